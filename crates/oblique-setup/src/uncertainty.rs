//! The velocity's uncertainty carried into the verdict of an estimate or a sweep: the weld
//! probability at the estimated point, and the sweep's settings ranked by it.
//!
//! The velocity's standard deviation follows from where the efficiency came from (docs/theory.md
//! §15.6): an uncalibrated efficiency (the default 1, an upper estimate) or one given without a
//! calibration on file gets the wide spread
//! [`oblique_confidence::priors::UNCALIBRATED_VELOCITY_SPREAD`]; a stored calibration gets the
//! model error reported after calibration,
//! [`oblique_confidence::priors::CALIBRATED_VELOCITY_SPREAD`]. The user may state another.

use crate::error::{SetupError, SetupResult};
use crate::estimate::PulseReport;
use crate::inputs::{Inputs, Provenance};
use crate::sweep::{SweepProbability, SweepRanking};
use oblique_confidence::priors::{
    CALIBRATED_VELOCITY_SPREAD, PROCESS_ANGLE_SPREAD_DEG, UNCALIBRATED_VELOCITY_SPREAD,
};
use oblique_confidence::{
    probabilities, weld_probability, ConfidenceError, Point, Sampling, Scatter, VelocitySpread,
    WeldProbability,
};
use oblique_core::units::{Angle, Velocity};
use oblique_core::Convention;

/// What the user states about the scatter of a process estimate (each `None`: the default).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct ProcessScatter {
    /// The velocity's standard deviation; default from the efficiency's provenance.
    pub velocity: Option<VelocitySpread>,
    /// The angle's standard deviation; default 1 deg.
    pub angle: Option<Angle>,
    /// Sample the model's constants and materials too (default on).
    pub model: Option<bool>,
    /// Samples (default 20 000 for an estimate, 512 per setting for a sweep).
    pub samples: Option<usize>,
    /// Seed (default 1).
    pub seed: Option<u64>,
}

/// Samples of an estimate's probability unless given.
pub const ESTIMATE_SAMPLES: usize = 20_000;
/// Draws per setting of a sweep unless given (the same draws for every setting).
pub const SWEEP_SAMPLES: usize = 512;

/// The velocity's relative standard deviation implied by the efficiency's provenance, and why.
#[must_use]
pub fn velocity_spread(inputs: &Inputs) -> (f64, String) {
    let calibration = inputs.entries.iter().find_map(|i| match &i.from {
        Provenance::Calibration(c) if i.key == "efficiency" && c.mismatch.is_none() => Some(c),
        _ => None,
    });
    match calibration {
        Some(c) => match c.velocity_uncertainty {
            // The calibration shot's own spread, as the issue asks: the model reproduces that
            // shot, so the spread of the next one is at least the measurement's.
            Some(u) => (
                u,
                format!(
                    "calibrated efficiency: {:.1} %, the spread of its calibration shot's measured velocity ({})",
                    100.0 * u,
                    c.source
                ),
            ),
            None => (
                CALIBRATED_VELOCITY_SPREAD,
                "calibrated efficiency: 11 %, the model error reported after calibration (Hahn et al. 2016); the calibration records no spread of its own (calibrate ... --measured-velocity-sd stores one)".to_string(),
            ),
        },
        None => (
            UNCALIBRATED_VELOCITY_SPREAD,
            "efficiency not calibrated on this workpiece: 25 %, a wide spread (docs/theory.md 15.6); the estimate is an upper estimate, so the probability of a melted or too-fast shot is overstated and that of a too-slow one understated".to_string(),
        ),
    }
}

impl ProcessScatter {
    /// The scatter for a set-up with these inputs, and the basis of its velocity spread.
    #[must_use]
    pub fn resolve(&self, inputs: &Inputs) -> (Scatter, String) {
        let (rel, basis) = velocity_spread(inputs);
        let (velocity, basis) = match self.velocity {
            Some(v) => (v, format!("stated: --velocity-sd {}", v.text())),
            None => (VelocitySpread::Relative(rel), basis),
        };
        (
            Scatter {
                velocity: Some(velocity),
                angle: Some(
                    self.angle
                        .unwrap_or(Angle::from_degrees(PROCESS_ANGLE_SPREAD_DEG)),
                ),
                model: self.model.unwrap_or(true),
            },
            basis,
        )
    }

    fn sampling(&self, default: usize) -> Sampling {
        Sampling {
            samples: self.samples.unwrap_or(default),
            seed: self
                .seed
                .unwrap_or(oblique_confidence::scatter::DEFAULT_SEED),
            threads: None,
        }
    }
}

fn setup_error(e: ConfidenceError) -> SetupError {
    match e {
        ConfidenceError::Invalid { field, message } => SetupError::Invalid { field, message },
        ConfidenceError::Physics(p) => SetupError::Physics(p),
        other => SetupError::Invalid {
            field: "--pair",
            message: other.to_string(),
        },
    }
}

/// The weld probability of an estimate's impact at the user's angle, when the estimate was
/// checked against a window; with the basis of the velocity spread.
///
/// # Errors
/// A scatter setting out of range (naming its flag), or a point the physics refuses.
pub fn estimate_probability(
    report: &PulseReport<'_>,
    scatter: &ProcessScatter,
) -> SetupResult<Option<(WeldProbability, String)>> {
    let (Some(w), Some(angle), Some(vp), Some(_)) = (
        report.setup.window,
        report.setup.angle,
        report.estimate.impact_velocity(),
        report.check.as_ref(),
    ) else {
        return Ok(None);
    };
    let (s, basis) = scatter.resolve(&report.setup.inputs);
    let point = Point::impact(
        Convention::NormalToFlyer,
        Velocity::from_m_s(vp.si()),
        angle,
    );
    let p = weld_probability(w, &point, &s, &scatter.sampling(ESTIMATE_SAMPLES))
        .map_err(setup_error)?;
    Ok(Some((p, basis)))
}

/// The probabilities rounded for ranking: settings whose probabilities agree to 0.01 tie.
fn rank_key(p: f64) -> i64 {
    (p * 100.0).round() as i64
}

/// Weld probabilities for every setting of a sweep checked against a window, and the settings
/// inside re-ranked by them: highest probability (to 0.01) first, ties by velocity headroom
/// (the order before), then by charging voltage.
///
/// # Errors
/// A scatter setting out of range (naming its flag), or a point the physics refuses.
pub fn rank_by_probability(r: &mut SweepRanking<'_>, scatter: &ProcessScatter) -> SetupResult {
    let (Some(w), Some(angles)) = (r.window, r.grid.angles.clone()) else {
        return Ok(());
    };
    let (s, basis) = scatter.resolve(&r.inputs);
    let mut points = Vec::new();
    let mut index = Vec::new();
    for (k, st) in r.settings.iter().enumerate() {
        if let Some(v) = r.velocity(st) {
            points.push(Point::impact(
                Convention::NormalToFlyer,
                Velocity::from_m_s(v),
                Angle::from_radians(angles[st.standoff_index]),
            ));
            index.push(k);
        }
    }
    let sampling = scatter.sampling(SWEEP_SAMPLES);
    let p = probabilities(w, &points, &s, &sampling).map_err(setup_error)?;
    let mut per_setting = vec![None; r.settings.len()];
    for (k, pk) in index.into_iter().zip(p) {
        per_setting[k] = Some(pk);
    }
    // Stable sort: equal keys keep the headroom order.
    r.ranked
        .sort_by_key(|&k| -rank_key(per_setting[k].unwrap_or(0.0)));
    r.probability = Some(SweepProbability {
        per_setting,
        scatter: s,
        samples: sampling.samples,
        seed: sampling.seed,
        basis,
    });
    Ok(())
}
