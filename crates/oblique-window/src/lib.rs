//! # oblique-window
//!
//! The only crate that knows oblique's file formats: the material library (`materials.ron`)
//! and pair window files (one per flyer/parent/thickness: criteria, user boundaries, trial
//! observations, provenance). It loads the built-in library embedded from `windows/` and user
//! folders, validates with `file:line:col` messages, classifies process points against a window,
//! reports agreement with the trials, and writes the user's files atomically.
//!
//! ```
//! use oblique_core::units::{Angle, Velocity};
//! use oblique_core::Collision;
//! use oblique_window::{agreement, classify, Library};
//!
//! let lib = Library::load(&[]).expect("the built-in library loads");
//! let window = lib.pair("demo-al6061-on-cu").expect("the demo pair (invented data)");
//! let setup = window.setup().expect("valid materials");
//! let point = Collision::from_impact(
//!     window.convention,
//!     Velocity::from_m_s(450.0),
//!     Angle::from_degrees(10.0),
//! )
//! .expect("a valid collision");
//! let c = classify(window, &setup, &point).expect("the point classifies");
//! assert!(c.inside);
//! // How well the window's limits agree with the pair's own trials.
//! let a = agreement(window).expect("the trials classify");
//! assert_eq!(a.observations, window.observations.len());
//! ```
// Negated comparisons such as `!(x > 0.0)` are deliberate: they reject NaN together with
// out-of-range values, which the suggested rewrite would let through.
#![allow(clippy::neg_cmp_op_on_partial_ord)]
#![deny(missing_docs)]

pub mod advice;
pub mod agreement;
pub mod boundary;
pub mod classify;
pub mod diag;
pub mod explain;
pub mod files;
pub mod library;
pub mod machine;
pub mod margin;
pub mod materials;
pub mod pair;
pub mod present;
pub mod references;
pub mod ronpath;
pub mod text;
pub mod trials;
pub mod write;

pub use agreement::{agreement, Agreement};
pub use classify::{classify, Classification, LimitRef, Prediction};
pub use diag::{Diagnostic, Diagnostics};
pub use library::Library;
pub use materials::MaterialRecord;
pub use pair::{Fitted, FittedValue, Observation, ObservationEntry, Outcome, PairWindow};
