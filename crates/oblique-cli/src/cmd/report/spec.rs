//! `--alternative`: another set of settings, as `[LABEL:] key=value, key=value[, because=TEXT]`.
//! Keys are the flag names without their dashes; values carry their units; `because=` takes
//! the rest of the text (commas included) as the reason the person gives.

use crate::args::process::parse;
use crate::qarg;

/// One `--alternative`.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct AltSpec {
    /// Its label, if given.
    pub label: Option<String>,
    /// Charging voltage (V).
    pub charge_voltage: Option<f64>,
    /// Stored energy (J).
    pub energy: Option<f64>,
    /// Standoff (m).
    pub standoff: Option<f64>,
    /// Angle (rad).
    pub angle: Option<f64>,
    /// Efficiency.
    pub efficiency: Option<f64>,
    /// Impact velocity (m/s), for a point.
    pub velocity: Option<f64>,
    /// Collision-point velocity (m/s), for a point.
    pub collision_velocity: Option<f64>,
    /// Gurney velocity (m/s), explosive.
    pub gurney_velocity: Option<f64>,
    /// Detonation velocity (m/s), explosive.
    pub detonation_velocity: Option<f64>,
    /// Flyer-to-charge mass ratio, explosive.
    pub mass_ratio: Option<f64>,
    /// Charge-to-flyer mass ratio, explosive.
    pub charge_ratio: Option<f64>,
    /// Preset angle (rad), explosive.
    pub preset_angle: Option<f64>,
    /// The person's reason for not choosing it.
    pub because: Option<String>,
}

/// The keys of a process alternative.
pub const PROCESS_KEYS: &str = "charge-voltage, energy, standoff, angle, efficiency, because";
/// The keys of a point alternative.
pub const POINT_KEYS: &str = "velocity, collision-velocity, angle, because";
/// The keys of an explosive alternative.
pub const EXPLOSIVE_KEYS: &str =
    "gurney-velocity, detonation-velocity, mass-ratio, charge-ratio, preset-angle, because";

/// What a record is of, for the keys its alternatives may use.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// A point.
    Point,
    /// A magnetic pulse set-up.
    Magnetic,
    /// An explosive set-up.
    Explosive,
}

/// Parse one `--alternative` value (the keys are checked against the report's kind later).
pub fn parse_alternative(s: &str) -> Result<AltSpec, String> {
    let mut spec = AltSpec::default();
    let mut rest = s.trim();
    if let Some((head, tail)) = rest.split_once(':') {
        if !head.contains('=') && !head.contains(',') {
            let label = head.trim();
            if label.is_empty() {
                return Err("the label before ':' is empty".into());
            }
            spec.label = Some(label.to_string());
            rest = tail.trim();
        }
    }
    while !rest.is_empty() {
        let (key, after) = rest
            .split_once('=')
            .ok_or_else(|| format!("'{rest}' is not key=value"))?;
        let key = key.trim();
        if key == "because" {
            let text = after.trim();
            if text.is_empty() {
                return Err("because= is empty".into());
            }
            spec.because = Some(text.to_string());
            break;
        }
        let (value, next) = match after.split_once(',') {
            Some((v, n)) => (v.trim(), n.trim()),
            None => (after.trim(), ""),
        };
        let field = |r: Result<f64, String>| r.map_err(|e| format!("{key}={value}: {e}"));
        let slot = match key {
            "charge-voltage" => &mut spec.charge_voltage,
            "energy" => &mut spec.energy,
            "standoff" => &mut spec.standoff,
            "angle" => &mut spec.angle,
            "efficiency" => &mut spec.efficiency,
            "velocity" => &mut spec.velocity,
            "collision-velocity" => &mut spec.collision_velocity,
            "gurney-velocity" => &mut spec.gurney_velocity,
            "detonation-velocity" => &mut spec.detonation_velocity,
            "mass-ratio" => &mut spec.mass_ratio,
            "charge-ratio" => &mut spec.charge_ratio,
            "preset-angle" => &mut spec.preset_angle,
            other => {
                return Err(format!(
                    "unknown key '{other}': expected {PROCESS_KEYS} (a magnetic pulse set-up), {EXPLOSIVE_KEYS} (an explosive set-up) or {POINT_KEYS} (a point)"
                ))
            }
        };
        if slot.is_some() {
            return Err(format!("{key} is given twice"));
        }
        *slot = Some(field(match key {
            "charge-voltage" => parse::voltage(value),
            "energy" => parse::energy(value),
            "standoff" => parse::length(value),
            "angle" => qarg::angle(value),
            "efficiency" => parse::efficiency(value),
            "mass-ratio" | "charge-ratio" => parse::number(value),
            "preset-angle" => qarg::angle_or_zero(value),
            _ => qarg::positive_velocity(value),
        })?);
        rest = next;
    }
    Ok(spec)
}

impl AltSpec {
    /// Refuse keys of another kind, naming them.
    pub fn check_kind(&self, kind: Kind) -> Result<(), String> {
        let given = [
            (
                "charge-voltage",
                self.charge_voltage.is_some(),
                Kind::Magnetic,
            ),
            ("energy", self.energy.is_some(), Kind::Magnetic),
            ("standoff", self.standoff.is_some(), Kind::Magnetic),
            ("efficiency", self.efficiency.is_some(), Kind::Magnetic),
            ("velocity", self.velocity.is_some(), Kind::Point),
            (
                "collision-velocity",
                self.collision_velocity.is_some(),
                Kind::Point,
            ),
            (
                "gurney-velocity",
                self.gurney_velocity.is_some(),
                Kind::Explosive,
            ),
            (
                "detonation-velocity",
                self.detonation_velocity.is_some(),
                Kind::Explosive,
            ),
            ("mass-ratio", self.mass_ratio.is_some(), Kind::Explosive),
            ("charge-ratio", self.charge_ratio.is_some(), Kind::Explosive),
            ("preset-angle", self.preset_angle.is_some(), Kind::Explosive),
            // The angle is the point's or the geometry's; an explosive set-up computes it.
            (
                "angle",
                self.angle.is_some(),
                if kind == Kind::Explosive {
                    Kind::Point
                } else {
                    kind
                },
            ),
        ];
        let wrong: Vec<&str> = given
            .iter()
            .filter(|(_, on, k)| *on && *k != kind)
            .map(|(name, _, _)| *name)
            .collect();
        if wrong.is_empty() {
            Ok(())
        } else {
            Err(format!(
                "{} do(es) not apply here: expected {}",
                wrong.join(", "),
                match kind {
                    Kind::Point => POINT_KEYS,
                    Kind::Magnetic => PROCESS_KEYS,
                    Kind::Explosive => EXPLOSIVE_KEYS,
                }
            ))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn alternatives_parse_with_label_units_and_reason() {
        let a = parse_alternative("B: charge-voltage=8kV, standoff=1mm, angle=6deg, because=too near the melting limit, and noisy")
            .expect("parses");
        assert_eq!(a.label.as_deref(), Some("B"));
        assert!((a.charge_voltage.expect("v") - 8000.0).abs() < 1e-9);
        assert!((a.standoff.expect("g") - 0.001).abs() < 1e-12);
        assert_eq!(
            a.because.as_deref(),
            Some("too near the melting limit, and noisy")
        );
        let p = parse_alternative("velocity=400m/s,angle=8deg").expect("parses");
        assert!(p.label.is_none() && p.velocity.is_some());
        assert!(parse_alternative("standoff=1")
            .expect_err("no unit")
            .contains("standoff=1"));
        assert!(parse_alternative("colour=red")
            .expect_err("key")
            .contains("unknown key 'colour'"));
        assert!(parse_alternative("angle=5deg, angle=6deg")
            .expect_err("twice")
            .contains("twice"));
        assert!(p.check_kind(Kind::Magnetic).is_err() && p.check_kind(Kind::Point).is_ok());
        let x = parse_alternative("mass-ratio=1.5, preset-angle=0deg").expect("parses");
        assert!(x.check_kind(Kind::Explosive).is_ok() && x.check_kind(Kind::Magnetic).is_err());
    }
}
