//! Tests of the parent module.

use super::*;

fn origin(name: &str) -> Origin {
    Origin {
        display: name.into(),
        path: None,
        sha256: String::new(),
    }
}

const BANK: &str = r#"// test bank (invented)
(
    format: "oblique-machine/1",
    name: "t-bank",
    maintainer: "tests",
    revisions: [(date: "2026-12-01", note: "created")],
    bank: (
        capacitance: (value: "300 uF", source: "invented"),
        max_voltage: (value: "12 kV", source: "invented"),
        ring_down: (frequency: "45.25 kHz", peak_ratio: "3.02", source: "invented record"),
    ),
)
"#;

#[test]
fn every_built_in_machine_file_loads() {
    let m = Machines::load(&[]).expect("built-in machine files load");
    let n = BUILTIN_FILES
        .iter()
        .filter(|(r, _)| r.starts_with("machines/"))
        .count();
    assert_eq!(m.items.len(), n);
    assert!(n >= 2, "a demo bank and a demo coil are shipped");
    for rec in m.items.values() {
        assert!(
            rec.invented.is_some(),
            "built-in machine files are invented demos"
        );
        assert!(builtin_text(&rec.name).is_some());
    }
}

#[test]
fn ring_down_gives_l_and_r_when_not_written() {
    let (_, rec) = parse_machine_file(origin("b.ron"), BANK).expect("valid");
    let MachineItem::Bank(b) = rec.item else {
        panic!("a bank")
    };
    // 300 uF, 40 nH, 4 mohm ring at 45.25 kHz with same-sign peak ratio 3.02 (closed form).
    assert!((b.inductance.value.si() / 40e-9 - 1.0).abs() < 0.01);
    assert!((b.resistance.value.si() / 4e-3 - 1.0).abs() < 0.01);
    assert!(b
        .inductance
        .source
        .contains("(exact form) from invented record"));
}

#[test]
fn every_problem_is_reported_with_its_place() {
    let bad = BANK
        .replace("\"300 uF\"", "\"-300 uF\"")
        .replace("\"12 kV\"", "\"12\"")
        .replace("source: \"invented record\"", "source: \"\"");
    let e = parse_machine_file(origin("b.ron"), &bad).unwrap_err();
    let text = e.to_string();
    assert!(text.contains("b.ron:8:"), "{text}");
    assert!(text.contains("bank.capacitance.value"), "{text}");
    assert!(text.contains("bank.max_voltage.value"), "{text}");
    assert!(text.contains("bank.ring_down.source"), "{text}");
}

#[test]
fn calibration_append_keeps_the_file_and_validates() {
    let entry = CalibrationEntry {
        efficiency: "0.674".into(),
        model: "mpw-tube".into(),
        coil: Some("c".into()),
        date: "2026-12-01".into(),
        measured_velocity: "410 m/s".into(),
        charge_voltage: "8 kV".into(),
        standoff: "2.5 mm".into(),
        flyer: Some("aa6061-t6".into()),
        flyer_thickness: Some("1 mm".into()),
        settings: "test".into(),
        velocity_uncertainty: Some("12 m/s".into()),
        source: "record \"7\"".into(),
    };
    let once = append_calibration_text(Path::new("b.ron"), BANK, &entry).unwrap();
    assert!(once.starts_with(&BANK[..BANK.rfind(')').unwrap_or(0) - 1]));
    let twice = append_calibration_text(Path::new("b.ron"), &once, &entry).unwrap();
    let (_, rec) = parse_machine_file(origin("b.ron"), &twice).expect("valid");
    assert_eq!(rec.calibrations.len(), 2);
    assert_eq!(
        rec.calibration_for("mpw-tube", Some("c")).map(|c| c.index),
        Some(1)
    );
    assert!(rec.calibration_for("mpw-sheet", Some("c")).is_none());
}

#[test]
fn user_files_load_shadow_and_warn_on_inconsistent_ring_down() {
    let dir = tempfile::tempdir().expect("temp dir");
    std::fs::create_dir_all(dir.path().join(MACHINES_DIR)).expect("folder");
    let text = BANK.replace(
        "        ring_down:",
        "        inductance: (value: \"55 nH\", source: \"old label\"),\n        ring_down:",
    );
    std::fs::write(dir.path().join("machines/t.ron"), text).expect("write");
    let m = Machines::load(&[dir.path().to_path_buf()]).expect("loads");
    let (rec, b) = m.bank("t-bank").expect("a bank");
    assert!(!rec.is_builtin());
    assert!(
        (b.inductance.value.si() - 55e-9).abs() < 1e-15,
        "the written value wins"
    );
    assert!(
        m.warnings.iter().any(|w| w.contains("differs")),
        "{:?}",
        m.warnings
    );
    assert!(m.compression_coil("t-bank").is_err());
    assert!(m.get("t-bnak").unwrap_err().contains("t-bank"));
}

#[test]
fn dates() {
    assert!(is_iso_date("2026-12-01"));
    assert!(!is_iso_date("2026-13-01"));
    assert!(!is_iso_date("1/12/2026"));
}
