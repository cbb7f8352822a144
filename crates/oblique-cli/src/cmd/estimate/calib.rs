//! `oblique calibrate mpw-tube|mpw-sheet|ring-down|export`: flags to a calibration request, the
//! fit from `oblique_setup` (stored in the bank's file with `--save`), L and R from a ring-down
//! record (and a new bank file with `--save-as`), a machine file printed for copying.

use super::{CalibrateCommon, RingDownArgs, SheetCalibrateArgs, TubeCalibrateArgs};
use crate::common::{load_catalog, print_notes, today, user_dirs};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json};
use oblique_core::units::{Capacitance, Frequency, Length, Velocity, Voltage};
use oblique_setup::calibrate::{
    check_bank_name, identify, new_bank_conflict, new_bank_text, write_new_machine, NewBank,
};
use oblique_setup::present::{calibration_json, calibration_text, ring_down_json, ring_down_text};
use oblique_setup::{calibrate, CalibrationRequest, Charge, MagneticRequest, RingDownRequest};
use oblique_window::machine::builtin_text;
use std::path::PathBuf;

/// `oblique calibrate mpw-tube`.
pub fn run_tube(dirs: &[PathBuf], a: TubeCalibrateArgs) -> CmdResult {
    let process = a.tube.request(&a.bank);
    fit(dirs, process, a.charge.charge()?, a.standoff, &a.common)
}

/// `oblique calibrate mpw-sheet`.
pub fn run_sheet(dirs: &[PathBuf], a: SheetCalibrateArgs) -> CmdResult {
    let process = a.sheet.request(&a.bank);
    fit(dirs, process, a.charge.charge()?, a.standoff, &a.common)
}

fn fit(
    dirs: &[PathBuf],
    process: MagneticRequest,
    charge: Charge,
    standoff: f64,
    c: &CalibrateCommon,
) -> CmdResult {
    let catalog = load_catalog(dirs)?;
    let request = CalibrationRequest {
        process,
        charge,
        standoff: Length::from_m(standoff),
        measured_velocity: Velocity::from_m_s(c.measured_velocity),
        velocity_uncertainty: c.measured_velocity_sd.map(|s| match s {
            oblique_confidence::VelocitySpread::Relative(r) => r,
            oblique_confidence::VelocitySpread::Absolute(a) => a / c.measured_velocity,
        }),
        source: c.source.clone(),
        date: c.date.clone().unwrap_or_else(today),
        save: c.save,
        pair: c.pair.clone(),
        integration: c.integration.integration(),
    };
    let mut notes = Vec::new();
    let fitted = calibrate(&catalog, &request, &mut notes);
    print_notes(&notes);
    let fitted = fitted?;
    let saved = if c.save { Some(fitted.save()?) } else { None };
    if c.json {
        emit_json(&calibration_json(&fitted, saved.as_deref()))
    } else {
        emit(&calibration_text(&fitted, saved.as_deref()))
    }
}

/// `oblique calibrate ring-down`.
pub fn run_ring_down(dirs: &[PathBuf], a: RingDownArgs) -> CmdResult {
    let record = RingDownRequest {
        capacitance: Capacitance::from_f(a.capacitance),
        ring_frequency: Frequency::from_hz(a.ring_frequency),
        peak_ratio: a.peak_ratio,
    };
    let ring = identify(record)?;
    let mut written = None;
    if let Some(name) = &a.save_as {
        written = Some(save_bank(dirs, name, &record, &a)?);
    }
    if a.json {
        emit_json(&ring_down_json(&ring, written.as_deref()))
    } else {
        emit(&ring_down_text(&ring, written.as_deref()))
    }
}

fn save_bank(
    dirs: &[PathBuf],
    name: &str,
    record: &RingDownRequest,
    a: &RingDownArgs,
) -> CmdResult<String> {
    check_bank_name(name)?;
    let folders = user_dirs(dirs);
    let Some(dir) = folders.first() else {
        return Err(Fail::input(
            "--save-as needs a library folder: give --library DIR (or set OBLIQUE_LIBRARY)",
        ));
    };
    let machines = crate::common::load_machines(dirs)?;
    if let Some(w) = new_bank_conflict(&machines, name)? {
        errln!("warning: {w}");
    }
    let (Some(rating), Some(source)) = (a.rated_voltage, &a.source) else {
        return Err(Fail::input("--save-as needs --rated-voltage and --source"));
    };
    let bank = NewBank {
        name: name.to_string(),
        rated_voltage: Voltage::from_v(rating),
        source: source.clone(),
        datasheet: a.datasheet.clone().unwrap_or_else(|| "datasheet".into()),
        maintainer: a
            .maintainer
            .clone()
            .or_else(|| std::env::var("USER").ok())
            .unwrap_or_else(|| "unknown".into()),
        date: today(),
    };
    let path = write_new_machine(dir, name, &new_bank_text(record, &bank))?;
    Ok(path.display().to_string())
}

/// `oblique calibrate export NAME`.
pub fn run_export(dirs: &[PathBuf], name: &str) -> CmdResult {
    let machines = crate::common::load_machines(dirs)?;
    let rec = machines.get(name).map_err(Fail::input)?;
    let builtin = rec
        .origin
        .path
        .is_none()
        .then(|| builtin_text(name))
        .flatten();
    crate::common::emit_library_file(rec.origin.path.as_deref(), builtin, || {
        format!("built-in file for '{name}' not found")
    })
}
