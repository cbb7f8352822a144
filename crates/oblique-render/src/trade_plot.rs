//! The line plot of a trade (`oblique trade --plot`): the control on the horizontal axis and
//! one panel per kind of quantity stacked over it, sharing that axis: angles (the collision
//! angle against the Deribas minimum and the jetting critical angle), the impact velocity
//! against the strength floor and the melting ceiling, the collision-point and flow velocities
//! against the plates' sound speeds, the impact pressure against the required multiple of the
//! HEL, and the weld probability when it was computed. The stretches inside the window are
//! tinted in every panel and the window's entry and exit are drawn and labelled, so the picture
//! a teacher draws on a board reads off directly: where the point's line crosses a limit's line,
//! the verdict changes. SVG through plotters with the bundled font; PNG by [`crate::png`].

use crate::error::RenderResult;
use crate::window_plot::legend::{draw_legend, Entry, Mark, Section};
use crate::window_plot::{criterion_colour, register_fonts, wrap_words};
use oblique_aim::{Control, Row, Trade};
use oblique_core::CriterionId;
use oblique_window::boundary::{Plane, WeldSide};
use oblique_window::classify::LimitRef;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use std::fmt::Write as _;

const WIDTH: u32 = 1100;
const LEGEND_W: u32 = 300;
const PANEL_H: u32 = 165;
const TITLE_H: u32 = 44;
const AXIS_H: u32 = 44;
const FOOTER_H: u32 = 40;

const INSIDE: RGBColor = RGBColor(214, 229, 244);
const OUTSIDE_DOMAIN: RGBColor = RGBColor(232, 232, 232);
const POINT: RGBColor = RGBColor(20, 20, 20);
const FLOW: RGBColor = RGBColor(120, 120, 120);
const SONIC_PARENT: RGBColor = RGBColor(60, 60, 60);
const SONIC_FLYER: RGBColor = RGBColor(160, 160, 160);
const PROBABILITY: RGBColor = RGBColor(0, 110, 110);
const BOUNDARY: [RGBColor; 4] = [
    RGBColor(1, 133, 113),
    RGBColor(140, 81, 10),
    RGBColor(197, 27, 125),
    RGBColor(110, 120, 0),
];

type Area<'b> = DrawingArea<SVGBackend<'b>, Shift>;

fn err<E: std::fmt::Display>(e: E) -> crate::RenderError {
    crate::RenderError::Draw(e.to_string())
}

/// What a line reads off a row.
type Read = Box<dyn Fn(&Row) -> Option<f64>>;

/// One line of a panel: its label, what it reads off each row (`None` breaks the line), colour,
/// width, dash, and its samples once read.
struct Line {
    label: String,
    read: Read,
    points: Vec<(f64, Option<f64>)>,
    colour: RGBColor,
    width: u32,
    dash: Option<(u32, u32)>,
}

impl Line {
    fn new(
        label: impl Into<String>,
        colour: RGBColor,
        width: u32,
        read: impl Fn(&Row) -> Option<f64> + 'static,
    ) -> Self {
        Line {
            label: label.into(),
            read: Box::new(read),
            points: Vec::new(),
            colour,
            width,
            dash: None,
        }
    }

    fn dashed(mut self, d: (u32, u32)) -> Self {
        self.dash = Some(d);
        self
    }
}

/// A panel: its axis title and its lines.
struct Panel {
    y_desc: String,
    lines: Vec<Line>,
    y_floor_zero: bool,
    y_max: Option<f64>,
}

impl Panel {
    fn new(y_desc: impl Into<String>, lines: Vec<Line>) -> Self {
        Panel {
            y_desc: y_desc.into(),
            lines,
            y_floor_zero: true,
            y_max: None,
        }
    }

    /// The largest value of the panel's first line (the point's own).
    fn point_max(&self) -> f64 {
        self.lines.first().map_or(0.0, |l| {
            l.points.iter().filter_map(|p| p.1).fold(0.0f64, f64::max)
        })
    }
}

fn boundary_colour(i: usize) -> RGBColor {
    BOUNDARY[i % BOUNDARY.len()]
}

fn limit(id: CriterionId) -> impl Fn(&Row) -> Option<f64> {
    move |r: &Row| r.check.evaluation.criterion(id).map(|c| c.limit)
}

/// The limits' lines of the angle, velocity and pressure panels, for the enabled criteria.
fn criterion_lines(t: &Trade<'_>) -> (Vec<Line>, Vec<Line>, Vec<Line>) {
    let cfg = &t.window.criteria;
    let crit = criterion_colour;
    let (mut a, mut v, mut p) = (Vec::new(), Vec::new(), Vec::new());
    if cfg.deribas_enabled {
        a.push(Line::new(
            format!("Deribas minimum angle (k = {})", cfg.deribas_k),
            crit(CriterionId::DeribasLower),
            2,
            limit(CriterionId::DeribasLower),
        ));
    }
    if cfg.jetting_enabled {
        a.push(Line::new(
            "jetting critical angle",
            crit(CriterionId::Jetting),
            2,
            |r: &Row| r.check.evaluation.jetting.critical_angle_deg(),
        ));
    }
    if cfg.strength_enabled {
        v.push(Line::new(
            "strength minimum sqrt(UTS/rho)",
            crit(CriterionId::StrengthLower),
            2,
            limit(CriterionId::StrengthLower),
        ));
    }
    if cfg.melting_enabled {
        v.push(Line::new(
            format!("melting maximum (Wittman, N = {})", cfg.wittman_n),
            crit(CriterionId::MeltingUpper),
            2,
            limit(CriterionId::MeltingUpper),
        ));
        v.push(
            Line::new(
                "melting maximum with Tm in degC (the scale uncertainty)",
                crit(CriterionId::MeltingUpper),
                1,
                |r: &Row| {
                    r.check
                        .evaluation
                        .criterion(CriterionId::MeltingUpper)
                        .and_then(|c| c.limit_tm_celsius)
                },
            )
            .dashed((4, 3)),
        );
    }
    if cfg.pressure_enabled {
        p.push(Line::new(
            format!("required pressure {} x HEL", cfg.hel_multiple),
            crit(CriterionId::PressureLower),
            2,
            |r: &Row| {
                r.check
                    .evaluation
                    .criterion(CriterionId::PressureLower)
                    .map(|c| c.limit / 1e9)
            },
        ));
    }
    (a, v, p)
}

/// The panels of a trade, every line read off the rows' classifications.
fn panels(t: &Trade<'_>) -> Vec<Panel> {
    let w = t.window;
    let (c0p, c0f) = (
        w.parent.material.hugoniot.c0.si(),
        w.flyer.material.hugoniot.c0.si(),
    );
    let (la, lv, lp) = criterion_lines(t);
    let mut angle = Panel::new(
        "angle [deg]",
        vec![Line::new("collision angle beta", POINT, 2, |r: &Row| {
            Some(r.check.evaluation.collision.angle.degrees())
        })],
    );
    angle.lines.extend(la);
    let mut speed = Panel::new(
        format!("Vp [m/s] ({})", w.convention),
        vec![Line::new(
            format!("impact velocity Vp ({})", w.convention),
            POINT,
            2,
            |r: &Row| Some(r.check.evaluation.collision.impact_velocity.si()),
        )],
    );
    speed.lines.extend(lv);
    let mut flow = Panel::new(
        "Vc, Vf [m/s]",
        vec![
            Line::new("collision-point velocity Vc", POINT, 2, |r: &Row| {
                Some(r.check.evaluation.collision.collision_velocity.si())
            }),
            Line::new("flow velocity Vf (flyer inflow)", FLOW, 2, |r: &Row| {
                Some(r.check.evaluation.collision.flow_velocity.si())
            }),
            Line::new(
                format!("C0 of the parent ({})", w.parent.material.id),
                SONIC_PARENT,
                1,
                move |_: &Row| Some(c0p),
            )
            .dashed((6, 4)),
            Line::new(
                format!("C0 of the flyer ({})", w.flyer.material.id),
                SONIC_FLYER,
                1,
                move |_: &Row| Some(c0f),
            )
            .dashed((6, 4)),
        ],
    );
    let mut pressure = Panel::new(
        "pressure [GPa]",
        vec![Line::new("impact pressure p", POINT, 2, |r: &Row| {
            Some(r.check.evaluation.impact.pressure.gpa())
        })],
    );
    pressure.lines.extend(lp);
    for (i, b) in w.boundaries.iter().enumerate() {
        let l = Line::new(
            format!("B{}: {}", i + 1, b.label),
            boundary_colour(i),
            2,
            move |r: &Row| r.check.boundaries.get(i).and_then(|b| b.limit),
        )
        .dashed((8, 4));
        match (b.weld_side, b.plane) {
            (WeldSide::Above | WeldSide::Below, _) => angle.lines.push(l),
            (_, Plane::AngleImpactVelocity) => speed.lines.push(l),
            (_, Plane::AngleCollisionVelocity) => flow.lines.push(l),
        }
    }
    let mut out = vec![angle, speed, flow, pressure];
    if t.probability.is_some() {
        let mut p = Panel::new(
            "P(weld)",
            vec![Line::new("weld probability", PROBABILITY, 2, |r: &Row| {
                r.probability
            })],
        );
        p.y_max = Some(1.0);
        out.push(p);
    }
    for p in &mut out {
        for l in &mut p.lines {
            l.points = t.rows.iter().map(|r| (r.at, (l.read)(r))).collect();
        }
    }
    // Keep the velocity panel readable: the melting ceiling grows without bound as Vc falls.
    out[1].y_max = Some(2.5 * out[1].point_max());
    out[0].y_max = Some((1.6 * out[0].point_max()).clamp(5.0, 90.0));
    out
}

/// The y range of a panel: from zero (or the smallest value) to its cap or the largest value,
/// with a little room.
fn y_range(p: &Panel) -> (f64, f64) {
    let vals = p
        .lines
        .iter()
        .flat_map(|l| l.points.iter().filter_map(|q| q.1));
    let (lo, hi) = vals.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
        (a.min(v), b.max(v))
    });
    let lo = if p.y_floor_zero { lo.min(0.0) } else { lo };
    let hi = match p.y_max {
        Some(cap) => hi.min(cap),
        None => hi,
    };
    if !(lo.is_finite() && hi.is_finite()) || hi <= lo {
        return (0.0, 1.0);
    }
    if p.y_max == Some(1.0) {
        return (0.0, 1.05);
    }
    (lo, hi + 0.08 * (hi - lo))
}

/// The runs of a line inside the panel's y range (a sample outside it, or missing, breaks the
/// line), so that nothing is drawn outside the panel.
fn runs(l: &Line, (lo, hi): (f64, f64)) -> Vec<Vec<(f64, f64)>> {
    let mut out = Vec::new();
    let mut cur = Vec::new();
    for (x, y) in &l.points {
        match y {
            Some(y) if *y >= lo && *y <= hi => cur.push((*x, *y)),
            _ => {
                if cur.len() > 1 {
                    out.push(std::mem::take(&mut cur));
                } else {
                    cur.clear();
                }
            }
        }
    }
    if cur.len() > 1 {
        out.push(cur);
    }
    out
}

/// The text drawn where a panel's lines go (replaced by them, see `put_lines`).
const LINES_MARK: &str = "@@oblique-trade-lines@@";

/// Replace each marker text element, in order, by its panel's lines (`lines`, SVG elements).
fn put_lines(svg: &str, lines: &[String]) -> String {
    let mut out = String::with_capacity(svg.len() + lines.iter().map(String::len).sum::<usize>());
    let mut rest = svg;
    for l in lines {
        let Some(m) = rest.find(LINES_MARK) else {
            break;
        };
        let (Some(open), Some(close)) = (rest[..m].rfind("<text"), rest[m..].find("</text>"))
        else {
            break;
        };
        out.push_str(&rest[..open]);
        out.push_str(l);
        rest = rest[m + close + "</text>".len()..].trim_start_matches('\n');
    }
    out.push_str(rest);
    out
}

/// Render the trade's plot as SVG.
///
/// # Errors
/// [`crate::RenderError`] when drawing fails.
pub fn render_svg(t: &Trade<'_>) -> RenderResult<String> {
    register_fonts();
    let panels = panels(t);
    let height = TITLE_H + PANEL_H * panels.len() as u32 + AXIS_H + FOOTER_H;
    let mut svg = String::new();
    let mut lines = Vec::new();
    {
        let root = SVGBackend::with_string(&mut svg, (WIDTH, height)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        draw(&root, t, &panels, height, &mut lines)?;
        root.present().map_err(err)?;
    }
    let svg = put_lines(&svg, &lines);
    Ok(oblique_window::present::xml_safe(&svg).into_owned())
}

/// Render the trade's plot as PNG (the SVG rasterised with the bundled font).
///
/// # Errors
/// As [`render_svg`], and when rasterising fails.
pub fn render_png(t: &Trade<'_>) -> RenderResult<Vec<u8>> {
    crate::png::svg_to_png(&render_svg(t)?)
}

fn title(t: &Trade<'_>) -> String {
    let w = t.window;
    let what = match t.control {
        Control::Angle { velocity, .. } => {
            format!(
                "the collision angle at Vp {velocity:.0} m/s ({})",
                t.convention
            )
        }
        Control::Velocity { angle_deg, .. } => {
            format!("the impact velocity at {angle_deg:.2} deg")
        }
    };
    format!(
        "Trade-off along {what}: {} ({} {:.2} mm on {})",
        w.name,
        w.flyer.material.id,
        w.flyer_thickness.mm(),
        w.parent.material.id
    )
}

fn draw(
    root: &Area<'_>,
    t: &Trade<'_>,
    panels: &[Panel],
    height: u32,
    lines: &mut Vec<String>,
) -> RenderResult {
    let (top, rest) = root.split_vertically(TITLE_H);
    top.draw(&Text::new(
        title(t),
        (14, 14),
        ("sans-serif", 17).into_font().color(&BLACK),
    ))
    .map_err(err)?;
    let (main, footer) = rest.split_vertically(height - TITLE_H - FOOTER_H);
    let (charts, legend) = main.split_horizontally(WIDTH - LEGEND_W);
    let (lo, hi) = (
        t.rows.first().map_or(0.0, |r| r.at),
        t.rows.last().map_or(1.0, |r| r.at),
    );
    let mut y0 = 0u32;
    let n = panels.len();
    for (k, p) in panels.iter().enumerate() {
        let h = PANEL_H + if k + 1 == n { AXIS_H } else { 0 };
        let area = charts.clone().shrink((0, y0), (WIDTH - LEGEND_W, h));
        y0 += h;
        draw_panel(&area, t, p, (lo, hi), (k + 1 == n, k == 0), lines)?;
    }
    // As low as it has always gone (the legend reaches 630 px below the title at most).
    draw_legend(&legend, &legend_sections(t, panels), 630).map_err(err)?;
    footer
        .draw(&Text::new(
            "Screening estimate from published relations, not a guarantee of a weld. Lethal voltages, stored energy, explosives and flying parts: follow local codes and licensed practice.",
            (12, 8),
            ("sans-serif", 11).into_font().color(&RGBColor(90, 90, 90)),
        ))
        .map_err(err)?;
    if let Some(inv) = &t.window.invented {
        footer
            .draw(&Text::new(
                wrap_words(&format!("INVENTED DATA: {inv}"), 190).remove(0),
                (12, 24),
                ("sans-serif", 11).into_font().color(&RGBColor(165, 15, 21)),
            ))
            .map_err(err)?;
    }
    Ok(())
}

fn draw_panel(
    area: &Area<'_>,
    t: &Trade<'_>,
    p: &Panel,
    (lo, hi): (f64, f64),
    (bottom, first): (bool, bool),
    lines: &mut Vec<String>,
) -> RenderResult {
    let (ylo, yhi) = y_range(p);
    let mut chart = ChartBuilder::on(area)
        .margin_left(12)
        .margin_right(16)
        .margin_top(6)
        .x_label_area_size(if bottom { AXIS_H } else { 0 })
        .y_label_area_size(66)
        .build_cartesian_2d(lo..hi, ylo..yhi)
        .map_err(err)?;
    let x_desc = match t.control {
        Control::Angle { .. } => "collision angle beta [deg]".to_string(),
        Control::Velocity { .. } => format!("impact velocity Vp [m/s] ({})", t.convention),
    };
    // Outside the validity domain (between rows both outside), then the window's stretches.
    for pair in t.rows.windows(2) {
        if !pair[0].check.domain.inside() && !pair[1].check.domain.inside() {
            chart
                .draw_series([Rectangle::new(
                    [(pair[0].at, ylo), (pair[1].at, yhi)],
                    OUTSIDE_DOMAIN.filled(),
                )])
                .map_err(err)?;
        }
    }
    for (a, b) in t.inside_stretches() {
        let a = a.unwrap_or(lo);
        let b = b.unwrap_or(hi);
        chart
            .draw_series([Rectangle::new([(a, ylo), (b, yhi)], INSIDE.filled())])
            .map_err(err)?;
    }
    let wide = yhi - ylo >= 10.0;
    let yfmt = move |v: &f64| {
        if wide {
            format!("{v:.0}")
        } else {
            format!("{v:.1}")
        }
    };
    let xfmt = |v: &f64| format!("{v}");
    let mut mesh = chart.configure_mesh();
    mesh.y_desc(p.y_desc.as_str())
        .axis_desc_style(("sans-serif", 13))
        .label_style(("sans-serif", 12))
        .y_labels(5)
        .y_label_formatter(&yfmt)
        .x_label_formatter(&xfmt)
        .light_line_style(RGBColor(240, 240, 240))
        .bold_line_style(RGBColor(220, 220, 220));
    if bottom {
        mesh.x_desc(x_desc.as_str());
    } else {
        mesh.x_labels(0);
    }
    mesh.draw().map_err(err)?;
    // The lines go in with sub-pixel vertices: the backend rounds every vertex to a whole
    // pixel, which bends a straight rise of a few pixels per row into visible steps. A marker
    // text drawn here, at the lines' place in the drawing order, is replaced by them afterwards
    // (`put_lines`).
    let (c0, c1) = (
        chart.backend_coord(&(lo, ylo)),
        chart.backend_coord(&(hi, yhi)),
    );
    let to_px = |(x, y): (f64, f64)| {
        (
            f64::from(c0.0) + (x - lo) / (hi - lo) * f64::from(c1.0 - c0.0),
            f64::from(c0.1) + (y - ylo) / (yhi - ylo) * f64::from(c1.1 - c0.1),
        )
    };
    let mut svg_lines = String::new();
    for l in &p.lines {
        for run in runs(l, (ylo, yhi)) {
            let pts: Vec<String> = run
                .into_iter()
                .map(|q| {
                    let (x, y) = to_px(q);
                    format!("{x:.2},{y:.2}")
                })
                .collect();
            let dash = l.dash.map_or(String::new(), |(d, g)| {
                format!(" stroke-dasharray=\"{d} {g}\"")
            });
            let _ = writeln!(
                svg_lines,
                "<polyline fill=\"none\" opacity=\"1\" stroke=\"#{:02X}{:02X}{:02X}\" stroke-width=\"{}\"{dash} points=\"{}\"/>",
                l.colour.0,
                l.colour.1,
                l.colour.2,
                l.width,
                pts.join(" ")
            );
        }
    }
    lines.push(svg_lines);
    area.draw(&Text::new(LINES_MARK, (0, 0), ("sans-serif", 1)))
        .map_err(err)?;
    for (k, c) in t.crossings.iter().enumerate() {
        chart
            .draw_series(DashedLineSeries::new(
                vec![(c.unrounded, ylo), (c.unrounded, yhi)],
                5,
                3,
                BLACK.stroke_width(1),
            ))
            .map_err(err)?;
        if first {
            let at = match t.control {
                Control::Angle { .. } => format!("{:.2} deg", c.reached_at),
                Control::Velocity { .. } => format!("{:.0} m/s", c.reached_at),
            };
            let text = format!(
                "{} {at}",
                if c.entering { "enters at" } else { "leaves at" }
            );
            let (px, _) = chart.backend_coord(&(c.unrounded, yhi));
            let right = f64::from(px) < f64::from(WIDTH - LEGEND_W) * 0.75;
            let pos = Pos::new(if right { HPos::Left } else { HPos::Right }, VPos::Top);
            let dx = if right { 5 } else { -5 };
            // Labels of neighbouring crossings alternate in height.
            let dy = 3 + 15 * (k as i32 % 2);
            chart
                .plotting_area()
                .draw(
                    &(EmptyElement::at((c.unrounded, yhi))
                        + Text::new(
                            text,
                            (dx, dy),
                            ("sans-serif", 12).into_font().color(&BLACK).pos(pos),
                        )),
                )
                .map_err(err)?;
        }
    }
    Ok(())
}

fn legend_sections(t: &Trade<'_>, panels: &[Panel]) -> Vec<Section> {
    let mut point = Section::new("At the point");
    point.push(Entry::new(
        "the point's own value in each panel (beta, Vp, Vc, p)",
        Mark::Line {
            colour: POINT,
            width: 2,
            dash: None,
        },
    ));
    let mut limits = Section::new("Limits");
    for p in panels {
        for (k, l) in p.lines.iter().enumerate() {
            if k == 0 && l.label != "weld probability" {
                continue;
            }
            let e = Entry::new(
                l.label.clone(),
                Mark::Line {
                    colour: l.colour,
                    width: l.width,
                    dash: l.dash,
                },
            );
            let is_point =
                k == 0 || l.label.starts_with("flow velocity") || l.label == "weld probability";
            if is_point {
                point.push(e);
            } else {
                limits.push(e);
            }
        }
    }
    let mut window = Section::new("Window");
    if !t.inside_stretches().is_empty() {
        window.push(Entry::new("inside the window", Mark::Fill(INSIDE)));
    }
    if t.rows.iter().any(|r| !r.check.domain.inside()) {
        window.push(Entry::new(
            "outside the validity domain: no verdict claimed",
            Mark::Fill(OUTSIDE_DOMAIN),
        ));
    }
    if !t.crossings.is_empty() {
        window.push(Entry::new(
            "entry / exit: where the verdict changes",
            Mark::Line {
                colour: BLACK,
                width: 1,
                dash: Some((5, 3)),
            },
        ));
    }
    let _ = LimitRef::Boundary(0);
    vec![point, limits, window]
}
