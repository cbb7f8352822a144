//! `oblique demo`: an invented scenario run end to end on the built-in library: a capacitor
//! bank and coil (machine files) give impact velocities for three candidate set-ups through
//! `oblique_setup`, each is checked against the pair window, the one with the most velocity
//! headroom is chosen, and the choice is documented in a decision record that lists the other
//! two with the reasons they were not chosen, with the plots.

use crate::common::{load_catalog, print_notes, record_provenance, write_output};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, CAUTION};
use clap::Args;
use oblique_core::units::{Angle, Length, Voltage};
use oblique_render::report::{html, json, ReportInput};
use oblique_render::window_plot::{
    render_svg, PlotRequest, PointRole, ProcessCurve, ProposedPoint,
};
use oblique_setup::{
    decide, magnetic_candidate, BankRequest, Charge, EstimateRequest, MagneticRequest, TubeRequest,
};
use oblique_window::boundary::Plane;
use std::path::PathBuf;

/// The demo's pair window (built in, invented data).
pub const DEMO_PAIR: &str = "demo-al6061-on-cu";
/// The demo's bank and coil (built in, invented).
pub const DEMO_BANK: &str = "harbourside-bank-300uf";
/// See [`DEMO_BANK`].
pub const DEMO_COIL: &str = "harbourside-coil-42mm";
/// Outer radius of the demo tube, m (invented).
const TUBE_OUTER_RADIUS_M: f64 = 0.020;

/// Flags of `oblique demo`.
#[derive(Debug, Args)]
#[command(
    after_help = "The scenario, its workshop, bank, coil, trials and candidate set-ups are INVENTED to show the workflow."
)]
pub struct DemoArgs {
    /// Folder for the plots and the report (created if missing).
    #[arg(long, value_name = "DIR", default_value = "oblique-demo")]
    pub out: PathBuf,
}

/// The invented candidate set-ups: (label, charging voltage kV, standoff mm, rod chamfer =
/// collision angle deg).
pub const CANDIDATES: [(&str, f64, f64, f64); 3] = [
    ("A", 7.0, 2.0, 10.0),
    ("B", 8.0, 1.0, 6.0),
    ("C", 9.0, 2.0, 10.0),
];

/// The estimate request of the demo tube at a voltage, standoff and chamfer.
fn request(kv: f64, standoff_mm: f64, deg: f64) -> EstimateRequest {
    let tube = TubeRequest {
        bank: BankRequest::machine(DEMO_BANK),
        coil: Some(DEMO_COIL.into()),
        tube_outer_radius: Some(Length::from_m(TUBE_OUTER_RADIUS_M)),
        ..TubeRequest::default()
    };
    let mut r = EstimateRequest::new(
        MagneticRequest::Tube(tube),
        Charge::Voltage(Voltage::from_v(kv * 1e3)),
        Length::from_m(standoff_mm * 1e-3),
    );
    r.pair = Some(DEMO_PAIR.into());
    r.angle = Some(Angle::from_degrees(deg));
    r
}

pub fn run(dirs: &[PathBuf], a: DemoArgs) -> CmdResult {
    let catalog = load_catalog(dirs)?;
    let window = catalog
        .library
        .pair(DEMO_PAIR)
        .map_err(|m| Fail::other(format!("the built-in demo pair is missing: {m}")))?;
    std::fs::create_dir_all(&a.out).map_err(|e| {
        Fail::input(format!(
            "--out {}: cannot create the folder: {e}",
            a.out.display()
        ))
    })?;
    let mut s = String::new();
    s.push_str("oblique demo: an INVENTED scenario. The Harbourside Busbar Works (fictional) must choose a magnetic\n");
    s.push_str("pulse set-up to weld a 1.0 mm Al 6061-T6 tube (20 mm outer radius) onto a Cu C11000 rod with its\n");
    s.push_str(&format!("bank '{DEMO_BANK}' and coil '{DEMO_COIL}' (built-in, invented). Its 16 trial shots (fictional)\n"));
    s.push_str(&format!("are in the built-in pair window '{DEMO_PAIR}'. Three candidate set-ups, impact velocity estimated\n"));
    s.push_str("by the coupled tube-compression model (efficiency not calibrated: an upper estimate), collision\n");
    s.push_str("angle from the rod chamfer:\n\n");
    let mut notes = Vec::new();
    let mut candidates = Vec::new();
    for (label, kv, gap, deg) in CANDIDATES {
        let c = magnetic_candidate(&catalog, label, &request(kv, gap, deg), &mut notes)?;
        let vp = c
            .point()
            .map_or("no impact".into(), |(v, _)| format!("{v:.0} m/s"));
        let head = c
            .headroom(window)
            .map_or_else(String::new, |h| format!("; {}", h.sentence()));
        s.push_str(&format!(
            "  {label}  {kv:.0} kV, standoff {gap:.1} mm, chamfer {deg:.0} deg -> Vp {vp}: {}{head}\n",
            c.verdict(window)
        ));
        candidates.push(c);
    }
    notes.sort();
    notes.dedup();
    print_notes(&notes);
    let decision = decide(window, candidates, None)?;
    let chosen = &decision.chosen;
    // The process curve of the chosen standoff and chamfer: velocity against charging voltage.
    let (_, _, gap, deg) = CANDIDATES
        .iter()
        .copied()
        .find(|c| c.0 == chosen.label)
        .unwrap_or(CANDIDATES[0]);
    let mut curve = Vec::new();
    for kv in [6.0, 6.5, 7.0, 7.5, 8.0, 8.5, 9.0, 9.5, 10.0] {
        let mut n = Vec::new();
        let c = magnetic_candidate(&catalog, "curve", &request(kv, gap, deg), &mut n)?;
        if let Some((v, a)) = c.point() {
            let tag = (kv == 6.0 || kv == 10.0).then(|| format!("{kv:.0} kV"));
            curve.push((v, a, tag));
        }
    }
    let curves = vec![ProcessCurve {
        label: format!("standoff {gap:.0} mm, chamfer {deg:.0} deg, 6 to 10 kV"),
        points: curve,
    }];
    let agreement = oblique_window::agreement(window)?;
    s.push_str(&format!(
        "\ncandidate {} is chosen: {}.\n",
        chosen.label,
        decision.rule.text()
    ));
    for alt in &decision.alternatives {
        s.push_str(&format!(
            "  {} not chosen: {}\n",
            alt.candidate.label, alt.reason
        ));
    }
    let outside = agreement.outside_domain.len();
    s.push_str(&format!(
        "The window agrees with {} of the {} trials inside its validity domain{}.\n\n",
        agreement.agreeing,
        agreement.observations - outside,
        if outside > 0 {
            format!("; {outside} more lie(s) outside it, where no verdict is claimed")
        } else {
            String::new()
        }
    ));
    let p1 = a.out.join("window-angle-velocity.svg");
    let p2 = a.out.join("window-angle-collision-velocity.svg");
    let p3 = a.out.join("report.html");
    let p4 = a.out.join("report.json");
    let mut points = Vec::new();
    for (c, role) in std::iter::once((chosen, PointRole::Chosen)).chain(
        decision
            .alternatives
            .iter()
            .map(|x| (&x.candidate, PointRole::Alternative)),
    ) {
        if let Some((v, ang)) = c.point() {
            points.push(ProposedPoint::new(c.label.clone(), v, ang).with_role(role));
        }
    }
    for (plane, path) in [
        (Plane::AngleImpactVelocity, &p1),
        (Plane::AngleCollisionVelocity, &p2),
    ] {
        let mut req = PlotRequest::new(window, plane);
        req.points = points.clone();
        req.curves = curves.clone();
        write_output(path, render_svg(&req)?.as_bytes())?;
    }
    let files = oblique_setup::decision::files_used(&catalog, window, &decision);
    let references = oblique_window::references::References::builtin().map_err(Fail::other)?;
    let input = ReportInput {
        window,
        decision: &decision,
        agreement: &agreement,
        question: Some("Which of the candidate set-ups A, B and C (invented) should the Harbourside Busbar Works (fictional) use to weld its 1.0 mm Al 6061-T6 tube onto the Cu C11000 rod, and why not the others?".into()),
        curves,
        provenance: record_provenance(files, Some("oblique demo (invented scenario)".into()), None)?,
        // Under the scatter the set-up implies: the uncalibrated efficiency's wide velocity
        // spread and 1 deg on the angle, model uncertainty on.
        probability: crate::common::chosen_probability(
            window,
            &decision,
            &crate::args::ScatterArgs::default(),
            true,
        )?,
        alternative_probabilities: crate::common::alternative_probabilities(
            window,
            &decision,
            &crate::args::ScatterArgs::default(),
            true,
        )?,
        references: &references,
    };
    if let Some(p) = &input.probability {
        s.push_str(&format!(
            "weld probability of the chosen set-up: {:.0} %, with the wide velocity scatter of a bank whose efficiency is not calibrated, 1 deg of scatter on the angle and the model's own uncertainty (the choice above is by headroom, not by this number; the record says what it assumes and what dominates the doubt)\n",
            100.0 * p.value
        ));
    }
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
