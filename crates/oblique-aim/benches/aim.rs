//! Benchmarks of the aiming engines (figures in docs/performance.md).

use criterion::{criterion_group, criterion_main, Criterion};
use oblique_aim::{trade, Control, TradeRequest};

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
}

criterion_group!(benches, bench);
criterion_main!(benches);
