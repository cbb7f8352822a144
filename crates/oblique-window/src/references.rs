//! The project's one reference list (`windows/references.ron`, built in): every citation key
//! used in the material data, the criteria, the reports and the documents resolves to a full
//! reference (authors, title, year, where published) or is marked from memory; `MEM` and `DER`
//! are markers. [`References::builtin`] loads it; [`citation_keys`] finds the keys a text cites
//! (`[KEY]`); [`criterion_keys`] names the references of each criterion.

use crate::library::{BUILTIN_FILES, REFERENCES_FILE};
use oblique_core::CriterionId;
use serde::Deserialize;
use std::collections::BTreeMap;

/// One entry of the file.
#[derive(Debug, Clone, PartialEq, Eq, Deserialize)]
#[serde(deny_unknown_fields)]
struct Entry {
    key: String,
    #[serde(default)]
    authors: Option<String>,
    #[serde(default)]
    title: Option<String>,
    #[serde(default)]
    year: Option<String>,
    #[serde(default)]
    published: Option<String>,
    #[serde(default)]
    read: Option<String>,
    #[serde(default)]
    note: Option<String>,
    #[serde(default)]
    from_memory: bool,
    #[serde(default)]
    marker: Option<String>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct File {
    format: u32,
    references: Vec<Entry>,
}

/// A resolved reference.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Reference {
    /// A publication (or datasheet, web page, data package).
    Work {
        /// Authors or the organisation.
        authors: String,
        /// Title.
        title: String,
        /// Year (or "undated (read 2026)").
        year: String,
        /// Where it was published.
        published: String,
        /// How it was read (transcription, abstract only), if said.
        read: Option<String>,
        /// A note.
        note: Option<String>,
        /// True when the details were recalled, not read.
        from_memory: bool,
    },
    /// A marker (MEM: from memory; DER: derived here).
    Marker(String),
}

impl Reference {
    /// The reference in one line: `Authors (year). Title. Published. [read ...] [from memory]`.
    #[must_use]
    pub fn full(&self) -> String {
        match self {
            Reference::Work {
                authors,
                title,
                year,
                published,
                read,
                note,
                from_memory,
            } => {
                let mut s = format!("{authors} ({year}). {title}. {published}.");
                if let Some(r) = read {
                    s.push_str(&format!(" Read: {r}."));
                }
                if let Some(n) = note {
                    s.push_str(&format!(" Note: {n}."));
                }
                if *from_memory {
                    s.push_str(" [from memory: details recalled, not read in a stored copy]");
                }
                s
            }
            Reference::Marker(m) => format!("marker: {m}"),
        }
    }
}

/// The reference list: key -> reference.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct References {
    /// Every entry by key.
    pub entries: BTreeMap<String, Reference>,
}

impl References {
    /// The built-in list.
    ///
    /// # Errors
    /// A message when the built-in file is missing or does not parse (a build problem).
    pub fn builtin() -> Result<References, String> {
        let text = BUILTIN_FILES
            .iter()
            .find(|(rel, _)| *rel == REFERENCES_FILE)
            .map(|(_, t)| *t)
            .ok_or_else(|| format!("the built-in {REFERENCES_FILE} is missing"))?;
        Self::parse(text)
    }

    /// Parse a reference list.
    ///
    /// # Errors
    /// A message naming the entry when an entry is incomplete, a key is defined twice, or the
    /// text does not parse.
    pub fn parse(text: &str) -> Result<References, String> {
        let f: File = ron::Options::default()
            .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
            .from_str(text)
            .map_err(|e| format!("{REFERENCES_FILE}: {e}"))?;
        if f.format != 1 {
            return Err(format!("{REFERENCES_FILE}: format {} is not 1", f.format));
        }
        let mut entries = BTreeMap::new();
        for e in f.references {
            let r = match (&e.marker, &e.authors, &e.title, &e.year, &e.published) {
                (Some(m), None, None, None, None) => Reference::Marker(m.clone()),
                (None, Some(a), Some(t), Some(y), Some(p)) => Reference::Work {
                    authors: a.clone(),
                    title: t.clone(),
                    year: y.clone(),
                    published: p.clone(),
                    read: e.read.clone(),
                    note: e.note.clone(),
                    from_memory: e.from_memory,
                },
                _ => {
                    return Err(format!(
                        "{REFERENCES_FILE}: '{}' needs authors, title, year and published (or only marker)",
                        e.key
                    ))
                }
            };
            if entries.insert(e.key.clone(), r).is_some() {
                return Err(format!("{REFERENCES_FILE}: '{}' is defined twice", e.key));
            }
        }
        Ok(References { entries })
    }

    /// The reference of `key`.
    #[must_use]
    pub fn get(&self, key: &str) -> Option<&Reference> {
        self.entries.get(key)
    }

    /// The full references of `keys` (each once, in order of the list), with the keys that do
    /// not resolve left out.
    #[must_use]
    pub fn cited<'a>(&self, keys: impl IntoIterator<Item = &'a str>) -> Vec<(String, String)> {
        let mut want: Vec<&str> = keys.into_iter().collect();
        want.sort_unstable();
        want.dedup();
        want.into_iter()
            .filter_map(|k| self.get(k).map(|r| (k.to_string(), r.full())))
            .collect()
    }
}

/// Every key a material record cites: its properties' source keys, and the keys its notes cite
/// (those that resolve in `refs` or in the record's own file), sorted, each once.
#[must_use]
pub fn material_keys(rec: &crate::MaterialRecord, refs: &References) -> Vec<String> {
    let mut keys: Vec<String> = rec.sources.values().map(|p| p.key.clone()).collect();
    let own: Vec<&String> = rec.sources.values().map(|p| &p.key).collect();
    let notes = rec
        .sources
        .values()
        .filter_map(|p| p.note.as_deref())
        .chain(std::iter::once(rec.notes.as_str()));
    for n in notes {
        keys.extend(
            citation_keys(n)
                .into_iter()
                .filter(|k| refs.get(k).is_some() || own.contains(&k)),
        );
    }
    keys.sort();
    keys.dedup();
    keys
}

impl References {
    /// The references a material record cites, `(key, full reference)`: from this list, else the
    /// text the record's own file gives for the key (a user's material file), said so.
    #[must_use]
    pub fn for_material(&self, rec: &crate::MaterialRecord) -> Vec<(String, String)> {
        material_keys(rec, self)
            .into_iter()
            .map(|k| {
                let text = match self.get(&k) {
                    Some(r) => r.full(),
                    None => rec
                        .sources
                        .values()
                        .find(|p| p.key == k)
                        .map(|p| {
                            format!(
                                "{} (from the material file {}; not in the project's reference list)",
                                p.reference, rec.origin
                            )
                        })
                        .unwrap_or_default(),
                };
                (k, text)
            })
            .collect()
    }
}

/// The citation keys a text cites as `[KEY]`: a letter or digit first, then letters, digits,
/// `-` and `'`, at most 16 characters, not all digits. Units and labels in brackets (`[deg]`,
/// `[m/s]`) match this shape too: callers keep those that resolve, and the project's test
/// refuses the rest unless they are known words.
#[must_use]
pub fn citation_keys(text: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut rest = text;
    while let Some(i) = rest.find('[') {
        rest = &rest[i + 1..];
        let Some(j) = rest.find(']') else { break };
        let inner = &rest[..j];
        let ok = !inner.is_empty()
            && inner.len() <= 16
            && inner
                .chars()
                .next()
                .is_some_and(|c| c.is_ascii_alphanumeric())
            && inner
                .chars()
                .all(|c| c.is_ascii_alphanumeric() || c == '-' || c == '\'')
            && !inner.chars().all(|c| c.is_ascii_digit());
        if ok {
            out.push(inner.to_string());
        }
        rest = &rest[j..];
    }
    out
}

/// The reference keys of a criterion (its relation's sources).
#[must_use]
pub fn criterion_keys(id: CriterionId) -> &'static [&'static str] {
    match id {
        CriterionId::DeribasLower => &["DKM67"],
        CriterionId::StrengthLower => &["W73", "CW75"],
        CriterionId::PressureLower => &["K10"],
        CriterionId::MeltingUpper => &["W73", "CW75"],
        CriterionId::Jetting => &["CH63", "WSW53"],
        CriterionId::WavyTransition => &["CBH71"],
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_builtin_list_loads_and_every_criterion_key_resolves() {
        let r = References::builtin().expect("loads");
        assert!(r.entries.len() > 40);
        for id in CriterionId::ALL {
            for k in criterion_keys(id) {
                assert!(r.get(k).is_some(), "{k}");
            }
        }
        assert!(matches!(r.get("MEM"), Some(Reference::Marker(_))));
        assert!(r.get("S96").expect("S96").full().contains("1996"));
    }

    #[test]
    fn keys_are_found_in_text() {
        assert_eq!(
            citation_keys("HB 23 [AI]; see [D-EOS] and [1018b], not [0] or [m/s]"),
            vec!["AI", "D-EOS", "1018b"]
        );
    }

    #[test]
    fn incomplete_entries_are_refused() {
        let e = References::parse("(format: 1, references: [(key: \"X\", title: \"t\")])")
            .expect_err("refused");
        assert!(e.contains("'X' needs authors"), "{e}");
        let e = References::parse(
            "(format: 1, references: [(key: \"M\", marker: \"m\"), (key: \"M\", marker: \"n\")])",
        )
        .expect_err("refused");
        assert!(e.contains("twice"), "{e}");
    }
}
