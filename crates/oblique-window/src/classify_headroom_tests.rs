//! Headroom tests of `classify` (kept apart so that classify.rs stays short).

use super::*;
use crate::advice::*;
use crate::library::Library;

fn demo() -> PairWindow {
    Library::load(&[])
        .expect("built-in library")
        .pair("demo-al6061-on-cu")
        .expect("demo pair")
        .clone()
}

fn satisfied(w: &PairWindow, limit: &LimitRef, v: f64, deg: f64) -> bool {
    let setup = w.setup().expect("setup");
    let col = Collision::from_impact(
        w.convention,
        Velocity::from_m_s(v),
        Angle::from_degrees(deg),
    )
    .expect("collision");
    let c = classify(w, &setup, &col).expect("classifies");
    match limit {
        LimitRef::Criterion(id) => c.evaluation.criterion(*id).expect("enabled").satisfied,
        LimitRef::Boundary(i) => c.boundaries[*i].satisfied.expect("in range"),
    }
}

/// Following the advice cures the limit, and stopping just short of it does not: the
/// headroom is found along the user's controls, not at a frozen collision-point velocity.
#[test]
fn following_the_headroom_crosses_the_limit() {
    let w = demo();
    let setup = w.setup().expect("setup");
    for (v, deg, limit) in [
        (360.0, 18.0, LimitRef::Criterion(CriterionId::DeribasLower)),
        (450.0, 10.0, LimitRef::Criterion(CriterionId::MeltingUpper)),
        (300.0, 10.0, LimitRef::Criterion(CriterionId::StrengthLower)),
        (450.0, 10.0, LimitRef::Boundary(0)),
    ] {
        let col = Collision::from_impact(
            w.convention,
            Velocity::from_m_s(v),
            Angle::from_degrees(deg),
        )
        .expect("collision");
        let mut c = classify(&w, &setup, &col).expect("classifies");
        explain(&w, &setup, &mut c);
        let h = c
            .headroom
            .iter()
            .find(|(l, _)| *l == limit)
            .expect("headroom")
            .1;
        let vstar = h.velocity_m_s.expect("reached along the velocity");
        let before = satisfied(&w, &limit, v, deg);
        let side = if vstar > v { 1.0 } else { -1.0 };
        assert_eq!(
            satisfied(&w, &limit, vstar - side * 0.5, deg),
            before,
            "{limit:?} at {vstar}"
        );
        assert_eq!(
            satisfied(&w, &limit, vstar + side * 0.5, deg),
            !before,
            "{limit:?} at {vstar}"
        );
    }
}

/// The melting limit's own margin (+277 m/s at 450 m/s and 10 deg) is taken at a frozen
/// collision-point velocity; along the impact velocity at 10 deg the limit is reached much
/// sooner (independent check: 560 m/s passes, 600 m/s fails in `check`).
#[test]
fn melting_headroom_is_smaller_than_the_frozen_margin() {
    let w = demo();
    let setup = w.setup().expect("setup");
    let col = Collision::from_impact(
        w.convention,
        Velocity::from_m_s(450.0),
        Angle::from_degrees(10.0),
    )
    .expect("collision");
    let c = classify_explained(&w, &setup, &col).expect("classifies");
    let frozen = c
        .evaluation
        .criterion(CriterionId::MeltingUpper)
        .expect("on")
        .margin;
    let v = c
        .headroom
        .iter()
        .find(|(l, _)| *l == LimitRef::Criterion(CriterionId::MeltingUpper))
        .expect("h")
        .1
        .velocity_m_s
        .expect("v");
    assert!(v - 450.0 < 0.5 * frozen, "{v} vs frozen margin {frozen}");
    assert!(v > 560.0 && v < 600.0, "{v}");
}
