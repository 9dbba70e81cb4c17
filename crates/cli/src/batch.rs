//! The batch pipeline: a reader thread, a dispatching thread that hands each chunk to a
//! rayon pool as its own task, and a writer thread that puts finished chunks back in input
//! order.
//!
//! Chunks overlap: a worker that finishes its share of one chunk steals from the chunk still
//! in progress or starts the next, so no worker waits for the slowest record of a chunk
//! before there is more work (a barrier per chunk cost a tenth of the second core). Memory
//! stays bounded whatever the length of the input: at most [`IN_FLIGHT`] chunks are between
//! the dispatcher and the end of their writing, and the reader runs at most two chunks ahead
//! of the dispatcher.

use std::collections::BTreeMap;
use std::io::{self, Write};
use std::panic::{catch_unwind, AssertUnwindSafe};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc::{channel, sync_channel, Receiver, RecvTimeoutError};
use std::time::{Duration, Instant};

use rayon::prelude::*;

use crate::input::{Item, Source};
use crate::progress::Progress;

/// Records per chunk: large enough to keep every thread busy, small enough that a chunk
/// of results is a few megabytes at most.
pub const CHUNK: usize = 1024;

/// Chunks dispatched and not yet written. One being written, one being finished, one being
/// started and one waiting is enough to keep any number of workers busy, since all of
/// them work on the oldest chunks first; more would only hold more memory.
pub const IN_FLIGHT: usize = 4;

/// Records a worker estimates in one go before it looks for other work. Left to itself
/// rayon cuts a chunk into pieces of a quarter or so, and the last worker still in a big
/// piece holds back the end of the run; a few records cost nothing to hand out.
const PIECE: usize = 16;

/// The work done on each record.
pub trait Job: Sync {
    /// The result of one record.
    type Out: Send + Outcome;
    /// Processes one record (including records that failed while reading).
    fn run(&self, item: &Item) -> Self::Out;
    /// The result for a record whose processing panicked (a bug, not bad input).
    fn internal_error(&self, item: &Item, message: String) -> Self::Out;
    /// Processes a run of consecutive records, one result each in order onto `outs`. By
    /// default each record by itself, a panic becoming [`Job::internal_error`]; a job may
    /// instead put what its records share (one output text) in one of them.
    fn run_piece(&self, items: &[Item], outs: &mut Vec<Self::Out>)
    where
        Self: Sized,
    {
        outs.extend(items.iter().map(|item| run_one(self, item)));
    }
}

/// A record's result.
pub trait Outcome {
    /// Whether the record failed (its error is in the output).
    fn failed(&self) -> bool;
}

/// Writes results in one output format.
pub trait Sink<T> {
    /// Writes one record. The result is handed over, so a writer may keep it until
    /// [`Sink::flush`] and write several at once.
    fn write(&mut self, item: &Item, out: T) -> io::Result<()>;
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
    // Unbounded, but never holds more than IN_FLIGHT chunks: see `slots`.
    let (done_tx, done_rx) = channel::<Done<J::Out>>();
    // A counting semaphore: the dispatcher fills a slot before it hands a chunk to the pool
    // (and waits while all are full), the writer empties one when it has written a chunk.
    let (slots_tx, slots_rx) = sync_channel::<()>(IN_FLIGHT);
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
            let result = write_all_chunks(done_rx, slots_rx, sink, progress, &mut summary);
            // Dropping the receivers here (end of the closure) also wakes a dispatcher
            // waiting for a free slot.
            stopped.store(true, Ordering::SeqCst);
            (summary, result)
        });
        let mut read_error = None;
        // Runs on this thread, not in the pool: the tasks it spawns may borrow `job`, and
        // it returns only when every one of them has finished.
        pool.in_place_scope(|tasks| {
            let mut seq = 0u64;
            loop {
                let chunk = match read_rx.recv_timeout(Duration::from_millis(50)) {
                    Ok(chunk) => chunk,
                    Err(RecvTimeoutError::Timeout) if stopped.load(Ordering::SeqCst) => break,
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
                if slots_tx.send(()).is_err() {
                    // The writer has stopped.
                    break;
                }
                let done_tx = done_tx.clone();
                tasks.spawn(move |_| {
                    let outs: Vec<Vec<J::Out>> = items
                        .par_chunks(PIECE)
                        .with_max_len(1)
                        .map(|piece| {
                            let mut outs = Vec::with_capacity(piece.len());
                            job.run_piece(piece, &mut outs);
                            outs
                        })
                        .collect();
                    // A closed channel means the writer has stopped; the results are
                    // not wanted any more.
                    let _ = done_tx.send(Done { seq, items, outs });
                });
                seq += 1;
            }
        });
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

/// A finished chunk: its place in the input, its records and their results (piece by
/// piece, see [`PIECE`]).
struct Done<T> {
    seq: u64,
    items: Vec<Item>,
    outs: Vec<Vec<T>>,
}

fn write_all_chunks<T>(
    chunks: Receiver<Done<T>>,
    slots: Receiver<()>,
    sink: &mut (dyn Sink<T> + Send),
    progress: &Progress,
    summary: &mut Summary,
) -> anyhow::Result<()>
where
    T: Send + Outcome,
{
    // Chunks finish out of order (a later one can be cheaper); those ahead of the next to
    // write wait here. There are never more than IN_FLIGHT of them.
    let mut waiting = BTreeMap::new();
    let mut next = 0u64;
    for done in chunks {
        waiting.insert(done.seq, done);
        while let Some(Done { items, outs, .. }) = waiting.remove(&next) {
            for (item, out) in items.iter().zip(outs.into_iter().flatten()) {
                let failed = out.failed();
                if let Err(e) = sink.write(item, out) {
                    return output_error(e, summary);
                }
                summary.records += 1;
                summary.failed += failed as u64;
            }
            if let Err(e) = sink.flush() {
                return output_error(e, summary);
            }
            progress.update(summary.records, items.last().map(|i| i.end));
            next += 1;
            // The chunk is written: its slot is free for the dispatcher. The slot was
            // filled before the chunk was dispatched, so this never waits.
            let _ = slots.recv();
        }
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

/// Processes one record; a panic becomes [`Job::internal_error`].
pub fn run_one<J: Job>(job: &J, item: &Item) -> J::Out {
    // A panic is a bug in the library, never the input's fault; one such record must not
    // take down a batch of a million, so it becomes an error record.
    match catch_unwind(AssertUnwindSafe(|| job.run(item))) {
        Ok(out) => out,
        Err(payload) => job.internal_error(item, internal_error(&*payload)),
    }
}

/// The message of an error record for a panic (a bug in the library, not bad input).
pub fn internal_error(payload: &(dyn std::any::Any + Send)) -> String {
    let what = payload
        .downcast_ref::<&str>()
        .map(|s| s.to_string())
        .or_else(|| payload.downcast_ref::<String>().cloned())
        .unwrap_or_else(|| "unknown panic".to_string());
    format!("internal error (please report it): {what}")
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

#[cfg(test)]
mod tests {
    use super::*;
    use std::sync::atomic::AtomicU64;
    use std::sync::Arc;

    /// Records numbered from 1, `limit` of them (or without end), counting chunks read.
    struct Counting {
        next: u64,
        limit: Option<u64>,
        chunks: Arc<AtomicU64>,
    }

    impl Source for Counting {
        fn next_chunk(&mut self, n: usize) -> io::Result<Vec<Item>> {
            let mut items = Vec::new();
            while items.len() < n && self.limit.is_none_or(|l| self.next <= l) {
                items.push(Item {
                    number: self.next,
                    text: self.next.to_string(),
                    id: None,
                    problem: None,
                    row: None,
                    end: self.next,
                });
                self.next += 1;
            }
            self.chunks.fetch_add(1, Ordering::SeqCst);
            Ok(items)
        }
    }

    fn source(limit: Option<u64>) -> (Box<dyn Source>, Arc<AtomicU64>) {
        let chunks = Arc::new(AtomicU64::new(0));
        let source = Counting {
            next: 1,
            limit,
            chunks: chunks.clone(),
        };
        (Box::new(source), chunks)
    }

    /// Echoes the record number; the first record of the first chunk is slow, so that
    /// later chunks finish before it; numbers divisible by 7 fail; 1000 panics.
    struct Echo;

    impl Outcome for (u64, bool) {
        fn failed(&self) -> bool {
            self.1
        }
    }

    impl Job for Echo {
        type Out = (u64, bool);
        fn run(&self, item: &Item) -> (u64, bool) {
            if item.number == 1 {
                std::thread::sleep(Duration::from_millis(300));
            }
            if item.number == 1000 {
                panic!("record 1000");
            }
            (item.number, item.number % 7 == 0)
        }
        fn internal_error(&self, item: &Item, _message: String) -> (u64, bool) {
            (item.number, true)
        }
    }

    /// Keeps what it is given; stalls on the first record for `stall`, and reports a
    /// closed pipe after `close_after` records.
    #[derive(Default)]
    struct Collect {
        got: Vec<u64>,
        stall: Option<(Duration, Arc<AtomicU64>)>,
        chunks_read_during_stall: u64,
        close_after: Option<usize>,
        finished: bool,
    }

    impl Sink<(u64, bool)> for Collect {
        fn write(&mut self, _item: &Item, out: (u64, bool)) -> io::Result<()> {
            if Some(self.got.len()) == self.close_after {
                return Err(io::ErrorKind::BrokenPipe.into());
            }
            if let (Some((stall, chunks)), true) = (&self.stall, self.got.is_empty()) {
                std::thread::sleep(*stall);
                self.chunks_read_during_stall = chunks.load(Ordering::SeqCst);
            }
            self.got.push(out.0);
            Ok(())
        }
        fn finish(&mut self) -> io::Result<()> {
            self.finished = true;
            Ok(())
        }
        fn flush(&mut self) -> io::Result<()> {
            Ok(())
        }
    }

    fn quiet() -> Progress {
        Progress::new(true, None)
    }

    #[test]
    fn every_record_once_in_input_order_when_chunks_finish_out_of_order() {
        let n = 10 * CHUNK as u64 + 17;
        for threads in [1, 2, 3] {
            let (source, _) = source(Some(n));
            let mut sink = Collect::default();
            let summary = run(source, Some(threads), &Echo, &mut sink, &quiet()).unwrap();
            assert_eq!(sink.got, (1..=n).collect::<Vec<_>>(), "{threads} threads");
            assert!(sink.finished);
            assert_eq!(summary.records, n);
            // Multiples of 7, plus record 1000 whose panic became an error record.
            assert_eq!(summary.failed, n / 7 + 1);
            assert!(!summary.pipe_closed);
        }
    }

    #[test]
    fn reading_stays_a_few_chunks_ahead_of_a_stalled_writer() {
        let (source, chunks) = source(Some(100 * CHUNK as u64));
        let mut sink = Collect {
            stall: Some((Duration::from_millis(500), chunks.clone())),
            ..Collect::default()
        };
        run(source, Some(2), &Echo, &mut sink, &quiet()).unwrap();
        // In flight, two in the reader's channel, one held by the dispatcher waiting for a
        // slot, one held by the reader waiting for room in its channel.
        let bound = IN_FLIGHT as u64 + 4;
        assert!(
            sink.chunks_read_during_stall <= bound,
            "{} chunks read while the writer was stalled on the first record, at most {bound} expected",
            sink.chunks_read_during_stall
        );
        assert_eq!(sink.got.len(), 100 * CHUNK);
    }

    #[test]
    fn closed_output_ends_a_run_over_an_endless_input() {
        let (source, _) = source(None);
        let mut sink = Collect {
            close_after: Some(3 * CHUNK + 5),
            ..Collect::default()
        };
        let summary = run(source, Some(2), &Echo, &mut sink, &quiet()).unwrap();
        assert!(summary.pipe_closed);
        assert_eq!(summary.records, 3 * CHUNK as u64 + 5);
        assert_eq!(sink.got, (1..=3 * CHUNK as u64 + 5).collect::<Vec<_>>());
    }
}
