//! The window plot of a sweep: the pair window in the angle-impact velocity plane with one
//! process curve per standoff (one angle per standoff) or per charging voltage (the same angle
//! at every standoff), a few points labelled where the labels do not overlap.

use crate::window_plot::{render_svg, PlotRequest, ProcessCurve};
use crate::RenderResult;
use oblique_setup::human;
use oblique_setup::{SweepGrid, SweepRanking};
use oblique_window::boundary::Plane;
use oblique_window::PairWindow;

/// Labelled points at most.
const MAX_LABELS: usize = 12;

/// A curve point: impact velocity (m/s), angle (rad), label.
type CurvePoint = (f64, f64, String);

fn point_label(grid: &SweepGrid, i: usize, j: usize) -> String {
    match (grid.one_angle(), grid.voltages.len() > 1) {
        (true, true) => format!(
            "{}, {}",
            human::kv(grid.voltages[i]),
            human::mm(grid.standoffs[j])
        ),
        (true, false) => human::mm(grid.standoffs[j]),
        (false, _) => human::kv(grid.voltages[i]),
    }
}

/// Pick which curve points get a text label so that no two labels overlap: the highest voltage
/// of each curve first, then the lowest, then the others in order; a label is kept only when
/// its box (estimated from the plot's scale) is clear of every label kept before.
fn choose_labels(
    curves: &[Vec<CurvePoint>],
    x_max: f64,
    y_max: f64,
    max_labels: usize,
) -> Vec<Vec<bool>> {
    // Approximate size of the plotting area of `render_svg` in pixels.
    let (w_px, h_px) = (717.0, 556.0);
    let to_px = |v: f64, a: f64| (v / x_max * w_px, (1.0 - a.to_degrees() / y_max) * h_px);
    let mut keep: Vec<Vec<bool>> = curves.iter().map(|c| vec![false; c.len()]).collect();
    let mut boxes: Vec<(f64, f64, f64, f64)> = Vec::new();
    let mut order: Vec<(usize, usize)> = Vec::new();
    for (ci, c) in curves.iter().enumerate() {
        if let Some(last) = c.len().checked_sub(1) {
            order.push((ci, last));
        }
    }
    for (ci, c) in curves.iter().enumerate() {
        if c.len() > 1 {
            order.push((ci, 0));
        }
    }
    for (ci, c) in curves.iter().enumerate() {
        for k in 1..c.len().saturating_sub(1) {
            order.push((ci, k));
        }
    }
    for (ci, k) in order {
        if boxes.len() >= max_labels {
            break;
        }
        let (v, a, text) = &curves[ci][k];
        let (x, y) = to_px(*v, *a);
        // The text is drawn from the point to the right and downwards (left-top anchor).
        let bx = (x, y, x + 6.4 * text.chars().count() as f64, y + 13.0);
        // Stay clear of every curve marker (radius 4 px) other than the labelled point itself.
        let hits_marker = curves.iter().enumerate().any(|(cj, cc)| {
            cc.iter().enumerate().any(|(kk, (vv, aa, _))| {
                if cj == ci && kk == k {
                    return false;
                }
                let (px, py) = to_px(*vv, *aa);
                px + 5.0 > bx.0 && px - 5.0 < bx.2 && py + 5.0 > bx.1 && py - 5.0 < bx.3
            })
        });
        let clear = boxes.iter().all(|b| {
            bx.2 + 2.0 <= b.0 || bx.0 >= b.2 + 2.0 || bx.3 + 2.0 <= b.1 || bx.1 >= b.3 + 2.0
        });
        if clear && !hits_marker {
            boxes.push(bx);
            keep[ci][k] = true;
        }
    }
    keep
}

fn nice_ceil(x: f64, step: f64) -> f64 {
    (x / step).ceil() * step
}

/// The curves of the sweep and their legend names (empty without angles).
fn curves_of(r: &SweepRanking<'_>) -> (Vec<Vec<CurvePoint>>, Vec<String>) {
    let grid = &r.grid;
    let mut raw: Vec<Vec<CurvePoint>> = Vec::new();
    let mut names = Vec::new();
    let Some(angles) = &grid.angles else {
        return (raw, names);
    };
    if grid.one_angle() {
        // One angle for every standoff: one curve per charging voltage, velocity against
        // standoff (all on one line of the plot), labelled by standoff.
        for (i, u) in grid.voltages.iter().enumerate() {
            let pts: Vec<CurvePoint> = (0..grid.standoffs.len())
                .filter_map(|j| {
                    r.result
                        .impact_velocity(i, j)
                        .map(|v| (v.si(), angles[j], point_label(grid, i, j)))
                })
                .collect();
            if !pts.is_empty() {
                raw.push(pts);
                names.push(format!(
                    "{} ({}) at {} deg, standoff {} to {}",
                    human::kv(*u),
                    human::kj(r.result.point(i, 0).map_or(0.0, |p| p.stored_energy.si())),
                    human::g(angles[0].to_degrees()),
                    human::mm(grid.standoffs.iter().copied().fold(f64::INFINITY, f64::min)),
                    human::mm(grid.standoffs.iter().copied().fold(0.0, f64::max)),
                ));
            }
        }
    } else {
        // One angle per standoff: one curve per standoff, velocity against voltage.
        for (j, g) in grid.standoffs.iter().enumerate() {
            let pts: Vec<CurvePoint> = (0..grid.voltages.len())
                .filter_map(|i| {
                    r.result
                        .impact_velocity(i, j)
                        .map(|v| (v.si(), angles[j], point_label(grid, i, j)))
                })
                .collect();
            if !pts.is_empty() {
                raw.push(pts);
                names.push(format!(
                    "standoff {} at {} deg",
                    human::mm(*g),
                    human::g(angles[j].to_degrees())
                ));
            }
        }
    }
    (raw, names)
}

/// The window plot (SVG, angle against impact velocity) of `window` with the sweep's process
/// curves. A sweep without angles has no curves to place: the plot then shows the window
/// alone.
///
/// # Errors
/// [`crate::RenderError`] when the window cannot be evaluated or drawn.
pub fn render_sweep_svg(window: &PairWindow, r: &SweepRanking<'_>) -> RenderResult<String> {
    let (raw, names) = curves_of(r);
    // The plot's scale, as render_svg chooses it (velocity plane).
    let max_v = raw
        .iter()
        .flatten()
        .map(|p| p.0)
        .chain(window.observations.iter().map(|o| o.velocity.si()))
        .fold(0.0f64, f64::max);
    let max_a = raw
        .iter()
        .flatten()
        .map(|p| p.1.to_degrees())
        .chain(window.observations.iter().map(|o| o.angle.degrees()))
        .fold(0.0f64, f64::max);
    let x_max = nice_ceil((max_v * 1.2).max(700.0), 100.0);
    let y_max = nice_ceil((max_a * 1.15).max(30.0), 5.0).min(85.0);
    let keep = choose_labels(&raw, x_max, y_max, MAX_LABELS);
    let curves: Vec<ProcessCurve> = raw
        .into_iter()
        .zip(keep)
        .zip(names)
        .map(|((pts, k), label)| ProcessCurve {
            label,
            points: pts
                .into_iter()
                .zip(k)
                .map(|((v, a, t), keep)| (v, a, keep.then_some(t)))
                .collect(),
        })
        .collect();
    render_svg(&PlotRequest {
        window,
        plane: Plane::AngleImpactVelocity,
        points: Vec::new(),
        curves,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_never_overlap() {
        let a = 8f64.to_radians();
        let curve = |v0: f64| -> Vec<CurvePoint> {
            (0..7)
                .map(|i| (v0 + 40.0 * i as f64, a, format!("{} kV, 1 mm", 6 + i)))
                .collect()
        };
        let curves = vec![curve(300.0), curve(310.0), curve(320.0)];
        let keep = choose_labels(&curves, 800.0, 30.0, 12);
        let n: usize = keep.iter().flatten().filter(|k| **k).count();
        assert!((1..21).contains(&n), "{n} labels");
        // Neighbouring points 10 m/s apart on one line can never both be labelled.
        for i in 0..7 {
            let same: usize = keep.iter().filter(|k| k[i]).count();
            assert!(same <= 1);
        }
    }
}
