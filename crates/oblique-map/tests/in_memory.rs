//! An input in memory (a memory-mapped file, `WeldMap::open_in_memory`) gives the same map and
//! summary as the same bytes read from a stream, in every layout the readers know, over many
//! chunks; the pages it is done with are released in order, page-aligned.

use oblique_map::{BadRows, Format, InMemory, MapOptions, WeldMap};
use oblique_window::Library;
use std::sync::Mutex;

/// An export of `rows` rows (invented values along a 40 mm joint), with quoted ids when asked,
/// `eol` line ends, and a bad row now and then.
fn export(rows: usize, eol: &str, quoted: bool) -> Vec<u8> {
    let mut s =
        format!("# invented data for a test{eol}id,position[mm],velocity[m/s],angle[deg]{eol}");
    for i in 0..rows {
        let id = if quoted {
            format!("\"r{i}, q\"")
        } else {
            format!("r{i}")
        };
        let v = if i % 997 == 5 {
            "-1".to_string()
        } else {
            format!("{}", 250 + (i * 7) % 500)
        };
        let a = 2.0 + (i % 260) as f64 * 0.1;
        s.push_str(&format!(
            "{id},{:.6},{v},{a:.2}{eol}",
            i as f64 * 40.0 / rows as f64
        ));
    }
    s.into_bytes()
}

fn jsonl(rows: usize) -> Vec<u8> {
    let mut s = String::new();
    for i in 0..rows {
        s.push_str(&format!(
            "{{\"position[mm]\": {}, \"velocity[m/s]\": {}, \"angle[deg]\": {}}}\n",
            i as f64 * 0.001,
            if i % 997 == 5 {
                -1
            } else {
                300 + (i % 400) as i64
            },
            3.0 + (i % 200) as f64 * 0.1
        ));
    }
    s.into_bytes()
}

#[test]
fn in_memory_and_streamed_maps_are_the_same() {
    let lib = Library::load(&[]).expect("built-in library");
    let window = lib
        .pair("demo-al6061-on-cu")
        .expect("demo pair (invented data)");
    let cases = [
        (export(30_000, "\n", false), Format::Csv),
        (export(30_000, "\r\n", false), Format::Csv),
        (export(20_000, "\n", true), Format::Csv),
        (jsonl(20_000), Format::Jsonl),
    ];
    for (bytes, format) in &cases {
        for out_format in [Format::Csv, Format::Jsonl] {
            let opts = MapOptions {
                input_format: *format,
                output_format: out_format,
                bad_rows: BadRows::Skip,
                threads: 2,
                ..MapOptions::default()
            };
            let mut streamed = Vec::new();
            let mut m = WeldMap::open(window, &bytes[..], &opts).expect("header");
            let s1 = m.run(&mut streamed, None, &mut |_| {}).expect("map");
            let released: Mutex<Vec<std::ops::Range<usize>>> = Mutex::new(Vec::new());
            let input = InMemory {
                bytes,
                release: Box::new(|r| released.lock().expect("lock").push(r)),
            };
            let mut in_memory = Vec::new();
            let mut m = WeldMap::open_in_memory(window, input, &opts).expect("header");
            let s2 = m.run(&mut in_memory, None, &mut |_| {}).expect("map");
            drop(m);
            assert!(streamed == in_memory, "{format:?} -> {out_format:?}");
            assert_eq!(s1.to_json(), s2.to_json());
            assert!(s1.rows_rejected > 0 && s1.rows_classified > 10_000);
            // Released in order, page-aligned, within the input, and most of it.
            let r = released.into_inner().expect("lock");
            let mut at = 0;
            for range in &r {
                assert_eq!(range.start, at);
                assert!(range.end > range.start && range.end % 4096 == 0);
                at = range.end;
            }
            assert!(
                at <= bytes.len() && at + 300_000 > bytes.len(),
                "{at} of {}",
                bytes.len()
            );
        }
    }
}

/// A CSV map copies each input record without its line break: with CRLF line ends and a
/// pass-through text column last, records short and long (the one-pass reader's two tiers,
/// and the last record of every chunk) keep no `\r` in the map, and the last record of a file
/// that ends in `\r` without a line break loses it too; streamed and in memory alike.
#[test]
fn a_pass_through_last_column_keeps_no_carriage_return() {
    let lib = Library::load(&[]).expect("built-in library");
    let window = lib
        .pair("demo-al6061-on-cu")
        .expect("demo pair (invented data)");
    let mut text = String::from("position[mm],velocity[m/s],angle[deg],note\r\n");
    let rows = 30_000;
    for i in 0..rows {
        // Notes of 0 to 80 characters: records from 16 to about 100 bytes.
        let note = "n".repeat(i % 81);
        text.push_str(&format!(
            "{:.6},{},{:.2},{note}\r\n",
            i as f64 * 40.0 / rows as f64,
            250 + (i * 7) % 500,
            2.0 + (i % 260) as f64 * 0.1
        ));
    }
    text.push_str("40.5,400,10,last\r");
    let bytes = text.into_bytes();
    let opts = MapOptions {
        threads: 2,
        ..MapOptions::default()
    };
    let mut streamed = Vec::new();
    let mut m = WeldMap::open(window, &bytes[..], &opts).expect("header");
    m.run(&mut streamed, None, &mut |_| {}).expect("map");
    let input = InMemory {
        bytes: &bytes,
        release: Box::new(|_| {}),
    };
    let mut in_memory = Vec::new();
    let mut m = WeldMap::open_in_memory(window, input, &opts).expect("header");
    m.run(&mut in_memory, None, &mut |_| {}).expect("map");
    drop(m);
    for map in [&streamed, &in_memory] {
        assert!(!map.contains(&b'\r'), "a carriage return in the map");
        let text = String::from_utf8_lossy(map);
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(lines.len(), rows + 2, "header and every record");
        // Each row: row number, the record as written, the computed columns.
        let input_lines: Vec<&str> = std::str::from_utf8(&bytes)
            .expect("ascii")
            .split("\r\n")
            .skip(1)
            .collect();
        for (row, rec) in lines[1..].iter().zip(&input_lines) {
            let rec = rec.trim_end_matches('\r');
            let (_, rest) = row.split_once(',').expect("row number");
            assert!(rest.starts_with(&format!("{rec},")), "{row:?} from {rec:?}");
        }
    }
}
