//! `oblique aim`: the most robust point of a window (`oblique_aim::aim`), or, with a machine and
//! a coil family, the set-ups ranked by the same measure (`oblique_aim::setups`).

mod setup;

use crate::args::{OnOff, ScatterArgs, WindowArgs};
use crate::common::{load_library, window_from};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json};
use crate::qarg;
use clap::Args;
use oblique_aim::{aim, AimRequest, Spread};
use oblique_confidence::VelocitySpread;
use std::path::PathBuf;

/// Flags of `oblique aim`.
#[derive(Debug, Args)]
#[command(after_help = "Examples:
  oblique aim --pair demo-al6061-on-cu
  oblique aim --pair demo-al6061-on-cu --velocity-sd 5% --angle-sd 1.5deg \\
      --min-probability 80% --json
  oblique aim --pair demo-al6061-on-cu --machine harbourside-bank-300uf --coil-bore 21mm \\
      --coil-length 20mm..60mm --coil-inductance 20nH --tube-outer-radius 20mm \\
      --charge-voltage 6kV..12kV --standoff 1mm..3mm --chamfer 4deg..16deg --steps 5 \\
      --max-current 500kA

Without a machine: the (impact velocity, collision angle) that keeps the most room to every limit,
measured in the stated scatter (default: 3 % and 1 deg, a measured shot, docs/theory.md §15.3):
the smallest margin in standard deviations (z), ties broken by the next smallest (§16). The best
point is rounded to 1 m/s and 0.1 deg and checked there; its margins are those `check` prints.
With a machine: every set-up of the coil family (each range spread over --steps values) is
estimated with the tube model and ranked by the same measure, within the bank's rating; the
collision angle is the rod's chamfer (the simple model's assumption, said in the output). The
bank's rated voltage, and --max-current/--max-energy (or the bank file's max_current and
max_energy), leave set-ups out; --steps spreads each range over 2 to 100 values (default 5), at
most 100000 set-ups. --velocity-sd/--angle-sd are the scatter the room is measured in.

Screening only, never a guarantee: lethal voltages, stored energy, explosives and flying parts are
involved in every real shot; follow local codes and licensed practice.")]
pub struct AimArgs {
    #[command(flatten)]
    pub window: WindowArgs,
    #[command(flatten)]
    pub scatter: ScatterArgs,
    /// The weld probability the reported region keeps, e.g. 90%.
    #[arg(long = "min-probability", value_name = "PERCENT", value_parser = qarg::level)]
    pub min_probability: Option<f64>,
    /// How many points (or set-ups) to rank, 1 to 100.
    #[arg(long, value_name = "N", default_value_t = 10)]
    pub top: usize,
    #[command(flatten)]
    pub setup: setup::SetupFlags,
    /// Print JSON (`best`, then `ranked`) instead of the text.
    #[arg(long)]
    pub json: bool,
}

/// The scatter of the measure: stated, or the documented defaults of a measured shot.
fn spread(s: &ScatterArgs) -> (Spread, String) {
    let mut basis = Vec::new();
    let velocity = s.velocity_sd.unwrap_or_else(|| {
        basis.push(
            "velocity sd 3 % by default, a measured shot (docs/theory.md §15.3, common practice)",
        );
        VelocitySpread::Relative(0.03)
    });
    let angle = s.angle_sd.map_or_else(
        || {
            basis.push("angle sd 1 deg by default (common practice)");
            1.0
        },
        f64::to_degrees,
    );
    let text = if basis.is_empty() {
        "stated".to_string()
    } else {
        basis.join("; ")
    };
    (
        Spread {
            velocity,
            angle_deg: angle,
            model: s.model_uncertainty != Some(OnOff::Off),
        },
        text,
    )
}

pub fn run(dirs: &[PathBuf], a: AimArgs) -> CmdResult {
    let lib = load_library(dirs)?;
    let (window, _) = window_from(&lib, &a.window)?;
    if let (Some(_), Some(c)) = (&a.window.pair, a.window.convention) {
        let c: oblique_core::Convention = c.into();
        if c != window.convention {
            return Err(Fail::input(format!(
                "--convention: aim works in the pair window's own convention ({}); leave --convention out",
                window.convention
            )));
        }
    }
    if a.setup.given() {
        return setup::run(dirs, &a, lib, &window);
    }
    let (spread, basis) = spread(&a.scatter);
    let result = aim(&AimRequest {
        window: &window,
        spread,
        top: a.top,
        level: a.min_probability.unwrap_or(0.9),
        seed: a
            .scatter
            .seed
            .unwrap_or(oblique_confidence::scatter::DEFAULT_SEED),
        samples: a.scatter.samples,
        basis,
    })?;
    if a.json {
        emit_json(&result.json())
    } else {
        emit(&result.text())
    }
}
