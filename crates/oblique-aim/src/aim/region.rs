//! The region of points that keep at least a given weld probability: the sampled probability
//! (`oblique_confidence::probability_grid`, every node with the same draws) on a grid over the
//! part of the validity domain where the window lies, and, per angle of the grid, the stretches
//! of impact velocity at or above the level (their ends interpolated linearly between nodes).

use super::AimRequest;
use crate::error::AimResult;
use oblique_confidence::{probability_grid, ProbabilityGrid, Sampling, Scatter};
use oblique_window::boundary::Plane;
use oblique_window::PairWindow;

/// Nodes per axis of the region's grid.
pub const REGION_NODES: usize = 24;
/// Draws per node of the region's grid unless given.
pub const REGION_SAMPLES: usize = 256;

/// Where the weld probability is at least the level.
#[derive(Debug, Clone)]
pub struct Region {
    /// The level (0 to 1).
    pub level: f64,
    /// The probability grid (impact velocity in the window's convention, angle in deg).
    pub grid: ProbabilityGrid,
    /// Per angle of the grid (deg): the stretches of impact velocity (m/s) at or above the
    /// level.
    pub rows: Vec<(f64, Vec<(f64, f64)>)>,
}

impl Region {
    /// True when no node reaches the level.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.rows.iter().all(|r| r.1.is_empty())
    }

    /// The extent of the region: (lowest, highest velocity), (lowest, highest angle).
    #[must_use]
    pub fn extent(&self) -> Option<((f64, f64), (f64, f64))> {
        let mut v = (f64::INFINITY, f64::NEG_INFINITY);
        let mut a = (f64::INFINITY, f64::NEG_INFINITY);
        for (b, s) in &self.rows {
            for (lo, hi) in s {
                v = (v.0.min(*lo), v.1.max(*hi));
                a = (a.0.min(*b), a.1.max(*b));
            }
        }
        v.0.is_finite().then_some((v, a))
    }
}

/// The stretches of one row at or above `level`. A NaN node is left out (no claim there): a
/// stretch ends at the last node before it, without interpolation.
fn stretches(xs: &[f64], p: &[f64], level: f64) -> Vec<(f64, f64)> {
    let mut out = Vec::new();
    let cross = |i: usize| {
        // Between node i and i+1, linear; next to a node left out, the node kept.
        let (a, b) = (p[i], p[i + 1]);
        if a.is_nan() {
            return xs[i + 1];
        }
        if b.is_nan() {
            return xs[i];
        }
        let t = if (b - a).abs() > 0.0 {
            (level - a) / (b - a)
        } else {
            0.5
        };
        xs[i] + t.clamp(0.0, 1.0) * (xs[i + 1] - xs[i])
    };
    let mut start: Option<f64> = None;
    for (i, pi) in p.iter().enumerate().take(xs.len()) {
        let on = *pi >= level;
        match (on, start) {
            (true, None) => start = Some(if i == 0 { xs[0] } else { cross(i - 1) }),
            (false, Some(s)) => {
                out.push((s, cross(i - 1)));
                start = None;
            }
            _ => {}
        }
    }
    if let Some(s) = start {
        out.push((s, xs[xs.len() - 1]));
    }
    out
}

/// The region of `window` over the bounding box of the nodes found inside (`inside`: velocity,
/// angle, measure), widened a little.
pub(super) fn region(
    window: &PairWindow,
    inside: &[(f64, f64, Vec<f64>)],
    scatter: &Scatter,
    req: &AimRequest<'_>,
) -> AimResult<Region> {
    let (mut vlo, mut vhi, mut blo, mut bhi) = (
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    );
    for &(v, b, _) in inside.iter() {
        vlo = vlo.min(v);
        vhi = vhi.max(v);
        blo = blo.min(b);
        bhi = bhi.max(b);
    }
    let (vlo, vhi) = (vlo / 1.08, vhi * 1.08);
    let top = window
        .domain
        .bound(oblique_core::DomainQuantity::CollisionAngle)
        .map_or(89.0, |b| b.max.min(89.0));
    let (blo, bhi) = ((blo - 0.5).max(0.25), (bhi + 0.5).min(top));
    let n = REGION_NODES - 1;
    let xs: Vec<f64> = (0..=n)
        .map(|i| vlo * (vhi / vlo).powf(i as f64 / n as f64))
        .collect();
    let ys: Vec<f64> = (0..=n)
        .map(|i| blo + (bhi - blo) * i as f64 / n as f64)
        .collect();
    let sampling = Sampling {
        samples: req
            .samples
            .map_or(REGION_SAMPLES, |s| s.min(REGION_SAMPLES * 8)),
        seed: req.seed,
        threads: None,
    };
    let grid = probability_grid(
        window,
        Plane::AngleImpactVelocity,
        xs,
        ys,
        scatter,
        &sampling,
    )?;
    let nx = grid.xs.len();
    // No verdict is claimed outside the validity domain, and a user boundary is not
    // extrapolated beyond its points: such nodes are left out of the region.
    let setup = window.setup()?;
    let in_domain = |v: f64, b: f64| {
        crate::measure::classify_point(window, &setup, window.convention, v, b)
            .is_ok_and(|c| c.domain.inside() && !c.outside_trial_data)
    };
    let rows = grid
        .ys_deg
        .iter()
        .enumerate()
        .map(|(j, &b)| {
            let p: Vec<f64> = (0..nx)
                .map(|i| {
                    let v = grid.values[j * nx + i];
                    if in_domain(grid.xs[i], b) {
                        v
                    } else {
                        f64::NAN
                    }
                })
                .collect();
            (b, stretches(&grid.xs, &p, req.level))
        })
        .collect();
    Ok(Region {
        level: req.level,
        grid,
        rows,
    })
}

#[cfg(test)]
mod tests {
    use super::stretches;

    #[test]
    fn stretch_ends_are_interpolated() {
        let xs = [0.0, 1.0, 2.0, 3.0, 4.0];
        let p = [0.0, 0.5, 1.0, 1.0, 0.0];
        let s = stretches(&xs, &p, 0.9);
        assert_eq!(s.len(), 1);
        assert!(
            (s[0].0 - 1.8).abs() < 1e-12 && (s[0].1 - 3.1).abs() < 1e-12,
            "{s:?}"
        );
        assert!(stretches(&xs, &[0.0; 5], 0.5).is_empty());
        assert_eq!(stretches(&xs, &[1.0; 5], 0.5), vec![(0.0, 4.0)]);
        let gap = [0.95, 0.95, f64::NAN, 0.95, 0.0];
        let s = stretches(&xs, &gap, 0.9);
        assert_eq!(s.len(), 2);
        assert_eq!(s[0], (0.0, 1.0));
        assert!(
            s[1].0 == 3.0 && (s[1].1 - (3.0 + 0.05 / 0.95)).abs() < 1e-12,
            "{s:?}"
        );
    }
}
