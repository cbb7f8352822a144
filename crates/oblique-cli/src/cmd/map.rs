//! `oblique map`: classify every point of an interface export (simulation or measurement) against
//! a pair window, streaming: the weld map (one output row per input row), a summary along the
//! interface, and optional plots. The engine is the `oblique_map` crate, the plots
//! `oblique_render::weld_map`; this module turns the flags into `MapOptions`, opens the files,
//! shows the progress bar and prints. Layout and policies: `docs/weld-map.md`.

mod input;
mod outputs;

use crate::args::ConstantArgs;
use crate::common::load_library;
use crate::fail::{CmdResult, Fail};
use crate::output::CAUTION;
use clap::{Args, ValueEnum};
use oblique_core::units::Length;
use oblique_map::{
    BadRows, ColumnNames, ColumnSelection, ConstantNote, Format, JettingMode, MapError, MapOptions,
    Output, Summary, VelocityKind, WeldMap,
};
use oblique_window::PairWindow;
use outputs::{write_file, AtomicFile, Out};
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};

const AFTER_HELP: &str = "Input layout (CSV; JSON lines take the same names as keys), units in the header:
  position[mm],velocity[m/s],angle[deg]          required
  time[us], id, anything else                    optional, passed through to the output
Units are converted (position[m], velocity[km/s], angle[rad], time[s], ...) and never guessed:
a header without a unit for position, velocity, angle or time is an error. Lines starting with
'#' before the header are skipped (and counted).
The velocity is the impact (flyer) velocity Vp in the pair window's convention
(`oblique pair show NAME` names it); --velocity-kind collision reads the collision-point
velocity Vc instead, which is the same in every convention.
Positions must run monotonically along the interface (either way); --unsorted accepts any order
but then computes no lengths or segments.

Output: one row per classified input row: row (line number), the input fields as written, then
verdict, binding limit, its margin (in that limit's unit, positive = on the welding side) and
relative margin (over the limit's own value), every failing limit, Vc, Vf and impact pressure;
--all-columns adds Vp, the jetting critical angle and the margin of every decisive limit;
--columns picks the columns (--columns verdict-only: the row number and the verdict).
Verdicts: welded, not-welded, melted, head-on (angle 0: not welded, no collision point sweeps
the interface) and outside-domain (outside the validity domain of docs/theory.md §7.1: no
verdict claimed). The summary accounts for the whole interface (welded, melted, unbonded,
outside the domain, no verdict) and goes to standard error, or to standard output when -o is
given; --json prints it as JSON instead (needs -o).

Examples:
  oblique map interface.csv --pair demo-al6061-on-cu -o map.csv --strip-svg strip.svg
  sim-export | oblique map - --pair demo-al6061-on-cu --bad-rows skip > map.csv
  oblique map run7.jsonl --pair demo-al6061-on-cu --velocity-column vp --angle-column beta -o map.jsonl --json

Exit status: 0 when the map was made, 2 on bad input (first bad row with --bad-rows stop, or no
row that could be classified).
Screening only, never a guarantee: lethal voltages, stored energy, explosives and flying parts
are involved in every real shot; follow local codes and licensed practice.";

/// Input or output layout, as a flag value.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum FormatArg {
    /// Comma-separated values with a header row.
    Csv,
    /// JSON lines: one object per line.
    Jsonl,
}

/// What the velocity column holds, as a flag value.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum VelocityKindArg {
    /// Impact (flyer) velocity Vp in the pair window's convention.
    Impact,
    /// Collision-point velocity Vc along the parent (convention-free).
    Collision,
}

/// Flags of `oblique map`.
#[derive(Debug, Args)]
#[command(after_help = AFTER_HELP)]
pub struct MapArgs {
    /// Interface export (CSV or JSON lines), or - for standard input.
    #[arg(value_name = "INPUT")]
    pub input: PathBuf,
    /// Pair window to classify against (`oblique pair list`).
    #[arg(long, value_name = "NAME")]
    pub pair: String,
    /// Write the per-point map to FILE (default, or `-`: standard output).
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: Option<PathBuf>,
    /// Input layout (default: jsonl for .jsonl/.ndjson files, else csv).
    #[arg(long, value_enum, ignore_case = true, value_name = "FORMAT")]
    pub format: Option<FormatArg>,
    /// Output layout (default: jsonl when -o ends in .jsonl/.ndjson, else csv).
    #[arg(
        long = "output-format",
        value_enum,
        ignore_case = true,
        value_name = "FORMAT"
    )]
    pub output_format: Option<FormatArg>,
    /// What the velocity column holds: impact = Vp in the window's convention; collision = Vc.
    #[arg(
        long = "velocity-kind",
        value_enum,
        ignore_case = true,
        default_value = "impact"
    )]
    pub velocity_kind: VelocityKindArg,
    /// Name of the position column (its unit in brackets in the header).
    #[arg(
        long = "position-column",
        value_name = "NAME",
        default_value = "position"
    )]
    pub position_column: String,
    /// Name of the velocity column.
    #[arg(
        long = "velocity-column",
        value_name = "NAME",
        default_value = "velocity"
    )]
    pub velocity_column: String,
    /// Name of the collision-angle column.
    #[arg(long = "angle-column", value_name = "NAME", default_value = "angle")]
    pub angle_column: String,
    /// Name of the optional time column (checked to be a number, passed through).
    #[arg(long = "time-column", value_name = "NAME", default_value = "time")]
    pub time_column: String,
    /// Bad rows: stop (first one, exit 2), skip (count them), or save:FILE (with the reason).
    #[arg(long = "bad-rows", value_name = "POLICY", default_value = "stop", value_parser = parse_policy)]
    pub bad_rows: BadRowsArg,
    /// Accept positions in any order; then no lengths or segments are computed.
    #[arg(long)]
    pub unsorted: bool,
    /// Join welded or unwelded runs shorter than LENGTH (e.g. 0.2mm) to their neighbours in the
    /// segment statistics (segments, longest welded segment, unbonded ends); welded length and
    /// verdicts stay point by point. For noisy exports that flicker at the window's edges.
    #[arg(long, value_name = "LENGTH", value_parser = crate::qarg::positive_length)]
    pub min_segment: Option<f64>,
    /// Also write the summary as JSON to FILE.
    #[arg(long = "summary-json", value_name = "FILE")]
    pub summary_json: Option<PathBuf>,
    /// Print the summary as JSON on standard output instead of the text (needs -o).
    #[arg(long)]
    pub json: bool,
    /// Draw the verdict strip along the interface with velocity and angle traces (.svg or .png).
    #[arg(long = "strip-svg", value_name = "FILE")]
    pub strip_svg: Option<PathBuf>,
    /// Draw the points on the window plane, angle against impact velocity (.svg or .png).
    #[arg(long = "window-svg", value_name = "FILE")]
    pub window_svg: Option<PathBuf>,
    /// Worker threads (default: the number of cores).
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u16).range(1..=256))]
    pub threads: Option<u16>,
    /// Solve the jetting test directly for every row with a supersonic stream instead of using
    /// the table (slow; no effect when the window's jetting criterion is off).
    #[arg(long = "exact-jetting")]
    pub exact_jetting: bool,
    /// Add Vp, the jetting critical angle and the margin of every limit to the output (the
    /// same as --columns all).
    #[arg(long = "all-columns", conflicts_with = "columns")]
    pub all_columns: bool,
    /// The map's columns: a comma-separated list of column names and sets, written in the
    /// map's own order: default, all, verdict-only (row,verdict); row, input (every input
    /// column), verdict, binding, binding_margin, binding_margin_unit, binding_relative_margin,
    /// failing_limits, impact_velocity, collision_velocity, flow_velocity, impact_pressure,
    /// jetting_critical_angle, margins (every limit's), margin_<limit> (e.g. margin_jetting),
    /// outside_trial_data.
    #[arg(long, value_name = "LIST", value_parser = parse_columns)]
    pub columns: Option<ColumnSelection>,
    /// Never show a progress bar.
    #[arg(long = "no-progress")]
    pub no_progress: bool,
    #[command(flatten)]
    pub constants: ConstantArgs,
}

/// `--bad-rows`, as a flag value.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum BadRowsArg {
    /// Stop at the first (exit 2).
    Stop,
    /// Skip and count.
    Skip,
    /// Write to a side file with the reason.
    Save(PathBuf),
}

fn parse_columns(s: &str) -> Result<ColumnSelection, String> {
    ColumnSelection::parse(s)
}

fn parse_policy(s: &str) -> Result<BadRowsArg, String> {
    match s {
        "stop" => Ok(BadRowsArg::Stop),
        "skip" => Ok(BadRowsArg::Skip),
        _ => match s.strip_prefix("save:") {
            Some(f) if !f.is_empty() => Ok(BadRowsArg::Save(PathBuf::from(f))),
            _ => Err(format!(
                "'{s}' is not a bad-row policy: expected stop, skip or save:FILE"
            )),
        },
    }
}

impl BadRowsArg {
    fn policy(&self) -> BadRows {
        match self {
            Self::Stop => BadRows::Stop,
            Self::Skip => BadRows::Skip,
            Self::Save(_) => BadRows::Save,
        }
    }

    fn text(&self) -> String {
        match self {
            Self::Stop => "stop".into(),
            Self::Skip => "skip".into(),
            Self::Save(f) => format!("save:{}", f.display()),
        }
    }

    fn side_file(&self) -> Option<&PathBuf> {
        match self {
            Self::Save(f) => Some(f),
            _ => None,
        }
    }
}

fn format_of(path: &Path) -> Format {
    match path.extension().and_then(|e| e.to_str()) {
        Some("jsonl" | "ndjson") => Format::Jsonl,
        _ => Format::Csv,
    }
}

fn fmt_arg(f: FormatArg) -> Format {
    match f {
        FormatArg::Csv => Format::Csv,
        FormatArg::Jsonl => Format::Jsonl,
    }
}

/// Run `oblique map`.
pub fn run(dirs: &[PathBuf], a: MapArgs) -> CmdResult {
    let mut a = a;
    check_args(&mut a)?;
    let stdin = a.input.as_os_str() == "-";

    // The window with the constants of the command line.
    let lib = load_library(dirs)?;
    let mut window = lib
        .pair(&a.pair)
        .map_err(|m| Fail::input(format!("--pair: {m}")))?
        .clone();
    let window_criteria = window.criteria.clone();
    window.criteria = a.constants.apply(window.criteria.clone());
    crate::common::refuse_empty_window(&window, &a.constants)?;
    let opts = map_options(&a, &window, &window_criteria, stdin);

    // The input and its header, then the classifier.
    let (mut opened, total_len, is_file) = input::open(&a.input, stdin, &opts.input_name)?;
    let mut map = input::weld_map(&window, &mut opened, &opts).map_err(input_fail)?;

    // Outputs.
    let mut out = match &a.output {
        Some(p) => Out::File(AtomicFile::create(p, "-o")?),
        None => Out::Stdout(std::io::stdout()),
    };
    let mut side = match a.bad_rows.side_file() {
        Some(p) => match AtomicFile::create(p, "--bad-rows save:") {
            Ok(f) => Some(f),
            Err(fail) => {
                // The map's header line has always gone out before the side file is created:
                // keep that order (standard output shows the header, then the error).
                out.write_all(&map.map_header())
                    .map_err(|e| out.write_failure(&e))?;
                return Err(fail);
            }
        },
        None => None,
    };

    // Progress: only for a regular file, on a terminal, after about a second.
    let mut bar = ProgressBar::new(
        total_len
            .filter(|_| is_file && !a.json && !a.no_progress && std::io::stderr().is_terminal()),
    );
    let result = map.run(
        &mut out,
        side.as_mut().map(|f| f as &mut dyn Write),
        &mut |bytes| bar.update(bytes),
    );
    bar.finish();
    let nothing_classified = matches!(result, Err(MapError::NothingClassified(_)));
    let mut summary = match result {
        Ok(s) => s,
        Err(e) => {
            let fail = map_fail(e, &out, side.as_ref());
            if let (true, Some(f)) = (nothing_classified, side) {
                // Keep the side file with every rejected row and its reason; no map is written.
                f.commit()?;
            }
            return Err(fail);
        }
    };
    if let Out::File(f) = out {
        f.commit()?;
    }
    if let Some(f) = side {
        f.commit()?;
    }
    summary.info.bad_rows = a.bad_rows.text();
    report(&a, &window, &map, &summary)
}

/// Refuse flags that cannot go together; `-o -` is standard output, as `-` is standard input.
fn check_args(a: &mut MapArgs) -> CmdResult {
    if a.json && a.output.is_none() {
        return Err(Fail::input(
            "--json prints the summary on standard output, where the map goes without -o: give the map a file with -o FILE",
        ));
    }
    if a.output.as_deref().is_some_and(|p| p.as_os_str() == "-") {
        if a.json {
            return Err(Fail::input(
                "--json prints the summary on standard output, where -o - sends the map: give -o FILE",
            ));
        }
        a.output = None;
    }
    if a.unsorted && a.min_segment.is_some() {
        return Err(Fail::input(
            "--min-segment joins runs along the interface and needs sorted positions: it cannot be used with --unsorted",
        ));
    }
    if a.unsorted && a.strip_svg.is_some() {
        return Err(Fail::input(
            "--strip-svg draws along the interface and needs sorted positions: it cannot be used with --unsorted",
        ));
    }
    let mut outputs: Vec<(&str, &Path)> = Vec::new();
    for (flag, p) in [
        ("-o", a.output.as_deref()),
        ("--summary-json", a.summary_json.as_deref()),
        ("--strip-svg", a.strip_svg.as_deref()),
        ("--window-svg", a.window_svg.as_deref()),
        (
            "--bad-rows save:",
            a.bad_rows.side_file().map(PathBuf::as_path),
        ),
    ] {
        if let Some(p) = p {
            outputs.push((flag, p));
        }
    }
    crate::common::distinct_outputs(&[("the input file", a.input.as_path())], &outputs)?;
    // One rule for every file written: the extension picks the format, checked before any work.
    use crate::common::{output_format, FileFormat};
    if let Some(p) = &a.output {
        let f = output_format(
            "-o",
            p,
            &[FileFormat::Csv, FileFormat::JsonLines],
            Some(a.output_format.map_or(FileFormat::Csv, |f| match f {
                FormatArg::Csv => FileFormat::Csv,
                FormatArg::Jsonl => FileFormat::JsonLines,
            })),
        )?;
        let named = match f {
            FileFormat::JsonLines => FormatArg::Jsonl,
            _ => FormatArg::Csv,
        };
        if a.output_format.is_some_and(|g| g != named) {
            return Err(Fail::input(format!(
                "-o {} and --output-format disagree: the extension picks the format; drop --output-format or rename the file",
                p.display()
            )));
        }
    }
    if let Some(p) = &a.summary_json {
        output_format(
            "--summary-json",
            p,
            &[FileFormat::Json],
            Some(FileFormat::Json),
        )?;
    }
    for (flag, p) in [
        ("--strip-svg", &a.strip_svg),
        ("--window-svg", &a.window_svg),
    ] {
        if let Some(p) = p {
            output_format(
                flag,
                p,
                &[FileFormat::Svg, FileFormat::Png],
                Some(FileFormat::Svg),
            )?;
        }
    }
    if let Some(p) = a.bad_rows.side_file() {
        output_format(
            "--bad-rows save:",
            p,
            &[FileFormat::Csv, FileFormat::JsonLines],
            Some(FileFormat::Csv),
        )?;
    }
    Ok(())
}

/// The engine's options from the flags.
fn map_options(
    a: &MapArgs,
    window: &PairWindow,
    window_criteria: &oblique_core::CriteriaConfig,
    stdin: bool,
) -> MapOptions {
    let constant = |name, flag, value, window| ConstantNote {
        name,
        flag,
        value,
        window,
    };
    let c = &window.criteria;
    MapOptions {
        input_name: if stdin {
            "<stdin>".to_string()
        } else {
            a.input.display().to_string()
        },
        input_format: a.format.map(fmt_arg).unwrap_or_else(|| {
            if stdin {
                Format::Csv
            } else {
                format_of(&a.input)
            }
        }),
        output_format: a
            .output_format
            .map(fmt_arg)
            .unwrap_or_else(|| a.output.as_deref().map_or(Format::Csv, format_of)),
        columns: ColumnNames {
            position: a.position_column.clone(),
            velocity: a.velocity_column.clone(),
            angle: a.angle_column.clone(),
            time: a.time_column.clone(),
        },
        velocity_kind: match a.velocity_kind {
            VelocityKindArg::Impact => VelocityKind::Impact,
            VelocityKindArg::Collision => VelocityKind::Collision,
        },
        jetting: if a.exact_jetting {
            JettingMode::Direct
        } else {
            JettingMode::Table
        },
        bad_rows: a.bad_rows.policy(),
        all_columns: a.all_columns,
        output_columns: a.columns.clone(),
        unsorted: a.unsorted,
        min_segment: a.min_segment.map(Length::from_m),
        collect_strip: a.strip_svg.is_some(),
        collect_window_plane: a.window_svg.is_some(),
        constants: vec![
            constant(
                "deribas_k",
                "--deribas-k",
                c.deribas_k,
                window_criteria.deribas_k,
            ),
            constant(
                "wittman_n",
                "--wittman-n",
                c.wittman_n,
                window_criteria.wittman_n,
            ),
            constant(
                "hel_multiple",
                "--hel-multiple",
                c.hel_multiple,
                window_criteria.hel_multiple,
            ),
        ],
        threads: a.threads.map_or(0, usize::from),
    }
}

/// A map error before any output exists.
fn input_fail(e: MapError) -> Fail {
    if e.is_input() {
        Fail::input(e.to_string())
    } else {
        Fail::other(e.to_string())
    }
}

/// A map error, with the outputs named as the user gave them.
fn map_fail(e: MapError, out: &Out, side: Option<&AtomicFile>) -> Fail {
    match e {
        MapError::Write {
            output: Output::Map,
            source,
        } => out.write_failure(&source),
        MapError::Write {
            output: Output::BadRows,
            source,
        } => match side {
            Some(f) => f.write_failure(&source),
            None => Fail::other(format!("cannot write the rejected rows: {source}")),
        },
        e => input_fail(e),
    }
}

/// The bytes of a plot for `path`: PNG for a .png name (checked before any work), else the SVG.
fn picture(path: &Path, svg: String) -> CmdResult<Vec<u8>> {
    let png = path
        .extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case("png"));
    Ok(if png {
        oblique_render::png::svg_to_png(&svg)?
    } else {
        svg.into_bytes()
    })
}

/// The summary (text or JSON), the summary file and the plots.
fn report(a: &MapArgs, window: &PairWindow, map: &WeldMap<'_>, summary: &Summary) -> CmdResult {
    let json = summary.to_json();
    if let Some(p) = &a.summary_json {
        let text = serde_json::to_string_pretty(&json).map_err(|e| Fail::other(e.to_string()))?;
        write_file(p, "--summary-json", (text + "\n").as_bytes())?;
    }
    if let Some(p) = &a.strip_svg {
        let svg = oblique_render::weld_map::strip_svg(window, summary)?;
        write_file(p, "--strip-svg", &picture(p, svg)?)?;
    }
    if let Some(p) = &a.window_svg {
        let svg = oblique_render::weld_map::window_plane_svg(window, map.classifier(), summary)?;
        write_file(p, "--window-svg", &picture(p, svg)?)?;
    }
    if a.json {
        crate::output::emit_json(&json)?;
    } else {
        let text = summary.to_text();
        debug_assert!(text.ends_with(&format!("{CAUTION}\n")));
        if a.output.is_some() {
            crate::output::emit(&text)?;
        } else {
            to_stderr(&text);
        }
    }
    Ok(())
}

/// Write to standard error; a closed standard error is not worth a panic.
fn to_stderr(text: &str) {
    let _ = std::io::stderr().lock().write_all(text.as_bytes());
}

/// The progress bar on standard error: it appears after about a second, for a regular file of
/// known length on a terminal.
struct ProgressBar {
    /// The input's length, when a bar may be shown.
    total: Option<u64>,
    started: std::time::Instant,
    bar: Option<indicatif::ProgressBar>,
}

impl ProgressBar {
    fn new(total: Option<u64>) -> Self {
        Self {
            total,
            started: std::time::Instant::now(),
            bar: None,
        }
    }

    fn update(&mut self, bytes_done: u64) {
        let Some(total) = self.total else {
            return;
        };
        if self.bar.is_none() && self.started.elapsed().as_secs_f64() > 1.0 {
            self.bar = Some(make_bar(total, bytes_done));
        }
        if let Some(b) = &self.bar {
            // Own rate and time left: the bar appears late, so indicatif's estimate would
            // start from a jump.
            let secs = self.started.elapsed().as_secs_f64().max(1e-3);
            let rate = bytes_done as f64 / secs;
            let left = total.saturating_sub(bytes_done) as f64;
            b.set_message(format!(
                "{:.0} MB/s, about {:.0} s left",
                rate / 1e6,
                left / rate.max(1.0)
            ));
            b.set_position(bytes_done);
        }
    }

    fn finish(&self) {
        if let Some(b) = &self.bar {
            b.finish_and_clear();
        }
    }
}

/// The progress bar, drawn on stderr from the current position on (it appears late).
fn make_bar(len: u64, pos: u64) -> indicatif::ProgressBar {
    let bar = indicatif::ProgressBar::with_draw_target(
        Some(len),
        indicatif::ProgressDrawTarget::hidden(),
    );
    if let Ok(style) = indicatif::ProgressStyle::with_template(
        "{spinner} weld map [{bar:40}] {bytes}/{total_bytes} {msg}",
    ) {
        bar.set_style(style.progress_chars("=> "));
    }
    bar.set_position(pos);
    bar.set_draw_target(indicatif::ProgressDrawTarget::stderr());
    bar
}
