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

/// A collision angle: strictly between 0 and 90 deg.
pub fn angle(s: &str) -> Result<f64, String> {
    let rad = parse_quantity(s, QuantityKind::Angle).map_err(|e| e.to_string())?;
    let deg = rad.to_degrees();
    if deg > 0.0 && deg < 90.0 {
        Ok(rad)
    } else {
        Err(format!(
            "collision angle {deg:.3} deg is outside (0, 90) deg"
        ))
    }
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

/// A strictly positive velocity.
pub fn positive_velocity(s: &str) -> Result<f64, String> {
    positive(velocity(s)?, "velocity")
}

/// A strictly positive length.
pub fn positive_length(s: &str) -> Result<f64, String> {
    positive(length(s)?, "length")
}

/// A strictly positive pure number.
pub fn positive_number(s: &str) -> Result<f64, String> {
    let v = parse_quantity(s, QuantityKind::Dimensionless).map_err(|e| e.to_string())?;
    positive(v, "number")
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
