//! Presentation of typed results shared by every front end: the caution line, JSON shapes of
//! materials, criteria and classifications (SI values, keys with unit suffixes), plain text
//! tables and numbers in their criterion's unit. Pure functions: nothing here writes anywhere.

use crate::classify::{limit_label, Classification};
use crate::{MaterialRecord, PairWindow};
use oblique_core::{CriterionResult, PointEvaluation};
use serde_json::{json, Map, Value};

/// The one-line caution printed with every verdict and estimate.
pub const CAUTION: &str = "caution: screening estimate from published relations, not a guarantee of a weld; capacitor banks store lethal energy, explosives and flying parts kill: follow local codes and licensed practice before any shot";

/// Round to a sensible number of significant digits for JSON (keeps output stable and readable).
pub fn sig(x: f64) -> Value {
    if !x.is_finite() {
        return Value::Null;
    }
    if x == 0.0 {
        return json!(0.0);
    }
    let digits = 10 - x.abs().log10().floor() as i32;
    let factor = 10f64.powi(digits.clamp(-300, 300));
    json!((x * factor).round() / factor)
}

/// The material object shared by `check --json` (`flyer`, `parent`) and `material show --json`.
pub fn material_json(rec: &MaterialRecord, with_sources: bool) -> Value {
    let m = &rec.material;
    let mut o = Map::new();
    o.insert("id".into(), json!(m.id));
    o.insert("name".into(), json!(m.name));
    o.insert("density_kg_m3".into(), sig(m.density().si()));
    o.insert("bulk_sound_speed_m_s".into(), sig(m.sound_speed().si()));
    o.insert("hugoniot_slope".into(), sig(m.hugoniot.s));
    o.insert("vickers_hardness_pa".into(), sig(m.vickers_hardness.si()));
    o.insert("yield_strength_pa".into(), sig(m.yield_strength.si()));
    o.insert("tensile_strength_pa".into(), sig(m.tensile_strength.si()));
    o.insert("bulk_modulus_pa".into(), sig(m.bulk_modulus.si()));
    o.insert("shear_modulus_pa".into(), sig(m.shear_modulus.si()));
    o.insert(
        "melting_temperature_k".into(),
        sig(m.melting_temperature.si()),
    );
    o.insert(
        "thermal_conductivity_w_m_k".into(),
        sig(m.thermal_conductivity.si()),
    );
    o.insert("specific_heat_j_kg_k".into(), sig(m.specific_heat.si()));
    if with_sources {
        o.insert(
            "electrical_conductivity_s_m".into(),
            sig(m.electrical_conductivity.si()),
        );
        o.insert("condition".into(), json!(rec.condition));
        o.insert("notes".into(), json!(rec.notes));
        o.insert("origin".into(), json!(rec.origin));
        let mut s = Map::new();
        for (k, p) in &rec.sources {
            s.insert(
                (*k).to_string(),
                json!({"key": p.key, "reference": p.reference, "note": p.note, "as_written": p.as_written}),
            );
        }
        o.insert("sources".into(), Value::Object(s));
        // The full references of every key cited (the project's one list).
        let refs = crate::references::References::builtin().unwrap_or_default();
        let cited: Map<String, Value> = refs
            .for_material(rec)
            .into_iter()
            .map(|(k, r)| (k, json!(r)))
            .collect();
        o.insert("references".into(), Value::Object(cited));
    }
    Value::Object(o)
}

/// One criterion as JSON.
pub fn criterion_json(c: &CriterionResult, binding: bool) -> Value {
    let constants: Map<String, Value> = c
        .constants
        .iter()
        .map(|(k, v)| ((*k).to_string(), sig(*v)))
        .collect();
    json!({
        "id": c.id.as_str(),
        "title": c.id.title(),
        "value": sig(c.value),
        "limit": sig(c.limit),
        "margin": sig(c.margin),
        "unit": c.unit,
        "kind": c.kind,
        "satisfied": c.satisfied,
        "informational": c.informational,
        "governing": c.governing.as_str(),
        "limit_flyer": c.limit_flyer.map(sig),
        "limit_parent": c.limit_parent.map(sig),
        "constants": constants,
        "binding": binding,
        "advice": c.advice(),
    })
}

/// The keys shared by every point evaluation.
pub fn evaluation_fields(e: &PointEvaluation, o: &mut Map<String, Value>) {
    let c = &e.collision;
    o.insert("convention".into(), json!(c.convention.as_str()));
    o.insert("impact_velocity_m_s".into(), sig(c.impact_velocity.si()));
    o.insert("collision_angle_deg".into(), sig(c.angle.degrees()));
    o.insert(
        "collision_velocity_m_s".into(),
        sig(c.collision_velocity.si()),
    );
    o.insert("flow_velocity_m_s".into(), sig(c.flow_velocity.si()));
    o.insert("impact_pressure_pa".into(), sig(e.impact.pressure.si()));
    o.insert(
        "flyer_particle_velocity_m_s".into(),
        sig(e.impact.flyer_particle_velocity.si()),
    );
    o.insert(
        "parent_particle_velocity_m_s".into(),
        sig(e.impact.target_particle_velocity.si()),
    );
    o.insert(
        "jetting_critical_angle_deg".into(),
        sig(e.jetting.critical_angle.degrees()),
    );
    o.insert("jetting_regime".into(), json!(e.jetting.regime));
    o.insert("interface_wavelength_m".into(), sig(e.wavelength.si()));
    o.insert(
        "dissipated_energy_j_m2".into(),
        sig(e.dissipated_energy.si()),
    );
}

/// Add where the limit is reached along the two controls (after `explain`).
fn add_headroom(v: &mut Value, window: &PairWindow, c: &Classification, limit: &crate::LimitRef) {
    if let (Some(o), Some((_, h))) = (
        v.as_object_mut(),
        c.headroom.iter().find(|(l, _)| l == limit),
    ) {
        o.insert(
            "advice".into(),
            json!(crate::classify::limit_advice(window, c, limit)),
        );
        // The same rounded figures as the text (crate::margin::ROUNDING_RULE).
        let v = crate::margin::velocity_headroom(window, c, limit);
        let a = crate::margin::angle_headroom(window, c, limit);
        let _ = h;
        o.insert(
            "reached_at_impact_velocity_m_s".into(),
            v.as_ref().map_or(Value::Null, |x| json!(x.reached_at)),
        );
        o.insert(
            "reached_at_angle_deg".into(),
            a.as_ref().map_or(Value::Null, |x| json!(x.reached_at)),
        );
        o.insert(
            "velocity_headroom".into(),
            v.as_ref().map_or(Value::Null, crate::margin::Along::json),
        );
        o.insert(
            "angle_headroom".into(),
            a.as_ref().map_or(Value::Null, crate::margin::Along::json),
        );
    }
}

/// JSON of a classification against a pair window (check --pair, report).
pub fn classification_json(window: &PairWindow, c: &Classification) -> Value {
    let mut o = Map::new();
    o.insert("pair".into(), json!(window.name));
    o.insert("flyer".into(), material_json(&window.flyer, false));
    if let Some(Value::Object(f)) = o.get_mut("flyer") {
        f.insert("thickness_m".into(), sig(window.flyer_thickness.si()));
    }
    o.insert("parent".into(), material_json(&window.parent, false));
    evaluation_fields(&c.evaluation, &mut o);
    let binding_id = c.binding.as_ref().map(|b| limit_label(window, b));
    let criteria: Vec<Value> = c
        .evaluation
        .criteria
        .iter()
        .map(|r| {
            let mut v = criterion_json(
                r,
                matches!(&c.binding, Some(crate::LimitRef::Criterion(id)) if *id == r.id),
            );
            add_headroom(&mut v, window, c, &crate::LimitRef::Criterion(r.id));
            v
        })
        .collect();
    o.insert("criteria".into(), Value::Array(criteria));
    let boundaries: Vec<Value> = c
        .boundaries
        .iter()
        .zip(&window.boundaries)
        .enumerate()
        .map(|(bi, (r, b))| {
            let mut v = json!({
                "label": r.label,
                "plane": b.plane.as_str(),
                "weld_side": b.weld_side.as_str(),
                "limit": r.limit.map(sig),
                "margin": r.margin.map(sig),
                "unit": r.unit,
                "satisfied": r.satisfied,
                "in_range": r.in_range,
                "provenance": b.provenance,
            });
            add_headroom(&mut v, window, c, &crate::LimitRef::Boundary(bi));
            v
        })
        .collect();
    o.insert("boundaries".into(), Value::Array(boundaries));
    o.insert("inside".into(), json!(c.inside));
    o.insert(
        "binding".into(),
        match &c.binding {
            Some(crate::LimitRef::Criterion(id)) => json!(id.as_str()),
            Some(_) => json!(binding_id),
            None => Value::Null,
        },
    );
    o.insert(
        "binding_kind".into(),
        json!(c.binding.as_ref().map(|b| match b {
            crate::LimitRef::Criterion(_) => "criterion",
            crate::LimitRef::Boundary(_) => "boundary",
        })),
    );
    o.insert("outside_trial_data".into(), json!(c.outside_trial_data));
    o.insert("prediction".into(), json!(c.prediction.as_str()));
    o.insert("reason".into(), json!(c.reason));
    o.insert(
        "velocity_headroom".into(),
        crate::margin::verdict_velocity_headroom(window, c).map_or(Value::Null, |x| x.json()),
    );
    o.insert("rounding".into(), json!(crate::margin::ROUNDING_RULE));
    o.insert("caution".into(), json!(CAUTION));
    Value::Object(o)
}

/// A plain text table: columns padded to their widest cell.
pub fn table(header: &[&str], rows: &[Vec<String>]) -> String {
    let n = header.len();
    let mut width: Vec<usize> = header.iter().map(|h| h.chars().count()).collect();
    for r in rows {
        for (i, c) in r.iter().enumerate().take(n) {
            width[i] = width[i].max(c.chars().count());
        }
    }
    let mut s = String::new();
    let line = |cells: Vec<&str>, s: &mut String| {
        s.push_str("  ");
        for (i, c) in cells.iter().enumerate() {
            let pad = width[i] - c.chars().count();
            s.push_str(c);
            if i + 1 < cells.len() {
                s.push_str(&" ".repeat(pad + 2));
            }
        }
        s.push('\n');
    };
    line(header.to_vec(), &mut s);
    for r in rows {
        line(r.iter().map(String::as_str).collect(), &mut s);
    }
    s
}

/// Value of a criterion in its unit, human scale.
pub fn fmt_value(v: f64, unit: &str) -> String {
    oblique_core::criteria::format_in_unit(v, unit)
}

/// Signed margin, human scale.
pub fn fmt_margin(v: f64, unit: &str) -> String {
    let s = fmt_value(v, unit);
    if v >= 0.0 {
        format!("+{s}")
    } else {
        s
    }
}

/// `s` cut to at most `max` characters for an error message, with the number left out said.
#[must_use]
pub fn short(s: &str, max: usize) -> String {
    let n = s.chars().count();
    if n <= max {
        return s.to_string();
    }
    let head: String = s.chars().take(max).collect();
    format!("{head}... ({} more characters)", n - max)
}

/// `s` made safe for a terminal: control characters other than newline and tab (escape
/// sequences, carriage returns, form feeds, bells) are shown as `\u{..}` escapes instead of
/// acting on the terminal.
#[must_use]
pub fn terminal_safe(s: &str) -> std::borrow::Cow<'_, str> {
    if !s.chars().any(|c| c.is_control() && c != '\n' && c != '\t') {
        return std::borrow::Cow::Borrowed(s);
    }
    let mut out = String::with_capacity(s.len() + 16);
    for c in s.chars() {
        if c.is_control() && c != '\n' && c != '\t' {
            out.push_str(&format!("\\u{{{:x}}}", c as u32));
        } else {
            out.push(c);
        }
    }
    std::borrow::Cow::Owned(out)
}

/// `s` made safe for XML and HTML text: characters XML 1.0 forbids (controls other than tab,
/// newline and carriage return) become the visible Unicode control pictures (U+2400 block) or
/// U+FFFD, so that the document stays well-formed and the reader still sees something was there.
#[must_use]
pub fn xml_safe(s: &str) -> std::borrow::Cow<'_, str> {
    let bad = |c: char| c.is_control() && !matches!(c, '\n' | '\t' | '\r');
    if !s.chars().any(bad) {
        return std::borrow::Cow::Borrowed(s);
    }
    std::borrow::Cow::Owned(
        s.chars()
            .map(|c| match c {
                c if (c as u32) < 0x20 && bad(c) => {
                    char::from_u32(0x2400 + c as u32).unwrap_or('\u{fffd}')
                }
                '\u{7f}' => '\u{2421}',
                c if bad(c) => '\u{fffd}',
                c => c,
            })
            .collect(),
    )
}
