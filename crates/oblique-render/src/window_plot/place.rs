//! Label placement in pixels: each label goes to the first of a ring of positions around its
//! anchor that keeps clear of every marker, every other label and the plot's edges, preferring
//! positions that cross no drawn line. Required labels (proposed points, boundaries) are always
//! placed, at the least crowded position when none is clear; optional ones (process-curve
//! points, shot numbers) are left out when none is clear.

/// A box in pixels: left, top, right, bottom.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rect {
    /// Left.
    pub x0: f64,
    /// Top.
    pub y0: f64,
    /// Right.
    pub x1: f64,
    /// Bottom.
    pub y1: f64,
}

impl Rect {
    /// The box of a marker of radius `r` at `(x, y)`.
    #[must_use]
    pub fn around(x: f64, y: f64, r: f64) -> Self {
        Rect {
            x0: x - r,
            y0: y - r,
            x1: x + r,
            y1: y + r,
        }
    }

    fn overlaps(&self, o: &Rect, gap: f64) -> bool {
        self.x0 < o.x1 + gap && o.x0 < self.x1 + gap && self.y0 < o.y1 + gap && o.y0 < self.y1 + gap
    }

    /// The distance from `p` to the nearest point of the box (0 inside it).
    fn distance_to(&self, p: (f64, f64)) -> f64 {
        let dx = (self.x0 - p.0).max(p.0 - self.x1).max(0.0);
        let dy = (self.y0 - p.1).max(p.1 - self.y1).max(0.0);
        dx.hypot(dy)
    }

    fn contains(&self, p: (f64, f64)) -> bool {
        p.0 >= self.x0 && p.0 <= self.x1 && p.1 >= self.y0 && p.1 <= self.y1
    }

    /// True when the segment a-b passes through the box.
    fn crossed_by(&self, a: (f64, f64), b: (f64, f64)) -> bool {
        if a.0.max(b.0) < self.x0
            || a.0.min(b.0) > self.x1
            || a.1.max(b.1) < self.y0
            || a.1.min(b.1) > self.y1
        {
            return false;
        }
        if self.contains(a) || self.contains(b) {
            return true;
        }
        // Liang-Barsky clipping of the segment against the box.
        let (dx, dy) = (b.0 - a.0, b.1 - a.1);
        let mut t0 = 0.0f64;
        let mut t1 = 1.0f64;
        for (p, q) in [
            (-dx, a.0 - self.x0),
            (dx, self.x1 - a.0),
            (-dy, a.1 - self.y0),
            (dy, self.y1 - a.1),
        ] {
            if p == 0.0 {
                if q < 0.0 {
                    return false;
                }
            } else {
                let t = q / p;
                if p < 0.0 {
                    t0 = t0.max(t);
                } else {
                    t1 = t1.min(t);
                }
                if t0 > t1 {
                    return false;
                }
            }
        }
        true
    }
}

/// The gaps (px beyond the marker) of the rings of positions tried around an anchor.
pub const RINGS: [f64; 5] = [3.0, 9.0, 18.0, 30.0, 45.0];
/// The rings for a label that goes along a line of its own (a user boundary): near the line
/// only, crossing another line under its halo rather than floating away from its own.
pub const NEAR_RINGS: [f64; 3] = [3.0, 9.0, 18.0];

/// How far (px beyond the marker) the start of a point's label may lie from its marker and
/// still count as beside it: the name that begins the label is read there, so a long label
/// set to the left of its marker, its name hundreds of pixels away, is a last resort.
pub const START_NEAR: f64 = 18.0 + 24.0;

/// How crowded a label position is: (outside the area, labels hit, markers hit, nearer another
/// point's marker than its own (point labels only), start far from the marker (point labels
/// only), lines crossed).
type Score = (usize, usize, usize, usize, usize, usize);

/// Where labels may go and what they must avoid.
#[derive(Debug, Clone)]
pub struct Placer {
    /// The plotting area: labels stay inside it.
    pub area: Rect,
    markers: Vec<Rect>,
    /// The centres of the proposed points' markers (also in `markers`).
    points: Vec<(f64, f64)>,
    labels: Vec<Rect>,
    segments: Vec<((f64, f64), (f64, f64))>,
}

/// How much a label must be placed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Need {
    /// Always placed (at the least crowded position if no position is clear).
    Required,
    /// Left out when no position is clear.
    Optional,
}

impl Placer {
    /// A placer for the plotting area `area`.
    #[must_use]
    pub fn new(area: Rect) -> Self {
        Placer {
            area,
            markers: Vec::new(),
            points: Vec::new(),
            labels: Vec::new(),
            segments: Vec::new(),
        }
    }

    /// A marker labels must not cover.
    pub fn add_marker(&mut self, r: Rect) {
        self.markers.push(r);
    }

    /// A proposed point's marker of radius `r` at `at`: labels must not cover it, and a point's
    /// label goes nearer its own marker than any other point's.
    pub fn add_point_marker(&mut self, at: (f64, f64), r: f64) {
        self.markers.push(Rect::around(at.0, at.1, r));
        self.points.push(at);
    }

    /// A drawn polyline labels should not cross.
    pub fn add_line(&mut self, pts: &[(f64, f64)]) {
        for w in pts.windows(2) {
            self.segments.push((w[0], w[1]));
        }
    }

    /// Place a label of `size` (w, h) beside the marker of radius `r` at `anchor`; returns its
    /// top-left corner, or `None` for an optional label with no clear position. The placed box
    /// is remembered.
    pub fn place(
        &mut self,
        anchor: (f64, f64),
        r: f64,
        size: (f64, f64),
        need: Need,
    ) -> Option<(f64, f64)> {
        self.place_near(&[anchor], r, size, need, &RINGS)
    }

    /// Place the label of a point (its name first, then its verdict) beside its marker of
    /// radius `r` at `anchor`: within [`NEAR_RINGS`] of it, crossing a line under its halo
    /// rather than going further, and where the label's start (its name) lies within
    /// [`START_NEAR`] of the marker when any clear position allows (otherwise, e.g. at the
    /// right edge of the plot, the label ends beside the marker). Always placed.
    pub fn place_point(&mut self, anchor: (f64, f64), r: f64, size: (f64, f64)) -> (f64, f64) {
        let at = self.place_scored(&[anchor], r, size, Need::Required, &NEAR_RINGS, true);
        // A required label is always placed (there is always a candidate).
        at.unwrap_or((anchor.0 + r, anchor.1))
    }

    /// As [`Placer::place`], beside any of `anchors` (points of one thing, e.g. the vertices of a
    /// line, in order of preference) at the gaps `rings` (px beyond `r`): nearer positions come
    /// first whichever anchor they are beside, so that the label stays close to its own thing
    /// rather than far from the first anchor. The markers of radius `r` at the anchors
    /// themselves do not count as obstacles.
    pub fn place_near(
        &mut self,
        anchors: &[(f64, f64)],
        r: f64,
        size: (f64, f64),
        need: Need,
        rings: &[f64],
    ) -> Option<(f64, f64)> {
        self.place_scored(anchors, r, size, need, rings, false)
    }

    fn place_scored(
        &mut self,
        anchors: &[(f64, f64)],
        r: f64,
        size: (f64, f64),
        need: Need,
        rings: &[f64],
        start_near: bool,
    ) -> Option<(f64, f64)> {
        let (w, h) = size;
        let mut candidates = Vec::with_capacity(8 * rings.len() * anchors.len());
        for &d in rings {
            let g = r + d;
            for &(x, y) in anchors {
                candidates.extend([
                    (x + g, y - h / 2.0),
                    (x + g * 0.7, y - g * 0.7 - h),
                    (x + g * 0.7, y + g * 0.7),
                    (x - g - w, y - h / 2.0),
                    (x - g * 0.7 - w, y - g * 0.7 - h),
                    (x - g * 0.7 - w, y + g * 0.7),
                    (x - w / 2.0, y - g - h),
                    (x - w / 2.0, y + g),
                ]);
                if start_near {
                    // Above and below, starting at the marker (or as near it as the plot's
                    // right edge allows), and ending at it.
                    let x0 = (x - r).min(self.area.x1 - w).max(self.area.x0);
                    candidates.extend([
                        (x0, y - g - h),
                        (x0, y + g),
                        (x + r - w, y - g - h),
                        (x + r - w, y + g),
                    ]);
                }
            }
        }
        let own: Vec<Rect> = anchors
            .iter()
            .map(|&(x, y)| Rect::around(x, y, r))
            .collect();
        // Score: outside the area, then over another label, then over a marker, then across
        // lines; the first clear position (nearest first) wins.
        let mut best: Option<(Score, (f64, f64))> = None;
        for (cx, cy) in candidates {
            let b = Rect {
                x0: cx,
                y0: cy,
                x1: cx + w,
                y1: cy + h,
            };
            let outside = usize::from(
                b.x0 < self.area.x0
                    || b.x1 > self.area.x1
                    || b.y0 < self.area.y0
                    || b.y1 > self.area.y1,
            );
            let labels = self.labels.iter().filter(|l| l.overlaps(&b, 2.0)).count();
            let markers = self
                .markers
                .iter()
                .filter(|m| !own.contains(m) && m.overlaps(&b, 1.0))
                .count();
            let crossings = self
                .segments
                .iter()
                .filter(|(p, q)| b.crossed_by(*p, *q))
                .count();
            // The label's start (its left edge, level with the anchor where the box allows):
            // how far beyond START_NEAR, in steps of 12 px, so that the nearest start wins
            // when none is near.
            let far = if start_near {
                anchors
                    .iter()
                    .map(|&(x, y)| {
                        let beyond = (b.x0 - x).hypot(y.clamp(b.y0, b.y1) - y) - r - START_NEAR;
                        // Bounded: the plot is at most a few thousand px wide.
                        (beyond / 12.0).ceil().clamp(0.0, 1e4) as usize
                    })
                    .min()
                    .unwrap_or(0)
            } else {
                0
            };
            // Nearer another point's marker than its own: the label would be read as that
            // point's.
            let other = start_near && {
                let own = anchors
                    .iter()
                    .map(|&a| b.distance_to(a))
                    .fold(f64::INFINITY, f64::min);
                self.points
                    .iter()
                    .any(|&q| !anchors.contains(&q) && b.distance_to(q) < own)
            };
            let score = (outside, labels, markers, usize::from(other), far, crossings);
            if score == (0, 0, 0, 0, 0, 0) {
                best = Some((score, (cx, cy)));
                break;
            }
            if best.is_none_or(|(s, _)| score < s) {
                best = Some((score, (cx, cy)));
            }
        }
        let ((outside, labels, markers, _, _, _), at) = best?;
        if (outside + labels + markers) > 0 && need == Need::Optional {
            return None;
        }
        self.labels.push(Rect {
            x0: at.0,
            y0: at.1,
            x1: at.0 + w,
            y1: at.1 + h,
        });
        Some(at)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn area() -> Rect {
        Rect {
            x0: 0.0,
            y0: 0.0,
            x1: 400.0,
            y1: 300.0,
        }
    }

    #[test]
    fn labels_avoid_markers_lines_and_each_other() {
        let mut p = Placer::new(area());
        // A row of markers 12 px apart and a line through the middle of the area.
        for k in 0..10 {
            p.add_marker(Rect::around(100.0 + 12.0 * f64::from(k), 150.0, 4.0));
        }
        p.add_line(&[(0.0, 120.0), (400.0, 120.0)]);
        let mut boxes = Vec::new();
        for k in 0..10 {
            let a = (100.0 + 12.0 * f64::from(k), 150.0);
            if let Some(at) = p.place(a, 4.0, (40.0, 12.0), Need::Optional) {
                boxes.push(Rect {
                    x0: at.0,
                    y0: at.1,
                    x1: at.0 + 40.0,
                    y1: at.1 + 12.0,
                });
            }
        }
        assert!(!boxes.is_empty());
        for (i, a) in boxes.iter().enumerate() {
            for b in &boxes[i + 1..] {
                assert!(!a.overlaps(b, 0.0), "{a:?} {b:?}");
            }
            for k in 0..10 {
                let m = Rect::around(100.0 + 12.0 * f64::from(k), 150.0, 4.0);
                assert!(!a.overlaps(&m, 0.0));
            }
            assert!(!a.crossed_by((0.0, 120.0), (400.0, 120.0)));
        }
    }

    #[test]
    fn a_required_label_is_always_placed_inside_the_area() {
        let mut p = Placer::new(area());
        for k in 0..40 {
            p.add_marker(Rect::around(10.0 * f64::from(k), 295.0, 5.0));
        }
        let at = p
            .place((395.0, 295.0), 5.0, (60.0, 12.0), Need::Required)
            .expect("placed");
        assert!(at.0 >= 0.0 && at.0 + 60.0 <= 400.0 && at.1 >= 0.0 && at.1 + 12.0 <= 300.0);
    }

    /// Along a line, a label goes to the nearest clear position beside any of its points, not
    /// far from the first point: here the first point is boxed in by markers, the second is
    /// clear.
    #[test]
    fn a_label_along_a_line_goes_beside_the_nearest_clear_point() {
        let mut p = Placer::new(area());
        for dx in [-30.0, -15.0, 0.0, 15.0, 30.0] {
            for dy in [-30.0, -15.0, 0.0, 15.0, 30.0] {
                if dx != 0.0 || dy != 0.0 {
                    p.add_marker(Rect::around(100.0 + dx, 100.0 + dy, 6.0));
                }
            }
        }
        let at = p
            .place_near(
                &[(100.0, 100.0), (300.0, 200.0)],
                3.0,
                (40.0, 12.0),
                Need::Required,
                &NEAR_RINGS,
            )
            .expect("placed");
        let d = ((at.0 - 300.0).powi(2) + (at.1 + 6.0 - 200.0).powi(2)).sqrt();
        assert!(
            d < 3.0 + 18.0 + 40.0,
            "{at:?} is {d:.0} px from the clear point"
        );
    }

    #[test]
    fn segment_crossing() {
        let r = Rect {
            x0: 0.0,
            y0: 0.0,
            x1: 10.0,
            y1: 10.0,
        };
        assert!(r.crossed_by((-5.0, 5.0), (15.0, 5.0)));
        assert!(!r.crossed_by((-5.0, 15.0), (15.0, 12.0)));
        assert!(r.crossed_by((-5.0, -5.0), (15.0, 15.0)));
        assert!(!r.crossed_by((-5.0, 6.0), (4.0, 15.0)) || r.contains((0.5, 10.0)));
    }
}
