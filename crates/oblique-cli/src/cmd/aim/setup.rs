//! The set-up search of `oblique aim`: a machine, a coil family, charges, standoffs and
//! chamfers, searched with the tube model (`oblique_aim::setups`).

use super::AimArgs;
use crate::args::process::{parse, BankFlags, IntegrationFlags};
use crate::common::load_machines;
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json};
use crate::qarg;
use clap::Args;
use oblique_aim::setups::{search, CoilFamily, SetupSearch};
use oblique_setup::grid::{self, Grid};
use oblique_setup::{Catalog, ChargeGrid};
use oblique_window::{Library, PairWindow};
use std::path::PathBuf;

/// The machine, the coil family and the settings to search.
#[derive(Debug, Clone, Args)]
pub struct SetupFlags {
    #[command(flatten)]
    pub bank: BankFlags,
    /// Compression coil (or field-shaper) file: its bore, length and leads unless given below.
    #[arg(long, value_name = "NAME")]
    pub coil: Option<String>,
    /// Coil bore radii to try (radius, not diameter): a list 21mm,23mm or a range 21mm..25mm.
    #[arg(long = "coil-bore", value_name = "LIST|A..B", value_parser = grid::length_grid)]
    pub coil_bore: Option<Grid>,
    /// Coil working lengths to try: a list or a range, e.g. 20mm..60mm.
    #[arg(long = "coil-length", value_name = "LIST|A..B", value_parser = grid::length_grid)]
    pub coil_length: Option<Grid>,
    /// Inductance of the coil's terminals and leads, e.g. 20nH (default: the coil file's, else 0).
    #[arg(long = "coil-inductance", value_name = "INDUCTANCE", value_parser = parse::inductance_or_zero, allow_hyphen_values = true)]
    pub coil_inductance: Option<f64>,
    /// Tube outer radius, e.g. 20mm (the pair window gives the wall: its flyer thickness).
    #[arg(long = "tube-outer-radius", value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub tube_outer_radius: Option<f64>,
    /// Charging voltages to try: a list or a range, e.g. 6kV..12kV (above the rating: left out).
    #[arg(long = "charge-voltage", value_name = "LIST|A..B", value_parser = grid::voltage_grid, conflicts_with = "energy")]
    pub charge_voltage: Option<Grid>,
    /// Stored energies to try instead of voltages, e.g. 5kJ..20kJ.
    #[arg(long, value_name = "LIST|A..B", value_parser = grid::energy_grid)]
    pub energy: Option<Grid>,
    /// Standoffs to try (the wall's travel to the rod): a list or a range, e.g. 1mm..3mm.
    #[arg(long, value_name = "LIST|A..B", value_parser = grid::length_grid)]
    pub standoff: Option<Grid>,
    /// Rod chamfers (tapers) to try: the collision angle of the simple model, e.g. 4deg..16deg.
    #[arg(long, value_name = "LIST|A..B", value_parser = grid::angle_grid)]
    pub chamfer: Option<Grid>,
    /// Values each range is spread over, 2 to 100 (default 5); at most 100000 set-ups in all.
    #[arg(long, value_name = "N")]
    pub steps: Option<usize>,
    /// Efficiency factor eta in (0, 1] (default: the machine's stored calibration, else 1).
    #[arg(long, value_name = "ETA", value_parser = parse::efficiency)]
    pub efficiency: Option<f64>,
    /// The bank's current rating, e.g. 500kA: set-ups whose first current peak (workpiece held
    /// still) exceeds it are left out.
    #[arg(long = "max-current", value_name = "CURRENT", value_parser = qarg::current, allow_hyphen_values = true)]
    pub max_current: Option<f64>,
    /// The bank's energy rating, e.g. 20kJ: set-ups storing more are left out.
    #[arg(long = "max-energy", value_name = "ENERGY", value_parser = parse::energy, allow_hyphen_values = true)]
    pub max_energy: Option<f64>,
    #[command(flatten)]
    pub integration: IntegrationFlags,
}

impl SetupFlags {
    /// True when a set-up search is asked for (any of its flags).
    pub fn given(&self) -> bool {
        self.bank.machine.is_some()
            || self.bank.capacitance.is_some()
            || self.coil.is_some()
            || self.coil_bore.is_some()
            || self.coil_length.is_some()
            || self.tube_outer_radius.is_some()
            || self.charge_voltage.is_some()
            || self.energy.is_some()
            || self.standoff.is_some()
            || self.chamfer.is_some()
            || self.steps.is_some()
            || self.max_current.is_some()
            || self.max_energy.is_some()
    }
}

fn need<T: Clone>(v: &Option<T>, flag: &str, what: &str) -> CmdResult<T> {
    v.clone()
        .ok_or_else(|| Fail::input(format!("{flag} is required for the set-up search: {what}")))
}

pub fn run(dirs: &[PathBuf], a: &AimArgs, lib: Library, w: &PairWindow) -> CmdResult {
    let f = &a.setup;
    if f.bank.machine.is_none() && f.bank.capacitance.is_none() {
        return Err(Fail::input(
            "--machine is required for the set-up search: the capacitor bank file (or give the bank by --capacitance, --rated-voltage, --bank-inductance, --bank-resistance)",
        ));
    }
    let charge = match (&f.charge_voltage, &f.energy) {
        (Some(g), _) => ChargeGrid::Voltages(g.clone()),
        (None, Some(g)) => ChargeGrid::Energies(g.clone()),
        (None, None) => {
            return Err(Fail::input(
                "--charge-voltage is required for the set-up search: a list or a range, e.g. 6kV..12kV (or --energy)",
            ))
        }
    };
    let machines = load_machines(dirs)?;
    let catalog = Catalog::new(lib, machines);
    let s = SetupSearch {
        window: w,
        bank: f.bank.request(),
        coils: CoilFamily {
            file: f.coil.clone(),
            bore: f.coil_bore.clone(),
            length: f.coil_length.clone(),
            extra_inductance: f.coil_inductance,
        },
        tube_outer_radius: need(
            &f.tube_outer_radius,
            "--tube-outer-radius",
            "the tube's outer radius, e.g. 20mm",
        )?,
        charge,
        standoffs: need(
            &f.standoff,
            "--standoff",
            "a list or a range, e.g. 1mm..3mm",
        )?,
        chamfers: need(
            &f.chamfer,
            "--chamfer",
            "the rod chamfers (collision angles) to try, e.g. 4deg..16deg",
        )?,
        steps: f.steps.unwrap_or(5),
        efficiency: f.efficiency,
        max_current: f.max_current,
        max_energy: f.max_energy,
        integration: f.integration.integration(),
        velocity_sd: a.scatter.velocity_sd,
        angle_sd_deg: a.scatter.angle_sd.map(f64::to_degrees),
        model: a.scatter.model_uncertainty != Some(crate::args::OnOff::Off),
        samples: a.scatter.samples,
        seed: a
            .scatter
            .seed
            .unwrap_or(oblique_confidence::scatter::DEFAULT_SEED),
        top: a.top,
        window_from_file: a.window.pair.is_some(),
    };
    if !(1..=oblique_aim::aim::MAX_TOP).contains(&a.top) {
        return Err(Fail::input(format!(
            "--top: {} is outside 1 to {}",
            a.top,
            oblique_aim::aim::MAX_TOP
        )));
    }
    let r = search(&catalog, &s)?;
    if a.json {
        emit_json(&r.json())
    } else {
        emit(&r.text())
    }
}
