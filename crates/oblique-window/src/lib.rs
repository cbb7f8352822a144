//! # oblique-window
//!
//! The only crate that knows oblique's file formats: the material library (`materials.ron`)
//! and pair window files (one per flyer/parent/thickness: criteria, user boundaries, trial
//! observations, provenance). It loads the built-in library embedded from `windows/` and user
//! folders, validates with `file:line:col` messages, classifies process points against a window,
//! reports agreement with the trials, and writes the user's files atomically.
// Negated comparisons such as `!(x > 0.0)` are deliberate: they reject NaN together with
// out-of-range values, which the suggested rewrite would let through.
#![allow(clippy::neg_cmp_op_on_partial_ord)]
#![deny(missing_docs)]

pub mod agreement;
pub mod boundary;
pub mod classify;
pub mod diag;
pub mod library;
pub mod machine;
pub mod materials;
pub mod pair;
pub mod present;
pub mod ronpath;
pub mod write;

pub use agreement::{agreement, Agreement};
pub use classify::{classify, Classification, LimitRef, Prediction};
pub use diag::{Diagnostic, Diagnostics};
pub use library::Library;
pub use materials::MaterialRecord;
pub use pair::{Fitted, FittedValue, Observation, ObservationEntry, Outcome, PairWindow};
