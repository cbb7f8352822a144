//! Helpers shared by the subcommands: the library folders, loading the libraries, today's date,
//! writing an output file the user asked for, and the exit code of a set-up error. Subcommand
//! modules import from here, never from each other.

use crate::fail::{CmdResult, Fail};
use oblique_setup::{Catalog, SetupError};
use oblique_window::machine::Machines;
use oblique_window::Library;
use std::path::{Path, PathBuf};

/// The user folders: `--library` flags first, then `OBLIQUE_LIBRARY`.
pub fn user_dirs(cli_dirs: &[PathBuf]) -> Vec<PathBuf> {
    let mut dirs = cli_dirs.to_vec();
    dirs.extend(oblique_window::library::env_dirs());
    dirs
}

/// Load the material library, printing shadowing warnings on stderr.
pub fn load_library(cli_dirs: &[PathBuf]) -> CmdResult<Library> {
    let lib = Library::load(&user_dirs(cli_dirs))?;
    for w in &lib.warnings {
        eprintln!("warning: {w}");
    }
    Ok(lib)
}

/// Load the machine files, printing their warnings on stderr.
pub fn load_machines(cli_dirs: &[PathBuf]) -> CmdResult<Machines> {
    let machines = Machines::load(&user_dirs(cli_dirs))?;
    for w in &machines.warnings {
        eprintln!("warning: {w}");
    }
    Ok(machines)
}

/// Both libraries (materials first), printing their warnings on stderr.
pub fn load_catalog(cli_dirs: &[PathBuf]) -> CmdResult<Catalog> {
    let library = load_library(cli_dirs)?;
    let machines = load_machines(cli_dirs)?;
    Ok(Catalog::new(library, machines))
}

/// Print warnings gathered for the person on stderr.
pub fn print_notes(notes: &[String]) {
    for n in notes {
        eprintln!("warning: {n}");
    }
}

/// Today's date as YYYY-MM-DD (UTC), from the system clock.
pub fn today() -> String {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_secs() as i64)
        .unwrap_or(0);
    let days = secs.div_euclid(86_400);
    // Civil-from-days (H. Hinnant's algorithm, public domain).
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let y = yoe + era * 400;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = if m <= 2 { y + 1 } else { y };
    format!("{y:04}-{m:02}-{d:02}")
}

/// Write a file the user asked for, atomically.
pub fn write_output(path: &Path, bytes: &[u8]) -> CmdResult {
    use oblique_window::write::WriteError;
    oblique_window::write::atomic_write(path, bytes, None).map_err(|e| match e {
        WriteError::Io { source, .. } => Fail::input(format!(
            "{}: cannot write: {source}\n  hint: check that the folder exists and is writable",
            path.display()
        )),
        other => Fail::other(format!("cannot write {}: {other}", path.display())),
    })
}

impl From<SetupError> for Fail {
    fn from(e: SetupError) -> Self {
        if e.is_input() {
            Fail::input(e.to_string())
        } else {
            Fail::other(e.to_string())
        }
    }
}
