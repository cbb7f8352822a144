//! `oblique map`: classify every point of an interface export (issue 6; being written).

use crate::fail::{CmdResult, Fail};
use clap::Args;
use std::path::PathBuf;

/// Flags of `oblique map`.
#[derive(Debug, Args)]
pub struct MapArgs {
    /// Input CSV file, or - for standard input.
    pub input: PathBuf,
}

pub fn run(_dirs: &[PathBuf], _a: MapArgs) -> CmdResult {
    Err(Fail::other("oblique map is not built yet"))
}
