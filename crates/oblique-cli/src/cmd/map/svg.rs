//! The weld map's two plots, SVG through plotters into a `String` (deterministic):
//! - the strip along the interface: verdict by position, with the impact-velocity and
//!   collision-angle traces below it;
//! - the window plane: angle against impact velocity, the window's verdict regions tinted and
//!   the points on top, marked one by one when few, as a binned density when many.
//!
//! Palette (own): welded dark blue, not welded orange, melted medium red with white hatching.
//! Their lightness differs (dark, light, medium) so that they stay apart in greyscale and for
//! the common colour-vision deficiencies; the markers differ in shape as well.

use super::classifier::Classifier;
use super::summary::{Histogram, RunInfo, StripAcc, Summary};
use crate::fail::{CmdResult, Fail};
use oblique_window::PairWindow;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

const C_WELDED: RGBColor = RGBColor(24, 54, 118);
const C_NOT: RGBColor = RGBColor(225, 135, 0);
const C_MELTED: RGBColor = RGBColor(196, 44, 44);
/// Stretches without a verdict (rejected rows) on the strip.
const C_NO_VERDICT: RGBColor = RGBColor(20, 20, 20);
const T_WELDED: RGBColor = RGBColor(212, 226, 243);
const T_MELTED: RGBColor = RGBColor(246, 212, 208);
/// Welded by the model limits and the boundaries that span the cell, where some user boundary
/// does not span it (outside the trial data).
const T_UNTRIED: RGBColor = RGBColor(224, 229, 235);
const GREY: RGBColor = RGBColor(90, 90, 90);
const TRACE: RGBColor = RGBColor(30, 30, 30);
const BAND: RGBColor = RGBColor(190, 190, 190);

const PLOT_CAUTION: &str = "Screening estimate from published relations and the window's trials, not a guarantee of a weld. Lethal voltages, stored energy, explosives and flying parts: follow local codes and licensed practice.";

fn perr<E: std::fmt::Display>(e: E) -> Fail {
    Fail::other(format!("plot: {e}"))
}

fn verdict_colour(v: u8) -> RGBColor {
    match v {
        0 => C_WELDED,
        1 => C_NOT,
        _ => C_MELTED,
    }
}

fn nice_step(span: f64) -> f64 {
    let raw = span / 6.0;
    let mag = 10f64.powf(raw.log10().floor());
    let n = raw / mag;
    mag * if n < 1.5 {
        1.0
    } else if n < 3.5 {
        2.0
    } else if n < 7.5 {
        5.0
    } else {
        10.0
    }
}

/// Length per verdict in each of `cols` equal plot columns over [x0, x1] (mm), from the
/// exact strip accumulator (each of its columns spread evenly over the plot columns it meets).
fn columns(st: &StripAcc, x0: f64, x1: f64, cols: usize) -> Vec<[f64; 3]> {
    let mut acc = vec![[0.0; 3]; cols];
    let w = (x1 - x0) / cols as f64;
    if !(w > 0.0) || st.width <= 0.0 {
        return acc;
    }
    for (k, c) in st.cols.iter().enumerate() {
        let total: f64 = c.iter().sum();
        if total <= 0.0 {
            continue;
        }
        let pa = (st.origin + st.dir * k as f64 * st.width) * 1e3;
        let pb = (st.origin + st.dir * (k + 1) as f64 * st.width) * 1e3;
        let (a, b) = if pa <= pb { (pa, pb) } else { (pb, pa) };
        let span = b - a;
        let i0 = (((a - x0) / w).floor().max(0.0) as usize).min(cols - 1);
        let i1 = (((b - x0) / w).floor().max(0.0) as usize).min(cols - 1);
        for (i, cell) in acc.iter_mut().enumerate().take(i1 + 1).skip(i0) {
            let c0 = x0 + i as f64 * w;
            let share = ((b.min(c0 + w) - a.max(c0)).max(0.0) / span).min(1.0);
            for v in 0..3 {
                cell[v] += c[v] * share;
            }
        }
    }
    acc
}

/// Min, mean and max of a trace in each column, from the samples.
fn envelope(
    s: &Summary,
    x0: f64,
    x1: f64,
    cols: usize,
    f: impl Fn(usize) -> f64,
) -> Vec<Option<(f64, f64, f64)>> {
    let mut acc: Vec<Option<(f64, f64, f64, usize)>> = vec![None; cols];
    let w = (x1 - x0) / cols as f64;
    for (k, p) in s.samples.iter().enumerate() {
        let x = p.pos * 1e3;
        let i = if w > 0.0 {
            (((x - x0) / w).floor().max(0.0) as usize).min(cols - 1)
        } else {
            0
        };
        let y = f(k);
        acc[i] = Some(match acc[i] {
            None => (y, y, y, 1),
            Some((lo, sum, hi, n)) => (lo.min(y), sum + y, hi.max(y), n + 1),
        });
    }
    acc.into_iter()
        .map(|c| c.map(|(lo, sum, hi, n)| (lo, sum / n as f64, hi)))
        .collect()
}

/// `; constants set on the command line: ...` when any differs from the window's, else empty.
fn overridden_note(s: &Summary) -> String {
    let set: Vec<String> = s
        .constants
        .iter()
        .filter(|c| c.2 != c.3)
        .map(|&(name, _, value, window)| format!("{name} {value} (window {window})"))
        .collect();
    if set.is_empty() {
        String::new()
    } else {
        format!("; constants set on the command line: {}", set.join(", "))
    }
}

fn title_text(info: &RunInfo<'_>, what: &str) -> String {
    format!(
        "{what}: pair {} ({}), convention {}",
        info.pair, info.pair_line, info.convention
    )
}

/// The strip along the interface.
///
/// # Errors
/// A drawing error.
pub fn strip(
    w: &PairWindow,
    _c: &Classifier,
    s: &Summary,
    info: &RunInfo<'_>,
) -> CmdResult<String> {
    const W: u32 = 1200;
    const H: u32 = 760;
    let (a, b) = s.span().unwrap_or((0.0, 0.0));
    let (mut x0, mut x1) = (a.min(b) * 1e3, a.max(b) * 1e3);
    if x1 - x0 <= 0.0 {
        x0 -= 0.5;
        x1 += 0.5;
    }
    let (frac, basis) = s.welded_fraction();
    let mut svg = String::new();
    {
        oblique_render::window_plot::register_fonts();
        let root = SVGBackend::with_string(&mut svg, (W, H)).into_drawing_area();
        root.fill(&WHITE).map_err(perr)?;
        let (head, rest) = root.split_vertically(96);
        let (body, foot) = rest.split_vertically(H - 96 - 28);
        head.draw(&Text::new(
            title_text(info, "Weld map along the interface"),
            (16, 10),
            ("sans-serif", 18).into_font(),
        ))
        .map_err(perr)?;
        let welded = frac.map_or("-".to_string(), |f| format!("{:.1} %", 100.0 * f));
        let mut sub = if basis == "length" {
            format!(
                "{} rows classified, {} rejected; welded {welded} of {:.3} mm (length-weighted)",
                s.rows_classified,
                s.rows_rejected,
                (x1 - x0).abs()
            )
        } else {
            format!(
                "{} rows classified, {} rejected; welded {welded} of the rows (by count: the positions span no length)",
                s.rows_classified, s.rows_rejected
            )
        };
        if let Some(l) = s.longest_welded {
            sub.push_str(&format!(
                "; longest welded segment {:.3} to {:.3} mm",
                l.start * 1e3,
                l.end * 1e3
            ));
        }
        sub.push_str(&overridden_note(s));
        if s.gaps_total > 0 {
            sub.push_str(&format!(
                "; {} stretch(es) without verdict{}",
                s.gaps_total,
                if s.gaps_total as usize > s.gaps.len() {
                    format!(" (the first {} drawn)", s.gaps.len())
                } else {
                    String::new()
                }
            ));
        }
        head.draw(&Text::new(
            sub,
            (16, 36),
            ("sans-serif", 13).into_font().color(&GREY),
        ))
        .map_err(perr)?;
        if let Some(inv) = &w.invented {
            let mut t = format!("INVENTED DATA in the window: {inv}");
            if t.chars().count() > 170 {
                t = t.chars().take(167).collect::<String>() + "...";
            }
            head.draw(&Text::new(
                t,
                (16, 54),
                ("sans-serif", 11).into_font().color(&C_MELTED),
            ))
            .map_err(perr)?;
        }
        // Legend row, above the data.
        let mut lx = 16;
        let ly = 80;
        for (label, v) in [
            ("welded", 0u8),
            ("not welded", 1),
            ("melted (velocity ceiling)", 2),
        ] {
            head.draw(&Rectangle::new(
                [(lx, ly - 7), (lx + 28, ly + 7)],
                verdict_colour(v).filled(),
            ))
            .map_err(perr)?;
            if v == 2 {
                for k in 0..4 {
                    head.draw(&PathElement::new(
                        vec![(lx + 2 + 7 * k, ly + 7), (lx + 9 + 7 * k, ly - 7)],
                        WHITE.stroke_width(1),
                    ))
                    .map_err(perr)?;
                }
            }
            head.draw(&Text::new(
                label,
                (lx + 36, ly),
                TextStyle::from(("sans-serif", 13).into_font())
                    .pos(Pos::new(HPos::Left, VPos::Center)),
            ))
            .map_err(perr)?;
            lx += 52 + 8 * label.len() as i32;
        }
        if s.gaps_total > 0 {
            head.draw(&Rectangle::new(
                [(lx + 12, ly - 7), (lx + 15, ly + 7)],
                C_NO_VERDICT.filled(),
            ))
            .map_err(perr)?;
            let label = "no verdict";
            head.draw(&Text::new(
                label,
                (lx + 22, ly),
                TextStyle::from(("sans-serif", 13).into_font())
                    .pos(Pos::new(HPos::Left, VPos::Center)),
            ))
            .map_err(perr)?;
            lx += 30 + 7 * label.len() as i32;
        }
        let note = if s.samples.len() as u64 == s.rows_classified {
            "strip: verdict share per column; traces: min-max (grey), mean (black)".to_string()
        } else {
            format!(
                "strip: all rows; traces: min-max and mean of {} evenly spaced rows",
                s.samples.len()
            )
        };
        head.draw(&Text::new(
            note,
            (lx + 10, ly),
            ("sans-serif", 12)
                .into_font()
                .color(&GREY)
                .pos(Pos::new(HPos::Left, VPos::Center)),
        ))
        .map_err(perr)?;

        let panels = body.split_evenly((1, 1));
        let body = &panels[0];
        let (strip_area, traces) = body.split_vertically(110);
        let (v_area, b_area) = traces.split_vertically((H - 96 - 28 - 110) / 2);
        let y_label = 78;
        let step = nice_step(x1 - x0);
        let fmt_x = move |v: &f64| {
            if step >= 1.0 {
                format!("{v:.0}")
            } else if step >= 0.1 {
                format!("{v:.1}")
            } else {
                format!("{v:.3}")
            }
        };

        // Verdict strip.
        let mut chart = ChartBuilder::on(&strip_area)
            .margin_left(16)
            .margin_right(24)
            .margin_top(8)
            .x_label_area_size(34)
            .y_label_area_size(y_label)
            .build_cartesian_2d(x0..x1, 0f64..1f64)
            .map_err(perr)?;
        chart
            .configure_mesh()
            .disable_y_mesh()
            .disable_x_mesh()
            .y_labels(0)
            .x_labels(10)
            .x_label_formatter(&fmt_x)
            .y_desc("verdict")
            .x_desc("position along the interface [mm]")
            .axis_desc_style(("sans-serif", 13))
            .label_style(("sans-serif", 12))
            .draw()
            .map_err(perr)?;
        let (px, _) = chart.plotting_area().get_pixel_range();
        let cols = ((px.end - px.start).max(1)) as usize;
        let cw = (x1 - x0) / cols as f64;
        let acc = match &s.strip {
            Some(st) => columns(st, x0, x1, cols),
            None => vec![[0.0; 3]; cols],
        };
        // Merge equal neighbouring columns; each column is a stack of verdict fractions.
        let mut rects = Vec::new();
        let mut hatch = Vec::new();
        let mut i = 0;
        while i < cols {
            let tot: f64 = acc[i].iter().sum();
            if tot <= 0.0 {
                i += 1;
                continue;
            }
            let f = acc[i].map(|v| v / tot);
            let mut j = i + 1;
            while j < cols {
                let t2: f64 = acc[j].iter().sum();
                if t2 <= 0.0 {
                    break;
                }
                let g = acc[j].map(|v| v / t2);
                if (0..3).any(|k| (g[k] - f[k]).abs() > 0.02) {
                    break;
                }
                j += 1;
            }
            let (xa, xb) = (x0 + i as f64 * cw, x0 + j as f64 * cw);
            let mut y = 0.0;
            for (k, fk) in f.iter().enumerate() {
                if *fk <= 0.0 {
                    continue;
                }
                rects.push(Rectangle::new(
                    [(xa, y), (xb, y + fk)],
                    verdict_colour(k as u8).filled(),
                ));
                if k == 2 {
                    hatch.push((xa, xb, y, y + fk));
                }
                y += fk;
            }
            i = j;
        }
        chart.draw_series(rects).map_err(perr)?;
        // White hatching on melted parts, every 8 px.
        let hstep = 8.0 * cw;
        let mut lines = Vec::new();
        for (xa, xb, ya, yb) in hatch {
            let mut x = (xa / hstep).ceil() * hstep;
            while x < xb {
                lines.push(PathElement::new(
                    vec![(x, ya), ((x + hstep * 0.8).min(xb), yb)],
                    WHITE.stroke_width(1),
                ));
                x += hstep;
            }
        }
        chart.draw_series(lines).map_err(perr)?;
        // Stretches without a verdict, at least 3 px wide so that none is lost between pixels,
        // kept inside the strip so that one at an end does not merge with the axis.
        let min_w = 3.0 * cw;
        let gaps = s.gaps.iter().map(|&(a, b)| {
            let (a, b) = (a.min(b) * 1e3, a.max(b) * 1e3);
            let w = (b - a).max(min_w);
            let left = (0.5 * (a + b) - 0.5 * w).max(x0).min(x1 - w);
            Rectangle::new([(left, 0.0), (left + w, 1.0)], C_NO_VERDICT.filled())
        });
        chart.draw_series(gaps).map_err(perr)?;

        // Traces.
        for (area, label, pick, y_floor) in [
            (&v_area, "impact velocity Vp [m/s]", 0usize, 0.0),
            (&b_area, "collision angle beta [deg]", 1usize, 0.0),
        ] {
            let vals: Vec<f64> = s
                .samples
                .iter()
                .map(|p| {
                    if pick == 0 {
                        f64::from(p.vp)
                    } else {
                        f64::from(p.beta)
                    }
                })
                .collect();
            let hi = vals.iter().copied().fold(f64::MIN, f64::max);
            let lo = vals.iter().copied().fold(f64::MAX, f64::min);
            let (lo, hi) = if vals.is_empty() {
                (0.0, 1.0)
            } else {
                let pad = ((hi - lo) * 0.08).max(hi.abs() * 0.02).max(1e-9);
                ((lo - pad).max(y_floor), hi + pad)
            };
            let mut chart = ChartBuilder::on(area)
                .margin_left(16)
                .margin_right(24)
                .margin_top(10)
                .x_label_area_size(if pick == 1 { 40 } else { 12 })
                .y_label_area_size(y_label)
                .build_cartesian_2d(x0..x1, lo..hi)
                .map_err(perr)?;
            let mut mesh = chart.configure_mesh();
            let span = hi - lo;
            let y_fmt = move |v: &f64| {
                if span >= 20.0 {
                    format!("{v:.0}")
                } else if span >= 2.0 {
                    format!("{v:.1}")
                } else {
                    format!("{v:.3}")
                }
            };
            mesh.y_desc(label)
                .y_label_formatter(&y_fmt)
                .x_labels(10)
                .x_label_formatter(&fmt_x)
                .axis_desc_style(("sans-serif", 13))
                .label_style(("sans-serif", 12))
                .light_line_style(RGBColor(240, 240, 240))
                .bold_line_style(RGBColor(222, 222, 222));
            if pick == 1 {
                mesh.x_desc("position along the interface [mm]");
            } else {
                mesh.x_label_formatter(&|_| String::new());
            }
            mesh.draw().map_err(perr)?;
            let env = envelope(s, x0, x1, cols.min(600), |k| vals[k]);
            let ew = (x1 - x0) / env.len() as f64;
            let band: Vec<Rectangle<(f64, f64)>> = env
                .iter()
                .enumerate()
                .filter_map(|(i, e)| {
                    let (a, _, b) = (*e)?;
                    (b > a).then(|| {
                        Rectangle::new(
                            [(x0 + i as f64 * ew, a), (x0 + (i + 1) as f64 * ew, b)],
                            BAND.filled(),
                        )
                    })
                })
                .collect();
            chart.draw_series(band).map_err(perr)?;
            let mean: Vec<(f64, f64)> = env
                .iter()
                .enumerate()
                .filter_map(|(i, e)| e.map(|(_, m, _)| (x0 + (i as f64 + 0.5) * ew, m)))
                .collect();
            chart
                .draw_series(LineSeries::new(mean, TRACE.stroke_width(2)))
                .map_err(perr)?;
        }
        foot.draw(&Text::new(
            PLOT_CAUTION,
            (16, 8),
            ("sans-serif", 11).into_font().color(&GREY),
        ))
        .map_err(perr)?;
        root.present().map_err(perr)?;
    }
    Ok(svg)
}

fn nice_ceil(x: f64, step: f64) -> f64 {
    (x / step).ceil() * step
}

/// The points on the window plane (angle against impact velocity in the window's convention).
///
/// # Errors
/// A drawing error.
pub fn window_plane(
    w: &PairWindow,
    c: &Classifier,
    s: &Summary,
    info: &RunInfo<'_>,
) -> CmdResult<String> {
    const W: u32 = 1150;
    const H: u32 = 700;
    const LEGEND: u32 = 310;
    const NX: usize = 220;
    const NY: usize = 150;
    let x_max = nice_ceil((s.max_vp * 1.15).max(700.0), 100.0);
    let y_max = nice_ceil((s.max_beta * 1.1).max(30.0), 5.0).min(90.0);
    // Verdict regions of the window on a grid (the same classifier as the rows).
    let mut region = vec![255u8; NX * NY];
    let mut margins = Vec::new();
    for j in 0..NY {
        let beta = y_max * (j as f64 + 0.5) / NY as f64;
        if beta >= 90.0 {
            continue;
        }
        for i in 0..NX {
            let vp = x_max * (i as f64 + 0.5) / NX as f64;
            let v = match c.classify_impact(vp, beta.to_radians(), &mut margins) {
                Ok(p) => match p.verdict {
                    // Welded, but some user boundary does not span the cell.
                    oblique_window::classify::Prediction::Welded if p.outside_trial_data => 3,
                    oblique_window::classify::Prediction::Welded => 0,
                    oblique_window::classify::Prediction::NotWelded => 1,
                    oblique_window::classify::Prediction::Melted => 2,
                },
                Err(_) => 255,
            };
            region[j * NX + i] = v;
        }
    }
    let many = s.rows_classified as usize > s.marks.len();
    let mut svg = String::new();
    {
        oblique_render::window_plot::register_fonts();
        let root = SVGBackend::with_string(&mut svg, (W, H)).into_drawing_area();
        root.fill(&WHITE).map_err(perr)?;
        let (head, rest) = root.split_vertically(52);
        let (main, foot) = rest.split_vertically(H - 52 - 28);
        let (chart_area, legend) = main.split_horizontally(W - LEGEND);
        head.draw(&Text::new(
            format!("Weld map on the window plane: pair {}", info.pair),
            (16, 10),
            ("sans-serif", 18).into_font(),
        ))
        .map_err(perr)?;
        head.draw(&Text::new(
            format!(
                "{}; convention {}; each point classified against the window (tints: the window's verdict regions){}",
                info.pair_line,
                info.convention,
                overridden_note(s)
            ),
            (16, 34),
            ("sans-serif", 13).into_font().color(&GREY),
        ))
        .map_err(perr)?;
        let mut chart = ChartBuilder::on(&chart_area)
            .margin(12)
            .x_label_area_size(46)
            .y_label_area_size(58)
            .build_cartesian_2d(0f64..x_max, 0f64..y_max)
            .map_err(perr)?;
        chart
            .configure_mesh()
            .x_desc(format!("impact velocity Vp [m/s] ({})", info.convention))
            .y_desc("collision angle beta [deg]")
            .axis_desc_style(("sans-serif", 14))
            .label_style(("sans-serif", 12))
            .x_label_formatter(&|v| format!("{v:.0}"))
            .y_label_formatter(&|v| format!("{v:.0}"))
            .light_line_style(RGBColor(240, 240, 240))
            .bold_line_style(RGBColor(220, 220, 220))
            .draw()
            .map_err(perr)?;
        let (dx, dy) = (x_max / NX as f64, y_max / NY as f64);
        let mut rects = Vec::new();
        for j in 0..NY {
            let mut i = 0;
            while i < NX {
                let v = region[j * NX + i];
                let start = i;
                while i < NX && region[j * NX + i] == v {
                    i += 1;
                }
                let colour = match v {
                    0 => T_WELDED,
                    2 => T_MELTED,
                    3 => T_UNTRIED,
                    _ => continue,
                };
                rects.push(Rectangle::new(
                    [
                        (start as f64 * dx, j as f64 * dy),
                        (i as f64 * dx, (j + 1) as f64 * dy),
                    ],
                    colour.filled(),
                ));
            }
        }
        chart.draw_series(rects).map_err(perr)?;

        let mut density_max = 0u64;
        if many {
            if let Some(h) = &s.histogram {
                // Aggregate the exact histogram into plot cells of whole bins.
                let kv = ((x_max / 90.0) / h.dv).ceil().max(1.0) as usize;
                let kb = ((y_max / 60.0) / Histogram::DB).ceil().max(1.0) as usize;
                let nv = Histogram::NV.div_ceil(kv);
                let nb = Histogram::NB.div_ceil(kb);
                let mut cells = vec![0u64; nv * nb];
                for iv in 0..Histogram::NV {
                    for ib in 0..Histogram::NB {
                        let n = h.counts[iv * Histogram::NB + ib];
                        if n > 0 {
                            cells[(iv / kv) * nb + ib / kb] += n;
                        }
                    }
                }
                density_max = cells.iter().copied().max().unwrap_or(0);
                let lmax = ((density_max as f64) + 1.0).ln().max(1e-9);
                let cw = kv as f64 * h.dv;
                let ch = kb as f64 * Histogram::DB;
                let boxes: Vec<Rectangle<(f64, f64)>> = cells
                    .iter()
                    .enumerate()
                    .filter(|(_, n)| **n > 0)
                    .filter_map(|(k, n)| {
                        let (iv, ib) = (k / nb, k % nb);
                        let (xa, ya) = (iv as f64 * cw, ib as f64 * ch);
                        if xa >= x_max || ya >= y_max {
                            return None;
                        }
                        let shade = 0.15 + 0.8 * ((*n as f64) + 1.0).ln() / lmax;
                        Some(Rectangle::new(
                            [(xa, ya), ((xa + cw).min(x_max), (ya + ch).min(y_max))],
                            BLACK.mix(shade.min(0.95)).filled(),
                        ))
                    })
                    .collect();
                chart.draw_series(boxes).map_err(perr)?;
            }
        } else {
            for &(vp, beta, v) in &s.marks {
                let p = (f64::from(vp), f64::from(beta));
                match v {
                    0 => chart.draw_series(std::iter::once(Circle::new(p, 4, C_WELDED.filled()))),
                    1 => chart.draw_series(std::iter::once(
                        EmptyElement::at(p)
                            + Rectangle::new([(-4, -4), (4, 4)], C_NOT.stroke_width(2)),
                    )),
                    _ => chart.draw_series(std::iter::once(Cross::new(
                        p,
                        5,
                        C_MELTED.stroke_width(2),
                    ))),
                }
                .map_err(perr)?;
            }
        }

        // Legend, outside the data.
        let font = TextStyle::from(("sans-serif", 12).into_font());
        let mut y = 24;
        legend
            .draw(&Text::new(
                "Legend",
                (10, y),
                ("sans-serif", 15).into_font(),
            ))
            .map_err(perr)?;
        y += 24;
        for (label, colour) in [
            ("window predicts welded", T_WELDED),
            ("welded, outside a boundary's span", T_UNTRIED),
            ("window predicts melted", T_MELTED),
        ] {
            legend
                .draw(&Rectangle::new([(10, y - 6), (34, y + 6)], colour.filled()))
                .map_err(perr)?;
            legend
                .draw(&Rectangle::new(
                    [(10, y - 6), (34, y + 6)],
                    GREY.stroke_width(1),
                ))
                .map_err(perr)?;
            legend
                .draw(&Text::new(
                    label,
                    (42, y),
                    font.clone().pos(Pos::new(HPos::Left, VPos::Center)),
                ))
                .map_err(perr)?;
            y += 20;
        }
        legend
            .draw(&Rectangle::new(
                [(10, y - 6), (34, y + 6)],
                GREY.stroke_width(1),
            ))
            .map_err(perr)?;
        legend
            .draw(&Text::new(
                "window predicts not welded",
                (42, y),
                font.clone().pos(Pos::new(HPos::Left, VPos::Center)),
            ))
            .map_err(perr)?;
        y += 28;
        if many {
            legend
                .draw(&Text::new(
                    format!("{} points, binned (darker = more)", s.rows_classified),
                    (10, y),
                    font.clone().pos(Pos::new(HPos::Left, VPos::Center)),
                ))
                .map_err(perr)?;
            y += 20;
            for (k, label) in [(0.0, "1".to_string()), (1.0, format!("{density_max}"))] {
                let shade = 0.15 + 0.8 * k;
                legend
                    .draw(&Rectangle::new(
                        [(10, y - 6), (34, y + 6)],
                        BLACK.mix(shade).filled(),
                    ))
                    .map_err(perr)?;
                legend
                    .draw(&Text::new(
                        format!("{label} per cell"),
                        (42, y),
                        font.clone().pos(Pos::new(HPos::Left, VPos::Center)),
                    ))
                    .map_err(perr)?;
                y += 20;
            }
        } else {
            for (label, v) in [("welded", 0u8), ("not welded", 1), ("melted", 2)] {
                let p = (22, y);
                match v {
                    0 => legend.draw(&Circle::new(p, 4, C_WELDED.filled())),
                    1 => legend.draw(
                        &(EmptyElement::at(p)
                            + Rectangle::new([(-4, -4), (4, 4)], C_NOT.stroke_width(2))),
                    ),
                    _ => legend.draw(&Cross::new(p, 5, C_MELTED.stroke_width(2))),
                }
                .map_err(perr)?;
                legend
                    .draw(&Text::new(
                        format!("{label}: {}", s.counts[v as usize]),
                        (42, y),
                        font.clone().pos(Pos::new(HPos::Left, VPos::Center)),
                    ))
                    .map_err(perr)?;
                y += 20;
            }
        }
        y += 10;
        for line in [
            format!(
                "welded {}, not welded {}, melted {}",
                s.counts[0], s.counts[1], s.counts[2]
            ),
            format!("rejected rows: {}", s.rows_rejected),
        ] {
            legend
                .draw(&Text::new(
                    line,
                    (10, y),
                    font.clone().pos(Pos::new(HPos::Left, VPos::Center)),
                ))
                .map_err(perr)?;
            y += 18;
        }
        if let Some(inv) = &w.invented {
            y += 8;
            let text = format!("INVENTED DATA in the window: {inv}");
            for line in oblique_render::window_plot::wrap_words(&text, 46) {
                legend
                    .draw(&Text::new(
                        line,
                        (10, y),
                        ("sans-serif", 11).into_font().color(&C_MELTED),
                    ))
                    .map_err(perr)?;
                y += 14;
            }
        }
        foot.draw(&Text::new(
            PLOT_CAUTION,
            (12, 8),
            ("sans-serif", 11).into_font().color(&GREY),
        ))
        .map_err(perr)?;
        root.present().map_err(perr)?;
    }
    Ok(svg)
}
