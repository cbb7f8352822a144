//! `estimate` and `sweep` without a pair file: `--flyer`, `--parent`, `--flyer-thickness`,
//! `--convention` as in `check`.

use super::{fails_with, json, run, stdout};

const TUBE: [&str; 14] = [
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
];

#[test]
fn estimate_without_a_pair_file_checks_as_check_does() {
    let mut a = vec!["estimate", "mpw-tube"];
    a.extend(TUBE);
    a.extend([
        "--parent",
        "cu-c11000",
        "--convention",
        "normal-to-flyer",
        "--angle",
        "10deg",
        "--json",
    ]);
    let e = json(&a);
    let w = &e["window_check"];
    let v = format!("{}m/s", e["impact_velocity_m_s"].as_f64().expect("vp"));
    let k = json(&[
        "check",
        "--flyer",
        "aa6061-t6",
        "--parent",
        "cu-c11000",
        "--flyer-thickness",
        "1mm",
        "--velocity",
        &v,
        "--angle",
        "10deg",
        "--convention",
        "normal-to-flyer",
        "--process",
        "magnetic-pulse",
        "--json",
    ]);
    // The same verdict and margins (the velocity passed through its 11 printed digits).
    for key in ["inside", "prediction", "binding"] {
        assert_eq!(w[key], k[key], "{key}");
    }
    for key in [
        "reached_at_impact_velocity_m_s",
        "headroom_m_s",
        "headroom_percent",
        "limit",
    ] {
        assert_eq!(
            w["velocity_headroom"][key], k["velocity_headroom"][key],
            "{key}"
        );
    }
    let close = |a: &serde_json::Value, b: &serde_json::Value| {
        let (a, b) = (a.as_f64().expect("a"), b.as_f64().expect("b"));
        (a - b).abs() <= 1e-9 * a.abs().max(1.0)
    };
    assert!(close(&w["impact_pressure_pa"], &k["impact_pressure_pa"]));
    let (wc, kc) = (
        w["criteria"].as_array().expect("c"),
        k["criteria"].as_array().expect("c"),
    );
    assert_eq!(wc.len(), kc.len());
    for (a, b) in wc.iter().zip(kc) {
        assert_eq!(a["id"], b["id"]);
        assert!(close(&a["margin"], &b["margin"]), "{}", a["id"]);
    }
}

#[test]
fn sweep_and_explosive_estimate_without_a_pair_file() {
    let mut a = vec!["sweep", "mpw-tube"];
    a.extend(TUBE.iter().take(10));
    a.extend([
        "--standoff",
        "1mm,2mm,3mm",
        "--charge-voltage",
        "6kV..10kV",
        "--steps",
        "3",
        "--parent",
        "cu-c11000",
        "--convention",
        "normal-to-flyer",
        "--angle",
        "10deg",
        "--json",
    ]);
    let s = json(&a);
    assert!(s["points"].as_array().is_some_and(|x| x.len() == 9));
    assert_eq!(s["pair"], "aa6061-t6-on-cu-c11000");
    let e = stdout(&run(&[
        "estimate",
        "explosive",
        "--gurney-velocity",
        "1500m/s",
        "--detonation-velocity",
        "2500m/s",
        "--mass-ratio",
        "2",
        "--preset-angle",
        "0deg",
        "--flyer",
        "aa6061-t6",
        "--flyer-thickness",
        "3mm",
        "--parent",
        "ss304",
        "--convention",
        "bisector",
    ]));
    assert!(e.contains("window check (aa6061-t6-on-ss304"), "{e}");
}

#[test]
fn without_a_pair_file_every_missing_flag_is_named() {
    let with = |extra: &[&'static str]| {
        let mut a = vec!["estimate", "mpw-tube"];
        a.extend(TUBE);
        a.extend_from_slice(extra);
        a
    };
    fails_with(&with(&["--angle", "10deg"]), &["--angle", "--parent"]);
    fails_with(
        &with(&["--parent", "cu-c11000", "--angle", "10deg"]),
        &["--convention"],
    );
    fails_with(
        &with(&[
            "--parent",
            "cu-c1100",
            "--convention",
            "normal-to-flyer",
            "--angle",
            "10deg",
        ]),
        &["--parent", "cu-c11000"],
    );
    fails_with(&with(&["--convention", "bisector"]), &["--parent"]);
    fails_with(
        &with(&["--pair", "demo-al6061-on-cu", "--parent", "cu-c11000"]),
        &["--pair", "--parent"],
    );
}
