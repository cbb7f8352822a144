//! The summary as JSON: SI values, margins in their criterion's unit, every list capped and
//! said so.

use super::{Run, Summary, N_VERDICTS, SEGMENT_CAP};
use crate::options::ConstantNote;
use oblique_core::jetting_table::JettingTable;
use oblique_window::classify::Prediction;
use oblique_window::present::{sig, CAUTION};
use serde_json::{json, Map, Value};

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

fn verdict_map(c: &[u64; N_VERDICTS]) -> Value {
    let mut m = Map::new();
    for (p, n) in Prediction::ALL.iter().zip(c) {
        m.insert(p.as_str().into(), json!(n));
    }
    Value::Object(m)
}

impl Summary {
    /// The summary as JSON (SI values; margins in their criterion unit), with the caution.
    pub fn to_json(&self) -> Value {
        let mut o = Map::new();
        self.json_rows(&mut o);
        self.json_along(&mut o);
        self.json_limits(&mut o);
        Value::Object(o)
    }

    /// The run and its rows.
    fn json_rows(&self, o: &mut Map<String, Value>) {
        o.insert("pair".into(), json!(self.info.pair));
        o.insert("convention".into(), json!(self.info.convention));
        o.insert("velocity_kind".into(), json!(self.info.velocity_kind));
        o.insert("input".into(), json!(self.info.input));
        o.insert("rows_read".into(), json!(self.rows_read));
        o.insert("rows_classified".into(), json!(self.rows_classified));
        o.insert("rows_rejected".into(), json!(self.rows_rejected));
        o.insert("blank_lines".into(), json!(self.blank_lines));
        o.insert("comment_lines".into(), json!(self.comment_lines));
        o.insert("bad_rows".into(), json!(self.info.bad_rows));
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
    }

    /// Lengths, segments and stretches without a verdict along the interface.
    fn json_along(&self, o: &mut Map<String, Value>) {
        let (frac, basis) = self.welded_fraction();
        let sorted = !self.unsorted;
        let span = self.span().filter(|_| sorted);
        let (u_start, u_end) = self.unbonded_ends();
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
        let (cs, ce) = self.ends_by_verdict();
        o.insert(
            "melted_length_start_m".into(),
            json!(sorted.then(|| sig(cs[2]))),
        );
        o.insert(
            "melted_length_end_m".into(),
            json!(sorted.then(|| sig(ce[2]))),
        );
        let ends = |c: [f64; N_VERDICTS], nv: f64| {
            let mut m = Map::new();
            for (p, l) in Prediction::ALL.iter().zip(c) {
                m.insert(p.as_str().into(), sig(l));
            }
            m.insert("no-verdict".into(), sig(nv));
            Value::Object(m)
        };
        o.insert(
            "ends_to_weld_m".into(),
            if sorted {
                json!({
                    "start": ends(cs, self.no_verdict_at_ends.0),
                    "end": ends(ce, self.no_verdict_at_ends.1),
                })
            } else {
                Value::Null
            },
        );
        let mut acc = Map::new();
        for (k, l) in self.accounting() {
            acc.insert(k.into(), sig(l));
        }
        acc.insert(
            "total".into(),
            sig(self.accounting().iter().map(|x| x.1).sum()),
        );
        o.insert(
            "length_accounting_m".into(),
            if sorted {
                Value::Object(acc)
            } else {
                Value::Null
            },
        );
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
    }

    /// Margins, binding limits, jetting, constants, warnings and the caution.
    fn json_limits(&self, o: &mut Map<String, Value>) {
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
                "method": self.info.jetting,
                "enabled": self.info.jetting != "disabled",
                "off_reason": self.info.jetting_off_reason,
                "table_nodes": self.info.table.map(|t| t.0),
                "table_max_inflow_m_s": self.info.table.map(|t| t.1),
                "error_bound_deg": self.info.table.map(|_| JettingTable::ERROR_BOUND_DEG),
                "rows_solved_directly": self.jetting_direct,
                "mixed_rule": self.info.mixed_rule,
                "supersonic_rows": self.supersonic_rows,
                "mixed_rows": self.mixed_rows,
            }),
        );
        let mut exits = Map::new();
        for (q, n) in oblique_core::DomainQuantity::ALL
            .iter()
            .zip(self.domain_exits)
        {
            exits.insert(q.as_str().into(), json!(n));
        }
        o.insert(
            "validity_domain".into(),
            json!({
                "outside_rows": self.counts[Prediction::OutsideDomain.index()],
                "rows_outside_each_bound": exits,
                "bounds": self.info.domain.clone(),
            }),
        );
        let mut consts = Map::new();
        for &ConstantNote {
            name,
            value,
            window,
            ..
        } in &self.constants
        {
            consts.insert(
                name.into(),
                json!({"value": value, "window": window, "overridden": value != window}),
            );
        }
        o.insert("constants".into(), Value::Object(consts));
        o.insert("warnings".into(), json!(self.warnings));
        o.insert("caution".into(), json!(CAUTION));
    }
}
