//! The trade as a table for people, as CSV and as JSON.

use super::{Control, Row, Trade};
use oblique_core::criteria::format_in_unit;
use oblique_core::{CriterionId, LimitKind};
use oblique_window::classify::LimitRef;
use oblique_window::present::{sig, table, CAUTION};
use serde_json::{json, Value};

/// A decisive limit as a column: its reference, short name, long label, unit, floor or ceiling.
pub(crate) struct Column {
    pub(crate) limit: LimitRef,
    pub(crate) short: String,
    pub(crate) label: String,
    pub(crate) unit: &'static str,
    pub(crate) lower: bool,
}

/// The decisive limits of the trade's window, in `check`'s order: criteria, then boundaries
/// (B1, B2, ...).
pub(crate) fn columns(t: &Trade<'_>) -> Vec<Column> {
    let mut cols = Vec::new();
    if let Some(r) = t.rows.first() {
        for c in r
            .check
            .evaluation
            .criteria
            .iter()
            .filter(|c| !c.informational)
        {
            cols.push(Column {
                limit: LimitRef::Criterion(c.id),
                short: short_id(c.id).into(),
                label: c.id.as_str().into(),
                unit: c.unit,
                lower: c.kind == LimitKind::Lower,
            });
        }
    }
    for (i, b) in t.window.boundaries.iter().enumerate() {
        cols.push(Column {
            limit: LimitRef::Boundary(i),
            short: format!("B{}", i + 1),
            label: format!("boundary \"{}\"", b.label),
            unit: if b.weld_side.along_velocity() {
                "deg"
            } else {
                "m/s"
            },
            lower: matches!(
                b.weld_side,
                oblique_window::boundary::WeldSide::Above
                    | oblique_window::boundary::WeldSide::Right
            ),
        });
    }
    cols
}

fn short_id(id: CriterionId) -> &'static str {
    match id {
        CriterionId::DeribasLower => "deribas",
        CriterionId::StrengthLower => "strength",
        CriterionId::PressureLower => "pressure",
        CriterionId::MeltingUpper => "melting",
        CriterionId::Jetting => "jetting",
        CriterionId::WavyTransition => "wavy",
    }
}

/// (limit, margin at this point) of a column at a row, `None` where it does not apply.
pub(crate) fn limit_at(
    c: &oblique_window::Classification,
    col: &Column,
) -> Option<(f64, f64, bool)> {
    match &col.limit {
        LimitRef::Criterion(id) => c
            .evaluation
            .criterion(*id)
            .map(|r| (r.limit, r.margin, r.satisfied)),
        LimitRef::Boundary(i) => c
            .boundaries
            .get(*i)
            .and_then(|b| Some((b.limit?, b.margin?, b.satisfied?))),
    }
}

fn display_unit(unit: &str) -> &str {
    if unit == "Pa" {
        "GPa"
    } else {
        unit
    }
}

/// A number of `unit` without its unit, at `check`'s scale.
fn bare(v: f64, unit: &str) -> String {
    let s = format_in_unit(v, unit);
    s.split(' ').next().unwrap_or(&s).to_string()
}

fn signed(v: f64, unit: &str) -> String {
    let s = bare(v, unit);
    if v >= 0.0 {
        format!("+{s}")
    } else {
        s
    }
}

fn binding_short(t: &Trade<'_>, cols: &[Column], c: &oblique_window::Classification) -> String {
    c.binding
        .as_ref()
        .and_then(|b| cols.iter().find(|col| col.limit == *b))
        .map_or_else(
            || {
                c.binding.as_ref().map_or("-".into(), |b| {
                    oblique_window::classify::limit_label(t.window, b)
                })
            },
            |col| col.short.clone(),
        )
}

fn verdict_word(c: &oblique_window::Classification) -> String {
    if c.inside && c.outside_trial_data {
        "welded*".into()
    } else {
        c.prediction.as_str().into()
    }
}

fn control_text(t: &Trade<'_>) -> String {
    match t.control {
        Control::Angle {
            velocity,
            from_deg,
            to_deg,
        } => format!(
            "the collision angle from {} to {} deg at an impact velocity of {velocity:.1} m/s ({})",
            fmt_g(from_deg),
            fmt_g(to_deg),
            t.convention
        ),
        Control::Velocity {
            angle_deg,
            from,
            to,
        } => format!(
            "the impact velocity from {} to {} m/s ({}) at a collision angle of {angle_deg:.2} deg",
            fmt_g(from),
            fmt_g(to),
            t.convention
        ),
    }
}

fn fmt_g(x: f64) -> String {
    let s = format!("{x:.3}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}

fn crossing_text(t: &Trade<'_>, c: &super::Crossing) -> String {
    let (what, unit) = match t.control {
        Control::Angle { .. } => ("a collision angle", "deg"),
        Control::Velocity { .. } => ("an impact velocity", "m/s"),
    };
    let at = match unit {
        "deg" => format!("{:.2} deg", c.reached_at),
        _ => format!("{:.0} m/s", c.reached_at),
    };
    if c.span_edge {
        format!(
            "{} the window at {what} of {at}: there {} begins to span the points and fails (it is not extrapolated beyond its points: on the other side the point is outside the trial data)",
            if c.entering { "enters" } else { "leaves" },
            c.limit
        )
    } else if c.entering {
        format!(
            "enters the window at {what} of {at}: {} is met there",
            c.limit
        )
    } else {
        format!(
            "leaves the window at {what} of {at}: {} is reached there",
            c.limit
        )
    }
}

impl Trade<'_> {
    /// The table for people, with the window's entry and exit, the rounding rule and the
    /// caution.
    #[must_use]
    pub fn text(&self) -> String {
        let w = self.window;
        let cols = columns(self);
        let mut s = format!(
            "Trade-off along {} (pair window '{}': {} flyer {:.2} mm on {}; window convention {})\n\n",
            control_text(self),
            w.name,
            w.flyer.material.id,
            w.flyer_thickness.mm(),
            w.parent.material.id,
            w.convention
        );
        let mut header: Vec<String> = match self.control {
            Control::Angle { .. } => vec!["beta [deg]".into()],
            Control::Velocity { .. } => vec!["Vp [m/s]".into()],
        };
        header.extend(
            ["Vc [m/s]", "Vf [m/s]", "p [GPa]", "jetting > [deg]"]
                .iter()
                .map(|x| (*x).to_string()),
        );
        let text_cols: Vec<&Column> = cols
            .iter()
            .filter(|c| c.limit != LimitRef::Criterion(CriterionId::Jetting))
            .collect();
        for c in &text_cols {
            header.push(format!(
                "{} {} [{}]",
                c.short,
                if c.lower { ">=" } else { "<=" },
                display_unit(c.unit)
            ));
        }
        header.push("verdict".into());
        header.push("binding".into());
        if self.probability.is_some() {
            header.push("P(weld)".into());
        }
        let mut rows = Vec::new();
        for r in &self.rows {
            let e = &r.check.evaluation;
            let mut row = vec![match self.control {
                Control::Angle { .. } => format!("{:.2}", r.angle_deg),
                Control::Velocity { .. } => format!("{:.1}", r.velocity),
            }];
            row.push(format!("{:.1}", e.collision.collision_velocity.si()));
            row.push(format!("{:.1}", e.collision.flow_velocity.si()));
            row.push(format!("{:.2}", e.impact.pressure.gpa()));
            let crit = e
                .jetting
                .critical_angle_deg()
                .map_or("none<90".into(), |d| format!("{d:.2}"));
            row.push(match e.criterion(CriterionId::Jetting) {
                Some(j) => format!("{crit} ({})", signed(j.margin, "deg")),
                None => crit,
            });
            for c in &text_cols {
                row.push(limit_at(&r.check, c).map_or("n/a".into(), |(l, m, _)| {
                    format!("{} ({})", bare(l, c.unit), signed(m, c.unit))
                }));
            }
            row.push(verdict_word(&r.check));
            row.push(if r.check.inside {
                format!("({})", binding_short(self, &cols, &r.check))
            } else {
                binding_short(self, &cols, &r.check)
            });
            if let Some(p) = r.probability {
                row.push(format!("{:.0} %", 100.0 * p));
            }
            rows.push(row);
        }
        let h: Vec<&str> = header.iter().map(String::as_str).collect();
        s.push_str(&table(&h, &rows));
        s.push_str("  (each limit: its value at the row (its margin at this point, positive on the welding side); binding: the limit with the smallest relative margin, in brackets when the row is inside)\n");
        for c in cols
            .iter()
            .filter(|c| matches!(c.limit, LimitRef::Boundary(_)))
        {
            s.push_str(&format!("  ({}: {})\n", c.short, c.label));
        }
        if self
            .rows
            .iter()
            .any(|r| r.check.inside && r.check.outside_trial_data)
        {
            s.push_str("  (welded*: inside the model limits, but outside the span of a user boundary: outside the trial data)\n");
        }
        if let Some((sc, sa)) = &self.probability {
            s.push_str(&format!(
                "  (P(weld): weld probability, {}; {} draws per row, the same for every row, seed {}; docs/theory.md §15)\n",
                sc.text(),
                sa.samples,
                sa.seed
            ));
        }
        s.push('\n');
        if self.crossings.is_empty() {
            let inside = self.rows.first().is_some_and(|r| r.check.inside);
            s.push_str(if inside {
                "the verdict does not change over this range: inside the window throughout\n"
            } else {
                "the verdict does not change over this range: outside the window throughout\n"
            });
        }
        for c in &self.crossings {
            s.push_str(&format!("{}\n", crossing_text(self, c)));
        }
        for (a, b) in self.inside_stretches() {
            let f = |x: Option<f64>, end: f64| match self.control {
                Control::Angle { .. } => format!("{:.2} deg", x.unwrap_or(end)),
                Control::Velocity { .. } => format!("{:.0} m/s", x.unwrap_or(end)),
            };
            let (lo, hi) = self.control.ends();
            // The rows of the stretch that are welded* (a user boundary does not span them).
            let (from, to) = (a.unwrap_or(lo), b.unwrap_or(hi));
            let rows: Vec<&Row> = self
                .rows
                .iter()
                .filter(|r| r.check.inside && r.at >= from && r.at <= to)
                .collect();
            let untried = rows.iter().filter(|r| r.check.outside_trial_data).count();
            s.push_str(&format!(
                "inside the window from {}{} to {}{}{}\n",
                f(a, lo),
                if a.is_none() {
                    " (the range's start)"
                } else {
                    ""
                },
                f(b, hi),
                if b.is_none() {
                    " (the range's end)"
                } else {
                    ""
                },
                if untried > 0 && untried == rows.len() {
                    ": the model limits only, outside the trial data (its rows are welded*)"
                } else if untried > 0 {
                    ": partly outside the trial data (some rows welded*)"
                } else {
                    ""
                },
            ));
        }
        s.push_str(&trend(self));
        s.push_str(&format!(
            "(entry and exit: bisected to the tolerance of the headroom search of `check`; {})\n",
            oblique_window::margin::ROUNDING_RULE
        ));
        s.push_str(CAUTION);
        s.push('\n');
        s
    }

    /// The rows as CSV, with units in the header names.
    #[must_use]
    pub fn csv(&self) -> String {
        let cols = columns(self);
        let mut head = vec![
            "collision_angle[deg]".to_string(),
            "impact_velocity[m/s]".into(),
            "collision_velocity[m/s]".into(),
            "flow_velocity[m/s]".into(),
            "impact_pressure[GPa]".into(),
            "jetting_critical_angle[deg]".into(),
        ];
        for c in &cols {
            let u = display_unit(c.unit);
            head.push(format!("{} limit[{u}]", c.label));
            head.push(format!("{} margin[{u}]", c.label));
        }
        head.extend(["inside", "prediction", "binding"].map(String::from));
        if self.probability.is_some() {
            head.push("weld_probability".into());
        }
        let mut s = head
            .iter()
            .map(|h| csv_field(h))
            .collect::<Vec<_>>()
            .join(",");
        s.push('\n');
        let num = |x: f64| format!("{}", sig(x));
        for r in &self.rows {
            let e = &r.check.evaluation;
            let mut f = vec![
                num(r.angle_deg),
                num(r.velocity),
                num(e.collision.collision_velocity.si()),
                num(e.collision.flow_velocity.si()),
                num(e.impact.pressure.si() / 1e9),
                e.jetting.critical_angle_deg().map_or(String::new(), num),
            ];
            for c in &cols {
                let scale = if c.unit == "Pa" { 1e-9 } else { 1.0 };
                match limit_at(&r.check, c) {
                    Some((l, m, _))
                        if !(matches!(c.limit, LimitRef::Criterion(CriterionId::Jetting))
                            && l >= 90.0) =>
                    {
                        f.push(num(l * scale));
                        f.push(num(m * scale));
                    }
                    _ => {
                        f.push(String::new());
                        f.push(String::new());
                    }
                }
            }
            f.push(r.check.inside.to_string());
            f.push(r.check.prediction.as_str().into());
            f.push(csv_field(
                &r.check.binding.as_ref().map_or(String::new(), |b| {
                    oblique_window::classify::limit_label(self.window, b)
                }),
            ));
            if let Some(p) = r.probability {
                f.push(num(p));
            }
            s.push_str(&f.join(","));
            s.push('\n');
        }
        s
    }

    /// The trade as JSON: the rows with every derived quantity, the crossings, the caution.
    #[must_use]
    pub fn json(&self) -> Value {
        let cols = columns(self);
        let rows: Vec<Value> = self
            .rows
            .iter()
            .map(|r| {
                let e = &r.check.evaluation;
                let limits: Vec<Value> = cols
                    .iter()
                    .map(|c| {
                        let at = limit_at(&r.check, c);
                        let no_limit = matches!(c.limit, LimitRef::Criterion(CriterionId::Jetting))
                            && at.is_some_and(|(l, ..)| l >= 90.0);
                        json!({
                            "limit": c.label,
                            "kind": if c.lower { "lower" } else { "upper" },
                            "unit": c.unit,
                            "value": if no_limit { Value::Null } else { at.map_or(Value::Null, |x| sig(x.0)) },
                            "margin": at.map_or(Value::Null, |x| sig(x.1)),
                            "satisfied": at.map(|x| x.2),
                        })
                    })
                    .collect();
                json!({
                    "collision_angle_deg": sig(r.angle_deg),
                    "impact_velocity_m_s": sig(r.velocity),
                    "collision_velocity_m_s": sig(e.collision.collision_velocity.si()),
                    "flow_velocity_m_s": sig(e.collision.flow_velocity.si()),
                    "impact_pressure_pa": sig(e.impact.pressure.si()),
                    "jetting_critical_angle_deg": e.jetting.critical_angle_deg().map_or(Value::Null, sig),
                    "limits": limits,
                    "inside": r.check.inside,
                    "prediction": r.check.prediction.as_str(),
                    "outside_trial_data": r.check.outside_trial_data,
                    "domain_inside": r.check.domain.inside(),
                    "binding": r.check.binding.as_ref().map(|b| oblique_window::classify::limit_label(self.window, b)),
                    "weld_probability": r.probability,
                })
            })
            .collect();
        let (control, fixed) = match self.control {
            Control::Angle { velocity, .. } => (
                "collision_angle",
                json!({"impact_velocity_m_s": sig(velocity)}),
            ),
            Control::Velocity { angle_deg, .. } => (
                "impact_velocity",
                json!({"collision_angle_deg": sig(angle_deg)}),
            ),
        };
        let (a, b) = self.control.ends();
        json!({
            "pair": self.window.name,
            "convention": self.convention.as_str(),
            "window_convention": self.window.convention.as_str(),
            "control": control,
            "unit": self.control.unit(),
            "range": [sig(a), sig(b)],
            "steps": self.rows.len(),
            "fixed": fixed,
            "rows": rows,
            "crossings": self.crossings.iter().map(|c| json!({
                "at": c.reached_at,
                "at_unrounded": sig(c.unrounded),
                "entering": c.entering,
                "limit": c.limit,
                "domain_edge": c.domain_edge,
                "span_edge": c.span_edge,
            })).collect::<Vec<_>>(),
            "inside_stretches": self.inside_stretches().iter().map(|(x, y)| json!([x, y])).collect::<Vec<_>>(),
            "probability": self.probability.as_ref().map(|(sc, sa)| json!({
                "scatter": sc.text(), "samples": sa.samples, "seed": sa.seed,
            })),
            "rounding": oblique_window::margin::ROUNDING_RULE,
            "caution": CAUTION,
        })
    }
}

/// How the main quantities move along the control, in words (from the first and last rows).
fn trend(t: &Trade<'_>) -> String {
    let (Some(first), Some(last)) = (t.rows.first(), t.rows.last()) else {
        return String::new();
    };
    let (e0, e1) = (&first.check.evaluation, &last.check.evaluation);
    let mut parts = vec![format!(
        "Vc {:.0} -> {:.0} m/s",
        e0.collision.collision_velocity.si(),
        e1.collision.collision_velocity.si()
    )];
    for id in [
        CriterionId::DeribasLower,
        CriterionId::MeltingUpper,
        CriterionId::Jetting,
    ] {
        if let (Some(a), Some(b)) = (e0.criterion(id), e1.criterion(id)) {
            parts.push(format!(
                "{} {} -> {}",
                short_id(id),
                a.limit_text(),
                b.limit_text()
            ));
        }
    }
    format!(
        "along the range ({} rising): {}\n",
        t.control.name(),
        parts.join("; ")
    )
}

/// A CSV field, quoted when it holds a comma, a quote or a line end.
fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}
