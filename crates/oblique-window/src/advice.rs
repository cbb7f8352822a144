//! A classification explained for a person: the headroom of every decisive limit, where the
//! window is along each control, the plausibility and regime warnings, the reason and each
//! limit's advice in words (`explain`, `classify_explained`). Kept apart from `classify`, which
//! computes, so that the wording can use the rounded figures of `margin` without a circle.

use crate::classify::*;
use crate::pair::PairWindow;
use oblique_core::criteria::format_in_unit;
use oblique_core::{Collision, Convention, CriterionId, PairSetup, PhysicsError, WittmanForm};

/// Fill the headroom of every decisive limit and the plain-words reason, with velocities in the
/// window's convention.
pub fn explain(window: &PairWindow, setup: &PairSetup, c: &mut Classification) {
    explain_in(window, setup, c, window.convention);
}

/// As [`explain`], with the impact velocity of the advice in `convention` (the one the user
/// gave the point in).
pub fn explain_in(
    window: &PairWindow,
    setup: &PairSetup,
    c: &mut Classification,
    convention: Convention,
) {
    c.headroom_convention = convention;
    let span = domain_span_of(window, setup, c, convention);
    c.domain_span = Some(span);
    c.inside_stretch = Some(inside_stretch_of(window, setup, c, convention, &span));
    c.headroom = decisive_limits(window, c)
        .into_iter()
        .map(|l| {
            let h = headroom(window, setup, c, &l, convention, &span);
            (l, h)
        })
        .collect();
    let col = c.evaluation.collision.with_convention(convention);
    c.trials = crate::trials::trials_near(
        window,
        col.impact_velocity.si(),
        col.angle.degrees(),
        convention,
    );
    c.warnings = warnings(window, setup, c);
    c.reason = reason(window, c);
}

/// [`classify`] followed by [`explain`]: for single points shown to a person.
///
/// # Errors
/// [`PhysicsError`] when the physics cannot be evaluated.
pub fn classify_explained(
    window: &PairWindow,
    setup: &PairSetup,
    collision: &Collision,
) -> Result<Classification, PhysicsError> {
    let mut c = classify(window, setup, collision)?;
    explain(window, setup, &mut c);
    Ok(c)
}

/// What the physics does not know at this point, in words (see [`Classification::warnings`]).
fn warnings(window: &PairWindow, setup: &PairSetup, c: &Classification) -> Vec<String> {
    let e = &c.evaluation;
    let mut w = plausibility_warnings(window, &e.collision);
    let j = &e.jetting;
    let jet_on = window.criteria.jetting_enabled;
    if jet_on && j.is_mixed() {
        let rule = window.criteria.mixed_jetting;
        let how = match rule {
            oblique_core::MixedRule::SupersonicSidePolar => format!(
                "judged by the conservative supersonic-side polar rule (critical angle {})",
                e.criterion(CriterionId::Jetting)
                    .map_or_else(|| "-".into(), oblique_core::CriterionResult::limit_text)
            ),
            oblique_core::MixedRule::EitherSubsonic => {
                "judged by the either-subsonic rule (jet at any angle, from memory)".into()
            }
        };
        w.push(format!(
            "jetting in the mixed regime ({}; Vc/C0 parent {:.2}, Vf/C0 flyer {:.2}): no source covers a collision supersonic in one plate only; {how} (docs/theory.md §4.3)",
            j.inflow_text(),
            e.collision.collision_velocity.si() / setup.parent.hugoniot.c0.si(),
            e.collision.flow_velocity.si() / setup.flyer.hugoniot.c0.si(),
        ));
    } else if jet_on && j.any_supersonic() {
        w.push(format!(
            "supersonic collision in both plates (Vc/C0 parent {:.2}, Vf/C0 flyer {:.2}): the jetting limit rests on the shock-polar criterion (Walsh et al. 1953, from memory) and on linear Hugoniot fits; read points near the limit with that uncertainty",
            e.collision.collision_velocity.si() / setup.parent.hugoniot.c0.si(),
            e.collision.flow_velocity.si() / setup.flyer.hugoniot.c0.si(),
        ));
    }
    if let Some(m) = e.criterion(CriterionId::MeltingUpper) {
        if window.criteria.wittman_form == WittmanForm::B {
            w.push("the Wittman melting limit uses form B, for which no source was found; it is kept only for comparison (docs/theory.md §5.6)".into());
        }
        if let Some(low) = m.limit_tm_celsius {
            if m.value > low && m.value <= m.limit {
                w.push(format!(
                    "the impact velocity lies within the melting limit's scale uncertainty: {} with Tm in kelvin, {} with Tm in degrees Celsius (the Wittman constant's scale is unconfirmed; fit N to your trials)",
                    format_in_unit(m.limit, "m/s"),
                    format_in_unit(low, "m/s")
                ));
            }
        }
    }
    w
}

/// The validity domain along the two controls in words ("Vp 50-1638 m/s at this angle, angle
/// 3.1-30 deg at this velocity"), for advice that cannot be followed inside it.
fn domain_span_text(c: &Classification) -> String {
    let Some(span) = c.domain_span else {
        return String::new();
    };
    let v = span.velocity_m_s.map_or_else(
        || "no impact velocity at this angle".to_string(),
        |(a, b)| format!("Vp {:.0}-{:.0} m/s at this angle", a.ceil(), b.floor()),
    );
    let a = span.angle_deg.map_or_else(
        || "no angle at this velocity".to_string(),
        |(a, b)| format!("angle {a:.2}-{b:.2} deg at this velocity"),
    );
    format!("{v}, {a}")
}

/// Plain-words advice for one limit at this point, from its velocity and angle headroom
/// ([`crate::margin`]; call [`explain`] first; without it the advice only states the margin at
/// this point), searched inside the validity domain. Figures are rounded to the safe side
/// ([`crate::margin::ROUNDING_RULE`]).
pub fn limit_advice(window: &PairWindow, c: &Classification, limit: &LimitRef) -> String {
    if !c.headroom.iter().any(|(l, _)| l == limit) {
        return match limit {
            LimitRef::Criterion(id) => c
                .evaluation
                .criterion(*id)
                .map(|r| r.advice())
                .unwrap_or_default(),
            LimitRef::Boundary(i) => c
                .boundaries
                .get(*i)
                .and_then(|r| {
                    r.margin.map(|m| {
                        format!(
                            "margin at this point {}",
                            oblique_core::criteria::format_in_unit(m, r.unit)
                        )
                    })
                })
                .unwrap_or_default(),
        };
    }
    let v = crate::margin::velocity_headroom(window, c, limit);
    let a = crate::margin::angle_headroom(window, c, limit);
    let holds = v
        .as_ref()
        .or(a.as_ref())
        .map_or_else(|| crate::margin::holds(c, limit), |x| x.holds);
    let conv = c.headroom_convention;
    let vnote = if conv == c.evaluation.collision.convention {
        String::new()
    } else {
        format!(" (Vp in the {conv} convention)")
    };
    let parts: Vec<String> = [v.map(|x| x.sentence() + &vnote), a.map(|x| x.sentence())]
        .into_iter()
        .flatten()
        .collect();
    match (parts.is_empty(), holds) {
        (true, true) => format!(
            "not reached inside the validity domain by changing the impact velocity or the angle alone ({})",
            domain_span_text(c)
        ),
        (true, false) => format!(
            "not reachable inside the validity domain by changing the impact velocity or the angle alone ({})",
            domain_span_text(c)
        ),
        (false, true) => parts.join("; "),
        (false, false) => parts.join("; or "),
    }
}

/// Where the window lies along the two controls, in words (after [`explain`]): the stretch of
/// impact velocity inside at this angle and of angle inside at this velocity, or that there is
/// none inside the validity domain. Advice for one limit can cross another; this line says
/// where the window really is.
pub fn inside_stretch_text(c: &Classification) -> Option<String> {
    let st = c.inside_stretch.as_ref()?;
    let span = c.domain_span.unwrap_or(DomainSpan {
        velocity_m_s: None,
        angle_deg: None,
    });
    let conv = c.headroom_convention;
    // Each stretch rounded inwards (by the margins' rule: a value within the searches'
    // tolerance of a step is that step), marked when outside the trial data.
    let runs = |runs: &[Run], unit: f64, fmt: &dyn Fn(f64) -> String| -> String {
        runs.iter()
            .map(|r| {
                format!(
                    "from {} to {}{}",
                    fmt(crate::margin::round_directed(r.from, unit, true)),
                    fmt(crate::margin::round_directed(r.to, unit, false)),
                    if r.outside_trial_data {
                        " (outside the trial data)"
                    } else if r.partly_outside_trial_data {
                        " (partly outside the trial data)"
                    } else {
                        ""
                    }
                )
            })
            .collect::<Vec<_>>()
            .join(" and ")
    };
    let v = match (st.velocity_runs.is_empty(), span.velocity_m_s) {
        (false, _) => format!(
            "at this angle the window spans Vp ({conv}) {}",
            runs(&st.velocity_runs, 1.0, &|x| format!("{x:.0} m/s"))
        ),
        (true, Some((a, b))) => format!(
            "at this angle no impact velocity in the validity domain ({:.0}-{:.0} m/s) is inside the window",
            a.ceil(),
            b.floor()
        ),
        (true, None) => {
            "at this angle no impact velocity lies in the validity domain".to_string()
        }
    };
    let a = match (st.angle_runs.is_empty(), span.angle_deg) {
        (false, _) => format!(
            "at this velocity it spans the angle {}",
            runs(&st.angle_runs, 0.01, &|x| format!("{x:.2} deg"))
        ),
        (true, Some((lo, hi))) => format!(
            "at this velocity no angle in the validity domain ({lo:.2}-{hi:.2} deg) is inside"
        ),
        (true, None) => "at this velocity no angle lies in the validity domain".to_string(),
    };
    Some(format!("{v}; {a}"))
}

fn reason(window: &PairWindow, c: &Classification) -> String {
    let mut s = if !c.domain.inside() {
        let say = match c.domain.limits_say {
            Prediction::Welded => "inside the window".to_string(),
            Prediction::Melted => "melted".to_string(),
            _ => "not welded".to_string(),
        };
        let binding = c
            .binding
            .as_ref()
            .map(|b| {
                format!(
                    " (binding limit {}: {})",
                    limit_label(window, b),
                    limit_advice(window, c, b)
                )
            })
            .unwrap_or_default();
        format!(
            "outside the validity domain: {}; no verdict is claimed there (the limits, extrapolated, would say {say}{binding})",
            c.domain.exits_text()
        )
    } else if c.inside {
        match crate::margin::verdict_velocity_headroom(window, c) {
            Some(v) => format!("inside the window; {}", v.sentence()),
            None => match &c.binding {
                Some(b) => format!(
                    "inside the window; nearest limit {}: {}",
                    limit_label(window, b),
                    limit_advice(window, c, b)
                ),
                None => "inside the window (no decisive limit is enabled)".to_string(),
            },
        }
    } else {
        let first = c
            .binding
            .as_ref()
            .map(|b| format!("{}: {}", limit_label(window, b), limit_advice(window, c, b)))
            .unwrap_or_default();
        let others = c.failing.len().saturating_sub(1);
        if others > 0 {
            format!("outside the window; binding limit {first} ({others} more limit(s) also fail)")
        } else {
            format!("outside the window; binding limit {first}")
        }
    };
    if c.outside_trial_data {
        let labels: Vec<String> = c
            .boundaries
            .iter()
            .filter(|b| !b.in_range)
            .map(|b| format!("\"{}\"", b.label))
            .collect();
        s.push_str(&format!(
            "; outside the trial data: boundary {} does not span this point and was not extrapolated",
            labels.join(", ")
        ));
    }
    s
}
