//! `oblique demo`: an invented scenario run end to end on the built-in library.

use crate::cmd::load_library;
use crate::cmd::plot::write_output;
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, CAUTION};
use crate::plot::{render_svg, PlotRequest, ProposedPoint};
use crate::report::{command_line, html, json, ReportInput};
use clap::Args;
use oblique_core::units::{Angle, Velocity};
use oblique_core::Collision;
use oblique_window::agreement;
use oblique_window::boundary::Plane;
use oblique_window::classify::limit_label;
use std::path::PathBuf;

/// The demo's pair window (built in, invented data).
pub const DEMO_PAIR: &str = "demo-al6061-on-cu";

/// Flags of `oblique demo`.
#[derive(Debug, Args)]
#[command(
    after_help = "The scenario, its workshop, trials and candidate set-ups are INVENTED to show the workflow."
)]
pub struct DemoArgs {
    /// Folder for the plots and the report (created if missing).
    #[arg(long, value_name = "DIR", default_value = "oblique-demo")]
    pub out: PathBuf,
}

/// The invented candidate set-ups: (label, impact velocity m/s, collision angle deg, what it stands for).
pub const CANDIDATES: [(&str, f64, f64, &str); 3] = [
    ("A", 450.0, 10.0, "8 deg die taper, 1.5 mm standoff, 9 kV"),
    ("B", 380.0, 7.0, "6 deg die taper, 1.0 mm standoff, 8 kV"),
    ("C", 640.0, 12.0, "10 deg die taper, 2.5 mm standoff, 11 kV"),
];

pub fn run(dirs: &[PathBuf], a: DemoArgs) -> CmdResult {
    let lib = load_library(dirs)?;
    let window = lib
        .pair(DEMO_PAIR)
        .map_err(|m| Fail::other(format!("the built-in demo pair is missing: {m}")))?
        .clone();
    std::fs::create_dir_all(&a.out).map_err(|e| {
        Fail::input(format!(
            "--out {}: cannot create the folder: {e}",
            a.out.display()
        ))
    })?;
    let setup = window.setup()?;
    let mut s = String::new();
    s.push_str("oblique demo: an INVENTED scenario. The Harbourside Busbar Works (fictional) must choose a\n");
    s.push_str("magnetic pulse set-up to weld a 1.0 mm Al 6061-T6 tube onto a Cu C11000 rod. Its 16 trial\n");
    s.push_str("shots (fictional) are in the built-in pair window 'demo-al6061-on-cu'. Three candidate set-ups:\n\n");
    let mut points = Vec::new();
    let mut chosen = None;
    for (label, v, ang, what) in CANDIDATES {
        let col = Collision::from_impact(
            window.convention,
            Velocity::from_m_s(v),
            Angle::from_degrees(ang),
        )?;
        let c = oblique_window::classify::classify_explained(&window, &setup, &col)?;
        let binding = c
            .binding
            .as_ref()
            .map(|b| limit_label(&window, b))
            .unwrap_or_default();
        s.push_str(&format!(
            "  {label}  {v:.0} m/s at {ang:.0} deg  ({what}): {}, binding {binding}\n",
            if c.inside { "INSIDE" } else { "OUTSIDE" }
        ));
        points.push(ProposedPoint {
            label: label.to_string(),
            velocity_m_s: v,
            angle_rad: ang.to_radians(),
        });
        if c.inside && chosen.is_none() {
            chosen = Some((label, col, c));
        }
    }
    let Some((label, _col, c)) = chosen else {
        return Err(Fail::other("no demo candidate lies inside the demo window"));
    };
    let agr = agreement(&window)?;
    s.push_str(&format!("\ncandidate {label} is documented in the report. The window agrees with {} of its {} trials.\n\n", agr.agreeing, agr.observations));
    let p1 = a.out.join("window-angle-velocity.svg");
    let p2 = a.out.join("window-angle-collision-velocity.svg");
    let p3 = a.out.join("report.html");
    let p4 = a.out.join("report.json");
    for (plane, path) in [
        (Plane::AngleImpactVelocity, &p1),
        (Plane::AngleCollisionVelocity, &p2),
    ] {
        let svg = render_svg(&PlotRequest {
            window: &window,
            plane,
            points: points.clone(),
            curves: Vec::new(),
        })?;
        write_output(path, svg.as_bytes())?;
    }
    let others: Vec<ProposedPoint> = points
        .iter()
        .filter(|p| p.label != label)
        .cloned()
        .collect();
    let input = ReportInput {
        window: &window,
        classification: &c,
        agreement: &agr,
        library: &lib,
        command: command_line(),
        extra_points: others,
        curves: Vec::new(),
    };
    write_output(&p3, html(&input)?.as_bytes())?;
    let j = serde_json::to_string_pretty(&json(&input)).map_err(|e| Fail::other(e.to_string()))?;
    write_output(&p4, (j + "\n").as_bytes())?;
    s.push_str("wrote:\n");
    for p in [&p1, &p2, &p3, &p4] {
        s.push_str(&format!("  {}\n", p.display()));
    }
    s.push_str(&format!(
        "\nopen {} in a browser.\n{CAUTION}\n",
        p3.display()
    ));
    emit(&s)
}
