//! The crate's error.

use oblique_core::PhysicsError;

/// What can go wrong.
#[derive(Debug, thiserror::Error)]
pub enum ConfidenceError {
    /// A setting out of its documented range; `field` names it as the command line spells it.
    #[error("{field}: {message}")]
    Invalid {
        /// The flag (e.g. `--velocity-sd`).
        field: &'static str,
        /// What is wrong.
        message: String,
    },
    /// The pair has no observation to fit.
    #[error("pair '{pair}' has no observations: nothing to fit the constants to\n  hint: record trial shots first (`oblique pair observe {pair} ...` or `oblique pair import {pair} FILE.csv`)")]
    NoObservations {
        /// The pair's name.
        pair: String,
    },
    /// Every criterion that carries a fitted constant is switched off in the pair.
    #[error("pair '{pair}': {message}")]
    NothingToFit {
        /// The pair's name.
        pair: String,
        /// Why.
        message: String,
    },
    /// The physics could not be evaluated.
    #[error(transparent)]
    Physics(#[from] PhysicsError),
}

impl ConfidenceError {
    /// True for errors caused by the user's input (exit status 2).
    pub fn is_input(&self) -> bool {
        !matches!(
            self,
            ConfidenceError::Physics(PhysicsError::NoConvergence { .. })
        )
    }

    pub(crate) fn invalid(field: &'static str, message: impl Into<String>) -> Self {
        ConfidenceError::Invalid {
            field,
            message: message.into(),
        }
    }
}

/// Result alias.
pub type ConfidenceResult<T> = Result<T, ConfidenceError>;
