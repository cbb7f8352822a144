//! `oblique pair ...`: list, show, new, observe, import, validate, agreement.

use crate::args::ConventionArg;
use crate::common::{load_library, today, user_dirs};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json, material_json, sig, table};
use crate::qarg;
use clap::{Subcommand, ValueEnum};
use oblique_core::units::{parse_quantity, QuantityKind};
use oblique_window::library::sha256_hex;
use oblique_window::pair::{parse_pair_file, Origin};
use oblique_window::write::{append_observations, create_new, new_pair_text, NewPair, WriteError};
use oblique_window::{agreement, Library, ObservationEntry, PairWindow};
use serde_json::{json, Value};
use std::path::{Path, PathBuf};

fn outcome_word(o: OutcomeArg) -> &'static str {
    match o {
        OutcomeArg::Welded => "welded",
        OutcomeArg::NotWelded => "not-welded",
        OutcomeArg::Partial => "partial",
        OutcomeArg::Melted => "melted",
    }
}

fn process_word(p: ProcessArg) -> &'static str {
    match p {
        ProcessArg::MagneticPulse => "magnetic-pulse",
        ProcessArg::Explosive => "explosive",
        ProcessArg::FoilActuator => "foil-actuator",
        ProcessArg::Laser => "laser",
        ProcessArg::GasGun => "gas-gun",
        ProcessArg::Other => "other",
    }
}

fn method_word(m: MethodArg) -> &'static str {
    match m {
        MethodArg::Measured => "measured",
        MethodArg::Simulated => "simulated",
        MethodArg::Estimated => "estimated",
    }
}

fn write_fail(e: WriteError) -> Fail {
    match e {
        WriteError::Io { .. } => Fail::other(e.to_string()),
        _ => Fail::input(e.to_string()),
    }
}

/// The user file of a pair, or an error saying that built-in pairs are read-only.
fn user_file(w: &PairWindow) -> CmdResult<PathBuf> {
    w.origin.path.clone().ok_or_else(|| {
        Fail::input(format!(
            "pair '{}' is built in and read-only\n  hint: create your own with `oblique --library DIR pair new ...`, or copy {} into a library folder",
            w.name, w.origin.display
        ))
    })
}

pub fn pair_summary_json(w: &PairWindow) -> Value {
    json!({
        "name": w.name,
        "flyer": w.flyer.material.id,
        "parent": w.parent.material.id,
        "flyer_thickness_m": sig(w.flyer_thickness.si()),
        "convention": w.convention.as_str(),
        "observations": w.observations.len(),
        "boundaries": w.boundaries.len(),
        "invented": w.invented.is_some(),
        "file": w.origin.display,
    })
}

pub fn pair_json(w: &PairWindow) -> Value {
    let mut v = pair_summary_json(w);
    let o = v.as_object_mut().map(std::mem::take).unwrap_or_default();
    let mut o = o;
    o.insert("description".into(), json!(w.description));
    o.insert("invented_statement".into(), json!(w.invented));
    o.insert("sha256".into(), json!(w.origin.sha256));
    o.insert("maintainer".into(), json!(w.maintainer));
    o.insert(
        "revisions".into(),
        json!(w
            .revisions
            .iter()
            .map(|r| json!({"date": r.date, "note": r.note}))
            .collect::<Vec<_>>()),
    );
    o.insert(
        "parent_thickness_m".into(),
        json!(w.parent_thickness.map(|t| sig(t.si()))),
    );
    o.insert("flyer_material".into(), material_json(&w.flyer, true));
    o.insert("parent_material".into(), material_json(&w.parent, true));
    o.insert("criteria".into(), json!(w.criteria));
    o.insert(
        "criteria_reasons".into(),
        json!(w
            .criteria_reasons
            .iter()
            .map(|(k, v)| (k.as_str().to_string(), v.clone()))
            .collect::<std::collections::BTreeMap<_, _>>()),
    );
    o.insert(
        "boundary_list".into(),
        json!(w
            .boundaries
            .iter()
            .map(|b| json!({
                "label": b.label,
                "plane": b.plane.as_str(),
                "weld_side": b.weld_side.as_str(),
                "points": b.points.iter().map(|(v, a)| json!({"velocity_m_s": sig(v.si()), "angle_deg": sig(a.degrees())})).collect::<Vec<_>>(),
                "provenance": b.provenance,
            }))
            .collect::<Vec<_>>()),
    );
    o.insert(
        "observation_list".into(),
        json!(w
            .observations
            .iter()
            .map(|ob| json!({
                "index": ob.index,
                "velocity_m_s": sig(ob.velocity.si()),
                "angle_deg": sig(ob.angle.degrees()),
                "outcome": ob.outcome.as_str(),
                "process": ob.process,
                "method": ob.method,
                "velocity_uncertainty_m_s": ob.velocity_uncertainty.map(|v| sig(v.si())),
                "angle_uncertainty_deg": ob.angle_uncertainty.map(|a| sig(a.degrees())),
                "date": ob.date,
                "source": ob.source,
                "note": ob.note,
            }))
            .collect::<Vec<_>>()),
    );
    Value::Object(o)
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum OutcomeArg {
    /// Sound weld.
    Welded,
    /// No bond.
    NotWelded,
    /// Bond over part of the interface.
    Partial,
    /// Melted or brittle interface.
    Melted,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ProcessArg {
    /// Magnetic pulse welding.
    MagneticPulse,
    /// Explosive welding.
    Explosive,
    /// Vaporizing foil actuator welding.
    FoilActuator,
    /// Laser impact welding.
    Laser,
    /// Gas gun.
    GasGun,
    /// Anything else.
    Other,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum MethodArg {
    /// Measured (PDV, high-speed imaging, ...).
    Measured,
    /// From a simulation.
    Simulated,
    /// Estimated.
    Estimated,
}

#[derive(Debug, Subcommand)]
pub enum PairCommand {
    /// List the pair windows.
    List {
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Show one pair window: materials, criteria, boundaries, observations, provenance.
    Show {
        /// Pair name.
        name: String,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Create a new pair window file in the first --library folder.
    #[command(
        after_help = "Example:\n  oblique --library ./shop pair new al-on-cu --flyer aa6061-t6 --parent cu-c11000 --flyer-thickness 1.5mm --convention normal-to-flyer"
    )]
    New {
        /// Pair name (also the file name: NAME.ron).
        name: String,
        /// Flyer material id.
        #[arg(long, value_name = "ID")]
        flyer: String,
        /// Parent material id.
        #[arg(long, value_name = "ID")]
        parent: String,
        /// Flyer thickness, e.g. 1.5mm.
        #[arg(long = "flyer-thickness", value_name = "LENGTH", allow_hyphen_values = true, value_parser = qarg::positive_length)]
        flyer_thickness: f64,
        /// Parent thickness, e.g. 12mm (only for the dissipated energy; default: a massive parent).
        #[arg(long = "parent-thickness", value_name = "LENGTH", allow_hyphen_values = true, value_parser = qarg::positive_length)]
        parent_thickness: Option<f64>,
        /// What the window is for, e.g. "busbar connector, tube on rod".
        #[arg(long, value_name = "TEXT")]
        description: Option<String>,
        /// Convention in which the trials' velocities are recorded.
        #[arg(long, value_enum, default_value = "normal-to-flyer")]
        convention: ConventionArg,
        /// Who maintains the file (default: $USER).
        #[arg(long, value_name = "TEXT")]
        maintainer: Option<String>,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Record one trial shot in a pair window (appended; the rest of the file is kept byte for byte).
    #[command(
        after_help = "Example:\n  oblique --library ./shop pair observe al-on-cu --velocity 320m/s --angle 9deg --outcome welded --source \"shot log 2026-11-30 #4\""
    )]
    Observe {
        /// Pair name.
        name: String,
        /// Measured impact velocity in the pair's convention, e.g. 320m/s.
        #[arg(long, value_name = "SPEED", allow_hyphen_values = true, value_parser = qarg::positive_velocity)]
        velocity: f64,
        /// Collision angle, strictly between 0 and 90 deg, e.g. 9deg.
        #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle)]
        angle: f64,
        /// What the section or peel test showed.
        #[arg(long, value_enum)]
        outcome: OutcomeArg,
        /// Report, shot log or paper the shot comes from.
        #[arg(long, value_name = "TEXT")]
        source: String,
        /// Free note.
        #[arg(long, value_name = "TEXT")]
        note: Option<String>,
        /// Process that drove the flyer.
        #[arg(long, value_enum, default_value = "magnetic-pulse")]
        process: ProcessArg,
        /// How velocity and angle were obtained.
        #[arg(long, value_enum, default_value = "measured")]
        method: MethodArg,
        /// Standard uncertainty of the velocity, e.g. 15m/s.
        #[arg(long = "velocity-uncertainty", value_name = "SPEED", allow_hyphen_values = true, value_parser = qarg::positive_velocity)]
        velocity_uncertainty: Option<f64>,
        /// Standard uncertainty of the angle, e.g. 1deg.
        #[arg(long = "angle-uncertainty", value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle)]
        angle_uncertainty: Option<f64>,
        /// Date of the shot, YYYY-MM-DD (default: today).
        #[arg(long, value_name = "DATE", value_parser = qarg::date)]
        date: Option<String>,
        /// Refuse to write unless the file still has this SHA-256 (from `pair show --json`).
        #[arg(long = "if-unchanged", value_name = "SHA256")]
        if_unchanged: Option<String>,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Import many shots from a CSV file (all rows are checked before anything is written).
    #[command(
        after_help = "CSV header (units in brackets; velocity in m/s or km/s, angle in deg or rad):
  velocity[m/s],angle[deg],outcome,source,process,method,date,note,velocity_uncertainty[m/s],angle_uncertainty[deg]
The first four columns are required; the others are optional."
    )]
    Import {
        /// Pair name.
        name: String,
        /// CSV file.
        file: PathBuf,
        /// Refuse to write unless the pair file still has this SHA-256 (from `pair show --json`).
        #[arg(long = "if-unchanged", value_name = "SHA256")]
        if_unchanged: Option<String>,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Validate pair window files (default: the whole library); every problem at once, exit 2 if any.
    Validate {
        /// Files to validate.
        files: Vec<PathBuf>,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Compare the window's predictions with its trial observations.
    Agreement {
        /// Pair name.
        name: String,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
}

pub fn run(dirs: &[PathBuf], c: PairCommand) -> CmdResult {
    match c {
        PairCommand::List { json } => {
            let lib = load_library(dirs)?;
            if json {
                return emit_json(&Value::Array(
                    lib.pairs.values().map(pair_summary_json).collect(),
                ));
            }
            let rows: Vec<Vec<String>> = lib
                .pairs
                .values()
                .map(|w| {
                    vec![
                        w.name.clone(),
                        w.flyer.material.id.clone(),
                        w.parent.material.id.clone(),
                        format!("{:.2}", w.flyer_thickness.mm()),
                        w.convention.to_string(),
                        w.observations.len().to_string(),
                        if w.invented.is_some() {
                            "invented demo".into()
                        } else {
                            w.origin.display.clone()
                        },
                    ]
                })
                .collect();
            emit(&table(
                &[
                    "name",
                    "flyer",
                    "parent",
                    "h mm",
                    "convention",
                    "trials",
                    "file",
                ],
                &rows,
            ))
        }
        PairCommand::Show { name, json } => {
            let lib = load_library(dirs)?;
            let w = lib.pair(&name).map_err(Fail::input)?;
            if json {
                return emit_json(&pair_json(w));
            }
            emit(&show_human(w))
        }
        PairCommand::New {
            name,
            flyer,
            parent,
            flyer_thickness,
            parent_thickness,
            description,
            convention,
            maintainer,
            json,
        } => {
            let lib = load_library(dirs)?;
            let dir = dirs.first().ok_or_else(|| {
                Fail::input("pair new writes into the first --library folder, and none was given\n  hint: oblique --library ./my-windows pair new NAME ...")
            })?;
            if !dir.is_dir() {
                return Err(Fail::input(format!(
                    "--library {}: not a folder\n  hint: create it first (mkdir -p {})",
                    dir.display(),
                    dir.display()
                )));
            }
            if let Ok(existing) = lib.pair(&name) {
                if existing.origin.path.is_some() {
                    return Err(Fail::input(format!(
                        "a pair named '{name}' already exists in {}",
                        existing.origin.display
                    )));
                }
                eprintln!(
                    "warning: the new pair '{name}' will shadow the built-in pair of that name"
                );
            }
            lib.material(&flyer)
                .map_err(|m| Fail::input(format!("--flyer: {m}")))?;
            lib.material(&parent)
                .map_err(|m| Fail::input(format!("--parent: {m}")))?;
            oblique_window::library::check_file_name(&name, "pair name").map_err(|m| {
                Fail::input(if m.contains("reserved") {
                    format!("{m}\n  hint: name the pair after its materials, e.g. al6061-on-cu-1mm")
                } else {
                    m
                })
            })?;
            let who = maintainer
                .or_else(|| std::env::var("USER").ok())
                .unwrap_or_else(|| "unknown".into());
            let thickness = format!("{} mm", flyer_thickness * 1000.0);
            let parent_thickness = parent_thickness.map(|t| format!("{} mm", t * 1000.0));
            let date = today();
            let text = new_pair_text(&NewPair {
                name: &name,
                description: description.as_deref().unwrap_or(""),
                flyer: &flyer,
                parent: &parent,
                flyer_thickness: &thickness,
                parent_thickness: parent_thickness.as_deref(),
                convention: convention.into(),
                maintainer: &who,
                date: &date,
            });
            // Validate before writing: a new file must load.
            let path = dir.join(format!("{name}.ron"));
            let origin = Origin {
                display: path.display().to_string(),
                path: Some(path.clone()),
                sha256: sha256_hex(text.as_bytes()),
            };
            parse_pair_file(origin, &text, &lib.materials)?;
            create_new(&path, &text).map_err(write_fail)?;
            if json {
                return emit_json(
                    &json!({"name": name, "file": path.display().to_string(), "sha256": sha256_hex(text.as_bytes())}),
                );
            }
            emit(&format!("created pair '{name}' in {}\nrecord shots with: oblique --library {} pair observe {name} --velocity 320m/s --angle 9deg --outcome welded --source \"...\"\n", path.display(), dir.display()))
        }
        PairCommand::Observe {
            name,
            velocity,
            angle,
            outcome,
            source,
            note,
            process,
            method,
            velocity_uncertainty,
            angle_uncertainty,
            date,
            if_unchanged,
            json,
        } => {
            let lib = load_library(dirs)?;
            let w = lib.pair(&name).map_err(Fail::input)?;
            let path = user_file(w)?;
            if source.trim().is_empty() {
                return Err(Fail::input(
                    "--source must name the shot log, report or paper",
                ));
            }
            let entry = ObservationEntry {
                velocity: format!("{velocity} m/s"),
                angle: format!("{} deg", round_deg(angle.to_degrees())),
                outcome: outcome_word(outcome).into(),
                process: process_word(process).into(),
                method: method_word(method).into(),
                velocity_uncertainty: velocity_uncertainty.map(|v| format!("{v} m/s")),
                angle_uncertainty: angle_uncertainty
                    .map(|a| format!("{} deg", round_deg(a.to_degrees()))),
                date: Some(date.unwrap_or_else(today)),
                source,
                note,
            };
            // The append re-reads and re-validates the file under the folder's lock, so a shot
            // recorded meanwhile by another process is kept; only --if-unchanged pins the file.
            note_target(&path);
            let updated =
                append_observations(&path, &[entry], &lib.materials, if_unchanged.as_deref())
                    .map_err(write_fail)?;
            finish_append(&updated, &path, 1, json)
        }
        PairCommand::Import {
            name,
            file,
            if_unchanged,
            json,
        } => {
            let lib = load_library(dirs)?;
            let w = lib.pair(&name).map_err(Fail::input)?;
            let path = user_file(w)?;
            let rows = read_import_csv(&file)?;
            if rows.is_empty() {
                return Err(Fail::input(format!("{}: no data rows", file.display())));
            }
            precheck_import(&path, &file, &rows, &lib)?;
            let entries: Vec<ObservationEntry> = rows.into_iter().map(|(_, e)| e).collect();
            note_target(&path);
            let updated =
                append_observations(&path, &entries, &lib.materials, if_unchanged.as_deref())
                    .map_err(write_fail)?;
            finish_append(&updated, &path, entries.len(), json)
        }
        PairCommand::Validate { files, json } => validate(dirs, &files, json),
        PairCommand::Agreement { name, json } => {
            let lib = load_library(dirs)?;
            let w = lib.pair(&name).map_err(Fail::input)?;
            let a = agreement(w)?;
            if json {
                let mut v = serde_json::to_value(&a).map_err(|e| Fail::other(e.to_string()))?;
                if let Some(o) = v.as_object_mut() {
                    o.insert("pair".into(), json!(w.name));
                }
                return emit_json(&v);
            }
            emit(&agreement_human(w, &a))
        }
    }
}

/// Say so when a library file is written through a symbolic link.
fn note_target(path: &Path) {
    if let Ok(t) = oblique_window::write::resolve_target(path) {
        if let Some(n) = t.note(path) {
            eprintln!("note: {n}");
        }
    }
}

/// Degrees kept to a sensible precision for a file (no binary noise such as 8.999999999).
fn round_deg(d: f64) -> f64 {
    (d * 1e9).round() / 1e9
}

fn finish_append(w: &PairWindow, path: &Path, added: usize, json: bool) -> CmdResult {
    if json {
        return emit_json(
            &json!({"name": w.name, "file": path.display().to_string(), "added": added, "observations": w.observations.len(), "sha256": w.origin.sha256}),
        );
    }
    emit(&format!(
        "added {added} observation(s) to '{}' ({}); it now holds {}\n",
        w.name,
        path.display(),
        w.observations.len()
    ))
}

/// Read an import CSV: units in the header brackets, every row checked, all problems reported.
/// The 1-based line of a byte offset.
fn line_of(bytes: &[u8], offset: u64) -> u64 {
    let mut end = usize::try_from(offset)
        .unwrap_or(usize::MAX)
        .min(bytes.len());
    // A record after blank lines starts, for the reader, at the first of them.
    while end < bytes.len() && matches!(bytes[end], b'\n' | b'\r') {
        end += 1;
    }
    1 + bytes[..end].iter().filter(|&&b| b == b'\n').count() as u64
}

fn read_import_csv(file: &Path) -> CmdResult<Vec<(u64, ObservationEntry)>> {
    let display = file.display().to_string();
    let bytes = std::fs::read(file).map_err(|e| Fail::input(format!("{display}: {e}")))?;
    let mut rdr = csv::ReaderBuilder::new()
        .trim(csv::Trim::All)
        .from_reader(&bytes[..]);
    let headers = rdr
        .headers()
        .map_err(|e| Fail::input(format!("{display}: {e}")))?
        .clone();
    let mut cols: std::collections::HashMap<&str, (usize, Option<String>)> =
        std::collections::HashMap::new();
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
                problems.push(format!("{display}:{row}: {e}"));
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
            outcome: get("outcome").unwrap_or_default(),
            process: get("process").unwrap_or_else(|| "magnetic-pulse".into()),
            method: get("method").unwrap_or_else(|| "measured".into()),
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
fn precheck_import(
    pair_path: &Path,
    csv_path: &Path,
    rows: &[(u64, ObservationEntry)],
    lib: &Library,
) -> CmdResult {
    let Ok(text) = std::fs::read_to_string(pair_path) else {
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

fn validate(dirs: &[PathBuf], files: &[PathBuf], json: bool) -> CmdResult {
    let mut problems: Vec<oblique_window::Diagnostic> = Vec::new();
    let mut checked = Vec::new();
    if files.is_empty() {
        let lib = Library::load(&user_dirs(dirs))?;
        checked.extend(lib.files.iter().map(|f| f.display.clone()));
        problems.extend(lib.all_problems());
    } else {
        // Materials come from the library (which must itself load).
        let lib = Library::load(&user_dirs(dirs))?;
        let mut names: std::collections::HashMap<String, String> = std::collections::HashMap::new();
        for f in files {
            let display = f.display().to_string();
            checked.push(display.clone());
            let text = match std::fs::read_to_string(f) {
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
        eprintln!("{}", text.join("\n"));
        eprintln!("{} problem(s)", problems.len());
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

fn show_human(w: &PairWindow) -> String {
    let mut s = format!(
        "pair {}: {} flyer {:.2} mm on {} parent; convention {}\n",
        w.name,
        w.flyer.material.id,
        w.flyer_thickness.mm(),
        w.parent.material.id,
        w.convention
    );
    if let Some(inv) = &w.invented {
        s.push_str(&format!("INVENTED DATA: {inv}\n"));
    }
    if !w.description.is_empty() {
        s.push_str(&format!("{}\n", w.description));
    }
    s.push_str(&format!(
        "file: {} (sha256 {})\nmaintainer: {}\n",
        w.origin.display, w.origin.sha256, w.maintainer
    ));
    for r in &w.revisions {
        s.push_str(&format!("  {}  {}\n", r.date, r.note));
    }
    let c = &w.criteria;
    s.push_str("\ncriteria:\n");
    let onoff = |b: bool| if b { "on " } else { "off" };
    s.push_str(&format!(
        "  deribas-lower    {} k = {}\n",
        onoff(c.deribas_enabled),
        c.deribas_k
    ));
    s.push_str(&format!(
        "  strength-lower   {}\n",
        onoff(c.strength_enabled)
    ));
    s.push_str(&format!(
        "  pressure-lower   {} {} x HEL\n",
        onoff(c.pressure_enabled),
        c.hel_multiple
    ));
    s.push_str(&format!(
        "  melting-upper    {} N = {}, form {:?}\n",
        onoff(c.melting_enabled),
        c.wittman_n,
        c.wittman_form
    ));
    s.push_str(&format!(
        "  jetting          {}\n",
        onoff(c.jetting_enabled)
    ));
    s.push_str(&format!(
        "  wavy-transition  {} Re_crit = {} (informational)\n",
        onoff(c.wavy_enabled),
        c.wavy_critical_reynolds
    ));
    for (id, r) in &w.criteria_reasons {
        s.push_str(&format!("  reason for {id}: {r}\n"));
    }
    s.push_str(&format!("\nboundaries: {}\n", w.boundaries.len()));
    for b in &w.boundaries {
        let pts: Vec<String> = b
            .points
            .iter()
            .map(|(v, a)| format!("({:.0} m/s, {:.2} deg)", v.si(), a.degrees()))
            .collect();
        s.push_str(&format!(
            "  \"{}\" [{}], welds {}: {}\n    provenance: {}\n",
            b.label,
            b.plane.as_str(),
            b.weld_side.as_str(),
            pts.join(" "),
            b.provenance
        ));
    }
    s.push_str(&format!("\nobservations: {}\n", w.observations.len()));
    let rows: Vec<Vec<String>> = w
        .observations
        .iter()
        .map(|o| {
            vec![
                (o.index + 1).to_string(),
                format!("{:.0}", o.velocity.si()),
                format!("{:.2}", o.angle.degrees()),
                o.outcome.as_str().into(),
                o.process.clone(),
                o.method.clone(),
                o.date.clone().unwrap_or_default(),
                o.source.clone(),
            ]
        })
        .collect();
    if !rows.is_empty() {
        s.push_str(&table(
            &[
                "#", "Vp m/s", "beta deg", "outcome", "process", "method", "date", "source",
            ],
            &rows,
        ));
    }
    s
}

fn agreement_human(w: &PairWindow, a: &oblique_window::Agreement) -> String {
    let mut s = format!(
        "agreement of pair '{}' with its {} trial(s): {} agree",
        w.name, a.observations, a.agreeing
    );
    if a.observations > 0 {
        s.push_str(&format!(
            " ({:.0} %)",
            100.0 * a.agreeing as f64 / a.observations as f64
        ));
    }
    s.push_str("\n\n");
    let outcomes = ["welded", "not-welded", "partial", "melted"];
    let rows: Vec<Vec<String>> = ["welded", "not-welded", "melted"]
        .iter()
        .map(|p| {
            let mut r = vec![format!("predicted {p}")];
            for o in outcomes {
                r.push(
                    a.table
                        .get(p)
                        .and_then(|row| row.get(o))
                        .copied()
                        .unwrap_or(0)
                        .to_string(),
                );
            }
            r
        })
        .collect();
    let mut header = vec![""];
    header.extend(outcomes.iter().copied());
    s.push_str("              observed ->\n");
    s.push_str(&table(&header, &rows));
    s.push_str(&format!("({})\n", a.partial_rule));
    if a.disagreements.is_empty() {
        s.push_str("\nno disagreements\n");
    } else {
        s.push_str("\ndisagreements:\n");
        for d in &a.disagreements {
            s.push_str(&format!(
                "  #{} {:.0} m/s, {:.2} deg: observed {}, predicted {}; misjudged by {}: {}\n    source: {}\n",
                d.index + 1,
                d.velocity_m_s,
                d.angle_deg,
                d.observed.as_str(),
                d.predicted.as_str(),
                if d.misjudged_by.is_empty() { "-".to_string() } else { d.misjudged_by.join(", ") },
                d.explanation,
                d.source
            ));
        }
    }
    if w.invented.is_some() {
        s.push_str("\nnote: this pair's data are INVENTED for the demo\n");
    }
    s
}
