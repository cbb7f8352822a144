//! Calibration of a magnetic pulse model on one measured shot.
//!
//! One factor is fitted: the efficiency eta that multiplies the pressure reaching the workpiece,
//! p_w = eta f_s B^2 / (2 mu0) (see [`crate::process::magnetic`]). Why the pressure and not the
//! coupling (the gap inductance): eta then lumps everything the one-dimensional model leaves out
//! that weakens the push (end effects and field leakage at the coil ends, the transfer of a field
//! shaper, flux penetration beyond the simple skin-depth law, rate hardening above the quoted
//! flow stress), while the circuit is left as identified from the ring-down, so a calibrated model
//! still reproduces the measured current. The share (1 - eta f_s) of the field's work is booked as
//! the "withheld" loss, so the energy balance still closes.
//!
//! The fit solves v_model(eta) = v_measured on eta in [[`EFFICIENCY_SEARCH_MIN`], 1] with
//! Brent's method (Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall 1973,
//! ch. 4; from memory), with "no impact" counted as zero velocity.
//!
//! A calibrated model is still a **screening estimate, not a guarantee**: one shot fixes one
//! number, and the model extrapolates poorly far from that shot.

use super::magnetic::{estimate, run, IntegrationOptions, Plant, PulseEstimate, PulseSetup};
use super::{check_positive, ProcessError};
use crate::units::Velocity;
use serde::Serialize;

/// Lower end of the efficiency search interval.
pub const EFFICIENCY_SEARCH_MIN: f64 = 1e-3;

/// Absolute tolerance on eta.
const ETA_TOLERANCE: f64 = 1e-7;

/// Iteration limit of the root finder.
const MAX_ITERATIONS: usize = 200;

/// The result of [`calibrate_efficiency`].
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EfficiencyFit {
    /// The fitted efficiency factor eta.
    pub efficiency: f64,
    /// The measured impact velocity it reproduces.
    pub measured: Velocity,
    /// The model's impact velocity at the fitted eta.
    pub model_velocity: Velocity,
    /// Root-finder iterations used.
    pub iterations: usize,
    /// The full estimate at the fitted eta.
    pub estimate: PulseEstimate,
}

/// Brent's root finder (Brent 1973, ch. 4, from memory; the zeroin form): bracketed, with
/// inverse quadratic interpolation, secant steps and a bisection fallback that guarantees
/// convergence for any function with a sign change, continuous or not.
///
/// # Errors
/// [`ProcessError::NoBracket`] when f(low) and f(high) have the same sign,
/// [`ProcessError::NoConvergence`] after `max_iter` iterations, or any error of `f`.
pub(crate) fn brent<F>(
    mut f: F,
    what: &'static str,
    low: f64,
    high: f64,
    tol: f64,
    max_iter: usize,
) -> Result<(f64, usize), ProcessError>
where
    F: FnMut(f64) -> Result<f64, ProcessError>,
{
    let (mut a, mut b) = (low, high);
    let (mut fa, mut fb) = (f(a)?, f(b)?);
    if fa == 0.0 {
        return Ok((a, 0));
    }
    if fb == 0.0 {
        return Ok((b, 0));
    }
    if fa.signum() == fb.signum() {
        return Err(ProcessError::NoBracket {
            what,
            low,
            high,
            f_low: fa,
            f_high: fb,
        });
    }
    let (mut c, mut fc) = (a, fa);
    let mut d = b - a;
    let mut e = d;
    for iter in 1..=max_iter {
        if fb.signum() == fc.signum() {
            c = a;
            fc = fa;
            d = b - a;
            e = d;
        }
        if fc.abs() < fb.abs() {
            a = b;
            b = c;
            c = a;
            fa = fb;
            fb = fc;
            fc = fa;
        }
        let tol1 = 2.0 * f64::EPSILON * b.abs() + 0.5 * tol;
        let xm = 0.5 * (c - b);
        if xm.abs() <= tol1 || fb == 0.0 {
            return Ok((b, iter));
        }
        if e.abs() >= tol1 && fa.abs() > fb.abs() {
            let s = fb / fa;
            let (mut p, mut q) = if a == c {
                (2.0 * xm * s, 1.0 - s)
            } else {
                let qa = fa / fc;
                let r = fb / fc;
                (
                    s * (2.0 * xm * qa * (qa - r) - (b - a) * (r - 1.0)),
                    (qa - 1.0) * (r - 1.0) * (s - 1.0),
                )
            };
            if p > 0.0 {
                q = -q;
            }
            p = p.abs();
            let min1 = 3.0 * xm * q - (tol1 * q).abs();
            let min2 = (e * q).abs();
            if 2.0 * p < min1.min(min2) {
                e = d;
                d = p / q;
            } else {
                d = xm;
                e = d;
            }
        } else {
            d = xm;
            e = d;
        }
        a = b;
        fa = fb;
        b += if d.abs() > tol1 { d } else { tol1.copysign(xm) };
        fb = f(b)?;
    }
    Err(ProcessError::NoConvergence {
        what,
        iterations: max_iter,
    })
}

/// Fit the efficiency factor eta so that the model reproduces one measured impact velocity at
/// the set-up's voltage and standoff (the set-up's own eta is ignored). See the module
/// documentation for what eta multiplies and why. A screening estimate, not a guarantee.
///
/// # Errors
/// Validation errors of the set-up or options; [`crate::PhysicsError::OutOfDomain`] (wrapped)
/// for a measured velocity not finite and positive; [`ProcessError::NoBracket`] when even
/// eta = 1 gives a slower impact than measured (the model cannot reach the measurement: check
/// the bank, coil and material inputs) or eta = [`EFFICIENCY_SEARCH_MIN`] still gives a faster
/// one; [`ProcessError::NoConvergence`] if the root finder does not converge.
pub fn calibrate_efficiency(
    setup: &PulseSetup,
    measured: Velocity,
    options: &IntegrationOptions,
) -> Result<EfficiencyFit, ProcessError> {
    options.validate()?;
    let vm = check_positive("measured impact velocity", measured.si(), "m/s")?;
    setup.with_efficiency(1.0).validate()?;
    let fast = IntegrationOptions {
        sample_every: None,
        ..*options
    };
    let target = setup.standoff().si();
    let residual = |eta: f64| -> Result<f64, ProcessError> {
        let plant = Plant::from_setup(&setup.with_efficiency(eta))?;
        let r = run(&plant, &[target], &fast)?;
        let v = r
            .outcomes
            .first()
            .and_then(|o| o.impact_velocity())
            .map_or(0.0, |v| v.si());
        Ok(v - vm)
    };
    let (eta, iterations) = brent(
        residual,
        "efficiency factor eta",
        EFFICIENCY_SEARCH_MIN,
        1.0,
        ETA_TOLERANCE,
        MAX_ITERATIONS,
    )?;
    let est = estimate(&setup.with_efficiency(eta), options)?;
    let model_velocity = est.impact_velocity().unwrap_or(Velocity::from_m_s(0.0));
    Ok(EfficiencyFit {
        efficiency: eta,
        measured,
        model_velocity,
        iterations,
        estimate: est,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::process::magnetic::tests::{sheet_setup, tube_setup};
    use approx::assert_relative_eq;

    /// Self-consistency: run the model at eta = 0.6, treat its velocity as "measured", and
    /// recover eta = 0.6 (tube and sheet).
    #[test]
    fn recovers_a_known_efficiency() {
        for setup in [
            PulseSetup::Tube(tube_setup()),
            PulseSetup::Sheet(sheet_setup()),
        ] {
            let opts = IntegrationOptions::default();
            let v = estimate(&setup.with_efficiency(0.6), &opts)
                .unwrap()
                .impact_velocity()
                .unwrap();
            let fit = calibrate_efficiency(&setup, v, &opts).unwrap();
            assert_relative_eq!(fit.efficiency, 0.6, max_relative = 1e-5);
            assert_relative_eq!(fit.model_velocity.si(), v.si(), max_relative = 1e-5);
        }
    }

    /// A measurement faster than the ideal model cannot be fitted with eta <= 1.
    #[test]
    fn unreachable_measurement_is_no_bracket() {
        let setup = PulseSetup::Tube(tube_setup());
        let err = calibrate_efficiency(
            &setup,
            Velocity::from_m_s(5000.0),
            &IntegrationOptions::default(),
        )
        .unwrap_err();
        assert!(matches!(err, ProcessError::NoBracket { .. }), "{err}");
        assert!(calibrate_efficiency(
            &setup,
            Velocity::from_m_s(-1.0),
            &IntegrationOptions::default()
        )
        .is_err());
    }

    /// Brent on closed-form functions: a smooth root, a discontinuous step, no bracket, and an
    /// iteration limit.
    #[test]
    fn brent_behaves() {
        let (x, _) = brent(|x| Ok(x * x - 2.0), "sqrt 2", 0.0, 2.0, 1e-14, 100).unwrap();
        assert_relative_eq!(x, 2f64.sqrt(), max_relative = 1e-13);
        let (x, _) = brent(
            |x| Ok(if x < 0.3 { -1.0 } else { 1.0 }),
            "step",
            0.0,
            1.0,
            1e-10,
            200,
        )
        .unwrap();
        assert!((x - 0.3).abs() < 1e-9);
        assert!(matches!(
            brent(|x| Ok(x * x + 1.0), "none", -1.0, 1.0, 1e-10, 100),
            Err(ProcessError::NoBracket { .. })
        ));
        assert!(matches!(
            brent(
                |x| Ok(if x < 0.123456789 { -1.0 } else { 1.0 }),
                "slow",
                0.0,
                1.0,
                1e-15,
                3
            ),
            Err(ProcessError::NoConvergence { .. })
        ));
    }
}
