//! The most robust process point of a window: the (impact velocity, collision angle) that keeps
//! the most room to every limit and boundary, measured in the user's scatter
//! ([`crate::measure`]), with its margins as `check` gives them, a ranked list of distinct
//! points, and the region of points that keep at least a given weld probability (the sampled
//! probability of `oblique_confidence`, model uncertainty included unless switched off).
//!
//! Candidates lie inside the window and within the span of every user boundary (inside the
//! trial data: a boundary is never extrapolated, so beyond its points the window's shape there
//! is not known from the trials).
//!
//! The search: a grid over the validity domain (60 angles, 0.5 deg apart; 64 impact velocities,
//! 6 % apart), every node classified as `check` classifies it; the measure at every node inside
//! the window; a compass search from the three best distinct nodes (steps halved down to
//! 0.001 % of the velocity and 0.0001 deg); the best point rounded to 1 m/s and 0.1 deg (what a
//! set-up can be set to) and checked there.

mod present;
mod region;

pub(crate) use present::support as present_support;

use crate::error::{AimError, AimResult};
use crate::measure::{classify_point, compare, room, room_of, Room, Spread};
use oblique_confidence::{Point, Sampling, Scatter, VelocitySpread};
use oblique_core::units::{Angle, Velocity};
use oblique_core::{Convention, DomainQuantity, PairSetup};
use oblique_window::advice::explain_in;
use oblique_window::classify::Classification;
use oblique_window::PairWindow;
pub use region::Region;
use std::cmp::Ordering;

/// Angles of the search grid (deg apart).
const ANGLE_STEP: f64 = 0.5;
/// Velocities of the search grid.
const VELOCITY_NODES: usize = 64;
/// Draws per point of the ranked list's sampled probabilities unless given.
pub const RANK_SAMPLES: usize = 2000;
/// Draws of the best point's sampled probability unless given.
pub const BEST_SAMPLES: usize = 20_000;
/// How far apart (in standard deviations of the stated scatter) the points of the ranked list
/// are at least.
pub const RANK_SEPARATION: f64 = 2.0;
/// The most points of the ranked list.
pub const MAX_TOP: usize = 100;

/// What to aim for.
#[derive(Debug, Clone)]
pub struct AimRequest<'a> {
    /// The window (its convention is the convention of every velocity).
    pub window: &'a PairWindow,
    /// The scatter the room is measured in.
    pub spread: Spread,
    /// How many distinct points to rank (1 to [`MAX_TOP`]).
    pub top: usize,
    /// The weld probability the region must keep (0 to 1, exclusive).
    pub level: f64,
    /// Seed of the sampled probabilities (the same seed, the same numbers).
    pub seed: u64,
    /// Draws per point of the ranked list and per node of the region (`None`: the defaults).
    pub samples: Option<usize>,
    /// Where the scatter comes from, in words (stated, or a documented default).
    pub basis: String,
}

/// A point of the ranked list.
#[derive(Debug, Clone)]
pub struct Candidate {
    /// Impact velocity (m/s, the window's convention).
    pub velocity: f64,
    /// Collision angle (deg).
    pub angle_deg: f64,
    /// Its room to every limit.
    pub room: Room,
    /// Its classification.
    pub check: Classification,
    /// The sampled weld probability (same draws for every listed point).
    pub probability: Option<f64>,
}

/// The result of an aim over a window.
#[derive(Debug, Clone)]
pub struct Aim<'a> {
    /// The window.
    pub window: &'a PairWindow,
    /// The scatter of the measure.
    pub spread: Spread,
    /// The best point before rounding (m/s, deg).
    pub unrounded: Option<(f64, f64)>,
    /// The ranked list, best first (the best point rounded, its classification explained as
    /// `check` explains it).
    pub ranked: Vec<Candidate>,
    /// The best point's sampled weld probability, in full.
    pub best_probability: Option<oblique_confidence::WeldProbability>,
    /// The region keeping at least the requested probability.
    pub region: Option<Region>,
    /// The grid searched: nodes inside the window of all nodes.
    pub nodes_inside: (usize, usize),
    /// The stated scatter of the sampled probabilities.
    pub scatter: Scatter,
    /// Where the scatter comes from.
    pub basis: String,
    /// Draws per point of the ranked list's sampled probabilities.
    pub rank_samples: usize,
}

impl Aim<'_> {
    /// The best point, if any point of the grid is inside the window.
    #[must_use]
    pub fn best(&self) -> Option<&Candidate> {
        self.ranked.first()
    }
}

/// The sampled probability's scatter of a measure's spread.
#[must_use]
pub fn scatter_of(spread: &Spread) -> Scatter {
    Scatter {
        velocity: Some(spread.velocity),
        angle: Some(Angle::from_degrees(spread.angle_deg)),
        model: spread.model,
    }
}

/// The search grid: angles and velocities inside the window's validity domain.
fn grid(window: &PairWindow) -> (Vec<f64>, Vec<f64>) {
    let top = window
        .domain
        .bound(DomainQuantity::CollisionAngle)
        .map_or(30.0, |b| b.max.min(89.0));
    let (vlo, vhi) = window
        .domain
        .bound(DomainQuantity::ImpactVelocity)
        .map_or((50.0, 2000.0), |b| (b.min.max(1.0), b.max.min(1e5)));
    let na = (top / ANGLE_STEP).floor() as usize;
    let angles = (1..=na).map(|i| i as f64 * ANGLE_STEP).collect();
    let n = VELOCITY_NODES - 1;
    let speeds = (0..=n)
        .map(|i| vlo * (vhi / vlo).powf(i as f64 / n as f64))
        .collect();
    (angles, speeds)
}

/// Run `f` over `items` on two threads, in order.
pub(crate) fn par_map<T: Sync, R: Send>(items: &[T], f: impl Fn(&T) -> R + Sync) -> Vec<R> {
    let threads = std::thread::available_parallelism().map_or(2, |n| n.get().min(4));
    let per = items.len().div_ceil(threads).max(1);
    std::thread::scope(|s| {
        let handles: Vec<_> = items
            .chunks(per)
            .map(|chunk| {
                let f = &f;
                s.spawn(move || chunk.iter().map(f).collect::<Vec<R>>())
            })
            .collect();
        handles
            .into_iter()
            .flat_map(|h| h.join().unwrap_or_default())
            .collect()
    })
}

/// The measure of a point inside the window (its sorted z list), `None` outside.
fn objective(
    w: &PairWindow,
    setup: &PairSetup,
    spread: &Spread,
    v: f64,
    b: f64,
) -> Option<(Vec<f64>, Room, Classification)> {
    let c = classify_point(w, setup, w.convention, v, b).ok()?;
    // Inside the window and within every user boundary's span (the trial data).
    if !c.inside || c.outside_trial_data {
        return None;
    }
    let r = room_of(w, setup, w.convention, &c, v, b, spread).ok()?;
    Some((r.key(), r, c))
}

/// Compass search on the measure in (ln Vp, beta) from a start node.
fn refine(
    w: &PairWindow,
    setup: &PairSetup,
    spread: &Spread,
    v0: f64,
    b0: f64,
) -> (f64, f64, Vec<f64>) {
    let (mut lv, mut b) = (v0.ln(), b0);
    let mut best = objective(w, setup, spread, v0, b0).map_or_else(Vec::new, |x| x.0);
    let (mut sl, mut sb) = (0.5 * (1.06f64).ln(), 0.5 * ANGLE_STEP);
    for _ in 0..400 {
        if sl < 1e-7 && sb < 1e-4 {
            break;
        }
        let mut moved = false;
        for (dl, db) in [(sl, 0.0), (-sl, 0.0), (0.0, sb), (0.0, -sb)] {
            if (dl == 0.0 && sb < 1e-4) || (db == 0.0 && sl < 1e-7) {
                continue;
            }
            let (nl, nb) = (lv + dl, b + db);
            if !(nb > 0.0 && nb < 90.0) {
                continue;
            }
            if let Some((f, ..)) = objective(w, setup, spread, nl.exp(), nb) {
                if best.is_empty() || compare(&f, &best) == Ordering::Greater {
                    best = f;
                    lv = nl;
                    b = nb;
                    moved = true;
                    break;
                }
            }
        }
        if !moved {
            sl *= 0.5;
            sb *= 0.5;
        }
    }
    (lv.exp(), b, best)
}

/// Normalised distance between two points under `spread` (at the first point's velocity).
fn distance(spread: &Spread, a: (f64, f64), b: (f64, f64)) -> f64 {
    let sv = spread.velocity_sd(a.0).max(1e-9);
    let sb = spread.angle_deg.max(1e-9);
    (((a.0 - b.0) / sv).powi(2) + ((a.1 - b.1) / sb).powi(2)).sqrt()
}

/// Aim: the best point, the ranked list and the region.
///
/// # Errors
/// A setting out of range (naming its flag), or a window the physics refuses.
pub fn aim<'a>(req: &AimRequest<'a>) -> AimResult<Aim<'a>> {
    let w = req.window;
    validate(req)?;
    let setup = w.setup()?;
    let (angles, speeds) = grid(w);
    let nodes: Vec<(f64, f64)> = angles
        .iter()
        .flat_map(|&b| speeds.iter().map(move |&v| (v, b)))
        .collect();
    let spread = req.spread;
    let scored: Vec<Option<(f64, f64, Vec<f64>)>> = par_map(&nodes, |&(v, b)| {
        objective(w, &setup, &spread, v, b).map(|(f, ..)| (v, b, f))
    });
    let mut inside: Vec<(f64, f64, Vec<f64>)> = scored.into_iter().flatten().collect();
    let nodes_inside = (inside.len(), nodes.len());
    inside.sort_by(|a, b| compare(&b.2, &a.2));
    let scatter = scatter_of(&spread);
    if inside.is_empty() {
        return Ok(Aim {
            window: w,
            spread,
            unrounded: None,
            ranked: Vec::new(),
            best_probability: None,
            region: None,
            nodes_inside,
            scatter,
            basis: req.basis.clone(),
            rank_samples: 0,
        });
    }
    // Starts: the three best nodes at least one standard deviation apart.
    let mut starts: Vec<(f64, f64)> = Vec::new();
    for &(v, b, _) in &inside {
        if starts.iter().all(|s| distance(&spread, *s, (v, b)) >= 1.0) {
            starts.push((v, b));
        }
        if starts.len() == 3 {
            break;
        }
    }
    let refined = par_map(&starts, |&(v, b)| refine(w, &setup, &spread, v, b));
    let (bv, bb, _) = refined
        .into_iter()
        .max_by(|a, b| compare(&a.2, &b.2))
        .unwrap_or_else(|| inside[0].clone());
    // Rounded to what a set-up can be set to, unless that leaves the window.
    let (rv, rb) = ((bv).round(), (bb * 10.0).round() / 10.0);
    let (pv, pb) = match classify_point(w, &setup, w.convention, rv, rb) {
        Ok(c) if c.inside => (rv, rb),
        _ => (bv, bb),
    };
    let mut best = candidate(w, &setup, &spread, pv, pb)?;
    explain_in(w, &setup, &mut best.check, w.convention);
    let mut ranked = vec![best];
    for &(v, b, _) in &inside {
        if ranked.len() >= req.top {
            break;
        }
        if ranked
            .iter()
            .all(|c| distance(&spread, (c.velocity, c.angle_deg), (v, b)) >= RANK_SEPARATION)
        {
            ranked.push(candidate(w, &setup, &spread, v, b)?);
        }
    }
    // Sampled probabilities of the listed points, the same draws for each.
    let points: Vec<Point> = ranked
        .iter()
        .map(|c| {
            Point::impact(
                w.convention,
                Velocity::from_m_s(c.velocity),
                Angle::from_degrees(c.angle_deg),
            )
        })
        .collect();
    let sampling = Sampling {
        samples: req.samples.unwrap_or(RANK_SAMPLES),
        seed: req.seed,
        threads: None,
    };
    let p = oblique_confidence::probabilities(w, &points, &scatter, &sampling)?;
    for (c, pk) in ranked.iter_mut().zip(p) {
        c.probability = Some(pk);
    }
    let best_probability = Some(oblique_confidence::weld_probability(
        w,
        &points[0],
        &scatter,
        &Sampling {
            samples: req.samples.unwrap_or(BEST_SAMPLES),
            ..sampling
        },
    )?);
    let region = region::region(w, &inside, &scatter, req)?;
    Ok(Aim {
        window: w,
        spread,
        unrounded: Some((bv, bb)),
        ranked,
        best_probability,
        region: Some(region),
        nodes_inside,
        scatter,
        basis: req.basis.clone(),
        rank_samples: sampling.samples,
    })
}

fn candidate(
    w: &PairWindow,
    setup: &PairSetup,
    spread: &Spread,
    v: f64,
    b: f64,
) -> AimResult<Candidate> {
    let check = classify_point(w, setup, w.convention, v, b)?;
    let r = room(w, setup, w.convention, v, b, spread)?;
    Ok(Candidate {
        velocity: v,
        angle_deg: b,
        room: r,
        check,
        probability: None,
    })
}

fn validate(req: &AimRequest<'_>) -> AimResult {
    if !(1..=MAX_TOP).contains(&req.top) {
        return Err(AimError::invalid(
            "--top",
            format!("{} is outside 1 to {MAX_TOP}", req.top),
        ));
    }
    if !(req.level > 0.0 && req.level < 1.0) {
        return Err(AimError::invalid(
            "--min-probability",
            format!("{} % is outside (0, 100) %", 100.0 * req.level),
        ));
    }
    let sv = match req.spread.velocity {
        VelocitySpread::Relative(r) => {
            r > 0.0 && r <= oblique_confidence::scatter::MAX_RELATIVE_VELOCITY_SD
        }
        VelocitySpread::Absolute(a) => {
            a > 0.0 && a <= oblique_confidence::scatter::MAX_ABSOLUTE_VELOCITY_SD_M_S
        }
    };
    if !sv {
        return Err(AimError::invalid(
            "--velocity-sd",
            "must be above zero (the room is measured in it) and at most 50 % or 10000 m/s",
        ));
    }
    if !(req.spread.angle_deg > 0.0
        && req.spread.angle_deg <= oblique_confidence::scatter::MAX_ANGLE_SD_DEG)
    {
        return Err(AimError::invalid(
            "--angle-sd",
            "must be above zero (the room is measured in it) and at most 30 deg",
        ));
    }
    Ok(())
}

/// The convention of an aim: always the window's.
#[must_use]
pub fn convention(w: &PairWindow) -> Convention {
    w.convention
}

#[cfg(test)]
mod tests;
