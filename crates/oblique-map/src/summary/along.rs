//! The summary along the interface: each point's owned length, the welded and unwelded
//! segments (joined with `--min-segment`), stretches without a verdict where rows were
//! rejected, and the rejected rows before the first and after the last classified row.

use super::{OutOfOrder, Run, StripAcc, Summary, GAP_CAP, N_VERDICTS, SEGMENT_CAP};
use crate::record::Lite;

impl Summary {
    pub(super) fn along(&mut self, p: &Lite) -> Result<(), OutOfOrder> {
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
            self.cur_seg = Some(new_run(
                u8::from(p.verdict != 0),
                x,
                p,
                self.length_by_verdict,
            ));
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
            self.cur_seg = Some(new_run(state, boundary, p, self.length_by_verdict));
        }
        self.prev = Some((x, p.verdict, p.row));
        Ok(())
    }

    fn open(&mut self, p: &Lite, x: f64) {
        self.cur_seg = Some(new_run(
            u8::from(p.verdict != 0),
            x,
            p,
            self.length_by_verdict,
        ));
        if self.want_strip {
            self.strip = Some(StripAcc::new(x));
        }
    }

    pub(super) fn close_segment(&mut self, end: f64) {
        if let Some(mut s) = self.cur_seg.take() {
            s.end = end;
            s.cum_end = self.length_by_verdict;
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
    pub(super) fn flush_runs(&mut self) {
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
                    self.first_weld_cum = s.cum_start;
                }
                self.last_weld_end = Some(s.end);
                self.last_weld_cum = s.cum_end;
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

    /// Place the rejected rows before the first (`start`) or after the last classified row,
    /// whose outermost classified position is `edge`, given the direction of travel.
    pub(super) fn place_end(&mut self, start: bool, edge: f64, dir: f64) {
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
}

/// Extend run `a` by the run `b` that follows it (the state stays `a`'s).
fn extend_run(a: &mut Run, b: &Run) {
    a.end = b.end;
    a.cum_end = b.cum_end;
    a.last_row = b.last_row;
    a.points += b.points;
    for (x, y) in a.by_verdict.iter_mut().zip(b.by_verdict) {
        *x += y;
    }
}

fn new_run(verdict: u8, start: f64, p: &Lite, cum: [f64; N_VERDICTS]) -> Run {
    let mut by_verdict = [0; N_VERDICTS];
    by_verdict[p.verdict as usize] = 1;
    Run {
        verdict,
        start,
        end: start,
        first_row: p.row,
        last_row: p.row,
        points: 1,
        by_verdict,
        cum_start: cum,
        cum_end: cum,
    }
}
