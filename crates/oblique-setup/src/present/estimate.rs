//! One estimate (magnetic pulse or explosive) as a table or JSON, with its inputs and where they
//! came from, the energy balance, warnings, assumptions, window check and caution.

use super::{assumptions_value, inputs_json, inputs_table, ASSUMPTIONS_EXPLOSIVE};
use crate::estimate::PulseReport;
use crate::explosive::ExplosiveReport;
use crate::human;
use crate::inputs::Inputs;
use oblique_core::process::{ImpactOutcome, PulseEstimate};
use oblique_window::advice::inside_stretch_text;
use oblique_window::classify::Classification;
use oblique_window::present::{classification_json, sig, table, CAUTION};
use oblique_window::PairWindow;
use serde_json::{json, Map, Value};
use std::path::Path;

/// The pulse estimate as JSON (without caution and window check).
fn pulse_json(
    model: &str,
    est: &PulseEstimate,
    thickness: f64,
    inputs: &Inputs,
    assumptions: &str,
) -> Map<String, Value> {
    let mut o = Map::new();
    o.insert("model".into(), json!(model));
    let (impact, time, vel, after, reason, travel, vend) = match est.outcome {
        ImpactOutcome::Impact {
            time,
            velocity,
            after_first_half_wave,
        } => (
            true,
            sig(time.si()),
            sig(velocity.si()),
            json!(after_first_half_wave),
            Value::Null,
            Value::Null,
            Value::Null,
        ),
        ImpactOutcome::NoImpact {
            reason,
            travel,
            velocity,
            ..
        } => (
            false,
            Value::Null,
            Value::Null,
            Value::Null,
            json!(reason),
            sig(travel.si()),
            sig(velocity.si()),
        ),
    };
    o.insert("impact".into(), json!(impact));
    o.insert("impact_velocity_m_s".into(), vel);
    o.insert("impact_time_s".into(), time);
    o.insert("impact_after_first_half_wave".into(), after);
    o.insert("no_impact_reason".into(), reason);
    o.insert("final_travel_m".into(), travel);
    o.insert("final_velocity_m_s".into(), vend);
    o.insert("stored_energy_j".into(), sig(est.stored_energy.si()));
    o.insert(
        "initial_inductance_h".into(),
        sig(est.initial_inductance.si()),
    );
    o.insert("ring_frequency_hz".into(), sig(est.ring_frequency.si()));
    o.insert("peak_current_a".into(), sig(est.peak_current.si()));
    o.insert("peak_field_t".into(), sig(est.peak_field.si()));
    o.insert("peak_pressure_pa".into(), sig(est.peak_pressure.si()));
    o.insert(
        "peak_effective_pressure_pa".into(),
        sig(est.peak_effective_pressure.si()),
    );
    o.insert("skin_depth_m".into(), sig(est.skin_depth.si()));
    o.insert("workpiece_thickness_m".into(), sig(thickness));
    o.insert("skin_factor".into(), sig(est.skin_factor));
    o.insert(
        "first_current_zero_s".into(),
        est.first_current_zero.map_or(Value::Null, |t| sig(t.si())),
    );
    let e = &est.energy;
    o.insert(
        "energy_balance_j".into(),
        json!({
            "stored": sig(e.stored.si()),
            "capacitor": sig(e.capacitor.si()),
            "field": sig(e.field.si()),
            "resistive": sig(e.resistive.si()),
            "kinetic": sig(e.kinetic.si()),
            "plastic": sig(e.plastic.si()),
            "withheld": sig(e.withheld.si()),
        }),
    );
    o.insert(
        "energy_balance_relative_error".into(),
        sig(e.relative_error),
    );
    let mut warnings: Vec<Value> = est.warnings.iter().map(|w| json!(w.to_string())).collect();
    warnings.extend(inputs.efficiency_warnings().into_iter().map(|w| json!(w)));
    o.insert("warnings".into(), Value::Array(warnings));
    o.insert("assumptions".into(), assumptions_value(assumptions));
    inputs_json(inputs, &mut o);
    o
}

/// A magnetic pulse estimate as JSON; `history_file`: where the time histories were written.
#[must_use]
pub fn estimate_json(r: &PulseReport<'_>, history_file: Option<&Path>) -> Value {
    let s = &r.setup;
    let mut o = pulse_json(
        s.model.id(),
        &r.estimate,
        s.thickness(),
        &s.inputs,
        s.model.assumptions(),
    );
    o.insert(
        "angle_deg".into(),
        s.angle
            .map_or(Value::Null, |a| sig(a.radians().to_degrees())),
    );
    o.insert(
        "window_check".into(),
        match (&r.check, s.window) {
            (Some(c), Some(w)) => classification_json(w, c),
            _ => Value::Null,
        },
    );
    if let Some((p, basis)) = &r.probability {
        let mut v = p.json();
        if let Some(m) = v.as_object_mut() {
            m.insert("velocity_spread_basis".into(), json!(basis));
        }
        o.insert("probability".into(), v);
    }
    if let Some(p) = history_file {
        o.insert("history_file".into(), json!(p.display().to_string()));
    }
    o.insert("caution".into(), json!(CAUTION));
    Value::Object(o)
}

/// A magnetic pulse estimate as text; `history_file`: where the time histories were written.
#[must_use]
pub fn estimate_text(r: &PulseReport<'_>, history_file: Option<&Path>) -> String {
    let s = &r.setup;
    let est = &r.estimate;
    let mut out = format!(
        "oblique estimate {}: {} (screening estimate)\n\n",
        s.model.id(),
        s.model.title()
    );
    out.push_str(&inputs_table(&s.inputs));
    out.push('\n');
    out.push_str(&pulse_table(
        est,
        s.thickness(),
        &s.inputs.efficiency_warnings(),
    ));
    if let Some(p) = history_file {
        out.push_str(&format!(
            "time histories written to {} ({} samples)\n",
            p.display(),
            est.history.len()
        ));
    }
    out.push_str(&window_lines(
        s.window,
        s.angle.map(|a| a.radians()),
        est,
        r.check.as_ref(),
    ));
    if r.check.as_ref().is_some_and(|c| c.inside) && !s.inputs.efficiency_warnings().is_empty() {
        out.push_str("  the verdict rests on an uncalibrated (or transferred) efficiency: the real impact velocity is likely lower; check where the window is above before any shot\n");
    }
    if let Some((p, basis)) = &r.probability {
        out.push_str(&format!("\nwith the velocity's uncertainty ({basis}):\n"));
        out.push_str(&p.text());
    }
    out.push_str(s.model.assumptions());
    out.push('\n');
    out.push_str(CAUTION);
    out.push('\n');
    out
}

/// The result table of a pulse estimate, its energy balance and warnings (the estimate's and
/// `extra_warnings`).
#[must_use]
pub fn pulse_table(est: &PulseEstimate, thickness: f64, extra_warnings: &[String]) -> String {
    let mut rows: Vec<Vec<String>> = vec![
        vec![
            "stored energy".into(),
            human::kj(est.stored_energy.si()),
            "C U0^2 / 2".into(),
        ],
        vec![
            "loop inductance at rest".into(),
            human::nh(est.initial_inductance.si()),
            "bank + coil extra + gap".into(),
        ],
        vec![
            "ring frequency".into(),
            format!("{} kHz", human::g(est.ring_frequency.si() / 1e3)),
            "damped, at rest".into(),
        ],
        vec![
            "peak current".into(),
            format!("{} kA", human::g(est.peak_current.si() / 1e3)),
            String::new(),
        ],
        vec![
            "peak field".into(),
            format!("{} T", human::g(est.peak_field.si())),
            "in the gap".into(),
        ],
        vec![
            "peak magnetic pressure".into(),
            format!("{} MPa", human::g(est.peak_pressure.si() / 1e6)),
            "B^2 / (2 mu0)".into(),
        ],
        vec![
            "peak pressure on the workpiece".into(),
            format!("{} MPa", human::g(est.peak_effective_pressure.si() / 1e6)),
            "eta f_s B^2 / (2 mu0)".into(),
        ],
        vec![
            "skin depth vs thickness".into(),
            format!(
                "{} vs {}",
                human::mm(est.skin_depth.si()),
                human::mm(thickness)
            ),
            format!("skin factor f_s = {}", human::g(est.skin_factor)),
        ],
        vec![
            "first current zero".into(),
            est.first_current_zero
                .map_or("not before the end of the run".into(), |t| {
                    format!("{} us", human::g(t.si() * 1e6))
                }),
            String::new(),
        ],
    ];
    rows.extend(outcome_rows(&est.outcome));
    let mut s = format!("result\n{}", table(&["quantity", "value", "note"], &rows));
    s.push_str(&energy_table(est));
    if est.warnings.is_empty() && extra_warnings.is_empty() {
        s.push_str("warnings: none\n");
    } else {
        for w in &est.warnings {
            s.push_str(&format!("warning: {w}\n"));
        }
        for w in extra_warnings {
            s.push_str(&format!("warning: {w}\n"));
        }
    }
    s
}

fn outcome_rows(outcome: &ImpactOutcome) -> Vec<Vec<String>> {
    match *outcome {
        ImpactOutcome::Impact {
            time,
            velocity,
            after_first_half_wave,
        } => vec![
            vec![
                "impact time".into(),
                format!("{} us", human::g(time.si() * 1e6)),
                if after_first_half_wave {
                    "after the first current zero".into()
                } else {
                    "within the first half-wave".into()
                },
            ],
            vec![
                "impact velocity Vp".into(),
                format!("{:.0} m/s", velocity.si()),
                "normal to the workpiece".into(),
            ],
        ],
        ImpactOutcome::NoImpact {
            reason,
            travel,
            velocity,
            end_time,
        } => vec![
            vec!["outcome".into(), "NO IMPACT".into(), reason.to_string()],
            vec![
                "travel, velocity at the end".into(),
                format!("{}, {:.0} m/s", human::mm(travel.si()), velocity.si()),
                format!("at {} us", human::g(end_time.si() * 1e6)),
            ],
        ],
    }
}

fn energy_table(est: &PulseEstimate) -> String {
    let e = &est.energy;
    let at = if est.impact_velocity().is_some() {
        "at impact"
    } else {
        "at the end"
    };
    let erows: Vec<Vec<String>> = [
        ("stored", e.stored.si()),
        ("left in the capacitor", e.capacitor.si()),
        ("in the magnetic field", e.field.si()),
        ("dissipated in R", e.resistive.si()),
        ("kinetic (workpiece)", e.kinetic.si()),
        ("plastic work", e.plastic.si()),
        ("withheld (skin depth, eta)", e.withheld.si()),
    ]
    .iter()
    .map(|(k, v)| {
        vec![
            (*k).to_string(),
            format!("{:.1} J", v),
            format!("{:.1} %", 100.0 * v / e.stored.si()),
        ]
    })
    .collect();
    let mut s = format!("\nenergy balance {at}\n");
    s.push_str(&table(&["term", "energy", "share"], &erows));
    s.push_str(&format!("  relative error {:.1e}\n\n", e.relative_error));
    s
}

fn window_lines(
    window: Option<&PairWindow>,
    angle: Option<f64>,
    est: &PulseEstimate,
    check: Option<&Classification>,
) -> String {
    match (window, angle, check) {
        (Some(w), Some(a), Some(c)) => verdict_lines(w, a, "from the user", c),
        (Some(w), Some(_), None) => {
            format!("window check ({}): not made, there is no impact\n", w.name)
        }
        (Some(w), None, _) => {
            let v = est
                .impact_velocity()
                .map_or(String::new(), |v| format!(" with Vp = {:.0} m/s", v.si()));
            format!(
                "window check ({}): give --angle (your taper or chamfer angle) to check the point{v}\n",
                w.name
            )
        }
        _ => String::new(),
    }
}

/// The verdict of a window check at `angle` (rad), a few lines; `whose` says where the angle
/// comes from.
#[must_use]
pub fn verdict_lines(w: &PairWindow, angle: f64, whose: &str, c: &Classification) -> String {
    let mut s = format!(
        "window check ({}, angle {} deg {whose}): {}\n",
        w.name,
        human::g(angle.to_degrees()),
        if c.inside {
            "INSIDE the window"
        } else if !c.domain.inside() {
            "OUTSIDE THE VALIDITY DOMAIN (no verdict claimed)"
        } else {
            "OUTSIDE the window"
        }
    );
    s.push_str(&format!("  {}\n", c.reason));
    if let Some(t) = inside_stretch_text(c) {
        s.push_str(&format!("  where the window is: {t}\n"));
    }
    s.push_str(&format!("  ({})\n", oblique_window::margin::ROUNDING_RULE));
    for w in &c.warnings {
        s.push_str(&format!("  warning: {w}\n"));
    }
    s
}

/// The time histories as CSV: time, current, magnetic pressure, travel, velocity.
#[must_use]
pub fn history_csv(est: &PulseEstimate) -> String {
    let mut s = String::from("time[us],current[kA],pressure[MPa],travel[mm],velocity[m/s]\n");
    for h in &est.history {
        s.push_str(&format!(
            "{:.6},{:.4},{:.4},{:.6},{:.4}\n",
            h.time.si() * 1e6,
            h.current.si() / 1e3,
            h.magnetic_pressure.si() / 1e6,
            h.travel.si() * 1e3,
            h.velocity.si()
        ));
    }
    s
}

/// An explosive estimate as JSON.
#[must_use]
pub fn explosive_json(r: &ExplosiveReport<'_>) -> Value {
    let est = &r.estimate;
    let col = &est.collision;
    let mut o = Map::new();
    o.insert("model".into(), json!("explosive"));
    o.insert("impact".into(), json!(true));
    o.insert("impact_velocity_m_s".into(), sig(est.impact_velocity.si()));
    o.insert("convention".into(), json!(col.convention.as_str()));
    o.insert("gurney_factor".into(), sig(est.gurney_factor));
    o.insert("collision_angle_deg".into(), sig(col.angle.degrees()));
    o.insert(
        "collision_velocity_m_s".into(),
        sig(col.collision_velocity.si()),
    );
    o.insert("flow_velocity_m_s".into(), sig(col.flow_velocity.si()));
    // Keys of the magnetic estimates that have no meaning here.
    for k in [
        "impact_time_s",
        "peak_current_a",
        "peak_pressure_pa",
        "energy_balance_relative_error",
    ] {
        o.insert(k.into(), Value::Null);
    }
    o.insert("warnings".into(), json!(Vec::<String>::new()));
    o.insert(
        "assumptions".into(),
        assumptions_value(ASSUMPTIONS_EXPLOSIVE),
    );
    inputs_json(&r.inputs, &mut o);
    o.insert(
        "window_check".into(),
        match (&r.check, r.window) {
            (Some(c), Some(w)) => classification_json(w, c),
            _ => Value::Null,
        },
    );
    o.insert("caution".into(), json!(CAUTION));
    Value::Object(o)
}

/// An explosive estimate as text.
#[must_use]
pub fn explosive_text(r: &ExplosiveReport<'_>) -> String {
    let est = &r.estimate;
    let col = &est.collision;
    let mut out = String::from(
        "oblique estimate explosive: Gurney open-faced sandwich and collision kinematics (screening estimate)\n\n",
    );
    out.push_str(&inputs_table(&r.inputs));
    let rows = vec![
        vec![
            "Gurney factor V / sqrt(2E)".into(),
            human::g(est.gurney_factor),
            "open-faced sandwich".into(),
        ],
        vec![
            "flyer (impact) velocity Vp".into(),
            format!("{:.0} m/s", est.impact_velocity.si()),
            "terminal velocity".into(),
        ],
        vec![
            "collision angle beta".into(),
            format!("{:.2} deg", col.angle.degrees()),
            "from the kinematics".into(),
        ],
        vec![
            "collision-point velocity Vc".into(),
            format!("{:.0} m/s", col.collision_velocity.si()),
            if r.setup.preset_angle.radians() == 0.0 {
                "parallel set-up: Vc = Vd".into()
            } else {
                "inclined set-up".into()
            },
        ],
        vec![
            "flow velocity Vf".into(),
            format!("{:.0} m/s", col.flow_velocity.si()),
            "bisector convention".into(),
        ],
    ];
    out.push_str(&format!(
        "\nresult\n{}",
        table(&["quantity", "value", "note"], &rows)
    ));
    if let (Some(w), Some(c)) = (r.window, &r.check) {
        out.push_str(&verdict_lines(
            w,
            col.angle.radians(),
            "from the kinematics",
            c,
        ));
    }
    out.push_str(ASSUMPTIONS_EXPLOSIVE);
    out.push('\n');
    out.push_str("caution: explosives kill: their handling, storage and use are for licensed people under local law\n");
    out.push_str(CAUTION);
    out.push('\n');
    out
}
