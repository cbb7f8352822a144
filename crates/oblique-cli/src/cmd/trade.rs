//! `oblique trade`: the velocity-angle trade-off along one control (`oblique_aim::trade`), as a
//! table, CSV, JSON and a line plot (`oblique_render::trade_plot`).

use crate::args::{ScatterArgs, WindowArgs};
use crate::common::{
    distinct_outputs, load_library, output_format, window_from, write_output, FileFormat,
};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json};
use crate::qarg;
use clap::Args;
use oblique_aim::{trade, Control, TradeRequest};
use std::path::PathBuf;

/// Flags of `oblique trade`.
#[derive(Debug, Args)]
#[command(after_help = "Examples:
  oblique trade --pair demo-al6061-on-cu --velocity 450m/s --angle-range 2deg..30deg
  oblique trade --pair demo-al6061-on-cu --angle 10deg --velocity-range 200m/s..800m/s \\
      --steps 25 --plot trade.svg
  oblique trade --flyer aa6061-t6 --parent cu-c11000 --flyer-thickness 1mm \\
      --convention normal-to-flyer --velocity 400m/s --angle-range 2deg..30deg --csv trade.csv
  oblique trade --pair demo-al6061-on-cu --velocity 450m/s --angle-range 2deg..30deg \\
      --velocity-sd 5% --angle-sd 1deg --json

One control moves with the other fixed: the angle (--velocity V --angle-range A..B) or the impact
velocity (--angle A --velocity-range V1..V2). Every row is the point `oblique check` would
classify: Vc, Vf, the impact pressure, the jetting critical angle, each limit with its margin at
the point, the verdict and the binding limit; with --velocity-sd/--angle-sd, the weld probability
(the same draws for every row). The window's entry and exit are bisected and rounded as check's
headroom is. --steps: 2 to 2000 rows (default 29).

Screening only, never a guarantee: lethal voltages, stored energy, explosives and flying parts are
involved in every real shot; follow local codes and licensed practice.")]
pub struct TradeArgs {
    #[command(flatten)]
    pub window: WindowArgs,
    /// The fixed impact velocity while the angle moves over --angle-range, e.g. 450m/s.
    #[arg(long, value_name = "SPEED", allow_hyphen_values = true, value_parser = qarg::positive_velocity, requires = "angle_range", conflicts_with_all = ["angle", "velocity_range"])]
    pub velocity: Option<f64>,
    /// The angles to walk at the fixed --velocity: A..B, e.g. 2deg..30deg.
    #[arg(long = "angle-range", value_name = "A..B", allow_hyphen_values = true, value_parser = qarg::angle_range, required_unless_present = "velocity_range")]
    pub angle_range: Option<(f64, f64)>,
    /// The fixed collision angle while the velocity moves over --velocity-range, e.g. 10deg.
    #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle, requires = "velocity_range")]
    pub angle: Option<f64>,
    /// The impact velocities to walk at the fixed --angle: V1..V2, e.g. 200m/s..800m/s.
    #[arg(long = "velocity-range", value_name = "V1..V2", allow_hyphen_values = true, value_parser = qarg::velocity_range)]
    pub velocity_range: Option<(f64, f64)>,
    /// Number of rows, 2 to 2000 (evenly spaced, both ends included).
    #[arg(long, value_name = "N", default_value_t = 29)]
    pub steps: usize,
    #[command(flatten)]
    pub scatter: ScatterArgs,
    /// Write the rows as CSV (units in the header names).
    #[arg(long, value_name = "FILE.csv")]
    pub csv: Option<PathBuf>,
    /// Write the line plot (.svg or .png: the extension picks the format).
    #[arg(long, value_name = "OUT.svg|OUT.png")]
    pub plot: Option<PathBuf>,
    /// Print JSON instead of the table.
    #[arg(long)]
    pub json: bool,
}

pub fn run(dirs: &[PathBuf], a: TradeArgs) -> CmdResult {
    if let Some(p) = &a.csv {
        output_format("--csv", p, &[FileFormat::Csv], Some(FileFormat::Csv))?;
    }
    let plot_format = match &a.plot {
        Some(p) => Some(output_format(
            "--plot",
            p,
            &[FileFormat::Svg, FileFormat::Png],
            None,
        )?),
        None => None,
    };
    let outputs: Vec<(&str, &std::path::Path)> = [("--csv", &a.csv), ("--plot", &a.plot)]
        .into_iter()
        .filter_map(|(f, p)| p.as_deref().map(|p| (f, p)))
        .collect();
    distinct_outputs(&[], &outputs)?;
    let control = match (a.velocity, a.angle_range, a.angle, a.velocity_range) {
        (Some(v), Some((lo, hi)), None, None) => Control::Angle {
            velocity: v,
            from_deg: lo.to_degrees(),
            to_deg: hi.to_degrees(),
        },
        (None, None, Some(b), Some((lo, hi))) => Control::Velocity {
            angle_deg: b.to_degrees(),
            from: lo,
            to: hi,
        },
        (None, Some(_), _, _) => {
            return Err(Fail::input(
                "--velocity is required with --angle-range: the impact velocity held fixed while the angle moves, e.g. 450m/s",
            ))
        }
        (_, _, None, Some(_)) => {
            return Err(Fail::input(
                "--angle is required with --velocity-range: the collision angle held fixed while the velocity moves, e.g. 10deg",
            ))
        }
        _ => {
            return Err(Fail::input(
                "give --velocity V --angle-range A..B (the angle moves) or --angle A --velocity-range V1..V2 (the velocity moves)",
            ))
        }
    };
    let lib = load_library(dirs)?;
    let (window, _) = window_from(&lib, &a.window)?;
    let probability = a.scatter.asked().then(|| {
        (
            a.scatter.scatter(),
            a.scatter.sampling(oblique_aim::trade::TRADE_SAMPLES),
        )
    });
    let t = trade(&TradeRequest {
        window: &window,
        convention: a.window.convention.map_or(window.convention, Into::into),
        control,
        steps: a.steps,
        probability,
    })?;
    if let Some(p) = &a.csv {
        write_output(p, t.csv().as_bytes())?;
    }
    if let (Some(p), Some(f)) = (&a.plot, plot_format) {
        let svg = oblique_render::trade_plot::render_svg(&t)?;
        let bytes = match f {
            FileFormat::Png => oblique_render::png::svg_to_png(&svg)?,
            _ => svg.into_bytes(),
        };
        write_output(p, &bytes)?;
    }
    if a.json {
        emit_json(&t.json())
    } else {
        emit(&t.text())
    }
}
