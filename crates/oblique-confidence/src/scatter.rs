//! What the user states about the point and its scatter, and how many samples to draw.

use crate::error::{ConfidenceError, ConfidenceResult};
use oblique_core::units::{Angle, Velocity};
use oblique_core::{Collision, Convention, PhysicsError};
use serde::Serialize;
use std::num::NonZeroUsize;

/// The most samples one evaluation may draw (about 2 s at one point on two cores).
pub const MAX_SAMPLES: usize = 10_000_000;
/// The most point evaluations one request may make (points times samples): 200 million, about
/// a minute on two cores. A probability grid of 200 x 200 nodes may then draw up to 5000 samples
/// a node; a sweep of 2000 settings up to 100 000 a setting.
pub const MAX_EVALUATIONS: usize = 200_000_000;
/// The largest relative velocity scatter accepted (50 %: beyond it a normal distribution puts
/// visible weight on negative velocities).
pub const MAX_RELATIVE_VELOCITY_SD: f64 = 0.5;
/// The largest absolute velocity scatter accepted (m/s).
pub const MAX_ABSOLUTE_VELOCITY_SD_M_S: f64 = 10_000.0;
/// The largest angle scatter accepted (deg).
pub const MAX_ANGLE_SD_DEG: f64 = 30.0;
/// The default number of samples at one point.
pub const DEFAULT_SAMPLES: usize = 100_000;
/// The default seed: results are reproducible unless the user asks for another seed.
pub const DEFAULT_SEED: u64 = 1;

/// The velocity's standard deviation.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", content = "value", rename_all = "snake_case")]
pub enum VelocitySpread {
    /// A fraction of the velocity (0.05 for 5 %).
    Relative(f64),
    /// An absolute value (m/s).
    Absolute(f64),
}

impl VelocitySpread {
    /// The standard deviation (m/s) at velocity `v` (m/s).
    #[inline]
    pub fn at(self, v: f64) -> f64 {
        match self {
            VelocitySpread::Relative(r) => r * v,
            VelocitySpread::Absolute(a) => a,
        }
    }

    /// As written for people: `5 %` or `20 m/s`.
    pub fn text(self) -> String {
        match self {
            VelocitySpread::Relative(r) => format!("{} %", crate::present::num(100.0 * r)),
            VelocitySpread::Absolute(a) => format!("{} m/s", crate::present::num(a)),
        }
    }
}

/// The stated scatter: measurement (velocity, angle) and whether the model's constants and
/// material properties are sampled too.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Scatter {
    /// One standard deviation of the velocity as given (Vp, or Vc when the point was given by
    /// its collision-point velocity); `None` for none.
    pub velocity: Option<VelocitySpread>,
    /// One standard deviation of the collision angle; `None` for none.
    pub angle: Option<Angle>,
    /// Sample the criterion constants and the material properties from their documented
    /// distributions.
    pub model: bool,
}

impl Scatter {
    /// Check the ranges, naming the flags.
    ///
    /// # Errors
    /// [`ConfidenceError::Invalid`] for a negative, non-finite or oversized spread.
    pub fn validate(&self) -> ConfidenceResult<()> {
        match self.velocity {
            Some(VelocitySpread::Relative(r)) if !(0.0..=MAX_RELATIVE_VELOCITY_SD).contains(&r) => {
                return Err(ConfidenceError::invalid(
                    "--velocity-sd",
                    format!(
                        "{} % is outside 0 to {} %",
                        100.0 * r,
                        100.0 * MAX_RELATIVE_VELOCITY_SD
                    ),
                ))
            }
            Some(VelocitySpread::Absolute(a))
                if !(0.0..=MAX_ABSOLUTE_VELOCITY_SD_M_S).contains(&a) =>
            {
                return Err(ConfidenceError::invalid(
                    "--velocity-sd",
                    format!("{a} m/s is outside 0 to {MAX_ABSOLUTE_VELOCITY_SD_M_S} m/s"),
                ))
            }
            _ => {}
        }
        if let Some(a) = self.angle {
            let d = a.degrees();
            if !(0.0..=MAX_ANGLE_SD_DEG).contains(&d) {
                return Err(ConfidenceError::invalid(
                    "--angle-sd",
                    format!("{d} deg is outside 0 to {MAX_ANGLE_SD_DEG} deg"),
                ));
            }
        }
        Ok(())
    }

    /// The scatter in words ("velocity sd 5 %, angle sd 1 deg, model uncertainty on").
    pub fn text(&self) -> String {
        format!(
            "velocity sd {}, angle sd {}, model uncertainty {}",
            self.velocity.map_or("none".into(), VelocitySpread::text),
            self.angle.map_or("none".into(), |a| format!(
                "{} deg",
                crate::present::num(a.degrees())
            )),
            if self.model { "on" } else { "off" }
        )
    }
}

/// How many samples, which seed, how many threads.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sampling {
    /// Number of samples (1 to [`MAX_SAMPLES`]).
    pub samples: usize,
    /// Seed of the random streams; the same seed gives the same numbers whatever the threads.
    pub seed: u64,
    /// Worker threads (default: the available parallelism).
    pub threads: Option<NonZeroUsize>,
}

impl Default for Sampling {
    fn default() -> Self {
        Self {
            samples: DEFAULT_SAMPLES,
            seed: DEFAULT_SEED,
            threads: None,
        }
    }
}

impl Sampling {
    /// Check the number of samples, naming `--samples`.
    ///
    /// # Errors
    /// [`ConfidenceError::Invalid`] for 0 or more than [`MAX_SAMPLES`].
    pub fn validate(&self) -> ConfidenceResult<()> {
        if self.samples == 0 || self.samples > MAX_SAMPLES {
            return Err(ConfidenceError::invalid(
                "--samples",
                format!(
                    "{} is outside 1 to {MAX_SAMPLES} (10 million: about 2 s at one point on two cores)",
                    self.samples
                ),
            ));
        }
        Ok(())
    }

    /// Check the number of samples for `points` points evaluated with the same draws (a grid,
    /// a sweep), naming `--samples` and the most it may be here.
    ///
    /// # Errors
    /// As [`Self::validate`], and [`ConfidenceError::Invalid`] when points times samples is
    /// more than [`MAX_EVALUATIONS`].
    pub fn validate_for(&self, points: usize, what: &str) -> ConfidenceResult<()> {
        self.validate()?;
        if points.saturating_mul(self.samples) > MAX_EVALUATIONS {
            return Err(ConfidenceError::invalid(
                "--samples",
                format!(
                    "{} samples at each of the {points} {what} is more than {MAX_EVALUATIONS} evaluations (about a minute on two cores): give at most {}",
                    self.samples,
                    (MAX_EVALUATIONS / points.max(1)).max(1)
                ),
            ));
        }
        Ok(())
    }

    pub(crate) fn thread_count(&self) -> usize {
        self.threads.map_or_else(
            || std::thread::available_parallelism().map_or(1, NonZeroUsize::get),
            NonZeroUsize::get,
        )
    }
}

/// How the point's velocity was given.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", content = "m_s", rename_all = "snake_case")]
pub enum PointVelocity {
    /// The impact velocity Vp (m/s).
    Impact(f64),
    /// The collision-point velocity Vc (m/s).
    Collision(f64),
}

/// A process point as the user gave it: the velocity's scatter applies to the velocity given,
/// in the convention given.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Point {
    /// The convention the velocity is given in.
    pub convention: Convention,
    /// The velocity.
    pub velocity: PointVelocity,
    /// The collision angle (rad).
    pub angle_rad: f64,
}

impl Point {
    /// An impact velocity and angle.
    pub fn impact(convention: Convention, vp: Velocity, angle: Angle) -> Self {
        Self {
            convention,
            velocity: PointVelocity::Impact(vp.si()),
            angle_rad: angle.radians(),
        }
    }

    /// The velocity as given (m/s).
    pub fn velocity_m_s(&self) -> f64 {
        match self.velocity {
            PointVelocity::Impact(v) | PointVelocity::Collision(v) => v,
        }
    }

    /// The collision with velocity `v` (m/s, as given) and angle `beta` (rad), in `to`.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] for a velocity or angle outside the physical range.
    #[inline]
    pub(crate) fn collision_at(
        &self,
        v: f64,
        beta: f64,
        to: Convention,
    ) -> Result<Collision, PhysicsError> {
        let angle = Angle::from_radians(beta);
        let c = match self.velocity {
            PointVelocity::Impact(_) => {
                Collision::from_impact(self.convention, Velocity::from_m_s(v), angle)?
            }
            PointVelocity::Collision(_) => {
                Collision::from_collision_velocity(self.convention, Velocity::from_m_s(v), angle)?
            }
        };
        Ok(if c.convention == to {
            c
        } else {
            c.with_convention(to)
        })
    }

    /// The nominal collision in `to`.
    ///
    /// # Errors
    /// As [`Collision::from_impact`].
    pub fn collision(&self, to: Convention) -> Result<Collision, PhysicsError> {
        self.collision_at(self.velocity_m_s(), self.angle_rad, to)
    }
}
