//! The set-up to order: a machine (capacitor bank) and a family of compression coils (bore
//! radius and length, each a list or a range), the charging voltage (or stored energy), the
//! standoff and the rod's chamfer, searched with the tube model of `oblique_core::process` and
//! ranked by the measure of [`crate::measure`] in the process's scatter.
//!
//! - Every coil of the family is resolved as `oblique estimate mpw-tube` resolves it
//!   ([`oblique_setup::resolve_estimate`]: bank file and flags, coil values, the window's flyer
//!   and thickness, the efficiency from a stored calibration), and the model runs once per
//!   charging voltage with every standoff as a landing target (`oblique_core::process::sweep`).
//! - The collision angle is the chamfer: the lumped model moves the tube wall radially as one
//!   ring, parallel to the axis, so it meets a rod chamfered at angle alpha at a collision angle
//!   of alpha (normal-to-flyer convention, the model's impact velocity being normal to the
//!   wall). The real wall bends at the coil ends and the dynamic angle grows along the joint
//!   (docs/process-models.md §11); the angle's scatter (1 deg unless stated) stands for that
//!   difference. It is never computed from the set-up.
//! - The bank's rating is respected: a charging voltage above the rated voltage, a stored
//!   energy above the energy rating or a first current peak above the current rating (the
//!   workpiece held still: the fixed-inductance closed form of docs/process-models.md §1 with the
//!   coil's inductance at rest, expected above the shot's since the moving wall raises the
//!   inductance and draws energy) leaves the setting out, counted and said.
//! - The settings inside the window are ranked by the measure; the listed ones are estimated
//!   again one by one ([`oblique_setup::ResolvedSetup::estimate`], exactly as `oblique estimate`
//!   does) and their weld probability sampled with the same draws for each.

use crate::error::{AimError, AimResult};
use crate::measure::{compare, room, Room, Spread};
use oblique_confidence::{Point, Sampling, Scatter, VelocitySpread};
use oblique_core::process::sweep;
use oblique_core::units::{Angle, Inductance, Length, Velocity, Voltage};
use oblique_core::Convention;
use oblique_setup::grid::Grid;
use oblique_setup::{
    resolve_estimate, BankRequest, Catalog, Charge, ChargeGrid, EstimateRequest, Integration,
    MagneticRequest, TubeRequest,
};
use oblique_window::classify::{limit_label, Classification};
use oblique_window::PairWindow;

/// The most set-ups one search may hold (coils x voltages x standoffs x chamfers).
pub const MAX_SETUPS: usize = 100_000;
/// The most values one range is spread over.
pub const MAX_STEPS: usize = 100;
/// Draws per listed set-up of the sampled probability unless given (the same draws for each).
pub const SETUP_SAMPLES: usize = 512;

/// A family of compression coils: a coil file, and/or bore radii and lengths (lists or
/// ranges; given values win over the file's), with the leads' inductance.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CoilFamily {
    /// A coil file (its values are used where no list or range is given).
    pub file: Option<String>,
    /// Bore radii (m).
    pub bore: Option<Grid>,
    /// Working lengths (m).
    pub length: Option<Grid>,
    /// Inductance of terminals and leads (H).
    pub extra_inductance: Option<f64>,
}

/// A set-up search.
#[derive(Debug, Clone)]
pub struct SetupSearch<'a> {
    /// The window (its flyer is the tube; its thickness the wall).
    pub window: &'a PairWindow,
    /// The bank.
    pub bank: BankRequest,
    /// The coils.
    pub coils: CoilFamily,
    /// Tube outer radius (m).
    pub tube_outer_radius: f64,
    /// Charging voltages or stored energies.
    pub charge: ChargeGrid,
    /// Standoffs (m).
    pub standoffs: Grid,
    /// Chamfers of the rod (rad): the collision angles.
    pub chamfers: Grid,
    /// Values of each range.
    pub steps: usize,
    /// Efficiency (default: a stored calibration, else 1).
    pub efficiency: Option<f64>,
    /// The bank's current rating (A), if given (else the bank file's, if it has one).
    pub max_current: Option<f64>,
    /// The bank's energy rating (J), if given (else the bank file's, if it has one).
    pub max_energy: Option<f64>,
    /// Time integration.
    pub integration: Integration,
    /// The velocity's scatter (default: from the efficiency's provenance, docs/theory.md
    /// §15.6).
    pub velocity_sd: Option<VelocitySpread>,
    /// The angle's scatter (deg; default 1 deg).
    pub angle_sd_deg: Option<f64>,
    /// Constants' spreads in the measure and model uncertainty in the probability.
    pub model: bool,
    /// Draws per listed set-up (default [`SETUP_SAMPLES`]).
    pub samples: Option<usize>,
    /// Seed.
    pub seed: u64,
    /// How many set-ups to list.
    pub top: usize,
    /// The window comes from a pair file (`--pair`), not from `--flyer`/`--parent`.
    pub window_from_file: bool,
}

/// One set-up and what the model and the window say of it.
#[derive(Debug, Clone)]
pub struct SetupResult {
    /// Coil bore radius (m).
    pub bore: f64,
    /// Coil length (m).
    pub length: f64,
    /// Charging voltage (V).
    pub voltage: f64,
    /// Stored energy (J).
    pub energy: f64,
    /// Standoff (m).
    pub standoff: f64,
    /// Chamfer = collision angle (deg).
    pub chamfer_deg: f64,
    /// Impact velocity (m/s, normal to the wall).
    pub velocity: f64,
    /// First current peak with the workpiece held still (A).
    pub peak_current: f64,
    /// The window check.
    pub check: Classification,
    /// The room to every limit.
    pub room: Room,
    /// The sampled weld probability, for listed set-ups.
    pub probability: Option<f64>,
}

/// Why set-ups were left out, counted.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct LeftOut {
    /// Charging voltages above the rated voltage (settings).
    pub above_voltage: usize,
    /// Stored energies above the energy rating.
    pub above_energy: usize,
    /// First current peaks above the current rating.
    pub above_current: usize,
    /// No impact within the integration window.
    pub no_impact: usize,
    /// Outside the window (any verdict but welded, outside the validity domain included).
    pub outside_window: usize,
    /// Inside the model limits but outside the span of a user boundary (the trial data).
    pub outside_trial_data: usize,
}

/// The outcome of a set-up search.
#[derive(Debug, Clone)]
pub struct SetupSearchResult<'a> {
    /// The window.
    pub window: &'a PairWindow,
    /// The listed set-ups inside the window, best first.
    pub ranked: Vec<SetupResult>,
    /// The set-ups evaluated (every coil, voltage, standoff and chamfer).
    pub evaluated: usize,
    /// Inside the window.
    pub inside: usize,
    /// Left out, by reason.
    pub left_out: LeftOut,
    /// The scatter of the measure.
    pub spread: Spread,
    /// Why the velocity's spread is what it is.
    pub basis: String,
    /// The rated voltage (V) and where it comes from.
    pub rating: Option<(f64, String)>,
    /// The bank's name or "the bank given by flags".
    pub bank: String,
    /// The coil file, if any.
    pub coil_file: Option<String>,
    /// Leads' inductance (H) used.
    pub extra_inductance: f64,
    /// Tube outer radius (m).
    pub tube_outer_radius: f64,
    /// The efficiency used and where it came from.
    pub efficiency: (f64, String),
    /// Notes for the person (from resolving the set-ups).
    pub notes: Vec<String>,
    /// The current and energy ratings applied, with where they come from.
    pub ratings: Ratings,
    /// The efficiency is not calibrated on this workpiece (the default 1, or transferred).
    pub uncalibrated: bool,
    /// The flags that reproduce the family's fixed parts in `oblique estimate` (coil file or
    /// dimensions given, leads, efficiency, window).
    pub(crate) reproduce: Reproduce,
}

/// What `oblique estimate` needs besides the set-up's own values to give the same estimate.
#[derive(Debug, Clone)]
pub(crate) struct Reproduce {
    pub(crate) coil_file: Option<String>,
    pub(crate) bore_given: bool,
    pub(crate) length_given: bool,
    pub(crate) extra_inductance: Option<f64>,
    pub(crate) efficiency: Option<f64>,
    pub(crate) window_from_file: bool,
}

fn values(g: &Grid, steps: usize, field: &'static str) -> AimResult<Vec<f64>> {
    if let Grid::Range(..) = g {
        if !(2..=MAX_STEPS).contains(&steps) {
            return Err(AimError::invalid(
                "--steps",
                format!("{steps} is outside 2 to {MAX_STEPS} values per range"),
            ));
        }
    }
    let v = g
        .values(steps, "--steps")
        .map_err(|m| AimError::invalid(field, m))?;
    if v.is_empty() {
        return Err(AimError::invalid(field, "no value given"));
    }
    Ok(v)
}

fn tube_request(s: &SetupSearch<'_>, bore: Option<f64>, length: Option<f64>) -> MagneticRequest {
    MagneticRequest::Tube(TubeRequest {
        bank: s.bank.clone(),
        coil: s.coils.file.clone(),
        coil_bore: bore.map(Length::from_m),
        coil_length: length.map(Length::from_m),
        coil_inductance: s.coils.extra_inductance.map(Inductance::from_h),
        flyer: Some(s.window.flyer.material.id.clone()),
        flyer_thickness: Some(s.window.flyer_thickness),
        tube_outer_radius: Some(Length::from_m(s.tube_outer_radius)),
    })
}

/// One estimate request of the search (every field as `oblique estimate mpw-tube` takes it).
#[must_use]
pub fn estimate_request(s: &SetupSearch<'_>, r: &SetupResult) -> EstimateRequest {
    EstimateRequest {
        process: tube_request(s, Some(r.bore), Some(r.length)),
        charge: Charge::Voltage(Voltage::from_v(r.voltage)),
        standoff: Length::from_m(r.standoff),
        efficiency: s.efficiency,
        pair: None,
        angle: Some(Angle::from_degrees(r.chamfer_deg)),
        integration: s.integration,
        history: false,
    }
}

/// The values of every grid of a search, checked.
struct Grids {
    bores: Vec<Option<f64>>,
    lengths: Vec<Option<f64>>,
    standoffs: Vec<f64>,
    chamfers: Vec<f64>,
    charges: Vec<f64>,
    charge_field: &'static str,
}

fn grids(s: &SetupSearch<'_>) -> AimResult<Grids> {
    let optional = |g: &Option<Grid>, field| -> AimResult<Vec<Option<f64>>> {
        Ok(match g {
            Some(g) => values(g, s.steps, field)?.into_iter().map(Some).collect(),
            None => vec![None],
        })
    };
    let bores = optional(&s.coils.bore, "--coil-bore")?;
    let lengths = optional(&s.coils.length, "--coil-length")?;
    let standoffs = values(&s.standoffs, s.steps, "--standoff")?;
    let chamfers = values(&s.chamfers, s.steps, "--chamfer")?;
    let (charge_field, raw_charge) = match &s.charge {
        ChargeGrid::Voltages(g) => ("--charge-voltage", g),
        ChargeGrid::Energies(g) => ("--energy", g),
    };
    let charges = values(raw_charge, s.steps, charge_field)?;
    let total = bores.len() * lengths.len() * charges.len() * standoffs.len() * chamfers.len();
    if total > MAX_SETUPS {
        return Err(AimError::invalid(
            "--steps",
            format!("{total} set-ups is more than the limit of {MAX_SETUPS}: use fewer values"),
        ));
    }
    Ok(Grids {
        bores,
        lengths,
        standoffs,
        chamfers,
        charges,
        charge_field,
    })
}

/// The bank's current and energy ratings (SI) with where each comes from: the flag, else the
/// bank file.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Ratings {
    /// Peak current (A) and its origin.
    pub current: Option<(f64, String)>,
    /// Stored energy (J) and its origin.
    pub energy: Option<(f64, String)>,
}

fn ratings(catalog: &Catalog, s: &SetupSearch<'_>) -> Ratings {
    let spec = s
        .bank
        .machine
        .as_deref()
        .and_then(|n| catalog.machines.bank(n).ok());
    let from_file = |name: &str, source: &str| format!("{name} ({source})");
    Ratings {
        current: s
            .max_current
            .map(|x| (x, "--max-current".to_string()))
            .or_else(|| {
                spec.and_then(|(rec, b)| {
                    b.max_current
                        .as_ref()
                        .map(|v| (v.value.si(), from_file(&rec.name, &v.source)))
                })
            }),
        energy: s
            .max_energy
            .map(|x| (x, "--max-energy".to_string()))
            .or_else(|| {
                spec.and_then(|(rec, b)| {
                    b.max_energy
                        .as_ref()
                        .map(|v| (v.value.si(), from_file(&rec.name, &v.source)))
                })
            }),
    }
}

/// The inductance of the coil's leads and gap at rest (H).
fn load_inductance(setup: &oblique_core::process::PulseSetup) -> f64 {
    match setup {
        oblique_core::process::PulseSetup::Tube(t) => {
            t.coil.extra_inductance.si() + t.gap_inductance().si()
        }
        oblique_core::process::PulseSetup::Sheet(t) => {
            t.coil.extra_inductance.si() + t.gap_inductance().si()
        }
    }
}

/// The charging voltages of one coil within the bank's ratings, each with its first current
/// peak (workpiece held still); those left out are counted.
fn rated_voltages(
    s: &SetupSearch<'_>,
    ratings: &Ratings,
    g: &Grids,
    resolved: &oblique_setup::ResolvedSetup<'_>,
    left_out: &mut LeftOut,
) -> AimResult<Vec<(f64, f64)>> {
    let bank = *resolved.setup.bank();
    let c = bank.capacitance.si();
    let n = g.standoffs.len() * g.chamfers.len();
    let circuit = bank
        .circuit(Inductance::from_h(load_inductance(&resolved.setup)))
        .map_err(oblique_setup::SetupError::from)?;
    let mut out = Vec::new();
    for &x in &g.charges {
        let u = match &s.charge {
            ChargeGrid::Voltages(_) => x,
            ChargeGrid::Energies(_) => (2.0 * x / c).sqrt(),
        };
        let e = 0.5 * c * u * u;
        if bank.max_voltage.is_some_and(|m| u > m.si() * (1.0 + 1e-12)) {
            left_out.above_voltage += n;
            continue;
        }
        if ratings
            .energy
            .as_ref()
            .is_some_and(|m| e > m.0 * (1.0 + 1e-12))
        {
            left_out.above_energy += n;
            continue;
        }
        let peak = circuit
            .first_peak(Voltage::from_v(u))
            .map_err(oblique_setup::SetupError::from)?
            .1
            .si();
        if ratings
            .current
            .as_ref()
            .is_some_and(|m| peak > m.0 * (1.0 + 1e-12))
        {
            left_out.above_current += n;
        } else {
            out.push((u, peak));
        }
    }
    Ok(out)
}

/// Every setting of one resolved coil: the model over its voltages and the standoffs, each
/// impact checked at every chamfer.
fn coil_settings(
    w: &PairWindow,
    setup: &oblique_core::PairSetup,
    g: &Grids,
    resolved: &oblique_setup::ResolvedSetup<'_>,
    volts: &[(f64, f64)],
    left_out: &mut LeftOut,
) -> AimResult<Vec<SetupResult>> {
    for &x in &g.standoffs {
        resolved
            .setup
            .with_standoff(Length::from_m(x))
            .validate()
            .map_err(|e| AimError::invalid("--standoff", e.to_string()))?;
    }
    let us: Vec<Voltage> = volts.iter().map(|(u, _)| Voltage::from_v(*u)).collect();
    let gs: Vec<Length> = g.standoffs.iter().map(|x| Length::from_m(*x)).collect();
    let res = sweep(
        &resolved.setup.with_charging_voltage(us[0]),
        &us,
        &gs,
        &resolved.options,
        None,
    )
    .map_err(oblique_setup::SetupError::from)?;
    let (rc, rl) = match &resolved.setup {
        oblique_core::process::PulseSetup::Tube(t) => (t.coil.bore_radius.si(), t.coil.length.si()),
        oblique_core::process::PulseSetup::Sheet(t) => (0.0, t.coil.length.si()),
    };
    let c = resolved.setup.bank().capacitance.si();
    let mut out = Vec::new();
    for (i, (u, peak)) in volts.iter().enumerate() {
        for (j, gap) in g.standoffs.iter().enumerate() {
            let Some(v) = res.impact_velocity(i, j) else {
                left_out.no_impact += g.chamfers.len();
                continue;
            };
            for &a in &g.chamfers {
                let col = oblique_core::Collision::from_impact(
                    Convention::NormalToFlyer,
                    v,
                    Angle::from_radians(a),
                )?;
                out.push(SetupResult {
                    bore: rc,
                    length: rl,
                    voltage: *u,
                    energy: 0.5 * c * u * u,
                    standoff: *gap,
                    chamfer_deg: a.to_degrees(),
                    velocity: v.si(),
                    peak_current: *peak,
                    check: oblique_window::classify::classify(w, setup, &col)?,
                    room: Room {
                        limits: Vec::new(),
                        z_min: f64::NEG_INFINITY,
                        log_p1: f64::NEG_INFINITY,
                    },
                    probability: None,
                });
            }
        }
    }
    Ok(out)
}

/// The listed set-ups estimated again one by one as `oblique estimate` does, checked and
/// explained, their room measured, their weld probabilities sampled with the same draws.
fn finish_listed(
    catalog: &Catalog,
    s: &SetupSearch<'_>,
    setup: &oblique_core::PairSetup,
    spread: &Spread,
    listed: &mut [SetupResult],
) -> AimResult {
    let w = s.window;
    for r in listed.iter_mut() {
        let req = estimate_request(s, r);
        let rs = resolve_estimate(catalog, &req, &mut Vec::new())?;
        let v = rs
            .estimate()?
            .impact_velocity()
            .ok_or_else(|| {
                AimError::invalid("--standoff", "a listed set-up has no impact on its own")
            })?
            .si();
        r.velocity = v;
        let col = oblique_core::Collision::from_impact(
            Convention::NormalToFlyer,
            Velocity::from_m_s(v),
            Angle::from_degrees(r.chamfer_deg),
        )?;
        r.check = oblique_window::classify::classify(w, setup, &col)?;
        oblique_window::advice::explain_in(w, setup, &mut r.check, Convention::NormalToFlyer);
        r.room = room(
            w,
            setup,
            Convention::NormalToFlyer,
            v,
            r.chamfer_deg,
            spread,
        )?;
    }
    let scatter = Scatter {
        velocity: Some(spread.velocity),
        angle: Some(Angle::from_degrees(spread.angle_deg)),
        model: spread.model,
    };
    let points: Vec<Point> = listed
        .iter()
        .map(|r| {
            Point::impact(
                Convention::NormalToFlyer,
                Velocity::from_m_s(r.velocity),
                Angle::from_degrees(r.chamfer_deg),
            )
        })
        .collect();
    let sampling = Sampling {
        samples: s.samples.unwrap_or(SETUP_SAMPLES),
        seed: s.seed,
        threads: None,
    };
    let p = oblique_confidence::probabilities(w, &points, &scatter, &sampling)?;
    for (r, pk) in listed.iter_mut().zip(p) {
        r.probability = Some(pk);
    }
    Ok(())
}

/// Search the set-ups.
///
/// # Errors
/// A grid that is empty, too large or out of range (naming its flag), a set-up the files and
/// flags do not complete, or a model failure.
pub fn search<'a>(catalog: &Catalog, s: &SetupSearch<'a>) -> AimResult<SetupSearchResult<'a>> {
    let w = s.window;
    let setup = w.setup()?;
    let g = grids(s)?;
    let rated = ratings(catalog, s);
    let mut notes = Vec::new();
    let mut left_out = LeftOut::default();
    let mut all: Vec<SetupResult> = Vec::new();
    let mut first: Option<oblique_setup::ResolvedSetup<'_>> = None;
    for bore in &g.bores {
        for length in &g.lengths {
            // Resolve the coil as `estimate` would, at the first standoff.
            let base = EstimateRequest {
                process: tube_request(s, *bore, *length),
                charge: Charge::Voltage(Voltage::from_v(1.0)),
                standoff: Length::from_m(g.standoffs[0]),
                efficiency: s.efficiency,
                pair: None,
                angle: None,
                integration: s.integration,
                history: false,
            };
            let resolved = resolve_estimate(catalog, &base, &mut notes)?;
            let volts = rated_voltages(s, &rated, &g, &resolved, &mut left_out)?;
            if !volts.is_empty() {
                all.extend(coil_settings(
                    w,
                    &setup,
                    &g,
                    &resolved,
                    &volts,
                    &mut left_out,
                )?);
            }
            first.get_or_insert(resolved);
        }
    }
    let evaluated = all.len();
    left_out.outside_window = all.iter().filter(|r| !r.check.inside).count();
    left_out.outside_trial_data = all
        .iter()
        .filter(|r| r.check.inside && r.check.outside_trial_data)
        .count();
    let mut inside: Vec<SetupResult> = all
        .into_iter()
        .filter(|r| r.check.inside && !r.check.outside_trial_data)
        .collect();
    let first = first.ok_or_else(|| AimError::invalid(g.charge_field, "no coil to search"))?;
    if evaluated == 0 && left_out.no_impact == 0 {
        return Err(AimError::invalid(
            g.charge_field,
            "every setting is above the bank's rating (voltage, energy or current): nothing left to search",
        ));
    }
    let (rel, basis) = oblique_setup::uncertainty::velocity_spread(&first.inputs);
    let (velocity, basis) = match s.velocity_sd {
        Some(v) => (v, format!("stated: --velocity-sd {}", v.text())),
        None => (VelocitySpread::Relative(rel), basis.to_string()),
    };
    let spread = Spread {
        velocity,
        angle_deg: s
            .angle_sd_deg
            .unwrap_or(oblique_confidence::priors::PROCESS_ANGLE_SPREAD_DEG),
        model: s.model,
    };
    let rooms = crate::aim::par_map(&inside, |r| {
        room(
            w,
            &setup,
            Convention::NormalToFlyer,
            r.velocity,
            r.chamfer_deg,
            &spread,
        )
    });
    for (r, rm) in inside.iter_mut().zip(rooms) {
        r.room = rm?;
    }
    inside.sort_by(|a, b| compare(&b.room.key(), &a.room.key()));
    let n_inside = inside.len();
    inside.truncate(s.top);
    finish_listed(catalog, s, &setup, &spread, &mut inside)?;
    let eta = first
        .inputs
        .get("efficiency")
        .map_or((1.0, String::new()), |i| {
            (i.value.si().unwrap_or(1.0), i.from.to_string())
        });
    let rating = first.setup.bank().max_voltage.map(|m| {
        (
            m.si(),
            first
                .inputs
                .get("rated_voltage_v")
                .map_or_else(|| "the bank".to_string(), |i| i.from.to_string()),
        )
    });
    Ok(SetupSearchResult {
        window: w,
        ranked: inside,
        evaluated,
        inside: n_inside,
        left_out,
        spread,
        basis,
        rating,
        bank: s
            .bank
            .machine
            .clone()
            .unwrap_or_else(|| "the bank given by flags".into()),
        coil_file: s.coils.file.clone(),
        extra_inductance: match &first.setup {
            oblique_core::process::PulseSetup::Tube(t) => t.coil.extra_inductance.si(),
            oblique_core::process::PulseSetup::Sheet(t) => t.coil.extra_inductance.si(),
        },
        tube_outer_radius: s.tube_outer_radius,
        efficiency: eta,
        notes,
        ratings: rated,
        uncalibrated: first.inputs.uncalibrated() || first.inputs.calibration_mismatch(),
        reproduce: Reproduce {
            coil_file: s.coils.file.clone(),
            bore_given: s.coils.bore.is_some(),
            length_given: s.coils.length.is_some(),
            extra_inductance: s.coils.extra_inductance,
            efficiency: s.efficiency,
            window_from_file: s.window_from_file,
        },
    })
}

impl SetupResult {
    /// The binding limit's label.
    #[must_use]
    pub fn binding(&self, w: &PairWindow) -> String {
        self.check
            .binding
            .as_ref()
            .map_or("-".into(), |b| limit_label(w, b))
    }
}

mod present;

#[cfg(test)]
mod tests;
