//! PNG from SVG: every plot is drawn once, as SVG, and rasterised with `resvg` when a PNG is
//! asked for. Text is shaped with the bundled DejaVu Sans (no system fonts are read), so a PNG
//! has the same layout and the same kerning as its SVG and does not depend on the machine.

use crate::error::{RenderError, RenderResult};
use std::sync::{Arc, OnceLock};

/// The bundled text font (DejaVu Sans, Bitstream Vera licence in assets/).
pub const FONT: &[u8] = include_bytes!("../assets/DejaVuSans.ttf");

/// Pixels per SVG user unit of the PNG (the plots are laid out in pixels already).
const SCALE: f32 = 1.0;

fn options() -> &'static resvg::usvg::Options<'static> {
    static OPTIONS: OnceLock<resvg::usvg::Options<'static>> = OnceLock::new();
    OPTIONS.get_or_init(|| {
        let mut db = resvg::usvg::fontdb::Database::new();
        db.load_font_data(FONT.to_vec());
        // Every generic family and the names the plots and the report use map to the one font.
        db.set_sans_serif_family("DejaVu Sans");
        db.set_serif_family("DejaVu Sans");
        db.set_monospace_family("DejaVu Sans");
        resvg::usvg::Options {
            font_family: "DejaVu Sans".into(),
            fontdb: Arc::new(db),
            ..resvg::usvg::Options::default()
        }
    })
}

/// Rasterise an SVG document to PNG bytes (white background, the SVG's own size).
///
/// # Errors
/// [`RenderError::Draw`] when the SVG cannot be parsed or the PNG encoded.
pub fn svg_to_png(svg: &str) -> RenderResult<Vec<u8>> {
    let tree = resvg::usvg::Tree::from_str(svg, options())
        .map_err(|e| RenderError::Draw(format!("SVG to PNG: {e}")))?;
    let size = tree
        .size()
        .to_int_size()
        .scale_by(SCALE)
        .ok_or_else(|| RenderError::Draw("SVG to PNG: the picture has no size".into()))?;
    let mut pixmap = resvg::tiny_skia::Pixmap::new(size.width(), size.height())
        .ok_or_else(|| RenderError::Draw("SVG to PNG: the picture is too large".into()))?;
    pixmap.fill(resvg::tiny_skia::Color::WHITE);
    resvg::render(
        &tree,
        resvg::tiny_skia::Transform::from_scale(SCALE, SCALE),
        &mut pixmap.as_mut(),
    );
    pixmap
        .encode_png()
        .map_err(|e| RenderError::Draw(format!("SVG to PNG: {e}")))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_small_svg_becomes_a_png_of_its_size() {
        let svg = r#"<svg xmlns="http://www.w3.org/2000/svg" width="40" height="20"><text x="2" y="15" font-family="sans-serif" font-size="12">Legend</text></svg>"#;
        let png = svg_to_png(svg).expect("renders");
        assert_eq!(&png[1..4], b"PNG");
        // Width and height from the IHDR chunk.
        assert_eq!(u32::from_be_bytes([png[16], png[17], png[18], png[19]]), 40);
        assert_eq!(u32::from_be_bytes([png[20], png[21], png[22], png[23]]), 20);
    }

    #[test]
    fn bad_svg_is_an_error_not_a_panic() {
        assert!(svg_to_png("<svg").is_err());
    }
}
