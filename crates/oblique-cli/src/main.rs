//! `oblique`: screen impact-welding process points against weldability windows.
//!
//! `main` only parses the command line and dispatches; each subcommand is one module in `cmd/`
//! that turns validated flags into library calls and formats the result.

// Negated comparisons such as `!(x > 0.0)` are deliberate: they reject NaN together with
// out-of-range values, which the suggested rewrite would let through.
#![allow(clippy::neg_cmp_op_on_partial_ord)]
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
    let args = cli::Cli::parse();
    match args.run() {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => e.report(),
    }
}
