//! Every runnable example in the top-level `examples/` runs here (so none goes stale), and the
//! ready-to-copy input files there are used as a user would use them, through the real binary.

#[path = "../../../examples/check_point.rs"]
mod check_point;
#[path = "../../../examples/classify_interface.rs"]
mod classify_interface;
#[path = "../../../examples/estimate_setup.rs"]
mod estimate_setup;
#[path = "../../../examples/weld_probability.rs"]
mod weld_probability;

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn examples() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../examples")
}

fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_oblique"))
        .args(args)
        .env_remove("OBLIQUE_LIBRARY")
        .output()
        .expect("the binary runs")
}

fn ok(args: &[&str]) -> String {
    let o = run(args);
    let err = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(0), "{args:?}\n{err}");
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn p(path: &Path) -> &str {
    path.to_str().expect("a UTF-8 path")
}

#[test]
fn example_check_point_runs() {
    check_point::main();
}

#[test]
fn example_classify_interface_runs() {
    classify_interface::main();
}

#[test]
fn example_estimate_setup_runs() {
    estimate_setup::main();
}

#[test]
fn example_weld_probability_runs() {
    weld_probability::main();
}

#[test]
fn every_example_file_says_it_is_invented() {
    let mut files = vec![
        examples().join("shots.csv"),
        examples().join("interface.csv"),
        examples().join("shop/larchmont-al1100-on-cu.ron"),
    ];
    for e in std::fs::read_dir(examples().join("shop/machines")).expect("machines folder") {
        files.push(e.expect("entry").path());
    }
    for f in files {
        let text = std::fs::read_to_string(&f).expect("readable");
        assert!(
            text.to_lowercase().contains("invented"),
            "{} does not say it is invented",
            f.display()
        );
    }
}

#[test]
fn the_example_shop_folder_validates_and_its_pair_checks() {
    let shop = examples().join("shop");
    let out = ok(&["--library", p(&shop), "pair", "validate"]);
    assert!(out.contains("valid"), "{out}");
    let out = ok(&[
        "--library",
        p(&shop),
        "check",
        "--pair",
        "larchmont-al1100-on-cu",
        "--velocity",
        "400m/s",
        "--angle",
        "11deg",
    ]);
    assert!(out.contains("INSIDE"), "{out}");
}

#[test]
fn the_example_shots_import_into_a_copy_of_the_pair() {
    let dir = tempfile::tempdir().expect("temp dir");
    let pair = "larchmont-al1100-on-cu.ron";
    std::fs::copy(examples().join("shop").join(pair), dir.path().join(pair)).expect("copy");
    let before = std::fs::read_to_string(dir.path().join(pair)).expect("read");
    ok(&[
        "--library",
        p(dir.path()),
        "pair",
        "import",
        "larchmont-al1100-on-cu",
        p(&examples().join("shots.csv")),
    ]);
    let after = std::fs::read_to_string(dir.path().join(pair)).expect("read");
    assert!(after.len() > before.len());
    assert_eq!(after.matches("LLS-28 shot").count(), 3, "{after}");
    let agr = ok(&[
        "--library",
        p(dir.path()),
        "pair",
        "agreement",
        "larchmont-al1100-on-cu",
        "--json",
    ]);
    let v: serde_json::Value = serde_json::from_str(&agr).expect("JSON");
    assert_eq!(v["observations"].as_u64(), Some(13), "{v}");
}

#[test]
fn the_example_interface_export_maps() {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = dir.path().join("map.csv");
    let summary = dir.path().join("summary.json");
    ok(&[
        "--library",
        p(&examples().join("shop")),
        "map",
        p(&examples().join("interface.csv")),
        "--pair",
        "larchmont-al1100-on-cu",
        "-o",
        p(&out),
        "--summary-json",
        p(&summary),
    ]);
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(summary).expect("summary")).expect("JSON");
    assert_eq!(v["rows_classified"].as_u64(), Some(64), "{v}");
    let map = std::fs::read_to_string(out).expect("map");
    assert_eq!(map.lines().count(), 65);
}

#[test]
fn the_example_machine_and_coil_give_an_estimate() {
    let out = ok(&[
        "--library",
        p(&examples().join("shop")),
        "estimate",
        "mpw-tube",
        "--machine",
        "larchmont-bank-200uf",
        "--coil",
        "larchmont-coil-30mm",
        "--pair",
        "larchmont-al1100-on-cu",
        "--tube-outer-radius",
        "13mm",
        "--standoff",
        "2mm",
        "--charge-voltage",
        "7kV",
        "--angle",
        "10deg",
        "--json",
    ]);
    let v: serde_json::Value = serde_json::from_str(&out).expect("JSON");
    let vp = v["impact_velocity_m_s"].as_f64().expect("a velocity");
    assert!(vp > 100.0 && vp < 1500.0, "{vp}");
}
