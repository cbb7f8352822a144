//! `oblique material list|show`.

use crate::common::load_library;
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json, material_json, table};
use clap::Subcommand;
use oblique_window::materials::PROPERTIES;
use std::path::PathBuf;

/// Subcommands of `oblique material`.
#[derive(Debug, Subcommand)]
pub enum MaterialCommand {
    /// List the materials with their ids and key properties.
    List {
        /// Print JSON.
        #[arg(long)]
        json: bool,
        /// Print the ids only, one per line (for scripts and shell completion).
        #[arg(long, conflicts_with = "json")]
        ids: bool,
    },
    /// Show one material with every property and its source.
    Show {
        /// Material id, e.g. aa6061-t6.
        id: String,
        /// Print JSON.
        #[arg(long)]
        json: bool,
    },
}

pub fn run(dirs: &[PathBuf], c: MaterialCommand) -> CmdResult {
    let lib = load_library(dirs)?;
    match c {
        MaterialCommand::List { json, ids } => {
            if ids {
                return emit(
                    &lib.materials
                        .keys()
                        .map(|k| format!("{k}\n"))
                        .collect::<String>(),
                );
            }
            if json {
                let v: Vec<serde_json::Value> = lib
                    .materials
                    .values()
                    .map(|m| material_json(m, true))
                    .collect();
                return emit_json(&serde_json::Value::Array(v));
            }
            let rows: Vec<Vec<String>> = lib
                .materials
                .values()
                .map(|r| {
                    let m = &r.material;
                    vec![
                        m.id.clone(),
                        m.name.clone(),
                        format!("{:.0}", m.density().si()),
                        format!("{:.0}", m.sound_speed().si()),
                        format!("{:.0}", m.vickers_hardness.vickers()),
                        format!("{:.0}", m.tensile_strength.mpa()),
                        format!("{:.0}", m.melting_temperature.si() - 273.15),
                    ]
                })
                .collect();
            emit(&table(
                &[
                    "id",
                    "name",
                    "rho kg/m3",
                    "C0 m/s",
                    "HV",
                    "UTS MPa",
                    "Tm degC",
                ],
                &rows,
            ))
        }
        MaterialCommand::Show { id, json } => {
            let rec = lib.material(&id).map_err(Fail::input)?;
            if json {
                return emit_json(&material_json(rec, true));
            }
            let mut s = format!(
                "{} ({}), {}\nfrom {}\n\n",
                rec.material.name, rec.material.id, rec.condition, rec.origin
            );
            let rows: Vec<Vec<String>> = PROPERTIES
                .iter()
                .map(|(name, _)| {
                    let p = rec.sources.get(name);
                    vec![
                        (*name).to_string(),
                        p.map_or(String::new(), |p| p.as_written.clone()),
                        p.map_or(String::new(), |p| p.key.clone()),
                        p.and_then(|p| p.note.clone()).unwrap_or_default(),
                    ]
                })
                .collect();
            s.push_str(&table(&["property", "value", "source", "note"], &rows));
            if !rec.notes.is_empty() {
                s.push_str(&format!("\nnotes: {}\n", rec.notes));
            }
            // Every key cited above (sources and notes), from the project's one reference list.
            let refs = oblique_window::references::References::builtin().map_err(Fail::other)?;
            s.push_str("\nreferences:\n");
            for (k, r) in refs.for_material(rec) {
                s.push_str(&format!("  [{k}] {r}\n"));
            }
            emit(&s)
        }
    }
}
