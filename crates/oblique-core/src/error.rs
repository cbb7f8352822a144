//! The core's error type: every physical-domain and numerical failure is a variant.

/// A physical input outside its domain, or a numerical method that did not succeed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PhysicsError {
    /// A quantity outside the range where the relation holds.
    #[error("{quantity} = {value} {unit} is outside its allowed range {allowed}")]
    OutOfDomain {
        /// Which quantity.
        quantity: &'static str,
        /// The value given, in `unit`.
        value: f64,
        /// The unit of `value`.
        unit: &'static str,
        /// The allowed range in words.
        allowed: &'static str,
    },
    /// A root finder whose bracket does not contain a sign change.
    #[error("no root bracketed for {what} in [{low}, {high}]")]
    NoBracket {
        /// What was being solved for.
        what: &'static str,
        /// Lower end of the bracket.
        low: f64,
        /// Upper end of the bracket.
        high: f64,
    },
    /// An iteration that stopped before reaching its tolerance.
    #[error("{what} did not converge in {iterations} iterations")]
    NoConvergence {
        /// What was being solved for.
        what: &'static str,
        /// Iterations done.
        iterations: usize,
    },
    /// A configuration value that makes no sense (negative constant, NaN...).
    #[error("invalid constant {name} = {value}: {reason}")]
    InvalidConstant {
        /// The constant's name.
        name: &'static str,
        /// Its value.
        value: f64,
        /// Why it is refused.
        reason: &'static str,
    },
}

/// Check that a value is finite and strictly positive.
pub(crate) fn positive(
    quantity: &'static str,
    value: f64,
    unit: &'static str,
) -> Result<f64, PhysicsError> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(PhysicsError::OutOfDomain {
            quantity,
            value,
            unit,
            allowed: "(0, +inf)",
        })
    }
}
