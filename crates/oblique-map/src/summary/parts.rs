//! The summary's building blocks: runs along the interface, the strip plot's samples and exact
//! verdict lengths by position, and the window plot's histogram.

/// Verdicts a point can have, in `Prediction::ALL` order: welded, not welded, melted, head-on,
/// outside the validity domain.
pub const N_VERDICTS: usize = 5;

/// A run of points with one welded/unwelded state.
#[derive(Debug, Clone, Copy)]
pub struct Run {
    /// 0 welded, 1 unwelded.
    pub verdict: u8,
    /// Start position, m (file order).
    pub start: f64,
    /// End position, m.
    pub end: f64,
    /// First and last row.
    pub first_row: u64,
    /// See `first_row`.
    pub last_row: u64,
    /// Points in the run.
    pub points: u64,
    /// Points per verdict (an unwelded segment may mix not-welded, melted, head-on and
    /// outside-domain points).
    pub by_verdict: [u64; N_VERDICTS],
    /// Length per verdict owned by the points before the run's start, m (the summary's
    /// running total when the run began): with `cum_end`, what lies before and after a
    /// welded segment.
    pub cum_start: [f64; N_VERDICTS],
    /// The same when the run ended.
    pub cum_end: [f64; N_VERDICTS],
}

/// A sample for the strip plot.
#[derive(Debug, Clone, Copy)]
pub struct Sample {
    /// Position, m.
    pub pos: f64,
    /// Impact velocity, m/s.
    pub vp: f32,
    /// Angle, deg.
    pub beta: f32,
}

/// Length per verdict along the interface in `COLS` equal columns from the first position,
/// exact whatever the number of points: the column width doubles (merging neighbours) whenever
/// the interface grows past the last column. Feeds the strip plot.
#[derive(Debug, Clone)]
pub struct StripAcc {
    /// First position, m.
    pub origin: f64,
    /// +1 or -1 once known.
    pub dir: f64,
    /// Column width, m (0 until the first interval of non-zero length).
    pub width: f64,
    /// Length per verdict in each column, m.
    pub cols: Vec<[f64; N_VERDICTS]>,
}

impl StripAcc {
    /// Columns kept.
    pub const COLS: usize = 4096;

    pub(super) fn new(origin: f64) -> Self {
        Self {
            origin,
            dir: 0.0,
            width: 0.0,
            cols: vec![[0.0; N_VERDICTS]; Self::COLS],
        }
    }

    /// Add the interval between positions `a` and `b` (file order) with a verdict.
    pub(super) fn add(&mut self, a: f64, b: f64, verdict: usize) {
        if a == b {
            return;
        }
        if self.dir == 0.0 {
            self.dir = (b - a).signum();
        }
        let da = (a - self.origin) * self.dir;
        let db = (b - self.origin) * self.dir;
        if self.width == 0.0 {
            self.width = (db - da).abs().max(f64::MIN_POSITIVE) / 4.0;
        }
        while db.max(da) > self.width * Self::COLS as f64 {
            for i in 0..Self::COLS / 2 {
                let (l, r) = (self.cols[2 * i], self.cols[2 * i + 1]);
                self.cols[i] = std::array::from_fn(|v| l[v] + r[v]);
            }
            for c in &mut self.cols[Self::COLS / 2..] {
                *c = [0.0; N_VERDICTS];
            }
            self.width *= 2.0;
        }
        let (lo, hi) = if da <= db { (da, db) } else { (db, da) };
        let last = Self::COLS - 1;
        let i0 = ((lo / self.width).floor().max(0.0) as usize).min(last);
        let i1 = ((hi / self.width).floor().max(0.0) as usize).min(last);
        for i in i0..=i1 {
            let c0 = i as f64 * self.width;
            let overlap = (hi.min(c0 + self.width) - lo.max(c0)).max(0.0);
            self.cols[i][verdict] += overlap;
        }
    }
}

/// Exact 2-D histogram over (Vp, beta): beta in 0.25 deg bins over (0, 90); Vp bins start at
/// 2 m/s wide and double (merging pairs) whenever a point falls beyond the last bin.
#[derive(Debug, Clone)]
pub struct Histogram {
    /// Vp bin width, m/s.
    pub dv: f64,
    /// Counts, `[iv * NB + ib]`.
    pub counts: Vec<u64>,
}

impl Histogram {
    /// Vp bins.
    pub const NV: usize = 512;
    /// Angle bins.
    pub const NB: usize = 360;
    /// Angle bin width, deg.
    pub const DB: f64 = 0.25;

    pub(super) fn new() -> Self {
        Self {
            dv: 2.0,
            counts: vec![0; Self::NV * Self::NB],
        }
    }

    pub(super) fn add(&mut self, vp: f64, beta: f64) {
        while vp >= self.dv * Self::NV as f64 {
            let mut merged = vec![0u64; Self::NV * Self::NB];
            for iv in 0..Self::NV {
                for ib in 0..Self::NB {
                    merged[(iv / 2) * Self::NB + ib] += self.counts[iv * Self::NB + ib];
                }
            }
            self.counts = merged;
            self.dv *= 2.0;
        }
        let iv = ((vp / self.dv) as usize).min(Self::NV - 1);
        let ib = ((beta / Self::DB) as usize).min(Self::NB - 1);
        self.counts[iv * Self::NB + ib] += 1;
    }
}
