//! The window a point is checked against (a pair window, or one made on the spot from two
//! material ids) and the point itself: the flags `check` and `explain` share, and the window
//! flags `trade` and `aim` share. No subcommand module is imported from here.

use super::{ConstantArgs, ConventionArg, ProcessArg, ScatterArgs, VelocityInput};
use crate::qarg;
use clap::Args;

/// The pair window, or the flyer, parent and thickness of a window made on the spot.
#[derive(Debug, Clone, Args)]
pub struct WindowArgs {
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
    /// How Vp relates to Vc: bisector, normal-to-flyer or normal-to-parent (required unless --pair gives it).
    #[arg(long, value_enum, ignore_case = true, value_name = "CONVENTION")]
    pub convention: Option<ConventionArg>,
    /// The welding process, for a window without --pair: sets whether the pressure limit is on
    /// (off for explosive welding; default: on, its source states it for magnetic pulse welding).
    #[arg(
        long,
        value_enum,
        ignore_case = true,
        value_name = "PROCESS",
        conflicts_with = "pair"
    )]
    pub process: Option<ProcessArg>,
    #[command(flatten)]
    pub constants: ConstantArgs,
}

/// One process point against a window: the flags of `check` and `explain`.
#[derive(Debug, Clone, Args)]
pub struct PointArgs {
    #[command(flatten)]
    pub window: WindowArgs,
    #[command(flatten)]
    pub velocity: VelocityInput,
    /// Dynamic collision angle beta, from 0 (a head-on impact) to below 90 deg, e.g. 12deg.
    #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle_or_head_on)]
    pub angle: f64,
    #[command(flatten)]
    pub scatter: ScatterArgs,
}
