//! Window plots: the weldable region tinted, each limit traced (or the user's polyline), trials
//! by outcome (optionally numbered), proposed points and process curves with their verdicts, and
//! a legend with one entry per thing drawn. SVG through plotters, rendered into a `String`; PNG
//! by rasterising that SVG ([`crate::png`]). Deterministic for the same input.
//!
//! The module is split by task: [`field`] evaluates the window on a grid and traces the limits at
//! sub-grid resolution, [`place`] keeps labels clear of markers, lines and each other, `draw`
//! draws the layers and `legend` the legend panel.

mod contours;
mod draw;
pub mod field;
pub(crate) mod legend;
mod palette;
pub mod place;

pub use contours::{Contours, Polyline};

use crate::error::{RenderError, RenderResult};
use oblique_core::units::{Angle, Velocity};
use oblique_core::{Collision, CriterionId};
use oblique_window::boundary::Plane;
use oblique_window::classify::{Classification, LimitRef};
use oblique_window::PairWindow;
use plotters::prelude::*;

/// What a marked point stands for in a decision.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum PointRole {
    /// A proposed point (black diamond).
    #[default]
    Proposed,
    /// The chosen set-up of a decision (large black diamond).
    Chosen,
    /// An alternative that was considered and not chosen (open diamond).
    Alternative,
}

/// A proposed process point (impact velocity in the window's convention).
#[derive(Debug, Clone)]
pub struct ProposedPoint {
    /// Label shown beside the marker.
    pub label: String,
    /// Impact velocity Vp, m/s.
    pub velocity_m_s: f64,
    /// Collision angle, rad.
    pub angle_rad: f64,
    /// What the point stands for.
    pub role: PointRole,
}

impl ProposedPoint {
    /// A proposed point.
    #[must_use]
    pub fn new(label: impl Into<String>, velocity_m_s: f64, angle_rad: f64) -> Self {
        ProposedPoint {
            label: label.into(),
            velocity_m_s,
            angle_rad,
            role: PointRole::Proposed,
        }
    }

    /// The same point with another role.
    #[must_use]
    pub fn with_role(mut self, role: PointRole) -> Self {
        self.role = role;
        self
    }
}

/// A process curve: a polyline of points (e.g. velocity against charging voltage).
#[derive(Debug, Clone)]
pub struct ProcessCurve {
    /// Its legend entry.
    pub label: String,
    /// Points: impact velocity (m/s) and angle (rad), each with an optional label (shown where
    /// it fits clear of everything else).
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
    /// Write each trial's shot number (its position in the pair file, from 1) beside it.
    pub shot_numbers: bool,
}

impl<'a> PlotRequest<'a> {
    /// A plot of `window` in `plane` with nothing on it but the window and its trials.
    #[must_use]
    pub fn new(window: &'a PairWindow, plane: Plane) -> Self {
        PlotRequest {
            window,
            plane,
            points: Vec::new(),
            curves: Vec::new(),
            shot_numbers: false,
        }
    }
}

/// More proposed points than this are drawn as a density (binned), and the plot says so.
pub const MAX_MARKED_POINTS: usize = 400;
/// Points up to this count get a text label with their verdict.
pub const MAX_LABELLED_POINTS: usize = 12;

const WIDTH: u32 = 1100;
/// The height of the plot, and of the whole picture unless the legend needs more.
const HEIGHT: u32 = 680;
/// The canvas drawn on: the picture is cut to `HEIGHT`, or below the legend when it runs lower.
const CANVAS_HEIGHT: u32 = 2000;
const LEGEND_W: u32 = 300;

pub(crate) fn criterion_colour(id: CriterionId) -> RGBColor {
    match id {
        CriterionId::DeribasLower => RGBColor(27, 120, 55),
        CriterionId::StrengthLower => RGBColor(118, 42, 131),
        CriterionId::PressureLower => RGBColor(179, 88, 6),
        CriterionId::MeltingUpper => RGBColor(178, 24, 43),
        CriterionId::Jetting => RGBColor(33, 102, 172),
        CriterionId::WavyTransition => palette::C_INFO,
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

pub(crate) fn collision_at(
    window: &PairWindow,
    plane: Plane,
    x: f64,
    beta_deg: f64,
) -> Option<Collision> {
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

fn nice_ceil(x: f64, step: f64) -> f64 {
    (x / step).ceil() * step
}

/// The ranges a window plot of these data uses: (x_max, y_max) in the plane's units (m/s, deg).
/// Exposed so that callers placing things on the plot use the same scale.
#[must_use]
pub fn plot_ranges(req: &PlotRequest<'_>) -> (f64, f64) {
    let w = req.window;
    let plane = req.plane;
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
    let x_max = match plane {
        Plane::AngleImpactVelocity => nice_ceil((max_x * 1.2).max(700.0), 100.0),
        Plane::AngleCollisionVelocity => {
            let c0 = w
                .flyer
                .material
                .sound_speed()
                .si()
                .max(w.parent.material.sound_speed().si());
            nice_ceil((max_x * 1.1).clamp(1.4 * c0, 12_000.0), 500.0)
        }
    };
    let y_max = nice_ceil((max_y * 1.15).max(30.0), 5.0).min(85.0);
    (x_max, y_max)
}

/// Classify one point (the jetting test solved directly).
///
/// # Errors
/// A physics error in the window or the point.
pub fn classify_point(window: &PairWindow, vp: f64, beta: f64) -> RenderResult<Classification> {
    let setup = window.setup()?;
    let c = Collision::from_impact(
        window.convention,
        Velocity::from_m_s(vp),
        Angle::from_radians(beta),
    )?;
    Ok(oblique_window::classify::classify(window, &setup, &c)?)
}

fn plot_err<E: std::fmt::Display>(e: E) -> RenderError {
    RenderError::Draw(e.to_string())
}

/// Render the window plot as an SVG string.
///
/// # Errors
/// A physics error in the window, or a drawing error.
pub fn render_svg(req: &PlotRequest<'_>) -> RenderResult<String> {
    render_svg_overlay(req, None)
}

/// The window plot as SVG, with weld-probability contours over it when given.
pub(crate) fn render_svg_overlay(
    req: &PlotRequest<'_>,
    overlay: Option<&contours::Contours>,
) -> RenderResult<String> {
    register_fonts();
    let (x_max, y_max) = plot_ranges(req);
    let field = field::Field::evaluate(req.window, req.plane, x_max, y_max)?;
    let mut svg = String::new();
    let height = draw::draw(
        SVGBackend::with_string(&mut svg, (WIDTH, CANVAS_HEIGHT)).into_drawing_area(),
        req,
        &field,
        (x_max, y_max),
        overlay,
    )?;
    // The picture is cut below the legend (or at the plot's height).
    let svg = svg.replacen(
        &format!("height=\"{CANVAS_HEIGHT}\" viewBox=\"0 0 {WIDTH} {CANVAS_HEIGHT}\""),
        &format!("height=\"{height}\" viewBox=\"0 0 {WIDTH} {height}\""),
        1,
    );
    // User text (labels, names) may hold characters XML forbids: keep the SVG well-formed.
    Ok(oblique_window::present::xml_safe(&svg).into_owned())
}

/// Render the window plot as PNG bytes (for slides): the SVG rasterised with the bundled font.
///
/// # Errors
/// A physics error in the window, or a drawing or encoding error.
pub fn render_png(req: &PlotRequest<'_>) -> RenderResult<Vec<u8>> {
    crate::png::svg_to_png(&render_svg(req)?)
}

/// The text font, bundled (DejaVu Sans, Bitstream Vera licence in assets/) so that plots do not
/// depend on the fonts installed on the machine (plotters measures SVG text with it).
pub fn register_fonts() {
    static ONCE: std::sync::Once = std::sync::Once::new();
    ONCE.call_once(|| {
        let bytes: &'static [u8] = crate::png::FONT;
        // The bundled file is a valid font; a failure would only leave text unmeasured.
        let _ = plotters::style::register_font("sans-serif", FontStyle::Normal, bytes);
    });
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
    use oblique_core::units::Length;
    use oblique_core::Convention;

    fn lib() -> oblique_window::Library {
        oblique_window::Library::load(&[]).expect("library")
    }

    /// A window without trials has no Trials section; each process curve has its own legend
    /// entry and its own colour; point labels carry their verdicts.
    #[test]
    fn legend_sections_only_with_entries_and_one_entry_per_curve() {
        let l = lib();
        let w = l
            .ad_hoc_window(
                "aa6061-t6",
                "cu-c11000",
                Length::from_m(1e-3),
                None,
                Convention::NormalToFlyer,
                None,
            )
            .expect("window");
        let mut req = PlotRequest::new(&w, Plane::AngleImpactVelocity);
        let svg = render_svg(&req).expect("plot");
        // plotters writes each text on a line of its own.
        assert!(!svg.contains("\nTrials"), "an empty Trials section");
        assert!(!svg.contains("\nPoints\n") && !svg.contains("\nProcess curves\n"));
        for (k, v0) in [300.0, 350.0, 400.0].iter().enumerate() {
            req.curves.push(ProcessCurve {
                label: format!("curve number {k}"),
                points: (0..4)
                    .map(|i| (v0 + 40.0 * f64::from(i), 10f64.to_radians(), None))
                    .collect(),
            });
        }
        req.points
            .push(ProposedPoint::new("P1", 450.0, 10f64.to_radians()));
        let svg = render_svg(&req).expect("plot");
        for k in 0..3 {
            assert_eq!(svg.matches(&format!("curve number {k}")).count(), 1, "{k}");
        }
        assert!(svg.contains("\nProcess curves\n") && svg.contains("\nPoints\n"));
        assert!(svg.contains("P1 (inside)"));
        let colours: std::collections::BTreeSet<String> = (0..3)
            .map(|k| {
                let (c, _) = draw::curve_style(k);
                format!("#{:02X}{:02X}{:02X}", c.0, c.1, c.2)
            })
            .collect();
        assert_eq!(colours.len(), 3);
        for c in &colours {
            assert!(svg.contains(c.as_str()), "{c}");
        }
    }

    /// The box (x0, y0, x1, y1) of the label of the point named `name` (the label is the name
    /// alone or the name, a space and more): the halo drawn just before its text.
    fn label_box(svg: &str, name: &str) -> Option<(f64, f64, f64, f64)> {
        let lines: Vec<&str> = svg.lines().collect();
        let k = (2..lines.len()).find(|&k| {
            (lines[k] == name || lines[k].starts_with(&format!("{name} ")))
                && lines[k - 1].starts_with("<text")
        })?;
        let rect = lines[k - 2];
        let attr = |a: &str| -> Option<f64> {
            rect.split(&format!(" {a}=\""))
                .nth(1)?
                .split('"')
                .next()?
                .parse()
                .ok()
        };
        let (x, y) = (attr("x")?, attr("y")?);
        Some((x, y, x + attr("width")?, y + attr("height")?))
    }

    /// The centres of the proposed points' diamonds, in the order of the points.
    fn diamond_centres(svg: &str, n: usize) -> Vec<(f64, f64)> {
        polygons(svg, "#000000")
            .iter()
            .filter(|p| p.len() == 4)
            .map(|p| {
                (
                    p.iter().map(|q| q.0).sum::<f64>() / 4.0,
                    p.iter().map(|q| q.1).sum::<f64>() / 4.0,
                )
            })
            .take(n)
            .collect()
    }

    /// Every point's label sits beside its own marker: its box within 18 px of the marker
    /// (as a boundary's label is within 18 px of its line), and its start, where the point's
    /// name is read, near the marker too. Before, a long label could be set to the left of its
    /// marker with its name some 290 px (250 m/s) away (the layout of the first case).
    #[test]
    fn point_labels_sit_beside_their_markers() {
        let l = lib();
        let w = l
            .pair("demo-al6061-on-cu")
            .expect("demo pair (invented data)");
        let layouts: [&[(f64, f64)]; 4] = [
            &[(382.0, 5.0), (420.0, 85.0)],
            &[(382.0, 5.0), (600.0, 20.0), (450.0, 10.0)],
            &[(450.0, 10.0)],
            &[
                (382.0, 5.0),
                (390.0, 6.0),
                (450.0, 10.0),
                (360.0, 18.0),
                (780.0, 12.0),
            ],
        ];
        for pts in layouts {
            let mut req = PlotRequest::new(w, Plane::AngleImpactVelocity);
            for (i, (v, a)) in pts.iter().enumerate() {
                req.points.push(ProposedPoint::new(
                    format!("P{}", i + 1),
                    *v,
                    a.to_radians(),
                ));
            }
            let svg = render_svg(&req).expect("plot");
            let centres = diamond_centres(&svg, pts.len());
            assert_eq!(centres.len(), pts.len());
            for (i, &(x, y)) in centres.iter().enumerate() {
                let name = format!("P{}", i + 1);
                let (x0, y0, x1, y1) = label_box(&svg, &name).expect("label drawn");
                // Nearest point of the box to the marker's centre.
                let gap = (x0 - x)
                    .max(x - x1)
                    .max(0.0)
                    .hypot((y0 - y).max(y - y1).max(0.0));
                assert!(
                    gap <= 7.0 + 18.0 + 2.0,
                    "{pts:?}: {name} is {gap:.0} px from its marker"
                );
                // Nearer its own marker than any other point's.
                for (j, &(u, v)) in centres.iter().enumerate() {
                    let other = (x0 - u)
                        .max(u - x1)
                        .max(0.0)
                        .hypot((y0 - v).max(v - y1).max(0.0));
                    assert!(
                        j == i || other > gap,
                        "{pts:?}: {name} is nearer P{} ({other:.0} px) than its own marker ({gap:.0} px)",
                        j + 1
                    );
                }
                // Where the label fits to the right of its marker, it starts near it.
                if x + (x1 - x0) < 1100.0 - 300.0 - 30.0 {
                    let start = (x0 - x).hypot(y.clamp(y0, y1) - y);
                    assert!(
                        start <= 7.0 + place::START_NEAR + 24.0,
                        "{pts:?}: {name} starts {start:.0} px from its marker"
                    );
                }
            }
        }
    }

    /// A point where the collision is supersonic in one plate only (the mixed jetting case,
    /// docs/theory.md §4.3) says so in its label, with a legend note naming the pair's rule; a
    /// point outside that regime does not.
    #[test]
    fn a_point_in_the_mixed_jetting_regime_says_so() {
        let l = lib();
        let w = l
            .pair("demo-al6061-on-cu")
            .expect("demo pair (invented data)");
        let c = classify_point(w, 382.0, 5f64.to_radians()).expect("classify");
        assert!(
            c.evaluation.jetting.is_mixed(),
            "the probe point is in the mixed regime"
        );
        let mut req = PlotRequest::new(w, Plane::AngleImpactVelocity);
        req.points
            .push(ProposedPoint::new("P1", 382.0, 5f64.to_radians()));
        let svg = render_svg(&req).expect("plot");
        assert!(
            svg.contains("; jetting: mixed-case rule ~)"),
            "the point's label"
        );
        assert!(
            svg.contains("mixed-case rule (supersonic-side-polar)"),
            "the legend note"
        );
        let mut req = PlotRequest::new(w, Plane::AngleImpactVelocity);
        req.points
            .push(ProposedPoint::new("P1", 450.0, 10f64.to_radians()));
        let svg = render_svg(&req).expect("plot");
        assert!(svg.contains("P1 (inside)") && !svg.contains("mixed-case"));
    }

    /// The polygons of one fill colour in an SVG, in pixels.
    fn polygons(svg: &str, fill: &str) -> Vec<Vec<(f64, f64)>> {
        svg.lines()
            .filter(|l| l.contains("<polygon") && l.contains(&format!("fill=\"{fill}\"")))
            .filter_map(|l| {
                let pts = l.split("points=\"").nth(1)?.split('"').next()?;
                Some(
                    pts.split_whitespace()
                        .filter_map(|p| {
                            let (x, y) = p.split_once(',')?;
                            Some((x.parse().ok()?, y.parse().ok()?))
                        })
                        .collect(),
                )
            })
            .collect()
    }

    /// The non-zero winding number of a closed polygon about `p` (SVG's default fill rule fills
    /// `p` when it is not zero).
    fn winding(poly: &[(f64, f64)], p: (f64, f64)) -> i32 {
        let mut w = 0;
        for i in 0..poly.len() {
            let (a, b) = (poly[i], poly[(i + 1) % poly.len()]);
            let cross = (b.0 - a.0) * (p.1 - a.1) - (p.0 - a.0) * (b.1 - a.1);
            if a.1 <= p.1 && b.1 > p.1 && cross > 0.0 {
                w += 1;
            } else if a.1 > p.1 && b.1 <= p.1 && cross < 0.0 {
                w -= 1;
            }
        }
        w
    }

    /// In the collision-velocity plane the validity domain is an island: the grey fill of what
    /// lies outside it leaves the island clear, so that the weldable region shows. A point well
    /// inside the domain and inside the window (Vc 2500 m/s, beta 12 deg on the demo pair) is
    /// covered by the weldable tint and not by the grey; a point far outside the domain (Vc 9000
    /// m/s, beta 33 deg) is grey. The same holds in the impact-velocity plane. Each point is
    /// located in the SVG by a proposed-point diamond drawn on it.
    #[test]
    fn the_grey_outside_the_validity_domain_leaves_the_domain_clear() {
        let l = lib();
        let w = l
            .pair("demo-al6061-on-cu")
            .expect("demo pair (invented data)");
        let vp_of = |vc: f64, beta_deg: f64| {
            Collision::from_collision_velocity(
                w.convention,
                Velocity::from_m_s(vc),
                Angle::from_degrees(beta_deg),
            )
            .expect("kinematics")
            .impact_velocity
            .si()
        };
        let inside = (vp_of(2500.0, 12.0), 12f64.to_radians());
        let c = classify_point(w, inside.0, inside.1).expect("classify");
        assert!(
            c.inside && c.domain.inside(),
            "the probe point is in the window"
        );
        let outside = (vp_of(9000.0, 33.0), 33f64.to_radians());
        let c = classify_point(w, outside.0, outside.1).expect("classify");
        assert!(!c.domain.inside(), "the far point is outside the domain");
        for plane in [Plane::AngleCollisionVelocity, Plane::AngleImpactVelocity] {
            let mut req = PlotRequest::new(w, plane);
            req.points
                .push(ProposedPoint::new("in", inside.0, inside.1));
            if plane == Plane::AngleCollisionVelocity {
                req.points
                    .push(ProposedPoint::new("far", outside.0, outside.1));
            }
            let svg = render_svg(&req).expect("plot");
            let grey = polygons(&svg, "#D4D4D4");
            assert!(!grey.is_empty(), "{plane:?}: no grey drawn");
            let weldable = polygons(&svg, "#D6E5F4");
            // The black diamonds, in the order of the points (the legend's come after).
            let centres: Vec<(f64, f64)> = polygons(&svg, "#000000")
                .iter()
                .filter(|p| p.len() == 4)
                .map(|p| {
                    let n = p.len() as f64;
                    (
                        p.iter().map(|q| q.0).sum::<f64>() / n,
                        p.iter().map(|q| q.1).sum::<f64>() / n,
                    )
                })
                .take(req.points.len())
                .collect();
            assert_eq!(centres.len(), req.points.len(), "{plane:?}");
            let covered = |polys: &[Vec<(f64, f64)>], p| polys.iter().any(|g| winding(g, p) != 0);
            assert!(
                !covered(&grey, centres[0]),
                "{plane:?}: grey over a point inside the domain"
            );
            assert!(
                covered(&weldable, centres[0]),
                "{plane:?}: the weldable tint misses a point inside the window"
            );
            if let Some(far) = centres.get(1) {
                assert!(
                    covered(&grey, *far),
                    "{plane:?}: no grey outside the domain"
                );
            }
        }
    }
}
