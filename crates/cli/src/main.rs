//! The `pkarta` command-line tool: argument parsing, input and output, formatting. The
//! chemistry is in the `pkarta` library.

// A general-purpose allocator with per-thread heaps: the batch allocates many small,
// short-lived objects per molecule on every worker thread.
#[global_allocator]
static ALLOCATOR: mimalloc::MiMalloc = mimalloc::MiMalloc;

mod batch;
mod curve;
mod debug;
mod explain;
mod flags;
mod fmt;
mod input;
mod inspect;
mod json;
mod library;
mod predict;
mod progress;

use std::io::Write;
use std::process::ExitCode;
use std::sync::atomic::{AtomicBool, Ordering};

use clap::Parser;

use crate::flags::{Cli, Command};

/// Every record was read and estimated.
const OK: u8 = 0;
/// Some records failed; their errors are in the output.
const SOME_FAILED: u8 = 1;
/// Usage or I/O error.
const ERROR: u8 = 2;

fn main() -> ExitCode {
    quiet_repeated_panics();
    let cli = Cli::parse();
    match run(cli) {
        Ok(false) => ExitCode::from(OK),
        Ok(true) => ExitCode::from(SOME_FAILED),
        Err(e) => {
            let _ = writeln!(std::io::stderr(), "pkarta: {e:#}");
            ExitCode::from(ERROR)
        }
    }
}

/// A panic while estimating one record becomes that record's error (see `batch`); the
/// first one is still reported in full on stderr for the bug report, later ones are not,
/// so a library bug that hits every record cannot flood stderr or slow a batch down with
/// a backtrace per record.
fn quiet_repeated_panics() {
    static SEEN: AtomicBool = AtomicBool::new(false);
    let default = std::panic::take_hook();
    std::panic::set_hook(Box::new(move |info| {
        if !SEEN.swap(true, Ordering::SeqCst) {
            default(info);
        }
    }));
}

/// Runs a command; `Ok(true)` when some records failed.
fn run(cli: Cli) -> anyhow::Result<bool> {
    match cli.command {
        Command::Predict(args) => predict::run(&args),
        Command::Inspect(args) => inspect::run(&args),
        Command::Explain(args) => explain::run(&args),
        Command::Debug { view } => debug::run(&view),
        Command::Curve(args) => curve::run(&args),
    }
}
