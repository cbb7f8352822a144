//! `oblique check`: one process point against the window criteria (or a pair window).

use crate::args::PointArgs;
use crate::common::{classify_given, load_library, point_probability, window_from};
use crate::fail::{CmdResult, Fail};
use crate::output::{classification_json, classification_text, emit, emit_json};
use crate::qarg;
use clap::Args;
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
`oblique explain` with the same flags shows every step from these inputs to the verdict.

Exit status: 0 when the check ran (inside or not), 2 on bad input.
Screening only, never a guarantee: lethal voltages, stored energy, explosives and flying parts are
involved in every real shot; follow local codes and licensed practice.")]
pub struct CheckArgs {
    #[command(flatten)]
    pub point: PointArgs,
    /// Print JSON (SI values, keys with unit suffixes) instead of the table.
    #[arg(long)]
    pub json: bool,
}

pub fn run(dirs: &[PathBuf], a: CheckArgs) -> CmdResult {
    let lib = load_library(dirs)?;
    let p = &a.point;
    let is_pair = p.window.pair.is_some();
    let (window, fitted_note) = window_from(&lib, &p.window)?;
    if qarg::is_head_on(p.angle) {
        return head_on(&window, &a);
    }
    let (point, c) = classify_given(&window, p.window.convention, &p.velocity, p.angle)?;
    let probability = point_probability(&window, &point, p)?;
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
            if !is_pair {
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
                        "cautions": f.cautions(&window.name, window.observations.len()),
                    }),
                );
            }
            if let Some(p) = &probability {
                o.insert("probability".into(), p.json());
            }
        }
        return emit_json(&v);
    }
    let mut text = converted.unwrap_or_default() + &classification_text(&window, &c, is_pair);
    if let Some(n) = fitted_note {
        text.push_str(&n);
    }
    if let Some(p) = &probability {
        text.push('\n');
        text.push_str(&p.text());
    }
    emit(&text)
}

/// A head-on impact (`--angle 0deg`): not welded, with the 1-D impact state.
fn head_on(window: &oblique_window::PairWindow, a: &CheckArgs) -> CmdResult {
    let Some(vp) = a.point.velocity.velocity else {
        return Err(Fail::input(
            "--collision-velocity: a head-on impact (--angle 0deg) has no collision point; give the impact velocity with --velocity",
        ));
    };
    let h = oblique_window::classify::classify_head_on(window, &window.setup()?, vp)?;
    if a.json {
        let mut v = head_on_json(window, &h);
        if let Some(o) = v.as_object_mut() {
            if a.point.window.pair.is_none() {
                o.insert("pair".into(), serde_json::Value::Null);
            }
        }
        return emit_json(&v);
    }
    emit(&head_on_text(window, &h, a.point.window.pair.is_some()))
}
