//! `oblique new bank|coil|bar-coil|explosive NAME`: a commented machine-file template in the
//! first library folder's `machines/`, refused by the library until every "FILL IN" is replaced.

use crate::common::today;
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json};
use clap::{Args, ValueEnum};
use oblique_window::machine::template::{template, TemplateKind};
use oblique_window::machine::MACHINES_DIR;
use serde_json::json;
use std::path::PathBuf;

/// What to make a template of.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum KindArg {
    /// A capacitor bank (capacitance, rating, L and R or a ring-down record).
    Bank,
    /// A single-turn compression coil or field-shaper bore, for tubes.
    Coil,
    /// A flat one-turn bar coil, for sheets.
    BarCoil,
    /// An explosive welding set-up.
    Explosive,
}

/// Flags of `oblique new`.
#[derive(Debug, Args)]
#[command(after_help = "Example:
  oblique --library ./shop new bank shop-bank-200uf
  (edit ./shop/machines/shop-bank-200uf.ron, then: oblique --library ./shop pair validate)
The template is refused by the library until every \"FILL IN\" holds your own value and source.")]
pub struct NewArgs {
    /// What the file describes.
    #[arg(value_enum, ignore_case = true)]
    pub kind: KindArg,
    /// Its name (also the file name NAME.ron; used with --machine or --coil).
    pub name: String,
    /// Who maintains the file (default: $USER).
    #[arg(long, value_name = "TEXT")]
    pub maintainer: Option<String>,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

/// Run `oblique new`.
pub fn run(dirs: &[PathBuf], a: NewArgs) -> CmdResult {
    let dir = dirs.first().ok_or_else(|| {
        Fail::input("new writes into the first --library folder, and none was given\n  hint: oblique --library ./shop new bank NAME")
    })?;
    if !dir.is_dir() {
        return Err(Fail::input(format!(
            "--library {}: not a folder\n  hint: create it first (mkdir -p {})",
            dir.display(),
            dir.display()
        )));
    }
    oblique_window::library::check_file_name(&a.name, "name").map_err(Fail::input)?;
    let kind = match a.kind {
        KindArg::Bank => TemplateKind::Bank,
        KindArg::Coil => TemplateKind::CompressionCoil,
        KindArg::BarCoil => TemplateKind::BarCoil,
        KindArg::Explosive => TemplateKind::Explosive,
    };
    let who = a
        .maintainer
        .or_else(|| std::env::var("USER").ok())
        .unwrap_or_else(|| "unknown".into());
    let text = template(kind, &a.name, &who, &today());
    let folder = dir.join(MACHINES_DIR);
    std::fs::create_dir_all(&folder)
        .map_err(|e| Fail::input(format!("cannot create {}: {e}", folder.display())))?;
    let path = folder.join(format!("{}.ron", a.name));
    oblique_window::write::create_new(&path, &text).map_err(crate::common::write_fail)?;
    if a.json {
        return emit_json(&json!({"file": path.display().to_string(), "name": a.name}));
    }
    emit(&format!(
        "created {}\nreplace every \"FILL IN\" with your own value and its source; until then the library refuses the file\ncheck it with: oblique --library {} pair validate\n",
        path.display(),
        dir.display()
    ))
}
