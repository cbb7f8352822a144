//! `oblique check`: one process point against the window criteria (or a pair window).

use crate::args::{ConstantArgs, ConventionArg, VelocityInput};
use crate::common::{ad_hoc_window, classify_given, load_library, need};
use crate::fail::{CmdResult, Fail};
use crate::output::{classification_json, emit, emit_json, fmt_margin, fmt_value, table, CAUTION};
use crate::qarg;
use clap::Args;
use oblique_core::units::Length;
use oblique_window::classify::{limit_advice, limit_label, Classification, LimitRef};
use oblique_window::PairWindow;
use std::path::PathBuf;

/// Flags of `oblique check`.
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

pub fn run(dirs: &[PathBuf], a: CheckArgs) -> CmdResult {
    let lib = load_library(dirs)?;
    let mut window = match &a.pair {
        Some(name) => lib
            .pair(name)
            .map_err(|m| Fail::input(format!("--pair: {m}")))?
            .clone(),
        None => {
            let convention = need(
                a.convention,
                "--convention",
                "bisector, normal-to-flyer or normal-to-parent (the convention is never guessed)",
            )?;
            ad_hoc_window(
                &lib,
                &need(a.flyer.clone(), "--flyer", "a material id")?,
                &need(a.parent.clone(), "--parent", "a material id")?,
                need(
                    a.flyer_thickness,
                    "--flyer-thickness",
                    "a length such as 1mm",
                )?,
                a.parent_thickness,
                convention.into(),
            )?
        }
    };
    if let Some(t) = a.parent_thickness {
        window.parent_thickness = Some(Length::from_m(t));
    }
    window.criteria = a.constants.apply(window.criteria.clone());
    let (point, c) = classify_given(&window, a.convention, &a.velocity, a.angle)?;
    // A point given in another convention than the window's is re-expressed in the window's
    // (same Vc and beta, so the same collision); say so, with the value as given.
    let converted = (point.convention != window.convention).then(|| {
        format!(
            "note: the point was given in the {} convention (Vp {:.1} m/s, Vc {:.1} m/s) and is checked in the window's {} convention (same Vc and angle, Vp {:.1} m/s)\n",
            point.convention,
            point.impact_velocity.si(),
            point.collision_velocity.si(),
            window.convention,
            c.evaluation.collision.impact_velocity.si()
        )
    });
    if a.json {
        let mut v = classification_json(&window, &c);
        if let Some(o) = v.as_object_mut() {
            if a.pair.is_none() {
                o.insert("pair".into(), serde_json::Value::Null);
            }
            o.insert(
                "input_convention".into(),
                serde_json::json!(point.convention.as_str()),
            );
            o.insert(
                "input_impact_velocity_m_s".into(),
                crate::output::sig(point.impact_velocity.si()),
            );
        }
        return emit_json(&v);
    }
    emit(&(converted.unwrap_or_default() + &human(&window, &c, a.pair.is_some())))
}

/// The two headroom cells of a limit: the impact velocity at this angle and the angle at this
/// impact velocity where the limit is reached, with the change (rounded to the safe side).
fn headroom_cells(window: &PairWindow, c: &Classification, limit: &LimitRef) -> (String, String) {
    (
        oblique_window::margin::velocity_headroom(window, c, limit)
            .map_or("-".into(), |x| x.cell()),
        oblique_window::margin::angle_headroom(window, c, limit).map_or("-".into(), |x| x.cell()),
    )
}

/// The human report of a classification.
pub fn human(window: &PairWindow, c: &Classification, is_pair: bool) -> String {
    let e = &c.evaluation;
    let col = &e.collision;
    let mut s = String::new();
    let pair_note = if is_pair {
        format!(" (pair window '{}')", window.name)
    } else {
        String::new()
    };
    s.push_str(&format!(
        "{} flyer, {:.2} mm, on {} parent{}; convention {}\n\n",
        window.flyer.material.id,
        window.flyer_thickness.mm(),
        window.parent.material.id,
        pair_note,
        col.convention
    ));
    let jet_note = match e.jetting.regime {
        oblique_core::jetting::JettingRegime::SubsonicParent => {
            "subsonic: Vc below C0 of the parent, jet at any angle"
        }
        oblique_core::jetting::JettingRegime::SubsonicFlyer => {
            "subsonic: Vf below C0 of the flyer, jet at any angle"
        }
        oblique_core::jetting::JettingRegime::Supersonic => {
            "supersonic inflow: shock-polar construction"
        }
    };
    let rows = vec![
        vec![
            "impact velocity Vp".into(),
            format!("{:.1} m/s", col.impact_velocity.si()),
            String::new(),
        ],
        vec![
            "collision angle beta".into(),
            format!("{:.2} deg", col.angle.degrees()),
            String::new(),
        ],
        vec![
            "collision-point velocity Vc".into(),
            format!("{:.1} m/s", col.collision_velocity.si()),
            String::new(),
        ],
        vec![
            "flow velocity Vf".into(),
            format!("{:.1} m/s", col.flow_velocity.si()),
            "flyer inflow, collision-point frame".into(),
        ],
        vec![
            "impact pressure".into(),
            format!("{:.2} GPa", e.impact.pressure.gpa()),
            "1-D impedance matching at Vp".into(),
        ],
        vec![
            "jetting critical angle".into(),
            format!("{:.2} deg", e.jetting.critical_angle.degrees()),
            jet_note.into(),
        ],
        vec![
            "interface wavelength".into(),
            format!("{:.3} mm", e.wavelength.mm()),
            "26 h sin^2(beta/2)".into(),
        ],
        vec![
            "dissipated energy".into(),
            format!("{:.3e} J/m^2", e.dissipated_energy.si()),
            if window.parent_thickness.is_some() {
                "inelastic normal collision".into()
            } else {
                "massive parent assumed".into()
            },
        ],
    ];
    s.push_str(&table(&["quantity", "value", "note"], &rows));
    s.push('\n');
    let mut crit_rows = Vec::new();
    for r in &e.criteria {
        let consts = r.constants_text("=");
        crit_rows.push(vec![
            r.id.as_str().to_string(),
            fmt_value(r.value, r.unit),
            format!(
                "{} {}",
                if r.kind == oblique_core::LimitKind::Lower {
                    ">="
                } else {
                    "<="
                },
                fmt_value(r.limit, r.unit)
            ),
            fmt_margin(r.margin, r.unit),
            if r.informational {
                "info".into()
            } else if r.satisfied {
                "yes".into()
            } else {
                "NO".into()
            },
            r.governing.as_str().into(),
            headroom_cells(window, c, &LimitRef::Criterion(r.id)).0,
            headroom_cells(window, c, &LimitRef::Criterion(r.id)).1,
            consts.join(" "),
        ]);
    }
    for (bi, (r, b)) in c.boundaries.iter().zip(&window.boundaries).enumerate() {
        crit_rows.push(vec![
            format!("boundary \"{}\"", r.label),
            String::new(),
            r.limit.map_or("-".into(), |l| {
                format!(
                    "{} {}",
                    if matches!(
                        b.weld_side,
                        oblique_window::boundary::WeldSide::Above
                            | oblique_window::boundary::WeldSide::Right
                    ) {
                        ">="
                    } else {
                        "<="
                    },
                    fmt_value(l, r.unit)
                )
            }),
            r.margin
                .map_or("outside trial data".into(), |m| fmt_margin(m, r.unit)),
            match r.satisfied {
                Some(true) => "yes".into(),
                Some(false) => "NO".into(),
                None => "n/a".into(),
            },
            "user".into(),
            headroom_cells(window, c, &LimitRef::Boundary(bi)).0,
            headroom_cells(window, c, &LimitRef::Boundary(bi)).1,
            b.plane.as_str().into(),
        ]);
    }
    s.push_str(&table(
        &[
            "limit",
            "value",
            "limit",
            "margin at this point",
            "ok",
            "governs",
            "velocity headroom",
            "angle headroom",
            "constants",
        ],
        &crit_rows,
    ));
    s.push_str("  (velocity headroom: where the limit is reached along the impact velocity at this angle, and the change from the point; angle headroom: the same along the angle at this velocity; margin at this point: value - limit at this Vc)\n");
    s.push_str(&format!("  ({})\n", oblique_window::margin::ROUNDING_RULE));
    s.push('\n');
    let verdict = match (c.inside, c.outside_trial_data) {
        (true, false) => "INSIDE the window",
        (true, true) => "INSIDE the model limits and the boundaries that span this point, but OUTSIDE the trial data",
        (false, _) => "OUTSIDE the window",
    };
    s.push_str(&format!("verdict: {verdict}\n"));
    if c.inside {
        if let Some(v) = oblique_window::margin::verdict_velocity_headroom(window, c) {
            s.push_str(&format!("{}\n", v.sentence()));
        }
    } else if let Some(b) = &c.binding {
        s.push_str(&format!(
            "binding: {}: {}\n",
            limit_label(window, b),
            limit_advice(window, c, b)
        ));
    }
    for f in c.failing.iter().filter(|f| Some(*f) != c.binding.as_ref()) {
        s.push_str(&format!(
            "also failing: {}: {}\n",
            limit_label(window, f),
            limit_advice(window, c, f)
        ));
    }
    if let Some(t) = oblique_window::classify::inside_stretch_text(c) {
        s.push_str(&format!("where the window is: {t}\n"));
    }
    if c.outside_trial_data {
        s.push_str("note: the point lies outside the span of at least one user boundary (outside the trial data); that boundary was not extrapolated\n");
    }
    s.push_str(CAUTION);
    s.push('\n');
    s
}
