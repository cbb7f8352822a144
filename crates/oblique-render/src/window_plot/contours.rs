//! The probability contours a window plot can carry (computed by `crate::probability`, drawn
//! by `draw`): a type of the plot, so that the plot needs nothing of the computation.

use oblique_confidence::ProbabilityGrid;

/// A polyline in the plot's coordinates (velocity m/s, angle deg).
pub type Polyline = Vec<(f64, f64)>;

/// The grid and its contour lines, in the plot's coordinates.
#[derive(Debug, Clone)]
pub struct Contours {
    /// The probability grid (typed, for reports and tests).
    pub grid: ProbabilityGrid,
    /// Per level: the level and its polylines (velocity m/s, angle deg).
    pub lines: Vec<(f64, Vec<Polyline>)>,
}
