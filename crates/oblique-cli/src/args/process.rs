//! Flag groups of the process set-ups, shared by `estimate`, `sweep`, `calibrate` and `report`:
//! the bank, the coil and workpiece, the charge, the time integration, and their unit-checked
//! value parsers; each group turns into the typed request of `oblique_setup`.

use crate::fail::{CmdResult, Fail};
use crate::qarg;
use clap::Args;
use oblique_core::units::{
    Angle, Capacitance, Energy, Inductance, Length, Resistance, Velocity, Voltage,
};
use oblique_setup::{
    BankRequest, Charge, ExplosiveRequest, Integration, MagneticRequest, SheetRequest, TubeRequest,
};

/// A strictly positive quantity, with the flag's quantity name in the message.
fn positive(v: f64, what: &str, unit: &str) -> Result<f64, String> {
    if v > 0.0 {
        Ok(v)
    } else {
        Err(format!("{what} must be above zero, got {v} {unit}"))
    }
}

/// Value parsers for the flags of this module: units required, sign checked, and each quantity
/// within the range oblique computes with. The ranges are wide bounds around every pulsed-power
/// and explosive set-up in use (common practice), there so that a slip of the prefix
/// (`1e-300kV`, `300F`) is an error, never a number that overflows into NaN.
pub mod parse {
    use super::{positive, qarg};

    /// `v` within `lo..=hi` (SI), or a message with the range in words.
    fn within(
        v: f64,
        lo: f64,
        hi: f64,
        what: &str,
        unit: &str,
        words: &str,
    ) -> Result<f64, String> {
        if v < lo || v > hi {
            Err(format!(
                "{what} {v:.3e} {unit} is outside the range oblique computes with ({words})"
            ))
        } else {
            Ok(v)
        }
    }

    /// A capacitance above zero: 1 nF to 1 F.
    pub fn capacitance(s: &str) -> Result<f64, String> {
        let v = positive(qarg::capacitance(s)?, "capacitance", "F")?;
        within(v, 1e-9, 1.0, "capacitance", "F", "1 nF to 1 F")
    }
    /// A voltage above zero: 1 V to 1 MV.
    pub fn voltage(s: &str) -> Result<f64, String> {
        let v = positive(qarg::voltage(s)?, "voltage", "V")?;
        within(v, 1.0, 1e6, "voltage", "V", "1 V to 1 MV")
    }
    /// An inductance above zero: 1 pH to 1 H.
    pub fn inductance(s: &str) -> Result<f64, String> {
        let v = positive(qarg::inductance(s)?, "inductance", "H")?;
        within(v, 1e-12, 1.0, "inductance", "H", "1 pH to 1 H")
    }
    /// An inductance, zero allowed: up to 1 H.
    pub fn inductance_or_zero(s: &str) -> Result<f64, String> {
        let v = qarg::inductance(s)?;
        if v >= 0.0 {
            within(v, 0.0, 1.0, "inductance", "H", "0 to 1 H")
        } else {
            Err(format!("inductance must not be negative, got {v} H"))
        }
    }
    /// A resistance, zero allowed: up to 1 kohm.
    pub fn resistance(s: &str) -> Result<f64, String> {
        let v = qarg::resistance(s)?;
        if v >= 0.0 {
            within(v, 0.0, 1e3, "resistance", "ohm", "0 to 1 kohm")
        } else {
            Err(format!("resistance must not be negative, got {v} ohm"))
        }
    }
    /// A length above zero: 1 nm to 100 m.
    pub fn length(s: &str) -> Result<f64, String> {
        let v = positive(qarg::length(s)?, "length", "m")?;
        within(v, 1e-9, 100.0, "length", "m", "1 nm to 100 m")
    }
    /// A length, zero allowed: up to 100 m.
    pub fn length_or_zero(s: &str) -> Result<f64, String> {
        let v = qarg::length(s)?;
        if v >= 0.0 {
            within(v, 0.0, 100.0, "length", "m", "0 to 100 m")
        } else {
            Err(format!("length must not be negative, got {v} m"))
        }
    }
    /// An energy above zero: 1 mJ to 100 MJ.
    pub fn energy(s: &str) -> Result<f64, String> {
        let v = positive(qarg::energy(s)?, "energy", "J")?;
        within(v, 1e-3, 1e8, "energy", "J", "1 mJ to 100 MJ")
    }
    /// A frequency above zero: 1 Hz to 1 GHz.
    pub fn frequency(s: &str) -> Result<f64, String> {
        let v = positive(qarg::frequency(s)?, "frequency", "Hz")?;
        within(v, 1.0, 1e9, "frequency", "Hz", "1 Hz to 1 GHz")
    }
    /// A velocity above zero.
    pub fn velocity(s: &str) -> Result<f64, String> {
        qarg::positive_velocity(s)
    }
    /// A pure number above zero.
    pub fn number(s: &str) -> Result<f64, String> {
        qarg::positive_number(s)
    }
    /// An efficiency factor in (0, 1].
    pub fn efficiency(s: &str) -> Result<f64, String> {
        let v = qarg::positive_number(s)?;
        if v <= 1.0 {
            Ok(v)
        } else {
            Err(format!("efficiency must be in (0, 1], got {v}"))
        }
    }
    /// A same-sign peak ratio, at least 1.
    pub fn peak_ratio(s: &str) -> Result<f64, String> {
        let v = qarg::positive_number(s)?;
        if v >= 1.0 {
            Ok(v)
        } else {
            Err(format!(
                "peak ratio I1/I2 must be at least 1 (the first peak is the larger), got {v}"
            ))
        }
    }
}

/// The capacitor bank: a machine file and/or flags (flags win).
#[derive(Debug, Clone, Args)]
pub struct BankFlags {
    /// Capacitor bank file from the library (`DIR/machines/*.ron` or built in).
    #[arg(long, value_name = "NAME")]
    pub machine: Option<String>,
    /// Bank capacitance, e.g. 300uF.
    #[arg(long, value_name = "CAPACITANCE", value_parser = parse::capacitance, allow_hyphen_values = true)]
    pub capacitance: Option<f64>,
    /// Bank's rated (maximum) charging voltage, e.g. 12kV (a charge above it is refused).
    #[arg(long = "rated-voltage", value_name = "VOLTAGE", value_parser = parse::voltage, allow_hyphen_values = true)]
    pub rated_voltage: Option<f64>,
    /// Bank loop inductance, e.g. 40nH (bank, cables, switch; the coil is added separately).
    #[arg(long = "bank-inductance", value_name = "INDUCTANCE", value_parser = parse::inductance, allow_hyphen_values = true)]
    pub bank_inductance: Option<f64>,
    /// Bank loop resistance, e.g. 4mohm.
    #[arg(long = "bank-resistance", value_name = "RESISTANCE", value_parser = parse::resistance, allow_hyphen_values = true)]
    pub bank_resistance: Option<f64>,
}

/// A compression coil and the tube.
#[derive(Debug, Clone, Args)]
pub struct TubeFlags {
    /// Compression coil (or field-shaper) file from the library.
    #[arg(long, value_name = "NAME")]
    pub coil: Option<String>,
    /// Coil bore radius (radius, not diameter), e.g. 21mm.
    #[arg(long = "coil-bore", value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub coil_bore: Option<f64>,
    /// Coil working length, e.g. 20mm.
    #[arg(long = "coil-length", value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub coil_length: Option<f64>,
    /// Inductance of coil terminals and leads outside the gap, e.g. 20nH (default 0 without a coil file).
    #[arg(long = "coil-inductance", value_name = "INDUCTANCE", value_parser = parse::inductance_or_zero, allow_hyphen_values = true)]
    pub coil_inductance: Option<f64>,
    /// Tube (flyer) material id, e.g. aa6061-t6 (default: the --pair flyer).
    #[arg(long, value_name = "ID")]
    pub flyer: Option<String>,
    /// Tube wall thickness, e.g. 1mm (default: the --pair flyer thickness).
    #[arg(long = "flyer-thickness", value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub flyer_thickness: Option<f64>,
    /// Tube outer radius, e.g. 20mm.
    #[arg(long = "tube-outer-radius", value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub tube_outer_radius: Option<f64>,
}

/// A flat bar coil and the sheet.
#[derive(Debug, Clone, Args)]
pub struct SheetFlags {
    /// Bar coil file from the library.
    #[arg(long, value_name = "NAME")]
    pub coil: Option<String>,
    /// Bar length along the current, e.g. 100mm.
    #[arg(long = "coil-length", value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub coil_length: Option<f64>,
    /// Bar width, e.g. 20mm.
    #[arg(long = "coil-width", value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub coil_width: Option<f64>,
    /// Inductance of the return conductor and leads, e.g. 20nH (default 0 without a coil file).
    #[arg(long = "coil-inductance", value_name = "INDUCTANCE", value_parser = parse::inductance_or_zero, allow_hyphen_values = true)]
    pub coil_inductance: Option<f64>,
    /// Gap between coil surface and sheet (insulation), e.g. 0.5mm.
    #[arg(long = "initial-gap", value_name = "LENGTH", value_parser = parse::length_or_zero, allow_hyphen_values = true)]
    pub initial_gap: Option<f64>,
    /// Sheet (flyer) material id (default: the --pair flyer).
    #[arg(long, value_name = "ID")]
    pub flyer: Option<String>,
    /// Sheet thickness, e.g. 1mm (default: the --pair flyer thickness).
    #[arg(long = "flyer-thickness", value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub flyer_thickness: Option<f64>,
}

/// Settings of the time integration.
#[derive(Debug, Clone, Args)]
pub struct IntegrationFlags {
    /// Runge-Kutta steps per ring period (50 to 1000000).
    #[arg(long = "steps-per-period", value_name = "N", default_value_t = 400)]
    pub steps_per_period: u32,
    /// Length of the time window in ring periods (no impact inside it is "no impact").
    #[arg(long = "max-periods", value_name = "N", default_value_t = 3.0, value_parser = parse::number)]
    pub max_periods: f64,
}

/// The charging voltage, or the stored energy it gives.
#[derive(Debug, Clone, Args)]
#[group(required = true, multiple = false)]
pub struct ChargeFlags {
    /// Charging voltage, e.g. 8kV.
    #[arg(long = "charge-voltage", value_name = "VOLTAGE", value_parser = parse::voltage, allow_hyphen_values = true)]
    pub charge_voltage: Option<f64>,
    /// Stored energy instead of the voltage, e.g. 10kJ (U0 = sqrt(2E/C)).
    #[arg(long, value_name = "ENERGY", value_parser = parse::energy, allow_hyphen_values = true)]
    pub energy: Option<f64>,
}

impl BankFlags {
    /// The bank request.
    pub fn request(&self) -> BankRequest {
        BankRequest {
            machine: self.machine.clone(),
            capacitance: self.capacitance.map(Capacitance::from_f),
            rated_voltage: self.rated_voltage.map(Voltage::from_v),
            inductance: self.bank_inductance.map(Inductance::from_h),
            resistance: self.bank_resistance.map(Resistance::from_ohm),
        }
    }
}

impl TubeFlags {
    /// The tube request with its bank.
    pub fn request(&self, bank: &BankFlags) -> MagneticRequest {
        MagneticRequest::Tube(TubeRequest {
            bank: bank.request(),
            coil: self.coil.clone(),
            coil_bore: self.coil_bore.map(Length::from_m),
            coil_length: self.coil_length.map(Length::from_m),
            coil_inductance: self.coil_inductance.map(Inductance::from_h),
            flyer: self.flyer.clone(),
            flyer_thickness: self.flyer_thickness.map(Length::from_m),
            tube_outer_radius: self.tube_outer_radius.map(Length::from_m),
        })
    }
}

impl SheetFlags {
    /// The sheet request with its bank.
    pub fn request(&self, bank: &BankFlags) -> MagneticRequest {
        MagneticRequest::Sheet(SheetRequest {
            bank: bank.request(),
            coil: self.coil.clone(),
            coil_length: self.coil_length.map(Length::from_m),
            coil_width: self.coil_width.map(Length::from_m),
            coil_inductance: self.coil_inductance.map(Inductance::from_h),
            initial_gap: self.initial_gap.map(Length::from_m),
            flyer: self.flyer.clone(),
            flyer_thickness: self.flyer_thickness.map(Length::from_m),
        })
    }
}

impl ChargeFlags {
    /// The charging voltage or the stored energy (clap requires one of them).
    pub fn charge(&self) -> CmdResult<Charge> {
        match (self.charge_voltage, self.energy) {
            (Some(u), _) => Ok(Charge::Voltage(Voltage::from_v(u))),
            (None, Some(e)) => Ok(Charge::Energy(Energy::from_j(e))),
            (None, None) => Err(Fail::input(
                "give --charge-voltage (e.g. 8kV) or --energy (e.g. 10kJ)",
            )),
        }
    }
}

impl IntegrationFlags {
    /// The integration settings.
    pub fn integration(&self) -> Integration {
        Integration {
            steps_per_period: self.steps_per_period,
            max_periods: self.max_periods,
        }
    }
}

/// An explosive set-up: a set-up file and/or values (values win).
#[derive(Debug, Clone, Args)]
pub struct ExplosiveFlags {
    /// Explosive set-up file from the library.
    #[arg(long, value_name = "NAME")]
    pub setup: Option<String>,
    /// Gurney velocity sqrt(2E) of the explosive as laid, e.g. 1500m/s (no default is shipped).
    #[arg(long = "gurney-velocity", value_name = "SPEED", value_parser = parse::velocity, allow_hyphen_values = true)]
    pub gurney_velocity: Option<f64>,
    /// Detonation velocity, e.g. 2500m/s.
    #[arg(long = "detonation-velocity", value_name = "SPEED", value_parser = parse::velocity, allow_hyphen_values = true)]
    pub detonation_velocity: Option<f64>,
    /// Flyer-to-charge mass ratio M/C (per unit area), e.g. 2.
    #[arg(long = "mass-ratio", value_name = "M/C", value_parser = parse::number, conflicts_with = "charge_ratio", allow_hyphen_values = true)]
    pub mass_ratio: Option<f64>,
    /// Charge-to-flyer mass ratio C/M (the loading ratio), e.g. 0.5.
    #[arg(long = "charge-ratio", value_name = "C/M", value_parser = parse::number, allow_hyphen_values = true)]
    pub charge_ratio: Option<f64>,
    /// Preset angle between flyer and parent, e.g. 0deg for the parallel set-up.
    #[arg(long = "preset-angle", value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle_or_zero)]
    pub preset_angle: Option<f64>,
}

impl ExplosiveFlags {
    /// The explosive request, checked against `pair`.
    pub fn request(&self, pair: Option<String>) -> ExplosiveRequest {
        ExplosiveRequest {
            setup: self.setup.clone(),
            gurney_velocity: self.gurney_velocity.map(Velocity::from_m_s),
            detonation_velocity: self.detonation_velocity.map(Velocity::from_m_s),
            mass_ratio: self.mass_ratio,
            charge_ratio: self.charge_ratio,
            preset_angle: self.preset_angle.map(Angle::from_radians),
            pair,
        }
    }
}
