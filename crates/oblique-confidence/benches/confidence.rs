//! Benchmarks of issue 13: the weld probability at one point (10^5 samples), a probability
//! grid for a plot (200 x 200), a fit on 500 observations and the next-shot search.
//! Figures go to docs/performance.md.

use criterion::{criterion_group, criterion_main, Criterion};
use oblique_confidence::{
    probability_grid, weld_probability, Point, Sampling, Scatter, VelocitySpread,
};
use oblique_core::units::{Angle, Velocity};
use oblique_core::Convention;
use oblique_window::boundary::Plane;
use std::hint::black_box;

fn demo() -> oblique_window::PairWindow {
    let lib = oblique_window::Library::load(&[]).expect("built-in library");
    lib.pair("demo-al6061-on-cu").expect("demo pair").clone()
}

fn scatter() -> Scatter {
    Scatter {
        velocity: Some(VelocitySpread::Relative(0.05)),
        angle: Some(Angle::from_degrees(1.0)),
        model: true,
    }
}

fn point(c: &mut Criterion) {
    let w = demo();
    let mut g = c.benchmark_group("weld_probability");
    g.sample_size(30);
    for (name, v, a) in [
        ("subsonic 450 m/s 10 deg", 450.0, 10.0),
        ("supersonic 450 m/s 5 deg", 450.0, 5.0),
    ] {
        let p = Point::impact(
            Convention::NormalToFlyer,
            Velocity::from_m_s(v),
            Angle::from_degrees(a),
        );
        let sampling = Sampling {
            samples: 100_000,
            ..Sampling::default()
        };
        // The lazy jetting tables fill on first use: warm them outside the timing.
        let _ = weld_probability(&w, &p, &scatter(), &sampling);
        g.bench_function(format!("1e5 samples, {name}"), |b| {
            b.iter(|| black_box(weld_probability(&w, &p, &scatter(), &sampling).expect("p")))
        });
    }
    g.finish();
}

fn grid(c: &mut Criterion) {
    let w = demo();
    let mut g = c.benchmark_group("probability_grid");
    g.sample_size(10);
    let xs: Vec<f64> = (0..200).map(|i| 800.0 * (i as f64 + 0.5) / 200.0).collect();
    let ys: Vec<f64> = (0..200).map(|j| 35.0 * (j as f64 + 0.5) / 200.0).collect();
    let sampling = Sampling {
        samples: oblique_confidence::grid::DEFAULT_GRID_SAMPLES,
        ..Sampling::default()
    };
    g.bench_function(
        "200 x 200 nodes, 256 draws each, angle-impact-velocity",
        |b| {
            b.iter(|| {
                black_box(
                    probability_grid(
                        &w,
                        Plane::AngleImpactVelocity,
                        xs.clone(),
                        ys.clone(),
                        &scatter(),
                        &sampling,
                    )
                    .expect("grid"),
                )
            })
        },
    );
    g.finish();
}

fn fit_and_next_shot(c: &mut Criterion) {
    use oblique_confidence::fit::{fit, synthetic_trials, SyntheticDesign};
    use oblique_confidence::next_shot::{next_shots, NextShotSettings};
    let w = demo();
    let mut g = c.benchmark_group("fit");
    g.sample_size(10);
    // An invented series of 500 shots (the recovery test's design).
    let trials = synthetic_trials(
        &w,
        &SyntheticDesign {
            truth: [0.8, 0.13, 5.0],
            shots: 500,
            velocity_m_s: (250.0, 900.0),
            angle_deg: (2.0, 30.0),
            sd_velocity_relative: 0.03,
            sd_angle_deg: 1.0,
            seed: 7,
        },
    )
    .expect("trials");
    g.bench_function(
        "pair fit, 500 observations (k and N, profile intervals)",
        |b| b.iter(|| black_box(fit(&trials, &Default::default()).expect("fit"))),
    );
    g.bench_function("next-shot, 3 shots, demo pair (fit included)", |b| {
        b.iter(|| black_box(next_shots(&w, &NextShotSettings::default()).expect("shots")))
    });
    g.bench_function("next-shot, 3 shots, 500 observations (fit included)", |b| {
        b.iter(|| black_box(next_shots(&trials, &NextShotSettings::default()).expect("shots")))
    });
    g.finish();
}

criterion_group!(benches, point, grid, fit_and_next_shot);
criterion_main!(benches);
