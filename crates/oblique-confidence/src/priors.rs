//! The documented distributions of every sampled model input: the criterion constants and the
//! material properties, each with where its spread comes from. `docs/theory.md` §15 carries the
//! same table; change both together.
//!
//! Every spread here is one standard deviation of the natural logarithm (a log-normal
//! distribution with its median at the value in use), so a sampled value is always positive and
//! a spread of 0.05 reads as "about 5 %".

use oblique_core::CriterionId;

/// A criterion constant that can be sampled (and fitted).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Constant {
    /// Deribas k (`deribas-lower`).
    DeribasK,
    /// Wittman N (`melting-upper`).
    WittmanN,
    /// The multiple m of the Hugoniot elastic limit (`pressure-lower`).
    HelMultiple,
    /// A factor on the jetting critical angle of the supersonic shock-polar construction
    /// (`jetting`); 1 is the construction as implemented.
    JettingFactor,
}

impl Constant {
    /// Every constant, in report order.
    pub const ALL: [Constant; 4] = [
        Constant::DeribasK,
        Constant::WittmanN,
        Constant::HelMultiple,
        Constant::JettingFactor,
    ];

    /// The constants a pair's trials can be fitted for (the jetting factor is sampled, never
    /// fitted: no trial series we know of separates it from the angle scatter).
    pub const FITTED: [Constant; 3] = [
        Constant::DeribasK,
        Constant::WittmanN,
        Constant::HelMultiple,
    ];

    /// The name in files and JSON (`deribas_k`, `wittman_n`, `hel_multiple`, `jetting_factor`).
    pub fn key(self) -> &'static str {
        match self {
            Constant::DeribasK => "deribas_k",
            Constant::WittmanN => "wittman_n",
            Constant::HelMultiple => "hel_multiple",
            Constant::JettingFactor => "jetting_factor",
        }
    }

    /// Words for sentences ("the Deribas constant k").
    pub fn words(self) -> &'static str {
        match self {
            Constant::DeribasK => "the Deribas constant k",
            Constant::WittmanN => "the melting constant N (Wittman)",
            Constant::HelMultiple => "the pressure limit's HEL multiple m",
            Constant::JettingFactor => "the jetting construction (a factor on its critical angle)",
        }
    }

    /// The criterion the constant belongs to.
    pub fn criterion(self) -> CriterionId {
        match self {
            Constant::DeribasK => CriterionId::DeribasLower,
            Constant::WittmanN => CriterionId::MeltingUpper,
            Constant::HelMultiple => CriterionId::PressureLower,
            Constant::JettingFactor => CriterionId::Jetting,
        }
    }

    /// The prior spread (log standard deviation) around the value in use, and its basis.
    pub fn prior(self) -> (f64, &'static str) {
        match self {
            // 0.6 (cleaned surfaces) to 1.2 is a factor of 2; read as +-2 sd: ln 2 / 4.
            Constant::DeribasK => (
                0.173,
                "from memory: k = 0.6 to 1.2 depending on the surface (physics notes §4), a factor of 2 read as +-2 sd, ln(2)/4 = 17 %",
            ),
            // The notes' review: Tm in degC rather than K moves Vp_max by 10-20 %, form A/B and
            // unit scalings differ more; N is to be fitted.
            Constant::WittmanN => (
                0.25,
                "from memory: N = 0.11 unconfirmed; the temperature scale alone moves the limit by 10-20 % (physics notes §7); 25 % assumed here",
            ),
            Constant::HelMultiple => (
                0.20,
                "common practice: m = 5 quoted from Kore et al. 2010 for magnetic pulse welding (physics notes §7), no spread published; 20 % assumed here",
            ),
            Constant::JettingFactor => (
                0.15,
                "assumed here (no source): two constructions of the dissimilar critical angle are in use (physics notes §7); 15 %",
            ),
        }
    }

    /// The largest value accepted on the command line and in files (as `--deribas-k`,
    /// `--wittman-n`, `--hel-multiple`; common practice bounds, `docs/theory.md`).
    pub fn max(self) -> f64 {
        match self {
            Constant::DeribasK => 5.0,
            Constant::WittmanN => 10.0,
            Constant::HelMultiple => 100.0,
            Constant::JettingFactor => 10.0,
        }
    }
}

/// Material properties that enter a decisive criterion, by their file field names, with the
/// default relative spread (one standard deviation) used when the material file gives no
/// `spread`, and its basis. The electrical conductivity enters no criterion and is not sampled.
pub const PROPERTIES: [(&str, f64, &str); 11] = [
    (
        "density",
        0.01,
        "derived here from the spread between tables: Cu 8.89-8.94, Al 6061 2.70-2.703 g/cm3 (materials-sources §1, §3)",
    ),
    (
        "hugoniot_c0",
        0.02,
        "derived here: Al 6061 5.24 [S96] against 5.35 km/s [M94], about 2 %; C0 within a few % of sqrt(K/rho) (materials-sources §5)",
    ),
    (
        "hugoniot_s",
        0.05,
        "derived here: Al 6061 1.40 [S96] against 1.34 [M94]; compilations differ by more than 5 % for Ti, 1018 and brass (physics notes §7)",
    ),
    (
        "vickers_hardness",
        0.10,
        "common practice: datasheet HV values are often conversions from HB or HRB (materials-sources §0 item 4); 10 % assumed",
    ),
    (
        "yield_strength",
        0.10,
        "derived here: datasheet ranges such as Cu C11000 70-100 MPa [SHL] and Ti grade 2 275-410 MPa (materials-sources §2); 10 %",
    ),
    (
        "tensile_strength",
        0.05,
        "derived here: datasheet ranges such as Cu C11000 210-250 MPa [SHL] (materials-sources §2); 5 %",
    ),
    (
        "bulk_modulus",
        0.03,
        "derived here: bulk moduli between compilations agree within 5 % (physics notes §7); 3 %",
    ),
    (
        "shear_modulus",
        0.05,
        "derived here: Cu 44 against 46-48 GPa, 304 77 against 78-86 GPa (physics notes §7); 5 %",
    ),
    (
        "melting_temperature",
        0.015,
        "derived here: solidus values between datasheets, e.g. Ti 1668 +- 10 degC [ESPI] (materials-sources §3); 1.5 % of the value in K",
    ),
    (
        "thermal_conductivity",
        0.05,
        "derived here: Al 6061 167 (T6) against 180 W/(m K) (O) [BTI-6061], Cu 391 against 394 [CDA]; 5 %",
    ),
    (
        "specific_heat",
        0.03,
        "derived here: Cu 385 against 386 [CDA], Ta 140 against 151 J/(kg K) [MDL, ALFA]; 3 %",
    ),
];

/// Human words for a material property field.
pub fn property_words(field: &str) -> &'static str {
    match field {
        "density" => "density",
        "hugoniot_c0" => "Hugoniot C0",
        "hugoniot_s" => "Hugoniot slope s",
        "vickers_hardness" => "Vickers hardness",
        "yield_strength" => "yield strength",
        "tensile_strength" => "tensile strength",
        "bulk_modulus" => "bulk modulus",
        "shear_modulus" => "shear modulus",
        "melting_temperature" => "melting (solidus) temperature",
        "thermal_conductivity" => "thermal conductivity",
        "specific_heat" => "specific heat",
        _ => "property",
    }
}

/// Whether a criterion (when enabled) uses the property at index `k` of [`PROPERTIES`].
pub fn criterion_uses(id: CriterionId, k: usize) -> bool {
    let field = PROPERTIES[k].0;
    match id {
        CriterionId::DeribasLower => matches!(field, "density" | "vickers_hardness"),
        CriterionId::StrengthLower => matches!(field, "density" | "tensile_strength"),
        CriterionId::PressureLower => matches!(
            field,
            "density"
                | "hugoniot_c0"
                | "hugoniot_s"
                | "yield_strength"
                | "bulk_modulus"
                | "shear_modulus"
        ),
        CriterionId::MeltingUpper => matches!(
            field,
            "density"
                | "hugoniot_c0"
                | "melting_temperature"
                | "thermal_conductivity"
                | "specific_heat"
        ),
        CriterionId::Jetting => matches!(field, "density" | "hugoniot_c0" | "hugoniot_s"),
        CriterionId::WavyTransition => false,
    }
}

/// Default relative standard deviation of an observation's impact velocity when the file gives
/// none, by the observation's method (common practice: photon Doppler velocimetry scatters by a
/// few per cent; simulations and estimates by much more; assumed here).
pub fn default_velocity_uncertainty(method: &str) -> f64 {
    match method {
        "measured" => 0.03,
        "simulated" => 0.10,
        _ => 0.15,
    }
}

/// Default standard deviation of an observation's collision angle (deg) when the file gives
/// none, by method (assumed here, as above).
pub fn default_angle_uncertainty_deg(method: &str) -> f64 {
    match method {
        "measured" => 1.0,
        "simulated" => 2.0,
        _ => 3.0,
    }
}

/// The least scatter any observation is given in the fit (relative velocity, angle in deg), so
/// that a shot recorded as exact still leaves the likelihood smooth (assumed here).
pub const FLOOR_VELOCITY_RELATIVE: f64 = 0.01;
/// See [`FLOOR_VELOCITY_RELATIVE`].
pub const FLOOR_ANGLE_DEG: f64 = 0.25;

/// The velocity scatter (relative standard deviation) of a process estimate whose efficiency
/// is not calibrated: the uncalibrated lumped model is an upper estimate, and its error is
/// expected to be several times the 11 % a published foil-actuator model reached against its
/// measurements (Hahn et al. 2016, physics notes §6 (confirmed there)); 25 % assumed here.
pub const UNCALIBRATED_VELOCITY_SPREAD: f64 = 0.25;
/// The velocity scatter of a process estimate calibrated on a measured shot: the model error of
/// about 11 % reported by Hahn et al. 2016 (physics notes §6 (confirmed there)).
pub const CALIBRATED_VELOCITY_SPREAD: f64 = 0.11;
/// The angle scatter assumed for a process estimate's angle when none is given (deg): the
/// dynamic collision angle differs from the machined taper (assumed here).
pub const PROCESS_ANGLE_SPREAD_DEG: f64 = 1.0;
