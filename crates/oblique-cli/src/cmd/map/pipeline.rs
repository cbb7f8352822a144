//! The streaming pipeline: one reader thread cuts the input into chunks of whole records, a pool
//! of workers parses and classifies each chunk into output text and compact per-point records,
//! and the calling thread takes the chunks back in file order (summary, writing). A fixed set of
//! slots circulates between the three, so memory stays bounded whatever the input size.

use super::classifier::{Classifier, LimitInfo, MarginUnit, Point};
use super::format::{
    is_json_number, push_csv_field, push_json_string, push_u64, Counter, RowWriter, TextBuf, Word,
    NUMBER_MAX, WORD,
};
use super::input::{
    next_record, parse_number, scan_plain, split_fields, split_plain_line, trim_spaces, Fields,
    Format, Header, Source,
};
use super::summary::{Lite, Rejected};
use oblique_window::classify::Prediction;
use serde_json::{Map, Value};
use std::collections::BTreeMap;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc::{sync_channel, Receiver};
use std::sync::{Arc, Mutex};

/// Input bytes per chunk.
pub const CHUNK: usize = 256 * 1024;
/// Line breaks per chunk at most (bounds the output of a chunk of very short rows).
pub const CHUNK_LINES: usize = 8192;
/// A single record longer than this is refused.
pub const MAX_RECORD: usize = 16 * 1024 * 1024;

/// What to do with a bad row.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Policy {
    /// Stop at the first (exit 2).
    Stop,
    /// Skip and count.
    Skip,
    /// Write to a side file with the reason.
    Save(std::path::PathBuf),
}

/// Per-chunk counts, merged in order by the caller.
#[derive(Debug, Default, Clone)]
pub struct ChunkStats {
    /// Rows with data.
    pub rows_read: u64,
    /// Blank lines.
    pub blank: u64,
    /// Rejected rows.
    pub rejected: u64,
    /// Rows outside the span of a boundary.
    pub outside: u64,
    /// Welded rows outside the span of some boundary (welded by the model limits and the
    /// boundaries that do span them).
    pub welded_outside: u64,
    /// Rows solved directly for jetting.
    pub jetting_direct: u64,
    /// Smallest margin per limit among welded rows, with its row.
    pub welded_min: Vec<Option<(f64, u64)>>,
    /// Binding-limit counts of unwelded rows.
    pub unwelded_binding: Vec<[u64; 2]>,
}

/// A unit of work and its results; slots are recycled.
#[derive(Default)]
pub struct Slot {
    /// Chunk number.
    pub seq: u64,
    /// Line number of the first record.
    pub first_line: u64,
    /// Input bytes.
    pub data: Vec<u8>,
    /// Whether `data` holds a double quote (else every record is one plain line).
    pub has_quote: bool,
    /// Output text.
    pub out: TextBuf,
    /// Side-file text (save mode).
    pub bad_out: Vec<u8>,
    /// Classified points.
    pub lites: Vec<Lite>,
    /// Rejected rows.
    pub bad: Vec<Rejected>,
    /// Counts.
    pub stats: ChunkStats,
    /// Stop mode: a bad row ended this chunk (it is the last of `bad`).
    pub stopped: bool,
    /// The worker hit an internal problem (message).
    pub failure: Option<String>,
}

impl Slot {
    fn reset(&mut self) {
        self.data.clear();
        self.out.clear();
        self.bad_out.clear();
        self.lites.clear();
        self.bad.clear();
        self.stats = ChunkStats::default();
        self.stopped = false;
        self.failure = None;
    }
}

/// Everything the workers share.
pub struct Ctx<'a> {
    /// Input as shown in messages.
    pub file: &'a str,
    /// Input layout.
    pub in_format: Format,
    /// Output layout.
    pub out_format: Format,
    /// The header.
    pub header: &'a Header,
    /// The classifier.
    pub classifier: &'a Classifier,
    /// Bad-row policy.
    pub policy: &'a Policy,
    /// Output names of the input cells (renamed when they clash with computed columns).
    pub out_cells: Vec<String>,
    /// JSON keys of the input cells, `"name":` ready to copy.
    pub json_cell_keys: Vec<Vec<u8>>,
    /// Role (0 position, 1 velocity, 2 angle, 3 time) of each input cell.
    pub cell_role: Vec<Option<usize>>,
    /// Binding limit ids (criterion id or `boundary-N`), CSV-escaped and as JSON strings.
    pub binding_csv: Vec<Vec<u8>>,
    /// See `binding_csv`.
    pub binding_json: Vec<Vec<u8>>,
    /// Computed column names (with units), in order.
    pub computed: Vec<String>,
    /// Computed column kinds, in order.
    pub cols: Vec<Col>,
    /// JSON keys of the computed columns.
    pub computed_keys: Vec<Vec<u8>>,
    /// Most bytes of a CSV row besides the input line: row number, separators, every
    /// computed column at its widest, line break.
    pub row_bound: usize,
    /// The computed CSV columns as straight-line writes.
    pub csv_plan: CsvPlan,
    /// The output unit of each limit's margin (for the binding margin).
    pub margin_units: Vec<MarginUnit>,
    /// `,m/s`, `,deg`, `,GPa` (in `MarginUnit` order), padded.
    pub unit_words: Vec<Word>,
    /// For a window of at most eight limits, the `failing_limits` text of every failing set,
    /// indexed by its bit mask (`Point::failing`); empty otherwise.
    pub failing_texts: Vec<Vec<u8>>,
    /// `,verdict,` for each verdict (welded, not-welded, melted), padded.
    pub verdict_words: Vec<Word>,
    /// Binding limit ids as CSV fields, padded (`None` if one is too long to pad).
    pub binding_words: Option<Vec<Word>>,
    /// `,true` and `,false`, padded.
    pub outside_words: Vec<Word>,
}

/// One computed output column.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Col {
    /// welded / not-welded / melted.
    Verdict,
    /// Label of the binding limit.
    Binding,
    /// Impact velocity Vp, m/s.
    ImpactVelocity,
    /// Collision-point velocity Vc, m/s.
    CollisionVelocity,
    /// Flow velocity Vf, m/s.
    FlowVelocity,
    /// Impact pressure, GPa.
    Pressure,
    /// Jetting critical angle, deg.
    JettingAngle,
    /// Margin of the binding limit, in that limit's output unit (see `MarginUnit`).
    BindingMargin,
    /// The unit of `BindingMargin`.
    BindingUnit,
    /// Relative margin of the binding limit.
    BindingRelative,
    /// Every failing limit.
    Failing,
    /// Margin of limit k, in its output unit.
    Margin(usize, MarginUnit),
    /// Outside the span of a user boundary.
    Outside,
}

/// The computed columns every row starts with, in order: the verdict and the binding limit's
/// group (the CSV writer's straight line writes them first).
const LEADING: [(&str, Col); 6] = [
    ("verdict", Col::Verdict),
    ("binding", Col::Binding),
    ("binding_margin", Col::BindingMargin),
    ("binding_margin_unit", Col::BindingUnit),
    ("binding_relative_margin", Col::BindingRelative),
    ("failing_limits", Col::Failing),
];

/// The output unit of each limit's margin.
pub fn margin_units(c: &Classifier) -> Vec<MarginUnit> {
    c.limits.iter().map(LimitInfo::margin_unit).collect()
}

/// The computed columns for a classifier: names (with units) and kinds. Every row has the
/// verdict, the binding limit with its margin (in that limit's unit) and relative margin, Vc,
/// Vf and the impact pressure; `all` adds Vp (always there for collision-velocity input), the
/// jetting critical angle and the margin of every limit.
pub fn computed_columns(c: &Classifier, all: bool) -> (Vec<String>, Vec<Col>) {
    let mut names: Vec<String> = LEADING.iter().map(|(n, _)| n.to_string()).collect();
    let mut cols: Vec<Col> = LEADING.iter().map(|(_, c)| *c).collect();
    if all || c.kind() == super::classifier::VelocityKind::Collision {
        names.push("impact_velocity[m/s]".into());
        cols.push(Col::ImpactVelocity);
    }
    for (n, k) in [
        ("collision_velocity[m/s]", Col::CollisionVelocity),
        ("flow_velocity[m/s]", Col::FlowVelocity),
        ("impact_pressure[GPa]", Col::Pressure),
    ] {
        names.push(n.into());
        cols.push(k);
    }
    if all && c.jetting_enabled() {
        names.push("jetting_critical_angle[deg]".into());
        cols.push(Col::JettingAngle);
    }
    if all {
        for (k, (l, mu)) in c.limits.iter().zip(margin_units(c)).enumerate() {
            names.push(l.map_column());
            cols.push(Col::Margin(k, mu));
        }
    }
    if c.has_boundaries() {
        names.push("outside_trial_data".into());
        cols.push(Col::Outside);
    }
    (names, cols)
}

/// The computed CSV columns as a straight line of writes, in the order [`computed_columns`]
/// lays them out. (A loop over the columns with a match lets the compiler hoist and run every
/// number conversion any column might need, on every row, needed or not.)
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CsvPlan {
    vp: bool,
    jetting: bool,
    margins: Vec<(usize, MarginUnit)>,
    outside: bool,
}

impl CsvPlan {
    fn new(cols: &[Col]) -> Self {
        let mut plan = Self::default();
        for c in cols {
            match *c {
                Col::ImpactVelocity => plan.vp = true,
                Col::JettingAngle => plan.jetting = true,
                Col::Margin(k, u) => plan.margins.push((k, u)),
                Col::Outside => plan.outside = true,
                Col::Verdict | Col::Binding | Col::BindingMargin | Col::BindingUnit => {}
                Col::BindingRelative | Col::Failing => {}
                Col::CollisionVelocity | Col::FlowVelocity | Col::Pressure => {}
            }
        }
        plan
    }

    /// The columns this plan writes, in its order (checked against `computed_columns`).
    fn columns(&self) -> Vec<Col> {
        let mut v: Vec<Col> = LEADING.iter().map(|(_, c)| *c).collect();
        if self.vp {
            v.push(Col::ImpactVelocity);
        }
        v.extend([Col::CollisionVelocity, Col::FlowVelocity, Col::Pressure]);
        if self.jetting {
            v.push(Col::JettingAngle);
        }
        v.extend(self.margins.iter().map(|&(k, u)| Col::Margin(k, u)));
        if self.outside {
            v.push(Col::Outside);
        }
        v
    }
}

impl<'a> Ctx<'a> {
    /// Precompute the output pieces.
    pub fn new(
        file: &'a str,
        in_format: Format,
        out_format: Format,
        header: &'a Header,
        classifier: &'a Classifier,
        policy: &'a Policy,
        all_columns: bool,
    ) -> Self {
        let (computed, cols) = computed_columns(classifier, all_columns);
        let taken: Vec<&str> = std::iter::once("row")
            .chain(computed.iter().map(String::as_str))
            .collect();
        let out_cells: Vec<String> = header
            .cells
            .iter()
            .map(|c| {
                if taken.contains(&c.trim()) {
                    format!("input_{}", c.trim())
                } else {
                    c.clone()
                }
            })
            .collect();
        let key = |s: &str| {
            let mut v = Vec::new();
            push_json_string(&mut v, s.as_bytes());
            v.push(b':');
            v
        };
        let mut cell_role = vec![None; header.cells.len()];
        for (r, col) in [
            Some(&header.position),
            Some(&header.velocity),
            Some(&header.angle),
            header.time.as_ref(),
        ]
        .into_iter()
        .enumerate()
        {
            if let Some(col) = col {
                cell_role[col.index] = Some(r);
            }
        }
        // The binding limit ids, escaped once for each output layout.
        let ids = |escape: fn(&mut Vec<u8>, &[u8])| -> Vec<Vec<u8>> {
            classifier
                .limits
                .iter()
                .map(|l| {
                    let mut v = Vec::new();
                    escape(&mut v, l.id.as_bytes());
                    v
                })
                .collect()
        };
        let binding_csv = ids(push_csv_field);
        let binding_json = ids(push_json_string);
        let binding_max = binding_csv.iter().map(Vec::len).max().unwrap_or(0);
        // Short constants: they always fit a word.
        let verdict_words: Vec<Word> = [
            Prediction::Welded,
            Prediction::NotWelded,
            Prediction::Melted,
        ]
        .iter()
        .filter_map(|v| Word::new(format!(",{},", v.as_str()).as_bytes()))
        .collect();
        let outside_words: Vec<Word> = [b",true".as_slice(), b",false"]
            .iter()
            .filter_map(|t| Word::new(t))
            .collect();
        let binding_words: Option<Vec<Word>> = binding_csv.iter().map(|b| Word::new(b)).collect();
        let row_bound = WORD * 4
            + NUMBER_MAX
            + 2
            + cols
                .iter()
                .map(|c| {
                    1 + match c {
                        Col::Verdict => 16,
                        Col::Binding => binding_max,
                        // Every limit's id and a separator (the word stores' overrun is in
                        // the `WORD * 4` above).
                        Col::Failing => binding_csv.iter().map(|b| b.len() + 1).sum::<usize>(),
                        Col::Outside => 5,
                        _ => NUMBER_MAX,
                    }
                })
                .sum::<usize>();
        let csv_plan = CsvPlan::new(&cols);
        assert_eq!(
            csv_plan.columns(),
            cols,
            "the CSV plan must write the columns in header order"
        );
        let failing_texts = if binding_csv.len() <= 8 {
            (0..1usize << binding_csv.len())
                .map(|mask| {
                    let ids: Vec<&[u8]> = (0..binding_csv.len())
                        .filter(|k| mask & (1 << k) != 0)
                        .map(|k| binding_csv[k].as_slice())
                        .collect();
                    ids.join(&b';')
                })
                .collect()
        } else {
            Vec::new()
        };
        Self {
            failing_texts,
            margin_units: margin_units(classifier),
            unit_words: [
                MarginUnit::MetresPerSecond,
                MarginUnit::Degrees,
                MarginUnit::Gigapascals,
            ]
            .iter()
            .filter_map(|u| Word::new(format!(",{}", u.as_str()).as_bytes()))
            .collect(),
            verdict_words,
            binding_words,
            outside_words,
            csv_plan,
            row_bound,
            file,
            in_format,
            out_format,
            header,
            classifier,
            policy,
            json_cell_keys: out_cells.iter().map(|c| key(c)).collect(),
            out_cells,
            cell_role,
            binding_csv,
            binding_json,
            computed_keys: computed.iter().map(|c| key(c)).collect(),
            computed,
            cols,
        }
    }

    /// The output header line (CSV only; JSON lines have none).
    pub fn csv_header(&self) -> Vec<u8> {
        let mut v = Vec::new();
        v.extend_from_slice(b"row");
        for c in self.out_cells.iter().chain(&self.computed) {
            v.push(b',');
            push_csv_field(&mut v, c.as_bytes());
        }
        v.push(b'\n');
        v
    }

    /// The side-file header for bad rows (CSV input only).
    pub fn bad_header(&self) -> Vec<u8> {
        let mut v = b"row,field,reason".to_vec();
        for c in &self.header.cells {
            v.push(b',');
            push_csv_field(&mut v, c.as_bytes());
        }
        v.push(b'\n');
        v
    }
}

/// The values read from one row.
struct RowValues {
    position: f64,
    velocity: f64,
    angle: f64,
}

enum Cells<'r> {
    Csv { line: &'r [u8], fields: &'r Fields },
    Json { obj: &'r Map<String, Value> },
}

struct Worker {
    /// The current row number as text.
    row_text: Counter,
    fields: Fields,
    margins: Vec<f64>,
}

type Bad = (String, String);

fn cell_name(ctx: &Ctx<'_>, i: usize) -> String {
    ctx.header
        .cells
        .get(i)
        .cloned()
        .unwrap_or_else(|| format!("field {}", i + 1))
}

fn number_reason(text: &[u8], cell: &str) -> String {
    let t = String::from_utf8_lossy(trim_spaces(text)).into_owned();
    if t.is_empty() {
        "empty: every row needs a value here (fill it in, or take the row out)".into()
    } else if t.starts_with(|c: char| c.is_ascii_digit() || c == '-' || c == '+' || c == '.')
        && t.chars().any(|c| c.is_alphabetic())
        && !t.to_ascii_lowercase().starts_with("inf")
        && !t.to_ascii_lowercase().starts_with("nan")
    {
        format!("'{t}' is not a plain number (the unit belongs in the header, as in {cell})")
    } else {
        format!("'{t}' is not a finite number (write a plain decimal such as 12.5 or 1.25e1)")
    }
}

impl Worker {
    /// The common case of [`Worker::values`] without building any message: an unquoted CSV
    /// record whose fields all parse and pass the checks. `None` sends the row to `values`,
    /// which finds the same fault and words it.
    #[inline]
    fn plain_values(&self, ctx: &Ctx<'_>, line: &[u8]) -> Option<RowValues> {
        if self.fields.quoted {
            return None;
        }
        let h = ctx.header;
        let ranges = &self.fields.ranges;
        let num = |col: &super::input::Column| -> Option<f64> {
            let &(s, e) = ranges.get(col.index)?;
            parse_number(line.get(s..e)?).map(|v| v * col.factor)
        };
        let position = num(&h.position)?;
        let velocity = num(&h.velocity)?;
        let angle = num(&h.angle)?;
        if let Some(t) = &h.time {
            num(t)?;
        }
        let deg = angle.to_degrees();
        (position.is_finite() && velocity > 0.0 && velocity.is_finite() && deg > 0.0 && deg < 90.0)
            .then_some(RowValues {
                position,
                velocity,
                angle,
            })
    }

    fn values(&self, ctx: &Ctx<'_>, cells: &Cells<'_>) -> Result<RowValues, Bad> {
        let h = ctx.header;
        let get = |col: &super::input::Column| -> Result<f64, Bad> {
            match cells {
                Cells::Csv { line, fields } => {
                    let text = fields.get(line, col.index).unwrap_or(b"");
                    parse_number(text)
                        .map(|v| v * col.factor)
                        .ok_or_else(|| (col.cell.clone(), number_reason(text, &col.cell)))
                }
                Cells::Json { obj } => match obj.get(&col.cell) {
                    None | Some(Value::Null) => Err((col.cell.clone(), "missing".into())),
                    Some(Value::Number(n)) => n
                        .as_f64()
                        .filter(|v| v.is_finite())
                        .map(|v| v * col.factor)
                        .ok_or_else(|| (col.cell.clone(), format!("{n} is not a finite number"))),
                    Some(Value::String(s)) => parse_number(s.as_bytes())
                        .map(|v| v * col.factor)
                        .ok_or_else(|| (col.cell.clone(), number_reason(s.as_bytes(), &col.cell))),
                    Some(other) => Err((col.cell.clone(), format!("{other} is not a number"))),
                },
            }
        };
        let position = get(&h.position)?;
        let velocity = get(&h.velocity)?;
        let angle = get(&h.angle)?;
        if let Some(t) = &h.time {
            get(t)?;
        }
        if !position.is_finite() {
            return Err((h.position.cell.clone(), "not a finite length".into()));
        }
        // The value as written, with its conversion when the header's unit is not the one the
        // message speaks in.
        let as_written = |col: &super::input::Column, si_unit: &str, shown: f64| -> String {
            let unit = super::input::split_cell(&col.cell).1.unwrap_or("");
            if unit == si_unit {
                format!("{} {si_unit}", fmt_short(shown))
            } else {
                let raw = match cells {
                    Cells::Csv { line, fields } => String::from_utf8_lossy(trim_spaces(
                        fields.get(line, col.index).unwrap_or(b""),
                    ))
                    .into_owned(),
                    Cells::Json { obj } => obj.get(&col.cell).map_or(String::new(), |v| {
                        v.as_str().map_or_else(|| v.to_string(), str::to_string)
                    }),
                };
                format!("'{raw}' ({}) = {} {si_unit}", col.cell, fmt_short(shown))
            }
        };
        if !(velocity > 0.0 && velocity.is_finite()) {
            return Err((
                h.velocity.cell.clone(),
                format!(
                    "{} is not above zero (velocities must be positive)",
                    as_written(&h.velocity, "m/s", velocity)
                ),
            ));
        }
        let deg = angle.to_degrees();
        if !(deg > 0.0 && deg < 90.0) {
            let unit = super::input::split_cell(&h.angle.cell).1.unwrap_or("");
            let hint = if unit != "deg" && deg >= 90.0 {
                format!(
                    "; if this column holds degrees, write {}[deg] in the header",
                    super::input::split_cell(&h.angle.cell).0
                )
            } else {
                String::new()
            };
            return Err((
                h.angle.cell.clone(),
                format!(
                    "{} is outside (0, 90) deg{hint}",
                    as_written(&h.angle, "deg", deg)
                ),
            ));
        }
        Ok(RowValues {
            position,
            velocity,
            angle,
        })
    }

    fn process(&mut self, ctx: &Ctx<'_>, slot: &mut Slot) {
        let n_limits = ctx.classifier.limits.len();
        slot.stats.welded_min = vec![None; n_limits];
        slot.stats.unwelded_binding = vec![[0; 2]; n_limits];
        let data = std::mem::take(&mut slot.data);
        let mut pos = 0;
        let mut line_no = slot.first_line;
        while pos < data.len() {
            let mut plain = false;
            let (end, next, inside_nl, quoted) = match ctx.in_format {
                Format::Csv if !slot.has_quote => {
                    // No quote in the whole chunk: every record is one line.
                    plain = true;
                    let end = memchr::memchr(b'\n', &data[pos..]).map_or(data.len(), |p| pos + p);
                    let content = if end > pos && data[end - 1] == b'\r' {
                        end - 1
                    } else {
                        end
                    };
                    split_plain_line(&data[pos..content], &mut self.fields);
                    (end, (end + 1).min(data.len()), 0, false)
                }
                Format::Csv => match scan_plain(&data, pos, &mut self.fields) {
                    Some((end, next)) => {
                        plain = true;
                        (end, next, 0, false)
                    }
                    None => next_record(&data, pos),
                },
                Format::Jsonl => {
                    let nl = memchr::memchr(b'\n', &data[pos..]);
                    let end = nl.map_or(data.len(), |p| pos + p);
                    (end, nl.map_or(data.len(), |p| pos + p + 1), 0, false)
                }
            };
            let mut rec = &data[pos..end];
            if rec.last() == Some(&b'\r') {
                rec = &rec[..rec.len() - 1];
                if plain {
                    if let Some(last) = self.fields.ranges.last_mut() {
                        last.1 = last.1.min(rec.len());
                    }
                }
            }
            let row = line_no;
            line_no += 1 + inside_nl as u64;
            pos = next;
            if trim_spaces(rec).is_empty() {
                slot.stats.blank += 1;
                continue;
            }
            slot.stats.rows_read += 1;
            if let Err((field, reason)) = self.row(ctx, slot, row, rec, quoted, plain) {
                slot.stats.rejected += 1;
                if let Policy::Save(_) = ctx.policy {
                    write_bad(ctx, &mut slot.bad_out, row, &field, &reason, rec);
                }
                let pos = rejected_position(ctx, rec, quoted);
                slot.bad.push(Rejected {
                    row,
                    field,
                    reason,
                    pos,
                });
                if *ctx.policy == Policy::Stop {
                    slot.stopped = true;
                    break;
                }
            }
        }
        slot.data = data;
    }

    fn row(
        &mut self,
        ctx: &Ctx<'_>,
        slot: &mut Slot,
        row: u64,
        rec: &[u8],
        quoted: bool,
        already_split: bool,
    ) -> Result<(), Bad> {
        let n = ctx.header.cells.len();
        let obj;
        let cells = match ctx.in_format {
            Format::Csv => {
                if !already_split {
                    split_fields(rec, quoted, &mut self.fields);
                }
                let got = self.fields.ranges.len();
                if trim_spaces(rec).starts_with(b"#") {
                    return Err((
                        "(row)".into(),
                        "a comment line after the header: '#' lines are skipped only before the header".into(),
                    ));
                }
                if got < n {
                    return Err((
                        cell_name(ctx, got),
                        format!("missing: the row has {got} field(s), the header {n}"),
                    ));
                }
                if got > n {
                    return Err((
                        "(row)".into(),
                        format!(
                            "the row has {got} fields, the header {n} (a text field that holds a comma must be in double quotes)"
                        ),
                    ));
                }
                Cells::Csv {
                    line: rec,
                    fields: &self.fields,
                }
            }
            Format::Jsonl => {
                obj = match super::input::json_object(rec) {
                    Ok(o) => o,
                    Err(e) => {
                        return Err((
                            "(line)".into(),
                            format!("not a JSON object: {}", super::input::json_reason(&e)),
                        ))
                    }
                };
                if let Some(k) = obj.keys().find(|k| !ctx.header.cells.contains(k)) {
                    return Err((
                        k.clone(),
                        "not among the fields of the first line (the first object sets the columns)"
                            .into(),
                    ));
                }
                Cells::Json { obj: &obj }
            }
        };
        let fast = match &cells {
            Cells::Csv { line, .. } => self.plain_values(ctx, line),
            Cells::Json { .. } => None,
        };
        let v = match fast {
            Some(v) => v,
            None => self.values(ctx, &cells)?,
        };
        let p = ctx
            .classifier
            .classify(v.velocity, v.angle, &mut self.margins)
            .map_err(|e| ("(classification)".to_string(), e.to_string()))?;
        // Output.
        let out = &mut slot.out;
        let out_start = out.len();
        match ctx.out_format {
            Format::Csv => {
                let line_len = match &cells {
                    Cells::Csv { line, .. } => line.len(),
                    Cells::Json { .. } => 0,
                };
                let mut w = out.writer(ctx.row_bound + line_len);
                w.word(self.row_text.get(row));
                w.push(b',');
                if let Cells::Csv { line, .. } = &cells {
                    w.extend(line);
                    self.computed_csv(ctx, &mut w, &p);
                    w.push(b'\n');
                    let n = w.written();
                    out.commit(n);
                } else {
                    let n = w.written();
                    out.commit(n);
                }
                match &cells {
                    Cells::Csv { .. } => {}
                    Cells::Json { obj } => {
                        for (i, c) in ctx.header.cells.iter().enumerate() {
                            if i > 0 {
                                out.push(b',');
                            }
                            match obj.get(c) {
                                None | Some(Value::Null) => {}
                                Some(Value::String(s)) => out.csv_field(s.as_bytes()),
                                Some(other) => out.csv_field(other.to_string().as_bytes()),
                            }
                        }
                        let mut w = out.writer(ctx.row_bound);
                        self.computed_csv(ctx, &mut w, &p);
                        w.push(b'\n');
                        let n = w.written();
                        out.commit(n);
                    }
                }
            }
            Format::Jsonl => {
                out.extend(b"{\"row\":");
                out.u64(row);
                match &cells {
                    Cells::Csv { line, fields } => {
                        for i in 0..n {
                            out.push(b',');
                            out.extend(&ctx.json_cell_keys[i]);
                            let text = fields.get(line, i).unwrap_or(b"");
                            if ctx.cell_role[i].is_some() {
                                let t = trim_spaces(text);
                                if is_json_number(t) {
                                    out.extend(t);
                                } else {
                                    // Parsed before, so it is a finite number.
                                    let x = parse_number(t).unwrap_or(f64::NAN);
                                    out.extend(fmt_g(x).as_bytes());
                                }
                            } else {
                                out.json_string(text);
                            }
                        }
                    }
                    Cells::Json { obj } => {
                        for (i, c) in ctx.header.cells.iter().enumerate() {
                            out.push(b',');
                            out.extend(&ctx.json_cell_keys[i]);
                            match obj.get(c) {
                                Some(v) => out.extend(v.to_string().as_bytes()),
                                None => out.extend(b"null"),
                            }
                        }
                    }
                }
                self.computed_json(ctx, out, &p);
                out.extend(b"}\n");
            }
        }
        // Per-point record and counts.
        let verdict = match p.verdict {
            Prediction::Welded => 0u8,
            Prediction::NotWelded => 1,
            Prediction::Melted => 2,
        };
        if p.outside_trial_data {
            slot.stats.outside += 1;
            if verdict == 0 {
                slot.stats.welded_outside += 1;
            }
        }
        if p.jetting_direct {
            slot.stats.jetting_direct += 1;
        }
        if verdict == 0 {
            for (k, m) in self.margins.iter().enumerate() {
                if m.is_nan() {
                    continue;
                }
                let slotm = &mut slot.stats.welded_min[k];
                if slotm.is_none_or_greater(*m) {
                    *slotm = Some((*m, row));
                }
            }
        } else if let Some(b) = p.binding {
            slot.stats.unwelded_binding[b][usize::from(verdict == 2)] += 1;
        }
        let (margin, binding) = match p.binding {
            Some(b) => (self.margins[b], b as u16),
            None => (f64::NAN, u16::MAX),
        };
        slot.lites.push(Lite {
            row,
            pos: v.position,
            vp: p.vp as f32,
            beta: p.beta_deg as f32,
            binding,
            verdict,
            out_start: out_start as u32,
            margin,
            rel: p.binding_relative,
        });
        Ok(())
    }

    #[inline(always)]
    fn computed_csv(&self, ctx: &Ctx<'_>, out: &mut RowWriter<'_>, p: &Point) {
        // Decimals fixed per column, so each conversion is inlined for its count.
        let plan = &ctx.csv_plan;
        let v = match p.verdict {
            Prediction::Welded => 0,
            Prediction::NotWelded => 1,
            Prediction::Melted => 2,
        };
        match ctx.verdict_words.get(v) {
            Some(w) => out.word(w),
            None => {
                out.push(b',');
                out.extend(p.verdict.as_str().as_bytes());
                out.push(b',');
            }
        }
        // The verdict word ends in the binding column's comma.
        if let Some(b) = p.binding {
            match ctx.binding_words.as_ref().and_then(|w| w.get(b)) {
                Some(w) => out.word(w),
                None => out.extend(&ctx.binding_csv[b]),
            }
            out.push(b',');
            let m = self.margins.get(b).copied().unwrap_or(f64::NAN);
            let unit = ctx.margin_units.get(b);
            match unit {
                Some(MarginUnit::MetresPerSecond) => out.fixed_n::<1>(m),
                Some(MarginUnit::Degrees) => out.fixed_n::<3>(m),
                Some(MarginUnit::Gigapascals) => out.fixed_n::<3>(m * 1e-9),
                None => {}
            }
            match unit.and_then(|u| ctx.unit_words.get(*u as usize)) {
                Some(w) => out.word(w),
                None => out.push(b','),
            }
        } else {
            out.extend(b",,");
        }
        out.push(b',');
        out.fixed_n::<4>(p.binding_relative);
        out.push(b',');
        if p.verdict != Prediction::Welded {
            self.failing_csv(ctx, out, p);
        }
        if plan.vp {
            out.push(b',');
            out.fixed_n::<1>(p.vp);
        }
        out.push(b',');
        out.fixed_n::<1>(p.vc);
        out.push(b',');
        out.fixed_n::<1>(p.vf);
        out.push(b',');
        out.fixed_n::<3>(p.pressure * 1e-9);
        if plan.jetting {
            out.push(b',');
            out.fixed_n::<3>(p.jetting_deg);
        }
        for &(k, unit) in &plan.margins {
            out.push(b',');
            let m = self.margins.get(k).copied().unwrap_or(f64::NAN);
            match unit {
                MarginUnit::MetresPerSecond => out.fixed_n::<1>(m),
                MarginUnit::Degrees => out.fixed_n::<3>(m),
                MarginUnit::Gigapascals => out.fixed_n::<3>(m * 1e-9),
            }
        }
        if plan.outside {
            match ctx.outside_words.get(usize::from(!p.outside_trial_data)) {
                Some(w) => out.word(w),
                None => out.extend(if p.outside_trial_data {
                    b",true"
                } else {
                    b",false"
                }),
            }
        }
    }

    /// The failing limits' ids, `;`-separated, in the order of the limits.
    #[inline]
    fn failing_csv(&self, ctx: &Ctx<'_>, out: &mut RowWriter<'_>, p: &Point) {
        // Windows of up to eight limits: the text of every combination, made once.
        if let Some(text) = ctx.failing_texts.get(p.failing as usize) {
            out.extend(text);
            return;
        }
        let mut sep = false;
        let mut write = |out: &mut RowWriter<'_>, k: usize| {
            if std::mem::replace(&mut sep, true) {
                out.push(b';');
            }
            match ctx.binding_words.as_ref().and_then(|w| w.get(k)) {
                Some(w) => out.word(w),
                None => out.extend(&ctx.binding_csv[k]),
            }
        };
        let mut bits = p.failing;
        while bits != 0 {
            write(out, bits.trailing_zeros() as usize);
            bits &= bits - 1;
        }
        for k in 64..ctx.binding_csv.len() {
            if p.fails(k, &self.margins) {
                write(out, k);
            }
        }
    }

    fn computed_json(&self, ctx: &Ctx<'_>, out: &mut TextBuf, p: &Point) {
        for (col, key) in ctx.cols.iter().zip(&ctx.computed_keys) {
            out.push(b',');
            out.extend(key);
            match *col {
                Col::Verdict => {
                    out.push(b'"');
                    out.extend(p.verdict.as_str().as_bytes());
                    out.push(b'"');
                }
                Col::Binding => match p.binding {
                    Some(b) => out.extend(&ctx.binding_json[b]),
                    None => out.extend(b"null"),
                },
                Col::ImpactVelocity => out.json_number(p.vp, 1),
                Col::CollisionVelocity => out.json_number(p.vc, 1),
                Col::FlowVelocity => out.json_number(p.vf, 1),
                Col::Pressure => out.json_number(p.pressure * 1e-9, 3),
                Col::JettingAngle => out.json_number(p.jetting_deg, 3),
                Col::BindingUnit => match p.binding.and_then(|b| ctx.margin_units.get(b)) {
                    Some(unit) => {
                        out.push(b'"');
                        out.extend(unit.as_str().as_bytes());
                        out.push(b'"');
                    }
                    None => out.extend(b"null"),
                },
                Col::BindingMargin => {
                    match (p.binding, p.binding.and_then(|b| ctx.margin_units.get(b))) {
                        (Some(b), Some(unit)) => {
                            let (f, d) = unit.factor_decimals();
                            out.json_number(self.margins[b] * f, d);
                        }
                        _ => out.extend(b"null"),
                    }
                }
                Col::BindingRelative => out.json_number(p.binding_relative, 4),
                Col::Failing => {
                    out.push(b'[');
                    let mut first = true;
                    for k in 0..ctx.binding_json.len() {
                        if p.fails(k, &self.margins) {
                            if !first {
                                out.push(b',');
                            }
                            first = false;
                            out.extend(&ctx.binding_json[k]);
                        }
                    }
                    out.push(b']');
                }
                Col::Margin(k, unit) => {
                    let (f, d) = unit.factor_decimals();
                    out.json_number(self.margins[k] * f, d);
                }
                Col::Outside => out.extend(if p.outside_trial_data {
                    b"true"
                } else {
                    b"false"
                }),
            }
        }
    }
}

trait MinSlot {
    fn is_none_or_greater(&self, m: f64) -> bool;
}

impl MinSlot for Option<(f64, u64)> {
    fn is_none_or_greater(&self, m: f64) -> bool {
        match self {
            Some((old, _)) => m < *old,
            None => true,
        }
    }
}

/// The position of a rejected row, m, when its position cell can still be read (it places
/// the row along the interface for the summary); `None` otherwise.
fn rejected_position(ctx: &Ctx<'_>, rec: &[u8], quoted: bool) -> Option<f64> {
    let col = &ctx.header.position;
    let x = match ctx.in_format {
        Format::Csv => {
            let mut f = Fields::default();
            split_fields(rec, quoted, &mut f);
            parse_number(f.get(rec, col.index)?)?
        }
        Format::Jsonl => {
            let obj = serde_json::from_slice::<Map<String, Value>>(rec).ok()?;
            match obj.get(&col.cell)? {
                Value::Number(n) => n.as_f64()?,
                Value::String(t) => parse_number(t.as_bytes())?,
                _ => return None,
            }
        }
    };
    Some(x * col.factor).filter(|v| v.is_finite())
}

/// A number in the shortest form that reads back the same.
pub fn fmt_g(x: f64) -> String {
    format!("{x}")
}

/// A number for a message: at most 6 significant digits, no trailing zeros.
pub fn fmt_short(x: f64) -> String {
    if !x.is_finite() {
        return format!("{x}");
    }
    if x != 0.0 && !(1e-4..1e9).contains(&x.abs()) {
        return format!("{x:.5e}");
    }
    let digits = if x == 0.0 {
        0
    } else {
        (5 - x.abs().log10().floor() as i32).clamp(0, 12) as usize
    };
    let t = format!("{x:.digits$}");
    if t.contains('.') {
        t.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        t
    }
}

fn write_bad(ctx: &Ctx<'_>, out: &mut Vec<u8>, row: u64, field: &str, reason: &str, rec: &[u8]) {
    match ctx.in_format {
        Format::Csv => {
            push_u64(out, row);
            out.push(b',');
            push_csv_field(out, field.as_bytes());
            out.push(b',');
            push_csv_field(out, reason.as_bytes());
            out.push(b',');
            out.extend_from_slice(rec);
            out.push(b'\n');
        }
        Format::Jsonl => {
            out.extend_from_slice(b"{\"row\":");
            push_u64(out, row);
            out.extend_from_slice(b",\"field\":");
            push_json_string(out, field.as_bytes());
            out.extend_from_slice(b",\"reason\":");
            push_json_string(out, reason.as_bytes());
            out.extend_from_slice(b",\"line\":");
            push_json_string(out, rec);
            out.extend_from_slice(b"}\n");
        }
    }
}

/// Run the pipeline: `source` positioned after the header; `first_line` is the line number of
/// the first record; `sink` sees each chunk in file order. Returns the reader's I/O error, if
/// any, after every chunk before it has been seen.
///
/// # Errors
/// Whatever `sink` returns, or the reader's error message.
pub fn run<E>(
    ctx: &Ctx<'_>,
    mut source: Source,
    first_line: u64,
    threads: usize,
    mut sink: impl FnMut(&mut Slot) -> Result<(), E>,
    io_error: impl Fn(String) -> E,
) -> Result<(), E> {
    let threads = threads.max(1);
    let slots = 2 * threads + 2;
    let quotes = ctx.in_format == Format::Csv;
    let cancel = AtomicBool::new(false);
    let reader_error: Mutex<Option<String>> = Mutex::new(None);
    std::thread::scope(|s| {
        let (pool_tx, pool_rx) = sync_channel::<Slot>(slots);
        for _ in 0..slots {
            let _ = pool_tx.send(Slot::default());
        }
        let (work_tx, work_rx) = sync_channel::<Slot>(slots);
        let work_rx: Arc<Mutex<Receiver<Slot>>> = Arc::new(Mutex::new(work_rx));
        let (done_tx, done_rx) = sync_channel::<Slot>(slots);
        let cancel = &cancel;
        let reader_error = &reader_error;
        s.spawn(move || {
            let mut seq = 0u64;
            let mut line = first_line;
            while let Ok(mut slot) = pool_rx.recv() {
                if cancel.load(Ordering::Relaxed) {
                    break;
                }
                match source.next_chunk(&mut slot.data, CHUNK, CHUNK_LINES, quotes, MAX_RECORD) {
                    Ok(Some(info)) => {
                        slot.seq = seq;
                        slot.first_line = line;
                        slot.has_quote = info.has_quote;
                        line += info.lines;
                        seq += 1;
                        if work_tx.send(slot).is_err() {
                            break;
                        }
                    }
                    Ok(None) => break,
                    Err(e) => {
                        if let Ok(mut g) = reader_error.lock() {
                            *g = Some(e.to_string());
                        }
                        break;
                    }
                }
            }
        });
        for _ in 0..threads {
            let done_tx = done_tx.clone();
            let work_rx = Arc::clone(&work_rx);
            s.spawn(move || {
                let mut worker = Worker {
                    row_text: Counter::default(),
                    fields: Fields::default(),
                    margins: Vec::new(),
                };
                loop {
                    let next = match work_rx.lock() {
                        Ok(rx) => rx.recv(),
                        Err(_) => break,
                    };
                    let Ok(mut slot) = next else { break };
                    if cancel.load(Ordering::Relaxed) {
                        break;
                    }
                    worker.process(ctx, &mut slot);
                    if done_tx.send(slot).is_err() {
                        break;
                    }
                }
            });
        }
        drop(done_tx);
        drop(work_rx);
        let mut pending: BTreeMap<u64, Slot> = BTreeMap::new();
        let mut next = 0u64;
        let mut result: Result<(), E> = Ok(());
        'outer: for slot in done_rx.iter() {
            pending.insert(slot.seq, slot);
            while let Some(mut slot) = pending.remove(&next) {
                if let Err(e) = sink(&mut slot) {
                    result = Err(e);
                    break 'outer;
                }
                slot.reset();
                let _ = pool_tx.send(slot);
                next += 1;
            }
        }
        cancel.store(true, Ordering::Relaxed);
        drop(pool_tx);
        drop(done_rx);
        drop(pending);
        result
    })?;
    if let Some(e) = reader_error.lock().ok().and_then(|mut g| g.take()) {
        return Err(io_error(e));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::fmt_short;

    #[test]
    fn short_numbers_for_messages() {
        assert_eq!(fmt_short(167.475_563_516_739_64), "167.476");
        assert_eq!(fmt_short(-450.0), "-450");
        assert_eq!(fmt_short(0.5), "0.5");
        assert_eq!(fmt_short(0.0), "0");
        assert_eq!(fmt_short(12.000_01), "12");
        assert_eq!(fmt_short(1e-7), "1.00000e-7");
        assert_eq!(fmt_short(-2.5e12), "-2.50000e12");
    }
}
