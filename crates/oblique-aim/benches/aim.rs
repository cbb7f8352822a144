//! Benchmarks of the aiming engines (figures in docs/performance.md).

use criterion::{criterion_group, criterion_main, Criterion};
use oblique_aim::setups::{search, CoilFamily, SetupSearch};
use oblique_aim::{aim, trade, AimRequest, Control, Spread, TradeRequest};
use oblique_confidence::VelocitySpread;
use oblique_setup::grid::Grid;
use oblique_setup::{BankRequest, Catalog, ChargeGrid, Integration};

fn bench(c: &mut Criterion) {
    let lib = oblique_window::Library::load(&[]).expect("library");
    let w = lib.pair("demo-al6061-on-cu").expect("demo").clone();
    c.bench_function("trade, 200 angles at 450 m/s", |b| {
        b.iter(|| {
            trade(&TradeRequest {
                window: &w,
                convention: w.convention,
                control: Control::Angle {
                    velocity: 450.0,
                    from_deg: 2.0,
                    to_deg: 30.0,
                },
                steps: 200,
                probability: None,
            })
            .expect("trade")
        });
    });
    c.bench_function(
        "aim over the demo window (grid, refinement, ranked list, region)",
        |b| {
            b.iter(|| {
                aim(&AimRequest {
                    window: &w,
                    spread: Spread {
                        velocity: VelocitySpread::Relative(0.03),
                        angle_deg: 1.0,
                        model: true,
                    },
                    top: 10,
                    level: 0.9,
                    seed: 1,
                    samples: None,
                    basis: String::new(),
                })
                .expect("aim")
            });
        },
    );
    let catalog = Catalog::builtin().expect("catalog");
    let mut g = c.benchmark_group("set-ups");
    g.sample_size(10);
    g.bench_function("aim over 10^4 set-ups with the tube model", |b| {
        b.iter(|| {
            search(
                &catalog,
                &SetupSearch {
                    window: &w,
                    bank: BankRequest::machine("harbourside-bank-300uf"),
                    coils: CoilFamily {
                        file: None,
                        bore: Some(Grid::List(vec![21e-3])),
                        length: Some(Grid::Range(20e-3, 60e-3)),
                        extra_inductance: Some(20e-9),
                    },
                    tube_outer_radius: 20e-3,
                    charge: ChargeGrid::Voltages(Grid::Range(6e3, 12e3)),
                    standoffs: Grid::Range(1e-3, 3e-3),
                    chamfers: Grid::Range(4f64.to_radians(), 22f64.to_radians()),
                    steps: 10,
                    efficiency: None,
                    max_current: None,
                    max_energy: None,
                    integration: Integration::default(),
                    velocity_sd: None,
                    angle_sd_deg: None,
                    model: true,
                    samples: None,
                    seed: 1,
                    top: 10,
                    window_from_file: true,
                },
            )
            .expect("search")
        });
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
