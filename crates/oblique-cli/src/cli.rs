//! The command line, as clap types. Flag names are a contract with users' scripts.

use crate::qarg;
use clap::{Args, Parser, Subcommand, ValueEnum};
use std::path::PathBuf;

const AFTER_HELP: &str = "Units are required on every quantity: 350m/s, 0.35km/s, 12deg, 12°, 0.21rad, 1.5mm, 200uF, 8kV.
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
    Check(CheckArgs),
    /// List and show the material library.
    #[command(subcommand)]
    Material(MaterialCommand),
    /// Pair windows: trials, boundaries, agreement.
    #[command(subcommand)]
    Pair(PairCommand),
    /// Plot a weldability window with trials, proposed points and process curves (SVG).
    Plot(crate::cmd::plot::PlotArgs),
    /// Write a self-contained HTML decision report for a proposed set-up.
    Report(crate::cmd::report::ReportArgs),
    /// Run the invented demo scenario end to end and write its plots and report.
    Demo(crate::cmd::demo::DemoArgs),
    /// Estimate impact velocity from a capacitor bank and coil (or an explosive charge).
    Estimate(crate::cmd::estimate::EstimateArgs),
    /// Sweep charging voltage (or energy) and standoff; check every setting against a pair window.
    Sweep(crate::cmd::estimate::SweepArgs),
    /// Fit the efficiency factor of a machine and coil to one measured shot.
    Calibrate(crate::cmd::estimate::CalibrateArgs),
    /// Classify every point of an interface export (CSV or JSON lines): the weld map.
    Map(crate::cmd::map::MapArgs),
}

/// The velocity convention, as a flag value.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ConventionArg {
    /// Vp along the bisector of the collision angle (explosive welding).
    Bisector,
    /// Vp normal to the flyer (magnetic pulse, foil actuator).
    NormalToFlyer,
    /// Vp normal to the parent plate.
    NormalToParent,
}

impl From<ConventionArg> for oblique_core::Convention {
    fn from(c: ConventionArg) -> Self {
        match c {
            ConventionArg::Bisector => oblique_core::Convention::Bisector,
            ConventionArg::NormalToFlyer => oblique_core::Convention::NormalToFlyer,
            ConventionArg::NormalToParent => oblique_core::Convention::NormalToParent,
        }
    }
}

/// Where the point's velocity comes from.
#[derive(Debug, Clone, Args)]
#[group(required = true, multiple = false)]
pub struct VelocityInput {
    /// Impact (flyer) velocity Vp, e.g. 350m/s or 0.35km/s.
    #[arg(long, value_name = "SPEED", allow_hyphen_values = true, value_parser = qarg::positive_velocity)]
    pub velocity: Option<f64>,
    /// Collision-point velocity Vc along the parent, e.g. 2.4km/s (Vp then follows from the convention).
    #[arg(long = "collision-velocity", value_name = "SPEED", allow_hyphen_values = true, value_parser = qarg::positive_velocity)]
    pub collision_velocity: Option<f64>,
}

/// Criterion constants that can be overridden from the command line.
#[derive(Debug, Clone, Default, Args)]
pub struct ConstantArgs {
    /// Deribas constant k (default 0.6, carefully cleaned surfaces; up to 1.2).
    #[arg(long = "deribas-k", value_name = "K", allow_hyphen_values = true, value_parser = qarg::positive_number)]
    pub deribas_k: Option<f64>,
    /// Wittman melting constant N (default 0.11).
    #[arg(long = "wittman-n", value_name = "N", allow_hyphen_values = true, value_parser = qarg::positive_number)]
    pub wittman_n: Option<f64>,
    /// Required multiple of the Hugoniot elastic limit for the pressure limit (default 5).
    #[arg(long = "hel-multiple", value_name = "M", allow_hyphen_values = true, value_parser = qarg::positive_number)]
    pub hel_multiple: Option<f64>,
}

#[derive(Debug, Args)]
#[command(after_help = "Examples:
  oblique check --flyer aa6061-t6 --parent cu-c11000 --flyer-thickness 1mm --velocity 350m/s --angle 12deg --convention normal-to-flyer
  oblique check --flyer aa6061-t6 --parent ss304 --flyer-thickness 1mm --collision-velocity 2.4km/s --angle 10deg --convention bisector --deribas-k 1.0 --json
  oblique check --pair demo-al6061-on-cu --velocity 320m/s --angle 9deg

Exit status: 0 when the check ran (inside or not), 2 on bad input.
Screening only, never a guarantee: lethal voltages, stored energy, explosives and flying parts are
involved in every real shot; follow local codes and licensed practice.")]
pub struct CheckArgs {
    /// Use a pair window from the library (materials, thickness, criteria, boundaries).
    #[arg(long, value_name = "NAME", conflicts_with_all = ["flyer", "parent", "flyer_thickness"])]
    pub pair: Option<String>,
    /// Flyer (moving plate) material id, e.g. aa6061-t6 (`oblique material list`).
    #[arg(long, value_name = "ID", required_unless_present = "pair")]
    pub flyer: Option<String>,
    /// Parent (stationary plate) material id, e.g. cu-c11000.
    #[arg(long, value_name = "ID", required_unless_present = "pair")]
    pub parent: Option<String>,
    /// Flyer thickness, e.g. 1mm (enters the melting limit and the wavelength).
    #[arg(long = "flyer-thickness", value_name = "LENGTH", allow_hyphen_values = true, value_parser = qarg::positive_length, required_unless_present = "pair")]
    pub flyer_thickness: Option<f64>,
    /// Parent thickness, e.g. 10mm (only for the dissipated energy; default: a massive parent).
    #[arg(long = "parent-thickness", value_name = "LENGTH", allow_hyphen_values = true, value_parser = qarg::positive_length)]
    pub parent_thickness: Option<f64>,
    #[command(flatten)]
    pub velocity: VelocityInput,
    /// Dynamic collision angle beta, strictly between 0 and 90 deg, e.g. 12deg.
    #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle)]
    pub angle: f64,
    /// How Vp relates to Vc: bisector, normal-to-flyer or normal-to-parent (required unless --pair gives it).
    #[arg(long, value_enum, value_name = "CONVENTION")]
    pub convention: Option<ConventionArg>,
    #[command(flatten)]
    pub constants: ConstantArgs,
    /// Print JSON (SI values, keys with unit suffixes) instead of the table.
    #[arg(long)]
    pub json: bool,
}

#[derive(Debug, Subcommand)]
pub enum MaterialCommand {
    /// List the materials with their ids and key properties.
    List {
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Show one material with every property and its source.
    Show {
        /// Material id, e.g. aa6061-t6.
        id: String,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum OutcomeArg {
    /// Sound weld.
    Welded,
    /// No bond.
    NotWelded,
    /// Bond over part of the interface.
    Partial,
    /// Melted or brittle interface.
    Melted,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ProcessArg {
    /// Magnetic pulse welding.
    MagneticPulse,
    /// Explosive welding.
    Explosive,
    /// Vaporizing foil actuator welding.
    FoilActuator,
    /// Laser impact welding.
    Laser,
    /// Gas gun.
    GasGun,
    /// Anything else.
    Other,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum MethodArg {
    /// Measured (PDV, high-speed imaging, ...).
    Measured,
    /// From a simulation.
    Simulated,
    /// Estimated.
    Estimated,
}

#[derive(Debug, Subcommand)]
pub enum PairCommand {
    /// List the pair windows.
    List {
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Show one pair window: materials, criteria, boundaries, observations, provenance.
    Show {
        /// Pair name.
        name: String,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Create a new pair window file in the first --library folder.
    #[command(
        after_help = "Example:\n  oblique --library ./shop pair new al-on-cu --flyer aa6061-t6 --parent cu-c11000 --flyer-thickness 1.5mm --convention normal-to-flyer"
    )]
    New {
        /// Pair name (also the file name: NAME.ron).
        name: String,
        /// Flyer material id.
        #[arg(long, value_name = "ID")]
        flyer: String,
        /// Parent material id.
        #[arg(long, value_name = "ID")]
        parent: String,
        /// Flyer thickness, e.g. 1.5mm.
        #[arg(long = "flyer-thickness", value_name = "LENGTH", allow_hyphen_values = true, value_parser = qarg::positive_length)]
        flyer_thickness: f64,
        /// Parent thickness, e.g. 12mm (only for the dissipated energy; default: a massive parent).
        #[arg(long = "parent-thickness", value_name = "LENGTH", allow_hyphen_values = true, value_parser = qarg::positive_length)]
        parent_thickness: Option<f64>,
        /// What the window is for, e.g. "busbar connector, tube on rod".
        #[arg(long, value_name = "TEXT")]
        description: Option<String>,
        /// Convention in which the trials' velocities are recorded.
        #[arg(long, value_enum, default_value = "normal-to-flyer")]
        convention: ConventionArg,
        /// Who maintains the file (default: $USER).
        #[arg(long, value_name = "TEXT")]
        maintainer: Option<String>,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Record one trial shot in a pair window (appended; the rest of the file is kept byte for byte).
    #[command(
        after_help = "Example:\n  oblique --library ./shop pair observe al-on-cu --velocity 320m/s --angle 9deg --outcome welded --source \"shot log 2026-11-30 #4\""
    )]
    Observe {
        /// Pair name.
        name: String,
        /// Measured impact velocity in the pair's convention, e.g. 320m/s.
        #[arg(long, value_name = "SPEED", allow_hyphen_values = true, value_parser = qarg::positive_velocity)]
        velocity: f64,
        /// Collision angle, strictly between 0 and 90 deg, e.g. 9deg.
        #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle)]
        angle: f64,
        /// What the section or peel test showed.
        #[arg(long, value_enum)]
        outcome: OutcomeArg,
        /// Report, shot log or paper the shot comes from.
        #[arg(long, value_name = "TEXT")]
        source: String,
        /// Free note.
        #[arg(long, value_name = "TEXT")]
        note: Option<String>,
        /// Process that drove the flyer.
        #[arg(long, value_enum, default_value = "magnetic-pulse")]
        process: ProcessArg,
        /// How velocity and angle were obtained.
        #[arg(long, value_enum, default_value = "measured")]
        method: MethodArg,
        /// Standard uncertainty of the velocity, e.g. 15m/s.
        #[arg(long = "velocity-uncertainty", value_name = "SPEED", allow_hyphen_values = true, value_parser = qarg::positive_velocity)]
        velocity_uncertainty: Option<f64>,
        /// Standard uncertainty of the angle, e.g. 1deg.
        #[arg(long = "angle-uncertainty", value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle)]
        angle_uncertainty: Option<f64>,
        /// Date of the shot, YYYY-MM-DD (default: today).
        #[arg(long, value_name = "DATE", value_parser = qarg::date)]
        date: Option<String>,
        /// Refuse to write unless the file still has this SHA-256 (from `pair show --json`).
        #[arg(long = "if-unchanged", value_name = "SHA256")]
        if_unchanged: Option<String>,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Import many shots from a CSV file (all rows are checked before anything is written).
    #[command(
        after_help = "CSV header (units in brackets; velocity in m/s or km/s, angle in deg or rad):
  velocity[m/s],angle[deg],outcome,source,process,method,date,note,velocity_uncertainty[m/s],angle_uncertainty[deg]
The first four columns are required; the others are optional."
    )]
    Import {
        /// Pair name.
        name: String,
        /// CSV file.
        file: PathBuf,
        /// Refuse to write unless the pair file still has this SHA-256 (from `pair show --json`).
        #[arg(long = "if-unchanged", value_name = "SHA256")]
        if_unchanged: Option<String>,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Validate pair window files (default: the whole library); every problem at once, exit 2 if any.
    Validate {
        /// Files to validate.
        files: Vec<PathBuf>,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Compare the window's predictions with its trial observations.
    Agreement {
        /// Pair name.
        name: String,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
}
