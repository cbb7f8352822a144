//! Best-of-15 timings, one core, of the weld map's hand-written hot paths against the crates
//! that could replace them (see Cargo.toml). Input: the number fields and lines of the
//! 2 000 000-row benchmark file (`bench/gen_interface.py`), or a path given as the argument.

#[allow(dead_code)]
#[path = "../../../crates/oblique-map/src/input/fields.rs"]
mod fields;
#[allow(dead_code)]
#[path = "../../../crates/oblique-map/src/format.rs"]
mod format;
#[allow(dead_code)]
#[path = "../../../crates/oblique-map/src/input/number.rs"]
mod number;
#[allow(dead_code)]
#[path = "../../../crates/oblique-map/src/input/plain_row.rs"]
mod plain_row;

/// The part of the map's `input::header` that `plain_row` reads.
mod header {
    pub struct Column {
        pub index: usize,
        pub factor: f64,
    }
    pub struct Header {
        pub cells: Vec<String>,
        pub position: Column,
        pub velocity: Column,
        pub angle: Column,
        pub time: Option<Column>,
    }
}

use std::time::Instant;

/// Best time of 15 passes of `f`, in seconds.
fn best(mut f: impl FnMut()) -> f64 {
    (0..15)
        .map(|_| {
            let t = Instant::now();
            f();
            t.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min)
}

const POW10: [f64; 5] = [1.0, 10.0, 100.0, 1000.0, 10000.0];
const POW10U: [u64; 5] = [1, 10, 100, 1000, 10000];

/// The map's rounding with the digits by `itoa` (the library alternative to `fixed_n`).
#[inline(always)]
fn fixed_itoa<const DEC: usize>(out: &mut Vec<u8>, x: f64) {
    let scaled = x.abs() * POW10[DEC] + 0.5;
    let n = scaled as u64;
    if x < 0.0 {
        out.push(b'-');
    }
    let mut b = itoa::Buffer::new();
    out.extend_from_slice(b.format(n / POW10U[DEC]).as_bytes());
    if DEC > 0 {
        out.push(b'.');
        out.extend_from_slice(&b.format(n % POW10U[DEC] + POW10U[DEC]).as_bytes()[1..]);
    }
}

/// Every record of `input` read by `csv-core`'s reader (records end at `\n`): `f` sees the
/// record's fields copied into `out`, and their ends.
fn csv_core_records(
    input: &[u8],
    out: &mut [u8],
    ends: &mut [usize],
    mut f: impl FnMut(&[u8], &[usize]),
) {
    let mut rdr = csv_core::ReaderBuilder::new()
        .terminator(csv_core::Terminator::Any(b'\n'))
        .build();
    let mut pos = 0;
    loop {
        let (res, nin, _, nend) = rdr.read_record(&input[pos..], out, ends);
        pos += nin;
        match res {
            csv_core::ReadRecordResult::Record => f(out, &ends[..nend]),
            csv_core::ReadRecordResult::End => break,
            _ => {}
        }
    }
}

fn main() {
    let path = std::env::args()
        .nth(1)
        .unwrap_or_else(|| "../out/interface-2000000.csv".into());
    let data = std::fs::read(&path).unwrap_or_else(|e| panic!("{path}: {e}"));
    let body_start = memchr::memchr(b'\n', &data).map_or(0, |p| p + 1);
    let body = &data[body_start..];
    let body = &body[..memchr::memrchr(b'\n', body).map_or(0, |p| p + 1)];
    let rows = memchr::memchr_iter(b'\n', body).count();

    // Parsing: every field but the id.
    let mut spans = Vec::new();
    let mut f = fields::Fields::default();
    let mut pos = 0;
    while pos < body.len() {
        let end = fields::split_plain_record(body, pos, &mut f);
        spans.extend(f.ranges.iter().skip(1).map(|&(s, e)| (pos + s, pos + e)));
        pos = end + 1;
    }
    let per_field = |t: f64| t * 1e9 / spans.len() as f64;
    let mut sum = 0.0;
    let parsers: [(&str, &dyn Fn(&[u8]) -> Option<f64>); 4] = [
        ("map (plain_decimal, fast-float2 behind)", &|b| {
            number::parse_number(b)
        }),
        ("fast-float2", &|b| {
            fast_float2::parse::<f64, _>(b)
                .ok()
                .filter(|v| v.is_finite())
        }),
        ("lexical-core", &|b| {
            lexical_core::parse::<f64>(b).ok().filter(|v| v.is_finite())
        }),
        ("std", &|b| std::str::from_utf8(b).ok()?.parse::<f64>().ok()),
    ];
    println!("parse: {} number fields", spans.len());
    for (name, p) in parsers {
        let t = best(|| {
            for &(s, e) in &spans {
                sum += p(&body[s..e]).unwrap_or(0.0);
            }
        });
        println!("  {name:42} {:6.2} ns a field", per_field(t));
    }

    // Formatting: a collision velocity (1 decimal), a pressure (3), a relative margin (4).
    let mut xs = Vec::with_capacity(1_000_000);
    let mut s = 12345u64;
    for _ in 0..1_000_000 {
        s = s
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        let u = (s >> 11) as f64 / (1u64 << 53) as f64;
        xs.push((1000.0 + 7000.0 * u, 1.0 + 3.0 * u, -0.9 + 1.8 * u));
    }
    let mut tb = format::TextBuf::default();
    let t = best(|| {
        tb.clear();
        for &(a, b, c) in &xs {
            let mut w = tb.writer(200);
            w.fixed_n::<1>(a);
            w.push(b',');
            w.fixed_n::<3>(b);
            w.push(b',');
            w.fixed_n::<4>(c);
            w.push(b'\n');
            let n = w.written();
            tb.commit(n);
        }
    });
    let swar = tb.as_bytes().to_vec();
    println!("format: 3 000 000 numbers with fixed decimals");
    println!(
        "  {:42} {:6.2} ns a number",
        "map (fixed_n, SWAR)",
        t * 1e9 / 3e6
    );
    let mut v: Vec<u8> = Vec::with_capacity(64 << 20);
    let t = best(|| {
        v.clear();
        for &(a, b, c) in &xs {
            fixed_itoa::<1>(&mut v, a);
            v.push(b',');
            fixed_itoa::<3>(&mut v, b);
            v.push(b',');
            fixed_itoa::<4>(&mut v, c);
            v.push(b'\n');
        }
    });
    assert!(v == swar, "the same text");
    println!(
        "  {:42} {:6.2} ns a number",
        "itoa (same rounding)",
        t * 1e9 / 3e6
    );
    let counted: Vec<u8> = (2..1_000_002u64)
        .flat_map(|r| format!("{r},").into_bytes())
        .collect();
    let t = best(|| {
        tb.clear();
        for r in 2..1_000_002u64 {
            let mut w = tb.writer(64);
            w.u64(r);
            w.push(b',');
            let n = w.written();
            tb.commit(n);
        }
    });
    assert!(tb.as_bytes() == counted, "the same text");
    println!(
        "  {:42} {:6.2} ns a row number",
        "map (RowWriter::u64, SWAR)",
        t * 1e9 / 1e6
    );
    let t = best(|| {
        v.clear();
        let mut b = itoa::Buffer::new();
        for r in 2..1_000_002u64 {
            v.extend_from_slice(b.format(r).as_bytes());
            v.push(b',');
        }
    });
    assert!(v == counted, "the same text");
    println!("  {:42} {:6.2} ns a row number", "itoa", t * 1e9 / 1e6);

    // Splitting quote-free lines into fields.
    let mut total = 0usize;
    let t = best(|| {
        let mut pos = 0;
        while pos < body.len() {
            pos = fields::split_plain_record(body, pos, &mut f) + 1;
            total += f.ranges.len();
        }
    });
    println!("split: {rows} lines");
    println!(
        "  {:42} {:6.2} ns a line",
        "map (split_plain_record)",
        t * 1e9 / rows as f64
    );
    let mut out = vec![0u8; 4096];
    let mut ends = vec![0usize; 256];
    let t = best(|| {
        csv_core_records(body, &mut out, &mut ends, |_, e| total += e.len());
    });
    println!(
        "  {:42} {:6.2} ns a line",
        "csv-core Reader::read_record",
        t * 1e9 / rows as f64
    );

    // Records with a quoted field (every id quoted, holding a comma): the byte-by-byte path.
    let mut quoted = Vec::with_capacity(body.len() * 2);
    for line in body.split(|&b| b == b'\n').filter(|l| !l.is_empty()) {
        let comma = memchr::memchr(b',', line).unwrap_or(0);
        quoted.extend_from_slice(b"\"r");
        quoted.extend_from_slice(&line[..comma]);
        quoted.extend_from_slice(b", q\"");
        quoted.extend_from_slice(&line[comma..]);
        quoted.push(b'\n');
    }
    let t = best(|| {
        let mut pos = 0;
        while pos < quoted.len() {
            let (end, next, _, q) = fields::next_record(&quoted, pos);
            fields::split_fields(&quoted[pos..end], q, &mut f);
            total += f.ranges.len();
            pos = next;
        }
    });
    println!("split, a quoted field in every line: {rows} lines");
    println!(
        "  {:42} {:6.2} ns a line",
        "map (next_record + split_fields)",
        t * 1e9 / rows as f64
    );
    let t = best(|| {
        csv_core_records(&quoted, &mut out, &mut ends, |_, e| total += e.len());
    });
    println!(
        "  {:42} {:6.2} ns a line",
        "csv-core Reader::read_record",
        t * 1e9 / rows as f64
    );
    println!("(checksums {sum:.3e} {total})");

    // Whole records into values: position (mm), time checked, velocity, angle (deg), as the
    // map reads the benchmark file's layout `id,position[mm],time[us],velocity[m/s],angle[deg]`.
    let h = header::Header {
        cells: [
            "id",
            "position[mm]",
            "time[us]",
            "velocity[m/s]",
            "angle[deg]",
        ]
        .map(String::from)
        .to_vec(),
        position: header::Column {
            index: 1,
            factor: 1e-3,
        },
        velocity: header::Column {
            index: 3,
            factor: 1.0,
        },
        angle: header::Column {
            index: 4,
            factor: std::f64::consts::PI / 180.0,
        },
        time: Some(header::Column {
            index: 2,
            factor: 1e-6,
        }),
    };
    let reader = plain_row::PlainRow::new(&h);
    println!("read: {rows} records into position, velocity and angle (time checked)");
    let mut sums = Vec::new();
    let t = best(|| {
        let mut acc = 0.0;
        let mut pos = 0;
        while pos < body.len() {
            let r = reader.read(body, pos).expect("a plain record");
            acc += r.values[0] + r.values[1] + r.values[2];
            pos = r.next;
        }
        sums.push(acc);
    });
    println!(
        "  {:42} {:6.2} ns a record",
        "map (PlainRow::read)",
        t * 1e9 / rows as f64
    );
    let t = best(|| {
        let mut acc = 0.0;
        let mut pos = 0;
        while pos < body.len() {
            let end = fields::split_plain_record(body, pos, &mut f);
            let get = |i: usize| {
                let (s, e) = f.ranges[i];
                number::parse_number(&body[pos + s..pos + e]).expect("a number")
            };
            let (s, e) = f.ranges[2];
            assert!(number::is_number(&body[pos + s..pos + e]));
            acc += get(1) * 1e-3 + get(3) + get(4) * (std::f64::consts::PI / 180.0);
            pos = end + 1;
        }
        sums.push(acc);
    });
    println!(
        "  {:42} {:6.2} ns a record",
        "map before (split_plain_record, parse_number)",
        t * 1e9 / rows as f64
    );
    let t = best(|| {
        let mut acc = 0.0;
        csv_core_records(body, &mut out, &mut ends, |out, ends| {
            let field = |i: usize| {
                let s = if i == 0 { 0 } else { ends[i - 1] };
                fast_float2::parse::<f64, _>(&out[s..ends[i]]).expect("a number")
            };
            assert!(ends.len() == 5 && field(2).is_finite());
            acc += field(1) * 1e-3 + field(3) + field(4) * (std::f64::consts::PI / 180.0);
        });
        sums.push(acc);
    });
    println!(
        "  {:42} {:6.2} ns a record",
        "csv-core 0.1 + fast-float2 0.2",
        t * 1e9 / rows as f64
    );
    let n = sums.len() / 3;
    assert!(
        sums[..n]
            .iter()
            .chain(&sums[n..2 * n])
            .chain(&sums[2 * n..])
            .all(|x| *x == sums[0]),
        "the same values"
    );
}
