//! What `pair list`, `pair show` and `pair agreement` print: tables, text and JSON.

use super::*;
use oblique_window::text::one_line;

pub(super) fn pair_summary_json(w: &PairWindow) -> Value {
    json!({
        "name": w.name,
        "flyer": w.flyer.material.id,
        "parent": w.parent.material.id,
        "flyer_thickness_m": sig(w.flyer_thickness.si()),
        "convention": w.convention.as_str(),
        "observations": w.observations.len(),
        "boundaries": w.boundaries.len(),
        "invented": w.invented.is_some(),
        "file": w.origin.display,
    })
}

pub(super) fn pair_json(w: &PairWindow) -> Value {
    let mut v = pair_summary_json(w);
    let o = v.as_object_mut().map(std::mem::take).unwrap_or_default();
    let mut o = o;
    o.insert("description".into(), json!(w.description));
    o.insert("invented_statement".into(), json!(w.invented));
    o.insert("sha256".into(), json!(w.origin.sha256));
    o.insert("maintainer".into(), json!(w.maintainer));
    o.insert(
        "revisions".into(),
        json!(w
            .revisions
            .iter()
            .map(|r| json!({"date": r.date, "note": r.note}))
            .collect::<Vec<_>>()),
    );
    o.insert(
        "parent_thickness_m".into(),
        json!(w.parent_thickness.map(|t| sig(t.si()))),
    );
    o.insert("flyer_material".into(), material_json(&w.flyer, true));
    o.insert("parent_material".into(), material_json(&w.parent, true));
    o.insert("criteria".into(), json!(w.criteria));
    o.insert("process".into(), json!(w.process));
    o.insert(
        "pressure_scope".into(),
        json!(oblique_window::pair::pressure_default(w.process.as_deref()).1),
    );
    o.insert("validity_domain".into(), json!(w.domain));
    o.insert(
        "criteria_reasons".into(),
        json!(w
            .criteria_reasons
            .iter()
            .map(|(k, v)| (k.as_str().to_string(), v.clone()))
            .collect::<std::collections::BTreeMap<_, _>>()),
    );
    o.insert(
        "boundary_list".into(),
        json!(w
            .boundaries
            .iter()
            .map(|b| json!({
                "label": b.label,
                "plane": b.plane.as_str(),
                "weld_side": b.weld_side.as_str(),
                "points": b.points.iter().map(|(v, a)| json!({"velocity_m_s": sig(v.si()), "angle_deg": sig(a.degrees())})).collect::<Vec<_>>(),
                "provenance": b.provenance,
            }))
            .collect::<Vec<_>>()),
    );
    o.insert(
        "observation_list".into(),
        json!(w
            .observations
            .iter()
            .map(|ob| json!({
                "index": ob.index,
                "shot": ob.index + 1,
                "velocity_m_s": sig(ob.velocity.si()),
                "angle_deg": sig(ob.angle.degrees()),
                "outcome": ob.outcome.as_str(),
                "process": ob.process,
                "method": ob.method,
                "velocity_uncertainty_m_s": ob.velocity_uncertainty.map(|v| sig(v.si())),
                "angle_uncertainty_deg": ob.angle_uncertainty.map(|a| sig(a.degrees())),
                "date": ob.date,
                "source": ob.source,
                "note": ob.note,
            }))
            .collect::<Vec<_>>()),
    );
    Value::Object(o)
}

pub(super) fn show_human(w: &PairWindow) -> String {
    let mut s = format!(
        "pair {}: {} flyer {:.2} mm on {} parent; convention {}\n",
        w.name,
        w.flyer.material.id,
        w.flyer_thickness.mm(),
        w.parent.material.id,
        w.convention
    );
    if let Some(inv) = &w.invented {
        s.push_str(&format!("INVENTED DATA: {inv}\n"));
    }
    s.push_str(&format!(
        "process: {}\n",
        w.process.as_deref().unwrap_or("not given")
    ));
    if !w.description.is_empty() {
        s.push_str(&format!("{}\n", w.description));
    }
    s.push_str(&format!(
        "file: {} (sha256 {})\nmaintainer: {}\n",
        w.origin.display,
        w.origin.sha256,
        one_line(&w.maintainer)
    ));
    for r in &w.revisions {
        s.push_str(&format!("  {}  {}\n", one_line(&r.date), one_line(&r.note)));
    }
    let c = &w.criteria;
    s.push_str("\ncriteria:\n");
    let onoff = |b: bool| if b { "on " } else { "off" };
    s.push_str(&format!(
        "  deribas-lower    {} k = {}\n",
        onoff(c.deribas_enabled),
        c.deribas_k
    ));
    s.push_str(&format!(
        "  strength-lower   {}\n",
        onoff(c.strength_enabled)
    ));
    s.push_str(&format!(
        "  pressure-lower   {} {} x HEL ({})\n",
        onoff(c.pressure_enabled),
        c.hel_multiple,
        oblique_window::pair::pressure_default(w.process.as_deref()).1
    ));
    s.push_str(&format!(
        "  melting-upper    {} N = {}, form {:?}{}\n",
        onoff(c.melting_enabled),
        c.wittman_n,
        c.wittman_form,
        if c.wittman_form == oblique_core::WittmanForm::B {
            " (no source found for form B)"
        } else {
            ""
        }
    ));
    s.push_str(&format!(
        "  jetting          {} mixed case (one plate supersonic): {}\n",
        onoff(c.jetting_enabled),
        c.mixed_jetting.as_str()
    ));
    s.push_str(&format!(
        "  wavy-transition  {} Re_crit = {} (informational)\n",
        onoff(c.wavy_enabled),
        c.wavy_critical_reynolds
    ));
    for (id, r) in &w.criteria_reasons {
        s.push_str(&format!("  reason for {id}: {r}\n"));
    }
    s.push_str("\nvalidity domain (no verdict outside it; docs/theory.md §7.1):\n");
    for b in &w.domain.bounds {
        s.push_str(&format!("  {}: {}\n", b.quantity.label(), b.range_text()));
    }
    s.push_str(&format!("\nboundaries: {}\n", w.boundaries.len()));
    for b in &w.boundaries {
        let pts: Vec<String> = b
            .points
            .iter()
            .map(|(v, a)| format!("({:.0} m/s, {:.2} deg)", v.si(), a.degrees()))
            .collect();
        s.push_str(&format!(
            "  \"{}\" [{}], welds {}: {}\n    provenance: {}\n",
            one_line(&b.label),
            b.plane.as_str(),
            b.weld_side.as_str(),
            pts.join(" "),
            one_line(&b.provenance)
        ));
    }
    s.push_str(&format!("\nobservations: {}\n", w.observations.len()));
    let rows: Vec<Vec<String>> = w
        .observations
        .iter()
        .map(|o| {
            vec![
                (o.index + 1).to_string(),
                format!("{:.0}", o.velocity.si()),
                format!("{:.2}", o.angle.degrees()),
                o.outcome.as_str().into(),
                o.process.clone(),
                o.method.clone(),
                one_line(o.date.as_deref().unwrap_or_default()).into_owned(),
                one_line(&o.source).into_owned(),
            ]
        })
        .collect();
    if !rows.is_empty() {
        s.push_str(&table(
            &[
                "#", "Vp m/s", "beta deg", "outcome", "process", "method", "date", "source",
            ],
            &rows,
        ));
    }
    s
}

pub(super) fn agreement_human(w: &PairWindow, a: &oblique_window::Agreement) -> String {
    let judged = a.observations - a.outside_domain.len();
    let mut s = format!(
        "agreement of pair '{}' with its {} trial(s): {} agree",
        w.name, a.observations, a.agreeing
    );
    if judged > 0 {
        s.push_str(&format!(
            " ({:.0} % of the {judged} inside the validity domain)",
            100.0 * a.agreeing as f64 / judged as f64
        ));
    }
    s.push_str("\n\n");
    let outcomes = ["welded", "not-welded", "partial", "melted"];
    let rows: Vec<Vec<String>> = ["welded", "not-welded", "melted"]
        .iter()
        .map(|p| {
            let mut r = vec![format!("predicted {p}")];
            for o in outcomes {
                r.push(
                    a.table
                        .get(p)
                        .and_then(|row| row.get(o))
                        .copied()
                        .unwrap_or(0)
                        .to_string(),
                );
            }
            r
        })
        .collect();
    let mut header = vec![""];
    header.extend(outcomes.iter().copied());
    s.push_str("              observed ->\n");
    s.push_str(&table(&header, &rows));
    s.push_str(&format!("({})\n", a.partial_rule));
    if a.disagreements.is_empty() {
        s.push_str("\nno disagreements\n");
    } else {
        s.push_str("\ndisagreements:\n");
        for d in &a.disagreements {
            s.push_str(&format!(
                "  #{} {:.0} m/s, {:.2} deg: observed {}, predicted {}; misjudged by {}: {}\n    source: {}\n",
                d.index + 1,
                d.velocity_m_s,
                d.angle_deg,
                d.observed.as_str(),
                d.predicted.as_str(),
                if d.misjudged_by.is_empty() { "-".to_string() } else { d.misjudged_by.join(", ") },
                d.explanation,
                d.source
            ));
        }
        s.push_str(&format!(
            "what constants would fit: `oblique pair fit {}` fits the Deribas and Wittman constants to every trial (maximum likelihood, with intervals; --save stores them)\n",
            w.name
        ));
    }
    if !a.outside_domain.is_empty() {
        s.push_str("\noutside the validity domain (no verdict claimed there; neither agreement nor disagreement):\n");
        for t in &a.outside_domain {
            s.push_str(&format!(
                "  #{} {:.0} m/s, {:.2} deg: observed {}; {}\n",
                t.index + 1,
                t.velocity_m_s,
                t.angle_deg,
                t.observed.as_str(),
                t.exits
            ));
        }
    }
    if w.invented.is_some() {
        s.push_str("\nnote: this pair's data are INVENTED for the demo\n");
    }
    s
}
