//! `oblique aim`: the closed-form case, the best point's margins against check, the set-up
//! search within the bank's rating and against `estimate`, bad input.

use super::{fails_with, json, repo, run, run_in, stderr, stdout};
use serde_json::Value;

fn num(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("a number: {v}"))
}

/// A library folder holding the constructed two-pair window.
fn constructed() -> tempfile::TempDir {
    let dir = tempfile::tempdir().expect("tmp");
    std::fs::copy(
        repo().join("crates/oblique-cli/tests/data/two-pairs.ron"),
        dir.path().join("two-pairs.ron"),
    )
    .expect("copy");
    dir
}

/// Two pairs of parallel limits (velocity 300/500 m/s, angle 6/18 deg): the best point is the
/// midpoint in normalised margin, 400 m/s and 12 deg, whatever the two scatters (stated
/// tolerance: 0.5 m/s and 0.02 deg before rounding; exact after rounding to 1 m/s and 0.1 deg).
#[test]
fn aim_on_two_pairs_of_parallel_limits_finds_the_closed_form_point() {
    let lib = constructed();
    let d = lib.path().to_str().expect("utf-8");
    for (vsd, asd) in [("20m/s", "1deg"), ("40m/s", "0.5deg"), ("10m/s", "2deg")] {
        let j = json(&[
            "--library",
            d,
            "aim",
            "--pair",
            "constructed-two-pairs",
            "--velocity-sd",
            vsd,
            "--angle-sd",
            asd,
            "--model-uncertainty",
            "off",
            "--json",
        ]);
        let b = &j["best"];
        assert_eq!(num(&b["impact_velocity_m_s"]), 400.0, "{vsd} {asd}");
        assert_eq!(num(&b["collision_angle_deg"]), 12.0, "{vsd} {asd}");
        let u = &b["unrounded"];
        assert!((num(&u["impact_velocity_m_s"]) - 400.0).abs() < 0.5, "{u}");
        assert!((num(&u["collision_angle_deg"]) - 12.0).abs() < 0.02, "{u}");
        assert!(j["ranked"].as_array().is_some_and(|r| r.len() > 1));
    }
}

#[test]
fn the_best_points_margins_are_checks() {
    let j = json(&["aim", "--pair", "demo-al6061-on-cu", "--json"]);
    let b = &j["best"];
    let v = format!("{}m/s", num(&b["impact_velocity_m_s"]));
    let a = format!("{}deg", num(&b["collision_angle_deg"]));
    let k = json(&[
        "check",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        &v,
        "--angle",
        &a,
        "--json",
    ]);
    assert_eq!(k["inside"], true);
    assert_eq!(b["velocity_headroom"], k["velocity_headroom"]);
    for m in b["margins"].as_array().expect("margins") {
        let label = m["limit"].as_str().expect("label");
        let c = k["criteria"]
            .as_array()
            .into_iter()
            .flatten()
            .chain(k["boundaries"].as_array().into_iter().flatten())
            .find(|c| {
                c["id"].as_str() == Some(label)
                    || c["label"]
                        .as_str()
                        .map(|l| format!("boundary \"{l}\""))
                        .as_deref()
                        == Some(label)
            });
        if let Some(c) = c {
            assert_eq!(m["margin"], c["margin"], "{label}");
            assert_eq!(m["velocity_headroom"], c["velocity_headroom"], "{label}");
            assert_eq!(m["angle_headroom"], c["angle_headroom"], "{label}");
        } else {
            assert_eq!(m["kind"], "validity-domain", "{label}");
        }
    }
    assert!(j["caution"]
        .as_str()
        .is_some_and(|c| c.contains("not a guarantee")));
    let text = stdout(&run(&["aim", "--pair", "demo-al6061-on-cu"]));
    for needle in [
        "best point: Vp",
        "nearest limit",
        "region keeping a weld probability",
        "ranked",
        "not a guarantee",
    ] {
        assert!(text.contains(needle), "{needle}: {text}");
    }
}

fn setup_args() -> Vec<&'static str> {
    vec![
        "aim",
        "--pair",
        "demo-al6061-on-cu",
        "--machine",
        "harbourside-bank-300uf",
        "--coil-bore",
        "21mm",
        "--coil-length",
        "20mm..60mm",
        "--coil-inductance",
        "20nH",
        "--tube-outer-radius",
        "20mm",
        "--charge-voltage",
        "6kV..14kV",
        "--standoff",
        "1mm..3mm",
        "--chamfer",
        "4deg..16deg",
        "--max-current",
        "600kA",
    ]
}

#[test]
fn the_set_up_search_respects_the_rating_and_its_best_velocity_is_estimates() {
    let mut args = setup_args();
    args.extend(["--steps", "5", "--json"]);
    let j = json(&args);
    assert!(
        num(&j["left_out"]["above_rated_voltage"]) > 0.0,
        "14 kV is above the 12 kV rating"
    );
    let ranked = j["ranked"].as_array().expect("ranked");
    assert!(!ranked.is_empty());
    for r in ranked {
        assert!(num(&r["charge_voltage_v"]) <= 12e3, "{r}");
        assert!(num(&r["peak_current_held_a"]) <= 600e3, "{r}");
        assert_eq!(r["inside"], true);
        assert_eq!(num(&r["collision_angle_deg"]), num(&r["chamfer_deg"]));
        // The share of each rating used, and whether it comes within 10 % of one.
        let uses = r["rating_use"].as_array().expect("rating_use");
        let current = uses
            .iter()
            .find(|u| u["rating"] == "peak current (held still)")
            .expect("the current rating");
        let f = num(&current["fraction"]);
        assert!(
            (f - num(&r["peak_current_held_a"]) / 600e3).abs() < 1e-6,
            "{r}"
        );
        let near = uses.iter().any(|u| num(&u["fraction"]) >= 0.9);
        assert_eq!(r["near_a_rating"], near, "{r}");
    }
    let best = &j["best"];
    assert_eq!(best, &ranked[0]);
    // The same set-up through `oblique estimate`: the same velocity, digit for digit.
    let cmd = best["estimate_command"].as_str().expect("command");
    let mut e: Vec<&str> = cmd.split_whitespace().skip(1).collect();
    e.push("--json");
    let est = json(&e);
    assert_eq!(
        est["impact_velocity_m_s"], best["impact_velocity_m_s"],
        "{cmd}"
    );
    let text = stdout(&run(&setup_args()));
    for needle in [
        "best set-up: coil of bore radius",
        "the collision angle is the rod's chamfer",
        "above the rated voltage",
        "the same set-up on its own: oblique estimate mpw-tube",
        "not a guarantee",
    ] {
        assert!(text.contains(needle), "{needle}: {text}");
    }
}

#[test]
fn bad_aim_input_exits_2_naming_the_flag() {
    let with = |extra: &[&'static str]| {
        let mut a = setup_args();
        a.extend_from_slice(extra);
        a
    };
    fails_with(&with(&["--steps", "0"]), &["--steps"]);
    fails_with(&with(&["--steps", "101"]), &["--steps", "2 to 100"]);
    fails_with(
        &[
            "aim",
            "--pair",
            "demo-al6061-on-cu",
            "--machine",
            "harbourside-bank-300uf",
            "--coil-length",
            "60mm..20mm",
        ],
        &["--coil-length", "reversed"],
    );
    fails_with(
        &[
            "aim",
            "--pair",
            "demo-al6061-on-cu",
            "--machine",
            "harbourside-bank-300uf",
            "--standoff",
            "2mm..2mm",
        ],
        &["--standoff", "empty"],
    );
    fails_with(
        &[
            "aim",
            "--pair",
            "demo-al6061-on-cu",
            "--machine",
            "harbourside-bank-300uf",
            "--chamfer",
            "4deg..16mm",
        ],
        &["--chamfer", "mixes kinds"],
    );
    fails_with(
        &[
            "aim",
            "--pair",
            "demo-al6061-on-cu",
            "--machine",
            "harbourside-bank-300uf",
            "--charge-voltage",
            "6kV..12kV",
            "--standoff",
            "1mm..3mm",
            "--chamfer",
            "4deg..16deg",
        ],
        &["--tube-outer-radius"],
    );
    fails_with(
        &[
            "aim",
            "--pair",
            "demo-al6061-on-cu",
            "--coil-length",
            "20mm..60mm",
        ],
        &["--machine"],
    );
    fails_with(
        &[
            "aim",
            "--pair",
            "demo-al6061-on-cu",
            "--min-probability",
            "0%",
        ],
        &["--min-probability"],
    );
    fails_with(
        &["aim", "--pair", "demo-al6061-on-cu", "--top", "0"],
        &["--top"],
    );
    fails_with(
        &["aim", "--pair", "demo-al6061-on-cu", "--velocity-sd", "0%"],
        &["--velocity-sd"],
    );
    fails_with(
        &[
            "aim",
            "--pair",
            "demo-al6061-on-cu",
            "--convention",
            "bisector",
        ],
        &["--convention"],
    );
    let o = run_in(
        std::path::Path::new("."),
        &["aim", "--pair", "no-such-pair"],
    );
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
}

/// A bank file's current rating is used when --max-current is not given, and said so.
#[test]
fn a_bank_files_current_rating_leaves_set_ups_out() {
    let dir = tempfile::tempdir().expect("tmp");
    let machines = dir.path().join("machines");
    std::fs::create_dir_all(&machines).expect("mkdir");
    let bank = std::fs::read_to_string(repo().join("windows/machines/harbourside-bank-300uf.ron"))
        .expect("bank")
        .replace(
            "        ring_down: (",
            "        max_current: (value: \"450 kA\", source: \"invented rating for a test\"),\n        ring_down: (",
        );
    std::fs::write(
        machines.join("test-bank.ron"),
        bank.replace("name: \"harbourside-bank-300uf\"", "name: \"test-bank\""),
    )
    .expect("write");
    let d = dir.path().to_str().expect("utf-8");
    let j = json(&[
        "--library",
        d,
        "aim",
        "--pair",
        "demo-al6061-on-cu",
        "--machine",
        "test-bank",
        "--coil",
        "harbourside-coil-42mm",
        "--tube-outer-radius",
        "20mm",
        "--charge-voltage",
        "6kV..12kV",
        "--standoff",
        "1mm..3mm",
        "--chamfer",
        "8deg..20deg",
        "--json",
    ]);
    assert_eq!(j["max_current_a"], 450e3);
    assert!(j["max_current_from"]
        .as_str()
        .is_some_and(|f| f.starts_with("test-bank")));
    assert!(num(&j["left_out"]["above_current_rating"]) > 0.0);
    for r in j["ranked"].as_array().expect("ranked") {
        assert!(num(&r["peak_current_held_a"]) <= 450e3);
    }
}
