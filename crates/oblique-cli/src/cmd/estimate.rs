//! `oblique estimate`, `oblique sweep`, `oblique calibrate`: the flags (this module), turned into
//! typed requests (`request`) for `oblique_setup`, whose results are printed with
//! `oblique_setup::present` (`show`, `sweep`, `calib`).
//!
//! Every machine and tooling value comes from a library file (`--machine`, `--coil`, `--setup`)
//! or a flag, flags winning; the output says where each value came from. Every result is a
//! screening estimate, not a guarantee, and says so.

mod calib;
mod request;
mod show;
mod sweep;

pub use crate::args::process::{
    parse, BankFlags, ChargeFlags, ExplosiveFlags, IntegrationFlags, SheetFlags, TubeFlags,
};
use crate::fail::CmdResult;
use crate::qarg;
use clap::{Args, Subcommand};
use oblique_setup::grid::{self, Grid};
use std::path::PathBuf;

/// Flags of `oblique estimate`.
#[derive(Debug, Args)]
pub struct EstimateArgs {
    /// Which model.
    #[command(subcommand)]
    pub model: EstimateModel,
}

/// The models of `oblique estimate`.
#[derive(Debug, Subcommand)]
pub enum EstimateModel {
    /// Magnetic pulse: a tube compressed onto a rod by a single-turn coil or field-shaper bore.
    #[command(after_help = EXAMPLES_TUBE)]
    MpwTube(TubeEstimateArgs),
    /// Magnetic pulse: a sheet driven off a flat one-turn bar coil onto a parent plate.
    #[command(after_help = EXAMPLES_SHEET)]
    MpwSheet(SheetEstimateArgs),
    /// Explosive welding: Gurney open-faced sandwich, then the collision kinematics.
    #[command(after_help = EXAMPLES_EXPLOSIVE)]
    Explosive(ExplosiveArgs),
}

const EXAMPLES_TUBE: &str = "Examples (the built-in bank and coil are INVENTED demo files):
  oblique estimate mpw-tube --machine harbourside-bank-300uf --coil harbourside-coil-42mm --flyer aa6061-t6 --flyer-thickness 1mm --tube-outer-radius 20mm --standoff 2.5mm --charge-voltage 8kV
  oblique estimate mpw-tube --machine harbourside-bank-300uf --coil harbourside-coil-42mm --flyer aa6061-t6 --flyer-thickness 1mm --parent cu-c11000 --convention normal-to-flyer --tube-outer-radius 20mm --standoff 2mm --charge-voltage 8kV --angle 10deg
  oblique estimate mpw-tube --capacitance 300uF --rated-voltage 12kV --bank-inductance 40nH --bank-resistance 4mohm --coil-bore 21mm --coil-length 20mm --coil-inductance 20nH --pair demo-al6061-on-cu --tube-outer-radius 20mm --standoff 2.5mm --charge-voltage 8kV --angle 8deg --json
Models and assumptions: docs/process-models.md. A screening estimate, never a guarantee: the
bank stores lethal energy and parts fly; follow local codes and licensed practice.";

const EXAMPLES_SHEET: &str = "Example (INVENTED demo bank and bar coil):
  oblique estimate mpw-sheet --machine harbourside-bank-300uf --coil harbourside-bar-100x20 --initial-gap 0.5mm --flyer aa6061-t6 --flyer-thickness 1mm --standoff 2mm --charge-voltage 6kV
Models and assumptions: docs/process-models.md. A screening estimate, never a guarantee.";

const EXAMPLES_EXPLOSIVE: &str = "Example (every value is the user's; no explosive is shipped):
  oblique estimate explosive --gurney-velocity 1500m/s --detonation-velocity 2500m/s --mass-ratio 2 --preset-angle 0deg
Explosives kill: their handling, storage and use are for licensed people under local law.";

/// `oblique estimate mpw-tube`.
#[derive(Debug, Args)]
pub struct TubeEstimateArgs {
    #[command(flatten)]
    pub bank: BankFlags,
    #[command(flatten)]
    pub tube: TubeFlags,
    #[command(flatten)]
    pub charge: ChargeFlags,
    /// Radial standoff between tube and rod (the wall's travel to impact), e.g. 2.5mm.
    #[arg(long, value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub standoff: f64,
    #[command(flatten)]
    pub common: EstimateCommon,
}

/// `oblique estimate mpw-sheet`.
#[derive(Debug, Args)]
pub struct SheetEstimateArgs {
    #[command(flatten)]
    pub bank: BankFlags,
    #[command(flatten)]
    pub sheet: SheetFlags,
    #[command(flatten)]
    pub charge: ChargeFlags,
    /// Distance the sheet travels to the parent, e.g. 2mm.
    #[arg(long, value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub standoff: f64,
    #[command(flatten)]
    pub common: EstimateCommon,
}

/// Flags shared by the magnetic pulse estimates.
#[derive(Debug, Args)]
pub struct EstimateCommon {
    /// Efficiency factor eta in (0, 1] (default: the machine's stored calibration, else 1).
    #[arg(long, value_name = "ETA", value_parser = parse::efficiency)]
    pub efficiency: Option<f64>,
    /// Collision angle from your geometry (taper, chamfer), e.g. 8deg; checks the result against --pair (or --parent).
    #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle)]
    pub angle: Option<f64>,
    /// Pair window to check against (also the default flyer material and thickness).
    #[arg(long, value_name = "NAME", conflicts_with = "parent")]
    pub pair: Option<String>,
    #[command(flatten)]
    pub adhoc: AdHocWindow,
    /// Write the time histories to a CSV file.
    #[arg(long, value_name = "FILE.csv")]
    pub history: Option<PathBuf>,
    #[command(flatten)]
    pub integration: IntegrationFlags,
    #[command(flatten)]
    pub scatter: crate::args::ScatterArgs,
    /// Print JSON (SI values, keys with unit suffixes) instead of the table.
    #[arg(long)]
    pub json: bool,
}

/// A window made on the spot instead of a pair file, as `check` makes it: the parent plate and
/// the convention (the flyer and its thickness come from `--flyer` and `--flyer-thickness`).
#[derive(Debug, Args)]
pub struct AdHocWindow {
    /// Parent (stationary plate or rod) material id, e.g. cu-c11000: check against a window made
    /// from --flyer, --flyer-thickness, --parent and --convention instead of a pair file.
    #[arg(long, value_name = "ID")]
    pub parent: Option<String>,
    /// How Vp relates to Vc for the window made with --parent: bisector, normal-to-flyer or
    /// normal-to-parent (never guessed).
    #[arg(
        long,
        value_enum,
        ignore_case = true,
        value_name = "CONVENTION",
        requires = "parent"
    )]
    pub convention: Option<crate::args::ConventionArg>,
}

/// `oblique estimate explosive`.
#[derive(Debug, Args)]
pub struct ExplosiveArgs {
    #[command(flatten)]
    pub explosive: ExplosiveFlags,
    /// Pair window to check the resulting point against.
    #[arg(long, value_name = "NAME", conflicts_with = "parent")]
    pub pair: Option<String>,
    /// Flyer material id for a window made with --parent, e.g. aa6061-t6.
    #[arg(long, value_name = "ID", requires = "parent")]
    pub flyer: Option<String>,
    /// Flyer thickness for a window made with --parent, e.g. 3mm.
    #[arg(long = "flyer-thickness", value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true, requires = "parent")]
    pub flyer_thickness: Option<f64>,
    #[command(flatten)]
    pub adhoc: AdHocWindow,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

/// Flags of `oblique sweep`.
#[derive(Debug, Args)]
pub struct SweepArgs {
    /// Which model.
    #[command(subcommand)]
    pub model: SweepModel,
}

/// The models of `oblique sweep`.
#[derive(Debug, Subcommand)]
pub enum SweepModel {
    /// Tube compression over charging voltage x standoff.
    #[command(after_help = SWEEP_EXAMPLES)]
    MpwTube(TubeSweepArgs),
    /// Sheet on a bar coil over charging voltage x standoff.
    MpwSheet(SheetSweepArgs),
}

const SWEEP_EXAMPLES: &str = "Example (INVENTED demo bank, coil and pair):
  oblique sweep mpw-tube --machine harbourside-bank-300uf --coil harbourside-coil-42mm --pair demo-al6061-on-cu --tube-outer-radius 20mm --charge-voltage 6kV..12kV --steps 7 --standoff 1mm,1.5mm,2mm,3mm --angle 8deg --plot sweep.svg
Grids: a list (6kV,8kV,10kV) or a range A..B with --steps (voltage, energy) or --standoff-steps.
A screening estimate, never a guarantee: follow local codes and licensed practice.";

/// Grid and window flags shared by the sweeps.
#[derive(Debug, Args)]
pub struct SweepCommon {
    /// Charging voltages: a list 6kV,8kV,10kV or a range 6kV..12kV (with --steps).
    #[arg(long = "charge-voltage", value_name = "LIST|A..B", value_parser = grid::voltage_grid, conflicts_with = "energy", required_unless_present = "energy")]
    pub charge_voltage: Option<Grid>,
    /// Stored energies instead of voltages: 5kJ,10kJ or 5kJ..20kJ (with --steps).
    #[arg(long, value_name = "LIST|A..B", value_parser = grid::energy_grid)]
    pub energy: Option<Grid>,
    /// Number of values in a voltage or energy range.
    #[arg(long, value_name = "N", default_value_t = 7)]
    pub steps: usize,
    /// Standoffs: a list 1mm,1.5mm,2mm or a range 1mm..3mm (with --standoff-steps).
    #[arg(long, value_name = "LIST|A..B", value_parser = grid::length_grid)]
    pub standoff: Grid,
    /// Number of values in a standoff range.
    #[arg(long = "standoff-steps", value_name = "N", default_value_t = 5)]
    pub standoff_steps: usize,
    /// Collision angle from your geometry, the same at every standoff, e.g. 8deg.
    #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle, conflicts_with = "angle_per_standoff")]
    pub angle: Option<f64>,
    /// One angle per standoff, in the order of --standoff (a list, or a range A..B spread over them).
    #[arg(long = "angle-per-standoff", value_name = "LIST|A..B", value_parser = grid::angle_grid)]
    pub angle_per_standoff: Option<Grid>,
    /// Pair window to check every setting against (also the default flyer).
    #[arg(long, value_name = "NAME", conflicts_with = "parent")]
    pub pair: Option<String>,
    #[command(flatten)]
    pub adhoc: AdHocWindow,
    /// Efficiency factor eta in (0, 1] (default: the machine's stored calibration, else 1).
    #[arg(long, value_name = "ETA", value_parser = parse::efficiency)]
    pub efficiency: Option<f64>,
    /// How many inside settings to list (all are in --json).
    #[arg(long, value_name = "N", default_value_t = 10)]
    pub top: usize,
    /// Write the window plot with one process curve per standoff (.svg or .png: the extension picks the format; needs --pair or --parent).
    #[arg(long, value_name = "OUT.svg|OUT.png")]
    pub plot: Option<PathBuf>,
    // The help text names the CSV columns with their units in brackets (not doc links).
    #[allow(rustdoc::broken_intra_doc_links)]
    /// Write one CSV per standoff (velocity[m/s],angle[deg],label,...) into this folder.
    #[arg(long = "curves-csv", value_name = "DIR")]
    pub curves_csv: Option<PathBuf>,
    /// Worker threads (default: the available parallelism).
    #[arg(long, value_name = "N")]
    pub threads: Option<std::num::NonZeroUsize>,
    #[command(flatten)]
    pub integration: IntegrationFlags,
    #[command(flatten)]
    pub scatter: crate::args::ScatterArgs,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

/// `oblique sweep mpw-tube`.
#[derive(Debug, Args)]
pub struct TubeSweepArgs {
    #[command(flatten)]
    pub bank: BankFlags,
    #[command(flatten)]
    pub tube: TubeFlags,
    #[command(flatten)]
    pub common: SweepCommon,
}

/// `oblique sweep mpw-sheet`.
#[derive(Debug, Args)]
pub struct SheetSweepArgs {
    #[command(flatten)]
    pub bank: BankFlags,
    #[command(flatten)]
    pub sheet: SheetFlags,
    #[command(flatten)]
    pub common: SweepCommon,
}

/// Flags of `oblique calibrate`.
#[derive(Debug, Args)]
pub struct CalibrateArgs {
    /// What to calibrate.
    #[command(subcommand)]
    pub model: CalibrateModel,
}

/// The calibrations.
#[derive(Debug, Subcommand)]
pub enum CalibrateModel {
    /// Fit the efficiency of the tube model to one measured impact velocity.
    #[command(after_help = CAL_EXAMPLES)]
    MpwTube(TubeCalibrateArgs),
    /// Fit the efficiency of the sheet model to one measured impact velocity.
    MpwSheet(SheetCalibrateArgs),
    /// Loop inductance and resistance from a ring-down record (and optionally a new bank file).
    #[command(after_help = RING_EXAMPLES)]
    RingDown(RingDownArgs),
    /// Print a machine file (built-in or user) so that it can be copied into a library folder.
    Export {
        /// Machine, coil or set-up name.
        name: String,
    },
}

const CAL_EXAMPLES: &str = "Example (a user copy of the INVENTED demo bank in ./shop/machines):
  oblique --library ./shop calibrate mpw-tube --machine my-bank --coil harbourside-coil-42mm --flyer aa6061-t6 --flyer-thickness 1mm --tube-outer-radius 20mm --standoff 2.5mm --charge-voltage 8kV --measured-velocity 410m/s --source \"velocimetry record 12\" --save";

const RING_EXAMPLES: &str = "Examples:
  oblique calibrate ring-down --capacitance 300uF --ring-frequency 45.25kHz --peak-ratio 3.02
  oblique --library ./shop calibrate ring-down --capacitance 300uF --ring-frequency 45.25kHz --peak-ratio 3.02 --rated-voltage 12kV --source \"scope record 17\" --save-as my-bank
The record should be taken with the bank's output shorted at the coil terminals, so that L and R
are the bank's own; with a coil connected they are those of the whole loop.";

/// Flags shared by the efficiency calibrations.
#[derive(Debug, Args)]
pub struct CalibrateCommon {
    /// The measured impact velocity, e.g. 410m/s (velocimetry, high-speed imaging).
    #[arg(long = "measured-velocity", value_name = "SPEED", value_parser = parse::velocity, allow_hyphen_values = true)]
    pub measured_velocity: f64,
    /// The measurement's standard uncertainty, relative (3%) or absolute (12m/s); stored with a
    /// saved calibration, it becomes the velocity spread of the estimates that use it.
    #[arg(long = "measured-velocity-sd", value_name = "SD", value_parser = crate::qarg::velocity_sd, allow_hyphen_values = true)]
    pub measured_velocity_sd: Option<oblique_confidence::VelocitySpread>,
    /// Where the measurement comes from (record, logbook page).
    #[arg(long, value_name = "TEXT")]
    pub source: String,
    /// Date of the shot, YYYY-MM-DD (default: today).
    #[arg(long, value_name = "DATE")]
    pub date: Option<String>,
    /// Store the fitted efficiency and its shot in the bank's (user) file.
    #[arg(long, requires = "machine")]
    pub save: bool,
    /// Pair window giving the default flyer material and thickness.
    #[arg(long, value_name = "NAME")]
    pub pair: Option<String>,
    #[command(flatten)]
    pub integration: IntegrationFlags,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

/// `oblique calibrate mpw-tube`.
#[derive(Debug, Args)]
pub struct TubeCalibrateArgs {
    #[command(flatten)]
    pub bank: BankFlags,
    #[command(flatten)]
    pub tube: TubeFlags,
    #[command(flatten)]
    pub charge: ChargeFlags,
    /// Standoff of the measured shot, e.g. 2.5mm.
    #[arg(long, value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub standoff: f64,
    #[command(flatten)]
    pub common: CalibrateCommon,
}

/// `oblique calibrate mpw-sheet`.
#[derive(Debug, Args)]
pub struct SheetCalibrateArgs {
    #[command(flatten)]
    pub bank: BankFlags,
    #[command(flatten)]
    pub sheet: SheetFlags,
    #[command(flatten)]
    pub charge: ChargeFlags,
    /// Standoff of the measured shot, e.g. 2mm.
    #[arg(long, value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub standoff: f64,
    #[command(flatten)]
    pub common: CalibrateCommon,
}

/// `oblique calibrate ring-down`.
#[derive(Debug, Args)]
pub struct RingDownArgs {
    /// Bank capacitance, e.g. 300uF (from the datasheet or nameplate).
    #[arg(long, value_name = "CAPACITANCE", value_parser = parse::capacitance, allow_hyphen_values = true)]
    pub capacitance: f64,
    /// Damped ring frequency of the record, e.g. 45kHz (from zero crossings or same-sign peaks).
    #[arg(long = "ring-frequency", value_name = "FREQUENCY", value_parser = parse::frequency, allow_hyphen_values = true)]
    pub ring_frequency: f64,
    /// Ratio I1/I2 of two successive same-sign current peaks, one period apart, e.g. 3.0.
    #[arg(long = "peak-ratio", value_name = "RATIO", value_parser = parse::peak_ratio, allow_hyphen_values = true)]
    pub peak_ratio: f64,
    /// Write a new bank file NAME.ron into DIR/machines of the first --library folder.
    #[arg(long = "save-as", value_name = "NAME", requires_all = ["rated_voltage", "source"])]
    pub save_as: Option<String>,
    /// The bank's rated charging voltage, for --save-as, e.g. 12kV.
    #[arg(long = "rated-voltage", value_name = "VOLTAGE", value_parser = parse::voltage, allow_hyphen_values = true)]
    pub rated_voltage: Option<f64>,
    /// Where the record comes from, for --save-as.
    #[arg(long, value_name = "TEXT")]
    pub source: Option<String>,
    /// Where the capacitance and rating come from, for --save-as (default: "datasheet").
    #[arg(long = "datasheet", value_name = "TEXT")]
    pub datasheet: Option<String>,
    /// Who maintains the new file (default: $USER).
    #[arg(long, value_name = "TEXT")]
    pub maintainer: Option<String>,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

/// `oblique estimate`.
pub fn run_estimate(dirs: &[PathBuf], a: EstimateArgs) -> CmdResult {
    match a.model {
        EstimateModel::MpwTube(t) => show::run_tube(dirs, t),
        EstimateModel::MpwSheet(s) => show::run_sheet(dirs, s),
        EstimateModel::Explosive(e) => show::run_explosive(dirs, e),
    }
}

/// `oblique sweep`.
pub fn run_sweep(dirs: &[PathBuf], a: SweepArgs) -> CmdResult {
    match a.model {
        SweepModel::MpwTube(t) => sweep::run_tube(dirs, t),
        SweepModel::MpwSheet(s) => sweep::run_sheet(dirs, s),
    }
}

/// `oblique calibrate`.
pub fn run_calibrate(dirs: &[PathBuf], a: CalibrateArgs) -> CmdResult {
    match a.model {
        CalibrateModel::MpwTube(t) => calib::run_tube(dirs, t),
        CalibrateModel::MpwSheet(s) => calib::run_sheet(dirs, s),
        CalibrateModel::RingDown(r) => calib::run_ring_down(dirs, r),
        CalibrateModel::Export { name } => calib::run_export(dirs, &name),
    }
}
