//! A bounded fuzz run of the weld map's readers (CSV and JSON lines), by byte mutation
//! (proptest) of the committed inputs in `crates/oblique-cli/tests/data/` and
//! `tests/fuzz-corpus/`: every mutant gives a summary or an error, never a panic or a hang, with
//! every bad-row policy and worker count. `FUZZ_CASES` (default 128) sets the number of cases.

use oblique_map::{classify_stream, BadRows, Format, MapOptions};
use oblique_window::Library;
use proptest::prelude::*;
use std::path::{Path, PathBuf};

fn corpus() -> Vec<(Vec<u8>, Format)> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("../..");
    let mut out = Vec::new();
    for dir in [
        "crates/oblique-cli/tests/data",
        "tests/fuzz-corpus",
        "examples",
    ] {
        let Ok(entries) = std::fs::read_dir(root.join(dir)) else {
            continue;
        };
        let mut paths: Vec<PathBuf> = entries.filter_map(Result::ok).map(|e| e.path()).collect();
        paths.sort();
        for p in paths {
            let format = match p.extension().and_then(|e| e.to_str()) {
                Some("csv") => Format::Csv,
                Some("jsonl") => Format::Jsonl,
                _ => continue,
            };
            out.push((std::fs::read(&p).expect("readable"), format));
        }
    }
    assert!(out.len() >= 8, "the corpus is missing files");
    out
}

const TOKENS: &[&[u8]] = &[
    b"\"",
    b",",
    b"\n",
    b"\r\n",
    b"\r",
    b"#",
    b"1e308",
    b"-0",
    b"NaN",
    b"inf",
    b"1e-320",
    b"\xef\xbb\xbf",
    b"\xff\xfe",
    b"\x00",
    b"{",
    b"}",
    b"\":",
    b"[",
    b"]",
    b"null",
    b"0",
    b"[m/s]",
    b"[deg]",
    b"[km/s]",
    b"[rad]",
    b"9999999999999999999999",
];

fn mutate(data: &[u8], muts: &[(u8, usize, usize)]) -> Vec<u8> {
    let mut b = data.to_vec();
    for &(kind, at, n) in muts {
        let len = b.len().max(1);
        let at = at % len;
        match kind % 4 {
            0 => {
                let t = TOKENS[n % TOKENS.len()];
                let at = at.min(b.len());
                b.splice(at..at, t.iter().copied());
            }
            1 => {
                let end = (at + n % 40 + 1).min(b.len());
                if at < end {
                    b.drain(at..end);
                }
            }
            2 => {
                if !b.is_empty() {
                    b[at] = (n % 256) as u8;
                }
            }
            _ => {
                let end = (at + n % 300 + 1).min(b.len());
                if at < end {
                    let piece = b[at..end].to_vec();
                    b.splice(end..end, piece);
                }
            }
        }
    }
    b
}

fn cases() -> u32 {
    std::env::var("FUZZ_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(128)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: cases(), failure_persistence: None, ..ProptestConfig::default() })]

    #[test]
    fn mutated_exports_never_panic_the_map(
        pick in any::<usize>(),
        muts in proptest::collection::vec((any::<u8>(), any::<usize>(), any::<usize>()), 1..8),
        policy in 0u8..3,
        threads in 1usize..3,
        all_columns in any::<bool>(),
        unsorted in any::<bool>(),
    ) {
        let corpus = corpus();
        let (data, format) = &corpus[pick % corpus.len()];
        let input = mutate(data, &muts);
        let lib = Library::load(&[]).expect("built-in library");
        let window = lib.pair("demo-al6061-on-cu").expect("demo pair");
        let opts = MapOptions {
            input_format: *format,
            output_format: *format,
            bad_rows: match policy { 0 => BadRows::Stop, 1 => BadRows::Skip, _ => BadRows::Save },
            threads,
            all_columns,
            unsorted,
            ..MapOptions::default()
        };
        let mut out = Vec::new();
        match classify_stream(window, &input[..], &mut out, &opts) {
            Ok(summary) => {
                let text = summary.to_text();
                prop_assert!(text.contains("caution"));
                let _ = summary.to_json();
            }
            Err(e) => {
                prop_assert!(!e.to_string().is_empty());
            }
        }
    }
}
