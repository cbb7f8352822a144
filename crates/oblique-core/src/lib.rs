//! # oblique-core
//!
//! The physics of impact welding, with no IO: typed quantities and the unit parser
//! ([`units`]), steady oblique-collision kinematics under an explicit velocity [`Convention`]
//! ([`kinematics`]), linear Hugoniots and impedance matching ([`hugoniot`]), the jetting test
//! from shock polars ([`jetting`]), and the weldability-window criteria with the evaluation of
//! one process point ([`criteria`]). SI inside; every relation cites its source.
//!
//! ```
//! use oblique_core::hugoniot::{impedance_match, Hugoniot};
//! use oblique_core::units::{parse_quantity, Angle, Density, QuantityKind, Velocity};
//! use oblique_core::{Collision, Convention};
//!
//! // Units are explicit at the edge; SI inside.
//! let vp = parse_quantity("350m/s", QuantityKind::Velocity).expect("a velocity");
//! let beta = Angle::from_degrees(12.0);
//! let c = Collision::from_impact(Convention::NormalToFlyer, Velocity::from_m_s(vp), beta)
//!     .expect("a valid oblique collision");
//! // Normal to the flyer: Vc = Vp / sin(beta).
//! assert!((c.collision_velocity.si() - 350.0 / 12f64.to_radians().sin()).abs() < 1e-9);
//!
//! // Impact pressure of Al 6061-T6 on Cu by impedance matching of linear Hugoniots
//! // (rho0, C0, s as in the built-in library: Steinberg 1996 via the Uintah transcription).
//! let al = Hugoniot::new(Density::from_kg_m3(2703.0), Velocity::from_m_s(5240.0), 1.40).unwrap();
//! let cu = Hugoniot::new(Density::from_kg_m3(8930.0), Velocity::from_m_s(3940.0), 1.489).unwrap();
//! let state = impedance_match(&al, &cu, Velocity::from_m_s(vp)).expect("a state");
//! assert!(state.pressure.gpa() > 2.0 && state.pressure.gpa() < 4.0);
//! ```
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
