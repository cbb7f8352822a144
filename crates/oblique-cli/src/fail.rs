//! The binary's error: a message for the user and an exit code (2 for bad input, 1 otherwise).

use std::process::ExitCode;

/// A failure to show the user.
#[derive(Debug)]
pub struct Fail {
    /// The message, already formatted (may span lines, with `hint:` lines).
    pub message: String,
    /// Exit code.
    pub code: u8,
}

impl Fail {
    /// Bad input from the user (exit 2).
    pub fn input(message: impl Into<String>) -> Self {
        Self {
            message: message.into(),
            code: 2,
        }
    }

    /// Something else went wrong (exit 1).
    pub fn other(message: impl Into<String>) -> Self {
        Self {
            message: message.into(),
            code: 1,
        }
    }

    /// Print and return the exit code.
    pub fn report(self) -> ExitCode {
        if self.code == 0 {
            return ExitCode::SUCCESS;
        }
        if !self.message.is_empty() {
            errln!("error: {}", for_terminal(&self.message));
        }
        ExitCode::from(self.code)
    }
}

impl From<oblique_window::Diagnostics> for Fail {
    fn from(d: oblique_window::Diagnostics) -> Self {
        let n = d.0.len();
        Fail::input(format!("{d}\n{n} problem(s) in the library files"))
    }
}

impl From<oblique_core::PhysicsError> for Fail {
    fn from(e: oblique_core::PhysicsError) -> Self {
        Fail::input(e.to_string())
    }
}

/// A message for standard error: escape sequences shown, not acted on, and no line longer
/// than a screenful (an echoed 10 MB cell is cut, saying how much was left out).
pub fn for_terminal(message: &str) -> String {
    const MAX_LINE: usize = 600;
    let safe = oblique_window::present::terminal_safe(message);
    safe.lines()
        .map(|l| oblique_window::present::short(l, MAX_LINE))
        .collect::<Vec<_>>()
        .join("\n")
}

/// Result alias for commands.
pub type CmdResult<T = ()> = Result<T, Fail>;

impl From<oblique_render::RenderError> for Fail {
    fn from(e: oblique_render::RenderError) -> Self {
        if e.is_input() {
            Fail::input(e.to_string())
        } else {
            Fail::other(e.to_string())
        }
    }
}

impl From<oblique_confidence::ConfidenceError> for Fail {
    fn from(e: oblique_confidence::ConfidenceError) -> Self {
        if e.is_input() {
            Fail::input(e.to_string())
        } else {
            Fail::other(e.to_string())
        }
    }
}

impl From<oblique_aim::AimError> for Fail {
    fn from(e: oblique_aim::AimError) -> Self {
        if e.is_input() {
            Fail::input(e.to_string())
        } else {
            Fail::other(e.to_string())
        }
    }
}
