//! A magnetic pulse model over charging voltage (or energy) x standoff: every setting checked
//! against a pair window at the user's angle, and the settings inside ranked by the velocity
//! scatter they tolerate (how far the impact velocity can move, at the same angle, before the
//! verdict changes).

use crate::error::{SetupError, SetupResult};
use crate::estimate::{classify_impact, validate_options};
use crate::grid::Grid;
use crate::inputs::Inputs;
use crate::parts::resolve_parts;
use crate::request::{field, Integration, MagneticRequest};
use crate::resolve::{Catalog, MagneticModel, ResolvedBank};
use oblique_core::process::{sweep, SweepResult};
use oblique_core::units::{Angle, Length, Voltage};
use oblique_core::Convention;
use oblique_window::classify::{explain_velocity, Classification, LimitRef};
use oblique_window::PairWindow;
use std::num::NonZeroUsize;

/// The most settings one sweep may hold.
pub const MAX_SETTINGS: usize = 1_000_000;

/// The charging voltages of a sweep, or the stored energies that give them.
#[derive(Debug, Clone, PartialEq)]
pub enum ChargeGrid {
    /// Charging voltages (V).
    Voltages(Grid),
    /// Stored energies (J).
    Energies(Grid),
}

/// The collision angles of a sweep's window check.
#[derive(Debug, Clone, PartialEq)]
pub enum AngleGrid {
    /// The same angle at every standoff.
    Same(Angle),
    /// One angle per standoff, in their order (a list, or a range spread over them).
    PerStandoff(Grid),
}

/// A sweep over charging voltage (or energy) x standoff.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepRequest {
    /// Bank, coil and workpiece.
    pub process: MagneticRequest,
    /// Voltages or energies.
    pub charge: ChargeGrid,
    /// Number of values of a voltage or energy range.
    pub steps: usize,
    /// Standoffs (m).
    pub standoffs: Grid,
    /// Number of values of a standoff range.
    pub standoff_steps: usize,
    /// Angles for the window check (required with a pair window, refused without).
    pub angles: Option<AngleGrid>,
    /// Pair window to check every setting against (also the default flyer).
    pub pair: Option<String>,
    /// Efficiency eta in (0, 1] (default: the bank file's calibration, else 1).
    pub efficiency: Option<f64>,
    /// Time integration.
    pub integration: Integration,
    /// Worker threads (default: the available parallelism).
    pub threads: Option<NonZeroUsize>,
}

/// The grid's values (SI).
#[derive(Debug, Clone, PartialEq)]
pub struct SweepGrid {
    /// Charging voltages (V).
    pub voltages: Vec<f64>,
    /// Standoffs (m).
    pub standoffs: Vec<f64>,
    /// One collision angle per standoff (rad), when checking a window.
    pub angles: Option<Vec<f64>>,
    /// True when the voltages follow from stored energies.
    pub from_energy: bool,
}

impl SweepGrid {
    /// True when every standoff has the same angle (the process curves then lie on one line
    /// of the window plot).
    #[must_use]
    pub fn one_angle(&self) -> bool {
        self.angles
            .as_ref()
            .is_none_or(|a| a.iter().all(|x| (x - a[0]).abs() < 1e-12))
    }
}

/// One setting and its verdict.
#[derive(Debug, Clone)]
pub struct Setting {
    /// Index of the charging voltage.
    pub voltage_index: usize,
    /// Index of the standoff.
    pub standoff_index: usize,
    /// The window check at the standoff's angle (with a window, on impact).
    pub check: Option<Classification>,
    /// For settings inside the window: the nearest impact velocity at the same angle where the
    /// verdict changes (m/s, unrounded: where the limit reached first is reached), `None` when it
    /// does not change from Vp/20 to 20 Vp.
    pub verdict_change_m_s: Option<f64>,
    /// For settings inside the window: the limit reached first along the impact velocity.
    pub limit_reached: Option<LimitRef>,
}

impl Setting {
    /// True when the setting is inside the window.
    #[must_use]
    pub fn inside(&self) -> bool {
        self.check.as_ref().is_some_and(|k| k.inside)
    }

    /// |Vp at the verdict change - Vp| / Vp; infinite when the verdict does not change.
    #[must_use]
    pub fn relative_headroom(&self, vp: f64) -> f64 {
        self.verdict_change_m_s
            .map_or(f64::INFINITY, |v| (v - vp).abs() / vp)
    }
}

/// A sweep's weld probabilities.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepProbability {
    /// The probability of every setting (`None`: no impact).
    pub per_setting: Vec<Option<f64>>,
    /// The scatter assumed.
    pub scatter: oblique_confidence::Scatter,
    /// Draws per setting (the same for every setting).
    pub samples: usize,
    /// Seed.
    pub seed: u64,
    /// Why the velocity spread is what it is.
    pub basis: String,
}

/// A sweep's outcome: every setting with its velocity and verdict, and the settings inside
/// the window ranked by their velocity headroom, largest first.
#[derive(Debug, Clone)]
pub struct SweepRanking<'a> {
    /// Which model.
    pub model: MagneticModel,
    /// The pair window, if one was named.
    pub window: Option<&'a PairWindow>,
    /// Every input with its provenance, and warnings about them.
    pub inputs: Inputs,
    /// The bank's capacitance (F), for the stored energies.
    pub capacitance: f64,
    /// The grid.
    pub grid: SweepGrid,
    /// The model's outcomes, voltage-major.
    pub result: SweepResult,
    /// Every setting, voltage-major (setting (i, j) is at `i * standoffs + j`).
    pub settings: Vec<Setting>,
    /// Indices into `settings` of those inside the window, best first.
    pub ranked: Vec<usize>,
    /// The weld probability of every setting, once computed by
    /// `uncertainty::rank_by_probability` (which then re-ranks `ranked` by it).
    pub probability: Option<SweepProbability>,
}

impl SweepRanking<'_> {
    /// The impact velocity of a setting (m/s), `None` for no impact.
    #[must_use]
    pub fn velocity(&self, s: &Setting) -> Option<f64> {
        self.result
            .impact_velocity(s.voltage_index, s.standoff_index)
            .map(|v| v.si())
    }

    /// The collision angle of a setting (rad), when the sweep checks a window.
    #[must_use]
    pub fn angle(&self, s: &Setting) -> Option<f64> {
        self.grid.angles.as_ref().map(|a| a[s.standoff_index])
    }

    /// The stored energy C U0^2 / 2 at a charging voltage (J).
    #[must_use]
    pub fn stored_energy(&self, u: f64) -> f64 {
        0.5 * self.capacitance * u * u
    }

    /// The setting at voltage index `i` and standoff index `j`.
    #[must_use]
    pub fn setting(&self, i: usize, j: usize) -> &Setting {
        &self.settings[i * self.grid.standoffs.len() + j]
    }

    /// The settings inside the window, best first.
    pub fn inside_ranked(&self) -> impl Iterator<Item = &Setting> {
        self.ranked.iter().map(|&k| &self.settings[k])
    }
}

fn grid_values(
    bank: &ResolvedBank<'_>,
    c: &SweepRequest,
    window: Option<&PairWindow>,
) -> SetupResult<SweepGrid> {
    let (voltages, from_energy) = match &c.charge {
        ChargeGrid::Voltages(g) => (
            g.values(c.steps, field::STEPS)
                .map_err(|m| SetupError::invalid(field::CHARGE_VOLTAGE, m))?,
            false,
        ),
        ChargeGrid::Energies(g) => (
            g.values(c.steps, field::STEPS)
                .map_err(|m| SetupError::invalid(field::ENERGY, m))?
                .into_iter()
                .map(|e| (2.0 * e / bank.bank.capacitance.si()).sqrt())
                .collect(),
            true,
        ),
    };
    let charge_field = if from_energy {
        field::ENERGY
    } else {
        field::CHARGE_VOLTAGE
    };
    // A range is checked at its ends first, so a message names the end that is wrong (the
    // upper end of 6kV..18kV), not the first grid value above the rating.
    let highest = voltages.iter().copied().fold(f64::NAN, f64::max);
    if let Err(e) = bank.check_rating(highest, charge_field) {
        let is_range = matches!(
            &c.charge,
            ChargeGrid::Voltages(crate::grid::Grid::Range(..))
                | ChargeGrid::Energies(crate::grid::Grid::Range(..))
        );
        return Err(if is_range {
            e.with_prefix("the range's upper end: ")
        } else {
            e
        });
    }
    let standoffs = c
        .standoffs
        .values(c.standoff_steps, field::STANDOFF_STEPS)
        .map_err(|m| SetupError::invalid(field::STANDOFF, m))?;
    if voltages.is_empty() || standoffs.is_empty() {
        return Err(SetupError::Invalid {
            field: field::STANDOFF,
            message: "--charge-voltage / --energy / --standoff: the grid is empty".into(),
        });
    }
    if voltages.len() * standoffs.len() > MAX_SETTINGS {
        return Err(SetupError::Invalid {
            field: field::STEPS,
            message: format!(
                "--steps / --standoff-steps: {} x {} settings is more than the limit of 1000000",
                voltages.len(),
                standoffs.len()
            ),
        });
    }
    let angles = match &c.angles {
        Some(AngleGrid::Same(a)) => Some(vec![a.radians(); standoffs.len()]),
        Some(AngleGrid::PerStandoff(Grid::List(v))) => {
            if v.len() != standoffs.len() {
                return Err(SetupError::invalid(
                    field::ANGLE_PER_STANDOFF,
                    format!(
                        "{} angle(s) for {} standoff(s); give one per standoff, in the order of --standoff",
                        v.len(),
                        standoffs.len()
                    ),
                ));
            }
            Some(v.clone())
        }
        Some(AngleGrid::PerStandoff(g @ Grid::Range(..))) => Some(
            g.values(standoffs.len(), "the number of standoffs")
                .map_err(|m| SetupError::invalid(field::ANGLE_PER_STANDOFF, m))?,
        ),
        None => None,
    };
    match (window, &angles) {
        (Some(_), None) => {
            return Err(SetupError::missing(
                field::ANGLE,
                "--angle (or --angle-per-standoff) is required with --pair: the angle comes from your geometry (taper, chamfer); the estimate never computes it",
            ))
        }
        (None, Some(_)) => {
            return Err(SetupError::Invalid {
                field: field::ANGLE,
                message: "--angle needs --pair (or --parent with --convention): the angle is only used to check the settings against a window".into(),
            })
        }
        _ => {}
    }
    Ok(SweepGrid {
        voltages,
        standoffs,
        angles,
        from_energy,
    })
}

/// Resolve the request, run the model over the grid, check every setting against the pair
/// window and rank those inside. Screening estimates, not guarantees.
///
/// `notes` receives warnings for the person as they arise; they are kept when a later step
/// fails.
///
/// # Errors
/// As [`crate::resolve_estimate`], and for a grid that is empty, too large, or whose angles do
/// not match the standoffs or the window.
pub fn run_sweep<'a>(
    catalog: &'a Catalog,
    req: &SweepRequest,
    notes: &mut Vec<String>,
) -> SetupResult<SweepRanking<'a>> {
    let window = catalog.pair(req.pair.as_deref())?;
    let mut inputs = Inputs::default();
    let parts = resolve_parts(catalog, &req.process, window, &mut inputs, notes)?;
    let grid = grid_values(&parts.bank, req, window)?;
    for g in &grid.standoffs {
        parts.check_standoff(*g)?;
        parts.compression_warning(*g, &mut inputs);
    }
    let eta = parts.efficiency(req.efficiency, &mut inputs);
    let base = parts.setup(Voltage::from_v(grid.voltages[0]), grid.standoffs[0], eta);
    base.validate()?;
    let opts = req.integration.options(false);
    validate_options(&opts)?;
    let volts: Vec<Voltage> = grid.voltages.iter().map(|u| Voltage::from_v(*u)).collect();
    let gaps: Vec<Length> = grid.standoffs.iter().map(|g| Length::from_m(*g)).collect();
    let result = sweep(&base, &volts, &gaps, &opts, req.threads)?;
    let mut settings = Vec::with_capacity(result.points.len());
    for i in 0..volts.len() {
        for j in 0..gaps.len() {
            let check = match (window, &grid.angles, result.impact_velocity(i, j)) {
                (Some(w), Some(angles), Some(v)) => Some(classify_impact(w, v.si(), angles[j])?),
                _ => None,
            };
            settings.push(Setting {
                voltage_index: i,
                standoff_index: j,
                check,
                verdict_change_m_s: None,
                limit_reached: None,
            });
        }
    }
    if let Some(w) = window {
        headroom(w, &mut settings, req.threads)?;
    }
    let mut ranked: Vec<usize> = (0..settings.len())
        .filter(|&k| settings[k].inside())
        .collect();
    let vp_of = |s: &Setting| {
        result
            .impact_velocity(s.voltage_index, s.standoff_index)
            .map_or(1.0, |v| v.si())
    };
    ranked.sort_by(|&a, &b| {
        let (a, b) = (&settings[a], &settings[b]);
        let ma = a.relative_headroom(vp_of(a));
        let mb = b.relative_headroom(vp_of(b));
        mb.total_cmp(&ma)
            .then(grid.voltages[a.voltage_index].total_cmp(&grid.voltages[b.voltage_index]))
    });
    Ok(SweepRanking {
        model: parts.model,
        window,
        inputs,
        capacitance: parts.bank.bank.capacitance.si(),
        grid,
        result,
        settings,
        ranked,
        probability: None,
    })
}

/// Velocity headroom of the settings inside the window, on every core: for each, where every
/// decisive limit is reached along the impact velocity at its angle
/// (`oblique_window::classify::explain_velocity`, the search `check` and `estimate` use too), the
/// nearest of them being where the verdict changes.
fn headroom(
    w: &PairWindow,
    settings: &mut [Setting],
    threads: Option<NonZeroUsize>,
) -> SetupResult {
    let setup = w.setup()?;
    let threads = threads.map_or(2, NonZeroUsize::get).max(1);
    let chunk = settings.len().div_ceil(threads).max(1);
    std::thread::scope(|s| {
        for part in settings.chunks_mut(chunk) {
            let setup = &setup;
            s.spawn(move || {
                for r in part.iter_mut() {
                    let Some(k) = r.check.as_mut().filter(|k| k.inside) else {
                        continue;
                    };
                    explain_velocity(w, setup, k, Convention::NormalToFlyer);
                    let first = oblique_window::margin::verdict_velocity_headroom(w, k);
                    r.verdict_change_m_s = first.as_ref().map(|a| a.unrounded);
                    r.limit_reached = first.map(|a| a.limit).or_else(|| k.binding.clone());
                }
            });
        }
    });
    Ok(())
}
