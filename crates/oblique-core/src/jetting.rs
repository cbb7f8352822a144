//! Jetting: whether the collision can throw off the surface-cleaning jet that impact welds need.
//!
//! Two regimes (`physics-notes.md` §3):
//! - **Subsonic inflow** of either stream (Vc < C0 of the parent, or Vf < C0 of the flyer): a jet
//!   forms at any angle (Cowan & Holtzman 1963, J. Appl. Phys. 34:928, cited; from memory).
//! - **Supersonic inflow** of both: following Walsh, Shreffler & Willig (1953, J. Appl. Phys.
//!   24:349; from memory), no jet forms while both streams can be turned by attached oblique
//!   shocks. Each stream's shock polar gives its deflection theta(p) at pressure p; the streams
//!   meet at equal pressure with theta_flyer + theta_parent = beta, so a jet forms when beta
//!   exceeds the largest theta_flyer(p) + theta_parent(p) (derived; for identical plates this is
//!   2 theta_max).
//!
//! Shock polar for inflow speed V and shock angle phi: Un = V sin(phi) = C0 + s up, tangential
//! speed V cos(phi) unchanged, deflection theta = phi - atan((Un - up) / (V cos phi)),
//! p = rho0 Un up, 0 < up <= (V - C0)/s.

use crate::error::PhysicsError;
use crate::hugoniot::Hugoniot;
use crate::units::{Angle, Pressure, Velocity};
use serde::{Deserialize, Serialize};

/// One stream's shock polar: the material and its inflow speed in the collision-point frame.
#[derive(Debug, Clone, Copy)]
pub struct ShockPolar {
    hugoniot: Hugoniot,
    inflow: f64,
}

impl ShockPolar {
    /// The polar of `hugoniot` for inflow speed `inflow`. `None` when the inflow is not
    /// supersonic (V <= C0), where no attached shock exists.
    pub fn new(hugoniot: Hugoniot, inflow: Velocity) -> Option<Self> {
        (inflow.si() > hugoniot.c0.si()).then_some(Self {
            hugoniot,
            inflow: inflow.si(),
        })
    }

    /// Largest particle velocity on the polar (normal shock): (V - C0)/s, or unbounded in
    /// theory when s = 0 (then the normal shock is at Un = C0 = V, which cannot happen for V > C0
    /// so the polar ends where Un reaches V at any up; we cap at V).
    pub fn max_particle_velocity(&self) -> f64 {
        let h = &self.hugoniot;
        if h.s > 0.0 {
            (self.inflow - h.c0.si()) / h.s
        } else {
            self.inflow
        }
    }

    /// Pressure of the normal shock, the end of the polar.
    pub fn normal_shock_pressure(&self) -> Pressure {
        Pressure::from_pa(self.hugoniot.pressure(self.max_particle_velocity()))
    }

    /// Deflection theta (radians) at particle velocity up.
    pub fn deflection_at_particle_velocity(&self, up: f64) -> f64 {
        let v = self.inflow;
        let un = self.hugoniot.shock_speed(up).min(v);
        let sin_phi = un / v;
        let phi = sin_phi.asin();
        let vt = v * (1.0 - sin_phi * sin_phi).max(0.0).sqrt();
        if vt <= 0.0 {
            return 0.0;
        }
        (phi - ((un - up) / vt).atan()).max(0.0)
    }

    /// Deflection theta (radians) at pressure p (p up to the normal-shock pressure).
    pub fn deflection_at_pressure(&self, p: f64) -> f64 {
        let up = self
            .hugoniot
            .particle_velocity_at(p)
            .min(self.max_particle_velocity());
        self.deflection_at_particle_velocity(up)
    }

    /// Largest deflection on the polar (radians).
    pub fn max_deflection(&self) -> f64 {
        let upmax = self.max_particle_velocity();
        maximise(|up| self.deflection_at_particle_velocity(up), 0.0, upmax)
    }
}

/// Which regime decided the jetting test.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum JettingRegime {
    /// The parent's inflow (Vc) is below its C0: jet at any angle.
    SubsonicParent,
    /// The flyer's inflow (Vf) is below its C0: jet at any angle.
    SubsonicFlyer,
    /// Both inflows supersonic: jet only above the critical angle of the polar construction.
    Supersonic,
}

/// The result of the jetting test.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct JettingAssessment {
    /// Regime that decided.
    pub regime: JettingRegime,
    /// Critical collision angle above which a jet forms (zero in the subsonic regimes).
    pub critical_angle: Angle,
}

/// The jetting critical angle of a dissimilar pair: flyer stream flowing in at `flyer_inflow`
/// (Vf), parent stream at `parent_inflow` (Vc).
///
/// # Errors
/// [`PhysicsError::OutOfDomain`] for non-positive or non-finite inflow speeds.
pub fn critical_angle(
    flyer: &Hugoniot,
    parent: &Hugoniot,
    flyer_inflow: Velocity,
    parent_inflow: Velocity,
) -> Result<JettingAssessment, PhysicsError> {
    crate::error::positive("flyer inflow velocity", flyer_inflow.si(), "m/s")?;
    crate::error::positive("parent inflow velocity", parent_inflow.si(), "m/s")?;
    let Some(pp) = ShockPolar::new(*parent, parent_inflow) else {
        return Ok(JettingAssessment {
            regime: JettingRegime::SubsonicParent,
            critical_angle: Angle::from_radians(0.0),
        });
    };
    let Some(pf) = ShockPolar::new(*flyer, flyer_inflow) else {
        return Ok(JettingAssessment {
            regime: JettingRegime::SubsonicFlyer,
            critical_angle: Angle::from_radians(0.0),
        });
    };
    let p_end = pf
        .normal_shock_pressure()
        .si()
        .min(pp.normal_shock_pressure().si());
    let best = maximise(
        |p| pf.deflection_at_pressure(p) + pp.deflection_at_pressure(p),
        0.0,
        p_end,
    );
    if !best.is_finite() {
        return Err(PhysicsError::NoConvergence {
            what: "jetting critical angle",
            iterations: MAX_GOLDEN,
        });
    }
    Ok(JettingAssessment {
        regime: JettingRegime::Supersonic,
        critical_angle: Angle::from_radians(best),
    })
}

const N_SCAN: usize = 24;
const MAX_GOLDEN: usize = 60;

/// Largest value of `f` on [a, b]: a coarse scan to locate the peak, then golden-section
/// refinement in the two cells around it. The polar sums are smooth and single-peaked in
/// practice; the scan guards against a flat start.
fn maximise(f: impl Fn(f64) -> f64, a: f64, b: f64) -> f64 {
    if !(b > a) {
        return f(a).max(0.0);
    }
    let h = (b - a) / N_SCAN as f64;
    let mut best_i = 0;
    let mut best = f64::NEG_INFINITY;
    for i in 0..=N_SCAN {
        let y = f(a + h * i as f64);
        if y > best {
            best = y;
            best_i = i;
        }
    }
    let mut lo = a + h * best_i.saturating_sub(1) as f64;
    let mut hi = (a + h * (best_i + 1) as f64).min(b);
    let g = 0.5 * (5f64.sqrt() - 1.0);
    let mut x1 = hi - g * (hi - lo);
    let mut x2 = lo + g * (hi - lo);
    let (mut f1, mut f2) = (f(x1), f(x2));
    for _ in 0..MAX_GOLDEN {
        if (hi - lo) <= 1e-10 * (b - a) {
            break;
        }
        if f1 < f2 {
            lo = x1;
            x1 = x2;
            f1 = f2;
            x2 = lo + g * (hi - lo);
            f2 = f(x2);
        } else {
            hi = x2;
            x2 = x1;
            f2 = f1;
            x1 = hi - g * (hi - lo);
            f1 = f(x1);
        }
    }
    best.max(f1).max(f2)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::Density;
    use approx::assert_abs_diff_eq;
    use proptest::prelude::*;

    fn cu() -> Hugoniot {
        Hugoniot::new(
            Density::from_kg_m3(8930.0),
            Velocity::from_m_s(3940.0),
            1.489,
        )
        .unwrap()
    }
    fn al() -> Hugoniot {
        Hugoniot::new(
            Density::from_kg_m3(2700.0),
            Velocity::from_m_s(5350.0),
            1.34,
        )
        .unwrap()
    }

    /// Check values computed in `physics-notes.md` §3 (computed there, not published): Cu
    /// (3940 m/s, 1.489) theta_max at 4500, 5000, 6000 m/s = 0.96, 2.21, 4.78 deg; critical beta
    /// for Cu on Cu = 1.92, 4.42, 9.55 deg.
    #[test]
    fn copper_check_values() {
        for (v, theta, beta) in [
            (4500.0, 0.96, 1.92),
            (5000.0, 2.21, 4.42),
            (6000.0, 4.78, 9.55),
        ] {
            let polar = ShockPolar::new(cu(), Velocity::from_m_s(v)).unwrap();
            assert_abs_diff_eq!(polar.max_deflection().to_degrees(), theta, epsilon = 0.01);
            let j =
                critical_angle(&cu(), &cu(), Velocity::from_m_s(v), Velocity::from_m_s(v)).unwrap();
            assert_eq!(j.regime, JettingRegime::Supersonic);
            assert_abs_diff_eq!(j.critical_angle.degrees(), beta, epsilon = 0.01);
        }
    }

    #[test]
    fn polar_ends_at_zero_deflection() {
        let polar = ShockPolar::new(cu(), Velocity::from_m_s(5000.0)).unwrap();
        assert_abs_diff_eq!(
            polar.deflection_at_particle_velocity(0.0),
            0.0,
            epsilon = 1e-12
        );
        assert_abs_diff_eq!(
            polar.deflection_at_particle_velocity(polar.max_particle_velocity()),
            0.0,
            epsilon = 1e-9
        );
    }

    #[test]
    fn subsonic_inflow_of_either_stream_gives_zero() {
        let j = critical_angle(
            &cu(),
            &al(),
            Velocity::from_m_s(5000.0),
            Velocity::from_m_s(5000.0),
        )
        .unwrap();
        assert_eq!(j.regime, JettingRegime::SubsonicParent);
        assert_eq!(j.critical_angle.radians(), 0.0);
        let j = critical_angle(
            &al(),
            &cu(),
            Velocity::from_m_s(5000.0),
            Velocity::from_m_s(5000.0),
        )
        .unwrap();
        assert_eq!(j.regime, JettingRegime::SubsonicFlyer);
    }

    proptest! {
        #[test]
        fn zero_below_sonic_inflow(vf in 100.0f64..3939.0, vc in 100.0f64..20000.0) {
            let j = critical_angle(&cu(), &cu(), Velocity::from_m_s(vf), Velocity::from_m_s(vc)).unwrap();
            prop_assert_eq!(j.critical_angle.radians(), 0.0);
        }

        #[test]
        fn critical_angle_rises_with_inflow(v in 3950.0f64..9000.0, dv in 10.0f64..1000.0) {
            let lo = critical_angle(&cu(), &al(), Velocity::from_m_s(v + 1500.0), Velocity::from_m_s(v + 1500.0)).unwrap();
            let hi = critical_angle(&cu(), &al(), Velocity::from_m_s(v + 1500.0 + dv), Velocity::from_m_s(v + 1500.0 + dv)).unwrap();
            prop_assert!(hi.critical_angle.radians() >= lo.critical_angle.radians() - 1e-9);
        }

        #[test]
        fn pair_order_does_not_matter_for_equal_inflow(v in 5400.0f64..9000.0) {
            let v = Velocity::from_m_s(v);
            let a = critical_angle(&cu(), &al(), v, v).unwrap().critical_angle.radians();
            let b = critical_angle(&al(), &cu(), v, v).unwrap().critical_angle.radians();
            prop_assert!((a - b).abs() < 1e-9);
        }
    }
}
