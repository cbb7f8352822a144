//! `oblique map`: classify every point of an interface export (simulation or measurement) against
//! a pair window, streaming: the weld map (one output row per input row), a summary along the
//! interface, and optional plots. Layout and policies: `docs/weld-map.md`.

mod classifier;
mod format;
mod input;
mod pipeline;
mod summary;
mod svg;

use crate::args::ConstantArgs;
use crate::common::load_library;
use crate::fail::{CmdResult, Fail};
use crate::output::CAUTION;
use clap::{Args, ValueEnum};
use classifier::{Classifier, JettingMode, VelocityKind};
use input::{parse_header, split_fields, Fields, Format, Source, Wanted};
use pipeline::{Ctx, Policy, Slot};
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};
use summary::{LimitStat, OutOfOrder, Summary, EXAMPLE_CAP};

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
--all-columns adds Vp, the jetting critical angle and the margin of every decisive limit. The summary goes to standard
error, or to standard output when -o is given; --json prints it as JSON instead (needs -o).

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
    #[arg(long, value_enum, value_name = "FORMAT")]
    pub format: Option<FormatArg>,
    /// Output layout (default: jsonl when -o ends in .jsonl/.ndjson, else csv).
    #[arg(long = "output-format", value_enum, value_name = "FORMAT")]
    pub output_format: Option<FormatArg>,
    /// What the velocity column holds: impact = Vp in the window's convention; collision = Vc.
    #[arg(long = "velocity-kind", value_enum, default_value = "impact")]
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
    pub bad_rows: Policy,
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
    /// Draw the verdict strip along the interface with velocity and angle traces (SVG).
    #[arg(long = "strip-svg", value_name = "FILE")]
    pub strip_svg: Option<PathBuf>,
    /// Draw the points on the window plane, angle against impact velocity (SVG).
    #[arg(long = "window-svg", value_name = "FILE")]
    pub window_svg: Option<PathBuf>,
    /// Worker threads (default: the number of cores).
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u16).range(1..=256))]
    pub threads: Option<u16>,
    /// Solve the jetting test directly for every row instead of using the table (slow).
    #[arg(long = "exact-jetting")]
    pub exact_jetting: bool,
    /// Add Vp, the jetting critical angle and the margin of every limit to the output.
    #[arg(long = "all-columns")]
    pub all_columns: bool,
    /// Never show a progress bar.
    #[arg(long = "no-progress")]
    pub no_progress: bool,
    #[command(flatten)]
    pub constants: ConstantArgs,
}

fn parse_policy(s: &str) -> Result<Policy, String> {
    match s {
        "stop" => Ok(Policy::Stop),
        "skip" => Ok(Policy::Skip),
        _ => match s.strip_prefix("save:") {
            Some(f) if !f.is_empty() => Ok(Policy::Save(PathBuf::from(f))),
            _ => Err(format!(
                "'{s}' is not a bad-row policy: expected stop, skip or save:FILE"
            )),
        },
    }
}

fn policy_text(p: &Policy) -> String {
    match p {
        Policy::Stop => "stop".into(),
        Policy::Skip => "skip".into(),
        Policy::Save(f) => format!("save:{}", f.display()),
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

/// An output file. A regular file (or a new name) is written next to its final name and
/// renamed into place at the end, so that a failed run leaves no half-written map behind;
/// anything else that exists (a device such as /dev/null, a pipe, a symbolic link) is written
/// in place, never replaced.
struct AtomicFile {
    /// The temporary name, when renaming at the end.
    tmp: Option<PathBuf>,
    dest: PathBuf,
    file: Option<std::fs::File>,
}

impl AtomicFile {
    fn create(dest: &Path, flag: &str) -> CmdResult<Self> {
        let cannot = |e: std::io::Error| {
            Fail::input(format!("{flag}: cannot create {}: {e}", dest.display()))
        };
        let in_place = match std::fs::symlink_metadata(dest) {
            Ok(m) => !m.file_type().is_file(),
            Err(_) => false,
        };
        if in_place {
            let file = std::fs::OpenOptions::new()
                .write(true)
                .truncate(true)
                .open(dest)
                .map_err(cannot)?;
            return Ok(Self {
                tmp: None,
                dest: dest.to_path_buf(),
                file: Some(file),
            });
        }
        let name = dest
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .ok_or_else(|| {
                Fail::input(format!("{flag}: '{}' is not a file name", dest.display()))
            })?;
        let tmp = dest.with_file_name(format!(".{name}.partial-{}", std::process::id()));
        let file = std::fs::File::create(&tmp).map_err(cannot)?;
        Ok(Self {
            tmp: Some(tmp),
            dest: dest.to_path_buf(),
            file: Some(file),
        })
    }

    fn write_all(&mut self, b: &[u8]) -> CmdResult {
        if let Some(f) = &mut self.file {
            f.write_all(b)
                .map_err(|e| Fail::other(format!("cannot write {}: {e}", self.dest.display())))?;
        }
        Ok(())
    }

    /// Finish: flush, and rename into place when writing under a temporary name (no fsync: a
    /// map can be made again; the rename only keeps a failed run from leaving half a file).
    fn commit(mut self) -> CmdResult {
        let Some(mut f) = self.file.take() else {
            return Ok(());
        };
        let tmp = self.tmp.take();
        let dest = self.dest.clone();
        let fail =
            move |e: std::io::Error| Fail::other(format!("cannot write {}: {e}", dest.display()));
        let flushed = f.flush();
        drop(f);
        match (flushed, tmp) {
            (Ok(()), Some(t)) => std::fs::rename(&t, &self.dest).map_err(|e| {
                let _ = std::fs::remove_file(&t);
                fail(e)
            }),
            (Ok(()), None) => Ok(()),
            (Err(e), Some(t)) => {
                let _ = std::fs::remove_file(&t);
                Err(fail(e))
            }
            (Err(e), None) => Err(fail(e)),
        }
    }
}

impl Drop for AtomicFile {
    fn drop(&mut self) {
        if self.file.take().is_some() {
            if let Some(tmp) = &self.tmp {
                let _ = std::fs::remove_file(tmp);
            }
        }
    }
}

enum Out {
    Stdout(std::io::Stdout),
    File(AtomicFile),
}

impl Out {
    fn write_all(&mut self, b: &[u8]) -> CmdResult {
        match self {
            Out::File(f) => f.write_all(b),
            Out::Stdout(s) => match s.lock().write_all(b) {
                Ok(()) => Ok(()),
                Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Err(Fail {
                    message: String::new(),
                    code: 0,
                }),
                Err(e) => Err(Fail::other(format!("cannot write to standard output: {e}"))),
            },
        }
    }
}

fn write_file(path: &Path, flag: &str, bytes: &[u8]) -> CmdResult {
    std::fs::write(path, bytes)
        .map_err(|e| Fail::input(format!("{flag}: cannot write {}: {e}", path.display())))
}

fn same_file(a: &Path, b: &Path) -> bool {
    match (a.canonicalize(), b.canonicalize()) {
        (Ok(x), Ok(y)) => x == y,
        _ => false,
    }
}

/// Run `oblique map`.
pub fn run(dirs: &[PathBuf], a: MapArgs) -> CmdResult {
    let mut a = a;
    // `-o -` is standard output, as `-` is standard input.
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
    let stdin = a.input.as_os_str() == "-";
    let file_name = if stdin {
        "<stdin>".to_string()
    } else {
        a.input.display().to_string()
    };
    let in_format = a.format.map(fmt_arg).unwrap_or_else(|| {
        if stdin {
            Format::Csv
        } else {
            format_of(&a.input)
        }
    });
    let out_format = a
        .output_format
        .map(fmt_arg)
        .unwrap_or_else(|| a.output.as_deref().map_or(Format::Csv, format_of));
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
    for (flag, p) in [
        ("-o", a.output.as_ref()),
        ("--summary-json", a.summary_json.as_ref()),
        ("--strip-svg", a.strip_svg.as_ref()),
        ("--window-svg", a.window_svg.as_ref()),
        (
            "--bad-rows save:",
            match &a.bad_rows {
                Policy::Save(f) => Some(f),
                _ => None,
            },
        ),
    ] {
        if let Some(p) = p {
            if !stdin && same_file(p, &a.input) {
                return Err(Fail::input(format!(
                    "{flag}: {} is the input file; choose another name",
                    p.display()
                )));
            }
        }
    }

    // The window and the classifier.
    let lib = load_library(dirs)?;
    let mut window = lib
        .pair(&a.pair)
        .map_err(|m| Fail::input(format!("--pair: {m}")))?
        .clone();
    let window_criteria = window.criteria.clone();
    window.criteria = a.constants.apply(window.criteria.clone());
    let constants = vec![
        (
            "deribas_k",
            "--deribas-k",
            window.criteria.deribas_k,
            window_criteria.deribas_k,
        ),
        (
            "wittman_n",
            "--wittman-n",
            window.criteria.wittman_n,
            window_criteria.wittman_n,
        ),
        (
            "hel_multiple",
            "--hel-multiple",
            window.criteria.hel_multiple,
            window_criteria.hel_multiple,
        ),
    ];
    let threads = a.threads.map(usize::from).unwrap_or_else(|| {
        std::thread::available_parallelism().map_or(1, std::num::NonZeroUsize::get)
    });
    let kind = match a.velocity_kind {
        VelocityKindArg::Impact => VelocityKind::Impact,
        VelocityKindArg::Collision => VelocityKind::Collision,
    };
    let mode = if a.exact_jetting {
        JettingMode::Direct
    } else {
        JettingMode::Table
    };

    // The input and its header.
    let (reader, total_len, is_file): (Box<dyn std::io::Read + Send>, Option<u64>, bool) = if stdin
    {
        (Box::new(std::io::stdin()), None, false)
    } else {
        let f = std::fs::File::open(&a.input)
            .map_err(|e| Fail::input(format!("{file_name}: cannot open: {e}")))?;
        let meta = f.metadata().ok();
        let is_file = meta.as_ref().is_some_and(std::fs::Metadata::is_file);
        (Box::new(f), meta.map(|m| m.len()), is_file)
    };
    let mut source = Source::new(reader);
    let wanted = Wanted {
        names: [
            a.position_column.clone(),
            a.velocity_column.clone(),
            a.angle_column.clone(),
            a.time_column.clone(),
        ],
        flags: [
            "--position-column",
            "--velocity-column",
            "--angle-column",
            "--time-column",
        ],
    };
    let io = |e: std::io::Error| Fail::input(format!("{file_name}: cannot read: {e}"));
    let mut comment_lines = 0u64;
    let (cells, first_line) = match in_format {
        Format::Csv => {
            // Lines starting with '#' before the header are a preamble (an export's notes,
            // provenance, an "invented data" label): skipped, counted and reported.
            let mut head;
            loop {
                let Some(line) = source
                    .first_line(true, true, pipeline::MAX_RECORD)
                    .map_err(io)?
                else {
                    return Err(Fail::input(if comment_lines > 0 {
                        format!(
                            "{file_name}: no header row after {comment_lines} comment line(s): expected a header such as position[mm],velocity[m/s],angle[deg]"
                        )
                    } else {
                        format!(
                            "{file_name}: empty input: expected a header row such as position[mm],velocity[m/s],angle[deg]"
                        )
                    }));
                };
                head = line;
                if !head.trim_ascii_start().starts_with(b"#") {
                    break;
                }
                comment_lines += 1 + head.iter().filter(|&&b| b == b'\n').count() as u64;
            }
            let mut f = Fields::default();
            let quoted = head.contains(&b'"');
            split_fields(&head, quoted, &mut f);
            let cells: Vec<String> = (0..f.ranges.len())
                .map(|i| {
                    String::from_utf8_lossy(f.get(&head, i).unwrap_or(b""))
                        .trim()
                        .to_string()
                })
                .collect();
            let inside = head.iter().filter(|&&b| b == b'\n').count() as u64;
            (cells, 2 + inside + comment_lines)
        }
        Format::Jsonl => {
            // '#' lines before the first object are a preamble, as for CSV.
            let first = loop {
                let Some(line) = source
                    .first_line(false, false, pipeline::MAX_RECORD)
                    .map_err(io)?
                else {
                    return Err(Fail::input(format!(
                        "{file_name}: empty input: expected JSON lines such as {{\"position[mm]\": 0.5, \"velocity[m/s]\": 420, \"angle[deg]\": 8}}"
                    )));
                };
                if !line.trim_ascii_start().starts_with(b"#") {
                    break line;
                }
                source
                    .first_line(true, false, pipeline::MAX_RECORD)
                    .map_err(io)?;
                comment_lines += 1;
            };
            let obj: serde_json::Map<String, serde_json::Value> =
                input::json_object(&first).map_err(|e| {
                    Fail::input(format!(
                        "{file_name}: row {}: not a JSON object: {} (the first object sets the columns)",
                        1 + comment_lines,
                        input::json_reason(&e)
                    ))
                })?;
            (obj.keys().cloned().collect(), 1 + comment_lines)
        }
    };
    let header = parse_header(&file_name, 1 + comment_lines, cells, &wanted).map_err(|m| {
        // A JSON object read as a CSV header: say which flag reads it.
        if in_format == Format::Csv && m.contains("no column named") && m.contains('{') {
            Fail::input(format!(
                "{m}\n  hint: the first line looks like a JSON object: read the file as JSON lines with --format jsonl"
            ))
        } else {
            Fail::input(m)
        }
    })?;

    let classifier = Classifier::new(&window, kind, mode)?;
    let ctx = Ctx::new(
        &file_name,
        in_format,
        out_format,
        &header,
        &classifier,
        &a.bad_rows,
        a.all_columns,
    );

    // Outputs.
    let mut out = match &a.output {
        Some(p) => Out::File(AtomicFile::create(p, "-o")?),
        None => Out::Stdout(std::io::stdout()),
    };
    if out_format == Format::Csv {
        out.write_all(&ctx.csv_header())?;
    }
    let mut side = match &a.bad_rows {
        Policy::Save(p) => {
            let mut f = AtomicFile::create(p, "--bad-rows save:")?;
            if in_format == Format::Csv {
                f.write_all(&ctx.bad_header())?;
            }
            Some(f)
        }
        _ => None,
    };

    let limits: Vec<LimitStat> = classifier
        .limits
        .iter()
        .map(|l| LimitStat {
            label: l.label.clone(),
            id: l.id.clone(),
            column: l.map_column(),
            unit: l.unit,
            kind: match l.limit {
                oblique_window::LimitRef::Criterion(_) => "criterion",
                oblique_window::LimitRef::Boundary(_) => "boundary",
            },
            ceiling: match l.limit {
                oblique_window::LimitRef::Criterion(id) => {
                    id == oblique_core::CriterionId::MeltingUpper
                }
                oblique_window::LimitRef::Boundary(i) => window
                    .boundaries
                    .get(i)
                    .is_some_and(|b| b.weld_side.is_velocity_ceiling()),
            },
            welded_min: None,
            unwelded_binding: [0; 2],
        })
        .collect();
    let mut summary = Summary::new(
        limits,
        a.unsorted,
        (a.strip_svg.is_some(), a.window_svg.is_some()),
    );
    summary.comment_lines = comment_lines;
    summary.min_segment = a.min_segment.unwrap_or(0.0);
    summary.constants = constants;

    // Progress: only for a regular file, on a terminal, after about a second.
    let progress_allowed = is_file
        && !a.json
        && !a.no_progress
        && std::io::stderr().is_terminal()
        && total_len.is_some();
    let started = std::time::Instant::now();
    let mut bar: Option<indicatif::ProgressBar> = None;
    let mut bytes_done: u64 = 0;

    let result = pipeline::run(
        &ctx,
        source,
        first_line,
        threads,
        |slot: &mut Slot| -> CmdResult {
            fold_chunk(&ctx, slot, &mut summary, &mut out, side.as_mut())?;
            bytes_done += slot.data.len() as u64;
            if progress_allowed {
                if bar.is_none() && started.elapsed().as_secs_f64() > 1.0 {
                    bar = Some(make_bar(total_len.unwrap_or(0), bytes_done));
                }
                if let Some(b) = &bar {
                    // Own rate and time left: the bar appears late, so indicatif's estimate
                    // would start from a jump.
                    let secs = started.elapsed().as_secs_f64().max(1e-3);
                    let rate = bytes_done as f64 / secs;
                    let left = total_len.unwrap_or(0).saturating_sub(bytes_done) as f64;
                    b.set_message(format!(
                        "{:.0} MB/s, about {:.0} s left",
                        rate / 1e6,
                        left / rate.max(1.0)
                    ));
                    b.set_position(bytes_done);
                }
            }
            Ok(())
        },
        |e| Fail::input(format!("{file_name}: cannot read: {e}")),
    );
    if let Some(b) = &bar {
        b.finish_and_clear();
    }
    result?;
    summary.finish();

    if summary.rows_read == 0 {
        return Err(Fail::input(format!(
            "{file_name}: no data rows after the header: nothing to map"
        )));
    }
    if summary.rows_classified == 0 {
        // Keep the side file with every rejected row and its reason; no map is written.
        if let Some(f) = side {
            f.commit()?;
        }
        let mut msg = format!(
            "{file_name}: no row could be classified: all {} row(s) were rejected",
            summary.rows_rejected
        );
        for r in summary.examples.iter().take(3) {
            msg.push_str(&format!(
                "\n  row {}, field '{}': {}",
                r.row, r.field, r.reason
            ));
        }
        msg.push_str(&format!(
            "\n  hint: check the units in the header ('{}', '{}'); --bad-rows save:FILE lists every rejected row with its reason",
            header.velocity.cell, header.angle.cell
        ));
        return Err(Fail::input(msg));
    }
    summary.check_plausibility(&header.velocity.cell, &header.angle.cell);
    if let Out::File(f) = out {
        f.commit()?;
    }
    if let Some(f) = side {
        f.commit()?;
    }

    let info = summary::RunInfo {
        pair: &window.name,
        convention: window.convention.as_str(),
        velocity_kind: match kind {
            VelocityKind::Impact => "impact",
            VelocityKind::Collision => "collision",
        },
        input: &file_name,
        bad_rows: &policy_text(&a.bad_rows),
        jetting: if !classifier.jetting_enabled() {
            "disabled"
        } else if classifier.uses_table() {
            "table"
        } else {
            "direct"
        },
        table: classifier.table().map(|t| (t.nodes(), t.max_inflow().si())),
        pair_line: format!(
            "{} flyer {:.2} mm on {} parent",
            window.flyer.material.id,
            window.flyer_thickness.mm(),
            window.parent.material.id
        ),
    };
    let json = summary.to_json(&info);
    if let Some(p) = &a.summary_json {
        let text = serde_json::to_string_pretty(&json).map_err(|e| Fail::other(e.to_string()))?;
        write_file(p, "--summary-json", (text + "\n").as_bytes())?;
    }
    if let Some(p) = &a.strip_svg {
        let svg = svg::strip(&window, &classifier, &summary, &info)?;
        write_file(p, "--strip-svg", svg.as_bytes())?;
    }
    if let Some(p) = &a.window_svg {
        let svg = svg::window_plane(&window, &classifier, &summary, &info)?;
        write_file(p, "--window-svg", svg.as_bytes())?;
    }
    if a.json {
        crate::output::emit_json(&json)?;
    } else {
        let text = summary.to_text(&info);
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

/// Take one chunk in file order: summary, sortedness, output, bad rows.
fn fold_chunk(
    ctx: &Ctx<'_>,
    slot: &mut Slot,
    summary: &mut Summary,
    out: &mut Out,
    side: Option<&mut AtomicFile>,
) -> CmdResult {
    let st = &slot.stats;
    // Rows of this chunk in order: classified points are in `lites`, rejected in `bad`; the
    // out-of-order check runs over the classified ones.
    let mut cut: Option<(usize, OutOfOrder)> = None;
    let mut bad_rows = slot.bad.iter().peekable();
    for l in &slot.lites {
        // A rejected row since the previous classified one leaves a stretch without a verdict.
        while let Some(b) = bad_rows.next_if(|b| b.row < l.row) {
            summary.reject(b.pos);
        }
        if let Err(e) = summary.push(l) {
            cut = Some((l.out_start as usize, e));
            break;
        }
    }
    if cut.is_none() {
        for b in bad_rows {
            summary.reject(b.pos);
        }
    }
    let written = cut.as_ref().map_or(slot.out.len(), |c| c.0);
    if !slot.out.is_empty() {
        out.write_all(&slot.out.as_bytes()[..written])?;
    }
    if let Some((_, e)) = cut {
        // A stop-mode bad row earlier than the out-of-order row wins.
        if let Some(b) = slot.bad.first().filter(|b| slot.stopped && b.row < e.row) {
            return Err(bad_row_fail(ctx, b));
        }
        return Err(Fail::input(format!(
            "{}: row {}, field '{}': position {} mm comes after {} mm at row {}: positions must run {} along the interface\n  hint: sort the file by position, or pass --unsorted (then no lengths or segments are computed)",
            ctx.file,
            e.row,
            ctx.header.position.cell,
            pipeline::fmt_short(e.pos * 1e3),
            pipeline::fmt_short(e.prev_pos * 1e3),
            e.prev_row,
            if e.increasing { "upwards" } else { "downwards" }
        )));
    }
    summary.rows_read += st.rows_read;
    summary.rows_rejected += st.rejected;
    summary.blank_lines += st.blank;
    summary.outside_trial_data += st.outside;
    summary.welded_outside_trial_data += st.welded_outside;
    summary.jetting_direct += st.jetting_direct;
    for (l, (m, b)) in summary
        .limits
        .iter_mut()
        .zip(st.welded_min.iter().zip(&st.unwelded_binding))
    {
        l.unwelded_binding[0] += b[0];
        l.unwelded_binding[1] += b[1];
        if let Some((m, row)) = m {
            let better = match l.welded_min {
                Some((old, _)) => *m < old,
                None => true,
            };
            if better {
                l.welded_min = Some((*m, *row));
            }
        }
    }
    for b in &slot.bad {
        if summary.examples.len() < EXAMPLE_CAP {
            summary.examples.push(b.clone());
        }
    }
    if let Some(f) = side {
        f.write_all(&slot.bad_out)?;
    }
    if slot.stopped {
        if let Some(b) = slot.bad.last() {
            return Err(bad_row_fail(ctx, b));
        }
    }
    Ok(())
}

fn bad_row_fail(ctx: &Ctx<'_>, b: &summary::Rejected) -> Fail {
    Fail::input(format!(
        "{}: row {}, field '{}': {}\n  hint: --bad-rows skip skips and counts such rows; --bad-rows save:FILE sets them aside with the reason",
        ctx.file, b.row, b.field, b.reason
    ))
}
