//! `oblique pair import`: shots from a CSV file, every row checked before anything is written,
//! every problem worded at its CSV row and field.

use super::*;

/// The import CSV's columns: each known name with its index and the unit in its brackets.
type Columns = std::collections::HashMap<&'static str, (usize, Option<String>)>;

/// Read and check the header: known names only, no name twice, the required columns present,
/// a unit wherever a quantity needs one.
fn import_columns(display: &str, headers: &csv::StringRecord) -> CmdResult<Columns> {
    let mut cols: Columns = std::collections::HashMap::new();
    let known = [
        "velocity",
        "angle",
        "outcome",
        "source",
        "process",
        "method",
        "date",
        "note",
        "velocity_uncertainty",
        "angle_uncertainty",
    ];
    for (i, h) in headers.iter().enumerate() {
        let (name, unit) = match h.split_once('[') {
            Some((n, rest)) => (
                n.trim(),
                Some(rest.trim_end_matches(']').trim().to_string()),
            ),
            None => (h.trim(), None),
        };
        let Some(k) = known.iter().find(|k| **k == name) else {
            let near = oblique_window::diag::closest(name, known);
            return Err(Fail::input(format!(
                "{display}:1: unknown column '{h}'{}",
                near.map_or(String::new(), |n| format!("\n  hint: did you mean '{n}'?"))
            )));
        };
        if let Some((first, _)) = cols.get(k) {
            return Err(Fail::input(format!(
                "{display}:1: column '{k}' appears twice (columns {} and {})\n  hint: keep one; oblique never picks one of two silently",
                first + 1,
                i + 1
            )));
        }
        cols.insert(k, (i, unit));
    }
    for required in ["velocity", "angle", "outcome", "source"] {
        if !cols.contains_key(required) {
            let separator = if headers.len() == 1 && headers.get(0).is_some_and(|h| h.contains(';'))
            {
                "\n  note: the header looks separated by ';': oblique reads comma-separated values"
            } else {
                ""
            };
            return Err(Fail::input(format!("{display}:1: missing column '{required}'\n  hint: header like velocity[m/s],angle[deg],outcome,source{separator}")));
        }
    }
    for (q, needs) in [
        ("velocity", true),
        ("angle", true),
        ("velocity_uncertainty", true),
        ("angle_uncertainty", true),
    ] {
        if let Some((_, unit)) = cols.get(q) {
            if needs && unit.is_none() {
                let example = if q.starts_with("velocity") {
                    "m/s"
                } else {
                    "deg"
                };
                return Err(Fail::input(format!(
                    "{display}:1: column '{q}' has no unit\n  hint: write it as {q}[{example}]"
                )));
            }
            if let Some(u) = unit {
                let kind = if q.starts_with("velocity") {
                    QuantityKind::Velocity
                } else {
                    QuantityKind::Angle
                };
                if let Err(e) = parse_quantity(&format!("1 {u}"), kind) {
                    return Err(Fail::input(format!("{display}:1: column '{q}[{u}]': {e}")));
                }
            }
        }
    }
    Ok(cols)
}

/// Read an import CSV: units in the header brackets, every row checked, all problems reported.
/// The 1-based line of a byte offset.
pub(super) fn line_of(bytes: &[u8], offset: u64) -> u64 {
    let mut end = usize::try_from(offset)
        .unwrap_or(usize::MAX)
        .min(bytes.len());
    // A record after blank lines starts, for the reader, at the first of them.
    while end < bytes.len() && matches!(bytes[end], b'\n' | b'\r') {
        end += 1;
    }
    1 + bytes[..end].iter().filter(|&&b| b == b'\n').count() as u64
}

/// A record the CSV reader refused, in words: the line and the column's name.
fn csv_problem(
    display: &str,
    bytes: &[u8],
    headers: &csv::StringRecord,
    row: u64,
    e: &csv::Error,
) -> String {
    match e.kind() {
        csv::ErrorKind::Utf8 { pos, err } => {
            let line = pos.as_ref().map_or(row, |p| line_of(bytes, p.byte()));
            let name = headers.get(err.field()).unwrap_or("?");
            format!(
                "{display}:{line}: field '{name}' (column {}) is not UTF-8 text (valid for its first {} byte(s)): save the file as UTF-8",
                err.field() + 1,
                err.valid_up_to()
            )
        }
        csv::ErrorKind::UnequalLengths {
            pos,
            expected_len,
            len,
        } => {
            let line = pos.as_ref().map_or(row, |p| line_of(bytes, p.byte()));
            format!(
                "{display}:{line}: the row has {len} field(s), the header {expected_len}: a comma too many or too few (quote a text holding a comma: \"a, b\")"
            )
        }
        _ => format!("{display}:{row}: {e}"),
    }
}

pub(super) fn read_import_csv(file: &Path) -> CmdResult<Vec<(u64, ObservationEntry)>> {
    let display = file.display().to_string();
    let bytes = crate::common::read_input(file)?;
    let mut rdr = csv::ReaderBuilder::new()
        .trim(csv::Trim::All)
        .from_reader(&bytes[..]);
    let headers = rdr
        .headers()
        .map_err(|e| Fail::input(format!("{display}: {e}")))?
        .clone();
    let cols = import_columns(&display, &headers)?;
    let mut problems = Vec::new();
    let mut out = Vec::new();
    for (n, rec) in rdr.records().enumerate() {
        let fallback_row = n as u64 + 2;
        // The row is the file's line (blank lines and a byte-order mark counted), from the
        // record's byte offset: the CSV reader's own line count skips blank lines.
        let row = rec
            .as_ref()
            .ok()
            .and_then(|r| r.position())
            .map_or(fallback_row, |p| line_of(&bytes, p.byte()));
        let rec = match rec {
            Ok(r) => r,
            Err(e) => {
                problems.push(csv_problem(&display, &bytes, &headers, row, &e));
                continue;
            }
        };
        let get = |k: &str| {
            cols.get(k)
                .and_then(|(i, _)| rec.get(*i))
                .map(str::to_string)
                .filter(|s| !s.is_empty())
        };
        let with_unit = |k: &str,
                         kind: QuantityKind,
                         problems: &mut Vec<String>|
         -> Option<String> {
            let (_, unit) = cols.get(k)?;
            let raw = get(k)?;
            let word = raw.trim().to_ascii_lowercase();
            if [
                "nan",
                "inf",
                "+inf",
                "-inf",
                "infinity",
                "+infinity",
                "-infinity",
            ]
            .contains(&word.as_str())
            {
                problems.push(format!(
                    "{display}:{row}: field '{k}': '{raw}' is not a finite number: write the measured value"
                ));
                return None;
            }
            if raw
                .trim_end()
                .ends_with(|c: char| c.is_ascii_alphabetic() || c == '/' || c == '%')
            {
                problems.push(format!(
                        "{display}:{row}: field '{k}': '{raw}' carries a unit, but the unit belongs in the header ([{}]): write the number only",
                        unit.clone().unwrap_or_default()
                    ));
                return None;
            }
            let text = format!("{raw} {}", unit.clone().unwrap_or_default());
            match parse_quantity(&text, kind) {
                Ok(_) => Some(text),
                Err(e) => {
                    problems.push(format!("{display}:{row}: field '{k}': {e}"));
                    None
                }
            }
        };
        let v = with_unit("velocity", QuantityKind::Velocity, &mut problems);
        let a = with_unit("angle", QuantityKind::Angle, &mut problems);
        if get("velocity").is_none() {
            problems.push(format!("{display}:{row}: field 'velocity' is empty"));
        }
        if get("angle").is_none() {
            problems.push(format!("{display}:{row}: field 'angle' is empty"));
        }
        let entry = ObservationEntry {
            velocity: v.unwrap_or_default(),
            angle: a.unwrap_or_default(),
            // Words match in any case (`Welded`, `not_welded`) and are stored canonically.
            outcome: get("outcome")
                .map(|w| oblique_window::pair::canonical_word(&w))
                .unwrap_or_default(),
            process: get("process").map_or_else(
                || "magnetic-pulse".into(),
                |w| oblique_window::pair::canonical_word(&w),
            ),
            method: get("method").map_or_else(
                || "measured".into(),
                |w| oblique_window::pair::canonical_word(&w),
            ),
            velocity_uncertainty: with_unit(
                "velocity_uncertainty",
                QuantityKind::Velocity,
                &mut problems,
            ),
            angle_uncertainty: with_unit("angle_uncertainty", QuantityKind::Angle, &mut problems),
            date: get("date"),
            source: get("source").unwrap_or_default(),
            note: get("note"),
        };
        for (field, value, kind) in [
            (
                "velocity_uncertainty",
                &entry.velocity_uncertainty,
                QuantityKind::Velocity,
            ),
            (
                "angle_uncertainty",
                &entry.angle_uncertainty,
                QuantityKind::Angle,
            ),
        ] {
            // Checked here with every other field, so that one run lists every problem.
            if let Some(x) = value.as_deref().and_then(|t| parse_quantity(t, kind).ok()) {
                if x < 0.0 {
                    problems.push(format!(
                        "{display}:{row}: field '{field}': must not be negative (an uncertainty is a spread)"
                    ));
                }
            }
        }
        if oblique_window::Outcome::parse(&entry.outcome).is_none() {
            problems.push(format!("{display}:{row}: field 'outcome': unknown outcome '{}'\n  hint: use welded, not-welded, partial or melted", entry.outcome));
        }
        if let Some(d) = &entry.date {
            if !oblique_window::pair::is_iso_date(d) {
                problems.push(format!(
                    "{display}:{row}: field 'date': '{d}' is not a calendar date YYYY-MM-DD"
                ));
            }
        }
        if entry.source.is_empty() {
            problems.push(format!("{display}:{row}: field 'source' is empty"));
        }
        if let Some(p) = oblique_window::text::one_line_problem(&entry.source) {
            problems.push(format!("{display}:{row}: field 'source': {p}"));
        }
        if let Ok(rad) = parse_quantity(&entry.angle, QuantityKind::Angle) {
            let d = rad.to_degrees();
            if !(d > 0.0 && d < 90.0) {
                problems.push(format!(
                    "{display}:{row}: field 'angle': {d} deg is outside (0, 90) deg"
                ));
            }
        }
        if let Ok(v) = parse_quantity(&entry.velocity, QuantityKind::Velocity) {
            if !(v > 0.0) {
                problems.push(format!(
                    "{display}:{row}: field 'velocity': must be above zero"
                ));
            }
        }
        out.push((row, entry));
    }
    if problems.is_empty() {
        Ok(out)
    } else {
        Err(Fail::input(format!(
            "{}\n{} problem(s); nothing was written",
            problems.join("\n"),
            problems.len()
        )))
    }
}

/// Validate the imported rows as the pair file would after the import, and word every problem
/// at its CSV row and column (never at lines of a pair file that does not exist yet).
pub(super) fn precheck_import(
    pair_path: &Path,
    csv_path: &Path,
    rows: &[(u64, ObservationEntry)],
    lib: &Library,
) -> CmdResult {
    let Ok(text) = oblique_window::files::read_text_bounded(pair_path) else {
        return Ok(()); // the append itself reports an unreadable file
    };
    let origin = |t: &str| Origin {
        display: pair_path.display().to_string(),
        path: Some(pair_path.to_path_buf()),
        sha256: sha256_hex(t.as_bytes()),
    };
    let Ok((_, before)) = parse_pair_file(origin(&text), &text, &lib.materials) else {
        return Ok(()); // a file already invalid: the append reports it
    };
    let n_old = before.observations.len();
    let entries: Vec<ObservationEntry> = rows.iter().map(|(_, e)| e.clone()).collect();
    let Ok(new_text) = oblique_window::write::append_observation_text(pair_path, &text, &entries)
    else {
        return Ok(());
    };
    let Err(d) = parse_pair_file(origin(&new_text), &new_text, &lib.materials) else {
        return Ok(());
    };
    let csv_display = csv_path.display();
    let mut lines = Vec::new();
    for p in &d.0 {
        let mapped = p
            .field
            .strip_prefix("observations[")
            .and_then(|rest| rest.split_once(']'))
            .and_then(|(k, field)| Some((k.parse::<usize>().ok()?, field)))
            .filter(|(k, _)| *k >= n_old)
            .and_then(|(k, field)| Some((rows.get(k - n_old)?.0, field.trim_start_matches('.'))));
        match mapped {
            Some((row, field)) => {
                let mut l = format!("{csv_display}:{row}: field '{field}': {}", p.message);
                if let Some(h) = &p.hint {
                    l.push_str(&format!("\n  hint: {h}"));
                }
                lines.push(l);
            }
            None => lines.push(p.to_string()),
        }
    }
    Err(Fail::input(format!(
        "{}\n{} problem(s); nothing was written",
        lines.join("\n"),
        lines.len()
    )))
}

pub(super) fn import(dirs: &[PathBuf], a: ImportArgs) -> CmdResult {
    let ImportArgs {
        name,
        file,
        if_unchanged,
        json,
    } = a;
    let lib = load_library(dirs)?;
    let w = lib.pair(&name).map_err(Fail::input)?;
    let path = user_file(w)?;
    let rows = read_import_csv(&file)?;
    if rows.is_empty() {
        return Err(Fail::input(format!("{}: no data rows", file.display())));
    }
    precheck_import(&path, &file, &rows, &lib)?;
    let lines: Vec<u64> = rows.iter().map(|(l, _)| *l).collect();
    let entries: Vec<ObservationEntry> = rows.into_iter().map(|(_, e)| e).collect();
    note_target(&path);
    let updated = append_observations(&path, &entries, &lib.materials, if_unchanged.as_deref())
        .map_err(write_fail)?;
    warn_repeats(&updated, &file, &lines);
    finish_append(&updated, &path, entries.len(), json)
}

/// A warning for every imported shot equal to one recorded before it (velocity, angle, outcome
/// and source): the same file imported twice, or a row repeated. Both are kept (a shot is never
/// dropped); the warning says where to look.
fn warn_repeats(w: &PairWindow, csv: &Path, lines: &[u64]) {
    let obs = &w.observations;
    let first = obs.len().saturating_sub(lines.len());
    for (k, o) in obs.iter().enumerate().skip(first) {
        let same = obs[..k].iter().find(|e| e.same_shot(o));
        if let Some(e) = same {
            errln!(
                "warning: {}:{}: shot #{} repeats shot #{} (same velocity, angle, outcome and source): was this file imported before? Both are kept; `oblique pair show {}` lists the shots",
                csv.display(),
                lines.get(k - first).copied().unwrap_or(0),
                o.index + 1,
                e.index + 1,
                w.name
            );
        }
    }
}
