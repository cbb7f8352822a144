//! Data safety under concurrent writers and special files (each test failed before the folder
//! lock, the target resolution and the string-aware append existed).

use super::*;
use std::path::Path;

fn observe(dir: &Path, name: &str, source: &str) -> std::process::Output {
    run_in(
        dir,
        &[
            "--library",
            ".",
            "pair",
            "observe",
            name,
            "--velocity",
            "400m/s",
            "--angle",
            "10deg",
            "--outcome",
            "welded",
            "--source",
            source,
        ],
    )
}

#[test]
fn two_concurrent_writers_never_lose_an_acknowledged_shot() {
    let dir = tempfile::tempdir().expect("temp dir");
    assert_eq!(new_pair(dir.path(), "race").status.code(), Some(0));
    const PER_WRITER: usize = 60;
    let writers: Vec<_> = (0..2)
        .map(|w| {
            let d = dir.path().to_path_buf();
            std::thread::spawn(move || {
                let mut acked = Vec::new();
                for i in 0..PER_WRITER {
                    let tag = format!("writer {w} shot {i}");
                    let o = observe(&d, "race", &tag);
                    if o.status.code() == Some(0) {
                        acked.push(tag);
                    } else {
                        assert!(!stderr(&o).contains("panicked"), "{}", stderr(&o));
                    }
                }
                acked
            })
        })
        .collect();
    let mut acked = Vec::new();
    for w in writers {
        acked.extend(w.join().expect("writer thread"));
    }
    let text = std::fs::read_to_string(dir.path().join("race.ron")).expect("pair file");
    for tag in &acked {
        assert!(
            text.contains(&format!("\"{tag}\"")),
            "acknowledged shot '{tag}' is missing"
        );
    }
    assert_eq!(
        text.matches("source:").count(),
        acked.len(),
        "the file holds other shots than the acknowledged ones"
    );
    // With the lock, writers wait for each other instead of failing.
    assert_eq!(acked.len(), 2 * PER_WRITER);
}

#[test]
fn pair_new_from_two_processes_creates_once_and_never_replaces() {
    for round in 0..10 {
        let dir = tempfile::tempdir().expect("temp dir");
        let name = format!("twin{round}");
        let handles: Vec<_> = (0..2)
            .map(|_| {
                let d = dir.path().to_path_buf();
                let n = name.clone();
                std::thread::spawn(move || new_pair(&d, &n).status.code())
            })
            .collect();
        let codes: Vec<Option<i32>> = handles
            .into_iter()
            .map(|h| h.join().expect("thread"))
            .collect();
        let created = codes.iter().filter(|c| **c == Some(0)).count();
        assert_eq!(created, 1, "round {round}: exit codes {codes:?}");
    }
}

#[cfg(unix)]
#[test]
fn a_symlinked_pair_file_gets_the_shot_and_stays_a_link() {
    let dir = tempfile::tempdir().expect("temp dir");
    let shared = tempfile::tempdir().expect("shared dir");
    assert_eq!(new_pair(shared.path(), "shared").status.code(), Some(0));
    std::os::unix::fs::symlink(
        shared.path().join("shared.ron"),
        dir.path().join("shared.ron"),
    )
    .expect("symlink");
    let o = observe(dir.path(), "shared", "via the link");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stderr(&o).contains("symbolic link"), "{}", stderr(&o));
    let link = dir.path().join("shared.ron");
    assert!(std::fs::symlink_metadata(&link)
        .expect("meta")
        .file_type()
        .is_symlink());
    let target = std::fs::read_to_string(shared.path().join("shared.ron")).expect("target");
    assert!(target.contains("via the link"));
}

#[cfg(unix)]
#[test]
fn a_pair_file_keeps_its_mode() {
    use std::os::unix::fs::PermissionsExt;
    let dir = tempfile::tempdir().expect("temp dir");
    assert_eq!(new_pair(dir.path(), "private").status.code(), Some(0));
    let p = dir.path().join("private.ron");
    for mode in [0o600, 0o664] {
        std::fs::set_permissions(&p, std::fs::Permissions::from_mode(mode)).expect("chmod");
        let o = observe(dir.path(), "private", "mode test");
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        let now = std::fs::metadata(&p).expect("meta").permissions().mode() & 0o777;
        assert_eq!(now, mode, "mode {mode:o} became {now:o}");
    }
}

#[cfg(unix)]
#[test]
fn outputs_to_a_fifo_or_a_device_are_written_in_place() {
    let dir = tempfile::tempdir().expect("temp dir");
    let fifo = dir.path().join("plot.svg");
    let status = std::process::Command::new("mkfifo")
        .arg(&fifo)
        .status()
        .expect("mkfifo runs");
    assert!(status.success());
    let reader = {
        let f = fifo.clone();
        std::thread::spawn(move || std::fs::read(f).expect("read the fifo"))
    };
    let o = run_in(
        dir.path(),
        &[
            "plot",
            "--pair",
            "demo-al6061-on-cu",
            "--point",
            "450m/s,10deg",
            "-o",
            fifo.to_str().expect("utf-8"),
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let got = reader.join().expect("reader");
    assert!(got.starts_with(b"<svg"), "the SVG went through the pipe");
    let meta = std::fs::symlink_metadata(&fifo).expect("meta");
    use std::os::unix::fs::FileTypeExt;
    assert!(
        meta.file_type().is_fifo(),
        "the FIFO was replaced by a file"
    );
    // A device is written in place, never replaced (needs no privileges: /dev/null).
    let input = dir.path().join("in.csv");
    std::fs::write(
        &input,
        "position[mm],velocity[m/s],angle[deg]\n0,400,10\n1,410,11\n",
    )
    .expect("input");
    let o = run(&[
        "map",
        input.to_str().expect("utf-8"),
        "--pair",
        "demo-al6061-on-cu",
        "-o",
        "/dev/null",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(std::fs::symlink_metadata("/dev/null")
        .expect("meta")
        .file_type()
        .is_char_device());
}

#[test]
fn one_broken_pair_file_does_not_break_the_library() {
    let dir = tempfile::tempdir().expect("temp dir");
    assert_eq!(new_pair(dir.path(), "good").status.code(), Some(0));
    std::fs::write(
        dir.path().join("broken.ron"),
        "(\n    format: \"oblique-window/1\",\n    name: \"broken\",\n    flyer: 12,\n)\n",
    )
    .expect("write");
    let lib = dir.path().to_str().expect("utf-8");
    // Commands that do not need the broken file warn once and carry on.
    for args in [
        vec!["--library", lib, "material", "list"],
        vec![
            "--library",
            lib,
            "check",
            "--pair",
            "good",
            "--velocity",
            "400m/s",
            "--angle",
            "10deg",
        ],
        vec![
            "--library",
            lib,
            "check",
            "--flyer",
            "aa6061-t6",
            "--parent",
            "cu-c11000",
            "--flyer-thickness",
            "1mm",
            "--velocity",
            "400m/s",
            "--angle",
            "10deg",
            "--convention",
            "normal-to-flyer",
        ],
    ] {
        let o = run(&args);
        assert_eq!(o.status.code(), Some(0), "{args:?}: {}", stderr(&o));
        let err = stderr(&o);
        assert_eq!(err.matches("warning: skipped").count(), 1, "{err}");
        assert!(err.contains("broken.ron:"), "{err}");
    }
    // The command that needs it fails with the diagnostics, position included.
    let o = run(&[
        "--library",
        lib,
        "check",
        "--pair",
        "broken",
        "--velocity",
        "400m/s",
        "--angle",
        "10deg",
    ]);
    assert_eq!(o.status.code(), Some(2));
    let err = stderr(&o);
    assert!(err.contains("could not be loaded"), "{err}");
    assert!(err.contains("broken.ron:4:"), "{err}");
    // And pair validate lists it with exit 2.
    let o = run(&["--library", lib, "pair", "validate"]);
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn the_same_folder_twice_is_read_once() {
    let dir = tempfile::tempdir().expect("temp dir");
    assert_eq!(new_pair(dir.path(), "once").status.code(), Some(0));
    let lib = dir.path().to_str().expect("utf-8");
    let o = run(&["--library", lib, "--library", lib, "pair", "list"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(!stderr(&o).contains("duplicate"), "{}", stderr(&o));
    assert!(!stderr(&o).contains("shadows"), "{}", stderr(&o));
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_oblique"))
        .args(["--library", lib, "pair", "list"])
        .env("OBLIQUE_LIBRARY", lib)
        .output()
        .expect("runs");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(!stderr(&o).contains("duplicate"), "{}", stderr(&o));
}

#[test]
fn reserved_and_overlong_pair_names_are_refused() {
    let dir = tempfile::tempdir().expect("temp dir");
    for name in ["materials", "Machines"] {
        let o = new_pair(dir.path(), name);
        assert_eq!(o.status.code(), Some(2), "{name}");
        assert!(stderr(&o).contains("reserved"), "{}", stderr(&o));
    }
    let long = "p".repeat(245);
    let o = new_pair(dir.path(), &long);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("too long"), "{}", stderr(&o));
    assert!(!dir.path().join("materials.ron").exists());
}

#[test]
fn hostile_text_stays_text_in_svg_html_and_the_terminal() {
    let dir = tempfile::tempdir().expect("temp dir");
    assert_eq!(new_pair(dir.path(), "hostile").status.code(), Some(0));
    let lib = dir.path().to_str().expect("utf-8");
    let evil = "shot \u{1b}]0;pwned\u{7} \u{1b}[2J form\u{c}feed nul\u{0}";
    // A NUL cannot pass through a command line: the file gets it as a RON escape.
    let o = run(&[
        "--library",
        lib,
        "pair",
        "observe",
        "hostile",
        "--velocity",
        "400m/s",
        "--angle",
        "10deg",
        "--outcome",
        "welded",
        "--source",
        "shot \u{1b}]0;pwned\u{7} \u{1b}[2J form\u{c}feed",
    ]);
    // A source is one line of plain text: control characters are refused at the flag.
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("--source"), "{}", stderr(&o));
    // Free text (the description, a note) may hold anything; it must stay text where shown.
    let o = run(&[
        "--library",
        lib,
        "pair",
        "observe",
        "hostile",
        "--velocity",
        "400m/s",
        "--angle",
        "10deg",
        "--outcome",
        "welded",
        "--source",
        "shot 1",
        "--note",
        "note \u{1b}]0;pwned\u{7} \u{1b}[2J form\u{c}feed",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let path = dir.path().join("hostile.ron");
    let text = std::fs::read_to_string(&path).expect("pair");
    let at = text.find("description: ").expect("description");
    let end = at + text[at..].find(",\n").expect("end of description");
    let text = format!(
        "{}description: {}{}",
        &text[..at],
        oblique_window::write::ron_string(evil),
        &text[end..]
    );
    std::fs::write(&path, text).expect("write");
    for args in [
        vec!["--library", lib, "pair", "show", "hostile"],
        vec!["--library", lib, "pair", "agreement", "hostile"],
        vec![
            "--library",
            lib,
            "check",
            "--pair",
            "hostile",
            "--velocity",
            "400m/s",
            "--angle",
            "10deg",
        ],
    ] {
        let o = run(&args);
        assert_eq!(o.status.code(), Some(0), "{args:?}: {}", stderr(&o));
        for b in [&o.stdout, &o.stderr] {
            assert!(!b.contains(&0x1b), "{args:?}: raw ESC reached the terminal");
            assert!(!b.contains(&0x07), "{args:?}: raw BEL reached the terminal");
            assert!(
                !b.contains(&0x0c),
                "{args:?}: raw form feed reached the terminal"
            );
        }
    }
    let svg = dir.path().join("w.svg");
    let html = dir.path().join("r.html");
    let o = run(&[
        "--library",
        lib,
        "plot",
        "--pair",
        "hostile",
        "--point",
        "400m/s,10deg",
        "-o",
        svg.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let s = std::fs::read_to_string(&svg).expect("svg");
    roxmltree::Document::parse(&s).expect("the SVG is well-formed XML");
    let o = run(&[
        "--library",
        lib,
        "report",
        "--pair",
        "hostile",
        "--velocity",
        "400m/s",
        "--angle",
        "10deg",
        "-o",
        html.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let h = std::fs::read(&html).expect("html");
    for bad in [0u8, 0x1b, 0x07, 0x0c] {
        assert!(!h.contains(&bad), "byte {bad:#x} in the report");
    }
}

#[test]
fn absurd_observations_and_dates_are_refused_naming_the_field() {
    let dir = tempfile::tempdir().expect("temp dir");
    assert_eq!(new_pair(dir.path(), "absurd").status.code(), Some(0));
    let path = dir.path().join("absurd.ron");
    let text = std::fs::read_to_string(&path).expect("pair").replace(
        "    observations: [\n    ],",
        "    observations: [\n        (velocity: \"1e200 m/s\", angle: \"10 deg\", outcome: \"welded\", process: \"magnetic-pulse\", method: \"measured\", source: \"x\"),\n    ],",
    );
    std::fs::write(&path, text).expect("write");
    let lib = dir.path().to_str().expect("utf-8");
    let o = run(&["--library", lib, "pair", "agreement", "absurd"]);
    assert_eq!(o.status.code(), Some(2));
    let err = stderr(&o);
    assert!(err.contains("absurd.ron:"), "{err}");
    assert!(err.contains("observations[0].velocity"), "{err}");
    assert!(err.contains("10 km/s"), "{err}");
    let o = run(&[
        "--library",
        lib,
        "pair",
        "observe",
        "absurd",
        "--velocity",
        "400m/s",
        "--angle",
        "10deg",
        "--outcome",
        "welded",
        "--source",
        "x",
        "--date",
        "9999-12-31",
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("outside the accepted years 1900-2999"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn values_no_relation_covers_are_refused_naming_the_flag() {
    for (flag, value, needle) in [
        ("--velocity", "1e-320m/s", "1 mm/s to 100 km/s"),
        ("--velocity", "1e308m/s", "1 mm/s to 100 km/s"),
        ("--deribas-k", "1e308", "up to 1e6"),
        ("--deribas-k", "6", "published range"),
    ] {
        let mut args = vec!["check", "--pair", "demo-al6061-on-cu"];
        if flag != "--velocity" {
            args.extend(["--velocity", "400m/s"]);
        }
        if flag != "--angle" {
            args.extend(["--angle", "10deg"]);
        }
        args.extend([flag, value]);
        let o = run(&args);
        assert_eq!(o.status.code(), Some(2), "{args:?}");
        let err = stderr(&o);
        assert!(err.contains(flag), "{err}");
        assert!(err.contains(needle), "{err}");
        assert!(!err.contains("did not converge"), "{err}");
    }
}

#[test]
fn pair_import_words_problems_at_the_csv_row_and_refuses_a_doubled_column() {
    let dir = tempfile::tempdir().expect("temp dir");
    assert_eq!(new_pair(dir.path(), "imp").status.code(), Some(0));
    let lib = dir.path().to_str().expect("utf-8");
    let csv = dir.path().join("shots.csv");
    let import = |body: &str| {
        std::fs::write(&csv, body).expect("csv");
        run(&[
            "--library",
            lib,
            "pair",
            "import",
            "imp",
            csv.to_str().expect("utf-8"),
        ])
    };
    let o = import("velocity[m/s],angle[deg],outcome,source,source\n400,10,welded,a,b\n");
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("column 'source' appears twice"),
        "{}",
        stderr(&o)
    );
    let o = import(
        "velocity[m/s],angle[deg],outcome,source,process\n400,10,welded,a,magnetic-pulse\n\n400,10,welded,a,foo\n",
    );
    assert_eq!(o.status.code(), Some(2));
    let err = stderr(&o);
    assert!(err.contains("shots.csv:4: field 'process'"), "{err}");
    assert!(!err.contains("imp.ron:"), "{err}");
    // A byte-order mark and a blank line before the header are fine.
    let o = import("\u{feff}\nvelocity[m/s],angle[deg],outcome,source\n400,10,welded,a\n");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}

#[test]
fn a_pair_file_with_a_byte_order_mark_loads_and_keeps_it() {
    let dir = tempfile::tempdir().expect("temp dir");
    assert_eq!(new_pair(dir.path(), "bom").status.code(), Some(0));
    let path = dir.path().join("bom.ron");
    let text = std::fs::read_to_string(&path).expect("pair");
    std::fs::write(&path, format!("\u{feff}{}", text.replace('\n', "\r\n"))).expect("write");
    let o = observe(dir.path(), "bom", "after the BOM");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let after = std::fs::read_to_string(&path).expect("pair");
    assert!(after.starts_with('\u{feff}'));
    assert!(after.contains("after the BOM"));
    assert!(
        !after.replace("\r\n", "").contains('\n'),
        "CRLF kept throughout"
    );
}

#[test]
fn absurd_map_rows_are_refused_and_plots_finish() {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = dir.path().join("m.csv");
    let strip = dir.path().join("s.svg");
    let plane = dir.path().join("w.svg");
    for (body, needle) in [
        (
            "position[mm],velocity[m/s],angle[deg]\n0,1e39,10\n1,400,10\n",
            "above 100 km/s",
        ),
        (
            "position[m],velocity[m/s],angle[deg]\n0,400,10\n1e306,400,10\n",
            "beyond 1 km",
        ),
    ] {
        let input = dir.path().join("in.csv");
        std::fs::write(&input, body).expect("input");
        // Before, the strip's axis ticks looped for ever on these rows.
        let o = run(&[
            "map",
            input.to_str().expect("utf-8"),
            "--pair",
            "demo-al6061-on-cu",
            "-o",
            out.to_str().expect("utf-8"),
            "--strip-svg",
            strip.to_str().expect("utf-8"),
            "--window-svg",
            plane.to_str().expect("utf-8"),
        ]);
        assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
        assert!(stderr(&o).contains(needle), "{}", stderr(&o));
    }
    // The widest rows accepted still plot.
    let input = dir.path().join("wide.csv");
    std::fs::write(
        &input,
        "position[m],velocity[m/s],angle[deg]\n-1000,400,1e-5\n0,400,10\n1e-15,99999,10\n1000,0.001,89.99\n",
    )
    .expect("input");
    let o = run(&[
        "map",
        input.to_str().expect("utf-8"),
        "--pair",
        "demo-al6061-on-cu",
        "-o",
        out.to_str().expect("utf-8"),
        "--strip-svg",
        strip.to_str().expect("utf-8"),
        "--window-svg",
        plane.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    for f in [&strip, &plane] {
        let s = std::fs::read_to_string(f).expect("svg");
        roxmltree::Document::parse(&s).expect("well-formed SVG");
    }
}

#[test]
fn sizes_and_names_are_checked_before_any_work() {
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
        "--charge-voltage",
        "6kV..10kV",
        "--standoff",
        "1mm,2mm",
        "--angle",
        "8deg",
        "--steps",
    ];
    // Before: 34 GB allocated and an abort; 22 s and 7.8 GB before a refusal.
    for steps in ["4294967297", "1000000000"] {
        let mut args = sweep.to_vec();
        args.push(steps);
        let o = run(&args);
        assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
        assert!(
            stderr(&o).contains("more than the limit of 10000"),
            "{}",
            stderr(&o)
        );
    }
    let o = run(&[
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
        "--charge-voltage",
        "12.0001kV",
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("12.0001 kV exceeds"), "{}", stderr(&o));
    let dir = tempfile::tempdir().expect("temp dir");
    let o = run_in(
        dir.path(),
        &[
            "--library",
            ".",
            "calibrate",
            "ring-down",
            "--capacitance",
            "300uF",
            "--ring-frequency",
            "45kHz",
            "--peak-ratio",
            "1.6",
            "--rated-voltage",
            "10kV",
            "--source",
            "x",
            "--save-as",
            ".h",
        ],
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("must not start with a dot"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn outputs_on_the_same_file_or_on_an_input_are_refused_before_any_work() {
    let dir = tempfile::tempdir().expect("temp dir");
    let input = dir.path().join("in.csv");
    std::fs::write(&input, "position[mm],velocity[m/s],angle[deg]\n0,400,10\n").expect("input");
    let i = input.to_str().expect("utf-8");
    let at = |n: &str| dir.path().join(n).to_str().expect("utf-8").to_string();
    let (o, x, j) = (at("o.csv"), at("x.svg"), at("o.json"));
    let save = format!("save:{o}");
    for (extra, needle) in [
        (
            vec!["-o", &o, "--summary-json", &o],
            "also the output of -o",
        ),
        (
            vec!["-o", &o, "--strip-svg", &x, "--window-svg", &x],
            "also the output of --strip-svg",
        ),
        (vec!["-o", &o, "--bad-rows", &save], "also the output of -o"),
        (vec!["-o", &j, "--summary-json", i], "is the input file"),
    ] {
        let mut args = vec!["map", i, "--pair", "demo-al6061-on-cu"];
        args.extend(extra.iter().copied());
        let out = run(&args);
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        assert!(stderr(&out).contains(needle), "{}", stderr(&out));
        assert!(
            !Path::new(&o).exists() && !Path::new(&j).exists(),
            "work was done"
        );
    }
    let curve = at("c.csv");
    std::fs::write(&curve, "velocity[m/s],angle[deg]\n400,10\n").expect("curve");
    let out = run(&[
        "plot",
        "--pair",
        "demo-al6061-on-cu",
        "--curve",
        &curve,
        "-o",
        &curve,
    ]);
    assert_eq!(out.status.code(), Some(2));
    let out = run(&[
        "report",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "400m/s",
        "--angle",
        "10deg",
        "--curve",
        &curve,
        "-o",
        &curve,
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        stderr(&out).contains("the input of --curve"),
        "{}",
        stderr(&out)
    );
}

#[test]
fn non_utf8_pass_through_cells_are_kept_in_csv_and_counted_in_json() {
    let dir = tempfile::tempdir().expect("temp dir");
    let input = dir.path().join("in.csv");
    std::fs::write(
        &input,
        b"position[mm],velocity[m/s],angle[deg],note\n0,400,10,caf\xe9\n1,410,10,\"q\xff\"\n",
    )
    .expect("input");
    let csv = dir.path().join("o.csv");
    let jl = dir.path().join("o.jsonl");
    let i = input.to_str().expect("utf-8");
    let o = run(&[
        "map",
        i,
        "--pair",
        "demo-al6061-on-cu",
        "-o",
        csv.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let bytes = std::fs::read(&csv).expect("map");
    assert!(
        bytes.windows(4).any(|w| w == b"caf\xe9"),
        "CSV keeps the bytes"
    );
    let o = run(&[
        "map",
        i,
        "--pair",
        "demo-al6061-on-cu",
        "-o",
        jl.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let all = format!("{}{}", stdout(&o), stderr(&o));
    assert!(
        all.contains("2 pass-through cell(s) hold bytes that are not UTF-8"),
        "{all}"
    );
}

#[cfg(unix)]
#[test]
fn every_output_writer_writes_through_a_link_and_keeps_it() {
    let dir = tempfile::tempdir().expect("temp dir");
    let real = tempfile::tempdir().expect("target dir");
    let link = |name: &str| {
        let target = real.path().join(name);
        std::fs::write(&target, "old").expect("target");
        let l = dir.path().join(name);
        std::os::unix::fs::symlink(&target, &l).expect("symlink");
        (l, target)
    };
    let (plot, plot_t) = link("w.svg");
    let (report, report_t) = link("r.html");
    let (sweep, sweep_t) = link("s.svg");
    let (history, history_t) = link("h.csv");
    let p = |x: &Path| x.to_str().expect("utf-8").to_string();
    let commands: Vec<Vec<String>> = vec![
        [
            "plot",
            "--pair",
            "demo-al6061-on-cu",
            "--point",
            "450m/s,10deg",
            "-o",
            &p(&plot),
        ]
        .map(String::from)
        .to_vec(),
        [
            "report",
            "--pair",
            "demo-al6061-on-cu",
            "--velocity",
            "450m/s",
            "--angle",
            "10deg",
            "-o",
            &p(&report),
        ]
        .map(String::from)
        .to_vec(),
        [
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
            "--charge-voltage",
            "6kV..10kV",
            "--steps",
            "3",
            "--standoff",
            "1mm,2mm",
            "--angle",
            "8deg",
            "--plot",
            &p(&sweep),
        ]
        .map(String::from)
        .to_vec(),
        [
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
            "--charge-voltage",
            "8kV",
            "--history",
            &p(&history),
        ]
        .map(String::from)
        .to_vec(),
    ];
    for args in &commands {
        let a: Vec<&str> = args.iter().map(String::as_str).collect();
        let o = run(&a);
        assert_eq!(o.status.code(), Some(0), "{a:?}: {}", stderr(&o));
        // Each says it wrote through the link, as the library writes do.
        assert!(
            stderr(&o).contains("is a symbolic link: wrote through it"),
            "{a:?}: {}",
            stderr(&o)
        );
    }
    for (l, t) in [
        (plot, plot_t),
        (report, report_t),
        (sweep, sweep_t),
        (history, history_t),
    ] {
        assert!(
            std::fs::symlink_metadata(&l)
                .expect("meta")
                .file_type()
                .is_symlink(),
            "{} is no longer a link",
            l.display()
        );
        assert_ne!(
            std::fs::read(&t).expect("target"),
            b"old",
            "{} not written",
            t.display()
        );
    }
}

#[test]
fn a_huge_cell_is_not_echoed_whole() {
    let dir = tempfile::tempdir().expect("temp dir");
    let input = dir.path().join("big.csv");
    let cell = "x".repeat(10_000_000);
    std::fs::write(
        &input,
        format!("position[mm],velocity[m/s],angle[deg]\n0,{cell},10\n"),
    )
    .expect("input");
    let o = run(&[
        "map",
        input.to_str().expect("utf-8"),
        "--pair",
        "demo-al6061-on-cu",
    ]);
    assert_eq!(o.status.code(), Some(2));
    let err = stderr(&o);
    assert!(err.len() < 5_000, "{} bytes of message", err.len());
    assert!(err.contains("velocity"), "{}", &err[..err.len().min(500)]);
}

/// A user pair `p` in a fresh library folder, and an interface export beside it.
fn pair_folder() -> tempfile::TempDir {
    let dir = tempfile::tempdir().expect("temp dir");
    let o = run_in(
        dir.path(),
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
    std::fs::write(
        dir.path().join("interface.csv"),
        "position[mm],velocity[m/s],angle[deg]\n0,400,10\n",
    )
    .expect("interface");
    dir
}

/// An output that leads to a loaded library file, through a symbolic link or by its own name,
/// is refused (exit 2) and the pair file stays as it was.
#[cfg(unix)]
#[test]
fn an_output_never_replaces_a_library_file() {
    let dir = pair_folder();
    let d = dir.path();
    let before = std::fs::read(d.join("p.ron")).expect("pair");
    std::os::unix::fs::symlink(d.join("p.ron"), d.join("out.csv")).expect("link");
    for out in ["out.csv", "p.ron"] {
        let o = run_in(
            d,
            &[
                "--library",
                ".",
                "map",
                "interface.csv",
                "--pair",
                "p",
                "-o",
                out,
            ],
        );
        assert_eq!(o.status.code(), Some(2), "{out}: {}", stderr(&o));
        // By its own name the extension rule refuses it first; through the link, the library.
        if out == "out.csv" {
            assert!(stderr(&o).contains("library file"), "{}", stderr(&o));
        }
        let o = run_in(
            d,
            &[
                "--library",
                ".",
                "plot",
                "--pair",
                "p",
                "--velocity",
                "400m/s",
                "--angle",
                "10deg",
                "-o",
                out,
            ],
        );
        assert_ne!(
            o.status.code(),
            Some(0),
            "{out}: plot wrote over the pair file"
        );
    }
    assert_eq!(std::fs::read(d.join("p.ron")).expect("pair"), before);
}

/// A read-only output file is not silently replaced (even for root), and a read-only pair file
/// takes no observation; both exit 2 and keep the file.
#[cfg(unix)]
#[test]
fn read_only_files_are_not_replaced() {
    use std::os::unix::fs::PermissionsExt;
    let dir = pair_folder();
    let d = dir.path();
    std::fs::write(d.join("kept.csv"), "old\n").expect("write");
    std::fs::set_permissions(d.join("kept.csv"), std::fs::Permissions::from_mode(0o444))
        .expect("chmod");
    let o = run_in(
        d,
        &[
            "--library",
            ".",
            "map",
            "interface.csv",
            "--pair",
            "p",
            "-o",
            "kept.csv",
        ],
    );
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("read-only"), "{}", stderr(&o));
    assert_eq!(std::fs::read(d.join("kept.csv")).expect("read"), b"old\n");

    let before = std::fs::read(d.join("p.ron")).expect("pair");
    std::fs::set_permissions(d.join("p.ron"), std::fs::Permissions::from_mode(0o444))
        .expect("chmod");
    let o = run_in(
        d,
        &[
            "--library",
            ".",
            "pair",
            "observe",
            "p",
            "--velocity",
            "400m/s",
            "--angle",
            "10deg",
            "--outcome",
            "welded",
            "--source",
            "read-only test",
        ],
    );
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("read-only"), "{}", stderr(&o));
    assert_eq!(std::fs::read(d.join("p.ron")).expect("pair"), before);
}

/// `/dev/stdout` (a link to /proc/self/fd/1, whose pipe has no path) is written in place.
#[cfg(target_os = "linux")]
#[test]
fn dev_stdout_is_an_output() {
    let dir = pair_folder();
    let o = run_in(
        dir.path(),
        &[
            "--library",
            ".",
            "map",
            "interface.csv",
            "--pair",
            "p",
            "-o",
            "/dev/stdout",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).starts_with("row,position"), "{}", stdout(&o));
}

/// A device that never ends (`/dev/zero`) given where a file is read whole is refused with a
/// message naming the bound, not read until the memory runs out.
#[cfg(unix)]
#[test]
fn endless_inputs_are_refused() {
    let dir = pair_folder();
    let d = dir.path();
    for args in [
        vec!["--library", ".", "pair", "import", "p", "/dev/zero"],
        vec!["--library", ".", "pair", "validate", "/dev/zero"],
        vec![
            "--library",
            ".",
            "plot",
            "--pair",
            "p",
            "--points",
            "/dev/zero",
            "-o",
            "x.svg",
        ],
    ] {
        let o = run_in(d, &args);
        assert_eq!(o.status.code(), Some(2), "{args:?}: {}", stderr(&o));
        assert!(stderr(&o).contains("MiB"), "{args:?}: {}", stderr(&o));
    }
}

/// A line break in a one-line field (a source, a boundary label) is refused with the file,
/// line and field; given as a flag, the flag is named; a note may hold line breaks, and pair
/// show prints it on one line with `\n` shown, so that no user text starts a line of its own.
#[test]
fn user_text_cannot_fake_a_line() {
    let dir = pair_folder();
    let d = dir.path();
    let o = run_in(
        d,
        &[
            "--library",
            ".",
            "pair",
            "observe",
            "p",
            "--velocity",
            "400m/s",
            "--angle",
            "10deg",
            "--outcome",
            "welded",
            "--source",
            "log 7\nverdict: INSIDE the window",
        ],
    );
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("--source"), "{}", stderr(&o));
    assert!(stderr(&o).contains("one line"), "{}", stderr(&o));

    let text = std::fs::read_to_string(d.join("p.ron")).expect("pair");
    let tampered = text.replacen(
        "observations: [",
        "observations: [\n        (velocity: \"400 m/s\", angle: \"10 deg\", outcome: \"welded\", process: \"magnetic-pulse\", method: \"measured\", source: \"log 7\\nverdict: INSIDE\"),",
        1,
    );
    assert_ne!(tampered, text, "the test file has no observations list");
    std::fs::write(d.join("p.ron"), &tampered).expect("write");
    let o = run_in(d, &["--library", ".", "pair", "validate"]);
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    let e = stderr(&o);
    assert!(
        e.contains("observations[0].source") && e.contains("one line"),
        "{e}"
    );

    let noted = text.replacen(
        "observations: [",
        "observations: [\n        (velocity: \"400 m/s\", angle: \"10 deg\", outcome: \"welded\", process: \"magnetic-pulse\", method: \"measured\", source: \"log 7\", note: \"first line\\nverdict: INSIDE\"),",
        1,
    );
    std::fs::write(d.join("p.ron"), &noted).expect("write");
    let o = run_in(d, &["--library", ".", "pair", "show", "p", "--json"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let o = run_in(d, &["--library", ".", "pair", "show", "p"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(
        !stdout(&o).lines().any(|l| l.starts_with("verdict")),
        "{}",
        stdout(&o)
    );
}

/// Standard error (and output) on a pipe whose reader has gone (`oblique ... 2>&1 | head -1`):
/// the lines are lost, the exit code is the command's own, never a panic (101).
#[test]
fn a_closed_standard_error_keeps_the_exit_code() {
    let dir = tempfile::tempdir().expect("temp dir");
    // A library with a broken pair file: every command warns, pair validate fails.
    std::fs::write(dir.path().join("broken.ron"), "(name: \"broken\",").expect("write");
    let lib = dir.path().to_str().expect("utf-8 path");
    let cases: [(&[&str], i32); 4] = [
        (&["--library", lib, "material", "list"], 0),
        (&["--library", lib, "pair", "validate"], 2),
        (
            &[
                "check",
                "--pair",
                "no-such-pair",
                "--velocity",
                "450m/s",
                "--angle",
                "10deg",
            ],
            2,
        ),
        (&["check", "--velocity", "450", "--angle", "10deg"], 2),
    ];
    for (args, code) in cases {
        for _ in 0..3 {
            let (reader, writer) = std::io::pipe().expect("pipe");
            drop(reader);
            let (out_reader, out_writer) = std::io::pipe().expect("pipe");
            drop(out_reader);
            let status = Command::new(env!("CARGO_BIN_EXE_oblique"))
                .args(args)
                .current_dir(dir.path())
                .env_remove("OBLIQUE_LIBRARY")
                .stdout(out_writer)
                .stderr(writer)
                .status()
                .expect("the binary runs");
            assert_eq!(status.code(), Some(code), "{args:?}");
        }
    }
}

/// Removing shots while another shell records them: no removal is refused for the other's
/// appends (they never shift a number), no acknowledged shot is lost, none removed twice.
#[test]
fn removals_and_appends_at_once_lose_nothing_and_wait_for_each_other() {
    let dir = tempfile::tempdir().expect("temp dir");
    assert_eq!(new_pair(dir.path(), "mix").status.code(), Some(0));
    const N: usize = 25;
    for i in 0..N {
        assert_eq!(
            observe(dir.path(), "mix", &format!("old {i}"))
                .status
                .code(),
            Some(0)
        );
    }
    let d = dir.path().to_path_buf();
    let appender = std::thread::spawn(move || {
        (0..N)
            .filter(|i| observe(&d, "mix", &format!("new {i}")).status.code() == Some(0))
            .count()
    });
    let mut removed = 0;
    for _ in 0..N {
        let o = run_in(
            dir.path(),
            &[
                "--library",
                ".",
                "pair",
                "remove-shot",
                "mix",
                "--shot",
                "1",
            ],
        );
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        removed += 1;
    }
    let added = appender.join().expect("appender");
    assert_eq!(added, N);
    let text = std::fs::read_to_string(dir.path().join("mix.ron")).expect("pair");
    assert_eq!(text.matches("source:").count(), N + added - removed);
    for i in 0..N {
        assert!(
            text.contains(&format!("\"new {i}\"")),
            "acknowledged shot 'new {i}' lost"
        );
        assert!(
            !text.contains(&format!("\"old {i}\"")),
            "'old {i}' was to be removed"
        );
    }
}

/// A window file named otherwise than its pair (`w.ron` holding `name: "shop-al-cu"`, which the
/// format allows) that cannot be loaded: asking for the pair names the file and its problems,
/// not just "unknown pair", whether the file does not parse or parses and fails validation.
#[test]
fn a_broken_window_file_is_named_when_its_pair_is_asked_for() {
    let fixture = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data/map-lib/map-test-al-on-cu.ron"),
    )
    .expect("fixture");
    let renamed = fixture.replace("name: \"map-test-al-on-cu\"", "name: \"shop-al-cu\"");
    assert_ne!(renamed, fixture);
    for (case, criteria, needle) in [
        (
            "no reason",
            "    criteria: (jetting: (enabled: false)),\n",
            "gives no reason",
        ),
        (
            "not a boolean",
            "    criteria: (jetting: (enabled: maybe, reason: \"test\")),\n",
            "expected boolean",
        ),
    ] {
        let dir = tempfile::tempdir().expect("temp dir");
        let body = renamed.replace("    boundaries: [", &format!("{criteria}    boundaries: ["));
        std::fs::write(dir.path().join("w.ron"), body).expect("write window");
        let lib = dir.path().to_str().expect("utf-8 path");
        let o = run(&[
            "--library",
            lib,
            "check",
            "--pair",
            "shop-al-cu",
            "--velocity",
            "400m/s",
            "--angle",
            "10deg",
        ]);
        assert_eq!(o.status.code(), Some(2), "{case}");
        let err = stderr(&o);
        assert!(err.contains("unknown pair 'shop-al-cu'"), "{case}: {err}");
        assert!(
            err.contains("the window file")
                && err.contains("w.ron")
                && err.contains("could not be loaded"),
            "{case}: {err}"
        );
        assert!(err.contains(needle), "{case}: {err}");
    }
}
