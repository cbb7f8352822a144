//! The weld probability at one point: the share of samples inside the window, its standard
//! error, the failure probability of every limit, and the inputs that dominate the doubt.

use crate::engine::{Engine, Tally, BINS};
use crate::error::ConfidenceResult;
use crate::inputs::{Input, InputKind};
use crate::present::{percent, CAUTION};
use crate::priors::Constant;
use crate::scatter::{Point, Sampling, Scatter};
use oblique_core::CriterionId;
use oblique_window::classify::{classify, headroom, LimitRef};
use oblique_window::PairWindow;
use serde::Serialize;

/// What the probability leaves out (docs/theory.md §15.5 says the same).
pub const NOT_COVERED: [&str; 6] = [
    "whether the classical relations are the right ones at all: only their constants and the material values are sampled, not their form (the Wittman form, the jetting construction's shape, the 1-D pressure)",
    "correlations between inputs: every input is sampled independently",
    "anything the window does not model: surface condition and cleaning, oxide, temperature, coil wear, part fit-up, the joint's strength after welding",
    "the velocity convention: the point is evaluated in the window's convention",
    "the user boundaries' own uncertainty: they are fixed lines",
    "scatter beyond the stated standard deviations; the standard error covers the sampling noise only",
];

/// A limit's failure probability.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LimitFailure {
    /// The criterion id or the boundary's label.
    pub limit: String,
    /// The probability that this limit fails (whatever the others do).
    pub probability: f64,
}

/// An input's share of the doubt.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct InputShare {
    /// The input's id (`velocity`, `angle`, `wittman_n`, `flyer.hugoniot_c0`, ...).
    pub input: String,
    /// In words.
    pub label: String,
    /// Its first-order sensitivity index: the share of the verdict's variance explained by
    /// this input alone (0 to 1).
    pub share: f64,
}

/// The weld probability at one point, with everything needed to read it.
#[derive(Debug, Clone, Serialize)]
pub struct WeldProbability {
    /// The probability of landing inside the window.
    pub inside: f64,
    /// Its Monte Carlo standard error, sqrt(p (1 - p) / n).
    pub standard_error: f64,
    /// Number of samples.
    pub samples: usize,
    /// Seed of the random streams.
    pub seed: u64,
    /// The failure probability of every decisive limit, in report order.
    pub criteria_failure: Vec<LimitFailure>,
    /// The share of samples whose velocity or angle left the physical range (counted as not
    /// welded).
    pub no_collision: f64,
    /// The share of samples where some user boundary does not span the point.
    pub outside_trial_data: f64,
    /// The inputs, largest share of the doubt first.
    pub dominant_inputs: Vec<InputShare>,
    /// 1 - the sum of the shares: what only combinations of inputs explain; `None` when the
    /// verdict hardly varies.
    pub interactions: Option<f64>,
    /// The plain sentence naming the dominant input and the shot that would narrow it.
    pub doubt: String,
    /// The stated scatter.
    pub scatter: Scatter,
    /// Every sampled input with its distribution and basis.
    pub inputs: Vec<Input>,
    /// The nominal verdict (no scatter).
    pub nominal_inside: bool,
    /// "fitted to N trials ..." when the window's constants come from a fit.
    pub fitted: Option<String>,
    /// What the probability does not cover.
    pub not_covered: Vec<&'static str>,
    /// The caution.
    pub caution: &'static str,
}

/// The fewest samples of the rarer verdict for the sensitivity to be worth reporting.
const MIN_MINORITY: u64 = 20;

/// The weld probability of `point` against `window` under `scatter`.
///
/// # Errors
/// A scatter or sampling setting out of range (naming its flag), or a point the physics
/// refuses.
///
/// ```
/// use oblique_confidence::{weld_probability, Point, Sampling, Scatter, VelocitySpread};
/// use oblique_core::units::{Angle, Velocity};
/// use oblique_core::Convention;
/// let lib = oblique_window::Library::load(&[]).unwrap();
/// let w = lib.pair("demo-al6061-on-cu").unwrap();
/// let point = Point::impact(Convention::NormalToFlyer, Velocity::from_m_s(450.0), Angle::from_degrees(12.0));
/// let scatter = Scatter { velocity: Some(VelocitySpread::Relative(0.05)), angle: Some(Angle::from_degrees(1.0)), model: true };
/// let p = weld_probability(w, &point, &scatter, &Sampling { samples: 5000, ..Sampling::default() }).unwrap();
/// assert!(p.inside > 0.5 && p.standard_error < 0.01);
/// ```
pub fn weld_probability(
    window: &PairWindow,
    point: &Point,
    scatter: &Scatter,
    sampling: &Sampling,
) -> ConfidenceResult<WeldProbability> {
    sampling.validate()?;
    let engine = Engine::new(window, point, scatter)?;
    let nominal = point.collision(window.convention)?;
    let setup = window.setup()?;
    let c = classify(window, &setup, &nominal)?;
    let tally = engine.run(point, sampling)?;
    let n = tally.n as f64;
    let p = tally.inside as f64 / n;
    let criteria_failure = engine
        .limits
        .iter()
        .zip(&tally.failing)
        .map(|(l, f)| LimitFailure {
            limit: engine.limit_label(l),
            probability: *f as f64 / n,
        })
        .collect();
    let (dominant_inputs, interactions) = shares(&engine.inputs, &tally);
    let doubt = doubt_sentence(window, &setup, &engine, point, &c, &dominant_inputs, &tally);
    Ok(WeldProbability {
        inside: p,
        standard_error: (p * (1.0 - p) / n).sqrt(),
        samples: sampling.samples,
        seed: sampling.seed,
        criteria_failure,
        no_collision: tally.no_collision as f64 / n,
        outside_trial_data: tally.outside_trial_data as f64 / n,
        dominant_inputs,
        interactions,
        doubt,
        scatter: *scatter,
        inputs: engine.inputs.clone(),
        nominal_inside: c.inside,
        fitted: window.fitted.as_ref().map(|f| f.summary()),
        not_covered: NOT_COVERED.to_vec(),
        caution: CAUTION,
    })
}

/// First-order sensitivity indices of the verdict from the binned samples (the correlation
/// ratio Var(E[Y | bin of X_i]) / Var(Y) over 16 equal-probability bins of each input's normal
/// variate, less its bias (B - 1)/n under no effect), largest first. The binned samples are
/// those of the first [`crate::engine::SENSITIVITY_BLOCKS`] blocks.
fn shares(inputs: &[Input], t: &Tally) -> (Vec<InputShare>, Option<f64>) {
    if inputs.is_empty() {
        return (Vec::new(), None);
    }
    // The binned samples (the first blocks only; every input's bins hold the same samples).
    let n_binned: u64 = t.bin_n[..BINS].iter().sum();
    let inside_binned: u64 = t.bin_inside[..BINS].iter().sum();
    let minority = inside_binned.min(n_binned - inside_binned);
    if minority < MIN_MINORITY {
        return (Vec::new(), None);
    }
    let n = n_binned as f64;
    let mean = inside_binned as f64 / n;
    let var = mean * (1.0 - mean);
    let mut out: Vec<(usize, f64)> = (0..inputs.len())
        .map(|i| {
            let mut between = 0.0;
            for b in 0..BINS {
                let nb = t.bin_n[i * BINS + b] as f64;
                if nb > 0.0 {
                    let mb = t.bin_inside[i * BINS + b] as f64 / nb;
                    between += nb * (mb - mean) * (mb - mean);
                }
            }
            let s = between / (n * var) - (BINS as f64 - 1.0) / n;
            (i, s.clamp(0.0, 1.0))
        })
        .collect();
    out.sort_by(|a, b| b.1.total_cmp(&a.1).then(a.0.cmp(&b.0)));
    let sum: f64 = out.iter().map(|x| x.1).sum();
    let shares = out
        .into_iter()
        .map(|(i, s)| InputShare {
            input: inputs[i].id.clone(),
            label: inputs[i].label.clone(),
            share: s,
        })
        .collect();
    (shares, Some((1.0 - sum).max(0.0)))
}

/// "The melting constant N accounts for most of the doubt: a shot near 572 m/s at 10 deg
/// (where the melting limit lies) would narrow it."
fn doubt_sentence(
    window: &PairWindow,
    setup: &oblique_core::PairSetup,
    engine: &Engine<'_>,
    point: &Point,
    c: &oblique_window::Classification,
    dominant: &[InputShare],
    tally: &Tally,
) -> String {
    let Some(top) = dominant.first() else {
        return if tally.inside == tally.n || tally.inside == 0 || engine.inputs.is_empty() {
            format!(
                "the verdict does not change over the {} samples: no sampled input moved the point across a limit",
                tally.n
            )
        } else {
            "the verdict changes in too few samples to share the doubt among the inputs".into()
        };
    };
    if top.share < 0.05 {
        // The first-order shares do not tell the inputs apart: inputs acting only together, or
        // a verdict that changes so rarely (in both tails of an input, say) that the binned
        // estimate of the shares is lost in its noise. Say so rather than name a leader.
        return format!(
            "the first-order shares do not single out an input (the largest, {}, {:.0} %): the verdict changes only in combinations of inputs or too rarely for the shares to be estimated; the failure probability per limit above says which limits are at stake",
            top.label,
            100.0 * top.share
        );
    }
    let amount = if top.share >= 0.5 {
        "most of the doubt".to_string()
    } else {
        format!(
            "the largest share of the doubt ({:.0} %)",
            100.0 * top.share
        )
    };
    let Some(input) = engine.inputs.iter().find(|i| i.id == top.input) else {
        return String::new();
    };
    let beta = point.angle_rad.to_degrees();
    let span = oblique_window::classify::domain_span_of(window, setup, c, point.convention);
    let reached = |id: CriterionId| {
        Some(headroom(
            window,
            setup,
            c,
            &LimitRef::Criterion(id),
            point.convention,
            &span,
        ))
    };
    let action = match input.kind {
        InputKind::Velocity => "measuring the set-up's impact velocity (for example by photon Doppler velocimetry on a trial shot) or a steadier set-up would narrow it".to_string(),
        InputKind::Angle => "a better-known collision angle (measured on sectioned trials or from a tighter taper) would narrow it".to_string(),
        InputKind::Property { .. } => format!("a measured value for the actual stock (the batch certificate, a hardness or tensile test) would narrow it ({})", input.label),
        InputKind::Constant { constant } => {
            let h = reached(constant.criterion());
            let limit = match constant {
                Constant::DeribasK => "Deribas",
                Constant::WittmanN => "melting",
                Constant::HelMultiple => "pressure",
                Constant::JettingFactor => "jetting",
            };
            let outcome = if constant == Constant::WittmanN {
                "melted-or-welded"
            } else {
                "welded-or-not"
            };
            let by_velocity = h.and_then(|h| h.velocity_m_s).map(|v| {
                format!("a {outcome} shot near {v:.0} m/s at {beta:.1} deg (where the {limit} limit lies at this angle) would narrow it")
            });
            let by_angle = h.and_then(|h| h.angle_deg).map(|a| {
                format!("a {outcome} shot near {a:.1} deg at {:.0} m/s (where the {limit} limit lies at this velocity) would narrow it", point.velocity_m_s())
            });
            let prefer_velocity = matches!(constant, Constant::WittmanN | Constant::HelMultiple);
            let (first, second) = if prefer_velocity {
                (by_velocity, by_angle)
            } else {
                (by_angle, by_velocity)
            };
            first
                .or(second)
                .unwrap_or_else(|| format!("trials at the edge of the {limit} limit would narrow it"))
        }
    };
    let who = match input.kind {
        InputKind::Velocity => "the scatter of the velocity".to_string(),
        InputKind::Angle => "the scatter of the collision angle".to_string(),
        InputKind::Constant { constant } => constant.words().to_string(),
        InputKind::Property { .. } => format!("the {}", input.label),
    };
    format!("{who} accounts for {amount}: {action}")
}

impl WeldProbability {
    /// The `probability` object of the JSON outputs.
    pub fn json(&self) -> serde_json::Value {
        let failure: serde_json::Map<String, serde_json::Value> = self
            .criteria_failure
            .iter()
            .map(|f| (f.limit.clone(), serde_json::json!(f.probability)))
            .collect();
        serde_json::json!({
            "inside": self.inside,
            "standard_error": self.standard_error,
            "samples": self.samples,
            "seed": self.seed,
            "criteria_failure": failure,
            "no_collision": self.no_collision,
            "outside_trial_data": self.outside_trial_data,
            "dominant_inputs": self.dominant_inputs.iter().map(|d| serde_json::json!({
                "input": d.input, "label": d.label, "share": d.share,
            })).collect::<Vec<_>>(),
            "interactions": self.interactions,
            "doubt": self.doubt,
            "scatter": {
                "velocity_sd": self.scatter.velocity,
                "angle_sd_deg": self.scatter.angle.map(|a| a.degrees()),
                "model_uncertainty": self.scatter.model,
            },
            "inputs": self.inputs.iter().map(|i| serde_json::json!({
                "input": i.id, "label": i.label, "distribution": i.distribution,
                "unit": i.unit, "basis": i.basis,
            })).collect::<Vec<_>>(),
            "nominal_inside": self.nominal_inside,
            "fitted": self.fitted,
            "not_covered": self.not_covered,
            "caution": self.caution,
        })
    }

    /// The probability as a step of a worked example (`oblique explain` with scatter flags):
    /// the same lines `check` prints under its table, the probability and its standard error as
    /// results.
    #[must_use]
    pub fn explain_step(&self) -> oblique_window::explain::Step {
        oblique_window::explain::Step {
            key: "weld-probability".into(),
            title: "Weld probability under the stated scatter".into(),
            relation: "draw the velocity and the angle from their stated scatter, and (model uncertainty on) the criterion constants and the material values from their documented distributions; the probability is the share of draws inside the window".into(),
            formula: vec![
                "P(weld) = n_inside / n,  standard error sqrt(P (1 - P) / n)".into(),
            ],
            numbers: self.text().lines().map(|l| l.trim_start().to_string()).collect(),
            results: vec![
                oblique_window::explain::Figure {
                    key: "probability.inside".into(),
                    value: Some(self.inside),
                    text: percent(self.inside),
                    ..oblique_window::explain::Figure::default()
                },
                oblique_window::explain::Figure {
                    key: "probability.standard_error".into(),
                    value: Some(self.standard_error),
                    text: percent(self.standard_error),
                    ..oblique_window::explain::Figure::default()
                },
            ],
            source: "docs/theory.md §15 (sampling, the distribution and basis of every input)".into(),
            mark: "conditional on the model and the stated distributions".into(),
            ..oblique_window::explain::Step::default()
        }
    }

    /// The human text (a block under the check's table).
    pub fn text(&self) -> String {
        let mut s = String::new();
        s.push_str(&format!(
            "weld probability: {} (standard error {}, {} samples, seed {})\n",
            percent(self.inside),
            percent(self.standard_error),
            self.samples,
            self.seed
        ));
        if self.samples > 0 && (self.inside == 0.0 || self.inside == 1.0) {
            // Every sample on one side: the binomial standard error is zero, which says nothing
            // of how rare the other side may be. The rule of three bounds it (Hanley and
            // Lippman-Hand 1983, JAMA 249:1743, cited from memory: p < 3/n at 95 % when 0 of n
            // occur).
            s.push_str(&format!(
                "  every sample fell on one side: the other side's probability is below {} (95 %, rule of three: 3 / samples)\n",
                percent((3.0 / self.samples as f64).min(1.0))
            ));
        }
        s.push_str(&format!("  scatter: {}\n", self.scatter.text()));
        if let Some(f) = &self.fitted {
            s.push_str(&format!("  constants {f}\n"));
        }
        s.push_str("  failure probability per limit:\n");
        for f in &self.criteria_failure {
            s.push_str(&format!("    {:<42} {}\n", f.limit, percent(f.probability)));
        }
        if self.no_collision > 0.0 {
            s.push_str(&format!(
                "  {} of the samples left the physical range (velocity <= 0 or angle outside (0, 90) deg) and count as not welded\n",
                percent(self.no_collision)
            ));
        }
        if self.outside_trial_data > 0.0 {
            s.push_str(&format!(
                "  {} of the samples lie where a user boundary does not reach (outside the trial data)\n",
                percent(self.outside_trial_data)
            ));
        }
        if !self.dominant_inputs.is_empty() {
            s.push_str("  inputs that dominate the doubt (share of the verdict's variance):\n");
            for d in self.dominant_inputs.iter().take(5) {
                s.push_str(&format!("    {:<52} {:.0} %\n", d.label, 100.0 * d.share));
            }
            if let Some(i) = self.interactions {
                s.push_str(&format!(
                    "    {:<52} {:.0} %\n",
                    "(only combinations of inputs)",
                    100.0 * i
                ));
            }
        }
        s.push_str(&format!("  {}\n", self.doubt));
        s.push_str("  not covered by this probability:\n");
        for n in &self.not_covered {
            s.push_str(&format!("    - {n}\n"));
        }
        s.push_str(&format!("  {}\n", self.caution));
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scatter::VelocitySpread;
    use oblique_core::units::{Angle, Velocity};
    use oblique_core::Convention;
    use std::num::NonZeroUsize;

    fn demo() -> PairWindow {
        let lib = oblique_window::Library::load(&[]).expect("library");
        lib.pair("demo-al6061-on-cu").expect("demo").clone()
    }

    fn at(v: f64, a: f64) -> Point {
        Point::impact(
            Convention::NormalToFlyer,
            Velocity::from_m_s(v),
            Angle::from_degrees(a),
        )
    }

    fn sampling(n: usize, threads: usize) -> Sampling {
        Sampling {
            samples: n,
            seed: 3,
            threads: NonZeroUsize::new(threads),
        }
    }

    /// Far inside (the middle of the demo window, several standard deviations of the stated
    /// scatter from every limit): above 0.99. With model uncertainty on, the constants' own
    /// spread (Deribas k 17 %) lowers it, and the test says by how much it may.
    #[test]
    fn far_inside_with_small_scatter_is_above_0_99() {
        let w = demo();
        let s = Scatter {
            velocity: Some(VelocitySpread::Relative(0.02)),
            angle: Some(Angle::from_degrees(0.5)),
            model: false,
        };
        let p = weld_probability(&w, &at(500.0, 14.0), &s, &sampling(20_000, 2)).expect("p");
        assert!(p.nominal_inside);
        assert!(p.inside > 0.99, "{}", p.inside);
        let with_model = weld_probability(
            &w,
            &at(500.0, 14.0),
            &Scatter { model: true, ..s },
            &sampling(20_000, 2),
        )
        .expect("p");
        assert!(
            with_model.inside > 0.8 && with_model.inside <= p.inside,
            "{}",
            with_model.inside
        );
    }

    /// On the Deribas lower limit (at 14 deg the impact velocity where it is reached, from the
    /// window crate's headroom search), with symmetric velocity scatter, model uncertainty off
    /// and every other limit far away: every lower limit falls as the velocity rises, so the
    /// point is inside exactly when the sampled velocity is above the limit: one half.
    #[test]
    fn exactly_on_a_lower_limit_gives_one_half() {
        let mut w = demo();
        w.boundaries.clear();
        let setup = w.setup().expect("setup");
        let nominal = at(450.0, 14.0).collision(w.convention).expect("collision");
        let c = classify(&w, &setup, &nominal).expect("classify");
        let span = oblique_window::classify::domain_span_of(&w, &setup, &c, w.convention);
        let v = headroom(
            &w,
            &setup,
            &c,
            &LimitRef::Criterion(CriterionId::DeribasLower),
            w.convention,
            &span,
        )
        .velocity_m_s
        .expect("Deribas reached");
        let s = Scatter {
            velocity: Some(VelocitySpread::Relative(0.03)),
            angle: None,
            model: false,
        };
        let p = weld_probability(&w, &at(v, 14.0), &s, &sampling(40_000, 2)).expect("p");
        let deribas = p
            .criteria_failure
            .iter()
            .find(|f| f.limit == "deribas-lower")
            .expect("deribas");
        assert!(
            (p.inside - 0.5).abs() < 3.0 * p.standard_error,
            "{} +- {}",
            p.inside,
            p.standard_error
        );
        assert!((deribas.probability - (1.0 - p.inside)).abs() < 1e-12);
        assert_eq!(p.dominant_inputs[0].input, "velocity");
        assert!(p.dominant_inputs[0].share > 0.9, "{:?}", p.dominant_inputs);
    }

    #[test]
    fn same_seed_same_numbers_whatever_the_threads() {
        let w = demo();
        let s = Scatter {
            velocity: Some(VelocitySpread::Relative(0.08)),
            angle: Some(Angle::from_degrees(1.0)),
            model: true,
        };
        let a = weld_probability(&w, &at(420.0, 9.0), &s, &sampling(9_000, 1)).expect("a");
        let b = weld_probability(&w, &at(420.0, 9.0), &s, &sampling(9_000, 2)).expect("b");
        let c = weld_probability(&w, &at(420.0, 9.0), &s, &sampling(9_000, 5)).expect("c");
        assert_eq!(a.json(), b.json());
        assert_eq!(a.json(), c.json());
        let other = Sampling {
            seed: 4,
            ..sampling(9_000, 2)
        };
        let d = weld_probability(&w, &at(420.0, 9.0), &s, &other).expect("d");
        assert_ne!(a.inside, d.inside);
    }

    #[test]
    fn no_scatter_gives_the_crisp_verdict() {
        let w = demo();
        let s = Scatter {
            velocity: None,
            angle: None,
            model: false,
        };
        for (v, a) in [(450.0, 12.0), (300.0, 10.0), (700.0, 9.0)] {
            let p = weld_probability(&w, &at(v, a), &s, &sampling(100, 1)).expect("p");
            assert_eq!(
                p.inside,
                if p.nominal_inside { 1.0 } else { 0.0 },
                "{v} {a}"
            );
            assert!(p.dominant_inputs.is_empty());
        }
    }

    #[test]
    fn bad_settings_name_their_flag() {
        let w = demo();
        let s = Scatter {
            velocity: Some(VelocitySpread::Relative(-0.1)),
            angle: None,
            model: true,
        };
        let e = weld_probability(&w, &at(450.0, 12.0), &s, &sampling(100, 1)).unwrap_err();
        assert!(e.to_string().starts_with("--velocity-sd"), "{e}");
        let s = Scatter {
            velocity: None,
            angle: Some(Angle::from_degrees(f64::NAN)),
            model: true,
        };
        let e = weld_probability(&w, &at(450.0, 12.0), &s, &sampling(100, 1)).unwrap_err();
        assert!(e.to_string().starts_with("--angle-sd"), "{e}");
        let s = Scatter {
            velocity: None,
            angle: None,
            model: true,
        };
        let e = weld_probability(&w, &at(450.0, 12.0), &s, &sampling(0, 1)).unwrap_err();
        assert!(e.to_string().starts_with("--samples"), "{e}");
    }

    proptest::proptest! {
        #![proptest_config(proptest::prelude::ProptestConfig::with_cases(12))]
        /// Moving the point further inside across a lower limit (raising the velocity past
        /// the strength floor at a steep angle, same draws) never lowers the probability.
        #[test]
        fn probability_rises_as_the_point_moves_inside(v in 300.0f64..380.0, dv in 1.0f64..40.0) {
            let mut w = demo();
            w.boundaries.clear();
            let s = Scatter { velocity: Some(VelocitySpread::Absolute(15.0)), angle: None, model: true };
            let a = weld_probability(&w, &at(v, 20.0), &s, &sampling(3_000, 1)).expect("a");
            let b = weld_probability(&w, &at(v + dv, 20.0), &s, &sampling(3_000, 1)).expect("b");
            proptest::prop_assert!(b.inside >= a.inside, "{} then {}", a.inside, b.inside);
        }
    }
}
