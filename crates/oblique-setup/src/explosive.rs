//! An explosive welding estimate: set-up file and values, the core's Gurney model and collision
//! kinematics, and the window check of the resulting point.

use crate::error::{SetupError, SetupResult};
use crate::inputs::{Inputs, Provenance, Unit};
use crate::request::{field, ExplosiveRequest};
use crate::resolve::Catalog;
use oblique_core::process::{explosive_estimate, ExplosiveEstimate, ExplosiveSetup, MassRatio};
use oblique_core::units::{Angle, Velocity};
use oblique_window::advice::classify_explained;
use oblique_window::classify::Classification;
use oblique_window::machine::{MachineRecord, Valued};
use oblique_window::PairWindow;

/// An explosive estimate with its inputs and (with a pair window) the verdict.
#[derive(Debug, Clone)]
pub struct ExplosiveReport<'a> {
    /// The pair window, if one was named.
    pub window: Option<&'a PairWindow>,
    /// Every input with its provenance.
    pub inputs: Inputs,
    /// The set-up given to the model.
    pub setup: ExplosiveSetup,
    /// The model's result.
    pub estimate: ExplosiveEstimate,
    /// The window check of the resulting collision, explained.
    pub check: Option<Classification>,
}

/// A value from the request, else from the set-up file; recorded.
#[allow(clippy::too_many_arguments)]
fn need(
    inputs: &mut Inputs,
    label: &'static str,
    key: &'static str,
    field: &'static str,
    given: Option<f64>,
    file: Option<(f64, Provenance)>,
    unit: Unit,
) -> SetupResult<f64> {
    let (x, from) = match (given, file) {
        (Some(x), Some(_)) => (
            x,
            Provenance::Given {
                field,
                overrides: Some("the --setup file".into()),
            },
        ),
        (Some(x), None) => (
            x,
            Provenance::Given {
                field,
                overrides: None,
            },
        ),
        (None, Some((x, f))) => (x, f),
        (None, None) => {
            return Err(SetupError::missing(
                field,
                format!(
                    "{field} is required here ({label}): give it or name a set-up file with --setup"
                ),
            ))
        }
    };
    inputs.quantity(label, key, x, unit, from);
    Ok(x)
}

/// Resolve the request, run the Gurney model and the kinematics, and check the point against
/// the pair window. A screening estimate, not a guarantee.
///
/// # Errors
/// Unknown names, missing values, a set-up outside the model's domain (each naming its field).
pub fn estimate_explosive<'a>(
    catalog: &'a Catalog,
    a: &ExplosiveRequest,
) -> SetupResult<ExplosiveReport<'a>> {
    let window = catalog.pair(a.pair.as_deref())?;
    let found = a
        .setup
        .as_deref()
        .map(|n| {
            catalog
                .machines
                .explosive(n)
                .map_err(|m| SetupError::unknown(field::SETUP, m))
        })
        .transpose()?;
    let from_file = |name: &str, src: &str| Provenance::File {
        name: name.to_string(),
        source: src.to_string(),
    };
    let mut inputs = Inputs::default();
    let g = need(
        &mut inputs,
        "Gurney velocity sqrt(2E)",
        "gurney_velocity_m_s",
        field::GURNEY_VELOCITY,
        a.gurney_velocity.map(Velocity::si),
        found.map(|(r, s)| {
            (
                s.gurney_velocity.value.si(),
                from_file(&r.name, &s.gurney_velocity.source),
            )
        }),
        Unit::MetrePerSecond,
    )?;
    let vd = need(
        &mut inputs,
        "detonation velocity",
        "detonation_velocity_m_s",
        field::DETONATION_VELOCITY,
        a.detonation_velocity.map(Velocity::si),
        found.map(|(r, s)| {
            (
                s.detonation_velocity.value.si(),
                from_file(&r.name, &s.detonation_velocity.source),
            )
        }),
        Unit::MetrePerSecond,
    )?;
    let alpha = need(
        &mut inputs,
        "preset angle",
        "preset_angle_rad",
        field::PRESET_ANGLE,
        a.preset_angle.map(Angle::radians),
        found.map(|(r, s)| {
            (
                s.preset_angle.value.radians(),
                from_file(&r.name, &s.preset_angle.source),
            )
        }),
        Unit::Degree,
    )?;
    let ratio = mass_ratio(&mut inputs, a, found.map(|(r, s)| (r, &s.mass_ratio)))?;
    let setup = ExplosiveSetup {
        gurney_velocity: Velocity::from_m_s(g),
        mass_ratio: ratio,
        detonation_velocity: Velocity::from_m_s(vd),
        preset_angle: Angle::from_radians(alpha),
    };
    let estimate = explosive_estimate(&setup)?;
    let check = match window {
        Some(w) => Some(classify_explained(w, &w.setup()?, &estimate.collision)?),
        None => None,
    };
    Ok(ExplosiveReport {
        window,
        inputs,
        setup,
        estimate,
        check,
    })
}

/// The mass ratio: M/C given, else C/M given, else the set-up file's.
fn mass_ratio(
    inputs: &mut Inputs,
    a: &ExplosiveRequest,
    file: Option<(&MachineRecord, &Valued<MassRatio>)>,
) -> SetupResult<MassRatio> {
    match (a.mass_ratio, a.charge_ratio, file) {
        (Some(m), _, _) => {
            need(
                inputs,
                "mass ratio M/C",
                "mass_ratio_flyer_to_charge",
                field::MASS_RATIO,
                Some(m),
                None,
                Unit::Number,
            )?;
            Ok(MassRatio::FlyerToCharge(m))
        }
        (None, Some(r), _) => {
            need(
                inputs,
                "charge ratio C/M",
                "charge_ratio_charge_to_flyer",
                field::CHARGE_RATIO,
                Some(r),
                None,
                Unit::Number,
            )?;
            Ok(MassRatio::ChargeToFlyer(r))
        }
        (None, None, Some((rec, ratio))) => {
            let (key, label, v) = match ratio.value {
                MassRatio::FlyerToCharge(m) => ("mass_ratio_flyer_to_charge", "mass ratio M/C", m),
                MassRatio::ChargeToFlyer(r) => {
                    ("charge_ratio_charge_to_flyer", "charge ratio C/M", r)
                }
            };
            inputs.quantity(
                label,
                key,
                v,
                Unit::Number,
                Provenance::File {
                    name: rec.name.clone(),
                    source: ratio.source.clone(),
                },
            );
            Ok(ratio.value)
        }
        (None, None, None) => Err(SetupError::missing(
            field::MASS_RATIO,
            "--mass-ratio (M/C) or --charge-ratio (C/M) is required here: give one, or name a set-up file with --setup",
        )),
    }
}
