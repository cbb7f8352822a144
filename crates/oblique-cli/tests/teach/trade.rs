//! `oblique trade`: the rows are check's points, Vc falls as the angle rises, the window's entry
//! and exit agree with check's headroom, files and bad input.

use super::{fails_with, json, run, run_in, stderr, stdout};
use serde_json::Value;

fn num(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("a number: {v}"))
}

#[test]
fn along_the_angle_vc_falls_and_entry_and_exit_match_checks_headroom() {
    for (pair_args, v) in [
        (vec!["--pair", "demo-al6061-on-cu"], "450m/s"),
        (vec!["--pair", "demo-al6061-on-cu"], "380m/s"),
        (
            vec![
                "--flyer",
                "aa6061-t6",
                "--parent",
                "cu-c11000",
                "--flyer-thickness",
                "1mm",
                "--convention",
                "normal-to-flyer",
            ],
            "420m/s",
        ),
        (
            vec![
                "--flyer",
                "aa6061-t6",
                "--parent",
                "ss304",
                "--flyer-thickness",
                "2mm",
                "--convention",
                "bisector",
                "--process",
                "explosive",
            ],
            "500m/s",
        ),
    ] {
        let mut args = vec!["trade"];
        args.extend(&pair_args);
        args.extend([
            "--velocity",
            v,
            "--angle-range",
            "2deg..30deg",
            "--steps",
            "57",
            "--json",
        ]);
        let t = json(&args);
        let rows = t["rows"].as_array().expect("rows");
        assert_eq!(rows.len(), 57);
        for w in rows.windows(2) {
            assert!(
                num(&w[1]["collision_velocity_m_s"]) < num(&w[0]["collision_velocity_m_s"]),
                "{args:?}: Vc must fall as the angle rises"
            );
        }
        let crossings = t["crossings"].as_array().expect("crossings");
        assert!(
            !crossings.is_empty(),
            "{args:?}: the window is entered or left somewhere"
        );
        // Every entry and exit, seen from a row inside next to it: check's angle headroom of
        // the limit named reaches it at the same printed angle.
        for c in crossings {
            let at = num(&c["at"]);
            let unrounded = num(&c["at_unrounded"]);
            let inside = rows
                .iter()
                .filter(|r| r["inside"] == true)
                .min_by(|a, b| {
                    let d = |r: &Value| (num(&r["collision_angle_deg"]) - unrounded).abs();
                    d(a).total_cmp(&d(b))
                })
                .expect("an inside row");
            let angle = format!("{}deg", num(&inside["collision_angle_deg"]));
            let mut check = vec!["check"];
            check.extend(&pair_args);
            check.extend(["--velocity", v, "--angle", &angle, "--json"]);
            let k = json(&check);
            let label = c["limit"].as_str().expect("label");
            let limits: Vec<&Value> = k["criteria"]
                .as_array()
                .into_iter()
                .flatten()
                .chain(k["boundaries"].as_array().into_iter().flatten())
                .collect();
            let found = limits.iter().find(|l| {
                l["id"].as_str() == Some(label)
                    || l["label"]
                        .as_str()
                        .map(|b| format!("boundary \"{b}\""))
                        .as_deref()
                        == Some(label)
            });
            if c["span_edge"] == true {
                // Where a boundary's span begins: check does not extrapolate it, so the crossing
                // is one of its points' angles.
                let b = found.expect("the boundary");
                assert_eq!(b["in_range"], false, "{args:?}: {c}");
                continue;
            }
            match found {
                Some(l) => assert_eq!(
                    num(&l["reached_at_angle_deg"]),
                    at,
                    "{args:?}: crossing {c} against check at {angle}"
                ),
                None => assert!(
                    c["domain_edge"] == true,
                    "{args:?}: crossing {c} names no limit of check"
                ),
            }
        }
    }
}

#[test]
fn along_the_velocity_the_crossings_match_checks_velocity_headroom() {
    let t = json(&[
        "trade",
        "--pair",
        "demo-al6061-on-cu",
        "--angle",
        "10deg",
        "--velocity-range",
        "200m/s..800m/s",
        "--steps",
        "25",
        "--json",
    ]);
    let k = json(&[
        "check",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "--json",
    ]);
    let ats: Vec<f64> = t["crossings"]
        .as_array()
        .expect("c")
        .iter()
        .map(|c| num(&c["at"]))
        .collect();
    let span = &k["domain"]["window_span"]["impact_velocity_m_s"];
    // check's "where the window is" prints 379 to 572 m/s at this angle.
    assert_eq!(ats, vec![379.0, 572.0], "{span}");
    let m = k["criteria"]
        .as_array()
        .expect("c")
        .iter()
        .find(|c| c["id"] == "melting-upper")
        .expect("m");
    assert_eq!(num(&m["reached_at_impact_velocity_m_s"]), 572.0);
}

#[test]
fn trade_writes_csv_and_plots_and_prints_the_caution() {
    let dir = tempfile::tempdir().expect("tmp");
    let o = run_in(
        dir.path(),
        &[
            "trade",
            "--pair",
            "demo-al6061-on-cu",
            "--velocity",
            "450m/s",
            "--angle-range",
            "2deg..30deg",
            "--csv",
            "t.csv",
            "--plot",
            "t.svg",
            "--velocity-sd",
            "5%",
            "--angle-sd",
            "1deg",
            "--samples",
            "300",
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let text = stdout(&o);
    assert!(
        text.contains("enters the window at a collision angle of 6.17 deg"),
        "{text}"
    );
    assert!(
        text.contains("P(weld)") && text.contains("not a guarantee"),
        "{text}"
    );
    let csv = std::fs::read_to_string(dir.path().join("t.csv")).expect("csv");
    assert!(csv.starts_with("collision_angle[deg],impact_velocity[m/s],collision_velocity[m/s]"));
    assert_eq!(csv.lines().count(), 30);
    assert!(csv
        .lines()
        .next()
        .is_some_and(|h| h.ends_with("weld_probability")));
    let svg = std::fs::read_to_string(dir.path().join("t.svg")).expect("svg");
    roxmltree::Document::parse(&svg).expect("well-formed SVG");
    for needle in [
        "enters at 6.17 deg",
        "leaves at 25.00 deg",
        "Deribas minimum angle",
        "melting maximum",
        "not a guarantee",
    ] {
        assert!(svg.contains(needle), "{needle}");
    }
    let o = run_in(
        dir.path(),
        &[
            "trade",
            "--pair",
            "demo-al6061-on-cu",
            "--angle",
            "10deg",
            "--velocity-range",
            "200m/s..800m/s",
            "--plot",
            "t.png",
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let png = std::fs::read(dir.path().join("t.png")).expect("png");
    assert_eq!(&png[1..4], b"PNG");
    // Same input, same bytes.
    let again = run_in(
        dir.path(),
        &[
            "trade",
            "--pair",
            "demo-al6061-on-cu",
            "--velocity",
            "450m/s",
            "--angle-range",
            "2deg..30deg",
            "--plot",
            "u.svg",
        ],
    );
    assert!(again.status.success());
    let first = run_in(
        dir.path(),
        &[
            "trade",
            "--pair",
            "demo-al6061-on-cu",
            "--velocity",
            "450m/s",
            "--angle-range",
            "2deg..30deg",
            "--plot",
            "v.svg",
        ],
    );
    assert!(first.status.success());
    assert_eq!(
        std::fs::read(dir.path().join("u.svg")).expect("u"),
        std::fs::read(dir.path().join("v.svg")).expect("v")
    );
}

#[test]
fn bad_trade_input_exits_2_naming_the_flag() {
    let base = ["trade", "--pair", "demo-al6061-on-cu"];
    let with = |extra: &[&'static str]| {
        let mut a: Vec<&str> = base.to_vec();
        a.extend_from_slice(extra);
        a
    };
    fails_with(
        &with(&["--velocity", "450m/s", "--angle-range", "10deg..10deg"]),
        &["--angle-range", "empty"],
    );
    fails_with(
        &with(&["--velocity", "450m/s", "--angle-range", "30deg..2deg"]),
        &["--angle-range", "reversed"],
    );
    fails_with(
        &with(&["--velocity", "450m/s", "--angle-range", "2deg..800m/s"]),
        &["--angle-range", "mixes kinds", "a velocity"],
    );
    fails_with(
        &with(&["--angle", "10deg", "--velocity-range", "200m/s..30deg"]),
        &["--velocity-range", "mixes kinds"],
    );
    fails_with(
        &with(&["--angle", "10deg", "--velocity-range", "200..800"]),
        &["--velocity-range"],
    );
    fails_with(
        &with(&[
            "--velocity",
            "450m/s",
            "--angle-range",
            "2deg..30deg",
            "--steps",
            "0",
        ]),
        &["--steps", "2 to 2000"],
    );
    fails_with(
        &with(&[
            "--velocity",
            "450m/s",
            "--angle-range",
            "2deg..30deg",
            "--steps",
            "2001",
        ]),
        &["--steps", "2 to 2000"],
    );
    fails_with(
        &with(&["--velocity", "450m/s", "--angle-range", "2deg..95deg"]),
        &["--angle-range", "(0, 90)"],
    );
    fails_with(&with(&["--angle-range", "2deg..30deg"]), &["--velocity"]);
    fails_with(
        &with(&[
            "--velocity",
            "450m/s",
            "--angle-range",
            "2deg..30deg",
            "--plot",
            "t.pdf",
        ]),
        &["--plot", ".pdf"],
    );
    let o = run(&with(&["--velocity", "450m/s"]));
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
}

/// Where the window is inside on two stretches, check names both and marks the one no trial
/// supports; trade marks it too; the same end has the same digits in both and in the headroom.
#[test]
fn every_inside_stretch_is_named_and_one_outside_the_trial_data_says_so() {
    let o = run(&[
        "check",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "382m/s",
        "--angle",
        "5deg",
    ]);
    let out = stdout(&o);
    let line = out
        .lines()
        .find(|l| l.starts_with("where the window is"))
        .expect("the line");
    assert!(
        line.contains(
            "from 4.45 deg to 5.00 deg (outside the trial data) and from 8.96 deg to 23.76 deg"
        ),
        "{line}"
    );
    let o = run(&[
        "trade",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "380m/s",
        "--angle-range",
        "1deg..40deg",
        "--steps",
        "400",
    ]);
    let out = stdout(&o);
    assert!(
        out.contains("inside the window from 4.40 deg to 5.00 deg: the model limits only, outside the trial data"),
        "{out}"
    );
    // The tip bounce-back boundary at 25 deg: 25.00 in the stretch and in the headroom column.
    let o = run(&[
        "check",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
    ]);
    let out = stdout(&o);
    assert!(out.contains("25.00 deg (+15.00 deg)"), "{out}");
    assert!(out.contains("to 25.00 deg"), "{out}");
    assert!(!out.contains("24.99"), "{out}");
}

/// The plot's lines keep their sub-pixel vertices: the point's own impact velocity, a straight
/// line in the Vp panel of a trade along the velocity, is drawn straight (every vertex within
/// 0.05 px of the chord of its neighbours). The backend had rounded each vertex to a whole
/// pixel, bending the rows' straight or gently curved values into visible steps.
#[test]
fn trade_plot_lines_are_not_stair_stepped() {
    let dir = tempfile::tempdir().expect("tmp");
    let o = run_in(
        dir.path(),
        &[
            "trade",
            "--pair",
            "demo-al6061-on-cu",
            "--angle",
            "10deg",
            "--velocity-range",
            "200m/s..800m/s",
            "--steps",
            "50",
            "--plot",
            "tv.svg",
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let svg = std::fs::read_to_string(dir.path().join("tv.svg")).expect("svg");
    roxmltree::Document::parse(&svg).expect("well-formed SVG");
    let straight = svg
        .lines()
        .filter(|l| l.starts_with("<polyline") && l.contains("stroke=\"#141414\""))
        .filter_map(|l| {
            let pts: Vec<(f64, f64)> = l
                .split("points=\"")
                .nth(1)?
                .split('"')
                .next()?
                .split_whitespace()
                .filter_map(|p| {
                    let (x, y) = p.split_once(',')?;
                    Some((x.parse().ok()?, y.parse().ok()?))
                })
                .collect();
            (pts.len() >= 10 && (pts[0].1 - pts[pts.len() - 1].1).abs() > 50.0).then_some(pts)
        })
        .any(|pts| {
            pts.windows(3).all(|w| {
                let (a, b, c) = (w[0], w[1], w[2]);
                let t = (b.0 - a.0) / (c.0 - a.0);
                (a.1 + t * (c.1 - a.1) - b.1).abs() < 0.05
            })
        });
    assert!(straight, "no straight rising line drawn straight");
}
