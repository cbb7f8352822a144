//! Integration tests of the teaching and aiming commands (explain, trade, aim) and of the
//! tutorial, running the real `oblique` binary.

mod adhoc;
mod aim;
mod explain;
mod trade;
mod tutorial;

use std::path::Path;
use std::process::{Command, Output};

/// Run `oblique` with `args` in `dir`, with no user library from the environment.
pub fn run_in(dir: &Path, args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_oblique"))
        .args(args)
        .current_dir(dir)
        .env_remove("OBLIQUE_LIBRARY")
        .output()
        .expect("the binary runs")
}

pub fn run(args: &[&str]) -> Output {
    run_in(Path::new(env!("CARGO_MANIFEST_DIR")), args)
}

pub fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

pub fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// Run and parse standard output as JSON, asserting success.
pub fn json(args: &[&str]) -> serde_json::Value {
    let o = run(args);
    assert!(o.status.success(), "{args:?}: {}", stderr(&o));
    serde_json::from_slice(&o.stdout).unwrap_or_else(|e| panic!("{args:?}: {e}"))
}

/// Assert exit status 2 and that stderr contains every fragment.
pub fn fails_with(args: &[&str], fragments: &[&str]) {
    let o = run(args);
    let err = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "args {args:?}\nstderr: {err}");
    for f in fragments {
        assert!(err.contains(f), "args {args:?}: expected '{f}' in:\n{err}");
    }
    assert!(!err.contains("panicked"), "{err}");
}

/// The repository's top folder.
pub fn repo() -> std::path::PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}
