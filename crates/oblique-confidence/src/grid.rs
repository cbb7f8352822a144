//! The weld probability over a plane, for contour plots: every grid point evaluated with the
//! same draws (common random numbers), so the surface is smooth and its contours do not wander
//! with the sampling noise from one point to the next.

use crate::engine::Engine;
use crate::error::{ConfidenceError, ConfidenceResult};
use crate::scatter::{Point, PointVelocity, Sampling, Scatter};
use oblique_core::units::{Angle, Velocity};
use oblique_core::Collision;
use oblique_window::boundary::Plane;
use oblique_window::PairWindow;
use serde::Serialize;

/// The default number of draws per grid point of a plot (the standard error of a 50 % point is
/// then about 3 %).
pub const DEFAULT_GRID_SAMPLES: usize = 256;
/// The most grid points one evaluation may hold.
pub const MAX_GRID_POINTS: usize = 1_000_000;

/// The probability at the nodes of a grid.
#[derive(Debug, Clone, Serialize)]
pub struct ProbabilityGrid {
    /// The plane: impact velocity (in the window's convention) or collision-point velocity,
    /// against the collision angle.
    pub plane: Plane,
    /// Horizontal node values (m/s).
    pub xs: Vec<f64>,
    /// Vertical node values (deg).
    pub ys_deg: Vec<f64>,
    /// The probability at node (i, j), stored at `j * xs.len() + i`; NaN where the node is no
    /// collision (angle outside (0, 90) deg).
    pub values: Vec<f64>,
    /// Draws per node.
    pub samples: usize,
    /// Seed.
    pub seed: u64,
    /// The stated scatter (the velocity scatter applies to the impact velocity).
    pub scatter: Scatter,
}

/// The weld probability at every node of `xs` x `ys_deg` in `plane`.
///
/// # Errors
/// A setting out of range, or a grid larger than [`MAX_GRID_POINTS`].
pub fn probability_grid(
    window: &PairWindow,
    plane: Plane,
    xs: Vec<f64>,
    ys_deg: Vec<f64>,
    scatter: &Scatter,
    sampling: &Sampling,
) -> ConfidenceResult<ProbabilityGrid> {
    if xs.len() * ys_deg.len() > MAX_GRID_POINTS {
        return Err(ConfidenceError::invalid(
            "grid",
            format!(
                "{} x {} nodes is more than {MAX_GRID_POINTS}",
                xs.len(),
                ys_deg.len()
            ),
        ));
    }
    sampling.validate_for(xs.len() * ys_deg.len(), "nodes of the probability grid")?;
    let probe = Point {
        convention: window.convention,
        velocity: PointVelocity::Impact(400.0),
        angle_rad: 0.2,
    };
    let engine = Engine::new(window, &probe, scatter)?;
    let draws = engine.draws(sampling);
    let nx = xs.len();
    let mut values = vec![f64::NAN; nx * ys_deg.len()];
    let threads = sampling.thread_count().clamp(1, ys_deg.len().max(1));
    let rows_per = ys_deg.len().div_ceil(threads).max(1);
    let results: Vec<ConfidenceResult<()>> = std::thread::scope(|s| {
        let handles: Vec<_> = values
            .chunks_mut(nx * rows_per)
            .enumerate()
            .map(|(t, chunk)| {
                let (engine, draws, xs, ys) = (&engine, &draws, &xs, &ys_deg);
                s.spawn(move || -> ConfidenceResult<()> {
                    for (r, row) in chunk.chunks_mut(nx).enumerate() {
                        let y = ys[t * rows_per + r];
                        if !(y > 0.0 && y < 90.0) {
                            continue;
                        }
                        let beta = Angle::from_degrees(y);
                        for (i, slot) in row.iter_mut().enumerate() {
                            let vp = match plane {
                                Plane::AngleImpactVelocity => Some(xs[i]),
                                Plane::AngleCollisionVelocity => {
                                    Collision::from_collision_velocity(
                                        window.convention,
                                        Velocity::from_m_s(xs[i]),
                                        beta,
                                    )
                                    .ok()
                                    .map(|c| c.impact_velocity.si())
                                }
                            };
                            let Some(vp) = vp.filter(|v| *v > 0.0) else {
                                continue;
                            };
                            let point = Point {
                                convention: window.convention,
                                velocity: PointVelocity::Impact(vp),
                                angle_rad: beta.radians(),
                            };
                            *slot = engine.fraction_inside(&point, draws)?;
                        }
                    }
                    Ok(())
                })
            })
            .collect();
        handles
            .into_iter()
            .map(|h| {
                h.join().unwrap_or_else(|_| {
                    Err(oblique_core::PhysicsError::NoConvergence {
                        what: "probability grid (a worker thread stopped)",
                        iterations: 0,
                    }
                    .into())
                })
            })
            .collect()
    });
    for r in results {
        r?;
    }
    Ok(ProbabilityGrid {
        plane,
        xs,
        ys_deg,
        values,
        samples: sampling.samples,
        seed: sampling.seed,
        scatter: *scatter,
    })
}

/// The weld probability at each of `points` (each point's velocity and angle scattered as
/// stated), all with the same draws of the model, so that differences between points are not
/// sampling noise (common random numbers). Used to rank the settings of a sweep.
///
/// # Errors
/// A setting out of range, or a point the physics refuses.
pub fn probabilities(
    window: &PairWindow,
    points: &[Point],
    scatter: &Scatter,
    sampling: &Sampling,
) -> ConfidenceResult<Vec<f64>> {
    sampling.validate_for(points.len(), "points")?;
    let Some(first) = points.first() else {
        return Ok(Vec::new());
    };
    let engine = Engine::new(window, first, scatter)?;
    let draws = engine.draws(sampling);
    let mut out = vec![0.0; points.len()];
    let threads = sampling.thread_count().clamp(1, points.len());
    let per = points.len().div_ceil(threads);
    let results: Vec<ConfidenceResult<()>> = std::thread::scope(|s| {
        let handles: Vec<_> = out
            .chunks_mut(per)
            .zip(points.chunks(per))
            .map(|(slots, pts)| {
                let (engine, draws) = (&engine, &draws);
                s.spawn(move || -> ConfidenceResult<()> {
                    for (slot, p) in slots.iter_mut().zip(pts) {
                        *slot = engine.fraction_inside(p, draws)?;
                    }
                    Ok(())
                })
            })
            .collect();
        handles
            .into_iter()
            .map(|h| {
                h.join().unwrap_or_else(|_| {
                    Err(oblique_core::PhysicsError::NoConvergence {
                        what: "weld probabilities (a worker thread stopped)",
                        iterations: 0,
                    }
                    .into())
                })
            })
            .collect()
    });
    for r in results {
        r?;
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scatter::VelocitySpread;

    #[test]
    fn grid_matches_single_points_with_the_same_draws() {
        let lib = oblique_window::Library::load(&[]).expect("library");
        let w = lib.pair("demo-al6061-on-cu").expect("demo");
        let s = Scatter {
            velocity: Some(VelocitySpread::Relative(0.05)),
            angle: Some(Angle::from_degrees(1.0)),
            model: true,
        };
        let sampling = Sampling {
            samples: 300,
            seed: 9,
            threads: None,
        };
        let g = probability_grid(
            w,
            Plane::AngleImpactVelocity,
            vec![300.0, 450.0, 700.0],
            vec![3.0, 12.0],
            &s,
            &sampling,
        )
        .expect("grid");
        // The middle of the window is likely, the low-velocity corner is not.
        assert!(g.values[3 + 1] > 0.8, "{:?}", g.values);
        assert!(g.values[0] < 0.2, "{:?}", g.values);
        // The same draws give the same value one point at a time.
        let probe = Point::impact(
            w.convention,
            Velocity::from_m_s(450.0),
            Angle::from_degrees(12.0),
        );
        let e = Engine::new(w, &probe, &s).expect("engine");
        let d = e.draws(&sampling);
        assert_eq!(e.fraction_inside(&probe, &d).expect("p"), g.values[4]);
    }
}
