//! Window plots: the weldable region shaded from a grid evaluation of every active criterion and
//! user boundary, each limit drawn as a contour (or the user's polyline), trials by outcome,
//! proposed points and process curves with their verdicts. SVG through plotters, rendered into a
//! `String`; deterministic for the same input.

use crate::error::{RenderError, RenderResult};
use oblique_core::units::{Angle, Velocity};
use oblique_core::{Collision, CriterionId};
use oblique_window::boundary::Plane;
use oblique_window::classify::{classify_with_jetting, Classification, LimitRef};
use oblique_window::{Outcome, PairWindow};
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// A proposed process point (impact velocity in the window's convention).
#[derive(Debug, Clone)]
pub struct ProposedPoint {
    /// Label shown beside the marker.
    pub label: String,
    /// Impact velocity Vp, m/s.
    pub velocity_m_s: f64,
    /// Collision angle, rad.
    pub angle_rad: f64,
}

/// A process curve: a polyline of points (e.g. velocity against standoff).
#[derive(Debug, Clone)]
pub struct ProcessCurve {
    /// Label shown at the curve's end.
    pub label: String,
    /// Points: impact velocity (m/s) and angle (rad), each with an optional label.
    pub points: Vec<(f64, f64, Option<String>)>,
}

/// What to plot.
pub struct PlotRequest<'a> {
    /// The pair window.
    pub window: &'a PairWindow,
    /// The plane.
    pub plane: Plane,
    /// Proposed points.
    pub points: Vec<ProposedPoint>,
    /// Process curves.
    pub curves: Vec<ProcessCurve>,
}

/// More proposed points than this are drawn as a density (binned), and the plot says so.
pub const MAX_MARKED_POINTS: usize = 400;
/// Points up to this count get a text label with their verdict.
pub const MAX_LABELLED_POINTS: usize = 12;

const WIDTH: u32 = 1100;
const HEIGHT: u32 = 680;
const LEGEND_W: u32 = 300;
const NX: usize = 150;
const NY: usize = 110;

const REGION: RGBColor = RGBColor(214, 229, 244);
const C_WELDED: RGBColor = RGBColor(27, 79, 138);
const C_NOT: RGBColor = RGBColor(224, 138, 0);
const C_PARTIAL: RGBColor = RGBColor(123, 50, 148);
const C_MELTED: RGBColor = RGBColor(165, 15, 21);
const C_INFO: RGBColor = RGBColor(120, 120, 120);
/// Predicted welded (model limits and the boundaries that span the point), but where some user
/// boundary does not span (outside the trial data).
const REGION_UNTRIED: RGBColor = RGBColor(224, 229, 235);
const C_SONIC_PARENT: RGBColor = RGBColor(60, 60, 60);
const C_SONIC_FLYER: RGBColor = RGBColor(150, 150, 150);
/// Cells outside the validity domain, and the domain's edge.
const C_OUTSIDE_DOMAIN: RGBColor = RGBColor(212, 212, 212);
const C_DOMAIN_EDGE: RGBColor = RGBColor(70, 70, 70);

fn criterion_colour(id: CriterionId) -> RGBColor {
    match id {
        CriterionId::DeribasLower => RGBColor(27, 120, 55),
        CriterionId::StrengthLower => RGBColor(118, 42, 131),
        CriterionId::PressureLower => RGBColor(179, 88, 6),
        CriterionId::MeltingUpper => RGBColor(178, 24, 43),
        CriterionId::Jetting => RGBColor(33, 102, 172),
        CriterionId::WavyTransition => C_INFO,
    }
}

/// The legend label of a criterion, with its constants.
pub fn criterion_label(window: &PairWindow, id: CriterionId) -> String {
    let c = &window.criteria;
    match id {
        CriterionId::DeribasLower => format!("Deribas lower, k = {}", c.deribas_k),
        CriterionId::StrengthLower => "strength lower, sqrt(UTS/rho)".into(),
        CriterionId::PressureLower => format!("pressure lower, {} x HEL", c.hel_multiple),
        CriterionId::MeltingUpper => format!("Wittman melting upper, N = {}", c.wittman_n),
        CriterionId::Jetting => "jetting critical angle".into(),
        CriterionId::WavyTransition => {
            format!("wavy transition, Re = {} (info)", c.wavy_critical_reynolds)
        }
    }
}

/// The plane's horizontal value of a point given as (Vp, beta).
fn x_of(window: &PairWindow, plane: Plane, vp: f64, beta: f64) -> Option<f64> {
    match plane {
        Plane::AngleImpactVelocity => Some(vp),
        Plane::AngleCollisionVelocity => Collision::from_impact(
            window.convention,
            Velocity::from_m_s(vp),
            Angle::from_radians(beta),
        )
        .ok()
        .map(|c| c.collision_velocity.si()),
    }
}

fn collision_at(window: &PairWindow, plane: Plane, x: f64, beta_deg: f64) -> Option<Collision> {
    let beta = Angle::from_degrees(beta_deg);
    match plane {
        Plane::AngleImpactVelocity => {
            Collision::from_impact(window.convention, Velocity::from_m_s(x), beta).ok()
        }
        Plane::AngleCollisionVelocity => {
            Collision::from_collision_velocity(window.convention, Velocity::from_m_s(x), beta).ok()
        }
    }
}

fn nice_ceil(x: f64, step: f64) -> f64 {
    (x / step).ceil() * step
}

/// Classify one point (the jetting test solved directly).
pub fn classify_point(window: &PairWindow, vp: f64, beta: f64) -> RenderResult<Classification> {
    let setup = window.setup()?;
    let c = Collision::from_impact(
        window.convention,
        Velocity::from_m_s(vp),
        Angle::from_radians(beta),
    )?;
    Ok(oblique_window::classify::classify(window, &setup, &c)?)
}

struct Field {
    xs: Vec<f64>,
    ys: Vec<f64>,
    /// 0 outside, 1 inside, 2 inside but outside the trial data (a boundary does not span it).
    region: Vec<u8>,
    margins: Vec<(CriterionId, Vec<f64>)>,
    sonic_parent: Vec<f64>,
    sonic_flyer: Vec<f64>,
    /// How far inside the validity domain (`ValidityDomain::margin`: positive inside, the
    /// verdict's own test decides the sign), NaN where not evaluated.
    domain: Vec<f64>,
}

fn evaluate_field(
    window: &PairWindow,
    plane: Plane,
    x_max: f64,
    y_max: f64,
) -> RenderResult<Field> {
    let setup = window.setup()?;
    let xs: Vec<f64> = (0..NX)
        .map(|i| x_max * (i as f64 + 0.5) / NX as f64)
        .collect();
    let ys: Vec<f64> = (0..NY)
        .map(|j| y_max * (j as f64 + 0.5) / NY as f64)
        .collect();
    let ids: Vec<CriterionId> = CriterionId::ALL
        .into_iter()
        .filter(|id| criterion_enabled(window, *id))
        .collect();
    let mut margins: Vec<(CriterionId, Vec<f64>)> = ids
        .iter()
        .map(|id| (*id, vec![f64::NAN; NX * NY]))
        .collect();
    let mut region = vec![0u8; NX * NY];
    let mut sonic_parent = vec![f64::NAN; NX * NY];
    let mut sonic_flyer = vec![f64::NAN; NX * NY];
    let mut domain = vec![f64::NAN; NX * NY];
    let c0p = setup.parent.sound_speed().si();
    let c0f = setup.flyer.sound_speed().si();
    for (j, &y) in ys.iter().enumerate() {
        if y >= 90.0 {
            continue;
        }
        for (i, &x) in xs.iter().enumerate() {
            let Some(col) = collision_at(window, plane, x, y) else {
                continue;
            };
            let k = j * NX + i;
            sonic_parent[k] = col.collision_velocity.si() / c0p - 1.0;
            sonic_flyer[k] = col.flow_velocity.si() / c0f - 1.0;
            let jet = oblique_core::jetting::critical_angle(
                &setup.flyer.hugoniot,
                &setup.parent.hugoniot,
                col.flow_velocity,
                col.collision_velocity,
                window.criteria.mixed_jetting,
            )?;
            let c = classify_with_jetting(window, &setup, &col, jet)?;
            let m = window.domain.margin(&setup, &col).abs().max(1e-12);
            domain[k] = if c.domain.inside() { m } else { -m };
            region[k] = match (c.inside, c.outside_trial_data) {
                (false, _) => 0,
                (true, false) => 1,
                (true, true) => 2,
            };
            for (id, m) in &mut margins {
                if let Some(r) = c.evaluation.criterion(*id) {
                    m[k] = r.margin;
                }
            }
        }
    }
    Ok(Field {
        xs,
        ys,
        region,
        margins,
        sonic_parent,
        sonic_flyer,
        domain,
    })
}

/// Light grey over the cells outside the validity domain (no verdict claimed there) and a
/// grey line along its edge; the legend entry, when some cell lies outside.
fn draw_validity_domain<DB: DrawingBackend>(
    chart: &mut ChartContext<'_, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
    field: &Field,
    dx: f64,
    dy: f64,
) -> RenderResult<Option<(String, ShapeStyle, u8)>> {
    let mut rects = Vec::new();
    for j in 0..NY {
        let mut i = 0;
        while i < NX {
            if field.domain[j * NX + i] < 0.0 {
                let start = i;
                while i < NX && field.domain[j * NX + i] < 0.0 {
                    i += 1;
                }
                rects.push(Rectangle::new(
                    [
                        (start as f64 * dx, j as f64 * dy),
                        (i as f64 * dx, (j + 1) as f64 * dy),
                    ],
                    C_OUTSIDE_DOMAIN.filled(),
                ));
            } else {
                i += 1;
            }
        }
    }
    if rects.is_empty() {
        return Ok(None);
    }
    chart.draw_series(rects).map_err(plot_err)?;
    for line in contour(&field.xs, &field.ys, &field.domain) {
        chart
            .draw_series(DashedLineSeries::new(
                line,
                6,
                3,
                C_DOMAIN_EDGE.stroke_width(2),
            ))
            .map_err(plot_err)?;
    }
    Ok(Some((
        "outside the validity domain (dashed edge): no verdict claimed (docs/theory.md §7.1)"
            .into(),
        C_OUTSIDE_DOMAIN.filled(),
        0,
    )))
}

fn criterion_enabled(window: &PairWindow, id: CriterionId) -> bool {
    let c = &window.criteria;
    match id {
        CriterionId::DeribasLower => c.deribas_enabled,
        CriterionId::StrengthLower => c.strength_enabled,
        CriterionId::PressureLower => c.pressure_enabled,
        CriterionId::MeltingUpper => c.melting_enabled,
        CriterionId::Jetting => c.jetting_enabled,
        CriterionId::WavyTransition => c.wavy_enabled,
    }
}

/// Zero contour of a node field by marching squares: polylines (chained segments).
fn contour(xs: &[f64], ys: &[f64], f: &[f64]) -> Vec<Vec<(f64, f64)>> {
    let nx = xs.len();
    let mut segs: Vec<((f64, f64), (f64, f64))> = Vec::new();
    let v = |i: usize, j: usize| f[j * nx + i];
    for j in 0..ys.len().saturating_sub(1) {
        for i in 0..nx.saturating_sub(1) {
            let corners = [(i, j), (i + 1, j), (i + 1, j + 1), (i, j + 1)];
            let vals: Vec<f64> = corners.iter().map(|&(a, b)| v(a, b)).collect();
            if vals.iter().any(|x| !x.is_finite()) {
                continue;
            }
            let mut pts = Vec::new();
            for e in 0..4 {
                let (a, b) = (e, (e + 1) % 4);
                let (va, vb) = (vals[a], vals[b]);
                if (va < 0.0) != (vb < 0.0) {
                    let t = va / (va - vb);
                    let (ia, ja) = corners[a];
                    let (ib, jb) = corners[b];
                    let x = xs[ia] + t * (xs[ib] - xs[ia]);
                    let y = ys[ja] + t * (ys[jb] - ys[ja]);
                    pts.push((x, y));
                }
            }
            if pts.len() == 2 {
                segs.push((pts[0], pts[1]));
            } else if pts.len() == 4 {
                segs.push((pts[0], pts[1]));
                segs.push((pts[2], pts[3]));
            }
        }
    }
    chain(segs)
}

/// Join segments that share end points into polylines (keeps the SVG small).
fn chain(segs: Vec<((f64, f64), (f64, f64))>) -> Vec<Vec<(f64, f64)>> {
    use std::collections::HashMap;
    let key = |p: (f64, f64)| ((p.0 * 1e6).round() as i64, (p.1 * 1e6).round() as i64);
    let mut by_end: HashMap<(i64, i64), Vec<usize>> = HashMap::new();
    for (n, (a, b)) in segs.iter().enumerate() {
        by_end.entry(key(*a)).or_default().push(n);
        by_end.entry(key(*b)).or_default().push(n);
    }
    let mut used = vec![false; segs.len()];
    let mut out = Vec::new();
    for start in 0..segs.len() {
        if used[start] {
            continue;
        }
        used[start] = true;
        let mut line = vec![segs[start].0, segs[start].1];
        for forward in [true, false] {
            loop {
                let end = if forward {
                    line[line.len() - 1]
                } else {
                    line[0]
                };
                let next = by_end
                    .get(&key(end))
                    .and_then(|v| v.iter().copied().find(|&n| !used[n]));
                let Some(n) = next else { break };
                used[n] = true;
                let (a, b) = segs[n];
                let other = if key(a) == key(end) { b } else { a };
                if forward {
                    line.push(other);
                } else {
                    line.insert(0, other);
                }
            }
        }
        out.push(line);
    }
    out
}

fn plot_err<E: std::fmt::Display>(e: E) -> RenderError {
    RenderError::Draw(e.to_string())
}

/// Ranges from the data and the region evaluated on the grid.
fn prepare<'a>(req: &'a PlotRequest<'a>) -> RenderResult<Prepared<'a>> {
    let w = req.window;
    let plane = req.plane;
    // Ranges from the data: trials, proposed points, curves.
    let mut xs_data = Vec::new();
    let mut ys_data = Vec::new();
    for o in &w.observations {
        xs_data.extend(x_of(w, plane, o.velocity.si(), o.angle.radians()));
        ys_data.push(o.angle.degrees());
    }
    for p in &req.points {
        xs_data.extend(x_of(w, plane, p.velocity_m_s, p.angle_rad));
        ys_data.push(p.angle_rad.to_degrees());
    }
    for c in &req.curves {
        for (v, a, _) in &c.points {
            xs_data.extend(x_of(w, plane, *v, *a));
            ys_data.push(a.to_degrees());
        }
    }
    let max_x = xs_data.iter().copied().fold(0.0f64, f64::max);
    let max_y = ys_data.iter().copied().fold(0.0f64, f64::max);
    let (x_max, x_label) = match plane {
        Plane::AngleImpactVelocity => (
            nice_ceil((max_x * 1.2).max(700.0), 100.0),
            "impact velocity Vp [m/s]",
        ),
        Plane::AngleCollisionVelocity => {
            let c0 = w
                .flyer
                .material
                .sound_speed()
                .si()
                .max(w.parent.material.sound_speed().si());
            (
                nice_ceil((max_x * 1.1).clamp(1.4 * c0, 12_000.0), 500.0),
                "collision-point velocity Vc [m/s]",
            )
        }
    };
    let y_max = nice_ceil((max_y * 1.15).max(30.0), 5.0).min(85.0);
    let field = evaluate_field(w, plane, x_max, y_max)?;
    Ok(Prepared {
        req,
        field,
        x_max,
        y_max,
        x_label,
    })
}

/// Ranges and the evaluated region, ready to draw on any backend.
struct Prepared<'a> {
    req: &'a PlotRequest<'a>,
    field: Field,
    x_max: f64,
    y_max: f64,
    x_label: &'static str,
}

/// Render the window plot as an SVG string.
///
/// # Errors
/// A physics error in the window, or a drawing error.
pub fn render_svg(req: &PlotRequest<'_>) -> RenderResult<String> {
    register_fonts();
    let p = prepare(req)?;
    let mut svg = String::new();
    draw(
        SVGBackend::with_string(&mut svg, (WIDTH, HEIGHT)).into_drawing_area(),
        &p,
    )?;
    // User text (labels, names) may hold characters XML forbids: keep the SVG well-formed.
    Ok(oblique_window::present::xml_safe(&svg).into_owned())
}

/// Render the window plot as PNG bytes (for slides), with the bundled font.
///
/// # Errors
/// A physics error in the window, or a drawing or encoding error.
pub fn render_png(req: &PlotRequest<'_>) -> RenderResult<Vec<u8>> {
    register_fonts();
    let p = prepare(req)?;
    let mut rgb = vec![0u8; (WIDTH * HEIGHT * 3) as usize];
    draw(
        BitMapBackend::with_buffer(&mut rgb, (WIDTH, HEIGHT)).into_drawing_area(),
        &p,
    )?;
    encode_png(&rgb, WIDTH, HEIGHT)
}

/// Encode an RGB buffer as PNG.
fn encode_png(rgb: &[u8], width: u32, height: u32) -> RenderResult<Vec<u8>> {
    use image::ImageEncoder;
    let mut out = Vec::new();
    image::codecs::png::PngEncoder::new(&mut out)
        .write_image(rgb, width, height, image::ColorType::Rgb8)
        .map_err(plot_err)?;
    Ok(out)
}

/// The text font, bundled (DejaVu Sans, Bitstream Vera licence in assets/) so that plots do not
/// depend on the fonts installed on the machine.
pub fn register_fonts() {
    static ONCE: std::sync::Once = std::sync::Once::new();
    ONCE.call_once(|| {
        let bytes: &'static [u8] = include_bytes!("../assets/DejaVuSans.ttf");
        // The bundled file is a valid font; a failure would only leave text out of bitmaps.
        let _ = plotters::style::register_font("sans-serif", FontStyle::Normal, bytes);
    });
}

/// Draw the window plot on any plotters backend.
fn draw<DB: DrawingBackend>(
    root: DrawingArea<DB, plotters::coord::Shift>,
    p: &Prepared<'_>,
) -> RenderResult {
    let (req, field, x_max, y_max, x_label) = (p.req, &p.field, p.x_max, p.y_max, p.x_label);
    let w = req.window;
    let plane = req.plane;
    root.fill(&WHITE).map_err(plot_err)?;
    let (main, bottom) = root.split_vertically(HEIGHT - 26);
    let (chart_area, legend_area) = main.split_horizontally(WIDTH - LEGEND_W);
    let title = format!(
        "{}: {} flyer {:.2} mm on {}, convention {}",
        w.name,
        w.flyer.material.id,
        w.flyer_thickness.mm(),
        w.parent.material.id,
        w.convention
    );
    let mut chart = ChartBuilder::on(&chart_area)
        .caption(title, ("sans-serif", 20))
        .margin(12)
        .x_label_area_size(46)
        .y_label_area_size(58)
        .build_cartesian_2d(0f64..x_max, 0f64..y_max)
        .map_err(plot_err)?;
    chart
        .configure_mesh()
        .x_desc(x_label)
        .y_desc("collision angle beta [deg]")
        .axis_desc_style(("sans-serif", 15))
        .label_style(("sans-serif", 13))
        .x_label_formatter(&|v| format!("{v:.0}"))
        .y_label_formatter(&|v| format!("{v:.0}"))
        .light_line_style(RGBColor(238, 238, 238))
        .bold_line_style(RGBColor(215, 215, 215))
        .draw()
        .map_err(plot_err)?;

    // Weldable region: run-length merged cells.
    let dx = x_max / NX as f64;
    let dy = y_max / NY as f64;
    let mut rects = Vec::new();
    for j in 0..NY {
        let mut i = 0;
        while i < NX {
            let code = field.region[j * NX + i];
            if code != 0 {
                let start = i;
                while i < NX && field.region[j * NX + i] == code {
                    i += 1;
                }
                rects.push(Rectangle::new(
                    [
                        (start as f64 * dx, j as f64 * dy),
                        (i as f64 * dx, (j + 1) as f64 * dy),
                    ],
                    if code == 1 {
                        REGION.filled()
                    } else {
                        REGION_UNTRIED.filled()
                    },
                ));
            } else {
                i += 1;
            }
        }
    }
    chart.draw_series(rects).map_err(plot_err)?;
    let domain_legend = draw_validity_domain(&mut chart, field, dx, dy)?;

    // Many proposed points: a density under the limits and trials.
    let mut binned_legend = None;
    let binned = req.points.len() > MAX_MARKED_POINTS;
    if binned {
        let (bx, by) = (60usize, 40usize);
        let mut counts = vec![0usize; bx * by];
        for p in &req.points {
            if let Some(x) = x_of(w, plane, p.velocity_m_s, p.angle_rad) {
                let i = ((x / x_max) * bx as f64).floor();
                let j = ((p.angle_rad.to_degrees() / y_max) * by as f64).floor();
                if i >= 0.0 && j >= 0.0 && (i as usize) < bx && (j as usize) < by {
                    counts[j as usize * bx + i as usize] += 1;
                }
            }
        }
        let max = counts.iter().copied().max().unwrap_or(1).max(1) as f64;
        let cells = counts
            .iter()
            .enumerate()
            .filter(|(_, n)| **n > 0)
            .map(|(k, n)| {
                let (i, j) = (k % bx, k / bx);
                let shade = 0.1 + 0.5 * (*n as f64 / max).sqrt();
                Rectangle::new(
                    [
                        (i as f64 * x_max / bx as f64, j as f64 * y_max / by as f64),
                        (
                            (i + 1) as f64 * x_max / bx as f64,
                            (j + 1) as f64 * y_max / by as f64,
                        ),
                    ],
                    BLACK.mix(shade).filled(),
                )
            });
        chart.draw_series(cells).map_err(plot_err)?;
        binned_legend = Some(format!(
            "{} proposed points, binned (more than {MAX_MARKED_POINTS}); {} inside the window",
            req.points.len(),
            inside_count(w, &req.points)
        ));
    }

    // Criterion contours.
    // Legend marks: 0 solid line or fill, 1 long dashes, 2 dots, 3 medium dashes.
    let mut legend: Vec<(String, ShapeStyle, u8)> = vec![(
        "weldable: every active limit holds".into(),
        REGION.filled(),
        0,
    )];
    if let Some(d) = domain_legend {
        legend.push(d);
    }
    if field.region.contains(&2) {
        legend.push((
            "predicted welded, but a user boundary does not span here (outside the trial data)"
                .into(),
            REGION_UNTRIED.filled(),
            0,
        ));
    }
    for (id, m) in &field.margins {
        let colour = criterion_colour(*id);
        let informational = *id == CriterionId::WavyTransition;
        let style = colour.stroke_width(if informational { 1 } else { 2 });
        for line in contour(&field.xs, &field.ys, m) {
            if informational {
                chart
                    .draw_series(DashedLineSeries::new(line, 10, 4, style))
                    .map_err(plot_err)?;
            } else {
                chart
                    .draw_series(LineSeries::new(line, style))
                    .map_err(plot_err)?;
            }
        }
        legend.push((criterion_label(w, *id), style, u8::from(informational)));
    }
    for (f, label, sonic_style, (dash, gap), mark) in [
        (
            &field.sonic_parent,
            format!(
                "Vc = C0 of parent ({:.0} m/s, info)",
                w.parent.material.sound_speed().si()
            ),
            C_SONIC_PARENT.stroke_width(1),
            (2, 3),
            2u8,
        ),
        (
            &field.sonic_flyer,
            format!(
                "Vf = C0 of flyer ({:.0} m/s, info)",
                w.flyer.material.sound_speed().si()
            ),
            C_SONIC_FLYER.stroke_width(2),
            (5, 5),
            3u8,
        ),
    ] {
        for line in contour(&field.xs, &field.ys, f) {
            chart
                .draw_series(DashedLineSeries::new(line, dash, gap, sonic_style))
                .map_err(plot_err)?;
        }
        legend.push((label, sonic_style, mark));
    }

    // User boundaries as drawn, converted to this plane point by point.
    for b in &w.boundaries {
        let pts: Vec<(f64, f64)> = b
            .points
            .iter()
            .filter_map(|(v, a)| {
                let vp = match b.plane {
                    Plane::AngleImpactVelocity => v.si(),
                    Plane::AngleCollisionVelocity => {
                        Collision::from_collision_velocity(w.convention, *v, *a)
                            .ok()?
                            .impact_velocity
                            .si()
                    }
                };
                Some((x_of(w, plane, vp, a.radians())?, a.degrees()))
            })
            .collect();
        chart
            .draw_series(LineSeries::new(pts.clone(), BLACK.stroke_width(3)))
            .map_err(plot_err)?;
        chart
            .draw_series(pts.iter().map(|p| Circle::new(*p, 3, BLACK.filled())))
            .map_err(plot_err)?;
        if let Some(last) = pts.last() {
            chart
                .draw_series(std::iter::once(Text::new(
                    b.label.clone(),
                    *last,
                    ("sans-serif", 12)
                        .into_font()
                        .color(&BLACK)
                        .pos(Pos::new(HPos::Left, VPos::Bottom)),
                )))
                .map_err(plot_err)?;
        }
        legend.push((
            format!(
                "user boundary: {} (welds {})",
                b.label,
                b.weld_side.as_str()
            ),
            BLACK.stroke_width(3),
            0,
        ));
    }

    // Trials by outcome.
    for o in &w.observations {
        let Some(x) = x_of(w, plane, o.velocity.si(), o.angle.radians()) else {
            continue;
        };
        let p = (x, o.angle.degrees());
        match o.outcome {
            Outcome::Welded => {
                chart.draw_series(std::iter::once(Circle::new(p, 5, C_WELDED.filled())))
            }
            Outcome::NotWelded => chart.draw_series(std::iter::once(
                EmptyElement::at(p) + Rectangle::new([(-5, -5), (5, 5)], C_NOT.stroke_width(2)),
            )),
            Outcome::Partial => chart.draw_series(std::iter::once(TriangleMarker::new(
                p,
                7,
                C_PARTIAL.filled(),
            ))),
            Outcome::Melted => {
                chart.draw_series(std::iter::once(Cross::new(p, 5, C_MELTED.stroke_width(3))))
            }
        }
        .map_err(plot_err)?;
    }

    // Process curves.
    for c in &req.curves {
        let pts: Vec<(f64, f64)> = c
            .points
            .iter()
            .filter_map(|(v, a, _)| Some((x_of(w, plane, *v, *a)?, a.to_degrees())))
            .collect();
        chart
            .draw_series(DashedLineSeries::new(
                pts.clone(),
                8,
                4,
                BLACK.stroke_width(2),
            ))
            .map_err(plot_err)?;
        for ((v, a, lab), p) in c.points.iter().zip(&pts) {
            let verdict = classify_point(w, *v, *a).map(|k| k.inside).unwrap_or(false);
            let style = if verdict {
                BLACK.filled()
            } else {
                WHITE.filled()
            };
            chart
                .draw_series(std::iter::once(Circle::new(*p, 4, style)))
                .map_err(plot_err)?;
            chart
                .draw_series(std::iter::once(Circle::new(*p, 4, BLACK.stroke_width(1))))
                .map_err(plot_err)?;
            if let Some(l) = lab {
                chart
                    .draw_series(std::iter::once(Text::new(
                        l.clone(),
                        (p.0, p.1),
                        TextStyle::from(("sans-serif", 11).into_font())
                            .pos(Pos::new(HPos::Left, VPos::Top)),
                    )))
                    .map_err(plot_err)?;
            }
        }
        if req.curves.len() <= 6 {
            legend.push((
                format!("process curve: {} (filled = inside)", c.label),
                BLACK.stroke_width(2),
                1,
            ));
        }
    }
    if req.curves.len() > 6 {
        legend.push((
            format!(
                "{} process curves (labelled on the plot); filled markers are inside",
                req.curves.len()
            ),
            BLACK.stroke_width(2),
            1,
        ));
    }

    // Proposed points: marked and labelled, or binned when many.
    if !binned {
        for (n, p) in req.points.iter().enumerate() {
            let Some(x) = x_of(w, plane, p.velocity_m_s, p.angle_rad) else {
                continue;
            };
            let y = p.angle_rad.to_degrees();
            let diamond = |s: f64| {
                let (sx, sy) = (x_max / 140.0 * s, y_max / 90.0 * s);
                vec![(x, y + sy), (x + sx, y), (x, y - sy), (x - sx, y)]
            };
            chart
                .draw_series(std::iter::once(Polygon::new(diamond(1.6), WHITE.filled())))
                .map_err(plot_err)?;
            chart
                .draw_series(std::iter::once(Polygon::new(diamond(1.1), BLACK.filled())))
                .map_err(plot_err)?;
            if n < MAX_LABELLED_POINTS {
                let verdict = classify_point(w, p.velocity_m_s, p.angle_rad)
                    .map(|c| {
                        if c.inside {
                            "inside".to_string()
                        } else {
                            format!("outside: {}", binding_text(w, &c))
                        }
                    })
                    .unwrap_or_else(|e| e.to_string());
                chart
                    .draw_series(std::iter::once(Text::new(
                        format!("{} ({verdict})", p.label),
                        (x + x_max / 120.0, y + y_max / 70.0),
                        ("sans-serif", 12)
                            .into_font()
                            .color(&BLACK)
                            .pos(Pos::new(HPos::Left, VPos::Bottom)),
                    )))
                    .map_err(plot_err)?;
            }
        }
        if !req.points.is_empty() {
            legend.push((
                "proposed point (verdict beside it)".into(),
                BLACK.filled(),
                0,
            ));
        }
    }

    if let Some(text) = binned_legend {
        legend.push((text, BLACK.mix(0.35).filled(), 0));
    }

    // Legend panel, outside the data.
    let mut y = 40i32;
    let font = TextStyle::from(("sans-serif", 12).into_font());
    legend_area
        .draw(&Text::new(
            "Legend",
            (10, 16),
            ("sans-serif", 15).into_font(),
        ))
        .map_err(plot_err)?;
    for (label, style, mark) in &legend {
        let pattern: Option<(i32, i32)> = match mark {
            1 => Some((7, 3)),
            2 => Some((2, 3)),
            3 => Some((5, 5)),
            _ => None,
        };
        if style.filled && pattern.is_none() {
            legend_area
                .draw(&Rectangle::new([(10, y - 5), (34, y + 5)], *style))
                .map_err(plot_err)?;
        } else if let Some((dash, gap)) = pattern {
            let mut x0 = 10;
            while x0 < 34 {
                legend_area
                    .draw(&PathElement::new(
                        vec![(x0, y), ((x0 + dash).min(34), y)],
                        *style,
                    ))
                    .map_err(plot_err)?;
                x0 += dash + gap;
            }
        } else {
            legend_area
                .draw(&PathElement::new(vec![(10, y), (34, y)], *style))
                .map_err(plot_err)?;
        }
        y = draw_wrapped(&legend_area, label, 42, y, &font)?;
    }
    y += 8;
    legend_area
        .draw(&Text::new(
            "Trials",
            (10, y),
            ("sans-serif", 14).into_font(),
        ))
        .map_err(plot_err)?;
    y += 18;
    let trial_rows: [(&str, u8); 4] = [
        ("welded", 0),
        ("not welded", 1),
        ("partial", 2),
        ("melted", 3),
    ];
    for (label, kind) in trial_rows {
        let p = (22, y);
        match kind {
            0 => legend_area.draw(&Circle::new(p, 5, C_WELDED.filled())),
            1 => legend_area.draw(
                &(EmptyElement::at(p) + Rectangle::new([(-5, -5), (5, 5)], C_NOT.stroke_width(2))),
            ),
            2 => legend_area.draw(&TriangleMarker::new(p, 7, C_PARTIAL.filled())),
            _ => legend_area.draw(&Cross::new(p, 5, C_MELTED.stroke_width(3))),
        }
        .map_err(plot_err)?;
        legend_area
            .draw(&Text::new(
                label,
                (42, y),
                font.clone().pos(Pos::new(HPos::Left, VPos::Center)),
            ))
            .map_err(plot_err)?;
        y += 18;
    }
    if let Some(inv) = &w.invented {
        y += 6;
        draw_wrapped(
            &legend_area,
            &format!("INVENTED DATA: {inv}"),
            10,
            y,
            &("sans-serif", 11).into_font().color(&C_MELTED),
        )?;
    }

    bottom
        .draw(&Text::new(
            "Screening estimate from published relations and the trials shown, not a guarantee of a weld. Lethal voltages, stored energy, explosives and flying parts: follow local codes and licensed practice.",
            (12, 8),
            ("sans-serif", 11).into_font().color(&RGBColor(90, 90, 90)),
        ))
        .map_err(plot_err)?;
    root.present().map_err(plot_err)?;
    Ok(())
}

/// `text` in lines of at most `max_chars` characters, broken between words (a longer word has a
/// line of its own).
pub fn wrap_words(text: &str, max_chars: usize) -> Vec<String> {
    let mut lines = Vec::new();
    let mut cur = String::new();
    for word in text.split_whitespace() {
        if !cur.is_empty() && cur.chars().count() + 1 + word.chars().count() > max_chars {
            lines.push(std::mem::take(&mut cur));
        }
        if !cur.is_empty() {
            cur.push(' ');
        }
        cur.push_str(word);
    }
    if !cur.is_empty() {
        lines.push(cur);
    }
    lines
}

/// Draw text wrapped to the legend width; returns the next free y.
fn draw_wrapped<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    text: &str,
    x: i32,
    y: i32,
    font: &TextStyle<'_>,
) -> RenderResult<i32> {
    let max_chars = ((LEGEND_W as i32 - x - 8) / 6).max(10) as usize;
    let mut y = y;
    for l in wrap_words(text, max_chars) {
        area.draw(&Text::new(
            l,
            (x, y),
            font.clone().pos(Pos::new(HPos::Left, VPos::Center)),
        ))
        .map_err(plot_err)?;
        y += 15;
    }
    Ok(y + 3)
}

/// How many of the points lie inside the window.
fn inside_count(w: &PairWindow, points: &[ProposedPoint]) -> usize {
    // One set-up for all points (building it clones both materials).
    let Ok(setup) = w.setup() else { return 0 };
    points
        .iter()
        .filter(|p| {
            Collision::from_impact(
                w.convention,
                Velocity::from_m_s(p.velocity_m_s),
                Angle::from_radians(p.angle_rad),
            )
            .ok()
            .and_then(|c| oblique_window::classify::classify(w, &setup, &c).ok())
            .is_some_and(|c| c.inside)
        })
        .count()
}

/// Short text naming the binding limit of a failed point.
pub fn binding_text(w: &PairWindow, c: &Classification) -> String {
    match &c.binding {
        Some(LimitRef::Criterion(id)) => id.as_str().to_string(),
        Some(LimitRef::Boundary(i)) => w
            .boundaries
            .get(*i)
            .map_or("boundary".into(), |b| b.label.clone()),
        None => String::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The validity domain is drawn (issue 14): its outside tinted, its edge dashed, said in
    /// the legend; nothing inside the window is drawn beyond it.
    #[test]
    fn the_validity_domain_is_drawn() {
        register_fonts();
        let lib = oblique_window::Library::load(&[]).expect("built-in library");
        let w = lib
            .pair("demo-al6061-on-cu")
            .expect("demo pair (invented data)");
        let req = PlotRequest {
            window: w,
            plane: Plane::AngleImpactVelocity,
            points: Vec::new(),
            curves: Vec::new(),
        };
        let p = prepare(&req).expect("prepares");
        assert!(p.field.domain.iter().any(|d| *d < 0.0));
        for (k, r) in p.field.region.iter().enumerate() {
            if *r != 0 {
                assert!(
                    p.field.domain[k] > 0.0,
                    "cell {k} inside the window, outside the domain"
                );
            }
        }
        let svg = render_svg(&req).expect("draws");
        assert!(svg.contains("outside the validity domain"));
    }

    #[test]
    fn contour_of_a_plane_is_one_line() {
        let xs: Vec<f64> = (0..20).map(f64::from).collect();
        let ys = xs.clone();
        let f: Vec<f64> = (0..400).map(|k| (k % 20) as f64 - 9.5).collect();
        let lines = contour(&xs, &ys, &f);
        assert_eq!(lines.len(), 1);
        assert!(lines[0].iter().all(|p| (p.0 - 9.5).abs() < 1e-9));
        assert_eq!(lines[0].len(), 20);
    }
}
