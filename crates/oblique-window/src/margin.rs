//! The margins, each defined once and named wherever it is printed, and the one rounding rule.
//!
//! - **velocity headroom**: how far the impact velocity can move at this collision angle before a
//!   limit is reached (m/s, and % of the point's Vp); for a limit that fails, how far it must move
//!   to meet it (a *shortfall*). The verdict's velocity headroom is that of the limit reached first.
//! - **angle headroom**: how far the collision angle can move at this impact velocity before a
//!   limit is reached (deg), or must move to meet it.
//! - **margin at this point**: a criterion's value minus its limit at the point's own
//!   collision-point velocity Vc, in the criterion's unit (positive on the welding side). Vc moves
//!   with both controls, so this margin does not say how far a control can move; the headrooms do.
//!
//! Rounding: every figure along the controls is computed once ([`crate::classify::headroom`]),
//! then rounded on its own to the safe side ([`ROUNDING_RULE`]); tables, advice and JSON all print
//! the rounded figure, so the same margin has the same digits everywhere.

use crate::classify::{limit_label, Classification, LimitRef};
use crate::PairWindow;
use serde_json::{json, Value};

/// The rounding rule, said once per output.
pub const ROUNDING_RULE: &str = "headroom figures are rounded to the safe side (velocities to 1 m/s, angles to 0.01 deg, shares to 0.1 %): a limit not yet reached is rounded towards the point, so the room shown is never more than computed; a limit still to be met is rounded past it, so the value shown meets it";

/// The definitions of the margins, (name, meaning), for reports and documentation.
pub const DEFINITIONS: [(&str, &str); 3] = [
    (
        "velocity headroom",
        "how far the impact velocity can move at this collision angle before the limit is reached (m/s and % of Vp); for a failing limit, the shortfall: how far it must move to meet the limit; the verdict's velocity headroom is that of the limit reached first",
    ),
    (
        "angle headroom",
        "how far the collision angle can move at this impact velocity before the limit is reached (deg); for a failing limit, how far it must move to meet it",
    ),
    (
        "margin at this point",
        "the criterion's value minus its limit at this point's collision-point velocity Vc, in the criterion's unit, positive on the welding side; Vc moves with both controls, so this is not the room a control has",
    ),
];

fn round_to(x: f64, unit: f64, up: bool) -> f64 {
    // Divide by the inverse (10, 100): 0.01 steps land on the nearest double of the decimal.
    let inv = (1.0 / unit).round();
    // A value within the searches' tolerance of a step is that step (25.0 deg found as
    // 24.9999999 is 25.00, not 24.99).
    let k = (x * inv).round();
    if (x * inv - k).abs() < 1e-3 {
        return if k == 0.0 { 0.0 } else { k / inv };
    }
    let r = if up {
        (x * inv).ceil() / inv
    } else {
        (x * inv).floor() / inv
    };
    // No negative zero in print.
    if r == 0.0 {
        0.0
    } else {
        r
    }
}

/// Round `x` to `unit`, up or down, except that a value within the searches' tolerance of a step
/// is that step (the rounding of every margin and stretch figure).
#[must_use]
pub fn round_directed(x: f64, unit: f64, up: bool) -> f64 {
    round_to(x, unit, up)
}

/// Round `target` (where a limit is reached) to `unit`, to the safe side as seen from `from`:
/// towards `from` when the limit holds at `from` (`holds`), past the limit when it does not.
#[must_use]
pub fn round_safe(target: f64, from: f64, unit: f64, holds: bool) -> f64 {
    let above = target > from;
    // Towards the point: down when the target is above it; past the limit: up.
    round_to(target, unit, above != holds)
}

/// A change (signed) rounded to `unit` to the safe side: towards zero when the limit holds,
/// away from zero when it does not.
#[must_use]
pub fn round_change(change: f64, unit: f64, holds: bool) -> f64 {
    let away = !holds;
    round_to(change, unit, (change > 0.0) == away)
}

/// Where one limit is reached along one control, rounded by [`ROUNDING_RULE`].
#[derive(Debug, Clone, PartialEq)]
pub struct Along {
    /// The limit.
    pub limit: LimitRef,
    /// Its label (`melting-upper`, `boundary "..."`).
    pub label: String,
    /// True when the limit holds at the point.
    pub holds: bool,
    /// The control's value at the point (m/s or deg).
    pub at: f64,
    /// Where the limit is reached, rounded.
    pub reached_at: f64,
    /// Signed change from the point, rounded.
    pub change: f64,
    /// Signed change in % of the point's value (velocity only), rounded.
    pub percent: Option<f64>,
    /// The value before rounding.
    pub unrounded: f64,
    /// The figure is the edge of the validity domain (the limit's verdict changes between the
    /// point and that edge, or the search stopped there).
    pub at_domain_edge: bool,
}

/// Whether `limit` holds at the point of `c` (a limit without a result holds).
pub(crate) fn holds(c: &Classification, limit: &LimitRef) -> bool {
    match limit {
        LimitRef::Criterion(id) => c.evaluation.criterion(*id).is_none_or(|r| r.satisfied),
        LimitRef::Boundary(i) => c
            .boundaries
            .get(*i)
            .and_then(|b| b.satisfied)
            .unwrap_or(true),
    }
}

/// The velocity headroom of `limit` at the point of `c` (after `explain`): `None` when the limit
/// is not reached along the impact velocity (Vp/20 to 20 Vp).
#[must_use]
pub fn velocity_headroom(w: &PairWindow, c: &Classification, limit: &LimitRef) -> Option<Along> {
    let (_, h) = c.headroom.iter().find(|(l, _)| l == limit)?;
    let v = h.velocity_m_s?;
    let mut a = velocity_along(w, c, limit, v);
    a.at_domain_edge = h.velocity_at_domain_edge;
    Some(a)
}

/// A velocity headroom from a crossing velocity `v` (m/s, the headroom convention of `c`).
#[must_use]
pub fn velocity_along(w: &PairWindow, c: &Classification, limit: &LimitRef, v: f64) -> Along {
    let vp = c.headroom_impact_velocity();
    let ok = holds(c, limit);
    let change = v - vp;
    Along {
        limit: limit.clone(),
        label: limit_label(w, limit),
        holds: ok,
        at: vp,
        reached_at: round_safe(v, vp, 1.0, ok),
        change: round_change(change, 1.0, ok),
        percent: Some(round_change(100.0 * change / vp, 0.1, ok)),
        unrounded: v,
        at_domain_edge: false,
    }
}

/// The angle headroom of `limit` at the point of `c` (after `explain`).
#[must_use]
pub fn angle_headroom(w: &PairWindow, c: &Classification, limit: &LimitRef) -> Option<Along> {
    let (_, h) = c.headroom.iter().find(|(l, _)| l == limit)?;
    let a = h.angle_deg?;
    let beta = c.evaluation.collision.angle.degrees();
    let ok = holds(c, limit);
    Some(Along {
        limit: limit.clone(),
        label: limit_label(w, limit),
        holds: ok,
        at: beta,
        reached_at: round_safe(a, beta, 0.01, ok),
        change: round_change(a - beta, 0.01, ok),
        percent: None,
        unrounded: a,
        at_domain_edge: h.angle_at_domain_edge,
    })
}

/// The limit reached first along the impact velocity (the smallest velocity headroom of the
/// limits that hold), for a point inside the window; for a point outside, the velocity
/// headroom (shortfall) of the binding limit.
#[must_use]
pub fn verdict_velocity_headroom(w: &PairWindow, c: &Classification) -> Option<Along> {
    if c.inside {
        c.headroom
            .iter()
            .filter_map(|(l, _)| velocity_headroom(w, c, l))
            .filter(|a| a.holds)
            .min_by(|a, b| {
                (a.unrounded - a.at)
                    .abs()
                    .total_cmp(&(b.unrounded - b.at).abs())
            })
    } else {
        c.binding.as_ref().and_then(|b| velocity_headroom(w, c, b))
    }
}

impl Along {
    /// True for a velocity headroom.
    fn is_velocity(&self) -> bool {
        self.percent.is_some()
    }

    /// The figure in a table cell: `379 m/s (-71 m/s, -15.7 %)` or `8.59 deg (+0.59 deg)`.
    #[must_use]
    pub fn cell(&self) -> String {
        match self.percent {
            Some(p) => format!(
                "{:.0} m/s ({:+.0} m/s, {:+.1} %)",
                self.reached_at, self.change, p
            ),
            None => format!("{:.2} deg ({:+.2} deg)", self.reached_at, self.change),
        }
    }

    /// The margin in words, named: "velocity headroom: the impact velocity can fall by 71 m/s
    /// (15.7 %) to 379 m/s at this angle before boundary "..." is reached".
    #[must_use]
    pub fn sentence(&self) -> String {
        let edge = if self.at_domain_edge {
            " (the edge of the validity domain)"
        } else {
            ""
        };
        self.sentence_core() + edge
    }

    fn sentence_core(&self) -> String {
        let up = self.change > 0.0;
        if self.is_velocity() {
            let pct = self.percent.unwrap_or(0.0).abs();
            if self.holds {
                format!(
                    "velocity headroom: the impact velocity can {} by {:.0} m/s ({pct:.1} %) to {:.0} m/s at this angle before {} is reached",
                    if up { "rise" } else { "fall" },
                    self.change.abs(),
                    self.reached_at,
                    self.label
                )
            } else {
                format!(
                    "velocity shortfall: the impact velocity must {} by {:.0} m/s ({pct:.1} %) to {:.0} m/s at this angle to meet {}",
                    if up { "rise" } else { "fall" },
                    self.change.abs(),
                    self.reached_at,
                    self.label
                )
            }
        } else if self.holds {
            format!(
                "angle headroom: the collision angle can {} by {:.2} deg to {:.2} deg at this velocity before {} is reached",
                if up { "rise" } else { "fall" },
                self.change.abs(),
                self.reached_at,
                self.label
            )
        } else {
            format!(
                "angle shortfall: the collision angle must {} by {:.2} deg to {:.2} deg at this velocity to meet {}",
                if up { "rise" } else { "fall" },
                self.change.abs(),
                self.reached_at,
                self.label
            )
        }
    }

    /// The figures as JSON: the rounded figures (the same digits as the text) and the value
    /// before rounding.
    #[must_use]
    pub fn json(&self) -> Value {
        if self.is_velocity() {
            json!({
                "limit": self.label,
                "holds": self.holds,
                "reached_at_impact_velocity_m_s": self.reached_at,
                "headroom_m_s": self.change,
                "headroom_percent": self.percent,
                "reached_at_unrounded_m_s": crate::text::sig(self.unrounded),
                "reached_at_domain_edge": self.at_domain_edge,
            })
        } else {
            json!({
                "limit": self.label,
                "holds": self.holds,
                "reached_at_angle_deg": self.reached_at,
                "headroom_deg": self.change,
                "reached_at_unrounded_deg": crate::text::sig(self.unrounded),
                "reached_at_domain_edge": self.at_domain_edge,
            })
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rounding_is_to_the_safe_side() {
        // A limit below the point that holds: rounded up, towards the point.
        assert_eq!(round_safe(371.2, 450.0, 1.0, true), 372.0);
        // A limit above the point that holds: rounded down.
        assert_eq!(round_safe(572.9, 450.0, 1.0, true), 572.0);
        // A target above the point (failing): rounded up, past it.
        assert_eq!(round_safe(400.1, 380.0, 1.0, false), 401.0);
        // A target below the point (failing): rounded down, past it.
        assert_eq!(round_safe(511.6, 530.0, 1.0, false), 511.0);
        // Changes: towards zero when the limit holds, away when it does not.
        assert_eq!(round_change(-78.8, 1.0, true), -78.0);
        assert_eq!(round_change(122.9, 1.0, true), 122.0);
        assert_eq!(round_change(-18.4, 1.0, false), -19.0);
        assert_eq!(round_change(20.1, 1.0, false), 21.0);
        assert_eq!(round_change(-0.4, 1.0, true), 0.0);
    }
}
