//! The streaming pipeline: one reader thread cuts the input into chunks of whole records, a pool
//! of workers parses and classifies each chunk into output text and compact per-point records,
//! and the calling thread takes the chunks back in file order (summary, writing). A fixed set of
//! slots circulates between the three, so memory stays bounded whatever the input size.
//!
//! `slot` is the unit of work, `layout` what the workers share (the output's columns,
//! precomputed text), `worker` one worker's loop over the records of a chunk, `columns` the
//! computed columns of a row.

mod columns;
mod layout;
mod slot;
mod worker;

pub use layout::Ctx;
pub use slot::Slot;

use crate::input::{cut_chunk, Source, MAX_RECORD};
use crate::options::Format;
use std::collections::BTreeMap;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc::{sync_channel, Receiver};
use std::sync::{Arc, Mutex};
use worker::Worker;

/// Input bytes per chunk.
pub const CHUNK: usize = 256 * 1024;
/// Line breaks per chunk at most (bounds the output of a chunk of very short rows); fewer when
/// the output's rows are wide (see [`Ctx::chunk_lines`]).
pub const CHUNK_LINES: usize = 8192;
/// About how many bytes of output one chunk may make: with the slots in flight this bounds the
/// memory of wide outputs (JSON lines, every column), whose rows are many times their input's.
pub const CHUNK_OUTPUT: usize = 2 << 20;

/// Page size for giving back the pages of a mapped input (a multiple of every page size the
/// release could meet is not needed: a range that is not page-aligned is rounded inwards by
/// the caller's `madvise`, and 4 KiB is the smallest page).
const PAGE: usize = 4096;

/// Where the records come from.
pub enum Input<'s> {
    /// A reader, copied chunk by chunk into the slots.
    Stream(Source<'s>),
    /// The whole input in memory (a memory-mapped file), the records from `start` on: the
    /// workers read the chunks where they lie, with no copy. `release` hears, in order, the
    /// page-aligned ranges that every chunk is done with, so that their pages can be given back
    /// and the resident memory stays bounded.
    Mapped {
        /// The input.
        bytes: &'s [u8],
        /// Where the records start (after the header).
        start: usize,
        /// Called with each range no longer needed.
        release: &'s (dyn Fn(std::ops::Range<usize>) + Sync),
    },
}

/// Run the pipeline: `input` positioned after the header; `first_line` is the line number of
/// the first record; `sink` sees each chunk in file order. Returns the reader's I/O error, if
/// any, after every chunk before it has been seen.
///
/// # Errors
/// Whatever `sink` returns, or the reader's error message.
pub fn run<E>(
    ctx: &Ctx<'_>,
    input: Input<'_>,
    first_line: u64,
    threads: usize,
    mut sink: impl FnMut(&mut Slot) -> Result<(), E>,
    io_error: impl Fn(String) -> E,
) -> Result<(), E> {
    let threads = threads.max(1);
    let slots = 2 * threads + 2;
    let quotes = ctx.in_format == Format::Csv;
    let lines = ctx.chunk_lines();
    let cancel = AtomicBool::new(false);
    let reader_error: Mutex<Option<String>> = Mutex::new(None);
    std::thread::scope(|s| {
        let (pool_tx, pool_rx) = sync_channel::<Slot>(slots);
        for _ in 0..slots {
            let _ = pool_tx.send(Slot::default());
        }
        let (work_tx, work_rx) = sync_channel::<Slot>(slots);
        let work_rx: Arc<Mutex<Receiver<Slot>>> = Arc::new(Mutex::new(work_rx));
        let (done_tx, done_rx) = sync_channel::<Slot>(slots);
        let cancel = &cancel;
        let reader_error = &reader_error;
        let (mapped, release) = match &input {
            Input::Mapped { bytes, release, .. } => (Some(*bytes), Some(*release)),
            Input::Stream(_) => (None, None),
        };
        s.spawn(move || {
            let mut seq = 0u64;
            let mut line = first_line;
            let mut input = input;
            while let Ok(mut slot) = pool_rx.recv() {
                if cancel.load(Ordering::Relaxed) {
                    break;
                }
                let next = match &mut input {
                    Input::Stream(source) => {
                        slot.range = None;
                        source.next_chunk(&mut slot.data, CHUNK, lines, quotes, MAX_RECORD)
                    }
                    Input::Mapped { bytes, start, .. } => next_mapped(bytes, start, lines, quotes)
                        .map(|c| {
                            c.map(|(at, info)| {
                                slot.range = Some((at, at + info.len));
                                info
                            })
                        }),
                };
                match next {
                    Ok(Some(info)) => {
                        slot.seq = seq;
                        slot.first_line = line;
                        slot.has_quote = info.has_quote;
                        line += info.lines;
                        seq += 1;
                        if work_tx.send(slot).is_err() {
                            break;
                        }
                    }
                    Ok(None) => break,
                    Err(e) => {
                        if let Ok(mut g) = reader_error.lock() {
                            *g = Some(e.to_string());
                        }
                        break;
                    }
                }
            }
        });
        for _ in 0..threads {
            let done_tx = done_tx.clone();
            let work_rx = Arc::clone(&work_rx);
            s.spawn(move || {
                let mut worker = Worker::new();
                loop {
                    let next = match work_rx.lock() {
                        Ok(rx) => rx.recv(),
                        Err(_) => break,
                    };
                    let Ok(mut slot) = next else { break };
                    if cancel.load(Ordering::Relaxed) {
                        break;
                    }
                    worker.process(ctx, &mut slot, mapped);
                    if done_tx.send(slot).is_err() {
                        break;
                    }
                }
            });
        }
        drop(done_tx);
        drop(work_rx);
        let mut pending: BTreeMap<u64, Slot> = BTreeMap::new();
        let mut next = 0u64;
        let mut released = 0usize;
        let mut result: Result<(), E> = Ok(());
        'outer: for slot in done_rx.iter() {
            pending.insert(slot.seq, slot);
            while let Some(mut slot) = pending.remove(&next) {
                if let Err(e) = sink(&mut slot) {
                    result = Err(e);
                    break 'outer;
                }
                // Every chunk up to this one is done: give back its whole pages.
                if let (Some(release), Some((_, end))) = (release, slot.range) {
                    let upto = end / PAGE * PAGE;
                    if upto > released {
                        release(released..upto);
                        released = upto;
                    }
                }
                slot.reset();
                let _ = pool_tx.send(slot);
                next += 1;
            }
        }
        cancel.store(true, Ordering::Relaxed);
        drop(pool_tx);
        drop(done_rx);
        drop(pending);
        result
    })?;
    if let Some(e) = reader_error.lock().ok().and_then(|mut g| g.take()) {
        return Err(io_error(e));
    }
    Ok(())
}

/// The next chunk of a mapped input from `*start` on (moved past it): where it starts and what
/// it holds; `None` at the end.
fn next_mapped(
    bytes: &[u8],
    start: &mut usize,
    lines: usize,
    quotes: bool,
) -> std::io::Result<Option<(usize, crate::input::ChunkInfo)>> {
    let at = *start;
    let mut want = CHUNK;
    loop {
        let end = at.saturating_add(want).min(bytes.len());
        let at_end = end == bytes.len();
        match cut_chunk(&bytes[at..end], at_end, lines, quotes) {
            Some(info) => {
                *start = at + info.len;
                return Ok(Some((at, info)));
            }
            None if at_end => return Ok(None),
            None if want > MAX_RECORD => {
                return Err(std::io::Error::new(
                    std::io::ErrorKind::InvalidData,
                    format!("a record is longer than {} MiB", MAX_RECORD >> 20),
                ))
            }
            None => want *= 2,
        }
    }
}
