//! The next trial shots: the points (velocity, angle) whose outcome would tell most about the
//! fitted constants (docs/theory.md §15.4).
//!
//! The constants are drawn from their fit (a log-normal on each side of the estimate with the
//! interval's width; the prior spread on a side the trials do not bound). For a planned shot
//! with the scatter of a measured trial, each draw gives the probabilities of welded,
//! not-welded and melted (the likelihood of `fit`). A shot's value is the mutual information
//! between its outcome and the constants, H(mean over draws of p) - mean over draws of H(p)
//! (the "disagreement" criterion of Houlsby et al. 2011, Bayesian active learning, from
//! memory): high where the draws disagree about the outcome, low where they agree or where
//! each draw is itself unsure. Shots are chosen one at a time from a grid over the range, the
//! later ones averaged over the outcomes the earlier ones may have (each outcome reweights the
//! draws as Bayes' rule does), so the set does not repeat one question.

use crate::error::{ConfidenceError, ConfidenceResult};
use crate::fit::{fit, outcome_terms, FitResult, FitSettings, TermBuilder, Terms};
use crate::inputs::constant_in_use;
use crate::present::num;
use crate::priors::{self, Constant};
use oblique_window::{Outcome, PairWindow};
use rand::{RngExt, SeedableRng};
use serde::Serialize;

/// The most shots one request may ask for.
pub const MAX_COUNT: usize = 10;
/// Draws of the constants.
const DRAWS: usize = 256;
/// Candidate grid per axis.
const GRID: usize = 25;
/// The most outcome branches kept while choosing later shots.
const MAX_BRANCHES: usize = 81;

/// What to search.
#[derive(Debug, Clone, PartialEq)]
pub struct NextShotSettings {
    /// How many shots (1 to [`MAX_COUNT`]).
    pub count: usize,
    /// Impact velocity range (m/s, the window's convention); `None`: the trials' span widened
    /// by a fifth on each side.
    pub velocity_m_s: Option<(f64, f64)>,
    /// Angle range (deg); `None`: the trials' span widened by 2 deg on each side.
    pub angle_deg: Option<(f64, f64)>,
    /// Seed of the draws of the constants.
    pub seed: u64,
}

impl Default for NextShotSettings {
    fn default() -> Self {
        Self {
            count: 3,
            velocity_m_s: None,
            angle_deg: None,
            seed: crate::scatter::DEFAULT_SEED,
        }
    }
}

/// One proposed shot.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Shot {
    /// Impact velocity (m/s, the window's convention).
    pub velocity_m_s: f64,
    /// Collision angle (deg).
    pub angle_deg: f64,
    /// Why, in words.
    pub reason: String,
    /// Expected information about the constants (bits), given the shots before it.
    pub information_bits: f64,
    /// Predicted probabilities of welded, not-welded and melted under the fit.
    pub welded: f64,
    /// See `welded`.
    pub not_welded: f64,
    /// See `welded`.
    pub melted: f64,
    /// On an end of the velocity or angle range searched: the information may keep growing
    /// beyond it, so the range should be what the set-up can reach.
    pub at_range_edge: bool,
    /// Beyond the region the trials cover (as `check` says "outside the trial data").
    pub beyond_trials: bool,
}

/// The proposal.
#[derive(Debug, Clone, Serialize)]
pub struct NextShots {
    /// The pair.
    pub pair: String,
    /// The shots, in the order to fire them.
    pub shots: Vec<Shot>,
    /// The velocity range searched (m/s).
    pub velocity_range_m_s: (f64, f64),
    /// The angle range searched (deg).
    pub angle_range_deg: (f64, f64),
    /// The fit the proposal starts from.
    pub fit: FitResult,
}

fn entropy(p: &[f64; 3]) -> f64 {
    p.iter().filter(|x| **x > 0.0).map(|x| -x * x.log2()).sum()
}

/// Propose the next `settings.count` shots for `window`.
///
/// # Errors
/// As [`fit`]; a count or range out of bounds, naming its flag.
pub fn next_shots(window: &PairWindow, settings: &NextShotSettings) -> ConfidenceResult<NextShots> {
    if settings.count == 0 || settings.count > MAX_COUNT {
        return Err(ConfidenceError::invalid(
            "--count",
            format!("{} is outside 1 to {MAX_COUNT}", settings.count),
        ));
    }
    let fitted = fit(window, &FitSettings::default())?;
    let obs = &window.observations;
    let (vmin, vmax) = obs.iter().fold((f64::MAX, 0.0f64), |(a, b), o| {
        (a.min(o.velocity.si()), b.max(o.velocity.si()))
    });
    let (bmin, bmax) = obs.iter().fold((f64::MAX, 0.0f64), |(a, b), o| {
        (a.min(o.angle.degrees()), b.max(o.angle.degrees()))
    });
    let vr = settings.velocity_m_s.unwrap_or((0.8 * vmin, 1.2 * vmax));
    let br = settings
        .angle_deg
        .unwrap_or(((bmin - 2.0).max(0.5), (bmax + 2.0).min(60.0)));
    if !(vr.0 > 0.0 && vr.1 > vr.0 && vr.1.is_finite()) {
        return Err(ConfidenceError::invalid(
            "--velocity-range",
            "needs a low and a high velocity above zero, low below high".to_string(),
        ));
    }
    if !(br.0 > 0.0 && br.1 > br.0 && br.1 < 90.0) {
        return Err(ConfidenceError::invalid(
            "--angle-range",
            "needs a low and a high angle inside (0, 90) deg, low below high".to_string(),
        ));
    }

    // Draws of the constants from the fit.
    let mut rng = rand_pcg::Pcg64::seed_from_u64(settings.seed);
    let z95 = crate::quantile::normal(0.5 + fitted.level / 2.0);
    let draws: Vec<[f64; 3]> = (0..DRAWS)
        .map(|_| {
            let mut c = [
                constant_in_use(window, Constant::DeribasK),
                constant_in_use(window, Constant::WittmanN),
                constant_in_use(window, Constant::HelMultiple),
            ];
            for f in &fitted.constants {
                let prior = f.constant.prior().0;
                let below = f.low.map_or(prior, |l| (f.value / l).ln() / z95).max(1e-6);
                let above = f.high.map_or(prior, |h| (h / f.value).ln() / z95).max(1e-6);
                let z: f64 = rng.sample(rand_distr::StandardNormal);
                let i = match f.constant {
                    Constant::DeribasK => 0,
                    Constant::WittmanN => 1,
                    _ => 2,
                };
                c[i] = f.value * (if z < 0.0 { below } else { above } * z).exp();
            }
            c
        })
        .collect();

    // Candidates and their outcome probabilities per draw.
    let builder = TermBuilder::new(window)?;
    let sd_v = priors::default_velocity_uncertainty("measured");
    let sd_b = priors::default_angle_uncertainty_deg("measured");
    let mut candidates: Vec<(f64, f64, Terms)> = Vec::with_capacity(GRID * GRID);
    for i in 0..GRID {
        let v = vr.0 + (vr.1 - vr.0) * i as f64 / (GRID - 1) as f64;
        for j in 0..GRID {
            let b = br.0 + (br.1 - br.0) * j as f64 / (GRID - 1) as f64;
            candidates.push((v, b, builder.terms(Outcome::Welded, v, b, sd_v * v, sd_b)?));
        }
    }
    let probs: Vec<Vec<[f64; 3]>> = candidates
        .iter()
        .map(|(_, _, t)| {
            draws
                .iter()
                .map(|c| {
                    let (pl, ql, pm, qm) = outcome_terms(t, c);
                    [pl * pm, ql, pl * qm]
                })
                .collect()
        })
        .collect();

    // Greedy choice over outcome branches: (probability of the branch, weights of the draws).
    let mut branches: Vec<(f64, Vec<f64>)> = vec![(1.0, vec![1.0 / DRAWS as f64; DRAWS])];
    let mut chosen: Vec<usize> = Vec::new();
    let mut shots = Vec::new();
    for _ in 0..settings.count {
        let mut best: Option<(usize, f64)> = None;
        for (x, px) in probs.iter().enumerate() {
            if chosen.contains(&x) {
                continue;
            }
            let mut gain = 0.0;
            for (pi, w) in &branches {
                let mut mean = [0.0; 3];
                let mut cond = 0.0;
                for (p, ws) in px.iter().zip(w) {
                    for k in 0..3 {
                        mean[k] += ws * p[k];
                    }
                    cond += ws * entropy(p);
                }
                gain += pi * (entropy(&mean) - cond);
            }
            if best.is_none_or(|(_, g)| gain > g + 1e-12) {
                best = Some((x, gain));
            }
        }
        let Some((x, gain)) = best else { break };
        chosen.push(x);
        // Predicted outcome probabilities under the current (first-branch-averaged) draws.
        let mut mean = [0.0; 3];
        for (pi, w) in &branches {
            for (p, ws) in probs[x].iter().zip(w) {
                for k in 0..3 {
                    mean[k] += pi * ws * p[k];
                }
            }
        }
        let (v, b, t) = &candidates[x];
        let (i, j) = (x / GRID, x % GRID);
        shots.push(Shot {
            velocity_m_s: *v,
            angle_deg: *b,
            reason: reason(t, &draws, &fitted, gain),
            information_bits: gain,
            welded: mean[0],
            not_welded: mean[1],
            melted: mean[2],
            at_range_edge: i == 0 || i == GRID - 1 || j == 0 || j == GRID - 1,
            beyond_trials: oblique_window::trials::trials_near(window, *v, *b, window.convention)
                .is_some_and(|t| t.beyond_trials),
        });
        // Branch on the outcome of the chosen shot.
        let mut next = Vec::new();
        for (pi, w) in &branches {
            for k in 0..3 {
                let py: f64 = probs[x].iter().zip(w).map(|(p, ws)| ws * p[k]).sum();
                if py * pi < 1e-4 {
                    continue;
                }
                let nw: Vec<f64> = probs[x]
                    .iter()
                    .zip(w)
                    .map(|(p, ws)| ws * p[k] / py)
                    .collect();
                next.push((pi * py, nw));
            }
        }
        next.sort_by(|a, b| b.0.total_cmp(&a.0));
        next.truncate(MAX_BRANCHES);
        let total: f64 = next.iter().map(|b| b.0).sum();
        for b in &mut next {
            b.0 /= total;
        }
        branches = next;
    }
    Ok(NextShots {
        pair: window.name.clone(),
        shots,
        velocity_range_m_s: vr,
        angle_range_deg: br,
        fit: fitted,
    })
}

/// Which limit the shot sits on (the one whose verdict the draws are least sure of), and what
/// it would tell.
fn reason(t: &Terms, draws: &[[f64; 3]], fitted: &FitResult, gain: f64) -> String {
    let one = |c: &[f64; 3], which: usize| -> f64 {
        // The probability that only the named limit holds, from a terms copy with only it on.
        let mut only = t.clone();
        if which != 0 {
            only.deribas = None;
        }
        if which != 1 {
            only.melting = None;
        }
        only.strength = None;
        only.pressure = None;
        only.jetting = None;
        let (pl, _, pm, _) = outcome_terms(&only, c);
        pl * pm
    };
    let mut best = (None, 0.0);
    for f in &fitted.constants {
        let which = match f.constant {
            Constant::DeribasK => 0,
            Constant::WittmanN => 1,
            _ => continue,
        };
        let p: f64 = draws.iter().map(|c| one(c, which)).sum::<f64>() / draws.len() as f64;
        let doubt = p * (1.0 - p);
        if doubt > best.1 {
            best = (Some((f.constant, p)), doubt);
        }
    }
    match best.0 {
        Some((c, p)) => format!(
            "on the edge of the {} limit: it holds with probability {:.0} % under the fitted {}; expected information {:.2} bit",
            match c {
                Constant::DeribasK => "Deribas",
                _ => "melting",
            },
            100.0 * p,
            c.key(),
            gain
        ),
        None => format!("the fitted constants disagree most here; expected information {gain:.2} bit"),
    }
}

impl NextShots {
    /// The JSON of `pair next-shot --json`.
    pub fn json(&self) -> serde_json::Value {
        serde_json::json!({
            "pair": self.pair,
            "shots": self.shots,
            "velocity_range_m_s": [self.velocity_range_m_s.0, self.velocity_range_m_s.1],
            "angle_range_deg": [self.angle_range_deg.0, self.angle_range_deg.1],
            "fit": self.fit.json(),
            "method": "mutual information between a planned shot's outcome and the fitted constants (docs/theory.md 15.4); later shots averaged over the outcomes of the earlier ones",
            "caution": crate::present::CAUTION,
        })
    }

    /// The human text.
    pub fn text(&self) -> String {
        let mut s = format!(
            "pair '{}': the next {} shot(s) that would tell most about the fitted constants\n  searched: {}-{} m/s, {}-{} deg (a planned shot scatters like a measured trial: 3 % in velocity, 1 deg in angle)\n\n",
            self.pair,
            self.shots.len(),
            num(self.velocity_range_m_s.0),
            num(self.velocity_range_m_s.1),
            num(self.angle_range_deg.0),
            num(self.angle_range_deg.1),
        );
        for (i, sh) in self.shots.iter().enumerate() {
            s.push_str(&format!(
                "  {}. {:.0} m/s at {:.1} deg: predicted welded {:.0} %, not welded {:.0} %, melted {:.0} %\n     {}\n",
                i + 1,
                sh.velocity_m_s,
                sh.angle_deg,
                100.0 * sh.welded,
                100.0 * sh.not_welded,
                100.0 * sh.melted,
                sh.reason
            ));
            if sh.at_range_edge {
                s.push_str("     on an end of the range searched: the information may keep growing beyond it (optimal shots often lie at the extremes); give --velocity-range and --angle-range what the set-up can reach\n");
            }
            if sh.beyond_trials {
                s.push_str("     outside the trial data: no trial was fired near it; plan it where the set-up is known to be safe\n");
            }
        }
        s.push_str("\n  The fit these shots start from:\n");
        for c in &self.fit.constants {
            s.push_str(&format!(
                "    {} {} ({} % interval {})\n",
                c.constant.key(),
                num(c.value),
                num(100.0 * self.fit.level),
                crate::present::interval(c.low, c.high)
            ));
        }
        s.push_str(&format!("  {}\n", crate::present::CAUTION));
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn demo() -> PairWindow {
        let lib = oblique_window::Library::load(&[]).expect("library");
        lib.pair("demo-al6061-on-cu").expect("demo").clone()
    }

    #[test]
    fn proposes_distinct_shots_inside_the_range() {
        let w = demo();
        let s = NextShotSettings {
            count: 3,
            velocity_m_s: Some((350.0, 700.0)),
            angle_deg: Some((4.0, 20.0)),
            seed: 1,
        };
        let r = next_shots(&w, &s).expect("shots");
        assert_eq!(r.shots.len(), 3);
        for sh in &r.shots {
            assert!((350.0..=700.0).contains(&sh.velocity_m_s));
            assert!((4.0..=20.0).contains(&sh.angle_deg));
            assert!(sh.information_bits > 0.0);
            assert!((sh.welded + sh.not_welded + sh.melted - 1.0).abs() < 1e-9);
            let edge = [350.0, 700.0].contains(&sh.velocity_m_s)
                || [4.0, 20.0].iter().any(|e| (sh.angle_deg - e).abs() < 1e-9);
            assert_eq!(sh.at_range_edge, edge, "{sh:?}");
            let beyond = oblique_window::trials::trials_near(
                &w,
                sh.velocity_m_s,
                sh.angle_deg,
                w.convention,
            )
            .is_some_and(|t| t.beyond_trials);
            assert_eq!(sh.beyond_trials, beyond, "{sh:?}");
        }
        assert_ne!(
            (r.shots[0].velocity_m_s, r.shots[0].angle_deg),
            (r.shots[1].velocity_m_s, r.shots[1].angle_deg)
        );
        // The first shot is the most informative.
        assert!(r.shots[0].information_bits >= r.shots[1].information_bits - 1e-9);
    }

    #[test]
    fn bad_count_names_the_flag() {
        let e = next_shots(
            &demo(),
            &NextShotSettings {
                count: 0,
                ..NextShotSettings::default()
            },
        )
        .unwrap_err();
        assert!(e.to_string().starts_with("--count"), "{e}");
    }
}
