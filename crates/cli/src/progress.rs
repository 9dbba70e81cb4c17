//! Progress on stderr: a bar while a batch runs and a summary line at the end, only when
//! stderr is a terminal (a log file or a pipe gets neither) and `--quiet` is not given.
//! The bar is also left out when stdout is the same terminal.

use std::io::{IsTerminal, Write};
use std::time::Duration;

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use crate::batch::Summary;

/// The progress display of one batch.
pub struct Progress {
    bar: Option<ProgressBar>,
    by_bytes: bool,
}

impl Progress {
    /// A bar over `len` input bytes when the size is known, a spinner with a record count
    /// otherwise; nothing when stderr is not a terminal or `quiet`.
    pub fn new(quiet: bool, len: Option<u64>) -> Progress {
        // A bar redrawn on a terminal that also shows the output would garble it; the output
        // scrolling by is progress enough there.
        if quiet || !std::io::stderr().is_terminal() || std::io::stdout().is_terminal() {
            return Progress {
                bar: None,
                by_bytes: false,
            };
        }
        let target = ProgressDrawTarget::stderr_with_hz(4);
        let bar = match len {
            Some(len) => {
                let bar = ProgressBar::with_draw_target(Some(len), target);
                let style =
                    ProgressStyle::with_template("{bar:24} {percent:>3}%  {msg}  ETA {eta}")
                        .unwrap_or_else(|_| ProgressStyle::default_bar());
                bar.set_style(style);
                bar
            }
            None => {
                let bar = ProgressBar::with_draw_target(None, target);
                let style = ProgressStyle::with_template("{spinner} {msg}  {elapsed_precise}")
                    .unwrap_or_else(|_| ProgressStyle::default_spinner());
                bar.set_style(style);
                bar.enable_steady_tick(Duration::from_millis(250));
                bar
            }
        };
        Progress {
            bar: Some(bar),
            by_bytes: len.is_some(),
        }
    }

    /// Records written so far, and input bytes consumed by them.
    pub fn update(&self, records: u64, bytes: Option<u64>) {
        let Some(bar) = &self.bar else { return };
        let seconds = bar.elapsed().as_secs_f64().max(1e-9);
        bar.set_message(format!(
            "{records} records, {:.0}/s",
            records as f64 / seconds
        ));
        if self.by_bytes {
            if let Some(bytes) = bytes {
                bar.set_position(bytes);
            }
        }
    }

    /// Removes the bar.
    pub fn finish(&self) {
        if let Some(bar) = &self.bar {
            bar.finish_and_clear();
        }
    }
}

/// Prints the one-line summary of a batch on stderr, unless `quiet` or stderr is not a
/// terminal.
pub fn summary(quiet: bool, verb: &str, summary: &Summary) {
    if quiet || !std::io::stderr().is_terminal() {
        return;
    }
    let _ = writeln!(
        std::io::stderr(),
        "pkarta: {} records, {} {verb}, {} failed, {:.2} s{}",
        summary.records,
        summary.records - summary.failed,
        summary.failed,
        summary.seconds,
        if summary.pipe_closed {
            " (output closed early)"
        } else {
            ""
        }
    );
}
