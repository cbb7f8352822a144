//! Confidence in a verdict from Rust: the weld probability of one point of the example shop's
//! pair under 5 % velocity and 1 deg angle scatter (with the model's constants and materials
//! sampled too), what dominates its doubt, the pair's constants fitted to its ten trial shots,
//! and the next two shots that would tell most about them.
//!
//! Run: `cargo run -p oblique-cli --example weld_probability`
//!
//! The pair window in `examples/shop/` is INVENTED example data. A probability is a screening
//! estimate conditional on the model and the stated distributions (docs/theory.md §15), never a
//! guarantee of a weld; pulsed-power banks store lethal energy: follow local codes and licensed
//! practice before any shot.

use oblique_confidence::fit::{fit, FitSettings};
use oblique_confidence::next_shot::{next_shots, NextShotSettings};
use oblique_confidence::{weld_probability, Point, Sampling, Scatter, VelocitySpread};
use oblique_core::units::{Angle, Velocity};
use oblique_window::Library;
use std::path::PathBuf;

/// The example's body; `main` so that `cargo run --example` runs it, public so that the test
/// suite runs it too.
pub fn main() {
    let shop = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../examples/shop");
    let lib = Library::load(&[shop]).expect("the built-in library and the example shop load");
    let window = lib
        .pair("larchmont-al1100-on-cu")
        .expect("the example pair is in examples/shop");

    // 1. The weld probability at 400 m/s, 11 deg (in the pair's convention).
    let point = Point::impact(
        window.convention,
        Velocity::from_m_s(400.0),
        Angle::from_degrees(11.0),
    );
    let scatter = Scatter {
        velocity: Some(VelocitySpread::Relative(0.05)),
        angle: Some(Angle::from_degrees(1.0)),
        model: true,
    };
    let sampling = Sampling {
        samples: 20_000,
        ..Sampling::default()
    };
    let p = weld_probability(window, &point, &scatter, &sampling).expect("the point samples");
    println!(
        "{} at 400 m/s, 11 deg: weld probability {:.1} % +- {:.1} % ({})",
        window.name,
        100.0 * p.inside,
        100.0 * p.standard_error,
        scatter.text()
    );
    for f in &p.criteria_failure {
        println!(
            "  {} fails in {:.1} % of the samples",
            f.limit,
            100.0 * f.probability
        );
    }
    println!("  {}", p.doubt);

    // 2. The constants fitted to the pair's trials.
    let fitted = fit(window, &FitSettings::default()).expect("the pair has trials");
    for c in &fitted.constants {
        println!(
            "  {} {:.4} (was {}), 95 % interval {}",
            c.constant.key(),
            c.value,
            c.before,
            oblique_confidence::present::interval(c.low, c.high)
        );
    }

    // 3. The next two shots.
    let next = next_shots(
        window,
        &NextShotSettings {
            count: 2,
            ..NextShotSettings::default()
        },
    )
    .expect("shots");
    for s in &next.shots {
        println!(
            "  next: {:.0} m/s at {:.1} deg ({})",
            s.velocity_m_s, s.angle_deg, s.reason
        );
    }
    println!("{}", p.caution);
    assert!(p.inside > 0.0 && p.inside <= 1.0);
    assert_eq!(next.shots.len(), 2);
}
