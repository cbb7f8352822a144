//! Benchmark of the full single-point evaluation: kinematics, impedance matching, all criteria
//! and the jetting test (target: under 20 us, issue 2).
use criterion::{black_box, criterion_group, criterion_main, Criterion};
use oblique_core::hugoniot::Hugoniot;
use oblique_core::units::*;
use oblique_core::*;

fn material(rho: f64, c0: f64, s: f64, hv: f64, uts: f64) -> Material {
    Material {
        id: "bench".into(),
        name: "bench".into(),
        hugoniot: Hugoniot::new(Density::from_kg_m3(rho), Velocity::from_m_s(c0), s)
            .expect("valid"),
        vickers_hardness: Pressure::from_vickers(hv),
        yield_strength: Pressure::from_pa(0.8 * uts),
        tensile_strength: Pressure::from_pa(uts),
        bulk_modulus: Pressure::from_pa(70e9),
        shear_modulus: Pressure::from_pa(26e9),
        melting_temperature: Temperature::from_k(900.0),
        thermal_conductivity: ThermalConductivity::from_w_m_k(160.0),
        specific_heat: SpecificHeat::from_j_kg_k(900.0),
        electrical_conductivity: ElectricalConductivity::from_s_m(2.5e7),
    }
}

fn bench(c: &mut Criterion) {
    let al = material(2700.0, 5350.0, 1.34, 107.0, 310e6);
    let cu = material(8930.0, 3940.0, 1.489, 50.0, 220e6);
    let pair = PairSetup::new(al, cu, Length::from_m(1e-3), None).expect("valid");
    let cfg = CriteriaConfig::default();
    // Supersonic inflow for both streams, so the polar construction runs (the slow path).
    c.bench_function("single point, supersonic (polar jetting)", |b| {
        b.iter(|| {
            let col = Collision::from_collision_velocity(
                Convention::Bisector,
                Velocity::from_m_s(black_box(6000.0)),
                Angle::from_degrees(black_box(12.0)),
            )
            .expect("valid");
            evaluate(&pair, &col, &cfg).expect("evaluates")
        })
    });
    c.bench_function("single point, subsonic", |b| {
        b.iter(|| {
            let col = Collision::from_impact(
                Convention::NormalToFlyer,
                Velocity::from_m_s(black_box(350.0)),
                Angle::from_degrees(black_box(12.0)),
            )
            .expect("valid");
            evaluate(&pair, &col, &cfg).expect("evaluates")
        })
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
