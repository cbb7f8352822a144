//! The window plot of a sweep: the pair window in the angle-impact velocity plane with one
//! process curve per standoff (impact velocity against charging voltage at the standoff's
//! angle), each in its own colour or dash with its own legend entry, the points labelled by
//! voltage where a label fits clear of markers, lines and other labels.

use crate::window_plot::{render_svg, PlotRequest, ProcessCurve};
use crate::RenderResult;
use oblique_setup::human;
use oblique_setup::SweepRanking;
use oblique_window::boundary::Plane;
use oblique_window::PairWindow;

/// The process curves of a sweep, one per standoff (empty without angles).
#[must_use]
pub fn sweep_curves(r: &SweepRanking<'_>) -> Vec<ProcessCurve> {
    let grid = &r.grid;
    let Some(angles) = &grid.angles else {
        return Vec::new();
    };
    let mut curves = Vec::new();
    for (j, g) in grid.standoffs.iter().enumerate() {
        let points: Vec<(f64, f64, Option<String>)> = (0..grid.voltages.len())
            .filter_map(|i| {
                r.result
                    .impact_velocity(i, j)
                    .map(|v| (v.si(), angles[j], Some(human::kv(grid.voltages[i]))))
            })
            .collect();
        if points.is_empty() {
            continue;
        }
        let range = match (grid.voltages.first(), grid.voltages.last()) {
            (Some(a), Some(b)) if grid.voltages.len() > 1 => {
                format!(", {} to {}", human::kv(*a), human::kv(*b))
            }
            _ => String::new(),
        };
        curves.push(ProcessCurve {
            label: format!(
                "standoff {} at {} deg{range}",
                human::mm(*g),
                human::g(angles[j].to_degrees())
            ),
            points,
        });
    }
    curves
}

/// The window plot (SVG, angle against impact velocity) of `window` with the sweep's process
/// curves. A sweep without angles has no curves to place: the plot then shows the window
/// alone.
///
/// # Errors
/// [`crate::RenderError`] when the window cannot be evaluated or drawn.
pub fn render_sweep_svg(window: &PairWindow, r: &SweepRanking<'_>) -> RenderResult<String> {
    let mut req = PlotRequest::new(window, Plane::AngleImpactVelocity);
    req.curves = sweep_curves(r);
    render_svg(&req)
}
