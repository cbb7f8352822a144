//! The machine library: built-in files and the `machines/` folders of user libraries, lookups
//! by name and kind, and the one write: appending a calibration.

use super::*;

/// All machine files: built-in ones and those of user folders.
#[derive(Debug, Clone, Default)]
pub struct Machines {
    /// Records by name.
    pub items: BTreeMap<String, MachineRecord>,
    /// Shadowing notes for the user.
    pub warnings: Vec<String>,
    /// Files that could not be loaded (left out; the name they would define, from the file
    /// name, gives their diagnostics when asked for).
    pub problems: Vec<crate::library::FileProblem>,
}

/// Record one problem of a machine file.
fn push_problem(
    problems: &mut Vec<crate::library::FileProblem>,
    display: &str,
    stem: Option<String>,
    d: Diagnostic,
) {
    problems.push(crate::library::FileProblem {
        display: display.to_string(),
        pair_name: stem,
        materials: false,
        diagnostics: Diagnostics(vec![d]),
    });
}

fn user_machine_files(
    dir: &Path,
    problems: &mut Vec<Diagnostic>,
) -> Vec<(String, PathBuf, String)> {
    let folder = dir.join(MACHINES_DIR);
    let Ok(entries) = std::fs::read_dir(&folder) else {
        // A library folder without machines is normal.
        return Vec::new();
    };
    let mut paths: Vec<PathBuf> = entries.filter_map(Result::ok).map(|e| e.path()).collect();
    paths.sort();
    let mut out = Vec::new();
    for p in paths {
        let name = p.file_name().and_then(|n| n.to_str()).unwrap_or_default();
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
                out.push((display, p.clone(), text));
            }
            Err(e) => problems.push(Diagnostic {
                file: display,
                line: 1,
                col: 1,
                field: String::new(),
                message: format!("cannot read: {e}"),
                hint: None,
            }),
        }
    }
    out
}

impl Machines {
    /// Load the built-in machine files, then `DIR/machines/*.ron` of each user folder (earlier
    /// folders win over later ones, all win over built-in files, with a warning).
    ///
    /// # Errors
    /// Every problem of every file, together.
    pub fn load(user_dirs: &[PathBuf]) -> Result<Machines, Diagnostics> {
        let mut m = Machines::default();
        let mut problems = Vec::new();
        let mut sources: Vec<(String, Option<PathBuf>, String)> = BUILTIN_FILES
            .iter()
            .filter(|(rel, _)| rel.starts_with("machines/"))
            .map(|(rel, text)| (format!("built-in:windows/{rel}"), None, (*text).to_string()))
            .collect();
        let builtin_count = sources.len();
        for dir in user_dirs.iter().rev() {
            for (d, p, t) in user_machine_files(dir, &mut problems) {
                sources.push((d, Some(p), t));
            }
        }
        for (k, (display, path, text)) in sources.into_iter().enumerate() {
            let stem = path
                .as_ref()
                .and_then(|p| p.file_stem())
                .and_then(|n| n.to_str())
                .map(str::to_string);
            let origin = Origin {
                display: display.clone(),
                path: path.clone(),
                sha256: sha256_hex(text.as_bytes()),
            };
            match parse_machine_file(origin, &text) {
                Ok((_, rec)) => {
                    if let MachineItem::Bank(b) = &rec.item {
                        if let Some(rd) = &b.ring_down {
                            for (what, written, derived, unit) in [
                                (
                                    "inductance",
                                    b.inductance.value.si(),
                                    rd.fit.inductance.si(),
                                    1e9,
                                ),
                                (
                                    "resistance",
                                    b.resistance.value.si(),
                                    rd.fit.resistance.si(),
                                    1e3,
                                ),
                            ] {
                                let rel = (written / derived - 1.0).abs();
                                if rel > 0.1 {
                                    m.warnings.push(format!(
                                        "bank '{}' ({}): the written {what} {:.4} {} differs from the ring-down record's {:.4} by {:.0} %; the written value is used",
                                        rec.name,
                                        rec.origin.display,
                                        written * unit,
                                        if unit > 1e6 { "nH" } else { "mohm" },
                                        derived * unit,
                                        100.0 * rel
                                    ));
                                }
                            }
                        }
                    }
                    if let Some(old) = m.items.get(&rec.name) {
                        let same_folder = k < builtin_count
                            || match (&old.origin.path, &path) {
                                (Some(a), Some(b)) => a.parent() == b.parent(),
                                _ => false,
                            };
                        if same_folder {
                            push_problem(
                                &mut m.problems,
                                &display,
                                stem,
                                Diagnostic {
                                    file: display.clone(),
                                    line: 1,
                                    col: 1,
                                    field: "name".into(),
                                    message: format!(
                                        "duplicate machine name '{}' (also in {})",
                                        rec.name, old.origin.display
                                    ),
                                    hint: Some("give each machine file its own name".into()),
                                },
                            );
                            continue;
                        }
                        m.warnings.push(format!(
                            "machine '{}' from {} shadows the one from {}",
                            rec.name, rec.origin.display, old.origin.display
                        ));
                    }
                    m.items.insert(rec.name.clone(), rec);
                }
                Err(d) => m.problems.push(crate::library::FileProblem {
                    display: display.clone(),
                    pair_name: stem,
                    materials: false,
                    diagnostics: d,
                }),
            }
        }
        for d in problems {
            let display = d.file.clone();
            push_problem(&mut m.problems, &display, None, d);
        }
        Ok(m)
    }

    /// A record by name, or a message with close names.
    ///
    /// # Errors
    /// A message naming close names.
    pub fn get(&self, name: &str) -> Result<&MachineRecord, String> {
        if !self.items.contains_key(name) {
            if let Some(p) = self
                .problems
                .iter()
                .find(|p| p.pair_name.as_deref() == Some(name))
            {
                return Err(format!(
                    "machine file '{name}' could not be loaded:\n{}\n{} problem(s) in {}",
                    p.diagnostics,
                    p.diagnostics.0.len(),
                    p.display
                ));
            }
        }
        self.items.get(name).ok_or_else(|| {
            let near = close_matches(name, self.items.keys().map(String::as_str));
            let known: Vec<&str> = self.items.keys().map(String::as_str).collect();
            if near.is_empty() {
                format!(
                    "unknown machine file name '{name}'\n  hint: known names: {}",
                    if known.is_empty() {
                        "none".to_string()
                    } else {
                        known.join(", ")
                    }
                )
            } else {
                format!(
                    "unknown machine file name '{name}'\n  hint: did you mean {}?",
                    near.join(", ")
                )
            }
        })
    }

    fn wrong_kind(rec: &MachineRecord, wanted: &str) -> String {
        format!(
            "'{}' ({}) is a {}, not a {wanted}",
            rec.name,
            rec.origin.display,
            rec.item.kind()
        )
    }

    /// A bank by name.
    ///
    /// # Errors
    /// Unknown name, or a file of another kind.
    pub fn bank(&self, name: &str) -> Result<(&MachineRecord, &BankSpec), String> {
        let rec = self.get(name)?;
        match &rec.item {
            MachineItem::Bank(b) => Ok((rec, b)),
            _ => Err(Self::wrong_kind(rec, "capacitor bank")),
        }
    }

    /// A compression coil by name.
    ///
    /// # Errors
    /// Unknown name, or a file of another kind.
    pub fn compression_coil(
        &self,
        name: &str,
    ) -> Result<(&MachineRecord, &CompressionCoilSpec), String> {
        let rec = self.get(name)?;
        match &rec.item {
            MachineItem::CompressionCoil(c) => Ok((rec, c)),
            _ => Err(Self::wrong_kind(rec, "compression coil")),
        }
    }

    /// A bar coil by name.
    ///
    /// # Errors
    /// Unknown name, or a file of another kind.
    pub fn bar_coil(&self, name: &str) -> Result<(&MachineRecord, &BarCoilSpec), String> {
        let rec = self.get(name)?;
        match &rec.item {
            MachineItem::BarCoil(c) => Ok((rec, c)),
            _ => Err(Self::wrong_kind(rec, "bar coil")),
        }
    }

    /// An explosive set-up by name.
    ///
    /// # Errors
    /// Unknown name, or a file of another kind.
    pub fn explosive(&self, name: &str) -> Result<(&MachineRecord, &ExplosiveSpec), String> {
        let rec = self.get(name)?;
        match &rec.item {
            MachineItem::Explosive(e) => Ok((rec, e)),
            _ => Err(Self::wrong_kind(rec, "explosive set-up")),
        }
    }
}

/// The text of a built-in machine file by its name field, for copying into a user folder.
pub fn builtin_text(name: &str) -> Option<&'static str> {
    BUILTIN_FILES
        .iter()
        .filter(|(rel, _)| rel.starts_with("machines/"))
        .find(|(rel, text)| {
            let origin = Origin {
                display: (*rel).to_string(),
                path: None,
                sha256: String::new(),
            };
            parse_machine_file(origin, text).is_ok_and(|(f, _)| f.name == name)
        })
        .map(|(_, t)| *t)
}

/// Render a calibration entry as RON, indented for the top-level list.
pub fn render_calibration(e: &CalibrationEntry) -> String {
    let mut s = String::from("        (\n");
    let mut field =
        |k: &str, v: &str| s.push_str(&format!("            {k}: {},\n", ron_string(v)));
    field("efficiency", &e.efficiency);
    field("model", &e.model);
    if let Some(c) = &e.coil {
        field("coil", c);
    }
    field("date", &e.date);
    field("measured_velocity", &e.measured_velocity);
    field("charge_voltage", &e.charge_voltage);
    field("standoff", &e.standoff);
    if let Some(f) = &e.flyer {
        field("flyer", f);
    }
    if let Some(t) = &e.flyer_thickness {
        field("flyer_thickness", t);
    }
    field("settings", &e.settings);
    if let Some(u) = &e.velocity_uncertainty {
        field("velocity_uncertainty", u);
    }
    field("source", &e.source);
    s.push_str("        ),\n");
    s
}

/// The text of a machine file with `entry` appended to its `calibrations` list (the list is
/// created when absent); every other byte is kept.
///
/// # Errors
/// [`WriteError::Structure`] when the file has no place to append.
pub fn append_calibration_text(
    path: &Path,
    text: &str,
    entry: &CalibrationEntry,
) -> Result<String, WriteError> {
    crate::write::append_to_top_list(path, text, "calibrations", &render_calibration(entry))
}

/// Append a calibration to the user's machine file at `path`: the new text is validated first,
/// then written atomically, refusing if the file changed on disk since it was read (or since
/// `expected_sha256`, when the caller read it earlier).
///
/// # Errors
/// [`WriteError`]; the file is untouched on every error.
pub fn append_calibration(
    path: &Path,
    entry: &CalibrationEntry,
    expected_sha256: Option<&str>,
) -> Result<MachineRecord, WriteError> {
    update_file(
        path,
        expected_sha256,
        |text| append_calibration_text(path, text, entry),
        |origin, text| parse_machine_file(origin, text).map(|(_, r)| r),
    )
}
