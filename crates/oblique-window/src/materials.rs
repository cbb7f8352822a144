//! The material library file (`materials.ron`): every property with its unit and its source.
//! See `docs/window-format.md` for the format.

use crate::diag::{parse_ron, Collector, Diagnostics};
use oblique_core::hugoniot::Hugoniot;
use oblique_core::units::{
    Density, ElectricalConductivity, Pressure, QuantityKind, SpecificHeat, Temperature,
    ThermalConductivity, Velocity,
};
use oblique_core::Material;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// The format tag every material file carries.
pub const MATERIALS_FORMAT: &str = "oblique-materials/1";

/// A value with its unit, its source key and an optional note.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SourcedValue {
    /// The value with its unit, e.g. `"2700 kg/m3"`.
    pub value: String,
    /// A key of the file's `sources` table (`MEM` for from memory, `DER` for derived).
    pub source: String,
    /// Free note: conversion, stand-in, formula.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub note: Option<String>,
    /// The value's standard uncertainty (one standard deviation), relative (`"5 %"`) or with
    /// the property's unit (`"0.1 km/s"`): for example the spread between published tables.
    /// Absent: the documented default of the property is used where uncertainty is sampled.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub spread: Option<String>,
}

/// A revision note.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Revision {
    /// ISO date.
    pub date: String,
    /// What changed.
    pub note: String,
}

/// One material as written in the file.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MaterialEntry {
    /// Short id used everywhere else.
    pub id: String,
    /// Human name.
    pub name: String,
    /// Temper or condition.
    pub condition: String,
    /// Initial density.
    pub density: SourcedValue,
    /// Hugoniot intercept C0.
    pub hugoniot_c0: SourcedValue,
    /// Hugoniot slope s (a pure number).
    pub hugoniot_s: SourcedValue,
    /// Vickers hardness.
    pub vickers_hardness: SourcedValue,
    /// 0.2 % yield strength.
    pub yield_strength: SourcedValue,
    /// Ultimate tensile strength.
    pub tensile_strength: SourcedValue,
    /// Bulk modulus.
    pub bulk_modulus: SourcedValue,
    /// Shear modulus.
    pub shear_modulus: SourcedValue,
    /// Melting (solidus) temperature.
    pub melting_temperature: SourcedValue,
    /// Thermal conductivity.
    pub thermal_conductivity: SourcedValue,
    /// Specific heat.
    pub specific_heat: SourcedValue,
    /// Electrical conductivity.
    pub electrical_conductivity: SourcedValue,
    /// Free notes.
    #[serde(default)]
    pub notes: String,
}

/// The whole material file.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MaterialFile {
    /// Must be [`MATERIALS_FORMAT`].
    pub format: String,
    /// Who maintains the file.
    pub maintainer: String,
    /// Revision notes.
    #[serde(default)]
    pub revisions: Vec<Revision>,
    /// Source key -> full reference.
    pub sources: BTreeMap<String, String>,
    /// The materials.
    pub materials: Vec<MaterialEntry>,
}

/// One property's provenance, after loading.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Provenance {
    /// Source key.
    pub key: String,
    /// Full reference of the key.
    pub reference: String,
    /// Note, if any.
    pub note: Option<String>,
    /// The value as written in the file.
    pub as_written: String,
    /// The relative standard uncertainty (a fraction, 0.05 for 5 %) from the file's `spread`,
    /// if given.
    pub relative_spread: Option<f64>,
}

/// A loaded material: the core's physics view plus where each number came from.
#[derive(Debug, Clone, PartialEq)]
pub struct MaterialRecord {
    /// Physics view, SI.
    pub material: Material,
    /// Temper or condition.
    pub condition: String,
    /// Free notes.
    pub notes: String,
    /// Property name (the file's field name) -> provenance.
    pub sources: BTreeMap<&'static str, Provenance>,
    /// Where it was loaded from.
    pub origin: String,
}

/// The property fields, their kinds and their names in files and JSON.
pub const PROPERTIES: [(&str, QuantityKind); 12] = [
    ("density", QuantityKind::Density),
    ("hugoniot_c0", QuantityKind::Velocity),
    ("hugoniot_s", QuantityKind::Dimensionless),
    ("vickers_hardness", QuantityKind::Hardness),
    ("yield_strength", QuantityKind::Pressure),
    ("tensile_strength", QuantityKind::Pressure),
    ("bulk_modulus", QuantityKind::Pressure),
    ("shear_modulus", QuantityKind::Pressure),
    ("melting_temperature", QuantityKind::Temperature),
    ("thermal_conductivity", QuantityKind::ThermalConductivity),
    ("specific_heat", QuantityKind::SpecificHeat),
    (
        "electrical_conductivity",
        QuantityKind::ElectricalConductivity,
    ),
];

impl MaterialEntry {
    fn values(&self) -> [&SourcedValue; 12] {
        [
            &self.density,
            &self.hugoniot_c0,
            &self.hugoniot_s,
            &self.vickers_hardness,
            &self.yield_strength,
            &self.tensile_strength,
            &self.bulk_modulus,
            &self.shear_modulus,
            &self.melting_temperature,
            &self.thermal_conductivity,
            &self.specific_heat,
            &self.electrical_conductivity,
        ]
    }
}

/// Plausible ranges for engineering metals, SI. A value outside is almost surely a unit slip.
fn plausible(property: &str) -> (f64, f64, &'static str) {
    match property {
        "density" => (500.0, 25_000.0, "500 to 25000 kg/m3"),
        "hugoniot_c0" => (1000.0, 10_000.0, "1 to 10 km/s"),
        "hugoniot_s" => (0.3, 3.0, "0.3 to 3"),
        "vickers_hardness" => (1.0 * 9.80665e6, 2000.0 * 9.80665e6, "1 to 2000 HV"),
        "yield_strength" | "tensile_strength" => (1e6, 5e9, "1 MPa to 5 GPa"),
        "bulk_modulus" | "shear_modulus" => (1e9, 1e12, "1 to 1000 GPa"),
        "melting_temperature" => (250.0, 4000.0, "250 to 4000 K"),
        "thermal_conductivity" => (1.0, 500.0, "1 to 500 W/(m K)"),
        "specific_heat" => (50.0, 3000.0, "50 to 3000 J/(kg K)"),
        "electrical_conductivity" => (1e4, 1e8, "1e4 to 1e8 S/m"),
        _ => (f64::MIN_POSITIVE, f64::MAX, "positive"),
    }
}

/// Validate `entries` of a material file or of a pair file's inline materials, adding
/// problems to `c` under `prefix` (`materials`). Returns the records that are valid.
pub(crate) fn validate_entries(
    c: &mut Collector<'_>,
    prefix: &str,
    entries: &[MaterialEntry],
    sources: &BTreeMap<String, String>,
    origin: &str,
) -> Vec<MaterialRecord> {
    let mut out = Vec::new();
    let mut seen: BTreeMap<&str, usize> = BTreeMap::new();
    for (i, e) in entries.iter().enumerate() {
        let base = format!("{prefix}[{i}]");
        if e.id.trim().is_empty()
            || e.id
                .chars()
                .any(|ch| ch.is_whitespace() || ch.is_ascii_uppercase())
        {
            c.push(
                &format!("{base}.id"),
                format!(
                    "material id '{}' must be non-empty, lowercase, without spaces",
                    e.id
                ),
                Some("use ids like \"aa6061-t6\"".into()),
            );
        }
        if let Some(first) = seen.insert(&e.id, i) {
            c.push(
                &format!("{base}.id"),
                format!(
                    "duplicate material id '{}' (first defined at {prefix}[{first}])",
                    e.id
                ),
                Some("give each material its own id".into()),
            );
        }
        let mut si = [0.0f64; 12];
        let mut ok = true;
        let mut provenance = BTreeMap::new();
        for (k, ((name, kind), sv)) in PROPERTIES.iter().zip(e.values()).enumerate() {
            let field = format!("{base}.{name}.value");
            let value = c.quantity(&field, &sv.value, *kind);
            let relative_spread = sv
                .spread
                .as_deref()
                .and_then(|sp| parse_spread(c, &format!("{base}.{name}.spread"), sp, *kind, value));
            match value {
                Some(v) => {
                    let (lo, hi, words) = plausible(name);
                    if !(v >= lo && v <= hi) {
                        c.push(
                            &field,
                            format!(
                                "{name} '{}' is outside the plausible range {words}",
                                sv.value
                            ),
                            Some("check the unit".into()),
                        );
                        ok = false;
                    }
                    si[k] = v;
                }
                None => ok = false,
            }
            match sources.get(&sv.source) {
                Some(reference) => {
                    provenance.insert(
                        *name,
                        Provenance {
                            key: sv.source.clone(),
                            reference: reference.clone(),
                            note: sv.note.clone(),
                            as_written: sv.value.clone(),
                            relative_spread,
                        },
                    );
                }
                None => {
                    let hint = crate::diag::closest(&sv.source, sources.keys().map(String::as_str))
                        .map(|s| format!("did you mean \"{s}\"?"))
                        .or_else(|| Some("add the key to the file's `sources` table".into()));
                    c.push(
                        &format!("{base}.{name}.source"),
                        format!("unknown source key '{}'", sv.source),
                        hint,
                    );
                    ok = false;
                }
            }
        }
        if ok && si[4] > si[5] {
            c.push(
                &format!("{base}.yield_strength.value"),
                format!(
                    "yield strength {} is above the tensile strength {}",
                    e.yield_strength.value, e.tensile_strength.value
                ),
                None,
            );
            ok = false;
        }
        if !ok {
            continue;
        }
        let hugoniot =
            match Hugoniot::new(Density::from_kg_m3(si[0]), Velocity::from_m_s(si[1]), si[2]) {
                Ok(h) => h,
                Err(err) => {
                    c.push(&format!("{base}.hugoniot_c0"), err.to_string(), None);
                    continue;
                }
            };
        let material = Material {
            id: e.id.clone(),
            name: e.name.clone(),
            hugoniot,
            vickers_hardness: Pressure::from_pa(si[3]),
            yield_strength: Pressure::from_pa(si[4]),
            tensile_strength: Pressure::from_pa(si[5]),
            bulk_modulus: Pressure::from_pa(si[6]),
            shear_modulus: Pressure::from_pa(si[7]),
            melting_temperature: Temperature::from_k(si[8]),
            thermal_conductivity: ThermalConductivity::from_w_m_k(si[9]),
            specific_heat: SpecificHeat::from_j_kg_k(si[10]),
            electrical_conductivity: ElectricalConductivity::from_s_m(si[11]),
        };
        if let Err(err) = material.validate() {
            c.push(&base, err.to_string(), None);
            continue;
        }
        out.push(MaterialRecord {
            material,
            condition: e.condition.clone(),
            notes: e.notes.clone(),
            sources: provenance,
            origin: origin.to_string(),
        });
    }
    out
}

/// Parse and validate a material file. `file` names it in messages.
///
/// # Errors
/// Every problem found, each with file, line, column and field.
pub fn parse_material_file(
    file: &str,
    text: &str,
) -> Result<(MaterialFile, Vec<MaterialRecord>), Diagnostics> {
    // A byte-order mark (some editors write one) is not RON: read past it.
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let parsed: MaterialFile = parse_ron(file, text)?;
    let mut c = Collector::new(file, text);
    c.check_format(&parsed.format, MATERIALS_FORMAT);
    for (key, reference) in &parsed.sources {
        if reference.trim().is_empty() {
            c.push(
                &format!("sources.{key}"),
                format!("source '{key}' has an empty reference"),
                None,
            );
        }
    }
    let records = validate_entries(
        &mut c,
        "materials",
        &parsed.materials,
        &parsed.sources,
        file,
    );
    c.finish()?;
    Ok((parsed, records))
}

/// A property's `spread`: `"5 %"` (relative) or a value with the property's unit, as a
/// relative standard uncertainty between 0 and 1 (a problem is recorded otherwise).
fn parse_spread(
    c: &mut Collector,
    field: &str,
    text: &str,
    kind: QuantityKind,
    value: Option<f64>,
) -> Option<f64> {
    let t = text.trim();
    let rel = if let Some(p) = t.strip_suffix('%') {
        match p.trim().parse::<f64>() {
            Ok(v) if v.is_finite() => v / 100.0,
            _ => {
                c.push(
                    field,
                    format!("spread '{text}' is not a percentage"),
                    Some("write it like \"5 %\" or with the property's unit".into()),
                );
                return None;
            }
        }
    } else {
        let abs = c.quantity(field, text, kind)?;
        let v = value?;
        abs / v
    };
    if !(0.0..=1.0).contains(&rel) {
        c.push(
            field,
            format!("spread '{text}' must lie between 0 and 100 % of the value"),
            None,
        );
        return None;
    }
    Some(rel)
}

#[cfg(test)]
mod tests {
    use super::*;

    pub(crate) const GOOD: &str = r#"(
    format: "oblique-materials/1",
    maintainer: "test",
    sources: { "T": "test table", "MEM": "from memory" },
    materials: [
        (
            id: "al", name: "Al", condition: "O",
            density: (value: "2700 kg/m3", source: "T"),
            hugoniot_c0: (value: "5.35 km/s", source: "T"),
            hugoniot_s: (value: "1.34", source: "T"),
            vickers_hardness: (value: "107 HV", source: "T"),
            yield_strength: (value: "276 MPa", source: "T"),
            tensile_strength: (value: "310 MPa", source: "T"),
            bulk_modulus: (value: "67.5 GPa", source: "T"),
            shear_modulus: (value: "26 GPa", source: "T"),
            melting_temperature: (value: "582 degC", source: "T", note: "solidus"),
            thermal_conductivity: (value: "167 W/(m K)", source: "T"),
            specific_heat: (value: "896 J/(kg K)", source: "T"),
            electrical_conductivity: (value: "43 %IACS", source: "MEM"),
        ),
    ],
)"#;

    #[test]
    fn loads_a_good_file() {
        let (_, recs) = parse_material_file("m.ron", GOOD).unwrap();
        assert_eq!(recs.len(), 1);
        assert!((recs[0].material.melting_temperature.si() - 855.15).abs() < 1e-9);
        assert_eq!(recs[0].sources["electrical_conductivity"].key, "MEM");
    }

    #[test]
    fn reports_every_problem_with_its_place() {
        let bad = GOOD
            .replace("\"2700 kg/m3\"", "\"2700\"")
            .replace("source: \"MEM\"", "source: \"MEMO\"")
            .replace("\"26 GPa\"", "\"26 MPa\"");
        let err = parse_material_file("m.ron", &bad).unwrap_err();
        let text = err.to_string();
        assert_eq!(err.0.len(), 3, "{text}");
        assert!(
            text.contains("m.ron:8:30: field `materials[0].density.value`: '2700' has no unit"),
            "{text}"
        );
        assert!(text.contains("did you mean \"MEM\"?"), "{text}");
        assert!(text.contains("plausible range"), "{text}");
    }

    #[test]
    fn misspelt_key_names_the_fix() {
        let bad = GOOD.replace("condition:", "conditon:");
        let err = parse_material_file("m.ron", &bad).unwrap_err();
        let d = &err.0[0];
        assert_eq!((d.line, d.col), (7, 35), "{err}");
        assert_eq!(
            d.hint.as_deref(),
            Some("did you mean `condition`?"),
            "{err}"
        );
    }

    #[test]
    fn spreads_parse_relative_and_absolute_and_refuse_nonsense() {
        let text = |spread: &str| {
            GOOD.replace(
                "density: (value: \"2700 kg/m3\", source: \"T\")",
                &format!("density: (value: \"2700 kg/m3\", source: \"T\", spread: {spread})"),
            )
        };
        let (_, recs) = parse_material_file("m.ron", &text("\"5 %\"")).expect("5 %");
        let p = &recs[0].sources["density"];
        assert!((p.relative_spread.expect("spread") - 0.05).abs() < 1e-12);
        let (_, recs) = parse_material_file("m.ron", &text("\"27 kg/m3\"")).expect("absolute");
        let rel = recs[0].sources["density"].relative_spread.expect("spread");
        assert!((rel - 0.01).abs() < 1e-9, "{rel}");
        assert!(recs[0].sources["hugoniot_c0"].relative_spread.is_none());
        for bad in ["\"150 %\"", "\"-1 %\"", "\"x %\"", "\"5 m/s\""] {
            assert!(parse_material_file("m.ron", &text(bad)).is_err(), "{bad}");
        }
    }
}
