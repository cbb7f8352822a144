//! The unit of work that circulates between the reader, the workers and the in-order
//! hand-back: a chunk of input and everything made from it.

use crate::format::TextBuf;
use crate::record::{Lite, Rejected};

/// Per-chunk counts, merged in order by the caller.
#[derive(Debug, Default, Clone)]
pub struct ChunkStats {
    /// Rows with data.
    pub rows_read: u64,
    /// Blank lines.
    pub blank: u64,
    /// Rejected rows.
    pub rejected: u64,
    /// Rows outside the span of a boundary.
    pub outside: u64,
    /// Welded rows outside the span of some boundary (welded by the model limits and the
    /// boundaries that do span them).
    pub welded_outside: u64,
    /// Rows solved directly for jetting.
    pub jetting_direct: u64,
    /// Rows whose collision is supersonic in at least one plate.
    pub supersonic: u64,
    /// Rows supersonic in one plate and subsonic in the other (the mixed jetting case).
    pub mixed: u64,
    /// Rows outside each bound of the validity domain (`DomainQuantity::ALL` order).
    pub domain_exits: [u64; 5],
    /// Pass-through cells whose bytes are not UTF-8 (JSON output replaces them).
    pub non_utf8_cells: u64,
    /// Smallest margin per limit among welded rows, with its row.
    pub welded_min: Vec<Option<(f64, u64)>>,
    /// Binding-limit counts of unwelded rows.
    pub unwelded_binding: Vec<[u64; 2]>,
}

/// A unit of work and its results; slots are recycled.
#[derive(Default)]
pub struct Slot {
    /// Chunk number.
    pub seq: u64,
    /// Line number of the first record.
    pub first_line: u64,
    /// Input bytes (read from a stream).
    pub data: Vec<u8>,
    /// Where the chunk lies in a mapped input (then `data` is unused).
    pub range: Option<(usize, usize)>,
    /// Whether `data` holds a double quote (else every record is one plain line).
    pub has_quote: bool,
    /// Output text.
    pub out: TextBuf,
    /// Side-file text (save mode).
    pub bad_out: Vec<u8>,
    /// Classified points.
    pub lites: Vec<Lite>,
    /// Rejected rows.
    pub bad: Vec<Rejected>,
    /// Counts.
    pub stats: ChunkStats,
    /// Stop mode: a bad row ended this chunk (it is the last of `bad`).
    pub stopped: bool,
}

impl Slot {
    /// Input bytes in the chunk.
    pub fn input_len(&self) -> usize {
        match self.range {
            Some((s, e)) => e - s,
            None => self.data.len(),
        }
    }

    /// Empty the slot for the next chunk (its buffers keep their capacity).
    pub(super) fn reset(&mut self) {
        self.data.clear();
        self.out.clear();
        self.bad_out.clear();
        self.lites.clear();
        self.bad.clear();
        self.stats = ChunkStats::default();
        self.stopped = false;
    }
}
