//! The inputs of a resolved set-up: every value with its display unit and where it came from.

use crate::human;
use std::fmt;

/// Marks an efficiency taken from a calibration on another workpiece.
pub const MISMATCH: &str = "calibrated on another workpiece";

/// The warning printed when a stored efficiency comes from a shot on another workpiece.
pub const MISMATCH_WARNING: &str = "the stored efficiency was fitted on another flyer material or thickness; the coupling depends on both, so calibrate again with this workpiece before relying on it";

/// The warning printed with every estimate whose efficiency was not fitted to a measured shot.
pub const UNCALIBRATED: &str = "efficiency not calibrated (eta = 1): the model has not been anchored to a measured shot on this machine and coil, and lumped models usually overestimate; treat the velocity as an upper estimate and calibrate (oblique calibrate) before relying on it";

/// Where a value came from.
#[derive(Debug, Clone, PartialEq)]
pub enum Provenance {
    /// Given in the request (`flag --capacitance`), possibly over a file's value
    /// (`flag --capacitance (overrides harbourside-bank-300uf)`).
    Given {
        /// The request field, named as the command line names it.
        field: &'static str,
        /// What the given value overrides, if anything.
        overrides: Option<String>,
    },
    /// From a machine, coil or set-up file: `name (source)`.
    File {
        /// The file's name.
        name: String,
        /// The value's source as the file states it.
        source: String,
    },
    /// From the pair window named in the request.
    PairWindow(String),
    /// From the material library entry of this id.
    Material(String),
    /// Not given; the text says what follows from that (`not given: ...`).
    NotGiven(&'static str),
    /// An efficiency stored in the bank's file.
    Calibration(StoredCalibration),
    /// The default efficiency 1, not calibrated.
    Uncalibrated {
        /// When the bank file stores calibrations, but none for this model and coil: the bank
        /// file, the model and the coil (`None`: given by values, not a file).
        others: Option<(String, String, Option<String>)>,
    },
}

/// A stored calibration used for an estimate.
#[derive(Debug, Clone, PartialEq)]
pub struct StoredCalibration {
    /// The bank file holding it.
    pub bank: String,
    /// Date of the shot.
    pub date: String,
    /// Measured velocity (m/s).
    pub measured_velocity: f64,
    /// Charging voltage of the shot (V).
    pub charge_voltage: f64,
    /// Standoff of the shot (m).
    pub standoff: f64,
    /// Source of the measurement.
    pub source: String,
    /// The measured velocity's relative standard uncertainty, if the calibration records it.
    pub velocity_uncertainty: Option<f64>,
    /// Set when the shot was on another workpiece.
    pub mismatch: Option<WorkpieceMismatch>,
}

/// The calibrated workpiece against the one of the estimate.
#[derive(Debug, Clone, PartialEq)]
pub struct WorkpieceMismatch {
    /// The calibration's flyer, if recorded.
    pub calibrated_flyer: Option<String>,
    /// The calibration's flyer thickness (m), if recorded.
    pub calibrated_thickness: Option<f64>,
    /// The estimate's flyer.
    pub flyer: String,
    /// The estimate's flyer thickness (m).
    pub thickness: f64,
}

impl fmt::Display for Provenance {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Provenance::Given {
                field,
                overrides: None,
            } => write!(f, "flag {field}"),
            Provenance::Given {
                field,
                overrides: Some(o),
            } => write!(f, "flag {field} (overrides {o})"),
            Provenance::File { name, source } => write!(f, "{name} ({source})"),
            Provenance::PairWindow(name) => write!(f, "pair window {name}"),
            Provenance::Material(id) => write!(f, "material {id}"),
            Provenance::NotGiven(what) => write!(f, "not given: {what}"),
            Provenance::Calibration(c) => {
                write!(
                    f,
                    "calibration stored in {} ({}: {} measured at {}, standoff {}; {})",
                    c.bank,
                    c.date,
                    human::m_s(c.measured_velocity),
                    human::kv(c.charge_voltage),
                    human::mm(c.standoff),
                    c.source
                )?;
                if let Some(m) = &c.mismatch {
                    write!(
                        f,
                        "; {MISMATCH}: calibrated on {} {}, this estimate is for {} {}",
                        m.calibrated_flyer.as_deref().unwrap_or("?"),
                        m.calibrated_thickness.map_or("?".into(), human::mm),
                        m.flyer,
                        human::mm(m.thickness)
                    )?;
                }
                Ok(())
            }
            Provenance::Uncalibrated { others: None } => f.write_str("default 1, uncalibrated"),
            Provenance::Uncalibrated {
                others: Some((bank, model, coil)),
            } => write!(
                f,
                "default 1, uncalibrated ({bank} stores calibrations, none for {model} with coil {})",
                coil.as_deref().unwrap_or("given by flags")
            ),
        }
    }
}

/// How a value is shown.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Unit {
    /// Capacitance in uF.
    Microfarad,
    /// Voltage in kV.
    Kilovolt,
    /// Inductance in nH.
    Nanohenry,
    /// Resistance in mohm.
    Milliohm,
    /// Length in mm.
    Millimetre,
    /// Density in kg/m^3.
    KilogramPerCubicMetre,
    /// Stress in MPa.
    Megapascal,
    /// Electrical conductivity in MS/m.
    MegasiemensPerMetre,
    /// Velocity in m/s.
    MetrePerSecond,
    /// Angle (radians inside) in degrees.
    Degree,
    /// A pure number.
    Number,
}

impl Unit {
    /// The SI value in this unit, as text.
    #[must_use]
    pub fn show(self, si: f64) -> String {
        match self {
            Unit::Microfarad => human::uf(si),
            Unit::Kilovolt => human::kv(si),
            Unit::Nanohenry => human::nh(si),
            Unit::Milliohm => human::mohm(si),
            Unit::Millimetre => human::mm(si),
            Unit::KilogramPerCubicMetre => format!("{} kg/m^3", human::g(si)),
            Unit::Megapascal => format!("{} MPa", human::g(si / 1e6)),
            Unit::MegasiemensPerMetre => format!("{} MS/m", human::g(si / 1e6)),
            Unit::MetrePerSecond => human::m_s(si),
            Unit::Degree => format!("{} deg", human::g(si.to_degrees())),
            Unit::Number => human::g(si),
        }
    }
}

/// An input's value.
#[derive(Debug, Clone, PartialEq)]
pub enum InputValue {
    /// A quantity (SI) and how to show it.
    Quantity {
        /// The SI value.
        si: f64,
        /// The display unit.
        unit: Unit,
    },
    /// A text (a material id).
    Text(String),
    /// Not known (a bank rating that was not given).
    Unknown,
}

impl InputValue {
    /// The SI value of a quantity.
    #[must_use]
    pub fn si(&self) -> Option<f64> {
        match self {
            InputValue::Quantity { si, .. } => Some(*si),
            _ => None,
        }
    }

    /// As shown in the inputs table.
    #[must_use]
    pub fn shown(&self) -> String {
        match self {
            InputValue::Quantity { si, unit } => unit.show(*si),
            InputValue::Text(t) => t.clone(),
            InputValue::Unknown => "unknown".into(),
        }
    }
}

/// One input value: what it is, its value, where it came from.
#[derive(Debug, Clone, PartialEq)]
pub struct Input {
    /// Human name.
    pub label: &'static str,
    /// JSON key with the SI unit suffix.
    pub key: &'static str,
    /// The value.
    pub value: InputValue,
    /// Where it came from.
    pub from: Provenance,
}

/// All inputs of a set-up, in the order they were resolved, and warnings about them.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Inputs {
    /// The values.
    pub entries: Vec<Input>,
    /// Warnings about the inputs (large compression, ...), each once.
    pub warnings: Vec<String>,
}

impl Inputs {
    /// The warnings about the inputs: an uncalibrated efficiency, one calibrated on another
    /// workpiece, and those recorded with the inputs (large compression, ...).
    #[must_use]
    pub fn efficiency_warnings(&self) -> Vec<String> {
        let mut w = Vec::new();
        if self.uncalibrated() {
            w.push(UNCALIBRATED.to_string());
        }
        if self.calibration_mismatch() {
            w.push(MISMATCH_WARNING.to_string());
        }
        w.extend(self.warnings.iter().cloned());
        w
    }

    /// Whether the efficiency comes from a calibration on another workpiece.
    #[must_use]
    pub fn calibration_mismatch(&self) -> bool {
        self.entries.iter().any(|i| {
            i.key == "efficiency"
                && matches!(&i.from, Provenance::Calibration(c) if c.mismatch.is_some())
        })
    }

    /// Whether the efficiency is the uncalibrated default.
    #[must_use]
    pub fn uncalibrated(&self) -> bool {
        self.entries
            .iter()
            .any(|i| i.key == "efficiency" && matches!(i.from, Provenance::Uncalibrated { .. }))
    }

    /// The input under this JSON key.
    #[must_use]
    pub fn get(&self, key: &str) -> Option<&Input> {
        self.entries.iter().find(|i| i.key == key)
    }

    /// Record a quantity.
    pub(crate) fn quantity(
        &mut self,
        label: &'static str,
        key: &'static str,
        si: f64,
        unit: Unit,
        from: Provenance,
    ) {
        self.entries.push(Input {
            label,
            key,
            value: InputValue::Quantity { si, unit },
            from,
        });
    }

    /// Record any value.
    pub(crate) fn push(
        &mut self,
        label: &'static str,
        key: &'static str,
        value: InputValue,
        from: Provenance,
    ) {
        self.entries.push(Input {
            label,
            key,
            value,
            from,
        });
    }

    /// Record a warning once.
    pub(crate) fn warn_once(&mut self, w: String) {
        if !self.warnings.contains(&w) {
            self.warnings.push(w);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn provenance_texts() {
        let given = Provenance::Given {
            field: "--coil-length",
            overrides: Some("coil-a".into()),
        };
        assert_eq!(given.to_string(), "flag --coil-length (overrides coil-a)");
        let file = Provenance::File {
            name: "bank-a".into(),
            source: "nameplate".into(),
        };
        assert_eq!(file.to_string(), "bank-a (nameplate)");
        let cal = Provenance::Calibration(StoredCalibration {
            bank: "bank-a".into(),
            date: "2026-11-30".into(),
            measured_velocity: 410.0,
            charge_voltage: 8e3,
            standoff: 2.5e-3,
            source: "record 12".into(),
            velocity_uncertainty: None,
            mismatch: Some(WorkpieceMismatch {
                calibrated_flyer: Some("aa6061-t6".into()),
                calibrated_thickness: None,
                flyer: "aa6061-t6".into(),
                thickness: 1.5e-3,
            }),
        });
        assert_eq!(
            cal.to_string(),
            "calibration stored in bank-a (2026-11-30: 410 m/s measured at 8 kV, standoff 2.5 mm; record 12); calibrated on another workpiece: calibrated on aa6061-t6 ?, this estimate is for aa6061-t6 1.5 mm"
        );
        let mut inputs = Inputs::default();
        inputs.quantity(
            "efficiency eta",
            "efficiency",
            1.0,
            Unit::Number,
            Provenance::Uncalibrated { others: None },
        );
        assert!(inputs.uncalibrated() && !inputs.calibration_mismatch());
        assert_eq!(inputs.efficiency_warnings(), vec![UNCALIBRATED.to_string()]);
    }
}
