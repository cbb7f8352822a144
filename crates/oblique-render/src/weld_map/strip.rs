//! The strip along the interface: verdict shares by position (exact lengths from the summary's
//! accumulator), stretches without a verdict, and the impact-velocity and collision-angle
//! traces (min-max band and mean of the samples per column).

use super::{
    overridden_note, perr, title_text, verdict_colour, BAND, C_MELTED, C_NO_VERDICT, GREY,
    PLOT_CAUTION, TRACE,
};
use crate::error::RenderResult;
use oblique_map::{StripAcc, Summary, N_VERDICTS};
use oblique_window::PairWindow;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

type Area<'a> = DrawingArea<SVGBackend<'a>, Shift>;

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
fn columns(st: &StripAcc, x0: f64, x1: f64, cols: usize) -> Vec<[f64; N_VERDICTS]> {
    let mut acc = vec![[0.0; N_VERDICTS]; cols];
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
            for v in 0..N_VERDICTS {
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

/// The strip along the interface (sorted input only: positions must run one way).
///
/// # Errors
/// A drawing error.
pub fn strip_svg(w: &PairWindow, s: &Summary) -> RenderResult<String> {
    const W: u32 = 1200;
    const H: u32 = 760;
    let (a, b) = s.span().unwrap_or((0.0, 0.0));
    let (mut x0, mut x1) = (a.min(b) * 1e3, a.max(b) * 1e3);
    if x1 - x0 <= 0.0 {
        x0 -= 0.5;
        x1 += 0.5;
    }
    let mut svg = String::new();
    {
        crate::window_plot::register_fonts();
        let root = SVGBackend::with_string(&mut svg, (W, H)).into_drawing_area();
        root.fill(&WHITE).map_err(perr)?;
        let (head, rest) = root.split_vertically(96);
        let (body, foot) = rest.split_vertically(H - 96 - 28);
        strip_head(&head, w, s, x0, x1)?;
        strip_legend(&head, s)?;

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

        let cols = verdict_strip(&strip_area, s, x0, x1, y_label, &fmt_x)?;
        for (area, label, pick, y_floor) in [
            (&v_area, "impact velocity Vp [m/s]", 0usize, 0.0),
            (&b_area, "collision angle beta [deg]", 1usize, 0.0),
        ] {
            trace(
                area,
                s,
                (label, pick, y_floor),
                (x0, x1, cols),
                y_label,
                &fmt_x,
            )?;
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

/// Title, the line of figures and the window's invented-data note.
fn strip_head(head: &Area<'_>, w: &PairWindow, s: &Summary, x0: f64, x1: f64) -> RenderResult {
    let (frac, basis) = s.welded_fraction();
    head.draw(&Text::new(
        title_text(&s.info, "Weld map along the interface"),
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
    Ok(())
}

/// The legend row above the data: the verdicts, stretches without verdict, what is drawn.
fn strip_legend(head: &Area<'_>, s: &Summary) -> RenderResult {
    // Legend row, above the data.
    let mut lx = 16;
    let ly = 80;
    let mut entries = vec![
        ("welded", 0u8),
        ("not welded", 1),
        ("melted (velocity ceiling)", 2),
    ];
    if s.counts[3] > 0 {
        entries.push(("head-on (not welded)", 3));
    }
    if s.counts[4] > 0 {
        entries.push(("outside the validity domain", 4));
    }
    for (label, v) in entries {
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
            TextStyle::from(("sans-serif", 13).into_font()).pos(Pos::new(HPos::Left, VPos::Center)),
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
            TextStyle::from(("sans-serif", 13).into_font()).pos(Pos::new(HPos::Left, VPos::Center)),
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
    Ok(())
}

/// The verdict strip; the number of pixel columns of its plotting area.
fn verdict_strip(
    strip_area: &Area<'_>,
    s: &Summary,
    x0: f64,
    x1: f64,
    y_label: u32,
    fmt_x: &dyn Fn(&f64) -> String,
) -> RenderResult<usize> {
    // Verdict strip.
    let mut chart = ChartBuilder::on(strip_area)
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
        None => vec![[0.0; N_VERDICTS]; cols],
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
            if (0..N_VERDICTS).any(|k| (g[k] - f[k]).abs() > 0.02) {
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
    Ok(cols)
}

/// One trace (`pick` 0: impact velocity, 1: collision angle) below the strip.
fn trace(
    area: &Area<'_>,
    s: &Summary,
    (label, pick, y_floor): (&str, usize, f64),
    (x0, x1, cols): (f64, f64, usize),
    y_label: u32,
    fmt_x: &dyn Fn(&f64) -> String,
) -> RenderResult {
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
    Ok(())
}
