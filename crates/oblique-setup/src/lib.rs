//! # oblique-setup
//!
//! Process set-ups for impact welding screening: a capacitor bank file, a coil file and the
//! values a person gives are resolved into the input of a process model of
//! `oblique_core::process`, with the provenance of every value (given, bank or coil file, pair
//! window, material library, stored calibration, default). On top of that: one estimate and its
//! window check, a sweep over charging voltage x standoff ranked by velocity headroom, an
//! efficiency fitted to a measured shot, L and R from a ring-down record. [`present`] turns each
//! result into the tables and JSON that `oblique` prints.
//!
//! Requests hold SI values (`None`: not given); names of request fields are spelled as the
//! command line spells its flags ([`field`]), and messages and provenance texts quote them.
//! Nothing here parses flags or prints; files are read and written only through
//! `oblique_window`.
//!
//! Every number is a **screening estimate, not a guarantee**. Capacitor banks store lethal
//! energy, explosives and flying parts kill: follow local codes and licensed practice.
//!
//! ```
//! use oblique_core::units::{Length, Voltage};
//! use oblique_setup::{
//!     resolve_estimate, BankRequest, Catalog, Charge, EstimateRequest, MagneticRequest,
//!     TubeRequest,
//! };
//!
//! // The built-in bank and coil are INVENTED demo files.
//! let catalog = Catalog::builtin().expect("the built-in library loads");
//! let tube = TubeRequest {
//!     bank: BankRequest::machine("harbourside-bank-300uf"),
//!     coil: Some("harbourside-coil-42mm".into()),
//!     flyer: Some("aa6061-t6".into()),
//!     flyer_thickness: Some(Length::from_m(1e-3)),
//!     tube_outer_radius: Some(Length::from_m(20e-3)),
//!     ..TubeRequest::default()
//! };
//! let request = EstimateRequest::new(
//!     MagneticRequest::Tube(tube),
//!     Charge::Voltage(Voltage::from_v(8e3)),
//!     Length::from_m(2e-3),
//! );
//! let mut notes = Vec::new();
//! let setup = resolve_estimate(&catalog, &request, &mut notes).expect("a complete set-up");
//! // Where the bank's capacitance came from: the bank file and its stated source.
//! let from = &setup.inputs.get("capacitance_f").expect("recorded").from;
//! assert!(from.to_string().starts_with("harbourside-bank-300uf ("));
//! let report = setup.run().expect("the model runs");
//! let vp = report.estimate.impact_velocity().expect("an impact");
//! println!("impact velocity {:.0} m/s (screening estimate)", vp.si());
//! assert!(vp.si() > 100.0 && vp.si() < 1000.0);
//! ```
// Negated comparisons such as `!(x > 0.0)` are deliberate: they reject NaN together with
// out-of-range values, which the suggested rewrite would let through.
#![allow(clippy::neg_cmp_op_on_partial_ord)]
#![deny(missing_docs)]

pub mod calibrate;
pub mod decision;
pub mod error;
pub mod estimate;
pub mod explosive;
pub mod grid;
pub mod human;
pub mod inputs;
pub mod parts;
pub mod present;
pub mod request;
pub mod resolve;
pub mod sweep;
pub mod uncertainty;

pub use calibrate::{calibrate, CalibrationFit, CalibrationRequest, RingDown, RingDownRequest};
pub use decision::{
    decide, explosive_candidate, magnetic_candidate, point_candidate, Alternative, Candidate,
    ChoiceRule, Decision, FileUse, Produced, SweepFile, SweepSetting,
};
pub use error::{SetupError, SetupResult};
pub use estimate::{classify_impact, resolve_estimate, PulseReport, ResolvedSetup};
pub use explosive::{estimate_explosive, ExplosiveReport};
pub use grid::Grid;
pub use inputs::{Input, InputValue, Inputs, Provenance, Unit};
pub use parts::{resolve_parts, Plant, ResolvedParts};
pub use present::{ASSUMPTIONS_EXPLOSIVE, ASSUMPTIONS_SHEET, ASSUMPTIONS_TUBE};
pub use request::{
    field, BankRequest, Charge, EstimateRequest, ExplosiveRequest, Integration, MagneticRequest,
    SheetRequest, TubeRequest,
};
pub use resolve::{resolve_bank, Catalog, MagneticModel, ResolvedBank};
pub use sweep::{run_sweep, AngleGrid, ChargeGrid, Setting, SweepGrid, SweepRanking, SweepRequest};
