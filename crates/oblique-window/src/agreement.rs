//! Agreement of a window with its own trials: predicted against observed outcome for every
//! observation, and which limit misjudged each disagreeing one.
//!
//! Rules (documented in docs/theory.md §8.3): `welded`, `not-welded` and `melted` agree with
//! the prediction of the same word; `partial` agrees when the point lies near the window edge,
//! that is when the binding limit's relative margin is within [`PARTIAL_EDGE_BAND`]. A trial
//! outside the validity domain is neither agreement nor disagreement: the window claims no
//! verdict there; such trials are counted and listed apart.

use crate::classify::{classify, limit_label, LimitRef, Prediction};
use crate::pair::{Outcome, PairWindow};
use oblique_core::{Collision, CriterionId, PhysicsError};
use serde::Serialize;
use std::collections::BTreeMap;

/// A partial weld agrees with the window when the binding relative margin is within this band.
pub const PARTIAL_EDGE_BAND: f64 = 0.10;

/// One observation that the window misjudges.
#[derive(Debug, Clone, Serialize)]
pub struct Disagreement {
    /// Index in the file's observation list.
    pub index: usize,
    /// The shot's number as every view shows it (`index` + 1).
    pub shot: usize,
    /// Impact velocity, m/s.
    pub velocity_m_s: f64,
    /// Collision angle, deg.
    pub angle_deg: f64,
    /// Observed outcome.
    pub observed: Outcome,
    /// Predicted outcome.
    pub predicted: Prediction,
    /// The observation's source.
    pub source: String,
    /// The limit(s) that misjudged it, by label (criterion id or boundary label).
    pub misjudged_by: Vec<String>,
    /// In words.
    pub explanation: String,
}

/// A trial outside the validity domain (no verdict claimed there).
#[derive(Debug, Clone, Serialize)]
pub struct OutsideDomainTrial {
    /// Index in the file's observation list.
    pub index: usize,
    /// The shot's number as every view shows it (`index` + 1).
    pub shot: usize,
    /// Impact velocity, m/s.
    pub velocity_m_s: f64,
    /// Collision angle, deg.
    pub angle_deg: f64,
    /// Observed outcome.
    pub observed: Outcome,
    /// The bounds it misses, in words.
    pub exits: String,
}

/// The agreement report.
#[derive(Debug, Clone, Serialize)]
pub struct Agreement {
    /// Number of observations.
    pub observations: usize,
    /// Number that agree (among the trials inside the validity domain).
    pub agreeing: usize,
    /// Trials outside the validity domain: neither agreeing nor disagreeing.
    pub outside_domain: Vec<OutsideDomainTrial>,
    /// predicted -> observed -> count.
    pub table: BTreeMap<&'static str, BTreeMap<&'static str, usize>>,
    /// Each disagreeing observation.
    pub disagreements: Vec<Disagreement>,
    /// The rule used for partial welds.
    pub partial_rule: String,
}

/// Compare the window's predictions with its observations.
///
/// # Errors
/// [`PhysicsError`] when an observation cannot be evaluated.
pub fn agreement(window: &PairWindow) -> Result<Agreement, PhysicsError> {
    let setup = window.setup()?;
    let mut table: BTreeMap<&'static str, BTreeMap<&'static str, usize>> = BTreeMap::new();
    // A trial has a collision angle above zero (the file refuses 0), so never head-on.
    for p in Prediction::ALL
        .into_iter()
        .filter(|p| *p != Prediction::HeadOn)
    {
        let row = table.entry(p.as_str()).or_default();
        for o in Outcome::ALL {
            row.insert(o.as_str(), 0);
        }
    }
    let mut agreeing = 0;
    let mut disagreements = Vec::new();
    let mut outside_domain = Vec::new();
    for obs in &window.observations {
        let collision = Collision::from_impact(window.convention, obs.velocity, obs.angle)?;
        let c = classify(window, &setup, &collision)?;
        *table
            .entry(c.prediction.as_str())
            .or_default()
            .entry(obs.outcome.as_str())
            .or_default() += 1;
        if c.prediction == Prediction::OutsideDomain {
            outside_domain.push(OutsideDomainTrial {
                index: obs.index,
                shot: obs.index + 1,
                velocity_m_s: obs.velocity.si(),
                angle_deg: obs.angle.degrees(),
                observed: obs.outcome,
                exits: c.domain.exits_text(),
            });
            continue;
        }
        let near_edge = c
            .binding_relative_margin
            .is_some_and(|m| m.abs() <= PARTIAL_EDGE_BAND);
        let agrees = match obs.outcome {
            Outcome::Welded => c.prediction == Prediction::Welded,
            Outcome::NotWelded => c.prediction == Prediction::NotWelded,
            Outcome::Melted => c.prediction == Prediction::Melted,
            Outcome::Partial => near_edge,
        };
        if agrees {
            agreeing += 1;
            continue;
        }
        let melting_on = window.criteria.melting_enabled;
        let (misjudged, explanation): (Vec<LimitRef>, String) = match (obs.outcome, c.prediction) {
            (Outcome::Welded, _) => (
                c.failing.clone(),
                "welded in the trial, but these limits exclude it".into(),
            ),
            (Outcome::Melted, Prediction::Welded) if melting_on => (
                vec![LimitRef::Criterion(CriterionId::MeltingUpper)],
                "melted in the trial, but the melting limit lets it through".into(),
            ),
            (Outcome::Melted, _) => (
                c.failing.clone(),
                "melted in the trial, but the window predicts no weld for another reason".into(),
            ),
            (Outcome::NotWelded, Prediction::Melted) => (
                c.failing.clone(),
                "not welded in the trial; the window blames melting".into(),
            ),
            (Outcome::NotWelded, _) | (Outcome::Partial, Prediction::Welded) => (
                c.binding.clone().into_iter().collect(),
                "no limit excludes it; the closest one is named".into(),
            ),
            (Outcome::Partial, _) => (
                c.binding.clone().into_iter().collect(),
                format!(
                    "partial weld, but the point lies more than {:.0} % beyond the binding limit",
                    PARTIAL_EDGE_BAND * 100.0
                ),
            ),
        };
        disagreements.push(Disagreement {
            index: obs.index,
            shot: obs.index + 1,
            velocity_m_s: obs.velocity.si(),
            angle_deg: obs.angle.degrees(),
            observed: obs.outcome,
            predicted: c.prediction,
            source: obs.source.clone(),
            misjudged_by: misjudged.iter().map(|l| limit_label(window, l)).collect(),
            explanation,
        });
    }
    Ok(Agreement {
        observations: window.observations.len(),
        agreeing,
        outside_domain,
        table,
        disagreements,
        partial_rule: format!(
            "a partial weld agrees when the binding limit's relative margin is within +/-{:.0} %",
            PARTIAL_EDGE_BAND * 100.0
        ),
    })
}
