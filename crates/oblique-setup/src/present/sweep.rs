//! A sweep as text (the velocity grid and the ranking), JSON, and one CSV per standoff.

use super::{assumptions_value, inputs_json, inputs_table};
use crate::human;
use crate::sweep::{Setting, SweepRanking};
use oblique_core::process::ImpactOutcome;
use oblique_window::classify::limit_label;
use oblique_window::present::{sig, table, CAUTION};
use oblique_window::PairWindow;
use serde_json::{json, Map, Value};
use std::path::Path;

/// Settings at most in the printed velocity grid: rows (voltages) and columns (standoffs).
const MAX_PRINTED: (usize, usize) = (40, 12);

fn point_json(r: &SweepRanking<'_>, s: &Setting) -> Value {
    let grid = &r.grid;
    let (i, j) = (s.voltage_index, s.standoff_index);
    let mut p = Map::new();
    p.insert("charge_voltage_v".into(), sig(grid.voltages[i]));
    p.insert(
        "stored_energy_j".into(),
        sig(r.stored_energy(grid.voltages[i])),
    );
    p.insert("standoff_m".into(), sig(grid.standoffs[j]));
    p.insert(
        "angle_deg".into(),
        grid.angles
            .as_ref()
            .map_or(Value::Null, |a| sig(a[j].to_degrees())),
    );
    if let Some(pr) = &r.probability {
        let k = i * grid.standoffs.len() + j;
        p.insert(
            "weld_probability".into(),
            pr.per_setting
                .get(k)
                .copied()
                .flatten()
                .map_or(Value::Null, |x| json!(x)),
        );
    }
    match r.result.point(i, j).map(|p| p.outcome) {
        Some(ImpactOutcome::Impact {
            time,
            velocity,
            after_first_half_wave,
        }) => {
            p.insert("impact_velocity_m_s".into(), sig(velocity.si()));
            p.insert("impact_time_s".into(), sig(time.si()));
            p.insert(
                "impact_after_first_half_wave".into(),
                json!(after_first_half_wave),
            );
            p.insert("no_impact_reason".into(), Value::Null);
        }
        Some(ImpactOutcome::NoImpact { reason, .. }) => {
            p.insert("impact_velocity_m_s".into(), Value::Null);
            p.insert("impact_time_s".into(), Value::Null);
            p.insert("impact_after_first_half_wave".into(), Value::Null);
            p.insert("no_impact_reason".into(), json!(reason));
        }
        None => {}
    }
    match (&s.check, r.window) {
        (Some(k), Some(w)) => {
            p.insert("inside".into(), json!(k.inside));
            p.insert("outside_trial_data".into(), json!(k.beyond_trial_data(w)));
            p.insert("prediction".into(), json!(k.prediction.as_str()));
            p.insert(
                "binding".into(),
                json!(k.binding.as_ref().map(|b| limit_label(w, b))),
            );
            p.insert(
                "binding_relative_margin".into(),
                k.binding_relative_margin.map_or(Value::Null, sig),
            );
            // The same rounded figures as the ranking table (oblique_window::margin).
            let first =
                oblique_window::margin::verdict_velocity_headroom(w, k).filter(|_| k.inside);
            p.insert(
                "verdict_change_impact_velocity_m_s".into(),
                first.as_ref().map_or(Value::Null, |a| json!(a.reached_at)),
            );
            p.insert(
                "velocity_headroom".into(),
                first
                    .as_ref()
                    .map_or(Value::Null, oblique_window::margin::Along::json),
            );
            p.insert(
                "jetting_mixed".into(),
                json!(k.evaluation.jetting.is_mixed()),
            );
            p.insert(
                "jetting_supersonic".into(),
                json!(k.evaluation.jetting.any_supersonic()),
            );
            p.insert("domain_inside".into(), json!(k.domain.inside()));
        }
        _ => {
            p.insert("inside".into(), Value::Null);
            p.insert("prediction".into(), Value::Null);
            p.insert("binding".into(), Value::Null);
            p.insert("binding_relative_margin".into(), Value::Null);
        }
    }
    Value::Object(p)
}

/// A sweep as JSON: the grid, every setting, the ranked settings inside, the inputs.
#[must_use]
pub fn sweep_json(r: &SweepRanking<'_>) -> Value {
    let grid = &r.grid;
    let mut o = Map::new();
    o.insert("model".into(), json!(r.model.id()));
    o.insert("pair".into(), json!(r.window.map(|w| w.name.clone())));
    o.insert(
        "grid_from".into(),
        json!(if grid.from_energy {
            "energy"
        } else {
            "charge-voltage"
        }),
    );
    o.insert(
        "charge_voltages_v".into(),
        json!(grid.voltages.iter().map(|u| sig(*u)).collect::<Vec<_>>()),
    );
    o.insert(
        "stored_energies_j".into(),
        json!(grid
            .voltages
            .iter()
            .map(|u| sig(r.stored_energy(*u)))
            .collect::<Vec<_>>()),
    );
    o.insert(
        "standoffs_m".into(),
        json!(grid.standoffs.iter().map(|g| sig(*g)).collect::<Vec<_>>()),
    );
    o.insert(
        "angles_deg".into(),
        grid.angles.as_ref().map_or(Value::Null, |a| {
            json!(a.iter().map(|x| sig(x.to_degrees())).collect::<Vec<_>>())
        }),
    );
    o.insert(
        "points".into(),
        Value::Array(r.settings.iter().map(|s| point_json(r, s)).collect()),
    );
    o.insert("inside_count".into(), json!(r.ranked.len()));
    o.insert(
        "inside_ranked".into(),
        Value::Array(r.inside_ranked().map(|s| point_json(r, s)).collect()),
    );
    o.insert("ranking".into(), json!(ranking_words(r)));
    o.insert(
        "rounding".into(),
        json!(oblique_window::margin::ROUNDING_RULE),
    );
    if let Some(pr) = &r.probability {
        o.insert(
            "probability".into(),
            json!({
                "scatter": {
                    "velocity_sd": pr.scatter.velocity,
                    "angle_sd_deg": pr.scatter.angle.map(|a| a.degrees()),
                    "model_uncertainty": pr.scatter.model,
                },
                "velocity_spread_basis": pr.basis,
                "samples_per_setting": pr.samples,
                "seed": pr.seed,
                "caution": oblique_confidence::present::CAUTION,
            }),
        );
    }
    o.insert(
        "assumptions".into(),
        assumptions_value(r.model.assumptions()),
    );
    inputs_json(&r.inputs, &mut o);
    o.insert("warnings".into(), json!(r.inputs.efficiency_warnings()));
    o.insert("caution".into(), json!(CAUTION));
    Value::Object(o)
}

/// The velocity grid: one row per charging voltage, one column per standoff.
fn velocity_grid(r: &SweepRanking<'_>) -> String {
    let grid = &r.grid;
    let mut header = vec!["U0".to_string(), "E0".to_string()];
    for (j, g) in grid.standoffs.iter().enumerate() {
        header.push(match &grid.angles {
            Some(a) => format!("{} @ {} deg", human::mm(*g), human::g(a[j].to_degrees())),
            None => human::mm(*g),
        });
    }
    let mut trows = Vec::new();
    for (i, u) in grid.voltages.iter().enumerate() {
        let mut row = vec![human::kv(*u), human::kj(r.stored_energy(*u))];
        for j in 0..grid.standoffs.len() {
            let cell = match r.result.point(i, j).map(|p| p.outcome) {
                Some(ImpactOutcome::Impact {
                    velocity,
                    after_first_half_wave,
                    ..
                }) => {
                    let check = r.setting(i, j).check.as_ref();
                    let mark = match check {
                        Some(k) if k.inside && r.window.is_some_and(|w| k.beyond_trial_data(w)) => {
                            " in?"
                        }
                        Some(k) if k.inside => " in",
                        Some(k) if !k.domain.inside() => " dom",
                        Some(_) => " out",
                        None => "",
                    };
                    let mixed = if check.is_some_and(|k| k.evaluation.jetting.is_mixed()) {
                        "~"
                    } else {
                        ""
                    };
                    format!(
                        "{:.0}{}{mark}{mixed}",
                        velocity.si(),
                        if after_first_half_wave { "*" } else { "" }
                    )
                }
                _ => "no impact".into(),
            };
            row.push(cell);
        }
        trows.push(row);
    }
    let hdr: Vec<&str> = header.iter().map(String::as_str).collect();
    let mut out = String::from(
        "impact velocity Vp [m/s] by charging voltage (rows) and standoff (columns)\n",
    );
    out.push_str(&table(&hdr, &trows));
    out.push_str("  (in/out: inside or outside the pair window at the angle shown; in?: inside the model limits and the boundaries that reach it, but outside the trial data (a user boundary does not span it, or no trial was fired near it: `oblique check` says which); dom: outside the validity domain, no verdict claimed (docs/theory.md §7.1); ~ jetting in the mixed regime, one plate supersonic, which no source covers (docs/theory.md §4.3); * impact after the first current zero)\n\n");
    out
}

/// How the settings inside are ranked, in words.
fn ranking_words(r: &SweepRanking<'_>) -> String {
    match &r.probability {
        Some(p) => format!(
            "settings inside the window, by weld probability (to 1 %; {}; the same {} draws for every setting), ties by velocity headroom (how far the impact velocity can move at the same angle before the limit reached first is reached, in % of Vp), largest first",
            p.scatter.text(),
            p.samples
        ),
        None => "settings inside the window, by velocity headroom (how far the impact velocity can move at the same angle before the limit reached first is reached, in % of Vp), largest first".into(),
    }
}

/// The ranking of the settings inside the window (the first `top`).
fn ranking_table(r: &SweepRanking<'_>, w: &PairWindow, top: usize) -> String {
    let grid = &r.grid;
    let mut out = format!(
        "{} of {} settings land inside pair window {}",
        r.ranked.len(),
        r.settings.len(),
        w.name
    );
    let beyond = r
        .inside_ranked()
        .filter(|s| s.check.as_ref().is_some_and(|k| k.beyond_trial_data(w)))
        .count();
    if beyond > 0 {
        out.push_str(&format!(
            " ({beyond} of them outside the trial data: in? above)"
        ));
    }
    if r.ranked.is_empty() {
        out.push_str(".\n");
        return out;
    }
    out.push_str(&format!(
        "; ranked by {} (top {}):\n",
        ranking_words(r).trim_start_matches("settings inside the window, by "),
        top.min(r.ranked.len())
    ));
    if let Some(p) = &r.probability {
        out.push_str(&format!("  velocity spread: {}\n", p.basis));
    }
    let mut trows = Vec::new();
    for (n, s) in r.inside_ranked().take(top).enumerate() {
        let v = r.velocity(s).unwrap_or(0.0);
        let k = s.voltage_index * grid.standoffs.len() + s.standoff_index;
        trows.push(vec![
            format!("{}", n + 1),
            r.probability
                .as_ref()
                .and_then(|p| p.per_setting.get(k).copied().flatten())
                .map_or("-".into(), |x| format!("{:.0} %", 100.0 * x)),
            human::kv(grid.voltages[s.voltage_index]),
            human::kj(r.stored_energy(grid.voltages[s.voltage_index])),
            human::mm(grid.standoffs[s.standoff_index]),
            r.angle(s).map_or(String::new(), |a| {
                format!("{} deg", human::g(a.to_degrees()))
            }),
            format!("{v:.0} m/s"),
            s.limit_reached
                .as_ref()
                .map_or_else(|| "-".into(), |b| limit_label(w, b)),
            s.check
                .as_ref()
                .and_then(|k| oblique_window::margin::verdict_velocity_headroom(w, k))
                .map_or("not within Vp/20..20 Vp".into(), |a| a.cell()),
        ]);
    }
    out.push_str(&table(
        &[
            "rank",
            "P(weld)",
            "U0",
            "E0",
            "standoff",
            "angle",
            "Vp",
            "limit reached first",
            "velocity headroom",
        ],
        &trows,
    ));
    out.push_str(&format!("  ({})\n", oblique_window::margin::ROUNDING_RULE));
    out
}

/// A sweep as text: inputs, velocity grid, the ranking of the first `top` settings inside,
/// where the plot (`plot`) and the curves (`curves_dir`) were written, warnings, assumptions
/// and the caution.
#[must_use]
pub fn sweep_text(
    r: &SweepRanking<'_>,
    top: usize,
    plot: Option<&Path>,
    curves_dir: Option<&Path>,
) -> String {
    let grid = &r.grid;
    let mut out = format!(
        "oblique sweep {}: {} charging voltage(s) x {} standoff(s) = {} settings (screening estimates)\n\n",
        r.model.id(),
        grid.voltages.len(),
        grid.standoffs.len(),
        r.settings.len()
    );
    out.push_str(&inputs_table(&r.inputs));
    out.push('\n');
    if grid.voltages.len() <= MAX_PRINTED.0 && grid.standoffs.len() <= MAX_PRINTED.1 {
        out.push_str(&velocity_grid(r));
    } else {
        out.push_str(&format!(
            "the grid has {} x {} settings, too many to print: see --json or --curves-csv\n\n",
            grid.voltages.len(),
            grid.standoffs.len()
        ));
    }
    if let Some(w) = r.window {
        out.push_str(&ranking_table(r, w, top));
    }
    if let Some(p) = plot {
        out.push_str(&format!("plot written to {}\n", p.display()));
        if grid.one_angle() && grid.standoffs.len() > 1 {
            out.push_str("note: every standoff has the same angle, so the process curves (one colour per standoff) lie on one line of the plot and only the labels that fit are shown; --angle-per-standoff (e.g. one rod chamfer per standoff) separates them\n");
        }
    }
    if let Some(d) = curves_dir {
        out.push_str(&format!("process curves written to {}\n", d.display()));
    }
    for w in r.inputs.efficiency_warnings() {
        out.push_str(&format!("warning: {w}\n"));
    }
    out.push_str(r.model.assumptions());
    out.push('\n');
    out.push_str(CAUTION);
    out.push('\n');
    out
}

/// One CSV per standoff, `(file name, text)`: velocity, angle, label, charging voltage, stored
/// energy and verdict of every setting with an impact (the format `oblique plot --curve`
/// reads).
#[must_use]
pub fn curve_csvs(r: &SweepRanking<'_>) -> Vec<(String, String)> {
    let grid = &r.grid;
    let mut files = Vec::new();
    for (j, g) in grid.standoffs.iter().enumerate() {
        let angle = grid.angles.as_ref().map(|a| a[j]);
        let mut s = String::from(
            "velocity[m/s],angle[deg],label,charge_voltage[kV],stored_energy[kJ],inside\n",
        );
        for (i, u) in grid.voltages.iter().enumerate() {
            if let Some(v) = r.result.impact_velocity(i, j) {
                let inside = r
                    .setting(i, j)
                    .check
                    .as_ref()
                    .map_or(String::new(), |k| k.inside.to_string());
                s.push_str(&format!(
                    "{:.3},{},{},{:.6},{:.6},{inside}\n",
                    v.si(),
                    angle.map_or(String::new(), |a| format!("{:.6}", a.to_degrees())),
                    human::kv(*u),
                    u / 1e3,
                    r.result.point(i, j).map_or(0.0, |p| p.stored_energy.si()) / 1e3,
                ));
            }
        }
        files.push((format!("standoff-{}mm.csv", human::g(g * 1e3)), s));
    }
    files
}
