//! The magnetic pulse models over a grid of charging voltages and standoffs.
//!
//! The standoff only decides where the integration stops: the motion up to a distance x does
//! not depend on how much further the parent lies. So one integration per charging voltage, with
//! every standoff of the grid as a landing target (each landed on exactly, as in a single
//! estimate), gives the whole row, identical to running the single estimate at each setting.
//! Rows are shared out over threads (`std::thread::scope`).
//!
//! Every value is a **screening estimate, not a guarantee** (see [`crate::process::magnetic`]).

use super::magnetic::{run, ImpactOutcome, IntegrationOptions, Plant, PulseSetup};
use super::ProcessError;
use crate::units::{Energy, Length, Velocity, Voltage};
use serde::{Deserialize, Serialize};
use std::num::NonZeroUsize;

/// One setting of a sweep and what the model gives there.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct SweepPoint {
    /// Charging voltage U0.
    pub voltage: Voltage,
    /// Stored energy C U0^2 / 2.
    pub stored_energy: Energy,
    /// Standoff.
    pub standoff: Length,
    /// Impact (velocity, time, whether after the first half-wave) or why not.
    pub outcome: ImpactOutcome,
}

/// A voltage x standoff grid of outcomes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SweepResult {
    /// The voltages, in the order given.
    pub voltages: Vec<Voltage>,
    /// The standoffs, in the order given.
    pub standoffs: Vec<Length>,
    /// All points, voltage-major: point (i, j) is at `i * standoffs.len() + j`.
    pub points: Vec<SweepPoint>,
}

impl SweepResult {
    /// The point at voltage index `i` and standoff index `j`, if both are in range.
    pub fn point(&self, i: usize, j: usize) -> Option<&SweepPoint> {
        if i < self.voltages.len() && j < self.standoffs.len() {
            self.points.get(i * self.standoffs.len() + j)
        } else {
            None
        }
    }

    /// The impact velocity at (i, j), `None` for no impact or an index out of range.
    pub fn impact_velocity(&self, i: usize, j: usize) -> Option<Velocity> {
        self.point(i, j).and_then(|p| p.outcome.impact_velocity())
    }
}

/// Ascending unique targets and, for each original standoff, its index among them.
fn targets_of(standoffs: &[f64]) -> (Vec<f64>, Vec<usize>) {
    let mut sorted: Vec<f64> = standoffs.to_vec();
    sorted.sort_by(f64::total_cmp);
    sorted.dedup();
    let index = standoffs
        .iter()
        .map(|g| sorted.partition_point(|t| t < g))
        .collect();
    (sorted, index)
}

/// Impact outcomes at several distances from one integration of the set-up (its own standoff
/// is ignored): velocity against travelled distance, exact at each distance. Each distance must
/// be a valid standoff for the set-up. A screening estimate, not a guarantee.
///
/// # Errors
/// Validation errors of the set-up at any of the distances, or of the options;
/// [`ProcessError::NonFinite`] if the integration breaks down.
pub fn velocity_against_distance(
    setup: &PulseSetup,
    distances: &[Length],
    options: &IntegrationOptions,
) -> Result<Vec<ImpactOutcome>, ProcessError> {
    options.validate()?;
    let mut plant = None;
    for d in distances {
        plant = Some(Plant::from_setup(&setup.with_standoff(*d))?);
    }
    let Some(plant) = plant else {
        return Ok(Vec::new());
    };
    let raw: Vec<f64> = distances.iter().map(|d| d.si()).collect();
    let (targets, index) = targets_of(&raw);
    let opts = IntegrationOptions {
        sample_every: None,
        ..*options
    };
    let run = run(&plant, &targets, &opts)?;
    Ok(index.iter().map(|&k| run.outcomes[k]).collect())
}

/// Run the set-up's model over every charging voltage x standoff (the set-up's own voltage and
/// standoff are ignored; its efficiency is used). `threads`: `None` uses the available
/// parallelism. Every setting is validated before anything runs. A screening estimate, not a
/// guarantee.
///
/// Speed (measured on a 2-core VM, see `docs/process-models.md`): one integration per voltage,
/// so a 100 x 100 grid costs 100 integrations.
///
/// # Errors
/// The first validation error of any setting (e.g. a voltage above the bank's rating, a
/// standoff outside the geometry); [`ProcessError::NonFinite`] if an integration breaks down.
pub fn sweep(
    setup: &PulseSetup,
    voltages: &[Voltage],
    standoffs: &[Length],
    options: &IntegrationOptions,
    threads: Option<NonZeroUsize>,
) -> Result<SweepResult, ProcessError> {
    options.validate()?;
    let mut base = None;
    for v in voltages {
        for g in standoffs {
            let s = setup.with_charging_voltage(*v).with_standoff(*g);
            base = Some(Plant::from_setup(&s)?);
        }
    }
    let Some(base) = base else {
        return Ok(SweepResult {
            voltages: voltages.to_vec(),
            standoffs: standoffs.to_vec(),
            points: Vec::new(),
        });
    };
    let raw: Vec<f64> = standoffs.iter().map(|d| d.si()).collect();
    let (targets, index) = targets_of(&raw);
    let opts = IntegrationOptions {
        sample_every: None,
        ..*options
    };
    let n_threads = threads
        .or_else(|| std::thread::available_parallelism().ok())
        .map_or(1, NonZeroUsize::get)
        .min(voltages.len())
        .max(1);
    let chunk = voltages.len().div_ceil(n_threads);

    let row = |u: &Voltage| -> Result<Vec<ImpactOutcome>, ProcessError> {
        let plant = base.with_u0(u.si());
        Ok(run(&plant, &targets, &opts)?.outcomes)
    };
    let rows: Vec<Result<Vec<ImpactOutcome>, ProcessError>> = if n_threads == 1 {
        voltages.iter().map(row).collect()
    } else {
        std::thread::scope(|scope| {
            let handles: Vec<_> = voltages
                .chunks(chunk)
                .map(|part| scope.spawn(move || part.iter().map(row).collect::<Vec<_>>()))
                .collect();
            let mut all = Vec::with_capacity(voltages.len());
            for h in handles {
                match h.join() {
                    Ok(part) => all.extend(part),
                    Err(panic) => std::panic::resume_unwind(panic),
                }
            }
            all
        })
    };

    let bank = setup.bank();
    let mut points = Vec::with_capacity(voltages.len() * standoffs.len());
    for (u, row) in voltages.iter().zip(rows) {
        let row = row?;
        let stored_energy = bank.stored_energy(*u)?;
        for (g, &k) in standoffs.iter().zip(&index) {
            points.push(SweepPoint {
                voltage: *u,
                stored_energy,
                standoff: *g,
                outcome: row[k],
            });
        }
    }
    Ok(SweepResult {
        voltages: voltages.to_vec(),
        standoffs: standoffs.to_vec(),
        points,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::process::magnetic::estimate;
    use crate::process::magnetic::tests::{sheet_setup, tube_setup};
    use approx::assert_relative_eq;

    fn grid() -> (Vec<Voltage>, Vec<Length>) {
        (
            [6e3, 8e3, 10e3, 3e3]
                .iter()
                .map(|&v| Voltage::from_v(v))
                .collect(),
            [2.5e-3, 1e-3, 4e-3, 2.5e-3, 8e-3]
                .iter()
                .map(|&g| Length::from_m(g))
                .collect(),
        )
    }

    /// Every sweep point equals the single estimate at that setting (the shared-integration
    /// shortcut is exact), for both geometries and with 1 or 2 threads.
    #[test]
    fn sweep_matches_single_estimates() {
        let (us, gs) = grid();
        for setup in [
            PulseSetup::Tube(tube_setup()),
            PulseSetup::Sheet(sheet_setup()),
        ] {
            for threads in [1, 2] {
                let res = sweep(
                    &setup,
                    &us,
                    &gs,
                    &IntegrationOptions::default(),
                    NonZeroUsize::new(threads),
                )
                .unwrap();
                assert_eq!(res.points.len(), us.len() * gs.len());
                for (i, u) in us.iter().enumerate() {
                    for (j, g) in gs.iter().enumerate() {
                        let single = estimate(
                            &setup.with_charging_voltage(*u).with_standoff(*g),
                            &IntegrationOptions::default(),
                        )
                        .unwrap();
                        let p = res.point(i, j).unwrap();
                        assert_eq!(p.voltage, *u);
                        assert_eq!(p.standoff, *g);
                        match (p.outcome.impact_velocity(), single.impact_velocity()) {
                            (Some(a), Some(b)) => {
                                assert_relative_eq!(a.si(), b.si(), max_relative = 1e-9)
                            }
                            (None, None) => {}
                            other => panic!("mismatch at ({i}, {j}): {other:?}"),
                        }
                    }
                }
            }
        }
    }

    #[test]
    fn sweep_refuses_bad_settings() {
        let setup = PulseSetup::Tube(tube_setup());
        let opts = IntegrationOptions::default();
        assert!(matches!(
            sweep(
                &setup,
                &[Voltage::from_v(13e3)],
                &[Length::from_m(2e-3)],
                &opts,
                None
            ),
            Err(ProcessError::VoltageAboveRating { .. })
        ));
        assert!(sweep(
            &setup,
            &[Voltage::from_v(8e3)],
            &[Length::from_m(0.0)],
            &opts,
            None
        )
        .is_err());
        let empty = sweep(&setup, &[], &[Length::from_m(2e-3)], &opts, None).unwrap();
        assert!(empty.points.is_empty());
    }

    /// Velocity against distance rises with distance early in the flight (the wall is still
    /// being accelerated).
    #[test]
    fn velocity_against_distance_rises_early() {
        let setup = PulseSetup::Tube(tube_setup());
        let d: Vec<Length> = [0.5e-3, 1e-3, 1.5e-3]
            .iter()
            .map(|&x| Length::from_m(x))
            .collect();
        let out = velocity_against_distance(&setup, &d, &IntegrationOptions::default()).unwrap();
        let v: Vec<f64> = out
            .iter()
            .map(|o| o.impact_velocity().map_or(0.0, |v| v.si()))
            .collect();
        assert!(v[0] > 0.0 && v[0] < v[1] && v[1] < v[2], "{v:?}");
    }
}
