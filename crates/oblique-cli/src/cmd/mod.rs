//! One module per subcommand.

pub mod check;
pub mod demo;
pub mod estimate;
pub mod map;
pub mod material;
pub mod pair;
pub mod plot;
pub mod report;

use crate::cli::{Cli, Command};
use crate::fail::{CmdResult, Fail};
use oblique_window::Library;
use std::path::PathBuf;

/// The user folders: `--library` flags first, then `OBLIQUE_LIBRARY`.
pub fn user_dirs(cli_dirs: &[PathBuf]) -> Vec<PathBuf> {
    let mut dirs = cli_dirs.to_vec();
    dirs.extend(oblique_window::library::env_dirs());
    dirs
}

/// Load the library, printing shadowing warnings on stderr.
pub fn load_library(cli_dirs: &[PathBuf]) -> CmdResult<Library> {
    let lib = Library::load(&user_dirs(cli_dirs))?;
    for w in &lib.warnings {
        eprintln!("warning: {w}");
    }
    Ok(lib)
}

/// Dispatch.
pub fn run(cli: Cli) -> CmdResult {
    match cli.command {
        Command::Check(args) => check::run(&cli.library, args),
        Command::Material(c) => material::run(&cli.library, c),
        Command::Pair(c) => pair::run(&cli.library, c),
        Command::Map(a) => map::run(&cli.library, a),
        Command::Plot(a) => plot::run(&cli.library, a),
        Command::Report(a) => report::run(&cli.library, a),
        Command::Demo(a) => demo::run(&cli.library, a),
        Command::Estimate(a) => estimate::run_estimate(&cli.library, a),
        Command::Sweep(a) => estimate::run_sweep(&cli.library, a),
        Command::Calibrate(a) => estimate::run_calibrate(&cli.library, a),
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

/// Refuse a missing value with a message naming the flag.
pub fn need<T>(v: Option<T>, flag: &str, form: &str) -> CmdResult<T> {
    v.ok_or_else(|| Fail::input(format!("{flag} is required here: expected {form}")))
}
