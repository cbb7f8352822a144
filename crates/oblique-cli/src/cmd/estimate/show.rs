//! `oblique estimate mpw-tube|mpw-sheet|explosive`: flags to a request, the estimate from
//! `oblique_setup`, the time histories written, the result printed as a table or JSON.

use super::{EstimateCommon, ExplosiveArgs, SheetEstimateArgs, TubeEstimateArgs};
use crate::common::{load_catalog, print_notes};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json};
use oblique_core::units::Angle;
use oblique_core::units::Length;
use oblique_setup::present::{
    estimate_json, estimate_text, explosive_json, explosive_text, history_csv,
};
use oblique_setup::{
    estimate_explosive, resolve_estimate, Charge, EstimateRequest, MagneticRequest, PulseReport,
};
use std::path::PathBuf;

/// `oblique estimate mpw-tube`.
pub fn run_tube(dirs: &[PathBuf], a: TubeEstimateArgs) -> CmdResult {
    let process = a.tube.request(&a.bank);
    run_pulse(dirs, process, a.charge.charge()?, a.standoff, &a.common)
}

/// `oblique estimate mpw-sheet`.
pub fn run_sheet(dirs: &[PathBuf], a: SheetEstimateArgs) -> CmdResult {
    let process = a.sheet.request(&a.bank);
    run_pulse(dirs, process, a.charge.charge()?, a.standoff, &a.common)
}

fn run_pulse(
    dirs: &[PathBuf],
    process: MagneticRequest,
    charge: Charge,
    standoff: f64,
    common: &EstimateCommon,
) -> CmdResult {
    if let Some(p) = &common.history {
        crate::common::output_format(
            "--history",
            p,
            &[crate::common::FileFormat::Csv],
            Some(crate::common::FileFormat::Csv),
        )?;
    }
    let mut catalog = load_catalog(dirs)?;
    let pair = match &common.adhoc.parent {
        Some(parent) => {
            let (flyer, h) = crate::common::request_flyer(&process);
            Some(crate::common::adhoc_pair(
                &mut catalog,
                flyer,
                h,
                parent,
                common.adhoc.convention,
                "magnetic-pulse",
            )?)
        }
        None => common.pair.clone(),
    };
    if common.angle.is_some() && pair.is_none() {
        return Err(Fail::input(
            "--angle needs --pair (or --parent with --convention): the angle is only used to check the estimate against a window",
        ));
    }
    let request = EstimateRequest {
        process,
        charge,
        standoff: Length::from_m(standoff),
        efficiency: common.efficiency,
        pair,
        angle: common.angle.map(Angle::from_radians),
        integration: common.integration.integration(),
        history: common.history.is_some(),
    };
    let mut notes = Vec::new();
    let resolved = resolve_estimate(&catalog, &request, &mut notes);
    print_notes(&notes);
    let setup = resolved?;
    let estimate = setup.estimate()?;
    if let Some(path) = &common.history {
        crate::common::note_target(path);
        oblique_window::write::atomic_write(path, history_csv(&estimate).as_bytes(), None)
            .map_err(|e| Fail::input(format!("--history: cannot write {}: {e}", path.display())))?;
    }
    let check = setup.check(&estimate)?;
    let mut report = PulseReport {
        setup,
        estimate,
        check,
        probability: None,
    };
    report.probability =
        oblique_setup::uncertainty::estimate_probability(&report, &common.scatter.process())?;
    let history = common.history.as_deref();
    if common.json {
        emit_json(&estimate_json(&report, history))
    } else {
        emit(&estimate_text(&report, history))
    }
}

/// `oblique estimate explosive`.
pub fn run_explosive(dirs: &[PathBuf], a: ExplosiveArgs) -> CmdResult {
    let mut catalog = load_catalog(dirs)?;
    let pair = match &a.adhoc.parent {
        Some(parent) => Some(crate::common::adhoc_pair(
            &mut catalog,
            a.flyer.as_deref(),
            a.flyer_thickness,
            parent,
            a.adhoc.convention,
            "explosive",
        )?),
        None => a.pair,
    };
    let request = a.explosive.request(pair);
    let report = estimate_explosive(&catalog, &request)?;
    if a.json {
        emit_json(&explosive_json(&report))
    } else {
        emit(&explosive_text(&report))
    }
}
