//! Calibration: the efficiency factor fitted to one measured shot (and the record stored in the
//! bank's file), L and R identified from a ring-down record (and a new bank file from them).
//! The files are written through `oblique_window`'s atomic writers.

use crate::error::{SetupError, SetupResult};
use crate::estimate::validate_options;
use crate::human::{self, round12};
use crate::inputs::Inputs;
use crate::parts::resolve_parts;
use crate::request::{field, Charge, Integration, MagneticRequest};
use crate::resolve::{standoff_input, Catalog, MagneticModel, ResolvedBank};
use oblique_core::process::{
    calibrate_efficiency, identify_ring_down, EfficiencyFit, ProcessError, PulseSetup, RingDownFit,
};
use oblique_core::units::{Capacitance, Frequency, Length, Velocity, Voltage};
use oblique_window::machine::{
    append_calibration, is_iso_date, parse_machine_file, CalibrationEntry, Machines, MACHINES_DIR,
    MACHINE_FORMAT,
};
use oblique_window::pair::Origin;
use oblique_window::write::{create_new, ron_string, WriteError};
use std::path::{Path, PathBuf};

/// Fit the efficiency of a magnetic model to one measured shot.
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrationRequest {
    /// Bank, coil and workpiece of the shot.
    pub process: MagneticRequest,
    /// Charging voltage or stored energy of the shot.
    pub charge: Charge,
    /// Standoff of the shot.
    pub standoff: Length,
    /// The measured impact velocity.
    pub measured_velocity: Velocity,
    /// The measurement's standard uncertainty relative to it (0.03 for 3 %), if known: stored
    /// with the calibration, it is the velocity spread of later estimates that use it.
    pub velocity_uncertainty: Option<f64>,
    /// Where the measurement comes from (record, logbook page).
    pub source: String,
    /// Date of the shot, YYYY-MM-DD.
    pub date: String,
    /// Whether the fit will be stored in the bank's file (checked before the fit).
    pub save: bool,
    /// Pair window giving the default flyer.
    pub pair: Option<String>,
    /// Time integration.
    pub integration: Integration,
}

/// A fitted efficiency and what identifies its shot.
#[derive(Debug, Clone)]
pub struct CalibrationFit<'a> {
    /// Which model.
    pub model: MagneticModel,
    /// Every input of the shot with its provenance.
    pub inputs: Inputs,
    /// The bank (and its file, where the fit can be stored).
    pub bank: ResolvedBank<'a>,
    /// Coil file name, if any.
    pub coil: Option<String>,
    /// Flyer material id.
    pub flyer: String,
    /// Workpiece thickness (m).
    pub thickness: f64,
    /// Charging voltage of the shot (V).
    pub voltage: f64,
    /// Standoff of the shot (m).
    pub standoff: f64,
    /// Measured velocity (m/s).
    pub measured_velocity: f64,
    /// The measurement's relative standard uncertainty, if given.
    pub velocity_uncertainty: Option<f64>,
    /// Where the measurement comes from.
    pub source: String,
    /// Date of the shot.
    pub date: String,
    /// The fit (efficiency, model velocity, iterations, the estimate at the fitted efficiency).
    pub fit: EfficiencyFit,
}

/// How to copy a built-in machine file into a library folder to calibrate it.
#[must_use]
pub fn copy_hint(name: &str) -> String {
    format!(
        "copy it into a library folder first, then calibrate the copy:\n    mkdir -p DIR/{MACHINES_DIR} && oblique calibrate export {name} > DIR/{MACHINES_DIR}/{name}.ron\n    oblique --library DIR calibrate ... --machine {name} --save\n  (the copy shadows the built-in file, with a warning; give it a new `name` to avoid that)"
    )
}

/// Resolve the shot, check the request, and fit the efficiency with Brent's method
/// (`oblique_core::process::calibrate_efficiency`).
///
/// `notes` receives warnings for the person as they arise; they are kept when a later step
/// fails.
///
/// # Errors
/// As [`crate::resolve_estimate`]; a date that is not YYYY-MM-DD, an empty source, a save
/// into a built-in file; a measured velocity the model cannot reach at any efficiency.
pub fn calibrate<'a>(
    catalog: &'a Catalog,
    req: &CalibrationRequest,
    notes: &mut Vec<String>,
) -> SetupResult<CalibrationFit<'a>> {
    let window = catalog.pair(req.pair.as_deref())?;
    let mut inputs = Inputs::default();
    let parts = resolve_parts(catalog, &req.process, window, &mut inputs, notes)?;
    let u = parts.bank.charge(req.charge, &mut inputs)?;
    let g = req.standoff.si();
    parts.check_standoff(g)?;
    standoff_input(&mut inputs, g);
    let s = parts.setup(u, g, 1.0);
    if !is_iso_date(&req.date) {
        return Err(SetupError::invalid(
            field::DATE,
            format!("'{}' is not a date YYYY-MM-DD", req.date),
        ));
    }
    if req.source.trim().is_empty() {
        return Err(SetupError::invalid(
            field::SOURCE,
            "say where the measured velocity comes from (record, logbook page)",
        ));
    }
    // Refuse an impossible save before the work.
    if let (true, Some(rec)) = (req.save, parts.bank.record) {
        if rec.is_builtin() {
            return Err(SetupError::invalid(
                field::SAVE,
                format!(
                    "machine '{}' is a built-in file ({}) and read-only\n  hint: {}",
                    rec.name,
                    rec.origin.display,
                    copy_hint(&rec.name)
                ),
            ));
        }
    }
    let fit = fit(&s, req)?;
    Ok(CalibrationFit {
        model: parts.model,
        inputs,
        thickness: parts.thickness(),
        bank: parts.bank,
        coil: parts.coil_name,
        flyer: parts.flyer,
        voltage: u.si(),
        standoff: g,
        measured_velocity: req.measured_velocity.si(),
        velocity_uncertainty: req.velocity_uncertainty,
        source: req.source.clone(),
        date: req.date.clone(),
        fit,
    })
}

fn fit(s: &PulseSetup, req: &CalibrationRequest) -> SetupResult<EfficiencyFit> {
    s.with_efficiency(1.0).validate()?;
    let opts = req.integration.options(false);
    validate_options(&opts)?;
    let vm = req.measured_velocity.si();
    calibrate_efficiency(s, req.measured_velocity, &opts).map_err(|e| match e {
        ProcessError::NoBracket { f_high, .. } if f_high < 0.0 => SetupError::invalid(
            field::MEASURED_VELOCITY,
            format!(
                "the model cannot reach {vm:.0} m/s: even at efficiency 1 it gives {:.0} m/s\n  hint: check the bank, coil and material inputs (and the standoff); the efficiency only lowers the push",
                vm + f_high
            ),
        ),
        ProcessError::NoBracket { f_low, .. } => SetupError::invalid(
            field::MEASURED_VELOCITY,
            format!(
                "the model gives {:.0} m/s even at efficiency 0.001, faster than the measured {vm:.0} m/s\n  hint: check the inputs; a fit this far from 1 means the model does not describe the set-up",
                vm + f_low
            ),
        ),
        e => e.into(),
    })
}

impl CalibrationFit<'_> {
    /// The record to store in the bank's file: the fit, the shot and every setting with its
    /// origin.
    #[must_use]
    pub fn entry(&self) -> CalibrationEntry {
        let settings: Vec<String> = self
            .inputs
            .entries
            .iter()
            .map(|i| format!("{} {} ({})", i.label, i.value.shown(), i.from))
            .collect();
        let mut settings = settings.join("; ");
        if !self.bank.overrides.is_empty() {
            settings.push_str(&format!(
                "; NOTE: flags {} overrode this file's bank values for the shot",
                self.bank.overrides.join(", ")
            ));
        }
        CalibrationEntry {
            efficiency: format!("{:.6}", self.fit.efficiency),
            model: self.model.id().into(),
            coil: self.coil.clone(),
            date: self.date.clone(),
            measured_velocity: human::m_s(self.measured_velocity),
            charge_voltage: format!("{} kV", round12(self.voltage / 1e3)),
            standoff: format!("{} mm", round12(self.standoff * 1e3)),
            flyer: Some(self.flyer.clone()),
            flyer_thickness: Some(format!("{} mm", round12(self.thickness * 1e3))),
            settings,
            velocity_uncertainty: self
                .velocity_uncertainty
                .map(|u| format!("{} %", round12(100.0 * u))),
            source: self.source.clone(),
        }
    }

    /// Append [`Self::entry`] to the bank's (user) file, atomically, refusing if the file
    /// changed since it was loaded. Returns the file's path as shown.
    ///
    /// # Errors
    /// No bank file, a built-in one, a file that changed or does not take the entry
    /// ([`SetupError::SaveRefused`]), a failed write ([`SetupError::SaveFailed`]).
    pub fn save(&self) -> SetupResult<String> {
        let Some(rec) = self.bank.record else {
            return Err(SetupError::missing(
                field::MACHINE,
                "--save needs --machine: the bank file to store the calibration in",
            ));
        };
        let Some(path) = &rec.origin.path else {
            return Err(SetupError::invalid(
                field::SAVE,
                format!(
                    "machine '{}' is built in and read-only\n  hint: {}",
                    rec.name,
                    copy_hint(&rec.name)
                ),
            ));
        };
        append_calibration(path, &self.entry(), Some(&rec.origin.sha256)).map_err(|e| match e {
            WriteError::Invalid(_) => SetupError::SaveRefused {
                field: field::SAVE,
                source: e,
            },
            e => SetupError::SaveFailed {
                field: field::SAVE,
                source: e,
            },
        })?;
        Ok(path.display().to_string())
    }
}

/// A ring-down record of the bank's discharge.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RingDownRequest {
    /// Bank capacitance (datasheet or nameplate).
    pub capacitance: Capacitance,
    /// Damped ring frequency of the record.
    pub ring_frequency: Frequency,
    /// Ratio I1/I2 of two successive same-sign current peaks, one period apart.
    pub peak_ratio: f64,
}

/// L and R identified from a ring-down record.
#[derive(Debug, Clone, PartialEq)]
pub struct RingDown {
    /// The record.
    pub request: RingDownRequest,
    /// Exact and simple L and R, and the identified circuit.
    pub fit: RingDownFit,
    /// The decay rate a = f ln(I1/I2) (1/s).
    pub decay_rate: f64,
}

/// Identify the loop's L and R (`oblique_core::process::identify_ring_down`).
///
/// # Errors
/// [`SetupError::Process`] for values outside the model's domain.
pub fn identify(req: RingDownRequest) -> SetupResult<RingDown> {
    let fit = identify_ring_down(req.capacitance, req.ring_frequency, req.peak_ratio)?;
    let period = 1.0 / req.ring_frequency.si();
    Ok(RingDown {
        request: req,
        fit,
        decay_rate: req.peak_ratio.ln() / period,
    })
}

/// A new bank file from a ring-down record.
#[derive(Debug, Clone, PartialEq)]
pub struct NewBank {
    /// The file's name (also its file name, `NAME.ron`).
    pub name: String,
    /// The bank's rated charging voltage.
    pub rated_voltage: Voltage,
    /// Where the record comes from.
    pub source: String,
    /// Where the capacitance and rating come from.
    pub datasheet: String,
    /// Who maintains the file.
    pub maintainer: String,
    /// Date of creation, YYYY-MM-DD.
    pub date: String,
}

/// Refuse a name that cannot be a file name.
///
/// # Errors
/// [`SetupError::Invalid`] for an empty name, or one with spaces or slashes.
pub fn check_bank_name(name: &str) -> SetupResult {
    oblique_window::library::check_file_name(name, "name")
        .map_err(|m| SetupError::invalid(field::SAVE_AS, m))
}

/// Refuse a name a user file already has; a warning when the new file shadows a built-in one.
///
/// # Errors
/// [`SetupError::Invalid`] when a user file has the name.
pub fn new_bank_conflict(machines: &Machines, name: &str) -> SetupResult<Option<String>> {
    match machines.items.get(name) {
        Some(old) if !old.is_builtin() => Err(SetupError::invalid(
            field::SAVE_AS,
            format!(
                "a machine file named '{name}' already exists ({})",
                old.origin.display
            ),
        )),
        Some(old) => Ok(Some(format!(
            "the new bank '{name}' will shadow the built-in file {}",
            old.origin.display
        ))),
        None => Ok(None),
    }
}

/// The text of a new bank file holding the capacitance, rating and ring-down record.
#[must_use]
pub fn new_bank_text(record: &RingDownRequest, bank: &NewBank) -> String {
    format!(
        r#"// Capacitor bank for oblique, written by `oblique calibrate ring-down --save-as`.
// Format: docs/process-models.md, section "Command line". L and R follow from the ring-down
// record (exact form); write `inductance` and `resistance` entries to override them.
(
    format: {format},
    name: {name_q},
    description: "",
    maintainer: {maintainer},
    revisions: [
        (date: {date}, note: "created from a ring-down record"),
    ],
    bank: (
        capacitance: (value: {c}, source: {sheet}),
        max_voltage: (value: {u}, source: {sheet}),
        ring_down: (
            frequency: {f},
            peak_ratio: {r},
            source: {source},
        ),
    ),
    calibrations: [
    ],
)
"#,
        format = ron_string(MACHINE_FORMAT),
        name_q = ron_string(&bank.name),
        maintainer = ron_string(&bank.maintainer),
        date = ron_string(&bank.date),
        c = ron_string(&format!("{} uF", round12(record.capacitance.si() * 1e6))),
        u = ron_string(&format!("{} kV", round12(bank.rated_voltage.si() / 1e3))),
        sheet = ron_string(&bank.datasheet),
        f = ron_string(&format!(
            "{} kHz",
            round12(record.ring_frequency.si() / 1e3)
        )),
        r = ron_string(&format!("{}", record.peak_ratio)),
        source = ron_string(&bank.source),
    )
}

/// Write `text` as the new machine file `DIR/machines/NAME.ron` of a library folder, after
/// validating it with the parser every load uses; never over an existing file.
///
/// # Errors
/// [`SetupError::Folder`] when the folder cannot be made, [`SetupError::Library`] when the text
/// does not validate, [`SetupError::SaveRefused`] when the file exists or cannot be written.
pub fn write_new_machine(dir: &Path, name: &str, text: &str) -> SetupResult<PathBuf> {
    let folder = dir.join(MACHINES_DIR);
    std::fs::create_dir_all(&folder).map_err(|e| SetupError::Folder {
        path: folder.display().to_string(),
        message: e.to_string(),
    })?;
    let path = folder.join(format!("{name}.ron"));
    let origin = Origin {
        display: path.display().to_string(),
        path: Some(path.clone()),
        sha256: String::new(),
    };
    parse_machine_file(origin, text)?;
    create_new(&path, text).map_err(|e| SetupError::SaveRefused {
        field: field::SAVE_AS,
        source: e,
    })?;
    Ok(path)
}
