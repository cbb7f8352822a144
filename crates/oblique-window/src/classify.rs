//! Classification of one process point against a pair window: every model criterion and user
//! boundary with its margin, the binding limit, a reason in plain words, and the prediction used
//! to compare with trials.

use crate::boundary::BoundaryResult;
use crate::pair::PairWindow;
use oblique_core::units::{Angle, Velocity};
use oblique_core::{
    evaluate_with_jetting, Collision, Convention, CriterionId, LimitKind, PairSetup, PhysicsError,
    PointEvaluation,
};
use serde::Serialize;

/// A limit of either kind.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", content = "id", rename_all = "kebab-case")]
pub enum LimitRef {
    /// A model criterion.
    Criterion(CriterionId),
    /// A user boundary, by its index in the window.
    Boundary(usize),
}

/// What the window predicts for a point.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Prediction {
    /// Every decisive limit holds.
    Welded,
    /// A lower limit (or an angle ceiling) fails.
    NotWelded,
    /// Only velocity ceilings fail (melting upper, a left-side boundary).
    Melted,
}

impl Prediction {
    /// All predictions.
    pub const ALL: [Prediction; 3] = [
        Prediction::Welded,
        Prediction::NotWelded,
        Prediction::Melted,
    ];
    /// The word.
    pub fn as_str(self) -> &'static str {
        match self {
            Prediction::Welded => "welded",
            Prediction::NotWelded => "not-welded",
            Prediction::Melted => "melted",
        }
    }
}

/// A point classified against a window.
#[derive(Debug, Clone)]
pub struct Classification {
    /// The model evaluation (criteria, kinematics, pressure, jetting).
    pub evaluation: PointEvaluation,
    /// Every user boundary at the point.
    pub boundaries: Vec<BoundaryResult>,
    /// Every decisive criterion and every in-range boundary satisfied.
    pub inside: bool,
    /// The binding limit: the most violated one, or the closest one when inside.
    pub binding: Option<LimitRef>,
    /// The binding limit's margin relative to its limit.
    pub binding_relative_margin: Option<f64>,
    /// Some boundary does not span the point.
    pub outside_trial_data: bool,
    /// The prediction.
    pub prediction: Prediction,
    /// Failing decisive limits.
    pub failing: Vec<LimitRef>,
    /// A plain-words reason; filled by [`explain`] (empty after a bare [`classify`], which is
    /// also used for grids and sweeps where the text is not needed).
    pub reason: String,
    /// For every decisive limit, where it is reached along the user's two controls; filled by
    /// [`explain`].
    pub headroom: Vec<(LimitRef, Headroom)>,
    /// The convention of the headroom velocities (the window's unless the user gave another).
    pub headroom_convention: Convention,
    /// Where this angle and this velocity are inside the window; filled by [`explain`].
    pub inside_stretch: Option<InsideStretch>,
}

impl Classification {
    /// The point's impact velocity (m/s) in the convention of the headroom figures.
    pub fn headroom_impact_velocity(&self) -> f64 {
        self.evaluation
            .collision
            .with_convention(self.headroom_convention)
            .impact_velocity
            .si()
    }
}

/// Classify `collision` against `window` (the collision is re-expressed in the window's
/// convention, keeping the geometry Vc and beta).
///
/// # Errors
/// [`PhysicsError`] when the physics cannot be evaluated.
pub fn classify(
    window: &PairWindow,
    setup: &PairSetup,
    collision: &Collision,
) -> Result<Classification, PhysicsError> {
    let collision = if collision.convention == window.convention {
        *collision
    } else {
        collision.with_convention(window.convention)
    };
    let jetting = oblique_core::jetting::critical_angle(
        &setup.flyer.hugoniot,
        &setup.parent.hugoniot,
        collision.flow_velocity,
        collision.collision_velocity,
    )?;
    classify_with_jetting(window, setup, &collision, jetting)
}

/// As [`classify`], with the jetting assessment supplied (e.g. from a table), and the collision
/// already in the window's convention.
///
/// # Errors
/// [`PhysicsError`] when the physics cannot be evaluated.
pub fn classify_with_jetting(
    window: &PairWindow,
    setup: &PairSetup,
    collision: &Collision,
    jetting: oblique_core::jetting::JettingAssessment,
) -> Result<Classification, PhysicsError> {
    let evaluation = evaluate_with_jetting(setup, collision, &window.criteria, jetting)?;
    let boundaries: Vec<BoundaryResult> = window
        .boundaries
        .iter()
        .map(|b| {
            b.evaluate(
                collision.impact_velocity,
                collision.collision_velocity,
                collision.angle,
            )
        })
        .collect();

    let mut decisive: Vec<(LimitRef, f64, bool, bool)> = Vec::new(); // (ref, relative margin, satisfied, velocity ceiling)
    for c in evaluation.criteria.iter().filter(|c| !c.informational) {
        let ceiling = c.kind == LimitKind::Upper;
        decisive.push((
            LimitRef::Criterion(c.id),
            c.relative_margin(),
            c.satisfied,
            ceiling,
        ));
    }
    for (i, (b, r)) in window.boundaries.iter().zip(&boundaries).enumerate() {
        if let (Some(rel), Some(sat)) = (r.relative_margin(), r.satisfied) {
            decisive.push((
                LimitRef::Boundary(i),
                rel,
                sat,
                b.weld_side.is_velocity_ceiling(),
            ));
        }
    }
    let inside = decisive.iter().all(|d| d.2);
    let failing: Vec<LimitRef> = decisive
        .iter()
        .filter(|d| !d.2)
        .map(|d| d.0.clone())
        .collect();
    let binding = decisive.iter().min_by(|a, b| a.1.total_cmp(&b.1));
    let prediction = if inside {
        Prediction::Welded
    } else if decisive.iter().filter(|d| !d.2).all(|d| d.3) {
        Prediction::Melted
    } else {
        Prediction::NotWelded
    };
    let outside_trial_data = boundaries.iter().any(|b| !b.in_range);
    let c = Classification {
        evaluation,
        boundaries,
        inside,
        binding: binding.map(|b| b.0.clone()),
        binding_relative_margin: binding.map(|b| b.1),
        outside_trial_data,
        prediction,
        failing,
        reason: String::new(),
        headroom: Vec::new(),
        headroom_convention: window.convention,
        inside_stretch: None,
    };
    Ok(c)
}

/// Where a limit is reached along the two controls a process engineer actually turns: the impact
/// velocity at the same collision angle (the bank energy or the charge), and the collision angle
/// at the same impact velocity (the taper or chamfer). A criterion's own margin is taken at the
/// point's collision-point velocity, which moves when either control moves, so it can overstate
/// or understate the room left; these values do not.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Headroom {
    /// Impact velocity (m/s, the window's convention) at this angle where the limit is reached,
    /// nearest to the point; `None` when it is not reached in a search from Vp/20 to 20 Vp, or a
    /// user boundary stops spanning the points first (no extrapolation).
    pub velocity_m_s: Option<f64>,
    /// Collision angle (deg) at this impact velocity where the limit is reached, nearest to the
    /// point; `None` when not reached within (0, 90) deg.
    pub angle_deg: Option<f64>,
}

/// The signed margin of one limit at (vp, beta): positive on the welding side; `None` where it
/// does not apply (a boundary outside its span) or the point is not physical.
fn limit_margin(
    window: &PairWindow,
    setup: &PairSetup,
    limit: &LimitRef,
    convention: Convention,
    vp: f64,
    beta_rad: f64,
) -> Option<f64> {
    let col = Collision::from_impact(
        convention,
        Velocity::from_m_s(vp),
        Angle::from_radians(beta_rad),
    )
    .ok()?
    .with_convention(window.convention);
    match limit {
        LimitRef::Criterion(id) => {
            let jet = if *id == CriterionId::Jetting {
                oblique_core::jetting::critical_angle(
                    &setup.flyer.hugoniot,
                    &setup.parent.hugoniot,
                    col.flow_velocity,
                    col.collision_velocity,
                )
                .ok()?
            } else {
                // Not used by the other criteria.
                oblique_core::jetting::JettingAssessment {
                    regime: oblique_core::jetting::JettingRegime::SubsonicParent,
                    critical_angle: Angle::from_radians(0.0),
                }
            };
            let e = evaluate_with_jetting(setup, &col, &window.criteria, jet).ok()?;
            e.criterion(*id).map(|r| r.margin)
        }
        LimitRef::Boundary(i) => {
            window
                .boundaries
                .get(*i)?
                .evaluate(col.impact_velocity, col.collision_velocity, col.angle)
                .margin
        }
    }
}

/// The nearest place from `x0` where `f` changes sign, searching outward in both directions
/// with growing steps (first step `step0`) within [lo, hi], then bisecting. A `None` from `f`
/// ends the search in that direction.
fn nearest_crossing(
    x0: f64,
    step0: f64,
    lo: f64,
    hi: f64,
    tol: f64,
    f: impl Fn(f64) -> Option<f64>,
) -> Option<f64> {
    let f0 = f(x0)?;
    let s0 = f0 >= 0.0;
    let mut best: Option<f64> = None;
    for dir in [1.0f64, -1.0] {
        let mut prev = x0;
        let mut step = step0;
        for _ in 0..60 {
            let mut x = x0 + dir * step;
            // The last probe sits just inside the search range, so the whole range is covered.
            let at_edge = x <= lo || x >= hi;
            if at_edge {
                x = if dir > 0.0 {
                    hi - 1e-9 * (hi - x0)
                } else {
                    lo + 1e-9 * (x0 - lo)
                };
            }
            let Some(fx) = f(x) else { break };
            if (fx >= 0.0) != s0 {
                // Bisect between prev (same side as x0) and x.
                let (mut a, mut b) = (prev, x);
                for _ in 0..60 {
                    if (b - a).abs() <= tol {
                        break;
                    }
                    let m = 0.5 * (a + b);
                    match f(m) {
                        Some(fm) if (fm >= 0.0) == s0 => a = m,
                        Some(_) => b = m,
                        None => break,
                    }
                }
                let root = 0.5 * (a + b);
                if best.is_none_or(|r| (root - x0).abs() < (r - x0).abs()) {
                    best = Some(root);
                }
                break;
            }
            if at_edge {
                break;
            }
            prev = x;
            step *= 1.3;
        }
    }
    best
}

/// Where `limit` is reached along impact velocity (at this angle) and along angle (at this
/// impact velocity), for the point of `c`.
/// The impact velocity is taken in `convention` (the one the user typed the point in), at the
/// point's angle; the limit is evaluated in the window's convention (same Vc and angle).
pub fn headroom(
    window: &PairWindow,
    setup: &PairSetup,
    c: &Classification,
    limit: &LimitRef,
    convention: Convention,
) -> Headroom {
    let vp = c
        .evaluation
        .collision
        .with_convention(convention)
        .impact_velocity
        .si();
    let beta = c.evaluation.collision.angle.radians();
    let half_pi = std::f64::consts::FRAC_PI_2;
    let angle_deg = nearest_crossing(beta, 0.05f64.to_radians(), 0.0, half_pi, 1e-7, |b| {
        limit_margin(window, setup, limit, convention, vp, b)
    })
    .map(f64::to_degrees);
    Headroom {
        velocity_m_s: velocity_crossing(window, setup, c, limit, convention),
        angle_deg,
    }
}

/// Where `limit` is reached along the impact velocity (in `convention`) at the point's angle,
/// nearest to the point: the one search every velocity headroom comes from (check, estimate,
/// sweep, report), so that they agree to the last digit.
pub fn velocity_crossing(
    window: &PairWindow,
    setup: &PairSetup,
    c: &Classification,
    limit: &LimitRef,
    convention: Convention,
) -> Option<f64> {
    let vp = c
        .evaluation
        .collision
        .with_convention(convention)
        .impact_velocity
        .si();
    let beta = c.evaluation.collision.angle.radians();
    nearest_crossing(vp, 0.005 * vp, vp / 20.0, vp * 20.0, 1e-3, |v| {
        limit_margin(window, setup, limit, convention, v, beta)
    })
}

/// The decisive limits of a classification: every enabled, non-informational criterion and
/// every user boundary that spans the point.
fn decisive_limits(window: &PairWindow, c: &Classification) -> Vec<LimitRef> {
    let mut limits: Vec<LimitRef> = c
        .evaluation
        .criteria
        .iter()
        .filter(|r| !r.informational)
        .map(|r| LimitRef::Criterion(r.id))
        .collect();
    limits.extend(
        (0..window.boundaries.len())
            .filter(|i| c.boundaries.get(*i).is_some_and(|b| b.in_range))
            .map(LimitRef::Boundary),
    );
    limits
}

/// Fill the velocity headroom of every decisive limit (angles left unknown) with velocities in
/// `convention`: what a sweep needs to rank its settings, without the angle searches and the
/// words of [`explain`].
pub fn explain_velocity(
    window: &PairWindow,
    setup: &PairSetup,
    c: &mut Classification,
    convention: Convention,
) {
    c.headroom_convention = convention;
    c.headroom = decisive_limits(window, c)
        .into_iter()
        .map(|l| {
            let v = velocity_crossing(window, setup, c, &l, convention);
            (
                l,
                Headroom {
                    velocity_m_s: v,
                    angle_deg: None,
                },
            )
        })
        .collect();
}

/// The stretches of impact velocity (at the point's angle) and of angle (at the point's impact
/// velocity) that lie inside the window, nearest to the point: found by scanning 240 velocities
/// from Vp/20 to 20 Vp (geometric) and 180 angles from 0.25 to 89.75 deg, then bisecting the ends.
/// `None` on an axis where no scanned value is inside.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct InsideStretch {
    /// Lowest and highest inside impact velocity (m/s) at this angle, in the user's convention.
    pub velocity_m_s: Option<(f64, f64)>,
    /// Lowest and highest inside angle (deg) at this impact velocity.
    pub angle_deg: Option<(f64, f64)>,
}

/// The stretch of the inside region along one axis nearest to `x0`: scan `grid`, pick the run of
/// inside values nearest to x0, bisect both of its ends against their outside neighbours.
fn inside_stretch(x0: f64, grid: &[f64], inside: impl Fn(f64) -> bool) -> Option<(f64, f64)> {
    let flags: Vec<bool> = grid.iter().map(|&x| inside(x)).collect();
    let mut runs: Vec<(usize, usize)> = Vec::new();
    let mut k = 0;
    while k < grid.len() {
        if flags[k] {
            let start = k;
            while k < grid.len() && flags[k] {
                k += 1;
            }
            runs.push((start, k - 1));
        } else {
            k += 1;
        }
    }
    let dist = |r: &(usize, usize)| {
        if x0 < grid[r.0] {
            grid[r.0] - x0
        } else if x0 > grid[r.1] {
            x0 - grid[r.1]
        } else {
            0.0
        }
    };
    let run = runs
        .into_iter()
        .min_by(|a, b| dist(a).total_cmp(&dist(b)))?;
    let refine = |mut a: f64, mut b: f64| {
        // a inside, b outside
        for _ in 0..40 {
            let m = 0.5 * (a + b);
            if inside(m) {
                a = m;
            } else {
                b = m;
            }
        }
        a
    };
    let lo = if run.0 > 0 {
        refine(grid[run.0], grid[run.0 - 1])
    } else {
        grid[run.0]
    };
    let hi = if run.1 + 1 < grid.len() {
        refine(grid[run.1], grid[run.1 + 1])
    } else {
        grid[run.1]
    };
    Some((lo, hi))
}

/// Where the point's angle and impact velocity are inside the window (see [`InsideStretch`]).
pub fn inside_stretch_of(
    window: &PairWindow,
    setup: &PairSetup,
    c: &Classification,
    convention: Convention,
) -> InsideStretch {
    let vp = c
        .evaluation
        .collision
        .with_convention(convention)
        .impact_velocity
        .si();
    let beta = c.evaluation.collision.angle;
    let inside_at = |v: f64, b: Angle| -> bool {
        Collision::from_impact(convention, Velocity::from_m_s(v), b)
            .ok()
            .and_then(|col| classify(window, setup, &col).ok())
            .is_some_and(|k| k.inside)
    };
    let n = 240;
    let vgrid: Vec<f64> = (0..n)
        .map(|i| vp / 20.0 * 400f64.powf(i as f64 / (n - 1) as f64))
        .collect();
    let agrid: Vec<f64> = (0..180).map(|i| 0.25 + 0.5 * i as f64).collect();
    InsideStretch {
        velocity_m_s: inside_stretch(vp, &vgrid, |v| inside_at(v, beta)),
        angle_deg: inside_stretch(beta.degrees(), &agrid, |a| {
            inside_at(vp, Angle::from_degrees(a))
        }),
    }
}

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
    c.inside_stretch = Some(inside_stretch_of(window, setup, c, convention));
    c.headroom = decisive_limits(window, c)
        .into_iter()
        .map(|l| {
            let h = headroom(window, setup, c, &l, convention);
            (l, h)
        })
        .collect();
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

/// The label of a limit.
pub fn limit_label(window: &PairWindow, limit: &LimitRef) -> String {
    match limit {
        LimitRef::Criterion(id) => id.as_str().to_string(),
        LimitRef::Boundary(i) => window.boundaries.get(*i).map_or_else(
            || format!("boundary {i}"),
            |b| format!("boundary \"{}\"", b.label),
        ),
    }
}

/// Plain-words advice for one limit at this point, from its velocity and angle headroom
/// ([`crate::margin`]; call [`explain`] first; without it the advice only states the margin at
/// this point). Figures are rounded to the safe side ([`crate::margin::ROUNDING_RULE`]).
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
    let holds = v.as_ref().or(a.as_ref()).map_or_else(
        || match limit {
            LimitRef::Criterion(id) => c.evaluation.criterion(*id).is_none_or(|r| r.satisfied),
            LimitRef::Boundary(i) => c
                .boundaries
                .get(*i)
                .and_then(|b| b.satisfied)
                .unwrap_or(true),
        },
        |x| x.holds,
    );
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
        (true, true) => {
            "not reached by changing the impact velocity or the angle alone".to_string()
        }
        (true, false) => "not cured by changing the impact velocity or the angle alone (within Vp/20 to 20 Vp and 0 to 90 deg)".to_string(),
        (false, true) => parts.join("; "),
        (false, false) => parts.join("; or "),
    }
}

/// Where the window lies along the two controls, in words (after [`explain`]): the stretch of
/// impact velocity inside at this angle and of angle inside at this velocity, or that there is
/// none. Advice for one limit can cross another; this line says where the window really is.
pub fn inside_stretch_text(c: &Classification) -> Option<String> {
    let st = c.inside_stretch?;
    let conv = c.headroom_convention;
    let v = match st.velocity_m_s {
        Some((a, b)) => format!(
            "at this angle the window spans Vp ({conv}) from {:.0} to {:.0} m/s",
            a.ceil(),
            b.floor()
        ),
        None => {
            "at this angle no impact velocity from Vp/20 to 20 Vp is inside the window".to_string()
        }
    };
    let a = match st.angle_deg {
        Some((lo, hi)) => format!(
            "at this velocity it spans the angle from {:.2} to {:.2} deg",
            (lo * 100.0).ceil() / 100.0,
            (hi * 100.0).floor() / 100.0
        ),
        None => "at this velocity no angle is inside".to_string(),
    };
    Some(format!("{v}; {a}"))
}

fn reason(window: &PairWindow, c: &Classification) -> String {
    let mut s = if c.inside {
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::library::Library;
    use oblique_core::units::{Angle, Velocity};

    fn demo() -> PairWindow {
        Library::load(&[])
            .expect("built-in library")
            .pair("demo-al6061-on-cu")
            .expect("demo pair")
            .clone()
    }

    fn at(w: &PairWindow, v: f64, deg: f64) -> Classification {
        let setup = w.setup().expect("setup");
        let c = Collision::from_impact(
            w.convention,
            Velocity::from_m_s(v),
            Angle::from_degrees(deg),
        )
        .expect("collision");
        classify_explained(w, &setup, &c).expect("classifies")
    }

    #[test]
    fn predictions_on_the_demo_window() {
        let w = demo();
        let inside = at(&w, 450.0, 10.0);
        assert!(inside.inside);
        assert_eq!(inside.prediction, Prediction::Welded);
        assert_eq!(inside.binding, Some(LimitRef::Boundary(0)));
        assert!(inside.reason.starts_with("inside the window"));

        let slow = at(&w, 300.0, 10.0);
        assert_eq!(slow.prediction, Prediction::NotWelded);
        assert!(slow
            .failing
            .contains(&LimitRef::Criterion(CriterionId::StrengthLower)));
        assert!(slow.failing.contains(&LimitRef::Boundary(0)));

        // Only the melting ceiling fails: predicted melted.
        let hot = at(&w, 650.0, 9.0);
        assert_eq!(hot.prediction, Prediction::Melted);
        assert_eq!(
            hot.failing,
            vec![LimitRef::Criterion(CriterionId::MeltingUpper)]
        );
    }

    #[test]
    fn a_boundary_that_does_not_span_the_point_is_flagged_not_extrapolated() {
        let w = demo();
        let c = at(&w, 700.0, 20.0);
        assert!(c.outside_trial_data);
        assert!(!c.boundaries[1].in_range);
        assert!(!c.failing.contains(&LimitRef::Boundary(1)));
        assert!(c.reason.contains("outside the trial data"));
    }

    #[test]
    fn another_convention_is_converted_keeping_the_geometry() {
        let w = demo();
        let setup = w.setup().expect("setup");
        let nf = Collision::from_impact(
            w.convention,
            Velocity::from_m_s(450.0),
            Angle::from_degrees(10.0),
        )
        .expect("collision");
        let bis = nf.with_convention(oblique_core::Convention::Bisector);
        let a = classify(&w, &setup, &nf).expect("classifies");
        let b = classify(&w, &setup, &bis).expect("classifies");
        assert_eq!(a.inside, b.inside);
        assert!(
            (a.evaluation.collision.impact_velocity.si()
                - b.evaluation.collision.impact_velocity.si())
            .abs()
                < 1e-9
        );
    }

    #[test]
    fn agreement_on_the_demo_window() {
        let a = crate::agreement::agreement(&demo()).expect("agreement");
        assert_eq!(a.observations, 16);
        assert_eq!(a.agreeing, 14);
        let idx: Vec<usize> = a.disagreements.iter().map(|d| d.index).collect();
        assert_eq!(idx, vec![10, 13]);
        assert!(a.disagreements[1]
            .misjudged_by
            .iter()
            .any(|m| m == "deribas-lower"));
        assert_eq!(
            a.table["welded"]["partial"], 1,
            "the partial shot near the edge agrees"
        );
        assert_eq!(a.table["melted"]["melted"], 1);
    }
}

#[cfg(test)]
#[path = "classify_headroom_tests.rs"]
mod headroom_tests;
