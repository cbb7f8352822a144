//! `oblique calibrate mpw-tube|mpw-sheet|ring-down|export`: fit the efficiency factor to one
//! measured shot (and store it in the bank's file), identify L and R from a ring-down record
//! (and write a new bank file), print a machine file for copying.

use super::setup::{self, fmt, BankPick, Inputs};
use super::show::{inputs_json, inputs_table, pulse_table};
use super::{CalibrateCommon, RingDownArgs, SheetCalibrateArgs, TubeCalibrateArgs};
use crate::common::{today, user_dirs};
use crate::fail::{CmdResult, Fail};
use crate::output::{emit, emit_json, sig, table, CAUTION};
use oblique_core::process::{calibrate_efficiency, identify_ring_down, ProcessError, PulseSetup};
use oblique_core::units::{Capacitance, Frequency, Velocity};
use oblique_window::machine::{
    append_calibration, builtin_text, is_iso_date, CalibrationEntry, Machines, MACHINES_DIR,
    MACHINE_FORMAT,
};
use oblique_window::write::{create_new, ron_string, WriteError};
use serde_json::{json, Map, Value};
use std::path::PathBuf;

/// `oblique calibrate mpw-tube`.
pub fn run_tube(dirs: &[PathBuf], a: TubeCalibrateArgs) -> CmdResult {
    let ctx = setup::load(dirs)?;
    let window = setup::pair(&ctx, &a.common.pair)?;
    let mut inputs = Inputs::default();
    let parts = setup::tube_parts(&ctx, &a.bank, &a.tube, window, &mut inputs)?;
    let u = setup::charge(&parts.bank, &a.charge, &mut inputs)?;
    setup::check_tube_standoff(&parts, a.standoff)?;
    inputs.standoff_flag(a.standoff);
    let s = setup::tube_setup(&parts, u, a.standoff, 1.0);
    let shot = Shot {
        model: "mpw-tube",
        coil: parts.coil_name.clone(),
        flyer: parts.flyer.clone(),
        thickness: parts.tube.wall_thickness.si(),
        voltage: u.si(),
        standoff: a.standoff,
    };
    fit(&s, &parts.bank, &shot, &inputs, &a.common)
}

/// `oblique calibrate mpw-sheet`.
pub fn run_sheet(dirs: &[PathBuf], a: SheetCalibrateArgs) -> CmdResult {
    let ctx = setup::load(dirs)?;
    let window = setup::pair(&ctx, &a.common.pair)?;
    let mut inputs = Inputs::default();
    let parts = setup::sheet_parts(&ctx, &a.bank, &a.sheet, window, &mut inputs)?;
    let u = setup::charge(&parts.bank, &a.charge, &mut inputs)?;
    inputs.standoff_flag(a.standoff);
    let s = setup::sheet_setup(&parts, u, a.standoff, 1.0);
    let shot = Shot {
        model: "mpw-sheet",
        coil: parts.coil_name.clone(),
        flyer: parts.flyer.clone(),
        thickness: parts.sheet.thickness.si(),
        voltage: u.si(),
        standoff: a.standoff,
    };
    fit(&s, &parts.bank, &shot, &inputs, &a.common)
}

/// `v` rounded to 12 significant digits, so that unit conversions print without float noise.
fn round12(v: f64) -> f64 {
    if v == 0.0 || !v.is_finite() {
        return v;
    }
    let digits = 11 - v.abs().log10().floor() as i32;
    let f = 10f64.powi(digits);
    (v * f).round() / f
}

/// What identifies the calibrated shot.
struct Shot {
    model: &'static str,
    coil: Option<String>,
    flyer: String,
    thickness: f64,
    voltage: f64,
    standoff: f64,
}

fn copy_hint(name: &str) -> String {
    format!(
        "copy it into a library folder first, then calibrate the copy:\n    mkdir -p DIR/{MACHINES_DIR} && oblique calibrate export {name} > DIR/{MACHINES_DIR}/{name}.ron\n    oblique --library DIR calibrate ... --machine {name} --save\n  (the copy shadows the built-in file, with a warning; give it a new `name` to avoid that)"
    )
}

fn fit(
    s: &PulseSetup,
    bank: &BankPick,
    shot: &Shot,
    inputs: &Inputs,
    c: &CalibrateCommon,
) -> CmdResult {
    let date = match &c.date {
        Some(d) if is_iso_date(d) => d.clone(),
        Some(d) => {
            return Err(Fail::input(format!(
                "--date: '{d}' is not a date YYYY-MM-DD"
            )))
        }
        None => today(),
    };
    if c.source.trim().is_empty() {
        return Err(Fail::input(
            "--source: say where the measured velocity comes from (record, logbook page)",
        ));
    }
    // Refuse an impossible save before the work.
    if c.save {
        if let Some(rec) = &bank.record {
            if rec.is_builtin() {
                return Err(Fail::input(format!(
                    "--save: machine '{}' is a built-in file ({}) and read-only\n  hint: {}",
                    rec.name,
                    rec.origin.display,
                    copy_hint(&rec.name)
                )));
            }
        }
    }
    s.with_efficiency(1.0)
        .validate()
        .map_err(setup::process_fail)?;
    let opts = setup::options(&c.integration, false);
    opts.validate()
        .map_err(|e| Fail::input(format!("--steps-per-period / --max-periods: {e}")))?;
    let vm = c.measured_velocity;
    let f = calibrate_efficiency(s, Velocity::from_m_s(vm), &opts).map_err(|e| match e {
        ProcessError::NoBracket { f_high, .. } if f_high < 0.0 => Fail::input(format!(
            "--measured-velocity: the model cannot reach {vm:.0} m/s: even at efficiency 1 it gives {:.0} m/s\n  hint: check the bank, coil and material inputs (and the standoff); the efficiency only lowers the push",
            vm + f_high
        )),
        ProcessError::NoBracket { f_low, .. } => Fail::input(format!(
            "--measured-velocity: the model gives {:.0} m/s even at efficiency 0.001, faster than the measured {vm:.0} m/s\n  hint: check the inputs; a fit this far from 1 means the model does not describe the set-up",
            vm + f_low
        )),
        e => setup::process_fail(e),
    })?;
    let mut saved = None;
    if c.save {
        let Some(rec) = &bank.record else {
            return Err(Fail::input(
                "--save needs --machine: the bank file to store the calibration in",
            ));
        };
        let Some(path) = &rec.origin.path else {
            return Err(Fail::input(format!(
                "--save: machine '{}' is built in and read-only\n  hint: {}",
                rec.name,
                copy_hint(&rec.name)
            )));
        };
        let settings: Vec<String> = inputs
            .0
            .iter()
            .map(|i| format!("{} {} ({})", i.label, i.shown, i.from))
            .collect();
        let mut settings = settings.join("; ");
        if !bank.overrides.is_empty() {
            settings.push_str(&format!(
                "; NOTE: flags {} overrode this file's bank values for the shot",
                bank.overrides.join(", ")
            ));
        }
        let entry = CalibrationEntry {
            efficiency: format!("{:.6}", f.efficiency),
            model: shot.model.into(),
            coil: shot.coil.clone(),
            date: date.clone(),
            measured_velocity: format!("{} m/s", fmt::g(vm)),
            charge_voltage: format!("{} kV", round12(shot.voltage / 1e3)),
            standoff: format!("{} mm", round12(shot.standoff * 1e3)),
            flyer: Some(shot.flyer.clone()),
            flyer_thickness: Some(format!("{} mm", round12(shot.thickness * 1e3))),
            settings,
            source: c.source.clone(),
        };
        append_calibration(path, &entry, Some(&rec.origin.sha256)).map_err(|e| match e {
            WriteError::Invalid(_) => Fail::input(format!("--save: {e}")),
            e => Fail::other(format!("--save: {e}")),
        })?;
        saved = Some(path.display().to_string());
    }
    if c.json {
        let mut o = Map::new();
        o.insert("model".into(), json!(shot.model));
        o.insert("efficiency".into(), sig(f.efficiency));
        o.insert("measured_velocity_m_s".into(), sig(vm));
        o.insert("model_velocity_m_s".into(), sig(f.model_velocity.si()));
        o.insert("iterations".into(), json!(f.iterations));
        o.insert("date".into(), json!(date));
        o.insert("source".into(), json!(c.source));
        o.insert("coil".into(), json!(shot.coil));
        o.insert("saved_to".into(), json!(saved));
        o.insert(
            "warnings".into(),
            Value::Array(
                f.estimate
                    .warnings
                    .iter()
                    .map(|w| json!(w.to_string()))
                    .collect(),
            ),
        );
        inputs_json(inputs, &mut o);
        o.insert("caution".into(), json!(CAUTION));
        return emit_json(&Value::Object(o));
    }
    let mut out = format!(
        "oblique calibrate {}: efficiency fitted to one measured shot\n\n",
        shot.model
    );
    out.push_str(&inputs_table(inputs));
    out.push_str(&format!(
        "\nmeasured impact velocity {} ({}, {date})\nfitted efficiency eta = {:.4} (model gives {:.1} m/s; {} iterations of Brent's method)\n\n",
        format_args!("{} m/s", fmt::g(vm)),
        c.source,
        f.efficiency,
        f.model_velocity.si(),
        f.iterations
    ));
    out.push_str("the estimate at the fitted efficiency:\n");
    out.push_str(&pulse_table(&f.estimate, shot.thickness, &[]));
    match &saved {
        Some(p) => out.push_str(&format!(
            "saved to {p}: later estimates with this --machine and --coil use eta = {:.4} unless --efficiency is given\n",
            f.efficiency
        )),
        None => out.push_str("not saved (add --save with a bank file of your own to store it)\n"),
    }
    out.push_str("note: one shot fixes one number; the calibrated model still extrapolates poorly far from that shot\n");
    out.push_str(CAUTION);
    out.push('\n');
    emit(&out)
}

/// `oblique calibrate ring-down`.
pub fn run_ring_down(dirs: &[PathBuf], a: RingDownArgs) -> CmdResult {
    let fit = identify_ring_down(
        Capacitance::from_f(a.capacitance),
        Frequency::from_hz(a.ring_frequency),
        a.peak_ratio,
    )
    .map_err(setup::process_fail)?;
    let mut written = None;
    if let Some(name) = &a.save_as {
        written = Some(save_bank(dirs, name, &a)?);
    }
    let period = 1.0 / a.ring_frequency;
    let decay = a.peak_ratio.ln() / period;
    if a.json {
        let mut o = Map::new();
        o.insert("capacitance_f".into(), sig(a.capacitance));
        o.insert("ring_frequency_hz".into(), sig(a.ring_frequency));
        o.insert("peak_ratio".into(), sig(a.peak_ratio));
        o.insert("inductance_h".into(), sig(fit.inductance.si()));
        o.insert("resistance_ohm".into(), sig(fit.resistance.si()));
        o.insert(
            "simple_inductance_h".into(),
            sig(fit.simple_inductance.si()),
        );
        o.insert(
            "simple_resistance_ohm".into(),
            sig(fit.simple_resistance.si()),
        );
        o.insert(
            "simple_relative_error".into(),
            sig(fit.simple_relative_error),
        );
        o.insert("decay_rate_1_s".into(), sig(decay));
        o.insert(
            "critical_resistance_ohm".into(),
            sig(fit.circuit.critical_resistance().si()),
        );
        o.insert("written_to".into(), json!(written));
        o.insert("caution".into(), json!(CAUTION));
        return emit_json(&Value::Object(o));
    }
    let rows = vec![
        vec![
            "loop inductance L".into(),
            fmt::nh(fit.inductance.si()),
            fmt::nh(fit.simple_inductance.si()),
        ],
        vec![
            "loop resistance R".into(),
            fmt::mohm(fit.resistance.si()),
            fmt::mohm(fit.simple_resistance.si()),
        ],
    ];
    let mut out = format!(
        "oblique calibrate ring-down: C = {}, ring frequency {} kHz, same-sign peak ratio I1/I2 = {}\n\n",
        fmt::uf(a.capacitance),
        fmt::g(a.ring_frequency / 1e3),
        fmt::g(a.peak_ratio)
    );
    out.push_str(&table(
        &["quantity", "exact inverse", "simple form 1/(w^2 C)"],
        &rows,
    ));
    out.push_str(&format!(
        "\nexact: L = 1 / (C (w^2 + a^2)), R = 2 L a, with w = 2 pi f and a = f ln(I1/I2) = {} 1/s\nsimple: L = 1 / (w^2 C), R = 2 L ln(I1/I2) f; too large by {:.2} %\ncritical resistance 2 sqrt(L/C) = {} (the loop rings while R is below it)\n",
        fmt::g(decay),
        100.0 * fit.simple_relative_error,
        fmt::mohm(fit.circuit.critical_resistance().si())
    ));
    out.push_str("these are L and R of the whole loop during the record: with the output shorted at the coil terminals, the bank's own; with a coil connected, subtract the coil's inductance (docs/process-models.md section 1)\n");
    match &written {
        Some(p) => out.push_str(&format!("wrote the bank file {p}\n")),
        None => out.push_str(&format!(
            "to describe the bank in a file, add --save-as NAME --rated-voltage U --source TEXT (with --library DIR), or write DIR/{MACHINES_DIR}/NAME.ron by hand with\n    ring_down: (frequency: \"{} kHz\", peak_ratio: \"{}\", source: \"...\"),\n",
            fmt::g(a.ring_frequency / 1e3),
            fmt::g(a.peak_ratio)
        )),
    }
    out.push_str(CAUTION);
    out.push('\n');
    emit(&out)
}

fn save_bank(dirs: &[PathBuf], name: &str, a: &RingDownArgs) -> CmdResult<String> {
    if name.is_empty()
        || name
            .chars()
            .any(|c| c.is_whitespace() || c == '/' || c == '\\')
    {
        return Err(Fail::input(format!(
            "--save-as: name '{name}' must be non-empty, without spaces or slashes"
        )));
    }
    let folders = user_dirs(dirs);
    let Some(dir) = folders.first() else {
        return Err(Fail::input(
            "--save-as needs a library folder: give --library DIR (or set OBLIQUE_LIBRARY)",
        ));
    };
    let machines = Machines::load(&folders)?;
    if let Some(old) = machines.items.get(name) {
        if !old.is_builtin() {
            return Err(Fail::input(format!(
                "--save-as: a machine file named '{name}' already exists ({})",
                old.origin.display
            )));
        }
        eprintln!(
            "warning: the new bank '{name}' will shadow the built-in file {}",
            old.origin.display
        );
    }
    let (Some(rating), Some(source)) = (a.rated_voltage, &a.source) else {
        return Err(Fail::input("--save-as needs --rated-voltage and --source"));
    };
    let sheet = a.datasheet.clone().unwrap_or_else(|| "datasheet".into());
    let maintainer = a
        .maintainer
        .clone()
        .or_else(|| std::env::var("USER").ok())
        .unwrap_or_else(|| "unknown".into());
    let text = format!(
        r#"// Capacitor bank for oblique, written by `oblique calibrate ring-down --save-as`.
// Format: docs/process-models.md, section "Command line". L and R follow from the ring-down
// record (exact form); write `inductance` and `resistance` entries to override them.
(
    format: {format},
    name: {name_q},
    description: "",
    maintainer: {maintainer},
    revisions: [
        (date: {date}, note: "created from a ring-down record"),
    ],
    bank: (
        capacitance: (value: {c}, source: {sheet}),
        max_voltage: (value: {u}, source: {sheet}),
        ring_down: (
            frequency: {f},
            peak_ratio: {r},
            source: {source},
        ),
    ),
    calibrations: [
    ],
)
"#,
        format = ron_string(MACHINE_FORMAT),
        name_q = ron_string(name),
        maintainer = ron_string(&maintainer),
        date = ron_string(&today()),
        c = ron_string(&format!("{} uF", round12(a.capacitance * 1e6))),
        u = ron_string(&format!("{} kV", round12(rating / 1e3))),
        sheet = ron_string(&sheet),
        f = ron_string(&format!("{} kHz", round12(a.ring_frequency / 1e3))),
        r = ron_string(&format!("{}", a.peak_ratio)),
        source = ron_string(source),
    );
    let folder = dir.join(MACHINES_DIR);
    std::fs::create_dir_all(&folder)
        .map_err(|e| Fail::other(format!("cannot create {}: {e}", folder.display())))?;
    let path = folder.join(format!("{name}.ron"));
    // Validate before writing (the same parser as every load).
    let origin = oblique_window::pair::Origin {
        display: path.display().to_string(),
        path: Some(path.clone()),
        sha256: String::new(),
    };
    oblique_window::machine::parse_machine_file(origin, &text)?;
    create_new(&path, &text).map_err(|e| Fail::input(format!("--save-as: {e}")))?;
    Ok(path.display().to_string())
}

/// `oblique calibrate export NAME`.
pub fn run_export(dirs: &[PathBuf], name: &str) -> CmdResult {
    let machines = Machines::load(&user_dirs(dirs))?;
    let rec = machines.get(name).map_err(Fail::input)?;
    match &rec.origin.path {
        Some(p) => {
            let text = std::fs::read_to_string(p)
                .map_err(|e| Fail::other(format!("cannot read {}: {e}", p.display())))?;
            emit(&text)
        }
        None => match builtin_text(name) {
            Some(t) => emit(t),
            None => Err(Fail::other(format!("built-in file for '{name}' not found"))),
        },
    }
}
