//! Every citation key used anywhere in the project resolves in the one reference list
//! (`windows/references.ron`): the material data (`source:` fields, the `sources` table and `[KEY]`
//! in notes), the criteria, the pair and machine files, and the documents (docs/*.md, README.md,
//! DEVELOPERS.md). A bracketed word that is not a key (a unit, a label such as `[memory]`) must be
//! in the short list of known words below; anything else fails, so a new key cannot slip in
//! undefined.

use oblique_core::CriterionId;
use oblique_window::references::{citation_keys, criterion_keys, References};
use oblique_window::Library;
use std::path::{Path, PathBuf};

/// Bracketed words that are not citation keys: units, status labels of docs/physics-notes.md,
/// placeholders.
const NOT_KEYS: &[&str] = &[
    "KEY",
    "deg",
    "mm",
    "rad",
    "us",
    "unit",
    "inline",
    "mph",
    "kA",
    "kV",
    "kJ",
    "MPa",
    "GPa",
    "derived",
    "memory",
    "confirmed",
    "cited",
    "elementary",
    "FILES",
];

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}

#[test]
fn every_key_used_anywhere_resolves() {
    let refs = References::builtin().expect("the reference list loads");
    let mut missing: Vec<String> = Vec::new();
    let mut check = |key: &str, whence: &str| {
        if refs.get(key).is_none() && !NOT_KEYS.contains(&key) {
            missing.push(format!("{whence}: [{key}]"));
        }
    };
    // Material data as loaded: every property's source key and the keys its note cites.
    let lib = Library::load(&[]).expect("the built-in library loads");
    let mut n = 0;
    for rec in lib.materials.values() {
        for (prop, p) in &rec.sources {
            check(&p.key, &format!("materials.ron {} {prop}", rec.material.id));
            n += 1;
            for k in citation_keys(p.note.as_deref().unwrap_or("")) {
                check(
                    &k,
                    &format!("materials.ron {} {prop} note", rec.material.id),
                );
            }
        }
        for k in citation_keys(&rec.notes) {
            check(&k, &format!("materials.ron {} notes", rec.material.id));
        }
    }
    assert!(n > 100, "only {n} sourced values seen");
    // The materials file's own `sources` table: every key defined there is in the list.
    let text = std::fs::read_to_string(root().join("windows/materials.ron")).expect("read");
    let table = &text[text.find("sources: {").expect("sources table")..];
    let table = &table[..table.find("},").expect("end of the table")];
    for line in table.lines() {
        let line = line.trim();
        if let Some(rest) = line.strip_prefix('"') {
            if let Some(end) = rest.find('"') {
                check(&rest[..end], "materials.ron sources table");
            }
        }
    }
    // The criteria.
    for id in CriterionId::ALL {
        for k in criterion_keys(id) {
            check(k, &format!("criterion {}", id.as_str()));
        }
    }
    // Documents and the other built-in files.
    let mut files: Vec<PathBuf> = ["README.md", "DEVELOPERS.md"]
        .iter()
        .map(|f| root().join(f))
        .collect();
    for dir in ["docs", "windows", "windows/machines"] {
        for e in std::fs::read_dir(root().join(dir)).expect("folder") {
            let p = e.expect("entry").path();
            if matches!(p.extension().and_then(|x| x.to_str()), Some("md" | "ron"))
                && !p.ends_with("references.ron")
            {
                files.push(p);
            }
        }
    }
    files.sort();
    for f in &files {
        let text = std::fs::read_to_string(f).expect("read");
        for k in citation_keys(&text) {
            check(&k, &f.display().to_string());
        }
    }
    assert!(
        missing.is_empty(),
        "keys without a reference:\n{}",
        missing.join("\n")
    );
}

#[test]
fn every_reference_is_full_or_marked() {
    let refs = References::builtin().expect("loads");
    for (k, r) in &refs.entries {
        let full = r.full();
        assert!(
            full.starts_with("marker:") || full.matches(". ").count() >= 2,
            "{k}: {full}"
        );
    }
}
