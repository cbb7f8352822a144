//! The validation of a pair file's criteria, boundaries and observations, each problem with
//! its field path (the collector turns it into file:line:col).

use super::*;
use oblique_core::jetting::JettingAssessment;
use oblique_core::{evaluate_with_jetting, Collision};

/// The criteria section: constants checked, switches and reasons for every changed value.
pub(super) fn criteria(
    c: &mut Collector,
    parsed: &PairFile,
) -> (CriteriaConfig, BTreeMap<CriterionId, String>) {
    let cs = &parsed.criteria;
    check_constant(c, "criteria.deribas_lower.k", cs.deribas_lower.k);
    check_constant(
        c,
        "criteria.pressure_lower.hel_multiple",
        cs.pressure_lower.hel_multiple,
    );
    check_constant(c, "criteria.melting_upper.n", cs.melting_upper.n);
    check_constant(
        c,
        "criteria.wavy_transition.critical_reynolds",
        cs.wavy_transition.critical_reynolds,
    );
    let form = match cs.melting_upper.form.as_str() {
        "a" => WittmanForm::A,
        "b" => WittmanForm::B,
        other => {
            c.push(
                "criteria.melting_upper.form",
                format!("unknown form '{}'", crate::text::short(other, 40)),
                Some("use \"a\" (form b has no source and is kept only for comparison; see docs/theory.md §5.6)".into()),
            );
            WittmanForm::A
        }
    };
    let mixed = match MixedRule::parse(&cs.jetting.mixed) {
        Some(r) => r,
        None => {
            c.push(
                "criteria.jetting.mixed",
                format!(
                    "unknown rule '{}' for the mixed jetting case",
                    crate::text::short(&cs.jetting.mixed, 40)
                ),
                Some(
                    "use \"supersonic-side-polar\" (the default) or \"either-subsonic\" (docs/theory.md §4.3)"
                        .into(),
                ),
            );
            MixedRule::default()
        }
    };
    let (pressure_on, _) = pressure_default(parsed.process.as_deref());
    let criteria = CriteriaConfig {
        deribas_enabled: cs.deribas_lower.enabled,
        deribas_k: cs.deribas_lower.k,
        strength_enabled: cs.strength_lower.enabled,
        pressure_enabled: cs.pressure_lower.enabled.unwrap_or(pressure_on),
        hel_multiple: cs.pressure_lower.hel_multiple,
        melting_enabled: cs.melting_upper.enabled,
        wittman_n: cs.melting_upper.n,
        wittman_form: form,
        jetting_enabled: cs.jetting.enabled,
        wavy_enabled: cs.wavy_transition.enabled,
        wavy_critical_reynolds: cs.wavy_transition.critical_reynolds,
        mixed_jetting: mixed,
    };
    let mut criteria_reasons = BTreeMap::new();
    let defaults = CriteriaSection::default();
    let changed = [
        (
            CriterionId::DeribasLower,
            "deribas_lower",
            cs.deribas_lower
                != DeribasEntry {
                    reason: cs.deribas_lower.reason.clone(),
                    ..defaults.deribas_lower.clone()
                },
            &cs.deribas_lower.reason,
        ),
        (
            CriterionId::StrengthLower,
            "strength_lower",
            !cs.strength_lower.enabled,
            &cs.strength_lower.reason,
        ),
        (
            CriterionId::PressureLower,
            "pressure_lower",
            cs.pressure_lower.enabled.is_some_and(|e| e != pressure_on)
                || cs.pressure_lower.hel_multiple != defaults.pressure_lower.hel_multiple,
            &cs.pressure_lower.reason,
        ),
        (
            CriterionId::MeltingUpper,
            "melting_upper",
            cs.melting_upper
                != MeltingEntry {
                    reason: cs.melting_upper.reason.clone(),
                    ..defaults.melting_upper.clone()
                },
            &cs.melting_upper.reason,
        ),
        (
            CriterionId::Jetting,
            "jetting",
            cs.jetting
                != JettingEntry {
                    reason: cs.jetting.reason.clone(),
                    ..defaults.jetting.clone()
                },
            &cs.jetting.reason,
        ),
        (
            CriterionId::WavyTransition,
            "wavy_transition",
            cs.wavy_transition
                != WavyEntry {
                    reason: cs.wavy_transition.reason.clone(),
                    ..defaults.wavy_transition.clone()
                },
            &cs.wavy_transition.reason,
        ),
    ];
    for (id, key, is_changed, reason) in changed {
        match reason {
            Some(r) if !r.trim().is_empty() => {
                criteria_reasons.insert(id, r.clone());
            }
            _ if is_changed => c.push(
                &format!("criteria.{key}"),
                if reason.is_some() {
                    format!("{key} differs from the default but its reason is blank")
                } else {
                    format!("{key} differs from the default but gives no reason")
                },
                Some("add `reason: \"...\"` saying why (a trial series, a paper)".into()),
            ),
            _ => {}
        }
    }
    (criteria, criteria_reasons)
}

/// Whether a criterion constant differs from its default (then the window must not be empty).
pub(super) fn constants_changed(parsed: &PairFile) -> bool {
    let cs = &parsed.criteria;
    let d = CriteriaSection::default();
    cs.deribas_lower.k != d.deribas_lower.k
        || cs.pressure_lower.hel_multiple != d.pressure_lower.hel_multiple
        || cs.melting_upper.n != d.melting_upper.n
}

/// The field of the first changed constant, for the position of a message about them.
pub(super) fn changed_constant_field(parsed: &PairFile) -> String {
    let cs = &parsed.criteria;
    let d = CriteriaSection::default();
    if cs.deribas_lower.k != d.deribas_lower.k {
        "criteria.deribas_lower.k".into()
    } else if cs.pressure_lower.hel_multiple != d.pressure_lower.hel_multiple {
        "criteria.pressure_lower.hel_multiple".into()
    } else {
        "criteria.melting_upper.n".into()
    }
}

/// The user boundaries, each checked.
pub(super) fn boundaries(c: &mut Collector, parsed: &PairFile) -> Vec<Boundary> {
    let mut boundaries = Vec::new();
    for (i, b) in parsed.boundaries.iter().enumerate() {
        let base = format!("boundaries[{i}]");
        let plane = Plane::parse(&b.plane);
        if plane.is_none() {
            c.push(
                &format!("{base}.plane"),
                format!("unknown plane '{}'", b.plane),
                Some("use \"angle-impact-velocity\" or \"angle-collision-velocity\"".into()),
            );
        }
        let side = WeldSide::parse(&b.weld_side);
        if side.is_none() {
            c.push(
                &format!("{base}.weld_side"),
                format!("unknown weld side '{}'", b.weld_side),
                Some("use \"above\", \"below\", \"left\" or \"right\"".into()),
            );
        }
        if b.label.trim().is_empty() {
            c.push(&format!("{base}.label"), "a boundary needs a label", None);
        } else if let Some(j) = parsed.boundaries[..i]
            .iter()
            .position(|o| o.label.trim() == b.label.trim())
        {
            // Margins, failure probabilities and the map's columns are named by the label.
            c.push(
                &format!("{base}.label"),
                format!(
                    "the label '{}' is already boundaries[{j}]'s: every boundary needs its own label (outputs name each boundary by it)",
                    crate::text::one_line(b.label.trim())
                ),
                Some("give this boundary another label".into()),
            );
        }
        for (field, value) in [("label", &b.label), ("provenance", &b.provenance)] {
            if let Some(p) = crate::text::one_line_problem(value) {
                c.push(&format!("{base}.{field}"), p, None);
            }
        }
        if b.provenance.trim().is_empty() {
            c.push(
                &format!("{base}.provenance"),
                "a boundary needs its provenance (who drew it, from which trials)",
                None,
            );
        }
        if b.points.len() < 2 {
            c.push(
                &format!("{base}.points"),
                format!(
                    "a boundary needs at least two points, found {}",
                    b.points.len()
                ),
                None,
            );
            continue;
        }
        let mut pts = Vec::new();
        for (j, (v, a)) in b.points.iter().enumerate() {
            let v = c.quantity(&format!("{base}.points[{j}][0]"), v, QuantityKind::Velocity);
            let a = c.quantity(&format!("{base}.points[{j}][1]"), a, QuantityKind::Angle);
            if let (Some(v), Some(a)) = (v, a) {
                let deg = a.to_degrees();
                if !(v > 0.0) {
                    c.push(
                        &format!("{base}.points[{j}][0]"),
                        "boundary velocity must be above zero",
                        None,
                    );
                } else if !(deg > 0.0 && deg < 90.0) {
                    c.push(
                        &format!("{base}.points[{j}][1]"),
                        format!("angle {deg} deg is outside (0, 90) deg"),
                        None,
                    );
                } else {
                    pts.push((Velocity::from_m_s(v), Angle::from_radians(a)));
                }
            }
        }
        if pts.len() != b.points.len() {
            continue;
        }
        let xy: Vec<(f64, f64)> = pts
            .iter()
            .map(|(v, a)| (v.si() / 1000.0, a.degrees()))
            .collect();
        if let Some((s1, s2)) = self_crossing(&xy) {
            c.push(
                &format!("{base}.points"),
                format!("the polyline crosses itself (segment {s1} and segment {s2})"),
                Some("a boundary must be a simple line; split it into two boundaries".into()),
            );
            continue;
        }
        let (Some(plane), Some(side)) = (plane, side) else {
            continue;
        };
        let along: Vec<f64> = if side.along_velocity() {
            xy.iter().map(|p| p.0).collect()
        } else {
            xy.iter().map(|p| p.1).collect()
        };
        let increasing = along.windows(2).all(|w| w[1] > w[0]);
        let decreasing = along.windows(2).all(|w| w[1] < w[0]);
        if !(increasing || decreasing) {
            let axis = if side.along_velocity() {
                "velocity"
            } else {
                "angle"
            };
            c.push(
                &format!("{base}.points"),
                format!("with weld side '{}' the points must run one way in {axis}", side.as_str()),
                Some(format!("use weld side above/below for a line that is a function of velocity, left/right for one that is a function of angle (here the {axis} turns back)")),
            );
            continue;
        }
        if decreasing {
            pts.reverse();
        }
        boundaries.push(Boundary {
            label: b.label.clone(),
            plane,
            weld_side: side,
            points: pts,
            provenance: b.provenance.clone(),
        });
    }
    boundaries
}

/// The trial observations, each checked.
pub(super) fn observations(c: &mut Collector, parsed: &PairFile) -> Vec<Observation> {
    let mut observations = Vec::new();
    for (i, o) in parsed.observations.iter().enumerate() {
        let base = format!("observations[{i}]");
        let v = c.quantity(
            &format!("{base}.velocity"),
            &o.velocity,
            QuantityKind::Velocity,
        );
        if let Some(v) = v {
            if !(v > 0.0) {
                c.push(
                    &format!("{base}.velocity"),
                    format!("velocity '{}' must be above zero", o.velocity),
                    None,
                );
            } else if v > MAX_OBSERVED_VELOCITY_M_S {
                c.push(
                    &format!("{base}.velocity"),
                    format!(
                        "velocity '{}' is above {} km/s, beyond any impact-welding process",
                        crate::text::short(&o.velocity, 40),
                        MAX_OBSERVED_VELOCITY_M_S / 1000.0
                    ),
                    Some("check the unit (m/s, km/s); the bound is common practice: two-stage light-gas guns reach about 8 km/s".into()),
                );
            }
        }
        let a = c.quantity(&format!("{base}.angle"), &o.angle, QuantityKind::Angle);
        if let Some(a) = a {
            let deg = a.to_degrees();
            if !(deg > 0.0 && deg < 90.0) {
                c.push(
                    &format!("{base}.angle"),
                    format!("angle '{}' is outside (0, 90) deg", o.angle),
                    Some("collision angles lie strictly between 0 and 90 deg".into()),
                );
            }
        }
        let outcome = Outcome::parse(&o.outcome);
        if outcome.is_none() {
            let near = crate::diag::closest(&o.outcome, Outcome::ALL.iter().map(|x| x.as_str()));
            c.push(
                &format!("{base}.outcome"),
                format!("unknown outcome '{}'", o.outcome),
                Some(match near {
                    Some(n) => {
                        format!("did you mean \"{n}\"? (welded, not-welded, partial, melted)")
                    }
                    None => "use welded, not-welded, partial or melted".into(),
                }),
            );
        }
        if !PROCESSES.contains(&o.process.as_str()) {
            c.push(
                &format!("{base}.process"),
                format!("unknown process '{}'", o.process),
                Some(format!("use one of {}", PROCESSES.join(", "))),
            );
        }
        if !METHODS.contains(&o.method.as_str()) {
            c.push(
                &format!("{base}.method"),
                format!("unknown method '{}'", o.method),
                Some(format!("use one of {}", METHODS.join(", "))),
            );
        }
        if o.source.trim().is_empty() {
            c.push(
                &format!("{base}.source"),
                "an observation needs its source (report, shot log, paper)",
                None,
            );
        }
        if let Some(p) = crate::text::one_line_problem(&o.source) {
            c.push(&format!("{base}.source"), p, Some("a source is one line: a report number, a shot log, a paper; put the rest in `note`".into()));
        }
        let vu = o.velocity_uncertainty.as_ref().and_then(|t| {
            c.quantity(
                &format!("{base}.velocity_uncertainty"),
                t,
                QuantityKind::Velocity,
            )
        });
        let au = o
            .angle_uncertainty
            .as_ref()
            .and_then(|t| c.quantity(&format!("{base}.angle_uncertainty"), t, QuantityKind::Angle));
        if let Some(d) = &o.date {
            if let Some(problem) = crate::diag::date_problem(d) {
                c.push(
                    &format!("{base}.date"),
                    problem,
                    Some("write it like \"2026-11-30\"".into()),
                );
            }
        }
        for (field, value, bound) in [
            ("velocity_uncertainty", vu, MAX_OBSERVED_VELOCITY_M_S),
            ("angle_uncertainty", au, std::f64::consts::FRAC_PI_2),
        ] {
            if let Some(u) = value {
                if !(u >= 0.0) {
                    c.push(
                        &format!("{base}.{field}"),
                        format!("{field} must be zero or above"),
                        Some("a standard uncertainty; 0 means exact".into()),
                    );
                } else if u > bound {
                    c.push(
                        &format!("{base}.{field}"),
                        format!("{field} is larger than any value the quantity can take"),
                        Some("check the unit".into()),
                    );
                }
            }
        }
        if let (Some(v), Some(a), Some(outcome)) = (v, a, outcome) {
            observations.push(Observation {
                index: i,
                velocity: Velocity::from_m_s(v),
                angle: Angle::from_radians(a),
                outcome,
                process: o.process.clone(),
                method: o.method.clone(),
                velocity_uncertainty: vu.map(Velocity::from_m_s),
                angle_uncertainty: au.map(Angle::from_radians),
                date: o.date.clone(),
                source: o.source.clone(),
                note: o.note.clone(),
            });
        }
    }
    observations
}

/// The `fitted` section, each value checked: finite, above zero, within the command line's
/// bounds, inside its own interval.
pub(super) fn fitted(c: &mut Collector, parsed: &PairFile) -> Option<Fitted> {
    let f = parsed.fitted.as_ref()?;
    let before = c.problems.len();
    if let Some(problem) = crate::diag::date_problem(&f.date) {
        c.push(
            "fitted.date",
            problem,
            Some("write it like \"2026-11-30\"".into()),
        );
    }
    if f.method.trim().is_empty() {
        c.push("fitted.method", "a fit needs its method in words", None);
    }
    if f.observations == 0 {
        c.push(
            "fitted.observations",
            "a fit needs at least one observation",
            None,
        );
    }
    if !(f.level > 0.0 && f.level < 1.0) {
        c.push(
            "fitted.level",
            format!("level {} must lie strictly between 0 and 1", f.level),
            Some("0.95 for 95 % intervals".into()),
        );
    }
    for (key, max) in Fitted::CONSTANTS {
        let Some(v) = f.constant(key) else { continue };
        let base = format!("fitted.{key}");
        for (field, x) in [("value", Some(v.value)), ("low", v.low), ("high", v.high)] {
            if let Some(x) = x {
                if !(x.is_finite() && x > 0.0 && x <= max) {
                    c.push(
                        &format!("{base}.{field}"),
                        format!("{x} must be a finite number above zero and at most {max}"),
                        None,
                    );
                }
            }
        }
        if v.low.is_some_and(|lo| lo > v.value) || v.high.is_some_and(|hi| hi < v.value) {
            c.push(
                &base,
                format!("the value {} lies outside its own interval", v.value),
                Some("low <= value <= high".into()),
            );
        }
    }
    (c.problems.len() == before).then(|| f.clone())
}

/// Whether a criterion whose constant can be changed (Deribas k, the HEL multiple m, Wittman's
/// N) fails at every point of the validity domain, which leaves the window empty whatever the
/// other limits say. `None` when each holds somewhere; otherwise the reason in words, naming
/// the limit, its closest approach and the constant. A scan of 60 angles (0.5 to 30 deg) by 60
/// impact velocities (50 to 2000 m/s, geometric) over the domain, edges included: each of these
/// limits is monotonic in the impact velocity, so a limit satisfied anywhere in the domain is
/// satisfied at a scanned point near the domain's edge. (A window whose limits each hold
/// somewhere but never together is not refused: every point is then reported outside, with
/// the advice of each limit.)
pub fn empty_window(window: &PairWindow) -> Option<String> {
    let setup = window.setup().ok()?;
    let top = window
        .domain
        .bound(oblique_core::DomainQuantity::CollisionAngle)
        .map_or(30.0, |b| b.max);
    let (vlo, vhi) = window
        .domain
        .bound(oblique_core::DomainQuantity::ImpactVelocity)
        .map_or((50.0, 2000.0), |b| (b.min, b.max));
    let angles: Vec<f64> = (1..=60).map(|i| top * i as f64 / 60.0).collect();
    let speeds: Vec<f64> = (0..60)
        .map(|i| vlo * (vhi / vlo).powf(i as f64 / 59.0))
        .collect();
    let watched = [
        CriterionId::DeribasLower,
        CriterionId::PressureLower,
        CriterionId::MeltingUpper,
    ];
    // Per limit: satisfied somewhere, and its best relative margin with where.
    let mut best: std::collections::BTreeMap<CriterionId, (bool, f64, f64, f64)> =
        std::collections::BTreeMap::new();
    // None of these limits uses the jetting assessment.
    let jet = JettingAssessment::any_angle(
        oblique_core::jetting::JettingRegime::SubsonicParent,
        false,
        false,
    );
    for &deg in &angles {
        for &v in &speeds {
            let Ok(col) = Collision::from_impact(
                window.convention,
                Velocity::from_m_s(v),
                Angle::from_degrees(deg),
            ) else {
                continue;
            };
            if !window.domain.contains(&setup, &col) {
                continue;
            }
            let Ok(e) = evaluate_with_jetting(&setup, &col, &window.criteria, jet) else {
                continue;
            };
            for r in e.criteria.iter().filter(|r| watched.contains(&r.id)) {
                let rel = r.relative_margin();
                let entry = best
                    .entry(r.id)
                    .or_insert((false, f64::NEG_INFINITY, v, deg));
                entry.0 |= r.satisfied;
                if rel > entry.1 {
                    *entry = (entry.0, rel, v, deg);
                }
            }
        }
    }
    let constant = |id: CriterionId| -> String {
        let c = &window.criteria;
        match id {
            CriterionId::DeribasLower => format!("k = {}", c.deribas_k),
            CriterionId::PressureLower => format!("m = {}", c.hel_multiple),
            _ => format!("N = {}", c.wittman_n),
        }
    };
    let never: Vec<String> = best
        .iter()
        .filter(|(_, (sat, ..))| !sat)
        .map(|(id, (_, rel, v, deg))| {
            format!(
                "{id} with {} fails at every point of the validity domain (Vp {vlo:.0}-{vhi:.0} m/s, angle up to {top:.0} deg; closest at Vp {v:.0} m/s, {deg:.1} deg, {:.0} % short)",
                constant(*id),
                -100.0 * rel
            )
        })
        .collect();
    (!never.is_empty()).then(|| never.join("; "))
}
