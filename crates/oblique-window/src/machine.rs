//! Machine and tooling files: capacitor banks, compression coils (or field-shaper bores), flat bar
//! coils and explosive set-ups, one per file, in `windows/machines/*.ron` (built in) or
//! `DIR/machines/*.ron` of a user library folder. Every value carries its unit inside the string
//! and its own source (datasheet, drawing, ring-down record, ...). A bank may carry stored
//! calibrations: the fitted efficiency factor and the measured shot it came from.
//!
//! Format (`oblique-machine/1`), a bank:
//!
//! ```ron
//! (
//!     format: "oblique-machine/1",
//!     name: "my-bank",
//!     description: "what it is",
//!     maintainer: "who keeps the file",
//!     revisions: [(date: "2026-12-01", note: "created")],
//!     bank: (
//!         capacitance: (value: "300 uF", source: "nameplate"),
//!         max_voltage: (value: "12 kV", source: "datasheet"),
//!         // inductance and resistance: given, or derived from the ring-down record
//!         ring_down: (frequency: "45.25 kHz", peak_ratio: "3.02", load: "output shorted",
//!                     date: "2026-08-20", source: "scope record 17"),
//!     ),
//!     calibrations: [],
//! )
//! ```
//!
//! A coil file has `compression_coil: (bore_radius, length, extra_inductance)` or
//! `bar_coil: (length, width, extra_inductance)` instead of `bank`; an explosive set-up has
//! `explosive: (gurney_velocity, detonation_velocity, flyer_to_charge | charge_to_flyer,
//! preset_angle)`. See `docs/process-models.md`, section "Command line".

pub use crate::diag::is_iso_date;
use crate::diag::{close_matches, parse_ron, Collector, Diagnostic, Diagnostics};
use crate::library::{sha256_hex, BUILTIN_FILES};
use crate::materials::Revision;
use crate::pair::Origin;
use crate::write::{ron_string, update_file, WriteError};
use oblique_core::process::{
    identify_ring_down, BarCoil, CapacitorBank, CompressionCoil, MassRatio, RingDownFit,
};
use oblique_core::units::{
    Angle, Capacitance, Frequency, Inductance, Length, QuantityKind, Resistance, Velocity, Voltage,
};
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// The format tag every machine file carries.
pub const MACHINE_FORMAT: &str = "oblique-machine/1";

/// The sub-folder of a library folder that holds machine files.
pub const MACHINES_DIR: &str = "machines";

/// The models a calibration can belong to.
pub const CALIBRATION_MODELS: [&str; 2] = ["mpw-tube", "mpw-sheet"];

/// A value as written: the quantity with its unit, and where it comes from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SourcedEntry {
    /// The quantity with its unit, e.g. `"300 uF"`.
    pub value: String,
    /// Where the value comes from (datasheet, drawing, measurement record).
    pub source: String,
}

/// A ring-down record as written.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RingDownEntry {
    /// Damped ring frequency, with unit.
    pub frequency: String,
    /// Ratio I1/I2 of two successive same-sign current peaks (a pure number, >= 1).
    pub peak_ratio: String,
    /// What was connected to the bank during the record (e.g. "output shorted by a bar").
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub load: Option<String>,
    /// ISO date of the record.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub date: Option<String>,
    /// The record (file, logbook page).
    pub source: String,
}

/// A capacitor bank as written.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BankEntry {
    /// Capacitance.
    pub capacitance: SourcedEntry,
    /// Rated (maximum) charging voltage.
    pub max_voltage: SourcedEntry,
    /// Loop inductance of the bank (derived from `ring_down` when absent).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub inductance: Option<SourcedEntry>,
    /// Loop resistance of the bank (derived from `ring_down` when absent).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub resistance: Option<SourcedEntry>,
    /// A ring-down record of the bank with its output shorted.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ring_down: Option<RingDownEntry>,
    /// The peak current rating, if the datasheet gives one (`oblique aim` leaves out set-ups
    /// whose first current peak exceeds it).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max_current: Option<SourcedEntry>,
    /// The stored energy rating, if the datasheet gives one apart from the voltage rating.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max_energy: Option<SourcedEntry>,
}

/// A single-turn compression coil (or field-shaper bore) as written.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CompressionCoilEntry {
    /// Bore radius.
    pub bore_radius: SourcedEntry,
    /// Length of the working zone.
    pub length: SourcedEntry,
    /// Inductance of terminals and leads outside the working gap.
    pub extra_inductance: SourcedEntry,
}

/// A flat one-turn bar coil as written.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BarCoilEntry {
    /// Length of the bar (along the current).
    pub length: SourcedEntry,
    /// Width of the bar.
    pub width: SourcedEntry,
    /// Inductance of the return conductor and leads.
    pub extra_inductance: SourcedEntry,
}

/// An explosive set-up as written. No explosive is shipped: the Gurney velocity is the user's.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ExplosiveEntry {
    /// Gurney velocity sqrt(2E) of the explosive as laid.
    pub gurney_velocity: SourcedEntry,
    /// Detonation velocity.
    pub detonation_velocity: SourcedEntry,
    /// Flyer-to-charge mass ratio M/C (give this or `charge_to_flyer`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub flyer_to_charge: Option<SourcedEntry>,
    /// Charge-to-flyer mass ratio C/M (give this or `flyer_to_charge`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub charge_to_flyer: Option<SourcedEntry>,
    /// Preset angle between flyer and parent (`"0 deg"` for the parallel set-up).
    pub preset_angle: SourcedEntry,
}

/// A stored calibration as written: the fitted efficiency and the shot it came from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CalibrationEntry {
    /// The fitted efficiency factor eta, a pure number in (0, 1].
    pub efficiency: String,
    /// `mpw-tube` or `mpw-sheet`.
    pub model: String,
    /// The coil file's name, when the coil came from a file.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub coil: Option<String>,
    /// ISO date of the shot.
    pub date: String,
    /// The measured impact velocity.
    pub measured_velocity: String,
    /// Charging voltage of the shot.
    pub charge_voltage: String,
    /// Standoff of the shot.
    pub standoff: String,
    /// Flyer material id.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub flyer: Option<String>,
    /// Flyer (wall or sheet) thickness.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub flyer_thickness: Option<String>,
    /// Every other setting of the shot, in words.
    #[serde(default)]
    pub settings: String,
    /// The measured velocity's standard uncertainty, relative (`"3 %"`) or with a unit
    /// (`"12 m/s"`): the calibration shot's own spread, carried into later estimates.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub velocity_uncertainty: Option<String>,
    /// Where the measurement comes from (e.g. a velocimetry record).
    pub source: String,
}

/// A whole machine file.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MachineFile {
    /// Must be [`MACHINE_FORMAT`].
    pub format: String,
    /// Unique name, used with `--machine`, `--coil` or `--setup`.
    pub name: String,
    /// What it is.
    #[serde(default)]
    pub description: String,
    /// Set when the data are invented (demo): says so in words.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub invented: Option<String>,
    /// Who maintains the file.
    pub maintainer: String,
    /// Revision notes (at least one).
    #[serde(default)]
    pub revisions: Vec<Revision>,
    /// A capacitor bank.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub bank: Option<BankEntry>,
    /// A compression coil.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub compression_coil: Option<CompressionCoilEntry>,
    /// A flat bar coil.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub bar_coil: Option<BarCoilEntry>,
    /// An explosive set-up.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub explosive: Option<ExplosiveEntry>,
    /// Stored calibrations (banks only), oldest first.
    #[serde(default)]
    pub calibrations: Vec<CalibrationEntry>,
}

/// A validated value and its source.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sourced<'a, T> {
    /// The value (SI inside).
    pub value: T,
    /// Where it comes from.
    pub source: &'a str,
}

/// A validated value with an owned source text.
#[derive(Debug, Clone, PartialEq)]
pub struct Valued<T> {
    /// The value (SI inside).
    pub value: T,
    /// Where it comes from.
    pub source: String,
}

impl<T: Copy> Valued<T> {
    /// Borrowed view.
    pub fn view(&self) -> Sourced<'_, T> {
        Sourced {
            value: self.value,
            source: &self.source,
        }
    }
}

/// A validated ring-down record and the L and R identified from it.
#[derive(Debug, Clone, PartialEq)]
pub struct RingDown {
    /// Damped ring frequency.
    pub frequency: Frequency,
    /// Same-sign peak ratio I1/I2.
    pub peak_ratio: f64,
    /// What was connected during the record.
    pub load: Option<String>,
    /// Date.
    pub date: Option<String>,
    /// The record.
    pub source: String,
    /// L and R, exact and simple forms.
    pub fit: RingDownFit,
}

/// A validated bank.
#[derive(Debug, Clone, PartialEq)]
pub struct BankSpec {
    /// Capacitance.
    pub capacitance: Valued<Capacitance>,
    /// Rated charging voltage.
    pub max_voltage: Valued<Voltage>,
    /// Loop inductance (given, or from the ring-down).
    pub inductance: Valued<Inductance>,
    /// Loop resistance (given, or from the ring-down).
    pub resistance: Valued<Resistance>,
    /// The ring-down record, if any.
    pub ring_down: Option<RingDown>,
    /// The peak current rating, if given.
    pub max_current: Option<Valued<oblique_core::units::Current>>,
    /// The stored energy rating, if given.
    pub max_energy: Option<Valued<oblique_core::units::Energy>>,
}

impl BankSpec {
    /// The bank for the process models (its rating included).
    pub fn bank(&self) -> CapacitorBank {
        CapacitorBank {
            capacitance: self.capacitance.value,
            max_voltage: Some(self.max_voltage.value),
            inductance: self.inductance.value,
            resistance: self.resistance.value,
        }
    }
}

/// A validated compression coil.
#[derive(Debug, Clone, PartialEq)]
pub struct CompressionCoilSpec {
    /// Bore radius.
    pub bore_radius: Valued<Length>,
    /// Working length.
    pub length: Valued<Length>,
    /// Extra series inductance.
    pub extra_inductance: Valued<Inductance>,
}

impl CompressionCoilSpec {
    /// The coil for the process models.
    pub fn coil(&self) -> CompressionCoil {
        CompressionCoil {
            bore_radius: self.bore_radius.value,
            length: self.length.value,
            extra_inductance: self.extra_inductance.value,
        }
    }
}

/// A validated bar coil.
#[derive(Debug, Clone, PartialEq)]
pub struct BarCoilSpec {
    /// Bar length.
    pub length: Valued<Length>,
    /// Bar width.
    pub width: Valued<Length>,
    /// Extra series inductance.
    pub extra_inductance: Valued<Inductance>,
}

impl BarCoilSpec {
    /// The coil for the process models.
    pub fn coil(&self) -> BarCoil {
        BarCoil {
            length: self.length.value,
            width: self.width.value,
            extra_inductance: self.extra_inductance.value,
        }
    }
}

/// A validated explosive set-up.
#[derive(Debug, Clone, PartialEq)]
pub struct ExplosiveSpec {
    /// Gurney velocity.
    pub gurney_velocity: Valued<Velocity>,
    /// Detonation velocity.
    pub detonation_velocity: Valued<Velocity>,
    /// Mass ratio.
    pub mass_ratio: Valued<MassRatio>,
    /// Preset angle.
    pub preset_angle: Valued<Angle>,
}

/// What a machine file describes.
#[derive(Debug, Clone, PartialEq)]
pub enum MachineItem {
    /// A capacitor bank.
    Bank(Box<BankSpec>),
    /// A compression coil or field-shaper bore.
    CompressionCoil(CompressionCoilSpec),
    /// A flat bar coil.
    BarCoil(BarCoilSpec),
    /// An explosive set-up.
    Explosive(ExplosiveSpec),
}

impl MachineItem {
    /// The kind in words.
    pub fn kind(&self) -> &'static str {
        match self {
            MachineItem::Bank(_) => "capacitor bank",
            MachineItem::CompressionCoil(_) => "compression coil",
            MachineItem::BarCoil(_) => "bar coil",
            MachineItem::Explosive(_) => "explosive set-up",
        }
    }
}

/// A validated stored calibration.
#[derive(Debug, Clone, PartialEq)]
pub struct Calibration {
    /// Position in the file's list.
    pub index: usize,
    /// Fitted efficiency eta.
    pub efficiency: f64,
    /// Model.
    pub model: String,
    /// Coil name, if the coil came from a file.
    pub coil: Option<String>,
    /// Date of the shot.
    pub date: String,
    /// Measured velocity.
    pub measured_velocity: Velocity,
    /// Charging voltage.
    pub charge_voltage: Voltage,
    /// Standoff.
    pub standoff: Length,
    /// Flyer material id.
    pub flyer: Option<String>,
    /// Flyer thickness.
    pub flyer_thickness: Option<Length>,
    /// Other settings in words.
    pub settings: String,
    /// The measured velocity's standard uncertainty relative to it (0.03 for 3 %), if recorded.
    pub velocity_uncertainty: Option<f64>,
    /// Source of the measurement.
    pub source: String,
}

/// A validated machine file.
#[derive(Debug, Clone, PartialEq)]
pub struct MachineRecord {
    /// Name.
    pub name: String,
    /// Description.
    pub description: String,
    /// Invented-data statement.
    pub invented: Option<String>,
    /// Maintainer.
    pub maintainer: String,
    /// Revisions.
    pub revisions: Vec<Revision>,
    /// What it describes.
    pub item: MachineItem,
    /// Stored calibrations, oldest first.
    pub calibrations: Vec<Calibration>,
    /// Where it was loaded from.
    pub origin: Origin,
}

impl MachineRecord {
    /// The most recent calibration for this model and coil name, if any.
    pub fn calibration_for(&self, model: &str, coil: Option<&str>) -> Option<&Calibration> {
        self.calibrations
            .iter()
            .rev()
            .find(|c| c.model == model && c.coil.as_deref() == coil)
    }

    /// True for a built-in (read-only) file.
    pub fn is_builtin(&self) -> bool {
        self.origin.path.is_none()
    }
}

/// Which values a quantity may take.
#[derive(Clone, Copy)]
enum Domain {
    Positive,
    NonNegative,
    /// [0, 90) degrees.
    PresetAngle,
}
mod load;
mod parse;
pub mod template;

pub use load::{
    append_calibration, append_calibration_text, builtin_text, render_calibration, Machines,
};
pub use parse::parse_machine_file;

#[cfg(test)]
mod tests;
