//! Steady oblique-collision kinematics: impact (flyer) velocity Vp, dynamic collision angle beta,
//! collision-point velocity Vc along the parent plate and flow velocity Vf of flyer material into
//! the collision point (in the frame moving with it).
//!
//! With the collision point at the origin moving along +x over a stationary parent, the lab
//! velocity of the flyer is (Vc - Vf cos beta, -Vf sin beta) (derived from geometry,
//! `physics-notes.md` §1). Closing the system needs an assumption on the direction of Vp; the
//! three in use are the [`Convention`]s. The convention is always explicit.

use crate::error::{positive, PhysicsError};
use crate::units::{Angle, Velocity};
use serde::{Deserialize, Serialize};
use std::fmt;
use std::str::FromStr;

/// The assumption on the direction of the impact velocity Vp.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Convention {
    /// Vp along the bisector of the two plates' normals, beta/2 from each (so perpendicular to
    /// the bisector of the collision angle; Birkhoff-Taylor; explosive welding):
    /// Vc = Vp / (2 sin(beta/2)), Vf = Vc.
    Bisector,
    /// Vp normal to the flyer surface (magnetic pulse and foil-actuator welding):
    /// Vc = Vp / sin(beta), Vf = Vc cos(beta).
    NormalToFlyer,
    /// Vp normal to the parent plate (flyer driven straight down):
    /// Vc = Vp / tan(beta), Vf = Vc / cos(beta).
    NormalToParent,
}

impl Convention {
    /// All conventions, in a fixed order.
    pub const ALL: [Convention; 3] = [
        Convention::Bisector,
        Convention::NormalToFlyer,
        Convention::NormalToParent,
    ];

    /// The kebab-case name used in flags, files and JSON.
    pub fn as_str(self) -> &'static str {
        match self {
            Convention::Bisector => "bisector",
            Convention::NormalToFlyer => "normal-to-flyer",
            Convention::NormalToParent => "normal-to-parent",
        }
    }

    /// Vc / Vp for this convention at angle beta.
    fn vc_over_vp(self, beta: Angle) -> f64 {
        match self {
            Convention::Bisector => 1.0 / (2.0 * (beta.radians() / 2.0).sin()),
            Convention::NormalToFlyer => 1.0 / beta.sin(),
            Convention::NormalToParent => 1.0 / beta.tan(),
        }
    }

    /// Vf / Vc for this convention at angle beta.
    fn vf_over_vc(self, beta: Angle) -> f64 {
        match self {
            Convention::Bisector => 1.0,
            Convention::NormalToFlyer => beta.cos(),
            Convention::NormalToParent => 1.0 / beta.cos(),
        }
    }
}

impl fmt::Display for Convention {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// An unknown convention name.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("unknown convention '{0}': expected bisector, normal-to-flyer or normal-to-parent")]
pub struct UnknownConvention(pub String);

impl FromStr for Convention {
    type Err = UnknownConvention;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim() {
            "bisector" => Ok(Convention::Bisector),
            "normal-to-flyer" => Ok(Convention::NormalToFlyer),
            "normal-to-parent" => Ok(Convention::NormalToParent),
            other => Err(UnknownConvention(other.to_string())),
        }
    }
}

/// Check that a collision angle lies strictly inside (0, 90) deg.
pub fn check_angle(beta: Angle) -> Result<Angle, PhysicsError> {
    let deg = beta.degrees();
    if deg.is_finite() && deg > 0.0 && deg < 90.0 {
        Ok(beta)
    } else {
        Err(PhysicsError::OutOfDomain {
            quantity: "collision angle",
            value: deg,
            unit: "deg",
            allowed: "(0, 90) deg",
        })
    }
}

/// A steady oblique collision, all four quantities consistent under `convention`.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Collision {
    /// The convention relating Vp to Vc.
    pub convention: Convention,
    /// Impact (flyer) velocity Vp.
    pub impact_velocity: Velocity,
    /// Dynamic collision angle beta.
    pub angle: Angle,
    /// Collision-point velocity Vc along the parent.
    pub collision_velocity: Velocity,
    /// Flow velocity Vf of the flyer into the collision point (collision-point frame).
    pub flow_velocity: Velocity,
}

impl Collision {
    /// Forward form: from impact velocity Vp and angle beta.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] when Vp is not positive and finite or beta is not in (0, 90) deg.
    ///
    /// ```
    /// use oblique_core::{Collision, Convention, units::{Angle, Velocity}};
    /// // physics-notes.md §1 check value [derived]: normal to flyer, 400 m/s at 10 deg -> 2303.5 m/s.
    /// let c = Collision::from_impact(Convention::NormalToFlyer, Velocity::from_m_s(400.0), Angle::from_degrees(10.0)).unwrap();
    /// assert!((c.collision_velocity.si() - 2303.5).abs() < 0.1);
    /// ```
    pub fn from_impact(
        convention: Convention,
        impact_velocity: Velocity,
        angle: Angle,
    ) -> Result<Self, PhysicsError> {
        let vp = positive("impact velocity", impact_velocity.si(), "m/s")?;
        let beta = check_angle(angle)?;
        let vc = vp * convention.vc_over_vp(beta);
        let vf = vc * convention.vf_over_vc(beta);
        Ok(Self {
            convention,
            impact_velocity,
            angle: beta,
            collision_velocity: Velocity::from_m_s(vc),
            flow_velocity: Velocity::from_m_s(vf),
        })
    }

    /// Inverse form: from collision-point velocity Vc and angle beta.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] when Vc is not positive and finite or beta is not in (0, 90) deg.
    pub fn from_collision_velocity(
        convention: Convention,
        collision_velocity: Velocity,
        angle: Angle,
    ) -> Result<Self, PhysicsError> {
        let vc = positive("collision-point velocity", collision_velocity.si(), "m/s")?;
        let beta = check_angle(angle)?;
        let vp = vc / convention.vc_over_vp(beta);
        let vf = vc * convention.vf_over_vc(beta);
        Ok(Self {
            convention,
            impact_velocity: Velocity::from_m_s(vp),
            angle: beta,
            collision_velocity,
            flow_velocity: Velocity::from_m_s(vf),
        })
    }

    /// The same physical collision point re-expressed under another convention, keeping Vc and
    /// beta (the geometry) and recomputing Vp and Vf.
    pub fn with_convention(&self, convention: Convention) -> Self {
        let vc = self.collision_velocity.si();
        Self {
            convention,
            impact_velocity: Velocity::from_m_s(vc / convention.vc_over_vp(self.angle)),
            angle: self.angle,
            collision_velocity: self.collision_velocity,
            flow_velocity: Velocity::from_m_s(vc * convention.vf_over_vc(self.angle)),
        }
    }
}

/// Explosive welding, parallel set-up: the collision point travels with the detonation,
/// Vc = Vd, and the flyer bends by beta with Vp = 2 Vd sin(beta/2) (bisector convention;
/// `physics-notes.md` §1, from memory). Given Vd and Vp, beta = 2 asin(Vp / (2 Vd)).
///
/// # Errors
/// [`PhysicsError::OutOfDomain`] when a speed is not positive or Vp >= 2 Vd sin(45 deg).
pub fn explosive_parallel(
    detonation_velocity: Velocity,
    impact_velocity: Velocity,
) -> Result<Collision, PhysicsError> {
    explosive_inclined(
        detonation_velocity,
        Angle::from_radians(0.0),
        impact_velocity,
    )
}

/// Explosive welding, inclined set-up with preset angle alpha between flyer and parent: the
/// flyer bends by gamma = beta - alpha, Vp = 2 Vd sin(gamma/2), and the law of sines gives
/// Vc = Vd sin(gamma) / sin(beta) (`physics-notes.md` §1, derived), and the flyer inflows at
/// Vf = Vd (sin(beta) - sin(alpha)) / sin(beta) (derived here). Vp bisects the normals of the
/// flyer before and after the bend (it is perpendicular to the bend's bisector), so the result
/// is labelled bisector; for alpha > 0 Vf differs from Vc, and converting the
/// result to another convention re-derives Vp from Vc and beta. With alpha = 0 this is the
/// parallel set-up.
///
/// # Errors
/// [`PhysicsError::OutOfDomain`] for non-positive speeds, a negative preset angle or a
/// resulting beta outside (0, 90) deg.
pub fn explosive_inclined(
    detonation_velocity: Velocity,
    preset_angle: Angle,
    impact_velocity: Velocity,
) -> Result<Collision, PhysicsError> {
    let vd = positive("detonation velocity", detonation_velocity.si(), "m/s")?;
    let vp = positive("impact velocity", impact_velocity.si(), "m/s")?;
    let alpha = preset_angle.radians();
    if !(alpha.is_finite() && (0.0..std::f64::consts::FRAC_PI_2).contains(&alpha)) {
        return Err(PhysicsError::OutOfDomain {
            quantity: "preset angle",
            value: alpha.to_degrees(),
            unit: "deg",
            allowed: "[0, 90) deg",
        });
    }
    let ratio = vp / (2.0 * vd);
    if ratio >= 1.0 {
        return Err(PhysicsError::OutOfDomain {
            quantity: "impact velocity / (2 x detonation velocity)",
            value: ratio,
            unit: "",
            allowed: "(0, 1)",
        });
    }
    let gamma = 2.0 * ratio.asin();
    let beta = check_angle(Angle::from_radians(alpha + gamma))?;
    Ok(inclined_collision(
        vd,
        Angle::from_radians(alpha),
        beta,
        impact_velocity,
    ))
}

/// The steady inclined collision: Vc = Vd sin(gamma) / sin(beta) (law of sines) and the flyer's
/// inflow Vf = Vd (sin(beta) - sin(alpha)) / sin(beta), the value that makes the lab flyer
/// velocity (Vc - Vf cos beta, -Vf sin beta) equal Vp in size (derived here from the steady-bend
/// geometry; with alpha = 0 it gives Vf = Vc = Vd, the parallel set-up).
fn inclined_collision(vd: f64, alpha: Angle, beta: Angle, impact_velocity: Velocity) -> Collision {
    let gamma = beta.radians() - alpha.radians();
    let vc = vd * gamma.sin() / beta.sin();
    let vf = vd * (beta.sin() - alpha.sin()) / beta.sin();
    Collision {
        convention: Convention::Bisector,
        impact_velocity,
        angle: beta,
        collision_velocity: Velocity::from_m_s(vc),
        flow_velocity: Velocity::from_m_s(vf),
    }
}

/// Explosive welding from the geometry: Vd, preset angle alpha and dynamic angle beta > alpha.
/// Returns Vp = 2 Vd sin((beta - alpha)/2) and Vc = Vd sin(beta - alpha) / sin(beta).
///
/// # Errors
/// [`PhysicsError::OutOfDomain`] when beta <= alpha or a value is out of range.
pub fn explosive_from_angles(
    detonation_velocity: Velocity,
    preset_angle: Angle,
    angle: Angle,
) -> Result<Collision, PhysicsError> {
    let vd = positive("detonation velocity", detonation_velocity.si(), "m/s")?;
    let beta = check_angle(angle)?;
    let gamma = beta.radians() - preset_angle.radians();
    if !(gamma > 0.0) {
        return Err(PhysicsError::OutOfDomain {
            quantity: "bend angle (collision angle - preset angle)",
            value: gamma.to_degrees(),
            unit: "deg",
            allowed: "(0, 90) deg",
        });
    }
    let vp = 2.0 * vd * (gamma / 2.0).sin();
    Ok(inclined_collision(
        vd,
        preset_angle,
        beta,
        Velocity::from_m_s(vp),
    ))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use proptest::prelude::*;

    fn deg(d: f64) -> Angle {
        Angle::from_degrees(d)
    }
    fn ms(v: f64) -> Velocity {
        Velocity::from_m_s(v)
    }

    /// Check values from `physics-notes.md` §1, derived there by independent arithmetic.
    #[test]
    fn check_values_from_the_physics_notes() {
        let c = Collision::from_collision_velocity(Convention::Bisector, ms(2500.0), deg(10.0))
            .unwrap();
        assert_abs_diff_eq!(c.impact_velocity.si(), 435.8, epsilon = 0.05);
        let c =
            Collision::from_collision_velocity(Convention::NormalToParent, ms(2500.0), deg(10.0))
                .unwrap();
        assert_abs_diff_eq!(c.impact_velocity.si(), 440.8, epsilon = 0.05);
        assert_abs_diff_eq!(c.flow_velocity.si(), 2538.6, epsilon = 0.05);
        let c = Collision::from_impact(Convention::NormalToFlyer, ms(400.0), deg(10.0)).unwrap();
        assert_abs_diff_eq!(c.collision_velocity.si(), 2303.5, epsilon = 0.05);
        assert_abs_diff_eq!(c.flow_velocity.si(), 2268.5, epsilon = 0.05);
    }

    /// Inclined explosive set-up check value from `physics-notes.md` §1 [derived, law of sines]:
    /// Vd 2500 m/s, alpha 5 deg, beta 15 deg -> Vc 1677.3 m/s, Vp 435.8 m/s.
    #[test]
    fn explosive_inclined_check_value() {
        let c = explosive_from_angles(ms(2500.0), deg(5.0), deg(15.0)).unwrap();
        assert_abs_diff_eq!(c.collision_velocity.si(), 1677.3, epsilon = 0.05);
        assert_abs_diff_eq!(c.impact_velocity.si(), 435.8, epsilon = 0.05);
        let back = explosive_inclined(ms(2500.0), deg(5.0), c.impact_velocity).unwrap();
        assert_abs_diff_eq!(back.angle.degrees(), 15.0, epsilon = 1e-9);
        // The steady-bend flow velocity satisfies the general relation (derived here):
        // |(Vc - Vf cos beta, -Vf sin beta)| = Vp; Vf = 2500 (sin 15 - sin 5) / sin 15 = 1658.1 m/s.
        assert_abs_diff_eq!(c.flow_velocity.si(), 1658.1, epsilon = 0.05);
        let b = c.angle.radians();
        let lab = (c.collision_velocity.si() - c.flow_velocity.si() * b.cos())
            .hypot(c.flow_velocity.si() * b.sin());
        assert_abs_diff_eq!(lab, c.impact_velocity.si(), epsilon = 1e-9);
        let par = explosive_parallel(ms(2500.0), ms(435.8)).unwrap();
        assert_abs_diff_eq!(par.collision_velocity.si(), 2500.0, epsilon = 1e-9);
        assert_abs_diff_eq!(par.angle.degrees(), 10.0, epsilon = 0.01);
    }

    #[test]
    fn general_relation_holds_for_every_convention() {
        // Lab flyer velocity (Vc - Vf cos b, -Vf sin b) must have magnitude Vp.
        for conv in Convention::ALL {
            let c = Collision::from_impact(conv, ms(350.0), deg(12.0)).unwrap();
            let b = c.angle.radians();
            let vx = c.collision_velocity.si() - c.flow_velocity.si() * b.cos();
            let vy = -c.flow_velocity.si() * b.sin();
            assert_abs_diff_eq!(vx.hypot(vy), 350.0, epsilon = 1e-9);
        }
    }

    #[test]
    fn refuses_out_of_domain_inputs() {
        for bad in [0.0, 90.0, 95.0, -3.0, f64::NAN] {
            assert!(Collision::from_impact(Convention::Bisector, ms(300.0), deg(bad)).is_err());
        }
        for bad in [0.0, -1.0, f64::INFINITY, f64::NAN] {
            assert!(Collision::from_impact(Convention::Bisector, ms(bad), deg(10.0)).is_err());
        }
    }

    #[test]
    fn convention_names_round_trip() {
        for c in Convention::ALL {
            assert_eq!(c.as_str().parse::<Convention>().unwrap(), c);
        }
        assert!("normal".parse::<Convention>().is_err());
    }

    proptest! {
        #[test]
        fn forward_inverse_round_trip(vp in 1.0f64..3000.0, beta in 0.1f64..89.9, k in 0usize..3) {
            let conv = Convention::ALL[k];
            let f = Collision::from_impact(conv, ms(vp), deg(beta)).unwrap();
            let b = Collision::from_collision_velocity(conv, f.collision_velocity, deg(beta)).unwrap();
            prop_assert!((b.impact_velocity.si() - vp).abs() <= 1e-9 * vp);
            prop_assert!((b.flow_velocity.si() - f.flow_velocity.si()).abs() <= 1e-9 * f.flow_velocity.si());
        }

        #[test]
        fn collision_velocity_falls_as_angle_rises(vp in 1.0f64..3000.0, b1 in 0.5f64..80.0, db in 0.1f64..9.0, k in 0usize..3) {
            let conv = Convention::ALL[k];
            let lo = Collision::from_impact(conv, ms(vp), deg(b1)).unwrap();
            let hi = Collision::from_impact(conv, ms(vp), deg(b1 + db)).unwrap();
            prop_assert!(hi.collision_velocity.si() < lo.collision_velocity.si());
        }
    }
}
