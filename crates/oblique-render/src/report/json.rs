//! The JSON twin of the report: the same content as the HTML, SI values under unit-suffixed
//! keys, for archiving and for other tools.

use super::html::cited_keys;
use super::{assumptions, ReportInput, CAUTIONS, DOES_NOT_COVER};
use oblique_setup::{Candidate, Produced};
use oblique_window::margin::{verdict_velocity_headroom, DEFINITIONS, ROUNDING_RULE};
use oblique_window::present::{classification_json, material_json, sig, CAUTION};
use oblique_window::PairWindow;
use serde_json::{json, Map, Value};

fn candidate_json(w: &PairWindow, c: &Candidate<'_>, reason: Option<&str>) -> Value {
    let settings: Map<String, Value> = c
        .settings
        .iter()
        .map(|(k, v)| (k.trim_start_matches('-').to_string(), json!(v)))
        .collect();
    let (v, a) = c.point().map_or((Value::Null, Value::Null), |(v, a)| {
        (sig(v), sig(a.to_degrees()))
    });
    json!({
        "label": c.label,
        "settings": settings,
        "impact_velocity_m_s": v,
        "collision_angle_deg": a,
        "inside": c.check.as_ref().map(|k| k.inside),
        "outside_trial_data": c.check.as_ref().map(|k| k.outside_trial_data),
        "verdict": c.verdict(w),
        "velocity_headroom": c.headroom(w).map_or(Value::Null, |x| x.json()),
        "not_chosen_because": reason,
        "given_reason": c.given_reason,
    })
}

/// The JSON twin of the report (`null` check when the chosen set-up has none).
#[must_use]
pub fn json(input: &ReportInput<'_>) -> Value {
    let w = input.window;
    let d = input.decision;
    let mut check = d
        .chosen
        .check
        .as_ref()
        .map_or(Value::Null, |c| classification_json(w, c));
    if let Some(o) = check.as_object_mut() {
        o.insert("flyer_thickness_m".into(), sig(w.flyer_thickness.si()));
    }
    let setup = match &d.chosen.produced {
        Produced::Point => Value::Null,
        Produced::Magnetic(r) => oblique_setup::present::estimate_json(r, None),
        Produced::Explosive(x) => oblique_setup::present::explosive_json(x),
    };
    let p = &input.provenance;
    // The keys the HTML cites too: materials, criteria, assumptions.
    let mut text = assumptions(w).join(" ");
    if let Some(c) = &d.chosen.check {
        for r in &c.evaluation.criteria {
            for k in oblique_window::references::criterion_keys(r.id) {
                text.push_str(&format!(" [{k}]"));
            }
        }
    }
    text.push_str(" [M94]");
    let refs: Map<String, Value> = cited_keys(input, &text)
        .into_iter()
        .filter_map(|k| input.references.get(&k).map(|r| (k, json!(r.full()))))
        .collect();
    json!({
        "report": "oblique decision record",
        "version": p.version,
        "pair": w.name,
        "invented": w.invented,
        "question": input.question,
        "verdict": {
            "chosen": d.chosen.label,
            "inside": d.chosen.check.as_ref().map(|c| c.inside),
            "outside_trial_data": d.chosen.check.as_ref().map(|c| c.outside_trial_data),
            "reason": d.chosen.check.as_ref().map(|c| c.reason.clone()),
            "velocity_headroom": d.chosen.check.as_ref().and_then(|c| verdict_velocity_headroom(w, c)).map_or(Value::Null, |x| x.json()),
        },
        "probability": input.probability.as_ref().map(|q| json!({
            "value": q.value,
            "interval": q.interval.map(|(a, b)| vec![a, b]),
            "method": q.method,
        })),
        "choice_rule": d.rule.text(),
        "chosen": candidate_json(w, &d.chosen, None),
        "alternatives": d.alternatives.iter().enumerate().map(|(k, a)| {
            let mut v = candidate_json(w, &a.candidate, Some(&a.reason));
            if let Value::Object(o) = &mut v {
                o.insert("weld_probability".into(), json!(input.alternative_probabilities.get(k).copied().flatten()));
            }
            v
        }).collect::<Vec<_>>(),
        "setup": setup,
        "window_file": {"file": w.origin.display, "sha256": w.origin.sha256},
        "check": check,
        "agreement": input.agreement,
        "materials": {"flyer": material_json(&w.flyer, true), "parent": material_json(&w.parent, true)},
        "criteria_reasons": w.criteria_reasons.iter().map(|(k, v)| (k.as_str().to_string(), v.clone())).collect::<std::collections::BTreeMap<_, _>>(),
        "margin_definitions": DEFINITIONS.iter().map(|(k, v)| (k.to_string(), json!(v))).collect::<Map<_, _>>(),
        "rounding": ROUNDING_RULE,
        "assumptions": assumptions(w),
        "does_not_cover": DOES_NOT_COVER,
        "cautions": CAUTIONS,
        "caution": CAUTION,
        "references": refs,
        "provenance": {
            "version": p.version,
            "generated": p.generated,
            "from_source_date_epoch": p.from_source_date_epoch,
            "prepared_by": p.prepared_by,
            "checked_by": p.checked_by,
            "command": p.command,
            "files": p.files.iter().map(|f| json!({"role": f.role, "file": f.file, "sha256": f.sha256})).collect::<Vec<_>>(),
        },
    })
}
