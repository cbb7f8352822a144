//! Benchmark: loading a user library of 200 pair files with 100 observations each (issue 3
//! target: under 200 ms), plus the built-in library alone.
use criterion::{criterion_group, criterion_main, Criterion};
use oblique_window::Library;

fn make_library(dir: &std::path::Path) {
    let template = include_str!("../../../windows/demo-al6061-on-cu.ron");
    let start = template
        .find("    observations: [")
        .expect("template has observations");
    let head = &template[..start];
    for f in 0..200 {
        let mut text = head.replace(
            "name: \"demo-al6061-on-cu\"",
            &format!("name: \"bench-{f}\""),
        );
        text.push_str("    observations: [\n");
        for i in 0..100 {
            text.push_str(&format!(
                "        (velocity: \"{} m/s\", angle: \"{} deg\", outcome: \"{}\", process: \"magnetic-pulse\", method: \"measured\", source: \"bench {f}/{i}\"),\n",
                300 + (i * 7) % 300,
                3 + (i * 11) % 25,
                if i % 3 == 0 { "not-welded" } else { "welded" }
            ));
        }
        text.push_str("    ],\n)\n");
        std::fs::write(dir.join(format!("bench-{f}.ron")), text).expect("write");
    }
}

fn bench(c: &mut Criterion) {
    let dir = tempfile::tempdir().expect("tempdir");
    make_library(dir.path());
    let dirs = vec![dir.path().to_path_buf()];
    let mut g = c.benchmark_group("library");
    g.sample_size(20);
    g.bench_function("load built-in only", |b| {
        b.iter(|| Library::load(&[]).expect("loads"))
    });
    g.bench_function("load 200 pair files x 100 observations", |b| {
        b.iter(|| Library::load(&dirs).expect("loads"))
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
