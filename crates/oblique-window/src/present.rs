//! Presentation of typed results shared by every front end: the caution line, JSON shapes of
//! materials, criteria and classifications (SI values, keys with unit suffixes), plain text
//! tables and numbers in their criterion's unit. Pure functions: nothing here writes anywhere.

use crate::advice::limit_advice;
use crate::classify::{limit_label, Classification, HeadOn, LimitRef};
use crate::{MaterialRecord, PairWindow};
use oblique_core::{CriterionResult, PointEvaluation};
use serde_json::{json, Map, Value};

pub use crate::text::{short, sig, terminal_safe, xml_safe};

/// The one-line caution printed with every verdict and estimate.
pub const CAUTION: &str = "caution: screening estimate from published relations, not a guarantee of a weld; capacitor banks store lethal energy, explosives and flying parts kill: follow local codes and licensed practice before any shot";

/// The material object shared by `check --json` (`flyer`, `parent`) and `material show --json`.
pub fn material_json(rec: &MaterialRecord, with_sources: bool) -> Value {
    let m = &rec.material;
    let mut o = Map::new();
    o.insert("id".into(), json!(m.id));
    o.insert("name".into(), json!(m.name));
    o.insert("density_kg_m3".into(), sig(m.density().si()));
    // The Hugoniot intercept C0, under its own name; `bulk_sound_speed_m_s` holds the same
    // number and is kept for existing scripts (C0 is not exactly the bulk sound speed
    // sqrt(K/rho), docs/theory.md §9).
    o.insert("hugoniot_c0_m_s".into(), sig(m.hugoniot.c0.si()));
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
        .map(|(k, v)| {
            // The Wittman form is a word in the pair file ("a"/"b"), and a word here too.
            let value = if *k == "form" {
                json!(if *v < 1.5 { "a" } else { "b" })
            } else {
                sig(*v)
            };
            ((*k).to_string(), value)
        })
        .collect();
    // The jetting limit without a critical angle below 90 deg is no number (docs/theory.md §4).
    let no_limit = c.id == oblique_core::CriterionId::Jetting && c.limit >= 90.0;
    json!({
        "id": c.id.as_str(),
        "title": c.id.title(),
        "value": sig(c.value),
        "limit": if no_limit { Value::Null } else { sig(c.limit) },
        "limit_text": c.limit_text(),
        "limit_tm_celsius": c.limit_tm_celsius.map(sig),
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
        e.jetting.critical_angle_deg().map_or(Value::Null, sig),
    );
    o.insert("jetting_regime".into(), json!(e.jetting.regime));
    o.insert(
        "jetting".into(),
        json!({
            "flyer_supersonic": e.jetting.flyer_supersonic,
            "parent_supersonic": e.jetting.parent_supersonic,
            "mixed": e.jetting.is_mixed(),
            "mixed_rule": e.jetting.mixed_rule.map(|r| r.as_str()),
            "none_below_90_deg": e.jetting.none_below_90,
            "inflow": e.jetting.inflow_text(),
        }),
    );
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
            json!(crate::advice::limit_advice(window, c, limit)),
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
        o.insert(
            "reached_at_domain_edge".into(),
            json!({"impact_velocity": h.velocity_at_domain_edge, "angle": h.angle_at_domain_edge}),
        );
    }
}

/// An open bound end (0 for a ratio or an angle, or infinite) as null, else the number.
fn bound_end(x: f64, low: bool) -> Value {
    if x.is_finite() && (!low || x > 0.0) {
        sig(x)
    } else {
        Value::Null
    }
}

/// The validity domain of a classification as JSON: whether the point is inside, the bounds it
/// misses, the limits extrapolated, what they would say, every bound with its source, and the
/// domain and the window along the two controls (after `explain`).
pub fn domain_json(window: &PairWindow, c: &Classification) -> Value {
    let exits: Vec<Value> = c
        .domain
        .exits
        .iter()
        .map(|e| {
            json!({
                "quantity": e.quantity.as_str(),
                "value": sig(e.value),
                "min": bound_end(e.min, true),
                "max": bound_end(e.max, false),
                "unit": e.quantity.unit(),
                "text": e.text(),
                "limits": e.limits.iter().map(|l| l.as_str()).collect::<Vec<_>>(),
                "source": e.source,
            })
        })
        .collect();
    let bounds: Vec<Value> = window
        .domain
        .bounds
        .iter()
        .map(|b| {
            json!({
                "quantity": b.quantity.as_str(),
                "min": bound_end(b.min, true),
                "max": bound_end(b.max, false),
                "unit": b.quantity.unit(),
                "range": b.range_text(),
                "limits": b.limits.iter().map(|l| l.as_str()).collect::<Vec<_>>(),
                "source": b.source,
            })
        })
        .collect();
    let pair = |x: Option<(f64, f64)>| x.map_or(Value::Null, |(a, b)| json!([sig(a), sig(b)]));
    json!({
        "inside": c.domain.inside(),
        "exits": exits,
        "extrapolated_limits": c.domain.extrapolated.iter().map(|l| l.as_str()).collect::<Vec<_>>(),
        "limits_say": c.domain.limits_say.as_str(),
        "bounds": bounds,
        "span": c.domain_span.map_or(Value::Null, |s| json!({
            "convention": c.headroom_convention.as_str(),
            "impact_velocity_m_s": pair(s.velocity_m_s),
            "collision_angle_deg": pair(s.angle_deg),
        })),
        "window_span": c.inside_stretch.as_ref().map_or(Value::Null, |s| json!({
            "impact_velocity_m_s": pair(s.velocity_m_s),
            "collision_angle_deg": pair(s.angle_deg),
            "impact_velocity_stretches": s.velocity_runs.iter().map(|r| json!({
                "from_m_s": sig(r.from), "to_m_s": sig(r.to), "outside_trial_data": r.outside_trial_data, "partly_outside_trial_data": r.partly_outside_trial_data,
            })).collect::<Vec<_>>(),
            "collision_angle_stretches": s.angle_runs.iter().map(|r| json!({
                "from_deg": sig(r.from), "to_deg": sig(r.to), "outside_trial_data": r.outside_trial_data, "partly_outside_trial_data": r.partly_outside_trial_data,
            })).collect::<Vec<_>>(),
        })),
    })
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
    if let Some(t) = &c.trials {
        o.insert("beyond_trials".into(), json!(t.beyond_trials));
        o.insert(
            "nearest_trials".into(),
            json!(t
                .nearest
                .iter()
                .map(|n| json!({
                    "shot": n.index + 1,
                    "velocity_m_s": sig(n.velocity_m_s),
                    "angle_deg": sig(n.angle_deg),
                    "outcome": n.outcome,
                    "distance": sig(n.distance),
                    "source": n.source,
                }))
                .collect::<Vec<_>>()),
        );
    }
    o.insert("prediction".into(), json!(c.prediction.as_str()));
    o.insert("domain".into(), domain_json(window, c));
    o.insert("process".into(), json!(window.process));
    o.insert(
        "pressure_scope".into(),
        json!(crate::pair::pressure_default(window.process.as_deref()).1),
    );
    o.insert("warnings".into(), json!(c.warnings));
    o.insert("reason".into(), json!(c.reason));
    o.insert(
        "velocity_headroom".into(),
        crate::margin::verdict_velocity_headroom(window, c).map_or(Value::Null, |x| x.json()),
    );
    o.insert("rounding".into(), json!(crate::margin::ROUNDING_RULE));
    o.insert("caution".into(), json!(CAUTION));
    Value::Object(o)
}

/// JSON of a head-on impact (`check --angle 0deg`): the same keys as a classification where
/// they have a meaning, `null` where a head-on impact has none (no collision point).
pub fn head_on_json(window: &PairWindow, h: &HeadOn) -> Value {
    let mut o = Map::new();
    o.insert("pair".into(), json!(window.name));
    o.insert("flyer".into(), material_json(&window.flyer, false));
    if let Some(Value::Object(f)) = o.get_mut("flyer") {
        f.insert("thickness_m".into(), sig(window.flyer_thickness.si()));
    }
    o.insert("parent".into(), material_json(&window.parent, false));
    o.insert("convention".into(), json!(window.convention.as_str()));
    o.insert("impact_velocity_m_s".into(), sig(h.impact_velocity_m_s));
    o.insert("collision_angle_deg".into(), json!(0.0));
    for k in [
        "collision_velocity_m_s",
        "flow_velocity_m_s",
        "jetting_critical_angle_deg",
        "jetting_regime",
        "interface_wavelength_m",
        "binding",
        "binding_kind",
    ] {
        o.insert(k.into(), Value::Null);
    }
    o.insert("impact_pressure_pa".into(), sig(h.impact.pressure.si()));
    o.insert(
        "flyer_particle_velocity_m_s".into(),
        sig(h.impact.flyer_particle_velocity.si()),
    );
    o.insert(
        "parent_particle_velocity_m_s".into(),
        sig(h.impact.target_particle_velocity.si()),
    );
    o.insert("criteria".into(), json!([]));
    o.insert("boundaries".into(), json!([]));
    o.insert("inside".into(), json!(false));
    o.insert("outside_trial_data".into(), json!(false));
    o.insert("head_on".into(), json!(true));
    o.insert(
        "prediction".into(),
        json!(crate::classify::Prediction::HeadOn.as_str()),
    );
    o.insert("process".into(), json!(window.process));
    o.insert("warnings".into(), json!(h.warnings));
    o.insert("reason".into(), json!(crate::classify::HEAD_ON_REASON));
    o.insert("source".into(), json!(crate::classify::HEAD_ON_SOURCE));
    o.insert("caution".into(), json!(CAUTION));
    Value::Object(o)
}

/// The text of a head-on impact (`check --angle 0deg`): the 1-D impact state and the verdict.
#[must_use]
pub fn head_on_text(window: &PairWindow, h: &HeadOn, is_pair: bool) -> String {
    let mut s = String::new();
    let pair_note = if is_pair {
        format!(" (pair window '{}')", window.name)
    } else {
        String::new()
    };
    s.push_str(&format!(
        "{} flyer, {:.2} mm, on {} parent{}; head-on impact (collision angle 0)\n\n",
        window.flyer.material.id,
        window.flyer_thickness.mm(),
        window.parent.material.id,
        pair_note,
    ));
    let rows = vec![
        vec![
            "impact velocity Vp".into(),
            format!("{:.1} m/s", h.impact_velocity_m_s),
            "normal to both plates (every convention agrees)".into(),
        ],
        vec![
            "collision angle beta".into(),
            "0.00 deg".into(),
            "head-on: the flyer meets the parent face to face".into(),
        ],
        vec![
            "collision-point velocity Vc".into(),
            "none".into(),
            "no collision point sweeps the interface".into(),
        ],
        vec![
            "impact pressure".into(),
            format!("{:.2} GPa", h.impact.pressure.gpa()),
            "1-D impedance matching at Vp".into(),
        ],
        vec![
            "jetting critical angle".into(),
            "none".into(),
            "no jet forms in a head-on impact".into(),
        ],
    ];
    s.push_str(&table(&["quantity", "value", "note"], &rows));
    s.push('\n');
    s.push_str("verdict: NOT WELDED (head-on)\n");
    s.push_str(&format!("why: {}\n", crate::classify::HEAD_ON_REASON));
    s.push_str(&format!("source: {}\n", crate::classify::HEAD_ON_SOURCE));
    s.push_str("advice: tilt the flyer or the parent so that a collision angle forms (the window's limits are checked for angles above 0)\n");
    for w in &h.warnings {
        s.push_str(&format!("warning: {w}\n"));
    }
    s.push_str(CAUTION);
    s.push('\n');
    s
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

/// The two headroom cells of a limit: where it is reached along the impact velocity at this
/// angle and along the angle at this impact velocity, with the change (rounded to the safe side,
/// `crate::margin`).
fn headroom_cells(window: &PairWindow, c: &Classification, limit: &LimitRef) -> (String, String) {
    (
        crate::margin::velocity_headroom(window, c, limit).map_or("-".into(), |x| x.cell()),
        crate::margin::angle_headroom(window, c, limit).map_or("-".into(), |x| x.cell()),
    )
}

/// The text report of a classification, as `oblique check` prints it: the kinematics, every
/// limit with its margin and where it is reached, the verdict, the advice and the caution.
#[must_use]
pub fn classification_text(window: &PairWindow, c: &Classification, is_pair: bool) -> String {
    let mut s = quantities_text(window, c, is_pair);
    s.push_str(&limits_text(window, c));
    s.push_str(&verdict_text(window, c));
    s
}

/// The heading and the table of derived quantities.
fn quantities_text(window: &PairWindow, c: &Classification, is_pair: bool) -> String {
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
    let jet_note = jetting_note(&e.jetting);
    let jet_value = e.jetting.critical_angle_deg().map_or_else(
        || "none below 90 deg".to_string(),
        |d| format!("{d:.2} deg"),
    );
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
            "Vc / C0, Vf / C0".into(),
            format!(
                "{:.2}, {:.2}",
                col.collision_velocity.si() / window.parent.material.hugoniot.c0.si(),
                col.flow_velocity.si() / window.flyer.material.hugoniot.c0.si()
            ),
            "inflow Mach numbers: parent, flyer".into(),
        ],
        vec!["jetting critical angle".into(), jet_value, jet_note],
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
    s
}

/// The jetting row's note: which streams are supersonic and which rule decided.
#[must_use]
pub fn jetting_note(j: &oblique_core::jetting::JettingAssessment) -> String {
    use oblique_core::jetting::JettingRegime;
    match (j.regime, j.mixed_rule) {
        (_, Some(oblique_core::MixedRule::SupersonicSidePolar)) => format!(
            "{}: the supersonic stream's own polar (conservative mixed rule)",
            j.inflow_text()
        ),
        (_, Some(oblique_core::MixedRule::EitherSubsonic)) => format!(
            "{}: jet at any angle (either-subsonic rule, from memory)",
            j.inflow_text()
        ),
        (JettingRegime::Supersonic, _) if j.none_below_90 => {
            "both supersonic: the shock polars turn both streams at every angle".into()
        }
        (JettingRegime::Supersonic, _) => "both supersonic: shock-polar construction".into(),
        _ => "both subsonic: jet at any angle".into(),
    }
}

/// The table of every criterion and boundary with its margin and where it is reached.
fn limits_text(window: &PairWindow, c: &Classification) -> String {
    let e = &c.evaluation;
    let mut s = String::new();
    let mut crit_rows = Vec::new();
    for r in &e.criteria {
        let consts = r.constants_text("=");
        crit_rows.push(vec![
            r.id.as_str().to_string(),
            fmt_value(r.value, r.unit),
            format!(
                "{} {}{}",
                if r.kind == oblique_core::LimitKind::Lower {
                    ">="
                } else {
                    "<="
                },
                r.limit_text(),
                r.limit_tm_celsius.map_or(String::new(), |l| format!(
                    " ({} if Tm in degC)",
                    fmt_value(l, r.unit)
                ))
            ),
            fmt_margin(r.margin, r.unit),
            format!(
                "{}{}",
                if r.informational {
                    "info"
                } else if r.satisfied {
                    "yes"
                } else {
                    "NO"
                },
                if c.domain.extrapolated.contains(&r.id) {
                    "*"
                } else {
                    ""
                }
            ),
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
                        crate::boundary::WeldSide::Above | crate::boundary::WeldSide::Right
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
    s.push_str("  (velocity headroom: where the limit is reached along the impact velocity at this angle, and the change from the point; angle headroom: the same along the angle at this velocity; both searched inside the validity domain; margin at this point: value - limit at this Vc)\n");
    s.push_str(&format!("  ({})\n", crate::margin::ROUNDING_RULE));
    if !c.domain.extrapolated.is_empty() {
        s.push_str("  (*: evaluated outside its validity domain, an extrapolation)\n");
    }
    s.push('\n');
    s
}

/// The verdict, the binding and failing limits with their advice, and the caution, as `check`
/// prints them.
#[must_use]
pub fn verdict_text(window: &PairWindow, c: &Classification) -> String {
    let mut s = String::new();
    let beyond = c.trials.as_ref().is_some_and(|t| t.beyond_trials);
    let verdict = match (c.domain.inside(), c.inside, c.outside_trial_data, beyond) {
        (false, ..) => "OUTSIDE THE VALIDITY DOMAIN (no verdict claimed)",
        (true, true, false, false) => "INSIDE the window",
        // A user boundary does not reach the point (JSON outside_trial_data).
        (true, true, true, _) => "INSIDE the model limits and the boundaries that span this point, but OUTSIDE the trial data",
        // Every boundary reaches it, but no trial was fired near it (JSON beyond_trials).
        (true, true, false, true) => "INSIDE the window, but OUTSIDE the trial data (beyond the region the trials cover)",
        (true, false, ..) => "OUTSIDE the window",
    };
    s.push_str(&format!("verdict: {verdict}\n"));
    if !c.domain.inside() {
        for e in &c.domain.exits {
            s.push_str(&format!(
                "domain: {} ({})\n",
                e.text(),
                short_source(e.source)
            ));
        }
        let say = match c.domain.limits_say {
            crate::classify::Prediction::Welded => "inside the window",
            crate::classify::Prediction::Melted => "melted",
            _ => "not welded",
        };
        s.push_str(&format!(
            "the limits, extrapolated to this point, would say: {say} (not a prediction)\n"
        ));
    }
    let x = if c.domain.inside() {
        ""
    } else {
        " (extrapolated)"
    };
    if c.inside {
        if let Some(v) = crate::margin::verdict_velocity_headroom(window, c) {
            s.push_str(&format!("{}\n", v.sentence()));
        }
    } else if let Some(b) = &c.binding {
        s.push_str(&format!(
            "{}{x}: {}: {}\n",
            if c.domain.limits_say == crate::classify::Prediction::Welded && !c.domain.inside() {
                "closest limit"
            } else {
                "binding"
            },
            limit_label(window, b),
            limit_advice(window, c, b)
        ));
    }
    for f in c.failing.iter().filter(|f| Some(*f) != c.binding.as_ref()) {
        s.push_str(&format!(
            "also failing{x}: {}: {}\n",
            limit_label(window, f),
            limit_advice(window, c, f)
        ));
    }
    if let Some(t) = crate::advice::inside_stretch_text(c) {
        s.push_str(&format!("where the window is: {t}\n"));
    }
    if c.outside_trial_data {
        s.push_str("note: the point lies outside the span of at least one user boundary (outside the trial data); that boundary was not extrapolated\n");
    }
    if let Some(t) = &c.trials {
        s.push_str(&trials_text(t));
    }
    if window.criteria.pressure_enabled && window.process.as_deref() != Some("magnetic-pulse") {
        s.push_str(&format!(
            "note: pressure-lower {}\n",
            crate::pair::pressure_default(window.process.as_deref()).1
        ));
    }
    for w in &c.warnings {
        s.push_str(&format!("warning: {w}\n"));
    }
    s.push_str(CAUTION);
    s.push('\n');
    s
}

/// A bound's source cut to its first clause, for one-line text.
fn short_source(source: &str) -> &str {
    source.split(':').next().unwrap_or(source)
}

/// The trials near a point, in words: whether the point lies beyond the region they cover and
/// the nearest ones with their outcomes and scaled distances.
fn trials_text(t: &crate::trials::TrialsNear) -> String {
    let mut s = String::new();
    if t.beyond_trials {
        s.push_str(&format!(
            "note: outside the trial data: no trial was fired at a velocity and angle like this point (the trials, widened by their uncertainties, cover {:.0}-{:.0} m/s and {:.1}-{:.1} deg, but not every combination); here the window rests on the model and the boundaries alone\n",
            t.velocity_range_m_s.0,
            t.velocity_range_m_s.1,
            t.angle_range_deg.0,
            t.angle_range_deg.1
        ));
    }
    if !t.nearest.is_empty() {
        s.push_str(&format!(
            "nearest trials (distance in units of {:.0} m/s and {:.1} deg, the trials' typical uncertainties):\n",
            t.scales.velocity_m_s, t.scales.angle_deg
        ));
        for n in &t.nearest {
            s.push_str(&format!(
                "  shot #{} {:.0} m/s, {:.2} deg: {} (distance {:.1}; {})\n",
                n.index + 1,
                n.velocity_m_s,
                n.angle_deg,
                n.outcome,
                n.distance,
                crate::text::one_line(&n.source)
            ));
        }
    }
    s
}
