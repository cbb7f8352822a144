//! Where the pair's trials are: the region of the (impact velocity, collision angle) plane their
//! shots cover, and the trials nearest to a point.
//!
//! **Coverage.** Each trial is widened by its uncertainty (its own `velocity_uncertainty` and
//! `angle_uncertainty`, else [`DEFAULT_VELOCITY_SPREAD`] of its velocity and
//! [`DEFAULT_ANGLE_SPREAD_DEG`]; both common practice), the four corners of that cross are
//! taken, and the convex hull of all of them, in the plane scaled by the [`Scales`], is the
//! region the trials cover. A point outside it is *outside the trial data*: no shot was fired
//! at a velocity and angle like it, so the window there rests on the model and the boundaries
//! alone. Whatever the limits say, that is said with the verdict.
//!
//! **Distance.** The nearest trials are measured in the same scaled plane: one unit is
//! [`Scales::velocity_m_s`] along the velocity and [`Scales::angle_deg`] along the angle (the
//! trials' typical uncertainties), so that 20 m/s and 1 deg weigh alike for a series measured
//! to about 20 m/s and 1 deg.

use crate::pair::{Observation, PairWindow};
use oblique_core::Convention;
use serde::Serialize;

/// A trial's velocity uncertainty when it gives none: 5 % of its velocity (common practice:
/// photon Doppler velocimetry of a tube or sheet in a magnetic pulse set-up is good to a few per
/// cent; estimated velocities are worse).
pub const DEFAULT_VELOCITY_SPREAD: f64 = 0.05;
/// A trial's angle uncertainty when it gives none, deg (common practice: an angle read from a
/// section or a simulation to about a degree).
pub const DEFAULT_ANGLE_SPREAD_DEG: f64 = 1.0;

/// The units of the scaled plane.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Scales {
    /// One unit along the impact velocity, m/s: the median of the trials' velocity
    /// uncertainties.
    pub velocity_m_s: f64,
    /// One unit along the collision angle, deg: the median of their angle uncertainties.
    pub angle_deg: f64,
}

/// One trial near a point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct NearTrial {
    /// Index in the pair file's observation list (0-based; shot numbers are index + 1).
    pub index: usize,
    /// Its impact velocity, m/s (the pair's convention).
    pub velocity_m_s: f64,
    /// Its collision angle, deg.
    pub angle_deg: f64,
    /// What the section showed.
    pub outcome: &'static str,
    /// Distance from the point in the scaled plane (units of [`Scales`]).
    pub distance: f64,
    /// Where the shot is recorded.
    pub source: String,
}

/// The region the trials cover and their scales.
#[derive(Debug, Clone, PartialEq)]
pub struct Coverage {
    /// The scales of the plane.
    pub scales: Scales,
    /// The hull's corners in the scaled plane, counter-clockwise (fewer than three: the trials
    /// span no area, and only points on their segment or at their point are covered).
    hull: Vec<(f64, f64)>,
    /// The trials' ranges, m/s and deg (widened), for messages.
    pub velocity_range_m_s: (f64, f64),
    /// As above, deg.
    pub angle_range_deg: (f64, f64),
}

fn uncertainties(o: &Observation) -> (f64, f64) {
    let uv = o
        .velocity_uncertainty
        .map_or(DEFAULT_VELOCITY_SPREAD * o.velocity.si(), |u| u.si());
    let ua = o
        .angle_uncertainty
        .map_or(DEFAULT_ANGLE_SPREAD_DEG, |a| a.degrees());
    (uv.max(1e-9), ua.max(1e-9))
}

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

fn cross(o: (f64, f64), a: (f64, f64), b: (f64, f64)) -> f64 {
    (a.0 - o.0) * (b.1 - o.1) - (a.1 - o.1) * (b.0 - o.0)
}

/// Andrew's monotone chain: the convex hull, counter-clockwise, without collinear points.
fn hull(mut pts: Vec<(f64, f64)>) -> Vec<(f64, f64)> {
    pts.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
    pts.dedup();
    if pts.len() < 3 {
        return pts;
    }
    let mut lower: Vec<(f64, f64)> = Vec::new();
    for &p in &pts {
        while lower.len() >= 2 && cross(lower[lower.len() - 2], lower[lower.len() - 1], p) <= 0.0 {
            lower.pop();
        }
        lower.push(p);
    }
    let mut upper: Vec<(f64, f64)> = Vec::new();
    for &p in pts.iter().rev() {
        while upper.len() >= 2 && cross(upper[upper.len() - 2], upper[upper.len() - 1], p) <= 0.0 {
            upper.pop();
        }
        upper.push(p);
    }
    lower.pop();
    upper.pop();
    lower.extend(upper);
    lower
}

impl Coverage {
    /// The coverage of the window's trials (`None` without trials).
    #[must_use]
    pub fn of(window: &PairWindow) -> Option<Coverage> {
        let obs = &window.observations;
        if obs.is_empty() {
            return None;
        }
        let scales = Scales {
            velocity_m_s: median(obs.iter().map(|o| uncertainties(o).0).collect()),
            angle_deg: median(obs.iter().map(|o| uncertainties(o).1).collect()),
        };
        let mut pts = Vec::with_capacity(4 * obs.len());
        let (mut vr, mut ar) = ((f64::INFINITY, 0.0f64), (f64::INFINITY, 0.0f64));
        for o in obs {
            let (uv, ua) = uncertainties(o);
            let (v, a) = (o.velocity.si(), o.angle.degrees());
            for (dv, da) in [(-uv, 0.0), (uv, 0.0), (0.0, -ua), (0.0, ua)] {
                pts.push(((v + dv) / scales.velocity_m_s, (a + da) / scales.angle_deg));
            }
            vr = (vr.0.min(v - uv), vr.1.max(v + uv));
            ar = (ar.0.min(a - ua), ar.1.max(a + ua));
        }
        Some(Coverage {
            scales,
            hull: hull(pts),
            velocity_range_m_s: (vr.0.max(0.0), vr.1),
            angle_range_deg: (ar.0.max(0.0), ar.1),
        })
    }

    /// Whether the point (impact velocity in the pair's convention, m/s; angle, deg) lies in
    /// the region the trials cover.
    #[must_use]
    pub fn contains(&self, velocity_m_s: f64, angle_deg: f64) -> bool {
        let p = (
            velocity_m_s / self.scales.velocity_m_s,
            angle_deg / self.scales.angle_deg,
        );
        let h = &self.hull;
        match h.len() {
            0 => false,
            1 => (h[0].0 - p.0).hypot(h[0].1 - p.1) <= 1e-9,
            2 => {
                let d = cross(h[0], h[1], p).abs();
                let len = (h[1].0 - h[0].0).hypot(h[1].1 - h[0].1);
                let t = ((p.0 - h[0].0) * (h[1].0 - h[0].0) + (p.1 - h[0].1) * (h[1].1 - h[0].1))
                    / (len * len);
                d <= 1e-9 * len.max(1.0) && (0.0..=1.0).contains(&t)
            }
            n => (0..n).all(|i| cross(h[i], h[(i + 1) % n], p) >= -1e-12),
        }
    }

    /// The `k` trials nearest to the point (impact velocity in the pair's convention, m/s;
    /// angle, deg), nearest first.
    #[must_use]
    pub fn nearest(
        &self,
        window: &PairWindow,
        velocity_m_s: f64,
        angle_deg: f64,
        k: usize,
    ) -> Vec<NearTrial> {
        let mut near: Vec<NearTrial> = window
            .observations
            .iter()
            .map(|o| {
                let dv = (o.velocity.si() - velocity_m_s) / self.scales.velocity_m_s;
                let da = (o.angle.degrees() - angle_deg) / self.scales.angle_deg;
                NearTrial {
                    index: o.index,
                    velocity_m_s: o.velocity.si(),
                    angle_deg: o.angle.degrees(),
                    outcome: o.outcome.as_str(),
                    distance: dv.hypot(da),
                    source: o.source.clone(),
                }
            })
            .collect();
        near.sort_by(|a, b| {
            a.distance
                .total_cmp(&b.distance)
                .then(a.index.cmp(&b.index))
        });
        near.truncate(k);
        near
    }
}

/// What the trials say near a classified point: whether it lies in the region they cover and
/// the nearest ones (the point taken in the pair's convention).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TrialsNear {
    /// The point lies outside the region the trials cover.
    pub beyond_trials: bool,
    /// The trials nearest to it, nearest first (at most [`NEAREST_SHOWN`]).
    pub nearest: Vec<NearTrial>,
    /// The scales of the distance.
    pub scales: Scales,
    /// The trials' velocity range (widened), m/s.
    pub velocity_range_m_s: (f64, f64),
    /// The trials' angle range (widened), deg.
    pub angle_range_deg: (f64, f64),
}

/// How many nearest trials are listed.
pub const NEAREST_SHOWN: usize = 3;

/// The trials near the point `(vp, angle)` given in `convention` (`None` without trials).
#[must_use]
pub fn trials_near(
    window: &PairWindow,
    vp: f64,
    angle_deg: f64,
    convention: Convention,
) -> Option<TrialsNear> {
    let cov = Coverage::of(window)?;
    let v = if convention == window.convention {
        vp
    } else {
        oblique_core::Collision::from_impact(
            convention,
            oblique_core::units::Velocity::from_m_s(vp),
            oblique_core::units::Angle::from_degrees(angle_deg),
        )
        .ok()?
        .with_convention(window.convention)
        .impact_velocity
        .si()
    };
    Some(TrialsNear {
        beyond_trials: !cov.contains(v, angle_deg),
        nearest: cov.nearest(window, v, angle_deg, NEAREST_SHOWN),
        scales: cov.scales,
        velocity_range_m_s: cov.velocity_range_m_s,
        angle_range_deg: cov.angle_range_deg,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn demo() -> PairWindow {
        crate::Library::load(&[])
            .expect("library")
            .pair("demo-al6061-on-cu")
            .expect("demo")
            .clone()
    }

    #[test]
    fn the_hull_covers_every_trial_and_not_far_beyond() {
        let w = demo();
        let cov = Coverage::of(&w).expect("trials");
        for o in &w.observations {
            assert!(
                cov.contains(o.velocity.si(), o.angle.degrees()),
                "trial {}",
                o.index
            );
        }
        // Every demo trial lies between 3 and 27 deg: 45 deg is beyond them, as is 1500 m/s.
        assert!(!cov.contains(450.0, 45.0));
        assert!(!cov.contains(1500.0, 10.0));
        assert!(cov.contains(450.0, 12.0));
    }

    #[test]
    fn a_point_beyond_narrow_trials_is_outside_the_trial_data() {
        // Issue 17: every trial between 7 and 14 deg, a point at 25 deg was not "outside the
        // trial data".
        let mut w = demo();
        w.observations
            .retain(|o| (7.0..=14.0).contains(&o.angle.degrees()));
        let t = trials_near(&w, 450.0, 25.0, w.convention).expect("trials");
        assert!(t.beyond_trials);
        let t = trials_near(&w, 450.0, 11.0, w.convention).expect("trials");
        assert!(!t.beyond_trials);
        assert_eq!(t.nearest.len(), NEAREST_SHOWN);
        assert!(t.nearest.windows(2).all(|p| p[0].distance <= p[1].distance));
    }

    #[test]
    fn hull_of_a_square_and_a_segment() {
        let h = hull(vec![
            (0.0, 0.0),
            (1.0, 0.0),
            (1.0, 1.0),
            (0.0, 1.0),
            (0.5, 0.5),
        ]);
        assert_eq!(h.len(), 4);
        let h = hull(vec![(0.0, 0.0), (1.0, 1.0), (2.0, 2.0)]);
        assert_eq!(h.len(), 2);
    }
}
