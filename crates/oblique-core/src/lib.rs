//! # oblique-core
//!
//! The physics of impact welding, with no IO: typed quantities and the unit parser
//! ([`units`]), steady oblique-collision kinematics under an explicit velocity [`Convention`]
//! ([`kinematics`]), linear Hugoniots and impedance matching ([`hugoniot`]), the jetting test
//! from shock polars ([`jetting`]), and the weldability-window criteria with the evaluation of
//! one process point ([`criteria`]). SI inside; every relation cites its source.
// Negated comparisons such as `!(x > 0.0)` are deliberate: they reject NaN together with
// out-of-range values, which the suggested rewrite would let through.
#![allow(clippy::neg_cmp_op_on_partial_ord)]
#![deny(missing_docs)]

pub mod criteria;
pub mod domain;
pub mod error;
pub mod hugoniot;
pub mod jetting;
pub mod jetting_table;
pub mod kinematics;
pub mod material;
pub mod process;
pub mod units;

pub use criteria::{
    evaluate, evaluate_with_jetting, CriteriaConfig, CriterionId, CriterionResult, Governing,
    LimitKind, PairSetup, PointEvaluation, WittmanForm,
};
pub use domain::{DomainExit, DomainQuantity, ValidityDomain};
pub use error::PhysicsError;
pub use jetting::MixedRule;
pub use kinematics::{Collision, Convention};
pub use material::Material;
