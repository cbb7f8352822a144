//! clap value parsers for quantities with explicit units.

use oblique_core::units::{parse_quantity, QuantityKind};

macro_rules! parser {
    ($name:ident, $kind:expr) => {
        /// Parse a flag value of this kind (SI result).
        pub fn $name(s: &str) -> Result<f64, String> {
            parse_quantity(s, $kind).map_err(|e| e.to_string())
        }
    };
}

parser!(velocity, QuantityKind::Velocity);
parser!(length, QuantityKind::Length);
parser!(capacitance, QuantityKind::Capacitance);
parser!(voltage, QuantityKind::Voltage);
parser!(inductance, QuantityKind::Inductance);
parser!(resistance, QuantityKind::Resistance);
parser!(energy, QuantityKind::Energy);
parser!(frequency, QuantityKind::Frequency);

/// The range of every velocity flag (m/s): below 1 mm/s nothing collides, above 100 km/s no
/// launcher reaches (common practice bounds; the physics is not evaluated outside them).
pub const VELOCITY_RANGE_M_S: (f64, f64) = (1e-3, 1e5);
/// The smallest collision angle computed (deg); smaller angles are numerically head-on.
pub const MIN_ANGLE_DEG: f64 = 1e-6;
/// The range of every length flag (m): 1 nm to 100 m.
pub const LENGTH_RANGE_M: (f64, f64) = (1e-9, 100.0);
/// The largest pure number a flag takes (ratios, multiples).
pub const MAX_NUMBER: f64 = 1e6;

/// A collision angle: strictly between 0 and 90 deg.
pub fn angle(s: &str) -> Result<f64, String> {
    let rad = parse_quantity(s, QuantityKind::Angle).map_err(|e| e.to_string())?;
    let deg = rad.to_degrees();
    if deg > 0.0 && deg < MIN_ANGLE_DEG {
        return Err(format!(
            "collision angle {deg:.3e} deg is below {MIN_ANGLE_DEG:e} deg: numerically a head-on impact, which no oblique relation covers"
        ));
    }
    if deg > 0.0 && deg < 90.0 {
        Ok(rad)
    } else {
        Err(format!(
            "collision angle {deg:.3} deg is outside (0, 90) deg"
        ))
    }
}

/// A collision angle that may be head-on: from 0 (a head-on impact, below [`MIN_ANGLE_DEG`]
/// numerically so) to below 90 deg. `check` gives a head-on impact its own verdict.
pub fn angle_or_head_on(s: &str) -> Result<f64, String> {
    let rad = parse_quantity(s, QuantityKind::Angle).map_err(|e| e.to_string())?;
    let deg = rad.to_degrees();
    if (0.0..90.0).contains(&deg) {
        Ok(rad)
    } else {
        Err(format!(
            "collision angle {deg:.3} deg is outside [0, 90) deg (0 is a head-on impact)"
        ))
    }
}

/// Whether an angle (rad) from [`angle_or_head_on`] is a head-on impact: below
/// [`MIN_ANGLE_DEG`], where no oblique relation covers it.
pub fn is_head_on(rad: f64) -> bool {
    rad.to_degrees() < MIN_ANGLE_DEG
}

/// An angle that may be zero (preset angles).
pub fn angle_or_zero(s: &str) -> Result<f64, String> {
    let rad = parse_quantity(s, QuantityKind::Angle).map_err(|e| e.to_string())?;
    let deg = rad.to_degrees();
    if (0.0..90.0).contains(&deg) {
        Ok(rad)
    } else {
        Err(format!("angle {deg:.3} deg is outside [0, 90) deg"))
    }
}

/// A strictly positive velocity within [`VELOCITY_RANGE_M_S`].
pub fn positive_velocity(s: &str) -> Result<f64, String> {
    let v = positive(velocity(s)?, "velocity")?;
    within(
        v,
        VELOCITY_RANGE_M_S,
        "velocity",
        "m/s",
        "1 mm/s to 100 km/s",
    )
}

/// A strictly positive length within [`LENGTH_RANGE_M`].
pub fn positive_length(s: &str) -> Result<f64, String> {
    let v = positive(length(s)?, "length")?;
    within(v, LENGTH_RANGE_M, "length", "m", "1 nm to 100 m")
}

/// A strictly positive pure number, at most [`MAX_NUMBER`].
pub fn positive_number(s: &str) -> Result<f64, String> {
    let v = parse_quantity(s, QuantityKind::Dimensionless).map_err(|e| e.to_string())?;
    let v = positive(v, "number")?;
    within(v, (0.0, MAX_NUMBER), "number", "", "up to 1e6")
}

/// A criterion constant: above zero and at most `max` (beyond it the window is empty or the
/// relation meaningless; the published ranges are in docs/theory.md).
pub fn constant(s: &str, max: f64) -> Result<f64, String> {
    let v = positive_number(s)?;
    if v > max {
        return Err(format!(
            "{v} is above {max}, far outside the published range of this constant (docs/theory.md)"
        ));
    }
    Ok(v)
}

/// A Deribas constant k (published 0.6 to 1.2; at most 5 accepted).
pub fn deribas_k(s: &str) -> Result<f64, String> {
    constant(s, 5.0)
}

/// A Wittman constant N (published about 0.11; at most 10 accepted).
pub fn wittman_n(s: &str) -> Result<f64, String> {
    constant(s, 10.0)
}

/// A multiple of the Hugoniot elastic limit (published 5; at most 100 accepted).
pub fn hel_multiple(s: &str) -> Result<f64, String> {
    constant(s, 100.0)
}

fn within(
    v: f64,
    (lo, hi): (f64, f64),
    what: &str,
    unit: &str,
    range: &str,
) -> Result<f64, String> {
    if v < lo || v > hi {
        let sep = if unit.is_empty() { "" } else { " " };
        Err(format!(
            "{what} {v:.3e}{sep}{unit} is outside the range oblique computes with ({range})"
        ))
    } else {
        Ok(v)
    }
}

fn positive(v: f64, what: &str) -> Result<f64, String> {
    if v > 0.0 {
        Ok(v)
    } else {
        Err(format!("{what} must be above zero, got {v}"))
    }
}

/// `VELOCITY,ANGLE` as in `320m/s,9deg`.
pub fn point(s: &str) -> Result<(f64, f64), String> {
    let (v, a) = s
        .split_once(',')
        .ok_or_else(|| format!("'{s}' is not VELOCITY,ANGLE (for example 320m/s,9deg)"))?;
    Ok((positive_velocity(v)?, angle(a)?))
}

/// A calendar date YYYY-MM-DD.
pub fn date(s: &str) -> Result<String, String> {
    match oblique_window::diag::date_problem(s) {
        None => Ok(s.to_string()),
        Some(p) => Err(format!("{p}: write it as YYYY-MM-DD, e.g. 2026-11-30")),
    }
}
