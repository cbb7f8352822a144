//! Explosive welding: flyer velocity from the Gurney open-faced sandwich, then the collision
//! kinematics of the parallel or inclined set-up.
//!
//! Open-faced sandwich (a flyer of mass M per area under a layer of explosive of mass C per
//! area, nothing tamping the free face of the explosive), Kennedy 1970, from memory
//! (`physics-notes.md` §6):
//!
//! V = sqrt(2E) [((1 + 2 M/C)^3 + 1) / (6 (1 + M/C)) + M/C]^(-1/2)
//!
//! with sqrt(2E) the Gurney velocity of the explosive. Gurney energies of the low-speed
//! explosives used for welding are not reliably published, so none is shipped: the Gurney
//! velocity is an input, or is calibrated on one measured shot with
//! [`calibrate_gurney_velocity`]. V is the terminal velocity: a flyer that hits the parent
//! before it has finished accelerating (short standoff) is slower.
//!
//! Every result is a **screening estimate, not a guarantee**. Explosives kill: their handling,
//! storage and use are for licensed people under local law.

use super::{check_positive, ProcessError};
use crate::error::PhysicsError;
use crate::kinematics::{explosive_inclined, Collision};
use crate::units::{Angle, Density, Length, Velocity};
use serde::{Deserialize, Serialize};

/// The flyer-to-charge mass ratio, given either way round.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum MassRatio {
    /// M/C: flyer mass over explosive mass (per unit area).
    FlyerToCharge(f64),
    /// R = C/M: explosive mass over flyer mass (the "loading ratio" of explosive welding).
    ChargeToFlyer(f64),
}

impl MassRatio {
    /// M/C from the two layers: (rho_f h_f) / (rho_e h_e).
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] (wrapped) for any value not finite and positive.
    pub fn from_layers(
        flyer_density: Density,
        flyer_thickness: Length,
        charge_density: Density,
        charge_thickness: Length,
    ) -> Result<Self, ProcessError> {
        let rf = check_positive("flyer density", flyer_density.si(), "kg/m^3")?;
        let hf = check_positive("flyer thickness", flyer_thickness.si(), "m")?;
        let re = check_positive("explosive density", charge_density.si(), "kg/m^3")?;
        let he = check_positive("explosive thickness", charge_thickness.si(), "m")?;
        Ok(MassRatio::FlyerToCharge(rf * hf / (re * he)))
    }

    /// M/C, validated.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] (wrapped) for a ratio not finite and positive.
    pub fn flyer_to_charge(&self) -> Result<f64, ProcessError> {
        match *self {
            MassRatio::FlyerToCharge(m_c) => positive_ratio("flyer-to-charge mass ratio M/C", m_c),
            MassRatio::ChargeToFlyer(r) => {
                positive_ratio("charge-to-flyer mass ratio C/M", r).map(|r| 1.0 / r)
            }
        }
    }
}

fn positive_ratio(quantity: &'static str, value: f64) -> Result<f64, ProcessError> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(PhysicsError::OutOfDomain {
            quantity,
            value,
            unit: "",
            allowed: "(0, +inf)",
        }
        .into())
    }
}

/// V / sqrt(2E) for the open-faced sandwich, [((1 + 2 M/C)^3 + 1) / (6 (1 + M/C)) + M/C]^(-1/2)
/// (Kennedy 1970, from memory; `physics-notes.md` §6). Tends to sqrt(3) as M/C -> 0 and to
/// sqrt(3) / (2 M/C) as M/C -> infinity. A screening estimate, not a guarantee.
///
/// # Errors
/// As [`MassRatio::flyer_to_charge`].
pub fn gurney_factor(ratio: MassRatio) -> Result<f64, ProcessError> {
    let r = ratio.flyer_to_charge()?;
    let bracket = ((1.0 + 2.0 * r).powi(3) + 1.0) / (6.0 * (1.0 + r)) + r;
    let factor = bracket.sqrt().recip();
    if factor.is_finite() && factor > 0.0 {
        Ok(factor)
    } else {
        // Only for ratios so extreme that the cube overflows or the factor underflows.
        Err(PhysicsError::OutOfDomain {
            quantity: "flyer-to-charge mass ratio M/C",
            value: r,
            unit: "",
            allowed: "a ratio for which the Gurney factor is representable",
        }
        .into())
    }
}

/// Terminal flyer velocity of the open-faced sandwich: V = sqrt(2E) x [`gurney_factor`]
/// (Kennedy 1970, from memory). A screening estimate, not a guarantee.
///
/// # Errors
/// A Gurney velocity not finite and positive, or a bad mass ratio.
pub fn gurney_open_sandwich(
    gurney_velocity: Velocity,
    ratio: MassRatio,
) -> Result<Velocity, ProcessError> {
    let g = check_positive("Gurney velocity sqrt(2E)", gurney_velocity.si(), "m/s")?;
    Ok(Velocity::from_m_s(g * gurney_factor(ratio)?))
}

/// The Gurney velocity sqrt(2E) that makes the open-faced sandwich reproduce one measured flyer
/// velocity: sqrt(2E) = V_measured / [`gurney_factor`] (exact inverse). The measurement should be
/// a terminal velocity (long enough standoff). A screening estimate, not a guarantee.
///
/// # Errors
/// A measured velocity not finite and positive, or a bad mass ratio.
pub fn calibrate_gurney_velocity(
    measured: Velocity,
    ratio: MassRatio,
) -> Result<Velocity, ProcessError> {
    let v = check_positive("measured flyer velocity", measured.si(), "m/s")?;
    Ok(Velocity::from_m_s(v / gurney_factor(ratio)?))
}

/// An explosive welding set-up: explosive (Gurney velocity, detonation velocity), mass ratio,
/// and the preset angle between flyer and parent (zero for the parallel set-up).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ExplosiveSetup {
    /// Gurney velocity sqrt(2E) of the explosive as laid (no default is shipped).
    pub gurney_velocity: Velocity,
    /// Flyer-to-charge mass ratio.
    pub mass_ratio: MassRatio,
    /// Detonation velocity Vd.
    pub detonation_velocity: Velocity,
    /// Preset angle alpha between flyer and parent; zero for the parallel set-up.
    pub preset_angle: Angle,
}

/// Impact velocity and collision kinematics of an explosive set-up.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ExplosiveEstimate {
    /// V / sqrt(2E).
    pub gurney_factor: f64,
    /// The flyer velocity Vp from the Gurney relation.
    pub impact_velocity: Velocity,
    /// Vp, beta, Vc and Vf (bisector convention) from
    /// [`crate::kinematics::explosive_inclined`] (the parallel set-up when alpha = 0).
    pub collision: Collision,
}

/// Impact velocity from the Gurney open-faced sandwich, then the collision angle beta and the
/// collision-point velocity Vc of the parallel (alpha = 0: Vc = Vd, Vp = 2 Vd sin(beta/2)) or
/// inclined set-up (`physics-notes.md` §1, via [`explosive_inclined`]). A screening estimate,
/// not a guarantee: explosives kill, and their use is for licensed people under local law.
///
/// # Errors
/// Bad Gurney velocity or mass ratio; the kinematics' errors (e.g. Vp >= 2 Vd, a resulting beta
/// outside (0, 90) deg).
pub fn explosive_estimate(setup: &ExplosiveSetup) -> Result<ExplosiveEstimate, ProcessError> {
    let factor = gurney_factor(setup.mass_ratio)?;
    let vp = gurney_open_sandwich(setup.gurney_velocity, setup.mass_ratio)?;
    let collision = explosive_inclined(setup.detonation_velocity, setup.preset_angle, vp)?;
    Ok(ExplosiveEstimate {
        gurney_factor: factor,
        impact_velocity: vp,
        collision,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use proptest::prelude::*;

    /// Tabulated points checked by independent arithmetic (not taken from a table): M/C = 1 gives
    /// a bracket of 28/12 + 1 = 10/3, factor sqrt(0.3) = 0.5477226; M/C = 0.5 gives 9/9 + 0.5 =
    /// 1.5, factor sqrt(2/3) = 0.8164966; M/C = 2 gives 126/18 + 2 = 9, factor 1/3.
    #[test]
    fn gurney_factor_at_hand_checked_points() {
        assert_relative_eq!(
            gurney_factor(MassRatio::FlyerToCharge(1.0)).unwrap(),
            0.3f64.sqrt(),
            max_relative = 1e-14
        );
        assert_relative_eq!(
            gurney_factor(MassRatio::FlyerToCharge(0.5)).unwrap(),
            (2.0f64 / 3.0).sqrt(),
            max_relative = 1e-14
        );
        assert_relative_eq!(
            gurney_factor(MassRatio::ChargeToFlyer(0.5)).unwrap(),
            1.0 / 3.0,
            max_relative = 1e-14
        );
    }

    /// Parallel set-up by independent arithmetic: sqrt(2E) = 1500 m/s (invented), C/M = 0.5 ->
    /// Vp = 500 m/s; Vd = 2500 m/s -> beta = 2 asin(0.1) = 11.4783 deg, Vc = Vd.
    #[test]
    fn parallel_set_up() {
        let est = explosive_estimate(&ExplosiveSetup {
            gurney_velocity: Velocity::from_m_s(1500.0),
            mass_ratio: MassRatio::ChargeToFlyer(0.5),
            detonation_velocity: Velocity::from_m_s(2500.0),
            preset_angle: Angle::from_degrees(0.0),
        })
        .unwrap();
        assert_relative_eq!(est.impact_velocity.si(), 500.0, max_relative = 1e-12);
        assert_relative_eq!(est.collision.angle.degrees(), 11.4783, epsilon = 1e-4);
        assert_relative_eq!(
            est.collision.collision_velocity.si(),
            2500.0,
            max_relative = 1e-12
        );
        let inclined = explosive_estimate(&ExplosiveSetup {
            preset_angle: Angle::from_degrees(5.0),
            ..ExplosiveSetup {
                gurney_velocity: Velocity::from_m_s(1500.0),
                mass_ratio: MassRatio::ChargeToFlyer(0.5),
                detonation_velocity: Velocity::from_m_s(2500.0),
                preset_angle: Angle::from_degrees(0.0),
            }
        })
        .unwrap();
        assert_relative_eq!(inclined.collision.angle.degrees(), 16.4783, epsilon = 1e-4);
        assert!(inclined.collision.collision_velocity.si() < 2500.0);
    }

    #[test]
    fn calibration_inverts_the_relation() {
        let ratio = MassRatio::from_layers(
            Density::from_kg_m3(8930.0),
            Length::from_m(2e-3),
            Density::from_kg_m3(1000.0),
            Length::from_m(20e-3),
        )
        .unwrap();
        let v = gurney_open_sandwich(Velocity::from_m_s(1800.0), ratio).unwrap();
        let g = calibrate_gurney_velocity(v, ratio).unwrap();
        assert_relative_eq!(g.si(), 1800.0, max_relative = 1e-12);
    }

    #[test]
    fn bad_inputs_are_errors() {
        assert!(gurney_factor(MassRatio::FlyerToCharge(0.0)).is_err());
        assert!(gurney_factor(MassRatio::ChargeToFlyer(-1.0)).is_err());
        assert!(gurney_factor(MassRatio::FlyerToCharge(f64::NAN)).is_err());
        assert!(gurney_factor(MassRatio::FlyerToCharge(1e200)).is_err());
        assert!(
            gurney_open_sandwich(Velocity::from_m_s(0.0), MassRatio::FlyerToCharge(1.0)).is_err()
        );
        assert!(MassRatio::from_layers(
            Density::from_kg_m3(8930.0),
            Length::from_m(0.0),
            Density::from_kg_m3(1000.0),
            Length::from_m(20e-3),
        )
        .is_err());
        // Vp >= 2 Vd is refused by the kinematics.
        assert!(explosive_estimate(&ExplosiveSetup {
            gurney_velocity: Velocity::from_m_s(3000.0),
            mass_ratio: MassRatio::ChargeToFlyer(5.0),
            detonation_velocity: Velocity::from_m_s(1000.0),
            preset_angle: Angle::from_degrees(0.0),
        })
        .is_err());
    }

    proptest! {
        /// V rises with C/M (falls with M/C).
        #[test]
        fn velocity_rises_with_charge(r in 1e-3f64..1e3, k in 1.001f64..10.0) {
            let lo = gurney_factor(MassRatio::ChargeToFlyer(r)).unwrap();
            let hi = gurney_factor(MassRatio::ChargeToFlyer(r * k)).unwrap();
            prop_assert!(hi > lo);
        }

        /// Limits: sqrt(3) for a vanishing flyer, sqrt(3) / (2 M/C) for a heavy one, and the
        /// factor always lies below sqrt(3).
        #[test]
        fn limits(m_c in 1e-3f64..1e3) {
            let f = gurney_factor(MassRatio::FlyerToCharge(m_c)).unwrap();
            prop_assert!(f < 3f64.sqrt());
            let small = gurney_factor(MassRatio::FlyerToCharge(1e-9)).unwrap();
            prop_assert!((small / 3f64.sqrt() - 1.0).abs() < 1e-8);
            let big = 1e6;
            let heavy = gurney_factor(MassRatio::FlyerToCharge(big)).unwrap();
            prop_assert!((heavy * 2.0 * big / 3f64.sqrt() - 1.0).abs() < 1e-5);
        }
    }
}
