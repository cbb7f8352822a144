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

pub(crate) const PAIR: &str = "map-test-al-on-cu";
pub(crate) const CAUTION_START: &str = "caution: screening estimate";

pub(crate) fn data(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data")
        .join(name)
}

pub(crate) fn oblique() -> Command {
    let mut c = Command::new(env!("CARGO_BIN_EXE_oblique"));
    c.env_remove("OBLIQUE_LIBRARY")
        .arg("--library")
        .arg(data("map-lib"));
    c
}

pub(crate) fn run(args: &[&str]) -> Output {
    oblique().args(args).output().expect("the binary runs")
}

pub(crate) fn run_stdin(args: &[&str], input: &[u8]) -> Output {
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

pub(crate) fn text(b: &[u8]) -> String {
    String::from_utf8_lossy(b).into_owned()
}

pub(crate) fn path_str(p: &Path) -> &str {
    p.to_str().expect("utf-8 path")
}

/// The run failed with exit 2 and its message names `needle`.
pub(crate) fn assert_fails_with(o: &Output, needle: &str) {
    assert_eq!(o.status.code(), Some(2), "{}", text(&o.stderr));
    assert!(
        text(&o.stderr).contains(needle),
        "{needle}: {}",
        text(&o.stderr)
    );
}

/// Write `body` to `name` in `dir`; its path.
pub(crate) fn write_input(dir: &tempfile::TempDir, name: &str, body: &str) -> PathBuf {
    let p = dir.path().join(name);
    std::fs::write(&p, body).expect("write the input");
    p
}

/// The values of one column of a CSV text.
pub(crate) fn column(csv: &str, name: &str) -> Vec<String> {
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

pub(crate) const BASIC_VERDICTS: [&str; 8] = [
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

pub(crate) fn summary_json(args: &[&str]) -> (Value, String) {
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

mod columns;
mod more;

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
