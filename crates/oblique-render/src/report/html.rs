//! The parts of the HTML report, each one function: the decision (question, verdict, chosen
//! set-up, alternatives), the window at the chosen point (derived quantities, limits, headroom,
//! boundaries), the plots, the trials, the materials, the assumptions and cautions, the
//! references and the provenance.

use super::style::CSS;
use super::{assumptions, esc, ReportInput, CAUTIONS, DOES_NOT_COVER};
use crate::error::{RenderError, RenderResult};
use crate::window_plot::{render_svg, PlotRequest, PointRole, ProposedPoint};
use oblique_core::jetting::JettingRegime;
use oblique_core::CriterionId;
use oblique_setup::{Candidate, Produced};
use oblique_window::advice::inside_stretch_text;
use oblique_window::boundary::Plane;
use oblique_window::classify::{limit_label, Classification};
use oblique_window::margin::{angle_headroom, velocity_headroom, verdict_velocity_headroom};
use oblique_window::materials::PROPERTIES;
use oblique_window::present::{fmt_margin, fmt_value};
use oblique_window::references::{citation_keys, criterion_keys};
use oblique_window::PairWindow;
use std::fmt::Write as _;

fn fmt(v: f64, digits: usize) -> String {
    format!("{v:.digits$}")
}

/// A path or other long token: escaped, with a break opportunity after each slash.
fn long(s: &str) -> String {
    esc(s).replace('/', "/<wbr/>")
}

/// A candidate's settings, each flag and value kept on one line.
fn settings_html(c: &Candidate<'_>) -> String {
    c.settings
        .iter()
        .map(|(k, v)| {
            format!(
                "<span class=\"nw\"><code>{}</code> {}</span>",
                esc(k),
                esc(v)
            )
        })
        .collect::<Vec<_>>()
        .join(", ")
}

/// The chosen set-up's window check (required).
fn chosen_check<'a>(input: &'a ReportInput<'_>) -> RenderResult<&'a Classification> {
    input.decision.chosen.check.as_ref().ok_or_else(|| {
        RenderError::Draw(format!(
            "the chosen set-up '{}' has no window check ({}): a record needs its verdict",
            input.decision.chosen.label,
            input
                .decision
                .chosen
                .no_check
                .as_deref()
                .unwrap_or("no impact")
        ))
    })
}

/// The whole page.
pub(super) fn page(input: &ReportInput<'_>) -> RenderResult<String> {
    let c = chosen_check(input)?;
    let mut body = String::new();
    body.push_str(&part_decision(input, c));
    body.push_str(&part_window(input, c));
    body.push_str(&part_plots(input)?);
    body.push_str(&part_trials(input));
    body.push_str(&part_materials(input));
    body.push_str(&part_assumptions(input));
    let refs = part_references(input, &body);
    let w = input.window;
    let mut h = format!(
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n<title>Decision record: {}</title>\n<style>{CSS}</style>\n</head>\n<body>\n",
        esc(&w.name)
    );
    h.push_str(&body);
    h.push_str(&refs);
    h.push_str(&part_provenance(input));
    h.push_str("</body>\n</html>\n");
    Ok(h)
}

/// Title, who and when, the question, the verdict, the chosen set-up and the alternatives.
fn part_decision(input: &ReportInput<'_>, c: &Classification) -> String {
    let w = input.window;
    let p = &input.provenance;
    let mut h = String::from("<div class=\"part first\" id=\"decision\">\n");
    let _ = writeln!(
        h,
        "<h1>Decision record: {}</h1>\n<table class=\"meta\"><tbody>",
        esc(&w.name)
    );
    for (k, v) in [
        ("pair window", esc(&w.name)),
        ("generated", esc(&p.generated)),
        (
            "prepared by",
            esc(p
                .prepared_by
                .as_deref()
                .unwrap_or("(not given: --prepared-by)")),
        ),
        (
            "checked by",
            esc(p
                .checked_by
                .as_deref()
                .unwrap_or("(not given: --checked-by)")),
        ),
        ("tool", format!("oblique {}", esc(&p.version))),
    ] {
        let _ = writeln!(h, "<tr><th>{k}</th><td>{v}</td></tr>");
    }
    h.push_str("</tbody></table>\n");
    if let Some(inv) = &w.invented {
        let _ = writeln!(h, "<p class=\"invented\">INVENTED DATA. {}</p>", esc(inv));
    }
    let _ = writeln!(h, "<p class=\"caution\">{}</p>", esc(CAUTIONS[0]));
    let _ = writeln!(
        h,
        "<h2 id=\"question\">The question</h2>\n<p>{}</p>",
        esc(&question(input, c))
    );
    h.push_str(&verdict(input, c));
    h.push_str(&chosen_setup(input));
    h.push_str(&alternatives(input));
    h.push_str("</div>\n");
    h
}

fn question(input: &ReportInput<'_>, c: &Classification) -> String {
    if let Some(q) = &input.question {
        return q.clone();
    }
    let w = input.window;
    let col = &c.evaluation.collision;
    let what = match &input.decision.chosen.produced {
        Produced::Point => format!(
            "at impact velocity Vp = {} m/s and collision angle beta = {} deg (convention {})",
            fmt(col.impact_velocity.si(), 1),
            fmt(col.angle.degrees(), 2),
            col.convention
        ),
        Produced::Magnetic(r) => format!(
            "with the {} set-up {} ({})",
            r.setup.model.id(),
            input.decision.chosen.settings_text(),
            r.setup.model.title()
        ),
        Produced::Explosive(_) => format!(
            "with the explosive set-up {} (Gurney open-faced sandwich)",
            input.decision.chosen.settings_text()
        ),
    };
    let others = input.decision.alternatives.len();
    format!(
        "Will a flyer of {} ({} mm) striking a parent of {} {what} land inside this pair's weldability window, with what velocity headroom and against which limit{}?",
        w.flyer.material.name,
        fmt(w.flyer_thickness.mm(), 2),
        w.parent.material.name,
        if others > 0 {
            format!(", and is it the best of the {} set-ups considered", others + 1)
        } else {
            String::new()
        }
    )
}

fn verdict(input: &ReportInput<'_>, c: &Classification) -> String {
    let w = input.window;
    let word = match (c.inside, c.outside_trial_data) {
        _ if !c.domain.inside() => "OUTSIDE THE VALIDITY DOMAIN: no verdict claimed",
        (true, false) => "INSIDE the window",
        (true, true) => "INSIDE the model limits, but OUTSIDE the trial data",
        (false, _) => "OUTSIDE the window",
    };
    let mut h = format!(
        "<h2 id=\"verdict\">Verdict</h2>\n<div class=\"verdict{}\"><div class=\"big\">{}: {}</div>\n",
        if c.inside && !c.outside_trial_data { "" } else { " outside" },
        esc(&input.decision.chosen.label),
        word
    );
    if !c.inside {
        let _ = writeln!(h, "<p>{}</p>", esc(&c.reason));
    }
    if let Some(v) = verdict_velocity_headroom(w, c) {
        let _ = writeln!(h, "<p><b>{}</b></p>", esc(&v.sentence()));
    }
    if let Some(t) = inside_stretch_text(c) {
        let _ = writeln!(h, "<p>Where the window is: {}.</p>", esc(&t));
    }
    // The same warnings as the JSON twin's `check.warnings` (what the physics does not know
    // at this point: the mixed jetting regime, an implausible input, ...).
    for wn in &c.warnings {
        let _ = writeln!(h, "<p class=\"warning\"><b>Warning:</b> {}</p>", esc(wn));
    }
    if c.outside_trial_data {
        h.push_str("<p class=\"fail\">The point lies outside the span of at least one user boundary (outside the trial data); that boundary was not extrapolated, so the verdict rests on the model criteria there.</p>\n");
    }
    match &input.probability {
        Some(p) => {
            let _ = writeln!(
                h,
                "<p class=\"probability\"><b>Probability of a weld: {}</b>{}. {}</p>",
                fmt(100.0 * p.value, 0) + " %",
                p.interval.map_or(String::new(), |(a, b)| format!(
                    " (interval {} to {} %)",
                    fmt(100.0 * a, 0),
                    fmt(100.0 * b, 0)
                )),
                esc(&p.method)
            );
        }
        None => h.push_str("<p class=\"probability small\">No weld probability was asked for: give the scatter of the point (--velocity-sd, --angle-sd) to have one stated here (a process set-up's record states one by default, under the scatter its efficiency implies).</p>\n"),
    }
    let _ = writeln!(
        h,
        "<p class=\"small\">Margins: {}</p></div>",
        esc(oblique_window::margin::ROUNDING_RULE)
    );
    h
}

/// The heading of the chosen set-up's section: "The chosen set-up", followed by its label when
/// the label says more than the role does (the default label is "chosen", which would read
/// "The chosen set-up: chosen").
fn chosen_heading(label: &str) -> String {
    let l = label.trim();
    let bare = l.to_lowercase().replace(['-', '_'], " ");
    if l.is_empty()
        || [
            "chosen",
            "chosen set up",
            "chosen setup",
            "the chosen set up",
        ]
        .contains(&bare.as_str())
    {
        "The chosen set-up".to_string()
    } else {
        format!("The chosen set-up: {l}")
    }
}

/// The chosen set-up: its settings and, for a process, every input with its provenance and
/// the estimate's main results.
fn chosen_setup(input: &ReportInput<'_>) -> String {
    let ch = &input.decision.chosen;
    let mut h = format!(
        "<h2 id=\"chosen\">{}</h2>\n<p>Settings: {}. {}</p>\n",
        esc(&chosen_heading(&ch.label)),
        settings_html(ch),
        esc(&capitalise(input.decision.rule.text()))
    );
    let r = match &ch.produced {
        Produced::Magnetic(r) => r,
        Produced::Explosive(x) => {
            h.push_str(&explosive_setup(x));
            return h;
        }
        Produced::Point => return h,
    };
    let s = &r.setup;
    let _ = writeln!(
        h,
        "<p>Model: <b>{}</b>, {}.</p>",
        esc(s.model.id()),
        esc(s.model.title())
    );
    h.push_str(&inputs_table(&s.inputs));
    let e = &r.estimate;
    let mut rows = vec![
        (
            "stored energy",
            format!("{} kJ", fmt(e.stored_energy.si() / 1e3, 2)),
        ),
        (
            "peak current",
            format!("{} kA", fmt(e.peak_current.si() / 1e3, 1)),
        ),
        (
            "peak field in the gap",
            format!("{} T", fmt(e.peak_field.si(), 1)),
        ),
        (
            "peak pressure on the workpiece",
            format!("{} MPa", fmt(e.peak_effective_pressure.si() / 1e6, 0)),
        ),
        ("skin factor", fmt(e.skin_factor, 3)),
    ];
    match e.outcome {
        oblique_core::process::ImpactOutcome::Impact {
            time,
            velocity,
            after_first_half_wave,
        } => {
            rows.push(("impact time", format!("{} us", fmt(time.si() * 1e6, 2))));
            rows.push((
                "impact velocity Vp (normal to the flyer)",
                format!("{} m/s", fmt(velocity.si(), 0)),
            ));
            if after_first_half_wave {
                rows.push(("note", "impact after the first current zero".into()));
            }
        }
        oblique_core::process::ImpactOutcome::NoImpact { reason, .. } => {
            rows.push(("outcome", format!("no impact: {reason}")));
        }
    }
    h.push_str("<h3>Estimate</h3>\n<table class=\"meta\"><tbody>");
    for (k, v) in rows {
        let _ = writeln!(h, "<tr><th>{}</th><td>{}</td></tr>", esc(k), esc(&v));
    }
    h.push_str("</tbody></table>\n");
    for wng in e
        .warnings
        .iter()
        .map(ToString::to_string)
        .chain(s.inputs.efficiency_warnings())
    {
        let _ = writeln!(h, "<p class=\"fail\">Warning: {}</p>", esc(&wng));
    }
    h
}

/// An explosive set-up: its inputs with their provenance and the Gurney estimate.
fn explosive_setup(x: &oblique_setup::ExplosiveReport<'_>) -> String {
    let mut h = String::from("<p>Model: <b>explosive</b>, Gurney open-faced sandwich and the collision kinematics of the parallel or inclined set-up.</p>\n");
    h.push_str(&inputs_table(&x.inputs));
    let e = &x.estimate;
    let col = &e.collision;
    h.push_str("<h3>Estimate</h3>\n<table class=\"meta\"><tbody>");
    for (k, v) in [
        ("Gurney factor V / sqrt(2E)", fmt(e.gurney_factor, 4)),
        (
            "flyer (impact) velocity Vp",
            format!("{} m/s", fmt(e.impact_velocity.si(), 0)),
        ),
        (
            "collision angle beta",
            format!("{} deg", fmt(col.angle.degrees(), 2)),
        ),
        (
            "collision-point velocity Vc",
            format!("{} m/s", fmt(col.collision_velocity.si(), 0)),
        ),
    ] {
        let _ = writeln!(h, "<tr><th>{}</th><td>{}</td></tr>", esc(k), esc(&v));
    }
    h.push_str("</tbody></table>\n<p class=\"fail\">Explosives kill: their handling, storage and use are for licensed people under local law.</p>\n");
    h
}

/// Every input of a set-up with its value and where it came from.
fn inputs_table(inputs: &oblique_setup::Inputs) -> String {
    let mut h = String::from("<h3>Inputs and where each came from</h3>\n<table><thead><tr><th>quantity</th><th>value</th><th>from</th></tr></thead><tbody>\n");
    for i in &inputs.entries {
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td class=\"num\">{}</td><td>{}</td></tr>",
            esc(i.label),
            esc(&i.value.shown()),
            long(&i.from.to_string())
        );
    }
    h.push_str("</tbody></table>\n");
    h
}

fn capitalise(s: &str) -> String {
    let mut c = s.chars();
    c.next().map_or(String::new(), |f| {
        f.to_uppercase().collect::<String>() + c.as_str()
    })
}

/// Every alternative, its verdict, headroom and the reason it was not chosen.
fn alternatives(input: &ReportInput<'_>) -> String {
    let w = input.window;
    let d = input.decision;
    let mut h = String::from("<h2 id=\"alternatives\">Alternatives considered</h2>\n");
    if d.alternatives.is_empty() {
        h.push_str(
            "<p>No alternative was given to this record (--alternative, --from-sweep).</p>\n",
        );
        return h;
    }
    // P(weld) beside each candidate when the record computed them (the same scatter rule,
    // draws and seed as the chosen set-up's).
    let with_p = input.probability.is_some() && !input.alternative_probabilities.is_empty();
    let _ = writeln!(
        h,
        "<p>{} alternative(s), each evaluated as the chosen set-up was{}.</p>\n<table><thead><tr><th>candidate</th><th>settings</th><th>Vp, angle</th><th>verdict</th>{}<th>why it was not chosen</th></tr></thead><tbody>",
        d.alternatives.len(),
        if with_p {
            "; P(weld): the weld probability under the scatter stated in the verdict"
        } else {
            ""
        },
        if with_p { "<th>P(weld)</th>" } else { "" }
    );
    let row = |c: &Candidate<'_>, why: &str, chosen: bool, p: Option<f64>| -> String {
        let at = c.point().map_or("-".into(), |(v, a)| {
            format!("{} m/s, {} deg", fmt(v, 0), fmt(a.to_degrees(), 2))
        });
        let pcell = if with_p {
            format!(
                "<td class=\"num\">{}</td>",
                p.map_or("-".into(), |x| format!("{:.0} %", 100.0 * x))
            )
        } else {
            String::new()
        };
        format!(
            "<tr{}><td>{}</td><td>{}</td><td class=\"num\">{}</td><td>{}</td>{}<td>{}</td></tr>\n",
            if chosen { " class=\"chosen\"" } else { "" },
            esc(&c.label),
            settings_html(c),
            esc(&at),
            esc(&c.verdict(w)),
            pcell,
            esc(why)
        )
    };
    let chosen_why = d.chosen.headroom(w).map_or_else(
        || "chosen".to_string(),
        |a| format!("chosen; {}", a.sentence()),
    );
    h.push_str(&row(
        &d.chosen,
        &chosen_why,
        true,
        input.probability.as_ref().map(|p| p.value),
    ));
    for (k, a) in d.alternatives.iter().enumerate() {
        h.push_str(&row(
            &a.candidate,
            &a.reason,
            false,
            input.alternative_probabilities.get(k).copied().flatten(),
        ));
    }
    h.push_str("</tbody></table>\n");
    h
}

/// Derived quantities, limits and headroom at the chosen point, user boundaries.
fn part_window(input: &ReportInput<'_>, c: &Classification) -> String {
    let mut h = String::from(
        "<div class=\"part\" id=\"window\">\n<h2>The window at the chosen point</h2>\n",
    );
    h.push_str(&derived(c));
    h.push_str(&limits(input.window, c));
    h.push_str(&headroom_table(input.window, c));
    h.push_str(&formulas(input.window, c));
    h.push_str(&boundaries(input.window, c));
    h.push_str("</div>\n");
    h
}

fn derived(c: &Classification) -> String {
    let e = &c.evaluation;
    let col = &e.collision;
    let jet = match e.jetting.regime {
        JettingRegime::SubsonicParent => {
            "subsonic inflow of the parent (Vc < C0): jet at any angle"
        }
        JettingRegime::SubsonicFlyer => "subsonic inflow of the flyer (Vf < C0): jet at any angle",
        JettingRegime::Supersonic => "supersonic inflow: shock polars of both plates [WSW53]",
    };
    let rows = [
        (
            "impact velocity Vp",
            format!("{} m/s", fmt(col.impact_velocity.si(), 1)),
            format!("{} convention", col.convention),
        ),
        (
            "collision angle beta",
            format!("{} deg", fmt(col.angle.degrees(), 2)),
            "from the geometry".into(),
        ),
        (
            "collision-point velocity Vc",
            format!("{} m/s", fmt(col.collision_velocity.si(), 1)),
            "kinematics".into(),
        ),
        (
            "flow velocity Vf",
            format!("{} m/s", fmt(col.flow_velocity.si(), 1)),
            "flyer inflow in the collision-point frame".into(),
        ),
        (
            "impact pressure",
            format!("{} GPa", fmt(e.impact.pressure.gpa(), 3)),
            "impedance matching of the linear Hugoniots [M94]".into(),
        ),
        (
            "jetting critical angle",
            format!("{} deg", fmt(e.jetting.critical_angle.degrees(), 2)),
            jet.into(),
        ),
        (
            "interface wavelength",
            format!("{} mm", fmt(e.wavelength.mm(), 3)),
            "26 h sin^2(beta/2), from memory [CBH71]".into(),
        ),
        (
            "dissipated energy",
            format!("{:.3e} J/m^2", e.dissipated_energy.si()),
            "inelastic normal collision, from memory".into(),
        ),
    ];
    let mut h = String::from("<h3>Derived quantities</h3>\n<table><thead><tr><th>quantity</th><th>value</th><th>how</th></tr></thead><tbody>\n");
    for (k, v, r) in rows {
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td class=\"num\">{}</td><td>{}</td></tr>",
            esc(k),
            esc(&v),
            esc(&r)
        );
    }
    h.push_str("</tbody></table>\n");
    h
}

fn limits(w: &PairWindow, c: &Classification) -> String {
    let mut h = String::from("<h3>Limits at the chosen point</h3>\n<table><thead><tr><th>limit</th><th>value</th><th>limit used</th><th>flyer / parent</th><th>margin at this point</th><th>holds</th><th>governs</th></tr></thead><tbody>\n");
    for r in &c.evaluation.criteria {
        let per = match (r.limit_flyer, r.limit_parent) {
            (Some(f), Some(p)) => format!("{} / {}", fmt_value(f, r.unit), fmt_value(p, r.unit)),
            _ => "pair".into(),
        };
        let holds = if r.informational {
            format!(
                "info ({})",
                if r.satisfied {
                    "wavy expected"
                } else {
                    "flat expected"
                }
            )
        } else if r.satisfied {
            "<span class=\"ok\">yes</span>".into()
        } else {
            "<span class=\"fail\">NO</span>".into()
        };
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{} {}</td><td class=\"fig\">{}</td><td class=\"num\">{}</td><td>{}</td><td>{}</td></tr>",
            esc(&crate::window_plot::criterion_label(w, r.id)),
            esc(&fmt_value(r.value, r.unit)),
            if r.kind == oblique_core::LimitKind::Lower { "&gt;=" } else { "&lt;=" },
            esc(&fmt_value(r.limit, r.unit)),
            esc(&per),
            esc(&fmt_margin(r.margin, r.unit)),
            holds,
            esc(r.governing.as_str()),
        );
    }
    h.push_str("</tbody></table>\n");
    let off: Vec<&str> = CriterionId::ALL
        .iter()
        .filter(|id| c.evaluation.criterion(**id).is_none())
        .map(|id| id.as_str())
        .collect();
    if !off.is_empty() {
        let _ = writeln!(
            h,
            "<p>Disabled in this window: {}.</p>",
            esc(&off.join(", "))
        );
    }
    for (id, reason) in &w.criteria_reasons {
        let _ = writeln!(
            h,
            "<p>Reason recorded for changing <code>{}</code>: {}</p>",
            esc(id.as_str()),
            esc(reason)
        );
    }
    h
}

fn headroom_table(w: &PairWindow, c: &Classification) -> String {
    let mut h = String::from("<h3>Headroom along the two controls</h3>\n<table><thead><tr><th>limit</th><th>velocity headroom (at this angle)</th><th>angle headroom (at this velocity)</th></tr></thead><tbody>\n");
    for (l, _) in &c.headroom {
        let v =
            velocity_headroom(w, c, l).map_or("not reached (Vp/20 to 20 Vp)".into(), |a| a.cell());
        let a = angle_headroom(w, c, l).map_or("not reached (0 to 90 deg)".into(), |a| a.cell());
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td class=\"fig\">{}</td><td class=\"fig\">{}</td></tr>",
            esc(&limit_label(w, l)),
            esc(&v),
            esc(&a)
        );
    }
    h.push_str("</tbody></table>\n<ul class=\"small\">\n");
    for (name, meaning) in oblique_window::margin::DEFINITIONS {
        let _ = writeln!(h, "<li><b>{}</b>: {}.</li>", esc(name), esc(meaning));
    }
    let _ = writeln!(
        h,
        "<li><b>rounding</b>: {}.</li>\n</ul>",
        esc(oblique_window::margin::ROUNDING_RULE)
    );
    h
}

fn formulas(w: &PairWindow, c: &Classification) -> String {
    let mut h = String::from("<h3>Criteria: relations and sources</h3>\n<table><thead><tr><th>criterion</th><th>relation</th><th>constants</th><th>source</th></tr></thead><tbody>\n");
    for r in &c.evaluation.criteria {
        let keys: Vec<String> = criterion_keys(r.id)
            .iter()
            .map(|k| format!("[{k}]"))
            .collect();
        let _ = writeln!(
            h,
            "<tr><td class=\"nw\">{}</td><td><code>{}</code></td><td>{}</td><td>{} {}</td></tr>",
            esc(r.id.as_str()),
            esc(r.id.formula()),
            esc(&r.constants_text(" = ").join(", ")),
            esc(r.id.source()),
            esc(&keys.join(" "))
        );
    }
    h.push_str("</tbody></table>\n");
    let _ = w;
    h
}

fn boundaries(w: &PairWindow, c: &Classification) -> String {
    if w.boundaries.is_empty() {
        return String::new();
    }
    let mut h = String::from("<h3>User boundaries</h3>\n<table><thead><tr><th>label</th><th>plane</th><th>welds</th><th>limit at the point</th><th>margin at this point</th><th>holds</th><th>provenance</th></tr></thead><tbody>\n");
    for (b, r) in w.boundaries.iter().zip(&c.boundaries) {
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}</td><td>{}</td></tr>",
            esc(&b.label),
            esc(b.plane.as_str()),
            esc(b.weld_side.as_str()),
            esc(&r.limit.map_or("outside its span".into(), |l| fmt_value(l, r.unit))),
            esc(&r.margin.map_or("-".into(), |m| fmt_margin(m, r.unit))),
            match r.satisfied {
                Some(true) => "<span class=\"ok\">yes</span>",
                Some(false) => "<span class=\"fail\">NO</span>",
                None => "not applicable (outside the trial data)",
            },
            esc(&b.provenance)
        );
    }
    h.push_str("</tbody></table>\n");
    h
}

/// Both planes with the chosen point, the alternatives and the process curves.
fn part_plots(input: &ReportInput<'_>) -> RenderResult<String> {
    let d = input.decision;
    let mut points = Vec::new();
    if let Some((v, a)) = d.chosen.point() {
        points.push(ProposedPoint::new(d.chosen.label.clone(), v, a).with_role(PointRole::Chosen));
    }
    for alt in &d.alternatives {
        if let Some((v, a)) = alt.candidate.point() {
            points.push(
                ProposedPoint::new(alt.candidate.label.clone(), v, a)
                    .with_role(PointRole::Alternative),
            );
        }
    }
    let mut h = String::from("<div class=\"part\" id=\"plots\">\n<h2>Window plots</h2>\n<p>Shaded: where every active limit and user boundary holds. Lines: each limit. Markers: trials by outcome (numbered as in the trial table); the large black diamond is the chosen set-up, open diamonds the alternatives, each with its verdict.</p>\n");
    for (plane, caption) in [
        (
            Plane::AngleImpactVelocity,
            "Collision angle against impact velocity.",
        ),
        (
            Plane::AngleCollisionVelocity,
            "Collision angle against collision-point velocity.",
        ),
    ] {
        let mut req = PlotRequest::new(input.window, plane);
        req.points = points.clone();
        req.curves = input.curves.clone();
        req.shot_numbers = true;
        let svg = render_svg(&req)?;
        let svg = svg.find("<svg").map_or(svg.as_str(), |i| &svg[i..]);
        let _ = writeln!(
            h,
            "<figure>{svg}<figcaption>{}</figcaption></figure>",
            esc(caption)
        );
    }
    h.push_str("</div>\n");
    Ok(h)
}

/// The agreement table, the disagreements and every trial.
fn part_trials(input: &ReportInput<'_>) -> String {
    let w = input.window;
    let a = input.agreement;
    let mut h = format!(
        "<div class=\"part\" id=\"trials\">\n<h2>Trials and agreement</h2>\n<p>{} trial(s); the window agrees with {} of the {} inside its validity domain{}. {}</p>\n",
        a.observations,
        a.agreeing,
        a.observations - a.outside_domain.len(),
        if a.outside_domain.is_empty() {
            String::new()
        } else {
            format!(
                "; outside it, where no verdict is claimed and the table below does not count them: {}",
                a.outside_domain
                    .iter()
                    .map(|t| format!("#{}", t.index + 1))
                    .collect::<Vec<_>>()
                    .join(", ")
            )
        },
        esc(&a.partial_rule)
    );
    h.push_str("<table><thead><tr><th>predicted \\ observed</th><th>welded</th><th>not-welded</th><th>partial</th><th>melted</th></tr></thead><tbody>\n");
    for p in ["welded", "not-welded", "melted"] {
        let row = a.table.get(p);
        let cell = |o: &str| row.and_then(|r| r.get(o)).copied().unwrap_or(0);
        let _ = writeln!(h, "<tr><th>{p}</th><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>", cell("welded"), cell("not-welded"), cell("partial"), cell("melted"));
    }
    h.push_str("</tbody></table>\n");
    if !a.disagreements.is_empty() {
        h.push_str("<h3>Trials the window misjudges</h3>\n<table><thead><tr><th>#</th><th>Vp m/s</th><th>beta deg</th><th>observed</th><th>predicted</th><th>misjudged by</th><th>why</th></tr></thead><tbody>\n");
        for d in &a.disagreements {
            let _ = writeln!(
                h,
                "<tr><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"nw\">{}</td><td class=\"nw\">{}</td><td>{}</td><td>{}</td></tr>",
                d.index + 1,
                fmt(d.velocity_m_s, 0),
                fmt(d.angle_deg, 2),
                d.observed.as_str(),
                d.predicted.as_str(),
                esc(&d.misjudged_by.join(", ")),
                esc(&d.explanation)
            );
        }
        h.push_str("</tbody></table>\n");
    }
    if !w.observations.is_empty() {
        h.push_str("<h3>Every trial</h3>\n<table><thead><tr><th>#</th><th>Vp m/s</th><th>beta deg</th><th>outcome</th><th>process, method</th><th>date</th><th>source and note</th></tr></thead><tbody>\n");
        for o in &w.observations {
            let _ = writeln!(
                h,
                "<tr><td class=\"num\">{}</td><td class=\"num\">{}{}</td><td class=\"num\">{}{}</td><td class=\"nw\">{}</td><td>{}, {}</td><td class=\"nw\">{}</td><td>{}{}</td></tr>",
                o.index + 1,
                fmt(o.velocity.si(), 0),
                o.velocity_uncertainty.map_or(String::new(), |u| format!(" &#177; {}", fmt(u.si(), 0))),
                fmt(o.angle.degrees(), 2),
                o.angle_uncertainty.map_or(String::new(), |u| format!(" &#177; {}", fmt(u.degrees(), 1))),
                o.outcome.as_str(),
                esc(&o.process),
                esc(&o.method),
                esc(o.date.as_deref().unwrap_or("")),
                esc(&o.source),
                o.note.as_deref().map_or(String::new(), |n| format!("; {}", esc(n)))
            );
        }
        h.push_str("</tbody></table>\n");
    }
    h.push_str("</div>\n");
    h
}

/// Every property of both materials with its value and source key; the notes below.
fn part_materials(input: &ReportInput<'_>) -> String {
    let w = input.window;
    let mut h = format!(
        "<div class=\"part\" id=\"materials\">\n<h2>Material properties and sources</h2>\n<table><thead><tr><th>property</th><th>flyer: {}</th><th>source</th><th>parent: {}</th><th>source</th></tr></thead><tbody>\n",
        esc(&w.flyer.material.id),
        esc(&w.parent.material.id)
    );
    let mut notes = Vec::new();
    for (prop, _) in PROPERTIES {
        let cell = |rec: &oblique_window::MaterialRecord| {
            rec.sources
                .get(prop)
                .map_or((String::new(), String::new()), |p| {
                    (p.as_written.clone(), format!("[{}]", p.key))
                })
        };
        for rec in [&w.flyer, &w.parent] {
            if let Some(n) = rec.sources.get(prop).and_then(|p| p.note.clone()) {
                notes.push(format!("{} {}: {}", rec.material.id, prop, n));
            }
        }
        let (fv, fs) = cell(&w.flyer);
        let (pv, ps) = cell(&w.parent);
        let _ = writeln!(h, "<tr><td>{}</td><td class=\"num\">{}</td><td>{}</td><td class=\"num\">{}</td><td>{}</td></tr>", esc(prop), esc(&fv), esc(&fs), esc(&pv), esc(&ps));
    }
    h.push_str("</tbody></table>\n<h3>Notes on the values</h3>\n<ul class=\"small\">\n");
    for n in notes {
        let _ = writeln!(h, "<li>{}</li>", esc(&n));
    }
    h.push_str("</ul>\n<p class=\"small\">Every source key is given in full under References.</p>\n</div>\n");
    h
}

/// Assumptions, what the result does not cover, the cautions.
fn part_assumptions(input: &ReportInput<'_>) -> String {
    let mut h = String::from("<div class=\"part\" id=\"assumptions\">\n<h2>Assumptions and what is unconfirmed</h2>\n<ul>\n");
    let mut all = assumptions(input.window);
    if let Produced::Magnetic(r) = &input.decision.chosen.produced {
        all.insert(
            0,
            capitalise(
                r.setup
                    .model
                    .assumptions()
                    .trim_start_matches("assumptions: "),
            ) + ".",
        );
    }
    for s in all {
        let _ = writeln!(h, "<li>{}</li>", esc(&s));
    }
    h.push_str("</ul>\n<p>Every relation, its symbols and its source are in <code>docs/theory.md</code> of the oblique sources.</p>\n<h2 id=\"not-covered\">What this result does not cover</h2>\n<ul>\n");
    for s in DOES_NOT_COVER {
        let _ = writeln!(h, "<li>{}</li>", esc(s));
    }
    h.push_str("</ul>\n<h2 id=\"cautions\">Cautions</h2>\n<div class=\"caution\"><ul>\n");
    for s in CAUTIONS {
        let _ = writeln!(h, "<li>{}</li>", esc(s));
    }
    h.push_str("</ul></div>\n</div>\n");
    h
}

/// Every reference the record cites: the materials' keys, the criteria's and those in the text.
pub(super) fn cited_keys(input: &ReportInput<'_>, body: &str) -> Vec<String> {
    let refs = input.references;
    let mut keys: Vec<String> = Vec::new();
    for rec in [&input.window.flyer, &input.window.parent] {
        keys.extend(oblique_window::references::material_keys(rec, refs));
    }
    keys.extend(
        citation_keys(body)
            .into_iter()
            .filter(|k| refs.get(k).is_some()),
    );
    keys.sort();
    keys.dedup();
    keys
}

fn part_references(input: &ReportInput<'_>, body: &str) -> String {
    let mut h = String::from("<div class=\"part\" id=\"references\">\n<h2>References</h2>\n<p class=\"small\">Every key cited in this record, from the project's reference list (windows/references.ron); details recalled rather than read are marked from memory.</p>\n<ul class=\"small\">\n");
    for k in cited_keys(input, body) {
        let text = match input.references.get(&k) {
            Some(r) => r.full(),
            None => [&input.window.flyer, &input.window.parent]
                .iter()
                .find_map(|rec| rec.sources.values().find(|p| p.key == k))
                .map(|p| {
                    format!(
                        "{} (from the material file; not in the project's reference list)",
                        p.reference
                    )
                })
                .unwrap_or_default(),
        };
        let _ = writeln!(h, "<li>[{}] {}</li>", esc(&k), long(&text));
    }
    h.push_str("</ul>\n");
    h
}

/// Tool, time, people, command and every file with its SHA-256.
fn part_provenance(input: &ReportInput<'_>) -> String {
    let p = &input.provenance;
    let mut h =
        String::from("<h2 id=\"provenance\">Provenance</h2>\n<table class=\"meta\"><tbody>\n");
    let time = if p.from_source_date_epoch {
        format!("{} (from SOURCE_DATE_EPOCH)", p.generated)
    } else {
        p.generated.clone()
    };
    for (k, v) in [
        ("tool", format!("oblique {}", esc(&p.version))),
        ("date and time", esc(&time)),
        (
            "prepared by",
            esc(p.prepared_by.as_deref().unwrap_or("(not given)")),
        ),
        (
            "checked by",
            esc(p.checked_by.as_deref().unwrap_or("(not given)")),
        ),
        ("command", format!("<code>{}</code>", long(&p.command))),
    ] {
        let _ = writeln!(h, "<tr><th>{k}</th><td>{v}</td></tr>");
    }
    h.push_str("</tbody></table>\n<h3>Files that entered the computation</h3>\n<table><thead><tr><th>what</th><th>file and SHA-256</th></tr></thead><tbody>\n");
    for f in &p.files {
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td><code>{}</code><br/><code class=\"hash\">{}</code></td></tr>",
            esc(&f.role),
            long(&f.file),
            esc(&f.sha256)
        );
    }
    h.push_str("</tbody></table>\n<footer>Screening estimate, not a guarantee; follow local codes and licensed practice.</footer>\n</div>\n");
    h
}

#[cfg(test)]
mod tests {
    use super::chosen_heading;

    /// A label that only names the role is not repeated after it; any other label is shown.
    #[test]
    fn the_chosen_heading_does_not_repeat_the_role() {
        for l in [
            "chosen",
            "Chosen",
            " chosen ",
            "chosen set-up",
            "chosen_setup",
            "",
        ] {
            assert_eq!(chosen_heading(l), "The chosen set-up", "{l:?}");
        }
        assert_eq!(chosen_heading("A"), "The chosen set-up: A");
        assert_eq!(
            chosen_heading("chosen one"),
            "The chosen set-up: chosen one"
        );
    }
}
