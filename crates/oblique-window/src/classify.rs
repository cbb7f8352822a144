//! Classification of one process point against a pair window: every model criterion and user
//! boundary with its margin, the binding limit, the validity domain, a reason in plain words,
//! and the prediction used to compare with trials.

use crate::boundary::BoundaryResult;
use crate::pair::PairWindow;
use oblique_core::hugoniot::{impedance_match, ImpactState};
use oblique_core::jetting::JettingAssessment;
use oblique_core::units::{Angle, Velocity};
use oblique_core::{
    evaluate_with_jetting, Collision, Convention, CriterionId, DomainExit, LimitKind, PairSetup,
    PhysicsError, PointEvaluation, ValidityDomain,
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
    /// Every decisive limit holds, inside the validity domain.
    Welded,
    /// A lower limit (or an angle ceiling) fails.
    NotWelded,
    /// Only velocity ceilings fail (melting upper, a left-side boundary).
    Melted,
    /// A head-on impact (collision angle 0): no collision point sweeps the interface, so no
    /// jet forms and nothing welds (not welded).
    HeadOn,
    /// The point lies outside the validity domain (docs/theory.md §7.1): the limits there are
    /// extrapolations, and no verdict is claimed.
    OutsideDomain,
}

impl Prediction {
    /// All predictions, in the order of the map's counts.
    pub const ALL: [Prediction; 5] = [
        Prediction::Welded,
        Prediction::NotWelded,
        Prediction::Melted,
        Prediction::HeadOn,
        Prediction::OutsideDomain,
    ];
    /// The word.
    pub fn as_str(self) -> &'static str {
        match self {
            Prediction::Welded => "welded",
            Prediction::NotWelded => "not-welded",
            Prediction::Melted => "melted",
            Prediction::HeadOn => "head-on",
            Prediction::OutsideDomain => "outside-domain",
        }
    }
    /// Its index in [`Self::ALL`].
    pub fn index(self) -> usize {
        match self {
            Prediction::Welded => 0,
            Prediction::NotWelded => 1,
            Prediction::Melted => 2,
            Prediction::HeadOn => 3,
            Prediction::OutsideDomain => 4,
        }
    }
}

/// Where the point stands against the validity domain.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DomainStatus {
    /// Every bound the point misses; empty inside the domain.
    pub exits: Vec<DomainExit>,
    /// The limits evaluated outside their part of the domain (extrapolated).
    pub extrapolated: Vec<CriterionId>,
    /// What the limits alone say at the point (welded, not-welded or melted), extrapolated when
    /// the point is outside: never a verdict there.
    pub limits_say: Prediction,
}

impl DomainStatus {
    /// Inside the validity domain.
    pub fn inside(&self) -> bool {
        self.exits.is_empty()
    }

    /// The exits in words, `; `-separated.
    pub fn exits_text(&self) -> String {
        self.exits
            .iter()
            .map(DomainExit::text)
            .collect::<Vec<_>>()
            .join("; ")
    }
}

/// The validity domain along the two controls at the point: the stretch of impact velocity
/// (in the convention of the headroom) at the point's angle, and of angle at its impact
/// velocity, that lies inside the domain. `None` on an axis where nothing does.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct DomainSpan {
    /// Lowest and highest impact velocity (m/s) inside the domain at this angle.
    pub velocity_m_s: Option<(f64, f64)>,
    /// Lowest and highest angle (deg) inside the domain at this impact velocity.
    pub angle_deg: Option<(f64, f64)>,
}

/// A point classified against a window.
#[derive(Debug, Clone)]
pub struct Classification {
    /// The model evaluation (criteria, kinematics, pressure, jetting).
    pub evaluation: PointEvaluation,
    /// Every user boundary at the point.
    pub boundaries: Vec<BoundaryResult>,
    /// Every decisive criterion and every in-range boundary satisfied, inside the validity
    /// domain.
    pub inside: bool,
    /// The binding limit: the most violated one, or the closest one when inside.
    pub binding: Option<LimitRef>,
    /// The binding limit's margin relative to its limit.
    pub binding_relative_margin: Option<f64>,
    /// Some boundary does not span the point.
    pub outside_trial_data: bool,
    /// The prediction (`outside-domain` outside the validity domain).
    pub prediction: Prediction,
    /// Failing decisive limits.
    pub failing: Vec<LimitRef>,
    /// The point against the validity domain.
    pub domain: DomainStatus,
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
    /// The validity domain along the two controls; filled by [`explain`].
    pub domain_span: Option<DomainSpan>,
    /// What the pair's trials say near the point (filled by [`explain`]; `None` without trials):
    /// whether it lies beyond the region they cover, and the nearest ones.
    pub trials: Option<crate::trials::TrialsNear>,
    /// What the physics does not know at this point, and inputs no practitioner would type:
    /// the mixed jetting case, supersonic inflow, an unsourced form, the melting limit's scale,
    /// implausible magnitudes (each threshold documented in docs/theory.md §7.2); filled by
    /// [`explain`].
    pub warnings: Vec<String>,
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

    /// Inside or not, whether the point lies outside the trial data, as `check` words it: a
    /// user boundary does not span it, or it lies beyond the region the trials cover (from
    /// `trials` when `advice::explain` filled it, found here otherwise).
    pub fn beyond_trial_data(&self, window: &PairWindow) -> bool {
        if self.outside_trial_data {
            return true;
        }
        match &self.trials {
            Some(t) => t.beyond_trials,
            None => {
                let col = self.evaluation.collision.with_convention(window.convention);
                crate::trials::trials_near(
                    window,
                    col.impact_velocity.si(),
                    col.angle.degrees(),
                    window.convention,
                )
                .is_some_and(|t| t.beyond_trials)
            }
        }
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
        window.criteria.mixed_jetting,
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
    jetting: JettingAssessment,
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
    let limits_inside = decisive.iter().all(|d| d.2);
    let failing: Vec<LimitRef> = decisive
        .iter()
        .filter(|d| !d.2)
        .map(|d| d.0.clone())
        .collect();
    let binding = decisive.iter().min_by(|a, b| a.1.total_cmp(&b.1));
    let limits_say = if limits_inside {
        Prediction::Welded
    } else if decisive.iter().filter(|d| !d.2).all(|d| d.3) {
        Prediction::Melted
    } else {
        Prediction::NotWelded
    };
    let exits = window.domain.check(setup, collision);
    let domain = DomainStatus {
        extrapolated: ValidityDomain::extrapolated(&exits),
        exits,
        limits_say,
    };
    let (inside, prediction) = if domain.inside() {
        (limits_inside, limits_say)
    } else {
        (false, Prediction::OutsideDomain)
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
        domain,
        reason: String::new(),
        headroom: Vec::new(),
        headroom_convention: window.convention,
        inside_stretch: None,
        domain_span: None,
        warnings: Vec::new(),
        trials: None,
    };
    Ok(c)
}

/// Where a limit is reached along the two controls a process engineer actually turns: the impact
/// velocity at the same collision angle (the bank energy or the charge), and the collision angle
/// at the same impact velocity (the taper or chamfer). A criterion's own margin is taken at the
/// point's collision-point velocity, which moves when either control moves, so it can overstate
/// or understate the room left; these values do not. Both searches stay inside the validity
/// domain and cover all of it along their axis.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Headroom {
    /// Impact velocity (m/s, the headroom's convention) at this angle where the limit is
    /// reached, nearest to the point, inside the validity domain; `None` when it is not reached
    /// there, or a user boundary stops spanning the points first (no extrapolation).
    pub velocity_m_s: Option<f64>,
    /// The velocity is the edge of the validity domain: the point lies outside it and the
    /// limit's verdict already changes between the point and the domain's edge.
    pub velocity_at_domain_edge: bool,
    /// Collision angle (deg) at this impact velocity where the limit is reached, nearest to the
    /// point, inside the validity domain; `None` when not reached there.
    pub angle_deg: Option<f64>,
    /// As `velocity_at_domain_edge`, for the angle.
    pub angle_at_domain_edge: bool,
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
                    window.criteria.mixed_jetting,
                )
                .ok()?
            } else {
                // Not used by the other criteria.
                JettingAssessment::any_angle(
                    oblique_core::jetting::JettingRegime::SubsonicParent,
                    false,
                    false,
                )
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

/// The nearest crossing of `f` from `x0` inside the domain stretch [lo, hi]. A point outside
/// the stretch starts from its nearest end; when `f`'s sign already differs there from the
/// point's, that end is the answer (flagged `true`: the crossing itself lies outside the
/// domain). The first step is `step0` of the starting value.
fn crossing_in_domain(
    x0: f64,
    (lo, hi): (f64, f64),
    step0: impl Fn(f64) -> f64,
    tol: f64,
    f: impl Fn(f64) -> Option<f64>,
) -> Option<(f64, bool)> {
    let x1 = x0.clamp(lo, hi);
    if x1 == x0 {
        return nearest_crossing(x0, step0(x0), lo, hi, tol, f).map(|x| (x, false));
    }
    let s0 = f(x0).map(|v| v >= 0.0);
    let s1 = f(x1)? >= 0.0;
    if s0.is_some_and(|s| s != s1) {
        return Some((x1, true));
    }
    nearest_crossing(x1, step0(x1), lo, hi, tol, f).map(|x| (x, false))
}

/// The stretch of impact velocity (in `convention`, at the point's angle) inside the validity
/// domain: every speed scales with Vp at a fixed angle, so it is one interval.
fn domain_velocity_span(
    window: &PairWindow,
    setup: &PairSetup,
    c: &Classification,
    convention: Convention,
) -> Option<(f64, f64)> {
    let col = &c.evaluation.collision;
    let vp = col.with_convention(convention).impact_velocity.si();
    window
        .domain
        .speed_scale_interval(setup, col)
        .map(|(lo, hi)| (vp * lo, vp * hi))
}

/// The stretch of angle (deg, at impact velocity `vp` in `convention`) inside the validity
/// domain nearest to `beta0` deg: a scan in 0.05 deg steps up to the angle bound, both ends
/// bisected.
fn domain_angle_span(
    window: &PairWindow,
    setup: &PairSetup,
    vp: f64,
    beta0: f64,
    convention: Convention,
) -> Option<(f64, f64)> {
    let top = window
        .domain
        .bound(oblique_core::DomainQuantity::CollisionAngle)
        .map_or(89.999, |b| b.max.min(89.999));
    let inside = |deg: f64| {
        Collision::from_impact(convention, Velocity::from_m_s(vp), Angle::from_degrees(deg))
            .is_ok_and(|col| {
                window
                    .domain
                    .contains(setup, &col.with_convention(window.convention))
            })
    };
    let n = (top / 0.05).ceil() as usize;
    let grid: Vec<f64> = (1..=n).map(|i| (i as f64 * 0.05).min(top)).collect();
    inside_stretch(beta0, &grid, inside)
}

/// Where `limit` is reached along impact velocity (at this angle) and along angle (at this
/// impact velocity), for the point of `c`, inside the validity domain (`span`, see
/// [`DomainSpan`]). The impact velocity is taken in `convention` (the one the user typed the
/// point in), at the point's angle; the limit is evaluated in the window's convention (same Vc
/// and angle).
pub fn headroom(
    window: &PairWindow,
    setup: &PairSetup,
    c: &Classification,
    limit: &LimitRef,
    convention: Convention,
    span: &DomainSpan,
) -> Headroom {
    let vp = c
        .evaluation
        .collision
        .with_convention(convention)
        .impact_velocity
        .si();
    let beta = c.evaluation.collision.angle.radians();
    let velocity = span
        .velocity_m_s
        .and_then(|s| velocity_search(window, setup, limit, convention, vp, beta, s));
    let angle = span.angle_deg.and_then(|(lo, hi)| {
        crossing_in_domain(
            beta,
            (lo.to_radians(), hi.to_radians()),
            |_| 0.05f64.to_radians(),
            1e-7,
            |b| limit_margin(window, setup, limit, convention, vp, b),
        )
    });
    Headroom {
        velocity_m_s: velocity.map(|v| v.0),
        velocity_at_domain_edge: velocity.is_some_and(|v| v.1),
        angle_deg: angle.map(|a| a.0.to_degrees()),
        angle_at_domain_edge: angle.is_some_and(|a| a.1),
    }
}

/// The search for where `limit` is reached along the impact velocity (in `convention`) at the
/// angle `beta` (rad), nearest to `vp`, within the domain's stretch `span` of velocities: the
/// crossing and whether it is the domain's edge.
fn velocity_search(
    window: &PairWindow,
    setup: &PairSetup,
    limit: &LimitRef,
    convention: Convention,
    vp: f64,
    beta: f64,
    span: (f64, f64),
) -> Option<(f64, bool)> {
    crossing_in_domain(
        vp,
        span,
        |x| 0.005 * x,
        1e-3,
        |v| limit_margin(window, setup, limit, convention, v, beta),
    )
}

/// Where `limit` is reached along the impact velocity (in `convention`) at the point's angle,
/// nearest to the point, inside the validity domain: the one search every velocity headroom
/// comes from (check, estimate, sweep, report), so that they agree to the last digit.
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
    let span = domain_velocity_span(window, setup, c, convention)?;
    velocity_search(window, setup, limit, convention, vp, beta, span).map(|v| v.0)
}

/// The decisive limits of a classification: every enabled, non-informational criterion and
/// every user boundary that spans the point.
pub(crate) fn decisive_limits(window: &PairWindow, c: &Classification) -> Vec<LimitRef> {
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
    let span = domain_velocity_span(window, setup, c, convention);
    let vp = c
        .evaluation
        .collision
        .with_convention(convention)
        .impact_velocity
        .si();
    let beta = c.evaluation.collision.angle.radians();
    c.headroom = decisive_limits(window, c)
        .into_iter()
        .map(|l| {
            let v = span.and_then(|s| velocity_search(window, setup, &l, convention, vp, beta, s));
            (
                l,
                Headroom {
                    velocity_m_s: v.map(|x| x.0),
                    velocity_at_domain_edge: v.is_some_and(|x| x.1),
                    angle_deg: None,
                    angle_at_domain_edge: false,
                },
            )
        })
        .collect();
}

/// The stretches of impact velocity (at the point's angle) and of angle (at the point's impact
/// velocity) that lie inside the window, nearest to the point, within the validity domain:
/// found by scanning 240 velocities and 180 angles across the domain's stretch on each axis,
/// then bisecting the ends. `None` on an axis where no scanned value is inside.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct InsideStretch {
    /// Lowest and highest inside impact velocity (m/s) at this angle, in the user's convention:
    /// the stretch nearest to the point.
    pub velocity_m_s: Option<(f64, f64)>,
    /// Lowest and highest inside angle (deg) at this impact velocity: the stretch nearest to
    /// the point.
    pub angle_deg: Option<(f64, f64)>,
    /// Every inside stretch of impact velocity at this angle, in order (the window can be
    /// inside on two separate stretches).
    pub velocity_runs: Vec<Run>,
    /// Every inside stretch of angle at this impact velocity, in order.
    pub angle_runs: Vec<Run>,
}

/// One stretch of a control inside the window.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Run {
    /// Lowest inside value.
    pub from: f64,
    /// Highest inside value.
    pub to: f64,
    /// Inside the model limits and the boundaries that reach it, but outside the trial data (a
    /// user boundary does not span it, or no trial was fired near it): at every one of nine
    /// points spread along it.
    pub outside_trial_data: bool,
    /// As `outside_trial_data`, at some of the nine points only.
    pub partly_outside_trial_data: bool,
}

/// Whether a stretch lies outside the trial data, judged at nine points spread along it:
/// (everywhere, somewhere).
fn trial_cover(from: f64, to: f64, beyond: impl Fn(f64) -> bool) -> (bool, bool) {
    let n = (0..9)
        .filter(|&i| beyond(from + (to - from) * f64::from(i) / 8.0))
        .count();
    (n == 9, n > 0 && n < 9)
}

/// The stretch of the inside region along one axis nearest to `x0`: scan `grid`, pick the run of
/// inside values nearest to x0, bisect both of its ends against their outside neighbours.
fn inside_stretch(x0: f64, grid: &[f64], inside: impl Fn(f64) -> bool) -> Option<(f64, f64)> {
    nearest_run(x0, &inside_runs(grid, inside, Some(x0)))
}

/// The distance from `x0` to the stretch `lo..=hi` (0 inside it).
fn distance_to(x0: f64, lo: f64, hi: f64) -> f64 {
    (lo - x0).max(x0 - hi).max(0.0)
}

/// The run nearest to `x0` (0 when `x0` lies in it).
fn nearest_run(x0: f64, runs: &[(f64, f64)]) -> Option<(f64, f64)> {
    runs.iter()
        .copied()
        .min_by(|a, b| distance_to(x0, a.0, a.1).total_cmp(&distance_to(x0, b.0, b.1)))
}

/// The runs of inside values of `grid`, each end bisected against its outside neighbour; with
/// `only_near`, only the run nearest to that value is refined and returned.
fn inside_runs(
    grid: &[f64],
    inside: impl Fn(f64) -> bool,
    only_near: Option<f64>,
) -> Vec<(f64, f64)> {
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
    if let Some(x0) = only_near {
        let dist = |r: &(usize, usize)| distance_to(x0, grid[r.0], grid[r.1]);
        runs = runs
            .into_iter()
            .min_by(|a, b| dist(a).total_cmp(&dist(b)))
            .into_iter()
            .collect();
    }
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
    runs.into_iter()
        .map(|run| {
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
            (lo, hi)
        })
        .collect()
}

/// The validity domain along the two controls at the point (see [`DomainSpan`]).
pub fn domain_span_of(
    window: &PairWindow,
    setup: &PairSetup,
    c: &Classification,
    convention: Convention,
) -> DomainSpan {
    let vp = c
        .evaluation
        .collision
        .with_convention(convention)
        .impact_velocity
        .si();
    DomainSpan {
        velocity_m_s: domain_velocity_span(window, setup, c, convention),
        angle_deg: domain_angle_span(
            window,
            setup,
            vp,
            c.evaluation.collision.angle.degrees(),
            convention,
        ),
    }
}

/// Where the point's angle and impact velocity are inside the window (see [`InsideStretch`]),
/// scanning across the domain's stretch `span` on each axis.
pub fn inside_stretch_of(
    window: &PairWindow,
    setup: &PairSetup,
    c: &Classification,
    convention: Convention,
    span: &DomainSpan,
) -> InsideStretch {
    let vp = c
        .evaluation
        .collision
        .with_convention(convention)
        .impact_velocity
        .si();
    let beta = c.evaluation.collision.angle;
    let at = |v: f64, b: Angle| {
        Collision::from_impact(convention, Velocity::from_m_s(v), b)
            .ok()
            .and_then(|col| classify(window, setup, &col).ok())
    };
    let inside_at = |v: f64, b: Angle| -> bool { at(v, b).is_some_and(|k| k.inside) };
    // A point is outside the trial data when a user boundary does not span it or no trial was
    // fired near it.
    let beyond =
        |v: f64, b: Angle| -> bool { at(v, b).is_some_and(|k| k.beyond_trial_data(window)) };
    let velocity_runs: Vec<Run> = span.velocity_m_s.map_or_else(Vec::new, |(lo, hi)| {
        let n = 240;
        let vgrid: Vec<f64> = (0..n)
            .map(|i| {
                if i + 1 == n {
                    hi
                } else {
                    lo * (hi / lo).powf(i as f64 / (n - 1) as f64)
                }
            })
            .collect();
        runs_of(&vgrid, |v| inside_at(v, beta), |v| beyond(v, beta))
    });
    let angle_runs: Vec<Run> = span.angle_deg.map_or_else(Vec::new, |(lo, hi)| {
        let n = 180;
        let agrid: Vec<f64> = (0..n)
            .map(|i| {
                if i + 1 == n {
                    hi
                } else {
                    lo + (hi - lo) * i as f64 / (n - 1) as f64
                }
            })
            .collect();
        runs_of(
            &agrid,
            |a| inside_at(vp, Angle::from_degrees(a)),
            |a| beyond(vp, Angle::from_degrees(a)),
        )
    });
    let pairs = |runs: &[Run]| runs.iter().map(|r| (r.from, r.to)).collect::<Vec<_>>();
    InsideStretch {
        velocity_m_s: nearest_run(vp, &pairs(&velocity_runs)),
        angle_deg: nearest_run(beta.degrees(), &pairs(&angle_runs)),
        velocity_runs,
        angle_runs,
    }
}

/// Every inside run of `grid` (see `inside_runs`), each with whether it lies outside the trial
/// data (`beyond` at nine points along it).
fn runs_of(grid: &[f64], inside: impl Fn(f64) -> bool, beyond: impl Fn(f64) -> bool) -> Vec<Run> {
    inside_runs(grid, inside, None)
        .into_iter()
        .map(|(from, to)| {
            let (all, some) = trial_cover(from, to, &beyond);
            Run {
                from,
                to,
                outside_trial_data: all,
                partly_outside_trial_data: some,
            }
        })
        .collect()
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

/// Plausibility thresholds at the point of entry (common practice; docs/theory.md §7.2): values
/// outside them are accepted but warned about as ones no practitioner would type.
pub mod plausible {
    /// Flyer thickness range, m (10 um foils to 100 mm plates).
    pub const FLYER_THICKNESS_M: (f64, f64) = (1e-6, 0.1);
    /// Largest parent thickness, m.
    pub const PARENT_THICKNESS_MAX_M: f64 = 1.0;
    /// Impact velocity range, m/s.
    pub const IMPACT_VELOCITY_M_S: (f64, f64) = (10.0, 5000.0);
    /// Largest collision-point velocity, m/s (the jetting table's range).
    pub const COLLISION_VELOCITY_MAX_M_S: f64 = 20_000.0;
}

/// Warnings about inputs no practitioner would type (thresholds in [`plausible`]).
pub fn plausibility_warnings(window: &PairWindow, collision: &Collision) -> Vec<String> {
    let mut w = Vec::new();
    let h = window.flyer_thickness.si();
    let (hlo, hhi) = plausible::FLYER_THICKNESS_M;
    if !(hlo..=hhi).contains(&h) {
        w.push(format!(
            "flyer thickness {} mm: no impact-welding flyer is {} (common practice: about 0.01 to 50 mm); is the unit right?",
            fmt_num(h * 1e3),
            if h > hhi { "that thick" } else { "that thin" }
        ));
    }
    if let Some(t) = window.parent_thickness {
        if t.si() > plausible::PARENT_THICKNESS_MAX_M {
            w.push(format!(
                "parent thickness {} mm: above 1 m, no impact-welded part is that thick (common practice); is the unit right?",
                fmt_num(t.si() * 1e3)
            ));
        }
    }
    let vp = collision.impact_velocity.si();
    let (vlo, vhi) = plausible::IMPACT_VELOCITY_M_S;
    if !(vlo..=vhi).contains(&vp) {
        w.push(format!(
            "impact velocity {} m/s: {} any impact-welding process (common practice: about 100 to 1000 m/s); is the unit right?",
            fmt_num(vp),
            if vp > vhi { "far above" } else { "far below" }
        ));
    }
    let vc = collision.collision_velocity.si();
    if vc > plausible::COLLISION_VELOCITY_MAX_M_S {
        w.push(format!(
            "collision-point velocity {} m/s at {} deg: above 20 km/s no set-up welds (Vc = Vp / sin(beta) grows without bound as the angle goes to 0); is the angle's unit right?",
            fmt_num(vc),
            fmt_num(collision.angle.degrees())
        ));
    }
    w
}

/// A number with about four significant digits, no exponent for everyday sizes.
pub(crate) fn fmt_num(x: f64) -> String {
    if x != 0.0 && (x.abs() >= 1e6 || x.abs() < 1e-3) {
        format!("{x:.3e}")
    } else if x.abs() >= 100.0 {
        format!("{x:.0}")
    } else {
        let s = format!("{x:.4}");
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    }
}

/// A head-on impact (collision angle 0): the flyer meets the parent face to face, no collision
/// point sweeps the interface, no jet forms and the surfaces are not cleaned, so nothing welds
/// (Abdelmaola et al., Metals 14 (2024) 342: a laser impact weld of 0.127 mm Ti on Cu at about
/// 900 m/s, head-on at the weld centre, left the centre unwelded). Only the 1-D impact state is
/// computed.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct HeadOn {
    /// Impact velocity Vp (normal to both plates: every convention agrees), m/s.
    pub impact_velocity_m_s: f64,
    /// The 1-D impact state at Vp.
    pub impact: ImpactState,
    /// Inputs no practitioner would type.
    pub warnings: Vec<String>,
}

/// The source of the head-on verdict.
pub const HEAD_ON_SOURCE: &str = "Abdelmaola et al., Metals 14 (2024) 342: a laser impact weld of 0.127 mm Ti on Cu at about 900 m/s, head-on at the weld centre, left the centre unwelded";

/// The verdict of a head-on impact in words.
pub const HEAD_ON_REASON: &str = "not welded: head-on impact, no collision point sweeps the interface, so no jet forms and the surfaces are not cleaned";

/// Classify a head-on impact at impact velocity `vp` (m/s): always [`Prediction::HeadOn`].
///
/// # Errors
/// [`PhysicsError`] when the impact state cannot be computed (a non-positive velocity).
pub fn classify_head_on(
    window: &PairWindow,
    setup: &PairSetup,
    vp: f64,
) -> Result<HeadOn, PhysicsError> {
    let impact = impedance_match(
        &setup.flyer.hugoniot,
        &setup.parent.hugoniot,
        Velocity::from_m_s(vp),
    )?;
    let mut warnings = Vec::new();
    let probe = Collision::from_impact(
        window.convention,
        Velocity::from_m_s(vp),
        Angle::from_degrees(45.0),
    );
    if let Ok(col) = probe {
        warnings.extend(
            plausibility_warnings(window, &col)
                .into_iter()
                .filter(|w| !w.starts_with("collision-point velocity")),
        );
    }
    Ok(HeadOn {
        impact_velocity_m_s: vp,
        impact,
        warnings,
    })
}

#[cfg(test)]
#[path = "classify_tests.rs"]
mod tests;

#[cfg(test)]
#[path = "classify_headroom_tests.rs"]
mod headroom_tests;
