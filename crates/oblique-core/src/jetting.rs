//! Jetting: whether the collision can throw off the surface-cleaning jet that impact welds need.
//!
//! Three cases, by which streams flow into the collision point faster than their C0 (the flyer
//! at Vf, the parent at Vc; `physics-notes.md` §3, docs/theory.md §4):
//! - **Both subsonic**: a jet forms at any angle (Cowan & Holtzman 1963, J. Appl. Phys. 34:928,
//!   cited; from memory).
//! - **Both supersonic**: following Walsh, Shreffler & Willig (1953, J. Appl. Phys. 24:349; from
//!   memory), no jet forms while both streams can be turned by attached oblique shocks. Each
//!   stream's shock polar gives its deflection theta(p) at pressure p; the streams meet at equal
//!   pressure with theta_flyer + theta_parent = beta, so a jet forms when beta exceeds the largest
//!   theta_flyer(p) + theta_parent(p) (derived; for identical plates this is 2 theta_max).
//! - **Mixed** (one stream supersonic, the other subsonic): no source read covers it. Two rules
//!   ([`MixedRule`]): the either-subsonic rule (jet at any angle, the extension of Walsh's
//!   condition derived in docs/theory.md §4.3) or the conservative supersonic-side polar rule (jet
//!   only above the largest deflection an attached shock gives the supersonic stream alone).
//!
//! Shock polar for inflow speed V and shock angle phi: Un = V sin(phi) = C0 + s up, tangential
//! speed V cos(phi) unchanged, deflection theta = phi - atan((Un - up) / (V cos phi)),
//! p = rho0 Un up, 0 < up <= (V - C0)/s. The polar is also cut where the linear Hugoniot stops
//! describing a compression (Us - up >= 0, which binds only for s < 1: up <= C0/(1 - s)), so
//! every deflection lies in [0, phi] and below 90 deg. The critical angle is reported in
//! [0, 90) deg; where the construction reaches 90 deg there is no critical angle at all
//! (`none_below_90`: the attached shocks turn the streams at every angle, no jet predicted).

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

    /// Largest particle velocity on the polar: the normal shock, (V - C0)/s, unless the linear
    /// Hugoniot stops describing a compression first. For s < 1 the density ratio
    /// Us / (Us - up) diverges at up = C0/(1 - s) (and is negative beyond), so the polar ends
    /// there (for s = 0 that is up = C0). For s >= 1 this is the normal shock, as before.
    pub fn max_particle_velocity(&self) -> f64 {
        let h = &self.hugoniot;
        let normal = if h.s > 0.0 {
            (self.inflow - h.c0.si()) / h.s
        } else {
            self.inflow
        };
        if h.s < 1.0 {
            normal.min(h.c0.si() / (1.0 - h.s))
        } else {
            normal
        }
    }

    /// Pressure at the end of the polar (the normal shock, or the end of the compression
    /// branch for s < 1, see [`Self::max_particle_velocity`]).
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
        // Un - up >= 0 on the polar (its end is cut where it would turn negative), so the
        // deflection stays within [0, phi].
        (phi - ((un - up).max(0.0) / vt).atan()).max(0.0)
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
    /// The parent's inflow (Vc) is at or below its C0. With the flyer subsonic too, or under
    /// [`MixedRule::EitherSubsonic`], a jet forms at any angle; in the mixed case under
    /// [`MixedRule::SupersonicSidePolar`] the flyer's polar sets the critical angle.
    SubsonicParent,
    /// The flyer's inflow (Vf) is at or below its C0 while the parent's is above its own (a
    /// mixed case): jet at any angle under [`MixedRule::EitherSubsonic`], else the parent's
    /// polar sets the critical angle.
    SubsonicFlyer,
    /// Both inflows supersonic: jet only above the critical angle of the polar construction.
    Supersonic,
}

/// How the jetting test treats a mixed collision: one stream supersonic, the other subsonic.
/// No source read covers this case (`physics-notes.md` §7); docs/theory.md §4.3 writes out both
/// rules.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum MixedRule {
    /// A subsonic stream cannot be turned by an attached shock, so under Walsh's condition (no
    /// jet only while both streams are turned by attached shocks) the collision jets at any
    /// angle; the rule "either stream subsonic: jet" (from memory).
    EitherSubsonic,
    /// Conservative: the supersonic stream must fail its own polar test, jet iff beta exceeds
    /// the largest deflection an attached shock gives it alone (the subsonic stream taken as
    /// turning not at all). It can only remove jets the either-subsonic rule predicts.
    SupersonicSidePolar,
}

impl MixedRule {
    /// Both rules.
    pub const ALL: [MixedRule; 2] = [MixedRule::EitherSubsonic, MixedRule::SupersonicSidePolar];

    /// The kebab-case name used in pair files and JSON.
    pub fn as_str(self) -> &'static str {
        match self {
            MixedRule::EitherSubsonic => "either-subsonic",
            MixedRule::SupersonicSidePolar => "supersonic-side-polar",
        }
    }

    /// Parse the name.
    pub fn parse(s: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|r| r.as_str() == s)
    }
}

impl Default for MixedRule {
    /// The conservative rule: no source covers the mixed case, so the default predicts a jet
    /// only where the supersonic stream cannot be turned by an attached shock.
    fn default() -> Self {
        MixedRule::SupersonicSidePolar
    }
}

/// The result of the jetting test.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct JettingAssessment {
    /// Regime that decided.
    pub regime: JettingRegime,
    /// Critical collision angle above which a jet forms: in [0, 90) deg (zero when a subsonic
    /// stream decides), or exactly 90 deg when [`Self::none_below_90`] is set (then it is a
    /// bound for the criterion, never a number to show).
    pub critical_angle: Angle,
    /// The flyer's inflow Vf is above its C0.
    pub flyer_supersonic: bool,
    /// The parent's inflow Vc is above its C0.
    pub parent_supersonic: bool,
    /// The shock polars turn the streams at every collision angle below 90 deg: no critical
    /// angle exists and no jet is predicted at any angle.
    pub none_below_90: bool,
    /// The rule that decided a mixed case (`None` when both streams are on the same side).
    pub mixed_rule: Option<MixedRule>,
}

impl JettingAssessment {
    /// A jet at any angle (a subsonic stream decided).
    pub fn any_angle(
        regime: JettingRegime,
        flyer_supersonic: bool,
        parent_supersonic: bool,
    ) -> Self {
        let mixed = flyer_supersonic != parent_supersonic;
        Self {
            regime,
            critical_angle: Angle::from_radians(0.0),
            flyer_supersonic,
            parent_supersonic,
            none_below_90: false,
            mixed_rule: mixed.then_some(MixedRule::EitherSubsonic),
        }
    }

    /// The assessment for a critical angle `rad` from a polar construction, capped: at or above
    /// 90 deg there is no critical angle.
    pub fn from_polar(
        regime: JettingRegime,
        rad: f64,
        flyer_supersonic: bool,
        parent_supersonic: bool,
        mixed_rule: Option<MixedRule>,
    ) -> Self {
        let none_below_90 = rad >= std::f64::consts::FRAC_PI_2;
        Self {
            regime,
            critical_angle: Angle::from_radians(if none_below_90 {
                std::f64::consts::FRAC_PI_2
            } else {
                rad
            }),
            flyer_supersonic,
            parent_supersonic,
            none_below_90,
            mixed_rule,
        }
    }

    /// One stream supersonic and the other subsonic.
    pub fn is_mixed(&self) -> bool {
        self.flyer_supersonic != self.parent_supersonic
    }

    /// Some stream flows in above its C0.
    pub fn any_supersonic(&self) -> bool {
        self.flyer_supersonic || self.parent_supersonic
    }

    /// The critical angle in degrees, `None` when there is none below 90 deg.
    pub fn critical_angle_deg(&self) -> Option<f64> {
        (!self.none_below_90).then(|| self.critical_angle.degrees())
    }

    /// Which streams are supersonic, in words.
    pub fn inflow_text(&self) -> &'static str {
        match (self.flyer_supersonic, self.parent_supersonic) {
            (false, false) => "both streams subsonic",
            (true, true) => "both streams supersonic",
            (true, false) => "mixed: flyer supersonic (Vf above its C0), parent subsonic",
            (false, true) => "mixed: parent supersonic (Vc above its C0), flyer subsonic",
        }
    }
}

/// The jetting critical angle of a dissimilar pair: flyer stream flowing in at `flyer_inflow`
/// (Vf), parent stream at `parent_inflow` (Vc), with `rule` for a mixed case.
///
/// # Errors
/// [`PhysicsError::OutOfDomain`] for non-positive or non-finite inflow speeds.
pub fn critical_angle(
    flyer: &Hugoniot,
    parent: &Hugoniot,
    flyer_inflow: Velocity,
    parent_inflow: Velocity,
    rule: MixedRule,
) -> Result<JettingAssessment, PhysicsError> {
    crate::error::positive("flyer inflow velocity", flyer_inflow.si(), "m/s")?;
    crate::error::positive("parent inflow velocity", parent_inflow.si(), "m/s")?;
    let pp = ShockPolar::new(*parent, parent_inflow);
    let pf = ShockPolar::new(*flyer, flyer_inflow);
    let (fs, ps) = (pf.is_some(), pp.is_some());
    match (pf, pp) {
        (Some(pf), Some(pp)) => {
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
            Ok(JettingAssessment::from_polar(
                JettingRegime::Supersonic,
                best,
                true,
                true,
                None,
            ))
        }
        (None, None) => Ok(JettingAssessment::any_angle(
            JettingRegime::SubsonicParent,
            false,
            false,
        )),
        (sf, sp) => {
            // Mixed: the regime names the subsonic stream, as the direct solve always did
            // (the parent is tested first).
            let regime = if sp.is_none() {
                JettingRegime::SubsonicParent
            } else {
                JettingRegime::SubsonicFlyer
            };
            match rule {
                MixedRule::EitherSubsonic => Ok(JettingAssessment::any_angle(regime, fs, ps)),
                MixedRule::SupersonicSidePolar => {
                    let Some(polar) = sf.or(sp) else {
                        return Ok(JettingAssessment::any_angle(regime, fs, ps));
                    };
                    let best = polar.max_deflection();
                    if !best.is_finite() {
                        return Err(PhysicsError::NoConvergence {
                            what: "jetting critical angle (single polar)",
                            iterations: MAX_GOLDEN,
                        });
                    }
                    Ok(JettingAssessment::from_polar(
                        regime,
                        best,
                        fs,
                        ps,
                        Some(MixedRule::SupersonicSidePolar),
                    ))
                }
            }
        }
    }
}

/// The largest deflection an attached shock gives one stream (radians, below 90 deg): the
/// critical angle of a mixed case under [`MixedRule::SupersonicSidePolar`]. Zero for a subsonic
/// inflow.
pub fn single_polar_max_deflection(hugoniot: &Hugoniot, inflow: Velocity) -> f64 {
    ShockPolar::new(*hugoniot, inflow).map_or(0.0, |p| p.max_deflection())
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

    /// Ti grade 2 as tabulated by [K70] (s = 0.767 < 1: the polar is cut where the linear
    /// Hugoniot stops compressing).
    fn ti() -> Hugoniot {
        Hugoniot::new(
            Density::from_kg_m3(4528.0),
            Velocity::from_m_s(5220.0),
            0.767,
        )
        .unwrap()
    }

    fn v(x: f64) -> Velocity {
        Velocity::from_m_s(x)
    }

    const EITHER: MixedRule = MixedRule::EitherSubsonic;
    const POLAR: MixedRule = MixedRule::SupersonicSidePolar;

    /// Check values computed in `physics-notes.md` §3 (computed there, not published): Cu
    /// (3940 m/s, 1.489) theta_max at 4500, 5000, 6000 m/s = 0.96, 2.21, 4.78 deg; critical beta
    /// for Cu on Cu = 1.92, 4.42, 9.55 deg.
    #[test]
    fn copper_check_values() {
        for (speed, theta, beta) in [
            (4500.0, 0.96, 1.92),
            (5000.0, 2.21, 4.42),
            (6000.0, 4.78, 9.55),
        ] {
            let polar = ShockPolar::new(cu(), v(speed)).unwrap();
            assert_abs_diff_eq!(polar.max_deflection().to_degrees(), theta, epsilon = 0.01);
            for rule in MixedRule::ALL {
                let j = critical_angle(&cu(), &cu(), v(speed), v(speed), rule).unwrap();
                assert_eq!(j.regime, JettingRegime::Supersonic);
                assert_abs_diff_eq!(j.critical_angle.degrees(), beta, epsilon = 0.01);
                assert!(!j.none_below_90 && j.mixed_rule.is_none());
            }
        }
    }

    #[test]
    fn polar_ends_at_zero_deflection() {
        let polar = ShockPolar::new(cu(), v(5000.0)).unwrap();
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
    fn subsonic_inflow_of_either_stream_gives_zero_under_the_either_subsonic_rule() {
        let j = critical_angle(&cu(), &al(), v(5000.0), v(5000.0), EITHER).unwrap();
        assert_eq!(j.regime, JettingRegime::SubsonicParent);
        assert_eq!(j.critical_angle.radians(), 0.0);
        assert!(j.is_mixed() && j.flyer_supersonic && !j.parent_supersonic);
        assert_eq!(j.mixed_rule, Some(EITHER));
        let j = critical_angle(&al(), &cu(), v(5000.0), v(5000.0), EITHER).unwrap();
        assert_eq!(j.regime, JettingRegime::SubsonicFlyer);
        assert!(j.is_mixed() && j.parent_supersonic);
        // Both subsonic: no mixed rule at all.
        let j = critical_angle(&al(), &cu(), v(3000.0), v(3000.0), POLAR).unwrap();
        assert_eq!(j.critical_angle.radians(), 0.0);
        assert!(!j.any_supersonic() && j.mixed_rule.is_none());
    }

    /// The mixed case under the conservative rule: the supersonic stream's own polar sets the
    /// critical angle (issue 14: at 382 m/s and 5 deg on Al 6061 on Cu, Vc = 4383 m/s is above
    /// the parent's C0 while Vf is below the flyer's).
    #[test]
    fn mixed_case_under_the_polar_rule_takes_the_supersonic_side() {
        // Cu parent at 5000 m/s (supersonic), Al flyer at 5000 m/s (subsonic).
        let j = critical_angle(&al(), &cu(), v(5000.0), v(5000.0), POLAR).unwrap();
        assert_eq!(j.regime, JettingRegime::SubsonicFlyer);
        assert_eq!(j.mixed_rule, Some(POLAR));
        // The copper check value of physics-notes.md §3: theta_max(5000 m/s) = 2.21 deg.
        assert_abs_diff_eq!(j.critical_angle.degrees(), 2.21, epsilon = 0.01);
        // And the other way round: Cu flyer supersonic, Al parent subsonic.
        let j = critical_angle(&cu(), &al(), v(6000.0), v(5000.0), POLAR).unwrap();
        assert_eq!(j.regime, JettingRegime::SubsonicParent);
        assert_abs_diff_eq!(j.critical_angle.degrees(), 4.78, epsilon = 0.01);
    }

    /// Issue 14: Ti grade 2 on Cu, 0.127 mm, 900 m/s at 1 deg, normal to the flyer gives
    /// Vc = 51.6 km/s, and the critical angle came out as 196.78 deg (the polar of s = 0.767 ran
    /// past infinite compression). Now every deflection stays below 90 deg and the sum says in
    /// words that no critical angle exists below 90 deg.
    #[test]
    fn titanium_at_extreme_inflow_has_no_impossible_angle() {
        let vc = 900.0 / 1f64.to_radians().sin();
        let vf = vc * 1f64.to_radians().cos();
        for rule in MixedRule::ALL {
            let j = critical_angle(&ti(), &cu(), v(vf), v(vc), rule).unwrap();
            let deg = j.critical_angle.degrees();
            assert!(deg <= 90.0, "{deg}");
            assert!(j.none_below_90 || deg < 90.0);
            assert_eq!(j.critical_angle_deg().is_none(), j.none_below_90);
        }
        let p = ShockPolar::new(ti(), v(vc)).unwrap();
        assert!(p.max_deflection() < std::f64::consts::FRAC_PI_2);
    }

    proptest! {
        #[test]
        fn zero_below_sonic_inflow(vf in 100.0f64..3939.0, vc in 100.0f64..20000.0) {
            let j = critical_angle(&cu(), &cu(), v(vf), v(vc), EITHER).unwrap();
            prop_assert_eq!(j.critical_angle.radians(), 0.0);
        }

        /// The conservative rule never predicts a jet the either-subsonic rule does not.
        #[test]
        fn the_polar_rule_is_never_less_demanding(vf in 100.0f64..12000.0, vc in 100.0f64..12000.0) {
            let a = critical_angle(&al(), &cu(), v(vf), v(vc), EITHER).unwrap();
            let b = critical_angle(&al(), &cu(), v(vf), v(vc), POLAR).unwrap();
            prop_assert!(b.critical_angle.radians() >= a.critical_angle.radians());
            prop_assert_eq!(a.regime, b.regime);
        }

        /// Every critical angle in [0, 90) deg, or none below 90 deg said in words, over the
        /// whole input domain: inflows from 1 mm/s to 100 km/s (the command line's bounds), every
        /// pair of Hugoniots from s = 0.3 to 3 (the material file's range) and both rules.
        #[test]
        fn critical_angle_is_always_physical(
            vf in 1e-3f64..1e5, vc in 1e-3f64..1e5,
            c0f in 1000.0f64..10000.0, c0p in 1000.0f64..10000.0,
            sf in 0.3f64..3.0, sp in 0.3f64..3.0,
            polar in proptest::bool::ANY,
        ) {
            let hf = Hugoniot::new(Density::from_kg_m3(4500.0), v(c0f), sf).unwrap();
            let hp = Hugoniot::new(Density::from_kg_m3(8900.0), v(c0p), sp).unwrap();
            let rule = if polar { POLAR } else { EITHER };
            let j = critical_angle(&hf, &hp, v(vf), v(vc), rule).unwrap();
            let deg = j.critical_angle.degrees();
            prop_assert!(deg >= 0.0 && deg.is_finite());
            if j.none_below_90 {
                prop_assert_eq!(deg, 90.0);
                prop_assert!(j.critical_angle_deg().is_none());
            } else {
                prop_assert!(deg < 90.0, "{}", deg);
            }
            for (h, speed) in [(hf, vf), (hp, vc)] {
                if let Some(p) = ShockPolar::new(h, v(speed)) {
                    let t = p.max_deflection();
                    prop_assert!((0.0..std::f64::consts::FRAC_PI_2).contains(&t), "{}", t);
                }
            }
        }

        #[test]
        fn critical_angle_rises_with_inflow(speed in 3950.0f64..9000.0, dv in 10.0f64..1000.0) {
            let lo = critical_angle(&cu(), &al(), v(speed + 1500.0), v(speed + 1500.0), POLAR).unwrap();
            let hi = critical_angle(&cu(), &al(), v(speed + 1500.0 + dv), v(speed + 1500.0 + dv), POLAR).unwrap();
            prop_assert!(hi.critical_angle.radians() >= lo.critical_angle.radians() - 1e-9);
        }

        #[test]
        fn pair_order_does_not_matter_for_equal_inflow(speed in 5400.0f64..9000.0) {
            let a = critical_angle(&cu(), &al(), v(speed), v(speed), POLAR).unwrap().critical_angle.radians();
            let b = critical_angle(&al(), &cu(), v(speed), v(speed), POLAR).unwrap().critical_angle.radians();
            prop_assert!((a - b).abs() < 1e-9);
        }
    }
}
