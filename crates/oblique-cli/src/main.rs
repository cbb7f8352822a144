//! `oblique`: screen impact-welding process points against weldability windows.
//!
//! `main` only parses the command line and dispatches; each subcommand is one module in `cmd/`
//! that turns validated flags into library calls and formats the result.

// Negated comparisons such as `!(x > 0.0)` are deliberate: they reject NaN together with
// out-of-range values, which the suggested rewrite would let through.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

/// `eprintln!` that never panics: when standard error is a pipe that has closed (`2>&1 | head`),
/// the line is lost, not the exit code (std's `eprintln!` panics, exit 101).
macro_rules! errln {
    ($($arg:tt)*) => {{
        use std::io::Write as _;
        let _ = writeln!(std::io::stderr().lock(), $($arg)*);
    }};
}

/// `eprint!` that never panics (see `errln!`).
macro_rules! err_text {
    ($($arg:tt)*) => {{
        use std::io::Write as _;
        let _ = write!(std::io::stderr().lock(), $($arg)*);
    }};
}

mod args;
mod cli;
mod cmd;
mod common;
mod fail;
mod output;
mod qarg;

use clap::Parser;
use std::process::ExitCode;

fn main() -> ExitCode {
    let argv: Vec<std::ffi::OsString> = std::env::args_os().collect();
    if let Some(hint) = split_quantity(&argv) {
        return fail::Fail::input(hint).report();
    }
    let args = cli::Cli::parse_from(argv);
    // Ctrl-C or SIGTERM: the final files are never half-written (every write goes through a
    // temporary file renamed into place); remove the temporary files of unfinished writes
    // too. A handler that cannot be installed only means they stay behind, as after a kill.
    let _ = ctrlc::set_handler(|| {
        let removed = oblique_window::files::remove_temporaries();
        let what = match removed {
            0 => String::new(),
            1 => "; removed the temporary file of an unfinished write".to_string(),
            n => format!("; removed the temporary files of {n} unfinished writes"),
        };
        errln!("interrupted: nothing was left half-written{what}");
        std::process::exit(130);
    });
    match args.run() {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => e.report(),
    }
}

/// A value the shell split at its space (`--charge-voltage 12 kV` arrives as `12` and `kV`):
/// the message that says how to write it, naming the flag.
fn split_quantity(argv: &[std::ffi::OsString]) -> Option<String> {
    let words: Vec<&str> = argv.iter().map(|a| a.to_str().unwrap_or("")).collect();
    for i in 2..words.len() {
        let (flag, number, unit) = (words[i - 2], words[i - 1], words[i]);
        let numeric = number
            .rsplit("..")
            .next()
            .is_some_and(|n| n.parse::<f64>().is_ok());
        if flag.starts_with("--") && numeric && oblique_core::units::is_unit_token(unit) {
            return Some(format!(
                "{flag}: write {number}{unit} without a space (the shell passed '{number}' and '{unit}' as two arguments), or quote it: {flag} '{number} {unit}'"
            ));
        }
    }
    None
}
