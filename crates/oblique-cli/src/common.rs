//! Helpers shared by the subcommands: loading the libraries, the point the user gave, files the
//! user asked for, the exit code of a set-up error. No subcommand module is imported from here.

use crate::args::{ConventionArg, VelocityInput};
use crate::fail::{CmdResult, Fail};
use oblique_core::units::{parse_quantity, Angle, Length, QuantityKind, Velocity};
use oblique_core::{Collision, Convention};
use oblique_setup::{Catalog, SetupError};
use oblique_window::machine::Machines;
use oblique_window::{Library, PairWindow};
use std::path::{Path, PathBuf};

/// The user folders: `--library` flags first, then `OBLIQUE_LIBRARY`.
pub fn user_dirs(cli_dirs: &[PathBuf]) -> Vec<PathBuf> {
    let mut dirs = cli_dirs.to_vec();
    dirs.extend(oblique_window::library::env_dirs());
    dirs
}

/// Load the library, printing shadowing warnings on stderr.
pub fn load_library(cli_dirs: &[PathBuf]) -> CmdResult<Library> {
    let lib = Library::load(&user_dirs(cli_dirs))?;
    for w in &lib.warnings {
        errln!("warning: {}", crate::fail::for_terminal(w));
    }
    for p in &lib.problems {
        errln!("warning: {}", crate::fail::for_terminal(&p.summary()));
    }
    Ok(lib)
}

/// Load the machine files, printing their warnings on stderr.
pub fn load_machines(cli_dirs: &[PathBuf]) -> CmdResult<Machines> {
    let machines = Machines::load(&user_dirs(cli_dirs))?;
    for w in &machines.warnings {
        errln!("warning: {}", crate::fail::for_terminal(w));
    }
    for p in &machines.problems {
        errln!("warning: {}", crate::fail::for_terminal(&p.summary()));
    }
    Ok(machines)
}

/// Both libraries (materials first), printing their warnings on stderr.
pub fn load_catalog(cli_dirs: &[PathBuf]) -> CmdResult<Catalog> {
    let library = load_library(cli_dirs)?;
    let machines = load_machines(cli_dirs)?;
    Ok(Catalog::new(library, machines))
}

/// Print warnings gathered for the person on stderr.
pub fn print_notes(notes: &[String]) {
    for n in notes {
        errln!("warning: {n}");
    }
}

/// Today's date as YYYY-MM-DD (UTC), from the system clock.
pub fn today() -> String {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_secs() as i64)
        .unwrap_or(0);
    let days = secs.div_euclid(86_400);
    // Civil-from-days (H. Hinnant's algorithm, public domain).
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let y = yoe + era * 400;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = if m <= 2 { y + 1 } else { y };
    format!("{y:04}-{m:02}-{d:02}")
}

/// Refuse a missing value with a message naming the flag.
pub fn need<T>(v: Option<T>, flag: &str, form: &str) -> CmdResult<T> {
    v.ok_or_else(|| Fail::input(format!("{flag} is required here: expected {form}")))
}

/// A window made on the spot from two material ids and a thickness, with the default criteria.
pub fn ad_hoc_window(
    lib: &Library,
    flyer: &str,
    parent: &str,
    flyer_thickness: f64,
    parent_thickness: Option<f64>,
    convention: Convention,
    process: Option<&str>,
) -> CmdResult<PairWindow> {
    lib.ad_hoc_window(
        flyer,
        parent,
        Length::from_m(flyer_thickness),
        parent_thickness.map(Length::from_m),
        convention,
        process,
    )
    .map_err(|(which, m)| Fail::input(format!("--{which}: {m}")))
}

/// Refuse criterion constants set on the command line that leave the window empty in the
/// validity domain (a limit that no point of it satisfies), naming the flags given.
///
/// # Errors
/// [`Fail::input`] with the reason.
pub fn refuse_empty_window(window: &PairWindow, c: &crate::args::ConstantArgs) -> CmdResult {
    if !c.any() {
        return Ok(());
    }
    match oblique_window::pair::empty_window(window) {
        None => Ok(()),
        Some(why) => {
            let flags: Vec<&str> = [
                (c.deribas_k.is_some(), "--deribas-k"),
                (c.wittman_n.is_some(), "--wittman-n"),
                (c.hel_multiple.is_some(), "--hel-multiple"),
            ]
            .into_iter()
            .filter_map(|(set, f)| set.then_some(f))
            .collect();
            Err(Fail::input(format!(
                "{}: with this constant the window is empty: {why}\n  hint: a constant this far from its published range (docs/theory.md §5) leaves no weld anywhere in the validity domain (§7.1)",
                flags.join(", ")
            )))
        }
    }
}

/// Build the collision from Vp or Vc.
/// The point as the user gave it (velocity or collision velocity, angle, convention; the
/// window's convention when none is given), classified against `window` with its advice in
/// the convention the user typed the point in.
///
/// # Errors
/// No velocity, or a point or window the physics refuses.
pub fn classify_given(
    window: &PairWindow,
    convention: Option<ConventionArg>,
    v: &VelocityInput,
    angle: f64,
) -> CmdResult<(Collision, oblique_window::Classification)> {
    let convention: Convention = convention.map_or(window.convention, Into::into);
    let point = collision(convention, v.velocity, v.collision_velocity, angle)?;
    let setup = window.setup()?;
    let mut c = oblique_window::classify::classify(window, &setup, &point)?;
    oblique_window::advice::explain_in(window, &setup, &mut c, point.convention);
    Ok((point, c))
}

pub fn collision(
    convention: Convention,
    velocity: Option<f64>,
    collision_velocity: Option<f64>,
    angle: f64,
) -> CmdResult<Collision> {
    let beta = Angle::from_radians(angle);
    let c = match (velocity, collision_velocity) {
        (Some(vp), _) => Collision::from_impact(convention, Velocity::from_m_s(vp), beta),
        (None, Some(vc)) => {
            Collision::from_collision_velocity(convention, Velocity::from_m_s(vc), beta)
        }
        (None, None) => return Err(Fail::input("give --velocity or --collision-velocity")),
    };
    c.map_err(|e| Fail::input(e.to_string()))
}

/// Read `velocity[unit],angle[unit][,label]` rows.
pub fn read_point_csv(path: &Path) -> CmdResult<Vec<(f64, f64, Option<String>)>> {
    let bytes = read_input(path)?;
    let display = if path.as_os_str() == "-" {
        "standard input".to_string()
    } else {
        path.display().to_string()
    };
    let mut rdr = csv::ReaderBuilder::new()
        .trim(csv::Trim::All)
        .from_reader(&bytes[..]);
    let headers = rdr
        .headers()
        .map_err(|e| Fail::input(format!("{display}: {e}")))?
        .clone();
    let mut vcol = None;
    let mut acol = None;
    let mut lcol = None;
    for (i, h) in headers.iter().enumerate() {
        let (name, unit) = match h.split_once('[') {
            Some((n, u)) => (n.trim(), Some(u.trim_end_matches(']').trim().to_string())),
            None => (h.trim(), None),
        };
        match name {
            "velocity" => vcol = Some((i, unit)),
            "angle" => acol = Some((i, unit)),
            "label" => lcol = Some(i),
            _ => {}
        }
    }
    let (Some((vi, Some(vu))), Some((ai, Some(au)))) = (vcol, acol) else {
        return Err(Fail::input(format!("{display}:1: the header needs velocity[UNIT] and angle[UNIT] columns, e.g. velocity[m/s],angle[deg],label")));
    };
    let mut out = Vec::new();
    for (n, rec) in rdr.records().enumerate() {
        let row = n + 2;
        let rec = rec.map_err(|e| Fail::input(format!("{display}:{row}: {e}")))?;
        let v = parse_quantity(
            &format!("{} {vu}", rec.get(vi).unwrap_or("")),
            QuantityKind::Velocity,
        )
        .map_err(|e| Fail::input(format!("{display}:{row}: field 'velocity': {e}")))?;
        let a = parse_quantity(
            &format!("{} {au}", rec.get(ai).unwrap_or("")),
            QuantityKind::Angle,
        )
        .map_err(|e| Fail::input(format!("{display}:{row}: field 'angle': {e}")))?;
        if !(v > 0.0) {
            return Err(Fail::input(format!(
                "{display}:{row}: field 'velocity': must be above zero"
            )));
        }
        let d = a.to_degrees();
        if !(d > 0.0 && d < 90.0) {
            return Err(Fail::input(format!(
                "{display}:{row}: field 'angle': {d} deg is outside (0, 90) deg"
            )));
        }
        let label = lcol
            .and_then(|i| rec.get(i))
            .map(str::to_string)
            .filter(|s| !s.is_empty());
        out.push((v, a, label));
    }
    Ok(out)
}

/// The bytes of an input file, or of standard input for `-`.
///
/// # Errors
/// The file cannot be read (exit 2, naming it).
pub fn read_input(path: &Path) -> CmdResult<Vec<u8>> {
    use oblique_window::files::{read_all_bounded, read_bounded, MAX_READ_BYTES};
    if path.as_os_str() == "-" {
        return read_all_bounded(std::io::stdin().lock(), MAX_READ_BYTES)
            .map_err(|e| Fail::input(format!("standard input: {e}")));
    }
    read_bounded(path).map_err(|e| Fail::input(format!("{}: {e}", path.display())))
}

/// Where a file went, for the closing message: on standard error when the file itself went to
/// standard output (`-`), so that the output stays clean.
pub fn said_where(path: &Path, text: &str) -> CmdResult {
    if path.as_os_str() == "-" {
        err_text!("{}", crate::fail::for_terminal(text));
        Ok(())
    } else {
        crate::output::emit(text)
    }
}

/// Print a library file as it is: a user file read again from `path`, a built-in one from the
/// text built into the binary (`builtin`); `missing` words the case where neither is found.
pub fn emit_library_file(
    path: Option<&Path>,
    builtin: Option<&str>,
    missing: impl FnOnce() -> String,
) -> CmdResult {
    match (path, builtin) {
        (Some(p), _) => {
            let text = oblique_window::files::read_text_bounded(p)
                .map_err(|e| Fail::other(format!("cannot read {}: {e}", p.display())))?;
            crate::output::emit(&text)
        }
        (None, Some(t)) => crate::output::emit(t),
        (None, None) => Err(Fail::other(missing())),
    }
}

/// Say so when a file is written through a symbolic link (to its target, the link kept).
pub fn note_target(path: &Path) {
    if let Ok(t) = oblique_window::write::resolve_target(path) {
        if let Some(n) = t.note(path) {
            errln!("note: {n}");
        }
    }
}

/// Write a file the user asked for, atomically.
pub fn write_output(path: &Path, bytes: &[u8]) -> CmdResult {
    use oblique_window::write::WriteError;
    if path.as_os_str() == "-" {
        // Standard output; a closed pipe is a normal end.
        use std::io::Write;
        let mut out = std::io::stdout().lock();
        return match out.write_all(bytes).and_then(|()| out.flush()) {
            Ok(()) => Ok(()),
            Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Err(Fail {
                message: String::new(),
                code: 0,
            }),
            Err(e) => Err(Fail::other(format!("cannot write to standard output: {e}"))),
        };
    }
    note_target(path);
    oblique_window::write::atomic_write(path, bytes, None).map_err(|e| match e {
        WriteError::Io { source, .. } => Fail::other(format!(
            "{}: cannot write: {source}\n  hint: check that the folder exists and is writable",
            path.display()
        )),
        other => write_fail(other),
    })
}

/// The exit code of a write that did not happen: 1 when the command was right and the machine
/// or another process stood in the way (an IO error, another writer's lock held too long), 2
/// when the path or the data asked for cannot be written (a folder, a read-only or library
/// file, an existing name, a change that would leave an invalid file, a file that is no longer
/// the one the user read: `--if-unchanged`).
pub fn write_fail(e: oblique_window::write::WriteError) -> Fail {
    use oblique_window::write::WriteError;
    match e {
        WriteError::Io { .. } | WriteError::Locked { .. } => Fail::other(e.to_string()),
        WriteError::Conflict { .. }
        | WriteError::Invalid(_)
        | WriteError::Exists(_)
        | WriteError::Structure { .. } => Fail::input(e.to_string()),
    }
}

impl From<SetupError> for Fail {
    fn from(e: SetupError) -> Self {
        if e.is_input() {
            Fail::input(e.to_string())
        } else {
            Fail::other(e.to_string())
        }
    }
}

/// Where a path leads: the canonical file when it exists (links followed), else the canonical
/// folder joined with the name; `None` for standard input/output (`-`).
fn resolved(p: &Path) -> Option<PathBuf> {
    if p.as_os_str() == "-" {
        return None;
    }
    if let Ok(c) = p.canonicalize() {
        return Some(c);
    }
    let parent = p
        .parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let name = p.file_name()?;
    Some(parent.canonicalize().ok()?.join(name))
}

/// Refuse, before any work, outputs that would land on the same file or on an input: the
/// later write would silently replace the earlier one (or the input before it is read).
/// `inputs` are (what it is, e.g. "the input file" or "the input of --curve", path) pairs,
/// `outputs` (flag, path) pairs.
///
/// # Errors
/// [`Fail::input`] naming both flags.
pub fn distinct_outputs(inputs: &[(&str, &Path)], outputs: &[(&str, &Path)]) -> CmdResult {
    let ins: Vec<(&str, PathBuf)> = inputs
        .iter()
        .filter_map(|(f, p)| Some((*f, resolved(p)?)))
        .collect();
    let mut seen: Vec<(&str, PathBuf)> = Vec::new();
    for (flag, p) in outputs {
        let Some(r) = resolved(p) else { continue };
        if r.as_path() == Path::new("/dev/null") {
            continue;
        }
        if let Some((f, _)) = ins.iter().find(|(_, i)| *i == r) {
            return Err(Fail::input(format!(
                "{flag}: {} is {f}; choose another name",
                p.display()
            )));
        }
        if let Some((f, _)) = seen.iter().find(|(_, s)| *s == r) {
            return Err(Fail::input(format!(
                "{flag}: {} is also the output of {f}; one would replace the other: give each its own name",
                p.display()
            )));
        }
        seen.push((flag, r));
    }
    Ok(())
}

/// The formats a command can write, picked by the output file's extension.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FileFormat {
    /// `.svg`
    Svg,
    /// `.png`
    Png,
    /// `.html`, `.htm`
    Html,
    /// `.json`
    Json,
    /// `.csv`
    Csv,
    /// `.jsonl`, `.ndjson`
    JsonLines,
}

impl FileFormat {
    /// The extensions of the format, first the usual one.
    #[must_use]
    pub fn extensions(self) -> &'static [&'static str] {
        match self {
            FileFormat::Svg => &["svg"],
            FileFormat::Png => &["png"],
            FileFormat::Html => &["html", "htm"],
            FileFormat::Json => &["json"],
            FileFormat::Csv => &["csv"],
            FileFormat::JsonLines => &["jsonl", "ndjson"],
        }
    }
}

/// One rule for every file a command writes: the extension picks the format among those the
/// command supports (case does not matter); any other extension, or none, is refused before any
/// work, naming the flag and the supported list. Standard output (`-`) and an existing
/// non-regular file (a pipe, a device such as /dev/null) take `default`, when there is one.
///
/// # Errors
/// [`Fail::input`] naming the flag, the extension and the supported extensions.
pub fn output_format(
    flag: &str,
    path: &Path,
    supported: &[FileFormat],
    default: Option<FileFormat>,
) -> CmdResult<FileFormat> {
    let special = path.as_os_str() == "-"
        || std::fs::metadata(path).is_ok_and(|m| !m.is_file() && !m.is_dir());
    let ext = path
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase);
    if let Some(ext) = &ext {
        if let Some(f) = supported
            .iter()
            .find(|f| f.extensions().contains(&ext.as_str()))
        {
            return Ok(*f);
        }
    }
    if special {
        if let Some(d) = default {
            return Ok(d);
        }
    }
    let list: Vec<String> = supported
        .iter()
        .flat_map(|f| f.extensions().iter().map(|e| format!(".{e}")))
        .collect();
    let what = match &ext {
        Some(e) => format!("'.{e}' is not a format it writes"),
        None => "the name has no extension, and the extension picks the format".into(),
    };
    Err(Fail::input(format!(
        "{flag} {}: {what}; supported: {}",
        path.display(),
        list.join(", ")
    )))
}

/// The provenance of a record: this tool's version, the time (`SOURCE_DATE_EPOCH` when set, for
/// reproducible records; else now), the people, the command line and the files.
///
/// # Errors
/// [`Fail::input`] when `SOURCE_DATE_EPOCH` is set but not a whole number of seconds.
pub fn record_provenance(
    files: Vec<oblique_setup::FileUse>,
    prepared_by: Option<String>,
    checked_by: Option<String>,
) -> CmdResult<oblique_render::report::Provenance> {
    let now = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.as_secs() as i64);
    let sde = std::env::var("SOURCE_DATE_EPOCH").ok();
    let (generated, fixed) =
        oblique_render::report::record_time(sde.as_deref(), now).map_err(Fail::input)?;
    Ok(oblique_render::report::Provenance {
        version: env!("CARGO_PKG_VERSION").to_string(),
        generated,
        from_source_date_epoch: fixed,
        prepared_by,
        checked_by,
        command: oblique_render::report::command_line(),
        files,
    })
}

/// The window of `a`: the pair window (with `--parent-thickness` and the constant flags
/// applied), or one made on the spot from `--flyer`, `--parent`, `--flyer-thickness`,
/// `--convention` and `--process`; refused when a constant flag empties it. With it, the note
/// on constants fitted to the pair's trials (and which flags override them), if any.
///
/// # Errors
/// [`Fail::input`] naming the flag: an unknown pair or material, a missing flag, a constant
/// that empties the window.
pub fn window_from(
    lib: &Library,
    a: &crate::args::WindowArgs,
) -> CmdResult<(PairWindow, Option<String>)> {
    let mut window = match &a.pair {
        Some(name) => lib
            .pair(name)
            .map_err(|m| Fail::input(format!("--pair: {m}")))?
            .clone(),
        None => {
            let convention = need(
                a.convention,
                "--convention",
                "bisector, normal-to-flyer or normal-to-parent (the convention is never guessed)",
            )?;
            ad_hoc_window(
                lib,
                &need(a.flyer.clone(), "--flyer", "a material id")?,
                &need(a.parent.clone(), "--parent", "a material id")?,
                need(
                    a.flyer_thickness,
                    "--flyer-thickness",
                    "a length such as 1mm",
                )?,
                a.parent_thickness,
                convention.into(),
                a.process.map(crate::args::ProcessArg::as_str),
            )?
        }
    };
    if let Some(t) = a.parent_thickness {
        window.parent_thickness = Some(Length::from_m(t));
    }
    let note = fitted_note(&window, &a.constants);
    window.criteria = a.constants.apply(window.criteria.clone());
    refuse_empty_window(&window, &a.constants)?;
    Ok((window, note))
}

/// "constants fitted to N trials ...", with each fitted constant and its interval, and a word
/// when a flag overrides one.
pub fn fitted_note(window: &PairWindow, flags: &crate::args::ConstantArgs) -> Option<String> {
    let f = window.fitted.as_ref()?;
    let mut s = format!("constants {}:", f.summary());
    for (key, v) in f.constants() {
        s.push_str(&format!(
            " {key} {} ({} % interval {})",
            oblique_confidence::present::num(v.value),
            oblique_confidence::present::num(100.0 * f.level),
            oblique_confidence::present::interval(v.low, v.high)
        ));
        let overridden = match key {
            "deribas_k" => flags.deribas_k.is_some(),
            "wittman_n" => flags.wittman_n.is_some(),
            "hel_multiple" => flags.hel_multiple.is_some(),
            _ => false,
        };
        if overridden {
            s.push_str(" [the flag overrides it]");
        }
        s.push(';');
    }
    s.pop();
    s.push('\n');
    for c in f.cautions(&window.name, window.observations.len()) {
        s.push_str(&format!("  caution: {c}\n"));
    }
    Some(s)
}

/// The weld probability of the point the user gave (`--velocity-sd`, `--angle-sd`, ...), when
/// any scatter flag asks for it: the velocity scattered as given (Vp or Vc, in the convention
/// given).
///
/// # Errors
/// A scatter setting out of range, naming its flag.
pub fn point_probability(
    window: &PairWindow,
    point: &Collision,
    a: &crate::args::PointArgs,
) -> CmdResult<Option<oblique_confidence::WeldProbability>> {
    if !a.scatter.asked() {
        return Ok(None);
    }
    let p = oblique_confidence::Point {
        convention: point.convention,
        velocity: match (a.velocity.velocity, a.velocity.collision_velocity) {
            (Some(v), _) => oblique_confidence::PointVelocity::Impact(v),
            (None, Some(v)) => oblique_confidence::PointVelocity::Collision(v),
            (None, None) => oblique_confidence::PointVelocity::Impact(point.impact_velocity.si()),
        },
        angle_rad: a.angle,
    };
    Ok(Some(oblique_confidence::weld_probability(
        window,
        &p,
        &a.scatter.scatter(),
        &a.scatter
            .sampling(oblique_confidence::scatter::DEFAULT_SAMPLES),
    )?))
}

/// A window made on the spot for a process estimate (`--parent` and `--convention`, with the
/// flyer and its thickness of the set-up), put into the catalog under its name; the name is
/// returned for the request's pair. The same default criteria as `check` without `--pair`,
/// for `process`.
///
/// # Errors
/// [`Fail::input`] naming the missing or unknown flag.
pub fn adhoc_pair(
    catalog: &mut Catalog,
    flyer: Option<&str>,
    thickness: Option<f64>,
    parent: &str,
    convention: Option<ConventionArg>,
    process: &str,
) -> CmdResult<String> {
    let flyer = need(
        flyer,
        "--flyer",
        "the flyer's material id with --parent, e.g. aa6061-t6",
    )?;
    let thickness = need(
        thickness,
        "--flyer-thickness",
        "the flyer's thickness with --parent, e.g. 1mm",
    )?;
    let convention = need(
        convention,
        "--convention",
        "bisector, normal-to-flyer or normal-to-parent with --parent (the convention is never guessed)",
    )?;
    let w = ad_hoc_window(
        &catalog.library,
        flyer,
        parent,
        thickness,
        None,
        convention.into(),
        Some(process),
    )?;
    let name = w.name.clone();
    catalog.library.pairs.insert(name.clone(), w);
    Ok(name)
}

/// The flyer id and thickness (m) a magnetic request names.
pub fn request_flyer(p: &oblique_setup::MagneticRequest) -> (Option<&str>, Option<f64>) {
    match p {
        oblique_setup::MagneticRequest::Tube(t) => (
            t.flyer.as_deref(),
            t.flyer_thickness.map(oblique_core::units::Length::si),
        ),
        oblique_setup::MagneticRequest::Sheet(s) => (
            s.flyer.as_deref(),
            s.flyer_thickness.map(oblique_core::units::Length::si),
        ),
    }
}

/// The weld probability of the chosen set-up, when the scatter flags ask for it (or `always`): under the stated
/// scatter (a process estimate: the velocity spread of its efficiency's provenance unless
/// --velocity-sd is given; the angle 1 deg unless --angle-sd is).
pub fn chosen_probability(
    window: &oblique_window::PairWindow,
    decision: &oblique_setup::decision::Decision<'_>,
    a: &crate::args::ScatterArgs,
    always: bool,
) -> CmdResult<Option<oblique_render::report::Probability>> {
    candidate_probability(window, &decision.chosen, a, always)
}

/// The weld probability of every alternative of a record, as [`chosen_probability`] computes
/// the chosen set-up's (the same scatter rule, draws and seed), in the order of
/// `decision.alternatives`; empty when no probability is asked for.
///
/// # Errors
/// As [`chosen_probability`].
pub fn alternative_probabilities(
    window: &oblique_window::PairWindow,
    decision: &oblique_setup::decision::Decision<'_>,
    a: &crate::args::ScatterArgs,
    always: bool,
) -> CmdResult<Vec<Option<f64>>> {
    if !a.asked() && !always {
        return Ok(Vec::new());
    }
    decision
        .alternatives
        .iter()
        .map(|alt| Ok(candidate_probability(window, &alt.candidate, a, always)?.map(|p| p.value)))
        .collect()
}

/// The weld probability of one candidate of a record (see [`chosen_probability`]).
fn candidate_probability(
    window: &oblique_window::PairWindow,
    candidate: &oblique_setup::decision::Candidate<'_>,
    a: &crate::args::ScatterArgs,
    always: bool,
) -> CmdResult<Option<oblique_render::report::Probability>> {
    if !a.asked() && !always {
        return Ok(None);
    }
    let Some(check) = &candidate.check else {
        return Ok(None);
    };
    let col = &check.evaluation.collision;
    let (scatter, basis) = match &candidate.produced {
        oblique_setup::decision::Produced::Magnetic(r) => a.process().resolve(&r.setup.inputs),
        _ => (a.scatter(), "as stated".to_string()),
    };
    let point = oblique_confidence::Point::impact(col.convention, col.impact_velocity, col.angle);
    let sampling = a.sampling(oblique_setup::uncertainty::ESTIMATE_SAMPLES);
    let p = oblique_confidence::weld_probability(window, &point, &scatter, &sampling)
        .map_err(|e| Fail::input(e.to_string()))?;
    let half = 1.959964 * p.standard_error; // normal 0.975 quantile (NIST handbook table)
    let mut doubt = p.doubt.clone();
    if let Some(first) = doubt.get(..1) {
        doubt = first.to_uppercase() + &doubt[1..];
    }
    if !doubt.ends_with('.') {
        doubt.push('.');
    }
    Ok(Some(oblique_render::report::Probability {
        value: p.inside,
        interval: Some(((p.inside - half).max(0.0), (p.inside + half).min(1.0))),
        method: format!(
            "Monte Carlo, {} draws, seed {}, under the stated scatter ({}; velocity spread basis: {basis}); 95 % interval of the sampling only. {} The probability is conditional on the model and these distributions (docs/theory.md, section 15), a screening estimate, never a guarantee",
            p.samples,
            p.seed,
            scatter.text(),
            doubt
        ),
    }))
}
