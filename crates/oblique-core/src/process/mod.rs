//! Process estimates: how a set-up (capacitor bank and coil, or explosive charge) produces the
//! impact velocity.
//!
//! - [`circuit`]: the capacitor bank, the closed-form series RLC discharge and the
//!   identification of L and R from a ring-down record.
//! - [`magnetic`]: lumped, time-integrated models of magnetic pulse welding (tube compression in
//!   a single-turn coil or field-shaper bore; sheet over a flat one-turn bar coil), with energy
//!   bookkeeping and warnings.
//! - [`sweep`](mod@sweep): the magnetic models over a grid of charging voltages and standoffs, on threads.
//! - [`calibrate`](mod@calibrate): fitting one efficiency factor to one measured shot (and the Gurney velocity
//!   of an explosive to one measured shot).
//! - [`gurney`]: explosive welding, Gurney open-faced sandwich, feeding the collision kinematics.
//!
//! Everything here is a **screening estimate, not a guarantee**: the models are lumped and
//! one-dimensional, their inputs are uncertain, and the processes they describe involve lethal
//! voltages, large stored energies, flying parts and explosives. Equations, sources and limits
//! are in `docs/process-models.md`.
//!
//! None of these models computes the collision angle at impact: it comes from the user's
//! geometry (taper, preset angle) or, for explosive set-ups, from the kinematics in
//! [`crate::kinematics`].

pub mod calibrate;
pub mod circuit;
pub mod gurney;
pub mod magnetic;
pub mod sweep;

pub use calibrate::{calibrate_efficiency, EfficiencyFit};
pub use circuit::{identify_ring_down, CapacitorBank, Damping, RingDownFit, RlcCircuit};
pub use gurney::{
    calibrate_gurney_velocity, explosive_estimate, gurney_factor, gurney_open_sandwich,
    ExplosiveEstimate, ExplosiveSetup, MassRatio,
};
pub use magnetic::{
    estimate, BarCoil, CompressionCoil, EnergyBalance, ImpactOutcome, IntegrationOptions,
    NoImpactReason, ProcessWarning, PulseEstimate, PulseSample, PulseSetup, Sheet, SheetSetup,
    Tube, TubeSetup, Workpiece, DEFAULT_EFFICIENCY,
};
pub use sweep::{sweep, velocity_against_distance, SweepPoint, SweepResult};

use crate::error::PhysicsError;
use crate::units::{Resistance, Time, Voltage};

/// Magnetic constant mu0 in N/A^2: 1.25663706212e-6 (CODATA 2018 recommended value, from
/// memory; it differs from the pre-2019 exact 4 pi 1e-7 by about 5e-10 relative, far below
/// anything these models resolve).
pub const MU0: f64 = 1.256_637_062_12e-6;

/// Why a process estimate could not be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ProcessError {
    /// A physical input outside its domain (from the shared checks).
    #[error(transparent)]
    Physics(#[from] PhysicsError),
    /// The charging voltage exceeds the bank's rated voltage.
    #[error("charging voltage {voltage} exceeds the bank's rated voltage {rating}")]
    VoltageAboveRating {
        /// Requested charging voltage.
        voltage: Voltage,
        /// The bank's rated maximum voltage.
        rating: Voltage,
    },
    /// A geometric inconsistency between parts of a set-up.
    #[error("inconsistent geometry: {what} ({detail})")]
    Geometry {
        /// Which rule is broken, in words.
        what: &'static str,
        /// The numbers involved, formatted with their units.
        detail: String,
    },
    /// The coupled magnetic models need an oscillating (underdamped) circuit.
    #[error(
        "circuit is not underdamped: R = {resistance} >= 2 sqrt(L/C) = {critical}; \
         the magnetic pulse models need a ringing discharge"
    )]
    NotUnderdamped {
        /// Circuit resistance.
        resistance: Resistance,
        /// Critical resistance 2 sqrt(L/C).
        critical: Resistance,
    },
    /// A root finder whose bracket does not contain a sign change.
    #[error(
        "no root bracketed for {what} in [{low}, {high}]: the residual is {f_low} at the low end \
         and {f_high} at the high end"
    )]
    NoBracket {
        /// What was being solved for.
        what: &'static str,
        /// Lower end of the bracket (of the dimensionless unknown, e.g. eta).
        low: f64,
        /// Upper end of the bracket.
        high: f64,
        /// Residual at the lower end: model minus measurement, in the SI unit of the measured
        /// quantity (m/s for a measured impact velocity).
        f_low: f64,
        /// Residual at the upper end.
        f_high: f64,
    },
    /// An iteration that stopped before reaching its tolerance.
    #[error("{what} did not converge in {iterations} iterations")]
    NoConvergence {
        /// What was being solved for.
        what: &'static str,
        /// Iterations done.
        iterations: usize,
    },
    /// The time integration produced a non-finite number (an input far outside the range the
    /// models are meant for).
    #[error("the time integration produced a non-finite {what} at t = {time}")]
    NonFinite {
        /// Which state variable.
        what: &'static str,
        /// Time at which it happened.
        time: Time,
    },
}

/// Finite and strictly positive, else [`PhysicsError::OutOfDomain`].
pub(crate) fn check_positive(
    quantity: &'static str,
    value: f64,
    unit: &'static str,
) -> Result<f64, ProcessError> {
    Ok(crate::error::positive(quantity, value, unit)?)
}

/// Finite and not negative, else [`PhysicsError::OutOfDomain`].
pub(crate) fn check_non_negative(
    quantity: &'static str,
    value: f64,
    unit: &'static str,
) -> Result<f64, ProcessError> {
    if value.is_finite() && value >= 0.0 {
        Ok(value)
    } else {
        Err(PhysicsError::OutOfDomain {
            quantity,
            value,
            unit,
            allowed: "[0, +inf)",
        }
        .into())
    }
}
