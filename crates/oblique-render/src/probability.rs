//! Weld-probability contours over the window plot: the probability evaluated by
//! `oblique_confidence::probability_grid` on a 200 x 200 grid over the plot's range (every node
//! with the same draws), and its 10 %, 50 % and 90 % lines drawn over the window (levels
//! configurable). The legend states the scatter assumed.

use crate::error::RenderResult;
use crate::window_plot::{plot_ranges, render_svg_overlay, PlotRequest};
pub use crate::window_plot::{Contours, Polyline};
use oblique_confidence::{probability_grid, Sampling, Scatter};

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

/// Bilinear interpolation of a node field at (x, y), `None` outside the grid.
fn bilinear(xs: &[f64], ys: &[f64], v: &[f64], x: f64, y: f64) -> Option<f64> {
    let cell = |g: &[f64], t: f64| -> Option<(usize, f64)> {
        if g.len() < 2 || t < g[0] || t > g[g.len() - 1] {
            return None;
        }
        let k = g.partition_point(|&a| a <= t).clamp(1, g.len() - 1);
        Some((k - 1, (t - g[k - 1]) / (g[k] - g[k - 1])))
    };
    let ((i, tx), (j, ty)) = (cell(xs, x)?, cell(ys, y)?);
    let nx = xs.len();
    let at = |a: usize, b: usize| v[b * nx + a];
    let lo = at(i, j) + (at(i + 1, j) - at(i, j)) * tx;
    let hi = at(i, j + 1) + (at(i + 1, j + 1) - at(i, j + 1)) * tx;
    Some(lo + (hi - lo) * ty)
}

/// The probability grid over [0, x_max] x [0, y_max] and its contours at `overlay.levels`
/// (marching squares, each crossing placed by bisection of the bilinear interpolant).
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
    // No line where the relations are not claimed to hold: nodes outside the validity domain
    // are left out of the contours (the plot shades that region and says so).
    let setup = req.window.setup()?;
    let nx = grid.xs.len();
    let masked: Vec<f64> = grid
        .values
        .iter()
        .enumerate()
        .map(|(k, p)| {
            let (x, y) = (grid.xs[k % nx], grid.ys_deg[k / nx]);
            let inside = crate::window_plot::collision_at(req.window, req.plane, x, y)
                .is_some_and(|c| req.window.domain.margin(&setup, &c) >= 0.0);
            if inside {
                *p
            } else {
                f64::NAN
            }
        })
        .collect();
    let lines = overlay
        .levels
        .iter()
        .map(|level| {
            let shifted: Vec<f64> = masked.iter().map(|p| p - level).collect();
            let probe = |x: f64, y: f64| bilinear(&grid.xs, &grid.ys_deg, &shifted, x, y);
            (
                *level,
                crate::window_plot::field::trace_field(
                    &grid.xs,
                    &grid.ys_deg,
                    &shifted,
                    &probe,
                    false,
                ),
            )
        })
        .collect();
    Ok(Contours { grid, lines })
}

/// The window plot with weld-probability contours, as SVG.
///
/// # Errors
/// As [`crate::window_plot::render_svg`], and a probability setting out of range.
pub fn render_svg(req: &PlotRequest<'_>, overlay: &ProbabilityOverlay) -> RenderResult<String> {
    let (x_max, y_max) = plot_ranges(req);
    let c = contours(req, overlay, x_max, y_max)?;
    render_svg_overlay(req, Some(&c))
}

/// The window plot with weld-probability contours, as PNG bytes (the SVG rasterised).
///
/// # Errors
/// As [`render_svg`], and an encoding error.
pub fn render_png(req: &PlotRequest<'_>, overlay: &ProbabilityOverlay) -> RenderResult<Vec<u8>> {
    crate::png::svg_to_png(&render_svg(req, overlay)?)
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
        let req = PlotRequest::new(w, Plane::AngleImpactVelocity);
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
