//! A bounded fuzz run of the file loaders, the structural scanner and the append, by byte
//! mutation (proptest) of a committed corpus: the built-in library, the broken-file corpus in
//! `tests/broken/`, the example shop and the seeds in `tests/fuzz-corpus/`. Every mutant must
//! give `Ok` or a diagnostic, never a panic; an append to a file that loads must give a file
//! that loads (or a refusal), never damage.
//!
//! The run is bounded (`FUZZ_CASES`, default 256 per target) so that it fits the test suite;
//! a longer run: `FUZZ_CASES=20000 cargo test -p oblique-window --test fuzz --release`.

use oblique_window::pair::{parse_pair_file, Origin};
use oblique_window::write::append_observation_text;
use oblique_window::{Library, ObservationEntry};
use proptest::prelude::*;
use std::path::{Path, PathBuf};

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}

fn corpus() -> Vec<String> {
    let mut files = Vec::new();
    for dir in [
        "windows",
        "windows/machines",
        "tests/broken",
        "tests/fuzz-corpus",
        "examples/shop",
        "examples/shop/machines",
    ] {
        let Ok(entries) = std::fs::read_dir(root().join(dir)) else {
            continue;
        };
        let mut paths: Vec<PathBuf> = entries.filter_map(Result::ok).map(|e| e.path()).collect();
        paths.sort();
        for p in paths {
            if p.extension().and_then(|e| e.to_str()) == Some("ron") {
                files.push(std::fs::read_to_string(&p).expect("corpus file is text"));
            }
        }
    }
    assert!(files.len() >= 15, "the corpus is missing files");
    files
}

/// Tokens that stress a RON reader more than random bytes do.
const TOKENS: &[&str] = &[
    "\"",
    "\\",
    "//",
    "/*",
    "*/",
    "(",
    ")",
    "[",
    "]",
    "{",
    "}",
    ",",
    ":",
    "r#\"",
    "\"#",
    "\u{feff}",
    "\r\n",
    "\n",
    "1e308",
    "-0",
    "NaN",
    "inf",
    "Some(",
    "\u{0}",
    "\u{1b}[2J",
    "observations: [",
    "velocity: \"",
    " m/s\"",
    " deg\"",
    "ü",
    "\u{10FFFF}",
];

#[derive(Debug, Clone)]
enum Mutation {
    Insert(usize, usize),
    Delete(usize, usize),
    Flip(usize, u8),
    Duplicate(usize, usize),
}

fn mutation() -> impl Strategy<Value = Mutation> {
    prop_oneof![
        (any::<usize>(), 0..TOKENS.len()).prop_map(|(a, t)| Mutation::Insert(a, t)),
        (any::<usize>(), 1usize..64).prop_map(|(a, n)| Mutation::Delete(a, n)),
        (any::<usize>(), any::<u8>()).prop_map(|(a, b)| Mutation::Flip(a, b)),
        (any::<usize>(), 1usize..200).prop_map(|(a, n)| Mutation::Duplicate(a, n)),
    ]
}

fn apply(text: &str, muts: &[Mutation]) -> String {
    let mut b = text.as_bytes().to_vec();
    for m in muts {
        let len = b.len().max(1);
        match *m {
            Mutation::Insert(at, t) => {
                let at = at % (b.len() + 1);
                b.splice(at..at, TOKENS[t].bytes());
            }
            Mutation::Delete(at, n) => {
                let at = at % len;
                let end = (at + n).min(b.len());
                if at < end {
                    b.drain(at..end);
                }
            }
            Mutation::Flip(at, v) => {
                if !b.is_empty() {
                    let at = at % b.len();
                    b[at] = v;
                }
            }
            Mutation::Duplicate(at, n) => {
                let at = at % len;
                let end = (at + n).min(b.len());
                if at < end {
                    let piece: Vec<u8> = b[at..end].to_vec();
                    b.splice(end..end, piece);
                }
            }
        }
    }
    // The loaders take text: invalid UTF-8 is refused before them (as the library does).
    String::from_utf8_lossy(&b).into_owned()
}

fn cases() -> u32 {
    std::env::var("FUZZ_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(256)
}

fn entry() -> ObservationEntry {
    ObservationEntry {
        velocity: "400 m/s".into(),
        angle: "10 deg".into(),
        outcome: "welded".into(),
        process: "magnetic-pulse".into(),
        method: "measured".into(),
        velocity_uncertainty: None,
        angle_uncertainty: None,
        date: None,
        source: "fuzz \"shot\" // with slashes".into(),
        note: Some("line one\nline two /* not a comment */".into()),
    }
}

fn origin(text: &str) -> Origin {
    Origin {
        display: "fuzz.ron".into(),
        path: None,
        sha256: oblique_window::library::sha256_hex(text.as_bytes()),
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: cases(), failure_persistence: None, ..ProptestConfig::default() })]

    #[test]
    fn mutated_files_never_panic_the_loaders(pick in any::<usize>(), muts in proptest::collection::vec(mutation(), 1..8)) {
        let corpus = corpus();
        let text = apply(&corpus[pick % corpus.len()], &muts);
        let lib = Library::load(&[]).expect("built-in library");
        let _ = parse_pair_file(origin(&text), &text, &lib.materials);
        let _ = oblique_window::materials::parse_material_file("fuzz.ron", &text);
        let _ = oblique_window::machine::parse_machine_file(origin(&text), &text);
        let idx = oblique_window::ronpath::RonIndex::scan(&text);
        let _ = idx.locate(&text, "observations[3].velocity");
    }

    #[test]
    fn an_append_to_a_loadable_mutant_loads_and_keeps_its_bytes(pick in any::<usize>(), muts in proptest::collection::vec(mutation(), 1..4)) {
        let corpus = corpus();
        let text = apply(&corpus[pick % corpus.len()], &muts);
        let lib = Library::load(&[]).expect("built-in library");
        if let Ok((_, before)) = parse_pair_file(origin(&text), &text, &lib.materials) {
            if let Ok(out) = append_observation_text(Path::new("fuzz.ron"), &text, &[entry()]) {
                let (_, after) = parse_pair_file(origin(&out), &out, &lib.materials)
                    .map_err(|d| TestCaseError::fail(format!("append broke a loadable file:\n{d}\n---\n{out}")))?;
                prop_assert_eq!(after.observations.len(), before.observations.len() + 1);
                for (a, b) in before.observations.iter().zip(&after.observations) {
                    prop_assert_eq!(&a.source, &b.source);
                    prop_assert_eq!(&a.note, &b.note);
                }
                // Every old byte is still there, in order.
                let mut it = out.chars();
                for c in text.chars() {
                    prop_assert!(it.any(|d| d == c), "an old character went missing");
                }
            }
        }
    }
}
