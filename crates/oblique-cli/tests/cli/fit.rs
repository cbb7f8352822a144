//! `oblique pair fit` and `oblique pair next-shot`: contract keys, --save into the user's file
//! (observations untouched, round trip, used by check), refusals and bad input.

use super::*;
use serde_json::Value;

fn json_of(o: &Output) -> Value {
    assert_eq!(o.status.code(), Some(0), "{}", stderr(o));
    serde_json::from_str(&stdout(o)).expect("json")
}

/// A user library with a copy of the built-in demo pair under another name (invented data, as
/// the demo file says).
fn shop() -> (tempfile::TempDir, std::path::PathBuf) {
    let dir = tempfile::tempdir().expect("tempdir");
    let text = std::fs::read_to_string(repo().join("windows/demo-al6061-on-cu.ron"))
        .expect("demo")
        .replace("name: \"demo-al6061-on-cu\"", "name: \"shop-al-on-cu\"");
    let path = dir.path().join("shop-al-on-cu.ron");
    std::fs::write(&path, text).expect("write");
    (dir, path)
}

fn observations_of(path: &std::path::Path) -> String {
    let text = std::fs::read_to_string(path).expect("read");
    let start = text.find("observations: [").expect("list");
    let end = text[start..].find("\n    ],").expect("end") + start;
    text[start..end].to_string()
}

#[test]
fn fit_json_has_the_contract_keys() {
    let v = json_of(&run(&["pair", "fit", "demo-al6061-on-cu", "--json"]));
    assert_eq!(v["observations"], 16);
    for key in ["deribas_k", "wittman_n"] {
        let c = &v["constants"][key];
        for field in ["value", "low", "high", "bounded"] {
            assert!(c.get(field).is_some(), "{key}.{field} in {v}");
        }
    }
    assert!(v["misclassified_before"].is_array());
    assert!(v["misclassified_after"].is_array());
    // Each misjudged shot carries the number every human view shows (#1 is the first).
    let before = v["misclassified_before"].as_array().expect("list");
    assert!(!before.is_empty(), "{v}");
    for m in before {
        assert_eq!(
            m["shot"].as_u64(),
            m["index"].as_u64().map(|i| i + 1),
            "{m}"
        );
    }
    assert!(v["warnings"].is_array());
    // Shot #10 of the demo lies outside the validity domain: the fit says it used it anyway.
    assert!(
        v["warnings"].as_array().expect("warnings").iter().any(|w| w
            .as_str()
            .is_some_and(|w| w.contains("outside the validity domain (#10)"))),
        "{v}"
    );
    assert!(v["caution"]
        .as_str()
        .expect("caution")
        .contains("not a guarantee"));
}

#[test]
fn one_sided_bounds_are_said_in_words() {
    // With the HEL multiple fitted too, Deribas k and m both act as velocity floors at small
    // angles: the demo's trials bound them on one side only, and the output says so.
    let v = json_of(&run(&[
        "pair",
        "fit",
        "demo-al6061-on-cu",
        "--constants",
        "deribas-k,wittman-n,hel-multiple",
        "--json",
    ]));
    let m = &v["constants"]["hel_multiple"];
    assert_eq!(m["bounded"], false, "{v}");
    let warnings = v["warnings"].as_array().expect("warnings");
    assert!(
        warnings.iter().any(|w| w
            .as_str()
            .unwrap_or("")
            .contains("hel_multiple: bounded on one side only")),
        "{v}"
    );
}

#[test]
fn save_writes_the_fit_keeps_the_observations_and_check_uses_it() {
    let (dir, path) = shop();
    let lib = dir.path().to_str().expect("path");
    let before = observations_of(&path);
    let v = json_of(&run(&[
        "--library",
        lib,
        "pair",
        "fit",
        "shop-al-on-cu",
        "--save",
        "--json",
    ]));
    assert_eq!(
        observations_of(&path),
        before,
        "the fit changed an observation"
    );
    let text = std::fs::read_to_string(&path).expect("read");
    assert!(text.contains("fitted: ("), "{text}");
    assert!(text.contains("observations: 16"), "{text}");
    // Round trip: the file's values are the fit's, to the four digits stored.
    let saved = json_of(&run(&[
        "--library",
        lib,
        "check",
        "--pair",
        "shop-al-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "--json",
    ]));
    let fitted = &saved["fitted"];
    assert_eq!(fitted["observations"], 16);
    for key in ["deribas_k", "wittman_n"] {
        let a = v["constants"][key]["value"].as_f64().expect("fit");
        let b = fitted["constants"][key]["value"].as_f64().expect("file");
        assert!((a - b).abs() <= 1e-3 * a, "{key}: {a} {b}");
    }
    let k = saved["criteria"]
        .as_array()
        .expect("criteria")
        .iter()
        .find(|c| c["id"] == "deribas-lower")
        .expect("deribas")
        .clone();
    assert_eq!(
        k["constants"]["k"].as_f64(),
        fitted["constants"]["deribas_k"]["value"].as_f64(),
        "{k}"
    );
    let human = run(&[
        "--library",
        lib,
        "check",
        "--pair",
        "shop-al-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
    ]);
    assert!(
        stdout(&human).contains("fitted to 16 trials"),
        "{}",
        stdout(&human)
    );
    // A second save replaces the first: one section, observations still untouched.
    json_of(&run(&[
        "--library",
        lib,
        "pair",
        "fit",
        "shop-al-on-cu",
        "--save",
        "--json",
    ]));
    let text = std::fs::read_to_string(&path).expect("read");
    assert_eq!(text.matches("fitted:").count(), 1, "{text}");
    assert_eq!(observations_of(&path), before);
    let o = run(&["--library", lib, "pair", "validate"]);
    assert_eq!(o.status.code(), Some(0), "{}{}", stdout(&o), stderr(&o));
}

#[test]
fn refusals_are_clear() {
    fails_with(
        &["pair", "fit", "demo-al6061-on-cu", "--save"],
        &["built in and read-only"],
    );
    let dir = tempfile::tempdir().expect("tempdir");
    let lib = dir.path().to_str().expect("path");
    let o = run(&[
        "--library",
        lib,
        "pair",
        "new",
        "empty-pair",
        "--flyer",
        "aa6061-t6",
        "--parent",
        "cu-c11000",
        "--flyer-thickness",
        "1mm",
        "--convention",
        "normal-to-flyer",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    fails_with(
        &["--library", lib, "pair", "fit", "empty-pair"],
        &["has no observations", "pair observe"],
    );
    fails_with(
        &["--library", lib, "pair", "next-shot", "empty-pair"],
        &["has no observations"],
    );
    fails_with(
        &["pair", "fit", "demo-al6061-on-cu", "--level", "95"],
        &["--level"],
    );
    fails_with(
        &["pair", "fit", "demo-al6061-on-cu", "--level", "100%"],
        &["--level"],
    );
}

#[test]
fn next_shot_json_has_shots_inside_the_range() {
    let v = json_of(&run(&[
        "pair",
        "next-shot",
        "demo-al6061-on-cu",
        "--count",
        "3",
        "--velocity-range",
        "350m/s..650m/s",
        "--angle-range",
        "4deg..20deg",
        "--json",
    ]));
    let shots = v["shots"].as_array().expect("shots");
    assert_eq!(shots.len(), 3);
    for s in shots {
        let vel = s["velocity_m_s"].as_f64().expect("velocity");
        let ang = s["angle_deg"].as_f64().expect("angle");
        assert!(
            (350.0..=650.0).contains(&vel) && (4.0..=20.0).contains(&ang),
            "{s}"
        );
        assert!(!s["reason"].as_str().expect("reason").is_empty());
    }
}

#[test]
fn next_shot_bad_input_names_the_flag() {
    fails_with(
        &["pair", "next-shot", "demo-al6061-on-cu", "--count", "0"],
        &["--count"],
    );
    fails_with(
        &["pair", "next-shot", "demo-al6061-on-cu", "--count", "11"],
        &["--count"],
    );
    fails_with(
        &[
            "pair",
            "next-shot",
            "demo-al6061-on-cu",
            "--velocity-range",
            "700m/s..300m/s",
        ],
        &["--velocity-range"],
    );
    fails_with(
        &[
            "pair",
            "next-shot",
            "demo-al6061-on-cu",
            "--velocity-range",
            "300..700",
        ],
        &["--velocity-range"],
    );
    fails_with(
        &[
            "pair",
            "next-shot",
            "demo-al6061-on-cu",
            "--angle-range",
            "4deg..95deg",
        ],
        &["--angle-range"],
    );
    fails_with(
        &["pair", "next-shot", "demo-al6061-on-cu", "--seed", "x"],
        &["--seed"],
    );
}

/// A saved fit whose constant sits at the end of a one-sided interval says so when saved and in
/// check; a trial added after the fit makes check say the fit is stale; the weld probability of
/// a one-sided constant takes the prior spread (its basis says so), never a spread of zero.
#[test]
fn saved_fits_carry_their_cautions() {
    let (dir, _path) = shop();
    let lib = dir.path().to_str().expect("path");
    let v = json_of(&run(&[
        "--library",
        lib,
        "pair",
        "fit",
        "shop-al-on-cu",
        "--constants",
        "deribas-k,wittman-n,hel-multiple",
        "--save",
        "--json",
    ]));
    let m = &v["constants"]["hel_multiple"];
    assert_eq!(m["bounded"], false, "{v}");
    let cautions = v["saved_cautions"].as_array().expect("cautions");
    let one_sided = |list: &[Value]| {
        list.iter()
            .any(|c| c.as_str().unwrap_or("").contains("one-sided interval"))
    };
    // hel_multiple is bounded on one side; when the value in use lay beyond that side it was
    // moved onto the end, and the caution is there.
    let at_end = [m["low"].as_f64(), m["high"].as_f64()]
        .iter()
        .flatten()
        .any(|e| (e - m["value"].as_f64().expect("value")).abs() < 1e-3 * e.abs());
    assert_eq!(one_sided(cautions), at_end, "{v}");

    let o = run(&[
        "--library",
        lib,
        "pair",
        "observe",
        "shop-al-on-cu",
        "--velocity",
        "420m/s",
        "--angle",
        "11deg",
        "--outcome",
        "welded",
        "--source",
        "stale-fit test (invented)",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let args = [
        "--library",
        lib,
        "check",
        "--pair",
        "shop-al-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "--velocity-sd",
        "5%",
        "--model-uncertainty",
        "on",
    ];
    let human = run(&args);
    let out = stdout(&human);
    assert!(out.contains("the file now holds 17"), "{out}");
    let mut j = args.to_vec();
    j.push("--json");
    let c = json_of(&run(&j));
    let cautions = c["fitted"]["cautions"].as_array().expect("cautions");
    assert!(
        cautions
            .iter()
            .any(|c| c.as_str().unwrap_or("").contains("now holds 17")),
        "{c}"
    );
    let text = c.to_string();
    assert!(
        !text.contains("\"above\":1e-6") && !text.contains("\"below\":1e-6"),
        "{text}"
    );
}
