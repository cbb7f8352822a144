//! Kill tests: every command that writes a file is killed (SIGKILL) after its temporary file is
//! complete and before the rename (the test hook `OBLIQUE_FAULT_PAUSE_BEFORE_RENAME_MS`); the
//! target must be exactly as before (or still absent), the library must still load, and the
//! same command must then succeed, whatever temporary file the killed one left.

use super::*;
use std::path::Path;
use std::process::Command;

/// A library folder with one user pair `k` and the demo bank copied in.
fn library() -> tempfile::TempDir {
    let dir = tempfile::tempdir().expect("temp dir");
    let o = run_in(
        dir.path(),
        &[
            "--library",
            ".",
            "pair",
            "new",
            "k",
            "--flyer",
            "aa6061-t6",
            "--parent",
            "cu-c11000",
            "--flyer-thickness",
            "1mm",
        ],
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let export = run(&["calibrate", "export", "harbourside-bank-300uf"]);
    assert_eq!(export.status.code(), Some(0), "{}", stderr(&export));
    let text = stdout(&export).replace("name: \"harbourside-bank-300uf\"", "name: \"k-bank\"");
    std::fs::create_dir_all(dir.path().join("machines")).expect("machines");
    std::fs::write(dir.path().join("machines/k-bank.ron"), text).expect("bank");
    std::fs::write(
        dir.path().join("shots.csv"),
        "velocity[m/s],angle[deg],outcome,source\n400,10,welded,a\n",
    )
    .expect("csv");
    std::fs::write(
        dir.path().join("interface.csv"),
        "position[mm],velocity[m/s],angle[deg]\n0,400,10\n1,410,11\n",
    )
    .expect("interface");
    dir
}

fn snapshot(dir: &Path) -> Vec<(String, Vec<u8>)> {
    let mut out = Vec::new();
    for sub in [dir.to_path_buf(), dir.join("machines")] {
        let Ok(entries) = std::fs::read_dir(&sub) else {
            continue;
        };
        for e in entries.filter_map(Result::ok) {
            let name = e.file_name().to_string_lossy().into_owned();
            if name.starts_with('.') || e.path().is_dir() {
                continue;
            }
            out.push((name, std::fs::read(e.path()).expect("read")));
        }
    }
    out.sort();
    out
}

fn temp_files(dir: &Path) -> usize {
    [dir.to_path_buf(), dir.join("machines")]
        .iter()
        .filter_map(|d| std::fs::read_dir(d).ok())
        .flat_map(|r| r.filter_map(Result::ok))
        .filter(|e| e.file_name().to_string_lossy().contains(".tmp-"))
        .count()
}

fn kill_mid_write(dir: &Path, args: &[&str]) {
    let before = snapshot(dir);
    let temps_before = temp_files(dir);
    let mut child = Command::new(env!("CARGO_BIN_EXE_oblique"))
        .args(args)
        .current_dir(dir)
        .env("OBLIQUE_FAULT_PAUSE_BEFORE_RENAME_MS", "20000")
        .env_remove("OBLIQUE_LIBRARY")
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .spawn()
        .expect("spawn");
    let mut seen = false;
    for _ in 0..800 {
        if temp_files(dir) > temps_before {
            seen = true;
            break;
        }
        if let Ok(Some(status)) = child.try_wait() {
            panic!("{args:?} ended ({status}) before writing");
        }
        std::thread::sleep(std::time::Duration::from_millis(25));
    }
    child.kill().expect("kill");
    child.wait().expect("wait");
    assert!(seen, "{args:?}: the temporary file never appeared");
    assert_eq!(
        snapshot(dir),
        before,
        "{args:?}: a file changed although the write was killed"
    );
    let o = run_in(dir, &["--library", ".", "pair", "validate"]);
    assert_eq!(o.status.code(), Some(0), "{args:?}: {}", stderr(&o));
    // The same command now goes through, next to the left-over temporary file.
    let o = run_in(dir, args);
    assert_eq!(
        o.status.code(),
        Some(0),
        "{args:?} after the kill: {}",
        stderr(&o)
    );
    assert_ne!(snapshot(dir), before, "{args:?}: nothing was written");
}

#[cfg(unix)]
#[test]
fn every_write_path_survives_a_kill_before_the_rename() {
    let lib = library();
    let d = lib.path();
    let commands: Vec<Vec<&str>> = vec![
        vec![
            "--library",
            ".",
            "pair",
            "observe",
            "k",
            "--velocity",
            "400m/s",
            "--angle",
            "9deg",
            "--outcome",
            "welded",
            "--source",
            "s",
        ],
        vec!["--library", ".", "pair", "import", "k", "shots.csv"],
        vec![
            "--library",
            ".",
            "pair",
            "new",
            "k2",
            "--flyer",
            "aa6061-t6",
            "--parent",
            "cu-c11000",
            "--flyer-thickness",
            "1mm",
        ],
        vec![
            "--library",
            ".",
            "calibrate",
            "mpw-tube",
            "--machine",
            "k-bank",
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
            "--measured-velocity",
            "400m/s",
            "--source",
            "kill test (invented)",
            "--save",
        ],
        vec![
            "--library",
            ".",
            "plot",
            "--pair",
            "k",
            "--point",
            "400m/s,9deg",
            "-o",
            "w.svg",
        ],
        vec![
            "--library",
            ".",
            "report",
            "--pair",
            "k",
            "--velocity",
            "400m/s",
            "--angle",
            "9deg",
            "-o",
            "r.html",
        ],
        vec![
            "--library",
            ".",
            "map",
            "interface.csv",
            "--pair",
            "k",
            "-o",
            "m.csv",
        ],
        vec![
            "--library",
            ".",
            "map",
            "interface.csv",
            "--pair",
            "k",
            "-o",
            "m2.csv",
            "--summary-json",
            "m2.json",
        ],
    ];
    for args in &commands {
        kill_mid_write(d, args);
    }
}

/// SIGTERM (what Ctrl-C's SIGINT and a service manager's stop send) mid-write: the target is
/// as before, exit 130, and the temporary file of the unfinished write is gone.
#[cfg(unix)]
#[test]
fn a_terminated_write_removes_its_temporary_file() {
    let dir = library();
    let d = dir.path();
    let before = snapshot(d);
    let child = Command::new(env!("CARGO_BIN_EXE_oblique"))
        .args([
            "--library",
            ".",
            "pair",
            "observe",
            "k",
            "--velocity",
            "380m/s",
        ])
        .args([
            "--angle",
            "9deg",
            "--outcome",
            "welded",
            "--source",
            "sigterm test",
        ])
        .current_dir(d)
        .env("OBLIQUE_FAULT_PAUSE_BEFORE_RENAME_MS", "20000")
        .env_remove("OBLIQUE_LIBRARY")
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .expect("spawn");
    let mut seen = false;
    for _ in 0..800 {
        if temp_files(d) > 0 {
            seen = true;
            break;
        }
        std::thread::sleep(std::time::Duration::from_millis(25));
    }
    assert!(seen, "the temporary file never appeared");
    let k = Command::new("kill")
        .args(["-TERM", &child.id().to_string()])
        .status()
        .expect("kill");
    assert!(k.success());
    let out = child.wait_with_output().expect("wait");
    assert_eq!(
        out.status.code(),
        Some(130),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(String::from_utf8_lossy(&out.stderr).contains("interrupted"));
    assert_eq!(temp_files(d), 0, "the temporary file was left behind");
    assert_eq!(
        snapshot(d),
        before,
        "a file changed although the write was stopped"
    );
}
