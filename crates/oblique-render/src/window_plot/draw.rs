//! The layers of the window plot, bottom to top: the tinted region, the density of many points,
//! the limits, the user boundaries, the process curves, the trials, the proposed points; then
//! every label placed clear of the rest, the legend and the caution line.

use super::field::{Field, P};
use super::legend::{draw_legend, Entry, Mark, Section};
use super::place::{Need, Placer, Rect, NEAR_RINGS};
use super::{
    binding_text, classify_point, criterion_colour, criterion_label, inside_count, plot_err, x_of,
    PlotRequest, PointRole, ProposedPoint, CANVAS_HEIGHT, HEIGHT, LEGEND_W, MAX_LABELLED_POINTS,
    MAX_MARKED_POINTS, WIDTH,
};
use crate::error::RenderResult;
use oblique_core::CriterionId;
use oblique_window::boundary::Plane;
use oblique_window::{Outcome, PairWindow};
use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::palette::{C_MELTED, C_NOT, C_PARTIAL, C_WELDED, REGION, REGION_UNTRIED};

type Root<'b> = DrawingArea<SVGBackend<'b>, Shift>;
type Chart<'a, 'b> = ChartContext<'a, SVGBackend<'b>, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

/// More points than this are labelled by name only, without their verdicts.
const SHORT_LABELS_ABOVE: usize = 4;
/// Height of the caution strip under the plot.
const FOOTER: u32 = 40;
const C_SONIC_PARENT: RGBColor = RGBColor(60, 60, 60);
const C_SONIC_FLYER: RGBColor = RGBColor(150, 150, 150);
const C_LABEL: RGBColor = RGBColor(20, 20, 20);
const C_SHOT: RGBColor = RGBColor(90, 90, 90);

/// Colours and dashes of the process curves: each curve has its own pair.
const CURVE_COLOURS: [RGBColor; 6] = [
    RGBColor(20, 20, 20),
    RGBColor(1, 133, 113),
    RGBColor(140, 81, 10),
    RGBColor(197, 27, 125),
    RGBColor(110, 120, 0),
    RGBColor(40, 40, 120),
];
const CURVE_DASHES: [(u32, u32); 2] = [(8, 4), (3, 3)];

/// The look of process curve `k`: colour and dash.
pub(super) fn curve_style(k: usize) -> (RGBColor, (u32, u32)) {
    (
        CURVE_COLOURS[k % CURVE_COLOURS.len()],
        CURVE_DASHES[(k / CURVE_COLOURS.len()) % CURVE_DASHES.len()],
    )
}

/// The dash of user boundary `k` (solid, long dashes, short dashes, long-short): each boundary
/// has its own, on the plot and in the legend alike.
pub(super) fn boundary_dash(k: usize) -> Option<(u32, u32)> {
    [
        None,
        Some((14, 6)),
        Some((5, 4)),
        Some((22, 5)),
        Some((2, 3)),
    ][k % 5]
}

/// A label waiting for its place.
struct Label {
    text: String,
    anchor: (f64, f64),
    /// Other points the label may go beside instead (a line's other points); empty for one
    /// anchor.
    along: Vec<(f64, f64)>,
    radius: f64,
    size: u32,
    colour: RGBColor,
    need: Need,
    /// A proposed point's label: kept beside its marker, its start (the name) near it.
    point: bool,
}

/// What the layers leave for the labels and the legend.
struct Layers<'p> {
    placer: Placer,
    labels: Vec<Label>,
    sections: Vec<Section>,
    _req: std::marker::PhantomData<&'p ()>,
}

fn px(chart: &Chart<'_, '_>, p: P) -> (f64, f64) {
    let (x, y) = chart.backend_coord(&p);
    (f64::from(x), f64::from(y))
}

/// Draw the window plot.
pub(super) fn draw(
    root: Root<'_>,
    req: &PlotRequest<'_>,
    field: &Field<'_>,
    (x_max, y_max): (f64, f64),
    overlay: Option<&super::contours::Contours>,
) -> RenderResult<u32> {
    let w = req.window;
    root.fill(&WHITE).map_err(plot_err)?;
    // The chart keeps its size; the legend beside it may run lower than the chart (the canvas,
    // `CANVAS_HEIGHT` tall, is then cut below the legend instead of at `HEIGHT`).
    let (chart_area, _) = root
        .clone()
        .shrink((0, 0), (WIDTH, HEIGHT - FOOTER))
        .split_horizontally(WIDTH - LEGEND_W);
    let legend_area = root
        .clone()
        .shrink((WIDTH - LEGEND_W, 0), (LEGEND_W, CANVAS_HEIGHT - FOOTER));
    let mut chart = frame(&chart_area, req, x_max, y_max)?;
    let (a, b) = (px(&chart, (0.0, y_max)), px(&chart, (x_max, 0.0)));
    let mut layers = Layers {
        placer: Placer::new(Rect {
            x0: a.0 + 2.0,
            y0: a.1 + 2.0,
            x1: b.0 - 2.0,
            y1: b.1 - 2.0,
        }),
        labels: Vec::new(),
        sections: vec![Section::new("Legend")],
        _req: std::marker::PhantomData,
    };
    draw_region(&mut chart, field, &mut layers)?;
    draw_validity_domain(&mut chart, field, &mut layers)?;
    let binned = req.points.len() > MAX_MARKED_POINTS;
    if binned {
        draw_density(&mut chart, req, x_max, y_max, &mut layers)?;
    }
    draw_limits(&mut chart, w, field, &mut layers)?;
    draw_boundaries(&mut chart, req, &mut layers)?;
    if let Some(c) = overlay {
        draw_probability(&mut chart, c, &mut layers)?;
    }
    draw_curves(&mut chart, req, &mut layers)?;
    draw_trials(&mut chart, req, &mut layers)?;
    if !binned {
        draw_points(&mut chart, req, &mut layers)?;
    }
    place_labels(&root, layers.placer, layers.labels)?;
    let reach = draw_legend(&legend_area, &layers.sections, (CANVAS_HEIGHT - 50) as i32)?;
    // As many pixels under the legend as under the chart.
    let height = HEIGHT.max(u32::try_from(reach).unwrap_or(0) + 50);
    let bottom = root.clone().shrink((0, height - FOOTER), (WIDTH, FOOTER));
    bottom
        .draw(&Text::new(
            "Screening estimate from published relations and the trials shown, not a guarantee of a weld. Lethal voltages, stored energy, explosives and flying parts: follow local codes and licensed practice.",
            (12, 6),
            ("sans-serif", 11).into_font().color(&RGBColor(90, 90, 90)),
        ))
        .map_err(plot_err)?;
    if let Some(inv) = &w.invented {
        let text = format!("INVENTED DATA: {inv}");
        bottom
            .draw(&Text::new(
                super::wrap_words(&text, 190).remove(0),
                (12, 22),
                ("sans-serif", 11).into_font().color(&C_MELTED),
            ))
            .map_err(plot_err)?;
    }
    root.present().map_err(plot_err)?;
    Ok(height)
}

const C_PROBABILITY: RGBColor = RGBColor(0, 110, 110);

/// Weld-probability contours: 50 % solid and wider, lower levels long dashes, higher levels
/// short dashes, one label per level at the middle of its longest line (placed clear of the
/// rest like every label), and a legend section stating the scatter assumed.
fn draw_probability(
    chart: &mut Chart<'_, '_>,
    c: &super::contours::Contours,
    layers: &mut Layers<'_>,
) -> RenderResult {
    let mut section = Section::new("Weld probability");
    for (level, lines) in &c.lines {
        let middle = (*level - 0.5).abs() < 1e-9;
        let width = if middle { 3 } else { 2 };
        let dash = if middle {
            None
        } else if *level < 0.5 {
            Some((6, 4))
        } else {
            Some((2, 3))
        };
        for line in lines {
            let pix: Vec<(f64, f64)> = line.iter().map(|p| px(chart, *p)).collect();
            layers.placer.add_line(&pix);
            let style = C_PROBABILITY.stroke_width(width);
            match dash {
                None => chart
                    .draw_series(LineSeries::new(line.clone(), style))
                    .map_err(plot_err)?,
                Some((d, g)) => chart
                    .draw_series(DashedLineSeries::new(line.clone(), d, g, style))
                    .map_err(plot_err)?,
            };
        }
        if let Some(longest) = lines.iter().max_by_key(|l| l.len()) {
            layers.labels.push(Label {
                text: format!("{:.0} %", 100.0 * level),
                anchor: px(chart, longest[longest.len() / 2]),
                along: Vec::new(),
                radius: 3.0,
                size: 13,
                colour: C_PROBABILITY,
                need: Need::Optional,
                point: false,
            });
        }
        section.push(Entry::new(
            format!("weld probability {:.0} %", 100.0 * level),
            Mark::Line {
                colour: C_PROBABILITY,
                width,
                dash,
            },
        ));
    }
    let s = &c.grid.scatter;
    section.push(Entry::new(
        format!(
            "under the stated scatter: {}; {} draws per node, seed {}; drawn inside the validity domain only; conditional on the model (docs/theory.md, section 15)",
            s.text(),
            c.grid.samples,
            c.grid.seed
        ),
        Mark::Fill(WHITE),
    ));
    layers.sections.push(section);
    Ok(())
}

/// Cells outside the validity domain, and the domain's edge.
const C_OUTSIDE_DOMAIN: RGBColor = RGBColor(212, 212, 212);
const C_DOMAIN_EDGE: RGBColor = RGBColor(70, 70, 70);

/// Light grey over the regions outside the validity domain (no verdict claimed there), its
/// edge dashed, and the legend entry, when some part of the plot lies outside (issue 14).
fn draw_validity_domain(
    chart: &mut Chart<'_, '_>,
    field: &Field<'_>,
    layers: &mut Layers<'_>,
) -> RenderResult {
    if !field.has_outside_domain() {
        return Ok(());
    }
    chart
        .draw_series(
            field
                .outside_domain_outlines()
                .into_iter()
                .map(|p| Polygon::new(p, C_OUTSIDE_DOMAIN.filled())),
        )
        .map_err(plot_err)?;
    for line in field.domain_edge() {
        let pix: Vec<(f64, f64)> = line.iter().map(|p| px(chart, *p)).collect();
        layers.placer.add_line(&pix);
        chart
            .draw_series(DashedLineSeries::new(
                line,
                6,
                3,
                C_DOMAIN_EDGE.stroke_width(2),
            ))
            .map_err(plot_err)?;
    }
    layers.sections[0].push(Entry::new(
        "outside the validity domain (dashed edge): no verdict claimed (docs/theory.md §7.1)",
        Mark::Fill(C_OUTSIDE_DOMAIN),
    ));
    Ok(())
}

/// The title, axes and mesh.
fn frame<'a, 'b>(
    area: &'a Root<'b>,
    req: &PlotRequest<'_>,
    x_max: f64,
    y_max: f64,
) -> RenderResult<Chart<'a, 'b>> {
    let w = req.window;
    let title = format!(
        "{}: {} flyer {:.2} mm on {}, convention {}",
        w.name,
        w.flyer.material.id,
        w.flyer_thickness.mm(),
        w.parent.material.id,
        w.convention
    );
    let x_label = match req.plane {
        Plane::AngleImpactVelocity => "impact velocity Vp [m/s]",
        Plane::AngleCollisionVelocity => "collision-point velocity Vc [m/s]",
    };
    let mut chart = ChartBuilder::on(area)
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
    Ok(chart)
}

/// The weldable region (and the part of it outside the trial data), as traced polygons.
fn draw_region(
    chart: &mut Chart<'_, '_>,
    field: &Field<'_>,
    layers: &mut Layers<'_>,
) -> RenderResult {
    let untried = field.has_untried();
    let all = field.region_outlines(false);
    let (outer, inner) = if untried {
        (REGION_UNTRIED, Some(field.region_outlines(true)))
    } else {
        (REGION, None)
    };
    chart
        .draw_series(all.into_iter().map(|p| Polygon::new(p, outer.filled())))
        .map_err(plot_err)?;
    if let Some(inner) = inner {
        chart
            .draw_series(inner.into_iter().map(|p| Polygon::new(p, REGION.filled())))
            .map_err(plot_err)?;
    }
    let legend = &mut layers.sections[0];
    legend.push(Entry::new(
        "weldable: every active limit holds",
        Mark::Fill(REGION),
    ));
    if untried {
        legend.push(Entry::new(
            "predicted welded, but a user boundary does not span here (outside the trial data)",
            Mark::Fill(REGION_UNTRIED),
        ));
    }
    Ok(())
}

/// Many proposed points: a density under the limits and trials.
fn draw_density(
    chart: &mut Chart<'_, '_>,
    req: &PlotRequest<'_>,
    x_max: f64,
    y_max: f64,
    layers: &mut Layers<'_>,
) -> RenderResult {
    let (bx, by) = (60usize, 40usize);
    let mut counts = vec![0usize; bx * by];
    for p in &req.points {
        if let Some(x) = x_of(req.window, req.plane, p.velocity_m_s, p.angle_rad) {
            let i = ((x / x_max) * bx as f64).floor();
            let j = ((p.angle_rad.to_degrees() / y_max) * by as f64).floor();
            if i >= 0.0 && j >= 0.0 && (i as usize) < bx && (j as usize) < by {
                counts[j as usize * bx + i as usize] += 1;
            }
        }
    }
    let max = counts.iter().copied().max().unwrap_or(1).max(1) as f64;
    let (dx, dy) = (x_max / bx as f64, y_max / by as f64);
    let cells = counts
        .iter()
        .enumerate()
        .filter(|(_, n)| **n > 0)
        .map(|(k, n)| {
            let (i, j) = ((k % bx) as f64, (k / bx) as f64);
            let shade = 0.1 + 0.5 * (*n as f64 / max).sqrt();
            Rectangle::new(
                [(i * dx, j * dy), ((i + 1.0) * dx, (j + 1.0) * dy)],
                BLACK.mix(shade).filled(),
            )
        });
    chart.draw_series(cells).map_err(plot_err)?;
    layers.sections[0].push(Entry::new(
        format!(
            "{} proposed points, binned (more than {MAX_MARKED_POINTS}); {} inside the window",
            req.points.len(),
            inside_count(req.window, &req.points)
        ),
        Mark::Fill(RGBColor(140, 140, 140)),
    ));
    Ok(())
}

/// Every enabled criterion's limit and the two sonic lines.
fn draw_limits(
    chart: &mut Chart<'_, '_>,
    w: &PairWindow,
    field: &Field<'_>,
    layers: &mut Layers<'_>,
) -> RenderResult {
    for (id, lines) in field.criterion_lines() {
        let colour = criterion_colour(id);
        let info = id == CriterionId::WavyTransition;
        let width = if info { 1 } else { 2 };
        for line in lines {
            let pix: Vec<(f64, f64)> = line.iter().map(|p| px(chart, *p)).collect();
            layers.placer.add_line(&pix);
            if info {
                chart
                    .draw_series(DashedLineSeries::new(
                        line,
                        10,
                        4,
                        colour.stroke_width(width),
                    ))
                    .map_err(plot_err)?;
            } else {
                chart
                    .draw_series(LineSeries::new(line, colour.stroke_width(width)))
                    .map_err(plot_err)?;
            }
        }
        let dash = info.then_some((10, 4));
        layers.sections[0].push(Entry::new(
            criterion_label(w, id),
            Mark::Line {
                colour,
                width,
                dash,
            },
        ));
    }
    let [parent, flyer] = field.sonic_lines();
    for (lines, label, colour, width, dash) in [
        (
            parent,
            format!(
                "Vc = C0 of parent ({:.0} m/s, info)",
                w.parent.material.sound_speed().si()
            ),
            C_SONIC_PARENT,
            1,
            (2, 3),
        ),
        (
            flyer,
            format!(
                "Vf = C0 of flyer ({:.0} m/s, info)",
                w.flyer.material.sound_speed().si()
            ),
            C_SONIC_FLYER,
            2,
            (5, 5),
        ),
    ] {
        for line in lines {
            chart
                .draw_series(DashedLineSeries::new(
                    line,
                    dash.0,
                    dash.1,
                    colour.stroke_width(width),
                ))
                .map_err(plot_err)?;
        }
        layers.sections[0].push(Entry::new(
            label,
            Mark::Line {
                colour,
                width,
                dash: Some(dash),
            },
        ));
    }
    Ok(())
}

/// User boundaries as drawn, converted to this plane point by point, labelled at their end.
fn draw_boundaries(
    chart: &mut Chart<'_, '_>,
    req: &PlotRequest<'_>,
    layers: &mut Layers<'_>,
) -> RenderResult {
    let w = req.window;
    // A point of a boundary (velocity in its own plane, m/s; angle, rad) in this plane.
    let to_plot = |plane: Plane, v: f64, a: f64| -> Option<P> {
        let vp = match plane {
            Plane::AngleImpactVelocity => v,
            Plane::AngleCollisionVelocity => oblique_core::Collision::from_collision_velocity(
                w.convention,
                oblique_core::units::Velocity::from_m_s(v),
                oblique_core::units::Angle::from_radians(a),
            )
            .ok()?
            .impact_velocity
            .si(),
        };
        Some((x_of(w, req.plane, vp, a)?, a.to_degrees()))
    };
    for (k, b) in w.boundaries.iter().enumerate() {
        let pts: Vec<P> = b
            .points
            .iter()
            .filter_map(|(v, a)| to_plot(b.plane, v.si(), a.radians()))
            .collect();
        // The line is straight between its points in its own plane; in the other plane it
        // curves (Vc = Vp / sin beta, or its convention's form), so each segment is drawn
        // through points taken along it in its own plane, not as a chord between the ends.
        // In its own plane the chords are exact (and more vertices, each rounded to a pixel by
        // the backend, would only make a steep line wobble).
        let steps: usize = if b.plane == req.plane { 1 } else { 32 };
        let line: Vec<P> = b
            .points
            .windows(2)
            .flat_map(|s| {
                let ((v0, a0), (v1, a1)) = (
                    (s[0].0.si(), s[0].1.radians()),
                    (s[1].0.si(), s[1].1.radians()),
                );
                (0..steps).map(move |i| {
                    let t = i as f64 / steps as f64;
                    (v0 + t * (v1 - v0), a0 + t * (a1 - a0))
                })
            })
            .chain(b.points.last().map(|(v, a)| (v.si(), a.radians())))
            .filter_map(|(v, a)| to_plot(b.plane, v, a))
            .collect();
        let dash = boundary_dash(k);
        let style = BLACK.stroke_width(3);
        match dash {
            None => chart.draw_series(LineSeries::new(line.clone(), style)),
            Some((d, g)) => chart.draw_series(DashedLineSeries::new(line.clone(), d, g, style)),
        }
        .map_err(plot_err)?;
        chart
            .draw_series(pts.iter().map(|p| Circle::new(*p, 3, BLACK.filled())))
            .map_err(plot_err)?;
        let pix: Vec<(f64, f64)> = pts.iter().map(|p| px(chart, *p)).collect();
        let line_pix: Vec<(f64, f64)> = line.iter().map(|p| px(chart, *p)).collect();
        layers.placer.add_line(&line_pix);
        for p in &pix {
            layers.placer.add_marker(Rect::around(p.0, p.1, 3.0));
        }
        if let Some(last) = pix.last() {
            // Beside its own line: the last point first, then the first, then the rest of the
            // line (whichever has room nearest).
            let mut along = vec![*last];
            along.extend(pix.first().filter(|_| pix.len() > 1));
            along.extend(pix.iter().skip(1).take(pix.len().saturating_sub(2)));
            along.extend(
                pix.windows(2)
                    .map(|s| (0.5 * (s[0].0 + s[1].0), 0.5 * (s[0].1 + s[1].1))),
            );
            layers.labels.push(Label {
                text: b.label.clone(),
                anchor: *last,
                along,
                radius: 3.0,
                size: 12,
                colour: C_LABEL,
                need: Need::Required,
                point: true,
            });
        }
        layers.sections[0].push(Entry::new(
            format!(
                "user boundary: {} (welds {})",
                b.label,
                b.weld_side.as_str()
            ),
            Mark::Line {
                colour: BLACK,
                width: 3,
                dash,
            },
        ));
    }
    Ok(())
}

/// Process curves: each its own colour or dash and legend entry; markers filled where the
/// point is inside the window, open where it is not.
fn draw_curves(
    chart: &mut Chart<'_, '_>,
    req: &PlotRequest<'_>,
    layers: &mut Layers<'_>,
) -> RenderResult {
    if req.curves.is_empty() {
        return Ok(());
    }
    let w = req.window;
    let mut section = Section::new("Process curves");
    let mut end_labels = Vec::new();
    let mut other_labels = Vec::new();
    for (k, c) in req.curves.iter().enumerate() {
        let (colour, (dash, gap)) = curve_style(k);
        let pts: Vec<P> = c
            .points
            .iter()
            .filter_map(|(v, a, _)| Some((x_of(w, req.plane, *v, *a)?, a.to_degrees())))
            .collect();
        chart
            .draw_series(DashedLineSeries::new(
                pts.clone(),
                dash,
                gap,
                colour.stroke_width(2),
            ))
            .map_err(plot_err)?;
        let pix: Vec<(f64, f64)> = pts.iter().map(|p| px(chart, *p)).collect();
        layers.placer.add_line(&pix);
        let n = c.points.len();
        for (idx, ((v, a, lab), p)) in c.points.iter().zip(&pts).enumerate() {
            let k = classify_point(w, *v, *a).ok();
            let inside = k.as_ref().is_some_and(|k| k.inside);
            // Inside the model limits but outside the trial data (as sweep's "in?" and check's
            // words): a pale marker.
            let untried = inside && k.as_ref().is_some_and(|k| k.beyond_trial_data(w));
            let fill = if untried {
                colour.mix(0.3).filled()
            } else if inside {
                colour.filled()
            } else {
                WHITE.filled()
            };
            chart
                .draw_series([
                    Circle::new(*p, 4, fill),
                    Circle::new(*p, 4, colour.stroke_width(1)),
                ])
                .map_err(plot_err)?;
            let q = px(chart, *p);
            layers.placer.add_marker(Rect::around(q.0, q.1, 4.0));
            if let Some(l) = lab {
                let label = Label {
                    text: l.clone(),
                    anchor: q,
                    along: Vec::new(),
                    radius: 4.0,
                    size: 11,
                    colour,
                    need: Need::Optional,
                    point: false,
                };
                if idx == 0 || idx + 1 == n {
                    end_labels.push(label);
                } else {
                    other_labels.push(label);
                }
            }
        }
        section.push(Entry::new(
            c.label.clone(),
            Mark::Line {
                colour,
                width: 2,
                dash: Some((dash, gap)),
            },
        ));
    }
    section.push(Entry::new(
        "filled marker: inside the window; pale: inside the model limits, outside the trial data; open: outside",
        Mark::Dot {
            colour: CURVE_COLOURS[0],
        },
    ));
    layers.sections.push(section);
    // Curve ends are labelled before the points between them.
    layers.labels.extend(end_labels);
    layers.labels.extend(other_labels);
    Ok(())
}

/// Trials by outcome, optionally with their shot numbers.
fn draw_trials(
    chart: &mut Chart<'_, '_>,
    req: &PlotRequest<'_>,
    layers: &mut Layers<'_>,
) -> RenderResult {
    let w = req.window;
    if w.observations.is_empty() {
        return Ok(());
    }
    let mut seen = [false; 4];
    let mut shots = Vec::new();
    for o in &w.observations {
        let Some(x) = x_of(w, req.plane, o.velocity.si(), o.angle.radians()) else {
            continue;
        };
        let p = (x, o.angle.degrees());
        let kind = trial_kind(o.outcome);
        seen[kind] = true;
        match kind {
            0 => chart.draw_series(std::iter::once(Circle::new(p, 5, C_WELDED.filled()))),
            1 => chart.draw_series(std::iter::once(
                EmptyElement::at(p) + Rectangle::new([(-5, -5), (5, 5)], C_NOT.stroke_width(2)),
            )),
            2 => chart.draw_series(std::iter::once(TriangleMarker::new(
                p,
                7,
                C_PARTIAL.filled(),
            ))),
            _ => chart.draw_series(std::iter::once(Cross::new(p, 5, C_MELTED.stroke_width(3)))),
        }
        .map_err(plot_err)?;
        let q = px(chart, p);
        layers.placer.add_marker(Rect::around(q.0, q.1, 6.0));
        if req.shot_numbers {
            shots.push(Label {
                text: format!("{}", o.index + 1),
                anchor: q,
                along: Vec::new(),
                radius: 6.0,
                size: 10,
                colour: C_SHOT,
                need: Need::Optional,
                point: false,
            });
        }
    }
    let mut section = Section::new(if req.shot_numbers {
        "Trials (numbered as in the pair file)"
    } else {
        "Trials"
    });
    for (kind, label) in ["welded", "not welded", "partial", "melted"]
        .iter()
        .enumerate()
    {
        if seen[kind] {
            section.push(Entry::new(*label, Mark::Trial(kind)));
        }
    }
    layers.sections.push(section);
    layers.labels.extend(shots);
    Ok(())
}

/// 0 welded, 1 not welded, 2 partial, 3 melted.
pub(super) fn trial_kind(o: Outcome) -> usize {
    match o {
        Outcome::Welded => 0,
        Outcome::NotWelded => 1,
        Outcome::Partial => 2,
        Outcome::Melted => 3,
    }
}

/// Proposed points (chosen, alternatives) as diamonds, with their verdicts as labels.
fn draw_points(
    chart: &mut Chart<'_, '_>,
    req: &PlotRequest<'_>,
    layers: &mut Layers<'_>,
) -> RenderResult {
    let w = req.window;
    let mut roles = [false; 3];
    let mut any_mixed = false;
    let mut labels = Vec::new();
    for (n, p) in req.points.iter().enumerate() {
        let Some(x) = x_of(w, req.plane, p.velocity_m_s, p.angle_rad) else {
            continue;
        };
        let y = p.angle_rad.to_degrees();
        let q = px(chart, (x, y));
        let (r, fill) = match p.role {
            PointRole::Proposed => (7.0, BLACK),
            PointRole::Chosen => (9.0, BLACK),
            PointRole::Alternative => (7.0, WHITE),
        };
        roles[role_index(p.role)] = true;
        let diamond = |s: f64| -> Vec<(i32, i32)> {
            let s = s.round() as i32;
            vec![(0, -s), (s, 0), (0, s), (-s, 0)]
        };
        let mut shapes = vec![
            EmptyElement::at((x, y)) + Polygon::new(diamond(r + 2.5), WHITE.filled()),
            EmptyElement::at((x, y)) + Polygon::new(diamond(r), BLACK.filled()),
        ];
        if fill == WHITE {
            shapes.push(EmptyElement::at((x, y)) + Polygon::new(diamond(r - 2.5), WHITE.filled()));
        }
        chart.draw_series(shapes).map_err(plot_err)?;
        layers.placer.add_point_marker(q, r + 1.0);
        // Name-only labels are small: up to 40 of them.
        let short = req.points.len() > SHORT_LABELS_ABOVE;
        if n < MAX_LABELLED_POINTS || (short && n < 40) {
            // Many points: their labels only (the verdicts go in a table of the caller's).
            let (text, mixed) = point_text(w, p, short);
            any_mixed |= mixed;
            labels.push(Label {
                text,
                anchor: q,
                along: Vec::new(),
                radius: r,
                size: 12,
                colour: C_LABEL,
                need: Need::Required,
                point: true,
            });
        }
    }
    let mut section = Section::new("Points");
    let beside = if req.points.len() > SHORT_LABELS_ABOVE {
        "(labelled by name)"
    } else {
        "(verdict beside it)"
    };
    for (i, text) in [
        format!("proposed point {beside}"),
        format!("chosen set-up {beside}"),
        format!("alternative considered {beside}"),
    ]
    .iter()
    .enumerate()
    {
        if roles[i] {
            section.push(Entry::new(text.clone(), Mark::Diamond { filled: i != 2 }));
        }
    }
    if any_mixed {
        section.push(Entry::new(
            format!(
                "point supersonic in one plate only: its jetting limit rests on the pair's mixed-case rule ({}), which no source covers (docs/theory.md §4.3)",
                w.criteria.mixed_jetting.as_str()
            ),
            Mark::Glyph(MIXED_MARK),
        ));
    }
    if !section.is_empty() {
        layers.sections.push(section);
    }
    // Proposed points are labelled before anything else.
    labels.append(&mut layers.labels);
    layers.labels = labels;
    Ok(())
}

fn role_index(r: PointRole) -> usize {
    match r {
        PointRole::Proposed => 0,
        PointRole::Chosen => 1,
        PointRole::Alternative => 2,
    }
}

/// The mark, in a point's label and in the legend, of a point whose jetting limit rests on the
/// pair's mixed-case rule (the collision supersonic in one plate only; docs/theory.md §4.3).
pub(super) const MIXED_MARK: &str = "~";

/// A point's label with its verdict, and whether its jetting limit rests on the pair's
/// mixed-case rule (as `check` warns: jetting judged, one plate supersonic, the other not).
fn point_text(w: &PairWindow, p: &ProposedPoint, short: bool) -> (String, bool) {
    let c = classify_point(w, p.velocity_m_s, p.angle_rad);
    let mixed = c.as_ref().is_ok_and(|c| {
        c.domain.inside() && w.criteria.jetting_enabled && c.evaluation.jetting.is_mixed()
    });
    if short {
        let text = if mixed {
            format!("{} {MIXED_MARK}", p.label)
        } else {
            p.label.clone()
        };
        return (text, mixed);
    }
    let verdict = c
        .map(|c| {
            if !c.domain.inside() {
                // No limit's word is claimed where the relations are not claimed to hold.
                "outside the validity domain".to_string()
            } else if c.inside {
                "inside".to_string()
            } else {
                format!("outside: {}", binding_text(w, &c))
            }
        })
        .unwrap_or_else(|e| e.to_string());
    let note = if mixed {
        format!("; jetting: mixed-case rule {MIXED_MARK}")
    } else {
        String::new()
    };
    (format!("{} ({verdict}{note})", p.label), mixed)
}

/// Place and draw every label, in order.
fn place_labels(root: &Root<'_>, mut placer: Placer, labels: Vec<Label>) -> RenderResult {
    for l in labels {
        let font = TextStyle::from(("sans-serif", l.size).into_font());
        let (tw, th) = root.estimate_text_size(&l.text, &font).map_err(plot_err)?;
        let size = (f64::from(tw) + 2.0, f64::from(th) + 2.0);
        let at = if l.point {
            Some(placer.place_point(l.anchor, l.radius, size))
        } else if l.along.is_empty() {
            placer.place(l.anchor, l.radius, size, l.need)
        } else {
            placer.place_near(&l.along, l.radius, size, l.need, &NEAR_RINGS)
        };
        if let Some(at) = at {
            let pos = (at.0.round() as i32 + 1, at.1.round() as i32 + 1);
            // A white halo keeps the text readable over lines and tints.
            root.draw(&Rectangle::new(
                [
                    (pos.0 - 1, pos.1 - 1),
                    (pos.0 + tw as i32 + 1, pos.1 + th as i32 + 1),
                ],
                WHITE.mix(0.8).filled(),
            ))
            .map_err(plot_err)?;
            root.draw(&Text::new(
                l.text,
                pos,
                font.color(&l.colour).pos(Pos::new(HPos::Left, VPos::Top)),
            ))
            .map_err(plot_err)?;
        }
    }
    Ok(())
}
