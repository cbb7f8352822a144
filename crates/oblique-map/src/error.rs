//! The map crate's error.

use oblique_core::PhysicsError;

/// Which output a write failed on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Output {
    /// The per-point map.
    Map,
    /// The rejected rows ([`BadRows::Save`](crate::BadRows::Save)).
    BadRows,
}

/// What can stop a weld map. The messages are the ones `oblique map` prints (its hints name
/// that command's flags).
#[derive(Debug, thiserror::Error)]
pub enum MapError {
    /// Bad input: the header, a bad row (with [`BadRows::Stop`](crate::BadRows::Stop)),
    /// positions out of order, a read error, no data row, options that cannot go together.
    #[error("{0}")]
    Input(String),
    /// Every data row was rejected: there is nothing to map (bad input as well). With
    /// [`BadRows::Save`](crate::BadRows::Save) the rejected rows have all been written, with
    /// their reasons, which is worth keeping.
    #[error("{0}")]
    NothingClassified(String),
    /// The window's materials or constants cannot be evaluated (bad input).
    #[error(transparent)]
    Physics(#[from] PhysicsError),
    /// Writing an output failed.
    #[error("cannot write the {}: {source}", match .output { Output::Map => "map", Output::BadRows => "rejected rows" })]
    Write {
        /// Which output.
        output: Output,
        /// The error of the writer.
        #[source]
        source: std::io::Error,
    },
    /// The API was used in a way that cannot work (a second run of the same input,
    /// [`BadRows::Save`](crate::BadRows::Save) without a writer for the rejected rows).
    #[error("{0}")]
    Misuse(String),
}

impl MapError {
    /// True when the cause is the input (the data, the window, the options) rather than the
    /// program or the outputs: `oblique map` exits with 2 then, with 1 otherwise.
    #[must_use]
    pub fn is_input(&self) -> bool {
        matches!(
            self,
            MapError::Input(_) | MapError::NothingClassified(_) | MapError::Physics(_)
        )
    }
}
