//! Errors of the aiming engines: bad input naming its flag (exit 2), or a failure of the
//! physics, the sampling or the process model underneath.

use thiserror::Error;

/// What went wrong.
#[derive(Debug, Error)]
pub enum AimError {
    /// A setting out of range, naming the flag it came from.
    #[error("{field}: {message}")]
    Invalid {
        /// The flag, as the command line spells it.
        field: &'static str,
        /// What is wrong and what is accepted.
        message: String,
    },
    /// The physics refused a point or a window.
    #[error(transparent)]
    Physics(#[from] oblique_core::PhysicsError),
    /// The weld probability could not be computed.
    #[error(transparent)]
    Confidence(#[from] oblique_confidence::ConfidenceError),
    /// A process set-up could not be resolved or run.
    #[error(transparent)]
    Setup(#[from] oblique_setup::SetupError),
}

impl AimError {
    /// An input error naming `field`.
    pub fn invalid(field: &'static str, message: impl Into<String>) -> Self {
        AimError::Invalid {
            field,
            message: message.into(),
        }
    }

    /// True for bad input (exit 2), false for anything else (exit 1).
    #[must_use]
    pub fn is_input(&self) -> bool {
        match self {
            AimError::Invalid { .. } => true,
            AimError::Physics(e) => !matches!(e, oblique_core::PhysicsError::NoConvergence { .. }),
            AimError::Confidence(e) => e.is_input(),
            AimError::Setup(e) => e.is_input(),
        }
    }
}

/// Result alias.
pub type AimResult<T = ()> = Result<T, AimError>;
