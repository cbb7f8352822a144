//! The window evaluated on a grid of the plot's plane, and its limits traced at sub-grid
//! resolution: marching squares find the grid edges where a limit's margin (or the verdict)
//! changes sign, and each crossing is then located on its edge by bisection of the real
//! criterion, not by interpolating the grid values. Curves and the tinted regions therefore follow
//! the limits themselves (also where a margin jumps, as the jetting limit does at the sonic
//! line), without stair steps.

use super::{collision_at, criterion_enabled};
use crate::error::RenderResult;
use oblique_core::{CriterionId, PairSetup};
use oblique_window::boundary::Plane;
use oblique_window::classify::classify_with_jetting;
use oblique_window::PairWindow;
use std::collections::HashMap;

/// Grid nodes across (velocity) and up (angle).
pub(super) const NX: usize = 150;
/// See [`NX`].
pub(super) const NY: usize = 110;
/// Bisection steps that place a crossing on its grid edge (1/1024 of a cell).
const REFINE_STEPS: usize = 10;

/// A point of the plot's plane: (velocity in the plane's unit, angle in degrees).
pub(super) type P = (f64, f64);

/// The grid of the plane and what the window says at each node.
pub(super) struct Field<'a> {
    window: &'a PairWindow,
    setup: PairSetup,
    plane: Plane,
    pub(super) xs: Vec<f64>,
    pub(super) ys: Vec<f64>,
    /// 0 outside, 1 inside, 2 inside but outside the trial data (a boundary does not span it),
    /// 255 not a physical point.
    region: Vec<u8>,
    /// Every enabled criterion's margin at each node (NaN where not physical).
    margins: Vec<(CriterionId, Vec<f64>)>,
    sonic_parent: Vec<f64>,
    sonic_flyer: Vec<f64>,
    /// How far inside the validity domain (`ValidityDomain::margin`, its sign set by the
    /// classification's own domain test: positive inside), NaN where not physical.
    domain: Vec<f64>,
}

/// What a node or a probe point says.
#[derive(Clone, Copy)]
enum Probe {
    Region,
    Tried,
    /// Outside the validity domain (positive outside).
    OutsideDomain,
    Criterion(CriterionId),
    SonicParent,
    SonicFlyer,
}

impl<'a> Field<'a> {
    /// Evaluate the window on the grid of `[0, x_max] x [0, y_max]` (the nodes on the lower and
    /// left edges sit just inside, where the kinematics are defined).
    pub(super) fn evaluate(
        window: &'a PairWindow,
        plane: Plane,
        x_max: f64,
        y_max: f64,
    ) -> RenderResult<Self> {
        let setup = window.setup()?;
        let node = |k: usize, n: usize, max: f64| max * (k as f64).max(0.002) / n as f64;
        let xs: Vec<f64> = (0..=NX).map(|i| node(i, NX, x_max)).collect();
        let ys: Vec<f64> = (0..=NY).map(|j| node(j, NY, y_max)).collect();
        let ids: Vec<CriterionId> = CriterionId::ALL
            .into_iter()
            .filter(|id| criterion_enabled(window, *id))
            .collect();
        let n = xs.len() * ys.len();
        let mut f = Field {
            window,
            setup,
            plane,
            margins: ids.iter().map(|id| (*id, vec![f64::NAN; n])).collect(),
            region: vec![255; n],
            sonic_parent: vec![f64::NAN; n],
            sonic_flyer: vec![f64::NAN; n],
            domain: vec![f64::NAN; n],
            xs,
            ys,
        };
        for j in 0..f.ys.len() {
            for i in 0..f.xs.len() {
                let k = j * f.xs.len() + i;
                let Some(e) = f.classify(f.xs[i], f.ys[j])? else {
                    continue;
                };
                f.region[k] = e.0;
                f.sonic_parent[k] = e.1;
                f.sonic_flyer[k] = e.2;
                f.domain[k] = f.domain_value(f.xs[i], f.ys[j], &e.3);
                for (id, m) in &mut f.margins {
                    if let Some(r) = e.3.evaluation.criterion(*id) {
                        m[k] = r.margin;
                    }
                }
            }
        }
        Ok(f)
    }

    /// Region code, sonic margins and the classification at a point (`None` off the physical
    /// plane).
    #[allow(clippy::type_complexity)]
    fn classify(
        &self,
        x: f64,
        y: f64,
    ) -> RenderResult<Option<(u8, f64, f64, oblique_window::Classification)>> {
        if y >= 90.0 {
            return Ok(None);
        }
        let Some(col) = collision_at(self.window, self.plane, x, y) else {
            return Ok(None);
        };
        let jet = oblique_core::jetting::critical_angle(
            &self.setup.flyer.hugoniot,
            &self.setup.parent.hugoniot,
            col.flow_velocity,
            col.collision_velocity,
            self.window.criteria.mixed_jetting,
        )?;
        let c = classify_with_jetting(self.window, &self.setup, &col, jet)?;
        let code = match (c.inside, c.outside_trial_data) {
            (false, _) => 0,
            (true, false) => 1,
            (true, true) => 2,
        };
        let sp = col.collision_velocity.si() / self.setup.parent.sound_speed().si() - 1.0;
        let sf = col.flow_velocity.si() / self.setup.flyer.sound_speed().si() - 1.0;
        Ok(Some((code, sp, sf, c)))
    }

    /// The validity domain's margin at a point, positive inside (the classification decides the
    /// sign, so the drawn edge agrees with the verdicts).
    fn domain_value(&self, x: f64, y: f64, c: &oblique_window::Classification) -> f64 {
        let Some(col) = collision_at(self.window, self.plane, x, y) else {
            return f64::NAN;
        };
        let m = self
            .window
            .domain
            .margin(&self.setup, &col)
            .abs()
            .max(1e-12);
        if c.domain.inside() {
            m
        } else {
            -m
        }
    }

    /// True when some node lies outside the validity domain.
    pub(super) fn has_outside_domain(&self) -> bool {
        self.domain.iter().any(|d| *d < 0.0)
    }

    /// The regions outside the validity domain, as closed polygons.
    pub(super) fn outside_domain_outlines(&self) -> Vec<Vec<P>> {
        let values: Vec<f64> = self.domain.iter().map(|d| -d).collect();
        fill_polygons(self.trace(&values, Probe::OutsideDomain, true))
    }

    /// The validity domain's edge, as lines.
    pub(super) fn domain_edge(&self) -> Vec<Vec<P>> {
        let values: Vec<f64> = self.domain.iter().map(|d| -d).collect();
        self.trace(&values, Probe::OutsideDomain, false)
    }

    /// The sign-carrying value of `probe` at a point off the grid (`None` where not physical).
    fn probe(&self, probe: Probe, x: f64, y: f64) -> Option<f64> {
        if let Probe::SonicParent | Probe::SonicFlyer = probe {
            let col = collision_at(self.window, self.plane, x, y)?;
            return Some(match probe {
                Probe::SonicParent => {
                    col.collision_velocity.si() / self.setup.parent.sound_speed().si() - 1.0
                }
                _ => col.flow_velocity.si() / self.setup.flyer.sound_speed().si() - 1.0,
            });
        }
        if let Probe::Criterion(id) = probe {
            if id != CriterionId::Jetting {
                // The other criteria do not use the jetting assessment: skip its solve.
                let col = collision_at(self.window, self.plane, x, y)?;
                let jet = oblique_core::jetting::JettingAssessment::any_angle(
                    oblique_core::jetting::JettingRegime::SubsonicParent,
                    false,
                    false,
                );
                let e = oblique_core::evaluate_with_jetting(
                    &self.setup,
                    &col,
                    &self.window.criteria,
                    jet,
                )
                .ok()?;
                return e.criterion(id).map(|r| r.margin);
            }
        }
        let (code, _, _, c) = self.classify(x, y).ok()??;
        Some(match probe {
            Probe::Region => inside_value(code),
            Probe::Tried => tried_value(code),
            Probe::OutsideDomain => -self.domain_value(x, y, &c),
            Probe::Criterion(id) => c.evaluation.criterion(id)?.margin,
            Probe::SonicParent | Probe::SonicFlyer => unreachable!("handled above"),
        })
    }

    /// True when some node is inside the window but outside the trial data.
    pub(super) fn has_untried(&self) -> bool {
        self.region.contains(&2)
    }

    /// The criteria drawn, in their order, each with its traced zero lines.
    pub(super) fn criterion_lines(&self) -> Vec<(CriterionId, Vec<Vec<P>>)> {
        self.margins
            .iter()
            .map(|(id, m)| (*id, self.trace(m, Probe::Criterion(*id), false)))
            .collect()
    }

    /// The sonic lines: Vc = C0 of the parent, Vf = C0 of the flyer.
    pub(super) fn sonic_lines(&self) -> [Vec<Vec<P>>; 2] {
        [
            self.trace(&self.sonic_parent, Probe::SonicParent, false),
            self.trace(&self.sonic_flyer, Probe::SonicFlyer, false),
        ]
    }

    /// The outlines of the region inside the window (every limit holds, `tried == false`), or of
    /// the part of it inside the trial data too (`tried == true`): closed polygons.
    pub(super) fn region_outlines(&self, tried: bool) -> Vec<Vec<P>> {
        let values: Vec<f64> = self
            .region
            .iter()
            .map(|&c| {
                if tried {
                    tried_value(c)
                } else {
                    inside_value(c)
                }
            })
            .collect();
        let probe = if tried { Probe::Tried } else { Probe::Region };
        fill_polygons(self.trace(&values, probe, true))
    }

    /// Zero lines of a node field, each crossing bisected on `probe` (see [`trace_field`]).
    fn trace(&self, values: &[f64], probe: Probe, closed: bool) -> Vec<Vec<P>> {
        trace_field(
            &self.xs,
            &self.ys,
            values,
            &|x, y| self.probe(probe, x, y),
            closed,
        )
    }
}

/// Zero lines of a node field (`values[j * xs.len() + i]` at `(xs[i], ys[j])`, NaN where not
/// defined) by marching squares, each crossing located on its grid edge by bisection of
/// `probe` (the sign of the real function there, `None` where it is not defined) rather than
/// by interpolating the grid values. With `closed`, the grid is surrounded by a ring of
/// negative nodes on its own edges, so that every line of the region `values >= 0` closes into
/// a polygon.
pub(crate) fn trace_field(
    xs: &[f64],
    ys: &[f64],
    values: &[f64],
    probe: &dyn Fn(f64, f64) -> Option<f64>,
    closed: bool,
) -> Vec<Vec<P>> {
    let (nx, ny) = (xs.len(), ys.len());
    // The (optionally padded) grid: pad nodes sit on the grid's edges.
    let pad = usize::from(closed);
    let (gx, gy) = (nx + 2 * pad, ny + 2 * pad);
    let (x_lo, x_hi) = (xs[0].min(0.0), xs[nx - 1]);
    let (y_lo, y_hi) = (ys[0].min(0.0), ys[ny - 1]);
    let pos = |i: usize, j: usize| -> (P, bool) {
        let real = i >= pad && i < nx + pad && j >= pad && j < ny + pad;
        let x = if i < pad {
            x_lo
        } else if i >= nx + pad {
            x_hi
        } else {
            xs[i - pad]
        };
        let y = if j < pad {
            y_lo
        } else if j >= ny + pad {
            y_hi
        } else {
            ys[j - pad]
        };
        ((x, y), real)
    };
    let val = |i: usize, j: usize| -> f64 {
        match pos(i, j) {
            (_, true) => values[(j - pad) * nx + (i - pad)],
            _ => -1.0,
        }
    };
    let mut crossings: HashMap<(usize, usize), P> = HashMap::new();
    let mut segs: Vec<(P, P)> = Vec::new();
    for j in 0..gy.saturating_sub(1) {
        for i in 0..gx.saturating_sub(1) {
            let corners = [(i, j), (i + 1, j), (i + 1, j + 1), (i, j + 1)];
            let vals = corners.map(|(a, b)| val(a, b));
            if vals.iter().any(|v| !v.is_finite()) {
                continue;
            }
            let mut pts = Vec::with_capacity(4);
            for e in 0..4 {
                let (a, b) = (corners[e], corners[(e + 1) % 4]);
                let (va, vb) = (vals[e], vals[(e + 1) % 4]);
                if (va < 0.0) == (vb < 0.0) {
                    continue;
                }
                // One crossing per edge, whichever cell asks first (so both cells of an
                // edge share the exact point and the lines chain).
                let (lo, hi) = if (a.1, a.0) < (b.1, b.0) {
                    (a, b)
                } else {
                    (b, a)
                };
                let key = (lo.1 * gx + lo.0, hi.1 * gx + hi.0);
                let p = *crossings.entry(key).or_insert_with(|| {
                    let ((pa, ra), (pb, rb)) = (pos(lo.0, lo.1), pos(hi.0, hi.1));
                    match (ra, rb) {
                        (true, true) => refine(probe, pa, pb, val(lo.0, lo.1) >= 0.0),
                        (false, _) => pa,
                        (_, false) => pb,
                    }
                });
                pts.push(p);
            }
            match pts.len() {
                2 => segs.push((pts[0], pts[1])),
                4 => {
                    segs.push((pts[0], pts[1]));
                    segs.push((pts[2], pts[3]));
                }
                _ => {}
            }
        }
    }
    chain(segs)
}

/// The closed outlines of a region, as traced (outer edges and the edges of its holes, in no
/// particular order or orientation), joined into one polygon that fills the region itself under
/// the non-zero fill rule (SVG's default): each outline is turned counter-clockwise when it lies
/// inside an even number of the others (an outer edge) and clockwise when inside an odd number
/// (the edge of a hole), and each is reached from the first along a cut travelled there and
/// back, which adds nothing to any point's winding number. Drawn one by one, the outlines of a
/// ring (the region outside an island, as the validity domain is in the collision-velocity
/// plane) would each be filled whole and cover the island too. Outlines without area are
/// dropped.
pub(crate) fn fill_polygons(loops: Vec<Vec<P>>) -> Vec<Vec<P>> {
    let mut loops: Vec<Vec<P>> = loops
        .into_iter()
        .filter(|l| l.len() >= 3 && signed_area(l).abs() > 0.0)
        .collect();
    if loops.is_empty() {
        return loops;
    }
    let depths: Vec<usize> = (0..loops.len())
        .map(|i| {
            let at = loops[i][0];
            (0..loops.len())
                .filter(|&j| j != i && contains(&loops[j], at))
                .count()
        })
        .collect();
    for (l, d) in loops.iter_mut().zip(&depths) {
        if (signed_area(l) > 0.0) != (d % 2 == 0) {
            l.reverse();
        }
    }
    let mut loops = loops.into_iter();
    let mut out = loops.next().unwrap_or_default();
    let hub = out[0];
    close(&mut out);
    for l in loops {
        out.extend_from_slice(&l);
        out.push(l[0]);
        out.push(hub);
    }
    vec![out]
}

/// Make a polyline end where it starts.
fn close(l: &mut Vec<P>) {
    if let (Some(a), Some(b)) = (l.first().copied(), l.last().copied()) {
        if a != b {
            l.push(a);
        }
    }
}

/// The signed area of a polygon (positive counter-clockwise, y up).
fn signed_area(l: &[P]) -> f64 {
    let n = l.len();
    0.5 * (0..n)
        .map(|i| {
            let (a, b) = (l[i], l[(i + 1) % n]);
            a.0 * b.1 - b.0 * a.1
        })
        .sum::<f64>()
}

/// Whether `p` lies inside the polygon `l` (even-odd ray test).
fn contains(l: &[P], p: P) -> bool {
    let n = l.len();
    let mut inside = false;
    for i in 0..n {
        let (a, b) = (l[i], l[(i + 1) % n]);
        if (a.1 > p.1) != (b.1 > p.1) && p.0 < a.0 + (p.1 - a.1) * (b.0 - a.0) / (b.1 - a.1) {
            inside = !inside;
        }
    }
    inside
}

/// The sign change of `probe` between `a` (sign `a_pos`) and `b`, by bisection.
fn refine(probe: &dyn Fn(f64, f64) -> Option<f64>, a: P, b: P, a_pos: bool) -> P {
    let (mut a, mut b) = (a, b);
    for _ in 0..REFINE_STEPS {
        let m = (0.5 * (a.0 + b.0), 0.5 * (a.1 + b.1));
        match probe(m.0, m.1) {
            Some(v) if (v >= 0.0) == a_pos => a = m,
            Some(_) => b = m,
            None => break,
        }
    }
    (0.5 * (a.0 + b.0), 0.5 * (a.1 + b.1))
}

fn inside_value(code: u8) -> f64 {
    match code {
        1 | 2 => 1.0,
        0 => -1.0,
        _ => f64::NAN,
    }
}

fn tried_value(code: u8) -> f64 {
    match code {
        1 => 1.0,
        0 | 2 => -1.0,
        _ => f64::NAN,
    }
}

/// Join segments that share end points into polylines (keeps the SVG small).
pub(super) fn chain(segs: Vec<(P, P)>) -> Vec<Vec<P>> {
    let key = |p: P| ((p.0 * 1e6).round() as i64, (p.1 * 1e6).round() as i64);
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
        let mut line = std::collections::VecDeque::from([segs[start].0, segs[start].1]);
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
                    line.push_back(other);
                } else {
                    line.push_front(other);
                }
            }
        }
        out.push(line.into_iter().collect());
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn chained_segments_form_one_line() {
        let segs = vec![
            ((1.0, 0.0), (2.0, 0.0)),
            ((0.0, 0.0), (1.0, 0.0)),
            ((2.0, 0.0), (3.0, 1.0)),
        ];
        let lines = chain(segs);
        assert_eq!(lines.len(), 1);
        assert_eq!(lines[0].len(), 4);
    }

    /// The demo window's traced limits lie on the limits: at every traced point of the strength
    /// limit (a vertical line at sqrt(UTS/rho) in the velocity plane), the margin is zero to far
    /// below a grid cell, and the lines are not stair steps (the strength line is one straight
    /// segment in x).
    #[test]
    fn traced_limits_are_on_the_limits() {
        let lib = oblique_window::Library::load(&[]).expect("library");
        let w = lib.pair("demo-al6061-on-cu").expect("demo");
        let f = Field::evaluate(w, Plane::AngleImpactVelocity, 800.0, 35.0).expect("field");
        let cell = 800.0 / NX as f64;
        let lines = f.criterion_lines();
        let (_, strength) = lines
            .iter()
            .find(|(id, _)| *id == CriterionId::StrengthLower)
            .expect("strength line");
        let xs: Vec<f64> = strength.iter().flatten().map(|p| p.0).collect();
        let spread = xs.iter().copied().fold(f64::MIN, f64::max)
            - xs.iter().copied().fold(f64::MAX, f64::min);
        assert!(
            spread < cell / 100.0,
            "spread {spread} against a cell of {cell}"
        );
        // The region's outline is closed.
        for poly in f.region_outlines(false) {
            let (a, b) = (poly[0], poly[poly.len() - 1]);
            assert!((a.0 - b.0).abs() < 1e-9 && (a.1 - b.1).abs() < 1e-9);
        }
    }
}

#[cfg(test)]
mod domain_tests {
    use super::*;

    /// The validity domain is drawn (issue 14): some of the demo plot lies outside it, nothing
    /// inside the window does, and the plot says so in its legend.
    #[test]
    fn nothing_inside_the_window_lies_outside_the_validity_domain() {
        let lib = oblique_window::Library::load(&[]).expect("built-in library");
        let w = lib
            .pair("demo-al6061-on-cu")
            .expect("demo pair (invented data)");
        let f = Field::evaluate(w, Plane::AngleImpactVelocity, 900.0, 35.0).expect("field");
        assert!(f.has_outside_domain());
        for (k, r) in f.region.iter().enumerate() {
            if *r != 0 && *r != 255 {
                assert!(
                    f.domain[k] > 0.0,
                    "node {k} inside the window, outside the domain"
                );
            }
        }
        assert!(!f.outside_domain_outlines().is_empty());
        let req = crate::window_plot::PlotRequest::new(w, Plane::AngleImpactVelocity);
        let svg = crate::window_plot::render_svg(&req).expect("draws");
        assert!(svg.contains("outside the validity domain"));
    }
}
