//! The command line, as clap types. Flag names are a contract with users' scripts.

use crate::cmd;
use crate::fail::CmdResult;
use clap::{CommandFactory, Parser, Subcommand};
use std::path::PathBuf;

const AFTER_HELP: &str = "Units are required on every quantity: 350m/s, 0.35km/s, 12deg, 12°, 0.21rad, 1.5mm, 200uF, 8kV.
Exit status: 0 the command ran (a verdict of OUTSIDE is still 0); 2 bad input (a flag, a file
line, a CSV row: the message names it); 1 anything else (a file that cannot be written, ...).
A closed output pipe (| head) is a normal end. '-' means standard input or output where a file
is read or written.
Results are screening estimates, not guarantees. Pulsed-power banks store lethal energy and
explosives kill: follow local codes and licensed practice before any shot.";

/// Screen impact-welding process points (flyer velocity, collision angle) against weldability windows.
#[derive(Debug, Parser)]
#[command(name = "oblique", version, about, after_help = AFTER_HELP, max_term_width = 100)]
pub struct Cli {
    /// Extra library folder (materials.ron, pair window files, machines/*.ron); repeatable, earlier wins.
    /// Folders in the OBLIQUE_LIBRARY environment variable (separated like PATH) come after.
    #[arg(long = "library", value_name = "DIR", global = true)]
    pub library: Vec<PathBuf>,

    #[command(subcommand)]
    pub command: Command,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Check one process point against the classical window criteria (or a pair window).
    Check(cmd::check::CheckArgs),
    /// Show the worked example of a check: every step from the inputs to the verdict, with the numbers.
    Explain(cmd::explain::ExplainArgs),
    /// Walk one control (the angle, or the impact velocity) with the other fixed: every derived quantity, the window's entry and exit.
    Trade(cmd::trade::TradeArgs),
    /// Find the point (or the set-up of a machine and coil family) that keeps the most room to every limit in your scatter.
    Aim(cmd::aim::AimArgs),
    /// List and show the material library.
    #[command(subcommand)]
    Material(cmd::material::MaterialCommand),
    /// Pair windows: trials, boundaries, agreement.
    #[command(subcommand)]
    Pair(cmd::pair::PairCommand),
    /// Plot a weldability window with trials, proposed points and process curves (SVG or PNG).
    Plot(cmd::plot::PlotArgs),
    /// Write the decision record (HTML or JSON) of a point or a process set-up, with the alternatives considered.
    Report(Box<cmd::report::ReportArgs>),
    /// Run the invented demo scenario end to end and write its plots and report.
    Demo(cmd::demo::DemoArgs),
    /// Estimate impact velocity from a capacitor bank and coil (or an explosive charge).
    Estimate(cmd::estimate::EstimateArgs),
    /// Sweep charging voltage (or energy) and standoff; check every setting against a pair window.
    Sweep(cmd::estimate::SweepArgs),
    /// Fit the efficiency factor of a machine and coil to one measured shot.
    Calibrate(cmd::estimate::CalibrateArgs),
    /// Classify every point of an interface export (CSV or JSON lines): the weld map.
    Map(cmd::map::MapArgs),
    /// Write a commented template of a machine file (bank, coil, bar coil, explosive set-up).
    New(cmd::new::NewArgs),
    /// Print a shell completion script (bash, zsh, fish, PowerShell).
    Completions(cmd::shell::CompletionsArgs),
    /// Write the man pages (one per command and subcommand), made from the same definitions as --help.
    Manpage(cmd::shell::ManpageArgs),
}

impl Cli {
    /// Run the chosen subcommand.
    pub fn run(self) -> CmdResult {
        let dirs = &self.library;
        match self.command {
            Command::Check(a) => cmd::check::run(dirs, a),
            Command::Explain(a) => cmd::explain::run(dirs, a),
            Command::Trade(a) => cmd::trade::run(dirs, a),
            Command::Aim(a) => cmd::aim::run(dirs, a),
            Command::Material(c) => cmd::material::run(dirs, c),
            Command::Pair(c) => cmd::pair::run(dirs, c),
            Command::Map(a) => cmd::map::run(dirs, a),
            Command::Plot(a) => cmd::plot::run(dirs, a),
            Command::Report(a) => cmd::report::run(dirs, *a),
            Command::Demo(a) => cmd::demo::run(dirs, a),
            Command::Estimate(a) => cmd::estimate::run_estimate(dirs, a),
            Command::Sweep(a) => cmd::estimate::run_sweep(dirs, a),
            Command::Calibrate(a) => cmd::estimate::run_calibrate(dirs, a),
            Command::New(a) => cmd::new::run(dirs, a),
            Command::Completions(a) => cmd::shell::run_completions(Cli::command(), a),
            Command::Manpage(a) => cmd::shell::run_manpage(Cli::command(), a),
        }
    }
}
