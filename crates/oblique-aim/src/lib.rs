//! # oblique-aim
//!
//! Aiming and teaching, on top of the window, confidence and set-up crates:
//!
//! - [`trade`]: the velocity-angle trade-off along one control (the angle at a fixed impact
//!   velocity, or the velocity at a fixed angle): every derived quantity of every row as `check`
//!   computes it, the weld probability with a stated scatter, the window's entry and exit.
//! - [`measure`]: the room a point keeps to every limit, measured in the user's scatter.
//! - [`aim`]: the (velocity, angle) that keeps the most room, with its margins, a ranked list
//!   and the region keeping a given weld probability.
//! - [`setups`]: the set-ups of a machine and a coil family (coil dimensions, charge, standoff,
//!   chamfer) searched with the process model and ranked by the same measure, within the bank's
//!   rating.
//!
//! Nothing here parses flags, prints or draws. Every result is a screening estimate, never a
//! guarantee: pulsed-power banks store lethal energy, explosives and flying parts kill; follow
//! local codes and licensed practice.
#![deny(missing_docs)]
#![allow(clippy::neg_cmp_op_on_partial_ord)]

pub mod aim;
pub mod error;
pub mod measure;
pub mod setups;
pub mod trade;

pub use aim::{aim, Aim, AimRequest, Candidate};
pub use error::{AimError, AimResult};
pub use measure::{Room, Spread};
pub use trade::{trade, Control, Crossing, Row, Trade, TradeRequest};
