//! The validity domain: where the window's relations are claimed to hold at all.
//!
//! Every limit of the window is a published or recalled relation fitted to, or argued for, a
//! range of collisions; no published window reaches steep angles, hypervelocity impacts or
//! collision-point velocities several times the sound speed. A verdict outside that range is an
//! extrapolation, so the window crate reports it as "outside the validity domain", never as
//! inside. Each bound names the limits it bounds and its source; the bounds and their reasons
//! are tabulated in docs/theory.md §7.1.
//!
//! The quantities are those of the point in the window's convention: the collision angle, the
//! impact velocity Vp, the Mach numbers of the two inflows (Vc over the parent's C0, Vf over the
//! flyer's C0) and the flyer thickness.

use crate::criteria::{CriterionId, PairSetup};
use crate::kinematics::Collision;
use serde::Serialize;

/// A quantity the domain bounds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum DomainQuantity {
    /// The collision angle beta, deg.
    CollisionAngle,
    /// The impact velocity Vp in the window's convention, m/s.
    ImpactVelocity,
    /// The parent's inflow Mach number Vc / C0(parent).
    ParentMach,
    /// The flyer's inflow Mach number Vf / C0(flyer).
    FlyerMach,
    /// The flyer thickness, m.
    FlyerThickness,
}

impl DomainQuantity {
    /// Every bounded quantity, in report order.
    pub const ALL: [DomainQuantity; 5] = [
        DomainQuantity::CollisionAngle,
        DomainQuantity::ImpactVelocity,
        DomainQuantity::ParentMach,
        DomainQuantity::FlyerMach,
        DomainQuantity::FlyerThickness,
    ];

    /// The snake_case key used in JSON.
    pub fn as_str(self) -> &'static str {
        match self {
            DomainQuantity::CollisionAngle => "collision_angle",
            DomainQuantity::ImpactVelocity => "impact_velocity",
            DomainQuantity::ParentMach => "parent_mach",
            DomainQuantity::FlyerMach => "flyer_mach",
            DomainQuantity::FlyerThickness => "flyer_thickness",
        }
    }

    /// The unit of the values and bounds: deg, m/s, 1 (a ratio) or m.
    pub fn unit(self) -> &'static str {
        match self {
            DomainQuantity::CollisionAngle => "deg",
            DomainQuantity::ImpactVelocity => "m/s",
            DomainQuantity::ParentMach | DomainQuantity::FlyerMach => "1",
            DomainQuantity::FlyerThickness => "m",
        }
    }

    /// The quantity in words.
    pub fn label(self) -> &'static str {
        match self {
            DomainQuantity::CollisionAngle => "collision angle",
            DomainQuantity::ImpactVelocity => "impact velocity Vp",
            DomainQuantity::ParentMach => "Vc / C0 of the parent",
            DomainQuantity::FlyerMach => "Vf / C0 of the flyer",
            DomainQuantity::FlyerThickness => "flyer thickness",
        }
    }

    /// A value of this quantity at a human scale, with its unit.
    pub fn format(self, v: f64) -> String {
        match self {
            DomainQuantity::CollisionAngle => format!("{} deg", trim(v, 2)),
            DomainQuantity::ImpactVelocity => format!("{} m/s", trim(v, 0)),
            DomainQuantity::ParentMach | DomainQuantity::FlyerMach => trim(v, 2),
            DomainQuantity::FlyerThickness => format!("{} mm", trim(v * 1e3, 3)),
        }
    }
}

/// `v` with at most `decimals` decimals, trailing zeros dropped.
fn trim(v: f64, decimals: usize) -> String {
    let s = format!("{v:.decimals$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// One bound of the domain: `min <= value <= max` (either end may be open: -inf, +inf).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DomainBound {
    /// The quantity bounded.
    pub quantity: DomainQuantity,
    /// Lowest value inside (in [`DomainQuantity::unit`]).
    pub min: f64,
    /// Highest value inside.
    pub max: f64,
    /// The limits whose validity this bound expresses (every bound also bounds the window as a
    /// whole).
    pub limits: Vec<CriterionId>,
    /// Where the bound comes from: a source, or "common practice".
    pub source: &'static str,
}

impl DomainBound {
    /// The range in words, e.g. "50 m/s to 2000 m/s" or "at most 30 deg".
    pub fn range_text(&self) -> String {
        let q = self.quantity;
        match (self.min.is_finite() && self.min > 0.0, self.max.is_finite()) {
            (true, true) => format!("{} to {}", q.format(self.min), q.format(self.max)),
            (false, true) => format!("at most {}", q.format(self.max)),
            (true, false) => format!("at least {}", q.format(self.min)),
            (false, false) => "any".to_string(),
        }
    }
}

/// A point (or a pair) outside one bound.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DomainExit {
    /// The quantity outside its bound.
    pub quantity: DomainQuantity,
    /// Its value at the point, in the quantity's unit.
    pub value: f64,
    /// The bound's lowest value.
    pub min: f64,
    /// The bound's highest value.
    pub max: f64,
    /// The limits this bound concerns.
    pub limits: Vec<CriterionId>,
    /// The bound's source.
    pub source: &'static str,
}

impl DomainExit {
    /// Below (`true`) or above the bound.
    pub fn below(&self) -> bool {
        self.value < self.min
    }

    /// In words: "impact velocity Vp 35000 m/s is above 2000 m/s".
    pub fn text(&self) -> String {
        let q = self.quantity;
        if self.below() {
            format!(
                "{} {} is below {}",
                q.label(),
                q.format(self.value),
                q.format(self.min)
            )
        } else {
            format!(
                "{} {} is above {}",
                q.label(),
                q.format(self.value),
                q.format(self.max)
            )
        }
    }
}

/// The source text of the angle bound.
pub const ANGLE_SOURCE: &str = "common practice: published explosive and magnetic pulse weldability windows are drawn for collision angles up to about 25-30 deg (the best magnetic pulse joints in physics-notes.md §6 lie at 4 and 8 deg); the Deribas form and 1-D impedance matching at the full Vp are small-angle estimates";
/// The source text of the impact-velocity bound.
pub const VELOCITY_SOURCE: &str = "common practice: magnetic pulse impact velocities are usually 200-500 m/s (review, Proc. IMechE B 2021), foil-actuator flyers reach about three times that (Hahn et al. 2016), a laser impact weld of Ti on Cu ran at about 900 m/s (Abdelmaola et al., Metals 14 (2024) 342); 50 m/s is far below any weld, 2000 m/s twice the fastest of these";
/// The source text of the two Mach bounds.
pub const MACH_SOURCE: &str = "common practice: the shock-polar construction's check values (physics-notes.md §3) run to 1.5 C0, explosive-welding practice keeps Vc near C0; at 2 C0 the polars reach particle velocities of about C0/s, the end of the range the tabulated linear Hugoniots were fitted over (Marsh 1980: copper to 4.2 km/s)";
/// The source text of the thickness bound.
pub const THICKNESS_SOURCE: &str = "common practice: laser impact welding uses foils from about 10 um (0.127 mm Ti in Abdelmaola et al. 2024), explosive cladding flyers reach a few tens of millimetres; the Wittman limit's h^(-1/4) is not claimed beyond";

/// The validity domain: a list of bounds, every one of which a point must meet.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ValidityDomain {
    /// The bounds, in [`DomainQuantity::ALL`] order.
    pub bounds: Vec<DomainBound>,
}

impl Default for ValidityDomain {
    /// The documented domain (docs/theory.md §7.1): collision angle at most 30 deg, Vp from 50
    /// to 2000 m/s, Vc and Vf at most 2 C0 of their plate, flyer thickness 10 um to 50 mm.
    fn default() -> Self {
        use CriterionId as C;
        let all = vec![
            C::DeribasLower,
            C::StrengthLower,
            C::PressureLower,
            C::MeltingUpper,
            C::Jetting,
        ];
        Self {
            bounds: vec![
                DomainBound {
                    quantity: DomainQuantity::CollisionAngle,
                    min: 0.0,
                    max: 30.0,
                    limits: all.clone(),
                    source: ANGLE_SOURCE,
                },
                DomainBound {
                    quantity: DomainQuantity::ImpactVelocity,
                    min: 50.0,
                    max: 2000.0,
                    limits: all,
                    source: VELOCITY_SOURCE,
                },
                DomainBound {
                    quantity: DomainQuantity::ParentMach,
                    min: 0.0,
                    max: 2.0,
                    limits: vec![C::Jetting, C::DeribasLower, C::MeltingUpper],
                    source: MACH_SOURCE,
                },
                DomainBound {
                    quantity: DomainQuantity::FlyerMach,
                    min: 0.0,
                    max: 2.0,
                    limits: vec![C::Jetting],
                    source: MACH_SOURCE,
                },
                DomainBound {
                    quantity: DomainQuantity::FlyerThickness,
                    min: 10e-6,
                    max: 50e-3,
                    limits: vec![C::MeltingUpper],
                    source: THICKNESS_SOURCE,
                },
            ],
        }
    }
}

impl ValidityDomain {
    /// The value of `q` at collision `c` (in the window's convention) for `pair`.
    pub fn value(q: DomainQuantity, pair: &PairSetup, c: &Collision) -> f64 {
        match q {
            DomainQuantity::CollisionAngle => c.angle.degrees(),
            DomainQuantity::ImpactVelocity => c.impact_velocity.si(),
            DomainQuantity::ParentMach => c.collision_velocity.si() / pair.parent.hugoniot.c0.si(),
            DomainQuantity::FlyerMach => c.flow_velocity.si() / pair.flyer.hugoniot.c0.si(),
            DomainQuantity::FlyerThickness => pair.flyer_thickness.si(),
        }
    }

    /// The bound on `q`, if any.
    pub fn bound(&self, q: DomainQuantity) -> Option<&DomainBound> {
        self.bounds.iter().find(|b| b.quantity == q)
    }

    /// The comparison behind every check: the quantity's raw value at the point and the
    /// bound's ends in the same scale. The Mach bounds compare the inflow speed with the bound
    /// times C0 (`min * C0 <= V <= max * C0`), so that a caller can precompute the products and
    /// get the same answer bit for bit (the weld map does).
    pub fn raw(b: &DomainBound, pair: &PairSetup, c: &Collision) -> (f64, f64, f64) {
        match b.quantity {
            DomainQuantity::ParentMach => {
                let c0 = pair.parent.hugoniot.c0.si();
                (c.collision_velocity.si(), b.min * c0, b.max * c0)
            }
            DomainQuantity::FlyerMach => {
                let c0 = pair.flyer.hugoniot.c0.si();
                (c.flow_velocity.si(), b.min * c0, b.max * c0)
            }
            q => (Self::value(q, pair, c), b.min, b.max),
        }
    }

    /// Whether the point meets bound `b`; a value that is not a number does not.
    pub fn meets(b: &DomainBound, pair: &PairSetup, c: &Collision) -> bool {
        let (v, lo, hi) = Self::raw(b, pair, c);
        v >= lo && v <= hi
    }

    /// Every bound the point misses (empty: inside the domain). A value that is not a number
    /// misses its bound.
    pub fn check(&self, pair: &PairSetup, c: &Collision) -> Vec<DomainExit> {
        self.bounds
            .iter()
            .filter_map(|b| {
                let v = Self::value(b.quantity, pair, c);
                (!Self::meets(b, pair, c)).then(|| DomainExit {
                    quantity: b.quantity,
                    value: v,
                    min: b.min,
                    max: b.max,
                    limits: b.limits.clone(),
                    source: b.source,
                })
            })
            .collect()
    }

    /// How far inside the domain the point lies: the smallest relative margin over every
    /// bound ((value - min) / min and (max - value) / max, open ends left out), positive
    /// inside, negative outside, zero on the edge. A smooth field for drawing the domain's
    /// edge; the verdict uses [`Self::contains`].
    pub fn margin(&self, pair: &PairSetup, c: &Collision) -> f64 {
        let mut m = f64::INFINITY;
        for b in &self.bounds {
            let (v, lo, hi) = Self::raw(b, pair, c);
            if lo > 0.0 && lo.is_finite() {
                m = m.min((v - lo) / lo);
            }
            if hi.is_finite() && hi > 0.0 {
                m = m.min((hi - v) / hi);
            }
        }
        m
    }

    /// Whether the point meets every bound.
    pub fn contains(&self, pair: &PairSetup, c: &Collision) -> bool {
        self.bounds.iter().all(|b| Self::meets(b, pair, c))
    }

    /// Bounds the pair itself misses whatever the point (the flyer thickness).
    pub fn pair_exits(&self, pair: &PairSetup) -> Vec<DomainExit> {
        self.bounds
            .iter()
            .filter(|b| b.quantity == DomainQuantity::FlyerThickness)
            .filter_map(|b| {
                let v = pair.flyer_thickness.si();
                (!(v >= b.min && v <= b.max)).then(|| DomainExit {
                    quantity: b.quantity,
                    value: v,
                    min: b.min,
                    max: b.max,
                    limits: b.limits.clone(),
                    source: b.source,
                })
            })
            .collect()
    }

    /// The limits evaluated outside their part of the domain, sorted, without repeats.
    pub fn extrapolated(exits: &[DomainExit]) -> Vec<CriterionId> {
        let mut v: Vec<CriterionId> = exits.iter().flat_map(|e| e.limits.clone()).collect();
        v.sort();
        v.dedup();
        v
    }

    /// The stretch of the factor x > 0 such that the collision with every speed of `c`
    /// multiplied by x (the same angle: Vp, Vc and Vf all scale with x) lies inside the domain;
    /// `None` when no factor does (the angle or the thickness is outside, or the speed bounds
    /// leave nothing). Used to bound searches along the impact velocity at a fixed angle.
    pub fn speed_scale_interval(&self, pair: &PairSetup, c: &Collision) -> Option<(f64, f64)> {
        let (mut lo, mut hi) = (0.0f64, f64::INFINITY);
        for b in &self.bounds {
            let v = Self::value(b.quantity, pair, c);
            match b.quantity {
                DomainQuantity::CollisionAngle | DomainQuantity::FlyerThickness => {
                    if !(v >= b.min && v <= b.max) {
                        return None;
                    }
                }
                _ => {
                    if !(v > 0.0 && v.is_finite()) {
                        return None;
                    }
                    lo = lo.max(b.min / v);
                    hi = hi.min(b.max / v);
                }
            }
        }
        (lo <= hi && hi > 0.0).then_some((lo, hi))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::criteria::tests::al6061;
    use crate::kinematics::Convention;
    use crate::units::{Angle, Length, Velocity};
    use proptest::prelude::*;

    fn pair(h: f64) -> PairSetup {
        PairSetup::new(al6061(), al6061(), Length::from_m(h), None).unwrap()
    }

    fn at(vp: f64, deg: f64) -> Collision {
        Collision::from_impact(
            Convention::NormalToFlyer,
            Velocity::from_m_s(vp),
            Angle::from_degrees(deg),
        )
        .unwrap()
    }

    /// The cases of issue 14: a steep angle, a hypervelocity impact, a tiny angle that sends
    /// Vc far above C0, a 500 mm flyer.
    #[test]
    fn the_cases_of_issue_14_lie_outside() {
        let d = ValidityDomain::default();
        let p = pair(1e-3);
        assert!(d.contains(&p, &at(420.0, 11.0)));
        let steep = d.check(&p, &at(420.0, 89.9));
        assert_eq!(steep[0].quantity, DomainQuantity::CollisionAngle);
        assert!(
            steep[0].text().contains("is above 30 deg"),
            "{}",
            steep[0].text()
        );
        let fast = d.check(&p, &at(35_000.0, 12.0));
        assert!(fast
            .iter()
            .any(|e| e.quantity == DomainQuantity::ImpactVelocity));
        let grazing = d.check(&p, &at(900.0, 1.0));
        assert!(grazing
            .iter()
            .any(|e| e.quantity == DomainQuantity::ParentMach));
        let thick = d.check(&pair(0.5), &at(420.0, 11.0));
        assert_eq!(thick[0].quantity, DomainQuantity::FlyerThickness);
        assert_eq!(d.pair_exits(&pair(0.5)).len(), 1);
        assert!(ValidityDomain::extrapolated(&thick).contains(&CriterionId::MeltingUpper));
    }

    #[test]
    fn every_bound_has_a_source() {
        for b in &ValidityDomain::default().bounds {
            assert!(
                b.source.starts_with("common practice") || b.source.contains("et al."),
                "{:?}",
                b.quantity
            );
            assert!(b.min < b.max);
        }
    }

    proptest! {
        /// Scaling the speeds by a factor inside the interval keeps the point inside, and just
        /// outside it leaves it.
        #[test]
        fn the_speed_scale_interval_is_the_domain_along_the_velocity(deg in 0.2f64..40.0, vp in 10.0f64..5000.0) {
            let d = ValidityDomain::default();
            let p = pair(1e-3);
            let c = at(vp, deg);
            match d.speed_scale_interval(&p, &c) {
                Some((lo, hi)) => {
                    for x in [lo * 1.000001, 0.5 * (lo + hi), hi * 0.999999] {
                        prop_assert!(d.contains(&p, &at(vp * x, deg)), "{x}");
                    }
                    prop_assert!(!d.contains(&p, &at(vp * lo * 0.999, deg)));
                    prop_assert!(!d.contains(&p, &at(vp * hi * 1.001, deg)));
                }
                None => {
                    for x in [0.01, 0.1, 1.0, 10.0] {
                        prop_assert!(!d.contains(&p, &at(vp * x, deg)));
                    }
                }
            }
        }
    }
}
