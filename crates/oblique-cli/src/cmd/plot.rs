//! `oblique plot`: the window with trials, proposed points and process curves, as SVG.

use crate::args::{ConventionArg, ScatterArgs};
use crate::common::{ad_hoc_window, output_format, read_point_csv, write_output, FileFormat};
use crate::common::{load_library, need};
use crate::fail::{CmdResult, Fail};
use crate::qarg;
use clap::{Args, ValueEnum};
use oblique_render::window_plot::{render_svg, PlotRequest, ProcessCurve, ProposedPoint};
use oblique_window::boundary::Plane;
use oblique_window::PairWindow;
use std::path::{Path, PathBuf};

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum PlaneArg {
    /// Collision angle against impact velocity Vp.
    #[value(alias = "angle-impact-velocity")]
    AngleVelocity,
    /// Collision angle against collision-point velocity Vc.
    AngleCollisionVelocity,
}

impl From<PlaneArg> for Plane {
    fn from(p: PlaneArg) -> Self {
        match p {
            PlaneArg::AngleVelocity => Plane::AngleImpactVelocity,
            PlaneArg::AngleCollisionVelocity => Plane::AngleCollisionVelocity,
        }
    }
}

/// Flags of `oblique plot`.
#[derive(Debug, Args)]
#[command(after_help = "Examples:
  oblique plot --pair demo-al6061-on-cu --point 450m/s,10deg --point 380m/s,8deg -o window.svg
  oblique plot --flyer aa6061-t6 --parent ss304 --flyer-thickness 1mm --convention normal-to-flyer --plane angle-collision-velocity -o w.svg
Points and curve files are CSV with units in the header: velocity[m/s],angle[deg],label
(velocity is the impact velocity in the window's convention; label optional).
The extension of -o picks the format: .svg, or .png (1100 x 680, the SVG rasterised with the
bundled DejaVu Sans font) for slides.

--probability draws the 10 %, 50 % and 90 % lines of the weld probability under the stated scatter
(--velocity-sd, --angle-sd; model uncertainty on unless --model-uncertainty off), 256 draws per node
by default (--samples), the same draws at every node:
  oblique plot --pair demo-al6061-on-cu --probability --velocity-sd 5% --angle-sd 1deg -o p.svg")]
pub struct PlotArgs {
    /// Pair window from the library.
    #[arg(long, value_name = "NAME", conflicts_with_all = ["flyer", "parent", "flyer_thickness"])]
    pub pair: Option<String>,
    /// Flyer material id (without --pair).
    #[arg(long, value_name = "ID", required_unless_present = "pair")]
    pub flyer: Option<String>,
    /// Parent material id (without --pair).
    #[arg(long, value_name = "ID", required_unless_present = "pair")]
    pub parent: Option<String>,
    /// Flyer thickness (without --pair), e.g. 1mm.
    #[arg(long = "flyer-thickness", value_name = "LENGTH", allow_hyphen_values = true, value_parser = qarg::positive_length, required_unless_present = "pair")]
    pub flyer_thickness: Option<f64>,
    /// Convention (required without --pair).
    #[arg(long, value_enum, ignore_case = true)]
    pub convention: Option<ConventionArg>,
    /// Which plane to draw.
    #[arg(long, value_enum, ignore_case = true, default_value = "angle-velocity")]
    pub plane: PlaneArg,
    /// A proposed point VELOCITY,ANGLE, e.g. 320m/s,9deg (repeatable).
    #[arg(long = "point", value_name = "V,ANGLE", allow_hyphen_values = true, value_parser = qarg::point)]
    pub point: Vec<(f64, f64)>,
    /// Proposed points from a CSV file.
    #[arg(long, value_name = "FILE.csv")]
    pub points: Option<PathBuf>,
    /// A process curve from a CSV file (repeatable).
    #[arg(long = "curve", value_name = "FILE.csv")]
    pub curve: Vec<PathBuf>,
    /// Write each trial's shot number (its position in the pair file) beside it.
    #[arg(long = "shot-numbers")]
    pub shot_numbers: bool,
    /// Output file: .svg or .png (the extension picks the format).
    #[arg(short = 'o', long = "output", value_name = "OUT.svg|OUT.png")]
    pub output: PathBuf,
    /// Draw contours of the weld probability (10, 50, 90 %) under the stated scatter.
    #[arg(long)]
    pub probability: bool,
    #[command(flatten)]
    pub scatter: ScatterArgs,
}

/// The window for plot/report: a pair, or one made from flags.
pub fn window_from(
    dirs: &[PathBuf],
    pair: &Option<String>,
    flyer: &Option<String>,
    parent: &Option<String>,
    thickness: Option<f64>,
    convention: Option<ConventionArg>,
) -> CmdResult<PairWindow> {
    let lib = load_library(dirs)?;
    match pair {
        Some(name) => lib
            .pair(name)
            .cloned()
            .map_err(|m| Fail::input(format!("--pair: {m}"))),
        None => ad_hoc_window(
            &lib,
            &need(flyer.clone(), "--flyer", "a material id")?,
            &need(parent.clone(), "--parent", "a material id")?,
            need(thickness, "--flyer-thickness", "a length such as 1mm")?,
            None,
            need(
                convention,
                "--convention",
                "bisector, normal-to-flyer or normal-to-parent",
            )?
            .into(),
            None,
        ),
    }
}

pub fn run(dirs: &[PathBuf], a: PlotArgs) -> CmdResult {
    let format = output_format(
        "-o",
        &a.output,
        &[FileFormat::Svg, FileFormat::Png],
        Some(FileFormat::Svg),
    )?;
    let mut inputs: Vec<(&str, &Path)> = a
        .curve
        .iter()
        .map(|c| ("the input of --curve", c.as_path()))
        .collect();
    if let Some(p) = &a.points {
        inputs.push(("the input of --points", p.as_path()));
    }
    crate::common::distinct_outputs(&inputs, &[("-o", a.output.as_path())])?;
    let window = window_from(
        dirs,
        &a.pair,
        &a.flyer,
        &a.parent,
        a.flyer_thickness,
        a.convention,
    )?;
    let mut points: Vec<ProposedPoint> = a
        .point
        .iter()
        .enumerate()
        .map(|(i, (v, ang))| ProposedPoint::new(format!("P{}", i + 1), *v, *ang))
        .collect();
    if let Some(f) = &a.points {
        for (i, (v, ang, l)) in read_point_csv(f)?.into_iter().enumerate() {
            points.push(ProposedPoint::new(
                l.unwrap_or_else(|| format!("F{}", i + 1)),
                v,
                ang,
            ));
        }
    }
    let mut curves = Vec::new();
    for f in &a.curve {
        let pts = read_point_csv(f)?;
        if pts.len() < 2 {
            return Err(Fail::input(format!(
                "{}: a curve needs at least two rows",
                f.display()
            )));
        }
        curves.push(ProcessCurve {
            label: f
                .file_stem()
                .and_then(|s| s.to_str())
                .unwrap_or("curve")
                .to_string(),
            points: pts,
        });
    }
    let request = PlotRequest {
        window: &window,
        plane: a.plane.into(),
        points,
        curves,
        shot_numbers: a.shot_numbers,
    };
    if !a.probability && a.scatter.asked() {
        return Err(Fail::input(
            "--velocity-sd, --angle-sd, --samples, --seed and --model-uncertainty need --probability here",
        ));
    }
    let bytes = if a.probability {
        let mut overlay = oblique_render::probability::ProbabilityOverlay::new(
            a.scatter.scatter(),
            a.scatter
                .seed
                .unwrap_or(oblique_confidence::scatter::DEFAULT_SEED),
        );
        overlay.sampling = a
            .scatter
            .sampling(oblique_confidence::grid::DEFAULT_GRID_SAMPLES);
        if format == FileFormat::Png {
            oblique_render::probability::render_png(&request, &overlay)?
        } else {
            oblique_render::probability::render_svg(&request, &overlay)?.into_bytes()
        }
    } else if format == FileFormat::Png {
        oblique_render::window_plot::render_png(&request)?
    } else {
        render_svg(&request)?.into_bytes()
    };
    write_output(&a.output, &bytes)?;
    crate::common::said_where(&a.output, &format!("wrote {}\n", a.output.display()))
}
