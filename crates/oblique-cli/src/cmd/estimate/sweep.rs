//! `oblique sweep mpw-tube|mpw-sheet`: the model over charging voltage (or energy) x standoff,
//! every setting checked against a pair window at the user's angle, the settings inside ranked
//! by the velocity scatter they tolerate (nearest Vp where the verdict changes), and optionally a window plot with one process
//! curve per standoff.

use super::setup::{self, fmt, BankPick, Ctx, Inputs};
use super::show::{check_point, inputs_json, inputs_table, ASSUMPTIONS_SHEET, ASSUMPTIONS_TUBE};
use super::{SheetSweepArgs, SweepCommon, TubeSweepArgs};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json, sig, table, CAUTION};
use oblique_core::process::{sweep, ImpactOutcome, PulseSetup, SweepResult};
use oblique_core::units::{Length, Voltage};
use oblique_render::window_plot::{render_svg, PlotRequest, ProcessCurve};
use oblique_window::boundary::Plane;
use oblique_window::classify::{limit_label, Classification};
use oblique_window::PairWindow;
use serde_json::{json, Map, Value};
use std::path::{Path, PathBuf};

/// The grid: voltages, standoffs and one angle per standoff (when checking a window).
struct GridValues {
    voltages: Vec<f64>,
    standoffs: Vec<f64>,
    angles: Option<Vec<f64>>,
    from_energy: bool,
}

fn grid_values(
    bank: &BankPick,
    c: &SweepCommon,
    window: Option<&PairWindow>,
) -> CmdResult<GridValues> {
    let (voltages, from_energy) = match (&c.charge_voltage, &c.energy) {
        (Some(g), _) => (
            g.values(c.steps, "--steps")
                .map_err(|m| Fail::input(format!("--charge-voltage: {m}")))?,
            false,
        ),
        (None, Some(g)) => (
            g.values(c.steps, "--steps")
                .map_err(|m| Fail::input(format!("--energy: {m}")))?
                .into_iter()
                .map(|e| (2.0 * e / bank.bank.capacitance.si()).sqrt())
                .collect(),
            true,
        ),
        (None, None) => {
            return Err(Fail::input(
                "give --charge-voltage (e.g. 6kV..12kV) or --energy (e.g. 5kJ..20kJ)",
            ))
        }
    };
    let flag = if from_energy {
        "--energy"
    } else {
        "--charge-voltage"
    };
    for u in &voltages {
        setup::check_rating(bank, *u, flag)?;
    }
    let standoffs = c
        .standoff
        .values(c.standoff_steps, "--standoff-steps")
        .map_err(|m| Fail::input(format!("--standoff: {m}")))?;
    if voltages.is_empty() || standoffs.is_empty() {
        return Err(Fail::input(
            "--charge-voltage / --energy / --standoff: the grid is empty",
        ));
    }
    if voltages.len() * standoffs.len() > 1_000_000 {
        return Err(Fail::input(format!(
            "--steps / --standoff-steps: {} x {} settings is more than the limit of 1000000",
            voltages.len(),
            standoffs.len()
        )));
    }
    let angles = match (c.angle, &c.angle_per_standoff) {
        (Some(a), _) => Some(vec![a; standoffs.len()]),
        (None, Some(super::Grid::List(v))) => {
            if v.len() != standoffs.len() {
                return Err(Fail::input(format!(
                    "--angle-per-standoff: {} angle(s) for {} standoff(s); give one per standoff, in the order of --standoff",
                    v.len(),
                    standoffs.len()
                )));
            }
            Some(v.clone())
        }
        (None, Some(g @ super::Grid::Range(..))) => Some(
            g.values(standoffs.len(), "the number of standoffs")
                .map_err(|m| Fail::input(format!("--angle-per-standoff: {m}")))?,
        ),
        (None, None) => None,
    };
    match (window, &angles) {
        (Some(_), None) => {
            return Err(Fail::input(
                "--angle (or --angle-per-standoff) is required with --pair: the angle comes from your geometry (taper, chamfer); the estimate never computes it",
            ))
        }
        (None, Some(_)) => {
            return Err(Fail::input(
                "--angle needs --pair: the angle is only used to check the settings against a pair window",
            ))
        }
        _ => {}
    }
    Ok(GridValues {
        voltages,
        standoffs,
        angles,
        from_energy,
    })
}

/// `oblique sweep mpw-tube`.
pub fn run_tube(dirs: &[PathBuf], a: TubeSweepArgs) -> CmdResult {
    let ctx = setup::load(dirs)?;
    let window = setup::pair(&ctx, &a.common.pair)?;
    let mut inputs = Inputs::default();
    let parts = setup::tube_parts(&ctx, &a.bank, &a.tube, window, &mut inputs)?;
    let grid = grid_values(&parts.bank, &a.common, window)?;
    for g in &grid.standoffs {
        setup::check_tube_standoff(&parts, *g)?;
        setup::compression_warning(&parts, *g, &mut inputs);
    }
    let eta = setup::efficiency(
        a.common.efficiency,
        &parts.bank,
        "mpw-tube",
        parts.coil_name.as_deref(),
        (parts.flyer.as_str(), parts.tube.wall_thickness.si()),
        &mut inputs,
    );
    let base = setup::tube_setup(
        &parts,
        Voltage::from_v(grid.voltages[0]),
        grid.standoffs[0],
        eta,
    );
    run_common(
        &ctx,
        window,
        "mpw-tube",
        &base,
        &grid,
        &parts.bank,
        &inputs,
        &a.common,
        ASSUMPTIONS_TUBE,
    )
}

/// `oblique sweep mpw-sheet`.
pub fn run_sheet(dirs: &[PathBuf], a: SheetSweepArgs) -> CmdResult {
    let ctx = setup::load(dirs)?;
    let window = setup::pair(&ctx, &a.common.pair)?;
    let mut inputs = Inputs::default();
    let parts = setup::sheet_parts(&ctx, &a.bank, &a.sheet, window, &mut inputs)?;
    let grid = grid_values(&parts.bank, &a.common, window)?;
    let eta = setup::efficiency(
        a.common.efficiency,
        &parts.bank,
        "mpw-sheet",
        parts.coil_name.as_deref(),
        (parts.flyer.as_str(), parts.sheet.thickness.si()),
        &mut inputs,
    );
    let base = setup::sheet_setup(
        &parts,
        Voltage::from_v(grid.voltages[0]),
        grid.standoffs[0],
        eta,
    );
    run_common(
        &ctx,
        window,
        "mpw-sheet",
        &base,
        &grid,
        &parts.bank,
        &inputs,
        &a.common,
        ASSUMPTIONS_SHEET,
    )
}

/// One setting with its verdict.
struct Row {
    i: usize,
    j: usize,
    check: Option<Classification>,
    /// For settings inside the window: the nearest impact velocity at the same angle where the
    /// verdict changes (how much velocity scatter the setting tolerates).
    verdict_change_m_s: Option<f64>,
}

impl Row {
    /// |Vp at the verdict change - Vp| / Vp; infinite when the verdict does not change.
    fn relative_headroom(&self, vp: f64) -> f64 {
        self.verdict_change_m_s
            .map_or(f64::INFINITY, |v| (v - vp).abs() / vp)
    }
}

#[allow(clippy::too_many_arguments)]
fn run_common(
    _ctx: &Ctx,
    window: Option<&PairWindow>,
    model: &str,
    base: &PulseSetup,
    grid: &GridValues,
    bank: &BankPick,
    inputs: &Inputs,
    c: &SweepCommon,
    assumptions: &str,
) -> CmdResult {
    base.validate().map_err(setup::process_fail)?;
    let opts = setup::options(&c.integration, false);
    opts.validate()
        .map_err(|e| Fail::input(format!("--steps-per-period / --max-periods: {e}")))?;
    let volts: Vec<Voltage> = grid.voltages.iter().map(|u| Voltage::from_v(*u)).collect();
    let gaps: Vec<Length> = grid.standoffs.iter().map(|g| Length::from_m(*g)).collect();
    let res = sweep(base, &volts, &gaps, &opts, c.threads).map_err(setup::process_fail)?;
    let mut rows = Vec::with_capacity(res.points.len());
    for i in 0..volts.len() {
        for j in 0..gaps.len() {
            let check = match (window, &grid.angles, res.impact_velocity(i, j)) {
                (Some(w), Some(angles), Some(v)) => Some(check_point(w, v.si(), angles[j])?),
                _ => None,
            };
            rows.push(Row {
                i,
                j,
                check,
                verdict_change_m_s: None,
            });
        }
    }
    // Velocity headroom of the settings inside the window, on every core (a search along the
    // impact velocity per setting).
    if let Some(w) = window {
        let setup = w.setup()?;
        let threads = c.threads.map_or(2, |n| n.get()).max(1);
        let chunk = rows.len().div_ceil(threads).max(1);
        std::thread::scope(|s| {
            for part in rows.chunks_mut(chunk) {
                let setup = &setup;
                s.spawn(move || {
                    for r in part.iter_mut() {
                        if let Some(k) = r.check.as_ref().filter(|k| k.inside) {
                            r.verdict_change_m_s =
                                oblique_window::classify::velocity_to_verdict_change(
                                    w,
                                    setup,
                                    k,
                                    oblique_core::Convention::NormalToFlyer,
                                );
                        }
                    }
                });
            }
        });
    }
    let mut ranked: Vec<&Row> = rows
        .iter()
        .filter(|r| r.check.as_ref().is_some_and(|k| k.inside))
        .collect();
    let vp_of = |r: &Row| res.impact_velocity(r.i, r.j).map_or(1.0, |v| v.si());
    ranked.sort_by(|a, b| {
        let ma = a.relative_headroom(vp_of(a));
        let mb = b.relative_headroom(vp_of(b));
        mb.total_cmp(&ma)
            .then(grid.voltages[a.i].total_cmp(&grid.voltages[b.i]))
    });
    if let Some(dir) = &c.curves_csv {
        write_curves(dir, &res, grid, &rows)?;
    }
    if let (Some(path), Some(w)) = (&c.plot, window) {
        write_plot(path, w, &res, grid)?;
    }
    let energy = |u: f64| 0.5 * bank.bank.capacitance.si() * u * u;
    if c.json {
        let mut o = Map::new();
        o.insert("model".into(), json!(model));
        o.insert("pair".into(), json!(window.map(|w| w.name.clone())));
        o.insert(
            "grid_from".into(),
            json!(if grid.from_energy {
                "energy"
            } else {
                "charge-voltage"
            }),
        );
        o.insert(
            "charge_voltages_v".into(),
            json!(grid.voltages.iter().map(|u| sig(*u)).collect::<Vec<_>>()),
        );
        o.insert(
            "stored_energies_j".into(),
            json!(grid
                .voltages
                .iter()
                .map(|u| sig(energy(*u)))
                .collect::<Vec<_>>()),
        );
        o.insert(
            "standoffs_m".into(),
            json!(grid.standoffs.iter().map(|g| sig(*g)).collect::<Vec<_>>()),
        );
        o.insert(
            "angles_deg".into(),
            grid.angles.as_ref().map_or(Value::Null, |a| {
                json!(a.iter().map(|x| sig(x.to_degrees())).collect::<Vec<_>>())
            }),
        );
        let point_json = |r: &Row| -> Value {
            let mut p = Map::new();
            let pt = res.point(r.i, r.j);
            p.insert("charge_voltage_v".into(), sig(grid.voltages[r.i]));
            p.insert("stored_energy_j".into(), sig(energy(grid.voltages[r.i])));
            p.insert("standoff_m".into(), sig(grid.standoffs[r.j]));
            p.insert(
                "angle_deg".into(),
                grid.angles
                    .as_ref()
                    .map_or(Value::Null, |a| sig(a[r.j].to_degrees())),
            );
            match pt.map(|p| p.outcome) {
                Some(ImpactOutcome::Impact {
                    time,
                    velocity,
                    after_first_half_wave,
                }) => {
                    p.insert("impact_velocity_m_s".into(), sig(velocity.si()));
                    p.insert("impact_time_s".into(), sig(time.si()));
                    p.insert(
                        "impact_after_first_half_wave".into(),
                        json!(after_first_half_wave),
                    );
                    p.insert("no_impact_reason".into(), Value::Null);
                }
                Some(ImpactOutcome::NoImpact { reason, .. }) => {
                    p.insert("impact_velocity_m_s".into(), Value::Null);
                    p.insert("impact_time_s".into(), Value::Null);
                    p.insert("impact_after_first_half_wave".into(), Value::Null);
                    p.insert("no_impact_reason".into(), json!(reason));
                }
                None => {}
            }
            match (&r.check, window) {
                (Some(k), Some(w)) => {
                    p.insert("inside".into(), json!(k.inside));
                    p.insert("prediction".into(), json!(k.prediction.as_str()));
                    p.insert(
                        "binding".into(),
                        json!(k.binding.as_ref().map(|b| limit_label(w, b))),
                    );
                    p.insert(
                        "binding_relative_margin".into(),
                        k.binding_relative_margin.map_or(Value::Null, sig),
                    );
                    p.insert(
                        "verdict_change_impact_velocity_m_s".into(),
                        r.verdict_change_m_s.map_or(Value::Null, sig),
                    );
                }
                _ => {
                    p.insert("inside".into(), Value::Null);
                    p.insert("prediction".into(), Value::Null);
                    p.insert("binding".into(), Value::Null);
                    p.insert("binding_relative_margin".into(), Value::Null);
                }
            }
            Value::Object(p)
        };
        o.insert(
            "points".into(),
            Value::Array(rows.iter().map(point_json).collect()),
        );
        o.insert("inside_count".into(), json!(ranked.len()));
        o.insert(
            "inside_ranked".into(),
            Value::Array(ranked.iter().map(|r| point_json(r)).collect()),
        );
        o.insert("ranking".into(), json!("settings inside the window, by how far the impact velocity can move at the same angle before the verdict changes (relative to Vp), largest first"));
        o.insert(
            "assumptions".into(),
            json!(assumptions.trim_start_matches("assumptions: ")),
        );
        inputs_json(inputs, &mut o);
        o.insert("warnings".into(), json!(inputs.efficiency_warnings()));
        o.insert("caution".into(), json!(CAUTION));
        return emit_json(&Value::Object(o));
    }

    let mut out = format!(
        "oblique sweep {model}: {} charging voltage(s) x {} standoff(s) = {} settings (screening estimates)\n\n",
        grid.voltages.len(),
        grid.standoffs.len(),
        rows.len()
    );
    out.push_str(&inputs_table(inputs));
    out.push('\n');
    if grid.voltages.len() <= 40 && grid.standoffs.len() <= 12 {
        let mut header = vec!["U0".to_string(), "E0".to_string()];
        for (j, g) in grid.standoffs.iter().enumerate() {
            header.push(match &grid.angles {
                Some(a) => format!("{} @ {} deg", fmt::mm(*g), fmt::g(a[j].to_degrees())),
                None => fmt::mm(*g),
            });
        }
        let mut trows = Vec::new();
        for (i, u) in grid.voltages.iter().enumerate() {
            let mut r = vec![fmt::kv(*u), fmt::kj(energy(*u))];
            for j in 0..grid.standoffs.len() {
                let row = &rows[i * grid.standoffs.len() + j];
                let cell = match res.point(i, j).map(|p| p.outcome) {
                    Some(ImpactOutcome::Impact {
                        velocity,
                        after_first_half_wave,
                        ..
                    }) => {
                        let mark = match &row.check {
                            Some(k) if k.inside => " in",
                            Some(_) => " out",
                            None => "",
                        };
                        format!(
                            "{:.0}{}{mark}",
                            velocity.si(),
                            if after_first_half_wave { "*" } else { "" }
                        )
                    }
                    _ => "no impact".into(),
                };
                r.push(cell);
            }
            trows.push(r);
        }
        let hdr: Vec<&str> = header.iter().map(String::as_str).collect();
        out.push_str(
            "impact velocity Vp [m/s] by charging voltage (rows) and standoff (columns)\n",
        );
        out.push_str(&table(&hdr, &trows));
        out.push_str("  (in/out: inside or outside the pair window at the angle shown; * impact after the first current zero)\n\n");
    } else {
        out.push_str(&format!(
            "the grid has {} x {} settings, too many to print: see --json or --curves-csv\n\n",
            grid.voltages.len(),
            grid.standoffs.len()
        ));
    }
    if let Some(w) = window {
        out.push_str(&format!(
            "{} of {} settings land inside pair window {}",
            ranked.len(),
            rows.len(),
            w.name
        ));
        if ranked.is_empty() {
            out.push_str(".\n");
        } else {
            out.push_str(&format!(
                "; ranked by how far the impact velocity can move at the same angle before the verdict changes, largest first (top {}):\n",
                c.top.min(ranked.len())
            ));
            let mut trows = Vec::new();
            for (n, r) in ranked.iter().take(c.top).enumerate() {
                let k = r.check.as_ref();
                let v = res.impact_velocity(r.i, r.j).map_or(0.0, |v| v.si());
                trows.push(vec![
                    format!("{}", n + 1),
                    fmt::kv(grid.voltages[r.i]),
                    fmt::kj(energy(grid.voltages[r.i])),
                    fmt::mm(grid.standoffs[r.j]),
                    grid.angles.as_ref().map_or(String::new(), |a| {
                        format!("{} deg", fmt::g(a[r.j].to_degrees()))
                    }),
                    format!("{v:.0} m/s"),
                    // The limit that fails just beyond the verdict change.
                    r.verdict_change_m_s
                        .zip(grid.angles.as_ref())
                        .and_then(|(x, a)| {
                            check_point(w, x + (x - v).signum() * 0.002 * v, a[r.j]).ok()
                        })
                        .and_then(|kb| kb.binding.as_ref().map(|b| limit_label(w, b)))
                        .or_else(|| {
                            k.and_then(|k| k.binding.as_ref())
                                .map(|b| limit_label(w, b))
                        })
                        .unwrap_or_else(|| "-".into()),
                    r.verdict_change_m_s
                        .map_or("not within Vp/20..20 Vp".into(), |x| {
                            format!("{x:.0} m/s ({:+.1} %)", 100.0 * (x - v) / v)
                        }),
                ]);
            }
            out.push_str(&table(
                &[
                    "rank",
                    "U0",
                    "E0",
                    "standoff",
                    "angle",
                    "Vp",
                    "limit reached",
                    "verdict changes at Vp",
                ],
                &trows,
            ));
        }
    }
    if let Some(p) = &c.plot {
        out.push_str(&format!("plot written to {}\n", p.display()));
        if one_angle(grid) && grid.standoffs.len() > 1 {
            out.push_str("note: every standoff has the same angle, so the process curves lie on one line of the plot and only a few points are labelled; --angle-per-standoff (e.g. one rod chamfer per standoff) separates them\n");
        }
    }
    if let Some(d) = &c.curves_csv {
        out.push_str(&format!("process curves written to {}\n", d.display()));
    }
    for w in inputs.efficiency_warnings() {
        out.push_str(&format!("warning: {w}\n"));
    }
    out.push_str(assumptions);
    out.push('\n');
    out.push_str(CAUTION);
    out.push('\n');
    emit(&out)
}

/// True when every standoff has the same angle (the curves then lie on one line).
fn one_angle(grid: &GridValues) -> bool {
    grid.angles
        .as_ref()
        .is_none_or(|a| a.iter().all(|x| (x - a[0]).abs() < 1e-12))
}

fn point_label(grid: &GridValues, i: usize, j: usize) -> String {
    match (one_angle(grid), grid.voltages.len() > 1) {
        (true, true) => format!(
            "{}, {}",
            fmt::kv(grid.voltages[i]),
            fmt::mm(grid.standoffs[j])
        ),
        (true, false) => fmt::mm(grid.standoffs[j]),
        (false, _) => fmt::kv(grid.voltages[i]),
    }
}

fn write_curves(dir: &Path, res: &SweepResult, grid: &GridValues, rows: &[Row]) -> CmdResult {
    std::fs::create_dir_all(dir).map_err(|e| {
        Fail::input(format!(
            "--curves-csv: cannot create {}: {e}",
            dir.display()
        ))
    })?;
    for (j, g) in grid.standoffs.iter().enumerate() {
        let angle = grid.angles.as_ref().map(|a| a[j]);
        let mut s = String::from(
            "velocity[m/s],angle[deg],label,charge_voltage[kV],stored_energy[kJ],inside\n",
        );
        for (i, u) in grid.voltages.iter().enumerate() {
            if let Some(v) = res.impact_velocity(i, j) {
                let inside = rows[i * grid.standoffs.len() + j]
                    .check
                    .as_ref()
                    .map_or(String::new(), |k| k.inside.to_string());
                s.push_str(&format!(
                    "{:.3},{},{},{:.6},{:.6},{inside}\n",
                    v.si(),
                    angle.map_or(String::new(), |a| format!("{:.6}", a.to_degrees())),
                    fmt::kv(*u),
                    u / 1e3,
                    res.point(i, j).map_or(0.0, |p| p.stored_energy.si()) / 1e3,
                ));
            }
        }
        let name = format!("standoff-{}mm.csv", fmt::g(g * 1e3));
        let path = dir.join(name);
        crate::common::write_output(&path, s.as_bytes())?;
    }
    Ok(())
}

/// Pick which curve points get a text label so that no two labels overlap: the highest voltage
/// of each curve first, then the lowest, then the others in order; a label is kept only when
/// its box (estimated from the plot's scale) is clear of every label kept before.
fn choose_labels(
    curves: &[Vec<(f64, f64, String)>],
    x_max: f64,
    y_max: f64,
    max_labels: usize,
) -> Vec<Vec<bool>> {
    // Approximate size of the plotting area of `render_svg` in pixels.
    let (w_px, h_px) = (717.0, 556.0);
    let to_px = |v: f64, a: f64| (v / x_max * w_px, (1.0 - a.to_degrees() / y_max) * h_px);
    let mut keep: Vec<Vec<bool>> = curves.iter().map(|c| vec![false; c.len()]).collect();
    let mut boxes: Vec<(f64, f64, f64, f64)> = Vec::new();
    let mut order: Vec<(usize, usize)> = Vec::new();
    for (ci, c) in curves.iter().enumerate() {
        if let Some(last) = c.len().checked_sub(1) {
            order.push((ci, last));
        }
    }
    for (ci, c) in curves.iter().enumerate() {
        if c.len() > 1 {
            order.push((ci, 0));
        }
    }
    for (ci, c) in curves.iter().enumerate() {
        for k in 1..c.len().saturating_sub(1) {
            order.push((ci, k));
        }
    }
    for (ci, k) in order {
        if boxes.len() >= max_labels {
            break;
        }
        let (v, a, text) = &curves[ci][k];
        let (x, y) = to_px(*v, *a);
        // The text is drawn from the point to the right and downwards (left-top anchor).
        let bx = (x, y, x + 6.4 * text.chars().count() as f64, y + 13.0);
        // Stay clear of every curve marker (radius 4 px) other than the labelled point itself.
        let hits_marker = curves.iter().enumerate().any(|(cj, cc)| {
            cc.iter().enumerate().any(|(kk, (vv, aa, _))| {
                if cj == ci && kk == k {
                    return false;
                }
                let (px, py) = to_px(*vv, *aa);
                px + 5.0 > bx.0 && px - 5.0 < bx.2 && py + 5.0 > bx.1 && py - 5.0 < bx.3
            })
        });
        let clear = boxes.iter().all(|b| {
            bx.2 + 2.0 <= b.0 || bx.0 >= b.2 + 2.0 || bx.3 + 2.0 <= b.1 || bx.1 >= b.3 + 2.0
        });
        if clear && !hits_marker {
            boxes.push(bx);
            keep[ci][k] = true;
        }
    }
    keep
}

fn nice_ceil(x: f64, step: f64) -> f64 {
    (x / step).ceil() * step
}

fn write_plot(path: &Path, w: &PairWindow, res: &SweepResult, grid: &GridValues) -> CmdResult {
    let ext = path
        .extension()
        .and_then(|e| e.to_str())
        .unwrap_or("")
        .to_ascii_lowercase();
    if ext != "svg" {
        return Err(Fail::input(format!(
            "--plot {}: the plot is written as SVG; name it OUT.svg (convert it with e.g. rsvg-convert)",
            path.display()
        )));
    }
    let Some(angles) = &grid.angles else {
        return Err(Fail::input("--plot needs --angle or --angle-per-standoff"));
    };
    let mut raw: Vec<Vec<(f64, f64, String)>> = Vec::new();
    let mut names = Vec::new();
    if one_angle(grid) {
        // One angle for every standoff: one curve per charging voltage, velocity against
        // standoff (all on one line of the plot), labelled by standoff.
        for (i, u) in grid.voltages.iter().enumerate() {
            let pts: Vec<(f64, f64, String)> = (0..grid.standoffs.len())
                .filter_map(|j| {
                    res.impact_velocity(i, j)
                        .map(|v| (v.si(), angles[j], point_label(grid, i, j)))
                })
                .collect();
            if !pts.is_empty() {
                raw.push(pts);
                names.push(format!(
                    "{} ({}) at {} deg, standoff {} to {}",
                    fmt::kv(*u),
                    fmt::kj(res.point(i, 0).map_or(0.0, |p| p.stored_energy.si())),
                    fmt::g(angles[0].to_degrees()),
                    fmt::mm(grid.standoffs.iter().copied().fold(f64::INFINITY, f64::min)),
                    fmt::mm(grid.standoffs.iter().copied().fold(0.0, f64::max)),
                ));
            }
        }
    } else {
        // One angle per standoff: one curve per standoff, velocity against voltage.
        for (j, g) in grid.standoffs.iter().enumerate() {
            let pts: Vec<(f64, f64, String)> = (0..grid.voltages.len())
                .filter_map(|i| {
                    res.impact_velocity(i, j)
                        .map(|v| (v.si(), angles[j], point_label(grid, i, j)))
                })
                .collect();
            if !pts.is_empty() {
                raw.push(pts);
                names.push(format!(
                    "standoff {} at {} deg",
                    fmt::mm(*g),
                    fmt::g(angles[j].to_degrees())
                ));
            }
        }
    }
    // The plot's scale, as render_svg chooses it (velocity plane).
    let max_v = raw
        .iter()
        .flatten()
        .map(|p| p.0)
        .chain(w.observations.iter().map(|o| o.velocity.si()))
        .fold(0.0f64, f64::max);
    let max_a = raw
        .iter()
        .flatten()
        .map(|p| p.1.to_degrees())
        .chain(w.observations.iter().map(|o| o.angle.degrees()))
        .fold(0.0f64, f64::max);
    let x_max = nice_ceil((max_v * 1.2).max(700.0), 100.0);
    let y_max = nice_ceil((max_a * 1.15).max(30.0), 5.0).min(85.0);
    let keep = choose_labels(&raw, x_max, y_max, 12);
    let curves: Vec<ProcessCurve> = raw
        .into_iter()
        .zip(keep)
        .zip(names)
        .map(|((pts, k), label)| ProcessCurve {
            label,
            points: pts
                .into_iter()
                .zip(k)
                .map(|((v, a, t), keep)| (v, a, keep.then_some(t)))
                .collect(),
        })
        .collect();
    let svg = render_svg(&PlotRequest {
        window: w,
        plane: Plane::AngleImpactVelocity,
        points: Vec::new(),
        curves,
    })?;
    crate::common::write_output(path, svg.as_bytes())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_never_overlap() {
        let a = 8f64.to_radians();
        let curve = |v0: f64| -> Vec<(f64, f64, String)> {
            (0..7)
                .map(|i| (v0 + 40.0 * i as f64, a, format!("{} kV, 1 mm", 6 + i)))
                .collect()
        };
        let curves = vec![curve(300.0), curve(310.0), curve(320.0)];
        let keep = choose_labels(&curves, 800.0, 30.0, 12);
        let n: usize = keep.iter().flatten().filter(|k| **k).count();
        assert!((1..21).contains(&n), "{n} labels");
        // Neighbouring points 10 m/s apart on one line can never both be labelled.
        for i in 0..7 {
            let same: usize = keep.iter().filter(|k| k[i]).count();
            assert!(same <= 1);
        }
    }
}
