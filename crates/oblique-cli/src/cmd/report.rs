//! `oblique report`: the decision record of a point, or of a process set-up (as `estimate`
//! takes it), with the alternatives considered (`--alternative`, `--from-sweep`), who prepared
//! and checked it, and the SHA-256 of every file that entered the computation.

mod spec;

use crate::args::process::{
    parse, BankFlags, ExplosiveFlags, IntegrationFlags, SheetFlags, TubeFlags,
};
use crate::args::{ConstantArgs, ConventionArg, VelocityInput};
use crate::common::{
    collision, load_catalog, output_format, print_notes, read_point_csv, write_output, FileFormat,
};
use crate::fail::{CmdResult, Fail};
use crate::output::emit_json;
use crate::qarg;
use clap::{Args, Subcommand};
use oblique_core::units::{Angle, Energy, Length, Velocity, Voltage};
use oblique_core::Convention;
use oblique_render::report::{html, json, ReportInput};
use oblique_render::window_plot::ProcessCurve;
use oblique_setup::{
    decide, explosive_candidate, magnetic_candidate, point_candidate, Candidate, Catalog, Charge,
    Decision, EstimateRequest, FileUse, MagneticRequest, SweepFile,
};
use oblique_window::library::sha256_hex;
use oblique_window::references::References;
use spec::{parse_alternative, AltSpec, Kind};
use std::path::{Path, PathBuf};

const AFTER_HELP: &str = "Examples (the built-in pair, bank and coil are INVENTED demo data):
  oblique report --pair demo-al6061-on-cu --velocity 450m/s --angle 10deg -o report.html
  oblique report mpw-tube --machine harbourside-bank-300uf --coil harbourside-coil-42mm \\
      --pair demo-al6061-on-cu --tube-outer-radius 20mm --charge-voltage 7kV --standoff 2mm --angle 10deg \\
      --alternative 'B: charge-voltage=8kV, standoff=1mm, angle=6deg' --prepared-by 'A. Person' -o report.html
  oblique report mpw-tube ... --from-sweep sweep.json -o report.html   (the sweep's best setting chosen)
The extension of -o picks the format: .html (self-contained: inline SVG and CSS, no script, no
external resource) or .json. SOURCE_DATE_EPOCH fixes the record's date and time (reproducible
output). The report documents a screening estimate, not a guarantee; it carries the cautions in full.";

/// Flags of `oblique report`: a point (these flags) or a process (a subcommand).
#[derive(Debug, Args)]
#[command(
    after_help = AFTER_HELP,
    args_conflicts_with_subcommands = true,
    subcommand_negates_reqs = true
)]
pub struct ReportArgs {
    /// A process set-up instead of a point.
    #[command(subcommand)]
    pub process: Option<ReportProcess>,
    /// Pair window from the library.
    #[arg(long, value_name = "NAME", required = true)]
    pub pair: Option<String>,
    #[command(flatten)]
    pub velocity: VelocityInput,
    /// Collision angle, strictly between 0 and 90 deg, e.g. 10deg.
    #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle, required = true)]
    pub angle: Option<f64>,
    /// Convention of --velocity (default: the pair's).
    #[arg(long, value_enum, ignore_case = true)]
    pub convention: Option<ConventionArg>,
    #[command(flatten)]
    pub constants: ConstantArgs,
    #[command(flatten)]
    pub record: RecordArgs,
}

/// The processes a report can take.
#[derive(Debug, Subcommand)]
pub enum ReportProcess {
    /// Magnetic pulse: a tube compressed onto a rod (flags as `estimate mpw-tube`).
    MpwTube(TubeReportArgs),
    /// Magnetic pulse: a sheet driven off a bar coil (flags as `estimate mpw-sheet`).
    MpwSheet(SheetReportArgs),
    /// Explosive welding: Gurney open-faced sandwich (flags as `estimate explosive`).
    Explosive(ExplosiveReportArgs),
}

/// `oblique report explosive`.
#[derive(Debug, Args)]
#[command(after_help = AFTER_HELP)]
pub struct ExplosiveReportArgs {
    #[command(flatten)]
    pub explosive: ExplosiveFlags,
    /// Pair window to check every set-up against.
    #[arg(long, value_name = "NAME")]
    pub pair: String,
    #[command(flatten)]
    pub record: RecordArgs,
}

/// `oblique report mpw-tube`.
#[derive(Debug, Args)]
#[command(after_help = AFTER_HELP)]
pub struct TubeReportArgs {
    #[command(flatten)]
    pub bank: BankFlags,
    #[command(flatten)]
    pub tube: TubeFlags,
    #[command(flatten)]
    pub setting: SettingArgs,
    #[command(flatten)]
    pub record: RecordArgs,
}

/// `oblique report mpw-sheet`.
#[derive(Debug, Args)]
#[command(after_help = AFTER_HELP)]
pub struct SheetReportArgs {
    #[command(flatten)]
    pub bank: BankFlags,
    #[command(flatten)]
    pub sheet: SheetFlags,
    #[command(flatten)]
    pub setting: SettingArgs,
    #[command(flatten)]
    pub record: RecordArgs,
}

/// The chosen setting of a process (all of it may come from --from-sweep instead).
#[derive(Debug, Args)]
pub struct SettingArgs {
    /// Charging voltage of the chosen set-up, e.g. 8kV.
    #[arg(long = "charge-voltage", value_name = "VOLTAGE", value_parser = parse::voltage, allow_hyphen_values = true, conflicts_with = "energy")]
    pub charge_voltage: Option<f64>,
    /// Stored energy of the chosen set-up instead of the voltage, e.g. 10kJ.
    #[arg(long, value_name = "ENERGY", value_parser = parse::energy, allow_hyphen_values = true)]
    pub energy: Option<f64>,
    /// Standoff of the chosen set-up, e.g. 2mm.
    #[arg(long, value_name = "LENGTH", value_parser = parse::length, allow_hyphen_values = true)]
    pub standoff: Option<f64>,
    /// Collision angle of the chosen set-up from its geometry (taper, chamfer), e.g. 10deg.
    #[arg(long, value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle)]
    pub angle: Option<f64>,
    /// Pair window to check every set-up against (also the default flyer).
    #[arg(long, value_name = "NAME")]
    pub pair: String,
    /// Efficiency factor eta in (0, 1] (default: the machine's stored calibration, else 1).
    #[arg(long, value_name = "ETA", value_parser = parse::efficiency)]
    pub efficiency: Option<f64>,
    #[command(flatten)]
    pub integration: IntegrationFlags,
}

/// What the record holds besides the set-up: alternatives, people, output.
#[derive(Debug, Args)]
pub struct RecordArgs {
    // The help text shows the syntax with its optional parts in brackets (not doc links).
    #[allow(rustdoc::broken_intra_doc_links)]
    /// Another set-up considered: '[LABEL:] key=value, ...[, because=TEXT]' with the keys
    /// charge-voltage, energy, standoff, angle, efficiency (magnetic pulse); gurney-velocity,
    /// detonation-velocity, mass-ratio, charge-ratio, preset-angle (explosive); velocity,
    /// collision-velocity, angle (a point); unset keys keep the chosen set-up's values
    /// (repeatable).
    #[arg(long = "alternative", value_name = "SPEC", value_parser = parse_alternative)]
    pub alternative: Vec<AltSpec>,
    /// The settings of a `sweep --json` file as alternatives, in its ranking order (recomputed
    /// here); without a chosen setting, the sweep's best one is chosen.
    #[arg(long = "from-sweep", value_name = "SWEEP.json")]
    pub from_sweep: Option<PathBuf>,
    /// The label of the chosen set-up.
    #[arg(long, value_name = "TEXT", default_value = "chosen")]
    pub label: String,
    /// The question the record answers, in your words (default: built from the set-up).
    #[arg(long, value_name = "TEXT")]
    pub question: Option<String>,
    /// Who prepared the record.
    #[arg(long = "prepared-by", value_name = "NAME")]
    pub prepared_by: Option<String>,
    /// Who checked the record.
    #[arg(long = "checked-by", value_name = "NAME")]
    pub checked_by: Option<String>,
    // The help text names the CSV columns with their units in brackets (not doc links).
    #[allow(rustdoc::broken_intra_doc_links)]
    /// A process curve to overlay (CSV velocity[m/s],angle[deg],label; repeatable).
    #[arg(long = "curve", value_name = "FILE.csv")]
    pub curve: Vec<PathBuf>,
    /// Output file: .html or .json (the extension picks the format); required.
    #[arg(short = 'o', long = "output", value_name = "report.html|report.json")]
    pub output: Option<PathBuf>,
    /// Also print the record as JSON on standard output (for archiving).
    #[arg(long)]
    pub json: bool,
    /// The weld probability of the chosen set-up, under this scatter (a process record: the
    /// velocity spread defaults to the one its efficiency's provenance implies).
    #[command(flatten)]
    pub scatter: crate::args::ScatterArgs,
}

/// `oblique report`.
pub fn run(dirs: &[PathBuf], a: ReportArgs) -> CmdResult {
    match a.process {
        Some(ReportProcess::MpwTube(t)) => {
            let process = t.tube.request(&t.bank);
            run_process(dirs, process, "mpw-tube", &t.setting, &t.record)
        }
        Some(ReportProcess::MpwSheet(s)) => {
            let process = s.sheet.request(&s.bank);
            run_process(dirs, process, "mpw-sheet", &s.setting, &s.record)
        }
        Some(ReportProcess::Explosive(x)) => run_explosive(dirs, &x),
        None => run_point(dirs, &a),
    }
}

fn run_explosive(dirs: &[PathBuf], a: &ExplosiveReportArgs) -> CmdResult {
    let output = preflight(&a.record)?;
    if a.record.from_sweep.is_some() {
        return Err(Fail::input(
            "--from-sweep takes the settings of a magnetic pulse sweep; an explosive record takes --alternative",
        ));
    }
    let catalog = load_catalog(dirs)?;
    let base = a.explosive.request(Some(a.pair.clone()));
    let mut candidates = vec![explosive_candidate(&catalog, &a.record.label, &base)?];
    for (n, s) in a.record.alternative.iter().enumerate() {
        s.check_kind(Kind::Explosive)
            .map_err(|m| Fail::input(format!("--alternative: {m}")))?;
        let mut req = base.clone();
        if let Some(v) = s.gurney_velocity {
            req.gurney_velocity = Some(Velocity::from_m_s(v));
        }
        if let Some(v) = s.detonation_velocity {
            req.detonation_velocity = Some(Velocity::from_m_s(v));
        }
        if s.mass_ratio.is_some() {
            req.mass_ratio = s.mass_ratio;
            req.charge_ratio = None;
        }
        if s.charge_ratio.is_some() {
            req.charge_ratio = s.charge_ratio;
            req.mass_ratio = None;
        }
        if let Some(x) = s.preset_angle {
            req.preset_angle = Some(Angle::from_radians(x));
        }
        let mut c = explosive_candidate(&catalog, &alt_label(s, n), &req)
            .map_err(|e| Fail::input(format!("--alternative {}: {e}", alt_label(s, n))))?;
        c.given_reason.clone_from(&s.because);
        candidates.push(c);
    }
    let window = catalog
        .pair(Some(&a.pair))?
        .ok_or_else(|| Fail::input("--pair: no pair window"))?;
    let decision = decide(window, candidates, Some(0))?;
    let files = oblique_setup::decision::files_used(&catalog, window, &decision);
    write_record(window, &decision, files, &a.record, output)
}

/// Checks before any work: the output is given, its format, and that it does not land on an
/// input. Returns the output file and its format.
fn preflight(r: &RecordArgs) -> CmdResult<(PathBuf, FileFormat)> {
    let out = crate::common::need(
        r.output.clone(),
        "-o",
        "the record's file, report.html or report.json",
    )?;
    let mut inputs: Vec<(&str, &Path)> = r
        .curve
        .iter()
        .map(|c| ("the input of --curve", c.as_path()))
        .collect();
    if let Some(f) = &r.from_sweep {
        inputs.push(("the input of --from-sweep", f.as_path()));
    }
    crate::common::distinct_outputs(&inputs, &[("-o", out.as_path())])?;
    let format = output_format(
        "-o",
        &out,
        &[FileFormat::Html, FileFormat::Json],
        Some(FileFormat::Html),
    )?;
    Ok((out, format))
}

fn run_point(dirs: &[PathBuf], a: &ReportArgs) -> CmdResult {
    let output = preflight(&a.record)?;
    let pair = crate::common::need(a.pair.clone(), "--pair", "a pair window name")?;
    let angle = crate::common::need(a.angle, "--angle", "an angle such as 10deg")?;
    let catalog = load_catalog(dirs)?;
    let mut window = catalog
        .library
        .pair(&pair)
        .map_err(|m| Fail::input(format!("--pair: {m}")))?
        .clone();
    window.criteria = a.constants.apply(window.criteria.clone());
    crate::common::refuse_empty_window(&window, &a.constants)?;
    let conv: Convention = a.convention.map_or(window.convention, Into::into);
    let given = collision(
        conv,
        a.velocity.velocity,
        a.velocity.collision_velocity,
        angle,
    )?;
    let mut candidates = vec![point_candidate(&window, &a.record.label, &given)?];
    for (n, s) in a.record.alternative.iter().enumerate() {
        s.check_kind(Kind::Point)
            .map_err(|m| Fail::input(format!("--alternative: {m}")))?;
        let v = s.velocity.or(if s.collision_velocity.is_some() {
            None
        } else {
            a.velocity.velocity
        });
        let vc = s.collision_velocity.or(a.velocity.collision_velocity);
        let col = collision(conv, v, vc, s.angle.unwrap_or(angle))?;
        let mut c = point_candidate(&window, &alt_label(s, n), &col)?;
        c.given_reason.clone_from(&s.because);
        candidates.push(c);
    }
    if a.record.from_sweep.is_some() {
        return Err(Fail::input(
            "--from-sweep takes the settings of a process sweep: use `oblique report mpw-tube` (or mpw-sheet) with the sweep's bank, coil and workpiece",
        ));
    }
    let decision = decide(&window, candidates, Some(0))?;
    let files = oblique_setup::decision::files_used(&catalog, &window, &decision);
    write_record(&window, &decision, files, &a.record, output)
}

fn alt_label(s: &AltSpec, n: usize) -> String {
    s.label.clone().unwrap_or_else(|| format!("alt-{}", n + 1))
}

#[allow(clippy::too_many_lines)]
fn run_process(
    dirs: &[PathBuf],
    process: MagneticRequest,
    model: &str,
    s: &SettingArgs,
    r: &RecordArgs,
) -> CmdResult {
    let output = preflight(r)?;
    let charge = match (s.charge_voltage, s.energy) {
        (Some(u), _) => Some(Charge::Voltage(Voltage::from_v(u))),
        (None, Some(e)) => Some(Charge::Energy(Energy::from_j(e))),
        (None, None) => None,
    };
    let chosen_given = charge.is_some() || s.standoff.is_some();
    if !chosen_given && r.from_sweep.is_none() {
        return Err(Fail::input(
            "give the chosen set-up (--charge-voltage or --energy, --standoff, --angle) or --from-sweep SWEEP.json to choose the sweep's best setting",
        ));
    }
    if chosen_given && (charge.is_none() || s.standoff.is_none() || s.angle.is_none()) {
        return Err(Fail::input(
            "the chosen set-up needs --charge-voltage (or --energy), --standoff and --angle",
        ));
    }
    let sweep = match &r.from_sweep {
        Some(p) => Some(read_sweep(p, model, &s.pair)?),
        None => None,
    };
    let catalog = load_catalog(dirs)?;
    let base = EstimateRequest {
        process,
        charge: charge.unwrap_or(Charge::Voltage(Voltage::from_v(1.0))),
        standoff: Length::from_m(s.standoff.unwrap_or(1e-3)),
        efficiency: s.efficiency,
        pair: Some(s.pair.clone()),
        angle: s.angle.map(Angle::from_radians),
        integration: s.integration.integration(),
        history: false,
    };
    let mut notes = Vec::new();
    let mut candidates: Vec<Candidate<'_>> = Vec::new();
    // The settings already listed (label, voltage V, standoff m, angle rad): a sweep setting
    // equal to one of them is not listed twice.
    let mut listed: Vec<(String, f64, f64, Option<f64>)> = Vec::new();
    let setting = |label: String, req: &EstimateRequest| {
        let u = match req.charge {
            Charge::Voltage(u) => u.si(),
            Charge::Energy(_) => f64::NAN,
        };
        (label, u, req.standoff.si(), req.angle.map(|a| a.radians()))
    };
    if chosen_given {
        let c = magnetic_candidate(&catalog, &r.label, &base, &mut notes);
        print_notes(&notes);
        candidates.push(c?);
        listed.push(setting(r.label.clone(), &base));
    }
    for (n, spec) in r.alternative.iter().enumerate() {
        spec.check_kind(Kind::Magnetic)
            .map_err(|m| Fail::input(format!("--alternative: {m}")))?;
        let mut req = base.clone();
        match (spec.charge_voltage, spec.energy) {
            (Some(u), _) => req.charge = Charge::Voltage(Voltage::from_v(u)),
            (None, Some(e)) => req.charge = Charge::Energy(Energy::from_j(e)),
            (None, None) if !chosen_given => {
                return Err(Fail::input(
                    "--alternative: without a chosen set-up, each alternative needs charge-voltage (or energy), standoff and angle",
                ))
            }
            (None, None) => {}
        }
        if let Some(g) = spec.standoff {
            req.standoff = Length::from_m(g);
        }
        if let Some(x) = spec.angle {
            req.angle = Some(Angle::from_radians(x));
        }
        if spec.efficiency.is_some() {
            req.efficiency = spec.efficiency;
        }
        let mut notes = Vec::new();
        let mut c = magnetic_candidate(&catalog, &alt_label(spec, n), &req, &mut notes)
            .map_err(|e| Fail::input(format!("--alternative {}: {e}", alt_label(spec, n))))?;
        c.given_reason.clone_from(&spec.because);
        candidates.push(c);
        listed.push(setting(alt_label(spec, n), &req));
    }
    let mut sweep_file = None;
    if let Some((path, bytes, sf)) = &sweep {
        let name = path.file_name().map_or_else(
            || path.display().to_string(),
            |n| n.to_string_lossy().into_owned(),
        );
        sweep_candidates(&catalog, &base, (sf, &name), &listed, &mut candidates)?;
        sweep_file = Some(FileUse {
            role: "sweep (--from-sweep)".into(),
            file: path.display().to_string(),
            sha256: sha256_hex(bytes),
        });
    }
    let window = catalog
        .pair(Some(&s.pair))?
        .ok_or_else(|| Fail::input("--pair: no pair window"))?;
    let decision = decide(window, candidates, chosen_given.then_some(0))?;
    if decision.chosen.check.is_none() {
        return Err(Fail::input(format!(
            "the chosen set-up gives no window check: {}",
            decision.chosen.no_check.clone().unwrap_or_default()
        )));
    }
    let mut files = oblique_setup::decision::files_used(&catalog, window, &decision);
    files.extend(sweep_file);
    write_record(window, &decision, files, r, output)
}

/// The sweep file's bytes and settings, checked against the report's model and pair.
fn read_sweep(path: &Path, model: &str, pair: &str) -> CmdResult<(PathBuf, Vec<u8>, SweepFile)> {
    let shown = path.display();
    let bytes = oblique_window::files::read_bounded(path)
        .map_err(|e| Fail::input(format!("--from-sweep {shown}: cannot read: {e}")))?;
    let v: serde_json::Value = serde_json::from_slice(&bytes)
        .map_err(|e| Fail::input(format!("--from-sweep {shown}: not JSON: {e}")))?;
    let sf =
        SweepFile::from_json(&v).map_err(|m| Fail::input(format!("--from-sweep {shown}: {m}")))?;
    if sf.model != model {
        return Err(Fail::input(format!(
            "--from-sweep {shown}: the sweep is of {}, this report of {model}",
            sf.model
        )));
    }
    if sf.pair.as_deref() != Some(pair) {
        return Err(Fail::input(format!(
            "--from-sweep {shown}: the sweep was checked against pair {}, this report against {pair}",
            sf.pair.as_deref().unwrap_or("(none)")
        )));
    }
    if sf.settings.is_empty() {
        return Err(Fail::input(format!(
            "--from-sweep {shown}: the sweep has no settings"
        )));
    }
    Ok((path.to_path_buf(), bytes, sf))
}

/// The settings of a sweep file as candidates (one already listed, the chosen set-up or an
/// --alternative, is left out with a note), each recomputed; a velocity that differs from the
/// file's is a warning.
fn sweep_candidates<'a>(
    catalog: &'a Catalog,
    base: &EstimateRequest,
    (sf, sf_name): (&SweepFile, &str),
    listed: &[(String, f64, f64, Option<f64>)],
    candidates: &mut Vec<Candidate<'a>>,
) -> CmdResult {
    for (n, st) in sf.settings.iter().enumerate() {
        let same = listed.iter().find(|(_, u, g, a)| {
            (st.voltage - u).abs() <= 1e-6 * u
                && (st.standoff - g).abs() <= 1e-9
                && match (st.angle, a) {
                    (Some(x), Some(y)) => (x - y).abs() <= 1e-9,
                    _ => true,
                }
        });
        if let Some((label, ..)) = same {
            errln!(
                "note: --from-sweep setting S{} is the set-up '{label}' already listed: the record lists it once",
                n + 1
            );
            continue;
        }
        let req = sf.request(base, st);
        let mut notes = Vec::new();
        let label = format!("S{}", n + 1);
        let mut c = magnetic_candidate(catalog, &label, &req, &mut notes)
            .map_err(|e| Fail::input(format!("--from-sweep setting {label}: {e}")))?;
        // Where the setting came from (the inputs table says "flag", as for any given value).
        c.settings.push((
            "--from-sweep".into(),
            match st.rank {
                Some(k) => format!("{} (setting ranked {k})", sf_name),
                None => format!("{sf_name} (setting outside the window)"),
            },
        ));
        let now = c.check.as_ref().map(|k| {
            k.evaluation
                .collision
                .with_convention(Convention::NormalToFlyer)
                .impact_velocity
                .si()
        });
        if let (Some(a), Some(b)) = (st.velocity, now) {
            if (a - b).abs() > 0.5 + 1e-3 * a {
                errln!(
                    "warning: --from-sweep setting {label}: the file says Vp {a:.0} m/s, recomputed here {b:.0} m/s: was the sweep made with other machine files or another efficiency?"
                );
            }
        }
        candidates.push(c);
    }
    Ok(())
}

/// Build the provenance, render and write the record, print where it went.
fn write_record(
    window: &oblique_window::PairWindow,
    decision: &Decision<'_>,
    mut files: Vec<FileUse>,
    r: &RecordArgs,
    (out, format): (PathBuf, FileFormat),
) -> CmdResult {
    let mut curves = Vec::new();
    for f in &r.curve {
        let bytes = oblique_window::files::read_bounded(f)
            .map_err(|e| Fail::input(format!("--curve {}: cannot read: {e}", f.display())))?;
        files.push(FileUse {
            role: "process curve (--curve)".into(),
            file: f.display().to_string(),
            sha256: sha256_hex(&bytes),
        });
        curves.push(ProcessCurve {
            label: f
                .file_stem()
                .and_then(|s| s.to_str())
                .unwrap_or("curve")
                .to_string(),
            points: read_point_csv(f)?,
        });
    }
    let provenance =
        crate::common::record_provenance(files, r.prepared_by.clone(), r.checked_by.clone())?;
    let agreement = oblique_window::agreement(window)?;
    // A process set-up's record states its weld probability as `estimate` does, under the
    // scatter its efficiency's provenance implies; a point's needs the scatter flags.
    let process = matches!(
        decision.chosen.produced,
        oblique_setup::decision::Produced::Magnetic(_)
    );
    let probability = crate::common::chosen_probability(window, decision, &r.scatter, process)?;
    let alternative_probabilities =
        crate::common::alternative_probabilities(window, decision, &r.scatter, process)?;
    let references = References::builtin().map_err(Fail::other)?;
    let input = ReportInput {
        window,
        decision,
        agreement: &agreement,
        question: r.question.clone(),
        curves,
        provenance,
        probability,
        alternative_probabilities,
        references: &references,
    };
    let bytes = if format == FileFormat::Json {
        let text =
            serde_json::to_string_pretty(&json(&input)).map_err(|e| Fail::other(e.to_string()))?;
        text + "\n"
    } else {
        html(&input)?
    };
    write_output(&out, bytes.as_bytes())?;
    if r.json {
        return emit_json(&json(&input));
    }
    crate::common::said_where(
        &out,
        &format!(
            "wrote {} ({}: {}; {} alternative(s))\n{}\n",
            out.display(),
            decision.chosen.label,
            decision.chosen.verdict(window),
            decision.alternatives.len(),
            crate::output::CAUTION
        ),
    )
}
