use super::*;
use oblique_core::units::Length;
use oblique_window::boundary::{Boundary, WeldSide};

/// A window with two pairs of parallel limits only: every criterion off, a velocity floor at
/// 300 m/s and a ceiling at 500 m/s (angles 1 to 29 deg), an angle floor at 6 deg and a ceiling
/// at 18 deg (velocities 100 to 1500 m/s). Under an absolute velocity scatter and an angle
/// scatter the best point is, in closed form, the midpoint in normalised margin of each pair:
/// 400 m/s and 12 deg (every other limit, the spans' ends and the domain's bounds, lies more
/// than 10 standard deviations away there and moves it by less than 1e-20).
pub(crate) fn two_pairs() -> PairWindow {
    let lib = oblique_window::Library::load(&[]).expect("library");
    let mut w = lib
        .ad_hoc_window(
            "aa6061-t6",
            "cu-c11000",
            Length::from_m(1e-3),
            None,
            Convention::NormalToFlyer,
            Some("magnetic-pulse"),
        )
        .expect("window");
    let c = &mut w.criteria;
    c.deribas_enabled = false;
    c.strength_enabled = false;
    c.pressure_enabled = false;
    c.melting_enabled = false;
    c.jetting_enabled = false;
    c.wavy_enabled = false;
    let b = |label: &str, side: WeldSide, pts: [(f64, f64); 2]| Boundary {
        label: label.into(),
        plane: oblique_window::boundary::Plane::AngleImpactVelocity,
        weld_side: side,
        points: pts
            .iter()
            .map(|(v, a)| (Velocity::from_m_s(*v), Angle::from_degrees(*a)))
            .collect(),
        provenance: "constructed for the closed-form test".into(),
    };
    w.boundaries = vec![
        b("floor 300", WeldSide::Right, [(300.0, 1.0), (300.0, 29.0)]),
        b("ceiling 500", WeldSide::Left, [(500.0, 1.0), (500.0, 29.0)]),
        b(
            "angle floor 6",
            WeldSide::Above,
            [(100.0, 6.0), (1500.0, 6.0)],
        ),
        b(
            "angle ceiling 18",
            WeldSide::Below,
            [(100.0, 18.0), (1500.0, 18.0)],
        ),
    ];
    w
}

fn request(w: &PairWindow, spread: Spread) -> AimRequest<'_> {
    AimRequest {
        window: w,
        spread,
        top: 5,
        level: 0.9,
        seed: 1,
        samples: Some(300),
        basis: "stated".into(),
    }
}

#[test]
fn two_parallel_pairs_give_the_midpoint_in_normalised_margin() {
    let w = two_pairs();
    for (sv, sb) in [(20.0, 1.0), (20.0, 2.0), (40.0, 0.5)] {
        let spread = Spread {
            velocity: VelocitySpread::Absolute(sv),
            angle_deg: sb,
            model: false,
        };
        let a = aim(&request(&w, spread)).expect("aim");
        let (v, b) = a.unrounded.expect("a best point");
        assert!((v - 400.0).abs() < 0.5, "sd {sv}, {sb}: {v}");
        assert!((b - 12.0).abs() < 0.02, "sd {sv}, {sb}: {b}");
        let best = a.best().expect("best");
        assert_eq!((best.velocity, best.angle_deg), (400.0, 12.0));
        // The nearest limits: 5 (or 100/40 = 2.5) standard deviations away.
        let expected = (100.0 / sv).min(6.0 / sb);
        assert!(
            (best.room.z_min - expected).abs() < 1e-3,
            "{}",
            best.room.z_min
        );
    }
}

#[test]
fn the_demo_window_has_a_best_point_inside_with_distinct_alternatives() {
    let lib = oblique_window::Library::load(&[]).expect("library");
    let w = lib.pair("demo-al6061-on-cu").expect("demo");
    let spread = Spread {
        velocity: VelocitySpread::Relative(0.03),
        angle_deg: 1.0,
        model: true,
    };
    let a = aim(&request(w, spread)).expect("aim");
    let best = a.best().expect("best");
    assert!(best.check.inside && best.room.z_min > 0.0);
    for c in &a.ranked[1..] {
        assert!(
            !c.room.better_than(&best.room),
            "{} {}",
            c.velocity,
            c.angle_deg
        );
    }
    let r = a.region.as_ref().expect("region");
    assert!(!r.is_empty());
}
