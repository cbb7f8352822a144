//! Typed requests: the values a person gave (SI, `None` when not given) and the names of the
//! library files to take the others from.

use oblique_core::process::IntegrationOptions;
use oblique_core::units::{
    Angle, Capacitance, Energy, Inductance, Length, Resistance, Velocity, Voltage,
};
use std::num::NonZeroU32;

/// The names of the request fields, spelled as the `oblique` command line spells its flags.
/// Messages and provenance texts quote them (`flag --capacitance`, `--coil: unknown ...`).
pub mod field {
    /// [`super::BankRequest::machine`].
    pub const MACHINE: &str = "--machine";
    /// [`super::BankRequest::capacitance`].
    pub const CAPACITANCE: &str = "--capacitance";
    /// [`super::BankRequest::rated_voltage`].
    pub const RATED_VOLTAGE: &str = "--rated-voltage";
    /// [`super::BankRequest::inductance`].
    pub const BANK_INDUCTANCE: &str = "--bank-inductance";
    /// [`super::BankRequest::resistance`].
    pub const BANK_RESISTANCE: &str = "--bank-resistance";
    /// The coil file of a tube or sheet request.
    pub const COIL: &str = "--coil";
    /// [`super::TubeRequest::coil_bore`].
    pub const COIL_BORE: &str = "--coil-bore";
    /// The coil length of a tube or sheet request.
    pub const COIL_LENGTH: &str = "--coil-length";
    /// [`super::SheetRequest::coil_width`].
    pub const COIL_WIDTH: &str = "--coil-width";
    /// The coil's extra inductance.
    pub const COIL_INDUCTANCE: &str = "--coil-inductance";
    /// [`super::SheetRequest::initial_gap`].
    pub const INITIAL_GAP: &str = "--initial-gap";
    /// The flyer material id.
    pub const FLYER: &str = "--flyer";
    /// The flyer thickness.
    pub const FLYER_THICKNESS: &str = "--flyer-thickness";
    /// [`super::TubeRequest::tube_outer_radius`].
    pub const TUBE_OUTER_RADIUS: &str = "--tube-outer-radius";
    /// [`super::Charge::Voltage`] and the voltage grid of a sweep.
    pub const CHARGE_VOLTAGE: &str = "--charge-voltage";
    /// [`super::Charge::Energy`] and the energy grid of a sweep.
    pub const ENERGY: &str = "--energy";
    /// The standoff.
    pub const STANDOFF: &str = "--standoff";
    /// The pair window.
    pub const PAIR: &str = "--pair";
    /// The collision angle of an estimate or a sweep.
    pub const ANGLE: &str = "--angle";
    /// The efficiency.
    pub const EFFICIENCY: &str = "--efficiency";
    /// Both integration settings.
    pub const INTEGRATION: &str = "--steps-per-period / --max-periods";
    /// The number of values of a voltage or energy range.
    pub const STEPS: &str = "--steps";
    /// The number of values of a standoff range.
    pub const STANDOFF_STEPS: &str = "--standoff-steps";
    /// One angle per standoff.
    pub const ANGLE_PER_STANDOFF: &str = "--angle-per-standoff";
    /// [`super::ExplosiveRequest::setup`].
    pub const SETUP: &str = "--setup";
    /// [`super::ExplosiveRequest::gurney_velocity`].
    pub const GURNEY_VELOCITY: &str = "--gurney-velocity";
    /// [`super::ExplosiveRequest::detonation_velocity`].
    pub const DETONATION_VELOCITY: &str = "--detonation-velocity";
    /// [`super::ExplosiveRequest::mass_ratio`].
    pub const MASS_RATIO: &str = "--mass-ratio";
    /// [`super::ExplosiveRequest::charge_ratio`].
    pub const CHARGE_RATIO: &str = "--charge-ratio";
    /// [`super::ExplosiveRequest::preset_angle`].
    pub const PRESET_ANGLE: &str = "--preset-angle";
    /// The measured velocity of a calibration.
    pub const MEASURED_VELOCITY: &str = "--measured-velocity";
    /// The source of a calibration.
    pub const SOURCE: &str = "--source";
    /// The date of a calibration.
    pub const DATE: &str = "--date";
    /// Storing a calibration.
    pub const SAVE: &str = "--save";
    /// Writing a new bank file.
    pub const SAVE_AS: &str = "--save-as";
}

/// The capacitor bank: a machine file and/or values (values win).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct BankRequest {
    /// Bank file name.
    pub machine: Option<String>,
    /// Capacitance.
    pub capacitance: Option<Capacitance>,
    /// Rated (maximum) charging voltage.
    pub rated_voltage: Option<Voltage>,
    /// Loop inductance of bank, cables and switch.
    pub inductance: Option<Inductance>,
    /// Loop resistance.
    pub resistance: Option<Resistance>,
}

impl BankRequest {
    /// Everything from a bank file.
    #[must_use]
    pub fn machine(name: &str) -> Self {
        Self {
            machine: Some(name.to_string()),
            ..Self::default()
        }
    }
}

/// A compression coil and the tube around which it sits.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct TubeRequest {
    /// The bank.
    pub bank: BankRequest,
    /// Compression coil (or field-shaper) file name.
    pub coil: Option<String>,
    /// Coil bore radius.
    pub coil_bore: Option<Length>,
    /// Coil working length.
    pub coil_length: Option<Length>,
    /// Inductance of coil terminals and leads (default 0 without a coil file).
    pub coil_inductance: Option<Inductance>,
    /// Tube (flyer) material id (default: the pair window's flyer).
    pub flyer: Option<String>,
    /// Wall thickness (default: the pair window's flyer thickness).
    pub flyer_thickness: Option<Length>,
    /// Tube outer radius.
    pub tube_outer_radius: Option<Length>,
}

/// A flat bar coil and the sheet over it.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct SheetRequest {
    /// The bank.
    pub bank: BankRequest,
    /// Bar coil file name.
    pub coil: Option<String>,
    /// Bar length along the current.
    pub coil_length: Option<Length>,
    /// Bar width.
    pub coil_width: Option<Length>,
    /// Inductance of the return conductor and leads (default 0 without a coil file).
    pub coil_inductance: Option<Inductance>,
    /// Gap between coil surface and sheet (insulation).
    pub initial_gap: Option<Length>,
    /// Sheet (flyer) material id (default: the pair window's flyer).
    pub flyer: Option<String>,
    /// Sheet thickness (default: the pair window's flyer thickness).
    pub flyer_thickness: Option<Length>,
}

/// A magnetic pulse set-up without its charge and standoff.
#[derive(Debug, Clone, PartialEq)]
pub enum MagneticRequest {
    /// Tube compression.
    Tube(TubeRequest),
    /// Sheet on a bar coil.
    Sheet(SheetRequest),
}

/// The charging voltage, or the stored energy it gives (U0 = sqrt(2 E / C)).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Charge {
    /// Charging voltage.
    Voltage(Voltage),
    /// Stored energy.
    Energy(Energy),
}

/// Settings of the time integration (see `oblique_core::process::IntegrationOptions`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Integration {
    /// Runge-Kutta steps per ring period (50 to 1000000).
    pub steps_per_period: u32,
    /// Length of the time window in ring periods.
    pub max_periods: f64,
}

impl Default for Integration {
    fn default() -> Self {
        Self {
            steps_per_period: 400,
            max_periods: 3.0,
        }
    }
}

impl Integration {
    /// The core's options; `history` keeps every step.
    #[must_use]
    pub fn options(&self, history: bool) -> IntegrationOptions {
        IntegrationOptions {
            steps_per_period: self.steps_per_period,
            max_periods: self.max_periods,
            sample_every: if history { Some(NonZeroU32::MIN) } else { None },
        }
    }
}

/// One magnetic pulse estimate.
#[derive(Debug, Clone, PartialEq)]
pub struct EstimateRequest {
    /// Bank, coil and workpiece.
    pub process: MagneticRequest,
    /// Charging voltage or stored energy.
    pub charge: Charge,
    /// The workpiece's travel to impact.
    pub standoff: Length,
    /// Efficiency eta in (0, 1] (default: the bank file's calibration, else 1).
    pub efficiency: Option<f64>,
    /// Pair window to check against (also the default flyer).
    pub pair: Option<String>,
    /// The collision angle from the geometry, for the window check.
    pub angle: Option<Angle>,
    /// Time integration.
    pub integration: Integration,
    /// Keep the time histories.
    pub history: bool,
}

impl EstimateRequest {
    /// A request with default efficiency, integration, no pair window and no history.
    #[must_use]
    pub fn new(process: MagneticRequest, charge: Charge, standoff: Length) -> Self {
        Self {
            process,
            charge,
            standoff,
            efficiency: None,
            pair: None,
            angle: None,
            integration: Integration::default(),
            history: false,
        }
    }
}

/// An explosive welding set-up: a set-up file and/or values (values win).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ExplosiveRequest {
    /// Explosive set-up file name.
    pub setup: Option<String>,
    /// Gurney velocity sqrt(2E) of the explosive as laid.
    pub gurney_velocity: Option<Velocity>,
    /// Detonation velocity.
    pub detonation_velocity: Option<Velocity>,
    /// Flyer-to-charge mass ratio M/C (per unit area).
    pub mass_ratio: Option<f64>,
    /// Charge-to-flyer mass ratio C/M (used when `mass_ratio` is not given).
    pub charge_ratio: Option<f64>,
    /// Preset angle between flyer and parent.
    pub preset_angle: Option<Angle>,
    /// Pair window to check the resulting point against.
    pub pair: Option<String>,
}
