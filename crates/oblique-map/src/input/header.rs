//! The header of an interface export: column names, units and their factors to SI, the
//! mapping of the wanted columns (`--*-column`), and strict JSON objects (no repeated key).

use oblique_core::units::{parse_quantity, QuantityKind};

/// A mapped column: its index and the factor to SI.
#[derive(Debug, Clone)]
pub struct Column {
    /// Index in the record.
    pub index: usize,
    /// The header cell as written (e.g. `velocity[km/s]`).
    pub cell: String,
    /// SI per input unit.
    pub factor: f64,
}

/// The parsed header.
#[derive(Debug, Clone)]
pub struct Header {
    /// Every header cell as written (JSON lines: the keys of the first object, sorted).
    pub cells: Vec<String>,
    /// position, velocity, angle (required) and time (optional).
    pub position: Column,
    /// See `position`.
    pub velocity: Column,
    /// See `position`.
    pub angle: Column,
    /// See `position`.
    pub time: Option<Column>,
}

/// Split a header cell `name[unit]` into its name and unit (both trimmed).
pub fn split_cell(cell: &str) -> (&str, Option<&str>) {
    let c = cell.trim();
    match (c.find('['), c.ends_with(']')) {
        (Some(open), true) => (c[..open].trim(), Some(c[open + 1..c.len() - 1].trim())),
        _ => (c, None),
    }
}

/// The wanted column names (after `--*-column` mapping), for position, velocity, angle, time.
#[derive(Debug, Clone)]
pub struct Wanted {
    /// Names for position, velocity, angle and time, in that order.
    pub names: [String; 4],
    /// Which flag set each name, for messages.
    pub flags: [&'static str; 4],
}

const KINDS: [QuantityKind; 4] = [
    QuantityKind::Length,
    QuantityKind::Velocity,
    QuantityKind::Angle,
    QuantityKind::Time,
];

/// Build the header from its cells. `file` names the input in messages, `header_row` is the
/// header's line number (after any comment lines).
///
/// # Errors
/// A message naming the column: missing required column, missing or unknown unit, duplicate.
pub fn parse_header(
    file: &str,
    header_row: u64,
    cells: Vec<String>,
    wanted: &Wanted,
) -> Result<Header, String> {
    let where_ = |s: &str| format!("{file}: row {header_row} (header): {s}");
    let mut found: [Option<Column>; 4] = [None, None, None, None];
    // Every problem with units, so that one run names them all.
    let mut problems: Vec<String> = Vec::new();
    let mut seen: [Option<usize>; 4] = [None; 4];
    for (i, cell) in cells.iter().enumerate() {
        let (name, unit) = split_cell(cell);
        for r in 0..4 {
            let w = &wanted.names[r];
            if name != w && cell.trim() != w {
                continue;
            }
            if let Some(prev) = seen[r] {
                return Err(where_(&format!(
                    "column '{}' appears twice (columns {} and {})",
                    w,
                    prev + 1,
                    i + 1
                )));
            }
            seen[r] = Some(i);
            let kind = KINDS[r];
            let Some(unit) = unit.filter(|u| !u.is_empty()) else {
                problems.push(format!(
                    "column '{cell}' has no unit: units are never guessed; write it as {name}[UNIT] with one of {}, e.g. {}",
                    kind.accepted_units(),
                    example_cell(r, name)
                ));
                continue;
            };
            match parse_quantity(&format!("1 {unit}"), kind) {
                Ok(factor) => {
                    found[r] = Some(Column {
                        index: i,
                        cell: cell.clone(),
                        factor,
                    })
                }
                Err(_) => problems.push(format!(
                    "column '{cell}': unknown unit '{unit}' for {}: expected one of {}",
                    kind.describe(),
                    kind.accepted_units()
                )),
            }
        }
    }
    let missing: Vec<usize> = (0..3).filter(|&r| seen[r].is_none()).collect();
    if !missing.is_empty() {
        let names: Vec<&str> = missing.iter().map(|&r| wanted.names[r].as_str()).collect();
        let flags: Vec<String> = missing
            .iter()
            .map(|&r| format!("{} NAME", wanted.flags[r]))
            .collect();
        problems.push(format!(
            "no column named '{}'\n  hint: the columns are: {}\n  hint: the default layout is position[mm],velocity[m/s],angle[deg]; name other columns with {}",
            names.join("', '"),
            cells.join(", "),
            flags.join(", ")
        ));
    }
    match problems.len() {
        0 => {}
        1 => return Err(where_(&problems[0])),
        n => {
            let mut m = where_(&format!("{n} problems:"));
            for p in &problems {
                m.push_str("\n  ");
                m.push_str(p);
            }
            return Err(m);
        }
    }
    let [p, v, a, t] = found;
    match (p, v, a) {
        (Some(position), Some(velocity), Some(angle)) => Ok(Header {
            cells,
            position,
            velocity,
            angle,
            time: t,
        }),
        _ => Err(where_("required columns missing")),
    }
}

fn example_cell(role: usize, name: &str) -> String {
    let unit = ["mm", "m/s", "deg", "us"][role];
    format!("{name}[{unit}]")
}

/// One JSON object, refusing a key that appears twice (a plain map would keep the last value
/// and drop the first without a word).
///
/// # Errors
/// Not a JSON object, or a repeated key (the message names it).
pub fn json_object(
    bytes: &[u8],
) -> Result<serde_json::Map<String, serde_json::Value>, serde_json::Error> {
    use serde::de::{Deserializer, Error, MapAccess, Visitor};
    struct Unique;
    impl<'de> Visitor<'de> for Unique {
        type Value = serde_json::Map<String, serde_json::Value>;
        fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
            f.write_str("a JSON object")
        }
        fn visit_map<A: MapAccess<'de>>(self, mut a: A) -> Result<Self::Value, A::Error> {
            let mut m = serde_json::Map::new();
            while let Some((k, v)) = a.next_entry::<String, serde_json::Value>()? {
                if m.contains_key(&k) {
                    return Err(A::Error::custom(format!("key '{k}' appears twice")));
                }
                m.insert(k, v);
            }
            Ok(m)
        }
    }
    let mut de = serde_json::Deserializer::from_slice(bytes);
    let m = (&mut de).deserialize_map(Unique)?;
    de.end()?;
    Ok(m)
}

/// A JSON error for a message about one line of a file: serde's "at line 1 column N" counts
/// within that line only, so it becomes "at column N of the line".
pub fn json_reason(e: &serde_json::Error) -> String {
    let t = e.to_string();
    match t.rfind(" at line ") {
        Some(i) => format!("{} (at column {} of the line)", &t[..i], e.column()),
        None => t,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn wanted() -> Wanted {
        Wanted {
            names: ["position", "velocity", "angle", "time"].map(String::from),
            flags: [
                "--position-column",
                "--velocity-column",
                "--angle-column",
                "--time-column",
            ],
        }
    }

    fn cells(s: &str) -> Vec<String> {
        s.split(',').map(String::from).collect()
    }

    #[test]
    fn header_units_become_factors() {
        let h = parse_header(
            "f.csv",
            1,
            cells("id,position [m],velocity[km/s],angle[rad],time[s],note"),
            &wanted(),
        )
        .unwrap();
        assert_eq!(h.position.index, 1);
        assert_eq!(h.position.factor, 1.0);
        assert_eq!(h.velocity.factor, 1000.0);
        assert_eq!(h.angle.factor, 1.0);
        assert_eq!(h.time.as_ref().map(|t| t.factor), Some(1.0));
        let h = parse_header(
            "f.csv",
            1,
            cells("position[mm],velocity[m/s],angle[deg]"),
            &wanted(),
        )
        .unwrap();
        assert!((h.position.factor - 1e-3).abs() < 1e-18);
        assert!((h.angle.factor - 1f64.to_radians()).abs() < 1e-18);
        assert!(h.time.is_none());
    }

    #[test]
    fn header_errors_name_the_column() {
        let e = parse_header(
            "f.csv",
            1,
            cells("position[mm],velocity,angle[deg]"),
            &wanted(),
        )
        .unwrap_err();
        assert!(
            e.contains("f.csv: row 1 (header): column 'velocity' has no unit"),
            "{e}"
        );
        let e = parse_header(
            "f.csv",
            1,
            cells("position[mm],velocity[mph],angle[deg]"),
            &wanted(),
        )
        .unwrap_err();
        assert!(e.contains("unknown unit 'mph'"), "{e}");
        let e = parse_header(
            "f.csv",
            1,
            cells("x[mm],velocity[m/s],angle[deg]"),
            &wanted(),
        )
        .unwrap_err();
        assert!(e.contains("no column named 'position'"), "{e}");
        assert!(e.contains("--position-column"), "{e}");
        let e = parse_header(
            "f.csv",
            1,
            cells("position[mm],velocity[m/s],angle[deg],angle[rad]"),
            &wanted(),
        )
        .unwrap_err();
        assert!(e.contains("appears twice"), "{e}");
    }

    #[test]
    fn header_problems_are_named_together() {
        let e =
            parse_header("f.csv", 1, cells("position,velocity[mph],angle"), &wanted()).unwrap_err();
        assert!(e.starts_with("f.csv: row 1 (header): 3 problems:"), "{e}");
        assert!(e.contains("column 'position' has no unit"), "{e}");
        assert!(e.contains("unknown unit 'mph'"), "{e}");
        assert!(e.contains("column 'angle' has no unit"), "{e}");
        let e = parse_header("f.csv", 1, cells("x[mm],vp[m/s],beta[deg]"), &wanted()).unwrap_err();
        assert!(
            e.contains("no column named 'position', 'velocity', 'angle'"),
            "{e}"
        );
        assert!(
            e.contains("--position-column NAME, --velocity-column NAME, --angle-column NAME"),
            "{e}"
        );
    }

    #[test]
    fn json_objects_refuse_repeated_keys() {
        let m = json_object(br#"{"a": 1, "b": [1, {"a": 2}]}"#).unwrap();
        assert_eq!(m.len(), 2);
        let e = json_object(br#"{"angle[deg]": 8, "angle[deg]": 30}"#).unwrap_err();
        assert!(
            e.to_string().contains("key 'angle[deg]' appears twice"),
            "{e}"
        );
        assert!(json_object(b"[1, 2]").is_err());
        assert!(json_object(br#"{"a": 1} x"#).is_err());
    }
}
