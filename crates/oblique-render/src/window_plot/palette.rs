//! The colours the window plot and its legend share (the legend draws the same marks as the
//! plot, so both take them from here).

use plotters::style::RGBColor;

/// Inside the window: every active limit holds.
pub(super) const REGION: RGBColor = RGBColor(214, 229, 244);
/// Predicted welded (model limits and the boundaries that span the point), but where some user
/// boundary does not span (outside the trial data).
pub(super) const REGION_UNTRIED: RGBColor = RGBColor(224, 229, 235);
/// Trial markers by outcome.
pub(super) const C_WELDED: RGBColor = RGBColor(27, 79, 138);
pub(super) const C_NOT: RGBColor = RGBColor(224, 138, 0);
pub(super) const C_PARTIAL: RGBColor = RGBColor(123, 50, 148);
pub(super) const C_MELTED: RGBColor = RGBColor(165, 15, 21);
/// Informational lines (wavy transition).
pub(super) const C_INFO: RGBColor = RGBColor(120, 120, 120);
