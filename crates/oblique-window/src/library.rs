//! The library: the built-in files (embedded from `windows/` at build time) plus user folders
//! given with `--library DIR` or the `OBLIQUE_LIBRARY` environment variable. User entries may
//! add materials and pairs, and may shadow built-in ones (with a warning).

use crate::diag::{Diagnostic, Diagnostics};
use crate::materials::{parse_material_file, MaterialRecord};
use crate::pair::{parse_pair_file, Origin, PairWindow};
use sha2::{Digest, Sha256};
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

mod builtin {
    include!(concat!(env!("OUT_DIR"), "/builtin.rs"));
}

pub use builtin::BUILTIN_FILES;

/// The environment variable naming extra library folders, separated like PATH.
pub const LIBRARY_ENV: &str = "OBLIQUE_LIBRARY";

/// The file name of a folder's material file.
pub const MATERIALS_FILE: &str = "materials.ron";

/// The file name of the project's reference list (built in; see [`crate::references`]).
pub const REFERENCES_FILE: &str = "references.ron";

/// The longest name of a library file (a pair or a machine; it is also the file name:
/// file systems allow 255 bytes, and the temporary name of a safe write adds about 40).
pub const MAX_FILE_NAME: usize = 100;

/// Names a library file may not take: `materials.ron` is read as the folder's materials file,
/// `machines/` is the machine folder, `references.ron` the reference list.
pub const RESERVED_NAMES: [&str; 3] = ["materials", "machines", "references"];

/// Check a name that becomes a library file `NAME.ron`: not empty, no spaces, slashes or
/// control characters, not hidden (a name starting with a dot would be skipped by the library),
/// at most [`MAX_FILE_NAME`] bytes, not reserved.
///
/// # Errors
/// A message saying what is wrong.
pub fn check_file_name(name: &str, what: &str) -> Result<(), String> {
    if name.is_empty()
        || name
            .chars()
            .any(|c| c.is_whitespace() || c == '/' || c == '\\' || c.is_control())
    {
        return Err(format!(
            "{what} '{name}' must be non-empty, without spaces or slashes"
        ));
    }
    if name.starts_with('.') {
        return Err(format!(
            "{what} '{name}' must not start with a dot: the library skips hidden files"
        ));
    }
    if name.len() > MAX_FILE_NAME {
        return Err(format!(
            "{what} of {} bytes is too long (at most {MAX_FILE_NAME}): it is also the file name",
            name.len()
        ));
    }
    if RESERVED_NAMES.contains(&name.to_ascii_lowercase().as_str()) {
        return Err(format!(
            "{what} '{name}' is reserved: the library folder uses {name}.ron (or {name}/) for something else"
        ));
    }
    Ok(())
}

/// A file the library was loaded from.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct LibraryFile {
    /// As shown in messages.
    pub display: String,
    /// On disk, for user files.
    pub path: Option<PathBuf>,
    /// SHA-256 of the bytes, hex.
    pub sha256: String,
}

/// The loaded library.
#[derive(Debug, Clone, Default)]
pub struct Library {
    /// Materials by id.
    pub materials: BTreeMap<String, MaterialRecord>,
    /// Pair windows by name.
    pub pairs: BTreeMap<String, PairWindow>,
    /// Shadowing and other notes for the user.
    pub warnings: Vec<String>,
    /// Every file read, in load order.
    pub files: Vec<LibraryFile>,
    /// The user folders, in priority order (each folder once).
    pub user_dirs: Vec<PathBuf>,
    /// Files that could not be loaded, with every problem: the rest of the library is usable;
    /// a command that needs one of these files fails with its diagnostics.
    pub problems: Vec<FileProblem>,
}

/// A library file that could not be loaded.
#[derive(Debug, Clone)]
pub struct FileProblem {
    /// As shown in messages.
    pub display: String,
    /// The pair name the file would define, from its file name (`NAME.ron`); `None` for a
    /// materials file or an unreadable folder.
    pub pair_name: Option<String>,
    /// True for a materials file.
    pub materials: bool,
    /// Every problem found.
    pub diagnostics: Diagnostics,
}

impl FileProblem {
    /// One line for a warning: the file, the number of problems and the first one.
    #[must_use]
    pub fn summary(&self) -> String {
        let n = self.diagnostics.0.len();
        let first = self
            .diagnostics
            .0
            .first()
            .map_or_else(String::new, |d| format!("; first: {}", d.headline()));
        format!(
            "skipped {} ({n} problem(s){first}); commands that need it show every problem, `oblique pair validate` lists them",
            self.display
        )
    }
}

/// Hex SHA-256 of bytes.
pub fn sha256_hex(bytes: &[u8]) -> String {
    let digest = Sha256::digest(bytes);
    digest.iter().map(|b| format!("{b:02x}")).collect()
}

/// The user folders named by [`LIBRARY_ENV`].
pub fn env_dirs() -> Vec<PathBuf> {
    std::env::var_os(LIBRARY_ENV)
        .map(|v| {
            std::env::split_paths(&v)
                .filter(|p| !p.as_os_str().is_empty())
                .collect()
        })
        .unwrap_or_default()
}

struct Source {
    display: String,
    path: Option<PathBuf>,
    text: String,
}

fn io_problem(display: &str, message: String) -> Diagnostic {
    Diagnostic {
        file: display.to_string(),
        line: 0,
        col: 0,
        field: String::new(),
        message,
        hint: None,
    }
}

/// The `.ron` files of a user folder: (materials file, pair files), sorted by name. Hidden files
/// (such as interrupted temporary files) are skipped.
fn user_files(dir: &Path, problems: &mut Vec<Diagnostic>) -> (Option<Source>, Vec<Source>) {
    let display_dir = dir.display().to_string();
    let entries = match std::fs::read_dir(dir) {
        Ok(e) => e,
        Err(e) => {
            problems.push(Diagnostic {
                file: display_dir,
                line: 0,
                col: 0,
                field: String::new(),
                message: format!("cannot read library folder: {e}"),
                hint: Some("check the path given with --library or OBLIQUE_LIBRARY".into()),
            });
            return (None, Vec::new());
        }
    };
    let mut paths: Vec<PathBuf> = entries.filter_map(Result::ok).map(|e| e.path()).collect();
    paths.sort();
    let mut materials = None;
    let mut pairs = Vec::new();
    for p in paths {
        let name = p
            .file_name()
            .and_then(|n| n.to_str())
            .unwrap_or_default()
            .to_string();
        if name.starts_with('.')
            || !p.is_file()
            || p.extension().and_then(|e| e.to_str()) != Some("ron")
        {
            continue;
        }
        let display = p.display().to_string();
        match crate::files::read_text_bounded(&p) {
            Ok(text) => {
                crate::files::protect(&p);
                let s = Source {
                    display,
                    path: Some(p.clone()),
                    text,
                };
                if name == MATERIALS_FILE {
                    materials = Some(s);
                } else if name != REFERENCES_FILE {
                    pairs.push(s);
                }
            }
            Err(e) => problems.push(io_problem(&display, format!("cannot read: {e}"))),
        }
    }
    (materials, pairs)
}

/// The pair name a pair file defines by its file name.
fn pair_name_of(s: &Source) -> Option<String> {
    s.path
        .as_ref()
        .and_then(|p| p.file_stem())
        .and_then(|n| n.to_str())
        .map(str::to_string)
}

/// Record one problem of a pair file.
fn file_problem(problems: &mut Vec<FileProblem>, s: &Source, d: Diagnostic) {
    problems.push(FileProblem {
        display: s.display.clone(),
        pair_name: pair_name_of(s),
        materials: false,
        diagnostics: Diagnostics(vec![d]),
    });
}

impl Library {
    /// Load the built-in library and then each user folder in `user_dirs` (earlier folders win
    /// over later ones; all win over the built-in files).
    ///
    /// A file that cannot be loaded does not stop the rest: it is left out and recorded in
    /// [`Library::problems`]; looking up the pair it defines gives its diagnostics.
    ///
    /// # Errors
    /// None today (kept for callers written against the strict loader); every problem is in
    /// [`Library::problems`].
    pub fn load(user_dirs: &[PathBuf]) -> Result<Library, Diagnostics> {
        // The same folder named twice (two flags, or a flag and OBLIQUE_LIBRARY) is read once,
        // at its first (highest-priority) place.
        let mut seen = std::collections::HashSet::new();
        let dirs: Vec<PathBuf> = user_dirs
            .iter()
            .filter(|d| seen.insert(std::fs::canonicalize(d).unwrap_or_else(|_| (*d).clone())))
            .cloned()
            .collect();
        let user_dirs = &dirs[..];
        let mut lib = Library {
            user_dirs: user_dirs.to_vec(),
            ..Default::default()
        };
        let mut problems = Vec::new();
        let mut material_sources = Vec::new();
        let mut pair_sources = Vec::new();
        for (rel, text) in BUILTIN_FILES {
            if rel.starts_with("machines/") || *rel == REFERENCES_FILE {
                continue;
            }
            let s = Source {
                display: format!("built-in:windows/{rel}"),
                path: None,
                text: (*text).to_string(),
            };
            if *rel == MATERIALS_FILE {
                material_sources.push(s);
            } else {
                pair_sources.push(s);
            }
        }
        // Lowest priority first, so later inserts shadow earlier ones.
        for dir in user_dirs.iter().rev() {
            let (m, p) = user_files(dir, &mut problems);
            material_sources.extend(m);
            pair_sources.extend(p);
        }
        for s in &material_sources {
            lib.files.push(LibraryFile {
                display: s.display.clone(),
                path: s.path.clone(),
                sha256: sha256_hex(s.text.as_bytes()),
            });
            match parse_material_file(&s.display, &s.text) {
                Ok((_, records)) => {
                    for r in records {
                        if let Some(old) = lib.materials.get(&r.material.id) {
                            lib.warnings.push(format!(
                                "material '{}' from {} shadows the one from {}",
                                r.material.id, r.origin, old.origin
                            ));
                        }
                        lib.materials.insert(r.material.id.clone(), r);
                    }
                }
                Err(d) => lib.problems.push(FileProblem {
                    display: s.display.clone(),
                    pair_name: None,
                    materials: true,
                    diagnostics: d,
                }),
            }
        }
        for s in &pair_sources {
            let sha = sha256_hex(s.text.as_bytes());
            lib.files.push(LibraryFile {
                display: s.display.clone(),
                path: s.path.clone(),
                sha256: sha.clone(),
            });
            let origin = Origin {
                display: s.display.clone(),
                path: s.path.clone(),
                sha256: sha,
            };
            match parse_pair_file(origin, &s.text, &lib.materials) {
                Ok((_, w)) => {
                    if let Some(old) = lib.pairs.get(&w.name) {
                        let same_folder = match (&old.origin.path, &w.origin.path) {
                            (Some(a), Some(b)) => a.parent() == b.parent(),
                            (None, None) => true,
                            _ => false,
                        };
                        if same_folder {
                            let (line, col) =
                                crate::ronpath::RonIndex::scan(&s.text).locate(&s.text, "name");
                            file_problem(
                                &mut lib.problems,
                                s,
                                Diagnostic {
                                    file: w.origin.display.clone(),
                                    line,
                                    col,
                                    field: "name".into(),
                                    message: format!(
                                        "duplicate pair name '{}' (also in {})",
                                        w.name, old.origin.display
                                    ),
                                    hint: Some("give each pair file its own name".into()),
                                },
                            );
                            // Neither file is used: which one a command took would depend on
                            // the order of the file names, which is no choice at all.
                            lib.pairs.remove(&w.name);
                            continue;
                        }
                        lib.warnings.push(format!(
                            "pair '{}' from {} shadows the one from {}",
                            w.name, w.origin.display, old.origin.display
                        ));
                    }
                    lib.pairs.insert(w.name.clone(), w);
                }
                Err(d) => lib.problems.push(FileProblem {
                    display: s.display.clone(),
                    pair_name: pair_name_of(s),
                    materials: false,
                    diagnostics: d,
                }),
            }
        }
        // Folder problems (unreadable folder, unreadable file) belong to no one file's pair.
        for d in problems {
            lib.problems.push(FileProblem {
                display: d.file.clone(),
                pair_name: None,
                materials: false,
                diagnostics: Diagnostics(vec![d]),
            });
        }
        Ok(lib)
    }

    /// Every problem of every file that could not be loaded, together (for `pair validate`).
    #[must_use]
    pub fn all_problems(&self) -> Vec<Diagnostic> {
        self.problems
            .iter()
            .flat_map(|p| p.diagnostics.0.iter().cloned())
            .collect()
    }

    /// A window made on the spot from two material ids and a flyer thickness, with the
    /// published default criteria (the pressure limit as the process's default,
    /// [`crate::pair::pressure_default`]), no boundaries and no trials.
    ///
    /// # Errors
    /// An unknown material id, as `(which, message)` with `which` "flyer" or "parent".
    pub fn ad_hoc_window(
        &self,
        flyer: &str,
        parent: &str,
        flyer_thickness: oblique_core::units::Length,
        parent_thickness: Option<oblique_core::units::Length>,
        convention: oblique_core::Convention,
        process: Option<&str>,
    ) -> Result<crate::PairWindow, (&'static str, String)> {
        let f = self.material(flyer).map_err(|m| ("flyer", m))?;
        let p = self.material(parent).map_err(|m| ("parent", m))?;
        let criteria = oblique_core::CriteriaConfig {
            pressure_enabled: crate::pair::pressure_default(process).0,
            ..oblique_core::CriteriaConfig::default()
        };
        Ok(crate::PairWindow {
            name: format!("{flyer}-on-{parent}"),
            description: "made from the command line with the published default criteria".into(),
            invented: None,
            flyer: f.clone(),
            parent: p.clone(),
            flyer_thickness,
            parent_thickness,
            convention,
            process: process.map(str::to_string),
            domain: oblique_core::ValidityDomain::default(),
            maintainer: String::new(),
            revisions: Vec::new(),
            criteria,
            criteria_reasons: std::collections::BTreeMap::new(),
            boundaries: Vec::new(),
            observations: Vec::new(),
            fitted: None,
            origin: crate::pair::Origin {
                display: "command line".into(),
                path: None,
                sha256: String::new(),
            },
        })
    }

    /// A material by id, or a message with close ids.
    ///
    /// # Errors
    /// A message naming close ids.
    pub fn material(&self, id: &str) -> Result<&MaterialRecord, String> {
        self.materials.get(id).ok_or_else(|| {
            let near = crate::diag::close_matches(id, self.materials.keys().map(String::as_str));
            let mut m = if near.is_empty() {
                format!("unknown material id '{id}'\n  hint: `oblique material list` shows the ids")
            } else {
                format!(
                    "unknown material id '{id}'\n  hint: did you mean {}?",
                    near.join(", ")
                )
            };
            for p in self.problems.iter().filter(|p| p.materials) {
                m.push_str(&format!(
                    "\n  hint: the materials file {} could not be loaded, so its materials are missing:\n{}",
                    p.display, p.diagnostics
                ));
            }
            m
        })
    }

    /// A pair by name, or a message with close names.
    ///
    /// # Errors
    /// A message naming close pairs.
    pub fn pair(&self, name: &str) -> Result<&PairWindow, String> {
        if let Some(p) = self
            .problems
            .iter()
            .find(|p| p.pair_name.as_deref() == Some(name) && !self.pairs.contains_key(name))
        {
            return Err(format!(
                "pair '{name}' is in a file that could not be loaded:\n{}\n{} problem(s) in {}",
                p.diagnostics,
                p.diagnostics.0.len(),
                p.display
            ));
        }
        self.pairs.get(name).ok_or_else(|| {
            let near = crate::diag::close_matches(name, self.pairs.keys().map(String::as_str));
            let mut m = if near.is_empty() {
                format!("unknown pair '{name}'\n  hint: `oblique pair list` shows the pairs")
            } else {
                format!(
                    "unknown pair '{name}'\n  hint: did you mean {}?",
                    near.join(", ")
                )
            };
            // A pair file is found by the name inside it, which a file that could not be
            // loaded does not give: name every such file, with its problems, since the pair
            // may be in one of them (a file named otherwise than its pair, `w.ron` holding
            // `name: "shop-al-cu"`, is allowed).
            for p in self
                .problems
                .iter()
                .filter(|p| !p.materials && p.pair_name.as_deref().is_none_or(|n| !self.pairs.contains_key(n)))
            {
                m.push_str(&format!(
                    "\n  hint: the window file {} could not be loaded, so a pair it defines is missing:\n{}",
                    p.display, p.diagnostics
                ));
            }
            m
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::materials::MaterialFile;
    use crate::pair::PairFile;

    fn to_ron<T: serde::Serialize>(v: &T) -> String {
        let cfg =
            ron::ser::PrettyConfig::new().extensions(ron::extensions::Extensions::IMPLICIT_SOME);
        ron::ser::to_string_pretty(v, cfg).expect("serialises")
    }

    /// Load, save (canonical form) and load again every built-in file: the same content comes back.
    #[test]
    fn every_built_in_file_round_trips() {
        let lib = Library::load(&[]).expect("built-in library loads");
        let mut n = 0;
        for (rel, text) in BUILTIN_FILES {
            if rel.starts_with("machines/") || *rel == REFERENCES_FILE {
                continue;
            }
            n += 1;
            if *rel == MATERIALS_FILE {
                let (first, recs) = parse_material_file(rel, text).expect("loads");
                let saved = to_ron(&first);
                let (second, recs2) = parse_material_file(rel, &saved).expect("reloads");
                assert_eq!(first, second);
                assert_eq!(recs, recs2);
                let _: MaterialFile = second;
            } else {
                let origin = Origin {
                    display: (*rel).into(),
                    path: None,
                    sha256: String::new(),
                };
                let (first, w1) =
                    parse_pair_file(origin.clone(), text, &lib.materials).expect("loads");
                let saved = to_ron(&first);
                let (second, w2) =
                    parse_pair_file(origin, &saved, &lib.materials).expect("reloads");
                assert_eq!(first, second);
                let _: PairFile = second;
                assert_eq!(w1.observations, w2.observations);
                assert_eq!(w1.boundaries, w2.boundaries);
                assert_eq!(w1.criteria, w2.criteria);
            }
        }
        assert!(
            n >= 2,
            "expected the materials file and at least one pair window"
        );
    }

    #[test]
    fn the_twelve_required_materials_are_built_in() {
        let lib = Library::load(&[]).expect("loads");
        for id in [
            "aa1100-o",
            "aa6061-t6",
            "aa5083-o",
            "cu-c11000",
            "brass-c26000",
            "az31b-o",
            "steel-1018",
            "ss304",
            "ti-gr2",
            "ti6al4v",
            "ni200",
            "ta",
        ] {
            let m = lib.material(id).expect("present");
            assert!(!m.sources.is_empty());
        }
    }

    #[test]
    fn unknown_names_suggest_close_ones() {
        let lib = Library::load(&[]).expect("loads");
        let e = lib.material("ss30").unwrap_err();
        assert!(e.contains("ss304"), "{e}");
    }
}
