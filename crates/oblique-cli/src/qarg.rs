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

/// A SHA-256 as 64 hexadecimal digits (as `pair show --json` prints it), in lower case.
pub fn sha256(s: &str) -> Result<String, String> {
    let t = s.trim();
    if t.len() == 64 && t.chars().all(|c| c.is_ascii_hexdigit()) {
        Ok(t.to_ascii_lowercase())
    } else {
        Err(format!(
            "'{}' is not a SHA-256 (64 hexadecimal digits, as `oblique pair show NAME --json` prints in 'sha256')",
            short_text(t)
        ))
    }
}

/// The text of a flag's value cut for a message.
fn short_text(s: &str) -> String {
    oblique_window::text::short(s.trim(), 24)
}

/// A one-line text (a source, a label, a provenance): no line break or control character, so
/// that it can never pass for a line of oblique's own output where it is shown.
pub fn one_line_text(s: &str) -> Result<String, String> {
    match oblique_window::text::one_line_problem(s) {
        Some(p) => Err(p),
        None => Ok(s.to_string()),
    }
}

parser!(velocity, QuantityKind::Velocity);
parser!(length, QuantityKind::Length);
parser!(capacitance, QuantityKind::Capacitance);
parser!(voltage, QuantityKind::Voltage);
parser!(inductance, QuantityKind::Inductance);
parser!(resistance, QuantityKind::Resistance);
parser!(energy, QuantityKind::Energy);
parser!(frequency, QuantityKind::Frequency);
parser!(current, QuantityKind::Current);

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

/// A shot's velocity uncertainty: zero (exact) or above, up to 10 km/s (the bound of an
/// observed velocity; the pair file checks the same).
pub fn velocity_uncertainty(s: &str) -> Result<f64, String> {
    let v = velocity(s)?;
    if !(v >= 0.0) {
        return Err(format!(
            "a velocity uncertainty must be zero (exact) or above, got {}",
            short_text(s)
        ));
    }
    if v > oblique_window::pair::MAX_OBSERVED_VELOCITY_M_S {
        return Err(format!(
            "{} is larger than any observed velocity ({} km/s): check the unit",
            short_text(s),
            oblique_window::pair::MAX_OBSERVED_VELOCITY_M_S / 1e3
        ));
    }
    Ok(v)
}

/// A shot's angle uncertainty: zero (exact) or above, below 90 deg.
pub fn angle_uncertainty(s: &str) -> Result<f64, String> {
    let rad = parse_quantity(s, QuantityKind::Angle).map_err(|e| e.to_string())?;
    if !(rad >= 0.0) {
        return Err(format!(
            "an angle uncertainty must be zero (exact) or above, got {}",
            short_text(s)
        ));
    }
    if rad.to_degrees() >= 90.0 {
        return Err(format!(
            "an angle uncertainty of {} is larger than any collision angle: check the unit",
            short_text(s)
        ));
    }
    Ok(rad)
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
    // A thousandth of the largest accepted is already far below every published value; below
    // it the limits' searches lose their footing (numbers near the smallest double).
    let min = max * 1e-3;
    if v < min {
        return Err(format!(
            "{v:.3e} is below {min}, far outside the published range of this constant (docs/theory.md)"
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

/// A velocity standard deviation: relative (`5%`, 0 to 50 %) or absolute (`20m/s`).
pub fn velocity_sd(s: &str) -> Result<oblique_confidence::VelocitySpread, String> {
    use oblique_confidence::scatter::{MAX_ABSOLUTE_VELOCITY_SD_M_S, MAX_RELATIVE_VELOCITY_SD};
    let t = s.trim();
    if let Some(p) = t.strip_suffix('%') {
        let v: f64 = p.trim().parse().map_err(|_| {
            format!("'{s}' is not a percentage (write it like 5%) or a velocity (20m/s)")
        })?;
        if !v.is_finite() {
            return Err(format!(
                "'{}' is not a finite percentage: write it like 5%",
                short_text(p)
            ));
        }
        if v < 0.0 {
            return Err(format!(
                "a standard deviation cannot be negative ('{} %')",
                short_text(p.trim())
            ));
        }
        if v > 100.0 * MAX_RELATIVE_VELOCITY_SD {
            return Err(format!(
                "{} % is above {} %: beyond it a normal scatter puts visible weight on negative velocities",
                short_text(p.trim()),
                100.0 * MAX_RELATIVE_VELOCITY_SD
            ));
        }
        return Ok(oblique_confidence::VelocitySpread::Relative(v / 100.0));
    }
    let v = velocity(t).map_err(|e| format!("{e} (or a percentage such as 5%)"))?;
    if !(v >= 0.0) {
        return Err(format!(
            "a standard deviation cannot be negative ('{}')",
            short_text(t)
        ));
    }
    if v > MAX_ABSOLUTE_VELOCITY_SD_M_S {
        return Err(format!(
            "{v:.3e} m/s is above {MAX_ABSOLUTE_VELOCITY_SD_M_S} m/s"
        ));
    }
    Ok(oblique_confidence::VelocitySpread::Absolute(v))
}

/// An angle standard deviation (0 to 30 deg), with its unit; a percentage is refused.
pub fn angle_sd(s: &str) -> Result<f64, String> {
    if s.trim().ends_with('%') {
        return Err(format!(
            "'{s}': the angle's standard deviation needs an angle such as 1deg, not a percentage"
        ));
    }
    let rad = parse_quantity(s, QuantityKind::Angle).map_err(|e| e.to_string())?;
    let deg = rad.to_degrees();
    if !(deg >= 0.0) {
        return Err(format!(
            "a standard deviation cannot be negative ('{}')",
            short_text(s)
        ));
    }
    if deg > oblique_confidence::scatter::MAX_ANGLE_SD_DEG {
        return Err(format!(
            "{deg} deg is above {} deg",
            oblique_confidence::scatter::MAX_ANGLE_SD_DEG
        ));
    }
    Ok(rad)
}

/// A number of samples: a whole number from 1 to 10 000 000.
pub fn samples(s: &str) -> Result<usize, String> {
    let max = oblique_confidence::scatter::MAX_SAMPLES;
    let n: usize = s
        .trim()
        .replace('_', "")
        .parse()
        .map_err(|_| format!("'{s}' is not a whole number of samples (1 to {max})"))?;
    if n == 0 || n > max {
        return Err(format!(
            "{n} is outside 1 to {max} (10 million samples take about 2 s at one point)"
        ));
    }
    Ok(n)
}

/// A seed of the random streams: a whole number from 0 to 2^64 - 1.
pub fn seed(s: &str) -> Result<u64, String> {
    s.trim().replace('_', "").parse().map_err(|_| {
        format!(
            "'{}' is not a seed: a whole number from 0 to {}, e.g. 7",
            short_text(s),
            u64::MAX
        )
    })
}

/// A confidence level as a percentage, strictly between 0 and 100 % (e.g. 95%).
pub fn level(s: &str) -> Result<f64, String> {
    let p = s
        .trim()
        .strip_suffix('%')
        .ok_or_else(|| format!("'{s}' needs a percent sign, e.g. 95%"))?;
    let v: f64 = p
        .trim()
        .parse()
        .map_err(|_| format!("'{s}' is not a percentage, e.g. 95%"))?;
    if !(v > 0.0 && v < 100.0) {
        return Err(format!("{v} % is outside (0, 100) %"));
    }
    Ok(v / 100.0)
}

/// The kind of quantity `s` reads as, for a message about a range that mixes kinds.
fn kind_of(s: &str) -> Option<QuantityKind> {
    [
        QuantityKind::Velocity,
        QuantityKind::Angle,
        QuantityKind::Length,
        QuantityKind::Voltage,
        QuantityKind::Energy,
        QuantityKind::Pressure,
        QuantityKind::Current,
        QuantityKind::Capacitance,
        QuantityKind::Inductance,
        QuantityKind::Time,
        QuantityKind::Frequency,
        QuantityKind::Temperature,
        QuantityKind::Density,
    ]
    .into_iter()
    .find(|k| parse_quantity(s, *k).is_ok())
}

/// A range `A..B` of one kind of quantity (SI), the smaller end first, both with their units.
/// A bare number, an end of another kind (`2deg..800m/s`), an empty or reversed range are
/// refused with a message that says which.
pub fn range(s: &str, kind: QuantityKind) -> Result<(f64, f64), String> {
    let Some((a, b)) = s.split_once("..") else {
        if let Some(h) = oblique_setup::grid::dash_range_hint(s, kind) {
            return Err(format!("'{}' is not a range: {h}", short_text(s)));
        }
        return Err(format!(
            "expected a range A..B, e.g. {}..{} ({} with its unit at both ends)",
            kind.example(),
            kind.example(),
            kind.describe()
        ));
    };
    let end = |t: &str, which: &str| -> Result<f64, String> {
        parse_quantity(t, kind).map_err(|e| match kind_of(t) {
            Some(other) if other != kind => format!(
                "the range mixes kinds of quantity: its {which} end '{}' is {}, not {} (both ends need the same kind, e.g. {})",
                t.trim(),
                other.describe(),
                kind.describe(),
                kind.example()
            ),
            _ => format!("the range's {which} end: {e}"),
        })
    };
    let (x, y) = (end(a, "lower")?, end(b, "upper")?);
    if x == y {
        return Err(format!(
            "the range '{s}' is empty: give two different ends, the smaller first"
        ));
    }
    if x > y {
        return Err(format!(
            "the range '{s}' is reversed: give the smaller end first"
        ));
    }
    Ok((x, y))
}

/// A range of collision angles, each strictly between 0 and 90 deg, e.g. `2deg..30deg`.
pub fn angle_range(s: &str) -> Result<(f64, f64), String> {
    let (a, b) = range(s, QuantityKind::Angle)?;
    if !(a > 0.0 && b < std::f64::consts::FRAC_PI_2) {
        return Err(format!(
            "{:.3} to {:.3} deg leaves (0, 90) deg: every angle must be an oblique collision",
            a.to_degrees(),
            b.to_degrees()
        ));
    }
    Ok((a, b))
}

/// A range of velocities above zero within [`VELOCITY_RANGE_M_S`], e.g. `200m/s..800m/s`.
pub fn velocity_range(s: &str) -> Result<(f64, f64), String> {
    let (a, b) = range(s, QuantityKind::Velocity)?;
    if !(a > 0.0) {
        return Err("velocities must be above zero".into());
    }
    within(
        b,
        VELOCITY_RANGE_M_S,
        "velocity",
        "m/s",
        "1 mm/s to 100 km/s",
    )?;
    within(
        a,
        VELOCITY_RANGE_M_S,
        "velocity",
        "m/s",
        "1 mm/s to 100 km/s",
    )?;
    Ok((a, b))
}
