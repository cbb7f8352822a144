//! Integration tests that run the real `oblique` binary.

mod check;
mod comfort;
mod fit;
mod kill;
mod pair;
mod record;
mod report;
mod safety;
mod shell;

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

/// `pair new NAME` (an aa6061-t6 flyer of 1 mm on cu-c11000) in the library folder `dir`.
pub fn new_pair(dir: &Path, name: &str) -> Output {
    run_in(
        dir,
        &[
            "--library",
            ".",
            "pair",
            "new",
            name,
            "--flyer",
            "aa6061-t6",
            "--parent",
            "cu-c11000",
            "--flyer-thickness",
            "1mm",
        ],
    )
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
