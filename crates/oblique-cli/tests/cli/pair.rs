//! `oblique material` and `oblique pair`: listing, creating, recording, importing, validating,
//! agreement, and the safety of the user's files.

use super::*;
use serde_json::Value;

#[test]
fn material_show_json_has_check_keys_conductivity_and_sources() {
    let o = run(&["material", "show", "aa6061-t6", "--json"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
    for k in [
        "id",
        "density_kg_m3",
        "bulk_sound_speed_m_s",
        "hugoniot_slope",
        "melting_temperature_k",
        "electrical_conductivity_s_m",
        "sources",
    ] {
        assert!(v.get(k).is_some(), "missing {k}");
    }
    assert!(v["sources"]["density"]["key"].is_string());
    let o = run(&["material", "list", "--json"]);
    let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
    let ids: Vec<&str> = v
        .as_array()
        .unwrap()
        .iter()
        .map(|m| m["id"].as_str().unwrap())
        .collect();
    for id in [
        "aa1100-o",
        "aa6061-t6",
        "aa5083-o",
        "cu-c11000",
        "brass-c26000",
        "az31b-o",
        "steel-1018",
        "ss304",
        "ti-gr2",
        "ti6al4v",
        "ni200",
        "ta",
    ] {
        assert!(ids.contains(&id), "missing material {id}");
    }
    fails_with(
        &["material", "show", "ss30"],
        &["unknown material id 'ss30'", "ss304"],
    );
}

#[test]
fn pair_list_json_keys() {
    let o = run(&["pair", "list", "--json"]);
    let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
    let first = &v.as_array().unwrap()[0];
    for k in [
        "name",
        "flyer",
        "parent",
        "flyer_thickness_m",
        "observations",
    ] {
        assert!(first.get(k).is_some(), "missing {k}");
    }
}

fn lib() -> tempfile::TempDir {
    tempfile::tempdir().unwrap()
}

fn in_lib(dir: &std::path::Path, args: &[&str]) -> std::process::Output {
    let mut full = vec!["--library", dir.to_str().unwrap()];
    full.extend_from_slice(args);
    run_in(dir, &full)
}

#[test]
fn new_user_workflow_create_record_import_agree_check() {
    let d = lib();
    let p = d.path();
    let o = in_lib(
        p,
        &[
            "pair",
            "new",
            "al-on-cu",
            "--flyer",
            "aa6061-t6",
            "--parent",
            "cu-c11000",
            "--flyer-thickness",
            "1.5mm",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(p.join("al-on-cu.ron").is_file());
    // The new file names its process and the mixed jetting rule (issue 14).
    let text = std::fs::read_to_string(p.join("al-on-cu.ron")).unwrap();
    assert!(text.contains("process: \"magnetic-pulse\""), "{text}");
    assert!(text.contains("mixed: \"supersonic-side-polar\""), "{text}");
    // An explosive window needs its convention said (records use more than one).
    let o = in_lib(
        p,
        &[
            "pair",
            "new",
            "cu-on-steel",
            "--flyer",
            "cu-c11000",
            "--parent",
            "steel-1018",
            "--flyer-thickness",
            "3mm",
            "--process",
            "explosive",
        ],
    );
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("--convention"), "{}", stderr(&o));
    assert!(!p.join("cu-on-steel.ron").exists());
    // An explosive window starts with the pressure limit off, and loads without a reason.
    let o = in_lib(
        p,
        &[
            "pair",
            "new",
            "cu-on-steel",
            "--flyer",
            "cu-c11000",
            "--parent",
            "steel-1018",
            "--flyer-thickness",
            "3mm",
            "--convention",
            "bisector",
            "--process",
            "explosive",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let o = in_lib(p, &["pair", "show", "cu-on-steel"]);
    assert!(
        stdout(&o).contains("pressure-lower   off"),
        "{}",
        stdout(&o)
    );
    let shots = [
        ("420m/s", "8deg", "welded"),
        ("300m/s", "10deg", "not-welded"),
        ("460m/s", "12deg", "welded"),
        ("372m/s", "13deg", "partial"),
        ("700m/s", "9deg", "melted"),
    ];
    for (i, (v, a, out)) in shots.iter().enumerate() {
        let src = format!("shot {i}");
        let o = in_lib(
            p,
            &[
                "pair",
                "observe",
                "al-on-cu",
                "--velocity",
                v,
                "--angle",
                a,
                "--outcome",
                out,
                "--source",
                &src,
            ],
        );
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    }
    std::fs::write(p.join("shots.csv"), "velocity[km/s],angle[deg],outcome,source,note\n0.45,11,welded,log 7,\"two, commas\"\n0.5,9,welded,log 8,\n").unwrap();
    let o = in_lib(p, &["pair", "import", "al-on-cu", "shots.csv", "--json"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["observations"], 7);
    let o = in_lib(p, &["pair", "agreement", "al-on-cu", "--json"]);
    let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["observations"], 7);
    for k in ["agreeing", "table", "disagreements"] {
        assert!(v.get(k).is_some(), "missing {k}");
    }
    let o = in_lib(
        p,
        &[
            "check",
            "--pair",
            "al-on-cu",
            "--velocity",
            "400m/s",
            "--angle",
            "11deg",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let o = in_lib(p, &["pair", "validate"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let o = in_lib(p, &["pair", "show", "al-on-cu", "--json"]);
    let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["observation_list"][5]["note"], "two, commas");
    assert!((v["observation_list"][5]["velocity_m_s"].as_f64().unwrap() - 450.0).abs() < 1e-9);
}

#[test]
fn observe_keeps_comments_and_every_other_byte() {
    let d = lib();
    let p = d.path();
    assert_eq!(
        in_lib(
            p,
            &[
                "pair",
                "new",
                "k",
                "--flyer",
                "aa6061-t6",
                "--parent",
                "ss304",
                "--flyer-thickness",
                "1mm"
            ]
        )
        .status
        .code(),
        Some(0)
    );
    let f = p.join("k.ron");
    let original = std::fs::read_to_string(&f).unwrap().replace(
        "description: \"\",",
        "description: \"\", // a comment of mine",
    );
    std::fs::write(&f, &original).unwrap();
    let o = in_lib(
        p,
        &[
            "pair",
            "observe",
            "k",
            "--velocity",
            "400m/s",
            "--angle",
            "9deg",
            "--outcome",
            "welded",
            "--source",
            "s",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let after = std::fs::read_to_string(&f).unwrap();
    let cut = original.find("    ],\n)").unwrap();
    assert!(
        after.starts_with(&original[..cut]),
        "prefix changed:\n{after}"
    );
    assert!(after.ends_with("    ],\n)\n"));
    assert!(after.contains("// a comment of mine"));
}

#[test]
fn a_failed_append_leaves_the_file_as_it_was() {
    let d = lib();
    let p = d.path();
    assert_eq!(
        in_lib(
            p,
            &[
                "pair",
                "new",
                "k",
                "--flyer",
                "aa6061-t6",
                "--parent",
                "ss304",
                "--flyer-thickness",
                "1mm"
            ]
        )
        .status
        .code(),
        Some(0)
    );
    let f = p.join("k.ron");
    let before = std::fs::read(&f).unwrap();
    // A bad row in the middle: nothing is written.
    std::fs::write(
        p.join("bad.csv"),
        "velocity[m/s],angle[deg],outcome,source\n400,9,welded,a\n400,95,welded,b\n400,9,weldd,c\n",
    )
    .unwrap();
    let o = in_lib(p, &["pair", "import", "k", "bad.csv"]);
    assert_eq!(o.status.code(), Some(2));
    let err = stderr(&o);
    assert!(
        err.contains("bad.csv:3: field 'angle'") && err.contains("bad.csv:4: field 'outcome'"),
        "{err}"
    );
    assert_eq!(std::fs::read(&f).unwrap(), before);
}

#[test]
fn a_file_changed_since_it_was_read_is_not_overwritten() {
    let d = lib();
    let p = d.path();
    assert_eq!(
        in_lib(
            p,
            &[
                "pair",
                "new",
                "k",
                "--flyer",
                "aa6061-t6",
                "--parent",
                "ss304",
                "--flyer-thickness",
                "1mm"
            ]
        )
        .status
        .code(),
        Some(0)
    );
    let o = in_lib(p, &["pair", "show", "k", "--json"]);
    let sha = serde_json::from_str::<Value>(&stdout(&o)).unwrap()["sha256"]
        .as_str()
        .unwrap()
        .to_string();
    let f = p.join("k.ron");
    let edited = std::fs::read_to_string(&f).unwrap().replace(
        "description: \"\"",
        "description: \"edited by a colleague\"",
    );
    std::fs::write(&f, &edited).unwrap();
    let o = in_lib(
        p,
        &[
            "pair",
            "observe",
            "k",
            "--velocity",
            "400m/s",
            "--angle",
            "9deg",
            "--outcome",
            "welded",
            "--source",
            "s",
            "--if-unchanged",
            &sha,
        ],
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("changed on disk"), "{}", stderr(&o));
    assert_eq!(std::fs::read_to_string(&f).unwrap(), edited);
}

#[test]
fn a_write_killed_before_the_rename_leaves_the_file_intact() {
    let d = lib();
    let p = d.path();
    assert_eq!(
        in_lib(
            p,
            &[
                "pair",
                "new",
                "k",
                "--flyer",
                "aa6061-t6",
                "--parent",
                "ss304",
                "--flyer-thickness",
                "1mm"
            ]
        )
        .status
        .code(),
        Some(0)
    );
    let f = p.join("k.ron");
    let before = std::fs::read(&f).unwrap();
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_oblique"))
        .args([
            "--library",
            p.to_str().unwrap(),
            "pair",
            "observe",
            "k",
            "--velocity",
            "400m/s",
            "--angle",
            "9deg",
            "--outcome",
            "welded",
            "--source",
            "s",
        ])
        .env("OBLIQUE_FAULT_PAUSE_BEFORE_RENAME_MS", "20000")
        .env_remove("OBLIQUE_LIBRARY")
        .spawn()
        .unwrap();
    // Wait until the temporary file exists (the write is under way), then kill the process.
    let mut seen = false;
    for _ in 0..400 {
        if std::fs::read_dir(p)
            .unwrap()
            .filter_map(Result::ok)
            .any(|e| e.file_name().to_string_lossy().starts_with(".k.ron.tmp"))
        {
            seen = true;
            break;
        }
        std::thread::sleep(std::time::Duration::from_millis(25));
    }
    child.kill().unwrap();
    child.wait().unwrap();
    assert!(seen, "the temporary file never appeared");
    assert_eq!(
        std::fs::read(&f).unwrap(),
        before,
        "the file changed although the write was killed"
    );
    // The library still loads: the leftover temporary file is hidden and ignored.
    let o = in_lib(p, &["pair", "validate"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}

#[test]
fn built_in_pairs_are_read_only_and_new_needs_a_library() {
    fails_with(
        &[
            "pair",
            "observe",
            "demo-al6061-on-cu",
            "--velocity",
            "400m/s",
            "--angle",
            "9deg",
            "--outcome",
            "welded",
            "--source",
            "s",
        ],
        &["built in and read-only"],
    );
    fails_with(
        &[
            "pair",
            "new",
            "x",
            "--flyer",
            "aa6061-t6",
            "--parent",
            "ss304",
            "--flyer-thickness",
            "1mm",
        ],
        &["--library"],
    );
    fails_with(
        &[
            "pair",
            "observe",
            "demo-al6061-on-cu",
            "--velocity",
            "400m/s",
            "--angle",
            "9deg",
            "--outcome",
            "weldd",
            "--source",
            "s",
        ],
        &["--outcome"],
    );
}

#[test]
fn the_built_in_library_validates() {
    let o = run(&["pair", "validate"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}

/// Each broken file in `tests/broken/` gives its own message with file, line and column.
#[test]
fn broken_corpus_reports_every_problem_with_its_place() {
    let dir = repo().join("tests/broken");
    let check = |file: &str, fragments: &[&str]| {
        let path = dir.join(file);
        let o = run(&["pair", "validate", path.to_str().unwrap()]);
        let err = stderr(&o);
        assert_eq!(o.status.code(), Some(2), "{file}: {err}");
        for f in fragments {
            assert!(err.contains(f), "{file}: expected '{f}' in\n{err}");
        }
        assert!(!err.contains("panicked"));
    };
    check(
        "misspelt-key.ron",
        &[
            "misspelt-key.ron:7:5:",
            "flyer_thicknes",
            "did you mean `flyer_thickness`?",
        ],
    );
    check(
        "missing-unit.ron",
        &[
            "missing-unit.ron:20:20:",
            "observations[0].velocity",
            "has no unit",
        ],
    );
    check(
        "angle-zero.ron",
        &[
            "angle-zero.ron:20:",
            "observations[0].angle",
            "outside (0, 90) deg",
        ],
    );
    check(
        "angle-95.ron",
        &["observations[0].angle", "'95 deg' is outside (0, 90) deg"],
    );
    check(
        "boundary-one-point.ron",
        &[
            "boundary-one-point.ron:15:",
            "boundaries[0].points",
            "at least two points",
        ],
    );
    check(
        "boundary-crossing.ron",
        &["boundaries[0].points", "crosses itself"],
    );
    check(
        "unknown-outcome.ron",
        &[
            "observations[0].outcome",
            "unknown outcome 'weldd'",
            "did you mean \"welded\"?",
        ],
    );
    check(
        "unknown-material.ron",
        &[
            "unknown-material.ron:5:12:",
            "unknown material id 'aa6061'",
            "aa6061-t6",
        ],
    );
    let (a, b) = (dir.join("duplicate-a.ron"), dir.join("duplicate-b.ron"));
    let o = run(&["pair", "validate", a.to_str().unwrap(), b.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("duplicate pair name 'twin'"),
        "{}",
        stderr(&o)
    );
    // All at once: every file's problems in one run.
    let all: Vec<String> = std::fs::read_dir(&dir)
        .unwrap()
        .filter_map(Result::ok)
        .map(|e| e.path().display().to_string())
        .collect();
    let mut args = vec!["pair", "validate"];
    args.extend(all.iter().map(String::as_str));
    let o = run(&args);
    assert!(stderr(&o).contains("9 problem(s)"), "{}", stderr(&o));
}

#[test]
fn shadowing_a_built_in_pair_warns() {
    let d = lib();
    let p = d.path();
    let text = std::fs::read_to_string(repo().join("windows/demo-al6061-on-cu.ron")).unwrap();
    std::fs::write(p.join("mine.ron"), text).unwrap();
    let o = in_lib(p, &["pair", "list"]);
    assert_eq!(o.status.code(), Some(0));
    assert!(stderr(&o).contains("shadows"), "{}", stderr(&o));
    // The list names the user's file (invented data, so marked), not just "invented".
    assert!(
        stdout(&o).contains("mine.ron (invented data)"),
        "{}",
        stdout(&o)
    );
}

/// Two files in one folder that define the same pair name make the name ambiguous: a command
/// that asks for it is refused (exit 2) naming both files, instead of taking whichever file
/// sorts first.
#[test]
fn a_pair_name_defined_twice_in_one_folder_is_refused() {
    let dir = tempfile::tempdir().expect("temp dir");
    for f in ["duplicate-a.ron", "duplicate-b.ron"] {
        std::fs::copy(repo().join("tests/broken").join(f), dir.path().join(f)).expect("copy");
    }
    let o = run_in(
        dir.path(),
        &[
            "--library",
            ".",
            "check",
            "--pair",
            "twin",
            "--velocity",
            "400m/s",
            "--angle",
            "10deg",
        ],
    );
    assert_eq!(o.status.code(), Some(2), "{}", stdout(&o));
    let e = stderr(&o);
    assert!(e.contains("duplicate pair name 'twin'"), "{e}");
    assert!(
        e.contains("duplicate-a.ron") && e.contains("duplicate-b.ron"),
        "{e}"
    );
}

/// pair import lists every problem of every row in one run: a negative uncertainty beside an
/// unknown outcome is named too, and nothing is written.
#[test]
fn import_names_negative_uncertainties_with_the_other_problems() {
    let dir = tempfile::tempdir().expect("temp dir");
    let d = dir.path();
    let o = run_in(
        d,
        &[
            "--library",
            ".",
            "pair",
            "new",
            "p",
            "--flyer",
            "aa6061-t6",
            "--parent",
            "cu-c11000",
            "--flyer-thickness",
            "1mm",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let before = std::fs::read(d.join("p.ron")).expect("pair");
    std::fs::write(
        d.join("s.csv"),
        "velocity[m/s],angle[deg],outcome,source,velocity_uncertainty[m/s],angle_uncertainty[deg]\n400,10,weldd,a,-5,1\n410,11,welded,b,5,-0.5\n",
    )
    .expect("csv");
    let o = run_in(d, &["--library", ".", "pair", "import", "p", "s.csv"]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("s.csv:2: field 'velocity_uncertainty': must not be negative"),
        "{e}"
    );
    assert!(
        e.contains("s.csv:3: field 'angle_uncertainty': must not be negative"),
        "{e}"
    );
    assert!(e.contains("s.csv:2: field 'outcome'"), "{e}");
    assert!(e.contains("3 problem(s)"), "{e}");
    assert_eq!(std::fs::read(d.join("p.ron")).expect("pair"), before);
}

#[test]
fn pair_export_prints_the_file_so_a_built_in_pair_can_be_copied_and_changed() {
    let o = run(&["pair", "export", "demo-al6061-on-cu"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let builtin = std::fs::read(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("../../windows/demo-al6061-on-cu.ron"),
    )
    .expect("the built-in file");
    assert_eq!(o.stdout, builtin, "export is the file byte for byte");
    // The copy in a user folder shadows the built-in pair and takes a saved fit.
    let dir = tempfile::tempdir().expect("temp dir");
    std::fs::write(dir.path().join("demo-al6061-on-cu.ron"), &o.stdout).expect("copy");
    let lib = dir.path().to_str().expect("utf-8");
    let o = run(&[
        "--library",
        lib,
        "pair",
        "fit",
        "demo-al6061-on-cu",
        "--save",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let o = run(&["--library", lib, "pair", "export", "demo-al6061-on-cu"]);
    assert!(stdout(&o).contains("fitted"), "{}", stdout(&o));
    // The read-only message names the command.
    let o = run(&["pair", "fit", "demo-al6061-on-cu", "--save"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("oblique pair export demo-al6061-on-cu"),
        "{}",
        stderr(&o)
    );
    fails_with(&["pair", "export", "no-such-pair"], &["unknown pair"]);
}

#[test]
fn importing_the_same_file_twice_warns_of_each_repeated_shot_and_keeps_both() {
    let dir = tempfile::tempdir().expect("temp dir");
    let lib = dir.path().to_str().expect("utf-8");
    let o = new_pair(dir.path(), "t");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let csv = dir.path().join("s.csv");
    std::fs::write(
        &csv,
        "velocity[m/s],angle[deg],outcome,source\n400,10,welded,log 1\n380,9,not-welded,log 2\n",
    )
    .expect("csv");
    let csv = csv.to_str().expect("utf-8");
    let o = run(&["--library", lib, "pair", "import", "t", csv]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(!stderr(&o).contains("repeats"), "{}", stderr(&o));
    let o = run(&["--library", lib, "pair", "import", "t", csv]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let err = stderr(&o);
    assert!(err.contains("s.csv:2: shot #3 repeats shot #1"), "{err}");
    assert!(err.contains("s.csv:3: shot #4 repeats shot #2"), "{err}");
    let text = std::fs::read_to_string(dir.path().join("t.ron")).expect("pair");
    assert_eq!(text.matches("source:").count(), 4, "both kept");
}

#[test]
fn a_shot_and_a_boundary_are_removed_without_opening_the_file_every_other_line_kept() {
    let dir = tempfile::tempdir().expect("temp dir");
    let lib = dir.path().to_str().expect("utf-8");
    let o = run(&["pair", "export", "demo-al6061-on-cu"]);
    let file = dir.path().join("demo-al6061-on-cu.ron");
    std::fs::write(&file, &o.stdout).expect("copy");
    let before = String::from_utf8(o.stdout).expect("utf-8");
    let o = run(&[
        "--library",
        lib,
        "pair",
        "remove-shot",
        "demo-al6061-on-cu",
        "--shot",
        "10",
        "--json",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: Value = serde_json::from_slice(&o.stdout).expect("json");
    assert_eq!(v["observations"], 15);
    let cut = v["removed_text"].as_str().expect("removed text");
    assert!(cut.contains("HBW-2026 shot 10,"), "{cut}");
    let after = std::fs::read_to_string(&file).expect("pair");
    // The file is the old one without exactly the removed lines.
    assert_eq!(before.replacen(cut, "", 1), after);
    let o = run(&[
        "--library",
        lib,
        "pair",
        "boundary",
        "remove",
        "demo-al6061-on-cu",
        "--label",
        "tip bounce-back angle (HBW-2026)",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(
        stdout(&o).contains("it now has 1 boundary"),
        "{}",
        stdout(&o)
    );
    let o = run(&[
        "--library",
        lib,
        "pair",
        "show",
        "demo-al6061-on-cu",
        "--json",
    ]);
    let v: Value = serde_json::from_slice(&o.stdout).expect("json");
    assert_eq!(v["boundaries"], 1);
    // Wrong numbers and labels name the flag; a stale --if-unchanged is refused.
    fails_with(
        &[
            "--library",
            lib,
            "pair",
            "remove-shot",
            "demo-al6061-on-cu",
            "--shot",
            "16",
        ],
        &["--shot", "#1 to #15"],
    );
    fails_with(
        &[
            "--library",
            lib,
            "pair",
            "boundary",
            "remove",
            "demo-al6061-on-cu",
            "--label",
            "x",
        ],
        &["--label", "lowest welding velocity seen (HBW-2026)"],
    );
    let stale = "0".repeat(64);
    let o = run(&[
        "--library",
        lib,
        "pair",
        "remove-shot",
        "demo-al6061-on-cu",
        "--shot",
        "1",
        "--if-unchanged",
        &stale,
    ]);
    assert_ne!(o.status.code(), Some(0));
    assert_eq!(
        std::fs::read_to_string(&file)
            .expect("pair")
            .matches("(velocity:")
            .count(),
        15
    );
    // Built-in pairs stay read-only.
    fails_with(
        &["pair", "remove-shot", "demo-al6061-on-cu", "--shot", "1"],
        &["built in and read-only"],
    );
}

#[test]
fn observe_takes_a_zero_uncertainty_as_the_file_does_and_names_the_quantity_when_wrong() {
    let dir = tempfile::tempdir().expect("temp dir");
    assert_eq!(new_pair(dir.path(), "z").status.code(), Some(0));
    let observe = |extra: &[&str]| {
        let mut a = vec![
            "--library",
            ".",
            "pair",
            "observe",
            "z",
            "--velocity",
            "400m/s",
            "--angle",
            "10deg",
            "--outcome",
            "welded",
            "--source",
            "s",
        ];
        a.extend_from_slice(extra);
        run_in(dir.path(), &a)
    };
    let o = observe(&[
        "--velocity-uncertainty",
        "0m/s",
        "--angle-uncertainty",
        "0deg",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let o = observe(&["--angle-uncertainty", "-1deg"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("an angle uncertainty must be zero (exact) or above"),
        "{}",
        stderr(&o)
    );
    let o = observe(&["--velocity-uncertainty", "-1m/s"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("a velocity uncertainty must be zero"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn import_names_the_column_of_a_cell_that_is_not_utf8_and_a_row_of_the_wrong_length() {
    let dir = tempfile::tempdir().expect("temp dir");
    assert_eq!(new_pair(dir.path(), "u").status.code(), Some(0));
    let csv = dir.path().join("s.csv");
    std::fs::write(
        &csv,
        b"velocity[m/s],angle[deg],outcome,source\n400,10,welded,ab\xff\n410,10,welded,a,b\n",
    )
    .expect("csv");
    let o = run_in(
        dir.path(),
        &["--library", ".", "pair", "import", "u", "s.csv"],
    );
    assert_eq!(o.status.code(), Some(2));
    let err = stderr(&o);
    assert!(
        err.contains("s.csv:2: field 'source' (column 4) is not UTF-8 text"),
        "{err}"
    );
    assert!(
        err.contains("s.csv:3: the row has 5 field(s), the header 4"),
        "{err}"
    );
    assert!(err.contains("nothing was written"), "{err}");
}
