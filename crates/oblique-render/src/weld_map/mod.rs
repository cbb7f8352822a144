//! The weld map's two plots, SVG through plotters into a `String` (deterministic), drawn from
//! the map's [`Summary`]:
//! - [`strip_svg`]: the strip along the interface: verdict by position, with the
//!   impact-velocity and collision-angle traces below it;
//! - [`window_plane_svg`]: the window plane: angle against impact velocity, the window's
//!   verdict regions tinted and the points on top, marked one by one when few, as a binned
//!   density when many.
//!
//! Palette (own): welded dark blue, not welded orange, melted medium red with white hatching,
//! head-on brown, outside the validity domain light grey (grey outlined triangles on the plane). Their lightness differs so that
//! they stay apart in greyscale and for the common colour-vision deficiencies; the markers
//! differ in shape as well.

mod plane;
mod strip;

pub use plane::window_plane_svg;
pub use strip::strip_svg;

use crate::error::RenderError;
use oblique_map::{RunInfo, Summary};
use plotters::prelude::*;

const C_WELDED: RGBColor = RGBColor(24, 54, 118);
const C_NOT: RGBColor = RGBColor(225, 135, 0);
const C_MELTED: RGBColor = RGBColor(196, 44, 44);
/// Head-on rows (collision angle 0: not welded).
const C_HEAD_ON: RGBColor = RGBColor(150, 90, 40);
/// Rows outside the validity domain (no verdict claimed).
const C_OUTSIDE: RGBColor = RGBColor(215, 215, 215);
/// Cells of the window plane outside the validity domain.
const T_OUTSIDE: RGBColor = RGBColor(212, 212, 212);
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

fn perr<E: std::fmt::Display>(e: E) -> RenderError {
    RenderError::Draw(e.to_string())
}

fn verdict_colour(v: u8) -> RGBColor {
    match v {
        0 => C_WELDED,
        1 => C_NOT,
        3 => C_HEAD_ON,
        4 => C_OUTSIDE,
        _ => C_MELTED,
    }
}

/// `; constants set on the command line: ...` when any differs from the window's, else empty.
fn overridden_note(s: &Summary) -> String {
    let set: Vec<String> = s
        .constants
        .iter()
        .filter(|c| c.value != c.window)
        .map(|c| format!("{} {} (window {})", c.name, c.value, c.window))
        .collect();
    if set.is_empty() {
        String::new()
    } else {
        format!("; constants set on the command line: {}", set.join(", "))
    }
}

fn title_text(info: &RunInfo, what: &str) -> String {
    format!(
        "{what}: pair {} ({}), convention {}",
        info.pair, info.pair_line, info.convention
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use oblique_map::{MapOptions, WeldMap};
    use oblique_window::Library;

    /// Both plots of a small map of the demo pair (an invented window) are well-formed SVG with
    /// their titles, the caution, and one marker per point on the window plane.
    #[test]
    fn both_plots_of_a_small_map() {
        let lib = Library::load(&[]).expect("the built-in library loads");
        let window = lib.pair("demo-al6061-on-cu").expect("the demo pair");
        let csv = "position[mm],velocity[m/s],angle[deg]\n0.0,250,12\n0.5,450,10\n1.0,460,11\n1.5,900,12\n";
        let opts = MapOptions {
            collect_strip: true,
            collect_window_plane: true,
            ..MapOptions::default()
        };
        let mut map = WeldMap::open(window, csv.as_bytes(), &opts).expect("a good header");
        let summary = map
            .run(&mut std::io::sink(), None, &mut |_| {})
            .expect("four good rows");
        let strip = strip_svg(window, &summary).expect("the strip draws");
        let plane = window_plane_svg(window, map.classifier(), &summary).expect("the plane draws");
        for (svg, title) in [
            (
                &strip,
                "Weld map along the interface: pair demo-al6061-on-cu",
            ),
            (
                &plane,
                "Weld map on the window plane: pair demo-al6061-on-cu",
            ),
        ] {
            let doc = roxmltree::Document::parse(svg).expect("well-formed SVG");
            let texts: Vec<&str> = doc
                .descendants()
                .filter_map(|n| n.text())
                .map(str::trim)
                .collect();
            assert!(texts.iter().any(|t| t.starts_with(title)), "{title}");
            assert!(texts.contains(&PLOT_CAUTION), "{title}: the caution");
        }
        assert!(plane.contains("welded: 2"), "the legend counts the points");
    }
}
