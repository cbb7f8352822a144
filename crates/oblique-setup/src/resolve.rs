//! From library files and request values to a process set-up, recording where every value came
//! from (request values win over files): the catalog, the model, the bank and its charge. The
//! coil and workpiece are in [`crate::parts`].

use crate::error::{SetupError, SetupResult};
use crate::inputs::{InputValue, Inputs, Provenance, Unit};
use crate::request::{field, BankRequest, Charge};
use oblique_core::process::CapacitorBank;
use oblique_core::units::{Capacitance, Inductance, Resistance, Voltage};
use oblique_window::machine::{MachineRecord, Machines, Valued};
use oblique_window::{Library, PairWindow};

/// The material library (materials, pair windows) and the machine files (banks, coils,
/// explosive set-ups) that requests are resolved against.
#[derive(Debug, Clone)]
pub struct Catalog {
    /// Materials and pair windows.
    pub library: Library,
    /// Banks, coils, explosive set-ups.
    pub machines: Machines,
}

impl Catalog {
    /// Both libraries, already loaded (their warnings are the caller's to show).
    #[must_use]
    pub fn new(library: Library, machines: Machines) -> Self {
        Self { library, machines }
    }

    /// The built-in libraries only.
    ///
    /// # Errors
    /// [`SetupError::Library`] if a built-in file does not load (a build defect).
    pub fn builtin() -> SetupResult<Self> {
        Ok(Self {
            library: Library::load(&[])?,
            machines: Machines::load(&[])?,
        })
    }

    /// The pair window of this name, if a name is given.
    ///
    /// # Errors
    /// [`SetupError::Unknown`] for a name the library does not hold.
    pub fn pair(&self, name: Option<&str>) -> SetupResult<Option<&PairWindow>> {
        name.map(|n| {
            self.library
                .pair(n)
                .map_err(|m| SetupError::unknown(field::PAIR, m))
        })
        .transpose()
    }
}

/// The magnetic pulse models.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MagneticModel {
    /// A tube compressed onto a rod by a single-turn coil.
    Tube,
    /// A sheet driven off a flat one-turn bar coil.
    Sheet,
}

impl MagneticModel {
    /// The model's id (`mpw-tube`, `mpw-sheet`), as stored with calibrations.
    #[must_use]
    pub fn id(self) -> &'static str {
        match self {
            MagneticModel::Tube => "mpw-tube",
            MagneticModel::Sheet => "mpw-sheet",
        }
    }

    /// What the model describes, in a few words.
    #[must_use]
    pub fn title(self) -> &'static str {
        match self {
            MagneticModel::Tube => "tube compression in a single-turn coil",
            MagneticModel::Sheet => "sheet driven off a flat one-turn bar coil",
        }
    }

    /// The model's assumptions, in one line starting `assumptions: `.
    #[must_use]
    pub fn assumptions(self) -> &'static str {
        match self {
            MagneticModel::Tube => crate::ASSUMPTIONS_TUBE,
            MagneticModel::Sheet => crate::ASSUMPTIONS_SHEET,
        }
    }
}

/// The bank and where its values came from.
#[derive(Debug, Clone)]
pub struct ResolvedBank<'a> {
    /// The bank (rating included when known).
    pub bank: CapacitorBank,
    /// The machine file, if one was named.
    pub record: Option<&'a MachineRecord>,
    /// Where the rating came from, if there is one.
    pub rating_from: Option<String>,
    /// Fields whose values overrode the file's.
    pub overrides: Vec<&'static str>,
}

impl ResolvedBank<'_> {
    /// Refuse a charging voltage above the bank's rating, naming `field` and the rating's
    /// origin.
    ///
    /// # Errors
    /// [`SetupError::Invalid`] above the rating.
    pub fn check_rating(&self, u: f64, field: &'static str) -> SetupResult {
        if let Some(rating) = self.bank.max_voltage {
            if u > rating.si() * (1.0 + 1e-12) {
                return Err(SetupError::above_rating(
                    field,
                    u,
                    rating.si(),
                    self.rating_from.as_deref().unwrap_or("the bank"),
                ));
            }
        }
        Ok(())
    }

    /// The charging voltage of `charge` (from the energy through the capacitance), checked
    /// against the rating and recorded.
    ///
    /// # Errors
    /// [`SetupError::Invalid`] above the rating.
    pub(crate) fn charge(&self, charge: Charge, inputs: &mut Inputs) -> SetupResult<Voltage> {
        let (u, field) = match charge {
            Charge::Voltage(u) => (u.si(), field::CHARGE_VOLTAGE),
            Charge::Energy(e) => (
                (2.0 * e.si() / self.bank.capacitance.si()).sqrt(),
                field::ENERGY,
            ),
        };
        self.check_rating(u, field)?;
        inputs.quantity(
            "charging voltage",
            "charge_voltage_v",
            u,
            Unit::Kilovolt,
            Provenance::Given {
                field,
                overrides: None,
            },
        );
        Ok(Voltage::from_v(u))
    }
}

pub(crate) fn file_from(rec: &MachineRecord, source: &str) -> Provenance {
    Provenance::File {
        name: rec.name.clone(),
        source: source.to_string(),
    }
}

/// Pick a given value over a file value; record it; a message naming the field when neither
/// exists.
#[allow(clippy::too_many_arguments)]
pub(crate) fn pick<T: Copy>(
    inputs: &mut Inputs,
    label: &'static str,
    key: &'static str,
    field: &'static str,
    given: Option<f64>,
    file: Option<(&MachineRecord, &Valued<T>)>,
    si: impl Fn(T) -> f64,
    unit: Unit,
    file_hint: &str,
) -> SetupResult<f64> {
    let (v, from) = match (given, file) {
        (Some(v), Some((rec, _))) => (
            v,
            Provenance::Given {
                field,
                overrides: Some(rec.name.clone()),
            },
        ),
        (Some(v), None) => (
            v,
            Provenance::Given {
                field,
                overrides: None,
            },
        ),
        (None, Some((rec, f))) => (si(f.value), file_from(rec, &f.source)),
        (None, None) => {
            return Err(SetupError::missing(
                field,
                format!("{field} is required here ({label}): give it, or {file_hint}"),
            ))
        }
    };
    inputs.quantity(label, key, v, unit, from);
    Ok(v)
}

/// Resolve the bank from its file and values.
///
/// # Errors
/// An unknown or wrong file, a value neither given nor in the file.
pub fn resolve_bank<'a>(
    catalog: &'a Catalog,
    f: &BankRequest,
    inputs: &mut Inputs,
) -> SetupResult<ResolvedBank<'a>> {
    let found = f
        .machine
        .as_deref()
        .map(|n| {
            catalog
                .machines
                .bank(n)
                .map_err(|m| SetupError::unknown(field::MACHINE, m))
        })
        .transpose()?;
    let hint = "name a bank file with --machine";
    let c = pick(
        inputs,
        "bank capacitance",
        "capacitance_f",
        field::CAPACITANCE,
        f.capacitance.map(Capacitance::si),
        found.map(|(r, b)| (r, &b.capacitance)),
        Capacitance::si,
        Unit::Microfarad,
        hint,
    )?;
    let rating = match (f.rated_voltage, found) {
        (None, None) => {
            inputs.push(
                "bank rated voltage",
                "rated_voltage_v",
                InputValue::Unknown,
                Provenance::NotGiven("no rating check (give --rated-voltage or --machine)"),
            );
            None
        }
        _ => Some(pick(
            inputs,
            "bank rated voltage",
            "rated_voltage_v",
            field::RATED_VOLTAGE,
            f.rated_voltage.map(Voltage::si),
            found.map(|(r, b)| (r, &b.max_voltage)),
            Voltage::si,
            Unit::Kilovolt,
            hint,
        )?),
    };
    let l = pick(
        inputs,
        "bank inductance",
        "bank_inductance_h",
        field::BANK_INDUCTANCE,
        f.inductance.map(Inductance::si),
        found.map(|(r, b)| (r, &b.inductance)),
        Inductance::si,
        Unit::Nanohenry,
        "name a bank file with --machine (or derive L from a ring-down record: `oblique calibrate ring-down`)",
    )?;
    let r = pick(
        inputs,
        "bank resistance",
        "bank_resistance_ohm",
        field::BANK_RESISTANCE,
        f.resistance.map(Resistance::si),
        found.map(|(r, b)| (r, &b.resistance)),
        Resistance::si,
        Unit::Milliohm,
        "name a bank file with --machine (or derive R from a ring-down record: `oblique calibrate ring-down`)",
    )?;
    let rating_from =
        rating.and_then(|_| inputs.get("rated_voltage_v").map(|i| i.from.to_string()));
    let mut overrides = Vec::new();
    if found.is_some() {
        for (name, given) in [
            (field::CAPACITANCE, f.capacitance.is_some()),
            (field::RATED_VOLTAGE, f.rated_voltage.is_some()),
            (field::BANK_INDUCTANCE, f.inductance.is_some()),
            (field::BANK_RESISTANCE, f.resistance.is_some()),
        ] {
            if given {
                overrides.push(name);
            }
        }
    }
    Ok(ResolvedBank {
        bank: CapacitorBank {
            capacitance: Capacitance::from_f(c),
            max_voltage: rating.map(Voltage::from_v),
            inductance: Inductance::from_h(l),
            resistance: Resistance::from_ohm(r),
        },
        record: found.map(|(r, _)| r),
        rating_from,
        overrides,
    })
}

/// Record the standoff as given.
pub(crate) fn standoff_input(inputs: &mut Inputs, g: f64) {
    inputs.quantity(
        "standoff",
        "standoff_m",
        g,
        Unit::Millimetre,
        Provenance::Given {
            field: field::STANDOFF,
            overrides: None,
        },
    );
}
