//! A weld map from start to end: read the header, build the classifier, run the pipeline, take
//! its chunks back in file order (the summary, the outputs, a bad row or a position out of
//! order that ends the map), and finish the summary.

use crate::classifier::{criterion_column, Classifier, JettingMode, VelocityKind};
use crate::error::{MapError, Output};
use crate::format::fmt_short;
use crate::input::{read_header, Header, Source, Wanted};
use crate::options::{BadRows, Format, MapOptions};
use crate::pipeline::{self, Ctx, Input, Slot};
use crate::record::Rejected;
use crate::summary::{LimitStat, OutOfOrder, RunInfo, Summary, EXAMPLE_CAP};
use oblique_core::CriterionId;
use oblique_window::{LimitRef, PairWindow};
use std::io::{Read, Write};

/// An input already in memory, such as a memory-mapped file: the map reads its chunks where
/// they lie, with no copy, and calls `release` with each page-aligned range of `bytes` that it
/// is done with (in order), so that a mapped file's pages can be given back
/// (`madvise(MADV_DONTNEED)`) and the resident memory stays bounded whatever the file's size.
pub struct InMemory<'a> {
    /// The whole input.
    pub bytes: &'a [u8],
    /// Hears each range no longer needed.
    pub release: Box<dyn Fn(std::ops::Range<usize>) + Send + Sync + 'a>,
}

/// A weld map with its header read and its classifier built, ready to run: the two steps are
/// apart so that a caller can refuse a bad header before it creates any output.
pub struct WeldMap<'a> {
    window: &'a PairWindow,
    opts: MapOptions,
    classifier: Classifier,
    header: Header,
    source: Option<Source<'a>>,
    /// An input in memory, and where its records start.
    in_memory: Option<(InMemory<'a>, usize)>,
    first_line: u64,
    comment_lines: u64,
}

impl<'a> WeldMap<'a> {
    /// Read the header of `input` and prepare the classifier for `window` (its criteria as
    /// they should be used).
    ///
    /// # Errors
    /// [`MapError::Input`]: a read error, empty input, a header without the wanted columns or
    /// their units, options that cannot go together; [`MapError::Physics`]: the window's
    /// materials or constants cannot be evaluated.
    pub fn open(
        window: &'a PairWindow,
        input: impl Read + Send + 'a,
        opts: &MapOptions,
    ) -> Result<Self, MapError> {
        Self::open_source(window, Source::new(Box::new(input)), opts)
    }

    /// As [`WeldMap::open`], for an input already in memory (a memory-mapped file): the same
    /// map, read with no copy.
    ///
    /// # Errors
    /// As [`WeldMap::open`].
    pub fn open_in_memory(
        window: &'a PairWindow,
        input: InMemory<'a>,
        opts: &MapOptions,
    ) -> Result<Self, MapError> {
        let mut map = Self::open_source(
            window,
            Source::new(Box::new(std::io::Cursor::new(input.bytes))),
            opts,
        )?;
        // The records start where the header reading stopped handing out bytes.
        let start = map.source.take().map_or(0, |s| s.consumed as usize);
        map.in_memory = Some((input, start));
        Ok(map)
    }

    fn open_source(
        window: &'a PairWindow,
        mut source: Source<'a>,
        opts: &MapOptions,
    ) -> Result<Self, MapError> {
        if opts.unsorted && opts.min_segment.is_some() {
            return Err(MapError::Input(
                "--min-segment joins runs along the interface and needs sorted positions: it cannot be used with --unsorted".into(),
            ));
        }
        let c = &opts.columns;
        let wanted = Wanted {
            names: [
                c.position.clone(),
                c.velocity.clone(),
                c.angle.clone(),
                c.time.clone(),
            ],
            flags: [
                "--position-column",
                "--velocity-column",
                "--angle-column",
                "--time-column",
            ],
        };
        let read = read_header(&mut source, opts.input_format, &opts.input_name, &wanted)?;
        let classifier = Classifier::new(window, opts.velocity_kind, opts.jetting)?;
        let stems: Vec<String> = classifier.limits.iter().map(|l| l.column.clone()).collect();
        let selected = opts.selected_columns();
        let unknown = selected.unknown_margins(&stems);
        if !unknown.is_empty() {
            let mut m = format!(
                "--columns: {}: not a limit of pair '{}', whose margins are {}",
                unknown.join(", "),
                window.name,
                stems.join(", ")
            );
            // A criterion the window turns off: say so, with the window's reason.
            for id in CriterionId::ALL {
                let stem = criterion_column(id);
                if !unknown.contains(&stem.as_str()) {
                    continue;
                }
                if id == CriterionId::WavyTransition {
                    m.push_str(&format!(
                        "\n  hint: {stem}: the wavy transition is not a weld limit, so the map has no margin for it"
                    ));
                } else if !window.criteria.is_enabled(id) {
                    m.push_str(&format!(
                        "\n  hint: {stem}: the window turns its {} criterion off{}",
                        id.as_str(),
                        window
                            .criteria_reasons
                            .get(&id)
                            .map_or(String::new(), |r| format!(" (reason: {r})"))
                    ));
                }
            }
            return Err(MapError::Input(m));
        }
        Ok(Self {
            window,
            opts: opts.clone(),
            classifier,
            header: read.header,
            source: Some(source),
            in_memory: None,
            first_line: read.first_line,
            comment_lines: read.comment_lines,
        })
    }

    /// The map's CSV header line, which [`WeldMap::run`] writes first (empty for JSON lines).
    pub fn map_header(&self) -> Vec<u8> {
        if self.opts.output_format != Format::Csv {
            return Vec::new();
        }
        self.ctx().csv_header()
    }

    /// What the workers share.
    fn ctx(&self) -> Ctx<'_> {
        let opts = &self.opts;
        Ctx::new(
            &opts.input_name,
            opts.input_format,
            opts.output_format,
            &self.header,
            &self.classifier,
            opts.bad_rows,
            &opts.selected_columns(),
        )
    }

    /// The input's header: its cells and the columns read.
    pub fn header(&self) -> &Header {
        &self.header
    }

    /// The classifier (the window's limits in output order; it classifies any other point
    /// the same way, e.g. for a plot of the window plane).
    pub fn classifier(&self) -> &Classifier {
        &self.classifier
    }

    /// Map every row: the map goes to `output` (CSV with its header line, or JSON lines), the
    /// rejected rows with their reasons to `bad_rows` (needed with [`BadRows::Save`], unused
    /// otherwise); `progress` hears the input bytes taken so far after each chunk. Both
    /// writers are flushed at the end.
    ///
    /// # Errors
    /// [`MapError::Input`]: a bad row under [`BadRows::Stop`], a position out of order, a read
    /// error, no data row; [`MapError::NothingClassified`]: every row was rejected;
    /// [`MapError::Write`]: an output could not be written; [`MapError::Misuse`]: a second
    /// run, or [`BadRows::Save`] without `bad_rows`.
    pub fn run(
        &mut self,
        output: &mut dyn Write,
        mut bad_rows: Option<&mut dyn Write>,
        progress: &mut dyn FnMut(u64),
    ) -> Result<Summary, MapError> {
        if self.opts.bad_rows == BadRows::Save && bad_rows.is_none() {
            return Err(MapError::Misuse(
                "bad rows: BadRows::Save needs a writer for the rejected rows".into(),
            ));
        }
        let in_memory = self.in_memory.take();
        let input = match (self.source.take(), &in_memory) {
            (_, Some((m, start))) => Input::Mapped {
                bytes: m.bytes,
                start: *start,
                release: &*m.release,
            },
            (Some(source), None) => Input::Stream(source),
            (None, None) => {
                return Err(MapError::Misuse("the input has been mapped already".into()))
            }
        };
        let opts = &self.opts;
        let file_name = opts.input_name.as_str();
        let ctx = self.ctx();
        let write_map = |e| MapError::Write {
            output: Output::Map,
            source: e,
        };
        let write_bad = |e| MapError::Write {
            output: Output::BadRows,
            source: e,
        };
        if opts.output_format == Format::Csv {
            output.write_all(&ctx.csv_header()).map_err(write_map)?;
        }
        if opts.bad_rows == BadRows::Save && opts.input_format == Format::Csv {
            if let Some(w) = bad_rows.as_mut() {
                w.write_all(&ctx.bad_header()).map_err(write_bad)?;
            }
        }
        let mut summary = self.new_summary();
        let mut bytes_done = 0u64;
        pipeline::run(
            &ctx,
            input,
            self.first_line,
            opts.worker_threads(),
            |slot: &mut Slot| -> Result<(), MapError> {
                let side = bad_rows.as_mut().map(|w| &mut **w as &mut dyn Write);
                fold_chunk(&ctx, slot, &mut summary, output, side)?;
                bytes_done += slot.input_len() as u64;
                progress(bytes_done);
                Ok(())
            },
            |e| MapError::Input(format!("{file_name}: cannot read: {e}")),
        )?;
        output.flush().map_err(write_map)?;
        if let Some(w) = bad_rows {
            w.flush().map_err(write_bad)?;
        }
        summary.finish();
        self.check_rows(&summary)?;
        summary.check_plausibility(&self.header.velocity.cell, &self.header.angle.cell);
        summary.info = self.run_info();
        if self.opts.jetting == JettingMode::Direct && !self.classifier.jetting_enabled() {
            summary.warnings.push(
                "--exact-jetting has no effect: the window turns its jetting criterion off, so no critical angle is solved".into(),
            );
        }
        Ok(summary)
    }

    /// A fresh summary for this window's limits and these options.
    fn new_summary(&self) -> Summary {
        let window = self.window;
        let limits: Vec<LimitStat> = self
            .classifier
            .limits
            .iter()
            .map(|l| LimitStat {
                label: l.label.clone(),
                id: l.id.clone(),
                column: l.map_column(),
                unit: l.unit,
                kind: match l.limit {
                    LimitRef::Criterion(_) => "criterion",
                    LimitRef::Boundary(_) => "boundary",
                },
                ceiling: match l.limit {
                    LimitRef::Criterion(id) => id == CriterionId::MeltingUpper,
                    LimitRef::Boundary(i) => window
                        .boundaries
                        .get(i)
                        .is_some_and(|b| b.weld_side.is_velocity_ceiling()),
                },
                welded_min: None,
                unwelded_binding: [0; 2],
            })
            .collect();
        let opts = &self.opts;
        let mut summary = Summary::new(
            limits,
            opts.unsorted,
            (opts.collect_strip, opts.collect_window_plane),
        );
        summary.comment_lines = self.comment_lines;
        summary.min_segment = opts.min_segment.map_or(0.0, |l| l.si());
        summary.constants = opts.constants.clone();
        summary
    }

    /// Refuse a map without any row, or without any classified row.
    fn check_rows(&self, summary: &Summary) -> Result<(), MapError> {
        let file_name = &self.opts.input_name;
        if summary.rows_read == 0 {
            return Err(MapError::Input(format!(
                "{file_name}: no data rows after the header: nothing to map"
            )));
        }
        if summary.rows_classified > 0 {
            return Ok(());
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
            self.header.velocity.cell, self.header.angle.cell
        ));
        Err(MapError::NothingClassified(msg))
    }

    /// The facts about the run for the summary.
    fn run_info(&self) -> RunInfo {
        let (window, c) = (self.window, &self.classifier);
        RunInfo {
            pair: window.name.clone(),
            convention: window.convention.as_str(),
            velocity_kind: match c.kind() {
                VelocityKind::Impact => "impact",
                VelocityKind::Collision => "collision",
            },
            input: self.opts.input_name.clone(),
            bad_rows: self.opts.bad_rows.as_str().to_string(),
            jetting: if !c.jetting_enabled() {
                "disabled"
            } else if c.uses_table() {
                "table"
            } else {
                "direct"
            },
            table: c.table().map(|t| (t.nodes(), t.max_inflow().si())),
            pair_line: format!(
                "{} flyer {:.2} mm on {} parent",
                window.flyer.material.id,
                window.flyer_thickness.mm(),
                window.parent.material.id
            ),
            mixed_rule: window.criteria.mixed_jetting.as_str(),
            jetting_off_reason: if c.jetting_enabled() {
                None
            } else {
                window.criteria_reasons.get(&CriterionId::Jetting).cloned()
            },
            domain: window
                .domain
                .bounds
                .iter()
                .map(|b| format!("{} {}", b.quantity.label(), b.range_text()))
                .collect(),
        }
    }
}

/// Map `input` against `window` with `opts` in one call: the map goes to `output`, the summary
/// comes back. For [`BadRows::Save`], a progress report, or to refuse a bad header before
/// creating the output, use [`WeldMap`].
///
/// # Errors
/// As [`WeldMap::open`] and [`WeldMap::run`].
pub fn classify_stream(
    window: &PairWindow,
    input: impl Read + Send,
    mut output: impl Write,
    opts: &MapOptions,
) -> Result<Summary, MapError> {
    let mut map = WeldMap::open(window, input, opts)?;
    map.run(&mut output, None, &mut |_| {})
}

/// Take one chunk in file order: summary, sortedness, output, bad rows.
fn fold_chunk(
    ctx: &Ctx<'_>,
    slot: &mut Slot,
    summary: &mut Summary,
    out: &mut dyn Write,
    side: Option<&mut dyn Write>,
) -> Result<(), MapError> {
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
        out.write_all(&slot.out.as_bytes()[..written])
            .map_err(|e| MapError::Write {
                output: Output::Map,
                source: e,
            })?;
    }
    if let Some((_, e)) = cut {
        // A stop-mode bad row earlier than the out-of-order row wins.
        if let Some(b) = slot.bad.first().filter(|b| slot.stopped && b.row < e.row) {
            return Err(bad_row_error(ctx, b));
        }
        return Err(out_of_order_error(ctx, &e));
    }
    merge_counts(slot, summary);
    if let Some(f) = side {
        f.write_all(&slot.bad_out).map_err(|e| MapError::Write {
            output: Output::BadRows,
            source: e,
        })?;
    }
    if slot.stopped {
        if let Some(b) = slot.bad.last() {
            return Err(bad_row_error(ctx, b));
        }
    }
    Ok(())
}

/// Add a chunk's counts, smallest welded margins and first rejected rows to the summary.
fn merge_counts(slot: &Slot, summary: &mut Summary) {
    let st = &slot.stats;
    summary.rows_read += st.rows_read;
    summary.rows_rejected += st.rejected;
    summary.blank_lines += st.blank;
    summary.outside_trial_data += st.outside;
    summary.welded_outside_trial_data += st.welded_outside;
    summary.jetting_direct += st.jetting_direct;
    summary.supersonic_rows += st.supersonic;
    summary.mixed_rows += st.mixed;
    for (a, b) in summary.domain_exits.iter_mut().zip(st.domain_exits) {
        *a += b;
    }
    summary.non_utf8_cells += st.non_utf8_cells;
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
}

fn out_of_order_error(ctx: &Ctx<'_>, e: &OutOfOrder) -> MapError {
    MapError::Input(format!(
        "{}: row {}, field '{}': position {} mm comes after {} mm at row {}: positions must run {} along the interface\n  hint: sort the file by position, or pass --unsorted (then no lengths or segments are computed)",
        ctx.file,
        e.row,
        ctx.header.position.cell,
        fmt_short(e.pos * 1e3),
        fmt_short(e.prev_pos * 1e3),
        e.prev_row,
        if e.increasing { "upwards" } else { "downwards" }
    ))
}

fn bad_row_error(ctx: &Ctx<'_>, b: &Rejected) -> MapError {
    MapError::Input(format!(
        "{}: row {}, field '{}': {}\n  hint: --bad-rows skip skips and counts such rows; --bad-rows save:FILE sets them aside with the reason",
        ctx.file, b.row, b.field, b.reason
    ))
}
