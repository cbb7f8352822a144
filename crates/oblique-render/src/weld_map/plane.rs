//! The points of a weld map on the window plane: angle against impact velocity in the window's
//! convention, the window's verdict regions tinted (the map's own classifier on a grid), the
//! points on top, one by one when few, as a binned density when many.

use super::{
    overridden_note, perr, C_HEAD_ON, C_MELTED, C_NOT, C_WELDED, GREY, PLOT_CAUTION, T_MELTED,
    T_OUTSIDE, T_UNTRIED, T_WELDED,
};
use crate::error::RenderResult;
use oblique_map::{Classifier, Histogram, Summary};
use oblique_window::classify::Prediction;
use oblique_window::PairWindow;
use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

type Chart<'a, 'b> = ChartContext<'a, SVGBackend<'b>, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

/// Grid cells of the verdict regions, across and up.
const NX: usize = 220;
/// See `NX`.
const NY: usize = 150;

fn nice_ceil(x: f64, step: f64) -> f64 {
    (x / step).ceil() * step
}

/// The points on the window plane (angle against impact velocity in the window's convention);
/// `c` is the map's classifier, which tints the window's verdict regions.
///
/// # Errors
/// A drawing error.
pub fn window_plane_svg(w: &PairWindow, c: &Classifier, s: &Summary) -> RenderResult<String> {
    const W: u32 = 1150;
    const H: u32 = 700;
    const LEGEND: u32 = 310;
    let x_max = nice_ceil((s.max_vp * 1.15).max(700.0), 100.0);
    let y_max = nice_ceil((s.max_beta * 1.1).max(30.0), 5.0).min(90.0);
    let region = region_grid(c, x_max, y_max);
    let many = s.rows_classified as usize > s.marks.len();
    let mut svg = String::new();
    {
        crate::window_plot::register_fonts();
        let root = SVGBackend::with_string(&mut svg, (W, H)).into_drawing_area();
        root.fill(&WHITE).map_err(perr)?;
        let (head, rest) = root.split_vertically(52);
        let (main, foot) = rest.split_vertically(H - 52 - 28);
        let (chart_area, legend) = main.split_horizontally(W - LEGEND);
        head.draw(&Text::new(
            format!("Weld map on the window plane: pair {}", s.info.pair),
            (16, 10),
            ("sans-serif", 18).into_font(),
        ))
        .map_err(perr)?;
        head.draw(&Text::new(
            format!(
                "{}; convention {}; each point classified against the window (tints: the window's verdict regions){}",
                s.info.pair_line,
                s.info.convention,
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
            .x_desc(format!("impact velocity Vp [m/s] ({})", s.info.convention))
            .y_desc("collision angle beta [deg]")
            .axis_desc_style(("sans-serif", 14))
            .label_style(("sans-serif", 12))
            .x_label_formatter(&|v| format!("{v:.0}"))
            .y_label_formatter(&|v| format!("{v:.0}"))
            .light_line_style(RGBColor(240, 240, 240))
            .bold_line_style(RGBColor(220, 220, 220))
            .draw()
            .map_err(perr)?;
        draw_regions(&mut chart, &region, c)?;
        let density_max = draw_points(&mut chart, s, many, x_max, y_max)?;
        plane_legend(&legend, w, s, many, density_max)?;
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

/// The verdict code of the window at a point: 0 welded, 1 not welded (or head-on), 2 melted, 3
/// welded but outside a boundary's span, 4 outside the validity domain; `None` where the point
/// cannot be classified.
fn verdict_at(c: &Classifier, vp: f64, beta_deg: f64, margins: &mut Vec<f64>) -> Option<u8> {
    if !(beta_deg < 90.0) {
        return None;
    }
    c.classify_impact(vp, beta_deg.to_radians(), margins)
        .ok()
        .map(|p| match p.verdict {
            // Welded, but some user boundary does not span the point.
            Prediction::Welded if p.outside_trial_data => 3,
            Prediction::Welded => 0,
            Prediction::NotWelded | Prediction::HeadOn => 1,
            Prediction::Melted => 2,
            Prediction::OutsideDomain => 4,
        })
}

/// The grid of the verdict regions: node positions (the lower and left edges just inside the
/// plane) and the verdict code at each node (255: not classified).
struct Regions {
    xs: Vec<f64>,
    ys: Vec<f64>,
    codes: Vec<u8>,
}

/// The window's verdict at every node of the grid (the same classifier as the rows).
fn region_grid(c: &Classifier, x_max: f64, y_max: f64) -> Regions {
    let node = |k: usize, n: usize, max: f64| max * (k as f64).max(0.002) / n as f64;
    let xs: Vec<f64> = (0..=NX).map(|i| node(i, NX, x_max)).collect();
    let ys: Vec<f64> = (0..=NY).map(|j| node(j, NY, y_max)).collect();
    let mut margins = Vec::new();
    let mut codes = Vec::with_capacity(xs.len() * ys.len());
    for &beta in &ys {
        for &vp in &xs {
            codes.push(verdict_at(c, vp, beta, &mut margins).unwrap_or(255));
        }
    }
    Regions { xs, ys, codes }
}

/// The tinted verdict regions, each traced as closed polygons whose edges are bisected on the
/// classifier (no stair steps).
fn draw_regions(chart: &mut Chart<'_, '_>, r: &Regions, c: &Classifier) -> RenderResult {
    let margins = std::cell::RefCell::new(Vec::new());
    for (code, colour) in [
        (0u8, T_WELDED),
        (3, T_UNTRIED),
        (2, T_MELTED),
        (4, T_OUTSIDE),
    ] {
        if !r.codes.contains(&code) {
            continue;
        }
        let values: Vec<f64> = r
            .codes
            .iter()
            .map(|&v| match v {
                255 => f64::NAN,
                v if v == code => 1.0,
                _ => -1.0,
            })
            .collect();
        let probe = |x: f64, y: f64| {
            verdict_at(c, x, y, &mut margins.borrow_mut())
                .map(|v| if v == code { 1.0 } else { -1.0 })
        };
        // One polygon per verdict with its holes cut out (a region around an island of
        // another verdict would otherwise cover the island).
        let outlines = crate::window_plot::field::fill_polygons(
            crate::window_plot::field::trace_field(&r.xs, &r.ys, &values, &probe, true),
        );
        chart
            .draw_series(
                outlines
                    .into_iter()
                    .map(|p| Polygon::new(p, colour.filled())),
            )
            .map_err(perr)?;
    }
    Ok(())
}

/// The points: marked one by one when they are all kept, else the histogram binned into plot
/// cells; the largest count in a cell (0 when marked).
fn draw_points(
    chart: &mut Chart<'_, '_>,
    s: &Summary,
    many: bool,
    x_max: f64,
    y_max: f64,
) -> RenderResult<u64> {
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
                    EmptyElement::at(p) + Rectangle::new([(-4, -4), (4, 4)], C_NOT.stroke_width(2)),
                )),
                3 => chart.draw_series(std::iter::once(
                    EmptyElement::at(p)
                        + Rectangle::new([(-4, -4), (4, 4)], C_HEAD_ON.stroke_width(2)),
                )),
                4 => chart.draw_series(std::iter::once(TriangleMarker::new(
                    p,
                    5,
                    GREY.stroke_width(2),
                ))),
                _ => chart.draw_series(std::iter::once(Cross::new(p, 5, C_MELTED.stroke_width(2)))),
            }
            .map_err(perr)?;
        }
    }
    Ok(density_max)
}

/// The legend beside the plot: the tints, the points, the counts and any invented-data note.
fn plane_legend(
    legend: &DrawingArea<SVGBackend<'_>, Shift>,
    w: &PairWindow,
    s: &Summary,
    many: bool,
    density_max: u64,
) -> RenderResult {
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
        ("outside the validity domain", T_OUTSIDE),
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
        let mut marks = vec![("welded", 0u8), ("not welded", 1), ("melted", 2)];
        if s.counts[3] > 0 {
            marks.push(("head-on", 3));
        }
        if s.counts[4] > 0 {
            marks.push(("outside the domain", 4));
        }
        for (label, v) in marks {
            let p = (22, y);
            match v {
                0 => legend.draw(&Circle::new(p, 4, C_WELDED.filled())),
                1 => legend.draw(
                    &(EmptyElement::at(p)
                        + Rectangle::new([(-4, -4), (4, 4)], C_NOT.stroke_width(2))),
                ),
                3 => legend.draw(
                    &(EmptyElement::at(p)
                        + Rectangle::new([(-4, -4), (4, 4)], C_HEAD_ON.stroke_width(2))),
                ),
                4 => legend.draw(&TriangleMarker::new(p, 5, GREY.stroke_width(2))),
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
        format!(
            "head-on {}, outside the validity domain {}",
            s.counts[3], s.counts[4]
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
        for line in crate::window_plot::wrap_words(&text, 46) {
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
    Ok(())
}
