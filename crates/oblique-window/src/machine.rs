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
    Bank(BankSpec),
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

fn sourced(
    c: &mut Collector<'_>,
    field: &str,
    e: &SourcedEntry,
    kind: QuantityKind,
    domain: Domain,
) -> Option<Valued<f64>> {
    if e.source.trim().is_empty() {
        c.push(
            &format!("{field}.source"),
            "every value needs a source",
            Some("name the datasheet, drawing or record, e.g. \"nameplate\"".into()),
        );
    }
    let v = c.quantity(&format!("{field}.value"), &e.value, kind)?;
    let ok = match domain {
        Domain::Positive => v > 0.0,
        Domain::NonNegative => v >= 0.0,
        Domain::PresetAngle => (0.0..std::f64::consts::FRAC_PI_2).contains(&v),
    };
    if !ok {
        let allowed = match domain {
            Domain::Positive => "must be above zero",
            Domain::NonNegative => "must not be negative",
            Domain::PresetAngle => "must be in [0, 90) deg",
        };
        c.push(
            &format!("{field}.value"),
            format!("'{}' {allowed}", e.value),
            None,
        );
        return None;
    }
    Some(Valued {
        value: v,
        source: e.source.clone(),
    })
}

fn map<T>(v: Valued<f64>, f: impl FnOnce(f64) -> T) -> Valued<T> {
    Valued {
        value: f(v.value),
        source: v.source,
    }
}

fn bank_spec(c: &mut Collector<'_>, b: &BankEntry) -> Option<BankSpec> {
    let cap = sourced(
        c,
        "bank.capacitance",
        &b.capacitance,
        QuantityKind::Capacitance,
        Domain::Positive,
    );
    let umax = sourced(
        c,
        "bank.max_voltage",
        &b.max_voltage,
        QuantityKind::Voltage,
        Domain::Positive,
    );
    let l = b.inductance.as_ref().and_then(|e| {
        sourced(
            c,
            "bank.inductance",
            e,
            QuantityKind::Inductance,
            Domain::Positive,
        )
    });
    let r = b.resistance.as_ref().and_then(|e| {
        sourced(
            c,
            "bank.resistance",
            e,
            QuantityKind::Resistance,
            Domain::NonNegative,
        )
    });
    let mut ring = None;
    if let Some(rd) = &b.ring_down {
        let f = c.quantity(
            "bank.ring_down.frequency",
            &rd.frequency,
            QuantityKind::Frequency,
        );
        let ratio = c.quantity(
            "bank.ring_down.peak_ratio",
            &rd.peak_ratio,
            QuantityKind::Dimensionless,
        );
        if rd.source.trim().is_empty() {
            c.push(
                "bank.ring_down.source",
                "the ring-down record needs a source",
                Some("name the scope file or logbook page".into()),
            );
        }
        if let Some(d) = &rd.date {
            if !is_iso_date(d) {
                c.push(
                    "bank.ring_down.date",
                    format!("'{d}' is not a date YYYY-MM-DD"),
                    None,
                );
            }
        }
        if let (Some(f), Some(ratio), Some(cap)) = (f, ratio, &cap) {
            match identify_ring_down(Capacitance::from_f(cap.value), Frequency::from_hz(f), ratio) {
                Ok(fit) => {
                    ring = Some(RingDown {
                        frequency: Frequency::from_hz(f),
                        peak_ratio: ratio,
                        load: rd.load.clone(),
                        date: rd.date.clone(),
                        source: rd.source.clone(),
                        fit,
                    });
                }
                Err(e) => c.push("bank.ring_down", e.to_string(), None),
            }
        }
    }
    let derived = |what: &str, rd: &RingDown| {
        format!(
            "{what} (exact form) from {}: {} kHz, peak ratio {}",
            rd.source,
            rd.frequency.si() / 1e3,
            rd.peak_ratio
        )
    };
    let inductance = match (l, &ring) {
        (Some(l), _) => Some(map(l, Inductance::from_h)),
        (None, Some(rd)) => Some(Valued {
            value: rd.fit.inductance,
            source: derived("derived", rd),
        }),
        (None, None) => {
            if b.ring_down.is_none() && b.inductance.is_none() {
                c.push(
                    "bank",
                    "the bank needs an inductance or a ring-down record",
                    Some("add `inductance: (value: \"40 nH\", source: \"...\")` or `ring_down: (frequency: ..., peak_ratio: ..., source: ...)`".into()),
                );
            }
            None
        }
    };
    let resistance = match (r, &ring) {
        (Some(r), _) => Some(map(r, Resistance::from_ohm)),
        (None, Some(rd)) => Some(Valued {
            value: rd.fit.resistance,
            source: derived("derived", rd),
        }),
        (None, None) => {
            if b.ring_down.is_none() && b.resistance.is_none() {
                c.push(
                    "bank",
                    "the bank needs a resistance or a ring-down record",
                    Some("add `resistance: (value: \"4 mohm\", source: \"...\")` or a ring_down record".into()),
                );
            }
            None
        }
    };
    Some(BankSpec {
        capacitance: map(cap?, Capacitance::from_f),
        max_voltage: map(umax?, Voltage::from_v),
        inductance: inductance?,
        resistance: resistance?,
        ring_down: ring,
    })
}

fn compression_spec(
    c: &mut Collector<'_>,
    e: &CompressionCoilEntry,
) -> Option<CompressionCoilSpec> {
    let rc = sourced(
        c,
        "compression_coil.bore_radius",
        &e.bore_radius,
        QuantityKind::Length,
        Domain::Positive,
    );
    let l = sourced(
        c,
        "compression_coil.length",
        &e.length,
        QuantityKind::Length,
        Domain::Positive,
    );
    let x = sourced(
        c,
        "compression_coil.extra_inductance",
        &e.extra_inductance,
        QuantityKind::Inductance,
        Domain::NonNegative,
    );
    Some(CompressionCoilSpec {
        bore_radius: map(rc?, Length::from_m),
        length: map(l?, Length::from_m),
        extra_inductance: map(x?, Inductance::from_h),
    })
}

fn bar_spec(c: &mut Collector<'_>, e: &BarCoilEntry) -> Option<BarCoilSpec> {
    let l = sourced(
        c,
        "bar_coil.length",
        &e.length,
        QuantityKind::Length,
        Domain::Positive,
    );
    let w = sourced(
        c,
        "bar_coil.width",
        &e.width,
        QuantityKind::Length,
        Domain::Positive,
    );
    let x = sourced(
        c,
        "bar_coil.extra_inductance",
        &e.extra_inductance,
        QuantityKind::Inductance,
        Domain::NonNegative,
    );
    Some(BarCoilSpec {
        length: map(l?, Length::from_m),
        width: map(w?, Length::from_m),
        extra_inductance: map(x?, Inductance::from_h),
    })
}

fn explosive_spec(c: &mut Collector<'_>, e: &ExplosiveEntry) -> Option<ExplosiveSpec> {
    let g = sourced(
        c,
        "explosive.gurney_velocity",
        &e.gurney_velocity,
        QuantityKind::Velocity,
        Domain::Positive,
    );
    let vd = sourced(
        c,
        "explosive.detonation_velocity",
        &e.detonation_velocity,
        QuantityKind::Velocity,
        Domain::Positive,
    );
    let ratio = match (&e.flyer_to_charge, &e.charge_to_flyer) {
        (Some(m), None) => sourced(
            c,
            "explosive.flyer_to_charge",
            m,
            QuantityKind::Dimensionless,
            Domain::Positive,
        )
        .map(|v| map(v, MassRatio::FlyerToCharge)),
        (None, Some(r)) => sourced(
            c,
            "explosive.charge_to_flyer",
            r,
            QuantityKind::Dimensionless,
            Domain::Positive,
        )
        .map(|v| map(v, MassRatio::ChargeToFlyer)),
        (Some(_), Some(_)) => {
            c.push(
                "explosive.charge_to_flyer",
                "give the mass ratio one way only",
                Some("keep either `flyer_to_charge` (M/C) or `charge_to_flyer` (C/M)".into()),
            );
            None
        }
        (None, None) => {
            c.push(
                "explosive",
                "the mass ratio is missing",
                Some("add `flyer_to_charge: (value: \"1.2\", source: \"...\")` (M/C) or `charge_to_flyer` (C/M)".into()),
            );
            None
        }
    };
    let alpha = sourced(
        c,
        "explosive.preset_angle",
        &e.preset_angle,
        QuantityKind::Angle,
        Domain::PresetAngle,
    );
    Some(ExplosiveSpec {
        gurney_velocity: map(g?, Velocity::from_m_s),
        detonation_velocity: map(vd?, Velocity::from_m_s),
        mass_ratio: ratio?,
        preset_angle: map(alpha?, Angle::from_radians),
    })
}

fn calibration(c: &mut Collector<'_>, i: usize, e: &CalibrationEntry) -> Option<Calibration> {
    let p = format!("calibrations[{i}]");
    let eta = c.quantity(
        &format!("{p}.efficiency"),
        &e.efficiency,
        QuantityKind::Dimensionless,
    );
    if let Some(eta) = eta {
        if !(eta > 0.0 && eta <= 1.0) {
            c.push(
                &format!("{p}.efficiency"),
                format!("efficiency {eta} is outside (0, 1]"),
                None,
            );
        }
    }
    if !CALIBRATION_MODELS.contains(&e.model.as_str()) {
        c.push(
            &format!("{p}.model"),
            format!("unknown model '{}'", e.model),
            Some(format!("one of {}", CALIBRATION_MODELS.join(", "))),
        );
    }
    if !is_iso_date(&e.date) {
        c.push(
            &format!("{p}.date"),
            format!("'{}' is not a date YYYY-MM-DD", e.date),
            None,
        );
    }
    if e.source.trim().is_empty() {
        c.push(
            &format!("{p}.source"),
            "a calibration needs the source of its measurement",
            None,
        );
    }
    let v = c.quantity(
        &format!("{p}.measured_velocity"),
        &e.measured_velocity,
        QuantityKind::Velocity,
    );
    let u = c.quantity(
        &format!("{p}.charge_voltage"),
        &e.charge_voltage,
        QuantityKind::Voltage,
    );
    let g = c.quantity(&format!("{p}.standoff"), &e.standoff, QuantityKind::Length);
    let h = match &e.flyer_thickness {
        Some(t) => Some(c.quantity(&format!("{p}.flyer_thickness"), t, QuantityKind::Length)?),
        None => None,
    };
    let eta = eta.filter(|x| *x > 0.0 && *x <= 1.0)?;
    Some(Calibration {
        index: i,
        efficiency: eta,
        model: e.model.clone(),
        coil: e.coil.clone(),
        date: e.date.clone(),
        measured_velocity: Velocity::from_m_s(v?),
        charge_voltage: Voltage::from_v(u?),
        standoff: Length::from_m(g?),
        flyer: e.flyer.clone(),
        flyer_thickness: h.map(Length::from_m),
        settings: e.settings.clone(),
        source: e.source.clone(),
    })
}

/// Parse and validate a machine file.
///
/// # Errors
/// Every problem found, each with file, line, column and field.
pub fn parse_machine_file(
    origin: Origin,
    text: &str,
) -> Result<(MachineFile, MachineRecord), Diagnostics> {
    let file = origin.display.clone();
    // A byte-order mark (some editors write one) is not RON: read past it.
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let parsed: MachineFile = parse_ron(&file, text)?;
    let mut c = Collector::new(&file, text);
    c.check_format(&parsed.format, MACHINE_FORMAT);
    c.check_name(&parsed.name, "name", "shop-bank-300uf");
    if parsed.maintainer.trim().is_empty() {
        c.push(
            "maintainer",
            "say who maintains the file",
            Some("a person or team, e.g. \"pulse lab, J. Doe\"".into()),
        );
    }
    if parsed.revisions.is_empty() {
        c.push(
            "revisions",
            "at least one revision is needed",
            Some("add `revisions: [(date: \"2026-12-01\", note: \"created\")]`".into()),
        );
    }
    for (i, r) in parsed.revisions.iter().enumerate() {
        if !is_iso_date(&r.date) {
            c.push(
                &format!("revisions[{i}].date"),
                format!("'{}' is not a date YYYY-MM-DD", r.date),
                None,
            );
        }
    }
    let given = [
        parsed.bank.is_some(),
        parsed.compression_coil.is_some(),
        parsed.bar_coil.is_some(),
        parsed.explosive.is_some(),
    ]
    .iter()
    .filter(|b| **b)
    .count();
    if given != 1 {
        c.push(
            "name",
            format!("a machine file describes exactly one thing, found {given}"),
            Some("give one of `bank`, `compression_coil`, `bar_coil` or `explosive`; put each in its own file".into()),
        );
    }
    let item = if let Some(b) = &parsed.bank {
        bank_spec(&mut c, b).map(MachineItem::Bank)
    } else if let Some(e) = &parsed.compression_coil {
        compression_spec(&mut c, e).map(MachineItem::CompressionCoil)
    } else if let Some(e) = &parsed.bar_coil {
        bar_spec(&mut c, e).map(MachineItem::BarCoil)
    } else if let Some(e) = &parsed.explosive {
        explosive_spec(&mut c, e).map(MachineItem::Explosive)
    } else {
        None
    };
    if !parsed.calibrations.is_empty() && parsed.bank.is_none() {
        c.push(
            "calibrations",
            "only a bank file stores calibrations",
            Some("move them to the bank's file".into()),
        );
    }
    let calibrations: Vec<Calibration> = parsed
        .calibrations
        .iter()
        .enumerate()
        .filter_map(|(i, e)| calibration(&mut c, i, e))
        .collect();
    let problems = c.problems.len();
    c.finish()?;
    let Some(item) = item else {
        // Every path that yields no item recorded a problem; this is only a safety net.
        return Err(Diagnostics(vec![Diagnostic {
            file,
            line: 1,
            col: 1,
            field: String::new(),
            message: format!("the file describes nothing usable ({problems} problem(s))"),
            hint: None,
        }]));
    };
    let record = MachineRecord {
        name: parsed.name.clone(),
        description: parsed.description.clone(),
        invented: parsed.invented.clone(),
        maintainer: parsed.maintainer.clone(),
        revisions: parsed.revisions.clone(),
        item,
        calibrations,
        origin,
    };
    Ok((parsed, record))
}

/// All machine files: built-in ones and those of user folders.
#[derive(Debug, Clone, Default)]
pub struct Machines {
    /// Records by name.
    pub items: BTreeMap<String, MachineRecord>,
    /// Shadowing notes for the user.
    pub warnings: Vec<String>,
}

fn user_machine_files(
    dir: &Path,
    problems: &mut Vec<Diagnostic>,
) -> Vec<(String, PathBuf, String)> {
    let folder = dir.join(MACHINES_DIR);
    let Ok(entries) = std::fs::read_dir(&folder) else {
        // A library folder without machines is normal.
        return Vec::new();
    };
    let mut paths: Vec<PathBuf> = entries.filter_map(Result::ok).map(|e| e.path()).collect();
    paths.sort();
    let mut out = Vec::new();
    for p in paths {
        let name = p.file_name().and_then(|n| n.to_str()).unwrap_or_default();
        if name.starts_with('.')
            || !p.is_file()
            || p.extension().and_then(|e| e.to_str()) != Some("ron")
        {
            continue;
        }
        let display = p.display().to_string();
        match std::fs::read_to_string(&p) {
            Ok(text) => out.push((display, p.clone(), text)),
            Err(e) => problems.push(Diagnostic {
                file: display,
                line: 1,
                col: 1,
                field: String::new(),
                message: format!("cannot read: {e}"),
                hint: None,
            }),
        }
    }
    out
}

impl Machines {
    /// Load the built-in machine files, then `DIR/machines/*.ron` of each user folder (earlier
    /// folders win over later ones, all win over built-in files, with a warning).
    ///
    /// # Errors
    /// Every problem of every file, together.
    pub fn load(user_dirs: &[PathBuf]) -> Result<Machines, Diagnostics> {
        let mut m = Machines::default();
        let mut problems = Vec::new();
        let mut sources: Vec<(String, Option<PathBuf>, String)> = BUILTIN_FILES
            .iter()
            .filter(|(rel, _)| rel.starts_with("machines/"))
            .map(|(rel, text)| (format!("built-in:windows/{rel}"), None, (*text).to_string()))
            .collect();
        let builtin_count = sources.len();
        for dir in user_dirs.iter().rev() {
            for (d, p, t) in user_machine_files(dir, &mut problems) {
                sources.push((d, Some(p), t));
            }
        }
        for (k, (display, path, text)) in sources.into_iter().enumerate() {
            let origin = Origin {
                display: display.clone(),
                path: path.clone(),
                sha256: sha256_hex(text.as_bytes()),
            };
            match parse_machine_file(origin, &text) {
                Ok((_, rec)) => {
                    if let MachineItem::Bank(b) = &rec.item {
                        if let Some(rd) = &b.ring_down {
                            for (what, written, derived, unit) in [
                                (
                                    "inductance",
                                    b.inductance.value.si(),
                                    rd.fit.inductance.si(),
                                    1e9,
                                ),
                                (
                                    "resistance",
                                    b.resistance.value.si(),
                                    rd.fit.resistance.si(),
                                    1e3,
                                ),
                            ] {
                                let rel = (written / derived - 1.0).abs();
                                if rel > 0.1 {
                                    m.warnings.push(format!(
                                        "bank '{}' ({}): the written {what} {:.4} {} differs from the ring-down record's {:.4} by {:.0} %; the written value is used",
                                        rec.name,
                                        rec.origin.display,
                                        written * unit,
                                        if unit > 1e6 { "nH" } else { "mohm" },
                                        derived * unit,
                                        100.0 * rel
                                    ));
                                }
                            }
                        }
                    }
                    if let Some(old) = m.items.get(&rec.name) {
                        let same_folder = k < builtin_count
                            || match (&old.origin.path, &path) {
                                (Some(a), Some(b)) => a.parent() == b.parent(),
                                _ => false,
                            };
                        if same_folder {
                            problems.push(Diagnostic {
                                file: display,
                                line: 1,
                                col: 1,
                                field: "name".into(),
                                message: format!(
                                    "duplicate machine name '{}' (also in {})",
                                    rec.name, old.origin.display
                                ),
                                hint: Some("give each machine file its own name".into()),
                            });
                            continue;
                        }
                        m.warnings.push(format!(
                            "machine '{}' from {} shadows the one from {}",
                            rec.name, rec.origin.display, old.origin.display
                        ));
                    }
                    m.items.insert(rec.name.clone(), rec);
                }
                Err(d) => problems.extend(d.0),
            }
        }
        if problems.is_empty() {
            Ok(m)
        } else {
            Err(Diagnostics(problems))
        }
    }

    /// A record by name, or a message with close names.
    ///
    /// # Errors
    /// A message naming close names.
    pub fn get(&self, name: &str) -> Result<&MachineRecord, String> {
        self.items.get(name).ok_or_else(|| {
            let near = close_matches(name, self.items.keys().map(String::as_str));
            let known: Vec<&str> = self.items.keys().map(String::as_str).collect();
            if near.is_empty() {
                format!(
                    "unknown machine file name '{name}'\n  hint: known names: {}",
                    if known.is_empty() {
                        "none".to_string()
                    } else {
                        known.join(", ")
                    }
                )
            } else {
                format!(
                    "unknown machine file name '{name}'\n  hint: did you mean {}?",
                    near.join(", ")
                )
            }
        })
    }

    fn wrong_kind(rec: &MachineRecord, wanted: &str) -> String {
        format!(
            "'{}' ({}) is a {}, not a {wanted}",
            rec.name,
            rec.origin.display,
            rec.item.kind()
        )
    }

    /// A bank by name.
    ///
    /// # Errors
    /// Unknown name, or a file of another kind.
    pub fn bank(&self, name: &str) -> Result<(&MachineRecord, &BankSpec), String> {
        let rec = self.get(name)?;
        match &rec.item {
            MachineItem::Bank(b) => Ok((rec, b)),
            _ => Err(Self::wrong_kind(rec, "capacitor bank")),
        }
    }

    /// A compression coil by name.
    ///
    /// # Errors
    /// Unknown name, or a file of another kind.
    pub fn compression_coil(
        &self,
        name: &str,
    ) -> Result<(&MachineRecord, &CompressionCoilSpec), String> {
        let rec = self.get(name)?;
        match &rec.item {
            MachineItem::CompressionCoil(c) => Ok((rec, c)),
            _ => Err(Self::wrong_kind(rec, "compression coil")),
        }
    }

    /// A bar coil by name.
    ///
    /// # Errors
    /// Unknown name, or a file of another kind.
    pub fn bar_coil(&self, name: &str) -> Result<(&MachineRecord, &BarCoilSpec), String> {
        let rec = self.get(name)?;
        match &rec.item {
            MachineItem::BarCoil(c) => Ok((rec, c)),
            _ => Err(Self::wrong_kind(rec, "bar coil")),
        }
    }

    /// An explosive set-up by name.
    ///
    /// # Errors
    /// Unknown name, or a file of another kind.
    pub fn explosive(&self, name: &str) -> Result<(&MachineRecord, &ExplosiveSpec), String> {
        let rec = self.get(name)?;
        match &rec.item {
            MachineItem::Explosive(e) => Ok((rec, e)),
            _ => Err(Self::wrong_kind(rec, "explosive set-up")),
        }
    }
}

/// The text of a built-in machine file by its name field, for copying into a user folder.
pub fn builtin_text(name: &str) -> Option<&'static str> {
    BUILTIN_FILES
        .iter()
        .filter(|(rel, _)| rel.starts_with("machines/"))
        .find(|(rel, text)| {
            let origin = Origin {
                display: (*rel).to_string(),
                path: None,
                sha256: String::new(),
            };
            parse_machine_file(origin, text).is_ok_and(|(f, _)| f.name == name)
        })
        .map(|(_, t)| *t)
}

/// Render a calibration entry as RON, indented for the top-level list.
pub fn render_calibration(e: &CalibrationEntry) -> String {
    let mut s = String::from("        (\n");
    let mut field =
        |k: &str, v: &str| s.push_str(&format!("            {k}: {},\n", ron_string(v)));
    field("efficiency", &e.efficiency);
    field("model", &e.model);
    if let Some(c) = &e.coil {
        field("coil", c);
    }
    field("date", &e.date);
    field("measured_velocity", &e.measured_velocity);
    field("charge_voltage", &e.charge_voltage);
    field("standoff", &e.standoff);
    if let Some(f) = &e.flyer {
        field("flyer", f);
    }
    if let Some(t) = &e.flyer_thickness {
        field("flyer_thickness", t);
    }
    field("settings", &e.settings);
    field("source", &e.source);
    s.push_str("        ),\n");
    s
}

/// The text of a machine file with `entry` appended to its `calibrations` list (the list is
/// created when absent); every other byte is kept.
///
/// # Errors
/// [`WriteError::Structure`] when the file has no place to append.
pub fn append_calibration_text(
    path: &Path,
    text: &str,
    entry: &CalibrationEntry,
) -> Result<String, WriteError> {
    crate::write::append_to_top_list(path, text, "calibrations", &render_calibration(entry))
}

/// Append a calibration to the user's machine file at `path`: the new text is validated first,
/// then written atomically, refusing if the file changed on disk since it was read (or since
/// `expected_sha256`, when the caller read it earlier).
///
/// # Errors
/// [`WriteError`]; the file is untouched on every error.
pub fn append_calibration(
    path: &Path,
    entry: &CalibrationEntry,
    expected_sha256: Option<&str>,
) -> Result<MachineRecord, WriteError> {
    update_file(
        path,
        expected_sha256,
        |text| append_calibration_text(path, text, entry),
        |origin, text| parse_machine_file(origin, text).map(|(_, r)| r),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    fn origin(name: &str) -> Origin {
        Origin {
            display: name.into(),
            path: None,
            sha256: String::new(),
        }
    }

    const BANK: &str = r#"// test bank (invented)
(
    format: "oblique-machine/1",
    name: "t-bank",
    maintainer: "tests",
    revisions: [(date: "2026-12-01", note: "created")],
    bank: (
        capacitance: (value: "300 uF", source: "invented"),
        max_voltage: (value: "12 kV", source: "invented"),
        ring_down: (frequency: "45.25 kHz", peak_ratio: "3.02", source: "invented record"),
    ),
)
"#;

    #[test]
    fn every_built_in_machine_file_loads() {
        let m = Machines::load(&[]).expect("built-in machine files load");
        let n = BUILTIN_FILES
            .iter()
            .filter(|(r, _)| r.starts_with("machines/"))
            .count();
        assert_eq!(m.items.len(), n);
        assert!(n >= 2, "a demo bank and a demo coil are shipped");
        for rec in m.items.values() {
            assert!(
                rec.invented.is_some(),
                "built-in machine files are invented demos"
            );
            assert!(builtin_text(&rec.name).is_some());
        }
    }

    #[test]
    fn ring_down_gives_l_and_r_when_not_written() {
        let (_, rec) = parse_machine_file(origin("b.ron"), BANK).expect("valid");
        let MachineItem::Bank(b) = rec.item else {
            panic!("a bank")
        };
        // 300 uF, 40 nH, 4 mohm ring at 45.25 kHz with same-sign peak ratio 3.02 (closed form).
        assert!((b.inductance.value.si() / 40e-9 - 1.0).abs() < 0.01);
        assert!((b.resistance.value.si() / 4e-3 - 1.0).abs() < 0.01);
        assert!(b
            .inductance
            .source
            .contains("(exact form) from invented record"));
    }

    #[test]
    fn every_problem_is_reported_with_its_place() {
        let bad = BANK
            .replace("\"300 uF\"", "\"-300 uF\"")
            .replace("\"12 kV\"", "\"12\"")
            .replace("source: \"invented record\"", "source: \"\"");
        let e = parse_machine_file(origin("b.ron"), &bad).unwrap_err();
        let text = e.to_string();
        assert!(text.contains("b.ron:8:"), "{text}");
        assert!(text.contains("bank.capacitance.value"), "{text}");
        assert!(text.contains("bank.max_voltage.value"), "{text}");
        assert!(text.contains("bank.ring_down.source"), "{text}");
    }

    #[test]
    fn calibration_append_keeps_the_file_and_validates() {
        let entry = CalibrationEntry {
            efficiency: "0.674".into(),
            model: "mpw-tube".into(),
            coil: Some("c".into()),
            date: "2026-12-01".into(),
            measured_velocity: "410 m/s".into(),
            charge_voltage: "8 kV".into(),
            standoff: "2.5 mm".into(),
            flyer: Some("aa6061-t6".into()),
            flyer_thickness: Some("1 mm".into()),
            settings: "test".into(),
            source: "record \"7\"".into(),
        };
        let once = append_calibration_text(Path::new("b.ron"), BANK, &entry).unwrap();
        assert!(once.starts_with(&BANK[..BANK.rfind(')').unwrap_or(0) - 1]));
        let twice = append_calibration_text(Path::new("b.ron"), &once, &entry).unwrap();
        let (_, rec) = parse_machine_file(origin("b.ron"), &twice).expect("valid");
        assert_eq!(rec.calibrations.len(), 2);
        assert_eq!(
            rec.calibration_for("mpw-tube", Some("c")).map(|c| c.index),
            Some(1)
        );
        assert!(rec.calibration_for("mpw-sheet", Some("c")).is_none());
    }

    #[test]
    fn user_files_load_shadow_and_warn_on_inconsistent_ring_down() {
        let dir = tempfile::tempdir().expect("temp dir");
        std::fs::create_dir_all(dir.path().join(MACHINES_DIR)).expect("folder");
        let text = BANK.replace(
            "        ring_down:",
            "        inductance: (value: \"55 nH\", source: \"old label\"),\n        ring_down:",
        );
        std::fs::write(dir.path().join("machines/t.ron"), text).expect("write");
        let m = Machines::load(&[dir.path().to_path_buf()]).expect("loads");
        let (rec, b) = m.bank("t-bank").expect("a bank");
        assert!(!rec.is_builtin());
        assert!(
            (b.inductance.value.si() - 55e-9).abs() < 1e-15,
            "the written value wins"
        );
        assert!(
            m.warnings.iter().any(|w| w.contains("differs")),
            "{:?}",
            m.warnings
        );
        assert!(m.compression_coil("t-bank").is_err());
        assert!(m.get("t-bnak").unwrap_err().contains("t-bank"));
    }

    #[test]
    fn dates() {
        assert!(is_iso_date("2026-12-01"));
        assert!(!is_iso_date("2026-13-01"));
        assert!(!is_iso_date("1/12/2026"));
    }
}
