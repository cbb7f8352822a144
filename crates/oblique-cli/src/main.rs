//! `oblique`: screen impact-welding process points against weldability windows.
//!
//! `main` only parses the command line and dispatches; each subcommand is one module in `cmd/`
//! that turns validated flags into library calls and formats the result.

mod cli;
mod cmd;
mod fail;
mod output;
mod plot;
mod qarg;
mod report;

use clap::Parser;
use std::process::ExitCode;

fn main() -> ExitCode {
    let args = cli::Cli::parse();
    match cmd::run(args) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => e.report(),
    }
}
