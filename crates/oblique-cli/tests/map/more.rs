//! More weld-map tests: JSON lines, ordering, bad rows, plots, options.

use super::*;

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

/// A window whose jetting criterion is off: the critical angle is not solved for any row (it
/// was solved directly for every supersonic row, about 20 times the cost of the whole map), the
/// summary counts no direct solves, and the map is the one of the same window with jetting on,
/// less the jetting verdicts: here the rows the jetting limit alone decides are the only ones
/// that differ.
#[test]
fn jetting_off_is_not_solved() {
    let dir = tempfile::tempdir().expect("tempdir");
    let lib = dir.path().join("lib");
    std::fs::create_dir(&lib).expect("library dir");
    let base = std::fs::read_to_string(data("map-lib/map-test-al-on-cu.ron")).expect("fixture");
    let off = base
        .replace(
            "name: \"map-test-al-on-cu\"",
            "name: \"map-test-al-on-cu-nojet\"",
        )
        .replace(
            "    boundaries: [",
            "    criteria: (jetting: (enabled: false, reason: \"test: jetting criterion off\")),\n    boundaries: [",
        );
    assert_ne!(off, base);
    std::fs::write(lib.join("nojet.ron"), off).expect("write window");
    std::fs::write(lib.join("base.ron"), &base).expect("write window");
    // Supersonic in both plates (small angles), the mixed case and subsonic rows.
    let mut body = String::from("position[mm],velocity[m/s],angle[deg]\n");
    for i in 0..400 {
        let angle = 1.0 + f64::from(i % 40) * 0.5;
        let velocity = 300.0 + f64::from(i / 40) * 40.0;
        body.push_str(&format!("{i},{velocity},{angle}\n"));
    }
    let input = write_input(&dir, "sweep.csv", &body);
    // `oblique map` of the sweep against `pair` of this library, the map to `out`.
    let map_with = |pair: &str, out: &str, extra: &[&str]| {
        let out = dir.path().join(out);
        let mut args = vec![
            "map",
            path_str(&input),
            "--pair",
            pair,
            "--library",
            path_str(&lib),
            "-o",
            path_str(&out),
        ];
        args.extend_from_slice(extra);
        (run(&args), out)
    };
    let map_of = |pair: &str| {
        let (o, out) = map_with(pair, &format!("{pair}.csv"), &["--json", "--all-columns"]);
        assert!(o.status.success(), "{}", text(&o.stderr));
        let v: Value = serde_json::from_slice(&o.stdout).expect("summary JSON");
        (v, std::fs::read_to_string(&out).expect("map"))
    };
    const NOJET: &str = "map-test-al-on-cu-nojet";
    let (on, map_on) = map_of(PAIR);
    let (off, map_off) = map_of(NOJET);
    let (o, _) = map_with(NOJET, "text.csv", &[]);
    // The map goes to a file, so the summary is on standard output.
    let err = text(&o.stdout);
    assert!(
        err.contains("jetting: criterion off in this window (reason: test: jetting criterion off): no verdict rests on it; "),
        "{err}"
    );
    assert_eq!(err.matches("jetting:").count(), 1, "{err}");
    assert!(!err.contains("rests on the shock-polar"), "{err}");
    // --exact-jetting has nothing to solve there, and says so.
    let (o, _) = map_with(NOJET, "exact.csv", &["--exact-jetting", "--json"]);
    assert!(o.status.success(), "{}", text(&o.stderr));
    let v: Value = serde_json::from_slice(&o.stdout).expect("summary JSON");
    assert_eq!(v["jetting"]["rows_solved_directly"], 0);
    assert!(
        v["warnings"].as_array().is_some_and(|w| w.iter().any(|m| m
            .as_str()
            .is_some_and(|m| m.starts_with("--exact-jetting has no effect")))),
        "{v}"
    );
    // Asking for the jetting margin of such a window says why there is none.
    let (o, _) = map_with(NOJET, "refused.csv", &["--columns", "row,margin_jetting"]);
    assert_fails_with(&o, "--columns: margin_jetting: not a limit of pair");
    assert!(
        text(&o.stderr).contains(
            "hint: margin_jetting: the window turns its jetting criterion off (reason: test: jetting criterion off)"
        ),
        "{}",
        text(&o.stderr)
    );
    assert_eq!(off["jetting"]["method"], "disabled");
    assert_eq!(off["jetting"]["enabled"], false);
    assert_eq!(off["jetting"]["off_reason"], "test: jetting criterion off");
    assert_eq!(on["jetting"]["enabled"], true);
    assert!(on["jetting"]["off_reason"].is_null());
    assert_eq!(off["jetting"]["rows_solved_directly"], 0, "{off}");
    assert!(on["jetting"]["supersonic_rows"]
        .as_u64()
        .is_some_and(|n| n > 50));
    assert!(on["jetting"]["mixed_rows"].as_u64().is_some_and(|n| n > 0));
    // The regimes are still decided exactly.
    for key in ["supersonic_rows", "mixed_rows"] {
        assert_eq!(off["jetting"][key], on["jetting"][key], "{key}");
    }
    // The same impact pressures and every other limit's margins, row by row.
    for col in [
        "collision_velocity[m/s]",
        "impact_pressure[GPa]",
        "margin_deribas_lower[deg]",
        "margin_boundary_1[m/s]",
    ] {
        assert_eq!(column(&map_on, col), column(&map_off, col), "{col}");
    }
    assert!(!map_off.lines().next().unwrap_or("").contains("jetting"));
    // Where jetting is not what fails, the verdicts agree.
    let (v_on, v_off) = (column(&map_on, "verdict"), column(&map_off, "verdict"));
    let failing = column(&map_on, "failing_limits");
    for ((a, b), f) in v_on.iter().zip(&v_off).zip(&failing) {
        if !f.contains("jetting") {
            assert_eq!(a, b, "failing: {f}");
        }
    }
}

/// An output in a folder that does not exist: exit 1 (a file that cannot be created, as for
/// every command's files), the message names the flag, the file and the folder, never the
/// temporary name the map writes under.
#[test]
fn an_output_in_a_missing_folder_names_the_folder() {
    let dir = tempfile::tempdir().expect("tempdir");
    let target = dir.path().join("no-such-folder").join("map.csv");
    let o = run(&[
        "map",
        path_str(&data("map-basic.csv")),
        "--pair",
        PAIR,
        "-o",
        path_str(&target),
    ]);
    assert_eq!(o.status.code(), Some(1), "{}", text(&o.stderr));
    let err = text(&o.stderr);
    assert!(err.contains("-o: cannot create"), "{err}");
    assert!(err.contains("no-such-folder"), "{err}");
    assert!(!err.contains(".tmp-"), "{err}");
}

/// JSON lines have no header row: a key without its unit is placed on the first object's line,
/// named as such.
#[test]
fn json_lines_without_units_name_the_first_objects_keys() {
    let o = run_stdin(
        &["map", "-", "--pair", PAIR, "--format", "jsonl"],
        b"{\"position\": 0, \"velocity\": 450, \"angle\": 12}\n",
    );
    assert_fails_with(&o, "<stdin>: line 1 (the keys of the first object): ");
    assert!(!text(&o.stderr).contains("(header)"), "{}", text(&o.stderr));
}
