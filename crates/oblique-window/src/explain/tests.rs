use super::*;
use crate::advice::explain_in;
use crate::classify::classify;
use oblique_core::units::{Angle, Velocity};
use oblique_core::Convention;

fn derivation(conv: Convention, vp: f64, deg: f64) -> (Derivation, Classification) {
    let lib = crate::Library::load(&[]).expect("library");
    let w = lib.pair("demo-al6061-on-cu").expect("demo").clone();
    let setup = w.setup().expect("setup");
    let given = Collision::from_impact(conv, Velocity::from_m_s(vp), Angle::from_degrees(deg))
        .expect("point");
    let mut c = classify(&w, &setup, &given).expect("classify");
    explain_in(&w, &setup, &mut c, conv);
    let d = derive(&w, &given, GivenVelocity::Impact, &c, true).expect("derive");
    (d, c)
}

fn figure<'a>(d: &'a Derivation, step: &str, key: &str) -> &'a Figure {
    d.steps
        .iter()
        .filter(|s| s.key == step)
        .flat_map(|s| s.results.iter())
        .find(|f| f.key == key)
        .unwrap_or_else(|| panic!("{step}.{key}"))
}

#[test]
fn results_are_the_classifications_values() {
    let (d, c) = derivation(Convention::NormalToFlyer, 450.0, 10.0);
    let e = &c.evaluation;
    assert_eq!(
        figure(&d, "kinematics", "collision_velocity_m_s").value,
        Some(e.collision.collision_velocity.si())
    );
    assert_eq!(
        figure(&d, "impact-pressure", "impact_pressure_pa").value,
        Some(e.impact.pressure.si())
    );
    for r in &e.criteria {
        assert_eq!(
            figure(&d, r.id.as_str(), "limit").value,
            Some(r.limit),
            "{}",
            r.id
        );
        assert_eq!(
            figure(&d, r.id.as_str(), "margin").value,
            Some(r.margin),
            "{}",
            r.id
        );
    }
    let text = d.text();
    assert!(text.contains("Vc = 450.0 m/s / sin(10.00 deg)"), "{text}");
    assert!(text.contains("2591.4 m/s"), "{text}");
    assert!(text.contains("verdict: INSIDE the window"), "{text}");
    assert!(text.contains(crate::present::CAUTION));
}

#[test]
fn a_point_in_another_convention_is_re_expressed_first() {
    let (d, c) = derivation(Convention::Bisector, 450.0, 10.0);
    assert!(d.steps.iter().any(|s| s.key == "convention"));
    assert_eq!(
        figure(&d, "convention", "impact_velocity_m_s").value,
        Some(c.evaluation.collision.impact_velocity.si())
    );
}

#[test]
fn four_significant_digits() {
    assert_eq!(g(2703.0), "2703");
    assert_eq!(g(1.489), "1.489");
    assert_eq!(g(0.6), "0.6");
    assert_eq!(g(0.12345), "0.1235");
    assert_eq!(g(2.5e7), "2.500e7");
}
