//! # oblique-confidence
//!
//! Confidence in a weldability verdict:
//!
//! - **Weld probability at a point** ([`weld_probability`]): the velocity and the angle are
//!   scattered as stated, and (with model uncertainty on) the criterion constants and the
//!   material properties are drawn from documented distributions ([`priors`]); the result is the
//!   share of samples inside the window, its standard error, every limit's failure probability
//!   and the inputs that dominate the doubt (first-order variance-based sensitivity indices).
//!   Samples come in fixed blocks, each with its own seeded stream, so the same seed gives the
//!   same numbers whatever the number of threads.
//! - **Over a plane** ([`probability_grid`]) for contour plots, with common random numbers.
//! - **Constants fitted to a pair's trials** ([`fit::fit`]): a maximum-likelihood fit of Deribas
//!   k, Wittman N and the HEL multiple with profile-likelihood intervals.
//! - **The next shots** ([`next_shot::next_shots`]): the trial points that would tell most about
//!   the fitted constants.
//!
//! Every result is a screening estimate, conditional on the model and the stated
//! distributions, never a guarantee (docs/theory.md §15 says what it does not cover).
#![deny(missing_docs)]
#![allow(clippy::neg_cmp_op_on_partial_ord)]

pub mod engine;
pub mod error;
pub mod fit;
pub mod grid;
pub mod inputs;
pub mod jetting;
pub mod next_shot;
pub mod present;
pub mod priors;
pub mod probability;
pub mod quantile;
pub mod scatter;

pub use error::{ConfidenceError, ConfidenceResult};
pub use grid::{probabilities, probability_grid, ProbabilityGrid};
pub use probability::{weld_probability, WeldProbability};
pub use scatter::{Point, PointVelocity, Sampling, Scatter, VelocitySpread};
