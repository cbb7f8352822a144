//! User-entered window boundaries: polylines in the (velocity, angle) plane with the side that
//! welds. A boundary is only used over the velocity (or angle) range its points span; outside it
//! the point is flagged as outside the trial data instead of being extrapolated.

use oblique_core::units::{Angle, Velocity};
use serde::Serialize;

/// Which velocity is on the horizontal axis.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Plane {
    /// Collision angle against impact velocity Vp.
    AngleImpactVelocity,
    /// Collision angle against collision-point velocity Vc.
    AngleCollisionVelocity,
}

impl Plane {
    /// The name used in files and flags.
    pub fn as_str(self) -> &'static str {
        match self {
            Plane::AngleImpactVelocity => "angle-impact-velocity",
            Plane::AngleCollisionVelocity => "angle-collision-velocity",
        }
    }

    /// Parse a file or flag value.
    pub fn parse(s: &str) -> Option<Self> {
        match s {
            "angle-impact-velocity" | "angle-velocity" => Some(Plane::AngleImpactVelocity),
            "angle-collision-velocity" => Some(Plane::AngleCollisionVelocity),
            _ => None,
        }
    }
}

/// The side of the polyline on which welds are expected.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum WeldSide {
    /// At larger angles than the line (a lower angle limit); points run in increasing velocity.
    Above,
    /// At smaller angles than the line (an upper angle limit); points run in increasing velocity.
    Below,
    /// At lower velocities than the line (an upper velocity limit); points run in increasing angle.
    Left,
    /// At higher velocities than the line (a lower velocity limit); points run in increasing angle.
    Right,
}

impl WeldSide {
    /// The name used in files.
    pub fn as_str(self) -> &'static str {
        match self {
            WeldSide::Above => "above",
            WeldSide::Below => "below",
            WeldSide::Left => "left",
            WeldSide::Right => "right",
        }
    }

    /// Parse a file value.
    pub fn parse(s: &str) -> Option<Self> {
        match s {
            "above" => Some(WeldSide::Above),
            "below" => Some(WeldSide::Below),
            "left" => Some(WeldSide::Left),
            "right" => Some(WeldSide::Right),
            _ => None,
        }
    }

    /// Whether the line is a function of velocity (above/below) rather than of angle.
    pub fn along_velocity(self) -> bool {
        matches!(self, WeldSide::Above | WeldSide::Below)
    }

    /// Whether failing this boundary means "too fast" (a velocity ceiling).
    pub fn is_velocity_ceiling(self) -> bool {
        self == WeldSide::Left
    }
}

/// A validated boundary.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Boundary {
    /// Label shown on plots and in reports.
    pub label: String,
    /// The plane its points live in.
    pub plane: Plane,
    /// The side that welds.
    pub weld_side: WeldSide,
    /// Points (velocity, angle), sorted along the independent axis.
    pub points: Vec<(Velocity, Angle)>,
    /// Where the line comes from.
    pub provenance: String,
}

/// A boundary evaluated at one point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BoundaryResult {
    /// The boundary's label.
    pub label: String,
    /// The line's value at the point (deg for above/below, m/s for left/right); `None` out of range.
    pub limit: Option<f64>,
    /// Signed margin, positive on the welding side; `None` out of range.
    pub margin: Option<f64>,
    /// Unit of limit and margin.
    pub unit: &'static str,
    /// Whether the point is on the welding side; `None` out of range.
    pub satisfied: Option<bool>,
    /// Whether the point lies within the span of the boundary's points.
    pub in_range: bool,
}

impl BoundaryResult {
    /// Margin relative to the limit, for ranking against the model criteria.
    pub fn relative_margin(&self) -> Option<f64> {
        self.margin
            .map(|m| oblique_core::criteria::relative_margin(m, self.limit.unwrap_or(0.0)))
    }
}

/// Linear interpolation of y at x along sorted (x, y) points; `None` outside the span. The
/// weld map's classifier uses it too, so that both give the same bits.
#[inline]
pub fn interpolate(points: &[(f64, f64)], x: f64) -> Option<f64> {
    let first = points.first()?;
    let last = points.last()?;
    if !(x >= first.0 && x <= last.0) {
        return None;
    }
    let k = points
        .partition_point(|p| p.0 < x)
        .max(1)
        .min(points.len() - 1);
    let (x0, y0) = points[k - 1];
    let (x1, y1) = points[k];
    if x1 == x0 {
        return Some(y0);
    }
    Some(y0 + (y1 - y0) * (x - x0) / (x1 - x0))
}

impl Boundary {
    /// Evaluate at impact velocity `vp` / collision velocity `vc` and angle `beta`.
    pub fn evaluate(&self, vp: Velocity, vc: Velocity, beta: Angle) -> BoundaryResult {
        let v = match self.plane {
            Plane::AngleImpactVelocity => vp.si(),
            Plane::AngleCollisionVelocity => vc.si(),
        };
        let deg = beta.degrees();
        let (limit, margin, unit) = if self.weld_side.along_velocity() {
            let pts: Vec<(f64, f64)> = self
                .points
                .iter()
                .map(|(x, a)| (x.si(), a.degrees()))
                .collect();
            let lim = interpolate(&pts, v);
            let m = lim.map(|l| {
                if self.weld_side == WeldSide::Above {
                    deg - l
                } else {
                    l - deg
                }
            });
            (lim, m, "deg")
        } else {
            let pts: Vec<(f64, f64)> = self
                .points
                .iter()
                .map(|(x, a)| (a.degrees(), x.si()))
                .collect();
            let lim = interpolate(&pts, deg);
            let m = lim.map(|l| {
                if self.weld_side == WeldSide::Right {
                    v - l
                } else {
                    l - v
                }
            });
            (lim, m, "m/s")
        };
        BoundaryResult {
            label: self.label.clone(),
            limit,
            margin,
            unit,
            satisfied: margin.map(|m| m >= 0.0),
            in_range: margin.is_some(),
        }
    }
}

/// Whether segments p1-p2 and p3-p4 intersect (proper or touching), excluding shared endpoints
/// of neighbouring segments, which the caller skips.
pub(crate) fn segments_cross(
    p1: (f64, f64),
    p2: (f64, f64),
    p3: (f64, f64),
    p4: (f64, f64),
) -> bool {
    fn orient(a: (f64, f64), b: (f64, f64), c: (f64, f64)) -> f64 {
        (b.0 - a.0) * (c.1 - a.1) - (b.1 - a.1) * (c.0 - a.0)
    }
    fn on_segment(a: (f64, f64), b: (f64, f64), c: (f64, f64)) -> bool {
        c.0 >= a.0.min(b.0) && c.0 <= a.0.max(b.0) && c.1 >= a.1.min(b.1) && c.1 <= a.1.max(b.1)
    }
    let d1 = orient(p3, p4, p1);
    let d2 = orient(p3, p4, p2);
    let d3 = orient(p1, p2, p3);
    let d4 = orient(p1, p2, p4);
    if ((d1 > 0.0 && d2 < 0.0) || (d1 < 0.0 && d2 > 0.0))
        && ((d3 > 0.0 && d4 < 0.0) || (d3 < 0.0 && d4 > 0.0))
    {
        return true;
    }
    (d1 == 0.0 && on_segment(p3, p4, p1))
        || (d2 == 0.0 && on_segment(p3, p4, p2))
        || (d3 == 0.0 && on_segment(p1, p2, p3))
        || (d4 == 0.0 && on_segment(p1, p2, p4))
}

/// The first pair of non-adjacent segments that cross, as segment indices.
pub(crate) fn self_crossing(points: &[(f64, f64)]) -> Option<(usize, usize)> {
    let n = points.len();
    for i in 0..n.saturating_sub(1) {
        for j in (i + 2)..n.saturating_sub(1) {
            if segments_cross(points[i], points[i + 1], points[j], points[j + 1]) {
                return Some((i, j));
            }
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    fn b(side: WeldSide, pts: &[(f64, f64)]) -> Boundary {
        Boundary {
            label: "t".into(),
            plane: Plane::AngleImpactVelocity,
            weld_side: side,
            points: pts
                .iter()
                .map(|&(v, a)| (Velocity::from_m_s(v), Angle::from_degrees(a)))
                .collect(),
            provenance: "test".into(),
        }
    }

    #[test]
    fn above_line_margin_in_degrees() {
        let line = b(WeldSide::Above, &[(200.0, 10.0), (400.0, 6.0)]);
        let r = line.evaluate(
            Velocity::from_m_s(300.0),
            Velocity::from_m_s(0.0),
            Angle::from_degrees(9.0),
        );
        assert!(r.in_range);
        assert!((r.limit.unwrap() - 8.0).abs() < 1e-9);
        assert!((r.margin.unwrap() - 1.0).abs() < 1e-9);
        assert_eq!(r.satisfied, Some(true));
    }

    #[test]
    fn outside_the_span_is_not_extrapolated() {
        let line = b(WeldSide::Above, &[(200.0, 10.0), (400.0, 6.0)]);
        let r = line.evaluate(
            Velocity::from_m_s(500.0),
            Velocity::from_m_s(0.0),
            Angle::from_degrees(9.0),
        );
        assert!(!r.in_range);
        assert_eq!(r.margin, None);
        assert_eq!(r.satisfied, None);
    }

    #[test]
    fn left_line_margin_in_velocity() {
        let line = b(WeldSide::Left, &[(600.0, 5.0), (500.0, 20.0)]);
        let r = line.evaluate(
            Velocity::from_m_s(520.0),
            Velocity::from_m_s(0.0),
            Angle::from_degrees(12.5),
        );
        assert!((r.limit.unwrap() - 550.0).abs() < 1e-9);
        assert!((r.margin.unwrap() - 30.0).abs() < 1e-9);
    }

    #[test]
    fn detects_self_crossing() {
        let zigzag = [(0.0, 0.0), (2.0, 2.0), (2.0, 0.0), (0.0, 2.0)];
        assert_eq!(self_crossing(&zigzag), Some((0, 2)));
        assert_eq!(self_crossing(&[(0.0, 0.0), (1.0, 1.0), (2.0, 0.5)]), None);
    }
}
