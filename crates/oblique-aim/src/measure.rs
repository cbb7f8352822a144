//! The room a point keeps to every limit, measured in the user's scatter (docs/theory.md §16).
//!
//! For each limit j (every decisive criterion, every user boundary that spans the point, every
//! bound of the validity domain) the margin m_j at the point (positive
//! on the welding side, in the limit's own unit) is divided by its first-order standard
//! deviation
//!
//! ```text
//! s_j = sqrt((dm_j/dVp sigma_V)^2 + (dm_j/dbeta sigma_beta)^2 + (limit_j sigma_c)^2)
//! ```
//!
//! (the slopes by central differences of the classification itself; sigma_V and sigma_beta the
//! stated scatter; sigma_c the spread of the criterion's constant, docs/theory.md §15.2, when
//! model uncertainty is on: each constant scales its limit, so dm/d(ln c) = -limit). The
//! quotient z_j = m_j / s_j is how many standard deviations of that scatter the point stands
//! from limit j, to first order: the probit argument of the fit's likelihood (§15.3).
//!
//! The measure of a point is its smallest z_j (`z_min`: the nearest limit, in standard
//! deviations of the stated scatter); two points with the same smallest z are told apart by the
//! next smallest, and so on (leximin order, [`compare`]). It is deterministic, never saturates
//! (a probability rounds to 1 far inside the window; z keeps growing), and for two parallel
//! limits under the same scatter its best point is the midpoint in normalised margin. Beside it
//! the first-order probability of keeping every limit, the limits taken as independent,
//! P1 = prod_j Phi(z_j), is reported.

use crate::error::AimResult;
use oblique_confidence::inputs::{constant_distribution, constant_in_use, Distribution};
use oblique_confidence::priors::Constant;
use oblique_confidence::VelocitySpread;
use oblique_core::units::{Angle, Velocity};
use oblique_core::{Collision, Convention, CriterionId, DomainQuantity, PairSetup, ValidityDomain};
use oblique_window::classify::{classify, limit_label, Classification, LimitRef};
use oblique_window::PairWindow;

/// The scatter the room is measured in.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Spread {
    /// One standard deviation of the impact velocity.
    pub velocity: VelocitySpread,
    /// One standard deviation of the collision angle (deg).
    pub angle_deg: f64,
    /// Add the spread of each criterion's constant (docs/theory.md §15.2).
    pub model: bool,
}

impl Spread {
    /// The velocity's standard deviation (m/s) at `vp`.
    #[must_use]
    pub fn velocity_sd(&self, vp: f64) -> f64 {
        self.velocity.at(vp)
    }

    /// In words.
    #[must_use]
    pub fn text(&self) -> String {
        format!(
            "velocity sd {}, angle sd {} deg, constants' spread {}",
            self.velocity.text(),
            oblique_confidence::present::num(self.angle_deg),
            if self.model { "on" } else { "off" }
        )
    }
}

/// What a limit of the measure is.
#[derive(Debug, Clone, PartialEq)]
pub enum Kind {
    /// A decisive criterion or a user boundary, as in a classification.
    Limit(LimitRef),
    /// One end of a validity-domain bound: the quantity, `true` for its upper end.
    Domain(DomainQuantity, bool),
}

/// The room to one limit.
#[derive(Debug, Clone, PartialEq)]
pub struct LimitRoom {
    /// What the limit is.
    pub kind: Kind,
    /// Its label.
    pub label: String,
    /// The margin at the point (the limit's unit; positive on the welding side).
    pub margin: f64,
    /// The margin's unit (deg, m/s, Pa, ...).
    pub unit: &'static str,
    /// The margin's first-order standard deviation, same unit.
    pub sd: f64,
    /// margin / sd: standard deviations from the limit.
    pub z: f64,
}

/// The room of a point to every limit.
#[derive(Debug, Clone, PartialEq)]
pub struct Room {
    /// Every limit's room, in order: criteria, boundaries, domain bounds.
    pub limits: Vec<LimitRoom>,
    /// The smallest z (the nearest limit in standard deviations).
    pub z_min: f64,
    /// ln of the first-order probability of keeping every limit.
    pub log_p1: f64,
}

impl Room {
    /// Every z, smallest first: the measure compares these lexicographically (leximin).
    #[must_use]
    pub fn key(&self) -> Vec<f64> {
        let mut z: Vec<f64> = self.limits.iter().map(|l| l.z).collect();
        z.sort_by(f64::total_cmp);
        z
    }

    /// True when this point keeps more room than `other`: a larger smallest z, or on a tie
    /// (to 1e-9 relative) a larger next smallest, and so on.
    #[must_use]
    pub fn better_than(&self, other: &Room) -> bool {
        compare(&self.key(), &other.key()) == std::cmp::Ordering::Greater
    }

    /// The nearest limit in standard deviations.
    #[must_use]
    pub fn nearest(&self) -> Option<&LimitRoom> {
        self.limits.iter().min_by(|a, b| a.z.total_cmp(&b.z))
    }

    /// The first-order probability of keeping every limit.
    #[must_use]
    pub fn p1(&self) -> f64 {
        self.log_p1.exp()
    }
}

/// Leximin order of two sorted z lists: the first entry that differs by more than 1e-9
/// (relative, at least absolute 1e-9) decides.
#[must_use]
pub fn compare(a: &[f64], b: &[f64]) -> std::cmp::Ordering {
    for (x, y) in a.iter().zip(b) {
        if x == y {
            continue;
        }
        let tol = 1e-9 * x.abs().max(y.abs()).max(1.0);
        if x.is_infinite() || y.is_infinite() || (x - y).abs() > tol {
            return x.total_cmp(y);
        }
    }
    a.len().cmp(&b.len()).reverse()
}

/// ln Phi(z), accurate in both tails (erfc from statrs; the asymptotic series below -30).
#[must_use]
pub fn ln_phi(z: f64) -> f64 {
    use statrs::function::erf::erfc;
    if z.is_nan() {
        return f64::NEG_INFINITY;
    }
    if z == f64::INFINITY {
        return 0.0;
    }
    if z > 0.0 {
        (-0.5 * erfc(z / std::f64::consts::SQRT_2)).ln_1p()
    } else if z > -30.0 {
        (0.5 * erfc(-z / std::f64::consts::SQRT_2)).ln()
    } else {
        // Mills ratio: Phi(z) ~ phi(z) / |z| (1 - 1/z^2).
        -0.5 * z * z - (-z).ln() - 0.5 * (2.0 * std::f64::consts::PI).ln()
            + (1.0 - 1.0 / (z * z)).ln()
    }
}

/// Every raw margin of a classification, by kind, with its unit and (for criteria) its limit.
fn margins(
    window: &PairWindow,
    setup: &PairSetup,
    c: &Classification,
) -> Vec<(Kind, f64, &'static str, f64)> {
    let mut out = Vec::new();
    for r in c.evaluation.criteria.iter().filter(|r| !r.informational) {
        out.push((
            Kind::Limit(LimitRef::Criterion(r.id)),
            r.margin,
            r.unit,
            r.limit,
        ));
    }
    let col = &c.evaluation.collision;
    for (i, r) in c.boundaries.iter().enumerate() {
        if let (Some(m), Some(l)) = (r.margin, r.limit) {
            out.push((Kind::Limit(LimitRef::Boundary(i)), m, r.unit, l));
        }
    }
    for b in &window.domain.bounds {
        if b.quantity == DomainQuantity::FlyerThickness {
            continue;
        }
        let (v, lo, hi) = ValidityDomain::raw(b, setup, col);
        let unit = match b.quantity {
            DomainQuantity::CollisionAngle => "deg",
            _ => "m/s",
        };
        if lo.is_finite() && lo > 0.0 {
            out.push((Kind::Domain(b.quantity, false), v - lo, unit, lo));
        }
        if hi.is_finite() {
            out.push((Kind::Domain(b.quantity, true), hi - v, unit, hi));
        }
    }
    out
}

/// The relative spread (log sd, the dangerous side) of a criterion's constant in `window`.
fn constant_spread(window: &PairWindow, id: CriterionId) -> f64 {
    let constant = match id {
        CriterionId::DeribasLower => Constant::DeribasK,
        CriterionId::MeltingUpper => Constant::WittmanN,
        CriterionId::PressureLower => Constant::HelMultiple,
        CriterionId::Jetting => Constant::JettingFactor,
        _ => return 0.0,
    };
    let in_use = constant_in_use(window, constant);
    // A larger constant moves each of these limits against the weld (k, m and the jetting
    // factor raise a floor; N lowers the ceiling): the spread above the value in use counts.
    match constant_distribution(window, constant, in_use).0 {
        Distribution::LogNormal { sigma, .. } => sigma,
        Distribution::SplitLogNormal { above, .. } => above,
        Distribution::Normal { sd, .. } => sd / in_use.abs().max(f64::MIN_POSITIVE),
    }
}

fn label(window: &PairWindow, kind: &Kind) -> String {
    match kind {
        Kind::Limit(l) => limit_label(window, l),
        Kind::Domain(q, upper) => format!(
            "validity domain: {} {}",
            q.label(),
            if *upper { "maximum" } else { "minimum" }
        ),
    }
}

/// The point (vp in `convention`, m/s; beta in deg) classified as `check` classifies it.
///
/// # Errors
/// A point the physics refuses.
pub fn classify_point(
    window: &PairWindow,
    setup: &PairSetup,
    convention: Convention,
    vp: f64,
    beta_deg: f64,
) -> AimResult<Classification> {
    let col = Collision::from_impact(
        convention,
        Velocity::from_m_s(vp),
        Angle::from_degrees(beta_deg),
    )?;
    Ok(classify(window, setup, &col)?)
}

/// The room of the point (vp, beta) to every limit under `spread`.
///
/// # Errors
/// A point the physics refuses.
pub fn room(
    window: &PairWindow,
    setup: &PairSetup,
    convention: Convention,
    vp: f64,
    beta_deg: f64,
    spread: &Spread,
) -> AimResult<Room> {
    let c = classify_point(window, setup, convention, vp, beta_deg)?;
    room_of(window, setup, convention, &c, vp, beta_deg, spread)
}

/// As [`room`], with the point's classification already made.
///
/// # Errors
/// A neighbouring point the physics refuses.
pub fn room_of(
    window: &PairWindow,
    setup: &PairSetup,
    convention: Convention,
    c: &Classification,
    vp: f64,
    beta_deg: f64,
    spread: &Spread,
) -> AimResult<Room> {
    let here = margins(window, setup, c);
    let dv = 2e-3 * vp;
    let db = 0.01f64.min(0.25 * beta_deg);
    let at = |v: f64, b: f64| -> Option<Vec<(Kind, f64, &'static str, f64)>> {
        classify_point(window, setup, convention, v, b)
            .ok()
            .map(|k| margins(window, setup, &k))
    };
    let (vplus, vminus) = (at(vp + dv, beta_deg), at(vp - dv, beta_deg));
    let (bplus, bminus) = (at(vp, beta_deg + db), at(vp, beta_deg - db));
    let find = |set: &Option<Vec<(Kind, f64, &'static str, f64)>>, k: &Kind| {
        set.as_ref()
            .and_then(|s| s.iter().find(|x| x.0 == *k).map(|x| x.1))
    };
    // A central difference where both neighbours have the margin, else one-sided.
    let slope = |k: &Kind, m: f64, plus: &Option<_>, minus: &Option<_>, h: f64| -> f64 {
        match (find(plus, k), find(minus, k)) {
            (Some(p), Some(q)) => (p - q) / (2.0 * h),
            (Some(p), None) => (p - m) / h,
            (None, Some(q)) => (m - q) / h,
            (None, None) => 0.0,
        }
    };
    let sv = spread.velocity_sd(vp);
    let sb = spread.angle_deg;
    let mut limits = Vec::with_capacity(here.len());
    for (kind, m, unit, limit) in here {
        let gv = slope(&kind, m, &vplus, &vminus, dv);
        let gb = slope(&kind, m, &bplus, &bminus, db);
        let model = match (&kind, spread.model) {
            (Kind::Limit(LimitRef::Criterion(id)), true) => limit * constant_spread(window, *id),
            _ => 0.0,
        };
        let sd = ((gv * sv).powi(2) + (gb * sb).powi(2) + model.powi(2)).sqrt();
        let z = if sd > 0.0 {
            m / sd
        } else if m >= 0.0 {
            f64::INFINITY
        } else {
            f64::NEG_INFINITY
        };
        limits.push(LimitRoom {
            label: label(window, &kind),
            kind,
            margin: m,
            unit,
            sd,
            z,
        });
    }
    let z_min = limits.iter().map(|l| l.z).fold(f64::INFINITY, f64::min);
    let log_p1 = limits.iter().map(|l| ln_phi(l.z)).sum();
    Ok(Room {
        limits,
        z_min,
        log_p1,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ln_phi_in_both_tails() {
        // Phi(0) = 1/2, Phi(-1.959964) = 0.025 (normal tables, e.g. NIST/SEMATECH 1.3.6.7.1).
        assert!((ln_phi(0.0) - 0.5f64.ln()).abs() < 1e-12);
        assert!((ln_phi(-1.959964) - 0.025f64.ln()).abs() < 1e-6);
        // Far in the upper tail ln Phi(z) = -Q(z) without loss: Q(10) = 7.6199e-24.
        assert!((ln_phi(10.0) + 7.6199e-24).abs() < 1e-27);
        // The asymptotic series joins the direct form near -30.
        let a = (0.5 * statrs::function::erf::erfc(29.9 / std::f64::consts::SQRT_2)).ln();
        assert!((ln_phi(-29.9) - a).abs() < 1e-9);
        assert!((ln_phi(-30.1) - ln_phi(-29.9)).abs() < 7.0);
    }
}
