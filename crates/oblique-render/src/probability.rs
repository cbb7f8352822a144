//! Weld-probability contours over the window plot: the probability evaluated by
//! `oblique_confidence::probability_grid` on a 200 x 200 grid over the plot's range (every node
//! with the same draws), and its 10 %, 50 % and 90 % lines drawn over the window (levels
//! configurable). The legend states the scatter assumed.

use crate::error::RenderResult;
use crate::window_plot::{
    contour, draw, encode_png, plot_err, prepare, register_fonts, PlotRequest, HEIGHT, WIDTH,
};
use oblique_confidence::{probability_grid, ProbabilityGrid, Sampling, Scatter};
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// Nodes per axis of the probability grid.
pub const NODES: usize = 200;

/// What to overlay: the stated scatter, the sampling and the levels.
#[derive(Debug, Clone, PartialEq)]
pub struct ProbabilityOverlay {
    /// The stated scatter.
    pub scatter: Scatter,
    /// Draws per node and seed.
    pub sampling: Sampling,
    /// Probability levels to draw (fractions, e.g. 0.1, 0.5, 0.9).
    pub levels: Vec<f64>,
}

impl ProbabilityOverlay {
    /// 10 %, 50 % and 90 % under `scatter`, with the default number of draws per node.
    pub fn new(scatter: Scatter, seed: u64) -> Self {
        Self {
            scatter,
            sampling: Sampling {
                samples: oblique_confidence::grid::DEFAULT_GRID_SAMPLES,
                seed,
                threads: None,
            },
            levels: vec![0.1, 0.5, 0.9],
        }
    }
}

/// A polyline in the plot's coordinates (velocity m/s, angle deg).
pub type Polyline = Vec<(f64, f64)>;

/// The grid and its contour lines, in the plot's coordinates.
#[derive(Debug, Clone)]
pub struct Contours {
    /// The probability grid (typed, for reports and tests).
    pub grid: ProbabilityGrid,
    /// Per level: the level and its polylines (velocity m/s, angle deg).
    pub lines: Vec<(f64, Vec<Polyline>)>,
}

/// The probability grid over [0, x_max] x [0, y_max] and its contours at `overlay.levels`.
///
/// # Errors
/// A setting out of range, or a window the physics refuses.
pub fn contours(
    req: &PlotRequest<'_>,
    overlay: &ProbabilityOverlay,
    x_max: f64,
    y_max: f64,
) -> RenderResult<Contours> {
    let xs: Vec<f64> = (0..NODES)
        .map(|i| x_max * (i as f64 + 0.5) / NODES as f64)
        .collect();
    let ys: Vec<f64> = (0..NODES)
        .map(|j| y_max * (j as f64 + 0.5) / NODES as f64)
        .collect();
    let grid = probability_grid(
        req.window,
        req.plane,
        xs,
        ys,
        &overlay.scatter,
        &overlay.sampling,
    )?;
    let lines = overlay
        .levels
        .iter()
        .map(|level| {
            let shifted: Vec<f64> = grid.values.iter().map(|p| p - level).collect();
            (*level, contour(&grid.xs, &grid.ys_deg, &shifted))
        })
        .collect();
    Ok(Contours { grid, lines })
}

const C_PROBABILITY: RGBColor = RGBColor(0, 110, 110);

/// Draw the contour lines with a label on each, and return their legend entries.
pub(crate) fn draw_contours<DB: DrawingBackend>(
    chart: &mut ChartContext<'_, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
    c: &Contours,
) -> RenderResult<Vec<(String, ShapeStyle, u8)>> {
    let mut legend = Vec::new();
    for (level, lines) in &c.lines {
        let middle = (*level - 0.5).abs() < 1e-9;
        let style = C_PROBABILITY.stroke_width(if middle { 3 } else { 2 });
        // 50 % solid, below it long dashes, above it dots (legend marks 0, 3, 2).
        let (dash, gap, mark) = if middle {
            (0, 0, 0u8)
        } else if *level < 0.5 {
            (6, 4, 3)
        } else {
            (2, 3, 2)
        };
        for line in lines {
            if middle {
                chart
                    .draw_series(LineSeries::new(line.clone(), style))
                    .map_err(plot_err)?;
            } else {
                chart
                    .draw_series(DashedLineSeries::new(line.clone(), dash, gap, style))
                    .map_err(plot_err)?;
            }
        }
        // One label per level, at the middle of its longest line.
        if let Some(longest) = lines.iter().max_by_key(|l| l.len()) {
            let at = longest[longest.len() / 2];
            chart
                .draw_series(std::iter::once(Text::new(
                    format!("{:.0} %", 100.0 * level),
                    at,
                    ("sans-serif", 13)
                        .into_font()
                        .color(&C_PROBABILITY)
                        .pos(Pos::new(HPos::Left, VPos::Bottom)),
                )))
                .map_err(plot_err)?;
        }
        legend.push((
            format!("weld probability {:.0} %", 100.0 * level),
            style,
            mark,
        ));
    }
    let s = &c.grid.scatter;
    legend.push((
        format!(
            "probability under the stated scatter: {}; {} draws per node, seed {}; conditional on the model (docs/theory.md 15)",
            s.text(),
            c.grid.samples,
            c.grid.seed
        ),
        WHITE.filled(),
        0,
    ));
    Ok(legend)
}

/// The window plot with weld-probability contours, as SVG.
///
/// # Errors
/// As [`crate::window_plot::render_svg`], and a probability setting out of range.
pub fn render_svg(req: &PlotRequest<'_>, overlay: &ProbabilityOverlay) -> RenderResult<String> {
    register_fonts();
    let p = prepare(req)?;
    let c = contours(req, overlay, p.x_max, p.y_max)?;
    let mut svg = String::new();
    draw(
        SVGBackend::with_string(&mut svg, (WIDTH, HEIGHT)).into_drawing_area(),
        &p,
        Some(&c),
    )?;
    Ok(oblique_window::present::xml_safe(&svg).into_owned())
}

/// The window plot with weld-probability contours, as PNG bytes.
///
/// # Errors
/// As [`render_svg`], and an encoding error.
pub fn render_png(req: &PlotRequest<'_>, overlay: &ProbabilityOverlay) -> RenderResult<Vec<u8>> {
    register_fonts();
    let p = prepare(req)?;
    let c = contours(req, overlay, p.x_max, p.y_max)?;
    let mut rgb = vec![0u8; (WIDTH * HEIGHT * 3) as usize];
    draw(
        BitMapBackend::with_buffer(&mut rgb, (WIDTH, HEIGHT)).into_drawing_area(),
        &p,
        Some(&c),
    )?;
    encode_png(&rgb, WIDTH, HEIGHT)
}

#[cfg(test)]
mod tests {
    use super::*;
    use oblique_confidence::VelocitySpread;
    use oblique_core::units::Angle;
    use oblique_window::boundary::Plane;

    #[test]
    fn contours_lie_inside_the_window_and_the_svg_is_well_formed() {
        let lib = oblique_window::Library::load(&[]).expect("library");
        let w = lib.pair("demo-al6061-on-cu").expect("demo");
        let req = PlotRequest {
            window: w,
            plane: Plane::AngleImpactVelocity,
            points: Vec::new(),
            curves: Vec::new(),
        };
        let mut overlay = ProbabilityOverlay::new(
            Scatter {
                velocity: Some(VelocitySpread::Relative(0.05)),
                angle: Some(Angle::from_degrees(1.0)),
                model: true,
            },
            1,
        );
        overlay.sampling.samples = 64;
        let svg = render_svg(&req, &overlay).expect("svg");
        roxmltree::Document::parse(&svg).expect("well-formed");
        assert!(svg.contains("weld probability 50 %"), "legend");
        let c = contours(&req, &overlay, 800.0, 35.0).expect("contours");
        assert!(c.lines.iter().all(|(_, l)| !l.is_empty()));
        // The probability is highest inside the window (450 m/s, 14 deg is inside).
        let i = (450.0 / 800.0 * NODES as f64) as usize;
        let j = (14.0 / 35.0 * NODES as f64) as usize;
        assert!(c.grid.values[j * NODES + i] > 0.5);
    }
}
