//! The built-in material values against the published tables they cite (issue 14), and every
//! other value marked: from memory, derived, a stand-in, or from a supplier's datasheet with no
//! handbook value read, as `docs/material-data.md` lists it.

use oblique_window::Library;
use std::collections::BTreeSet;

/// Each value taken from a published table: material, property, the value as written in
/// `windows/materials.ron`, its source key, and the table (the row the number comes from).
const PUBLISHED: &[(&str, &str, &str, &str, &str)] = &[
    // Steinberg 1996 (LLNL UCRL-MA-106439), read via the Uintah transcription.
    (
        "aa1100-o",
        "density",
        "2707 kg/m3",
        "S96",
        "SCG_Aluminum1100-O: rho0 2.707 g/cm3",
    ),
    (
        "aa1100-o",
        "hugoniot_c0",
        "5.386 km/s",
        "S96",
        "SCG_Aluminum1100-O: C0 5.386 km/s",
    ),
    (
        "aa1100-o",
        "hugoniot_s",
        "1.339",
        "S96",
        "SCG_Aluminum1100-O: S1 1.339",
    ),
    (
        "ti6al4v",
        "density",
        "4419 kg/m3",
        "S96",
        "SCG_TitaniumAluminum6Vanadium4: rho0 4.419",
    ),
    (
        "ti6al4v",
        "hugoniot_c0",
        "5.13 km/s",
        "S96",
        "SCG_TitaniumAluminum6Vanadium4: C0 5.130",
    ),
    (
        "ti6al4v",
        "hugoniot_s",
        "1.028",
        "S96",
        "SCG_TitaniumAluminum6Vanadium4: S1 1.028",
    ),
    (
        "az31b-o",
        "shear_modulus",
        "16.5 GPa",
        "S96",
        "SCG_Magnesium (AZ31B-H24): mu0 16.5 GPa",
    ),
    (
        "steel-1018",
        "hugoniot_c0",
        "4.578 km/s",
        "S96",
        "4340 steel RC 38 (stand-in): C0 4.578",
    ),
    (
        "steel-1018",
        "hugoniot_s",
        "1.33",
        "S96",
        "4340 steel RC 38 (stand-in): S1 1.33",
    ),
    // McQueen, Marsh, Taylor, Fritz & Carter, appendix of Kinslow (ed.) 1970, via D-EOS.
    (
        "cu-c11000",
        "density",
        "8930 kg/m3",
        "K70",
        "Cu: rho0 8.930 g/cm3",
    ),
    (
        "cu-c11000",
        "hugoniot_c0",
        "3.940 km/s",
        "K70",
        "Cu: C0 3.940 km/s",
    ),
    ("cu-c11000", "hugoniot_s", "1.489", "K70", "Cu: s 1.489"),
    (
        "az31b-o",
        "density",
        "1780 kg/m3",
        "K70",
        "Mg AZ31B: rho0 1.780",
    ),
    (
        "az31b-o",
        "hugoniot_c0",
        "4.522 km/s",
        "K70",
        "Mg AZ31B: C0 4.522",
    ),
    ("az31b-o", "hugoniot_s", "1.242", "K70", "Mg AZ31B: s 1.242"),
    (
        "ss304",
        "density",
        "7896 kg/m3",
        "K70",
        "SS 304: rho0 7.896",
    ),
    (
        "ss304",
        "hugoniot_c0",
        "4.569 km/s",
        "K70",
        "SS 304: C0 4.569",
    ),
    ("ss304", "hugoniot_s", "1.490", "K70", "SS 304: s 1.490"),
    ("ti-gr2", "density", "4528 kg/m3", "K70", "Ti: rho0 4.528"),
    ("ti-gr2", "hugoniot_c0", "5.220 km/s", "K70", "Ti: C0 5.220"),
    ("ti-gr2", "hugoniot_s", "0.767", "K70", "Ti: s 0.767"),
    ("ta", "density", "16654 kg/m3", "K70", "Ta: rho0 16.654"),
    ("ta", "hugoniot_c0", "3.414 km/s", "K70", "Ta: C0 3.414"),
    ("ta", "hugoniot_s", "1.20", "K70", "Ta: s 1.20"),
    (
        "aa5083-o",
        "hugoniot_c0",
        "5.328 km/s",
        "K70",
        "Al 2024 (stand-in): C0 5.328",
    ),
    (
        "aa5083-o",
        "hugoniot_s",
        "1.338",
        "K70",
        "Al 2024 (stand-in): s 1.338",
    ),
    // Meyers 1994, ch. 4 table of Us-up parameters, via D-EOS (3 significant figures).
    (
        "aa6061-t6",
        "density",
        "2700 kg/m3",
        "M94",
        "Al 6061: rho0 2.70",
    ),
    (
        "aa6061-t6",
        "hugoniot_c0",
        "5.35 km/s",
        "M94",
        "Al 6061: C0 5.35",
    ),
    ("aa6061-t6", "hugoniot_s", "1.34", "M94", "Al 6061: S 1.34"),
    ("ni200", "density", "8870 kg/m3", "M94", "Ni: rho0 8.87"),
    ("ni200", "hugoniot_c0", "4.60 km/s", "M94", "Ni: C0 4.60"),
    ("ni200", "hugoniot_s", "1.44", "M94", "Ni: S 1.44"),
    (
        "brass-c26000",
        "hugoniot_c0",
        "3.73 km/s",
        "M94",
        "brass (stand-in): C0 3.73",
    ),
    (
        "brass-c26000",
        "hugoniot_s",
        "1.43",
        "M94",
        "brass (stand-in): S 1.43",
    ),
    // Kaye & Laby / Hertzberg 2012: shear moduli of polycrystalline metals.
    (
        "aa1100-o",
        "shear_modulus",
        "26.1 GPa",
        "KL-H12",
        "Al 26.1 GPa",
    ),
    (
        "cu-c11000",
        "shear_modulus",
        "48.3 GPa",
        "KL-H12",
        "Cu 48.3 GPa",
    ),
    (
        "steel-1018",
        "shear_modulus",
        "81.6 GPa",
        "KL-H12",
        "Fe 81.6 GPa",
    ),
    (
        "ti-gr2",
        "shear_modulus",
        "43.8 GPa",
        "KL-H12",
        "Ti 43.8 GPa",
    ),
    (
        "ni200",
        "shear_modulus",
        "76.0 GPa",
        "KL-H12",
        "Ni 76.0 GPa",
    ),
    ("ta", "shear_modulus", "69.2 GPa", "KL-H12", "Ta 69.2 GPa"),
    // Haynes, CRC Handbook of Chemistry and Physics, via mendeleev 1.3.0.
    (
        "ni200",
        "specific_heat",
        "444 J/(kg K)",
        "MDL",
        "Ni 0.444 J/(g K)",
    ),
    (
        "ta",
        "melting_temperature",
        "3017 degC",
        "MDL",
        "Ta 3290.15 K",
    ),
    (
        "ta",
        "specific_heat",
        "140 J/(kg K)",
        "MDL",
        "Ta 0.140 J/(g K)",
    ),
    (
        "ti-gr2",
        "melting_temperature",
        "1943.15 K",
        "MDL",
        "Ti 1943.15 K",
    ),
    // Aluminum Association typical values (Aluminum Standards and Data), as reproduced.
    (
        "aa6061-t6",
        "vickers_hardness",
        "107 HV",
        "AA-6061",
        "6061-T6 typical, HB 95 converted",
    ),
    (
        "aa6061-t6",
        "yield_strength",
        "276 MPa",
        "AA-6061",
        "6061-T6 typical yield",
    ),
    (
        "aa6061-t6",
        "tensile_strength",
        "310 MPa",
        "AA-6061",
        "6061-T6 typical ultimate",
    ),
    (
        "aa6061-t6",
        "melting_temperature",
        "582 degC",
        "AA-6061",
        "6061 solidus",
    ),
    (
        "aa6061-t6",
        "thermal_conductivity",
        "167 W/(m K)",
        "AA-6061",
        "6061-T6 at 25 degC",
    ),
    (
        "aa5083-o",
        "density",
        "2660 kg/m3",
        "AA-5083",
        "5083 density 2.66",
    ),
    (
        "aa5083-o",
        "vickers_hardness",
        "87 HV",
        "AA-5083",
        "5083-O typical, HB 77 converted",
    ),
    (
        "aa5083-o",
        "yield_strength",
        "145 MPa",
        "AA-5083",
        "5083-O typical yield",
    ),
    (
        "aa5083-o",
        "tensile_strength",
        "290 MPa",
        "AA-5083",
        "5083-O typical ultimate",
    ),
    (
        "aa5083-o",
        "shear_modulus",
        "26.4 GPa",
        "AA-5083",
        "5083 shear modulus",
    ),
];

/// Source keys of published tables (compilations, handbooks, standards, papers).
const PUBLISHED_KEYS: &[&str] = &[
    "S96", "K70", "M94", "Ma80", "Ma80-B", "Z23", "KL-H12", "MDL", "AA-6061", "AA-5083", "CDA",
    "B160",
];
/// The project's markers: from memory, derived here.
const MARKERS: &[&str] = &["MEM", "DER"];
/// Supplier datasheets, shops' and other web pages, and a package with no source named: values
/// with these keys are not from a published table, and `docs/material-data.md` lists each one.
const NOT_PUBLISHED: &[&str] = &[
    "ST-6061", "ST-5083", "ST-AZ31", "BTI-1100", "BTI-5083", "BTI-6061", "BTI-Ti64", "AI",
    "SA-blog", "HUS", "SHL", "OLIN", "LFA", "DB", "AZOM", "1018a", "1018b", "1018c", "304a",
    "304b", "TI2a", "TI2b", "TI2c", "ESPI", "TI64a", "SMC", "TA1", "TA2", "ALFA", "SPL", "PMG",
];

fn lib() -> Library {
    Library::load(&[]).expect("the built-in library loads")
}

fn docs() -> String {
    let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../../docs/material-data.md");
    std::fs::read_to_string(p).expect("docs/material-data.md")
}

/// The (material, property) rows of a table in `docs/material-data.md` between a marker line
/// and the next blank line: `| material | property | ... |`.
fn doc_rows(docs: &str, marker: &str) -> BTreeSet<(String, String)> {
    let start = docs
        .find(marker)
        .unwrap_or_else(|| panic!("docs/material-data.md lacks '{marker}'"));
    docs[start..]
        .lines()
        .skip_while(|l| !l.starts_with('|'))
        .take_while(|l| l.starts_with('|'))
        .filter_map(|l| {
            let cells: Vec<&str> = l.split('|').map(str::trim).collect();
            let (m, p) = (cells.get(1)?, cells.get(2)?);
            (!m.is_empty() && !m.starts_with('-') && *m != "material")
                .then(|| (m.to_string(), p.to_string()))
        })
        .collect()
}

/// Every value from a published table is the table's number, with the table's key.
#[test]
fn each_value_is_its_tables() {
    let lib = lib();
    for (id, prop, value, key, row) in PUBLISHED {
        let rec = &lib.materials[*id];
        let p = &rec.sources[prop];
        assert_eq!(
            &p.as_written, value,
            "{id} {prop}: the table ({key}: {row})"
        );
        assert_eq!(&p.key, key, "{id} {prop}: cites {key} ({row})");
    }
}

/// Every value cites a published table, or is marked: from memory or derived (its key), a
/// stand-in (its note), or from a datasheet or web page, listed in the documentation.
#[test]
fn every_value_names_a_published_table_or_is_marked() {
    let lib = lib();
    let docs = docs();
    let listed = doc_rows(&docs, "<!-- not-from-a-published-table -->");
    let memory = doc_rows(&docs, "<!-- from-memory -->");
    let published: BTreeSet<(String, String)> = PUBLISHED
        .iter()
        .map(|r| (r.0.to_string(), r.1.to_string()))
        .collect();
    let mut unpublished = BTreeSet::new();
    for (id, rec) in lib
        .materials
        .iter()
        .filter(|(_, r)| r.origin.starts_with("built-in"))
    {
        for (prop, p) in &rec.sources {
            let k = p.key.as_str();
            let at = (id.clone(), (*prop).to_string());
            if PUBLISHED_KEYS.contains(&k) {
                assert!(
                    published.contains(&at),
                    "{id} {prop} cites {k}: add it to PUBLISHED with its table row"
                );
            } else if k == "MEM" {
                assert!(
                    memory.contains(&at),
                    "{id} {prop} is from memory: list it in docs/material-data.md"
                );
            } else if MARKERS.contains(&k) {
                assert!(
                    p.note.as_deref().is_some_and(|n| !n.is_empty()),
                    "{id} {prop}: DER without its formula"
                );
            } else {
                assert!(
                    NOT_PUBLISHED.contains(&k),
                    "{id} {prop}: unclassified key {k}"
                );
                unpublished.insert(at);
            }
        }
    }
    assert_eq!(
        unpublished, listed,
        "the values not from a published table and docs/material-data.md's list of them"
    );
}

/// Where published values differ by more than 5 %, the spread is recorded (issue 14: the
/// Hugoniot slope of Ti grade 2, 1018 steel and brass; the shear moduli of Cu, Ti grade 2 and
/// 304; the 5083 stand-in; strengths and conductivities that differ by temper or source).
#[test]
fn spreads_are_recorded_where_tables_differ() {
    let lib = lib();
    for (id, prop, at_least) in [
        ("ti-gr2", "hugoniot_s", 0.2),
        ("steel-1018", "hugoniot_s", 0.05),
        ("brass-c26000", "hugoniot_s", 0.05),
        ("cu-c11000", "shear_modulus", 0.04),
        ("ti-gr2", "shear_modulus", 0.05),
        ("ss304", "shear_modulus", 0.05),
        ("aa5083-o", "hugoniot_c0", 0.02),
        ("aa5083-o", "hugoniot_s", 0.02),
        ("ti-gr2", "thermal_conductivity", 0.1),
        ("steel-1018", "thermal_conductivity", 0.05),
        ("cu-c11000", "yield_strength", 0.05),
        ("ti-gr2", "tensile_strength", 0.05),
    ] {
        let s = lib.materials[id].sources[prop].relative_spread;
        assert!(
            s.is_some_and(|s| s >= at_least),
            "{id} {prop}: spread {s:?}"
        );
    }
}
