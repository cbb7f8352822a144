//! Safe writes to the user's files: a temporary file in the same folder, fsync, rename, fsync of
//! the folder. An append re-validates the whole new text before anything is written, keeps every
//! other byte of the file as it was (comments and order included), and refuses to overwrite a
//! file that changed on disk since it was read.

use crate::diag::Diagnostics;
use crate::library::sha256_hex;
use crate::materials::MaterialRecord;
use crate::pair::{parse_pair_file, ObservationEntry, Origin, PairWindow, WINDOW_FORMAT};
use crate::ronpath::RonIndex;
use oblique_core::Convention;
use std::collections::BTreeMap;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Test hook: when set to a number of milliseconds, a write pauses that long after the temporary
/// file is complete and before the rename, so that a test can kill the process mid-write.
pub const FAULT_PAUSE_ENV: &str = "OBLIQUE_FAULT_PAUSE_BEFORE_RENAME_MS";

/// Why a write did not happen. In every case the target file is as it was.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    /// Reading, writing or renaming failed.
    #[error("{path}: {source}")]
    Io {
        /// The file.
        path: PathBuf,
        /// The OS error.
        source: std::io::Error,
    },
    /// The file changed on disk since it was read.
    #[error("{path}: the file changed on disk since it was read (expected sha256 {expected}, found {found}); nothing was written")]
    Conflict {
        /// The file.
        path: PathBuf,
        /// Hash when read.
        expected: String,
        /// Hash now.
        found: String,
    },
    /// The file would not be valid after the change.
    #[error("the change would leave an invalid file; nothing was written:\n{0}")]
    Invalid(Diagnostics),
    /// The target already exists.
    #[error("{0}: already exists; nothing was written")]
    Exists(PathBuf),
    /// The file's structure is not one we can append to.
    #[error("{path}: {message}; nothing was written")]
    Structure {
        /// The file.
        path: PathBuf,
        /// What is wrong.
        message: String,
    },
}

fn io(path: &Path) -> impl FnOnce(std::io::Error) -> WriteError + '_ {
    move |source| WriteError::Io {
        path: path.to_path_buf(),
        source,
    }
}

/// Write `bytes` to `path` atomically. When `expected_sha256` is given, the current file must
/// still have that hash just before the rename.
///
/// # Errors
/// [`WriteError`]; the target is untouched on every error.
pub fn atomic_write(
    path: &Path,
    bytes: &[u8],
    expected_sha256: Option<&str>,
) -> Result<(), WriteError> {
    let dir = path
        .parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let name = path.file_name().and_then(|n| n.to_str()).unwrap_or("file");
    let tmp = dir.join(format!(".{name}.tmp-{}", std::process::id()));
    let result = (|| {
        let mut f = std::fs::OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(&tmp)
            .map_err(io(&tmp))?;
        f.write_all(bytes).map_err(io(&tmp))?;
        f.sync_all().map_err(io(&tmp))?;
        drop(f);
        if let Some(ms) = std::env::var(FAULT_PAUSE_ENV)
            .ok()
            .and_then(|v| v.parse::<u64>().ok())
        {
            std::thread::sleep(std::time::Duration::from_millis(ms));
        }
        if let Some(expected) = expected_sha256 {
            let now = std::fs::read(path).map_err(io(path))?;
            let found = sha256_hex(&now);
            if found != expected {
                return Err(WriteError::Conflict {
                    path: path.to_path_buf(),
                    expected: expected.to_string(),
                    found,
                });
            }
        }
        std::fs::rename(&tmp, path).map_err(io(path))?;
        if let Ok(d) = std::fs::File::open(dir) {
            let _ = d.sync_all();
        }
        Ok(())
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result
}

/// Quote a string for RON.
pub fn ron_string(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 2);
    out.push('"');
    for ch in s.chars() {
        match ch {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\t' => out.push_str("\\t"),
            c if c.is_control() => out.push_str(&format!("\\u{{{:x}}}", c as u32)),
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

/// Render an observation as RON text, indented for a list inside the top-level struct.
pub fn render_observation(o: &ObservationEntry) -> String {
    let mut s = String::from("        (\n");
    let mut field =
        |k: &str, v: &str| s.push_str(&format!("            {k}: {},\n", ron_string(v)));
    field("velocity", &o.velocity);
    field("angle", &o.angle);
    field("outcome", &o.outcome);
    field("process", &o.process);
    field("method", &o.method);
    if let Some(v) = &o.velocity_uncertainty {
        field("velocity_uncertainty", v);
    }
    if let Some(v) = &o.angle_uncertainty {
        field("angle_uncertainty", v);
    }
    if let Some(v) = &o.date {
        field("date", v);
    }
    field("source", &o.source);
    if let Some(v) = &o.note {
        field("note", v);
    }
    s.push_str("        ),\n");
    s
}

/// The text of `text` with `entries` appended to its `observations` list; every other byte kept.
///
/// # Errors
/// [`WriteError::Structure`] when the file has no place to append.
pub fn append_observation_text(
    path: &Path,
    text: &str,
    entries: &[ObservationEntry],
) -> Result<String, WriteError> {
    let rendered: String = entries.iter().map(render_observation).collect();
    append_to_top_list(path, text, "observations", &rendered)
}

/// The text of `text` with `rendered` (already indented list items) appended to the top-level
/// list field `list`; the list is created before the top-level closing parenthesis when absent.
/// Every other byte is kept: a missing comma goes right after the last value, and trailing
/// comments stay where they are.
///
/// # Errors
/// [`WriteError::Structure`] when the file has no place to append.
pub fn append_to_top_list(
    path: &Path,
    text: &str,
    list: &str,
    rendered: &str,
) -> Result<String, WriteError> {
    let index = RonIndex::scan(text);
    if let Some(end) = index.list_end(list) {
        let value_end = strip_trailing_comments(&text[..end]).len();
        let last = text[..value_end].trim_end().chars().last();
        let needs_comma = !matches!(last, Some('[') | Some(','));
        let line_start = text[..end].rfind('\n').map_or(0, |i| i + 1);
        let bracket_on_own_line = text[line_start..end].trim().is_empty();
        let mut out = String::with_capacity(text.len() + rendered.len() + 8);
        out.push_str(&text[..value_end]);
        if needs_comma {
            out.push(',');
        }
        if bracket_on_own_line {
            out.push_str(&text[value_end..line_start]);
            out.push_str(rendered);
            out.push_str(&text[line_start..]);
        } else {
            out.push_str(&text[value_end..end]);
            out.push('\n');
            out.push_str(rendered);
            out.push_str("    ");
            out.push_str(&text[end..]);
        }
        return Ok(out);
    }
    // No such list yet: add one before the top-level struct's closing parenthesis.
    let close = strip_trailing_comments(text)
        .rfind(')')
        .ok_or_else(|| WriteError::Structure {
            path: path.to_path_buf(),
            message: "no closing parenthesis found for the top-level structure".into(),
        })?;
    let head = text[..close].trim_end();
    let comma = if head.ends_with(',') || head.ends_with('(') {
        ""
    } else {
        ","
    };
    Ok(format!(
        "{head}{comma}\n    {list}: [\n{rendered}    ],\n{}",
        &text[close..]
    ))
}

/// `s` without trailing blank space and `//` comments (a `//` inside a string does not count).
fn strip_trailing_comments(s: &str) -> &str {
    let mut s = s.trim_end();
    loop {
        let line_start = s.rfind('\n').map_or(0, |i| i + 1);
        let line = &s[line_start..];
        let mut in_string = false;
        let mut escaped = false;
        let mut comment_at = None;
        let bytes = line.as_bytes();
        for (i, &b) in bytes.iter().enumerate() {
            if in_string {
                if escaped {
                    escaped = false;
                } else if b == b'\\' {
                    escaped = true;
                } else if b == b'"' {
                    in_string = false;
                }
            } else if b == b'"' {
                in_string = true;
            } else if b == b'/' && bytes.get(i + 1) == Some(&b'/') {
                comment_at = Some(i);
                break;
            }
        }
        match comment_at {
            Some(pos) => {
                s = s[..line_start + pos].trim_end();
                if pos > 0 {
                    return s;
                }
            }
            None => return s,
        }
    }
}

/// Update the user's file at `path`: read it (refusing if it is not `expected_sha256`, when the
/// caller read it earlier), make the new text with `edit`, check it with `parse` (given the
/// new text's origin), then write it atomically, refusing if the file changed on disk since it
/// was read. What `parse` returns is the result.
///
/// # Errors
/// [`WriteError`]; the file is untouched on every error.
pub fn update_file<T>(
    path: &Path,
    expected_sha256: Option<&str>,
    edit: impl FnOnce(&str) -> Result<String, WriteError>,
    parse: impl FnOnce(Origin, &str) -> Result<T, Diagnostics>,
) -> Result<T, WriteError> {
    let bytes = std::fs::read(path).map_err(io(path))?;
    let read_sha = sha256_hex(&bytes);
    if let Some(expected) = expected_sha256 {
        if expected != read_sha {
            return Err(WriteError::Conflict {
                path: path.to_path_buf(),
                expected: expected.to_string(),
                found: read_sha,
            });
        }
    }
    let text = String::from_utf8(bytes).map_err(|e| WriteError::Structure {
        path: path.to_path_buf(),
        message: format!("not UTF-8 text: {e}"),
    })?;
    let new_text = edit(&text)?;
    let origin = Origin {
        display: path.display().to_string(),
        path: Some(path.to_path_buf()),
        sha256: sha256_hex(new_text.as_bytes()),
    };
    let parsed = parse(origin, &new_text).map_err(WriteError::Invalid)?;
    atomic_write(path, new_text.as_bytes(), Some(&read_sha))?;
    Ok(parsed)
}

/// Append observations to the pair file at `path`: validate the new text against `materials`,
/// then write atomically, refusing if the file changed since it was read (or since
/// `expected_sha256`, when the caller read it earlier).
///
/// # Errors
/// [`WriteError`]; the file is untouched on every error.
pub fn append_observations(
    path: &Path,
    entries: &[ObservationEntry],
    materials: &BTreeMap<String, MaterialRecord>,
    expected_sha256: Option<&str>,
) -> Result<PairWindow, WriteError> {
    update_file(
        path,
        expected_sha256,
        |text| append_observation_text(path, text, entries),
        |origin, text| parse_pair_file(origin, text, materials).map(|(_, w)| w),
    )
}

/// What a new pair window file starts with.
#[derive(Debug, Clone)]
pub struct NewPair<'a> {
    /// Pair name.
    pub name: &'a str,
    /// What the window is for (may be empty).
    pub description: &'a str,
    /// Flyer material id.
    pub flyer: &'a str,
    /// Parent material id.
    pub parent: &'a str,
    /// Flyer thickness with unit.
    pub flyer_thickness: &'a str,
    /// Parent thickness with unit, if known.
    pub parent_thickness: Option<&'a str>,
    /// Convention of the observations.
    pub convention: Convention,
    /// Who maintains the file.
    pub maintainer: &'a str,
    /// Creation date, YYYY-MM-DD.
    pub date: &'a str,
}

/// The text of a new pair window file with default criteria and no data yet.
pub fn new_pair_text(p: &NewPair<'_>) -> String {
    let NewPair {
        name,
        description,
        flyer,
        parent,
        flyer_thickness,
        parent_thickness,
        convention,
        maintainer,
        date,
    } = p;
    let parent_line = parent_thickness.map_or(String::new(), |t| {
        format!("    parent_thickness: {},\n", ron_string(t))
    });
    format!(
        r#"// Pair window for oblique: {name}. Format described in docs/window-format.md.
// Quantities carry their units inside the strings. Criteria are at their usual defaults (docs/theory.md);
// give a reason when you change one.
(
    format: {format},
    name: {name_q},
    description: {description},
    flyer: {flyer},
    parent: {parent},
    flyer_thickness: {thickness},
{parent_line}    convention: {convention},
    maintainer: {maintainer},
    revisions: [
        (date: {date}, note: "created with `oblique pair new`"),
    ],
    criteria: (
        deribas_lower: (enabled: true, k: 0.6),
        strength_lower: (enabled: true),
        pressure_lower: (enabled: true, hel_multiple: 5.0),
        melting_upper: (enabled: true, n: 0.11, form: "a"),
        jetting: (enabled: true),
        wavy_transition: (enabled: true, critical_reynolds: 10.6),
    ),
    boundaries: [
    ],
    observations: [
    ],
)
"#,
        format = ron_string(WINDOW_FORMAT),
        name_q = ron_string(name),
        description = ron_string(description),
        flyer = ron_string(flyer),
        parent = ron_string(parent),
        thickness = ron_string(flyer_thickness),
        convention = ron_string(convention.as_str()),
        maintainer = ron_string(maintainer),
        date = ron_string(date),
    )
}

/// Create a new file atomically; refuses to replace an existing one.
///
/// # Errors
/// [`WriteError::Exists`] or an IO error.
pub fn create_new(path: &Path, text: &str) -> Result<(), WriteError> {
    if path.exists() {
        return Err(WriteError::Exists(path.to_path_buf()));
    }
    atomic_write(path, text.as_bytes(), None)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn obs(v: &str) -> ObservationEntry {
        ObservationEntry {
            velocity: v.into(),
            angle: "9 deg".into(),
            outcome: "welded".into(),
            process: "magnetic-pulse".into(),
            method: "measured".into(),
            velocity_uncertainty: None,
            angle_uncertainty: None,
            date: None,
            source: "shot \"7\"".into(),
            note: None,
        }
    }

    #[test]
    fn append_keeps_every_other_byte() {
        let text = new_pair_text(&NewPair {
            name: "p",
            description: "",
            flyer: "a",
            parent: "b",
            flyer_thickness: "1 mm",
            parent_thickness: None,
            convention: Convention::NormalToFlyer,
            maintainer: "me",
            date: "2026-12-01",
        });
        let once = append_observation_text(Path::new("p.ron"), &text, &[obs("300 m/s")]).unwrap();
        let twice = append_observation_text(Path::new("p.ron"), &once, &[obs("310 m/s")]).unwrap();
        assert!(twice.starts_with(&text[..text.find("observations: [").unwrap()]));
        assert!(twice.ends_with("    ],\n)\n"));
        assert_eq!(twice.matches("velocity:").count(), 2);
        let parsed: crate::pair::PairFile = ron::from_str(&twice).unwrap();
        assert_eq!(parsed.observations[1].velocity, "310 m/s");
        assert_eq!(parsed.observations[0].source, "shot \"7\"");
    }

    #[test]
    fn append_after_an_entry_without_trailing_comma_and_with_a_comment() {
        let text = "(\n    format: \"x\",\n    observations: [\n        (velocity: \"1 m/s\") // last\n    ],\n)\n";
        let out = append_observation_text(Path::new("p.ron"), text, &[obs("2 m/s")]).unwrap();
        assert!(out.contains("(velocity: \"1 m/s\"),"), "{out}");
        assert!(out.contains("// last"), "{out}");
    }

    #[test]
    fn adds_a_list_when_there_is_none() {
        let text = "(\n    format: \"x\",\n    name: \"n\"\n)\n";
        let out = append_observation_text(Path::new("p.ron"), text, &[obs("2 m/s")]).unwrap();
        assert!(out.contains("name: \"n\",\n    observations: ["), "{out}");
    }

    #[test]
    fn atomic_write_refuses_on_conflict_and_leaves_the_file() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("f.ron");
        std::fs::write(&p, "old").unwrap();
        let err = atomic_write(&p, b"new", Some("0000")).unwrap_err();
        assert!(matches!(err, WriteError::Conflict { .. }));
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "old");
        assert_eq!(
            std::fs::read_dir(dir.path()).unwrap().count(),
            1,
            "temporary file left behind"
        );
        atomic_write(&p, b"new", Some(&sha256_hex(b"old"))).unwrap();
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "new");
    }

    #[test]
    fn ron_strings_round_trip() {
        for s in [
            "plain",
            "quote \" and \\ backslash",
            "line\nbreak",
            "<script>alert(1)</script>",
        ] {
            let back: String = ron::from_str(&ron_string(s)).unwrap();
            assert_eq!(back, s);
        }
    }
}
