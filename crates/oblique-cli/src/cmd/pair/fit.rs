//! `oblique pair fit` and `oblique pair next-shot`: the pair's constants fitted to its trials,
//! and the shots that would tell most about them.

use super::{user_file, write_fail};
use crate::common::{load_library, today};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json};
use crate::qarg;
use clap::{Args, ValueEnum};
use oblique_confidence::fit::{fit, FitSettings};
use oblique_confidence::next_shot::{next_shots, NextShotSettings};
use oblique_confidence::priors::Constant;
use std::path::PathBuf;

/// A constant to fit.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ConstantArg {
    /// Deribas k.
    DeribasK,
    /// Wittman N.
    WittmanN,
    /// The HEL multiple of the pressure limit.
    HelMultiple,
}

impl From<ConstantArg> for Constant {
    fn from(c: ConstantArg) -> Self {
        match c {
            ConstantArg::DeribasK => Constant::DeribasK,
            ConstantArg::WittmanN => Constant::WittmanN,
            ConstantArg::HelMultiple => Constant::HelMultiple,
        }
    }
}

/// Flags of `oblique pair fit`.
#[derive(Debug, Args)]
pub struct FitArgs {
    /// Pair name.
    pub name: String,
    /// Confidence level of the intervals, e.g. 95% (default 95%).
    #[arg(long, value_name = "PERCENT", value_parser = qarg::level)]
    pub level: Option<f64>,
    /// Constants to fit, comma separated (default: deribas-k,wittman-n; hel-multiple on request:
    /// at small angles it is rarely told apart from Deribas k).
    #[arg(
        long,
        value_enum,
        ignore_case = true,
        value_delimiter = ',',
        value_name = "LIST"
    )]
    pub constants: Vec<ConstantArg>,
    /// Write the fitted constants into the pair file (section `fitted`, with date, method,
    /// number of trials and intervals); observations and every other byte are kept. `check
    /// --pair` then uses them.
    #[arg(long)]
    pub save: bool,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

/// Flags of `oblique pair next-shot`.
#[derive(Debug, Args)]
pub struct NextShotArgs {
    /// Pair name.
    pub name: String,
    /// How many shots (1 to 10, default 3).
    #[arg(long, value_name = "K", default_value_t = 3, value_parser = clap::value_parser!(u64).range(1..=10))]
    pub count: u64,
    /// Impact velocity range to search, e.g. 300m/s..700m/s (default: the trials' span, a fifth
    /// wider on each side). Give what your machine and coil can reach.
    #[arg(long = "velocity-range", value_name = "LOW..HIGH", value_parser = qarg::velocity_range)]
    pub velocity_range: Option<(f64, f64)>,
    /// Collision angle range to search, e.g. 4deg..20deg (default: the trials' span, 2 deg
    /// wider on each side).
    #[arg(long = "angle-range", value_name = "LOW..HIGH", value_parser = qarg::angle_range)]
    pub angle_range: Option<(f64, f64)>,
    /// Seed of the draws of the constants (a whole number; default 1).
    #[arg(long, value_name = "S", allow_hyphen_values = true, value_parser = qarg::seed)]
    pub seed: Option<u64>,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

pub fn run_fit(dirs: &[PathBuf], a: FitArgs) -> CmdResult {
    let lib = load_library(dirs)?;
    let w = lib.pair(&a.name).map_err(Fail::input)?;
    let settings = FitSettings {
        level: a.level.unwrap_or(0.95),
        constants: (!a.constants.is_empty())
            .then(|| a.constants.iter().map(|c| Constant::from(*c)).collect()),
    };
    let r = fit(w, &settings)?;
    let mut saved = None;
    if a.save {
        let path = user_file(w)?;
        let fitted = r.to_fitted(&today());
        if fitted.constants().next().is_none() {
            return Err(Fail::input(format!(
                "--save: the trials bound none of the constants of pair '{}' on either side; nothing to save",
                w.name
            )));
        }
        oblique_window::write::save_fitted(&path, &fitted, &lib.materials, Some(&w.origin.sha256))
            .map_err(write_fail)?;
        saved = Some((path, fitted.cautions(&w.name, w.observations.len())));
    }
    if a.json {
        let mut v = r.json();
        if let Some(o) = v.as_object_mut() {
            o.insert(
                "saved_to".into(),
                serde_json::json!(saved.as_ref().map(|(p, _)| p.display().to_string())),
            );
            if let Some((_, cautions)) = &saved {
                o.insert("saved_cautions".into(), serde_json::json!(cautions));
            }
        }
        return emit_json(&v);
    }
    let mut text = r.text();
    if let Some((p, cautions)) = saved {
        text.push_str(&format!(
            "saved the fitted constants into {} (section `fitted`); `oblique check --pair {}` now uses them\n",
            p.display(),
            w.name
        ));
        for c in cautions {
            text.push_str(&format!("  caution: {c}\n"));
        }
    }
    emit(&text)
}

pub fn run_next_shot(dirs: &[PathBuf], a: NextShotArgs) -> CmdResult {
    let lib = load_library(dirs)?;
    let w = lib.pair(&a.name).map_err(Fail::input)?;
    let settings = NextShotSettings {
        count: a.count as usize,
        velocity_m_s: a.velocity_range,
        angle_deg: a.angle_range.map(|(l, h)| (l.to_degrees(), h.to_degrees())),
        seed: a.seed.unwrap_or(oblique_confidence::scatter::DEFAULT_SEED),
    };
    let r = next_shots(w, &settings)?;
    if a.json {
        return emit_json(&r.json());
    }
    emit(&r.text())
}
