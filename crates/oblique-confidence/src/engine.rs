//! The sampling engine: one draw of the model inputs (constants and material properties),
//! reduced to the few numbers each criterion needs, and the verdict of every decisive limit for
//! a draw at a collision, without allocating.
//!
//! The limits are computed with the core's own functions on scratch materials, and compared the
//! way `oblique_core::criteria::evaluate_with_jetting` and `oblique_window::classify` compare
//! them, so a draw gives the same verdict per limit as classifying the sampled window through
//! the public API (tested). The one difference is the jetting critical angle of a supersonic
//! collision with sampled Hugoniots, which comes from [`crate::jetting::JettingModel`] (within
//! 0.1 deg of the direct solve, tested).

use crate::error::ConfidenceResult;
use crate::inputs::{self, Input, InputKind, Plate};
use crate::jetting::{JetScale, JettingModel};
use crate::priors::Constant;
use crate::scatter::{Point, Sampling, Scatter};
use oblique_core::criteria::{
    deribas_coefficient, melting_coefficient, melting_divisor, strength_velocity,
};
use oblique_core::hugoniot::{impedance_match, Hugoniot};
use oblique_core::units::{
    Angle, Density, Pressure, SpecificHeat, Temperature, ThermalConductivity, Velocity,
};
use oblique_core::{Collision, CriterionId, Material, WittmanForm};
use oblique_window::boundary::{interpolate, Plane, WeldSide};
use oblique_window::PairWindow;
use rand::RngExt;
use rand_distr::StandardNormal;
use rand_pcg::Pcg64;
use std::sync::atomic::{AtomicUsize, Ordering};

/// Samples per block: each block has its own random stream, seeded from (seed, block index),
/// so results do not depend on how blocks are shared out among threads.
pub const BLOCK: usize = 1024;
/// Bins per input for the sensitivity estimate (equal probability under the input's standard
/// normal variate).
pub const BINS: usize = 16;
/// The sensitivity shares use the samples of the first this many blocks (32 768 samples: the
/// shares' sampling noise is then below 0.01, and binning every sample would cost a third of
/// the run).
pub const SENSITIVITY_BLOCKS: usize = 32;

/// A decisive limit of the window: a criterion or a user boundary.
#[derive(Debug, Clone, PartialEq)]
pub enum Limit {
    /// A model criterion.
    Criterion(CriterionId),
    /// A user boundary, by index.
    Boundary(usize),
}

#[derive(Debug, Clone)]
struct LeanBoundary {
    plane: Plane,
    side: WeldSide,
    /// (independent, dependent) points as `Boundary::evaluate` builds them.
    points: Vec<(f64, f64)>,
}

/// One draw of the model, reduced.
#[derive(Debug, Clone, Copy)]
pub(crate) struct ModelDraw {
    /// max over plates of k sqrt(Hv / rho) (rad m/s).
    deribas: f64,
    /// max over plates of sqrt(UTS / rho) (m/s).
    strength: f64,
    /// max over plates of m HEL (Pa).
    pressure_limit: f64,
    /// min over plates of the melting coefficient (divided by Vc or sqrt(Vc)).
    melting: f64,
    flyer: Hugoniot,
    parent: Hugoniot,
    scale: JetScale,
    jet_factor: f64,
}

/// The materials a draw writes into (one pair per thread; never allocated per sample).
#[derive(Debug, Clone)]
pub(crate) struct Scratch {
    pub(crate) flyer: Material,
    pub(crate) parent: Material,
}

/// The verdict of one sample.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Verdict {
    /// Every decisive limit holds.
    pub inside: bool,
    /// Bit i set: limit i fails.
    pub failing: u64,
    /// Some boundary does not span the point.
    pub outside_trial_data: bool,
}

/// Counts over samples; integers, so sums over blocks are exact in any order.
#[derive(Debug, Clone, Default, PartialEq)]
pub(crate) struct Tally {
    pub n: u64,
    pub inside: u64,
    pub no_collision: u64,
    pub outside_trial_data: u64,
    pub failing: Vec<u64>,
    /// Per input and bin: samples, and samples inside.
    pub bin_n: Vec<u64>,
    pub bin_inside: Vec<u64>,
}

impl Tally {
    fn new(limits: usize, inputs: usize) -> Self {
        Self {
            failing: vec![0; limits],
            bin_n: vec![0; inputs * BINS],
            bin_inside: vec![0; inputs * BINS],
            ..Self::default()
        }
    }

    fn add(&mut self, other: &Tally) {
        self.n += other.n;
        self.inside += other.inside;
        self.no_collision += other.no_collision;
        self.outside_trial_data += other.outside_trial_data;
        for (a, b) in self.failing.iter_mut().zip(&other.failing) {
            *a += b;
        }
        for (a, b) in self.bin_n.iter_mut().zip(&other.bin_n) {
            *a += b;
        }
        for (a, b) in self.bin_inside.iter_mut().zip(&other.bin_inside) {
            *a += b;
        }
    }
}

/// A window and a scatter, ready to sample.
#[derive(Debug)]
pub struct Engine<'w> {
    pub(crate) window: &'w PairWindow,
    /// The sampled inputs.
    pub inputs: Vec<Input>,
    /// The decisive limits, in report order (criteria, then boundaries).
    pub limits: Vec<Limit>,
    velocity_input: Option<usize>,
    angle_input: Option<usize>,
    #[cfg_attr(not(test), allow(dead_code))]
    constant_inputs: [Option<usize>; 4],
    nominal_properties: [[f64; 11]; 2],
    nominal_constants: [f64; 4],
    flyer_thickness: oblique_core::units::Length,
    form: WittmanForm,
    criterion_on: [bool; 5],
    jet: Option<std::sync::Arc<JettingModel>>,
    boundaries: Vec<LeanBoundary>,
    thresholds: [f64; BINS],
    scratch: Scratch,
    pub(crate) scatter: Scatter,
}

/// Criterion ids in the order of [`Engine::criterion_on`].
const DECISIVE: [CriterionId; 5] = [
    CriterionId::DeribasLower,
    CriterionId::StrengthLower,
    CriterionId::PressureLower,
    CriterionId::MeltingUpper,
    CriterionId::Jetting,
];

impl<'w> Engine<'w> {
    /// Prepare `window` for sampling `point` under `scatter`.
    ///
    /// # Errors
    /// An invalid scatter, or a window whose materials the jetting tables refuse.
    pub fn new(window: &'w PairWindow, point: &Point, scatter: &Scatter) -> ConfidenceResult<Self> {
        scatter.validate()?;
        window.criteria.validate()?;
        let inputs = inputs::inputs(window, point, scatter);
        let mut velocity_input = None;
        let mut angle_input = None;
        let mut constant_inputs = [None; 4];
        for (i, input) in inputs.iter().enumerate() {
            match input.kind {
                InputKind::Velocity => velocity_input = Some(i),
                InputKind::Angle => angle_input = Some(i),
                InputKind::Constant { constant } => {
                    constant_inputs[Constant::ALL
                        .iter()
                        .position(|c| *c == constant)
                        .unwrap_or(0)] = Some(i);
                }
                InputKind::Property { .. } => {}
            }
        }
        let criterion_on = DECISIVE.map(|id| inputs::enabled(window, id));
        let mut limits: Vec<Limit> = DECISIVE
            .iter()
            .zip(criterion_on)
            .filter(|(_, on)| *on)
            .map(|(id, _)| Limit::Criterion(*id))
            .collect();
        limits.extend((0..window.boundaries.len()).map(Limit::Boundary));
        let boundaries = window
            .boundaries
            .iter()
            .map(|b| LeanBoundary {
                plane: b.plane,
                side: b.weld_side,
                points: if b.weld_side.along_velocity() {
                    b.points
                        .iter()
                        .map(|(x, a)| (x.si(), a.degrees()))
                        .collect()
                } else {
                    b.points
                        .iter()
                        .map(|(x, a)| (a.degrees(), x.si()))
                        .collect()
                },
            })
            .collect();
        let jet = if window.criteria.jetting_enabled {
            Some(JettingModel::shared(
                window.flyer.material.hugoniot,
                window.parent.material.hugoniot,
                window.criteria.mixed_jetting,
                scatter.model,
            )?)
        } else {
            None
        };
        let mut thresholds = [f64::NEG_INFINITY; BINS];
        for (k, t) in thresholds.iter_mut().enumerate().skip(1) {
            *t = crate::quantile::normal(k as f64 / BINS as f64);
        }
        Ok(Self {
            window,
            inputs,
            limits,
            velocity_input,
            angle_input,
            constant_inputs,
            nominal_properties: [
                inputs::property_values(&window.flyer.material),
                inputs::property_values(&window.parent.material),
            ],
            nominal_constants: Constant::ALL.map(|c| inputs::constant_in_use(window, c)),
            flyer_thickness: window.flyer_thickness,
            form: window.criteria.wittman_form,
            criterion_on,
            jet,
            boundaries,
            thresholds,
            scratch: Scratch {
                flyer: window.flyer.material.clone(),
                parent: window.parent.material.clone(),
            },
            scatter: *scatter,
        })
    }

    /// The label of a limit: the criterion id or the boundary's label.
    pub fn limit_label(&self, limit: &Limit) -> String {
        match limit {
            Limit::Criterion(id) => id.as_str().to_string(),
            Limit::Boundary(i) => self
                .window
                .boundaries
                .get(*i)
                .map_or_else(|| format!("boundary {i}"), |b| b.label.clone()),
        }
    }

    #[cfg(test)]
    fn value(&self, input: Option<usize>, z: &[f64], nominal: f64) -> f64 {
        match input {
            Some(i) => self.inputs[i].distribution.value(z[i]),
            None => nominal,
        }
    }

    /// The model draw for the standard normal variates `z` (one per input), written through
    /// `scratch` (whose materials then hold the sampled values).
    pub(crate) fn draw(&self, z: &[f64], scratch: &mut Scratch) -> ModelDraw {
        let mut props = self.nominal_properties;
        let mut c = self.nominal_constants;
        for (input, zi) in self.inputs.iter().zip(z) {
            match input.kind {
                InputKind::Property { plate, index } => {
                    let v = input.distribution.value(*zi);
                    match plate {
                        Plate::Flyer => props[0][index] = v,
                        Plate::Parent => props[1][index] = v,
                        Plate::Both => {
                            props[0][index] = v;
                            props[1][index] = v;
                        }
                    }
                }
                InputKind::Constant { constant } => {
                    c[constant as usize] = input.distribution.value(*zi);
                }
                InputKind::Velocity | InputKind::Angle => {}
            }
        }
        for (m, v) in [&mut scratch.flyer, &mut scratch.parent]
            .into_iter()
            .zip(&props)
        {
            m.hugoniot = Hugoniot {
                density: Density::from_kg_m3(v[0]),
                c0: Velocity::from_m_s(v[1]),
                s: v[2],
            };
            m.vickers_hardness = Pressure::from_pa(v[3]);
            m.yield_strength = Pressure::from_pa(v[4]);
            m.tensile_strength = Pressure::from_pa(v[5]);
            m.bulk_modulus = Pressure::from_pa(v[6]);
            m.shear_modulus = Pressure::from_pa(v[7]);
            m.melting_temperature = Temperature::from_k(v[8]);
            m.thermal_conductivity = ThermalConductivity::from_w_m_k(v[9]);
            m.specific_heat = SpecificHeat::from_j_kg_k(v[10]);
        }
        let (f, p) = (&scratch.flyer, &scratch.parent);
        // The same functions and the same products as evaluate_with_jetting; the max and min
        // over the plates commute with the later division by the same positive Vc.
        let deribas = deribas_coefficient(f, c[0]).max(deribas_coefficient(p, c[0]));
        let strength = strength_velocity(f).max(strength_velocity(p));
        let pressure_limit =
            (c[2] * f.hugoniot_elastic_limit().si()).max(c[2] * p.hugoniot_elastic_limit().si());
        let h = self.flyer_thickness;
        let melting = melting_coefficient(f, h, c[1], self.form)
            .min(melting_coefficient(p, h, c[1], self.form));
        ModelDraw {
            deribas,
            strength,
            pressure_limit,
            melting,
            flyer: f.hugoniot,
            parent: p.hugoniot,
            scale: JetScale::of(
                (
                    &self.window.flyer.material.hugoniot,
                    &self.window.parent.material.hugoniot,
                ),
                (&f.hugoniot, &p.hugoniot),
            ),
            jet_factor: c[3],
        }
    }

    /// The verdict of every decisive limit for draw `d` at collision `col` (in the window's
    /// convention).
    #[inline]
    pub(crate) fn verdict(&self, d: &ModelDraw, col: &Collision) -> ConfidenceResult<Verdict> {
        let vp = col.impact_velocity.si();
        let vc = col.collision_velocity.si();
        let beta_deg = col.angle.degrees();
        let mut failing = 0u64;
        let mut bit = 0;
        for (id, on) in DECISIVE.iter().zip(self.criterion_on) {
            if !on {
                continue;
            }
            let holds = match id {
                CriterionId::DeribasLower => beta_deg >= (d.deribas / vc).to_degrees(),
                CriterionId::StrengthLower => vp >= d.strength,
                CriterionId::PressureLower => {
                    impedance_match(&d.flyer, &d.parent, col.impact_velocity)?
                        .pressure
                        .si()
                        >= d.pressure_limit
                }
                CriterionId::MeltingUpper => vp <= d.melting / melting_divisor(vc, self.form),
                CriterionId::Jetting => {
                    let crit = match &self.jet {
                        Some(j) => {
                            j.critical_angle(col.flow_velocity.si(), vc, &d.scale)? * d.jet_factor
                        }
                        None => 0.0,
                    };
                    beta_deg > Angle::from_radians(crit).degrees()
                }
                CriterionId::WavyTransition => true,
            };
            if !holds {
                failing |= 1 << bit;
            }
            bit += 1;
        }
        let mut outside_trial_data = false;
        for b in &self.boundaries {
            let v = match b.plane {
                Plane::AngleImpactVelocity => vp,
                Plane::AngleCollisionVelocity => vc,
            };
            let margin = if b.side.along_velocity() {
                interpolate(&b.points, v).map(|l| {
                    if b.side == WeldSide::Above {
                        beta_deg - l
                    } else {
                        l - beta_deg
                    }
                })
            } else {
                interpolate(&b.points, beta_deg).map(|l| {
                    if b.side == WeldSide::Right {
                        v - l
                    } else {
                        l - v
                    }
                })
            };
            match margin {
                Some(m) if !(m >= 0.0) => failing |= 1 << bit,
                Some(_) => {}
                None => outside_trial_data = true,
            }
            bit += 1;
        }
        Ok(Verdict {
            inside: failing == 0,
            failing,
            outside_trial_data,
        })
    }

    /// The bin of a standard normal variate: the number of thresholds below it, counted
    /// without branches (random variates defeat branch prediction).
    #[inline]
    fn bin(&self, z: f64) -> usize {
        self.thresholds[1..]
            .iter()
            .map(|t| usize::from(z > *t))
            .sum()
    }

    /// The random stream of one block: PCG-64 (O'Neill 2014, as implemented by `rand_pcg`)
    /// with the seed as its state and the block index as its stream, so every block has its
    /// own sequence and the result does not depend on which thread runs it.
    fn block_rng(seed: u64, block: usize) -> Pcg64 {
        // Spread the seed over the 128-bit state (SplitMix64 finaliser, Steele et al. 2014).
        let mut x = seed.wrapping_add(0x9E37_79B9_7F4A_7C15);
        x = (x ^ (x >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        x = (x ^ (x >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        x ^= x >> 31;
        Pcg64::new((u128::from(x) << 64) | u128::from(seed), block as u128)
    }

    /// The velocity (as given) and angle (rad) of a sample around `point`.
    #[inline]
    fn point_sample(&self, point: &Point, z: &[f64]) -> (f64, f64) {
        let v = point.velocity_m_s();
        let v = match (self.velocity_input, self.scatter.velocity) {
            (Some(i), Some(s)) => v + s.at(v) * z[i],
            _ => v,
        };
        let beta = match (self.angle_input, self.scatter.angle) {
            (Some(i), Some(a)) => {
                Angle::from_degrees(point.angle_rad.to_degrees() + a.degrees() * z[i]).radians()
            }
            _ => point.angle_rad,
        };
        (v, beta)
    }

    /// Sample `point` `sampling.samples` times, on the threads asked for.
    pub(crate) fn run(&self, point: &Point, sampling: &Sampling) -> ConfidenceResult<Tally> {
        let n = sampling.samples;
        let blocks = n.div_ceil(BLOCK);
        let threads = sampling.thread_count().clamp(1, blocks.max(1));
        let next = AtomicUsize::new(0);
        let work = || -> ConfidenceResult<Tally> {
            let mut tally = Tally::new(self.limits.len(), self.inputs.len());
            let mut scratch = self.scratch.clone();
            let mut z = vec![0.0; self.inputs.len()];
            let to = self.window.convention;
            loop {
                let b = next.fetch_add(1, Ordering::Relaxed);
                if b >= blocks {
                    break;
                }
                let mut rng = Self::block_rng(sampling.seed, b);
                let count = BLOCK.min(n - b * BLOCK);
                for _ in 0..count {
                    for x in z.iter_mut() {
                        *x = rng.sample(StandardNormal);
                    }
                    let (v, beta) = self.point_sample(point, &z);
                    tally.n += 1;
                    let inside = match point.collision_at(v, beta, to) {
                        Err(_) => {
                            tally.no_collision += 1;
                            false
                        }
                        Ok(col) => {
                            let d = self.draw(&z, &mut scratch);
                            let verdict = self.verdict(&d, &col)?;
                            for (i, f) in tally.failing.iter_mut().enumerate() {
                                *f += (verdict.failing >> i) & 1;
                            }
                            tally.outside_trial_data += u64::from(verdict.outside_trial_data);
                            verdict.inside
                        }
                    };
                    tally.inside += u64::from(inside);
                    if b >= SENSITIVITY_BLOCKS {
                        continue;
                    }
                    let y = u64::from(inside);
                    for ((n, yin), zi) in tally
                        .bin_n
                        .chunks_exact_mut(BINS)
                        .zip(tally.bin_inside.chunks_exact_mut(BINS))
                        .zip(&z)
                    {
                        let b = self.bin(*zi);
                        n[b] += 1;
                        yin[b] += y;
                    }
                }
            }
            Ok(tally)
        };
        let parts: Vec<ConfidenceResult<Tally>> = if threads == 1 {
            vec![work()]
        } else {
            std::thread::scope(|s| {
                let handles: Vec<_> = (0..threads).map(|_| s.spawn(work)).collect();
                handles
                    .into_iter()
                    .map(|h| {
                        h.join().unwrap_or_else(|_| {
                            Err(oblique_core::PhysicsError::NoConvergence {
                                what: "weld probability (a worker thread stopped)",
                                iterations: 0,
                            }
                            .into())
                        })
                    })
                    .collect()
            })
        };
        let mut total = Tally::new(self.limits.len(), self.inputs.len());
        for p in parts {
            total.add(&p?);
        }
        Ok(total)
    }

    /// `samples` draws of the point-independent inputs with the variates of the velocity and
    /// the angle, for evaluating many points with the same draws (common random numbers).
    pub(crate) fn draws(&self, sampling: &Sampling) -> Vec<(f64, f64, ModelDraw)> {
        let n = sampling.samples;
        let mut out = Vec::with_capacity(n);
        let mut scratch = self.scratch.clone();
        let mut z = vec![0.0; self.inputs.len()];
        for b in 0..n.div_ceil(BLOCK) {
            let mut rng = Self::block_rng(sampling.seed, b);
            for _ in 0..BLOCK.min(n - b * BLOCK) {
                for x in z.iter_mut() {
                    *x = rng.sample(StandardNormal);
                }
                let zv = self.velocity_input.map_or(0.0, |i| z[i]);
                let zb = self.angle_input.map_or(0.0, |i| z[i]);
                out.push((zv, zb, self.draw(&z, &mut scratch)));
            }
        }
        out
    }

    /// The fraction of `draws` inside the window at `point` (its velocity and angle scattered
    /// by the draws' variates).
    pub(crate) fn fraction_inside(
        &self,
        point: &Point,
        draws: &[(f64, f64, ModelDraw)],
    ) -> ConfidenceResult<f64> {
        let v0 = point.velocity_m_s();
        let sd_v = self.scatter.velocity.map_or(0.0, |s| s.at(v0));
        let beta0 = point.angle_rad.to_degrees();
        let sd_b = self.scatter.angle.map_or(0.0, |a| a.degrees());
        let mut inside = 0usize;
        for (zv, zb, d) in draws {
            let v = v0 + sd_v * zv;
            let beta = Angle::from_degrees(beta0 + sd_b * zb).radians();
            if let Ok(col) = point.collision_at(v, beta, self.window.convention) {
                inside += usize::from(self.verdict(d, &col)?.inside);
            }
        }
        Ok(inside as f64 / draws.len().max(1) as f64)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scatter::VelocitySpread;
    use oblique_core::jetting::{JettingAssessment, JettingRegime};
    use oblique_core::{Convention, PairSetup};
    use oblique_window::classify::{classify_with_jetting, LimitRef};

    pub(crate) fn demo() -> PairWindow {
        let lib = oblique_window::Library::load(&[]).expect("built-in library");
        lib.pair("demo-al6061-on-cu").expect("demo pair").clone()
    }

    /// The lean path gives, for every limit of every sample, the verdict of classifying the
    /// sampled window through the public API with the same jetting angle.
    #[test]
    fn lean_path_agrees_with_the_public_api() {
        let w = demo();
        let scatter = Scatter {
            velocity: Some(VelocitySpread::Relative(0.15)),
            angle: Some(Angle::from_degrees(4.0)),
            model: true,
        };
        for (v, a) in [(450.0, 10.0), (380.0, 6.0), (600.0, 20.0), (330.0, 3.0)] {
            let point = Point::impact(
                Convention::NormalToFlyer,
                Velocity::from_m_s(v),
                Angle::from_degrees(a),
            );
            let e = Engine::new(&w, &point, &scatter).expect("engine");
            let mut scratch = e.scratch.clone();
            let mut rng = Engine::block_rng(7, 0);
            let mut z = vec![0.0; e.inputs.len()];
            let mut checked = 0;
            for _ in 0..400 {
                for x in z.iter_mut() {
                    *x = rng.sample(StandardNormal);
                }
                let (vs, bs) = e.point_sample(&point, &z);
                let Ok(col) = point.collision_at(vs, bs, w.convention) else {
                    continue;
                };
                let d = e.draw(&z, &mut scratch);
                let lean = e.verdict(&d, &col).expect("lean");
                // The reference: the window with the sampled constants and materials.
                let mut rw = w.clone();
                let c = |k: Constant| {
                    e.value(
                        e.constant_inputs[Constant::ALL.iter().position(|x| *x == k).unwrap_or(0)],
                        &z,
                        e.nominal_constants
                            [Constant::ALL.iter().position(|x| *x == k).unwrap_or(0)],
                    )
                };
                rw.criteria.deribas_k = c(Constant::DeribasK);
                rw.criteria.wittman_n = c(Constant::WittmanN);
                rw.criteria.hel_multiple = c(Constant::HelMultiple);
                let setup = PairSetup::new(
                    scratch.flyer.clone(),
                    scratch.parent.clone(),
                    w.flyer_thickness,
                    w.parent_thickness,
                )
                .expect("setup");
                let crit = e
                    .jet
                    .as_ref()
                    .expect("jetting on")
                    .critical_angle(
                        col.flow_velocity.si(),
                        col.collision_velocity.si(),
                        &d.scale,
                    )
                    .expect("jet")
                    * d.jet_factor;
                let mut jet = JettingAssessment::any_angle(JettingRegime::Supersonic, true, true);
                jet.critical_angle = Angle::from_radians(crit);
                let r = classify_with_jetting(&rw, &setup, &col, jet).expect("reference");
                for (bit, limit) in e.limits.iter().enumerate() {
                    let fails_lean = (lean.failing >> bit) & 1 == 1;
                    let fails_ref = match limit {
                        Limit::Criterion(id) => r.failing.contains(&LimitRef::Criterion(*id)),
                        Limit::Boundary(i) => r.failing.contains(&LimitRef::Boundary(*i)),
                    };
                    assert_eq!(
                        fails_lean, fails_ref,
                        "{limit:?} at {v} m/s {a} deg, sample {z:?}"
                    );
                }
                assert_eq!(lean.inside, r.inside);
                assert_eq!(lean.outside_trial_data, r.outside_trial_data);
                checked += 1;
            }
            assert!(checked > 300);
        }
    }
}
