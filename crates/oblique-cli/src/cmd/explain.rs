//! `oblique explain`: the worked example of one check: every step from the inputs to the
//! verdict (`oblique_window::explain`), built from the same classification `check` prints.

use crate::args::PointArgs;
use crate::common::{load_library, point_probability, window_from};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json};
use crate::qarg;
use clap::Args;
use oblique_window::explain::{derive, derive_head_on, GivenVelocity};
use std::path::PathBuf;

/// Flags of `oblique explain`: the same as `check`.
#[derive(Debug, Args)]
#[command(after_help = "Examples:
  oblique explain --pair demo-al6061-on-cu --velocity 450m/s --angle 10deg
  oblique explain --flyer aa6061-t6 --parent cu-c11000 --flyer-thickness 1mm \\
      --velocity 350m/s --angle 12deg --convention normal-to-flyer --json
  oblique explain --pair demo-al6061-on-cu --velocity 450m/s --angle 10deg \\
      --velocity-sd 5% --angle-sd 1deg

Every step from the inputs to the verdict, in order: the relation in words and as a formula, the
numbers substituted with their units, the result, and its source or mark (from memory, derived
here, confirmed, common practice). The results are those `oblique check` prints for the same
flags, digit for digit (one evaluation). --json gives the same steps as data.

Screening only, never a guarantee: lethal voltages, stored energy, explosives and flying parts are
involved in every real shot; follow local codes and licensed practice.")]
pub struct ExplainArgs {
    #[command(flatten)]
    pub point: PointArgs,
    /// Print the steps as JSON (results under the keys `check --json` uses).
    #[arg(long)]
    pub json: bool,
}

pub fn run(dirs: &[PathBuf], a: ExplainArgs) -> CmdResult {
    let lib = load_library(dirs)?;
    let p = &a.point;
    let is_pair = p.window.pair.is_some();
    let (window, fitted_note) = window_from(&lib, &p.window)?;
    let mut d = if qarg::is_head_on(p.angle) {
        let Some(vp) = p.velocity.velocity else {
            return Err(Fail::input(
                "--collision-velocity: a head-on impact (--angle 0deg) has no collision point; give the impact velocity with --velocity",
            ));
        };
        let h = oblique_window::classify::classify_head_on(&window, &window.setup()?, vp)?;
        derive_head_on(&window, &h, is_pair)?
    } else {
        let (point, c) =
            crate::common::classify_given(&window, p.window.convention, &p.velocity, p.angle)?;
        let how = if p.velocity.velocity.is_some() {
            GivenVelocity::Impact
        } else {
            GivenVelocity::Collision
        };
        let mut d = derive(&window, &point, how, &c, is_pair)?;
        if let Some(prob) = point_probability(&window, &point, p)? {
            d.push(prob.explain_step());
        }
        d
    };
    if let (Some(n), Some(first)) = (fitted_note, d.steps.first_mut()) {
        first.notes.push(n.trim_end().to_string());
    }
    if a.json {
        emit_json(&d.json())
    } else {
        emit(&d.text())
    }
}
