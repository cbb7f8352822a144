//! The weld-map summary: counts, length-weighted welded fraction, segments along the interface,
//! margins in the welded zone. Fed point by point in file order, in constant memory (the stored
//! segment and run lists are capped; the totals are not).
//!
//! Length weighting: each classified point owns half the distance to each neighbour (the first
//! and last points own half the distance to their single neighbour), so the owned lengths add up
//! to the span from the first to the last position. Segment ends lie half-way between the last
//! point of one verdict and the first point of the next.

use crate::output::{sig, CAUTION};
use oblique_window::classify::Prediction;
use serde_json::{json, Map, Value};

/// Segments listed in the summary (the count and the longest one are always complete).
pub const SEGMENT_CAP: usize = 1000;
/// Samples kept for the strip plot's traces (every k-th point, k doubling as needed).
pub const SAMPLE_CAP: usize = 16_384;
/// Points kept for marking individually on the window plot.
pub const MARK_CAP: usize = 2_000;
/// Rejected rows listed in the summary.
pub const EXAMPLE_CAP: usize = 20;

/// What the summary needs of one classified point.
#[derive(Debug, Clone, Copy)]
pub struct Lite {
    /// Row (line number).
    pub row: u64,
    /// Position, m.
    pub pos: f64,
    /// Impact velocity, m/s.
    pub vp: f32,
    /// Collision angle, deg.
    pub beta: f32,
    /// Binding limit index, `u16::MAX` for none.
    pub binding: u16,
    /// Verdict index in `Prediction::ALL`.
    pub verdict: u8,
    /// Start of this row's text in the chunk's output.
    pub out_start: u32,
    /// Binding margin in its unit.
    pub margin: f64,
    /// Binding relative margin.
    pub rel: f64,
}

/// A run of points with one welded/unwelded state.
#[derive(Debug, Clone, Copy)]
pub struct Run {
    /// 0 welded, 1 unwelded.
    pub verdict: u8,
    /// Start position, m (file order).
    pub start: f64,
    /// End position, m.
    pub end: f64,
    /// First and last row.
    pub first_row: u64,
    /// See `first_row`.
    pub last_row: u64,
    /// Points in the run.
    pub points: u64,
    /// Points per verdict (an unwelded segment may mix not-welded and melted).
    pub by_verdict: [u64; 3],
}

/// A sample for the strip plot.
#[derive(Debug, Clone, Copy)]
pub struct Sample {
    /// Position, m.
    pub pos: f64,
    /// Impact velocity, m/s.
    pub vp: f32,
    /// Angle, deg.
    pub beta: f32,
}

/// Length per verdict along the interface in `COLS` equal columns from the first position,
/// exact whatever the number of points: the column width doubles (merging neighbours) whenever
/// the interface grows past the last column. Feeds the strip plot.
#[derive(Debug, Clone)]
pub struct StripAcc {
    /// First position, m.
    pub origin: f64,
    /// +1 or -1 once known.
    pub dir: f64,
    /// Column width, m (0 until the first interval of non-zero length).
    pub width: f64,
    /// Length per verdict in each column, m.
    pub cols: Vec<[f64; 3]>,
}

impl StripAcc {
    /// Columns kept.
    pub const COLS: usize = 4096;

    fn new(origin: f64) -> Self {
        Self {
            origin,
            dir: 0.0,
            width: 0.0,
            cols: vec![[0.0; 3]; Self::COLS],
        }
    }

    /// Add the interval between positions `a` and `b` (file order) with a verdict.
    fn add(&mut self, a: f64, b: f64, verdict: usize) {
        if a == b {
            return;
        }
        if self.dir == 0.0 {
            self.dir = (b - a).signum();
        }
        let da = (a - self.origin) * self.dir;
        let db = (b - self.origin) * self.dir;
        if self.width == 0.0 {
            self.width = (db - da).abs().max(f64::MIN_POSITIVE) / 4.0;
        }
        while db.max(da) > self.width * Self::COLS as f64 {
            for i in 0..Self::COLS / 2 {
                let (l, r) = (self.cols[2 * i], self.cols[2 * i + 1]);
                self.cols[i] = [l[0] + r[0], l[1] + r[1], l[2] + r[2]];
            }
            for c in &mut self.cols[Self::COLS / 2..] {
                *c = [0.0; 3];
            }
            self.width *= 2.0;
        }
        let (lo, hi) = if da <= db { (da, db) } else { (db, da) };
        let last = Self::COLS - 1;
        let i0 = ((lo / self.width).floor().max(0.0) as usize).min(last);
        let i1 = ((hi / self.width).floor().max(0.0) as usize).min(last);
        for i in i0..=i1 {
            let c0 = i as f64 * self.width;
            let overlap = (hi.min(c0 + self.width) - lo.max(c0)).max(0.0);
            self.cols[i][verdict] += overlap;
        }
    }
}

/// Exact 2-D histogram over (Vp, beta): beta in 0.25 deg bins over (0, 90); Vp bins start at
/// 2 m/s wide and double (merging pairs) whenever a point falls beyond the last bin.
#[derive(Debug, Clone)]
pub struct Histogram {
    /// Vp bin width, m/s.
    pub dv: f64,
    /// Counts, `[iv * NB + ib]`.
    pub counts: Vec<u64>,
}

impl Histogram {
    /// Vp bins.
    pub const NV: usize = 512;
    /// Angle bins.
    pub const NB: usize = 360;
    /// Angle bin width, deg.
    pub const DB: f64 = 0.25;

    fn new() -> Self {
        Self {
            dv: 2.0,
            counts: vec![0; Self::NV * Self::NB],
        }
    }

    fn add(&mut self, vp: f64, beta: f64) {
        while vp >= self.dv * Self::NV as f64 {
            let mut merged = vec![0u64; Self::NV * Self::NB];
            for iv in 0..Self::NV {
                for ib in 0..Self::NB {
                    merged[(iv / 2) * Self::NB + ib] += self.counts[iv * Self::NB + ib];
                }
            }
            self.counts = merged;
            self.dv *= 2.0;
        }
        let iv = ((vp / self.dv) as usize).min(Self::NV - 1);
        let ib = ((beta / Self::DB) as usize).min(Self::NB - 1);
        self.counts[iv * Self::NB + ib] += 1;
    }
}

/// A rejected row.
#[derive(Debug, Clone)]
pub struct Rejected {
    /// Row (line number).
    pub row: u64,
    /// The field (header cell), or a word in parentheses for the whole row.
    pub field: String,
    /// Why.
    pub reason: String,
    /// Its position, m, when that cell could be read (it places the row along the interface).
    pub pos: Option<f64>,
}

/// Per-limit facts, in `Classifier::limits` order.
#[derive(Debug, Clone)]
pub struct LimitStat {
    /// Label.
    pub label: String,
    /// Short id used in the per-row `binding` column.
    pub id: String,
    /// The margin's column in the map (`--all-columns`), unit included.
    pub column: String,
    /// Unit of the margin (deg, m/s, Pa).
    pub unit: &'static str,
    /// `criterion` or `boundary`.
    pub kind: &'static str,
    /// A velocity ceiling (the melting limit, or a boundary with the weld below or left of it).
    pub ceiling: bool,
    /// Smallest margin among welded rows, and its row.
    pub welded_min: Option<(f64, u64)>,
    /// Rows outside the window with this binding limit: not welded, melted.
    pub unwelded_binding: [u64; 2],
}

/// The streaming summary.
pub struct Summary {
    /// Positions may be in any order (no lengths).
    pub unsorted: bool,
    /// Rows with data (blank lines excluded).
    pub rows_read: u64,
    /// Rows classified.
    pub rows_classified: u64,
    /// Rows rejected.
    pub rows_rejected: u64,
    /// Blank lines (not rows).
    pub blank_lines: u64,
    /// Verdict counts in `Prediction::ALL` order.
    pub counts: [u64; 3],
    /// Per-limit facts.
    pub limits: Vec<LimitStat>,
    /// Rows outside the span of some user boundary.
    pub outside_trial_data: u64,
    /// Welded rows among them: welded by the model limits and the boundaries that do span them,
    /// while some boundary is silent there.
    pub welded_outside_trial_data: u64,
    /// Rows whose jetting test was solved directly.
    pub jetting_direct: u64,
    /// First rejected rows.
    pub examples: Vec<Rejected>,
    /// +1 increasing, -1 decreasing, 0 not yet known.
    pub direction: f64,
    first_pos: Option<f64>,
    prev: Option<(f64, u8, u64)>,
    /// Start of the previous point's owned interval.
    prev_boundary: f64,
    /// Owned length per verdict, m.
    pub length_by_verdict: [f64; 3],
    /// Length between classified rows that had rejected rows between them: no verdict there.
    pub length_unclassified: f64,
    /// Rejected rows came after the previous classified row (set by `reject`).
    pub pending_gap: bool,
    /// Rejected rows before the first classified row: how many, and the first readable
    /// position among them.
    lead: (u64, Option<f64>),
    /// Rejected rows since the last classified row: how many, and the last readable position.
    trail: (u64, Option<f64>),
    /// Rejected rows before the first or after the last classified row whose position could not
    /// be read or lies on the wrong side: the interface's end there is not known.
    pub unplaced_end_rows: (u64, u64),
    /// Where the interface ends (m) when rejected rows with readable positions extend it.
    end_override: Option<f64>,
    /// Strip accumulator (only when asked for).
    pub strip: Option<StripAcc>,
    want_strip: bool,
    cur_seg: Option<Run>,
    /// Stored welded/unwelded segments.
    pub segments: Vec<Run>,
    /// `--min-segment`, m (0: off).
    pub min_segment: f64,
    /// The run being merged (`--min-segment`).
    merged: Option<Run>,
    /// Short runs waiting for a long run to join (`--min-segment`).
    held: Vec<Run>,
    /// Segments counted, welded and unwelded.
    pub segments_total: [u64; 2],
    /// Where the first welded segment starts and the last one ends, m (the unbonded ends run
    /// from the interface's ends to these, through any stretch without a verdict).
    pub first_weld_start: Option<f64>,
    /// See `first_weld_start`.
    pub last_weld_end: Option<f64>,
    /// Length without a verdict before the first welded segment and after the last one, m.
    pub no_verdict_at_ends: (f64, f64),
    /// Stretches without a verdict (rejected rows between classified ones), m, file order; at
    /// most `GAP_CAP` kept.
    pub gaps: Vec<(f64, f64)>,
    /// Stretches without a verdict, all counted.
    pub gaps_total: u64,
    /// The longest welded segment.
    pub longest_welded: Option<Run>,
    /// Smallest binding relative margin among welded rows: (rel, limit, margin, row, pos).
    pub smallest: Option<(f64, u16, f64, u64, f64)>,
    /// Strip samples and their stride.
    pub samples: Vec<Sample>,
    stride: u64,
    seen: u64,
    /// Window plot histogram (only when asked for).
    pub histogram: Option<Histogram>,
    /// First points for marking on the window plot.
    pub marks: Vec<(f32, f32, u8)>,
    /// Lines starting with '#' before the header (skipped).
    pub comment_lines: u64,
    /// The criterion constants used: (name, flag, value, the window's value).
    pub constants: Vec<(&'static str, &'static str, f64, f64)>,
    /// Warnings about the data as a whole (implausible magnitudes: a unit wrong in the header?).
    pub warnings: Vec<String>,
    /// Largest Vp and angle seen.
    pub max_vp: f64,
    /// See `max_vp`.
    pub max_beta: f64,
}

/// A position going backwards along the interface.
#[derive(Debug)]
pub struct OutOfOrder {
    /// The offending row.
    pub row: u64,
    /// Its position, m.
    pub pos: f64,
    /// The previous classified row.
    pub prev_row: u64,
    /// Its position, m.
    pub prev_pos: f64,
    /// Whether the file was running upwards.
    pub increasing: bool,
}

impl Summary {
    /// A fresh summary for these limits.
    pub fn new(limits: Vec<LimitStat>, unsorted: bool, plots: (bool, bool)) -> Self {
        Self {
            unsorted,
            rows_read: 0,
            rows_classified: 0,
            rows_rejected: 0,
            blank_lines: 0,
            counts: [0; 3],
            limits,
            outside_trial_data: 0,
            welded_outside_trial_data: 0,
            jetting_direct: 0,
            examples: Vec::new(),
            direction: 0.0,
            first_pos: None,
            prev: None,
            prev_boundary: 0.0,
            length_by_verdict: [0.0; 3],
            length_unclassified: 0.0,
            pending_gap: false,
            lead: (0, None),
            trail: (0, None),
            unplaced_end_rows: (0, 0),
            end_override: None,
            strip: None,
            want_strip: plots.0,
            cur_seg: None,
            segments: Vec::new(),
            min_segment: 0.0,
            merged: None,
            held: Vec::new(),
            segments_total: [0; 2],
            first_weld_start: None,
            last_weld_end: None,
            no_verdict_at_ends: (0.0, 0.0),
            gaps: Vec::new(),
            gaps_total: 0,
            longest_welded: None,
            smallest: None,
            samples: Vec::new(),
            stride: if plots.0 { 1 } else { 0 },
            seen: 0,
            histogram: plots.1.then(Histogram::new),
            marks: Vec::new(),
            comment_lines: 0,
            constants: Vec::new(),
            warnings: Vec::new(),
            max_vp: 0.0,
            max_beta: 0.0,
        }
    }

    /// Add one classified point, in file order.
    ///
    /// # Errors
    /// The position goes backwards (sorted mode only).
    pub fn push(&mut self, p: &Lite) -> Result<(), OutOfOrder> {
        if !self.unsorted {
            self.along(p)?;
        }
        self.rows_classified += 1;
        let v = p.verdict as usize;
        self.counts[v] += 1;
        if v == 0 {
            let better = match self.smallest {
                Some((rel, ..)) => p.rel.total_cmp(&rel) == std::cmp::Ordering::Less,
                None => true,
            };
            if better && p.binding != u16::MAX {
                self.smallest = Some((p.rel, p.binding, p.margin, p.row, p.pos));
            }
        }
        self.max_vp = self.max_vp.max(f64::from(p.vp));
        self.max_beta = self.max_beta.max(f64::from(p.beta));
        if let Some(h) = &mut self.histogram {
            h.add(f64::from(p.vp), f64::from(p.beta));
        }
        if self.marks.len() < MARK_CAP {
            self.marks.push((p.vp, p.beta, p.verdict));
        }
        if self.stride > 0 {
            if self.seen.is_multiple_of(self.stride) {
                self.samples.push(Sample {
                    pos: p.pos,
                    vp: p.vp,
                    beta: p.beta,
                });
                if self.samples.len() >= SAMPLE_CAP {
                    // Keep every other sample and double the stride.
                    let kept: Vec<Sample> = self.samples.iter().step_by(2).copied().collect();
                    self.samples = kept;
                    self.stride *= 2;
                }
            }
            self.seen += 1;
        }
        Ok(())
    }

    /// Note a rejected row (in file order, before the classified row that follows it): the
    /// stretch up to the next classified row has no verdict.
    pub fn reject(&mut self, pos: Option<f64>) {
        self.pending_gap = true;
        if self.prev.is_none() {
            self.lead.0 += 1;
            if self.lead.1.is_none() {
                self.lead.1 = pos.filter(|x| x.is_finite());
            }
        } else {
            self.trail.0 += 1;
            if let Some(x) = pos.filter(|x| x.is_finite()) {
                self.trail.1 = Some(x);
            }
        }
    }

    fn along(&mut self, p: &Lite) -> Result<(), OutOfOrder> {
        let x = p.pos;
        if self.trail.0 > 0 {
            self.trail = (0, None);
        }
        let Some((px, pv, prow)) = self.prev else {
            // Rejected rows before the first classified row are settled in `finish`, once the
            // direction is known; they make no stretch between classified rows.
            self.pending_gap = false;
            self.first_pos = Some(x);
            self.prev = Some((x, p.verdict, p.row));
            self.prev_boundary = x;
            self.open(p, x);
            return Ok(());
        };
        let d = x - px;
        if self.direction == 0.0 && d != 0.0 {
            self.direction = d.signum();
        }
        if d * self.direction < 0.0 {
            return Err(OutOfOrder {
                row: p.row,
                pos: x,
                prev_row: prow,
                prev_pos: px,
                increasing: self.direction > 0.0,
            });
        }
        if std::mem::take(&mut self.pending_gap) {
            // Rows between px and x were rejected: that stretch has no verdict. The previous
            // point's share ends at px, this point's starts at x, and the segment breaks.
            self.length_by_verdict[pv as usize] += (px - self.prev_boundary).abs();
            if let Some(st) = &mut self.strip {
                st.add(self.prev_boundary, px, pv as usize);
            }
            let gap = (x - px).abs();
            self.length_unclassified += gap;
            self.close_segment(px);
            self.flush_runs();
            // Not welded as far as anyone knows: it belongs to an unbonded end if no welded
            // segment lies beyond it on that side.
            if self.first_weld_start.is_none() {
                self.no_verdict_at_ends.0 += gap;
            }
            self.no_verdict_at_ends.1 += gap;
            self.gaps_total += 1;
            if self.gaps.len() < GAP_CAP {
                self.gaps.push((px, x));
            }
            self.cur_seg = Some(new_run(u8::from(p.verdict != 0), x, p));
            self.prev_boundary = x;
            self.prev = Some((x, p.verdict, p.row));
            return Ok(());
        }
        let boundary = 0.5 * (px + x);
        self.length_by_verdict[pv as usize] += (boundary - self.prev_boundary).abs();
        if let Some(st) = &mut self.strip {
            st.add(self.prev_boundary, boundary, pv as usize);
        }
        self.prev_boundary = boundary;
        let state = u8::from(p.verdict != 0);
        let same_seg = self.cur_seg.is_some_and(|s| s.verdict == state);
        if same_seg {
            if let Some(s) = &mut self.cur_seg {
                s.last_row = p.row;
                s.points += 1;
                s.by_verdict[p.verdict as usize] += 1;
            }
        } else {
            self.close_segment(boundary);
            self.cur_seg = Some(new_run(state, boundary, p));
        }
        self.prev = Some((x, p.verdict, p.row));
        Ok(())
    }

    fn open(&mut self, p: &Lite, x: f64) {
        self.cur_seg = Some(new_run(u8::from(p.verdict != 0), x, p));
        if self.want_strip {
            self.strip = Some(StripAcc::new(x));
        }
    }

    fn close_segment(&mut self, end: f64) {
        if let Some(mut s) = self.cur_seg.take() {
            s.end = end;
            if self.min_segment > 0.0 {
                self.merge_run(s);
            } else {
                self.commit_segment(s);
            }
        }
    }

    /// With `--min-segment L`: a run shorter than L joins the run before it (or, with none
    /// before it, the next run at least L long); runs of one state then join. Runs on either
    /// side of a stretch without a verdict never join (`flush_runs` runs there).
    fn merge_run(&mut self, s: Run) {
        if (s.end - s.start).abs() < self.min_segment {
            match &mut self.merged {
                Some(p) => extend_run(p, &s),
                None => self.held.push(s),
            }
            return;
        }
        let mut s = s;
        if !self.held.is_empty() {
            let mut lead = self.held.remove(0);
            for h in self.held.drain(..) {
                extend_run(&mut lead, &h);
            }
            extend_run(&mut lead, &s);
            lead.verdict = s.verdict;
            s = lead;
        }
        match self.merged.take() {
            Some(mut p) if p.verdict == s.verdict => {
                extend_run(&mut p, &s);
                self.merged = Some(p);
            }
            Some(p) => {
                self.commit_segment(p);
                self.merged = Some(s);
            }
            None => self.merged = Some(s),
        }
    }

    /// Commit what `merge_run` holds (at a stretch without a verdict, and at the end); short
    /// runs with no long run to join stay as they are.
    fn flush_runs(&mut self) {
        if let Some(p) = self.merged.take() {
            self.commit_segment(p);
        }
        for h in std::mem::take(&mut self.held) {
            self.commit_segment(h);
        }
    }

    fn commit_segment(&mut self, s: Run) {
        {
            self.segments_total[s.verdict as usize] += 1;
            if s.verdict == 0 {
                if self.first_weld_start.is_none() {
                    self.first_weld_start = Some(s.start);
                }
                self.last_weld_end = Some(s.end);
                self.no_verdict_at_ends.1 = 0.0;
                let longer = match self.longest_welded {
                    Some(l) => (s.end - s.start).abs() > (l.end - l.start).abs(),
                    None => true,
                };
                if longer {
                    self.longest_welded = Some(s);
                }
            }
            if self.segments.len() < SEGMENT_CAP {
                self.segments.push(s);
            }
        }
    }

    /// Close the last run and segment after the last point, and place the rejected rows
    /// before the first and after the last classified row: with a readable position on the
    /// right side, the interface runs to it without a verdict there (counted in the unbonded
    /// end); otherwise that end of the interface is unknown, and said so.
    pub fn finish(&mut self) {
        if let Some((px, pv, _)) = self.prev {
            self.length_by_verdict[pv as usize] += (px - self.prev_boundary).abs();
            if let Some(st) = &mut self.strip {
                st.add(self.prev_boundary, px, pv as usize);
            }
            self.prev_boundary = px;
            self.close_segment(px);
            self.flush_runs();
        }
        if self.unsorted {
            return;
        }
        let (Some(first), Some((last, _, _))) = (self.first_pos, self.prev) else {
            return;
        };
        // The direction of travel; with a single classified position, the rejected rows' own.
        let dir = if self.direction != 0.0 {
            self.direction
        } else {
            match (self.lead.1, self.trail.1) {
                (Some(a), _) if a != first => (first - a).signum(),
                (_, Some(b)) if b != last => (b - last).signum(),
                _ => 0.0,
            }
        };
        self.place_end(true, first, dir);
        self.place_end(false, last, dir);
        self.pending_gap = false;
    }

    /// Warn when every classified point has an implausible magnitude, the usual sign of a unit
    /// that is wrong in the header. Thresholds are common practice, not physics: impact welding
    /// runs at impact velocities of about 100-1000 m/s and collision angles of a few degrees
    /// up to about 30 deg.
    pub fn check_plausibility(&mut self, velocity_cell: &str, angle_cell: &str) {
        if self.rows_classified == 0 {
            return;
        }
        if self.max_vp < 50.0 {
            self.warnings.push(format!(
                "every impact velocity is below 50 m/s (the largest is {:.3} m/s), far below any impact welding process (common practice: about 100-1000 m/s): is the unit in the header right ('{velocity_cell}'; e.g. velocity[km/s])?",
                self.max_vp
            ));
        }
        if self.max_vp > 5000.0 {
            self.warnings.push(format!(
                "impact velocities reach {:.0} m/s, above any impact welding process (common practice: up to about 1000 m/s): is the unit in the header right ('{velocity_cell}'), and are those rows real?",
                self.max_vp
            ));
        }
        if !self.unsorted && self.rows_classified > 1 && self.direction == 0.0 {
            self.warnings.push(
                "every classified row has the same position: no lengths can be measured (is the right column read as the position?)".into(),
            );
        }
        if let Some(&(_, flag, k, _)) = self.constants.iter().find(|c| c.0 == "deribas_k") {
            if !(0.6..=1.2).contains(&k) {
                self.warnings.push(format!(
                    "Deribas k {} ({flag}) is outside 0.6 (carefully cleaned surfaces) to 1.2, the range the physics notes give (from memory)",
                    super::pipeline::fmt_g(k)
                ));
            }
        }
        if self.max_beta < 1.0 {
            self.warnings.push(format!(
                "every collision angle is below 1 deg (the largest is {:.4} deg; common practice: a few degrees up to about 30 deg): is the unit in the header right ('{angle_cell}'; angle[rad] for radians)?",
                self.max_beta
            ));
        }
    }

    /// Place the rejected rows before the first (`start`) or after the last classified row,
    /// whose outermost classified position is `edge`, given the direction of travel.
    fn place_end(&mut self, start: bool, edge: f64, dir: f64) {
        let (count, pos) = if start { self.lead } else { self.trail };
        if count == 0 {
            return;
        }
        // The rejected position must lie beyond the edge, outwards.
        let outwards = if start { -dir } else { dir };
        let Some(x) = pos.filter(|&x| dir != 0.0 && (x - edge) * outwards > 0.0) else {
            if start {
                self.unplaced_end_rows.0 = count;
            } else {
                self.unplaced_end_rows.1 = count;
            }
            return;
        };
        let gap = (x - edge).abs();
        self.length_unclassified += gap;
        // Nothing welded: the whole interface is one unbonded stretch, seen from either end.
        let both = self.first_weld_start.is_none();
        if start || both {
            self.no_verdict_at_ends.0 += gap;
        }
        if !start || both {
            self.no_verdict_at_ends.1 += gap;
        }
        self.gaps_total += 1;
        if start {
            self.first_pos = Some(x);
            if self.gaps.len() < GAP_CAP {
                self.gaps.insert(0, (x, edge));
            }
        } else {
            self.end_override = Some(x);
            if self.gaps.len() < GAP_CAP {
                self.gaps.push((edge, x));
            }
        }
    }

    /// The interface, m: from the first to the last classified position, extended to the
    /// readable positions of rejected rows before the first or after the last one.
    pub fn span(&self) -> Option<(f64, f64)> {
        Some((
            self.first_pos?,
            self.end_override.or(self.prev.map(|p| p.0))?,
        ))
    }

    /// Welded fraction and its basis.
    pub fn welded_fraction(&self) -> (Option<f64>, &'static str) {
        if !self.unsorted {
            let total: f64 = self.length_by_verdict.iter().sum::<f64>() + self.length_unclassified;
            if total > 0.0 {
                return (Some(self.length_by_verdict[0] / total), "length");
            }
        }
        if self.rows_classified > 0 {
            (
                Some(self.counts[0] as f64 / self.rows_classified as f64),
                "count",
            )
        } else {
            (None, "none")
        }
    }

    /// The unbonded length at each end: from the interface's end to the nearest welded
    /// segment, stretches without a verdict included (they are not known to be welded); the
    /// whole interface at both ends when nothing is welded.
    fn unbonded_ends(&self) -> (Option<f64>, Option<f64>) {
        if self.unsorted {
            return (None, None);
        }
        let Some((first, last)) = self.span() else {
            return (None, None);
        };
        match (self.first_weld_start, self.last_weld_end) {
            (Some(a), Some(b)) => (Some((a - first).abs()), Some((last - b).abs())),
            _ => {
                let all = (last - first).abs();
                (Some(all), Some(all))
            }
        }
    }
}

/// Extend run `a` by the run `b` that follows it (the state stays `a`'s).
fn extend_run(a: &mut Run, b: &Run) {
    a.end = b.end;
    a.last_row = b.last_row;
    a.points += b.points;
    for (x, y) in a.by_verdict.iter_mut().zip(b.by_verdict) {
        *x += y;
    }
}

fn new_run(verdict: u8, start: f64, p: &Lite) -> Run {
    let mut by_verdict = [0; 3];
    by_verdict[p.verdict as usize] = 1;
    Run {
        verdict,
        start,
        end: start,
        first_row: p.row,
        last_row: p.row,
        points: 1,
        by_verdict,
    }
}

/// Stretches without a verdict kept for the strip plot (all are counted).
pub const GAP_CAP: usize = 2000;

/// Margin in a display unit: Pa shown in GPa.
pub fn display_margin(margin: f64, unit: &str) -> (f64, &'static str) {
    match unit {
        "Pa" => (margin / 1e9, "GPa"),
        "deg" => (margin, "deg"),
        _ => (margin, "m/s"),
    }
}

fn segment_json(s: &Run) -> Value {
    json!({
        "kind": if s.verdict == 0 { "welded" } else { "unwelded" },
        "start_m": sig(s.start),
        "end_m": sig(s.end),
        "length_m": sig((s.end - s.start).abs()),
        "first_row": s.first_row,
        "last_row": s.last_row,
        "points": s.points,
        "verdict_counts": verdict_map(&s.by_verdict),
    })
}

fn verdict_map(c: &[u64; 3]) -> Value {
    let mut m = Map::new();
    for (p, n) in Prediction::ALL.iter().zip(c) {
        m.insert(p.as_str().into(), json!(n));
    }
    Value::Object(m)
}

/// Facts about the run that go into the summary besides the counts.
pub struct RunInfo<'a> {
    /// Pair name.
    pub pair: &'a str,
    /// Convention.
    pub convention: &'a str,
    /// `impact` or `collision`.
    pub velocity_kind: &'a str,
    /// Input as given.
    pub input: &'a str,
    /// Bad-row policy as given.
    pub bad_rows: &'a str,
    /// Jetting method: `table`, `direct` or `disabled`.
    pub jetting: &'a str,
    /// Table nodes and range, when a table is used.
    pub table: Option<(usize, f64)>,
    /// Flyer/parent/thickness line.
    pub pair_line: String,
}

impl Summary {
    /// The summary as JSON (SI values; margins in their criterion unit).
    pub fn to_json(&self, info: &RunInfo<'_>) -> Value {
        let (frac, basis) = self.welded_fraction();
        let sorted = !self.unsorted;
        let span = self.span().filter(|_| sorted);
        let (u_start, u_end) = self.unbonded_ends();
        let mut o = Map::new();
        o.insert("pair".into(), json!(info.pair));
        o.insert("convention".into(), json!(info.convention));
        o.insert("velocity_kind".into(), json!(info.velocity_kind));
        o.insert("input".into(), json!(info.input));
        o.insert("rows_read".into(), json!(self.rows_read));
        o.insert("rows_classified".into(), json!(self.rows_classified));
        o.insert("rows_rejected".into(), json!(self.rows_rejected));
        o.insert("blank_lines".into(), json!(self.blank_lines));
        o.insert("comment_lines".into(), json!(self.comment_lines));
        o.insert("bad_rows".into(), json!(info.bad_rows));
        o.insert(
            "rejected_examples".into(),
            Value::Array(
                self.examples
                    .iter()
                    .map(|r| json!({"row": r.row, "field": r.field, "reason": r.reason}))
                    .collect(),
            ),
        );
        o.insert("verdict_counts".into(), verdict_map(&self.counts));
        o.insert("sorted".into(), json!(sorted));
        o.insert(
            "direction".into(),
            if !sorted {
                Value::Null
            } else if self.direction > 0.0 {
                json!("increasing")
            } else if self.direction < 0.0 {
                json!("decreasing")
            } else {
                json!("constant")
            },
        );
        o.insert("interface_start_m".into(), json!(span.map(|s| sig(s.0))));
        o.insert("interface_end_m".into(), json!(span.map(|s| sig(s.1))));
        o.insert(
            "interface_length_m".into(),
            json!(span.map(|s| sig((s.1 - s.0).abs()))),
        );
        o.insert(
            "welded_length_m".into(),
            json!(sorted.then(|| sig(self.length_by_verdict[0]))),
        );
        let mut lbv = Map::new();
        for (p, l) in Prediction::ALL.iter().zip(self.length_by_verdict) {
            lbv.insert(p.as_str().into(), sig(l));
        }
        o.insert(
            "length_by_verdict_m".into(),
            if sorted {
                Value::Object(lbv)
            } else {
                Value::Null
            },
        );
        o.insert(
            "unclassified_length_m".into(),
            json!(sorted.then(|| sig(self.length_unclassified))),
        );
        o.insert("welded_fraction".into(), json!(frac.map(sig)));
        o.insert("welded_fraction_basis".into(), json!(basis));
        o.insert(
            "segments".into(),
            if sorted {
                Value::Array(self.segments.iter().map(segment_json).collect())
            } else {
                Value::Null
            },
        );
        o.insert(
            "min_segment_m".into(),
            json!((self.min_segment > 0.0).then(|| sig(self.min_segment))),
        );
        o.insert(
            "segments_total".into(),
            json!(sorted.then(|| self.segments_total[0] + self.segments_total[1])),
        );
        o.insert(
            "welded_segments".into(),
            json!(sorted.then_some(self.segments_total[0])),
        );
        o.insert(
            "unwelded_segments".into(),
            json!(sorted.then_some(self.segments_total[1])),
        );
        o.insert(
            "segments_truncated".into(),
            json!(
                sorted && (self.segments_total[0] + self.segments_total[1]) as usize > SEGMENT_CAP
            ),
        );
        o.insert(
            "longest_welded_segment".into(),
            self.longest_welded
                .filter(|_| sorted)
                .map_or(Value::Null, |s| segment_json(&s)),
        );
        o.insert("unbonded_length_start_m".into(), json!(u_start.map(sig)));
        o.insert("unbonded_length_end_m".into(), json!(u_end.map(sig)));
        o.insert(
            "unbonded_no_verdict_start_m".into(),
            json!(sorted.then(|| sig(self.no_verdict_at_ends.0))),
        );
        o.insert(
            "unbonded_no_verdict_end_m".into(),
            json!(sorted.then(|| sig(self.no_verdict_at_ends.1))),
        );
        o.insert(
            "no_verdict_stretches".into(),
            json!(sorted.then_some(self.gaps_total)),
        );
        o.insert(
            "no_verdict".into(),
            if sorted {
                Value::Array(
                    self.gaps
                        .iter()
                        .take(SEGMENT_CAP)
                        .map(|&(a, b)| {
                            json!({"start_m": sig(a), "end_m": sig(b), "length_m": sig((b - a).abs())})
                        })
                        .collect(),
                )
            } else {
                Value::Null
            },
        );
        o.insert(
            "unplaced_end_rows".into(),
            json!({"start": self.unplaced_end_rows.0, "end": self.unplaced_end_rows.1}),
        );
        o.insert(
            "smallest_welded_margin".into(),
            match self.smallest {
                Some((rel, k, m, row, pos)) => {
                    let l = &self.limits[k as usize];
                    json!({
                        "limit": l.label,
                        "id": l.id,
                        "margin": sig(m),
                        "unit": l.unit,
                        "relative_margin": sig(rel),
                        "row": row,
                        "position_m": sig(pos),
                    })
                }
                None => Value::Null,
            },
        );
        o.insert(
            "welded_zone_min_margins".into(),
            Value::Array(
                self.limits
                    .iter()
                    .map(|l| {
                        json!({
                            "limit": l.label,
                            "id": l.id,
                            "kind": l.kind,
                            "column": l.column,
                            "margin": l.welded_min.map(|m| sig(m.0)),
                            "unit": l.unit,
                            "row": l.welded_min.map(|m| m.1),
                        })
                    })
                    .collect(),
            ),
        );
        let (mut b, mut bn, mut bm) = (Map::new(), Map::new(), Map::new());
        for l in &self.limits {
            let [n, m] = l.unwelded_binding;
            b.insert(l.label.clone(), json!(n + m));
            bn.insert(l.label.clone(), json!(n));
            bm.insert(l.label.clone(), json!(m));
        }
        o.insert("binding_counts_unwelded".into(), Value::Object(b));
        o.insert("binding_counts_not_welded".into(), Value::Object(bn));
        o.insert("binding_counts_melted".into(), Value::Object(bm));
        o.insert(
            "outside_trial_data_rows".into(),
            json!(self.outside_trial_data),
        );
        o.insert(
            "welded_outside_trial_data_rows".into(),
            json!(self.welded_outside_trial_data),
        );
        o.insert(
            "jetting".into(),
            json!({
                "method": info.jetting,
                "table_nodes": info.table.map(|t| t.0),
                "table_max_inflow_m_s": info.table.map(|t| t.1),
                "error_bound_deg": info.table.map(|_| oblique_core::jetting_table::JettingTable::ERROR_BOUND_DEG),
                "rows_solved_directly": self.jetting_direct,
            }),
        );
        let mut consts = Map::new();
        for &(name, _, value, window) in &self.constants {
            consts.insert(
                name.into(),
                json!({"value": value, "window": window, "overridden": value != window}),
            );
        }
        o.insert("constants".into(), Value::Object(consts));
        o.insert("warnings".into(), json!(self.warnings));
        o.insert("caution".into(), json!(CAUTION));
        Value::Object(o)
    }

    /// The human summary, ending with the caution line.
    pub fn to_text(&self, info: &RunInfo<'_>) -> String {
        let mut s = String::new();
        let pct = |n: u64| {
            if self.rows_classified > 0 {
                100.0 * n as f64 / self.rows_classified as f64
            } else {
                0.0
            }
        };
        s.push_str(&format!(
            "weld map: pair {} ({}); convention {}; velocity column = {}\n",
            info.pair,
            info.pair_line,
            info.convention,
            if info.velocity_kind == "impact" {
                "impact velocity Vp"
            } else {
                "collision-point velocity Vc"
            }
        ));
        s.push_str(&format!(
            "rows: {} read, {} classified, {} rejected (--bad-rows {}){}{}\n",
            self.rows_read,
            self.rows_classified,
            self.rows_rejected,
            info.bad_rows,
            if self.blank_lines > 0 {
                format!("; {} blank line(s) ignored", self.blank_lines)
            } else {
                String::new()
            },
            if self.comment_lines > 0 {
                format!(
                    "; {} comment line(s) before the header skipped",
                    self.comment_lines
                )
            } else {
                String::new()
            }
        ));
        for r in self.examples.iter().take(5) {
            s.push_str(&format!(
                "  rejected row {}: field '{}': {}\n",
                r.row, r.field, r.reason
            ));
        }
        if self.rows_rejected as usize > self.examples.len().min(5) {
            s.push_str(&format!(
                "  ({} more rejected row(s); --summary-json lists the first {EXAMPLE_CAP})\n",
                self.rows_rejected as usize - self.examples.len().min(5)
            ));
        }
        s.push_str(&format!(
            "verdicts: welded {} ({:.1} %), not-welded {} ({:.1} %), melted {} ({:.1} %)\n",
            self.counts[0],
            pct(self.counts[0]),
            self.counts[1],
            pct(self.counts[1]),
            self.counts[2],
            pct(self.counts[2])
        ));
        let (frac, basis) = self.welded_fraction();
        if self.unsorted {
            s.push_str("positions not used (--unsorted): no lengths or segments, which need the points in order along the interface\n");
            if let Some(f) = frac {
                s.push_str(&format!("welded fraction {:.1} % of the rows\n", 100.0 * f));
            }
        } else if let Some((a, b)) = self.span() {
            s.push_str(&format!(
                "interface: {:.3} to {:.3} mm ({:.3} mm); welded {:.3} mm = {} ({})\n",
                a * 1e3,
                b * 1e3,
                (b - a).abs() * 1e3,
                self.length_by_verdict[0] * 1e3,
                frac.map_or("-".into(), |f| format!("{:.1} %", 100.0 * f)),
                if basis == "length" {
                    "length-weighted: each point owns half the distance to its neighbours"
                } else {
                    "by count: the positions span no length"
                }
            ));
            if self.length_unclassified > 0.0 {
                s.push_str(&format!(
                    "no verdict over {:.3} mm where rows were rejected (counted in the interface, never as welded)\n",
                    self.length_unclassified * 1e3
                ));
            }
            s.push_str(&format!(
                "segments{}: {} welded, {} unwelded",
                if self.min_segment > 0.0 {
                    format!(
                        " (runs shorter than {:.3} mm joined to their neighbours, --min-segment)",
                        self.min_segment * 1e3
                    )
                } else {
                    String::new()
                },
                self.segments_total[0],
                self.segments_total[1]
            ));
            if let Some(l) = self.longest_welded {
                s.push_str(&format!(
                    "; longest welded {:.3} to {:.3} mm ({:.3} mm, rows {}-{})",
                    l.start * 1e3,
                    l.end * 1e3,
                    (l.end - l.start).abs() * 1e3,
                    l.first_row,
                    l.last_row
                ));
            }
            s.push('\n');
            let (us, ue) = self.unbonded_ends();
            let (ns, ne) = self.no_verdict_at_ends;
            if self.first_weld_start.is_none() {
                s.push_str(&format!(
                    "unbonded: the whole classified interface, {:.3} mm (no welded point)\n",
                    us.unwrap_or(0.0) * 1e3
                ));
            } else {
                s.push_str(&format!(
                    "unbonded at the start: {:.3} mm; at the end: {:.3} mm",
                    us.unwrap_or(0.0) * 1e3,
                    ue.unwrap_or(0.0) * 1e3
                ));
                if ns > 0.0 || ne > 0.0 {
                    s.push_str(&format!(
                        " ({:.3} mm and {:.3} mm of them without verdict: rejected rows, not known to be welded)",
                        ns * 1e3,
                        ne * 1e3
                    ));
                }
                s.push('\n');
            }
            if self.gaps_total > 0 {
                let shown: Vec<String> = self
                    .gaps
                    .iter()
                    .take(5)
                    .map(|&(a, b)| format!("{:.3}-{:.3} mm", a.min(b) * 1e3, a.max(b) * 1e3))
                    .collect();
                s.push_str(&format!(
                    "no verdict at {}{} (rejected rows); segments break there: a welded segment is never assumed to run through a rejected row\n",
                    shown.join(", "),
                    if self.gaps_total > 5 {
                        format!(" and {} more", self.gaps_total - 5)
                    } else {
                        String::new()
                    }
                ));
            }
            let (us_rows, ue_rows) = self.unplaced_end_rows;
            if us_rows > 0 {
                s.push_str(&format!(
                    "{us_rows} rejected row(s) before the first classified row have no readable position: where the interface starts is not known, and its start may be unbonded\n"
                ));
            }
            if ue_rows > 0 {
                s.push_str(&format!(
                    "{ue_rows} rejected row(s) after the last classified row have no readable position: where the interface ends is not known, and its end may be unbonded\n"
                ));
            }
        }
        match self.smallest {
            Some((_, k, m, row, pos)) => {
                let l = &self.limits[k as usize];
                let (v, u) = display_margin(m, l.unit);
                s.push_str(&format!(
                    "smallest margin in the welded zone: {} {:+.3} {} at row {} (position {:.3} mm)\n",
                    l.label,
                    v,
                    u,
                    row,
                    pos * 1e3
                ));
            }
            None if self.counts[0] > 0 => {
                s.push_str("smallest margin in the welded zone: no decisive limit is enabled\n")
            }
            None => s.push_str("no welded point\n"),
        }
        for (k, what) in [(0usize, "not-welded"), (1, "melted")] {
            let mut bind: Vec<(&LimitStat, u64)> = self
                .limits
                .iter()
                .filter(|l| l.unwelded_binding[k] > 0)
                .map(|l| (l, l.unwelded_binding[k]))
                .collect();
            bind.sort_by_key(|b| std::cmp::Reverse(b.1));
            if !bind.is_empty() {
                let parts: Vec<String> = bind
                    .iter()
                    .map(|(l, n)| format!("{} {}", l.label, n))
                    .collect();
                s.push_str(&format!(
                    "binding (most violated) limits of the {what} rows: {}\n",
                    parts.join(", ")
                ));
            }
        }
        if self
            .limits
            .iter()
            .any(|l| l.ceiling && l.unwelded_binding[0] > 0)
        {
            s.push_str("  (a not-welded row bound by a ceiling also fails a lower limit: the binding limit is the most violated one, not the only one; the map's failing_limits column lists them all)\n");
        }
        if self.outside_trial_data > 0 {
            s.push_str(&format!(
                "{} row(s) lie outside the span of a user boundary (outside the trial data; not extrapolated); {} of them are welded there by the model limits and the boundaries that do span them\n",
                self.outside_trial_data, self.welded_outside_trial_data
            ));
        }
        match (info.jetting, info.table) {
            ("table", None) => s.push_str(&format!(
                "jetting: no row had supersonic inflow, so no table was needed (critical angle exactly zero); {} row(s) solved directly\n",
                self.jetting_direct
            )),
            ("table", Some((n, v))) => s.push_str(&format!(
                "jetting: critical angle from a {n}x{n} table up to {:.0} km/s (within {} deg of the direct solve); {} row(s) solved directly (near the limit or outside the table)\n",
                v / 1e3,
                oblique_core::jetting_table::JettingTable::ERROR_BOUND_DEG,
                self.jetting_direct
            )),
            ("direct", _) => s.push_str(&format!(
                "jetting: solved directly for every row with supersonic inflow (--exact-jetting): {} row(s); the subsonic ones need no solve\n",
                self.jetting_direct
            )),
            _ => s.push_str("jetting: criterion disabled in the window\n"),
        }
        if !self.constants.is_empty() {
            let parts: Vec<String> = self
                .constants
                .iter()
                .map(|&(name, flag, value, window)| {
                    if value == window {
                        format!("{name} {}", super::pipeline::fmt_g(value))
                    } else {
                        format!(
                            "{name} {} (set by {flag}; the window's is {})",
                            super::pipeline::fmt_g(value),
                            super::pipeline::fmt_g(window)
                        )
                    }
                })
                .collect();
            s.push_str(&format!("constants: {}\n", parts.join(", ")));
        }
        for w in &self.warnings {
            s.push_str(&format!("warning: {w}\n"));
        }
        s.push_str(CAUTION);
        s.push('\n');
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn lite(row: u64, pos_mm: f64, verdict: u8) -> Lite {
        Lite {
            row,
            pos: pos_mm * 1e-3,
            vp: 400.0,
            beta: 10.0,
            binding: 0,
            verdict,
            out_start: 0,
            margin: 1.0,
            rel: 0.1 * row as f64,
        }
    }

    fn limits() -> Vec<LimitStat> {
        vec![LimitStat {
            label: "deribas-lower".into(),
            id: "deribas-lower".into(),
            column: "margin_deribas_lower[deg]".into(),
            unit: "deg",
            kind: "criterion",
            welded_min: None,
            unwelded_binding: [0; 2],
            ceiling: false,
        }]
    }

    #[test]
    fn owned_lengths_and_segments() {
        // Positions 0, 1, 2, 4, 6 mm; verdicts N W W M W.
        let mut s = Summary::new(limits(), false, (false, false));
        for (row, (x, v)) in [(0.0, 1), (1.0, 0), (2.0, 0), (4.0, 2), (6.0, 0)]
            .into_iter()
            .enumerate()
        {
            s.push(&lite(row as u64 + 2, x, v)).unwrap();
        }
        s.finish();
        // Owned: 0.5, 1, 1.5, 2, 1 mm.
        let l = s.length_by_verdict.map(|v| v * 1e3);
        assert!((l[0] - 3.5).abs() < 1e-12, "{l:?}");
        assert!((l[1] - 0.5).abs() < 1e-12);
        assert!((l[2] - 2.0).abs() < 1e-12);
        assert_eq!(s.segments_total, [2, 2]);
        let longest = s.longest_welded.unwrap();
        assert!((longest.start * 1e3 - 0.5).abs() < 1e-12);
        assert!((longest.end * 1e3 - 3.0).abs() < 1e-12);
        let (us, ue) = s.unbonded_ends();
        assert!((us.unwrap() * 1e3 - 0.5).abs() < 1e-12);
        assert_eq!(ue, Some(0.0));
        let (f, basis) = s.welded_fraction();
        assert_eq!(basis, "length");
        assert!((f.unwrap() - 3.5 / 6.0).abs() < 1e-12);
        assert_eq!(s.segments.len(), 4);
        // Smallest relative margin among welded rows: row 3.
        assert_eq!(s.smallest.unwrap().3, 3);
    }

    /// A rejected row inside the unbonded start does not shorten it: the unbonded ends run to
    /// the nearest welded segment, the stretch without verdict included; a rejected row inside a
    /// welded stretch breaks the segment.
    #[test]
    fn stretches_without_verdict_stay_in_the_unbonded_ends() {
        let mut s = Summary::new(limits(), false, (true, false));
        // mm: 0 not, [gap], 1 not, 2 welded, 3 welded, [gap], 4 welded, 5 not, [gap], 6 not.
        let pts = [
            (0.0, 1, false),
            (1.0, 1, true),
            (2.0, 0, false),
            (3.0, 0, false),
            (4.0, 0, true),
            (5.0, 1, false),
            (6.0, 1, true),
        ];
        for (row, (x, v, gap_before)) in pts.into_iter().enumerate() {
            if gap_before {
                s.reject(None);
            }
            s.push(&lite(row as u64 + 2, x, v)).unwrap();
        }
        s.finish();
        let (us, ue) = s.unbonded_ends();
        // First welded segment starts half-way between 1 and 2 mm; the last ends at 4.5 mm.
        assert!((us.unwrap() * 1e3 - 1.5).abs() < 1e-12, "{us:?}");
        assert!((ue.unwrap() * 1e3 - 1.5).abs() < 1e-12, "{ue:?}");
        let (ns, ne) = s.no_verdict_at_ends;
        assert!((ns * 1e3 - 1.0).abs() < 1e-12, "{ns}");
        assert!((ne * 1e3 - 1.0).abs() < 1e-12, "{ne}");
        assert_eq!(s.gaps_total, 3);
        assert_eq!(s.gaps.len(), 3);
        // The welded stretch 1.5-4.5 mm is broken by the gap between 3 and 4 mm.
        let longest = s.longest_welded.unwrap();
        assert!((longest.start * 1e3 - 1.5).abs() < 1e-12);
        assert!((longest.end * 1e3 - 3.0).abs() < 1e-12);
        assert_eq!(s.segments_total[0], 2);
        // Nothing welded: both ends are the whole interface.
        let mut n = Summary::new(limits(), false, (false, false));
        for (row, x) in [0.0, 1.0, 2.0].into_iter().enumerate() {
            n.push(&lite(row as u64 + 2, x, 1)).unwrap();
        }
        n.finish();
        let (a, b) = n.unbonded_ends();
        assert!((a.unwrap() * 1e3 - 2.0).abs() < 1e-12);
        assert!((b.unwrap() * 1e3 - 2.0).abs() < 1e-12);
    }

    /// Rejected rows before the first and after the last classified row: placed at their
    /// readable positions (no verdict there, part of the unbonded ends and of the interface),
    /// never as a stretch between the first two classified rows; without a readable position
    /// that end is reported as unknown.
    #[test]
    fn rejected_rows_at_the_ends_are_placed_or_reported() {
        let mut s = Summary::new(limits(), false, (false, false));
        s.reject(Some(0.0));
        s.reject(Some(0.5e-3));
        for (row, x) in [1.0, 2.0, 3.0].into_iter().enumerate() {
            s.push(&lite(row as u64 + 4, x, 0)).unwrap();
        }
        s.reject(None);
        s.reject(Some(4.0e-3));
        s.finish();
        assert_eq!(s.span(), Some((0.0, 4.0e-3)));
        assert_eq!(s.gaps, vec![(0.0, 1.0e-3), (3.0e-3, 4.0e-3)]);
        let (us, ue) = s.unbonded_ends();
        assert!((us.unwrap() * 1e3 - 1.0).abs() < 1e-12);
        assert!((ue.unwrap() * 1e3 - 1.0).abs() < 1e-12);
        assert!((s.length_unclassified * 1e3 - 2.0).abs() < 1e-12);
        assert!((s.length_by_verdict[0] * 1e3 - 2.0).abs() < 1e-12);
        assert_eq!(s.unplaced_end_rows, (0, 0));
        // No readable position, or one on the wrong side: the end is unknown.
        let mut u = Summary::new(limits(), false, (false, false));
        u.reject(None);
        for (row, x) in [1.0, 2.0].into_iter().enumerate() {
            u.push(&lite(row as u64 + 3, x, 0)).unwrap();
        }
        u.reject(Some(0.5e-3));
        u.finish();
        assert_eq!(u.span(), Some((1.0e-3, 2.0e-3)));
        assert_eq!(u.unplaced_end_rows, (1, 1));
        assert_eq!(u.gaps_total, 0);
    }

    /// `--min-segment`: runs shorter than the length join the run before them (or the next long
    /// one at the start), runs of one state then join; a stretch without verdict still breaks.
    #[test]
    fn short_runs_join_their_neighbours() {
        // mm: W W N W W W W N N N W N [gap] W W, each point owning 1 mm (half to each side).
        let verdicts = [0, 0, 1, 0, 0, 0, 0, 1, 1, 1, 0, 1, 0, 0];
        let run = |min_mm: f64| {
            let mut s = Summary::new(limits(), false, (false, false));
            s.min_segment = min_mm * 1e-3;
            for (i, v) in verdicts.into_iter().enumerate() {
                if i == 12 {
                    s.reject(Some(11.5e-3));
                }
                s.push(&lite(i as u64 + 2, i as f64, v)).unwrap();
            }
            s.finish();
            s
        };
        let raw = run(0.0);
        assert_eq!(raw.segments_total, [4, 3]);
        let merged = run(1.5);
        // The 1 mm unwelded run at 2 mm joins the welded stretch; the 1 mm welded run at 10 mm
        // joins the unwelded one before it, and so does the 0.5 mm unwelded run after it (up to
        // the gap); after the gap one welded run.
        assert_eq!(merged.segments_total, [2, 1], "{:?}", merged.segments);
        let first = merged.segments[0];
        assert_eq!((first.verdict, first.first_row, first.last_row), (0, 2, 8));
        assert_eq!(first.points, 7);
        let longest = merged.longest_welded.unwrap();
        assert!((longest.start - 0.0).abs() < 1e-15 && (longest.end * 1e3 - 6.5).abs() < 1e-12);
        // Welded length is point by point either way.
        assert_eq!(raw.length_by_verdict, merged.length_by_verdict);
        assert_eq!(merged.gaps_total, 1);
    }

    #[test]
    fn decreasing_positions_are_sorted_too() {
        let mut s = Summary::new(limits(), false, (false, false));
        for (row, x) in [5.0, 4.0, 4.0, 1.0].into_iter().enumerate() {
            s.push(&lite(row as u64 + 2, x, 0)).unwrap();
        }
        s.finish();
        assert!((s.length_by_verdict[0] * 1e3 - 4.0).abs() < 1e-12);
        let e = s.push(&lite(9, 2.0, 0));
        assert!(e.is_err());
    }

    #[test]
    fn out_of_order_names_both_rows() {
        let mut s = Summary::new(limits(), false, (false, false));
        s.push(&lite(2, 1.0, 0)).unwrap();
        s.push(&lite(3, 2.0, 0)).unwrap();
        let e = s.push(&lite(4, 1.5, 0)).unwrap_err();
        assert_eq!((e.row, e.prev_row, e.increasing), (4, 3, true));
    }

    #[test]
    fn unsorted_mode_counts_only() {
        let mut s = Summary::new(limits(), true, (false, false));
        for (row, x) in [5.0, 1.0, 3.0].into_iter().enumerate() {
            s.push(&lite(row as u64 + 2, x, u8::from(row == 1)))
                .unwrap();
        }
        s.finish();
        assert_eq!(s.welded_fraction().1, "count");
        assert_eq!(s.segments_total, [0, 0]);
    }

    #[test]
    fn strip_columns_add_up_to_the_owned_lengths() {
        let mut s = Summary::new(limits(), false, (true, false));
        // 10 000 points, 1 um apart, alternating blocks of verdicts.
        for i in 0..10_000u64 {
            let v = ((i / 37) % 3) as u8;
            s.push(&lite(i + 2, i as f64 * 1e-3, v)).unwrap();
        }
        s.finish();
        let st = s.strip.as_ref().unwrap();
        for v in 0..3 {
            let sum: f64 = st.cols.iter().map(|c| c[v]).sum();
            assert!((sum - s.length_by_verdict[v]).abs() < 1e-12, "{v}");
        }
        assert!(st.width * StripAcc::COLS as f64 >= 9.999e-3);
        // Decreasing positions fill the same columns.
        let mut d = Summary::new(limits(), false, (true, false));
        for i in 0..100u64 {
            d.push(&lite(i + 2, 5.0 - i as f64 * 0.01, 0)).unwrap();
        }
        d.finish();
        let total: f64 = d.strip.as_ref().unwrap().cols.iter().map(|c| c[0]).sum();
        assert!((total - 0.99e-3).abs() < 1e-12);
    }

    #[test]
    fn histogram_doubles_its_velocity_range() {
        let mut h = Histogram::new();
        h.add(100.0, 10.0);
        h.add(5000.0, 89.99);
        assert!(h.dv >= 5000.0 / Histogram::NV as f64);
        assert_eq!(h.counts.iter().sum::<u64>(), 2);
    }

    #[test]
    fn samples_stay_bounded() {
        let mut s = Summary::new(limits(), false, (true, false));
        for i in 0..(3 * SAMPLE_CAP as u64) {
            s.push(&lite(i + 2, i as f64, 0)).unwrap();
        }
        assert!(s.samples.len() < SAMPLE_CAP);
        assert!(s.samples.len() >= SAMPLE_CAP / 4);
    }
}
