//! Where the weld map's classification time goes, one core, best of 5 passes over the rows of
//! the 5 000 000-row benchmark file (`bench/gen_interface.py`, or a path given as the argument):
//!
//! 1. the map's own classifier (`oblique_map::Classifier::classify`, the code that runs) on the
//!    built-in demo window, then on copies of it with the user boundaries removed, with the
//!    jetting criterion off, and with both: the differences are what those limits cost;
//! 2. the jetting table's lookup alone, over the rows with a supersonic stream;
//! 3. the libm sine and cosine alone;
//! 4. the arithmetic of the five criteria, the collision velocities and the impact pressure (a
//!    stand-in with the classifier's operations: one sine and cosine, 8 divisions, 2 square
//!    roots), one row at a time as the classifier does it, against the same operations batched
//!    across rows so that the compiler can put several rows in one vector register (SSE2, and
//!    AVX2 where the CPU has it). Per row the operations and their order are the same, so the
//!    batched results are bit for bit the scalar ones (checked). This is the ceiling of the
//!    vector route for the arithmetic part of the classification.

use oblique_core::jetting_table::Lookup;
use oblique_map::{Classifier, JettingMode, VelocityKind};
use oblique_window::{Library, PairWindow};
use std::hint::black_box;
use std::time::Instant;

/// Rows per batch of the batched arithmetic.
const BATCH: usize = 256;

/// Best time of 5 passes of `f`, in ns per row of `rows`.
fn best_ns(rows: usize, mut f: impl FnMut()) -> f64 {
    (0..5)
        .map(|_| {
            let t = Instant::now();
            f();
            t.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min)
        * 1e9
        / rows as f64
}

/// The stand-in row: the operations of the classifier's collision, impact pressure and five
/// criteria (with their relative margins), given the sine and cosine of the angle.
#[derive(Clone, Copy)]
struct Consts {
    r1: f64,
    c1: f64,
    s1: f64,
    r2: f64,
    c2: f64,
    s2: f64,
    a: f64,
    b0: f64,
    b1: f64,
}

#[inline(always)]
fn row(k: &Consts, v: f64, beta: f64, s: f64, c: f64) -> f64 {
    let vc = v * (1.0 / s);
    let vf = vc * c;
    let deg = beta.to_degrees();
    let b = k.b0 + k.b1 * v;
    let cc = k.r1 * (k.c1 * v + k.s1 * v * v);
    let disc = b * b + 4.0 * k.a * cc;
    let u2 = 2.0 * cc / (b + disc.sqrt());
    let p = k.r2 * (k.c2 + k.s2 * u2) * u2;
    let deribas = (1234.0 / vc).to_degrees();
    let m1 = (deg - deribas) / deribas;
    let m2 = (v - 250.0) / 250.0;
    let m3 = (p - 1e9) / 1e9;
    let melting = 4.0e7 / (vc * vc.sqrt());
    let m4 = (melting - v) / melting;
    let m5 = (deg - 12.0) / 12.0;
    m1.min(m2).min(m3).min(m4).min(m5) + vf
}

/// The batched form: sines and cosines first (libm, one row at a time), then the arithmetic
/// of every row of the batch in a loop the compiler vectorises.
#[inline(always)]
fn batched(k: &Consts, v: &[f64], a: &[f64], out: &mut [f64]) {
    let (mut s, mut c) = ([0.0; BATCH], [0.0; BATCH]);
    for ((vb, ab), ob) in v
        .chunks_exact(BATCH)
        .zip(a.chunks_exact(BATCH))
        .zip(out.chunks_exact_mut(BATCH))
    {
        for i in 0..BATCH {
            (s[i], c[i]) = ab[i].sin_cos();
        }
        for i in 0..BATCH {
            ob[i] = row(k, vb[i], ab[i], s[i], c[i]);
        }
    }
}

/// [`batched`] compiled for AVX2 (four rows per register).
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
fn batched_avx2(k: &Consts, v: &[f64], a: &[f64], out: &mut [f64]) {
    batched(k, v, a, out);
}

/// Whether two results are the same bits, value by value.
fn same_bits(a: &[f64], b: &[f64]) -> bool {
    a.len() == b.len() && a.iter().zip(b).all(|(x, y)| x.to_bits() == y.to_bits())
}

fn window_without(w: &PairWindow, boundaries: bool, jetting: bool) -> PairWindow {
    let mut w = w.clone();
    if !boundaries {
        w.boundaries.clear();
    }
    if !jetting {
        w.criteria.jetting_enabled = false;
    }
    w
}

fn main() {
    let path = std::env::args()
        .nth(1)
        .unwrap_or_else(|| "../out/interface-5000000.csv".into());
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{path}: {e}"));
    let (mut v, mut a) = (Vec::new(), Vec::new());
    for line in text.lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        let num = |i: usize| -> f64 { f[i].parse().unwrap_or_else(|_| panic!("{line}")) };
        v.push(num(3));
        a.push(num(4).to_radians());
    }
    let n = v.len() / BATCH * BATCH;
    v.truncate(n);
    a.truncate(n);
    println!("{n} rows of {path}; one core, best of 5 passes");

    let lib = Library::load(&[]).expect("built-in library");
    let demo = lib.pair("demo-al6061-on-cu").expect("demo window");
    let mut margins = Vec::new();
    println!("1. the classifier (oblique_map::Classifier::classify):");
    let cases = [
        ("demo window (5 criteria, 2 boundaries)", true, true),
        ("  without its boundaries", false, true),
        ("  without jetting", true, false),
        ("  without both", false, false),
    ];
    let mut supersonic = Vec::new();
    for (name, boundaries, jetting) in cases {
        let w = window_without(demo, boundaries, jetting);
        let cl = Classifier::new(&w, VelocityKind::Impact, JettingMode::Table).expect("classifier");
        let (mut sonic, mut mixed, mut direct) = (0u64, 0u64, 0u64);
        for i in 0..n {
            let p = cl
                .classify(v[i], a[i], &mut margins)
                .expect("in the domain");
            sonic += u64::from(p.sonic != 0);
            mixed += u64::from(p.sonic == 1 || p.sonic == 2);
            direct += u64::from(p.jetting_direct);
            if boundaries && jetting && p.sonic != 0 {
                supersonic.push((p.vf, p.vc));
            }
        }
        let mut verdicts = 0u64;
        let t = best_ns(n, || {
            for i in 0..n {
                let p = cl.classify(black_box(v[i]), black_box(a[i]), &mut margins);
                verdicts += p.map_or(0, |p| p.verdict.index() as u64);
            }
        });
        black_box(verdicts);
        println!(
            "   {name:40} {t:6.1} ns a row   ({} limits; rows with a supersonic stream {sonic}, mixed {mixed}; direct jetting solves {direct})",
            cl.limits.len()
        );
    }

    let cl = Classifier::new(demo, VelocityKind::Impact, JettingMode::Table).expect("classifier");
    for i in 0..n {
        let _ = cl.classify(v[i], a[i], &mut margins);
    }
    let table = cl.table().expect("the rows reach the table");
    let t = best_ns(supersonic.len(), || {
        let mut acc = 0.0;
        for &(vf, vc) in &supersonic {
            if let Lookup::Table(r) = table.lookup(black_box(vf), black_box(vc)) {
                acc += r;
            }
        }
        black_box(acc);
    });
    println!(
        "2. the jetting table's lookup alone: {t:5.1} ns a row with a supersonic stream ({:.1} ns a row over all rows)",
        t * supersonic.len() as f64 / n as f64
    );

    let t = best_ns(n, || {
        let mut acc = 0.0;
        for &x in &a {
            let (s, c) = black_box(x).sin_cos();
            acc += s + c;
        }
        black_box(acc);
    });
    println!("3. libm sine and cosine alone: {t:5.1} ns a row");

    let setup = demo.setup().expect("demo set-up");
    let (f, p) = (&setup.flyer.hugoniot, &setup.parent.hugoniot);
    let (r1, c1, s1) = (f.density.si(), f.c0.si(), f.s);
    let (r2, c2, s2) = (p.density.si(), p.c0.si(), p.s);
    let k = Consts {
        r1,
        c1,
        s1,
        r2,
        c2,
        s2,
        a: r2 * s2 - r1 * s1,
        b0: r1 * c1 + r2 * c2,
        b1: 2.0 * r1 * s1,
    };
    let mut scalar = vec![0.0; n];
    let t_scalar = best_ns(n, || {
        for i in 0..n {
            let (s, c) = black_box(a[i]).sin_cos();
            scalar[i] = row(&k, black_box(v[i]), a[i], s, c);
        }
    });
    let mut out = vec![0.0; n];
    let t_sse2 = best_ns(n, || {
        batched(&k, black_box(&v), black_box(&a), &mut out);
    });
    assert!(same_bits(&out, &scalar), "batched bits differ");
    println!("4. the criteria's arithmetic with the sine and cosine (stand-in):");
    println!("   one row at a time                        {t_scalar:6.1} ns a row");
    println!("   batched, SSE2 (two rows a register)      {t_sse2:6.1} ns a row (same bits)");
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx2") {
        let t = best_ns(n, || {
            // SAFETY: the CPU has AVX2 (checked just above).
            unsafe { batched_avx2(&k, black_box(&v), black_box(&a), &mut out) };
        });
        assert!(same_bits(&out, &scalar), "AVX2 bits differ");
        println!("   batched, AVX2 (four rows a register)     {t:6.1} ns a row (same bits)");
    }
}
