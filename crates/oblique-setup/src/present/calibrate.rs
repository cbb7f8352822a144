//! Calibrations as text and JSON: the efficiency fitted to a shot, L and R from a ring-down.

use super::estimate::pulse_table;
use super::{inputs_json, inputs_table};
use crate::calibrate::{CalibrationFit, RingDown};
use crate::human;
use oblique_window::machine::MACHINES_DIR;
use oblique_window::present::{sig, table, CAUTION};
use serde_json::{json, Map, Value};

/// A fitted efficiency as JSON; `saved_to`: the bank file it was stored in.
#[must_use]
pub fn calibration_json(f: &CalibrationFit<'_>, saved_to: Option<&str>) -> Value {
    let mut o = Map::new();
    o.insert("model".into(), json!(f.model.id()));
    o.insert("efficiency".into(), sig(f.fit.efficiency));
    o.insert("measured_velocity_m_s".into(), sig(f.measured_velocity));
    o.insert("model_velocity_m_s".into(), sig(f.fit.model_velocity.si()));
    o.insert("iterations".into(), json!(f.fit.iterations));
    o.insert("date".into(), json!(f.date));
    o.insert("source".into(), json!(f.source));
    o.insert("coil".into(), json!(f.coil));
    o.insert("saved_to".into(), json!(saved_to));
    o.insert(
        "warnings".into(),
        Value::Array(
            f.fit
                .estimate
                .warnings
                .iter()
                .map(|w| json!(w.to_string()))
                .collect(),
        ),
    );
    inputs_json(&f.inputs, &mut o);
    o.insert("caution".into(), json!(CAUTION));
    Value::Object(o)
}

/// A fitted efficiency as text; `saved_to`: the bank file it was stored in.
#[must_use]
pub fn calibration_text(f: &CalibrationFit<'_>, saved_to: Option<&str>) -> String {
    let mut out = format!(
        "oblique calibrate {}: efficiency fitted to one measured shot\n\n",
        f.model.id()
    );
    out.push_str(&inputs_table(&f.inputs));
    out.push_str(&format!(
        "\nmeasured impact velocity {} ({}, {})\nfitted efficiency eta = {:.4} (model gives {:.1} m/s; {} iterations of Brent's method)\n\n",
        human::m_s(f.measured_velocity),
        f.source,
        f.date,
        f.fit.efficiency,
        f.fit.model_velocity.si(),
        f.fit.iterations
    ));
    out.push_str("the estimate at the fitted efficiency:\n");
    out.push_str(&pulse_table(&f.fit.estimate, f.thickness, &[]));
    match saved_to {
        Some(p) => out.push_str(&format!(
            "saved to {p}: later estimates with this --machine and --coil use eta = {:.4} unless --efficiency is given\n",
            f.fit.efficiency
        )),
        None => out.push_str("not saved (add --save with a bank file of your own to store it)\n"),
    }
    out.push_str("note: one shot fixes one number; the calibrated model still extrapolates poorly far from that shot\n");
    out.push_str(CAUTION);
    out.push('\n');
    out
}

/// L and R from a ring-down record as JSON; `written_to`: the new bank file, if one was written.
#[must_use]
pub fn ring_down_json(r: &RingDown, written_to: Option<&str>) -> Value {
    let (q, fit) = (&r.request, &r.fit);
    let mut o = Map::new();
    o.insert("capacitance_f".into(), sig(q.capacitance.si()));
    o.insert("ring_frequency_hz".into(), sig(q.ring_frequency.si()));
    o.insert("peak_ratio".into(), sig(q.peak_ratio));
    o.insert("inductance_h".into(), sig(fit.inductance.si()));
    o.insert("resistance_ohm".into(), sig(fit.resistance.si()));
    o.insert(
        "simple_inductance_h".into(),
        sig(fit.simple_inductance.si()),
    );
    o.insert(
        "simple_resistance_ohm".into(),
        sig(fit.simple_resistance.si()),
    );
    o.insert(
        "simple_relative_error".into(),
        sig(fit.simple_relative_error),
    );
    o.insert("decay_rate_1_s".into(), sig(r.decay_rate));
    o.insert(
        "critical_resistance_ohm".into(),
        sig(fit.circuit.critical_resistance().si()),
    );
    o.insert("written_to".into(), json!(written_to));
    o.insert("caution".into(), json!(CAUTION));
    Value::Object(o)
}

/// L and R from a ring-down record as text; `written_to`: the new bank file, if one was written.
#[must_use]
pub fn ring_down_text(r: &RingDown, written_to: Option<&str>) -> String {
    let (q, fit) = (&r.request, &r.fit);
    let rows = vec![
        vec![
            "loop inductance L".into(),
            human::nh(fit.inductance.si()),
            human::nh(fit.simple_inductance.si()),
        ],
        vec![
            "loop resistance R".into(),
            human::mohm(fit.resistance.si()),
            human::mohm(fit.simple_resistance.si()),
        ],
    ];
    let mut out = format!(
        "oblique calibrate ring-down: C = {}, ring frequency {} kHz, same-sign peak ratio I1/I2 = {}\n\n",
        human::uf(q.capacitance.si()),
        human::g(q.ring_frequency.si() / 1e3),
        human::g(q.peak_ratio)
    );
    out.push_str(&table(
        &["quantity", "exact inverse", "simple form 1/(w^2 C)"],
        &rows,
    ));
    out.push_str(&format!(
        "\nexact: L = 1 / (C (w^2 + a^2)), R = 2 L a, with w = 2 pi f and a = f ln(I1/I2) = {} 1/s\nsimple: L = 1 / (w^2 C), R = 2 L ln(I1/I2) f; too large by {:.2} %\ncritical resistance 2 sqrt(L/C) = {} (the loop rings while R is below it)\n",
        human::g(r.decay_rate),
        100.0 * fit.simple_relative_error,
        human::mohm(fit.circuit.critical_resistance().si())
    ));
    out.push_str("these are L and R of the whole loop during the record: with the output shorted at the coil terminals, the bank's own; with a coil connected, subtract the coil's inductance (docs/process-models.md section 1)\n");
    match written_to {
        Some(p) => out.push_str(&format!("wrote the bank file {p}\n")),
        None => out.push_str(&format!(
            "to describe the bank in a file, add --save-as NAME --rated-voltage U --source TEXT (with --library DIR), or write DIR/{MACHINES_DIR}/NAME.ron by hand with\n    ring_down: (frequency: \"{} kHz\", peak_ratio: \"{}\", source: \"...\"),\n",
            human::g(q.ring_frequency.si() / 1e3),
            human::g(q.peak_ratio)
        )),
    }
    out.push_str(CAUTION);
    out.push('\n');
    out
}
