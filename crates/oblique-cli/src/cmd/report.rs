//! `oblique report`: the decision report for one proposed point.

use crate::args::{ConstantArgs, ConventionArg, VelocityInput};
use crate::common::classify_given;
use crate::common::load_library;
use crate::common::{read_point_csv, write_output};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json};
use crate::qarg;
use clap::Args;
use oblique_render::report::{command_line, html, json, ReportInput};
use oblique_render::window_plot::ProcessCurve;
use oblique_window::agreement;
use std::path::PathBuf;

/// Flags of `oblique report`.
#[derive(Debug, Args)]
#[command(after_help = "Example:
  oblique report --pair demo-al6061-on-cu --velocity 450m/s --angle 10deg -o report.html
The HTML file is self-contained (inline SVG and CSS, no script, no external resource).
The report documents a screening estimate, not a guarantee; it carries the cautions in full.")]
pub struct ReportArgs {
    /// Pair window from the library.
    #[arg(long, value_name = "NAME")]
    pub pair: String,
    #[command(flatten)]
    pub velocity: VelocityInput,
    /// Collision angle, strictly between 0 and 90 deg, e.g. 10deg.
    #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle)]
    pub angle: f64,
    /// Convention of --velocity (default: the pair's).
    #[arg(long, value_enum)]
    pub convention: Option<ConventionArg>,
    #[command(flatten)]
    pub constants: ConstantArgs,
    /// A process curve to overlay (CSV velocity[m/s],angle[deg],label; repeatable).
    #[arg(long = "curve", value_name = "FILE.csv")]
    pub curve: Vec<PathBuf>,
    /// Output HTML file.
    #[arg(short = 'o', long = "output", value_name = "report.html")]
    pub output: PathBuf,
    /// Also print the same content as JSON on standard output (for archiving).
    #[arg(long)]
    pub json: bool,
}

pub fn run(dirs: &[PathBuf], a: ReportArgs) -> CmdResult {
    let inputs: Vec<(&str, &std::path::Path)> = a
        .curve
        .iter()
        .map(|c| ("the input of --curve", c.as_path()))
        .collect();
    crate::common::distinct_outputs(&inputs, &[("-o", a.output.as_path())])?;
    let lib = load_library(dirs)?;
    let mut window = lib
        .pair(&a.pair)
        .map_err(|m| Fail::input(format!("--pair: {m}")))?
        .clone();
    window.criteria = a.constants.apply(window.criteria.clone());
    crate::common::refuse_empty_window(&window, &a.constants)?;
    let (_, c) = classify_given(&window, a.convention, &a.velocity, a.angle)?;
    let agr = agreement(&window)?;
    let mut curves = Vec::new();
    for f in &a.curve {
        curves.push(ProcessCurve {
            label: f
                .file_stem()
                .and_then(|s| s.to_str())
                .unwrap_or("curve")
                .to_string(),
            points: read_point_csv(f)?,
        });
    }
    let input = ReportInput {
        window: &window,
        classification: &c,
        agreement: &agr,
        library: &lib,
        command: command_line(),
        extra_points: Vec::new(),
        curves,
    };
    let page = html(&input)?;
    write_output(&a.output, page.as_bytes())?;
    if a.json {
        return emit_json(&json(&input));
    }
    emit(&format!(
        "wrote {} ({})\n{}\n",
        a.output.display(),
        if c.inside {
            "inside the window"
        } else if !c.domain.inside() {
            "outside the validity domain: no verdict claimed"
        } else {
            "outside the window"
        },
        crate::output::CAUTION
    ))
}
