//! The set-up crate's error: what stops a resolution, an estimate, a sweep or a calibration.
//!
//! Every message names the request field it is about, spelled as the `oblique` command line
//! spells its flag (see [`crate::field`]); the text is the program's output and stays stable.

use crate::human;
use oblique_core::process::ProcessError;
use oblique_core::PhysicsError;
use oblique_window::write::WriteError;
use oblique_window::Diagnostics;

/// What can stop a set-up.
#[derive(Debug, thiserror::Error)]
pub enum SetupError {
    /// A name (machine, coil, set-up, pair, material) that is not in the library, or names a
    /// file of another kind.
    #[error("{message}")]
    Unknown {
        /// The request field holding the name.
        field: &'static str,
        /// The whole message (it starts with the field).
        message: String,
    },
    /// A value the set-up needs that neither the request nor a library file gives.
    #[error("{message}")]
    Missing {
        /// The request field that would give it.
        field: &'static str,
        /// The whole message (it names the field and where else the value could come from).
        message: String,
    },
    /// A value out of its range or inconsistent with another one.
    #[error("{message}")]
    Invalid {
        /// The request field to change.
        field: &'static str,
        /// The whole message (it names the field, often with a `hint:` line).
        message: String,
    },
    /// The process model refused the set-up; `hint` names the request fields to check.
    #[error("{error}{hint}")]
    Process {
        /// The model's error.
        error: ProcessError,
        /// A `\n  hint: ...` line, or empty.
        hint: &'static str,
    },
    /// The collision or the window could not be evaluated.
    #[error(transparent)]
    Physics(#[from] PhysicsError),
    /// A machine file about to be written does not validate.
    #[error("{}", library_message(.0))]
    Library(Diagnostics),
    /// A save refused for a reason the user can fix (the file changed on disk, its structure
    /// has no place for the entry, the file exists).
    #[error("{field}: {source}")]
    SaveRefused {
        /// The request field that asked for the save.
        field: &'static str,
        /// Why.
        source: WriteError,
    },
    /// A save that failed on the way to the disk.
    #[error("{field}: {source}")]
    SaveFailed {
        /// The request field that asked for the save.
        field: &'static str,
        /// Why.
        source: WriteError,
    },
    /// A folder that could not be created.
    #[error("cannot create {path}: {message}")]
    Folder {
        /// The folder.
        path: String,
        /// The system's message.
        message: String,
    },
}

fn library_message(d: &Diagnostics) -> String {
    format!("{d}\n{} problem(s) in the library files", d.0.len())
}

impl SetupError {
    /// True when the cause is the request (exit code 2 in the command line), false when the
    /// system failed (exit code 1).
    #[must_use]
    pub fn is_input(&self) -> bool {
        !matches!(
            self,
            SetupError::SaveFailed { .. } | SetupError::Folder { .. }
        )
    }

    /// The request field the error is about, when there is one.
    #[must_use]
    pub fn field(&self) -> Option<&'static str> {
        match self {
            SetupError::Unknown { field, .. }
            | SetupError::Missing { field, .. }
            | SetupError::Invalid { field, .. }
            | SetupError::SaveRefused { field, .. }
            | SetupError::SaveFailed { field, .. } => Some(field),
            _ => None,
        }
    }

    /// `field: message` for a name the library does not know.
    pub(crate) fn unknown(field: &'static str, message: impl std::fmt::Display) -> Self {
        SetupError::Unknown {
            field,
            message: format!("{field}: {message}"),
        }
    }

    /// A missing value, with the whole message.
    pub(crate) fn missing(field: &'static str, message: impl Into<String>) -> Self {
        SetupError::Missing {
            field,
            message: message.into(),
        }
    }

    /// `field: message` for a value out of range.
    pub(crate) fn invalid(field: &'static str, message: impl std::fmt::Display) -> Self {
        SetupError::Invalid {
            field,
            message: format!("{field}: {message}"),
        }
    }

    /// The same error with `prefix` put before its message (after the field name).
    #[must_use]
    pub(crate) fn with_prefix(self, prefix: &str) -> Self {
        match self {
            SetupError::Invalid { field, message } => {
                let rest = message
                    .strip_prefix(&format!("{field}: "))
                    .unwrap_or(&message)
                    .to_string();
                SetupError::Invalid {
                    field,
                    message: format!("{field}: {prefix}{rest}"),
                }
            }
            other => other,
        }
    }

    /// A charging voltage above the bank's rating, naming the field and the rating's origin.
    /// The voltage is shown with as many digits as it takes to differ from the rating (never
    /// "12 kV exceeds 12 kV").
    pub(crate) fn above_rating(field: &'static str, u: f64, rating: f64, from: &str) -> Self {
        SetupError::invalid(
            field,
            format!(
                "charging voltage {} exceeds the bank's rated voltage {} (from {from})\n  hint: stay at or below the rating; the rating protects people and the bank",
                distinct_kv(u, rating),
                human::kv(rating),
            ),
        )
    }
}

impl From<ProcessError> for SetupError {
    /// The model's error with a hint naming the request fields involved, where it can.
    fn from(error: ProcessError) -> Self {
        let hint = match &error {
            ProcessError::Geometry { what, .. } if what.contains("bore") => {
                "\n  hint: check --coil-bore (a radius) and --tube-outer-radius"
            }
            ProcessError::Geometry { what, .. } if what.contains("standoff") => {
                "\n  hint: check --standoff against the tube's inner radius"
            }
            ProcessError::Geometry { .. } => {
                "\n  hint: check --flyer-thickness and --tube-outer-radius"
            }
            ProcessError::VoltageAboveRating { .. } => {
                "\n  hint: lower --charge-voltage (or --energy) to the rating"
            }
            ProcessError::NotUnderdamped { .. } => {
                "\n  hint: check --bank-resistance and the inductances (--bank-inductance, --coil-inductance)"
            }
            ProcessError::Physics(PhysicsError::OutOfDomain { quantity, .. })
                if quantity.contains("detonation velocity") =>
            {
                "\n  hint: the flyer would outrun the detonation: check --gurney-velocity against --detonation-velocity, and --mass-ratio or --charge-ratio (a larger flyer-to-charge mass ratio slows the flyer)"
            }
            ProcessError::Physics(PhysicsError::OutOfDomain { quantity, .. })
                if quantity.contains("collision angle") =>
            {
                "\n  hint: the resulting collision angle is not below 90 deg: check --preset-angle and the flyer velocity (--gurney-velocity, --mass-ratio)"
            }
            _ => "",
        };
        SetupError::Process { error, hint }
    }
}

impl From<Diagnostics> for SetupError {
    fn from(d: Diagnostics) -> Self {
        SetupError::Library(d)
    }
}

/// Result alias of the set-up crate.
pub type SetupResult<T = ()> = Result<T, SetupError>;

/// `u` in kV with enough significant digits to tell it from `rating`.
fn distinct_kv(u: f64, rating: f64) -> String {
    let shown = human::kv(u);
    if shown != human::kv(rating) {
        return shown;
    }
    for digits in 4..=12 {
        let (a, b) = (
            format!("{:.*e}", digits, u / 1e3),
            format!("{:.*e}", digits, rating / 1e3),
        );
        if a != b {
            let s = format!("{:.*}", digits, u / 1e3);
            return format!("{} kV", s.trim_end_matches('0').trim_end_matches('.'));
        }
    }
    format!("{} kV", u / 1e3)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn only_system_failures_are_not_input() {
        assert!(SetupError::invalid("--standoff", "x").is_input());
        assert!(!SetupError::Folder {
            path: "p".into(),
            message: "m".into()
        }
        .is_input());
        assert_eq!(
            SetupError::unknown("--pair", "unknown pair 'x'").to_string(),
            "--pair: unknown pair 'x'"
        );
        assert_eq!(SetupError::invalid("--coil", "y").field(), Some("--coil"));
    }
}
