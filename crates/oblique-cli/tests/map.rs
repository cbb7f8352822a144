//! Integration tests of `oblique map`: the real binary on small fixtures in `tests/data/map-*`,
//! with a fixture pair window (`tests/data/map-lib/map-test-al-on-cu.ron`, invented boundary,
//! published default criteria) so that the verdicts do not depend on the built-in demo.
//!
//! Fixture verdicts (Al 6061-T6 1 mm on Cu C11000, normal-to-flyer), checked point by point
//! with `oblique check` and far from every limit: 250 m/s at 12 deg fails the strength and
//! Deribas limits; 450 m/s at 2.5 deg fails jetting, a lower limit, so it is not welded even
//! though its binding (most violated) limit is the melting ceiling; 450/12, 480/16, 520/14 and
//! 600/20 weld; 700/9 and 900/12 only exceed the melting ceiling.

use serde_json::Value;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

const PAIR: &str = "map-test-al-on-cu";
const CAUTION_START: &str = "caution: screening estimate";

fn data(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data")
        .join(name)
}

fn oblique() -> Command {
    let mut c = Command::new(env!("CARGO_BIN_EXE_oblique"));
    c.env_remove("OBLIQUE_LIBRARY")
        .arg("--library")
        .arg(data("map-lib"));
    c
}

fn run(args: &[&str]) -> Output {
    oblique().args(args).output().expect("the binary runs")
}

fn run_stdin(args: &[&str], input: &[u8]) -> Output {
    let mut child = oblique()
        .args(args)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the binary starts");
    // A run that fails on its arguments may exit before reading: a broken pipe is not a test
    // failure (the exit status and messages are checked by the caller).
    if let Err(e) = child.stdin.take().expect("stdin").write_all(input) {
        assert_eq!(e.kind(), std::io::ErrorKind::BrokenPipe, "write stdin: {e}");
    }
    child.wait_with_output().expect("the binary ends")
}

fn text(b: &[u8]) -> String {
    String::from_utf8_lossy(b).into_owned()
}

fn path_str(p: &Path) -> &str {
    p.to_str().expect("utf-8 path")
}

/// The run failed with exit 2 and its message names `needle`.
fn assert_fails_with(o: &Output, needle: &str) {
    assert_eq!(o.status.code(), Some(2), "{}", text(&o.stderr));
    assert!(
        text(&o.stderr).contains(needle),
        "{needle}: {}",
        text(&o.stderr)
    );
}

/// Write `body` to `name` in `dir`; its path.
fn write_input(dir: &tempfile::TempDir, name: &str, body: &str) -> PathBuf {
    let p = dir.path().join(name);
    std::fs::write(&p, body).expect("write the input");
    p
}

/// The values of one column of a CSV text.
fn column(csv: &str, name: &str) -> Vec<String> {
    // Flexible: the bad-row side file keeps each raw line, whatever its field count.
    let mut r = csv::ReaderBuilder::new()
        .flexible(true)
        .from_reader(csv.as_bytes());
    let headers = r.headers().expect("header").clone();
    let i = headers
        .iter()
        .position(|h| h == name)
        .unwrap_or_else(|| panic!("no column {name} in {headers:?}"));
    r.records()
        .map(|rec| rec.expect("record")[i].to_string())
        .collect()
}

const BASIC_VERDICTS: [&str; 8] = [
    "not-welded",
    // 450 m/s at 2.5 deg: Vc = 10.3 km/s, 2.6 times the copper's C0, outside the validity
    // domain (issue 14; it was not-welded, an extrapolation).
    "outside-domain",
    "welded",
    "welded",
    "welded",
    "melted",
    "melted",
    "welded",
];

fn summary_json(args: &[&str]) -> (Value, String) {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("map.csv");
    let mut all = vec!["map"];
    all.extend_from_slice(args);
    all.extend_from_slice(&["--pair", PAIR, "-o", path_str(&out), "--json"]);
    let o = run(&all);
    assert!(o.status.success(), "{}", text(&o.stderr));
    let v: Value = serde_json::from_slice(&o.stdout).expect("summary JSON on stdout");
    let csv = std::fs::read_to_string(&out).expect("map written");
    (v, csv)
}

#[test]
fn basic_fixture_verdicts_and_summary() {
    let (v, csv) = summary_json(&[path_str(&data("map-basic.csv"))]);
    assert_eq!(column(&csv, "verdict"), BASIC_VERDICTS);
    assert_eq!(
        column(&csv, "row"),
        ["2", "3", "4", "5", "6", "7", "8", "9"]
    );
    // Extra columns pass through as written, quoted field included.
    assert_eq!(column(&csv, "note")[6], "tip, fast");
    assert_eq!(column(&csv, "id")[0], "a");
    assert_eq!(column(&csv, "binding")[1], "melting-upper");
    for key in [
        "rows_read",
        "rows_classified",
        "rows_rejected",
        "welded_fraction",
        "welded_length_m",
        "segments",
        "longest_welded_segment",
        "unbonded_length_start_m",
        "unbonded_length_end_m",
        "smallest_welded_margin",
        "verdict_counts",
        "caution",
    ] {
        assert!(v.get(key).is_some(), "summary lacks {key}: {v}");
    }
    assert_eq!(v["rows_read"], 8);
    assert_eq!(v["rows_classified"], 8);
    assert_eq!(v["rows_rejected"], 0);
    assert_eq!(v["verdict_counts"]["welded"], 4);
    assert_eq!(v["verdict_counts"]["not-welded"], 1);
    assert_eq!(v["verdict_counts"]["outside-domain"], 1);
    assert_eq!(v["verdict_counts"]["head-on"], 0);
    assert_eq!(v["verdict_counts"]["melted"], 2);
    assert_eq!(
        v["validity_domain"]["rows_outside_each_bound"]["parent_mach"],
        1
    );
    // Points 1 mm apart from 0 to 7 mm: each owns half the distance to its neighbours, so
    // welded = 1 + 1 + 1 + 0.5 mm of 7 mm.
    let wl = v["welded_length_m"].as_f64().expect("number");
    assert!((wl - 3.5e-3).abs() < 1e-12, "{wl}");
    assert!((v["welded_fraction"].as_f64().expect("number") - 0.5).abs() < 1e-12);
    assert_eq!(v["welded_fraction_basis"], "length");
    assert_eq!(v["segments_total"], 4);
    assert_eq!(v["welded_segments"], 2);
    let segs = v["segments"].as_array().expect("array");
    assert_eq!(segs.len(), 4);
    assert_eq!(segs[0]["kind"], "unwelded");
    assert!((segs[0]["end_m"].as_f64().expect("number") - 1.5e-3).abs() < 1e-12);
    let longest = &v["longest_welded_segment"];
    assert!((longest["start_m"].as_f64().expect("number") - 1.5e-3).abs() < 1e-12);
    assert!((longest["end_m"].as_f64().expect("number") - 4.5e-3).abs() < 1e-12);
    assert!((v["unbonded_length_start_m"].as_f64().expect("number") - 1.5e-3).abs() < 1e-12);
    assert_eq!(v["unbonded_length_end_m"].as_f64(), Some(0.0));
    assert_eq!(v["outside_trial_data_rows"], 1);
    assert!(v["smallest_welded_margin"]["limit"].is_string());
    // Its id is the map's binding id of that row.
    let small = &v["smallest_welded_margin"];
    let want = small["row"].to_string();
    let at = column(&csv, "row")
        .iter()
        .position(|r| *r == want)
        .expect("the row is in the map");
    assert_eq!(small["id"], column(&csv, "binding")[at].as_str());
    assert!(v["caution"]
        .as_str()
        .expect("string")
        .starts_with("caution: screening estimate"));
}

#[test]
fn text_summary_goes_to_stderr_without_output_file_and_ends_with_the_caution() {
    let o = run(&["map", path_str(&data("map-basic.csv")), "--pair", PAIR]);
    assert!(o.status.success(), "{}", text(&o.stderr));
    let out = text(&o.stdout);
    assert!(out.starts_with("row,id,position[mm]"), "{out}");
    assert_eq!(column(&out, "verdict"), BASIC_VERDICTS);
    let err = text(&o.stderr);
    assert!(
        err.contains("rows: 8 read, 8 classified, 0 rejected"),
        "{err}"
    );
    assert!(err.contains("convention normal-to-flyer"), "{err}");
    let last = err.trim_end().lines().last().unwrap_or_default();
    assert!(last.starts_with(CAUTION_START), "{last}");
}

#[test]
fn text_summary_goes_to_stdout_with_output_file() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("map.csv");
    let o = run(&[
        "map",
        path_str(&data("map-basic.csv")),
        "--pair",
        PAIR,
        "-o",
        path_str(&out),
    ]);
    assert!(o.status.success(), "{}", text(&o.stderr));
    let s = text(&o.stdout);
    assert!(s.contains("welded 3.500 mm = 50.0 %"), "{s}");
    assert!(s
        .trim_end()
        .lines()
        .last()
        .unwrap_or_default()
        .starts_with(CAUTION_START));
}

#[test]
fn units_in_the_header_are_converted() {
    let (a, csv_a) = summary_json(&[path_str(&data("map-basic.csv"))]);
    let (b, csv_b) = summary_json(&[path_str(&data("map-units.csv"))]);
    assert_eq!(column(&csv_b, "verdict"), BASIC_VERDICTS);
    assert_eq!(a["verdict_counts"], b["verdict_counts"]);
    let (wa, wb) = (
        a["welded_length_m"].as_f64().expect("number"),
        b["welded_length_m"].as_f64().expect("number"),
    );
    assert!((wa - wb).abs() < 1e-12, "{wa} {wb}");
    // Same Vc whatever the input units (km/s and rad against m/s and deg).
    let (va, vb) = (
        column(&csv_a, "collision_velocity[m/s]"),
        column(&csv_b, "collision_velocity[m/s]"),
    );
    assert_eq!(va, vb);
}

#[test]
fn header_without_unit_is_an_error_naming_the_column() {
    let o = run(&["map", path_str(&data("map-nounit.csv")), "--pair", PAIR]);
    assert_eq!(o.status.code(), Some(2));
    let err = text(&o.stderr);
    assert!(err.contains("map-nounit.csv: row 1 (header)"), "{err}");
    assert!(err.contains("column 'velocity' has no unit"), "{err}");
    assert!(err.contains("units are never guessed"), "{err}");
    assert!(o.stdout.is_empty());
}

#[test]
fn column_names_can_be_mapped() {
    let o = run(&[
        "map",
        path_str(&data("map-mapped.csv")),
        "--pair",
        PAIR,
        "--position-column",
        "x",
        "--velocity-column",
        "vp",
        "--angle-column",
        "beta",
    ]);
    assert!(o.status.success(), "{}", text(&o.stderr));
    assert_eq!(column(&text(&o.stdout), "verdict"), ["welded", "melted"]);
    // Without the mapping: a clear error with the columns and the flag to use.
    let o = run(&["map", path_str(&data("map-mapped.csv")), "--pair", PAIR]);
    assert_eq!(o.status.code(), Some(2));
    let err = text(&o.stderr);
    assert!(err.contains("no column named 'position'"), "{err}");
    assert!(err.contains("--position-column"), "{err}");
}

#[test]
fn bad_rows_stop_by_default_with_row_and_field() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("map.csv");
    let o = run(&[
        "map",
        path_str(&data("map-bad.csv")),
        "--pair",
        PAIR,
        "-o",
        path_str(&out),
    ]);
    assert_eq!(o.status.code(), Some(2));
    let err = text(&o.stderr);
    assert!(
        err.contains("map-bad.csv: row 3, field 'velocity[m/s]'"),
        "{err}"
    );
    assert!(err.contains("not above zero"), "{err}");
    assert!(err.contains("--bad-rows skip"), "{err}");
    // No half-written map is left behind.
    assert!(!out.exists());
    let leftovers: Vec<_> = std::fs::read_dir(dir.path()).expect("dir").collect();
    assert!(leftovers.is_empty(), "{leftovers:?}");
}

#[test]
fn bad_rows_skip_counts_them() {
    let (v, csv) = summary_json(&[path_str(&data("map-bad.csv")), "--bad-rows", "skip"]);
    assert_eq!(v["rows_read"], 9);
    assert_eq!(v["rows_classified"], 2);
    assert_eq!(v["rows_rejected"], 7);
    assert_eq!(v["blank_lines"], 1);
    assert_eq!(column(&csv, "row"), ["2", "10"]);
    let ex = v["rejected_examples"].as_array().expect("array");
    let rows: Vec<u64> = ex.iter().map(|e| e["row"].as_u64().expect("row")).collect();
    assert_eq!(rows, [3, 4, 5, 6, 7, 8, 11]);
    let fields: Vec<&str> = ex
        .iter()
        .map(|e| e["field"].as_str().expect("field"))
        .collect();
    assert_eq!(
        fields,
        [
            "velocity[m/s]",
            "angle[deg]",
            "angle[deg]",
            "velocity[m/s]",
            "velocity[m/s]",
            "angle[deg]",
            "(row)"
        ]
    );
    assert!(ex[4]["reason"]
        .as_str()
        .expect("reason")
        .contains("the unit belongs in the header"));
}

/// Rejected rows between two classified rows leave that stretch without a verdict: it counts in
/// the interface length but never as welded.
#[test]
fn rejected_rows_leave_a_stretch_without_verdict() {
    let dir = tempfile::tempdir().expect("tempdir");
    let input = dir.path().join("gap.csv");
    let mut text = String::from("position[mm],velocity[m/s],angle[deg]\n0,450,10\n");
    for k in 1..10 {
        text.push_str(&format!("{k},,10\n"));
    }
    text.push_str("10,450,10\n");
    std::fs::write(&input, text).expect("write");
    let (v, _) = summary_json(&[path_str(&input), "--bad-rows", "skip"]);
    assert_eq!(v["rows_classified"], 2);
    assert_eq!(v["rows_rejected"], 9);
    assert_eq!(v["welded_length_m"].as_f64(), Some(0.0));
    assert!((v["unclassified_length_m"].as_f64().expect("length") - 0.010).abs() < 1e-12);
    assert_eq!(v["welded_fraction"].as_f64(), Some(0.0));
    assert_eq!(v["no_verdict_stretches"], 1);
}

/// A rejected row inside the unbonded start does not shorten it: the unbonded end runs through
/// the stretch without verdict to the first welded segment, and says how much had no verdict.
#[test]
fn a_rejected_row_does_not_shorten_the_unbonded_end() {
    let dir = tempfile::tempdir().expect("tempdir");
    let input = write_input(
        &dir,
        "gap-start.csv",
        "position[mm],velocity[m/s],angle[deg]\n0,250,12\n0.5,,12\n1,250,12\n2,450,12\n3,450,12\n",
    );
    let (v, _) = summary_json(&[path_str(&input), "--bad-rows", "skip"]);
    assert_eq!(v["rows_rejected"], 1);
    // Welded from half-way between 1 and 2 mm: 1.5 mm unbonded, 1 mm of it without verdict.
    let start = v["unbonded_length_start_m"].as_f64().expect("length");
    assert!((start - 1.5e-3).abs() < 1e-12, "{start}");
    let nv = v["unbonded_no_verdict_start_m"].as_f64().expect("length");
    assert!((nv - 1.0e-3).abs() < 1e-12, "{nv}");
    assert_eq!(v["unbonded_length_end_m"].as_f64(), Some(0.0));
}

#[test]
fn bad_rows_save_writes_a_side_file_with_reasons() {
    let dir = tempfile::tempdir().expect("tempdir");
    let side = dir.path().join("bad.csv");
    let policy = format!("save:{}", path_str(&side));
    let (v, _) = summary_json(&[path_str(&data("map-bad.csv")), "--bad-rows", &policy]);
    assert_eq!(v["rows_rejected"], 7);
    let s = std::fs::read_to_string(&side).expect("side file");
    assert!(
        s.starts_with("row,field,reason,position[mm],velocity[m/s],angle[deg]\n"),
        "{s}"
    );
    assert_eq!(column(&s, "row"), ["3", "4", "5", "6", "7", "8", "11"]);
    let reasons = column(&s, "reason");
    assert!(reasons[1].contains("outside [0, 90) deg"), "{reasons:?}");
    assert!(reasons[2].contains("empty"), "{reasons:?}");
}

#[test]
fn stdin_input_and_output() {
    let input = std::fs::read(data("map-basic.csv")).expect("fixture");
    let o = run_stdin(&["map", "-", "--pair", PAIR], &input);
    assert!(o.status.success(), "{}", text(&o.stderr));
    assert_eq!(column(&text(&o.stdout), "verdict"), BASIC_VERDICTS);
    assert!(
        text(&o.stderr).contains("rows: 8 read"),
        "{}",
        text(&o.stderr)
    );
    // Bad input on stdin names <stdin>.
    let o = run_stdin(
        &["map", "-", "--pair", PAIR],
        b"position[mm],velocity[m/s],angle[deg]\n0,450,12\n1,450,nope\n",
    );
    assert_fails_with(&o, "<stdin>: row 3, field 'angle[deg]'");
}

/// The default map and the `--all-columns` map of `input` against a pair (`lib` adds a library).
fn short_and_long(input: &Path, pair: &str, lib: Option<&Path>) -> (String, String) {
    let dir = tempfile::tempdir().expect("tempdir");
    let (short, long) = (dir.path().join("short.csv"), dir.path().join("long.csv"));
    for (out, extra) in [(&short, None), (&long, Some("--all-columns"))] {
        let mut args = vec!["map", path_str(input), "--pair", pair, "-o", path_str(out)];
        if let Some(l) = lib {
            args.extend(["--library", path_str(l)]);
        }
        args.extend(extra);
        let o = run(&args);
        assert!(o.status.success(), "{}", text(&o.stderr));
    }
    (
        std::fs::read_to_string(&short).expect("map"),
        std::fs::read_to_string(&long).expect("map"),
    )
}

/// The default row against the `--all-columns` row of the same run: the same binding limit,
/// its margin the limit's own margin column in the unit named, the sign of that margin the
/// verdict's, and `failing_limits` exactly the limits with a negative margin, in column order
/// (empty for welded rows, the binding limit among them otherwise, only velocity ceilings,
/// `ceilings`, for melted rows).
fn assert_binding_columns_agree(short: &str, long: &str, ceilings: &[&str]) {
    let bindings = column(short, "binding");
    let margins = column(short, "binding_margin");
    let units = column(short, "binding_margin_unit");
    let verdicts = column(short, "verdict");
    let failing = column(short, "failing_limits");
    for name in [
        "binding",
        "binding_margin",
        "binding_margin_unit",
        "binding_relative_margin",
        "failing_limits",
    ] {
        assert_eq!(column(short, name), column(long, name), "{name}");
    }
    let long_header = long.lines().next().expect("header");
    let margin_cols: Vec<&str> = long_header
        .split(',')
        .filter(|c| c.starts_with("margin_"))
        .collect();
    let id_of = |c: &str| {
        c.trim_start_matches("margin_")
            .split('[')
            .next()
            .unwrap_or("")
            .replace('_', "-")
    };
    let long_margins: Vec<Vec<String>> = margin_cols.iter().map(|c| column(long, c)).collect();
    for row in 0..verdicts.len() {
        let (v, b, m, unit, f) = (
            &verdicts[row],
            &bindings[row],
            &margins[row],
            &units[row],
            &failing[row],
        );
        let k = margin_cols
            .iter()
            .position(|c| id_of(c) == *b)
            .unwrap_or_else(|| panic!("no margin column for {b} in {long_header}"));
        assert_eq!(&long_margins[k][row], m, "row {row}: {b}");
        assert!(
            margin_cols[k].ends_with(&format!("[{unit}]")),
            "row {row}: {unit}"
        );
        // A sign kept even where the margin rounds to zero.
        assert_eq!(v == "welded", !m.starts_with('-'), "row {row}: {v} {m}");
        let negative: Vec<String> = (0..margin_cols.len())
            .filter(|&j| long_margins[j][row].starts_with('-'))
            .map(|j| id_of(margin_cols[j]))
            .collect();
        let listed: Vec<&str> = f.split(';').filter(|s| !s.is_empty()).collect();
        assert_eq!(listed, negative, "row {row}");
        assert_eq!(v == "welded", listed.is_empty(), "row {row}: {v} '{f}'");
        if v != "welded" {
            assert!(listed.contains(&b.as_str()), "row {row}: {b} not in {f}");
        }
        if v == "melted" {
            assert!(
                listed.iter().all(|l| ceilings.contains(l)),
                "row {row}: {f}"
            );
        }
    }
}

/// The default row carries the binding limit's margin in that limit's unit, its relative
/// margin and every failing limit; `--all-columns` adds every limit's margin, and they agree.
/// Both ways of writing the failing limits: a table of every combination (the demo window's
/// seven limits) and limit by limit (a fixture window of nine).
#[test]
fn default_row_has_the_binding_margin_and_all_columns_every_margin() {
    let (short, long) = short_and_long(&data("map-basic.csv"), PAIR, None);
    let header = short.lines().next().expect("header");
    assert!(
        header.ends_with(
            "verdict,binding,binding_margin,binding_margin_unit,binding_relative_margin,\
             failing_limits,collision_velocity[m/s],flow_velocity[m/s],impact_pressure[GPa],\
             outside_trial_data"
        ),
        "{header}"
    );
    assert!(!header.contains("margin_jetting"), "{header}");
    assert_binding_columns_agree(&short, &long, &["melting-upper"]);
    // A sweep over angle and velocity, every verdict and many failing sets.
    let dir = tempfile::tempdir().expect("tempdir");
    let mut sweep = String::from("position[mm],velocity[m/s],angle[deg]\n");
    let mut i = 0;
    for v in (150..=900).step_by(25) {
        for a in (3..=57).step_by(2) {
            sweep.push_str(&format!("{},{v},{:.1}\n", i, f64::from(a) / 2.0));
            i += 1;
        }
    }
    let input = write_input(&dir, "sweep.csv", &sweep);
    let (short, long) = short_and_long(&input, PAIR, None);
    assert_binding_columns_agree(&short, &long, &["melting-upper"]);
    let wide = data("map-lib-wide");
    let (short, long) = short_and_long(&input, "map-wide-al-on-cu", Some(&wide));
    assert!(long
        .lines()
        .next()
        .is_some_and(|h| h.contains("margin_boundary_4")));
    // Its third boundary (weld side left, in the collision-velocity plane) is a ceiling too.
    assert_binding_columns_agree(&short, &long, &["melting-upper", "boundary-3"]);
    let failing = column(&short, "failing_limits");
    assert!(
        failing.iter().any(|f| f.split(';').count() >= 3),
        "{failing:?}"
    );
}

#[test]
fn json_lines_in_and_out() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("map.jsonl");
    let o = run(&[
        "map",
        path_str(&data("map-basic.jsonl")),
        "--pair",
        PAIR,
        "-o",
        path_str(&out),
        "--json",
        "--all-columns",
    ]);
    assert!(o.status.success(), "{}", text(&o.stderr));
    let v: Value = serde_json::from_slice(&o.stdout).expect("summary");
    assert_eq!(v["rows_classified"], 8);
    let lines: Vec<Value> = std::fs::read_to_string(&out)
        .expect("map")
        .lines()
        .map(|l| serde_json::from_str(l).expect("one JSON object per line"))
        .collect();
    let verdicts: Vec<&str> = lines
        .iter()
        .map(|l| l["verdict"].as_str().expect("verdict"))
        .collect();
    assert_eq!(verdicts, BASIC_VERDICTS);
    // JSON lines number their rows from 1 (no header); values pass through.
    assert_eq!(lines[0]["row"], 1);
    assert_eq!(lines[6]["note"], "tip, fast");
    assert_eq!(lines[3]["velocity[m/s]"], "480");
    assert!(lines[0]["collision_velocity[m/s]"].is_number());
    // Outside a boundary's span its margin is null (the key is there).
    let row = lines[1].as_object().expect("object");
    assert!(row
        .get("margin_boundary_1[m/s]")
        .is_some_and(Value::is_null));
    assert!(row.get("binding_margin").is_some_and(Value::is_number));
    assert!(row.get("binding_margin_unit").is_some_and(Value::is_string));
    // Every failing limit as a list: empty for a welded row.
    for l in &lines {
        let failing = l["failing_limits"]
            .as_array()
            .expect("failing_limits is a list");
        assert_eq!(failing.is_empty(), l["verdict"] == "welded", "{l}");
        if !failing.is_empty() {
            assert!(failing.contains(&l["binding"]), "{l}");
        }
    }
    // CSV in, JSON lines out, by flag.
    let o = run(&[
        "map",
        path_str(&data("map-basic.csv")),
        "--pair",
        PAIR,
        "--output-format",
        "jsonl",
    ]);
    assert!(o.status.success(), "{}", text(&o.stderr));
    let first: Value =
        serde_json::from_str(text(&o.stdout).lines().next().unwrap_or_default()).expect("json");
    assert_eq!(first["position[mm]"], 0.0);
    assert_eq!(first["id"], "a");
    assert_eq!(first["verdict"], "not-welded");
}

#[test]
fn unsorted_positions_stop_unless_allowed() {
    let o = run(&["map", path_str(&data("map-unsorted.csv")), "--pair", PAIR]);
    assert_eq!(o.status.code(), Some(2));
    let err = text(&o.stderr);
    assert!(err.contains("row 4"), "{err}");
    assert!(err.contains("row 3"), "{err}");
    assert!(err.contains("--unsorted"), "{err}");
    let (v, _) = summary_json(&[path_str(&data("map-unsorted.csv")), "--unsorted"]);
    assert_eq!(v["rows_classified"], 3);
    assert_eq!(v["sorted"], false);
    assert!(v["segments"].is_null());
    assert!(v["welded_length_m"].is_null());
    assert_eq!(v["welded_fraction_basis"], "count");
}

#[test]
fn collision_velocity_input() {
    let input = b"position[mm],velocity[km/s],angle[deg]\n0,2.3035,10\n";
    let o = run_stdin(
        &["map", "-", "--pair", PAIR, "--velocity-kind", "collision"],
        input,
    );
    assert!(o.status.success(), "{}", text(&o.stderr));
    let out = text(&o.stdout);
    // physics-notes.md §1 check value (derived): normal to flyer, Vc = 2303.5 m/s at 10 deg
    // -> Vp = 400 m/s.
    let vp: f64 = column(&out, "impact_velocity[m/s]")[0]
        .parse()
        .expect("number");
    assert!((vp - 400.0).abs() < 0.1, "{vp}");
    assert!(text(&o.stderr).contains("collision-point velocity Vc"));
}

#[test]
fn blank_lines_are_counted_not_dropped_silently() {
    let o = run_stdin(
        &["map", "-", "--pair", PAIR],
        b"position[mm],velocity[m/s],angle[deg]\n0,450,12\n\n\r\n1,480,16\n\n",
    );
    assert!(o.status.success(), "{}", text(&o.stderr));
    let err = text(&o.stderr);
    assert!(
        err.contains("rows: 2 read, 2 classified, 0 rejected"),
        "{err}"
    );
    assert!(err.contains("3 blank line(s) ignored"), "{err}");
    assert_eq!(column(&text(&o.stdout), "row"), ["2", "5"]);
}

#[test]
fn json_summary_needs_an_output_file() {
    let o = run(&[
        "map",
        path_str(&data("map-basic.csv")),
        "--pair",
        PAIR,
        "--json",
    ]);
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn unknown_pair_and_missing_file_exit_2() {
    let o = run(&[
        "map",
        path_str(&data("map-basic.csv")),
        "--pair",
        "no-such-pair",
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o.stderr).contains("unknown pair"));
    let o = run(&["map", "/nonexistent/file.csv", "--pair", PAIR]);
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o.stderr).contains("/nonexistent/file.csv: cannot open"));
    let o = run_stdin(&["map", "-", "--pair", PAIR], b"");
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o.stderr).contains("empty input"));
}

#[test]
fn output_over_a_symbolic_link_is_written_through_not_replaced() {
    let dir = tempfile::tempdir().expect("tempdir");
    let target = write_input(&dir, "target.csv", "old");
    let link = dir.path().join("link.csv");
    std::os::unix::fs::symlink(&target, &link).expect("symlink");
    let o = run(&[
        "map",
        path_str(&data("map-basic.csv")),
        "--pair",
        PAIR,
        "-o",
        path_str(&link),
    ]);
    assert!(o.status.success(), "{}", text(&o.stderr));
    assert!(std::fs::symlink_metadata(&link)
        .expect("link")
        .file_type()
        .is_symlink());
    let s = std::fs::read_to_string(&target).expect("target");
    assert_eq!(column(&s, "verdict"), BASIC_VERDICTS);
}

/// A generated interface of many rows (several chunks): every row comes out once, in order,
/// whatever the number of threads; the jetting table gives the verdicts of the direct solve.
#[test]
fn many_rows_keep_their_order_and_verdicts() {
    let dir = tempfile::tempdir().expect("tempdir");
    let input = dir.path().join("big.csv");
    let mut s = String::from("id,position[mm],velocity[m/s],angle[deg],note\n");
    let n = 60_000;
    for i in 0..n {
        let x = i as f64 / (n - 1) as f64;
        // Angle from 1.5 to 28 deg, velocity rising then falling: every regime, including
        // supersonic inflow (small angles) where the jetting table is used.
        let beta = 1.5 + 26.5 * x.powf(1.5);
        let v = 230.0 + 420.0 * (std::f64::consts::PI * x).sin();
        let note = if i % 997 == 0 { "\"a, b\"" } else { "" };
        s.push_str(&format!("{i},{:.6},{v:.3},{beta:.4},{note}\n", 40.0 * x));
    }
    std::fs::write(&input, &s).expect("write");
    let mut outputs = Vec::new();
    for extra in [
        &["--threads", "1", "--all-columns"][..],
        &["--threads", "3", "--all-columns"][..],
        &["--exact-jetting", "--all-columns"][..],
    ] {
        let out = dir.path().join(format!("out-{}.csv", outputs.len()));
        let mut args = vec![
            "map",
            path_str(&input),
            "--pair",
            PAIR,
            "-o",
            path_str(&out),
            "--json",
        ];
        args.extend_from_slice(extra);
        let o = run(&args);
        assert!(o.status.success(), "{}", text(&o.stderr));
        let v: Value = serde_json::from_slice(&o.stdout).expect("summary");
        assert_eq!(v["rows_classified"], n);
        outputs.push((v, std::fs::read_to_string(&out).expect("map")));
    }
    // Threads do not change a byte.
    assert_eq!(outputs[0].1, outputs[1].1);
    let rows = column(&outputs[0].1, "row");
    assert_eq!(rows.len(), n);
    assert!(rows
        .iter()
        .enumerate()
        .all(|(i, r)| r.parse::<usize>().ok() == Some(i + 2)));
    // Table and direct solve: the same verdicts row by row.
    assert_eq!(
        column(&outputs[0].1, "verdict"),
        column(&outputs[2].1, "verdict")
    );
    assert_eq!(
        outputs[0].0["verdict_counts"],
        outputs[2].0["verdict_counts"]
    );
    assert_eq!(outputs[2].0["jetting"]["method"], "direct");
    // Some rows were decided in the supersonic regime by the table.
    let jet = column(&outputs[0].1, "margin_jetting[deg]");
    assert!(jet.iter().any(|m| m.parse::<f64>().is_ok_and(|m| m < 0.0)));
}

#[test]
fn plots_are_well_formed_deterministic_and_labelled() {
    let dir = tempfile::tempdir().expect("tempdir");
    let mut svgs = Vec::new();
    for k in 0..2 {
        let strip = dir.path().join(format!("strip{k}.svg"));
        let window = dir.path().join(format!("window{k}.svg"));
        let o = run(&[
            "map",
            path_str(&data("map-basic.csv")),
            "--pair",
            PAIR,
            "-o",
            path_str(&dir.path().join("m.csv")),
            "--strip-svg",
            path_str(&strip),
            "--window-svg",
            path_str(&window),
        ]);
        assert!(o.status.success(), "{}", text(&o.stderr));
        svgs.push((
            std::fs::read_to_string(&strip).expect("strip"),
            std::fs::read_to_string(&window).expect("window"),
        ));
    }
    assert_eq!(svgs[0], svgs[1], "plots must be deterministic");
    for svg in [&svgs[0].0, &svgs[0].1] {
        let doc = roxmltree::Document::parse(svg).expect("well-formed SVG");
        let texts: Vec<&str> = doc
            .descendants()
            .filter(|n| n.has_tag_name("text"))
            .filter_map(|n| n.text())
            .collect();
        let all = texts.join(" | ");
        assert!(all.contains(PAIR), "{all}");
        assert!(all.contains("normal-to-flyer"), "{all}");
        assert!(all.contains("not a guarantee of a weld"), "{all}");
        assert!(all.contains("[deg]"), "{all}");
        assert!(all.contains("[m/s]") || all.contains("[mm]"), "{all}");
    }
    let strip_texts = &svgs[0].0;
    assert!(strip_texts.contains("position along the interface [mm]"));
    // --strip-svg needs positions in order.
    let o = run(&[
        "map",
        path_str(&data("map-basic.csv")),
        "--pair",
        PAIR,
        "--unsorted",
        "--strip-svg",
        path_str(&dir.path().join("x.svg")),
    ]);
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn help_names_the_velocity_convention_and_the_layout() {
    let o = run(&["map", "--help"]);
    assert!(o.status.success());
    let h = text(&o.stdout);
    assert!(h.contains("position[mm],velocity[m/s],angle[deg]"), "{h}");
    assert!(
        h.contains("impact (flyer) velocity Vp in the pair window's convention"),
        "{h}"
    );
    assert!(h.contains("--bad-rows"), "{h}");
}

/// The three ways a CSV record is read (a chunk with no quote at all, split eight bytes at a
/// time; a chunk with a quote somewhere, scanned byte by byte; a quoted field, unescaped) and
/// both line endings give the same map, byte for byte once the passed-through text is the same.
#[test]
fn line_endings_and_quotes_do_not_change_the_map() {
    let header = "id,position[mm],velocity[m/s],angle[deg]";
    let rows = [
        ("a", "0", "450", "12"),
        ("b", "0.5", "480", "16"),
        ("c", "1.0", "-450", "12"),
        ("d", "1.5", "4.5e2", "1.2E1"),
        ("e", "2.0", "700", "9"),
    ];
    let build = |eol: &str, quote_id: bool| {
        let mut s = format!("{header}{eol}");
        for (id, p, v, a) in rows {
            let id = if quote_id {
                format!("\"{id}\"")
            } else {
                id.to_string()
            };
            s.push_str(&format!("{id},{p},{v},{a}{eol}"));
        }
        s
    };
    let map_of = |input: &str| {
        let o = run_stdin(
            &["map", "-", "--pair", PAIR, "--bad-rows", "skip"],
            input.as_bytes(),
        );
        assert!(o.status.success(), "{}", text(&o.stderr));
        let err = text(&o.stderr);
        assert!(
            err.contains("rows: 5 read, 4 classified, 1 rejected"),
            "{err}"
        );
        text(&o.stdout)
    };
    let plain = map_of(&build("\n", false));
    assert_eq!(map_of(&build("\r\n", false)), plain);
    // Quoted ids: the same fields once unquoted; the map passes the line through as written.
    let quoted = map_of(&build("\n", true));
    assert_eq!(quoted.replace('"', ""), plain);
    assert_eq!(map_of(&build("\r\n", true)).replace('"', ""), plain);
    // Scientific notation is read: row d is 450 m/s at 12 deg, like row a.
    let tail = |line: &str| line.splitn(6, ',').nth(5).map(str::to_string);
    let lines: Vec<&str> = plain.lines().collect();
    // Row c (negative velocity) is skipped, so row d is the third data line.
    assert_eq!(tail(lines[1]), tail(lines[3]), "{plain}");
}

/// A map with no classified row is a failure (exit 2), not an empty success: the header alone,
/// or every row rejected (the reasons and a hint about the header's units are shown, the side
/// file keeps every rejected row, and no map file is written).
#[test]
fn nothing_classified_is_an_error() {
    let dir = tempfile::tempdir().expect("tempdir");
    let header_only = write_input(
        &dir,
        "header.csv",
        "position[mm],velocity[m/s],angle[deg]\n",
    );
    let map = dir.path().join("map.csv");
    let o = run(&[
        "map",
        path_str(&header_only),
        "--pair",
        PAIR,
        "-o",
        path_str(&map),
    ]);
    assert_fails_with(&o, "no data rows");
    assert!(!map.exists());

    // Degrees under a radians header: every angle is out of range.
    let rad = write_input(
        &dir,
        "rad.csv",
        "position[mm],velocity[m/s],angle[rad]\n0,450,12\n1,480,16\n",
    );
    let side = dir.path().join("rejected.csv");
    let policy = format!("save:{}", path_str(&side));
    let o = run(&[
        "map",
        path_str(&rad),
        "--pair",
        PAIR,
        "-o",
        path_str(&map),
        "--bad-rows",
        &policy,
    ]);
    assert_eq!(o.status.code(), Some(2));
    let err = text(&o.stderr);
    assert!(
        err.contains("no row could be classified: all 2 row(s) were rejected"),
        "{err}"
    );
    assert!(
        err.contains("'12' (angle[rad]) = 687.549 deg is outside [0, 90) deg"),
        "{err}"
    );
    assert!(err.contains("write angle[deg] in the header"), "{err}");
    assert!(!map.exists());
    let kept = std::fs::read_to_string(&side).expect("side file kept");
    assert_eq!(column(&kept, "row"), ["2", "3"]);
}

/// Magnitudes no impact weld has (a unit wrong in the header) are classified but warned about,
/// in the text and in the JSON summary.
#[test]
fn implausible_magnitudes_are_warned_about() {
    let dir = tempfile::tempdir().expect("tempdir");
    let input = dir.path().join("kms.csv");
    // km/s values under an m/s header, radians under a degrees header.
    std::fs::write(
        &input,
        "position[mm],velocity[m/s],angle[deg]\n0,0.45,0.21\n1,0.48,0.28\n",
    )
    .expect("write");
    let (v, _) = summary_json(&[path_str(&input)]);
    let w: Vec<&str> = v["warnings"]
        .as_array()
        .expect("warnings")
        .iter()
        .filter_map(Value::as_str)
        .collect();
    assert_eq!(w.len(), 2, "{w:?}");
    assert!(
        w[0].contains("every impact velocity is below 50 m/s"),
        "{w:?}"
    );
    assert!(
        w[1].contains("every collision angle is below 1 deg"),
        "{w:?}"
    );
    let o = run(&["map", path_str(&input), "--pair", PAIR]);
    assert!(o.status.success());
    assert!(text(&o.stderr).contains("warning: every impact velocity is below 50 m/s"));
}

/// Lines starting with '#' before the header are a preamble: skipped, counted, and the row
/// numbers still count every line of the file.
#[test]
fn comment_lines_before_the_header_are_skipped_and_counted() {
    let input = b"# invented data for a test\n  # exported by hand\nposition[mm],velocity[m/s],angle[deg]\n0,450,12\n1,480,16\n";
    let o = run_stdin(&["map", "-", "--pair", PAIR], input);
    assert!(o.status.success(), "{}", text(&o.stderr));
    assert_eq!(column(&text(&o.stdout), "row"), ["4", "5"]);
    assert!(text(&o.stderr).contains("2 comment or blank line(s) before the header skipped"));
    // A header problem is reported at the header's own line.
    let o = run_stdin(
        &["map", "-", "--pair", PAIR],
        b"# note\nposition,velocity[m/s],angle[deg]\n0,450,12\n",
    );
    assert_fails_with(&o, "row 2 (header)");
}

/// Rejected rows before the first and after the last classified row stay where they are along
/// the interface (no verdict there, in the unbonded ends), and make no stretch between the
/// first classified rows; the stretches are listed.
#[test]
fn rejected_rows_at_the_ends_stay_at_the_ends() {
    let dir = tempfile::tempdir().expect("tempdir");
    let input = write_input(&dir, "ends.csv", "position[mm],velocity[m/s],angle[deg]\n0,,12\n1,450,12\n2,450,12\n3,450,12\n4,450,12\n5,NaN,12\n");
    let (v, _) = summary_json(&[path_str(&input), "--bad-rows", "skip"]);
    assert_eq!(v["rows_rejected"], 2);
    assert_eq!(v["interface_start_m"].as_f64(), Some(0.0));
    assert!((v["interface_end_m"].as_f64().expect("end") - 5e-3).abs() < 1e-12);
    assert!((v["welded_length_m"].as_f64().expect("welded") - 3e-3).abs() < 1e-12);
    assert!((v["unbonded_length_start_m"].as_f64().expect("start") - 1e-3).abs() < 1e-12);
    assert!((v["unbonded_length_end_m"].as_f64().expect("end") - 1e-3).abs() < 1e-12);
    assert_eq!(v["no_verdict_stretches"], 2);
    let list = v["no_verdict"].as_array().expect("list");
    assert_eq!(list.len(), 2);
    assert_eq!(list[0]["start_m"].as_f64(), Some(0.0));
    assert_eq!(v["welded_segments"], 1);
    assert_eq!(v["unwelded_segments"], 0);
    assert_eq!(v["unplaced_end_rows"]["start"], 0);
}

/// Messages for bad cells say how to fix them; `-o -` is standard output.
#[test]
fn bad_cell_messages_say_how_to_fix_and_dash_is_stdout() {
    let input = b"position[mm],velocity[m/s],angle[deg],note\n0,450,12,ok\n# late\n1,480,16,a,b\n2,,16,x\n3,NaN,16,y\n";
    let o = run_stdin(
        &["map", "-", "--pair", PAIR, "--bad-rows", "skip", "-o", "-"],
        input,
    );
    assert!(o.status.success(), "{}", text(&o.stderr));
    assert_eq!(column(&text(&o.stdout), "row"), ["2"]);
    let err = text(&o.stderr);
    for want in [
        "'#' lines are skipped only before the header",
        "a text field that holds a comma must be in double quotes",
        "empty: every row needs a value here",
        "'NaN' is not a finite number (write a plain decimal",
    ] {
        assert!(err.contains(want), "{want}: {err}");
    }
    assert!(!Path::new("-").exists());
    let o = run_stdin(&["map", "-", "--pair", PAIR, "-o", "-", "--json"], input);
    assert_fails_with(&o, "--json prints the summary on standard output");
    // Without -o the map itself goes to standard output: the same refusal, said in words.
    let o = run_stdin(&["map", "-", "--pair", PAIR, "--json"], input);
    assert_fails_with(&o, "give the map a file with -o FILE");
}

/// Constants set on the command line are recorded (text and JSON) and warned about when
/// outside the documented range; an all-equal position column is warned about.
#[test]
fn overridden_constants_are_recorded() {
    let dir = tempfile::tempdir().expect("tempdir");
    let input = write_input(
        &dir,
        "same.csv",
        "position[mm],velocity[m/s],angle[deg]\n1,450,12\n1,480,16\n",
    );
    let (v, _) = summary_json(&[path_str(&input), "--deribas-k", "1.5"]);
    assert_eq!(v["constants"]["deribas_k"]["value"].as_f64(), Some(1.5));
    assert_eq!(v["constants"]["deribas_k"]["overridden"], true);
    assert_eq!(v["constants"]["wittman_n"]["overridden"], false);
    let w = v["warnings"].to_string();
    assert!(w.contains("Deribas k 1.5"), "{w}");
    assert!(w.contains("the same position"), "{w}");
    let o = run(&[
        "map",
        path_str(&input),
        "--pair",
        PAIR,
        "--deribas-k",
        "1.5",
    ]);
    assert!(text(&o.stderr).contains("deribas_k 1.5 (set by --deribas-k"));
}

/// JSON lines take '#' comment lines before the first object; a JSON file read as CSV gets a
/// hint to use --format jsonl.
#[test]
fn json_lines_comments_and_format_hint() {
    let input = b"# invented\n{\"position[mm]\": 0, \"velocity[m/s]\": 450, \"angle[deg]\": 12}\n";
    let o = run_stdin(&["map", "-", "--pair", PAIR, "--format", "jsonl"], input);
    assert!(o.status.success(), "{}", text(&o.stderr));
    assert_eq!(column(&text(&o.stdout), "row"), ["2"]);
    let o = run_stdin(&["map", "-", "--pair", PAIR], &input[11..]);
    assert_fails_with(&o, "--format jsonl");
}

/// A JSON-lines key given twice is refused, never silently overwritten.
#[test]
fn repeated_json_keys_are_refused() {
    let input = b"{\"position[mm]\": 0, \"velocity[m/s]\": 450, \"angle[deg]\": 12}\n{\"position[mm]\": 1, \"velocity[m/s]\": 450, \"angle[deg]\": 8, \"angle[deg]\": 30}\n";
    let o = run_stdin(&["map", "-", "--pair", PAIR, "--format", "jsonl"], input);
    assert_eq!(o.status.code(), Some(2));
    let err = text(&o.stderr);
    assert!(err.contains("row 2"), "{err}");
    assert!(
        err.contains("key 'angle[deg]' appears twice (at column"),
        "{err}"
    );
}

/// `--min-segment` joins short runs in the segment statistics only, is recorded, needs a unit,
/// and is refused with `--unsorted`.
#[test]
fn min_segment_joins_short_runs() {
    let dir = tempfile::tempdir().expect("tempdir");
    let input = dir.path().join("flicker.csv");
    // Welded at 450 m/s 12 deg, one not-welded flicker (250 m/s) in the middle.
    let mut t = String::from("position[mm],velocity[m/s],angle[deg]\n");
    for k in 0..21 {
        let v = if k == 10 { 250 } else { 450 };
        t.push_str(&format!("{},{v},12\n", k as f64 * 0.1));
    }
    std::fs::write(&input, t).expect("write");
    let (raw, _) = summary_json(&[path_str(&input)]);
    assert_eq!(raw["welded_segments"], 2);
    assert_eq!(raw["min_segment_m"], Value::Null);
    let (joined, _) = summary_json(&[path_str(&input), "--min-segment", "0.2mm"]);
    assert_eq!(joined["welded_segments"], 1);
    assert_eq!(joined["unwelded_segments"], 0);
    assert_eq!(joined["min_segment_m"].as_f64(), Some(2e-4));
    assert_eq!(joined["welded_length_m"], raw["welded_length_m"]);
    let o = run(&[
        "map",
        path_str(&input),
        "--pair",
        PAIR,
        "--min-segment",
        "2",
    ]);
    assert_eq!(o.status.code(), Some(2));
    let o = run(&[
        "map",
        path_str(&input),
        "--pair",
        PAIR,
        "--min-segment",
        "0.2mm",
        "--unsorted",
    ]);
    assert_eq!(o.status.code(), Some(2));
}

/// Issue 14: a row at angle 0 (the centre of a simulated interface, where the plates meet
/// head-on) was rejected as bad input; it is classified `head-on` (not welded: no collision
/// point sweeps the interface). Melted length is reported apart from the unbonded length (it
/// was counted as unbonded), and every millimetre is accounted for.
#[test]
fn head_on_rows_and_melted_length_are_accounted() {
    let dir = tempfile::tempdir().expect("tempdir");
    let input = write_input(
        &dir,
        "centre.csv",
        "position[mm],velocity[m/s],angle[deg]\n0,450,0\n1,450,0\n2,700,9\n3,700,9\n4,450,12\n5,450,12\n",
    );
    let (v, csv) = summary_json(&[path_str(&input)]);
    assert_eq!(
        column(&csv, "verdict"),
        ["head-on", "head-on", "melted", "melted", "welded", "welded"]
    );
    assert_eq!(v["rows_read"], 6);
    assert_eq!(v["rows_classified"], 6);
    assert_eq!(v["rows_rejected"], 0);
    assert_eq!(v["verdict_counts"]["head-on"], 2);
    // Head-on rows have no binding limit, no collision point, but an impact pressure.
    assert_eq!(column(&csv, "binding")[0], "");
    assert_eq!(column(&csv, "collision_velocity[m/s]")[0], "");
    assert!(!column(&csv, "impact_pressure[GPa]")[0].is_empty());
    // Each point owns half the distance to its neighbours: head-on 1.5 mm, melted 2 mm,
    // welded 1.5 mm. From the start to the first welded segment (3.5 mm): unbonded 1.5 mm
    // (the head-on centre), melted 2 mm (bonded, brittle), reported apart.
    let num = |x: &Value| x.as_f64().expect("number");
    assert!(
        (num(&v["unbonded_length_start_m"]) - 1.5e-3).abs() < 1e-12,
        "{v}"
    );
    assert!(
        (num(&v["melted_length_start_m"]) - 2.0e-3).abs() < 1e-12,
        "{v}"
    );
    let acc = &v["length_accounting_m"];
    assert!((num(&acc["welded"]) - 1.5e-3).abs() < 1e-12);
    assert!((num(&acc["melted"]) - 2.0e-3).abs() < 1e-12);
    assert!((num(&acc["unbonded"]) - 1.5e-3).abs() < 1e-12);
    assert!((num(&acc["total"]) - 5.0e-3).abs() < 1e-12);
    assert_eq!(num(&acc["no_verdict"]), 0.0);
    let ends = &v["ends_to_weld_m"]["start"];
    assert!((num(&ends["head-on"]) - 1.5e-3).abs() < 1e-12);
    // The text says so too.
    let o = run(&["map", path_str(&input), "--pair", PAIR]);
    assert!(o.status.success(), "{}", text(&o.stderr));
    let err = text(&o.stderr);
    assert!(err.contains("head-on 2 (33.3 %)"), "{err}");
    assert!(err.contains("melted 2.000 mm (bonded, brittle)"), "{err}");
    // A head-on row cannot carry a collision-point velocity.
    let o = run(&[
        "map",
        path_str(&input),
        "--pair",
        PAIR,
        "--velocity-kind",
        "collision",
    ]);
    assert_fails_with(&o, "a head-on impact has no collision point");
}

/// Rows outside the validity domain (issue 14) are counted by bound, and rows supersonic in
/// one plate (the mixed jetting case) are counted.
#[test]
fn domain_and_mixed_jetting_rows_are_counted() {
    let dir = tempfile::tempdir().expect("tempdir");
    let input = write_input(
        &dir,
        "edges.csv",
        "position[mm],velocity[m/s],angle[deg]\n0,450,40\n1,3000,12\n2,382,5\n3,450,12\n",
    );
    let (v, csv) = summary_json(&[path_str(&input)]);
    assert_eq!(
        column(&csv, "verdict")[..2],
        ["outside-domain", "outside-domain"]
    );
    let d = &v["validity_domain"];
    assert_eq!(d["outside_rows"], 2);
    assert_eq!(d["rows_outside_each_bound"]["collision_angle"], 1);
    assert_eq!(d["rows_outside_each_bound"]["impact_velocity"], 1);
    assert!(d["bounds"].as_array().is_some_and(|b| b.len() == 5));
    // 382 m/s at 5 deg: Vc 4383 m/s above the copper's C0, Vf below the aluminium's.
    assert!(
        v["jetting"]["mixed_rows"].as_u64().is_some_and(|n| n >= 1),
        "{v}"
    );
    assert!(v["jetting"]["supersonic_rows"]
        .as_u64()
        .is_some_and(|n| n >= 1));
    assert_eq!(v["jetting"]["mixed_rule"], "supersonic-side-polar");
    let o = run(&["map", path_str(&input), "--pair", PAIR]);
    let err = text(&o.stderr);
    assert!(err.contains("in one plate only (the mixed case"), "{err}");
    assert!(
        err.contains("validity domain: 2 row(s) outside it"),
        "{err}"
    );
}
