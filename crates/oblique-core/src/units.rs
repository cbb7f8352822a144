//! Typed physical quantities (SI inside) and the parser for user input with explicit units.
//!
//! Every quantity is a small newtype over an `f64` holding the SI value. Constructors and
//! accessors name the unit (`Velocity::from_m_s`, `Angle::from_degrees`), so degrees and
//! radians, or m/s and km/s, cannot be confused at a call site. Units appear only at the edges:
//! [`parse_quantity`] turns `"350m/s"` into SI, and formatting helpers turn SI back into text.

use serde::{Deserialize, Serialize};
use std::fmt;

macro_rules! quantity {
    ($(#[$doc:meta])* $name:ident, $si:ident, $unit:literal) => {
        $(#[$doc])*
        #[derive(Debug, Clone, Copy, PartialEq, PartialOrd, Default, Serialize, Deserialize)]
        #[serde(transparent)]
        pub struct $name(f64);

        impl $name {
            #[doc = concat!("From a value in ", $unit, " (the SI unit).")]
            pub const fn $si(value: f64) -> Self {
                Self(value)
            }
            #[doc = concat!("The value in ", $unit, " (the SI unit).")]
            pub const fn si(self) -> f64 {
                self.0
            }
            #[doc = concat!("The SI unit symbol, `", $unit, "`.")]
            pub const UNIT: &'static str = $unit;
        }

        impl fmt::Display for $name {
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                match f.precision() {
                    Some(p) => write!(f, "{:.*} {}", p, self.0, $unit),
                    None => write!(f, "{} {}", self.0, $unit),
                }
            }
        }
    };
}

quantity!(
    /// A speed, in m/s.
    Velocity, from_m_s, "m/s"
);
quantity!(
    /// A length, in m.
    Length, from_m, "m"
);
quantity!(
    /// A pressure or stress (also hardness expressed as a stress), in Pa.
    Pressure, from_pa, "Pa"
);
quantity!(
    /// A mass density, in kg/m^3.
    Density, from_kg_m3, "kg/m^3"
);
quantity!(
    /// An absolute temperature, in K.
    Temperature, from_k, "K"
);
quantity!(
    /// A thermal conductivity, in W/(m K).
    ThermalConductivity, from_w_m_k, "W/(m K)"
);
quantity!(
    /// A specific heat capacity, in J/(kg K).
    SpecificHeat, from_j_kg_k, "J/(kg K)"
);
quantity!(
    /// An electrical conductivity, in S/m.
    ElectricalConductivity, from_s_m, "S/m"
);
quantity!(
    /// A capacitance, in F.
    Capacitance, from_f, "F"
);
quantity!(
    /// An electric potential, in V.
    Voltage, from_v, "V"
);
quantity!(
    /// An inductance, in H.
    Inductance, from_h, "H"
);
quantity!(
    /// An electrical resistance, in ohm.
    Resistance, from_ohm, "ohm"
);
quantity!(
    /// An energy, in J.
    Energy, from_j, "J"
);
quantity!(
    /// An energy per unit area, in J/m^2.
    ArealEnergy, from_j_m2, "J/m^2"
);
quantity!(
    /// A duration, in s.
    Time, from_s, "s"
);
quantity!(
    /// A frequency, in Hz.
    Frequency, from_hz, "Hz"
);
quantity!(
    /// An electric current, in A.
    Current, from_a, "A"
);
quantity!(
    /// A magnetic flux density, in T.
    MagneticField, from_t, "T"
);

impl Velocity {
    /// The value in km/s.
    pub fn km_s(self) -> f64 {
        self.0 / 1000.0
    }
}

impl Length {
    /// The value in mm.
    pub fn mm(self) -> f64 {
        self.0 * 1000.0
    }
}

impl Pressure {
    /// The value in GPa.
    pub fn gpa(self) -> f64 {
        self.0 / 1e9
    }
    /// The value in MPa.
    pub fn mpa(self) -> f64 {
        self.0 / 1e6
    }
    /// A Vickers hardness number (kgf/mm^2) expressed as a stress in Pa.
    pub fn from_vickers(hv: f64) -> Self {
        Self(hv * VICKERS_TO_PA)
    }
    /// This stress read as a Vickers hardness number (kgf/mm^2).
    pub fn vickers(self) -> f64 {
        self.0 / VICKERS_TO_PA
    }
}

/// One kgf/mm^2 in Pa (standard gravity 9.80665 m/s^2, exact by definition: CGPM 1901).
pub const VICKERS_TO_PA: f64 = 9.80665e6;

/// Electrical conductivity of the International Annealed Copper Standard (100 %IACS), in S/m:
/// 1 / (1.7241e-8 ohm m) (IEC 60028; \[CDA\] Table 5 in `materials-sources.md`).
pub const IACS_100_S_M: f64 = 1.0 / 1.7241e-8;

/// A plane angle, stored in radians. Built only through named constructors.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd, Default, Serialize, Deserialize)]
#[serde(transparent)]
pub struct Angle(f64);

impl Angle {
    /// From radians.
    pub const fn from_radians(rad: f64) -> Self {
        Self(rad)
    }
    /// From degrees.
    pub fn from_degrees(deg: f64) -> Self {
        Self(deg.to_radians())
    }
    /// In radians.
    pub const fn radians(self) -> f64 {
        self.0
    }
    /// In degrees.
    pub fn degrees(self) -> f64 {
        self.0.to_degrees()
    }
    /// Sine.
    pub fn sin(self) -> f64 {
        self.0.sin()
    }
    /// Cosine.
    pub fn cos(self) -> f64 {
        self.0.cos()
    }
    /// Tangent.
    pub fn tan(self) -> f64 {
        self.0.tan()
    }
}

impl fmt::Display for Angle {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match f.precision() {
            Some(p) => write!(f, "{:.*} deg", p, self.degrees()),
            None => write!(f, "{} deg", self.degrees()),
        }
    }
}

/// What kind of quantity a piece of user input must be; decides which units are accepted.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum QuantityKind {
    /// Speed: m/s, km/s, mm/us.
    Velocity,
    /// Plane angle: deg, °, rad, mrad.
    Angle,
    /// Length: m, cm, mm, um, in.
    Length,
    /// Pressure or stress: Pa, kPa, MPa, GPa, bar.
    Pressure,
    /// Hardness: HV (kgf/mm^2) or a stress unit.
    Hardness,
    /// Density: kg/m3, g/cm3.
    Density,
    /// Temperature: K, degC.
    Temperature,
    /// Thermal conductivity: W/(m K).
    ThermalConductivity,
    /// Specific heat: J/(kg K), kJ/(kg K).
    SpecificHeat,
    /// Electrical conductivity: S/m, MS/m, %IACS.
    ElectricalConductivity,
    /// Capacitance: F, mF, uF, nF.
    Capacitance,
    /// Voltage: V, kV.
    Voltage,
    /// Inductance: H, mH, uH, nH.
    Inductance,
    /// Resistance: ohm, mohm, uohm.
    Resistance,
    /// Energy: J, kJ, MJ.
    Energy,
    /// Time: s, ms, us, ns.
    Time,
    /// Frequency: Hz, kHz, MHz.
    Frequency,
    /// Current: A, kA, MA.
    Current,
    /// A pure number: no unit allowed (or `1`).
    Dimensionless,
}

/// How a unit maps to SI: `si = value * scale + offset`.
struct UnitDef {
    symbol: &'static str,
    scale: f64,
    offset: f64,
}

const fn u(symbol: &'static str, scale: f64) -> UnitDef {
    UnitDef {
        symbol,
        scale,
        offset: 0.0,
    }
}

const VELOCITY_UNITS: &[UnitDef] = &[
    u("m/s", 1.0),
    u("km/s", 1000.0),
    u("mm/us", 1000.0),
    u("mm/µs", 1000.0),
    u("m/us", 1e6),
];
const ANGLE_UNITS: &[UnitDef] = &[
    u("deg", std::f64::consts::PI / 180.0),
    u("°", std::f64::consts::PI / 180.0),
    u("rad", 1.0),
    u("mrad", 1e-3),
];
const LENGTH_UNITS: &[UnitDef] = &[
    u("m", 1.0),
    u("cm", 1e-2),
    u("mm", 1e-3),
    u("um", 1e-6),
    u("µm", 1e-6),
    u("in", 0.0254),
];
const PRESSURE_UNITS: &[UnitDef] = &[
    u("Pa", 1.0),
    u("kPa", 1e3),
    u("MPa", 1e6),
    u("GPa", 1e9),
    u("bar", 1e5),
];
const HARDNESS_UNITS: &[UnitDef] = &[
    u("HV", VICKERS_TO_PA),
    u("Pa", 1.0),
    u("MPa", 1e6),
    u("GPa", 1e9),
];
const DENSITY_UNITS: &[UnitDef] = &[
    u("kg/m3", 1.0),
    u("kg/m^3", 1.0),
    u("g/cm3", 1000.0),
    u("g/cm^3", 1000.0),
    u("g/cc", 1000.0),
];
const TEMPERATURE_UNITS: &[UnitDef] = &[
    u("K", 1.0),
    UnitDef {
        symbol: "degC",
        scale: 1.0,
        offset: 273.15,
    },
    UnitDef {
        symbol: "°C",
        scale: 1.0,
        offset: 273.15,
    },
];
const THERMAL_CONDUCTIVITY_UNITS: &[UnitDef] = &[
    u("W/(m K)", 1.0),
    u("W/(m·K)", 1.0),
    u("W/m/K", 1.0),
    u("W/mK", 1.0),
];
const SPECIFIC_HEAT_UNITS: &[UnitDef] = &[
    u("J/(kg K)", 1.0),
    u("J/(kg·K)", 1.0),
    u("J/kg/K", 1.0),
    u("kJ/(kg K)", 1000.0),
];
const ELECTRICAL_CONDUCTIVITY_UNITS: &[UnitDef] = &[
    u("S/m", 1.0),
    u("MS/m", 1e6),
    u("%IACS", IACS_100_S_M / 100.0),
];
const CAPACITANCE_UNITS: &[UnitDef] = &[
    u("F", 1.0),
    u("mF", 1e-3),
    u("uF", 1e-6),
    u("µF", 1e-6),
    u("nF", 1e-9),
];
const VOLTAGE_UNITS: &[UnitDef] = &[u("V", 1.0), u("kV", 1e3)];
const INDUCTANCE_UNITS: &[UnitDef] = &[
    u("H", 1.0),
    u("mH", 1e-3),
    u("uH", 1e-6),
    u("µH", 1e-6),
    u("nH", 1e-9),
];
const RESISTANCE_UNITS: &[UnitDef] = &[
    u("ohm", 1.0),
    u("Ω", 1.0),
    u("mohm", 1e-3),
    u("mΩ", 1e-3),
    u("uohm", 1e-6),
    u("µΩ", 1e-6),
];
const ENERGY_UNITS: &[UnitDef] = &[u("J", 1.0), u("kJ", 1e3), u("MJ", 1e6)];
const TIME_UNITS: &[UnitDef] = &[
    u("s", 1.0),
    u("ms", 1e-3),
    u("us", 1e-6),
    u("µs", 1e-6),
    u("ns", 1e-9),
];
const FREQUENCY_UNITS: &[UnitDef] = &[u("Hz", 1.0), u("kHz", 1e3), u("MHz", 1e6)];
const CURRENT_UNITS: &[UnitDef] = &[u("A", 1.0), u("kA", 1e3), u("MA", 1e6)];
const DIMENSIONLESS_UNITS: &[UnitDef] = &[u("", 1.0), u("1", 1.0)];

impl QuantityKind {
    fn units(self) -> &'static [UnitDef] {
        match self {
            QuantityKind::Velocity => VELOCITY_UNITS,
            QuantityKind::Angle => ANGLE_UNITS,
            QuantityKind::Length => LENGTH_UNITS,
            QuantityKind::Pressure => PRESSURE_UNITS,
            QuantityKind::Hardness => HARDNESS_UNITS,
            QuantityKind::Density => DENSITY_UNITS,
            QuantityKind::Temperature => TEMPERATURE_UNITS,
            QuantityKind::ThermalConductivity => THERMAL_CONDUCTIVITY_UNITS,
            QuantityKind::SpecificHeat => SPECIFIC_HEAT_UNITS,
            QuantityKind::ElectricalConductivity => ELECTRICAL_CONDUCTIVITY_UNITS,
            QuantityKind::Capacitance => CAPACITANCE_UNITS,
            QuantityKind::Voltage => VOLTAGE_UNITS,
            QuantityKind::Inductance => INDUCTANCE_UNITS,
            QuantityKind::Resistance => RESISTANCE_UNITS,
            QuantityKind::Energy => ENERGY_UNITS,
            QuantityKind::Time => TIME_UNITS,
            QuantityKind::Frequency => FREQUENCY_UNITS,
            QuantityKind::Current => CURRENT_UNITS,
            QuantityKind::Dimensionless => DIMENSIONLESS_UNITS,
        }
    }

    /// A human name for messages ("a velocity").
    pub fn describe(self) -> &'static str {
        match self {
            QuantityKind::Velocity => "a velocity",
            QuantityKind::Angle => "an angle",
            QuantityKind::Length => "a length",
            QuantityKind::Pressure => "a pressure",
            QuantityKind::Hardness => "a hardness",
            QuantityKind::Density => "a density",
            QuantityKind::Temperature => "a temperature",
            QuantityKind::ThermalConductivity => "a thermal conductivity",
            QuantityKind::SpecificHeat => "a specific heat",
            QuantityKind::ElectricalConductivity => "an electrical conductivity",
            QuantityKind::Capacitance => "a capacitance",
            QuantityKind::Voltage => "a voltage",
            QuantityKind::Inductance => "an inductance",
            QuantityKind::Resistance => "a resistance",
            QuantityKind::Energy => "an energy",
            QuantityKind::Time => "a time",
            QuantityKind::Frequency => "a frequency",
            QuantityKind::Current => "a current",
            QuantityKind::Dimensionless => "a pure number",
        }
    }

    /// The accepted unit symbols, comma separated, for messages and help.
    pub fn accepted_units(self) -> String {
        self.units()
            .iter()
            .filter(|d| !d.symbol.is_empty())
            .map(|d| d.symbol)
            .collect::<Vec<_>>()
            .join(", ")
    }

    /// An example of a well-formed value.
    pub fn example(self) -> &'static str {
        match self {
            QuantityKind::Velocity => "350m/s",
            QuantityKind::Angle => "12deg",
            QuantityKind::Length => "1.5mm",
            QuantityKind::Pressure => "310MPa",
            QuantityKind::Hardness => "107HV",
            QuantityKind::Density => "2.7g/cm3",
            QuantityKind::Temperature => "855K",
            QuantityKind::ThermalConductivity => "167W/(m K)",
            QuantityKind::SpecificHeat => "896J/(kg K)",
            QuantityKind::ElectricalConductivity => "25MS/m",
            QuantityKind::Capacitance => "200uF",
            QuantityKind::Voltage => "8kV",
            QuantityKind::Inductance => "50nH",
            QuantityKind::Resistance => "5mohm",
            QuantityKind::Energy => "10kJ",
            QuantityKind::Time => "12us",
            QuantityKind::Frequency => "20kHz",
            QuantityKind::Current => "300kA",
            QuantityKind::Dimensionless => "1.34",
        }
    }
}

/// Why a piece of user input is not a quantity of the expected kind.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum UnitError {
    /// Nothing was given.
    #[error("empty value: expected {kind} such as {example}")]
    Empty {
        /// What was expected.
        kind: &'static str,
        /// A well-formed example.
        example: &'static str,
    },
    /// The text does not start with a number.
    #[error("'{input}' does not start with a number: expected {kind} such as {example}")]
    NotANumber {
        /// The offending text.
        input: String,
        /// What was expected.
        kind: &'static str,
        /// A well-formed example.
        example: &'static str,
    },
    /// A number without a unit where one is required.
    #[error("'{input}' has no unit: expected {kind} with one of the units {accepted}, such as {example}")]
    MissingUnit {
        /// The offending text.
        input: String,
        /// What was expected.
        kind: &'static str,
        /// The accepted units.
        accepted: String,
        /// A well-formed example.
        example: &'static str,
    },
    /// A unit that does not belong to the expected kind.
    #[error(
        "unknown unit '{unit}' in '{input}': expected {kind} with one of the units {accepted}{hint}"
    )]
    UnknownUnit {
        /// The offending text.
        input: String,
        /// The unit as given.
        unit: String,
        /// What was expected.
        kind: &'static str,
        /// The accepted units.
        accepted: String,
        /// "; did you mean 12kV?" when the unit differs from an accepted one only in case or
        /// by a common spelling, else empty.
        hint: String,
    },
    /// NaN, infinity, or a number too large to represent.
    #[error("'{input}' is not a finite number")]
    NotFinite {
        /// The offending text.
        input: String,
    },
}

/// An accepted unit of `kind` that `unit` was probably meant to be: the same letters in another
/// case (`kv` -> `kV`, `MM` -> `mm`) when exactly one unit matches, or a common spelling
/// (`m/sec`, `degrees`, `microfarad`, `kilovolt`, ...).
#[must_use]
pub fn suggest_unit(kind: QuantityKind, unit: &str) -> Option<&'static str> {
    let units = kind.units();
    let lower = unit.to_lowercase();
    let same_case: Vec<&'static str> = units
        .iter()
        .map(|d| d.symbol)
        .filter(|s| !s.is_empty() && s.to_lowercase() == lower)
        .collect();
    if same_case.len() == 1 {
        return Some(same_case[0]);
    }
    let alias = match lower.as_str() {
        "m/sec" | "mps" | "m s-1" | "m.s-1" => "m/s",
        "km/sec" => "km/s",
        "degree" | "degrees" | "deg." | "grad" => "deg",
        "radian" | "radians" => "rad",
        "millimetre" | "millimeter" | "millimetres" | "millimeters" => "mm",
        "microfarad" | "microfarads" | "µf" => "uF",
        "kilovolt" | "kilovolts" => "kV",
        "volt" | "volts" => "V",
        "kilojoule" | "kilojoules" => "kJ",
        "nanohenry" | "nanohenries" => "nH",
        _ => return None,
    };
    units.iter().map(|d| d.symbol).find(|s| *s == alias)
}

/// Whether `token` is, alone, a unit of some quantity kind (`kV`, `m/s`, `deg`): the second
/// half of a value the shell split at a space (`12 kV`).
#[must_use]
pub fn is_unit_token(token: &str) -> bool {
    !token.is_empty()
        && ALL_KINDS
            .iter()
            .any(|k| k.units().iter().any(|d| d.symbol == token))
}

/// Every kind, for lookups over all units.
const ALL_KINDS: [QuantityKind; 19] = [
    QuantityKind::Velocity,
    QuantityKind::Angle,
    QuantityKind::Length,
    QuantityKind::Pressure,
    QuantityKind::Hardness,
    QuantityKind::Density,
    QuantityKind::Temperature,
    QuantityKind::ThermalConductivity,
    QuantityKind::SpecificHeat,
    QuantityKind::ElectricalConductivity,
    QuantityKind::Capacitance,
    QuantityKind::Voltage,
    QuantityKind::Inductance,
    QuantityKind::Resistance,
    QuantityKind::Energy,
    QuantityKind::Time,
    QuantityKind::Frequency,
    QuantityKind::Current,
    QuantityKind::Dimensionless,
];

/// Parse user text such as `350m/s`, `0.35 km/s`, `12°` or `2.7 g/cm3` into the SI value of
/// the given kind. A bare number is an error unless the kind is [`QuantityKind::Dimensionless`].
///
/// # Errors
/// [`UnitError`] naming what was wrong and which units are accepted.
///
/// ```
/// use oblique_core::units::{parse_quantity, QuantityKind};
/// let v = parse_quantity("0.35 km/s", QuantityKind::Velocity).unwrap();
/// assert!((v - 350.0).abs() < 1e-9);
/// assert!(parse_quantity("350", QuantityKind::Velocity).is_err());
/// ```
pub fn parse_quantity(input: &str, kind: QuantityKind) -> Result<f64, UnitError> {
    let text = input.trim();
    if text.is_empty() {
        return Err(UnitError::Empty {
            kind: kind.describe(),
            example: kind.example(),
        });
    }
    let split = number_prefix_len(text);
    if split == 0 {
        let lower = text.to_ascii_lowercase();
        if lower.starts_with("nan")
            || lower.starts_with("inf")
            || lower.starts_with("+inf")
            || lower.starts_with("-inf")
        {
            return Err(UnitError::NotFinite {
                input: text.to_string(),
            });
        }
        return Err(UnitError::NotANumber {
            input: text.to_string(),
            kind: kind.describe(),
            example: kind.example(),
        });
    }
    let (number, rest) = text.split_at(split);
    let unit = rest.trim();
    let value: f64 = number.parse().map_err(|_| UnitError::NotANumber {
        input: text.to_string(),
        kind: kind.describe(),
        example: kind.example(),
    })?;
    if !value.is_finite() {
        return Err(UnitError::NotFinite {
            input: text.to_string(),
        });
    }
    if unit.is_empty() && kind != QuantityKind::Dimensionless {
        return Err(UnitError::MissingUnit {
            input: text.to_string(),
            kind: kind.describe(),
            accepted: kind.accepted_units(),
            example: kind.example(),
        });
    }
    let Some(def) = kind.units().iter().find(|d| d.symbol == unit) else {
        let hint = suggest_unit(kind, unit)
            .map(|u| format!("; did you mean {number}{u}?"))
            .unwrap_or_default();
        return Err(UnitError::UnknownUnit {
            input: text.to_string(),
            unit: unit.to_string(),
            kind: kind.describe(),
            accepted: kind.accepted_units(),
            hint,
        });
    };
    let si = value * def.scale + def.offset;
    if !si.is_finite() {
        return Err(UnitError::NotFinite {
            input: text.to_string(),
        });
    }
    Ok(si)
}

/// Length of the leading decimal number (sign, digits, point, exponent) in `text`.
fn number_prefix_len(text: &str) -> usize {
    let b = text.as_bytes();
    let mut i = 0;
    if i < b.len() && (b[i] == b'+' || b[i] == b'-') {
        i += 1;
    }
    let digits_start = i;
    while i < b.len() && b[i].is_ascii_digit() {
        i += 1;
    }
    let mut n_digits = i - digits_start;
    if i < b.len() && b[i] == b'.' {
        i += 1;
        let frac_start = i;
        while i < b.len() && b[i].is_ascii_digit() {
            i += 1;
        }
        n_digits += i - frac_start;
    }
    if n_digits == 0 {
        return 0;
    }
    // An exponent only counts when digits follow it, so that `5e` is not eaten from a unit.
    if i < b.len() && (b[i] == b'e' || b[i] == b'E') {
        let mut j = i + 1;
        if j < b.len() && (b[j] == b'+' || b[j] == b'-') {
            j += 1;
        }
        let exp_start = j;
        while j < b.len() && b[j].is_ascii_digit() {
            j += 1;
        }
        if j > exp_start {
            i = j;
        }
    }
    i
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn ok(input: &str, kind: QuantityKind, expected: f64) {
        let got = parse_quantity(input, kind).unwrap_or_else(|e| panic!("{input}: {e}"));
        assert_relative_eq!(got, expected, max_relative = 1e-12);
    }

    #[test]
    fn parses_the_forms_users_type() {
        ok("350m/s", QuantityKind::Velocity, 350.0);
        ok("0.35 km/s", QuantityKind::Velocity, 350.0);
        ok("0.35km/s", QuantityKind::Velocity, 350.0);
        ok("12deg", QuantityKind::Angle, 12f64.to_radians());
        ok("12°", QuantityKind::Angle, 12f64.to_radians());
        ok("0.21rad", QuantityKind::Angle, 0.21);
        ok("1.5mm", QuantityKind::Length, 1.5e-3);
        ok("2.7 g/cm3", QuantityKind::Density, 2700.0);
        ok("310MPa", QuantityKind::Pressure, 310e6);
        ok("200uF", QuantityKind::Capacitance, 200e-6);
        ok("8kV", QuantityKind::Voltage, 8000.0);
        ok("1e3 m/s", QuantityKind::Velocity, 1000.0);
        ok("582 degC", QuantityKind::Temperature, 855.15);
        ok("107 HV", QuantityKind::Hardness, 107.0 * 9.80665e6);
        ok(
            "100 %IACS",
            QuantityKind::ElectricalConductivity,
            1.0 / 1.7241e-8,
        );
        ok("1.34", QuantityKind::Dimensionless, 1.34);
    }

    #[test]
    fn bare_number_names_the_expected_units() {
        let e = parse_quantity("350", QuantityKind::Velocity).unwrap_err();
        let msg = e.to_string();
        assert!(matches!(e, UnitError::MissingUnit { .. }));
        assert!(msg.contains("m/s") && msg.contains("km/s"), "{msg}");
    }

    #[test]
    fn rejects_unknown_units_nan_infinity_and_overflow() {
        assert!(matches!(
            parse_quantity("350 mph", QuantityKind::Velocity),
            Err(UnitError::UnknownUnit { .. })
        ));
        assert!(matches!(
            parse_quantity("12 m/s", QuantityKind::Angle),
            Err(UnitError::UnknownUnit { .. })
        ));
        assert!(matches!(
            parse_quantity("NaN m/s", QuantityKind::Velocity),
            Err(UnitError::NotFinite { .. })
        ));
        assert!(matches!(
            parse_quantity("inf m/s", QuantityKind::Velocity),
            Err(UnitError::NotFinite { .. })
        ));
        assert!(matches!(
            parse_quantity("1e400 m/s", QuantityKind::Velocity),
            Err(UnitError::NotFinite { .. })
        ));
        assert!(matches!(
            parse_quantity("1e308 km/s", QuantityKind::Velocity),
            Err(UnitError::NotFinite { .. })
        ));
        assert!(matches!(
            parse_quantity("", QuantityKind::Velocity),
            Err(UnitError::Empty { .. })
        ));
        assert!(matches!(
            parse_quantity("fast", QuantityKind::Velocity),
            Err(UnitError::NotANumber { .. })
        ));
    }

    #[test]
    fn units_are_case_sensitive() {
        // mPa (millipascal) is not MPa: refusing it beats a silent factor of 1e9.
        assert!(parse_quantity("310 mpa", QuantityKind::Pressure).is_err());
    }

    #[test]
    fn angle_accessors_round_trip() {
        let a = Angle::from_degrees(12.5);
        assert_relative_eq!(a.degrees(), 12.5, max_relative = 1e-14);
        assert_relative_eq!(
            Angle::from_radians(a.radians()).degrees(),
            12.5,
            max_relative = 1e-14
        );
    }
}
