//! The velocity-angle trade-off along one control: the collision angle at a fixed impact
//! velocity, or the impact velocity at a fixed angle, in steps. Every row is the classification
//! `oblique check` makes of that point ([`oblique_window::classify::classify`]): the
//! kinematics, the pressure, the jetting critical angle, each limit and its margin at the point,
//! the verdict and the binding limit; with a stated scatter, the weld probability of every row
//! with the same draws (common random numbers). Where the verdict changes between two rows, the
//! change is bisected with the same tolerance as `check`'s headroom search (1e-7 rad, 1e-3 m/s)
//! and rounded by the same rule, towards the inside: the window's entry and exit.

mod present;

use crate::error::{AimError, AimResult};
use oblique_confidence::{Point, Sampling, Scatter};
use oblique_core::units::{Angle, Velocity};
use oblique_core::{Collision, Convention};
use oblique_window::classify::{classify, limit_label, Classification, LimitRef};
use oblique_window::PairWindow;

/// The fewest steps of a trade.
pub const MIN_STEPS: usize = 2;
/// The most steps of a trade (a documented limit: every step is one classification, and the
/// table is read by a person).
pub const MAX_STEPS: usize = 2000;
/// Draws per row of the weld probability unless given (the same draws for every row).
pub const TRADE_SAMPLES: usize = 1000;

/// Which control moves.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Control {
    /// The collision angle moves (deg, from..to) at a fixed impact velocity (m/s).
    Angle {
        /// The fixed impact velocity (m/s, in the trade's convention).
        velocity: f64,
        /// First angle (deg).
        from_deg: f64,
        /// Last angle (deg).
        to_deg: f64,
    },
    /// The impact velocity moves (m/s, from..to) at a fixed collision angle (deg).
    Velocity {
        /// The fixed collision angle (deg).
        angle_deg: f64,
        /// First velocity (m/s).
        from: f64,
        /// Last velocity (m/s).
        to: f64,
    },
}

impl Control {
    /// The name of the moving control: "collision angle" or "impact velocity".
    #[must_use]
    pub fn name(&self) -> &'static str {
        match self {
            Control::Angle { .. } => "collision angle",
            Control::Velocity { .. } => "impact velocity",
        }
    }

    /// The unit of the moving control: deg or m/s.
    #[must_use]
    pub fn unit(&self) -> &'static str {
        match self {
            Control::Angle { .. } => "deg",
            Control::Velocity { .. } => "m/s",
        }
    }

    fn ends(&self) -> (f64, f64) {
        match *self {
            Control::Angle {
                from_deg, to_deg, ..
            } => (from_deg, to_deg),
            Control::Velocity { from, to, .. } => (from, to),
        }
    }

    /// (Vp in m/s, beta in deg) at control value `x`.
    #[must_use]
    pub fn point(&self, x: f64) -> (f64, f64) {
        match *self {
            Control::Angle { velocity, .. } => (velocity, x),
            Control::Velocity { angle_deg, .. } => (x, angle_deg),
        }
    }

    /// The range's flag, for messages.
    fn flag(&self) -> &'static str {
        match self {
            Control::Angle { .. } => "--angle-range",
            Control::Velocity { .. } => "--velocity-range",
        }
    }
}

/// A trade to compute.
#[derive(Debug, Clone)]
pub struct TradeRequest<'a> {
    /// The window.
    pub window: &'a PairWindow,
    /// The convention of the velocities given and shown (the window's unless the user gave
    /// another; a point in another convention is checked in the window's, same Vc and angle).
    pub convention: Convention,
    /// Which control moves, over which range.
    pub control: Control,
    /// Number of rows, [`MIN_STEPS`] to [`MAX_STEPS`].
    pub steps: usize,
    /// The stated scatter and the sampling, for the weld probability of every row.
    pub probability: Option<(Scatter, Sampling)>,
}

/// One row of a trade: the point and its classification.
#[derive(Debug, Clone)]
pub struct Row {
    /// The control's value (deg or m/s).
    pub at: f64,
    /// The impact velocity (m/s, in the trade's convention).
    pub velocity: f64,
    /// The collision angle (deg).
    pub angle_deg: f64,
    /// The classification, as `check` makes it (in the window's convention).
    pub check: Classification,
    /// The weld probability under the stated scatter, when asked for.
    pub probability: Option<f64>,
}

/// Where the verdict changes along the control: the window's entry or exit.
#[derive(Debug, Clone, PartialEq)]
pub struct Crossing {
    /// Where the change lies (unrounded; deg or m/s).
    pub unrounded: f64,
    /// Rounded towards the inside (to 0.01 deg or 1 m/s, `oblique_window::margin`).
    pub reached_at: f64,
    /// True when the point enters the window as the control rises.
    pub entering: bool,
    /// What changes there: the limit's label, or the validity domain.
    pub limit: String,
    /// The change is the edge of the validity domain.
    pub domain_edge: bool,
    /// The change is where a user boundary's span begins or ends (it is not extrapolated
    /// beyond its points): outside the span the point is inside the model limits but outside
    /// the trial data.
    pub span_edge: bool,
}

/// A trade along one control.
#[derive(Debug, Clone)]
pub struct Trade<'a> {
    /// The window.
    pub window: &'a PairWindow,
    /// The convention of the velocities.
    pub convention: Convention,
    /// The control and its range.
    pub control: Control,
    /// The rows, in the order of the control.
    pub rows: Vec<Row>,
    /// Every change of the verdict between two rows, in the order of the control.
    pub crossings: Vec<Crossing>,
    /// The stated scatter and sampling of the probabilities, if any.
    pub probability: Option<(Scatter, Sampling)>,
}

/// Check the range and the steps, naming the flags.
///
/// # Errors
/// [`AimError::Invalid`] for a range that is empty, reversed or outside the physical range, or
/// a number of steps outside [`MIN_STEPS`]..=[`MAX_STEPS`].
pub fn validate(control: &Control, steps: usize) -> AimResult {
    let (a, b) = control.ends();
    let flag = control.flag();
    if !(a.is_finite() && b.is_finite()) {
        return Err(AimError::invalid(flag, "the range's ends must be numbers"));
    }
    if a == b {
        return Err(AimError::invalid(
            flag,
            format!(
                "the range is empty ({a} to {b} {}): give two different ends, the smaller first",
                control.unit()
            ),
        ));
    }
    if a > b {
        return Err(AimError::invalid(
            flag,
            format!(
                "the range is reversed ({a} to {b} {}): give the smaller end first",
                control.unit()
            ),
        ));
    }
    match control {
        Control::Angle { .. } if !(a > 0.0 && b < 90.0) => {
            return Err(AimError::invalid(
                flag,
                format!("{a} to {b} deg leaves (0, 90) deg: every angle of a trade must be an oblique collision"),
            ))
        }
        Control::Velocity { .. } if !(a > 0.0) => {
            return Err(AimError::invalid(flag, "velocities must be above zero"))
        }
        _ => {}
    }
    if !(MIN_STEPS..=MAX_STEPS).contains(&steps) {
        return Err(AimError::invalid(
            "--steps",
            format!(
                "{steps} is outside {MIN_STEPS} to {MAX_STEPS} (the most rows one trade computes)"
            ),
        ));
    }
    Ok(())
}

/// Classify the point at control value `x` as `check` does.
fn classify_at(
    window: &PairWindow,
    setup: &oblique_core::PairSetup,
    convention: Convention,
    control: &Control,
    x: f64,
) -> AimResult<Classification> {
    let (v, deg) = control.point(x);
    let col = Collision::from_impact(convention, Velocity::from_m_s(v), Angle::from_degrees(deg))?;
    Ok(classify(window, setup, &col)?)
}

/// The trade: every row classified, the probabilities with the same draws, the verdict's
/// changes bisected.
///
/// # Errors
/// A range or step count out of bounds (naming its flag), a scatter out of range, or a point
/// the physics refuses.
pub fn trade<'a>(req: &TradeRequest<'a>) -> AimResult<Trade<'a>> {
    validate(&req.control, req.steps)?;
    let w = req.window;
    let setup = w.setup()?;
    let (a, b) = req.control.ends();
    let n = req.steps - 1;
    let mut rows = Vec::with_capacity(req.steps);
    for i in 0..=n {
        let x = if i == n {
            b
        } else {
            a + (b - a) * i as f64 / n as f64
        };
        let (velocity, angle_deg) = req.control.point(x);
        let check = classify_at(w, &setup, req.convention, &req.control, x)?;
        rows.push(Row {
            at: x,
            velocity,
            angle_deg,
            check,
            probability: None,
        });
    }
    if let Some((scatter, sampling)) = &req.probability {
        let points: Vec<Point> = rows
            .iter()
            .map(|r| {
                Point::impact(
                    req.convention,
                    Velocity::from_m_s(r.velocity),
                    Angle::from_degrees(r.angle_deg),
                )
            })
            .collect();
        let p = oblique_confidence::probabilities(w, &points, scatter, sampling)?;
        for (r, pk) in rows.iter_mut().zip(p) {
            r.probability = Some(pk);
        }
    }
    let mut crossings = Vec::new();
    for k in 1..rows.len() {
        let (r0, r1) = (&rows[k - 1], &rows[k]);
        if r0.check.inside != r1.check.inside {
            crossings.push(bisect(w, &setup, req, r0, r1)?);
        }
    }
    Ok(Trade {
        window: w,
        convention: req.convention,
        control: req.control,
        rows,
        crossings,
        probability: req.probability,
    })
}

/// The change of the verdict between two rows: bisected to the headroom search's tolerance,
/// named by the limit (or the domain bound) that changes, rounded towards the inside.
fn bisect(
    w: &PairWindow,
    setup: &oblique_core::PairSetup,
    req: &TradeRequest<'_>,
    r0: &Row,
    r1: &Row,
) -> AimResult<Crossing> {
    let tol = match req.control {
        Control::Angle { .. } => 1e-7f64.to_degrees(),
        Control::Velocity { .. } => 1e-3,
    };
    // in_x: inside, out_x: outside.
    let entering = r1.check.inside;
    let (mut in_x, mut out_x) = if entering {
        (r1.at, r0.at)
    } else {
        (r0.at, r1.at)
    };
    let mut in_c = if entering {
        r1.check.clone()
    } else {
        r0.check.clone()
    };
    let mut out_c = if entering {
        r0.check.clone()
    } else {
        r1.check.clone()
    };
    for _ in 0..200 {
        if (in_x - out_x).abs() <= tol {
            break;
        }
        let m = 0.5 * (in_x + out_x);
        let c = classify_at(w, setup, req.convention, &req.control, m)?;
        if c.inside {
            in_x = m;
            in_c = c;
        } else {
            out_x = m;
            out_c = c;
        }
    }
    let x = 0.5 * (in_x + out_x);
    let mut span_edge = false;
    let (limit, domain_edge) = if in_c.domain.inside() && !out_c.domain.inside() {
        let what = out_c
            .domain
            .exits
            .first()
            .map_or_else(String::new, |e| format!(" ({})", e.quantity.label()));
        (format!("the edge of the validity domain{what}"), true)
    } else {
        let flipped: Option<&LimitRef> = out_c.failing.iter().find(|l| !in_c.failing.contains(l));
        if let Some(LimitRef::Boundary(i)) = flipped {
            span_edge = in_c.boundaries.get(*i).is_some_and(|b| !b.in_range);
        }
        (
            flipped.or(out_c.binding.as_ref()).map_or_else(
                || "the trial data's span".to_string(),
                |l| limit_label(w, l),
            ),
            false,
        )
    };
    let unit = match req.control {
        Control::Angle { .. } => 0.01,
        Control::Velocity { .. } => 1.0,
    };
    Ok(Crossing {
        unrounded: x,
        reached_at: oblique_window::margin::round_safe(x, in_x + (in_x - out_x), unit, true),
        entering,
        limit,
        domain_edge,
        span_edge,
    })
}

impl Trade<'_> {
    /// The stretches of the control inside the window, as (entry, exit) pairs rounded towards
    /// the inside; an end of the range stands in where the window reaches past it (`None`).
    #[must_use]
    pub fn inside_stretches(&self) -> Vec<(Option<f64>, Option<f64>)> {
        let mut out = Vec::new();
        let mut open: Option<Option<f64>> =
            self.rows.first().filter(|r| r.check.inside).map(|_| None);
        for c in &self.crossings {
            if c.entering {
                open = Some(Some(c.reached_at));
            } else if let Some(start) = open.take() {
                out.push((start, Some(c.reached_at)));
            }
        }
        if let Some(start) = open {
            out.push((start, None));
        }
        out
    }
}

#[cfg(test)]
mod tests;
