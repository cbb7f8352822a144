//! `oblique pair validate`: every problem of every file, with its position.

use super::*;

pub(super) fn validate(dirs: &[PathBuf], files: &[PathBuf], json: bool) -> CmdResult {
    let mut problems: Vec<oblique_window::Diagnostic> = Vec::new();
    let mut checked = Vec::new();
    if files.is_empty() {
        let lib = Library::load(&user_dirs(dirs))?;
        checked.extend(lib.files.iter().map(|f| f.display.clone()));
        problems.extend(lib.all_problems());
        // The machine files (banks, coils, explosive set-ups) too.
        let machines = oblique_window::machine::Machines::load(&user_dirs(dirs))?;
        checked.extend(machines.items.values().map(|r| r.origin.display.clone()));
        for p in &machines.problems {
            checked.push(p.display.clone());
            problems.extend(p.diagnostics.0.iter().cloned());
        }
    } else {
        // Materials come from the library (which must itself load).
        let lib = Library::load(&user_dirs(dirs))?;
        let mut names: std::collections::HashMap<String, String> = std::collections::HashMap::new();
        for f in files {
            // A pair name where no such file exists: that pair's file (`pair validate shop1`).
            let by_name = (!f.exists()).then(|| pair_file_of(&lib, f)).flatten();
            let f = match by_name {
                Some(PairFileOf::Path(p)) => p,
                Some(PairFileOf::BuiltIn(display)) => {
                    // Built into the binary and loaded with it: nothing can be wrong with it.
                    checked.push(display);
                    continue;
                }
                None => f.clone(),
            };
            let f = &f;
            let display = f.display().to_string();
            checked.push(display.clone());
            let text = match oblique_window::files::read_text_bounded(f) {
                Ok(t) => t,
                Err(e) => {
                    problems.push(oblique_window::Diagnostic {
                        file: display,
                        line: 1,
                        col: 1,
                        field: String::new(),
                        message: format!("cannot read: {e}"),
                        hint: None,
                    });
                    continue;
                }
            };
            let origin = Origin {
                display: display.clone(),
                path: Some(f.clone()),
                sha256: sha256_hex(text.as_bytes()),
            };
            let (name_line, name_col) =
                oblique_window::ronpath::RonIndex::scan(&text).locate(&text, "name");
            let result = if text.contains("oblique-materials/") {
                oblique_window::materials::parse_material_file(&display, &text).map(|_| ())
            } else {
                parse_pair_file(origin, &text, &lib.materials).map(|(_, w)| {
                    if let Some(first) = names.insert(w.name.clone(), display.clone()) {
                        problems.push(oblique_window::Diagnostic {
                            file: display.clone(),
                            line: name_line,
                            col: name_col,
                            field: "name".into(),
                            message: format!("duplicate pair name '{}' (also in {first})", w.name),
                            hint: Some("give each pair file its own name".into()),
                        });
                    }
                })
            };
            if let Err(d) = result {
                problems.extend(d.0);
            }
        }
    }
    if json {
        let v = json!({
            "files": checked,
            "problems": problems.iter().map(|p| json!({"file": p.file, "line": p.line, "col": p.col, "field": p.field, "message": p.message, "hint": p.hint})).collect::<Vec<_>>(),
            "valid": problems.is_empty(),
        });
        emit_json(&v)?;
    } else if problems.is_empty() {
        emit(&format!("{} file(s) valid\n", checked.len()))?;
    } else {
        let text: Vec<String> = problems.iter().map(ToString::to_string).collect();
        errln!("{}", text.join("\n"));
        errln!("{} problem(s)", problems.len());
    }
    if problems.is_empty() {
        Ok(())
    } else {
        Err(Fail {
            message: String::new(),
            code: 2,
        })
    }
}

/// Where a pair named on the command line lives.
enum PairFileOf {
    Path(PathBuf),
    BuiltIn(String),
}

/// The file of the pair named `arg` (a bare name: no folder, no extension), loaded or broken.
fn pair_file_of(lib: &Library, arg: &std::path::Path) -> Option<PairFileOf> {
    let name = arg.to_str()?;
    if arg.components().count() != 1 || arg.extension().is_some() {
        return None;
    }
    if let Some(w) = lib.pairs.get(name) {
        return Some(match &w.origin.path {
            Some(p) => PairFileOf::Path(p.clone()),
            None => PairFileOf::BuiltIn(w.origin.display.clone()),
        });
    }
    lib.problems
        .iter()
        .find(|p| p.pair_name.as_deref() == Some(name))
        .map(|p| PairFileOf::Path(PathBuf::from(&p.display)))
}
