//! Weldability-window criteria (`physics-notes.md` §4) and the evaluation of one process point.
//!
//! Each criterion gives a limit and a signed margin (positive = on the welding side). For a
//! dissimilar pair every material-dependent limit is evaluated for both plates and the more
//! demanding one is kept; the result says which plate governs. No single published rule says
//! whose properties enter each limit, so this is the conservative choice (`physics-notes.md` §4).

use crate::error::{positive, PhysicsError};
use crate::hugoniot::{impedance_match, ImpactState};
use crate::jetting::{critical_angle, JettingAssessment, MixedRule};
use crate::kinematics::Collision;
use crate::material::Material;
use crate::units::{Angle, ArealEnergy, Length, Velocity};
use serde::{Deserialize, Serialize};
use std::fmt;

/// The criteria, by the ids used in flags, files and JSON.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum CriterionId {
    /// Deribas lower angle limit.
    DeribasLower,
    /// Lower impact-velocity limit from the tensile strength.
    StrengthLower,
    /// Lower impact-pressure limit, a multiple of the Hugoniot elastic limit.
    PressureLower,
    /// Wittman upper impact-velocity limit (interface melting).
    MeltingUpper,
    /// Jetting: collision angle above the critical angle (or subsonic inflow).
    Jetting,
    /// Cowan-Bergmann-Holtzman wavy/flat interface transition (informational).
    WavyTransition,
}

impl CriterionId {
    /// All criteria, in report order.
    pub const ALL: [CriterionId; 6] = [
        CriterionId::DeribasLower,
        CriterionId::StrengthLower,
        CriterionId::PressureLower,
        CriterionId::MeltingUpper,
        CriterionId::Jetting,
        CriterionId::WavyTransition,
    ];

    /// The kebab-case id.
    pub fn as_str(self) -> &'static str {
        match self {
            CriterionId::DeribasLower => "deribas-lower",
            CriterionId::StrengthLower => "strength-lower",
            CriterionId::PressureLower => "pressure-lower",
            CriterionId::MeltingUpper => "melting-upper",
            CriterionId::Jetting => "jetting",
            CriterionId::WavyTransition => "wavy-transition",
        }
    }

    /// A human title.
    pub fn title(self) -> &'static str {
        match self {
            CriterionId::DeribasLower => "Deribas lower angle",
            CriterionId::StrengthLower => "strength lower velocity",
            CriterionId::PressureLower => "pressure lower (HEL multiple)",
            CriterionId::MeltingUpper => "Wittman melting upper velocity",
            CriterionId::Jetting => "jetting critical angle",
            CriterionId::WavyTransition => "wavy-interface transition (informational)",
        }
    }

    /// The formula in plain text.
    pub fn formula(self) -> &'static str {
        match self {
            CriterionId::DeribasLower => "beta_min = k sqrt(Hv / (rho Vc^2))",
            CriterionId::StrengthLower => "Vp_min = sqrt(sigma_UTS / rho)",
            CriterionId::PressureLower => "p >= m HEL, HEL = 0.5 (K/G + 4/3) Y0, p from 1-D impedance matching at Vp",
            CriterionId::MeltingUpper => {
                "Vp_max = (1/N) sqrt(Tm C0) / Vc (k Cp C0 / (rho h))^(1/4)  [form A]; (1/N) sqrt(Tm / Vc) (k Cp C0 / (rho h))^(1/4)  [form B]"
            }
            CriterionId::Jetting => {
                "jet if Vc < C0(parent) or Vf < C0(flyer); else jet iff beta > max_p [theta_flyer(p) + theta_parent(p)] (shock polars)"
            }
            CriterionId::WavyTransition => "Re = (rho_f + rho_p) Vc^2 / (2 (Hv_f + Hv_p)); wavy above Re_crit",
        }
    }

    /// Where the relation comes from, and how sure we are of it.
    pub fn source(self) -> &'static str {
        match self {
            CriterionId::DeribasLower => {
                "Deribas et al.; k = 0.6 for carefully cleaned surfaces up to 1.2 (from memory; see docs/theory.md)"
            }
            CriterionId::StrengthLower => {
                "Wittman 1973; Carpenter & Wittman 1975 (cited; formula from memory; see docs/theory.md)"
            }
            CriterionId::PressureLower => "p >= 5 HEL, HEL = 0.5 (K/G + 4/3) Y0, as quoted from Kore et al. 2010 (confirmed) for magnetic pulse welding; other processes by default per docs/theory.md §5.4",
            CriterionId::MeltingUpper => {
                "Wittman; Carpenter & Wittman 1975, Annu. Rev. Mater. Sci. 5:177 (form A corroborated second-hand, exponents from memory; form B: no source found; N = 0.11 from memory, its SI scale with Tm in kelvin unconfirmed)"
            }
            CriterionId::Jetting => {
                "Cowan & Holtzman 1963 (both subsonic, cited); Walsh, Shreffler & Willig 1953 (polars, from memory); dissimilar construction derived; mixed case: no source, rule chosen per pair (docs/theory.md §4.3)"
            }
            CriterionId::WavyTransition => "Cowan, Bergmann & Holtzman 1971; Re_crit = 10.6 (from memory)",
        }
    }
}

impl fmt::Display for CriterionId {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// Which of the two forms of the Wittman melting limit is used (both circulate, `physics-notes.md`
/// §4). Form A is corroborated second-hand (`physics-notes.md` §7); **no source was found for
/// form B**: it is kept only to show how much the form matters, and every result with it says
/// so.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum WittmanForm {
    /// (1/N) sqrt(Tm C0) / Vc (k Cp C0 / (rho h))^(1/4) (the default).
    A,
    /// (1/N) sqrt(Tm / Vc) (k Cp C0 / (rho h))^(1/4). Unsourced.
    B,
}

/// The Wittman constant's stated uncertainty: no source read confirms N = 0.11 in SI with the
/// solidus in kelvin (`physics-notes.md` §7); with the solidus in degrees Celsius the limit
/// falls by the factor sqrt((Tm - 273.15 K) / Tm), 10-20 % for the library's metals. Fit N to
/// your own trials.
pub const WITTMAN_SCALE_NOTE: &str = "N = 0.11 is from memory and its scale is unconfirmed: no source read says whether Tm enters in kelvin (used) or degrees Celsius, which lowers the limit by 10-20 %; fit N to your trials";

/// Constants and switches of every criterion. `Default` gives the usual defaults (k 0.6, N 0.11,
/// 5 HEL, Re 10.6; from memory or common practice, see docs/theory.md).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CriteriaConfig {
    /// Deribas lower angle limit on/off.
    pub deribas_enabled: bool,
    /// Deribas constant k (0.6 for carefully cleaned surfaces up to 1.2).
    pub deribas_k: f64,
    /// Strength lower limit on/off.
    pub strength_enabled: bool,
    /// Pressure lower limit on/off.
    pub pressure_enabled: bool,
    /// Required multiple m of the Hugoniot elastic limit (5 by common practice).
    pub hel_multiple: f64,
    /// Melting upper limit on/off.
    pub melting_enabled: bool,
    /// Wittman constant N (0.11).
    pub wittman_n: f64,
    /// Form of the melting limit.
    pub wittman_form: WittmanForm,
    /// Jetting on/off.
    pub jetting_enabled: bool,
    /// Wavy transition on/off (informational in any case).
    pub wavy_enabled: bool,
    /// Critical Reynolds number of the wavy transition (10.6).
    pub wavy_critical_reynolds: f64,
    /// How the jetting test treats a collision supersonic in one plate only.
    pub mixed_jetting: MixedRule,
}

impl Default for CriteriaConfig {
    fn default() -> Self {
        Self {
            deribas_enabled: true,
            deribas_k: 0.6,
            strength_enabled: true,
            pressure_enabled: true,
            hel_multiple: 5.0,
            melting_enabled: true,
            wittman_n: 0.11,
            wittman_form: WittmanForm::A,
            jetting_enabled: true,
            wavy_enabled: true,
            wavy_critical_reynolds: 10.6,
            mixed_jetting: MixedRule::default(),
        }
    }
}

impl CriteriaConfig {
    /// Check that every constant is finite and positive.
    ///
    /// # Errors
    /// [`PhysicsError::InvalidConstant`] naming the constant.
    pub fn validate(&self) -> Result<(), PhysicsError> {
        for (name, value) in [
            ("deribas k", self.deribas_k),
            ("HEL multiple", self.hel_multiple),
            ("Wittman N", self.wittman_n),
            ("wavy critical Reynolds number", self.wavy_critical_reynolds),
        ] {
            if !(value.is_finite() && value > 0.0) {
                return Err(PhysicsError::InvalidConstant {
                    name,
                    value,
                    reason: "must be a finite number above zero",
                });
            }
        }
        Ok(())
    }

    /// Whether criterion `id` is on.
    pub fn is_enabled(&self, id: CriterionId) -> bool {
        match id {
            CriterionId::DeribasLower => self.deribas_enabled,
            CriterionId::StrengthLower => self.strength_enabled,
            CriterionId::PressureLower => self.pressure_enabled,
            CriterionId::MeltingUpper => self.melting_enabled,
            CriterionId::Jetting => self.jetting_enabled,
            CriterionId::WavyTransition => self.wavy_enabled,
        }
    }
}

/// Which plate's properties set a limit.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Governing {
    /// The flyer's.
    Flyer,
    /// The parent plate's.
    Parent,
    /// Both together (jetting, wavy transition).
    Pair,
}

impl Governing {
    /// The lowercase word.
    pub fn as_str(self) -> &'static str {
        match self {
            Governing::Flyer => "flyer",
            Governing::Parent => "parent",
            Governing::Pair => "pair",
        }
    }
}

/// Whether a limit is a floor or a ceiling for the value.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum LimitKind {
    /// The value must be at least the limit.
    Lower,
    /// The value must be at most the limit.
    Upper,
}

/// One criterion evaluated at one point. Values are in `unit` (deg, m/s, Pa or 1).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CriterionResult {
    /// Which criterion.
    pub id: CriterionId,
    /// The point's value of the limited quantity.
    pub value: f64,
    /// The limit (the more demanding of the two plates where it depends on the material).
    pub limit: f64,
    /// Signed margin: value - limit for lower limits, limit - value for upper limits.
    pub margin: f64,
    /// Unit of value, limit and margin.
    pub unit: &'static str,
    /// Floor or ceiling.
    pub kind: LimitKind,
    /// Whether the point is on the welding side (for the informational wavy transition: the
    /// interface is expected wavy).
    pub satisfied: bool,
    /// Informational criteria never make a point fail.
    pub informational: bool,
    /// Whose properties set the limit.
    pub governing: Governing,
    /// The limit for the flyer's and for the parent's properties, where it depends on them.
    pub limit_flyer: Option<f64>,
    /// See `limit_flyer`.
    pub limit_parent: Option<f64>,
    /// The criterion's constants, by name (`k`, `n`, `hel_multiple`, `critical_reynolds`).
    pub constants: Vec<(&'static str, f64)>,
    /// The melting limit with the solidus taken in degrees Celsius instead of kelvin: the low
    /// end of the Wittman constant's scale uncertainty ([`WITTMAN_SCALE_NOTE`]); `None` for the
    /// other criteria.
    pub limit_tm_celsius: Option<f64>,
}

impl CriterionResult {
    /// Margin relative to the limit, for ranking unlike criteria (see [`relative_margin`]).
    pub fn relative_margin(&self) -> f64 {
        relative_margin(self.margin, self.limit)
    }

    /// The criterion's constants as `name{eq}value` texts, the Wittman form (stored as 1 or 2)
    /// written A or B; `eq` is "=" for tables, " = " for prose.
    pub fn constants_text(&self, eq: &str) -> Vec<String> {
        self.constants
            .iter()
            .map(|(k, v)| {
                if *k == "form" {
                    format!("form{eq}{}", if *v < 1.5 { "A" } else { "B" })
                } else {
                    format!("{k}{eq}{v}")
                }
            })
            .collect()
    }

    /// What the criterion says at this point, in words. It describes the limit at the point's
    /// own collision-point velocity; it does not prescribe a change, because changing the impact
    /// velocity or the angle also moves Vc and with it the limit (the window crate's headroom
    /// search gives the change that actually reaches the limit).
    pub fn advice(&self) -> String {
        let v = format_in_unit(self.value, self.unit);
        let l = format_in_unit(self.limit, self.unit);
        match (self.id, self.satisfied) {
            (CriterionId::DeribasLower, false) => format!("collision angle {v} is below the Deribas minimum {l} at this collision-point velocity"),
            (CriterionId::Jetting, false) if self.limit >= 90.0 => "the shock polars turn both streams at every collision angle: no jet at this collision-point velocity (no critical angle below 90 deg)".to_string(),
            (CriterionId::Jetting, false) => format!("collision angle {v} is below the jetting critical angle {l}: no jet at this collision-point velocity"),
            (CriterionId::StrengthLower, false) => format!("impact velocity {v} is below the strength minimum {l}"),
            (CriterionId::PressureLower, false) => format!("impact pressure {v} is below the required {l}"),
            (CriterionId::MeltingUpper, false) => format!("impact velocity {v} is above the melting limit {l} at this collision-point velocity"),
            (CriterionId::WavyTransition, false) => "interface expected flat (informational only)".to_string(),
            (CriterionId::WavyTransition, true) => "interface expected wavy (informational only)".to_string(),
            (_, true) => format!("holds at this point: {v} against a limit of {l}"),
        }
    }

    /// The margin with its unit, human scale.
    pub fn margin_text(&self) -> String {
        format_in_unit(self.margin, self.unit)
    }

    /// The limit with its unit, human scale; the jetting limit without a critical angle below
    /// 90 deg is said in words.
    pub fn limit_text(&self) -> String {
        if self.id == CriterionId::Jetting && self.limit >= 90.0 {
            "none below 90 deg".to_string()
        } else {
            format_in_unit(self.limit, self.unit)
        }
    }
}

/// Format a value of the given criterion unit at a human scale.
pub fn format_in_unit(value: f64, unit: &str) -> String {
    match unit {
        "Pa" => format!("{:.2} GPa", value / 1e9),
        // Small values get more digits, so that a failing margin never reads as zero.
        "m/s" if value != 0.0 && value.abs() < 1.0 => format!("{value:.2} m/s"),
        "m/s" => format!("{value:.0} m/s"),
        "deg" if value != 0.0 && value.abs() < 0.01 => format!("{value:.4} deg"),
        "deg" => format!("{value:.2} deg"),
        _ => format!("{value:.2}"),
    }
}

/// A pair of plates and the flyer thickness: what every criterion needs besides the point.
#[derive(Debug, Clone, PartialEq)]
pub struct PairSetup {
    /// The moving plate.
    pub flyer: Material,
    /// The stationary plate.
    pub parent: Material,
    /// Flyer thickness h (enters the melting limit and the wavelength).
    pub flyer_thickness: Length,
    /// Parent thickness, if known (enters the dissipated energy; absent means a massive parent).
    pub parent_thickness: Option<Length>,
}

impl PairSetup {
    /// A validated pair.
    ///
    /// # Errors
    /// [`PhysicsError`] for a bad material property or a non-positive thickness.
    pub fn new(
        flyer: Material,
        parent: Material,
        flyer_thickness: Length,
        parent_thickness: Option<Length>,
    ) -> Result<Self, PhysicsError> {
        flyer.validate()?;
        parent.validate()?;
        positive("flyer thickness", flyer_thickness.si(), "m")?;
        if let Some(t) = parent_thickness {
            positive("parent thickness", t.si(), "m")?;
        }
        Ok(Self {
            flyer,
            parent,
            flyer_thickness,
            parent_thickness,
        })
    }
}

/// Everything computed for one process point.
#[derive(Debug, Clone, PartialEq)]
pub struct PointEvaluation {
    /// Kinematics of the point.
    pub collision: Collision,
    /// 1-D impact state at closing speed Vp.
    pub impact: ImpactState,
    /// Jetting regime and critical angle.
    pub jetting: JettingAssessment,
    /// Every criterion, enabled ones only, in [`CriterionId::ALL`] order.
    pub criteria: Vec<CriterionResult>,
    /// All enabled, non-informational criteria satisfied.
    pub inside: bool,
    /// The binding criterion: the violated one with the most negative relative margin, or,
    /// when inside, the one with the smallest relative margin.
    pub binding: Option<CriterionId>,
    /// Interface wavelength estimate.
    pub wavelength: Length,
    /// Energy dissipated per unit area in the inelastic normal collision.
    pub dissipated_energy: ArealEnergy,
}

impl PointEvaluation {
    /// The result of one criterion, if enabled.
    pub fn criterion(&self, id: CriterionId) -> Option<&CriterionResult> {
        self.criteria.iter().find(|c| c.id == id)
    }

    /// The binding criterion's result.
    pub fn binding_result(&self) -> Option<&CriterionResult> {
        self.binding.and_then(|id| self.criterion(id))
    }
}

/// A margin relative to its limit, margin / |limit|, for ranking unlike limits (criteria and
/// user boundaries alike). Infinite, with the margin's sign, when the limit is zero (subsonic
/// jetting: satisfied whatever the angle).
#[inline]
pub fn relative_margin(margin: f64, limit: f64) -> f64 {
    if limit.abs() > 0.0 {
        margin / limit.abs()
    } else if margin >= 0.0 {
        f64::INFINITY
    } else {
        f64::NEG_INFINITY
    }
}

/// Deribas lower angle for one material at collision velocity vc, in radians:
/// k sqrt(Hv / (rho Vc^2)), computed as [`deribas_coefficient`] / Vc.
pub fn deribas_angle(material: &Material, vc: Velocity, k: f64) -> f64 {
    deribas_coefficient(material, k) / vc.si()
}

/// The part of the Deribas angle that does not depend on Vc, k sqrt(Hv / rho) (rad m/s). The
/// angle is this over Vc; a division by the same positive Vc keeps the order of two materials,
/// so the governing plate can be chosen on the coefficients.
pub fn deribas_coefficient(material: &Material, k: f64) -> f64 {
    k * (material.vickers_hardness.si() / material.density().si()).sqrt()
}

/// Strength lower impact velocity for one material, sqrt(sigma_UTS / rho).
pub fn strength_velocity(material: &Material) -> f64 {
    (material.tensile_strength.si() / material.density().si()).sqrt()
}

/// Wittman melting upper impact velocity for one material, with the flyer thickness h:
/// [`melting_coefficient`] / Vc (form A) or / sqrt(Vc) (form B).
pub fn melting_velocity(
    material: &Material,
    vc: Velocity,
    h: Length,
    n: f64,
    form: WittmanForm,
) -> f64 {
    melting_coefficient(material, h, n, form) / melting_divisor(vc.si(), form)
}

/// The part of the Wittman melting velocity that does not depend on Vc:
/// sqrt(Tm c0) (k c c0 / (rho h))^(1/4) / N for form A, sqrt(Tm) (...)^(1/4) / N for form B.
pub fn melting_coefficient(material: &Material, h: Length, n: f64, form: WittmanForm) -> f64 {
    let tm = material.melting_temperature.si();
    let c0 = material.sound_speed().si();
    let diffusive = (material.thermal_conductivity.si() * material.specific_heat.si() * c0
        / (material.density().si() * h.si()))
    .powf(0.25);
    let lead = match form {
        WittmanForm::A => (tm * c0).sqrt(),
        WittmanForm::B => tm.sqrt(),
    };
    lead * diffusive / n
}

/// What the melting coefficient is divided by at collision velocity `vc` (m/s): Vc for form A,
/// sqrt(Vc) for form B. Positive for a positive Vc, so the order of two materials is kept.
#[inline]
pub fn melting_divisor(vc: f64, form: WittmanForm) -> f64 {
    match form {
        WittmanForm::A => vc,
        WittmanForm::B => vc.sqrt(),
    }
}

/// Interface wavelength lambda = 26 h sin^2(beta/2) (from memory; Cowan, Bergmann & Holtzman
/// 1971 or the Belfast group, `physics-notes.md` §5).
pub fn interface_wavelength(flyer_thickness: Length, angle: Angle) -> Length {
    let s = (angle.radians() / 2.0).sin();
    Length::from_m(26.0 * flyer_thickness.si() * s * s)
}

/// Energy dissipated per unit area in an inelastic normal collision of plates with areal masses
/// m = rho h: m_f m_p Vp^2 / (2 (m_f + m_p)) (from memory, `physics-notes.md` §5); with no parent
/// thickness the parent is taken as massive and the result is m_f Vp^2 / 2.
pub fn dissipated_energy(pair: &PairSetup, vp: Velocity) -> ArealEnergy {
    let mf = pair.flyer.density().si() * pair.flyer_thickness.si();
    let v2 = vp.si() * vp.si();
    let e = match pair.parent_thickness {
        Some(hp) => {
            let mp = pair.parent.density().si() * hp.si();
            mf * mp * v2 / (2.0 * (mf + mp))
        }
        None => mf * v2 / 2.0,
    };
    ArealEnergy::from_j_m2(e)
}

fn lower(
    id: CriterionId,
    value: f64,
    limit_flyer: f64,
    limit_parent: f64,
    unit: &'static str,
    constants: Vec<(&'static str, f64)>,
) -> CriterionResult {
    let (limit, governing) = if limit_flyer >= limit_parent {
        (limit_flyer, Governing::Flyer)
    } else {
        (limit_parent, Governing::Parent)
    };
    CriterionResult {
        id,
        value,
        limit,
        margin: value - limit,
        unit,
        kind: LimitKind::Lower,
        satisfied: value >= limit,
        informational: false,
        governing,
        limit_flyer: Some(limit_flyer),
        limit_parent: Some(limit_parent),
        constants,
        limit_tm_celsius: None,
    }
}

/// The factor by which a plate's Wittman limit falls when its solidus enters in degrees Celsius
/// instead of kelvin, sqrt((Tm - 273.15 K) / Tm) (both forms carry sqrt(Tm)); derived here from
/// the formula, the low end of [`WITTMAN_SCALE_NOTE`]. 0.83 for Al 6061-T6 (855 K), 0.89 for
/// Cu C11000 (1338 K).
pub fn celsius_factor(material: &Material) -> f64 {
    let tm = material.melting_temperature.si();
    ((tm - 273.15).max(0.0) / tm).sqrt()
}

/// Evaluate every enabled criterion at one point.
///
/// # Errors
/// [`PhysicsError`] for an invalid configuration, or when a relation cannot be evaluated.
///
/// ```
/// # use oblique_core::*;
/// # fn m() -> Material { Material { id: "x".into(), name: "x".into(),
/// #   hugoniot: hugoniot::Hugoniot::new(units::Density::from_kg_m3(2700.0), units::Velocity::from_m_s(5350.0), 1.34).unwrap(),
/// #   vickers_hardness: units::Pressure::from_vickers(107.0), yield_strength: units::Pressure::from_pa(276e6),
/// #   tensile_strength: units::Pressure::from_pa(310e6), bulk_modulus: units::Pressure::from_pa(67.5e9),
/// #   shear_modulus: units::Pressure::from_pa(25.9e9), melting_temperature: units::Temperature::from_k(855.0),
/// #   thermal_conductivity: units::ThermalConductivity::from_w_m_k(167.0), specific_heat: units::SpecificHeat::from_j_kg_k(896.0),
/// #   electrical_conductivity: units::ElectricalConductivity::from_s_m(2.5e7) } }
/// let pair = PairSetup::new(m(), m(), units::Length::from_m(1e-3), None).unwrap();
/// let c = Collision::from_impact(Convention::NormalToFlyer, units::Velocity::from_m_s(400.0), units::Angle::from_degrees(12.0)).unwrap();
/// let e = evaluate(&pair, &c, &CriteriaConfig::default()).unwrap();
/// assert!(e.criteria.len() == 6);
/// ```
pub fn evaluate(
    pair: &PairSetup,
    collision: &Collision,
    config: &CriteriaConfig,
) -> Result<PointEvaluation, PhysicsError> {
    let jetting = critical_angle(
        &pair.flyer.hugoniot,
        &pair.parent.hugoniot,
        collision.flow_velocity,
        collision.collision_velocity,
        config.mixed_jetting,
    )?;
    evaluate_with_jetting(pair, collision, config, jetting)
}

/// As [`evaluate`], with the jetting assessment supplied by the caller (for example from a
/// precomputed table when classifying many points).
///
/// # Errors
/// [`PhysicsError`] for an invalid configuration, or when a relation cannot be evaluated.
pub fn evaluate_with_jetting(
    pair: &PairSetup,
    collision: &Collision,
    config: &CriteriaConfig,
    jetting: JettingAssessment,
) -> Result<PointEvaluation, PhysicsError> {
    config.validate()?;
    let (f, p) = (&pair.flyer, &pair.parent);
    let vp = collision.impact_velocity;
    let vc = collision.collision_velocity;
    let beta_deg = collision.angle.degrees();
    let impact = impedance_match(&f.hugoniot, &p.hugoniot, vp)?;
    let mut criteria = Vec::with_capacity(6);

    for id in CriterionId::ALL {
        if !config.is_enabled(id) {
            continue;
        }
        let result = match id {
            CriterionId::DeribasLower => lower(
                id,
                beta_deg,
                deribas_angle(f, vc, config.deribas_k).to_degrees(),
                deribas_angle(p, vc, config.deribas_k).to_degrees(),
                "deg",
                vec![("k", config.deribas_k)],
            ),
            CriterionId::StrengthLower => lower(
                id,
                vp.si(),
                strength_velocity(f),
                strength_velocity(p),
                "m/s",
                vec![],
            ),
            CriterionId::PressureLower => lower(
                id,
                impact.pressure.si(),
                config.hel_multiple * f.hugoniot_elastic_limit().si(),
                config.hel_multiple * p.hugoniot_elastic_limit().si(),
                "Pa",
                vec![("hel_multiple", config.hel_multiple)],
            ),
            CriterionId::MeltingUpper => {
                let h = pair.flyer_thickness;
                let lf = melting_velocity(f, vc, h, config.wittman_n, config.wittman_form);
                let lp = melting_velocity(p, vc, h, config.wittman_n, config.wittman_form);
                let (limit, governing) = if lf <= lp {
                    (lf, Governing::Flyer)
                } else {
                    (lp, Governing::Parent)
                };
                let form = match config.wittman_form {
                    WittmanForm::A => 1.0,
                    WittmanForm::B => 2.0,
                };
                CriterionResult {
                    id,
                    value: vp.si(),
                    limit,
                    margin: limit - vp.si(),
                    unit: "m/s",
                    kind: LimitKind::Upper,
                    satisfied: vp.si() <= limit,
                    informational: false,
                    governing,
                    limit_flyer: Some(lf),
                    limit_parent: Some(lp),
                    constants: vec![("n", config.wittman_n), ("form", form)],
                    limit_tm_celsius: Some(if lf <= lp {
                        lf * celsius_factor(f)
                    } else {
                        lp * celsius_factor(p)
                    }),
                }
            }
            CriterionId::Jetting => {
                let limit = jetting.critical_angle.degrees();
                CriterionResult {
                    id,
                    value: beta_deg,
                    limit,
                    margin: beta_deg - limit,
                    unit: "deg",
                    kind: LimitKind::Lower,
                    satisfied: beta_deg > limit,
                    informational: false,
                    governing: Governing::Pair,
                    limit_flyer: None,
                    limit_parent: None,
                    constants: vec![],
                    limit_tm_celsius: None,
                }
            }
            CriterionId::WavyTransition => {
                let re = (f.density().si() + p.density().si()) * vc.si() * vc.si()
                    / (2.0 * (f.vickers_hardness.si() + p.vickers_hardness.si()));
                let limit = config.wavy_critical_reynolds;
                CriterionResult {
                    id,
                    value: re,
                    limit,
                    margin: re - limit,
                    unit: "1",
                    kind: LimitKind::Lower,
                    satisfied: re >= limit,
                    informational: true,
                    governing: Governing::Pair,
                    limit_flyer: None,
                    limit_parent: None,
                    constants: vec![("critical_reynolds", limit)],
                    limit_tm_celsius: None,
                }
            }
        };
        if !(result.value.is_finite() && result.limit.is_finite()) {
            return Err(PhysicsError::NoConvergence {
                what: "criterion evaluation (non-finite value)",
                iterations: 0,
            });
        }
        criteria.push(result);
    }

    let decisive = criteria.iter().filter(|c| !c.informational);
    let inside = decisive.clone().all(|c| c.satisfied);
    let binding = decisive
        .min_by(|a, b| a.relative_margin().total_cmp(&b.relative_margin()))
        .map(|c| c.id);
    Ok(PointEvaluation {
        collision: *collision,
        impact,
        jetting,
        criteria,
        inside,
        binding,
        wavelength: interface_wavelength(pair.flyer_thickness, collision.angle),
        dissipated_energy: dissipated_energy(pair, vp),
    })
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;
    use crate::hugoniot::Hugoniot;
    use crate::kinematics::Convention;
    use crate::units::*;
    use approx::assert_abs_diff_eq;
    use proptest::prelude::*;

    /// Al 6061-T6 with the values the physics notes use for their check values (HV 107, rho 2700,
    /// C0 5350, s 1.34, UTS 310 MPa, Y0 276 MPa, E 68.9 GPa and nu 0.33 giving K and G, Tm 855 K,
    /// k 167, Cp 896).
    pub(crate) fn al6061() -> Material {
        let (e, nu) = (68.9e9, 0.33);
        Material {
            id: "aa6061-t6".into(),
            name: "Al 6061-T6".into(),
            hugoniot: Hugoniot::new(
                Density::from_kg_m3(2700.0),
                Velocity::from_m_s(5350.0),
                1.34,
            )
            .unwrap(),
            vickers_hardness: Pressure::from_vickers(107.0),
            yield_strength: Pressure::from_pa(276e6),
            tensile_strength: Pressure::from_pa(310e6),
            bulk_modulus: Pressure::from_pa(e / (3.0 * (1.0 - 2.0 * nu))),
            shear_modulus: Pressure::from_pa(e / (2.0 * (1.0 + nu))),
            melting_temperature: Temperature::from_k(855.0),
            thermal_conductivity: ThermalConductivity::from_w_m_k(167.0),
            specific_heat: SpecificHeat::from_j_kg_k(896.0),
            electrical_conductivity: ElectricalConductivity::from_s_m(2.5e7),
        }
    }

    fn harder(mut m: Material) -> Material {
        m.id = "harder".into();
        m.vickers_hardness = Pressure::from_vickers(300.0);
        m.tensile_strength = Pressure::from_pa(900e6);
        m
    }

    /// Deribas check value, `physics-notes.md` §4 (independent arithmetic there): Al6061 HV 107,
    /// rho 2700, Vc 2500 m/s -> 8.57 deg with k 0.6, 17.14 deg with k 1.2.
    #[test]
    fn deribas_check_value() {
        let vc = Velocity::from_m_s(2500.0);
        assert_abs_diff_eq!(
            deribas_angle(&al6061(), vc, 0.6).to_degrees(),
            8.57,
            epsilon = 0.005
        );
        assert_abs_diff_eq!(
            deribas_angle(&al6061(), vc, 1.2).to_degrees(),
            17.14,
            epsilon = 0.005
        );
    }

    /// Strength check value, `physics-notes.md` §4: 310 MPa, 2700 kg/m^3 -> 338.8 m/s.
    #[test]
    fn strength_check_value() {
        assert_abs_diff_eq!(strength_velocity(&al6061()), 338.8, epsilon = 0.05);
    }

    /// HEL check value, `physics-notes.md` §4 (as quoted from Kore et al. 2010): Al6061-T6,
    /// E 68.9 GPa, nu 0.33, Y0 276 MPa -> 5 HEL = 2.72 GPa.
    #[test]
    fn hel_check_value() {
        assert_abs_diff_eq!(
            5.0 * al6061().hugoniot_elastic_limit().gpa(),
            2.72,
            epsilon = 0.005
        );
    }

    /// Wittman check value, `physics-notes.md` §4 (first form, independent arithmetic there):
    /// Al6061, Tm 855 K, h 3 mm, Vc 2500 m/s -> 775 m/s.
    #[test]
    fn melting_check_value() {
        let v = melting_velocity(
            &al6061(),
            Velocity::from_m_s(2500.0),
            Length::from_m(3e-3),
            0.11,
            WittmanForm::A,
        );
        assert_abs_diff_eq!(v, 775.0, epsilon = 1.0);
    }

    /// Wavelength check value, `physics-notes.md` §5: beta 10 deg -> lambda/h = 0.197.
    #[test]
    fn wavelength_check_value() {
        let l = interface_wavelength(Length::from_m(1.0), Angle::from_degrees(10.0));
        assert_abs_diff_eq!(l.si(), 0.197, epsilon = 0.0005);
    }

    /// Dissipated energy check value, `physics-notes.md` §5: 1 mm Al on 3 mm SS304 at 400 m/s ->
    /// 1.94e5 J/m^2 (Al 2700 kg/m^3, SS304 7896 kg/m^3).
    #[test]
    fn dissipated_energy_check_value() {
        let mut ss = al6061();
        ss.hugoniot = Hugoniot::new(
            Density::from_kg_m3(7896.0),
            Velocity::from_m_s(4569.0),
            1.49,
        )
        .unwrap();
        let pair = PairSetup::new(
            al6061(),
            ss,
            Length::from_m(1e-3),
            Some(Length::from_m(3e-3)),
        )
        .unwrap();
        let e = dissipated_energy(&pair, Velocity::from_m_s(400.0));
        assert_abs_diff_eq!(e.si(), 1.94e5, epsilon = 0.005e5);
    }

    #[test]
    fn dissimilar_pair_keeps_the_more_demanding_plate() {
        let pair = PairSetup::new(al6061(), harder(al6061()), Length::from_m(1e-3), None).unwrap();
        let c = Collision::from_impact(
            Convention::NormalToFlyer,
            Velocity::from_m_s(400.0),
            Angle::from_degrees(10.0),
        )
        .unwrap();
        let e = evaluate(&pair, &c, &CriteriaConfig::default()).unwrap();
        let d = e.criterion(CriterionId::DeribasLower).unwrap();
        assert_eq!(d.governing, Governing::Parent);
        assert!(d.limit_parent.unwrap() > d.limit_flyer.unwrap());
        let s = e.criterion(CriterionId::StrengthLower).unwrap();
        assert_eq!(s.governing, Governing::Parent);
        // Swapping the plates moves the governing side with them.
        let swapped =
            PairSetup::new(harder(al6061()), al6061(), Length::from_m(1e-3), None).unwrap();
        let e2 = evaluate(&swapped, &c, &CriteriaConfig::default()).unwrap();
        assert_eq!(
            e2.criterion(CriterionId::DeribasLower).unwrap().governing,
            Governing::Flyer
        );
    }

    #[test]
    fn informational_criterion_never_fails_a_point() {
        let pair = PairSetup::new(al6061(), al6061(), Length::from_m(1e-3), None).unwrap();
        // Low Vc: flat interface expected, but the point can still be inside.
        let c = Collision::from_collision_velocity(
            Convention::NormalToFlyer,
            Velocity::from_m_s(1500.0),
            Angle::from_degrees(16.0),
        )
        .unwrap();
        let cfg = CriteriaConfig {
            pressure_enabled: false,
            strength_enabled: false,
            ..CriteriaConfig::default()
        };
        let e = evaluate(&pair, &c, &cfg).unwrap();
        let w = e.criterion(CriterionId::WavyTransition).unwrap();
        assert!(!w.satisfied && w.informational);
        assert!(e.inside, "{:?}", e.criteria);
        assert_ne!(e.binding, Some(CriterionId::WavyTransition));
    }

    #[test]
    fn disabled_criteria_are_left_out_and_bad_constants_refused() {
        let pair = PairSetup::new(al6061(), al6061(), Length::from_m(1e-3), None).unwrap();
        let c = Collision::from_impact(
            Convention::NormalToFlyer,
            Velocity::from_m_s(400.0),
            Angle::from_degrees(10.0),
        )
        .unwrap();
        let cfg = CriteriaConfig {
            melting_enabled: false,
            ..CriteriaConfig::default()
        };
        let e = evaluate(&pair, &c, &cfg).unwrap();
        assert!(e.criterion(CriterionId::MeltingUpper).is_none());
        let bad = CriteriaConfig {
            deribas_k: -1.0,
            ..CriteriaConfig::default()
        };
        assert!(matches!(
            evaluate(&pair, &c, &bad),
            Err(PhysicsError::InvalidConstant { .. })
        ));
    }

    #[test]
    fn binding_is_the_violated_limit() {
        let pair = PairSetup::new(al6061(), al6061(), Length::from_m(1e-3), None).unwrap();
        // 2 deg at 400 m/s: far below the Deribas angle.
        let c = Collision::from_impact(
            Convention::NormalToFlyer,
            Velocity::from_m_s(400.0),
            Angle::from_degrees(2.0),
        )
        .unwrap();
        let e = evaluate(&pair, &c, &CriteriaConfig::default()).unwrap();
        assert!(!e.inside);
        let b = e.binding_result().unwrap();
        assert!(!b.satisfied);
        assert!(b.advice().contains("is below the"), "{}", b.advice());
    }

    proptest! {
        #[test]
        fn deribas_angle_falls_as_vc_rises(vc in 500.0f64..8000.0, dv in 1.0f64..1000.0, k in 0.3f64..1.5) {
            let m = al6061();
            let a = deribas_angle(&m, Velocity::from_m_s(vc), k);
            let b = deribas_angle(&m, Velocity::from_m_s(vc + dv), k);
            prop_assert!(b < a);
        }

        #[test]
        fn melting_limit_falls_with_vc_and_thickness(vc in 500.0f64..8000.0, h in 1e-4f64..1e-2) {
            let m = al6061();
            let base = melting_velocity(&m, Velocity::from_m_s(vc), Length::from_m(h), 0.11, WittmanForm::A);
            let faster = melting_velocity(&m, Velocity::from_m_s(vc * 1.1), Length::from_m(h), 0.11, WittmanForm::A);
            let thicker = melting_velocity(&m, Velocity::from_m_s(vc), Length::from_m(h * 1.1), 0.11, WittmanForm::A);
            prop_assert!(faster < base && thicker < base);
        }

        #[test]
        fn evaluation_is_finite_everywhere(vp in 10.0f64..3000.0, beta in 0.2f64..89.8, k in 0usize..3) {
            let pair = PairSetup::new(al6061(), harder(al6061()), Length::from_m(1e-3), Some(Length::from_m(5e-3))).unwrap();
            let c = Collision::from_impact(Convention::ALL[k], Velocity::from_m_s(vp), Angle::from_degrees(beta)).unwrap();
            let e = evaluate(&pair, &c, &CriteriaConfig::default()).unwrap();
            for r in &e.criteria {
                prop_assert!(r.value.is_finite() && r.limit.is_finite() && r.margin.is_finite());
            }
            prop_assert!(e.binding.is_some());
        }
    }
}
