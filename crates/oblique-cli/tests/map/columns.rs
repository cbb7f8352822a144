//! `--columns`: named sets and lists of columns, in CSV and JSON lines, the same values as the
//! default and `--all-columns` maps, and the errors that name the flag.

use super::*;

/// The map of the basic fixture with `extra` flags, CSV or JSON lines by the output's name.
fn map_with(extra: &[&str], out_name: &str) -> String {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join(out_name);
    let input = data("map-basic.csv");
    let mut args = vec![
        "map",
        path_str(&input),
        "--pair",
        PAIR,
        "-o",
        path_str(&out),
    ];
    args.extend_from_slice(extra);
    let o = run(&args);
    assert!(o.status.success(), "{}", text(&o.stderr));
    std::fs::read_to_string(&out).expect("map written")
}

/// The named sets: `default` is the map without the flag, byte for byte; `all` is
/// `--all-columns`; `verdict-only` is the row number and the verdict.
#[test]
fn named_sets_are_the_maps_they_name() {
    for out in ["map.csv", "map.jsonl"] {
        let plain = map_with(&[], out);
        assert_eq!(map_with(&["--columns", "default"], out), plain, "{out}");
        let all = map_with(&["--all-columns"], out);
        assert_eq!(map_with(&["--columns", "all"], out), all, "{out}");
        assert_eq!(map_with(&["--columns", "default,all"], out), all, "{out}");
    }
    let v = map_with(&["--columns", "verdict-only"], "map.csv");
    let mut want = String::from("row,verdict\n");
    for (i, verdict) in BASIC_VERDICTS.iter().enumerate() {
        want.push_str(&format!("{},{verdict}\n", i + 2));
    }
    assert_eq!(v, want);
    // The order of the list does not matter: the map keeps its own.
    assert_eq!(map_with(&["--columns", "verdict,row"], "map.csv"), want);
    let j = map_with(&["--columns", "verdict-only"], "map.jsonl");
    assert_eq!(
        j.lines().next(),
        Some(r#"{"row":2,"verdict":"not-welded"}"#)
    );
}

/// A list of columns holds the same values as the full maps, column by column, with or without
/// the row number and the input in front.
#[test]
fn listed_columns_hold_the_same_values() {
    let all = map_with(&["--all-columns"], "map.csv");
    let picked = map_with(
        &[
            "--columns",
            "binding_margin, margin_jetting,impact_velocity,verdict,outside_trial_data",
        ],
        "map.csv",
    );
    let header = picked.lines().next().expect("header");
    assert_eq!(
        header,
        "verdict,binding_margin,impact_velocity[m/s],margin_jetting[deg],outside_trial_data"
    );
    for name in header.split(',') {
        assert_eq!(column(&picked, name), column(&all, name), "{name}");
    }
    // The input as written, then a computed column; JSON lines alike.
    let input = map_with(&["--columns", "input,failing_limits"], "map.csv");
    let src = std::fs::read_to_string(data("map-basic.csv")).expect("fixture");
    for (line, src_line) in input.lines().skip(1).zip(src.lines().skip(1)) {
        assert!(line.starts_with(src_line), "{line} / {src_line}");
    }
    assert_eq!(
        column(&input, "failing_limits"),
        column(&all, "failing_limits")
    );
    let j = map_with(&["--columns", "flow_velocity,margins"], "map.jsonl");
    let first: Value = serde_json::from_str(j.lines().next().expect("a row")).expect("JSON");
    let obj = first.as_object().expect("object");
    assert!(obj
        .keys()
        .all(|k| k.starts_with("margin_") || k == "flow_velocity[m/s]"));
    assert!(!obj.contains_key("row"));
}

fn run_owned(args: &[String]) -> Output {
    let v: Vec<&str> = args.iter().map(String::as_str).collect();
    run(&v)
}

/// Unknown names and limits are refused before any output, naming the flag; `--columns` and
/// `--all-columns` cannot go together.
#[test]
fn bad_lists_are_refused_naming_the_flag() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("map.csv");
    let args = |cols: &'static str| {
        vec![
            "map".to_string(),
            path_str(&data("map-basic.csv")).to_string(),
            "--pair".into(),
            PAIR.into(),
            "-o".into(),
            path_str(&out).to_string(),
            "--columns".into(),
            cols.into(),
        ]
    };
    let o = run_owned(&args("row,verdicts"));
    assert_fails_with(&o, "'verdicts' is not a column of the map");
    assert!(text(&o.stderr).contains("verdict-only"));
    let o = run_owned(&args("verdict,margin_wavy"));
    assert_fails_with(&o, "--columns: margin_wavy: not a limit of pair");
    assert!(text(&o.stderr).contains("margin_jetting"));
    let o = run_owned(&args(" , "));
    assert_eq!(o.status.code(), Some(2));
    assert!(!out.exists(), "no map for a refused list");
    let mut both = args("all");
    both.push("--all-columns".into());
    let o = run_owned(&both);
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o.stderr).contains("--all-columns"));
}

/// A regular file is memory-mapped; with `OBLIQUE_MAP_NO_MMAP` it is read, and standard input
/// always is: the three give the same map, byte for byte.
#[test]
fn mapped_read_and_piped_inputs_give_the_same_map() {
    let input = data("map-basic.csv");
    let args = ["map", path_str(&input), "--pair", PAIR, "--all-columns"];
    let mapped = oblique().args(args).output().expect("runs");
    let read = oblique()
        .args(args)
        .env("OBLIQUE_MAP_NO_MMAP", "1")
        .output()
        .expect("runs");
    let bytes = std::fs::read(&input).expect("fixture");
    let piped = run_stdin(&["map", "-", "--pair", PAIR, "--all-columns"], &bytes);
    for o in [&mapped, &read, &piped] {
        assert!(o.status.success(), "{}", text(&o.stderr));
    }
    assert!(!mapped.stdout.is_empty());
    assert_eq!(mapped.stdout, read.stdout);
    assert_eq!(mapped.stdout, piped.stdout);
}
