//! The weld-map summary: counts, length-weighted welded fraction, segments along the interface,
//! margins in the welded zone. Fed point by point in file order, in constant memory (the stored
//! segment and run lists are capped; the totals are not).
//!
//! Length weighting: each classified point owns half the distance to each neighbour (the first
//! and last points own half the distance to their single neighbour), so the owned lengths add up
//! to the span from the first to the last position. Segment ends lie half-way between the last
//! point of one verdict and the first point of the next.
//!
//! `along` follows the interface (lengths, segments, stretches without a verdict), `parts`
//! holds the accumulators for the plots, `json` and `text` render the summary.

mod along;
mod json;
mod parts;
mod text;

pub use parts::{Histogram, Run, Sample, StripAcc, N_VERDICTS};

use crate::format::fmt_g;
use crate::options::ConstantNote;
use crate::record::{Lite, Rejected};

/// Segments listed in the summary (the count and the longest one are always complete).
pub const SEGMENT_CAP: usize = 1000;
/// Samples kept for the strip plot's traces (every k-th point, k doubling as needed).
pub const SAMPLE_CAP: usize = 16_384;
/// Points kept for marking individually on the window plot.
pub const MARK_CAP: usize = 2_000;
/// Rejected rows listed in the summary.
pub const EXAMPLE_CAP: usize = 20;
/// Stretches without a verdict kept for the strip plot (all are counted).
pub const GAP_CAP: usize = 2000;

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
#[derive(Debug, Clone)]
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
    pub counts: [u64; N_VERDICTS],
    /// Per-limit facts.
    pub limits: Vec<LimitStat>,
    /// Rows outside the span of some user boundary.
    pub outside_trial_data: u64,
    /// Welded rows among them: welded by the model limits and the boundaries that do span them,
    /// while some boundary is silent there.
    pub welded_outside_trial_data: u64,
    /// Rows whose jetting test was solved directly.
    pub jetting_direct: u64,
    /// Rows whose collision is supersonic in at least one plate (the jetting limit rests on
    /// the shock-polar criterion or on the mixed rule there).
    pub supersonic_rows: u64,
    /// Rows supersonic in one plate and subsonic in the other: the mixed jetting case, which no
    /// source covers.
    pub mixed_rows: u64,
    /// Rows outside each bound of the validity domain (`DomainQuantity::ALL` order); a row
    /// may miss several.
    pub domain_exits: [u64; 5],
    /// First rejected rows.
    pub examples: Vec<Rejected>,
    /// +1 increasing, -1 decreasing, 0 not yet known.
    pub direction: f64,
    first_pos: Option<f64>,
    prev: Option<(f64, u8, u64)>,
    /// Start of the previous point's owned interval.
    prev_boundary: f64,
    /// Owned length per verdict, m.
    pub length_by_verdict: [f64; N_VERDICTS],
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
    /// Owned length per verdict before the first welded segment, m.
    pub first_weld_cum: [f64; N_VERDICTS],
    /// Owned length per verdict before the end of the last welded segment, m.
    pub last_weld_cum: [f64; N_VERDICTS],
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
    /// The criterion constants used, with the window's own values.
    pub constants: Vec<ConstantNote>,
    /// Facts about the run (pair, input, policies, jetting method).
    pub info: RunInfo,
    /// Warnings about the data as a whole (implausible magnitudes: a unit wrong in the header?).
    pub warnings: Vec<String>,
    /// Pass-through cells whose bytes were not UTF-8 (JSON-lines output replaces such bytes
    /// with U+FFFD; CSV output keeps them as they are).
    pub non_utf8_cells: u64,
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

/// Margin in a display unit: Pa shown in GPa.
pub fn display_margin(margin: f64, unit: &str) -> (f64, &'static str) {
    match unit {
        "Pa" => (margin / 1e9, "GPa"),
        "deg" => (margin, "deg"),
        _ => (margin, "m/s"),
    }
}

/// Facts about the run that go into the summary besides the counts.
#[derive(Debug, Clone, Default)]
pub struct RunInfo {
    /// Pair name.
    pub pair: String,
    /// Convention.
    pub convention: &'static str,
    /// `impact` or `collision`.
    pub velocity_kind: &'static str,
    /// Input as given.
    pub input: String,
    /// Bad-row policy as given (`oblique map` shows `save:FILE` for
    /// [`BadRows::Save`](crate::BadRows::Save)).
    pub bad_rows: String,
    /// Jetting method: `table`, `direct` or `disabled`.
    pub jetting: &'static str,
    /// Table nodes and range (m/s), when a table was built.
    pub table: Option<(usize, f64)>,
    /// Flyer/parent/thickness line.
    pub pair_line: String,
    /// The window's rule for the mixed jetting case.
    pub mixed_rule: &'static str,
    /// Why the window turns its jetting criterion off (`jetting` is `disabled`), as written
    /// in the window.
    pub jetting_off_reason: Option<String>,
    /// The validity domain's bounds in words (`quantity: range`), for the summary.
    pub domain: Vec<String>,
}

impl Summary {
    /// A fresh summary for these limits.
    pub(crate) fn new(limits: Vec<LimitStat>, unsorted: bool, plots: (bool, bool)) -> Self {
        Self {
            unsorted,
            rows_read: 0,
            rows_classified: 0,
            rows_rejected: 0,
            blank_lines: 0,
            counts: [0; N_VERDICTS],
            limits,
            outside_trial_data: 0,
            welded_outside_trial_data: 0,
            jetting_direct: 0,
            supersonic_rows: 0,
            mixed_rows: 0,
            domain_exits: [0; 5],
            examples: Vec::new(),
            direction: 0.0,
            first_pos: None,
            prev: None,
            prev_boundary: 0.0,
            length_by_verdict: [0.0; N_VERDICTS],
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
            first_weld_cum: [0.0; N_VERDICTS],
            last_weld_cum: [0.0; N_VERDICTS],
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
            info: RunInfo::default(),
            warnings: Vec::new(),
            non_utf8_cells: 0,
            max_vp: 0.0,
            max_beta: 0.0,
        }
    }

    /// Add one classified point, in file order.
    ///
    /// # Errors
    /// The position goes backwards (sorted mode only).
    #[inline]
    pub(crate) fn push(&mut self, p: &Lite) -> Result<(), OutOfOrder> {
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
    pub(crate) fn reject(&mut self, pos: Option<f64>) {
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

    /// Close the last run and segment after the last point, and place the rejected rows
    /// before the first and after the last classified row: with a readable position on the
    /// right side, the interface runs to it without a verdict there (counted in the unbonded
    /// end); otherwise that end of the interface is unknown, and said so.
    pub(crate) fn finish(&mut self) {
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
    pub(crate) fn check_plausibility(&mut self, velocity_cell: &str, angle_cell: &str) {
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
        if let Some(&ConstantNote { flag, value: k, .. }) =
            self.constants.iter().find(|c| c.name == "deribas_k")
        {
            if !(0.6..=1.2).contains(&k) {
                self.warnings.push(format!(
                    "Deribas k {} ({flag}) is outside 0.6 (carefully cleaned surfaces) to 1.2, the range the physics notes give (from memory)",
                    fmt_g(k)
                ));
            }
        }
        if self.non_utf8_cells > 0 {
            self.warnings.push(format!(
                "{} pass-through cell(s) hold bytes that are not UTF-8: JSON text cannot carry them, so the map shows U+FFFD there (write CSV output to keep every byte)",
                self.non_utf8_cells
            ));
        }
        if self.max_beta < 1.0 {
            self.warnings.push(format!(
                "every collision angle is below 1 deg (the largest is {:.4} deg; common practice: a few degrees up to about 30 deg): is the unit in the header right ('{angle_cell}'; angle[rad] for radians)?",
                self.max_beta
            ));
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

    /// What lies between each end of the interface and the nearest welded segment: length per
    /// verdict (welded only where `--min-segment` joined short welded runs to an unwelded
    /// stretch), m; the whole interface at both ends when nothing is welded. Stretches without
    /// a verdict are `no_verdict_at_ends`.
    pub fn ends_by_verdict(&self) -> ([f64; N_VERDICTS], [f64; N_VERDICTS]) {
        if self.first_weld_start.is_none() {
            return (self.length_by_verdict, self.length_by_verdict);
        }
        let end: [f64; N_VERDICTS] =
            std::array::from_fn(|v| (self.length_by_verdict[v] - self.last_weld_cum[v]).max(0.0));
        (self.first_weld_cum, end)
    }

    /// The interface's length by what it is, m: welded, melted (bonded but brittle), unbonded
    /// (not welded or head-on), outside the validity domain (no verdict claimed) and without a
    /// verdict (rejected rows); they add up to the interface's length.
    pub fn accounting(&self) -> [(&'static str, f64); 5] {
        let l = &self.length_by_verdict;
        [
            ("welded", l[0]),
            ("melted", l[2]),
            ("unbonded", l[1] + l[3]),
            ("outside_domain", l[4]),
            ("no_verdict", self.length_unclassified),
        ]
    }

    /// The stretch between each end and the nearest welded segment, m: (to the first welded
    /// segment, from the last one); stretches without a verdict included (they are not known
    /// to be welded); the whole interface at both ends when nothing is welded. Melted length
    /// is part of it: [`Self::unbonded_ends`] leaves it out.
    pub(crate) fn to_weld_ends(&self) -> (Option<f64>, Option<f64>) {
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

    /// The unbonded length at each end: from the interface's end to the nearest welded
    /// segment, less the melted length there (melted is bonded, though brittle, and is
    /// reported apart: [`Self::ends_by_verdict`]); stretches without a verdict included (not
    /// known to be welded).
    fn unbonded_ends(&self) -> (Option<f64>, Option<f64>) {
        let (a, b) = self.to_weld_ends();
        let (ca, cb) = self.ends_by_verdict();
        (
            a.map(|x| (x - ca[2]).max(0.0)),
            b.map(|x| (x - cb[2]).max(0.0)),
        )
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
