//! # oblique-map
//!
//! The weld map: classify every point of an interface export (a simulation's or a
//! measurement's position, velocity and collision angle along the joint) against a pair
//! window, streaming, in bounded memory and in parallel. Out come the map (one CSV or
//! JSON-lines row per input row: the input as written, the verdict, the binding limit and its
//! margin, every failing limit, Vc, Vf, the impact pressure) and a [`Summary`] along the
//! interface (length-weighted welded fraction, segments, unbonded ends, the smallest margins),
//! with its text and JSON renderings.
//!
//! Nothing here parses flags or opens files: the input is any [`std::io::Read`] (or bytes
//! already in memory, such as a memory-mapped file: [`WeldMap::open_in_memory`]), the outputs
//! any [`std::io::Write`]. The output's columns are a [`ColumnSelection`]. The layout is described in `docs/weld-map.md`. A verdict is a
//! screening estimate from published relations and the window's trials, never a guarantee of a
//! weld: pulsed power, stored energy, explosives and flying parts are dangerous; follow local
//! codes and licensed practice.
//!
//! ```
//! use oblique_map::{classify_stream, MapOptions};
//! use oblique_window::Library;
//!
//! let lib = Library::load(&[]).expect("the built-in library loads");
//! let window = lib.pair("demo-al6061-on-cu").expect("the demo pair (invented data)");
//! let csv = "position[mm],velocity[m/s],angle[deg]\n0.0,250,12\n0.5,450,10\n1.0,460,11\n";
//! let mut map = Vec::new();
//! let summary = classify_stream(window, csv.as_bytes(), &mut map, &MapOptions::default())
//!     .expect("three good rows");
//! // welded, not welded, melted, head-on, outside the validity domain
//! assert_eq!(summary.counts, [2, 1, 0, 0, 0]);
//! assert!(String::from_utf8(map).unwrap().starts_with("row,position[mm],"));
//! print!("{}", summary.to_text()); // ends with the caution line
//! ```
//!
//! Modules, from the bottom up, each importing only from those before it: `format` (fast
//! number text, escaping), `record` (what a worker hands back per row), `error` ([`MapError`]),
//! `classifier` ([`Classifier`], the per-point classification, the same verdicts and margins
//! as `oblique_window::classify`), `options` ([`MapOptions`]), `input` (header, record splitting,
//! numbers, the chunking source), `summary` ([`Summary`] and its renderings), `pipeline` (reader,
//! workers, the in-order hand-back), `engine` ([`WeldMap`], [`classify_stream`]).
// Negated comparisons such as `!(x > 0.0)` are deliberate: they reject NaN together with
// out-of-range values, which the suggested rewrite would let through.
#![allow(clippy::neg_cmp_op_on_partial_ord)]
#![deny(missing_docs)]

mod classifier;
mod engine;
mod error;
mod format;
mod input;
mod options;
mod pipeline;
mod record;
mod summary;

pub use classifier::{Classifier, JettingMode, LimitInfo, MarginUnit, Point, VelocityKind};
pub use engine::{classify_stream, InMemory, WeldMap};
pub use error::{MapError, Output};
pub use input::{Column, Header};
pub use options::{
    BadRows, ColumnNames, ColumnSelection, ConstantNote, Format, MapOptions, COLUMN_NAMES,
};
pub use record::Rejected;
pub use summary::{
    Histogram, LimitStat, Run, RunInfo, Sample, StripAcc, Summary, EXAMPLE_CAP, GAP_CAP, MARK_CAP,
    N_VERDICTS, SAMPLE_CAP, SEGMENT_CAP,
};
