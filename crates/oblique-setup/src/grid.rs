//! Grids of the sweeps: a comma list (`1mm,1.5mm,2mm`) or a range `A..B` spread over a number
//! of steps given by another field; every value with its unit (`oblique_core::units`).

use oblique_core::units::{parse_quantity, QuantityKind};

/// A list of values or a range (SI).
#[derive(Debug, Clone, PartialEq)]
pub enum Grid {
    /// Values as given.
    List(Vec<f64>),
    /// From, to (inclusive), spread over the steps of the matching flag.
    Range(f64, f64),
}

/// The most values one range may be spread over (a sweep of 10 000 voltages already takes
/// minutes; the grid of two ranges is limited further by `sweep::MAX_SETTINGS`).
pub const MAX_STEPS: usize = 10_000;

impl Grid {
    /// The values; a range is spread evenly over `steps` values (at least 2); `steps_field`
    /// names where the steps come from in the message.
    ///
    /// # Errors
    /// A message when a range has fewer than two steps.
    pub fn values(&self, steps: usize, steps_field: &str) -> Result<Vec<f64>, String> {
        match self {
            Grid::List(v) => Ok(v.clone()),
            Grid::Range(a, b) => {
                if steps < 2 {
                    return Err(format!(
                        "{steps_field} must be at least 2 for a range, got {steps}"
                    ));
                }
                // Checked before anything is allocated.
                if steps > MAX_STEPS {
                    return Err(format!(
                        "{steps_field} {steps} is more than the limit of {MAX_STEPS} values in one range"
                    ));
                }
                let n = steps - 1;
                Ok((0..=n).map(|i| a + (b - a) * i as f64 / n as f64).collect())
            }
        }
    }
}

/// The kind `t` reads as when it is not `kind` (for a range whose ends are of two kinds).
fn other_kind(t: &str, kind: QuantityKind) -> Option<QuantityKind> {
    [
        QuantityKind::Velocity,
        QuantityKind::Angle,
        QuantityKind::Length,
        QuantityKind::Voltage,
        QuantityKind::Energy,
        QuantityKind::Current,
        QuantityKind::Inductance,
        QuantityKind::Capacitance,
        QuantityKind::Pressure,
    ]
    .into_iter()
    .filter(|k| *k != kind)
    .find(|k| parse_quantity(t, *k).is_ok())
}

fn grid(s: &str, kind: QuantityKind, allow_zero: bool) -> Result<Grid, String> {
    let one = |t: &str| -> Result<f64, String> {
        let v = parse_quantity(t, kind).map_err(|e| e.to_string())?;
        if v > 0.0 || (allow_zero && v == 0.0) {
            Ok(v)
        } else {
            Err(format!(
                "'{}' must be above zero ({} such as {})",
                t.trim(),
                kind.describe(),
                kind.example()
            ))
        }
    };
    if let Some((a, b)) = s.split_once("..") {
        let mixed = |t: &str| {
            other_kind(t, kind).map(|o| {
                format!(
                    "the range mixes kinds of quantity: '{}' is {}, not {} (both ends need the same kind, e.g. {})",
                    t.trim(),
                    o.describe(),
                    kind.describe(),
                    kind.example()
                )
            })
        };
        let a = one(a).map_err(|m| mixed(a).unwrap_or(format!("the range's lower end: {m}")))?;
        let b = one(b).map_err(|m| mixed(b).unwrap_or(format!("the range's upper end: {m}")))?;
        if a == b {
            return Err(format!(
                "range '{s}' is empty: give two different ends, the smaller first (or one value)"
            ));
        }
        if !(b > a) {
            return Err(format!(
                "range '{s}' is reversed: it must go from the smaller to the larger value"
            ));
        }
        return Ok(Grid::Range(a, b));
    }
    let v: Vec<f64> = s
        .split(',')
        .map(one)
        .collect::<Result<_, _>>()
        .map_err(|e| match dash_range_hint(s, kind) {
            Some(h) => format!("{e}; {h}"),
            None => e,
        })?;
    Ok(Grid::List(v))
}

/// "write a range with two dots: 6kV..10kV" when `s` is two quantities of `kind` joined by a
/// dash (`6kV-10kV`, as ranges are often written on paper); `None` otherwise.
#[must_use]
pub fn dash_range_hint(s: &str, kind: QuantityKind) -> Option<String> {
    let t = s.trim();
    t.char_indices()
        .filter(|&(i, c)| {
            c == '-' && i > 0 && !matches!(t[..i].chars().last(), Some('e' | 'E' | '-'))
        })
        .find_map(|(i, _)| {
            let (a, b) = (t[..i].trim(), t[i + 1..].trim());
            (parse_quantity(a, kind).is_ok() && parse_quantity(b, kind).is_ok())
                .then(|| format!("write a range with two dots: {a}..{b}"))
        })
}

/// Charging voltages, e.g. `6kV..12kV` or `6kV,8kV`.
///
/// # Errors
/// A message for a value without its unit, not above zero, or a range the wrong way round.
pub fn voltage_grid(s: &str) -> Result<Grid, String> {
    grid(s, QuantityKind::Voltage, false)
}

/// Stored energies, e.g. `5kJ..20kJ`.
///
/// # Errors
/// As [`voltage_grid`].
pub fn energy_grid(s: &str) -> Result<Grid, String> {
    grid(s, QuantityKind::Energy, false)
}

/// Standoffs, e.g. `1mm,1.5mm,2mm`.
///
/// # Errors
/// As [`voltage_grid`].
pub fn length_grid(s: &str) -> Result<Grid, String> {
    grid(s, QuantityKind::Length, false)
}

/// Collision angles (each strictly between 0 and 90 deg), e.g. `6deg..14deg`.
///
/// # Errors
/// As [`voltage_grid`], and for an angle not below 90 deg.
pub fn angle_grid(s: &str) -> Result<Grid, String> {
    let g = grid(s, QuantityKind::Angle, false)?;
    let check = |v: f64| {
        if v < std::f64::consts::FRAC_PI_2 {
            Ok(())
        } else {
            Err(format!(
                "collision angle {} deg is outside (0, 90) deg",
                v.to_degrees()
            ))
        }
    };
    match &g {
        Grid::List(v) => v.iter().try_for_each(|x| check(*x))?,
        Grid::Range(_, b) => check(*b)?,
    }
    Ok(g)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_range_written_with_a_dash_gets_the_two_dot_hint() {
        let e = voltage_grid("6kV-10kV").expect_err("a dash is not a range");
        assert!(e.ends_with("write a range with two dots: 6kV..10kV"), "{e}");
        assert_eq!(
            dash_range_hint("1e-3kV-2kV", QuantityKind::Voltage).as_deref(),
            Some("write a range with two dots: 1e-3kV..2kV")
        );
        assert_eq!(dash_range_hint("-5kV", QuantityKind::Voltage), None);
        assert_eq!(dash_range_hint("6kV-10mm", QuantityKind::Voltage), None);
    }

    #[test]
    fn lists_and_ranges() {
        assert_eq!(
            length_grid("1mm,1.5mm").unwrap(),
            Grid::List(vec![1e-3, 1.5e-3])
        );
        let r = voltage_grid("6kV..12kV").unwrap();
        let v = r.values(4, "--steps").unwrap();
        assert_eq!(v.len(), 4);
        assert!((v[1] - 8e3).abs() < 1e-9 && (v[3] - 12e3).abs() < 1e-9);
        assert!(r.values(1, "--steps").is_err());
        let e = r.values(4_294_967_297, "--steps").unwrap_err();
        assert!(e.contains("more than the limit of 10000"), "{e}");
        assert!(voltage_grid("12kV..6kV").unwrap_err().contains("reversed"));
        assert!(voltage_grid("6kV..6kV").unwrap_err().contains("empty"));
        assert!(angle_grid("4deg..16mm")
            .unwrap_err()
            .contains("mixes kinds"));
        assert!(length_grid("0mm,1mm").is_err());
        assert!(length_grid("1,2").is_err(), "bare numbers need a unit");
        assert!(angle_grid("6deg,95deg").is_err());
    }
}
