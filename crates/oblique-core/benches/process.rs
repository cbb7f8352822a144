//! Benchmarks of the magnetic pulse process models (issue 5 targets: one estimate under 2 ms,
//! 10 000 settings under 2 s on 2 cores). The set-up is the invented, plausible tube of the unit
//! tests: 300 uF, 8 kV, 40 nH + 20 nH, 4 mohm; coil bore 21 mm radius, 20 mm long; Al 6061 tube
//! 20 mm outer radius, 1 mm wall; 2.5 mm standoff.
use criterion::{black_box, criterion_group, criterion_main, Criterion};
use oblique_core::process::*;
use oblique_core::units::*;
use std::num::NonZeroUsize;
use std::time::Duration;

fn tube() -> TubeSetup {
    let bank = CapacitorBank::new(
        Capacitance::from_f(300e-6),
        Some(Voltage::from_v(12e3)),
        Inductance::from_h(40e-9),
        Resistance::from_ohm(4e-3),
    )
    .expect("valid bank");
    let material = Workpiece::new(
        Density::from_kg_m3(2700.0),
        Pressure::from_pa(276e6),
        ElectricalConductivity::from_s_m(2.5e7),
    )
    .expect("valid material");
    TubeSetup::new(
        bank,
        CompressionCoil {
            bore_radius: Length::from_m(21e-3),
            length: Length::from_m(20e-3),
            extra_inductance: Inductance::from_h(20e-9),
        },
        Tube {
            outer_radius: Length::from_m(20e-3),
            wall_thickness: Length::from_m(1e-3),
            material,
        },
        Length::from_m(2.5e-3),
        Voltage::from_v(8e3),
    )
    .expect("valid set-up")
}

fn bench(c: &mut Criterion) {
    let setup = PulseSetup::Tube(tube());
    let with_history = IntegrationOptions::default();
    let no_history = IntegrationOptions {
        sample_every: None,
        ..IntegrationOptions::default()
    };
    c.bench_function("tube estimate, with history", |b| {
        b.iter(|| estimate(black_box(&setup), &with_history).expect("estimate"))
    });
    c.bench_function("tube estimate, no history", |b| {
        b.iter(|| estimate(black_box(&setup), &no_history).expect("estimate"))
    });

    let two = NonZeroUsize::new(2);
    // 100 voltages x 100 standoffs: one integration per voltage.
    let grid_u: Vec<Voltage> = (0..100)
        .map(|i| Voltage::from_v(2e3 + 100.0 * f64::from(i)))
        .collect();
    let grid_g: Vec<Length> = (0..100)
        .map(|j| Length::from_m(0.5e-3 + 0.05e-3 * f64::from(j)))
        .collect();
    // 10 000 voltages x 1 standoff: the worst case, 10 000 integrations.
    let line_u: Vec<Voltage> = (0..10_000)
        .map(|i| Voltage::from_v(1e3 + 1.0 * f64::from(i)))
        .collect();
    let line_g = [Length::from_m(2.5e-3)];

    let mut group = c.benchmark_group("sweep 10 000 settings, 2 threads");
    group.sample_size(10);
    group.measurement_time(Duration::from_secs(10));
    group.bench_function("100 voltages x 100 standoffs", |b| {
        b.iter(|| sweep(black_box(&setup), &grid_u, &grid_g, &no_history, two).expect("sweep"))
    });
    group.bench_function("10 000 voltages x 1 standoff", |b| {
        b.iter(|| sweep(black_box(&setup), &line_u, &line_g, &no_history, two).expect("sweep"))
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
