//! The render crate's error.

/// What can stop a plot or a report.
#[derive(Debug, thiserror::Error)]
pub enum RenderError {
    /// The window or a point is outside what the physics accepts (bad input: exit 2 in the CLI).
    #[error(transparent)]
    Physics(#[from] oblique_core::PhysicsError),
    /// The drawing library or the image encoder failed (exit 1 in the CLI).
    #[error("plot: {0}")]
    Draw(String),
    /// The weld probability could not be computed (a setting out of range is bad input).
    #[error(transparent)]
    Confidence(#[from] oblique_confidence::ConfidenceError),
}

impl RenderError {
    /// True when the cause is the user's input rather than the program.
    #[must_use]
    pub fn is_input(&self) -> bool {
        match self {
            RenderError::Physics(_) => true,
            RenderError::Confidence(e) => e.is_input(),
            RenderError::Draw(_) => false,
        }
    }
}

/// Result alias of the render crate.
pub type RenderResult<T = ()> = Result<T, RenderError>;
