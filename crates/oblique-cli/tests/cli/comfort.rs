//! Everyday command-line comfort (issue 17): quantities typed as on paper get exact hints,
//! words match in any case, range errors name their end, RON syntax errors point at the cause.

use super::*;

const TUBE: &[&str] = &[
    "estimate",
    "mpw-tube",
    "--machine",
    "harbourside-bank-300uf",
    "--coil",
    "harbourside-coil-42mm",
    "--flyer",
    "aa6061-t6",
    "--flyer-thickness",
    "1mm",
    "--tube-outer-radius",
    "20mm",
    "--standoff",
    "2mm",
];

fn with<'a>(base: &[&'a str], extra: &[&'a str]) -> Vec<&'a str> {
    base.iter().chain(extra).copied().collect()
}

#[test]
fn a_value_split_by_the_shell_gets_the_exact_hint() {
    fails_with(
        &with(TUBE, &["--charge-voltage", "12", "kV"]),
        &["--charge-voltage: write 12kV without a space"],
    );
    // Quoted, the space is fine.
    let o = run(&with(TUBE, &["--charge-voltage", "8 kV"]));
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}

#[test]
fn a_unit_in_the_wrong_case_gets_did_you_mean() {
    fails_with(
        &with(TUBE, &["--charge-voltage", "8kv"]),
        &["did you mean 8kV?"],
    );
    fails_with(
        &[
            "check",
            "--pair",
            "demo-al6061-on-cu",
            "--velocity",
            "400M/S",
            "--angle",
            "10deg",
        ],
        &["--velocity", "did you mean 400m/s?"],
    );
}

#[test]
fn range_errors_name_the_end_that_is_wrong() {
    let sweep = [
        "sweep",
        "mpw-tube",
        "--machine",
        "harbourside-bank-300uf",
        "--coil",
        "harbourside-coil-42mm",
        "--pair",
        "demo-al6061-on-cu",
        "--tube-outer-radius",
        "20mm",
        "--steps",
        "4",
        "--standoff",
        "1mm,2mm",
        "--angle",
        "8deg",
        "--charge-voltage",
    ];
    fails_with(
        &with(&sweep, &["6kV..18kV"]),
        &["the range's upper end: charging voltage 18 kV exceeds"],
    );
    fails_with(
        &with(&sweep, &["6kV..12"]),
        &["the range's upper end: '12' has no unit"],
    );
}

#[test]
fn outcome_process_and_method_words_match_in_any_case_and_are_stored_canonically() {
    let dir = tempfile::tempdir().expect("temp dir");
    let lib = dir.path().to_str().expect("utf-8");
    let o = new_pair(dir.path(), "w");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let o = run(&[
        "--library",
        lib,
        "pair",
        "observe",
        "w",
        "--velocity",
        "400m/s",
        "--angle",
        "10deg",
        "--outcome",
        "Welded",
        "--process",
        "MAGNETIC-PULSE",
        "--source",
        "s",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let csv = dir.path().join("s.csv");
    std::fs::write(
        &csv,
        "velocity[m/s],angle[deg],outcome,source,process\n410,11,NOT WELDED,b,Explosive\n",
    )
    .expect("csv");
    let o = run(&[
        "--library",
        lib,
        "pair",
        "import",
        "w",
        csv.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = std::fs::read_to_string(dir.path().join("w.ron")).expect("pair");
    assert!(text.contains("outcome: \"welded\""), "{text}");
    assert!(text.contains("outcome: \"not-welded\""), "{text}");
    assert!(text.contains("process: \"explosive\""), "{text}");
    assert!(!text.contains("Welded") && !text.contains("NOT"), "{text}");
    // Every word flag takes any case (pair new's process, the convention, on/off, the shell).
    let o = run(&[
        "--library",
        lib,
        "pair",
        "new",
        "v",
        "--flyer",
        "aa6061-t6",
        "--parent",
        "cu-c11000",
        "--flyer-thickness",
        "1mm",
        "--process",
        "Magnetic-Pulse",
        "--convention",
        "Normal-To-Flyer",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = std::fs::read_to_string(dir.path().join("v.ron")).expect("pair");
    assert!(text.contains("\"magnetic-pulse\""), "{text}");
    let o = run(&[
        "check",
        "--flyer",
        "aa6061-t6",
        "--parent",
        "cu-c11000",
        "--flyer-thickness",
        "1mm",
        "--convention",
        "Bisector",
        "--velocity",
        "400m/s",
        "--angle",
        "12deg",
        "--velocity-sd",
        "5%",
        "--samples",
        "200",
        "--model-uncertainty",
        "ON",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let o = run(&["completions", "PowerShell"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}

#[test]
fn a_missing_bracket_is_reported_at_its_line() {
    let dir = tempfile::tempdir().expect("temp dir");
    let lib = dir.path().to_str().expect("utf-8");
    let o = new_pair(dir.path(), "b");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let path = dir.path().join("b.ron");
    let text = std::fs::read_to_string(&path).expect("pair");
    let line = text
        .lines()
        .position(|l| l.contains("deribas_lower: (enabled: true, k: 0.6),"))
        .expect("the criteria line")
        + 1;
    std::fs::write(
        &path,
        text.replace(
            "deribas_lower: (enabled: true, k: 0.6),",
            "deribas_lower: (enabled: true, k: 0.6,",
        ),
    )
    .expect("write");
    let o = run(&["--library", lib, "pair", "validate"]);
    assert_eq!(o.status.code(), Some(2));
    let err = format!("{}{}", stdout(&o), stderr(&o));
    assert!(err.contains(&format!("b.ron:{line}:")), "{err}");
    assert!(err.contains("never closed"), "{err}");
    assert!(
        err.contains(&format!(
            "add the missing `)` before the end of line {line}"
        )),
        "{err}"
    );
    // A bracket closed later is not blamed: a wrong value inside it is reported where it is.
    std::fs::write(
        &path,
        "(format: \"oblique-window/1\", name: \"b\",\n  flyer: 12,\n)",
    )
    .expect("write");
    let o = run(&["--library", lib, "pair", "validate"]);
    let err = format!("{}{}", stdout(&o), stderr(&o));
    assert!(
        err.contains("b.ron:2:9: field `flyer`: expected string"),
        "{err}"
    );
    assert!(!err.contains("never closed"), "{err}");
}

#[test]
fn new_writes_templates_the_library_refuses_until_filled() {
    let dir = tempfile::tempdir().expect("temp dir");
    let lib = dir.path().to_str().expect("utf-8");
    for (kind, name) in [
        ("bank", "b1"),
        ("coil", "c1"),
        ("bar-coil", "bc1"),
        ("explosive", "e1"),
    ] {
        let o = run(&["--library", lib, "new", kind, name]);
        assert_eq!(o.status.code(), Some(0), "{kind}: {}", stderr(&o));
        let text = std::fs::read_to_string(dir.path().join(format!("machines/{name}.ron")))
            .expect("template");
        assert!(text.contains("FILL IN"), "{text}");
    }
    // A second time: refused, the first kept.
    let o = run(&["--library", lib, "new", "bank", "b1"]);
    assert_eq!(o.status.code(), Some(2));
    // An unfilled template does not break other work, and asking for it shows its problems.
    let tube = [
        "--library",
        lib,
        "estimate",
        "mpw-tube",
        "--coil",
        "harbourside-coil-42mm",
        "--flyer",
        "aa6061-t6",
        "--flyer-thickness",
        "1mm",
        "--tube-outer-radius",
        "20mm",
        "--standoff",
        "2mm",
        "--charge-voltage",
        "8kV",
        "--machine",
    ];
    let o = run(&with(&tube, &["harbourside-bank-300uf"]));
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stderr(&o).contains("warning: skipped"), "{}", stderr(&o));
    fails_with(&with(&tube, &["b1"]), &["could not be loaded", "FILL IN"]);
    let o = run(&["--library", lib, "pair", "validate"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(format!("{}{}", stdout(&o), stderr(&o)).contains("b1.ron"));
    // Every value filled in but the sources and the description left as the template's: still
    // refused, each placeholder named at its line.
    let path = dir.path().join("machines/b1.ron");
    let text = std::fs::read_to_string(&path).expect("bank");
    let filled = text
        .replacen("value: \"FILL IN\"", "value: \"300 uF\"", 1)
        .replacen("value: \"FILL IN\"", "value: \"12 kV\"", 1)
        .replacen("frequency: \"FILL IN\"", "frequency: \"45 kHz\"", 1)
        .replacen("peak_ratio: \"FILL IN\"", "peak_ratio: \"3.0\"", 1)
        .replacen("date: \"FILL IN\"", "date: \"2026-11-30\"", 1);
    assert!(!filled.contains(": \"FILL IN\""), "{filled}");
    std::fs::write(&path, filled).expect("write");
    let o = run(&["--library", lib, "pair", "validate"]);
    assert_eq!(o.status.code(), Some(2));
    let all = format!("{}{}", stdout(&o), stderr(&o));
    assert!(all.contains("b1.ron:8:"), "{all}");
    let b1: Vec<&str> = all
        .lines()
        .filter(|l| l.contains("b1.ron:") && !l.contains("bc1.ron"))
        .collect();
    assert_eq!(b1.len(), 4, "{all}");
    assert!(
        b1.iter()
            .all(|l| l.contains("still the template's placeholder")),
        "{all}"
    );
}

#[test]
fn one_unit_and_one_word_per_thing_across_views() {
    // The melting point in degrees Celsius in the list, as in `material show` (the files').
    let o = run(&["material", "list"]);
    let out = stdout(&o);
    assert!(out.contains("Tm degC"), "{out}");
    let cu = out
        .lines()
        .find(|l| l.contains("cu-c11000"))
        .expect("copper");
    assert!(cu.trim_end().ends_with("1065"), "{cu}");
    // The Wittman form is the file's word in JSON, not a number.
    let o = run(&[
        "check",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "--json",
    ]);
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).expect("JSON");
    let melt = v["criteria"]
        .as_array()
        .expect("criteria")
        .iter()
        .find(|c| c["id"] == "melting-upper")
        .expect("the melting limit");
    assert_eq!(melt["constants"]["form"], "a");
}

#[test]
fn json_lines_input_keeps_its_column_order_in_a_csv_map() {
    let dir = tempfile::tempdir().expect("temp dir");
    let input = dir.path().join("in.jsonl");
    std::fs::write(
        &input,
        "{\"velocity[m/s]\":400,\"angle[deg]\":10,\"position[mm]\":0,\"zeta\":\"z\",\"alpha\":\"a\"}\n",
    )
    .expect("input");
    let out = dir.path().join("m.csv");
    let o = run(&[
        "map",
        input.to_str().expect("utf-8"),
        "--pair",
        "demo-al6061-on-cu",
        "-o",
        out.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let header = std::fs::read_to_string(&out).expect("map");
    assert!(
        header.starts_with("row,velocity[m/s],angle[deg],position[mm],zeta,alpha,"),
        "{header}"
    );
}

#[test]
fn a_boundary_is_added_from_the_command_line_and_every_new_shot_says_if_the_window_agrees() {
    let dir = tempfile::tempdir().expect("temp dir");
    let lib = dir.path().to_str().expect("utf-8");
    let o = new_pair(dir.path(), "bd");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let before = std::fs::read_to_string(dir.path().join("bd.ron")).expect("pair");
    let o = run(&[
        "--library",
        lib,
        "pair",
        "boundary",
        "add",
        "bd",
        "--label",
        "lowest welding velocity",
        "--plane",
        "angle-impact-velocity",
        "--point",
        "330m/s,5deg",
        "--point",
        "310m/s,15deg",
        "--weld-side",
        "right",
        "--provenance",
        "drawn by hand (test)",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let after = std::fs::read_to_string(dir.path().join("bd.ron")).expect("pair");
    assert!(
        after.contains("label: \"lowest welding velocity\""),
        "{after}"
    );
    let head = &before[..before.find("boundaries: [").expect("list")];
    assert!(after.starts_with(head), "bytes before the list changed");
    // Shots: one the window agrees with, one it does not.
    let observe = |v: &str, outcome: &str| {
        run(&[
            "--library",
            lib,
            "pair",
            "observe",
            "bd",
            "--velocity",
            v,
            "--angle",
            "10deg",
            "--outcome",
            outcome,
            "--source",
            "s",
        ])
    };
    let o = observe("400m/s", "welded");
    assert!(
        stdout(&o).contains("the window agrees (predicted welded)"),
        "{}",
        stdout(&o)
    );
    let o = observe("300m/s", "welded");
    assert!(
        stdout(&o).contains("DISAGREES: it predicts not-welded"),
        "{}",
        stdout(&o)
    );
    assert!(
        stdout(&o).contains("lowest welding velocity"),
        "{}",
        stdout(&o)
    );
    // Outside the validity domain (Vp above 2000 m/s) the window claims no verdict: the shot
    // neither agrees nor disagrees, as in `pair agreement`.
    let o = observe("3000m/s", "welded");
    let out = stdout(&o);
    assert!(
        out.contains("outside the window's validity domain: no verdict claimed"),
        "{out}"
    );
    assert!(!out.contains("agrees (predicted"), "{out}");
    // A second boundary with the same label is refused: outputs name each boundary by it.
    fails_with(
        &[
            "--library",
            lib,
            "pair",
            "boundary",
            "add",
            "bd",
            "--label",
            "lowest welding velocity",
            "--plane",
            "angle-impact-velocity",
            "--point",
            "340m/s,5deg",
            "--point",
            "320m/s,15deg",
            "--weld-side",
            "right",
            "--provenance",
            "p",
        ],
        &["already boundaries[0]'s"],
    );
    // Fewer than two points is refused.
    fails_with(
        &[
            "--library",
            lib,
            "pair",
            "boundary",
            "add",
            "bd",
            "--label",
            "x",
            "--plane",
            "angle-impact-velocity",
            "--point",
            "330m/s,5deg",
            "--weld-side",
            "right",
            "--provenance",
            "p",
        ],
        &["at least two points"],
    );
}

#[test]
fn check_names_the_nearest_trials_and_a_point_beyond_them_is_outside_the_trial_data() {
    let dir = tempfile::tempdir().expect("temp dir");
    let lib = dir.path().to_str().expect("utf-8");
    let o = new_pair(dir.path(), "narrow");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    // Every trial between 7 and 14 deg.
    for (v, a) in [
        ("420m/s", "7deg"),
        ("450m/s", "10deg"),
        ("480m/s", "14deg"),
        ("500m/s", "12deg"),
    ] {
        let o = run(&[
            "--library",
            lib,
            "pair",
            "observe",
            "narrow",
            "--velocity",
            v,
            "--angle",
            a,
            "--outcome",
            "welded",
            "--source",
            "s",
        ]);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    }
    let check = |angle: &str| {
        run(&[
            "--library",
            lib,
            "check",
            "--pair",
            "narrow",
            "--velocity",
            "460m/s",
            "--angle",
            angle,
            "--json",
        ])
    };
    let v: serde_json::Value = serde_json::from_str(&stdout(&check("25deg"))).expect("JSON");
    assert_eq!(v["beyond_trials"], true, "{v}");
    let v: serde_json::Value = serde_json::from_str(&stdout(&check("11deg"))).expect("JSON");
    assert_eq!(v["beyond_trials"], false, "{v}");
    let near = v["nearest_trials"].as_array().expect("nearest");
    assert_eq!(near.len(), 3);
    assert_eq!(near[0]["shot"], 2, "{v}");
    let text = stdout(&run(&[
        "--library",
        lib,
        "check",
        "--pair",
        "narrow",
        "--velocity",
        "460m/s",
        "--angle",
        "25deg",
    ]));
    assert!(
        text.contains("OUTSIDE the trial data") || text.contains("outside the trial data"),
        "{text}"
    );
    assert!(text.contains("nearest trials"), "{text}");
}

#[test]
fn a_dash_is_standard_input_or_output() {
    // Plot and report to standard output (the format by default: SVG, HTML).
    let o = run(&[
        "plot",
        "--pair",
        "demo-al6061-on-cu",
        "--point",
        "450m/s,10deg",
        "-o",
        "-",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).starts_with("<svg"), "{}", &stdout(&o)[..60]);
    let o = run(&[
        "report",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "-o",
        "-",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).starts_with("<!DOCTYPE html>"));
    // Shots from standard input.
    let dir = tempfile::tempdir().expect("temp dir");
    let lib = dir.path().to_str().expect("utf-8");
    let o = new_pair(dir.path(), "stdin");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_oblique"))
        .args(["--library", lib, "pair", "import", "stdin", "-"])
        .stdin(std::process::Stdio::piped())
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .expect("spawn");
    {
        use std::io::Write;
        let mut input = child.stdin.take().expect("stdin");
        input
            .write_all(b"velocity[m/s],angle[deg],outcome,source\n405,10,welded,piped\n")
            .expect("write");
    }
    let o = child.wait_with_output().expect("runs");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = std::fs::read_to_string(dir.path().join("stdin.ron")).expect("pair");
    assert!(text.contains("\"piped\""), "{text}");
}

#[test]
fn pair_validate_takes_a_pair_name_for_its_file() {
    let dir = tempfile::tempdir().expect("temp dir");
    let lib = dir.path().to_str().expect("utf-8");
    std::fs::write(dir.path().join("broken.ron"), "(name: \"broken\",").expect("write");
    let o = run(&["--library", lib, "pair", "validate", "broken"]);
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("broken.ron:1:"), "{}", stderr(&o));
    let o = run(&["--library", lib, "pair", "validate", "demo-al6061-on-cu"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}
