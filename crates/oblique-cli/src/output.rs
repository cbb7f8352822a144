//! Standard output writes that treat a closed pipe as a normal end. The shapes and text of
//! results are in `oblique_window::present`.

use crate::fail::{CmdResult, Fail};
pub use oblique_window::present::*;
use serde_json::Value;
use std::io::Write;

/// Write text to stdout; a closed pipe (`| head`) ends quietly.
pub fn emit(text: &str) -> CmdResult {
    // User text (sources, notes, labels) may hold escape sequences: show them, never act.
    let text = terminal_safe(text);
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|()| out.flush()) {
        Ok(()) => Ok(()),
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Err(Fail {
            message: String::new(),
            code: 0,
        }),
        Err(e) => Err(Fail::other(format!("cannot write to standard output: {e}"))),
    }
}

/// Pretty JSON with a trailing newline.
pub fn emit_json(value: &Value) -> CmdResult {
    let text = serde_json::to_string_pretty(value).map_err(|e| Fail::other(e.to_string()))?;
    emit(&(text + "\n"))
}
