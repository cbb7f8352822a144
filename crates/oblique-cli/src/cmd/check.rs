//! `oblique check`: one process point against the window criteria (or a pair window).

use crate::args::{ConstantArgs, ConventionArg, ProcessArg, ScatterArgs, VelocityInput};
use crate::common::{ad_hoc_window, classify_given, load_library, need, refuse_empty_window};
use crate::fail::{CmdResult, Fail};
use crate::output::{classification_json, classification_text, emit, emit_json};
use crate::qarg;
use clap::Args;
use oblique_core::units::Length;
use oblique_window::present::{head_on_json, head_on_text};
use std::path::PathBuf;

/// Flags of `oblique check`.
#[derive(Debug, Args)]
#[command(after_help = "Examples:
  oblique check --flyer aa6061-t6 --parent cu-c11000 --flyer-thickness 1mm --velocity 350m/s --angle 12deg --convention normal-to-flyer
  oblique check --flyer aa6061-t6 --parent ss304 --flyer-thickness 1mm --collision-velocity 2.4km/s --angle 10deg --convention bisector --deribas-k 1.0 --json
  oblique check --pair demo-al6061-on-cu --velocity 320m/s --angle 9deg
  oblique check --pair demo-al6061-on-cu --velocity 450m/s --angle 10deg \\
      --velocity-sd 5% --angle-sd 1deg
  oblique check --flyer ti-gr2 --parent cu-c11000 --flyer-thickness 0.127mm --velocity 900m/s --angle 0deg --convention normal-to-flyer --process laser

With --velocity-sd, --angle-sd (or --samples, --seed, --model-uncertainty) the weld probability is
estimated by sampling: the stated scatter, and (model uncertainty on, the default) the criterion
constants and material properties from the distributions of docs/theory.md section 15. The
probability is conditional on the model and on those distributions.

A point outside the validity domain (docs/theory.md §7.1: collision angle up to 30 deg, Vp 50 to
2000 m/s, Vc and Vf up to 2 C0, flyer 10 um to 50 mm) gets no verdict: OUTSIDE THE VALIDITY
DOMAIN. An angle of 0 is a head-on impact: not welded, no collision point sweeps the interface.

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
    /// Dynamic collision angle beta, from 0 (a head-on impact) to below 90 deg, e.g. 12deg.
    #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle_or_head_on)]
    pub angle: f64,
    /// How Vp relates to Vc: bisector, normal-to-flyer or normal-to-parent (required unless --pair gives it).
    #[arg(long, value_enum, value_name = "CONVENTION")]
    pub convention: Option<ConventionArg>,
    /// The welding process, for a check without --pair: sets whether the pressure limit is on
    /// (off for explosive welding; default: on, its source states it for magnetic pulse welding).
    #[arg(long, value_enum, value_name = "PROCESS", conflicts_with = "pair")]
    pub process: Option<ProcessArg>,
    #[command(flatten)]
    pub constants: ConstantArgs,
    #[command(flatten)]
    pub scatter: ScatterArgs,
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
                a.process.map(ProcessArg::as_str),
            )?
        }
    };
    if let Some(t) = a.parent_thickness {
        window.parent_thickness = Some(Length::from_m(t));
    }
    let fitted_note = fitted_note(&window, &a.constants);
    window.criteria = a.constants.apply(window.criteria.clone());
    refuse_empty_window(&window, &a.constants)?;
    if qarg::is_head_on(a.angle) {
        return head_on(&window, &a);
    }
    let (point, c) = classify_given(&window, a.convention, &a.velocity, a.angle)?;
    let probability = if a.scatter.asked() {
        let p = oblique_confidence::Point {
            convention: point.convention,
            velocity: match (a.velocity.velocity, a.velocity.collision_velocity) {
                (Some(v), _) => oblique_confidence::PointVelocity::Impact(v),
                (None, Some(v)) => oblique_confidence::PointVelocity::Collision(v),
                (None, None) => {
                    oblique_confidence::PointVelocity::Impact(point.impact_velocity.si())
                }
            },
            angle_rad: a.angle,
        };
        Some(oblique_confidence::weld_probability(
            &window,
            &p,
            &a.scatter.scatter(),
            &a.scatter
                .sampling(oblique_confidence::scatter::DEFAULT_SAMPLES),
        )?)
    } else {
        None
    };
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
            if let Some(f) = &window.fitted {
                o.insert(
                    "fitted".into(),
                    serde_json::json!({
                        "summary": f.summary(),
                        "date": f.date,
                        "observations": f.observations,
                        "constants": f.constants().map(|(k, v)| (k.to_string(), serde_json::json!({
                            "value": v.value, "low": v.low, "high": v.high,
                        }))).collect::<serde_json::Map<_, _>>(),
                        "overridden_by_flags": fitted_note.as_ref().is_some_and(|n| n.contains("overrides")),
                        "cautions": f.cautions(window.observations.len()),
                    }),
                );
            }
            if let Some(p) = &probability {
                o.insert("probability".into(), p.json());
            }
        }
        return emit_json(&v);
    }
    let mut text =
        converted.unwrap_or_default() + &classification_text(&window, &c, a.pair.is_some());
    if let Some(n) = fitted_note {
        text.push_str(&n);
    }
    if let Some(p) = &probability {
        text.push('\n');
        text.push_str(&p.text());
    }
    emit(&text)
}

/// "constants fitted to N trials ...", with each fitted constant and its interval, and a word
/// when a flag overrides one.
fn fitted_note(window: &oblique_window::PairWindow, flags: &ConstantArgs) -> Option<String> {
    let f = window.fitted.as_ref()?;
    let mut s = format!("constants {}:", f.summary());
    for (key, v) in f.constants() {
        s.push_str(&format!(
            " {key} {} ({} % interval {})",
            oblique_confidence::present::num(v.value),
            oblique_confidence::present::num(100.0 * f.level),
            oblique_confidence::present::interval(v.low, v.high)
        ));
        let overridden = match key {
            "deribas_k" => flags.deribas_k.is_some(),
            "wittman_n" => flags.wittman_n.is_some(),
            "hel_multiple" => flags.hel_multiple.is_some(),
            _ => false,
        };
        if overridden {
            s.push_str(" [the flag overrides it]");
        }
        s.push(';');
    }
    s.pop();
    s.push('\n');
    for c in f.cautions(window.observations.len()) {
        s.push_str(&format!("  caution: {c}\n"));
    }
    Some(s)
}

/// A head-on impact (`--angle 0deg`): not welded, with the 1-D impact state.
fn head_on(window: &oblique_window::PairWindow, a: &CheckArgs) -> CmdResult {
    let Some(vp) = a.velocity.velocity else {
        return Err(Fail::input(
            "--collision-velocity: a head-on impact (--angle 0deg) has no collision point; give the impact velocity with --velocity",
        ));
    };
    let h = oblique_window::classify::classify_head_on(window, &window.setup()?, vp)?;
    if a.json {
        let mut v = head_on_json(window, &h);
        if let Some(o) = v.as_object_mut() {
            if a.pair.is_none() {
                o.insert("pair".into(), serde_json::Value::Null);
            }
        }
        return emit_json(&v);
    }
    emit(&head_on_text(window, &h, a.pair.is_some()))
}
