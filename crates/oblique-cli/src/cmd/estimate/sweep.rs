//! `oblique sweep mpw-tube|mpw-sheet`: flags to a sweep request, the ranking from
//! `oblique_setup`, the process curves (CSV) and the window plot (SVG, `oblique_render`)
//! written, the result printed as a table or JSON.

use super::{SheetSweepArgs, SweepCommon, TubeSweepArgs};
use crate::common::{load_catalog, output_format, print_notes, write_output, FileFormat};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json};
use oblique_render::sweep_plot::render_sweep_svg;
use oblique_setup::present::{curve_csvs, sweep_json, sweep_text};
use oblique_setup::{run_sweep, MagneticRequest, SweepRanking, SweepRequest};
use std::path::{Path, PathBuf};

/// `oblique sweep mpw-tube`.
pub fn run_tube(dirs: &[PathBuf], a: TubeSweepArgs) -> CmdResult {
    run(dirs, a.tube.request(&a.bank), &a.common)
}

/// `oblique sweep mpw-sheet`.
pub fn run_sheet(dirs: &[PathBuf], a: SheetSweepArgs) -> CmdResult {
    run(dirs, a.sheet.request(&a.bank), &a.common)
}

fn run(dirs: &[PathBuf], process: MagneticRequest, c: &SweepCommon) -> CmdResult {
    let plot_format = match &c.plot {
        Some(p) => Some(output_format(
            "--plot",
            p,
            &[FileFormat::Svg, FileFormat::Png],
            Some(FileFormat::Svg),
        )?),
        None => None,
    };
    let mut catalog = load_catalog(dirs)?;
    let pair = match &c.adhoc.parent {
        Some(parent) => {
            let (flyer, h) = crate::common::request_flyer(&process);
            Some(crate::common::adhoc_pair(
                &mut catalog,
                flyer,
                h,
                parent,
                c.adhoc.convention,
                "magnetic-pulse",
            )?)
        }
        None => c.pair.clone(),
    };
    if c.plot.is_some() && pair.is_none() {
        return Err(Fail::input(
            "--plot needs --pair (or --parent with --convention): the plot is the window with the process curves",
        ));
    }
    let request = SweepRequest {
        process,
        charge: c.charge_grid()?,
        steps: c.steps,
        standoffs: c.standoff.clone(),
        standoff_steps: c.standoff_steps,
        angles: c.angle_grid(),
        pair,
        efficiency: c.efficiency,
        integration: c.integration.integration(),
        threads: c.threads,
    };
    let mut notes = Vec::new();
    let ranking = run_sweep(&catalog, &request, &mut notes);
    print_notes(&notes);
    let mut ranking = ranking?;
    oblique_setup::uncertainty::rank_by_probability(&mut ranking, &c.scatter.process())?;
    if let Some(dir) = &c.curves_csv {
        write_curves(dir, &ranking)?;
    }
    if let (Some(path), Some(w), Some(format)) = (&c.plot, ranking.window, plot_format) {
        if ranking.grid.angles.is_none() {
            return Err(Fail::input("--plot needs --angle or --angle-per-standoff"));
        }
        let svg = render_sweep_svg(w, &ranking)?;
        let bytes = match format {
            FileFormat::Png => oblique_render::png::svg_to_png(&svg)?,
            _ => svg.into_bytes(),
        };
        write_output(path, &bytes)?;
    }
    if c.json {
        emit_json(&sweep_json(&ranking))
    } else {
        emit(&sweep_text(
            &ranking,
            c.top,
            c.plot.as_deref(),
            c.curves_csv.as_deref(),
        ))
    }
}

fn write_curves(dir: &Path, ranking: &SweepRanking<'_>) -> CmdResult {
    std::fs::create_dir_all(dir).map_err(|e| {
        Fail::input(format!(
            "--curves-csv: cannot create {}: {e}",
            dir.display()
        ))
    })?;
    for (name, text) in curve_csvs(ranking) {
        write_output(&dir.join(name), text.as_bytes())?;
    }
    Ok(())
}
