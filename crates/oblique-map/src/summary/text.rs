//! The summary as text for people, ending with the caution line.

use super::{display_margin, LimitStat, Summary, EXAMPLE_CAP};
use crate::format::fmt_g;
use crate::options::ConstantNote;
use oblique_core::jetting_table::JettingTable;
use oblique_window::present::CAUTION;

impl Summary {
    /// The human summary, ending with the caution line.
    pub fn to_text(&self) -> String {
        let mut s = String::new();
        self.text_rows(&mut s);
        self.text_along(&mut s);
        self.text_limits(&mut s);
        s
    }

    /// The run, its rows, the first rejected ones and the verdict counts.
    fn text_rows(&self, s: &mut String) {
        let pct = |n: u64| {
            if self.rows_classified > 0 {
                100.0 * n as f64 / self.rows_classified as f64
            } else {
                0.0
            }
        };
        s.push_str(&format!(
            "weld map: pair {} ({}); convention {}; velocity column = {}\n",
            self.info.pair,
            self.info.pair_line,
            self.info.convention,
            if self.info.velocity_kind == "impact" {
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
            self.info.bad_rows,
            if self.blank_lines > 0 {
                format!("; {} blank line(s) ignored", self.blank_lines)
            } else {
                String::new()
            },
            if self.comment_lines > 0 {
                format!(
                    "; {} comment or blank line(s) before the header skipped",
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
            "verdicts: welded {} ({:.1} %), not-welded {} ({:.1} %), melted {} ({:.1} %)",
            self.counts[0],
            pct(self.counts[0]),
            self.counts[1],
            pct(self.counts[1]),
            self.counts[2],
            pct(self.counts[2])
        ));
        for (k, what) in [(3usize, "head-on"), (4, "outside the validity domain")] {
            if self.counts[k] > 0 {
                s.push_str(&format!(
                    ", {what} {} ({:.1} %)",
                    self.counts[k],
                    pct(self.counts[k])
                ));
            }
        }
        s.push('\n');
    }

    /// Lengths, segments and stretches without a verdict along the interface.
    fn text_along(&self, s: &mut String) {
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
                    "no verdict over {:.3} mm where rows were rejected: a rejected row owns nothing, so the whole stretch between the classified rows around it has no verdict (counted in the interface, never as welded)\n",
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
            let acc = self.accounting();
            let parts: Vec<String> = acc
                .iter()
                .filter(|(k, l)| *l > 0.0 || *k == "welded" || *k == "unbonded")
                .map(|(k, l)| {
                    format!(
                        "{} {:.3} mm",
                        match *k {
                            "outside_domain" => "outside the validity domain",
                            "no_verdict" => "no verdict",
                            "unbonded" if self.length_by_verdict[3] > 0.0 =>
                                "unbonded (head-on included)",
                            other => other,
                        },
                        l * 1e3
                    )
                })
                .collect();
            s.push_str(&format!("lengths: {}\n", parts.join(", ")));
            let (ns, ne) = self.no_verdict_at_ends;
            let (cs, ce) = self.ends_by_verdict();
            // The stretch in the categories of the `lengths` line: "unbonded X mm + outside the
            // validity domain Y mm (no verdict claimed) + no verdict Z mm + melted W mm (bonded,
            // brittle)"; the JSON's `unbonded_length_*` is its total less the melted part.
            let split = |c: &[f64; super::N_VERDICTS], nv: f64| {
                let mut t = format!("unbonded {:.3} mm", (c[0] + c[1] + c[3]) * 1e3);
                if c[4] > 0.0 {
                    t.push_str(&format!(
                        " + outside the validity domain {:.3} mm (no verdict claimed)",
                        c[4] * 1e3
                    ));
                }
                if nv > 0.0 {
                    t.push_str(&format!(
                        " + no verdict {:.3} mm (rejected rows, not known to be welded)",
                        nv * 1e3
                    ));
                }
                if c[2] > 0.0 {
                    t.push_str(&format!(" + melted {:.3} mm (bonded, brittle)", c[2] * 1e3));
                }
                t
            };
            let (to_start, to_end) = self.to_weld_ends();
            if self.first_weld_start.is_none() {
                s.push_str(&format!(
                    "no welded point: the whole interface, {:.3} mm = {}\n",
                    to_start.unwrap_or(0.0) * 1e3,
                    split(&cs, ns)
                ));
            } else {
                s.push_str(&format!(
                    "to the first welded segment: {:.3} mm = {}; after the last one: {:.3} mm = {}\n",
                    to_start.unwrap_or(0.0) * 1e3,
                    split(&cs, ns),
                    to_end.unwrap_or(0.0) * 1e3,
                    split(&ce, ne)
                ));
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
    }

    /// Margins, binding limits, jetting, constants and warnings, then the caution.
    fn text_limits(&self, s: &mut String) {
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
        if self.supersonic_rows > 0 && self.info.jetting != "disabled" {
            s.push_str(&format!(
                "jetting: {} row(s) supersonic in at least one plate (the limit rests on the shock-polar criterion there), {} of them in one plate only (the mixed case, which no source covers; rule: {})\n",
                self.supersonic_rows, self.mixed_rows, self.info.mixed_rule
            ));
        }
        let outside = self.counts[4];
        if outside > 0 {
            let by: Vec<String> = oblique_core::DomainQuantity::ALL
                .iter()
                .zip(self.domain_exits)
                .filter(|(_, n)| *n > 0)
                .map(|(q, n)| format!("{} {n}", q.label()))
                .collect();
            s.push_str(&format!(
                "validity domain: {outside} row(s) outside it (verdict outside-domain: their limits are extrapolations; {}); bounds: {}\n",
                by.join(", "),
                self.info.domain.join("; ")
            ));
        }
        match (self.info.jetting, self.info.table) {
            ("table", None) => s.push_str(&format!(
                "jetting: no row had supersonic inflow, so no table was needed (critical angle exactly zero); {} row(s) solved directly\n",
                self.jetting_direct
            )),
            ("table", Some((n, v))) => s.push_str(&format!(
                "jetting: critical angle from a {n}x{n} table up to {:.0} km/s (within {} deg of the direct solve); {} row(s) solved directly (near the limit or outside the table)\n",
                v / 1e3,
                JettingTable::ERROR_BOUND_DEG,
                self.jetting_direct
            )),
            ("direct", _) => s.push_str(&format!(
                "jetting: solved directly for every row with supersonic inflow (--exact-jetting): {} row(s); the subsonic ones need no solve\n",
                self.jetting_direct
            )),
            _ => {
                // One line: the criterion is off, why, and the regimes counted all the same.
                s.push_str("jetting: criterion off in this window");
                if let Some(r) = &self.info.jetting_off_reason {
                    s.push_str(&format!(" (reason: {r})"));
                }
                s.push_str(": no verdict rests on it");
                if self.supersonic_rows > 0 {
                    s.push_str(&format!(
                        "; {} row(s) supersonic in at least one plate, {} of them in one plate only",
                        self.supersonic_rows, self.mixed_rows
                    ));
                }
                s.push('\n');
            }
        }
        if !self.constants.is_empty() {
            let parts: Vec<String> = self
                .constants
                .iter()
                .map(
                    |&ConstantNote {
                         name,
                         flag,
                         value,
                         window,
                     }| {
                        if value == window {
                            format!("{name} {}", fmt_g(value))
                        } else {
                            format!(
                                "{name} {} (set by {flag}; the window's is {})",
                                fmt_g(value),
                                fmt_g(window)
                            )
                        }
                    },
                )
                .collect();
            s.push_str(&format!("constants: {}\n", parts.join(", ")));
        }
        for w in &self.warnings {
            s.push_str(&format!("warning: {w}\n"));
        }
        s.push_str(CAUTION);
        s.push('\n');
    }
}
