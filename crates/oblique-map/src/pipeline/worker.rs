//! A worker's side of the pipeline: each record of a chunk split, checked, read (a fast path for
//! plain CSV numbers, a general one that words every fault), classified and written as an
//! output row, with a compact record of it for the summary.

/// Rows whose position lies further than this from the origin (m) are refused: no interface
/// is a kilometre long, and plot axes need a sane span (common practice bound).
const MAX_POSITION_M: f64 = 1e3;
/// Rows faster than this (m/s) are refused, as on the command line (common practice bound).
const MAX_VELOCITY_M_S: f64 = 1e5;
/// Rows with a collision angle from 0 up to below this (deg) are head-on (numerically: no
/// oblique relation covers them), with a verdict of their own; the command line's bound.
pub(crate) const HEAD_ON_DEG: f64 = 1e-6;

use super::columns::{computed_csv, computed_json};
use super::layout::Ctx;
use super::slot::Slot;
use crate::classifier::{Point, VelocityKind};
use crate::format::{
    fmt_g, fmt_short, is_json_number, push_csv_field, push_json_string, push_u64, TextBuf,
};
use crate::input::{
    is_number, json_object, json_reason, next_record, number_reason, parse_number, scan_plain,
    split_cell, split_fields, split_plain_record, trim_spaces, Column, Fields,
};
use crate::options::{BadRows, Format};
use crate::record::{Lite, Rejected};
use serde_json::{Map, Value};

/// The values read from one row.
struct RowValues {
    position: f64,
    velocity: f64,
    angle: f64,
}

impl RowValues {
    /// Whether the values are within the bounds both fast reads accept (anything else takes
    /// the general path, which words the fault or reads a head-on row).
    #[inline(always)]
    fn in_bounds(&self) -> bool {
        let deg = self.angle.to_degrees();
        self.position.abs() <= MAX_POSITION_M
            && self.velocity > 0.0
            && self.velocity <= MAX_VELOCITY_M_S
            && (HEAD_ON_DEG..90.0).contains(&deg)
    }
}

enum Cells<'r> {
    Csv { line: &'r [u8], fields: &'r Fields },
    Json { obj: &'r Map<String, Value> },
}

pub(super) struct Worker {
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

impl Worker {
    /// A worker with empty scratch.
    pub(super) fn new() -> Self {
        Self {
            fields: Fields::default(),
            margins: Vec::new(),
        }
    }

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
        let position = plain_number(line, ranges, &h.position)?;
        let velocity = plain_number(line, ranges, &h.velocity)?;
        let angle = plain_number(line, ranges, &h.angle)?;
        // The time is only checked to be a number (passed through, never used): no conversion.
        if let Some(t) = &h.time {
            let &(s, e) = ranges.get(t.index)?;
            if !is_number(line.get(s..e)?) {
                return None;
            }
        }
        let v = RowValues {
            position,
            velocity,
            angle,
        };
        v.in_bounds().then_some(v)
    }

    fn values(&self, ctx: &Ctx<'_>, cells: &Cells<'_>) -> Result<RowValues, Bad> {
        let h = ctx.header;
        let get = |col: &Column| -> Result<f64, Bad> {
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
        if position.abs() > MAX_POSITION_M {
            return Err((
                h.position.cell.clone(),
                format!(
                    "{} m is beyond 1 km from the origin: no welded interface is that long (common practice bound); check the column's unit",
                    fmt_short(position)
                ),
            ));
        }
        // The value as written, with its conversion when the header's unit is not the one the
        // message speaks in.
        let as_written = |col: &Column, si_unit: &str, shown: f64| -> String {
            let unit = split_cell(&col.cell).1.unwrap_or("");
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
        if velocity > MAX_VELOCITY_M_S {
            return Err((
                h.velocity.cell.clone(),
                format!(
                    "{} is above 100 km/s, beyond any launcher (common practice bound); check the column's unit",
                    as_written(&h.velocity, "m/s", velocity)
                ),
            ));
        }
        let deg = angle.to_degrees();
        if (0.0..HEAD_ON_DEG).contains(&deg) && ctx.classifier.kind() == VelocityKind::Collision {
            return Err((
                h.angle.cell.clone(),
                format!(
                    "{} with a collision-point velocity: a head-on impact has no collision point (give the impact velocity, --velocity-kind impact)",
                    as_written(&h.angle, "deg", deg)
                ),
            ));
        }
        if !(0.0..90.0).contains(&deg) {
            let unit = split_cell(&h.angle.cell).1.unwrap_or("");
            let hint = if unit != "deg" && deg >= 90.0 {
                format!(
                    "; if this column holds degrees, write {}[deg] in the header",
                    split_cell(&h.angle.cell).0
                )
            } else {
                String::new()
            };
            return Err((
                h.angle.cell.clone(),
                format!(
                    "{} is outside [0, 90) deg{hint}",
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

    /// Parse, classify and write every record of the slot's chunk.
    pub(super) fn process(&mut self, ctx: &Ctx<'_>, slot: &mut Slot, mapped: Option<&[u8]>) {
        let n_limits = ctx.classifier.limits.len();
        slot.stats.welded_min = vec![None; n_limits];
        slot.stats.unwelded_binding = vec![[0; 2]; n_limits];
        // A stream's chunk is taken out of the slot while its rows go in; a mapped one is read
        // where it lies.
        let owned = std::mem::take(&mut slot.data);
        let data: &[u8] = match (slot.range, mapped) {
            (Some((s, e)), Some(m)) => m.get(s..e).unwrap_or(&[]),
            _ => &owned,
        };
        let mut pos = 0;
        let mut line_no = slot.first_line;
        // Plain CSV records in a chunk without quotes: read in one pass, straight to the
        // classification; any other record goes the general way below.
        // (The reader exists only for a CSV input and map.)
        let one_pass = ctx.plain_row.as_ref().filter(|_| !slot.has_quote);
        while pos < data.len() {
            if let Some(r) = one_pass.and_then(|reader| reader.read(data, pos)) {
                let [position, velocity, angle] = r.values;
                let v = RowValues {
                    position,
                    velocity,
                    angle,
                };
                if v.in_bounds() {
                    let rec = &data[pos..r.end];
                    let row = line_no;
                    line_no += 1;
                    pos = r.next;
                    slot.stats.rows_read += 1;
                    let cells = Cells::Csv {
                        line: rec,
                        fields: &self.fields,
                    };
                    let res = classify_and_write(ctx, &mut self.margins, slot, row, &cells, &v);
                    if let Err(bad) = res {
                        if reject(ctx, slot, row, rec, false, bad) {
                            break;
                        }
                    }
                    continue;
                }
            }
            let mut plain = false;
            let (end, next, inside_nl, quoted) = match ctx.in_format {
                Format::Csv if !slot.has_quote => {
                    // No quote in the whole chunk: every record is one line.
                    // The fields and the line break in one pass (a `\r` before it is cut
                    // from the last field below).
                    plain = true;
                    let end = split_plain_record(data, pos, &mut self.fields);
                    (end, (end + 1).min(data.len()), 0, false)
                }
                Format::Csv => match scan_plain(data, pos, &mut self.fields) {
                    Some((end, next)) => {
                        plain = true;
                        (end, next, 0, false)
                    }
                    None => next_record(data, pos),
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
            if let Err(bad) = self.row(ctx, slot, row, rec, quoted, plain) {
                if reject(ctx, slot, row, rec, quoted, bad) {
                    break;
                }
            }
        }
        slot.data = owned;
    }

    /// Classify one record and write its output row; the row's fault otherwise.
    fn row(
        &mut self,
        ctx: &Ctx<'_>,
        slot: &mut Slot,
        row: u64,
        rec: &[u8],
        quoted: bool,
        already_split: bool,
    ) -> Result<(), Bad> {
        let obj;
        let cells = match ctx.in_format {
            Format::Csv => {
                self.csv_fields(ctx, rec, quoted, already_split)?;
                Cells::Csv {
                    line: rec,
                    fields: &self.fields,
                }
            }
            Format::Jsonl => {
                obj = json_cells(ctx, rec)?;
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
        classify_and_write(ctx, &mut self.margins, slot, row, &cells, &v)
    }

    /// Split a CSV record (unless the fast path did) and check its field count.
    #[inline(always)]
    fn csv_fields(
        &mut self,
        ctx: &Ctx<'_>,
        rec: &[u8],
        quoted: bool,
        already_split: bool,
    ) -> Result<(), Bad> {
        let n = ctx.header.cells.len();
        if !already_split {
            split_fields(rec, quoted, &mut self.fields);
        }
        let got = self.fields.ranges.len();
        if trim_spaces(rec).starts_with(b"#") {
            return Err((
                "(row)".into(),
                "a comment line after the header: '#' lines are skipped only before the header"
                    .into(),
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
        Ok(())
    }
}

/// Classify a row's values and write its output row and its record for the summary.
#[inline(always)]
fn classify_and_write(
    ctx: &Ctx<'_>,
    margins: &mut Vec<f64>,
    slot: &mut Slot,
    row: u64,
    cells: &Cells<'_>,
    v: &RowValues,
) -> Result<(), Bad> {
    let p = if v.angle.to_degrees() < HEAD_ON_DEG {
        ctx.classifier.head_on(v.velocity, margins)
    } else {
        ctx.classifier.classify(v.velocity, v.angle, margins)
    }
    .map_err(|e| ("(classification)".to_string(), e.to_string()))?;
    let out = &mut slot.out;
    let out_start = out.len();
    match ctx.out_format {
        Format::Csv => csv_row(ctx, margins, out, row, cells, &p),
        Format::Jsonl => {
            slot.stats.non_utf8_cells += json_row(ctx, margins, out, row, cells, &p);
        }
    }
    record(slot, margins, row, v.position, out_start, &p);
    Ok(())
}

/// Count a rejected row, keep it (and save it under `--bad-rows save`); whether the map
/// stops here (`--bad-rows stop`).
#[cold]
#[inline(never)]
fn reject(ctx: &Ctx<'_>, slot: &mut Slot, row: u64, rec: &[u8], quoted: bool, bad: Bad) -> bool {
    let (field, reason) = bad;
    slot.stats.rejected += 1;
    if ctx.policy == BadRows::Save {
        write_bad(ctx, &mut slot.bad_out, row, &field, &reason, rec);
    }
    let pos = rejected_position(ctx, rec, quoted);
    slot.bad.push(Rejected {
        row,
        field,
        reason,
        pos,
    });
    if ctx.policy == BadRows::Stop {
        slot.stopped = true;
        return true;
    }
    false
}

/// The value of column `col` of an unquoted CSV line split into `ranges`, in SI.
#[inline(always)]
fn plain_number(line: &[u8], ranges: &[(usize, usize)], col: &Column) -> Option<f64> {
    let &(s, e) = ranges.get(col.index)?;
    parse_number(line.get(s..e)?).map(|v| v * col.factor)
}

/// A JSON-lines record as an object whose keys are all among the first line's.
fn json_cells(ctx: &Ctx<'_>, rec: &[u8]) -> Result<Map<String, Value>, Bad> {
    let obj = match json_object(rec) {
        Ok(o) => o,
        Err(e) => {
            return Err((
                "(line)".into(),
                format!("not a JSON object: {}", json_reason(&e)),
            ))
        }
    };
    if let Some(k) = obj.keys().find(|k| !ctx.header.cells.contains(k)) {
        return Err((
            k.clone(),
            "not among the fields of the first line (the first object sets the columns)".into(),
        ));
    }
    Ok(obj)
}

/// One CSV output row: the row number, the input cells as written (a CSV line is copied
/// whole), the computed columns; each as the column selection has it.
#[inline(always)]
fn csv_row(
    ctx: &Ctx<'_>,
    margins: &[f64],
    out: &mut TextBuf,
    row: u64,
    cells: &Cells<'_>,
    p: &Point,
) {
    let line_len = match cells {
        Cells::Csv { line, .. } if ctx.input => line.len(),
        _ => 0,
    };
    // The computed columns each start with a comma: a row without the row number and the
    // input drops the first one.
    let lead = ctx.row || ctx.input;
    let mut w = out.writer(ctx.row_bound + line_len);
    if ctx.row {
        w.u64(row);
    }
    match cells {
        Cells::Csv { line, .. } => {
            if ctx.input {
                if ctx.row {
                    w.push(b',');
                }
                w.extend(line);
            }
            computed_csv(ctx, margins, &mut w, p);
            w.push(b'\n');
            let n = w.written();
            out.commit_from(usize::from(!lead), n);
        }
        Cells::Json { obj } => {
            let n = w.written();
            out.commit(n);
            if ctx.input {
                for (i, c) in ctx.header.cells.iter().enumerate() {
                    if i > 0 || ctx.row {
                        out.push(b',');
                    }
                    match obj.get(c) {
                        None | Some(Value::Null) => {}
                        Some(Value::String(s)) => out.csv_field(s.as_bytes()),
                        Some(other) => out.csv_field(other.to_string().as_bytes()),
                    }
                }
            }
            let mut w = out.writer(ctx.row_bound);
            computed_csv(ctx, margins, &mut w, p);
            w.push(b'\n');
            let n = w.written();
            out.commit_from(usize::from(!lead), n);
        }
    }
}

/// One JSON-lines output row: the row number, the input cells (numbers of the mapped columns
/// as numbers, other CSV cells as strings, JSON values as they were), the computed columns;
/// each as the column selection has it.
#[inline(always)]
fn json_row(
    ctx: &Ctx<'_>,
    margins: &[f64],
    out: &mut TextBuf,
    row: u64,
    cells: &Cells<'_>,
    p: &Point,
) -> u64 {
    // Pass-through cells that are not UTF-8: JSON text cannot carry them (replaced, counted).
    let mut non_utf8 = 0;
    out.push(b'{');
    if ctx.row {
        out.extend(b"\"row\":");
        out.u64(row);
    }
    let mut comma = ctx.row;
    if ctx.input {
        match cells {
            Cells::Csv { line, fields } => {
                for i in 0..ctx.header.cells.len() {
                    if std::mem::replace(&mut comma, true) {
                        out.push(b',');
                    }
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
                        non_utf8 += u64::from(std::str::from_utf8(text).is_err());
                        out.json_string(text);
                    }
                }
            }
            Cells::Json { obj } => {
                for (i, c) in ctx.header.cells.iter().enumerate() {
                    if std::mem::replace(&mut comma, true) {
                        out.push(b',');
                    }
                    out.extend(&ctx.json_cell_keys[i]);
                    match obj.get(c) {
                        Some(v) => out.extend(v.to_string().as_bytes()),
                        None => out.extend(b"null"),
                    }
                }
            }
        }
    }
    computed_json(ctx, margins, out, p, comma);
    out.extend(b"}\n");
    non_utf8
}

/// The per-point record for the summary, and the chunk's counts.
#[inline(always)]
fn record(slot: &mut Slot, margins: &[f64], row: u64, position: f64, out_start: usize, p: &Point) {
    let verdict = p.verdict.index() as u8;
    if p.sonic != 0 {
        slot.stats.supersonic += 1;
        if p.sonic != 3 {
            slot.stats.mixed += 1;
        }
    }
    if p.domain_exits != 0 {
        outside_domain(slot, p.domain_exits);
    }
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
        for (k, m) in margins.iter().enumerate() {
            if m.is_nan() {
                continue;
            }
            let slotm = &mut slot.stats.welded_min[k];
            if slotm.is_none_or_greater(*m) {
                *slotm = Some((*m, row));
            }
        }
    } else if let Some(b) = p.binding.filter(|_| verdict <= 2) {
        slot.stats.unwelded_binding[b][usize::from(verdict == 2)] += 1;
    }
    let (margin, binding) = match p.binding {
        Some(b) => (margins[b], b as u16),
        None => (f64::NAN, u16::MAX),
    };
    slot.lites.push(Lite {
        row,
        pos: position,
        vp: p.vp as f32,
        beta: p.beta_deg as f32,
        binding,
        verdict,
        out_start: out_start as u32,
        margin,
        rel: p.binding_relative,
    });
}

/// Count a row outside the validity domain, by the bounds it misses.
#[cold]
fn outside_domain(slot: &mut Slot, exits: u8) {
    for (k, n) in slot.stats.domain_exits.iter_mut().enumerate() {
        *n += u64::from(exits >> k & 1);
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
