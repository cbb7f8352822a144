//! The computed columns of one output row: the CSV ones as a straight line of writes (see
//! [`CsvPlan`](super::layout::CsvPlan)), the JSON ones column by column.

use super::layout::{Col, Ctx};
use crate::classifier::{MarginUnit, Point};
use crate::format::{RowWriter, TextBuf};
use oblique_window::classify::Prediction;

/// The computed CSV columns of a row, each with its leading comma and each number with the
/// decimals fixed for its column.
#[inline(always)]
pub(super) fn computed_csv(ctx: &Ctx<'_>, margins: &[f64], out: &mut RowWriter<'_>, p: &Point) {
    // Decimals fixed per column, so each conversion is inlined for its count.
    let plan = &ctx.csv_plan;
    if plan.verdict {
        let v = p.verdict.index();
        match ctx.verdict_words.get(v) {
            Some(w) => out.word(w),
            None => {
                out.push(b',');
                out.extend(p.verdict.as_str().as_bytes());
            }
        }
    }
    let unit = p.binding.and_then(|b| ctx.margin_units.get(b));
    if plan.binding {
        out.push(b',');
        if let Some(b) = p.binding {
            match ctx.binding_words.as_ref().and_then(|w| w.get(b)) {
                Some(w) => out.word(w),
                None => out.extend(&ctx.binding_csv[b]),
            }
        }
    }
    if plan.binding_margin {
        out.push(b',');
        if let Some(b) = p.binding {
            let m = margins.get(b).copied().unwrap_or(f64::NAN);
            match unit {
                Some(MarginUnit::MetresPerSecond) => out.fixed_n::<1>(m),
                Some(MarginUnit::Degrees) => out.fixed_n::<3>(m),
                Some(MarginUnit::Gigapascals) => out.fixed_n::<3>(m * 1e-9),
                None => {}
            }
        }
    }
    if plan.binding_unit {
        match unit.and_then(|u| ctx.unit_words.get(*u as usize)) {
            Some(w) => out.word(w),
            None => out.push(b','),
        }
    }
    if plan.binding_relative {
        out.push(b',');
        out.fixed_n::<4>(p.binding_relative);
    }
    if plan.failing {
        out.push(b',');
        if p.verdict != Prediction::Welded {
            failing_csv(ctx, margins, out, p);
        }
    }
    if plan.vp {
        out.push(b',');
        out.fixed_n::<1>(p.vp);
    }
    if plan.vc {
        out.push(b',');
        out.fixed_n::<1>(p.vc);
    }
    if plan.vf {
        out.push(b',');
        out.fixed_n::<1>(p.vf);
    }
    if plan.pressure {
        out.push(b',');
        out.fixed_n::<3>(p.pressure * 1e-9);
    }
    if plan.jetting {
        out.push(b',');
        out.fixed_n::<3>(p.jetting_deg);
    }
    for &(k, unit) in &plan.margins {
        out.push(b',');
        let m = margins.get(k).copied().unwrap_or(f64::NAN);
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
fn failing_csv(ctx: &Ctx<'_>, margins: &[f64], out: &mut RowWriter<'_>, p: &Point) {
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
        if p.fails(k, margins) {
            write(out, k);
        }
    }
}

/// The computed JSON members of a row; `comma`: whether a member comes before them.
pub(super) fn computed_json(
    ctx: &Ctx<'_>,
    margins: &[f64],
    out: &mut TextBuf,
    p: &Point,
    mut comma: bool,
) {
    for (col, key) in ctx.cols.iter().zip(&ctx.computed_keys) {
        if std::mem::replace(&mut comma, true) {
            out.push(b',');
        }
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
                        out.json_number(margins[b] * f, d);
                    }
                    _ => out.extend(b"null"),
                }
            }
            Col::BindingRelative => out.json_number(p.binding_relative, 4),
            Col::Failing => {
                out.push(b'[');
                let mut first = true;
                for k in 0..ctx.binding_json.len() {
                    if p.fails(k, margins) {
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
                out.json_number(margins[k] * f, d);
            }
            Col::Outside => out.extend(if p.outside_trial_data {
                b"true"
            } else {
                b"false"
            }),
        }
    }
}
