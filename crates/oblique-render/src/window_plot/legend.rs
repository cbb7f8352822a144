//! The legend panel beside the plot: sections with a title and one entry per thing drawn (no
//! section without entries), each entry a sample of its mark and its text wrapped to the panel.

use super::palette::{C_MELTED, C_NOT, C_PARTIAL, C_WELDED};
use super::{plot_err, wrap_words};
use crate::error::RenderResult;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// How an entry is shown.
#[derive(Debug, Clone, Copy)]
pub(crate) enum Mark {
    /// A filled swatch.
    Fill(RGBColor),
    /// A line, solid or dashed (dash, gap).
    Line {
        colour: RGBColor,
        width: u32,
        dash: Option<(u32, u32)>,
    },
    /// A trial marker: 0 welded, 1 not welded, 2 partial, 3 melted.
    Trial(usize),
    /// The process-curve markers, filled (inside) and open (outside).
    Dot { colour: RGBColor },
    /// A point diamond, filled (proposed, chosen) or open (alternative).
    Diamond { filled: bool },
    /// A character written in labels (a note's key).
    Glyph(&'static str),
}

/// One legend entry.
#[derive(Debug, Clone)]
pub(crate) struct Entry {
    text: String,
    mark: Mark,
}

impl Entry {
    pub(crate) fn new(text: impl Into<String>, mark: Mark) -> Self {
        Entry {
            text: text.into(),
            mark,
        }
    }
}

/// A titled group of entries.
#[derive(Debug, Clone)]
pub(crate) struct Section {
    title: String,
    entries: Vec<Entry>,
}

impl Section {
    pub(crate) fn new(title: &str) -> Self {
        Section {
            title: title.into(),
            entries: Vec::new(),
        }
    }

    pub(crate) fn push(&mut self, e: Entry) {
        self.entries.push(e);
    }

    pub(crate) fn is_empty(&self) -> bool {
        self.entries.is_empty()
    }
}

type Area<'b> = DrawingArea<SVGBackend<'b>, Shift>;

/// Draw the legend, its entries no lower than `bottom` (px from the top of `area`); entries that
/// do not fit say how many were left out. Returns how low the entries drawn reach.
pub(crate) fn draw_legend(area: &Area<'_>, sections: &[Section], bottom: i32) -> RenderResult<i32> {
    let font = TextStyle::from(("sans-serif", 12).into_font());
    let mut reach = 0;
    let mut y = 16;
    let total: usize = sections.iter().map(|s| s.entries.len()).sum();
    let mut shown = 0;
    'outer: for s in sections.iter().filter(|s| !s.is_empty()) {
        if y + 40 > bottom {
            break;
        }
        area.draw(&Text::new(
            s.title.clone(),
            (10, y),
            TextStyle::from(("sans-serif", 14).into_font()).pos(Pos::new(HPos::Left, VPos::Center)),
        ))
        .map_err(plot_err)?;
        y += 20;
        for e in &s.entries {
            let lines = wrap_words(&e.text, 41);
            if y + 15 * lines.len() as i32 > bottom {
                break 'outer;
            }
            reach = y + 15 * lines.len() as i32;
            draw_mark(area, e.mark, y)?;
            for l in lines {
                area.draw(&Text::new(
                    l,
                    (42, y),
                    font.clone().pos(Pos::new(HPos::Left, VPos::Center)),
                ))
                .map_err(plot_err)?;
                y += 15;
            }
            y += 3;
            shown += 1;
        }
        y += 8;
    }
    if shown < total {
        area.draw(&Text::new(
            format!("({} more entries not shown)", total - shown),
            (10, y),
            font.clone().pos(Pos::new(HPos::Left, VPos::Center)),
        ))
        .map_err(plot_err)?;
        reach = y + 8;
    }
    Ok(reach)
}

fn draw_mark(area: &Area<'_>, mark: Mark, y: i32) -> RenderResult {
    match mark {
        Mark::Fill(c) => area.draw(&Rectangle::new([(10, y - 5), (34, y + 5)], c.filled())),
        Mark::Line {
            colour,
            width,
            dash,
        } => {
            let style = colour.stroke_width(width);
            match dash {
                None => area.draw(&PathElement::new(vec![(10, y), (34, y)], style)),
                Some((d, g)) => {
                    let (d, g) = (d as i32, g as i32);
                    let mut x0 = 10;
                    while x0 < 34 {
                        area.draw(&PathElement::new(
                            vec![(x0, y), ((x0 + d).min(34), y)],
                            style,
                        ))
                        .map_err(plot_err)?;
                        x0 += d + g;
                    }
                    Ok(())
                }
            }
        }
        Mark::Trial(kind) => {
            let p = (22, y);
            match kind {
                0 => area.draw(&Circle::new(p, 5, C_WELDED.filled())),
                1 => area.draw(
                    &(EmptyElement::at(p)
                        + Rectangle::new([(-5, -5), (5, 5)], C_NOT.stroke_width(2))),
                ),
                2 => area.draw(&TriangleMarker::new(p, 7, C_PARTIAL.filled())),
                _ => area.draw(&Cross::new(p, 5, C_MELTED.stroke_width(3))),
            }
        }
        Mark::Dot { colour } => {
            // A filled and an open marker: inside and outside.
            area.draw(&Circle::new((16, y), 4, colour.filled()))
                .map_err(plot_err)?;
            area.draw(&Circle::new((28, y), 4, WHITE.filled()))
                .map_err(plot_err)?;
            area.draw(&Circle::new((28, y), 4, colour.stroke_width(1)))
        }
        Mark::Diamond { filled } => {
            let d = |s: i32| vec![(22, y - s), (22 + s, y), (22, y + s), (22 - s, y)];
            area.draw(&Polygon::new(d(7), BLACK.filled()))
                .map_err(plot_err)?;
            if !filled {
                area.draw(&Polygon::new(d(4), WHITE.filled()))
                    .map_err(plot_err)?;
            }
            Ok(())
        }
        Mark::Glyph(g) => area.draw(&Text::new(
            g,
            (22, y),
            TextStyle::from(("sans-serif", 16).into_font())
                .pos(Pos::new(HPos::Center, VPos::Center)),
        )),
    }
    .map_err(plot_err)
}
