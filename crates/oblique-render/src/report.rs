//! The decision report: one self-contained HTML file (inline CSS and SVG, no script, no external
//! resource) and its JSON twin. Every user-supplied string is escaped.

use crate::error::RenderResult;
use crate::window_plot::{render_svg, PlotRequest, ProcessCurve, ProposedPoint};
use oblique_core::CriterionId;
use oblique_window::boundary::Plane;
use oblique_window::classify::{limit_advice, limit_label, Classification, LimitRef};
use oblique_window::materials::PROPERTIES;
use oblique_window::present::{classification_json, material_json, sig, CAUTION};
use oblique_window::{Agreement, Library, PairWindow};
use serde_json::{json, Value};
use std::fmt::Write as _;

/// Escape text for HTML and XML (element content and attribute values).
pub fn esc(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for ch in s.chars() {
        match ch {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c => out.push(c),
        }
    }
    out
}

/// Everything a report needs.
pub struct ReportInput<'a> {
    /// The window.
    pub window: &'a PairWindow,
    /// The classification of the proposed point.
    pub classification: &'a Classification,
    /// Agreement with the trials.
    pub agreement: &'a Agreement,
    /// The library (for file checksums).
    pub library: &'a Library,
    /// The exact command.
    pub command: String,
    /// Extra proposed points to show on the plots (the main point is always shown).
    pub extra_points: Vec<ProposedPoint>,
    /// Process curves to show on the plots.
    pub curves: Vec<ProcessCurve>,
}

/// Assumptions and what is unconfirmed, in words (see docs/theory.md).
pub fn assumptions(window: &PairWindow) -> Vec<String> {
    let mut a = vec![
        format!("Velocity convention: {} (the relation between impact velocity and collision-point velocity is a modelling choice; the other conventions give other collision velocities for the same shot).", window.convention),
        "Steady collision: the relations hold for a collision point moving at constant speed and angle.".into(),
        "Impact pressure from one-dimensional impedance matching of the linear Hugoniots at closing speed Vp (Meyers 1994); oblique effects are ignored.".into(),
        "Dissimilar pair: each material-dependent limit is evaluated for both plates and the more demanding one kept; no published rule says whose properties enter each limit.".into(),
        "The Hugoniot intercept C0 stands in for the bulk sound speed (within a few percent for these metals).".into(),
        "Deribas k (0.6 to 1.2) and the Wittman constant N = 0.11 are from memory; the exponents of the Wittman melting limit are uncertain and two forms circulate (form used: see the criteria table).".into(),
        "The subsonic jetting condition and the shock-polar construction are from memory of Cowan & Holtzman 1963 and Walsh, Shreffler & Willig 1953; the equal-pressure construction for dissimilar plates is derived here.".into(),
        "The wavy-interface transition (Re = 10.6) and the wavelength 26 h sin^2(beta/2) are from memory and informational only.".into(),
        "5 x HEL as the lower pressure limit is common practice for magnetic pulse welding, not a law.".into(),
    ];
    for rec in [&window.flyer, &window.parent] {
        for (prop, p) in &rec.sources {
            if p.key == "MEM" {
                a.push(format!(
                    "{} {}: {} is from memory.",
                    rec.material.id, prop, p.as_written
                ));
            }
            if let Some(note) = &p.note {
                if note.starts_with("stand-in") {
                    a.push(format!("{} {}: {}", rec.material.id, prop, note));
                }
            }
        }
    }
    if !window.boundaries.is_empty() {
        a.push("User boundaries are used only over the span of their points; outside it a point is flagged as outside the trial data, never extrapolated.".into());
    }
    a
}

/// The cautions, in full.
pub const CAUTIONS: [&str; 5] = [
    "This is a screening estimate from published relations and the trials listed here. It is not a guarantee that a joint will weld, nor that it is safe to make.",
    "Magnetic pulse and foil-actuator equipment works at lethal voltages and stores lethal energy: only trained, authorised people may charge or fire a bank, following its interlocks, discharge and earthing procedures.",
    "Explosive welding must be planned, licensed and carried out under the explosives law of the site, by licensed shot-firers, with the exclusion zones it prescribes.",
    "Flyers, fragments and ejected jet material travel at hundreds of metres per second: guard every shot and keep people out of its line.",
    "Follow local codes and licensed practice; confirm every set-up with sectioned and tested trial joints before production.",
];

fn svg_inline(svg: &str) -> &str {
    match svg.find("<svg") {
        Some(i) => &svg[i..],
        None => svg,
    }
}

fn fmt(v: f64, digits: usize) -> String {
    format!("{v:.digits$}")
}

/// Where a limit is reached along the two controls, in words (after `explain`).
fn reached_at(c: &Classification, limit: &LimitRef) -> String {
    let Some((_, h)) = c.headroom.iter().find(|(l, _)| l == limit) else {
        return "-".into();
    };
    let v = h
        .velocity_m_s
        .map_or("Vp: not reached".to_string(), |v| format!("Vp {v:.0} m/s"));
    let a = h
        .angle_deg
        .map_or("angle: not reached".to_string(), |a| format!("{a:.2} deg"));
    format!("{v}; {a}")
}

/// Build the HTML report.
///
/// # Errors
/// Plot errors.
pub fn html(input: &ReportInput<'_>) -> RenderResult<String> {
    // User text (names, sources, notes) may hold characters HTML forbids (NUL, ESC, ...):
    // shown as visible control pictures, so the page stays well-formed.
    html_page(input).map(|page| oblique_window::present::xml_safe(&page).into_owned())
}

fn html_page(input: &ReportInput<'_>) -> RenderResult<String> {
    let w = input.window;
    let c = input.classification;
    let e = &c.evaluation;
    let col = &e.collision;
    let mut points = vec![ProposedPoint::new(
        "proposed",
        col.impact_velocity.si(),
        col.angle.radians(),
    )];
    points.extend(input.extra_points.iter().cloned());
    let plot_av = render_svg(&PlotRequest {
        window: w,
        plane: Plane::AngleImpactVelocity,
        points: points.clone(),
        curves: input.curves.clone(),
        shot_numbers: false,
    })?;
    let plot_acv = render_svg(&PlotRequest {
        window: w,
        plane: Plane::AngleCollisionVelocity,
        points,
        curves: input.curves.clone(),
        shot_numbers: false,
    })?;

    let mut h = String::new();
    let verdict = match (c.inside, c.outside_trial_data) {
        (true, false) => "INSIDE the window",
        (true, true) => "INSIDE the model limits, but OUTSIDE the trial data",
        (false, _) => "OUTSIDE the window",
    };
    let _ = write!(
        h,
        r#"<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8"/>
<meta name="viewport" content="width=device-width, initial-scale=1"/>
<title>Weld screening report: {pair}</title>
<style>
body {{ font-family: "DejaVu Sans", Arial, sans-serif; margin: 2em auto; max-width: 1150px; color: #1a1a1a; line-height: 1.4; padding: 0 1em; }}
h1 {{ font-size: 1.6em; margin-bottom: 0.2em; }}
h2 {{ font-size: 1.25em; border-bottom: 2px solid #d0d7de; padding-bottom: 0.2em; margin-top: 1.8em; }}
table {{ border-collapse: collapse; margin: 0.6em 0; font-size: 0.88em; max-width: 100%; }}
td, th {{ overflow-wrap: anywhere; }}
th, td {{ border: 1px solid #c8ccd0; padding: 0.3em 0.55em; text-align: left; vertical-align: top; }}
th {{ background: #eef2f6; }}
td.num {{ text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }}
.verdict {{ border: 3px solid #1b4f8a; padding: 0.8em 1.1em; border-radius: 6px; background: #f2f7fc; }}
.verdict.outside {{ border-color: #a50f15; background: #fcf2f2; }}
.verdict .big {{ font-size: 1.4em; font-weight: bold; }}
.caution {{ border-left: 6px solid #b35806; background: #fff6ec; padding: 0.6em 1em; }}
.invented {{ border-left: 6px solid #a50f15; background: #fdf0f0; padding: 0.5em 1em; font-weight: bold; }}
.fail {{ color: #a50f15; font-weight: bold; }}
.ok {{ color: #1b5e20; }}
.plot svg {{ max-width: 100%; height: auto; border: 1px solid #e0e0e0; }}
code {{ background: #f3f3f3; padding: 0 0.2em; }}
footer {{ margin-top: 2.5em; font-size: 0.85em; color: #444; border-top: 1px solid #ccc; padding-top: 0.8em; }}
</style>
</head>
<body>
<h1>Weld screening report: {pair}</h1>
<p>Generated by oblique {version}. {invented_short}</p>
"#,
        pair = esc(&w.name),
        version = env!("CARGO_PKG_VERSION"),
        invented_short = if w.invented.is_some() {
            "Demo data: invented."
        } else {
            ""
        },
    );
    if let Some(inv) = &w.invented {
        let _ = writeln!(h, "<p class=\"invented\">INVENTED DATA. {}</p>", esc(inv));
    }
    let _ = writeln!(
        h,
        "<h2>The question</h2>\n<p>Will a flyer of <b>{}</b> ({} mm) striking a parent of <b>{}</b> at impact velocity <b>Vp = {} m/s</b> and collision angle <b>beta = {} deg</b> (convention <code>{}</code>) land inside this pair's weldability window, with what margin, and against which limit?</p>",
        esc(&w.flyer.material.name),
        fmt(w.flyer_thickness.mm(), 2),
        esc(&w.parent.material.name),
        fmt(col.impact_velocity.si(), 1),
        fmt(col.angle.degrees(), 2),
        esc(col.convention.as_str())
    );
    if c.headroom_convention != col.convention {
        let given = col.with_convention(c.headroom_convention);
        let _ = writeln!(
            h,
            "<p><b>Note:</b> the point was given as Vp = {} m/s in the <code>{}</code> convention; the window records its trials in <code>{}</code>, so the same collision (Vc = {} m/s, same angle) is checked as Vp = {} m/s. The advice below quotes velocities in the convention you gave.</p>",
            fmt(given.impact_velocity.si(), 1),
            esc(c.headroom_convention.as_str()),
            esc(col.convention.as_str()),
            fmt(col.collision_velocity.si(), 1),
            fmt(col.impact_velocity.si(), 1)
        );
    }
    // The headroom of every decisive limit, nearest first, so the reader sees at once how much
    // the two controls can move.
    let mut rows: Vec<(f64, String)> = c
        .headroom
        .iter()
        .map(|(l, hd)| {
            let vp = col.impact_velocity.si();
            let dist = hd.velocity_m_s.map_or(f64::INFINITY, |v| (v - vp).abs());
            (
                dist,
                format!(
                    "<li><b>{}</b>: {}</li>",
                    esc(&limit_label(w, l)),
                    esc(&limit_advice(w, c, l))
                ),
            )
        })
        .collect();
    rows.sort_by(|a, b| a.0.total_cmp(&b.0));
    let list: String = rows.iter().take(4).map(|r| r.1.as_str()).collect();
    let _ = writeln!(
        h,
        "<div class=\"verdict{}\"><div class=\"big\">Verdict: {}</div><p>{}</p><p>Nearest limits along the impact velocity at this angle:</p><ul>{}</ul><p>{}</p>{}<p class=\"caution\">{}</p></div>",
        if c.inside && !c.outside_trial_data { "" } else { " outside" },
        verdict,
        esc(&c.reason),
        list,
        esc(&oblique_window::classify::inside_stretch_text(c).map(|t| format!("Where the window is: {t}.")).unwrap_or_default()),
        if c.outside_trial_data { "<p class=\"fail\">The point lies outside the span of at least one user boundary (outside the trial data); that boundary was not extrapolated, so the verdict rests on the model criteria there.</p>" } else { "" },
        esc(CAUTIONS[0])
    );

    // Set-up.
    let _ = writeln!(h, "<h2>Set-up</h2>\n<table>");
    let rows = [
        ("pair window", w.name.clone()),
        (
            "window file",
            format!("{} (sha256 {})", w.origin.display, w.origin.sha256),
        ),
        (
            "flyer",
            format!(
                "{} ({}), {} mm",
                w.flyer.material.name,
                w.flyer.material.id,
                fmt(w.flyer_thickness.mm(), 2)
            ),
        ),
        (
            "parent",
            format!(
                "{} ({}){}",
                w.parent.material.name,
                w.parent.material.id,
                w.parent_thickness
                    .map_or(String::new(), |t| format!(", {} mm", fmt(t.mm(), 2)))
            ),
        ),
        ("velocity convention", w.convention.to_string()),
        ("maintainer", w.maintainer.clone()),
        ("description", w.description.clone()),
    ];
    for (k, v) in rows {
        let _ = writeln!(h, "<tr><th>{}</th><td>{}</td></tr>", esc(k), esc(&v));
    }
    let _ = writeln!(h, "</table>");

    // Derived quantities.
    let _ = writeln!(h, "<h2>Derived quantities</h2>\n<table><tr><th>quantity</th><th>value</th><th>relation</th></tr>");
    let jet = match e.jetting.regime {
        oblique_core::jetting::JettingRegime::SubsonicParent => "subsonic inflow of the parent (Vc &lt; C0): jet at any angle",
        oblique_core::jetting::JettingRegime::SubsonicFlyer => "subsonic inflow of the flyer (Vf &lt; C0): jet at any angle",
        oblique_core::jetting::JettingRegime::Supersonic => "supersonic inflow: max over p of theta_flyer(p) + theta_parent(p) from the shock polars",
    };
    let derived = [
        (
            "impact velocity Vp",
            format!("{} m/s", fmt(col.impact_velocity.si(), 1)),
            "input".to_string(),
        ),
        (
            "collision angle beta",
            format!("{} deg", fmt(col.angle.degrees(), 2)),
            "input".to_string(),
        ),
        (
            "collision-point velocity Vc",
            format!("{} m/s", fmt(col.collision_velocity.si(), 1)),
            format!("{} convention", col.convention),
        ),
        (
            "flow velocity Vf",
            format!("{} m/s", fmt(col.flow_velocity.si(), 1)),
            "flyer inflow in the collision-point frame".into(),
        ),
        (
            "impact pressure",
            format!("{} GPa", fmt(e.impact.pressure.gpa(), 3)),
            "rho1 (C1 + s1 u1) u1 = rho2 (C2 + s2 u2) u2, u1 + u2 = Vp".into(),
        ),
        (
            "jetting critical angle",
            format!("{} deg", fmt(e.jetting.critical_angle.degrees(), 2)),
            jet.replace("&lt;", "<"),
        ),
        (
            "interface wavelength",
            format!("{} mm", fmt(e.wavelength.mm(), 3)),
            "26 h sin^2(beta/2) (from memory)".into(),
        ),
        (
            "dissipated energy",
            format!("{:.3e} J/m^2", e.dissipated_energy.si()),
            "m_f m_p Vp^2 / (2 (m_f + m_p)), m = rho h (from memory)".into(),
        ),
    ];
    for (k, v, r) in derived {
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td class=\"num\">{}</td><td>{}</td></tr>",
            esc(k),
            esc(&v),
            esc(&r)
        );
    }
    let _ = writeln!(h, "</table>");

    // Criteria.
    let _ = writeln!(h, "<h2>Criteria and margins</h2>\n<table><tr><th>criterion</th><th>formula</th><th>constants</th><th>limit (flyer / parent)</th><th>value</th><th>limit used</th><th>margin at this Vc</th><th>holds</th><th>reached at (this angle: Vp; this Vp: angle)</th><th>governs</th><th>source</th></tr>");
    for r in &e.criteria {
        let consts = r.constants_text(" = ");
        let per = match (r.limit_flyer, r.limit_parent) {
            (Some(f), Some(p)) => format!(
                "{} / {}",
                oblique_window::present::fmt_value(f, r.unit),
                oblique_window::present::fmt_value(p, r.unit)
            ),
            _ => "pair".into(),
        };
        let holds = if r.informational {
            format!(
                "<span>info ({})</span>",
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
            "<tr><td>{}</td><td><code>{}</code></td><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            esc(&crate::window_plot::criterion_label(w, r.id)),
            esc(r.id.formula()),
            esc(&consts.join(", ")),
            esc(&per),
            esc(&oblique_window::present::fmt_value(r.value, r.unit)),
            esc(&oblique_window::present::fmt_value(r.limit, r.unit)),
            esc(&oblique_window::present::fmt_margin(r.margin, r.unit)),
            holds,
            esc(&reached_at(c, &LimitRef::Criterion(r.id))),
            esc(r.governing.as_str()),
            esc(r.id.source())
        );
    }
    let _ = writeln!(h, "</table>");
    for (id, reason) in &w.criteria_reasons {
        let _ = writeln!(
            h,
            "<p>Reason recorded for changing <code>{}</code>: {}</p>",
            esc(id.as_str()),
            esc(reason)
        );
    }
    if CriterionId::ALL.iter().any(|id| e.criterion(*id).is_none()) {
        let off: Vec<&str> = CriterionId::ALL
            .iter()
            .filter(|id| e.criterion(**id).is_none())
            .map(|id| id.as_str())
            .collect();
        let _ = writeln!(
            h,
            "<p>Disabled in this window: {}.</p>",
            esc(&off.join(", "))
        );
    }

    // Boundaries.
    if !w.boundaries.is_empty() {
        let _ = writeln!(h, "<h2>User boundaries</h2>\n<table><tr><th>label</th><th>plane</th><th>welds</th><th>limit at the point</th><th>margin</th><th>holds</th><th>provenance</th></tr>");
        for (b, r) in w.boundaries.iter().zip(&c.boundaries) {
            let _ = writeln!(
                h,
                "<tr><td>{}</td><td>{}</td><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}</td><td>{}</td></tr>",
                esc(&b.label),
                esc(b.plane.as_str()),
                esc(b.weld_side.as_str()),
                esc(&r.limit.map_or("outside its span".into(), |l| oblique_window::present::fmt_value(l, r.unit))),
                esc(&r.margin.map_or("-".into(), |m| oblique_window::present::fmt_margin(m, r.unit))),
                match r.satisfied {
                    Some(true) => "<span class=\"ok\">yes</span>",
                    Some(false) => "<span class=\"fail\">NO</span>",
                    None => "not applicable (outside the trial data)",
                },
                esc(&b.provenance)
            );
        }
        let _ = writeln!(h, "</table>");
    }

    // Plots.
    let _ = writeln!(h, "<h2>Window plots</h2>\n<p>Shaded: the region where every active criterion and user boundary holds, evaluated on a grid. Lines: each limit. Markers: trials by outcome; black diamonds: proposed points.</p>");
    let _ = writeln!(h, "<div class=\"plot\">{}</div>", svg_inline(&plot_av));
    let _ = writeln!(h, "<div class=\"plot\">{}</div>", svg_inline(&plot_acv));

    // Trials and agreement.
    let a = input.agreement;
    let _ = writeln!(
        h,
        "<h2>Trials and agreement</h2>\n<p>{} trial(s); the window agrees with {} of them. {}</p>",
        a.observations,
        a.agreeing,
        esc(&a.partial_rule)
    );
    let _ = writeln!(h, "<table><tr><th>predicted \\ observed</th><th>welded</th><th>not-welded</th><th>partial</th><th>melted</th></tr>");
    for p in ["welded", "not-welded", "melted"] {
        let row = a.table.get(p);
        let cell = |o: &str| row.and_then(|r| r.get(o)).copied().unwrap_or(0);
        let _ = writeln!(h, "<tr><th>{p}</th><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>", cell("welded"), cell("not-welded"), cell("partial"), cell("melted"));
    }
    let _ = writeln!(h, "</table>");
    if !a.disagreements.is_empty() {
        let _ = writeln!(h, "<table><tr><th>#</th><th>Vp m/s</th><th>beta deg</th><th>observed</th><th>predicted</th><th>misjudged by</th><th>why</th><th>source</th></tr>");
        for d in &a.disagreements {
            let _ = writeln!(
                h,
                "<tr><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
                d.index + 1,
                fmt(d.velocity_m_s, 0),
                fmt(d.angle_deg, 2),
                d.observed.as_str(),
                d.predicted.as_str(),
                esc(&d.misjudged_by.join(", ")),
                esc(&d.explanation),
                esc(&d.source)
            );
        }
        let _ = writeln!(h, "</table>");
    }
    if !w.observations.is_empty() {
        let _ = writeln!(h, "<table><tr><th>#</th><th>Vp m/s</th><th>beta deg</th><th>outcome</th><th>process</th><th>method</th><th>date</th><th>source</th><th>note</th></tr>");
        for o in &w.observations {
            let _ = writeln!(
                h,
                "<tr><td>{}</td><td class=\"num\">{}{}</td><td class=\"num\">{}{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
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
                esc(o.note.as_deref().unwrap_or(""))
            );
        }
        let _ = writeln!(h, "</table>");
    }

    // Materials.
    let _ = writeln!(h, "<h2>Material properties and sources</h2>\n<table><tr><th>property</th><th>flyer: {}</th><th>source</th><th>parent: {}</th><th>source</th></tr>", esc(&w.flyer.material.id), esc(&w.parent.material.id));
    for (prop, _) in PROPERTIES {
        let cell = |rec: &oblique_window::MaterialRecord| {
            rec.sources
                .get(prop)
                .map_or((String::new(), String::new()), |p| {
                    (
                        p.as_written.clone(),
                        format!(
                            "[{}]{}",
                            p.key,
                            p.note.as_ref().map_or(String::new(), |n| format!(" {n}"))
                        ),
                    )
                })
        };
        let (fv, fs) = cell(&w.flyer);
        let (pv, ps) = cell(&w.parent);
        let _ = writeln!(h, "<tr><td>{}</td><td class=\"num\">{}</td><td>{}</td><td class=\"num\">{}</td><td>{}</td></tr>", esc(prop), esc(&fv), esc(&fs), esc(&pv), esc(&ps));
    }
    let _ = writeln!(h, "</table>\n<p>Source keys:</p>\n<ul>");
    let mut keys: std::collections::BTreeMap<String, String> = std::collections::BTreeMap::new();
    for rec in [&w.flyer, &w.parent] {
        for p in rec.sources.values() {
            keys.insert(p.key.clone(), p.reference.clone());
        }
    }
    for (k, r) in &keys {
        let _ = writeln!(h, "<li>[{}] {}</li>", esc(k), esc(r));
    }
    let _ = writeln!(h, "</ul>");

    // Assumptions.
    let _ = writeln!(h, "<h2>Assumptions and what is unconfirmed</h2>\n<ul>");
    for s in assumptions(w) {
        let _ = writeln!(h, "<li>{}</li>", esc(&s));
    }
    let _ = writeln!(h, "</ul>\n<p>Every relation, its symbols and its source are in <code>docs/theory.md</code> of the oblique sources.</p>");

    // Cautions.
    let _ = writeln!(h, "<h2>Cautions</h2>\n<div class=\"caution\"><ul>");
    for s in CAUTIONS {
        let _ = writeln!(h, "<li>{}</li>", esc(s));
    }
    let _ = writeln!(h, "</ul></div>");

    // Reproducibility.
    let _ = writeln!(
        h,
        "<footer><p>Reproduce with: <code>{}</code></p><p>oblique {} &#183; library files:</p><ul>",
        esc(&input.command),
        env!("CARGO_PKG_VERSION")
    );
    for f in &input.library.files {
        let _ = writeln!(
            h,
            "<li><code>{}</code> sha256 <code>{}</code></li>",
            esc(&f.display),
            esc(&f.sha256)
        );
    }
    let _ = writeln!(h, "</ul></footer>\n</body>\n</html>");
    Ok(h)
}

/// The JSON twin of the report.
pub fn json(input: &ReportInput<'_>) -> Value {
    let w = input.window;
    let mut cls = classification_json(w, input.classification);
    if let Some(o) = cls.as_object_mut() {
        o.insert("flyer_thickness_m".into(), sig(w.flyer_thickness.si()));
    }
    json!({
        "report": "oblique decision report",
        "version": env!("CARGO_PKG_VERSION"),
        "pair": w.name,
        "invented": w.invented,
        "window_file": {"file": w.origin.display, "sha256": w.origin.sha256},
        "check": cls,
        "agreement": input.agreement,
        "materials": {"flyer": material_json(&w.flyer, true), "parent": material_json(&w.parent, true)},
        "criteria_reasons": w.criteria_reasons.iter().map(|(k, v)| (k.as_str().to_string(), v.clone())).collect::<std::collections::BTreeMap<_, _>>(),
        "assumptions": assumptions(w),
        "cautions": CAUTIONS,
        "caution": CAUTION,
        "library_files": input.library.files.iter().map(|f| json!({"file": f.display, "sha256": f.sha256})).collect::<Vec<_>>(),
        "command": input.command,
    })
}

/// The command line as typed, quoted for a POSIX shell.
pub fn command_line() -> String {
    std::env::args()
        .enumerate()
        .map(|(i, a)| {
            let a = if i == 0 { "oblique".to_string() } else { a };
            if !a.is_empty()
                && a.chars()
                    .all(|c| c.is_ascii_alphanumeric() || "-_./:=,+@%".contains(c))
            {
                a
            } else {
                format!("'{}'", a.replace('\'', "'\\''"))
            }
        })
        .collect::<Vec<_>>()
        .join(" ")
}
