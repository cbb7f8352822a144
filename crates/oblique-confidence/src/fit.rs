//! Criterion constants fitted to a pair's own trials: maximum likelihood with profile-likelihood
//! intervals (docs/theory.md §15.3).
//!
//! **Likelihood.** Each observation's velocity and angle are uncertain (its own standard
//! uncertainties, or the documented defaults by method, never below a floor); propagated to
//! first order, each limit's margin at the observation is normal with mean the margin at the
//! recorded point and standard deviation from the margin's slopes. A limit holds with
//! probability Phi(margin / sd) (a probit), and the limits are taken as independent. With P_L
//! the probability that every lower limit holds and P_M that the melting ceiling holds:
//!
//! | observed | likelihood |
//! |---|---|
//! | welded | P_L P_M |
//! | not-welded | 1 - P_L (a lower limit failed) |
//! | melted | P_L (1 - P_M) (only the ceiling failed) |
//! | partial | sqrt(P_W (1 - P_W)), P_W = P_L P_M: highest when the edge runs through the shot |
//!
//! User boundaries are left out: they were drawn through the same trials, and counting them
//! would let a hand-drawn line explain the shots instead of the constants.
//!
//! **Estimate and intervals.** The log-likelihood is maximised over the logarithms of the
//! constants (coordinate ascent: a scan, then golden-section search, per constant, repeated)
//! within a factor of 20 of the values in use. A constant's interval is where the profile
//! log-likelihood stays within chi-square(level, 1 df)/2 of the maximum; a side where it does
//! not fall that far before the search box ends is unbounded, and the output says so.

use crate::error::{ConfidenceError, ConfidenceResult};
use crate::inputs::{constant_in_use, enabled};
use crate::present::{interval, num};
use crate::priors::{self, Constant};
use crate::quantile;
use oblique_core::criteria::{
    deribas_coefficient, melting_coefficient, melting_divisor, strength_velocity,
};
use oblique_core::hugoniot::impedance_match;
use oblique_core::jetting::critical_angle;
use oblique_core::units::{Angle, Velocity};
use oblique_core::{Collision, CriterionId};
use oblique_window::pair::{Fitted, FittedValue};
use oblique_window::{Outcome, PairWindow};
use serde::Serialize;

/// The method, in words, as stored with a saved fit.
pub const METHOD: &str = "maximum likelihood (probit per limit, first-order propagation of each trial's velocity and angle uncertainty, boundaries left out; docs/theory.md 15.3), profile-likelihood intervals";

/// The search box: a factor of this around the value in use.
const BOX: f64 = 20.0;

/// Settings of a fit.
#[derive(Debug, Clone, PartialEq)]
pub struct FitSettings {
    /// Confidence level of the intervals (0.95 by default).
    pub level: f64,
    /// The constants to fit (those whose criterion is on); `None`: [`DEFAULT_CONSTANTS`].
    pub constants: Option<Vec<Constant>>,
}

/// The constants fitted unless others are asked for: Deribas k and Wittman N. The HEL multiple
/// is fitted only on request: at small angles in the normal-to-flyer convention the Deribas
/// limit is, in effect, an impact-velocity floor of about k sqrt(Hv/rho) (docs/theory.md 8.2.1),
/// so a trial series rarely tells it from the pressure floor, and fitting both leaves each
/// bounded on one side only.
pub const DEFAULT_CONSTANTS: [Constant; 2] = [Constant::DeribasK, Constant::WittmanN];

impl Default for FitSettings {
    fn default() -> Self {
        Self {
            level: 0.95,
            constants: None,
        }
    }
}

/// One fitted constant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ConstantFit {
    /// Which.
    pub constant: Constant,
    /// The value in use before the fit.
    pub before: f64,
    /// The reported value: the maximum-likelihood estimate when both sides are bounded; else
    /// the value in use, moved into the one-sided interval if it lies outside.
    pub value: f64,
    /// Where the likelihood is highest inside the search box (at its edge when unbounded).
    pub maximum_likelihood: f64,
    /// Lower end of the interval; `None` when the trials do not bound it from below.
    pub low: Option<f64>,
    /// Upper end; `None` when the trials do not bound it from above.
    pub high: Option<f64>,
    /// Both ends bounded.
    pub bounded: bool,
}

/// An observation the window misjudges.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Misjudged {
    /// Index in the file's observation list.
    pub index: usize,
    /// The shot's number as every view shows it (`index` + 1).
    pub shot: usize,
    /// Observed outcome.
    pub observed: &'static str,
    /// Predicted outcome.
    pub predicted: &'static str,
    /// Impact velocity (m/s).
    pub velocity_m_s: f64,
    /// Collision angle (deg).
    pub angle_deg: f64,
}

/// A fit's result.
#[derive(Debug, Clone, Serialize)]
pub struct FitResult {
    /// The pair.
    pub pair: String,
    /// Observations used.
    pub observations: usize,
    /// Confidence level of the intervals.
    pub level: f64,
    /// Every fitted constant.
    pub constants: Vec<ConstantFit>,
    /// Log-likelihood at the values in use and at the fit.
    pub log_likelihood_before: f64,
    /// See `log_likelihood_before`.
    pub log_likelihood_after: f64,
    /// Observations the window misjudges with the values in use (rules of `pair agreement`).
    pub misclassified_before: Vec<Misjudged>,
    /// ... and with the fitted values.
    pub misclassified_after: Vec<Misjudged>,
    /// Honest words: constants the data do not bound, outcomes that inform nothing.
    pub warnings: Vec<String>,
    /// The method.
    pub method: &'static str,
}

/// What a limit's margin is at an observation, and its slopes along velocity (per m/s) and
/// angle (per deg).
#[derive(Debug, Clone, Copy, Default)]
pub(crate) struct Slope {
    value: f64,
    dv: f64,
    db: f64,
}

/// The terms of one observation that do not depend on the constants.
#[derive(Debug, Clone)]
pub(crate) struct Terms {
    pub(crate) outcome: Outcome,
    pub(crate) v: f64,
    pub(crate) beta_deg: f64,
    pub(crate) sd_v: f64,
    pub(crate) sd_b: f64,
    /// Deribas angle per unit k (deg).
    pub(crate) deribas: Option<Slope>,
    /// Strength floor (m/s).
    pub(crate) strength: Option<f64>,
    /// Impact pressure over the larger HEL.
    pub(crate) pressure: Option<Slope>,
    /// Melting velocity for N = 1 (m/s).
    pub(crate) melting: Option<Slope>,
    /// Jetting critical angle (deg).
    pub(crate) jetting: Option<Slope>,
}

/// The log-likelihood model of a window's trials.
#[derive(Debug, Clone)]
pub struct Likelihood {
    terms: Vec<Terms>,
    /// The constants fitted, in [`Constant::FITTED`] order where enabled.
    pub constants: Vec<Constant>,
    current: [f64; 3],
}

fn index(c: Constant) -> usize {
    match c {
        Constant::DeribasK => 0,
        Constant::WittmanN => 1,
        _ => 2,
    }
}

/// The complementary error function for x >= 0 by the Chebyshev-fitted form of Press et al.,
/// *Numerical Recipes* (2nd ed. 1992, section 6.2, `erfcc`; coefficients from memory), with a
/// fractional error below 1.2e-7 everywhere: checked against statrs' erfc in the tests. The
/// likelihood calls it millions of times in a fit, where statrs' full-precision form would
/// take most of the time.
#[inline]
fn erfc_fast(x: f64) -> f64 {
    let t = 1.0 / (1.0 + 0.5 * x);
    t * (-x * x - 1.265_512_23
        + t * (1.000_023_68
            + t * (0.374_091_96
                + t * (0.096_784_18
                    + t * (-0.186_288_06
                        + t * (0.278_868_07
                            + t * (-1.135_203_98
                                + t * (1.488_515_87 + t * (-0.822_152_23 + t * 0.170_872_77)))))))))
        .exp()
}

/// Phi(z) and 1 - Phi(z), the smaller of the two computed directly (no cancellation).
#[inline]
fn phi_pair(z: f64) -> (f64, f64) {
    if z >= 0.0 {
        let q = 0.5 * erfc_fast(z / std::f64::consts::SQRT_2);
        (1.0 - q, q)
    } else {
        let p = 0.5 * erfc_fast(-z / std::f64::consts::SQRT_2);
        (p, 1.0 - p)
    }
}

/// What the terms of a point need from the window: the plates' coefficients with the
/// constants set to 1.
#[derive(Debug, Clone)]
pub(crate) struct TermBuilder<'w> {
    window: &'w PairWindow,
    setup: oblique_core::PairSetup,
    d_coef: f64,
    s_floor: f64,
    hel: f64,
    m_coef: f64,
}

impl<'w> TermBuilder<'w> {
    pub(crate) fn new(window: &'w PairWindow) -> ConfidenceResult<Self> {
        let setup = window.setup()?;
        let (f, p) = (&setup.flyer, &setup.parent);
        let h = window.flyer_thickness;
        let form = window.criteria.wittman_form;
        Ok(Self {
            d_coef: deribas_coefficient(f, 1.0).max(deribas_coefficient(p, 1.0)),
            s_floor: strength_velocity(f).max(strength_velocity(p)),
            hel: f
                .hugoniot_elastic_limit()
                .si()
                .max(p.hugoniot_elastic_limit().si()),
            m_coef: melting_coefficient(f, h, 1.0, form).min(melting_coefficient(p, h, 1.0, form)),
            window,
            setup,
        })
    }

    /// The terms of a shot at `v` (m/s, the window's convention) and `b` (deg) with standard
    /// uncertainties `sd_v` (m/s) and `sd_b` (deg), floored.
    pub(crate) fn terms(
        &self,
        outcome: Outcome,
        v: f64,
        b: f64,
        sd_v: f64,
        sd_b: f64,
    ) -> ConfidenceResult<Terms> {
        let window = self.window;
        let (f, p) = (&self.setup.flyer, &self.setup.parent);
        let form = window.criteria.wittman_form;
        let on = |id| enabled(window, id);
        let at = |v: f64, b_deg: f64| {
            Collision::from_impact(
                window.convention,
                Velocity::from_m_s(v),
                Angle::from_degrees(b_deg),
            )
        };
        let sd_v = sd_v.max(priors::FLOOR_VELOCITY_RELATIVE * v);
        let sd_b = sd_b.max(priors::FLOOR_ANGLE_DEG);
        // Central differences, kept inside (0, 90) deg.
        let dv = 1e-3 * v;
        let db = 1e-3f64.min(0.5 * b).min(0.5 * (90.0 - b));
        let slope = |q: &dyn Fn(f64, f64) -> ConfidenceResult<f64>| -> ConfidenceResult<Slope> {
            Ok(Slope {
                value: q(v, b)?,
                dv: (q(v + dv, b)? - q(v - dv, b)?) / (2.0 * dv),
                db: (q(v, b + db)? - q(v, b - db)?) / (2.0 * db),
            })
        };
        let (d_coef, hel, m_coef) = (self.d_coef, self.hel, self.m_coef);
        let deribas = if on(CriterionId::DeribasLower) {
            Some(slope(&|v, b| {
                Ok((d_coef / at(v, b)?.collision_velocity.si()).to_degrees())
            })?)
        } else {
            None
        };
        let pressure = if on(CriterionId::PressureLower) {
            Some(slope(&|v, _| {
                Ok(
                    impedance_match(&f.hugoniot, &p.hugoniot, Velocity::from_m_s(v))?
                        .pressure
                        .si()
                        / hel,
                )
            })?)
        } else {
            None
        };
        let melting = if on(CriterionId::MeltingUpper) {
            Some(slope(&|v, b| {
                Ok(m_coef / melting_divisor(at(v, b)?.collision_velocity.si(), form))
            })?)
        } else {
            None
        };
        let jetting = if on(CriterionId::Jetting) {
            Some(slope(&|v, b| {
                let c = at(v, b)?;
                Ok(critical_angle(
                    &f.hugoniot,
                    &p.hugoniot,
                    c.flow_velocity,
                    c.collision_velocity,
                    window.criteria.mixed_jetting,
                )?
                .critical_angle
                .degrees())
            })?)
        } else {
            None
        };
        Ok(Terms {
            outcome,
            v,
            beta_deg: b,
            sd_v,
            sd_b,
            deribas,
            strength: on(CriterionId::StrengthLower).then_some(self.s_floor),
            pressure,
            melting,
            jetting,
        })
    }
}

/// The probabilities of a shot's outcomes under constants c = [k, N, m]: P_L (every lower
/// limit holds), 1 - P_L, P_M (the ceiling holds), 1 - P_M, each without cancellation.
#[inline]
pub(crate) fn outcome_terms(t: &Terms, c: &[f64; 3]) -> (f64, f64, f64, f64) {
    let [k, n, m] = *c;
    let z = |margin: f64, dv: f64, db: f64| {
        let sd = ((dv * t.sd_v).powi(2) + (db * t.sd_b).powi(2)).sqrt();
        if sd > 0.0 {
            margin / sd
        } else if margin >= 0.0 {
            f64::INFINITY
        } else {
            f64::NEG_INFINITY
        }
    };
    // P_L = prod (1 - q_j), and 1 - P_L = sum_j q_j prod_{i<j} (1 - q_i), which has no
    // cancellation when every q_j is small.
    let mut p_lower = 1.0;
    let mut q_lower = 0.0;
    let mut add = |zz: f64| {
        let (p, q) = phi_pair(zz);
        q_lower += q * p_lower;
        p_lower *= p;
    };
    if let Some(d) = t.deribas {
        add(z(t.beta_deg - k * d.value, -k * d.dv, 1.0 - k * d.db));
    }
    if let Some(s) = t.strength {
        add(z(t.v - s, 1.0, 0.0));
    }
    if let Some(pr) = t.pressure {
        add(z(pr.value - m, pr.dv, pr.db));
    }
    if let Some(j) = t.jetting {
        add(z(t.beta_deg - j.value, -j.dv, 1.0 - j.db));
    }
    let (p_melt, q_melt) = match t.melting {
        Some(me) => phi_pair(z(me.value / n - t.v, me.dv / n - 1.0, me.db / n)),
        None => (1.0, 0.0),
    };
    (p_lower, q_lower, p_melt, q_melt)
}

impl Likelihood {
    /// The model for `window`'s observations.
    ///
    /// # Errors
    /// [`ConfidenceError::NoObservations`] for a pair without observations;
    /// [`ConfidenceError::NothingToFit`] when every criterion with a fitted constant is off;
    /// a physics error for an observation that cannot be evaluated.
    pub fn new(window: &PairWindow, asked: &[Constant]) -> ConfidenceResult<Self> {
        if window.observations.is_empty() {
            return Err(ConfidenceError::NoObservations {
                pair: window.name.clone(),
            });
        }
        let constants: Vec<Constant> = Constant::FITTED
            .into_iter()
            .filter(|c| asked.contains(c) && enabled(window, c.criterion()))
            .collect();
        if constants.is_empty() {
            return Err(ConfidenceError::NothingToFit {
                pair: window.name.clone(),
                message: format!(
                    "the criteria of {} are switched off in this pair: no constant to fit",
                    asked.iter().map(|c| c.key()).collect::<Vec<_>>().join(", ")
                ),
            });
        }
        let builder = TermBuilder::new(window)?;
        let mut terms = Vec::with_capacity(window.observations.len());
        for o in &window.observations {
            let v = o.velocity.si();
            let sd_v = o
                .velocity_uncertainty
                .map_or(priors::default_velocity_uncertainty(&o.method) * v, |u| {
                    u.si()
                });
            let sd_b = o
                .angle_uncertainty
                .map_or(priors::default_angle_uncertainty_deg(&o.method), |u| {
                    u.degrees()
                });
            terms.push(builder.terms(o.outcome, v, o.angle.degrees(), sd_v, sd_b)?);
        }
        Ok(Self {
            terms,
            constants,
            current: [
                constant_in_use(window, Constant::DeribasK),
                constant_in_use(window, Constant::WittmanN),
                constant_in_use(window, Constant::HelMultiple),
            ],
        })
    }

    /// The log-likelihood at constants `c` = [k, N, m].
    pub fn log_likelihood(&self, c: &[f64; 3]) -> f64 {
        let tiny = 1e-300f64;
        let ln = |x: f64| x.max(tiny).ln();
        self.terms
            .iter()
            .map(|t| {
                let (p_lower, q_lower, p_melt, q_melt) = outcome_terms(t, c);
                match t.outcome {
                    Outcome::Welded => ln(p_lower * p_melt),
                    Outcome::NotWelded => ln(q_lower),
                    Outcome::Melted => ln(p_lower * q_melt),
                    // 1 - P_L P_M = (1 - P_L) + P_L (1 - P_M), again without cancellation.
                    Outcome::Partial => {
                        0.5 * ln(p_lower * p_melt) + 0.5 * ln(q_lower + p_lower * q_melt)
                    }
                }
            })
            .sum()
    }

    fn with(&self, x: &[f64; 3]) -> [f64; 3] {
        let mut c = self.current;
        for constant in &self.constants {
            let i = index(*constant);
            c[i] = x[i].exp();
        }
        c
    }

    fn bounds(&self, i: usize) -> (f64, f64) {
        let max = [
            Constant::DeribasK.max(),
            Constant::WittmanN.max(),
            Constant::HelMultiple.max(),
        ][i];
        let c = self.current[i];
        ((c / BOX).ln(), (c * BOX).min(max).ln())
    }

    /// Maximise over the free coordinates (those in `free`), starting from `x`: with `scan`, a
    /// first sweep scans each coordinate's whole box (to find the right hill); without, the
    /// search stays near `x` (a warm start).
    fn maximise(&self, x: &mut [f64; 3], free: &[usize], scan: bool) -> f64 {
        let f = |x: &[f64; 3]| self.log_likelihood(&self.with(x));
        let mut best = f(x);
        for sweep in 0..40 {
            let before = best;
            for &i in free {
                let (lo, hi) = self.bounds(i);
                // A scan on the first sweep, a narrower bracket after.
                let (a, b, steps) = if sweep == 0 && scan {
                    (lo, hi, 48)
                } else {
                    let w = ((hi - lo) / 48.0) * 2.0;
                    ((x[i] - w).max(lo), (x[i] + w).min(hi), 8)
                };
                let mut top = (x[i], best);
                for s in 0..=steps {
                    let mut y = *x;
                    y[i] = a + (b - a) * s as f64 / steps as f64;
                    let v = f(&y);
                    if v > top.1 {
                        top = (y[i], v);
                    }
                }
                // Golden-section refinement around the best scanned point (one new
                // evaluation per step).
                let h = (b - a) / steps as f64;
                let (mut l, mut r) = ((top.0 - h).max(lo), (top.0 + h).min(hi));
                let g = 0.5 * (5f64.sqrt() - 1.0);
                let at = |xi: f64| {
                    let mut y = *x;
                    y[i] = xi;
                    f(&y)
                };
                let (mut x1, mut x2) = (r - g * (r - l), l + g * (r - l));
                let (mut v1, mut v2) = (at(x1), at(x2));
                for _ in 0..60 {
                    if r - l < 1e-6 {
                        break;
                    }
                    if v1 >= v2 {
                        r = x2;
                        x2 = x1;
                        v2 = v1;
                        x1 = r - g * (r - l);
                        v1 = at(x1);
                    } else {
                        l = x1;
                        x1 = x2;
                        v1 = v2;
                        x2 = l + g * (r - l);
                        v2 = at(x2);
                    }
                }
                for (xx, vv) in [(x1, v1), (x2, v2)] {
                    if vv > top.1 {
                        top = (xx, vv);
                    }
                }
                x[i] = top.0;
                best = top.1;
            }
            if best - before < 1e-8 {
                break;
            }
        }
        best
    }
}

/// Fit the pair's constants to its observations.
///
/// # Errors
/// No observations, no constant to fit, a level outside (0, 1), or an observation the physics
/// cannot evaluate.
///
/// ```
/// let lib = oblique_window::Library::load(&[]).unwrap();
/// let w = lib.pair("demo-al6061-on-cu").unwrap();
/// let fit = oblique_confidence::fit::fit(w, &Default::default()).unwrap();
/// assert_eq!(fit.observations, 16);
/// assert!(fit.log_likelihood_after >= fit.log_likelihood_before);
/// ```
pub fn fit(window: &PairWindow, settings: &FitSettings) -> ConfidenceResult<FitResult> {
    if !(settings.level > 0.0 && settings.level < 1.0) {
        return Err(ConfidenceError::invalid(
            "--level",
            format!("{} is outside (0, 100) %", 100.0 * settings.level),
        ));
    }
    let asked = settings
        .constants
        .clone()
        .unwrap_or_else(|| DEFAULT_CONSTANTS.to_vec());
    let model = Likelihood::new(window, &asked)?;
    let free: Vec<usize> = model.constants.iter().map(|c| index(*c)).collect();
    let start = model.current.map(f64::ln);
    let ll_before = model.log_likelihood(&model.current);
    let mut best_x = start;
    let ll_max = model.maximise(&mut best_x, &free, true);
    let threshold = quantile::chi_square(settings.level, 1.0) / 2.0;
    let mut constants = Vec::new();
    let mut warnings = Vec::new();
    for (&i, constant) in free.iter().zip(&model.constants) {
        let others: Vec<usize> = free.iter().copied().filter(|&j| j != i).collect();
        let profile = |xi: f64, warm: &mut [f64; 3]| -> f64 {
            warm[i] = xi;
            if others.is_empty() {
                model.log_likelihood(&model.with(warm))
            } else {
                model.maximise(warm, &others, false)
            }
        };
        let (lo, hi) = model.bounds(i);
        let mut ends = [None, None];
        for (side, edge) in [(0usize, lo), (1usize, hi)] {
            let mut warm = best_x;
            if ll_max - profile(edge, &mut warm) < threshold {
                continue; // never falls far enough: unbounded on this side
            }
            // The end: where the profile deviance crosses the threshold, between the maximum
            // and the edge (Illinois variant of regula falsi, bracket kept).
            let mut warm = best_x;
            let g = |xi: f64, warm: &mut [f64; 3]| ll_max - profile(xi, warm) - threshold;
            let (mut a, mut fa) = (best_x[i], -threshold);
            let (mut b, mut fb) = (edge, g(edge, &mut warm));
            let mut warm = best_x;
            let mut side_kept = 0i8;
            for _ in 0..60 {
                if (b - a).abs() < 2e-4 {
                    break;
                }
                let c = (a * fb - b * fa) / (fb - fa);
                let c = if c.is_finite() && (c - a) * (c - b) < 0.0 {
                    c
                } else {
                    0.5 * (a + b)
                };
                let fc = g(c, &mut warm);
                if fc < 0.0 {
                    a = c;
                    fa = fc;
                    if side_kept == -1 {
                        fb *= 0.5;
                    }
                    side_kept = -1;
                } else {
                    b = c;
                    fb = fc;
                    if side_kept == 1 {
                        fa *= 0.5;
                    }
                    side_kept = 1;
                }
            }
            ends[side] = Some((0.5 * (a + b)).exp());
        }
        let [low, high] = ends;
        let mle = best_x[i].exp();
        let before = model.current[i];
        let value = match (low, high) {
            (Some(_), Some(_)) => mle,
            _ => {
                let mut v = before;
                if let Some(l) = low {
                    v = v.max(l);
                }
                if let Some(h) = high {
                    v = v.min(h);
                }
                v
            }
        };
        let name = constant.key();
        match (low, high) {
            (None, None) => warnings.push(format!(
                "{name}: the trials do not bound it on either side within a factor of {BOX} of {}; kept at {}",
                num(before),
                num(value)
            )),
            (None, Some(h)) => warnings.push(format!(
                "{name}: bounded on one side only, from above ({name} <= {}): {}; {} kept",
                num(h),
                one_sided_reason(window, *constant, false),
                num(value)
            )),
            (Some(l), None) => warnings.push(format!(
                "{name}: bounded on one side only, from below ({name} >= {}): {}; {} kept",
                num(l),
                one_sided_reason(window, *constant, true),
                num(value)
            )),
            _ => {}
        }
        constants.push(ConstantFit {
            constant: *constant,
            before,
            value,
            maximum_likelihood: mle,
            low,
            high,
            bounded: low.is_some() && high.is_some(),
        });
    }
    let mut after = window.clone();
    for c in &constants {
        match c.constant {
            Constant::DeribasK => after.criteria.deribas_k = c.value,
            Constant::WittmanN => after.criteria.wittman_n = c.value,
            Constant::HelMultiple => after.criteria.hel_multiple = c.value,
            Constant::JettingFactor => {}
        }
    }
    let ll_after = model.log_likelihood(&[
        after.criteria.deribas_k,
        after.criteria.wittman_n,
        after.criteria.hel_multiple,
    ]);
    let partial = window
        .observations
        .iter()
        .filter(|o| o.outcome == Outcome::Partial)
        .count();
    if partial > 0 {
        warnings.push(format!(
            "{partial} partial weld(s) count as half a weld and half a failure: they pull the window's edge through themselves"
        ));
    }
    // Trials outside the validity domain enter the likelihood through the limits' extrapolation
    // there (`pair agreement` counts them apart, claiming no verdict): say which.
    let outside: Vec<String> = oblique_window::agreement(window)
        .map(|a| {
            a.outside_domain
                .iter()
                .map(|t| format!("#{}", t.index + 1))
                .collect()
        })
        .unwrap_or_default();
    if !outside.is_empty() {
        warnings.push(format!(
            "{} trial(s) lie outside the validity domain ({}): they enter the fit through the limits' extrapolation there, where `pair agreement` claims no verdict; if the fit moves much without them, trust it less",
            outside.len(),
            outside.join(", ")
        ));
    }
    Ok(FitResult {
        pair: window.name.clone(),
        observations: window.observations.len(),
        level: settings.level,
        constants,
        log_likelihood_before: ll_before,
        log_likelihood_after: ll_after,
        misclassified_before: misjudged(window)?,
        misclassified_after: misjudged(&after)?,
        warnings,
        method: METHOD,
    })
}

/// Why a constant is bounded on one side only, in words.
fn one_sided_reason(window: &PairWindow, c: Constant, has_low: bool) -> String {
    let count = |o: Outcome| {
        window
            .observations
            .iter()
            .filter(|x| x.outcome == o)
            .count()
    };
    match (c, has_low) {
        (Constant::WittmanN, false) if count(Outcome::Melted) == 0 => {
            "no melted shot, so nothing shows where the melting limit stops welds: any smaller N (a higher melting limit) fits as well".into()
        }
        (Constant::WittmanN, false) => {
            "the melted shots lie where other limits could also explain them".into()
        }
        (Constant::WittmanN, true) => {
            "no welded shot near the melting limit: any larger N (a lower limit) fits as well".into()
        }
        (Constant::DeribasK | Constant::HelMultiple, false) => format!(
            "no not-welded shot that only this limit explains ({} not-welded in all): a smaller value fits as well",
            count(Outcome::NotWelded)
        ),
        (Constant::DeribasK | Constant::HelMultiple, true) => {
            "no welded shot close to this limit: a larger value fits as well".into()
        }
        (Constant::JettingFactor, _) => String::new(),
    }
}

fn misjudged(window: &PairWindow) -> ConfidenceResult<Vec<Misjudged>> {
    let a = oblique_window::agreement(window)?;
    Ok(a.disagreements
        .iter()
        .map(|d| Misjudged {
            index: d.index,
            shot: d.index + 1,
            observed: d.observed.as_str(),
            predicted: d.predicted.as_str(),
            velocity_m_s: d.velocity_m_s,
            angle_deg: d.angle_deg,
        })
        .collect())
}

impl FitResult {
    /// The section to store in the pair file (constants the trials bound on at least one
    /// side), dated `date`.
    pub fn to_fitted(&self, date: &str) -> Fitted {
        let get = |c: Constant| {
            self.constants
                .iter()
                .find(|x| x.constant == c && (x.low.is_some() || x.high.is_some()))
                .map(|x| FittedValue {
                    value: x.value,
                    low: x.low,
                    high: x.high,
                })
        };
        Fitted {
            date: date.to_string(),
            method: METHOD.to_string(),
            observations: self.observations,
            level: self.level,
            deribas_k: get(Constant::DeribasK),
            wittman_n: get(Constant::WittmanN),
            hel_multiple: get(Constant::HelMultiple),
        }
    }

    /// The JSON of `pair fit --json`.
    pub fn json(&self) -> serde_json::Value {
        let constants: serde_json::Map<String, serde_json::Value> = self
            .constants
            .iter()
            .map(|c| {
                (
                    c.constant.key().to_string(),
                    serde_json::json!({
                        "value": c.value,
                        "low": c.low,
                        "high": c.high,
                        "bounded": c.bounded,
                        "before": c.before,
                        "maximum_likelihood": c.maximum_likelihood,
                    }),
                )
            })
            .collect();
        serde_json::json!({
            "pair": self.pair,
            "observations": self.observations,
            "level": self.level,
            "constants": constants,
            "log_likelihood": { "before": self.log_likelihood_before, "after": self.log_likelihood_after },
            "misclassified_before": self.misclassified_before,
            "misclassified_after": self.misclassified_after,
            "warnings": self.warnings,
            "method": self.method,
            "caution": crate::present::CAUTION,
        })
    }

    /// The human text.
    pub fn text(&self) -> String {
        let mut s = format!(
            "pair '{}': constants fitted to {} trials ({} % profile-likelihood intervals)\n\n",
            self.pair,
            self.observations,
            num(100.0 * self.level)
        );
        s.push_str(&format!(
            "  {:<14} {:>10} {:>10}  {:<28} {}\n",
            "constant", "before", "fitted", "interval", "bounded"
        ));
        for c in &self.constants {
            s.push_str(&format!(
                "  {:<14} {:>10} {:>10}  {:<28} {}\n",
                c.constant.key(),
                num(c.before),
                num(c.value),
                interval(c.low, c.high),
                if c.bounded { "yes" } else { "no" }
            ));
        }
        s.push_str(&format!(
            "\n  log-likelihood {} before, {} after\n",
            num(self.log_likelihood_before),
            num(self.log_likelihood_after)
        ));
        let list = |v: &[Misjudged]| {
            if v.is_empty() {
                "none".to_string()
            } else {
                v.iter()
                    .map(|m| {
                        format!(
                            "#{} ({} m/s, {} deg: {}, predicted {})",
                            m.index + 1,
                            num(m.velocity_m_s),
                            num(m.angle_deg),
                            m.observed,
                            m.predicted
                        )
                    })
                    .collect::<Vec<_>>()
                    .join("; ")
            }
        };
        s.push_str(&format!(
            "  misclassified before ({}): {}\n",
            self.misclassified_before.len(),
            list(&self.misclassified_before)
        ));
        s.push_str(&format!(
            "  misclassified after ({}): {}\n",
            self.misclassified_after.len(),
            list(&self.misclassified_after)
        ));
        for w in &self.warnings {
            s.push_str(&format!("  warning: {w}\n"));
        }
        s.push_str(&format!("  method: {}\n", self.method));
        s.push_str(&format!("  {}\n", crate::present::CAUTION));
        s
    }
}

/// How an invented trial series is made (see [`synthetic_trials`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SyntheticDesign {
    /// The true constants [k, N, m].
    pub truth: [f64; 3],
    /// Number of shots.
    pub shots: usize,
    /// Range of the true impact velocities (m/s).
    pub velocity_m_s: (f64, f64),
    /// Range of the true angles (deg).
    pub angle_deg: (f64, f64),
    /// Relative standard deviation of the recorded velocity.
    pub sd_velocity_relative: f64,
    /// Standard deviation of the recorded angle (deg).
    pub sd_angle_deg: f64,
    /// Seed.
    pub seed: u64,
}

/// An invented trial series for tests and benchmarks (never a measurement): shots at true
/// points spread uniformly over the design's ranges, each outcome decided by the window's
/// criteria (boundaries left out) with the true constants, and each recorded velocity and
/// angle off the true one by normal noise of the design's spreads, which the observations
/// carry as their uncertainties. Every observation says it is invented.
///
/// # Errors
/// A point the physics cannot evaluate.
pub fn synthetic_trials(window: &PairWindow, d: &SyntheticDesign) -> ConfidenceResult<PairWindow> {
    use oblique_window::classify::{classify, Prediction};
    use oblique_window::Observation;
    use rand::{RngExt, SeedableRng};
    let (truth, n, velocity_m_s, angle_deg) = (d.truth, d.shots, d.velocity_m_s, d.angle_deg);
    let (sd_velocity_relative, sd_angle_deg, seed) =
        (d.sd_velocity_relative, d.sd_angle_deg, d.seed);
    let mut rng = rand_pcg::Pcg64::seed_from_u64(seed);
    let mut truth_window = window.clone();
    truth_window.boundaries.clear();
    truth_window.criteria.deribas_k = truth[0];
    truth_window.criteria.wittman_n = truth[1];
    truth_window.criteria.hel_multiple = truth[2];
    let setup = truth_window.setup()?;
    let mut out = window.clone();
    out.observations.clear();
    out.fitted = None;
    for i in 0..n {
        let v: f64 = rng.random_range(velocity_m_s.0..velocity_m_s.1);
        let b: f64 = rng.random_range(angle_deg.0..angle_deg.1);
        let c = Collision::from_impact(
            window.convention,
            Velocity::from_m_s(v),
            Angle::from_degrees(b),
        )?;
        let k = classify(&truth_window, &setup, &c)?;
        // Outside the validity domain the synthetic truth is what the limits say there.
        let said = if k.prediction == Prediction::OutsideDomain {
            k.domain.limits_say
        } else {
            k.prediction
        };
        let outcome = match said {
            Prediction::Welded => Outcome::Welded,
            Prediction::Melted => Outcome::Melted,
            Prediction::NotWelded | Prediction::HeadOn | Prediction::OutsideDomain => {
                Outcome::NotWelded
            }
        };
        let zv: f64 = rng.sample(rand_distr::StandardNormal);
        let zb: f64 = rng.sample(rand_distr::StandardNormal);
        let sd_v = sd_velocity_relative * v;
        out.observations.push(Observation {
            index: i,
            velocity: Velocity::from_m_s((v + sd_v * zv).max(1.0)),
            angle: Angle::from_degrees((b + sd_angle_deg * zb).clamp(0.05, 89.95)),
            outcome,
            process: "other".into(),
            method: "measured".into(),
            velocity_uncertainty: Some(Velocity::from_m_s(sd_v)),
            angle_uncertainty: Some(Angle::from_degrees(sd_angle_deg)),
            date: None,
            source: format!("invented: synthetic trial {i} (seed {seed}) for a recovery test"),
            note: None,
        });
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn demo() -> PairWindow {
        let lib = oblique_window::Library::load(&[]).expect("library");
        lib.pair("demo-al6061-on-cu").expect("demo").clone()
    }

    /// The fast erfc against statrs' (Numerical Recipes states a fractional error below
    /// 1.2e-7).
    #[test]
    fn fast_erfc_matches_statrs() {
        for k in 0..4000 {
            let x = k as f64 * 0.0025;
            let exact = statrs::function::erf::erfc(x);
            let rel = (erfc_fast(x) - exact).abs() / exact;
            assert!(rel < 1.3e-7, "x {x}: {rel}");
        }
    }

    #[test]
    fn no_observations_is_refused_clearly() {
        let mut w = demo();
        w.observations.clear();
        let e = fit(&w, &FitSettings::default()).unwrap_err();
        assert!(e.to_string().contains("has no observations"), "{e}");
        assert!(e.to_string().contains("pair observe"), "{e}");
    }

    #[test]
    fn the_fit_does_not_lower_the_likelihood_and_leaves_observations_alone() {
        let w = demo();
        let before = w.observations.clone();
        let r = fit(&w, &FitSettings::default()).expect("fit");
        assert_eq!(w.observations, before);
        assert!(r.log_likelihood_after >= r.log_likelihood_before - 1e-9);
        for c in &r.constants {
            if let Some(l) = c.low {
                assert!(l <= c.value);
            }
            if let Some(h) = c.high {
                assert!(h >= c.value);
            }
        }
    }
}
