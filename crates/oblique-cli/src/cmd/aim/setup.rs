//! The set-up search of `oblique aim` (with a machine and a coil family).

use super::AimArgs;
use crate::fail::{CmdResult, Fail};
use clap::Args;
use oblique_window::{Library, PairWindow};
use std::path::PathBuf;

/// The machine, the coil family and the settings to search.
#[derive(Debug, Clone, Args)]
pub struct SetupFlags {
    /// Capacitor bank file (starts the set-up search).
    #[arg(long, value_name = "NAME")]
    pub machine: Option<String>,
}

impl SetupFlags {
    /// True when a set-up search is asked for.
    pub fn given(&self) -> bool {
        self.machine.is_some()
    }
}

pub fn run(_dirs: &[PathBuf], _a: &AimArgs, _lib: Library, _w: &PairWindow) -> CmdResult {
    Err(Fail::input("--machine: the set-up search is not built yet"))
}
