//! Linear shock Hugoniot and one-dimensional impedance matching.
//!
//! Us = C0 + s up; Rankine-Hugoniot momentum jump p = rho0 Us up (Meyers, *Dynamic Behavior of
//! Materials*, Wiley 1994, sec. 4.3). A flyer (1) striking a stationary target (2) at closing
//! speed V: both sides reach the same pressure with u1 + u2 = V, where u1 is the particle-velocity
//! change in the flyer and u2 the particle velocity of the target (`physics-notes.md` §2).

use crate::error::{positive, PhysicsError};
use crate::units::{Density, Pressure, Velocity};
use serde::{Deserialize, Serialize};

/// A linear Us-up Hugoniot with its initial density.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Hugoniot {
    /// Initial density rho0.
    pub density: Density,
    /// Intercept C0 of the Us-up line (close to the bulk sound speed).
    pub c0: Velocity,
    /// Slope s of the Us-up line (dimensionless).
    pub s: f64,
}

impl Hugoniot {
    /// A validated Hugoniot.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] for a non-positive density or C0, or a negative or
    /// non-finite slope.
    pub fn new(density: Density, c0: Velocity, s: f64) -> Result<Self, PhysicsError> {
        positive("density", density.si(), "kg/m^3")?;
        positive("Hugoniot C0", c0.si(), "m/s")?;
        if !(s.is_finite() && s >= 0.0) {
            return Err(PhysicsError::OutOfDomain {
                quantity: "Hugoniot slope s",
                value: s,
                unit: "",
                allowed: "[0, +inf)",
            });
        }
        Ok(Self { density, c0, s })
    }

    /// Shock speed Us at particle velocity up.
    pub fn shock_speed(&self, up: f64) -> f64 {
        self.c0.si() + self.s * up
    }

    /// Pressure behind the shock at particle velocity up: p = rho0 (C0 + s up) up.
    pub fn pressure(&self, up: f64) -> f64 {
        self.density.si() * self.shock_speed(up) * up
    }

    /// The particle velocity that gives pressure p (the positive root of the quadratic).
    pub fn particle_velocity_at(&self, p: f64) -> f64 {
        let rho = self.density.si();
        let c0 = self.c0.si();
        // rho s up^2 + rho C0 up - p = 0, written in the cancellation-free form.
        2.0 * p / (rho * c0 + ((rho * c0).powi(2) + 4.0 * rho * self.s * p).sqrt())
    }

    /// Acoustic impedance rho0 C0.
    pub fn impedance(&self) -> f64 {
        self.density.si() * self.c0.si()
    }
}

/// The state reached when a flyer strikes a stationary target.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ImpactState {
    /// Common pressure behind both shocks.
    pub pressure: Pressure,
    /// Particle-velocity change in the flyer, u1.
    pub flyer_particle_velocity: Velocity,
    /// Particle velocity of the target, u2.
    pub target_particle_velocity: Velocity,
}

/// One-dimensional impedance matching of `flyer` on a stationary `target` at closing speed `v`.
///
/// Solves rho1 (C1 + s1 u1) u1 = rho2 (C2 + s2 u2) u2 with u1 + u2 = V. Eliminating u1 gives
/// a u2^2 + b u2 - c = 0 with a = rho2 s2 - rho1 s1, b = rho1 C1 + rho2 C2 + 2 rho1 s1 V,
/// c = rho1 (C1 V + s1 V^2); the root is taken as 2c / (b + sqrt(b^2 + 4ac)), which stays
/// accurate when a -> 0 (equal rho s) and is the unique root in (0, V) because both sides are
/// monotonic in u2.
///
/// # Errors
/// [`PhysicsError::OutOfDomain`] when `v` is not positive and finite.
///
/// ```
/// use oblique_core::{hugoniot::{impedance_match, Hugoniot}, units::{Density, Velocity}};
/// let cu = Hugoniot::new(Density::from_kg_m3(8930.0), Velocity::from_m_s(3940.0), 1.489).unwrap();
/// let p = impedance_match(&cu, &cu, Velocity::from_m_s(500.0)).unwrap().pressure;
/// assert!((p.gpa() - 9.63).abs() < 0.01); // physics-notes.md §2 check value
/// ```
pub fn impedance_match(
    flyer: &Hugoniot,
    target: &Hugoniot,
    v: Velocity,
) -> Result<ImpactState, PhysicsError> {
    let v = positive("closing velocity", v.si(), "m/s")?;
    let (r1, c1, s1) = (flyer.density.si(), flyer.c0.si(), flyer.s);
    let (r2, c2, s2) = (target.density.si(), target.c0.si(), target.s);
    let a = r2 * s2 - r1 * s1;
    let b = r1 * c1 + r2 * c2 + 2.0 * r1 * s1 * v;
    let c = r1 * (c1 * v + s1 * v * v);
    let disc = b * b + 4.0 * a * c;
    if !(disc >= 0.0) {
        return Err(PhysicsError::NoConvergence {
            what: "impedance matching (negative discriminant)",
            iterations: 0,
        });
    }
    let u2 = 2.0 * c / (b + disc.sqrt());
    let u1 = v - u2;
    Ok(ImpactState {
        pressure: Pressure::from_pa(target.pressure(u2)),
        flyer_particle_velocity: Velocity::from_m_s(u1),
        target_particle_velocity: Velocity::from_m_s(u2),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use proptest::prelude::*;

    fn h(rho: f64, c0: f64, s: f64) -> Hugoniot {
        Hugoniot::new(Density::from_kg_m3(rho), Velocity::from_m_s(c0), s).unwrap()
    }

    /// Check values computed in `physics-notes.md` §2 from the Hugoniot constants tabulated by
    /// Marsh (1980) / Meyers (1994): Cu on Al6061, Cu on Cu and Al6061 on SS304, all at 500 m/s.
    #[test]
    fn check_values_from_the_physics_notes() {
        let cu = h(8930.0, 3940.0, 1.489);
        let al = h(2700.0, 5350.0, 1.34);
        let ss = h(7896.0, 4569.0, 1.49);
        let v = Velocity::from_m_s(500.0);
        assert_relative_eq!(
            impedance_match(&cu, &al, v).unwrap().pressure.gpa(),
            5.52,
            max_relative = 2e-3
        );
        assert_relative_eq!(
            impedance_match(&cu, &cu, v).unwrap().pressure.gpa(),
            9.63,
            max_relative = 2e-3
        );
        assert_relative_eq!(
            impedance_match(&al, &ss, v).unwrap().pressure.gpa(),
            5.55,
            max_relative = 2e-3
        );
    }

    /// Identical plates split the closing speed in half (symmetry; independent arithmetic).
    #[test]
    fn identical_plates_split_velocity() {
        let cu = h(8930.0, 3940.0, 1.489);
        let st = impedance_match(&cu, &cu, Velocity::from_m_s(800.0)).unwrap();
        assert_relative_eq!(
            st.target_particle_velocity.si(),
            400.0,
            max_relative = 1e-12
        );
    }

    #[test]
    fn acoustic_limit() {
        // For small V the result tends to V Z1 Z2 / (Z1 + Z2) (physics-notes.md §2).
        let cu = h(8930.0, 3940.0, 1.489);
        let al = h(2700.0, 5350.0, 1.34);
        let v = 0.01;
        let (z1, z2) = (cu.impedance(), al.impedance());
        let p = impedance_match(&cu, &al, Velocity::from_m_s(v))
            .unwrap()
            .pressure
            .si();
        assert_relative_eq!(p, v * z1 * z2 / (z1 + z2), max_relative = 1e-5);
    }

    #[test]
    fn particle_velocity_inverts_pressure() {
        let al = h(2700.0, 5350.0, 1.34);
        for up in [1.0, 100.0, 1000.0] {
            assert_relative_eq!(
                al.particle_velocity_at(al.pressure(up)),
                up,
                max_relative = 1e-12
            );
        }
    }

    proptest! {
        #[test]
        fn swap_leaves_pressure_unchanged(
            r1 in 1500.0f64..20000.0, c1 in 2500.0f64..7000.0, s1 in 0.5f64..2.0,
            r2 in 1500.0f64..20000.0, c2 in 2500.0f64..7000.0, s2 in 0.5f64..2.0,
            v in 1.0f64..3000.0,
        ) {
            let (a, b) = (h(r1, c1, s1), h(r2, c2, s2));
            let v = Velocity::from_m_s(v);
            let p_ab = impedance_match(&a, &b, v).unwrap();
            let p_ba = impedance_match(&b, &a, v).unwrap();
            prop_assert!((p_ab.pressure.si() - p_ba.pressure.si()).abs() <= 1e-9 * p_ab.pressure.si());
            prop_assert!((p_ab.flyer_particle_velocity.si() - p_ba.target_particle_velocity.si()).abs() < 1e-6);
            // Both sides really are at the same pressure.
            let p1 = a.pressure(p_ab.flyer_particle_velocity.si());
            prop_assert!((p1 - p_ab.pressure.si()).abs() <= 1e-9 * p1);
        }

        #[test]
        fn pressure_rises_with_velocity(v in 1.0f64..2000.0, dv in 1.0f64..500.0) {
            let (a, b) = (h(8930.0, 3940.0, 1.489), h(2700.0, 5350.0, 1.34));
            let lo = impedance_match(&a, &b, Velocity::from_m_s(v)).unwrap().pressure.si();
            let hi = impedance_match(&a, &b, Velocity::from_m_s(v + dv)).unwrap().pressure.si();
            prop_assert!(hi > lo);
        }
    }
}
