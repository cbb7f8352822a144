//! The steps of the limits: each criterion (both plates, the more demanding kept), each user
//! boundary, the binding limit, the named margins along the two controls, and the verdict.

use super::{g, Figure, Step};
use crate::boundary::{Boundary, Plane, WeldSide};
use crate::classify::{limit_label, Classification, LimitRef};
use crate::margin::{angle_headroom, velocity_headroom, verdict_velocity_headroom};
use crate::present::{fmt_margin, fmt_value};
use crate::PairWindow;
use oblique_core::criteria::{format_in_unit, WITTMAN_SCALE_NOTE};
use oblique_core::{CriterionId, CriterionResult, LimitKind, Material, WittmanForm};

fn v1(x: f64) -> String {
    format!("{x:.1} m/s")
}

/// The words of each criterion's relation.
fn relation(id: CriterionId) -> &'static str {
    match id {
        CriterionId::DeribasLower => "the collision angle must reach a minimum that falls as the collision point runs faster (Deribas); evaluated with each plate's hardness and density, the larger minimum kept",
        CriterionId::StrengthLower => "the impact velocity must reach the speed at which the impact stress overcomes the tensile strength; evaluated for each plate, the larger kept",
        CriterionId::PressureLower => "the impact pressure must reach a multiple m of the Hugoniot elastic limit (HEL); the HEL of each plate, the larger kept",
        CriterionId::MeltingUpper => "the impact velocity must stay below the speed at which the interface melts (Wittman); it falls as the collision point runs faster and as the flyer thickens; evaluated for each plate, the smaller kept",
        CriterionId::Jetting => "the collision angle must exceed the jetting critical angle found above (strictly)",
        CriterionId::WavyTransition => "a Reynolds-type number of the two plates' flow marks where the interface turns wavy; it never decides a weld (informational)",
    }
}

fn mark(id: CriterionId) -> &'static str {
    match id {
        CriterionId::PressureLower => {
            "confirmed as quoted (Kore et al. 2010, for magnetic pulse welding)"
        }
        CriterionId::Jetting => "from memory; dissimilar construction derived here",
        _ => "from memory",
    }
}

/// The substituted line of one plate's limit.
fn plate_line(
    id: CriterionId,
    window: &PairWindow,
    m: &Material,
    r: &CriterionResult,
    c: &Classification,
    limit: f64,
) -> String {
    let vc = c.evaluation.collision.collision_velocity.si();
    let cfg = &window.criteria;
    let l = format_in_unit(limit, r.unit);
    match id {
        CriterionId::DeribasLower => format!(
            "{} x sqrt({} GPa / ({} kg/m^3 x ({})^2)) = {l}",
            cfg.deribas_k,
            g(m.vickers_hardness.si() / 1e9),
            g(m.density().si()),
            v1(vc)
        ),
        CriterionId::StrengthLower => format!(
            "sqrt({} MPa / {} kg/m^3) = {l}",
            g(m.tensile_strength.si() / 1e6),
            g(m.density().si())
        ),
        CriterionId::PressureLower => {
            let hel = m.hugoniot_elastic_limit().si();
            format!(
                "HEL = 0.5 x ({} GPa / {} GPa + 4/3) x {} MPa = {} GPa; m HEL = {} x {} GPa = {l}",
                g(m.bulk_modulus.si() / 1e9),
                g(m.shear_modulus.si() / 1e9),
                g(m.yield_strength.si() / 1e6),
                g(hel / 1e9),
                cfg.hel_multiple,
                g(hel / 1e9)
            )
        }
        CriterionId::MeltingUpper => {
            let lead = match cfg.wittman_form {
                WittmanForm::A => format!(
                    "sqrt({} K x {} m/s) / {}",
                    g(m.melting_temperature.si()),
                    g(m.hugoniot.c0.si()),
                    v1(vc)
                ),
                WittmanForm::B => format!("sqrt({} K / {})", g(m.melting_temperature.si()), v1(vc)),
            };
            format!(
                "(1 / {}) x {lead} x ({} W/(m K) x {} J/(kg K) x {} m/s / ({} kg/m^3 x {:.2} mm))^(1/4) = {l}",
                cfg.wittman_n,
                g(m.thermal_conductivity.si()),
                g(m.specific_heat.si()),
                g(m.hugoniot.c0.si()),
                g(m.density().si()),
                window.flyer_thickness.mm()
            )
        }
        CriterionId::Jetting | CriterionId::WavyTransition => l,
    }
}

/// Step: one criterion, both plates, the more demanding kept, the margin at this point.
pub(super) fn criterion(window: &PairWindow, c: &Classification, r: &CriterionResult) -> Step {
    let id = r.id;
    let title = id.title();
    let mut s = Step::new(id.as_str(), title[..1].to_uppercase() + &title[1..]);
    s.relation = relation(id).into();
    s.formula = match id {
        CriterionId::MeltingUpper => match window.criteria.wittman_form {
            WittmanForm::A => vec!["Vp_max = (1/N) sqrt(Tm C0) / Vc (k Cp C0 / (rho h))^(1/4)   [form A]".into()],
            WittmanForm::B => vec!["Vp_max = (1/N) sqrt(Tm / Vc) (k Cp C0 / (rho h))^(1/4)   [form B, no source found]".into()],
        },
        CriterionId::Jetting => vec!["beta > beta_crit".into()],
        _ => vec![id.formula().into()],
    };
    let (cmp, unit_v) = match r.kind {
        LimitKind::Lower => (">=", r.unit),
        LimitKind::Upper => ("<=", r.unit),
    };
    if let (Some(lf), Some(lp)) = (r.limit_flyer, r.limit_parent) {
        let f = &window.flyer.material;
        let p = &window.parent.material;
        s.numbers.push(format!(
            "flyer  {}: {}",
            f.id,
            plate_line(id, window, f, r, c, lf)
        ));
        s.numbers.push(format!(
            "parent {}: {}",
            p.id,
            plate_line(id, window, p, r, c, lp)
        ));
        s.numbers.push(format!(
            "kept: {} ({}, the {})",
            r.limit_text(),
            r.governing.as_str(),
            if r.kind == LimitKind::Lower {
                "larger"
            } else {
                "smaller"
            }
        ));
    }
    if id == CriterionId::WavyTransition {
        let e = &c.evaluation;
        let (f, p) = (&window.flyer.material, &window.parent.material);
        s.numbers.push(format!(
            "Re = ({} + {}) kg/m^3 x ({})^2 / (2 x ({} + {}) GPa) = {}",
            g(f.density().si()),
            g(p.density().si()),
            v1(e.collision.collision_velocity.si()),
            g(f.vickers_hardness.si() / 1e9),
            g(p.vickers_hardness.si() / 1e9),
            fmt_value(r.value, r.unit)
        ));
    }
    if let Some(tc) = r.limit_tm_celsius {
        s.numbers.push(format!(
            "with Tm in degrees Celsius instead of kelvin (the constant's unconfirmed scale): {}",
            format_in_unit(tc, "m/s")
        ));
        s.results.push(Figure::new(
            "limit_tm_celsius",
            tc,
            format_in_unit(tc, "m/s"),
        ));
        s.notes.push(WITTMAN_SCALE_NOTE.into());
    }
    let verdict = if r.informational {
        if r.satisfied {
            "wavy interface expected (informational)"
        } else {
            "flat interface expected (informational)"
        }
    } else if r.satisfied {
        "holds"
    } else {
        "FAILS"
    };
    let op = if id == CriterionId::Jetting { ">" } else { cmp };
    s.numbers.push(format!(
        "{} {op} {}: {verdict}; margin at this point {}",
        fmt_value(r.value, unit_v),
        r.limit_text(),
        fmt_margin(r.margin, r.unit)
    ));
    s.results
        .push(Figure::new("value", r.value, fmt_value(r.value, r.unit)));
    let no_limit = id == CriterionId::Jetting && r.limit >= 90.0;
    s.results.push(if no_limit {
        Figure::word("limit", r.limit_text())
    } else {
        Figure::new("limit", r.limit, r.limit_text())
    });
    s.results.push(Figure::new(
        "margin",
        r.margin,
        fmt_margin(r.margin, r.unit),
    ));
    if let Some(lf) = r.limit_flyer {
        s.results
            .push(Figure::new("limit_flyer", lf, format_in_unit(lf, r.unit)));
    }
    if let Some(lp) = r.limit_parent {
        s.results
            .push(Figure::new("limit_parent", lp, format_in_unit(lp, r.unit)));
    }
    // As `check --json` has it: true for an informational criterion, which never fails.
    s.results
        .push(Figure::flag("satisfied", r.satisfied, verdict));
    if c.domain.extrapolated.contains(&id) {
        s.notes.push(
            "evaluated outside its validity domain: an extrapolation (marked * in `check`)".into(),
        );
    }
    if id == CriterionId::PressureLower && window.process.as_deref() != Some("magnetic-pulse") {
        s.notes.push(format!(
            "pressure-lower {}",
            crate::pair::pressure_default(window.process.as_deref()).1
        ));
    }
    if id == CriterionId::MeltingUpper && window.criteria.wittman_form == WittmanForm::B {
        s.notes.push(
            "form B has no source; it is kept only for comparison (docs/theory.md §5.6)".into(),
        );
    }
    s.source = id.source().into();
    s.mark = mark(id).into();
    s
}

/// Step: one user boundary, interpolated at the point (never extrapolated).
pub(super) fn boundary(window: &PairWindow, c: &Classification, i: usize, b: &Boundary) -> Step {
    let mut s = Step::new("boundary", format!("Boundary \"{}\"", b.label));
    let (side, along_v) = match b.weld_side {
        WeldSide::Above => ("welds above the line: a lower angle limit", true),
        WeldSide::Below => ("welds below the line: an angle ceiling", true),
        WeldSide::Right => ("welds at higher velocities: a velocity floor", false),
        WeldSide::Left => ("welds at lower velocities: a velocity ceiling", false),
    };
    s.relation = format!(
        "a line drawn through the pair's trials ({side}); it is interpolated linearly at the point and never extrapolated beyond its points"
    );
    let pts: Vec<String> = b
        .points
        .iter()
        .map(|(v, a)| format!("({:.0} m/s, {} deg)", v.si(), g(a.degrees())))
        .collect();
    let vname = match b.plane {
        Plane::AngleImpactVelocity => "Vp",
        Plane::AngleCollisionVelocity => "Vc",
    };
    s.formula = vec![format!(
        "{} in the {} plane through {}",
        if along_v {
            format!("beta_line({vname})")
        } else {
            format!("{vname}_line(beta)")
        },
        b.plane.as_str(),
        pts.join(", ")
    )];
    let col = &c.evaluation.collision;
    let x = match (along_v, b.plane) {
        (true, Plane::AngleImpactVelocity) => format!("{vname} = {}", v1(col.impact_velocity.si())),
        (true, Plane::AngleCollisionVelocity) => {
            format!("{vname} = {}", v1(col.collision_velocity.si()))
        }
        (false, _) => format!("beta = {:.2} deg", col.angle.degrees()),
    };
    let r = c.boundaries.get(i);
    match r.and_then(|r| r.limit.zip(r.margin).map(|lm| (r, lm))) {
        Some((r, (limit, margin))) => {
            s.numbers.push(format!(
                "at {x} the line gives {}",
                fmt_value(limit, r.unit)
            ));
            let value = if along_v {
                format!("{:.2} deg", col.angle.degrees())
            } else {
                match b.plane {
                    Plane::AngleImpactVelocity => fmt_value(col.impact_velocity.si(), "m/s"),
                    Plane::AngleCollisionVelocity => fmt_value(col.collision_velocity.si(), "m/s"),
                }
            };
            let ge = matches!(b.weld_side, WeldSide::Above | WeldSide::Right);
            s.numbers.push(format!(
                "{value} {} {}: {}; margin at this point {}",
                if ge { ">=" } else { "<=" },
                fmt_value(limit, r.unit),
                if margin >= 0.0 { "holds" } else { "FAILS" },
                fmt_margin(margin, r.unit)
            ));
            s.results
                .push(Figure::new("limit", limit, fmt_value(limit, r.unit)));
            s.results
                .push(Figure::new("margin", margin, fmt_margin(margin, r.unit)));
            let holds = r.satisfied.unwrap_or(margin >= 0.0);
            s.results.push(Figure::flag(
                "satisfied",
                holds,
                if holds { "holds" } else { "FAILS" },
            ));
        }
        None => {
            s.numbers.push(format!(
                "at {x} the point lies outside the line's span: the boundary is not extrapolated, and the point is outside the trial data"
            ));
            s.results.push(Figure::word("limit", "outside the span"));
        }
    }
    s.source = b.provenance.clone();
    s.mark = "user boundary (the pair's trials)".into();
    let _ = window;
    s
}

/// Step: the binding limit, the smallest relative margin.
pub(super) fn binding(window: &PairWindow, c: &Classification) -> Step {
    let mut s = Step::new("binding", "The binding limit");
    s.relation = "unlike limits are compared by their margin relative to the limit; the binding limit has the smallest: the most violated one outside the window, the closest one inside".into();
    s.formula = vec!["relative margin = margin at this point / |limit|".into()];
    s.table_first = true;
    let mut rows = Vec::new();
    for r in c.evaluation.criteria.iter().filter(|r| !r.informational) {
        rows.push(vec![
            r.id.as_str().to_string(),
            fmt_margin(r.margin, r.unit),
            format!("{:+.3}", r.relative_margin()),
            if r.satisfied {
                "yes".into()
            } else {
                "NO".into()
            },
        ]);
    }
    for (i, r) in c.boundaries.iter().enumerate() {
        if let (Some(m), Some(rel)) = (r.margin, r.relative_margin()) {
            rows.push(vec![
                limit_label(window, &LimitRef::Boundary(i)),
                fmt_margin(m, r.unit),
                format!("{rel:+.3}"),
                if m >= 0.0 { "yes".into() } else { "NO".into() },
            ]);
        }
    }
    s.table = Some((
        vec![
            "limit".into(),
            "margin at this point".into(),
            "relative".into(),
            "holds".into(),
        ],
        rows,
    ));
    match (&c.binding, c.binding_relative_margin) {
        (Some(b), Some(rel)) => {
            let label = limit_label(window, b);
            s.numbers
                .push(format!("binding: {label} (relative margin {rel:+.3})"));
            s.results.push(Figure::word("binding", label));
        }
        _ => s.numbers.push("no decisive limit is enabled".into()),
    }
    s.source = "docs/theory.md §7 and §8.2".into();
    s.mark = "project convention".into();
    s
}

/// Step: the named margins along the two controls (velocity and angle headroom).
pub(super) fn headroom(window: &PairWindow, c: &Classification) -> Step {
    let mut s = Step::new(
        "headroom",
        "Where each limit is reached along the two controls",
    );
    s.relation = "a margin at this point is taken at the point's own Vc, but changing the impact velocity (the charge) or the angle (the taper) moves Vc and the limit with it; so each limit is searched along each control, inside the validity domain".into();
    s.formula = vec![
        "velocity headroom = (Vp where the limit is reached, same angle) - Vp".into(),
        "angle headroom = (beta where the limit is reached, same Vp) - beta".into(),
    ];
    s.table_first = true;
    for (n, d) in crate::margin::DEFINITIONS {
        s.notes.push(format!("{n}: {d}"));
    }
    let mut rows = Vec::new();
    for (l, _) in &c.headroom {
        let label = limit_label(window, l);
        let v = velocity_headroom(window, c, l);
        let a = angle_headroom(window, c, l);
        rows.push(vec![
            label.clone(),
            v.as_ref().map_or("-".into(), crate::margin::Along::cell),
            a.as_ref().map_or("-".into(), crate::margin::Along::cell),
        ]);
        if let Some(v) = &v {
            s.results.push(Figure::new(
                format!("{label}: reached_at_impact_velocity_m_s"),
                v.reached_at,
                format!("{:.0} m/s", v.reached_at),
            ));
        }
        if let Some(a) = &a {
            s.results.push(Figure::new(
                format!("{label}: reached_at_angle_deg"),
                a.reached_at,
                format!("{:.2} deg", a.reached_at),
            ));
        }
    }
    s.table = Some((
        vec![
            "limit".into(),
            "velocity headroom".into(),
            "angle headroom".into(),
        ],
        rows,
    ));
    if let Some(v) = verdict_velocity_headroom(window, c) {
        s.numbers.push(format!("the verdict's {}", v.sentence()));
        s.results.push(Figure::new(
            "velocity_headroom.headroom_m_s",
            v.change,
            format!("{:+.0} m/s", v.change),
        ));
        if let Some(p) = v.percent {
            s.results.push(Figure::new(
                "velocity_headroom.headroom_percent",
                p,
                format!("{p:+.1} %"),
            ));
        }
    }
    s.notes.push(crate::margin::ROUNDING_RULE.into());
    s.source = "docs/theory.md §8.2.1 (a numerical search with the classification itself: steps growing from 0.5 % of Vp or 0.05 deg, each sign change bisected)".into();
    s.mark = "computed here (numerical search)".into();
    s
}

/// Step: the verdict, as `check` prints it.
pub(super) fn verdict(window: &PairWindow, c: &Classification) -> Step {
    let mut s = Step::new("verdict", "Verdict");
    s.relation = "inside the window when every decisive limit and every boundary that spans the point holds, inside the validity domain; outside, the binding limit says what to change".into();
    let text = crate::present::verdict_text(window, c);
    s.numbers = text
        .lines()
        .filter(|l| *l != crate::present::CAUTION)
        .map(str::to_string)
        .collect();
    s.results.push(Figure::flag(
        "inside",
        c.inside,
        if c.inside { "true" } else { "false" },
    ));
    s.results
        .push(Figure::word("prediction", c.prediction.as_str()));
    s.source = "docs/theory.md §8.2".into();
    s.mark = "screening estimate, never a guarantee".into();
    s
}
