//! The batch pipeline: a reader thread, a compute thread driving a rayon pool over chunks,
//! and the writer on the calling thread. Channels between them hold at most two chunks
//! each, so memory stays bounded whatever the length of the input, and output keeps input
//! order because chunks are processed and written in sequence.

use std::io::{self, Write};
use std::panic::{catch_unwind, AssertUnwindSafe};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc::{sync_channel, Receiver, RecvTimeoutError};
use std::time::{Duration, Instant};

use rayon::prelude::*;

use crate::input::{Item, Source};
use crate::progress::Progress;

/// Records per chunk: large enough to keep every thread busy, small enough that a chunk
/// of results is a few megabytes at most.
pub const CHUNK: usize = 1024;

/// The work done on each record.
pub trait Job: Sync {
    /// The result of one record.
    type Out: Send + Outcome;
    /// Processes one record (including records that failed while reading).
    fn run(&self, item: &Item) -> Self::Out;
    /// The result for a record whose processing panicked (a bug, not bad input).
    fn internal_error(&self, item: &Item, message: String) -> Self::Out;
}

/// A record's result.
pub trait Outcome {
    /// Whether the record failed (its error is in the output).
    fn failed(&self) -> bool;
}

/// Writes results in one output format.
pub trait Sink<T> {
    /// Writes one record.
    fn write(&mut self, item: &Item, out: &T) -> io::Result<()>;
    /// Writes what comes after the last record, and flushes.
    fn finish(&mut self) -> io::Result<()>;
    /// Flushes at the end of a chunk so a reader downstream sees records as they come.
    fn flush(&mut self) -> io::Result<()>;
}

/// How a batch went.
#[derive(Debug, Default)]
pub struct Summary {
    /// Records written.
    pub records: u64,
    /// Of which failed.
    pub failed: u64,
    /// The downstream pipe was closed before the end.
    pub pipe_closed: bool,
    /// Seconds from start to end.
    pub seconds: f64,
}

/// Whether an output error means the reader went away (a closed pipe), which ends the run
/// quietly instead of failing it.
pub fn is_closed_pipe(e: &io::Error) -> bool {
    e.kind() == io::ErrorKind::BrokenPipe
}

/// Runs `job` over every record of `source`, writing results to `sink` in input order.
pub fn run<J: Job>(
    mut source: Box<dyn Source>,
    threads: Option<usize>,
    job: &J,
    sink: &mut (dyn Sink<J::Out> + Send),
    progress: &Progress,
) -> anyhow::Result<Summary> {
    let start = Instant::now();
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(threads.unwrap_or(0))
        .thread_name(|i| format!("pkarta-worker-{i}"))
        .build()?;
    let (read_tx, read_rx) = sync_channel::<io::Result<Vec<Item>>>(2);
    let (done_tx, done_rx) = sync_channel::<(Vec<Item>, Vec<J::Out>)>(2);
    let writer_stopped = AtomicBool::new(false);

    // The reader is detached, not scoped: when the output closes early it may be blocked on
    // a stream that never ends, and the run must not wait for it.
    std::thread::Builder::new()
        .name("pkarta-reader".into())
        .spawn(move || loop {
            let chunk = source.next_chunk(CHUNK);
            let last = matches!(&chunk, Ok(c) if c.is_empty()) || chunk.is_err();
            // A closed channel means the run is over (closed pipe or output error).
            if read_tx.send(chunk).is_err() || last {
                break;
            }
        })?;

    let (written, read_error) = std::thread::scope(|scope| {
        let stopped = &writer_stopped;
        let writer = scope.spawn(move || {
            let mut summary = Summary::default();
            let result = write_all_chunks(done_rx, sink, progress, &mut summary);
            stopped.store(true, Ordering::SeqCst);
            (summary, result)
        });
        let mut read_error = None;
        loop {
            let chunk = match read_rx.recv_timeout(Duration::from_millis(50)) {
                Ok(chunk) => chunk,
                Err(RecvTimeoutError::Timeout) if writer_stopped.load(Ordering::SeqCst) => break,
                Err(RecvTimeoutError::Timeout) => continue,
                Err(RecvTimeoutError::Disconnected) => break,
            };
            let items = match chunk {
                Ok(items) if items.is_empty() => break,
                Ok(items) => items,
                Err(e) => {
                    read_error = Some(e);
                    break;
                }
            };
            let outs: Vec<J::Out> =
                pool.install(|| items.par_iter().map(|item| run_one(job, item)).collect());
            if done_tx.send((items, outs)).is_err() {
                break;
            }
        }
        drop(done_tx);
        let written = writer.join().unwrap_or_else(|_| {
            (
                Summary::default(),
                Err(anyhow::anyhow!("the output thread stopped unexpectedly")),
            )
        });
        (written, read_error)
    });
    progress.finish();
    let (mut summary, write_result) = written;
    summary.seconds = start.elapsed().as_secs_f64();
    write_result?;
    if let Some(e) = read_error {
        return Err(anyhow::Error::new(e).context("cannot read the input"));
    }
    Ok(summary)
}

fn write_all_chunks<T>(
    chunks: Receiver<(Vec<Item>, Vec<T>)>,
    sink: &mut (dyn Sink<T> + Send),
    progress: &Progress,
    summary: &mut Summary,
) -> anyhow::Result<()>
where
    T: Send + Outcome,
{
    for (items, outs) in chunks {
        for (item, out) in items.iter().zip(&outs) {
            if let Err(e) = sink.write(item, out) {
                return output_error(e, summary);
            }
            summary.records += 1;
            summary.failed += out.failed() as u64;
        }
        if let Err(e) = sink.flush() {
            return output_error(e, summary);
        }
        progress.update(summary.records, items.last().map(|i| i.end));
    }
    sink.finish().or_else(|e| output_error(e, summary))
}

fn output_error(e: io::Error, summary: &mut Summary) -> anyhow::Result<()> {
    if is_closed_pipe(&e) {
        summary.pipe_closed = true;
        Ok(())
    } else {
        Err(anyhow::Error::new(e).context("cannot write the output"))
    }
}

fn run_one<J: Job>(job: &J, item: &Item) -> J::Out {
    // A panic is a bug in the library, never the input's fault; one such record must not
    // take down a batch of a million, so it becomes an error record.
    match catch_unwind(AssertUnwindSafe(|| job.run(item))) {
        Ok(out) => out,
        Err(payload) => {
            let what = payload
                .downcast_ref::<&str>()
                .map(|s| s.to_string())
                .or_else(|| payload.downcast_ref::<String>().cloned())
                .unwrap_or_else(|| "unknown panic".to_string());
            job.internal_error(item, format!("internal error (please report it): {what}"))
        }
    }
}

/// A buffered writer over standard output.
pub fn stdout() -> io::BufWriter<io::Stdout> {
    io::BufWriter::with_capacity(1 << 16, io::stdout())
}

/// Writes `bytes`, treating a closed pipe as the end of output rather than an error.
pub fn write_all_quiet(out: &mut dyn Write, bytes: &[u8]) -> anyhow::Result<()> {
    match out.write_all(bytes).and_then(|()| out.flush()) {
        Err(e) if !is_closed_pipe(&e) => {
            Err(anyhow::Error::new(e).context("cannot write the output"))
        }
        _ => Ok(()),
    }
}
