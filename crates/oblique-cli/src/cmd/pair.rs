//! `oblique pair ...`: list, show, new, observe, import, validate, agreement.

use crate::args::{ConventionArg, ProcessArg};
use crate::common::{load_library, today, user_dirs};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json, material_json, sig, table};
use crate::qarg;
use clap::{Args, Subcommand, ValueEnum};
use oblique_core::units::{parse_quantity, QuantityKind};
use oblique_window::library::sha256_hex;
use oblique_window::pair::{parse_pair_file, Origin};
use oblique_window::write::{append_observations, create_new, new_pair_text, NewPair, WriteError};
use oblique_window::{agreement, Library, ObservationEntry, PairWindow};
use serde_json::{json, Value};
use std::path::{Path, PathBuf};

mod boundary;
mod fit;
mod import;
mod validate;
mod view;

use boundary::run_boundary;
pub use boundary::BoundaryCommand;

use import::import;
use validate::validate;
use view::{agreement_human, pair_json, pair_summary_json, show_human};

fn outcome_word(o: OutcomeArg) -> &'static str {
    match o {
        OutcomeArg::Welded => "welded",
        OutcomeArg::NotWelded => "not-welded",
        OutcomeArg::Partial => "partial",
        OutcomeArg::Melted => "melted",
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
    crate::common::write_fail(e)
}

/// The user file of a pair, or an error saying that built-in pairs are read-only.
fn user_file(w: &PairWindow) -> CmdResult<PathBuf> {
    w.origin.path.clone().ok_or_else(|| {
        Fail::input(format!(
            "pair '{}' is built in and read-only\n  hint: create your own with `oblique --library DIR pair new ...`, or copy it into a library folder: `oblique pair export {} > DIR/{}.ron`, then `oblique --library DIR ...`",
            w.name, w.name, w.name
        ))
    })
}

/// `pair export`: the pair's file as it was loaded (a user file is read again; a built-in one
/// is the text built into the binary).
fn export(dirs: &[PathBuf], name: &str) -> CmdResult {
    let lib = load_library(dirs)?;
    let w = lib.pair(name).map_err(Fail::input)?;
    let rel = w
        .origin
        .display
        .strip_prefix("built-in:windows/")
        .unwrap_or(&w.origin.display);
    let builtin = oblique_window::library::BUILTIN_FILES
        .iter()
        .find(|(r, _)| *r == rel)
        .map(|(_, t)| *t);
    crate::common::emit_library_file(w.origin.path.as_deref(), builtin, || {
        format!(
            "the built-in file of pair '{name}' ({}) is not in this binary",
            w.origin.display
        )
    })
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
pub enum MethodArg {
    /// Measured (PDV, high-speed imaging, ...).
    Measured,
    /// From a simulation.
    Simulated,
    /// Estimated.
    Estimated,
}

/// Flags of `oblique pair new`.
#[derive(Debug, Args)]
pub struct NewArgs {
    /// Pair name (also the file name: NAME.ron).
    pub name: String,
    /// Flyer material id.
    #[arg(long, value_name = "ID")]
    pub flyer: String,
    /// Parent material id.
    #[arg(long, value_name = "ID")]
    pub parent: String,
    /// Flyer thickness, e.g. 1.5mm.
    #[arg(long = "flyer-thickness", value_name = "LENGTH", allow_hyphen_values = true, value_parser = qarg::positive_length)]
    pub flyer_thickness: f64,
    /// Parent thickness, e.g. 12mm (only for the dissipated energy; default: a massive parent).
    #[arg(long = "parent-thickness", value_name = "LENGTH", allow_hyphen_values = true, value_parser = qarg::positive_length)]
    pub parent_thickness: Option<f64>,
    /// What the window is for, e.g. "busbar connector, tube on rod".
    #[arg(long, value_name = "TEXT")]
    pub description: Option<String>,
    /// Convention in which the trials' velocities are recorded (default normal-to-flyer for
    /// magnetic pulse, foil actuator and laser welding; required for the other processes, whose
    /// records use more than one).
    #[arg(long, value_enum, ignore_case = true)]
    pub convention: Option<ConventionArg>,
    /// Process the window is for; sets whether the pressure limit is on by default (on for
    /// magnetic pulse, off for explosive welding: docs/theory.md §5.4).
    #[arg(long, value_enum, ignore_case = true, default_value = "magnetic-pulse")]
    pub process: ProcessArg,
    /// Who maintains the file (default: $USER).
    #[arg(long, value_name = "TEXT")]
    pub maintainer: Option<String>,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

/// Flags of `oblique pair observe`.
#[derive(Debug, Args)]
pub struct ObserveArgs {
    /// Pair name.
    pub name: String,
    /// Measured impact velocity in the pair's convention, e.g. 320m/s.
    #[arg(long, value_name = "SPEED", allow_hyphen_values = true, value_parser = qarg::positive_velocity)]
    pub velocity: f64,
    /// Collision angle, strictly between 0 and 90 deg, e.g. 9deg.
    #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle)]
    pub angle: f64,
    /// What the section or peel test showed.
    #[arg(long, value_enum, ignore_case = true)]
    pub outcome: OutcomeArg,
    /// Report, shot log or paper the shot comes from (one line).
    #[arg(long, value_name = "TEXT", value_parser = crate::qarg::one_line_text)]
    pub source: String,
    /// Free note.
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
    /// Process that drove the flyer.
    #[arg(long, value_enum, ignore_case = true, default_value = "magnetic-pulse")]
    pub process: ProcessArg,
    /// How velocity and angle were obtained.
    #[arg(long, value_enum, ignore_case = true, default_value = "measured")]
    pub method: MethodArg,
    /// Standard uncertainty of the velocity, e.g. 15m/s (0m/s: exact, as in the pair file).
    #[arg(long = "velocity-uncertainty", value_name = "SPEED", allow_hyphen_values = true, value_parser = qarg::velocity_uncertainty)]
    pub velocity_uncertainty: Option<f64>,
    /// Standard uncertainty of the angle, e.g. 1deg (0deg: exact).
    #[arg(long = "angle-uncertainty", value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle_uncertainty)]
    pub angle_uncertainty: Option<f64>,
    /// Date of the shot, YYYY-MM-DD (default: today).
    #[arg(long, value_name = "DATE", value_parser = qarg::date)]
    pub date: Option<String>,
    /// Refuse to write unless the file still has this SHA-256 (from `pair show --json`).
    #[arg(long = "if-unchanged", value_name = "SHA256", value_parser = crate::qarg::sha256)]
    pub if_unchanged: Option<String>,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

/// Flags of `oblique pair import`.
#[derive(Debug, Args)]
pub struct ImportArgs {
    /// Pair name.
    pub name: String,
    /// CSV file ('-' for standard input): a header with the unit of each quantity in brackets,
    /// velocity[m/s],angle[deg],outcome,source (required), then any of process, method, date,
    /// note, velocity_uncertainty[UNIT], angle_uncertainty[UNIT] (docs/window-format.md §5.1).
    pub file: PathBuf,
    /// Refuse to write unless the pair file still has this SHA-256 (from `pair show --json`).
    #[arg(long = "if-unchanged", value_name = "SHA256", value_parser = crate::qarg::sha256)]
    pub if_unchanged: Option<String>,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

#[derive(Debug, Subcommand)]
pub enum PairCommand {
    /// List the pair windows.
    List {
        /// Print JSON.
        #[arg(long)]
        json: bool,
        /// Print the pair names only, one per line (for scripts and shell completion).
        #[arg(long, conflicts_with = "json")]
        names: bool,
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
    New(NewArgs),
    /// Record one trial shot in a pair window (appended; the rest of the file is kept byte for byte).
    #[command(
        after_help = "Example:\n  oblique --library ./shop pair observe al-on-cu --velocity 320m/s --angle 9deg --outcome welded --source \"shot log 2026-11-30 #4\""
    )]
    Observe(ObserveArgs),
    /// Remove one recorded shot (a mistyped or repeated one) from a pair window; the removed
    /// text is printed, so it can be added back, and the shots after it move up by one.
    #[command(
        name = "remove-shot",
        after_help = "Example:\n  oblique --library ./shop pair remove-shot al-on-cu --shot 7"
    )]
    RemoveShot {
        /// Pair name.
        name: String,
        /// The shot's number, as `pair show` and `pair agreement` print it (#1 is the first).
        #[arg(long, value_name = "N")]
        shot: usize,
        /// Refuse to write unless the file still has this SHA-256 (from `pair show --json`).
        #[arg(long = "if-unchanged", value_name = "SHA256", value_parser = crate::qarg::sha256)]
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
    Import(ImportArgs),
    /// Validate pair window files (default: the whole library); every problem at once, exit 2 if any.
    Validate {
        /// Files to validate, or pair names (the file of that pair in the library).
        files: Vec<PathBuf>,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Print a pair's file (built-in or user) so that it can be copied into a library folder and
    /// changed there (trials recorded, constants fitted and saved).
    #[command(
        after_help = "Example (a user copy of the INVENTED demo pair, which then shadows the built-in one, with a warning):\n  mkdir -p shop && oblique pair export demo-al6061-on-cu > shop/demo-al6061-on-cu.ron\n  oblique --library ./shop pair fit demo-al6061-on-cu --save"
    )]
    Export {
        /// Pair name.
        name: String,
    },
    /// User boundaries: lines drawn through trials.
    #[command(subcommand)]
    Boundary(BoundaryCommand),
    /// Compare the window's predictions with its trial observations.
    Agreement {
        /// Pair name.
        name: String,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
    /// Fit the criterion constants (Deribas k, Wittman N) to the pair's trials, with intervals.
    #[command(after_help = "Examples:
  oblique pair fit demo-al6061-on-cu
  oblique --library ./shop pair fit al-on-cu --save
  oblique --library ./shop pair fit al-on-cu --constants deribas-k,wittman-n,hel-multiple --json

A maximum-likelihood fit (docs/theory.md section 15.3): not-welded shots count as a failed lower
limit, melted ones as a failed ceiling, partial ones as on the edge; each shot's velocity and angle
uncertainty is used where recorded. The intervals are profile-likelihood intervals; a constant the
trials bound on one side only is said to be. A screening estimate, never a guarantee.")]
    Fit(fit::FitArgs),
    /// Propose the next trial shots that would tell most about the fitted constants.
    #[command(after_help = "Examples:
  oblique pair next-shot demo-al6061-on-cu
  oblique pair next-shot demo-al6061-on-cu --count 3 --velocity-range 350m/s..650m/s --angle-range 4deg..20deg --json

The shots are chosen by the expected information their outcome gives about the fitted constants
(docs/theory.md section 15.4). Every shot is a real shot: lethal voltages, stored energy and flying
parts; follow local codes and licensed practice.")]
    NextShot(fit::NextShotArgs),
}

pub fn run(dirs: &[PathBuf], c: PairCommand) -> CmdResult {
    match c {
        PairCommand::List { json, names } => {
            let lib = load_library(dirs)?;
            if names {
                return emit(
                    &lib.pairs
                        .keys()
                        .map(|k| format!("{k}\n"))
                        .collect::<String>(),
                );
            }
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
                        // Where it comes from, so that a user's copy of the demo is told
                        // apart from the built-in one; invented data says so.
                        if w.invented.is_some() {
                            format!("{} (invented data)", w.origin.display)
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
        PairCommand::New(a) => new_pair(dirs, a),
        PairCommand::Observe(a) => observe(dirs, a),
        PairCommand::Import(a) => import(dirs, a),
        PairCommand::Validate { files, json } => validate(dirs, &files, json),
        PairCommand::Boundary(c) => run_boundary(dirs, c),
        PairCommand::Export { name } => export(dirs, &name),
        PairCommand::RemoveShot {
            name,
            shot,
            if_unchanged,
            json,
        } => remove_shot(dirs, &name, shot, if_unchanged.as_deref(), json),
        PairCommand::Fit(a) => fit::run_fit(dirs, a),
        PairCommand::NextShot(a) => fit::run_next_shot(dirs, a),
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

use crate::common::note_target;

/// Degrees kept to a sensible precision for a file (no binary noise such as 8.999999999).
fn round_deg(d: f64) -> f64 {
    (d * 1e9).round() / 1e9
}

/// A velocity for the file in m/s: twelve significant digits, so that a unit conversion's last
/// bit (0.29 km/s is 289.99999999999994 m/s in binary) is not written as if measured.
fn round_velocity(v: f64) -> f64 {
    if v == 0.0 || !v.is_finite() {
        return v;
    }
    let scale = 10f64.powi(11 - v.abs().log10().floor() as i32);
    (v * scale).round() / scale
}

fn finish_append(w: &PairWindow, path: &Path, added: usize, json: bool) -> CmdResult {
    let verdicts = new_shot_verdicts(w, added);
    if json {
        return emit_json(&json!({
            "name": w.name,
            "file": path.display().to_string(),
            "added": added,
            "observations": w.observations.len(),
            "sha256": w.origin.sha256,
            "new_shots": verdicts.iter().map(|v| json!({
                "index": v.index,
                "shot": v.index + 1,
                "observed": v.observed,
                "predicted": v.predicted,
                "agrees": v.agrees,
                "outside_domain": v.agrees.is_none(),
                "misjudged_by": v.misjudged_by,
            })).collect::<Vec<_>>(),
        }));
    }
    let mut text = format!(
        "added {added} observation(s) to '{}' ({}); it now holds {}\n",
        w.name,
        path.display(),
        w.observations.len()
    );
    for v in &verdicts {
        text.push_str(&v.line());
    }
    if verdicts.iter().any(|v| v.agrees == Some(false)) {
        text.push_str(&format!("  (a disagreement is evidence against the window's constants or boundaries where the shot lies: `oblique pair fit {}` fits the Deribas and Wittman constants to every trial, with intervals; `oblique pair agreement` shows every trial)\n", w.name));
    }
    emit(&text)
}

/// `pair remove-shot`: shot #`shot` out of the pair's file.
fn remove_shot(
    dirs: &[PathBuf],
    name: &str,
    shot: usize,
    if_unchanged: Option<&str>,
    json: bool,
) -> CmdResult {
    let lib = load_library(dirs)?;
    let w = lib.pair(name).map_err(Fail::input)?;
    let path = user_file(w)?;
    let n = w.observations.len();
    if shot == 0 || shot > n {
        return Err(Fail::input(format!(
            "--shot: pair '{}' has {n} shot(s), numbered from #1 to #{n}; `oblique pair show {}` lists them",
            w.name, w.name
        )));
    }
    let o = &w.observations[shot - 1];
    let what = format!(
        "shot #{shot} ({:.0} m/s, {:.2} deg, {}, source \"{}\")",
        o.velocity.si(),
        o.angle.degrees(),
        o.outcome.as_str(),
        oblique_window::text::one_line(&o.source)
    );
    // Under the folder's lock the shot at that number must still be this one (a concurrent
    // append never shifts it; a concurrent removal may).
    note_target(&path);
    let (updated, cut) =
        oblique_window::write::remove_observation(&path, shot - 1, o, &lib.materials, if_unchanged)
            .map_err(write_fail)?;
    let agr = agreement(&updated)?;
    if json {
        return emit_json(&json!({
            "name": updated.name,
            "file": path.display().to_string(),
            "removed_shot": shot,
            "removed_text": cut,
            "observations": updated.observations.len(),
            "agreement": {"observations": agr.observations, "agreeing": agr.agreeing},
            "sha256": updated.origin.sha256,
        }));
    }
    emit(&format!(
        "removed {what} from '{}' ({}); it now holds {} shot(s), the ones after it renumbered from #{shot}\nagreement with its {} trial(s) now: {} agree\nthe removed text (to add it back, paste it into the observations list):\n{}",
        updated.name,
        path.display(),
        updated.observations.len(),
        agr.observations,
        agr.agreeing,
        cut
    ))
}

/// What the window says of one newly recorded shot.
struct ShotVerdict {
    index: usize,
    velocity: f64,
    angle_deg: f64,
    observed: &'static str,
    predicted: &'static str,
    /// `None` outside the validity domain, where the window claims no verdict.
    agrees: Option<bool>,
    misjudged_by: Vec<String>,
}

impl ShotVerdict {
    fn line(&self) -> String {
        if self.agrees.is_none() {
            format!(
                "  shot #{} ({:.0} m/s, {:.2} deg, {}): outside the window's validity domain: no verdict claimed, so neither agreement nor disagreement (counted apart by `pair agreement`)\n",
                self.index + 1,
                self.velocity,
                self.angle_deg,
                self.observed,
            )
        } else if self.agrees == Some(true) {
            format!(
                "  shot #{} ({:.0} m/s, {:.2} deg, {}): the window agrees (predicted {})\n",
                self.index + 1,
                self.velocity,
                self.angle_deg,
                self.observed,
                self.predicted
            )
        } else {
            format!(
                "  shot #{} ({:.0} m/s, {:.2} deg, {}): the window DISAGREES: it predicts {}, misjudged by {}\n",
                self.index + 1,
                self.velocity,
                self.angle_deg,
                self.observed,
                self.predicted,
                self.misjudged_by.join(", ")
            )
        }
    }
}

/// The window's verdict on the last `added` observations (those just recorded).
fn new_shot_verdicts(w: &PairWindow, added: usize) -> Vec<ShotVerdict> {
    let Ok(agr) = agreement(w) else {
        return Vec::new();
    };
    let Ok(setup) = w.setup() else {
        return Vec::new();
    };
    let first = w.observations.len().saturating_sub(added);
    w.observations[first..]
        .iter()
        .filter_map(|o| {
            let col =
                oblique_core::Collision::from_impact(w.convention, o.velocity, o.angle).ok()?;
            let c = oblique_window::classify::classify(w, &setup, &col).ok()?;
            let dis = agr.disagreements.iter().find(|d| d.index == o.index);
            Some(ShotVerdict {
                index: o.index,
                velocity: o.velocity.si(),
                angle_deg: o.angle.degrees(),
                observed: o.outcome.as_str(),
                predicted: c.prediction.as_str(),
                agrees: (c.prediction != oblique_window::Prediction::OutsideDomain)
                    .then_some(dis.is_none()),
                misjudged_by: dis.map(|d| d.misjudged_by.clone()).unwrap_or_default(),
            })
        })
        .collect()
}

fn new_pair(dirs: &[PathBuf], a: NewArgs) -> CmdResult {
    let NewArgs {
        name,
        flyer,
        parent,
        flyer_thickness,
        parent_thickness,
        description,
        convention,
        process,
        maintainer,
        json,
    } = a;
    let convention = match (convention, process) {
        (Some(c), _) => c,
        (None, ProcessArg::MagneticPulse | ProcessArg::FoilActuator | ProcessArg::Laser) => {
            ConventionArg::NormalToFlyer
        }
        (None, _) => {
            return Err(Fail::input(
                "--convention: say in which convention this window's velocities are recorded: for explosive welding, gas guns and other processes the records use more than one (bisector, normal-to-flyer, normal-to-parent; docs/theory.md), and a wrong guess moves every trial\n  hint: e.g. --convention bisector",
            ))
        }
    };
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
        errln!("warning: the new pair '{name}' will shadow the built-in pair of that name");
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
        process: process.as_str(),
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

fn observe(dirs: &[PathBuf], a: ObserveArgs) -> CmdResult {
    let ObserveArgs {
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
    } = a;
    let lib = load_library(dirs)?;
    let w = lib.pair(&name).map_err(Fail::input)?;
    let path = user_file(w)?;
    if source.trim().is_empty() {
        return Err(Fail::input(
            "--source must name the shot log, report or paper",
        ));
    }
    let entry = ObservationEntry {
        velocity: format!("{} m/s", round_velocity(velocity)),
        angle: format!("{} deg", round_deg(angle.to_degrees())),
        outcome: outcome_word(outcome).into(),
        process: process.as_str().into(),
        method: method_word(method).into(),
        velocity_uncertainty: velocity_uncertainty.map(|v| format!("{} m/s", round_velocity(v))),
        angle_uncertainty: angle_uncertainty.map(|a| format!("{} deg", round_deg(a.to_degrees()))),
        date: Some(date.unwrap_or_else(today)),
        source,
        note,
    };
    // The append re-reads and re-validates the file under the folder's lock, so a shot
    // recorded meanwhile by another process is kept; only --if-unchanged pins the file.
    note_target(&path);
    let updated = append_observations(&path, &[entry], &lib.materials, if_unchanged.as_deref())
        .map_err(write_fail)?;
    finish_append(&updated, &path, 1, json)
}
