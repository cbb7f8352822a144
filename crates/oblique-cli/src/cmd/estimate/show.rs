//! `oblique estimate mpw-tube|mpw-sheet|explosive`: one estimate, as a table or JSON, with the
//! inputs and where they came from, the energy balance, warnings, assumptions and the caution.

use super::setup::{self, fmt, Ctx, Inputs};
use super::{EstimateCommon, ExplosiveArgs, SheetEstimateArgs, TubeEstimateArgs};
use crate::fail::{CmdResult, Fail};
use crate::output::{classification_json, emit, emit_json, sig, table, CAUTION};
use oblique_core::process::{
    estimate, explosive_estimate, ExplosiveSetup, ImpactOutcome, MassRatio, PulseEstimate,
    PulseSetup,
};
use oblique_core::units::{Angle, Velocity};
use oblique_core::{Collision, Convention};
use oblique_window::classify::{classify, limit_label, Classification};
use oblique_window::PairWindow;
use serde_json::{json, Map, Value};
use std::path::{Path, PathBuf};

/// The assumptions of the tube model, in one line.
pub const ASSUMPTIONS_TUBE: &str = "assumptions: lumped one-degree-of-freedom model (docs/process-models.md): series RLC bank with constant R, long-solenoid field in the gap (no coil end effects, no field leakage), thin rigid-plastic ring resisted by the quasi-static yield strength, skin-depth factor 1-exp(-2h/delta) at the instantaneous frequency, pressure scaled by the efficiency eta; the collision angle is not computed";
/// The assumptions of the sheet model, in one line.
pub const ASSUMPTIONS_SHEET: &str = "assumptions: lumped one-degree-of-freedom model (docs/process-models.md): series RLC bank with constant R, parallel-plate field over the bar (no fringing at the edges), the driven strip moves as one flat unresisted plate, skin-depth factor 1-exp(-2h/delta) at the instantaneous frequency, pressure scaled by the efficiency eta; the collision angle is not computed";
/// The assumptions of the explosive model, in one line.
pub const ASSUMPTIONS_EXPLOSIVE: &str = "assumptions: Gurney open-faced sandwich (terminal flyer velocity; a flyer that meets the parent before it has finished accelerating is slower), steady collision kinematics of the parallel or inclined set-up in the bisector convention (docs/process-models.md section 9); the Gurney velocity is the user's, none is shipped";

/// `oblique estimate mpw-tube`.
pub fn run_tube(dirs: &[PathBuf], a: TubeEstimateArgs) -> CmdResult {
    let ctx = setup::load(dirs)?;
    let window = setup::pair(&ctx, &a.common.pair)?;
    let mut inputs = Inputs::default();
    let parts = setup::tube_parts(&ctx, &a.bank, &a.tube, window, &mut inputs)?;
    let u = setup::charge(&parts.bank, &a.charge, &mut inputs)?;
    setup::check_tube_standoff(&parts, a.standoff)?;
    setup::compression_warning(&parts, a.standoff, &mut inputs);
    inputs.standoff_flag(a.standoff);
    let eta = setup::efficiency(
        a.common.efficiency,
        &parts.bank,
        "mpw-tube",
        parts.coil_name.as_deref(),
        (parts.flyer.as_str(), parts.tube.wall_thickness.si()),
        &mut inputs,
    );
    let s = setup::tube_setup(&parts, u, a.standoff, eta);
    finish(
        &ctx,
        window,
        "mpw-tube",
        "tube compression in a single-turn coil",
        &s,
        &inputs,
        &a.common,
        ASSUMPTIONS_TUBE,
    )
}

/// `oblique estimate mpw-sheet`.
pub fn run_sheet(dirs: &[PathBuf], a: SheetEstimateArgs) -> CmdResult {
    let ctx = setup::load(dirs)?;
    let window = setup::pair(&ctx, &a.common.pair)?;
    let mut inputs = Inputs::default();
    let parts = setup::sheet_parts(&ctx, &a.bank, &a.sheet, window, &mut inputs)?;
    let u = setup::charge(&parts.bank, &a.charge, &mut inputs)?;
    inputs.standoff_flag(a.standoff);
    let eta = setup::efficiency(
        a.common.efficiency,
        &parts.bank,
        "mpw-sheet",
        parts.coil_name.as_deref(),
        (parts.flyer.as_str(), parts.sheet.thickness.si()),
        &mut inputs,
    );
    let s = setup::sheet_setup(&parts, u, a.standoff, eta);
    finish(
        &ctx,
        window,
        "mpw-sheet",
        "sheet driven off a flat one-turn bar coil",
        &s,
        &inputs,
        &a.common,
        ASSUMPTIONS_SHEET,
    )
}

/// Classify an impact at the user's angle against the window (normal-to-flyer Vp).
pub fn check_point(window: &PairWindow, vp: f64, angle: f64) -> CmdResult<Classification> {
    let col = Collision::from_impact(
        Convention::NormalToFlyer,
        Velocity::from_m_s(vp),
        Angle::from_radians(angle),
    )?;
    let setup = window.setup()?;
    Ok(classify(window, &setup, &col)?)
}

#[allow(clippy::too_many_arguments)]
fn finish(
    _ctx: &Ctx,
    window: Option<&PairWindow>,
    model: &str,
    title: &str,
    s: &PulseSetup,
    inputs: &Inputs,
    common: &EstimateCommon,
    assumptions: &str,
) -> CmdResult {
    s.validate().map_err(setup::process_fail)?;
    let opts = setup::options(&common.integration, common.history.is_some());
    opts.validate()
        .map_err(|e| Fail::input(format!("--steps-per-period / --max-periods: {e}")))?;
    let est = estimate(s, &opts).map_err(setup::process_fail)?;
    if let Some(path) = &common.history {
        write_history(path, &est)?;
    }
    let check = match (common.angle, window, est.impact_velocity()) {
        (Some(angle), Some(w), Some(vp)) => {
            let mut c = check_point(w, vp.si(), angle)?;
            oblique_window::classify::explain(w, &w.setup()?, &mut c);
            Some(c)
        }
        _ => None,
    };
    let thickness = match s {
        PulseSetup::Tube(t) => t.tube.wall_thickness.si(),
        PulseSetup::Sheet(t) => t.sheet.thickness.si(),
    };
    if common.json {
        let mut o = pulse_json(model, &est, thickness, inputs, assumptions);
        o.insert(
            "angle_deg".into(),
            common.angle.map_or(Value::Null, |a| sig(a.to_degrees())),
        );
        o.insert(
            "window_check".into(),
            match (&check, window) {
                (Some(c), Some(w)) => classification_json(w, c),
                _ => Value::Null,
            },
        );
        if let Some(p) = &common.history {
            o.insert("history_file".into(), json!(p.display().to_string()));
        }
        o.insert("caution".into(), json!(CAUTION));
        return emit_json(&Value::Object(o));
    }
    let mut out = format!("oblique estimate {model}: {title} (screening estimate)\n\n");
    out.push_str(&inputs_table(inputs));
    out.push('\n');
    out.push_str(&pulse_table(&est, thickness, &inputs.efficiency_warnings()));
    if let Some(p) = &common.history {
        out.push_str(&format!(
            "time histories written to {} ({} samples)\n",
            p.display(),
            est.history.len()
        ));
    }
    out.push_str(&window_lines(window, common.angle, &est, check.as_ref()));
    if check.as_ref().is_some_and(|c| c.inside) && !inputs.efficiency_warnings().is_empty() {
        out.push_str("  the verdict rests on an uncalibrated (or transferred) efficiency: the real impact velocity is likely lower; check where the window is above before any shot\n");
    }
    out.push_str(assumptions);
    out.push('\n');
    out.push_str(CAUTION);
    out.push('\n');
    emit(&out)
}

/// The inputs table.
pub fn inputs_table(inputs: &Inputs) -> String {
    let rows: Vec<Vec<String>> = inputs
        .0
        .iter()
        .map(|i| vec![i.label.clone(), i.shown.clone(), i.from.clone()])
        .collect();
    format!("inputs\n{}", table(&["quantity", "value", "from"], &rows))
}

/// The inputs as JSON: `inputs` (SI values under unit-suffixed keys) and `input_sources`.
pub fn inputs_json(inputs: &Inputs, o: &mut Map<String, Value>) {
    let mut vals = Map::new();
    let mut from = Map::new();
    for i in &inputs.0 {
        let v = if i.si.is_nan() {
            if i.shown == "unknown" {
                Value::Null
            } else {
                json!(i.shown)
            }
        } else {
            sig(i.si)
        };
        vals.insert(i.key.clone(), v);
        from.insert(i.key.clone(), json!(i.from));
    }
    o.insert("inputs".into(), Value::Object(vals));
    o.insert("input_sources".into(), Value::Object(from));
}

/// The estimate as JSON (without caution and window check).
pub fn pulse_json(
    model: &str,
    est: &PulseEstimate,
    thickness: f64,
    inputs: &Inputs,
    assumptions: &str,
) -> Map<String, Value> {
    let mut o = Map::new();
    o.insert("model".into(), json!(model));
    let (impact, time, vel, after, reason, travel, vend) = match est.outcome {
        ImpactOutcome::Impact {
            time,
            velocity,
            after_first_half_wave,
        } => (
            true,
            sig(time.si()),
            sig(velocity.si()),
            json!(after_first_half_wave),
            Value::Null,
            Value::Null,
            Value::Null,
        ),
        ImpactOutcome::NoImpact {
            reason,
            travel,
            velocity,
            ..
        } => (
            false,
            Value::Null,
            Value::Null,
            Value::Null,
            json!(reason),
            sig(travel.si()),
            sig(velocity.si()),
        ),
    };
    o.insert("impact".into(), json!(impact));
    o.insert("impact_velocity_m_s".into(), vel);
    o.insert("impact_time_s".into(), time);
    o.insert("impact_after_first_half_wave".into(), after);
    o.insert("no_impact_reason".into(), reason);
    o.insert("final_travel_m".into(), travel);
    o.insert("final_velocity_m_s".into(), vend);
    o.insert("stored_energy_j".into(), sig(est.stored_energy.si()));
    o.insert(
        "initial_inductance_h".into(),
        sig(est.initial_inductance.si()),
    );
    o.insert("ring_frequency_hz".into(), sig(est.ring_frequency.si()));
    o.insert("peak_current_a".into(), sig(est.peak_current.si()));
    o.insert("peak_field_t".into(), sig(est.peak_field.si()));
    o.insert("peak_pressure_pa".into(), sig(est.peak_pressure.si()));
    o.insert(
        "peak_effective_pressure_pa".into(),
        sig(est.peak_effective_pressure.si()),
    );
    o.insert("skin_depth_m".into(), sig(est.skin_depth.si()));
    o.insert("workpiece_thickness_m".into(), sig(thickness));
    o.insert("skin_factor".into(), sig(est.skin_factor));
    o.insert(
        "first_current_zero_s".into(),
        est.first_current_zero.map_or(Value::Null, |t| sig(t.si())),
    );
    let e = &est.energy;
    o.insert(
        "energy_balance_j".into(),
        json!({
            "stored": sig(e.stored.si()),
            "capacitor": sig(e.capacitor.si()),
            "field": sig(e.field.si()),
            "resistive": sig(e.resistive.si()),
            "kinetic": sig(e.kinetic.si()),
            "plastic": sig(e.plastic.si()),
            "withheld": sig(e.withheld.si()),
        }),
    );
    o.insert(
        "energy_balance_relative_error".into(),
        sig(e.relative_error),
    );
    let mut warnings: Vec<Value> = est.warnings.iter().map(|w| json!(w.to_string())).collect();
    warnings.extend(inputs.efficiency_warnings().into_iter().map(|w| json!(w)));
    o.insert("warnings".into(), Value::Array(warnings));
    o.insert(
        "assumptions".into(),
        json!(assumptions.trim_start_matches("assumptions: ")),
    );
    inputs_json(inputs, &mut o);
    o
}

/// The result table of a pulse estimate.
pub fn pulse_table(est: &PulseEstimate, thickness: f64, extra_warnings: &[String]) -> String {
    let mut rows: Vec<Vec<String>> = vec![
        vec![
            "stored energy".into(),
            fmt::kj(est.stored_energy.si()),
            "C U0^2 / 2".into(),
        ],
        vec![
            "loop inductance at rest".into(),
            fmt::nh(est.initial_inductance.si()),
            "bank + coil extra + gap".into(),
        ],
        vec![
            "ring frequency".into(),
            format!("{} kHz", fmt::g(est.ring_frequency.si() / 1e3)),
            "damped, at rest".into(),
        ],
        vec![
            "peak current".into(),
            format!("{} kA", fmt::g(est.peak_current.si() / 1e3)),
            String::new(),
        ],
        vec![
            "peak field".into(),
            format!("{} T", fmt::g(est.peak_field.si())),
            "in the gap".into(),
        ],
        vec![
            "peak magnetic pressure".into(),
            format!("{} MPa", fmt::g(est.peak_pressure.si() / 1e6)),
            "B^2 / (2 mu0)".into(),
        ],
        vec![
            "peak pressure on the workpiece".into(),
            format!("{} MPa", fmt::g(est.peak_effective_pressure.si() / 1e6)),
            "eta f_s B^2 / (2 mu0)".into(),
        ],
        vec![
            "skin depth vs thickness".into(),
            format!("{} vs {}", fmt::mm(est.skin_depth.si()), fmt::mm(thickness)),
            format!("skin factor f_s = {}", fmt::g(est.skin_factor)),
        ],
        vec![
            "first current zero".into(),
            est.first_current_zero
                .map_or("not before the end of the run".into(), |t| {
                    format!("{} us", fmt::g(t.si() * 1e6))
                }),
            String::new(),
        ],
    ];
    match est.outcome {
        ImpactOutcome::Impact {
            time,
            velocity,
            after_first_half_wave,
        } => {
            rows.push(vec![
                "impact time".into(),
                format!("{} us", fmt::g(time.si() * 1e6)),
                if after_first_half_wave {
                    "after the first current zero".into()
                } else {
                    "within the first half-wave".into()
                },
            ]);
            rows.push(vec![
                "impact velocity Vp".into(),
                format!("{:.0} m/s", velocity.si()),
                "normal to the workpiece".into(),
            ]);
        }
        ImpactOutcome::NoImpact {
            reason,
            travel,
            velocity,
            end_time,
        } => {
            rows.push(vec![
                "outcome".into(),
                "NO IMPACT".into(),
                reason.to_string(),
            ]);
            rows.push(vec![
                "travel, velocity at the end".into(),
                format!("{}, {:.0} m/s", fmt::mm(travel.si()), velocity.si()),
                format!("at {} us", fmt::g(end_time.si() * 1e6)),
            ]);
        }
    }
    let mut s = format!("result\n{}", table(&["quantity", "value", "note"], &rows));
    let e = &est.energy;
    let at = if est.impact_velocity().is_some() {
        "at impact"
    } else {
        "at the end"
    };
    let erows: Vec<Vec<String>> = [
        ("stored", e.stored.si()),
        ("left in the capacitor", e.capacitor.si()),
        ("in the magnetic field", e.field.si()),
        ("dissipated in R", e.resistive.si()),
        ("kinetic (workpiece)", e.kinetic.si()),
        ("plastic work", e.plastic.si()),
        ("withheld (skin depth, eta)", e.withheld.si()),
    ]
    .iter()
    .map(|(k, v)| {
        vec![
            (*k).to_string(),
            format!("{:.1} J", v),
            format!("{:.1} %", 100.0 * v / e.stored.si()),
        ]
    })
    .collect();
    s.push_str(&format!("\nenergy balance {at}\n"));
    s.push_str(&table(&["term", "energy", "share"], &erows));
    s.push_str(&format!("  relative error {:.1e}\n\n", e.relative_error));
    if est.warnings.is_empty() && extra_warnings.is_empty() {
        s.push_str("warnings: none\n");
    } else {
        for w in &est.warnings {
            s.push_str(&format!("warning: {w}\n"));
        }
        for w in extra_warnings {
            s.push_str(&format!("warning: {w}\n"));
        }
    }
    s
}

fn window_lines(
    window: Option<&PairWindow>,
    angle: Option<f64>,
    est: &PulseEstimate,
    check: Option<&Classification>,
) -> String {
    match (window, angle, check) {
        (Some(w), Some(a), Some(c)) => verdict_lines(w, a, "from the user", c),
        (Some(w), Some(_), None) => {
            format!("window check ({}): not made, there is no impact\n", w.name)
        }
        (Some(w), None, _) => {
            let v = est
                .impact_velocity()
                .map_or(String::new(), |v| format!(" with Vp = {:.0} m/s", v.si()));
            format!(
                "window check ({}): give --angle (your taper or chamfer angle) to check the point{v}\n",
                w.name
            )
        }
        _ => String::new(),
    }
}

/// The verdict of a window check, a few lines.
pub fn verdict_lines(w: &PairWindow, angle: f64, whose: &str, c: &Classification) -> String {
    let mut s = format!(
        "window check ({}, angle {} deg {whose}): {}\n",
        w.name,
        fmt::g(angle.to_degrees()),
        if c.inside {
            "INSIDE the window"
        } else {
            "OUTSIDE the window"
        }
    );
    if let Some(b) = &c.binding {
        s.push_str(&format!(
            "  {}: {} (relative margin {:+.1} %)\n",
            if c.inside {
                "closest limit"
            } else {
                "binding limit"
            },
            limit_label(w, b),
            100.0 * c.binding_relative_margin.unwrap_or(0.0)
        ));
    }
    s.push_str(&format!("  {}\n", c.reason));
    if let Some(t) = oblique_window::classify::inside_stretch_text(c) {
        s.push_str(&format!("  where the window is: {t}\n"));
    }
    s
}

fn write_history(path: &Path, est: &PulseEstimate) -> CmdResult {
    let mut s = String::from("time[us],current[kA],pressure[MPa],travel[mm],velocity[m/s]\n");
    for h in &est.history {
        s.push_str(&format!(
            "{:.6},{:.4},{:.4},{:.6},{:.4}\n",
            h.time.si() * 1e6,
            h.current.si() / 1e3,
            h.magnetic_pressure.si() / 1e6,
            h.travel.si() * 1e3,
            h.velocity.si()
        ));
    }
    oblique_window::write::atomic_write(path, s.as_bytes(), None)
        .map_err(|e| Fail::input(format!("--history: cannot write {}: {e}", path.display())))
}

/// `oblique estimate explosive`.
pub fn run_explosive(dirs: &[PathBuf], a: ExplosiveArgs) -> CmdResult {
    let ctx = setup::load(dirs)?;
    let window = setup::pair(&ctx, &a.pair)?;
    let found = match &a.setup {
        Some(n) => Some(
            ctx.machines
                .explosive(n)
                .map_err(|m| Fail::input(format!("--setup: {m}")))?,
        ),
        None => None,
    };
    let mut inputs = Inputs::default();
    let from_file = |name: &str, src: &str| format!("{name} ({src})");
    let mut need = |label: &str,
                    key: &str,
                    flag: &str,
                    v: Option<f64>,
                    file: Option<(f64, String)>,
                    shown: fn(f64) -> String|
     -> CmdResult<f64> {
        let (x, from) = match (v, file) {
            (Some(x), Some(_)) => (x, format!("flag {flag} (overrides the --setup file)")),
            (Some(x), None) => (x, format!("flag {flag}")),
            (None, Some((x, f))) => (x, f),
            (None, None) => {
                return Err(Fail::input(format!(
                    "{flag} is required here ({label}): give it or name a set-up file with --setup"
                )))
            }
        };
        inputs.push(label, key, x, shown(x), from);
        Ok(x)
    };
    let ms = |v: f64| format!("{} m/s", fmt::g(v));
    let deg = |v: f64| format!("{} deg", fmt::g(v.to_degrees()));
    let num = |v: f64| fmt::g(v);
    let g = need(
        "Gurney velocity sqrt(2E)",
        "gurney_velocity_m_s",
        "--gurney-velocity",
        a.gurney_velocity,
        found.map(|(r, s)| {
            (
                s.gurney_velocity.value.si(),
                from_file(&r.name, &s.gurney_velocity.source),
            )
        }),
        ms,
    )?;
    let vd = need(
        "detonation velocity",
        "detonation_velocity_m_s",
        "--detonation-velocity",
        a.detonation_velocity,
        found.map(|(r, s)| {
            (
                s.detonation_velocity.value.si(),
                from_file(&r.name, &s.detonation_velocity.source),
            )
        }),
        ms,
    )?;
    let alpha = need(
        "preset angle",
        "preset_angle_rad",
        "--preset-angle",
        a.preset_angle,
        found.map(|(r, s)| {
            (
                s.preset_angle.value.radians(),
                from_file(&r.name, &s.preset_angle.source),
            )
        }),
        deg,
    )?;
    let ratio = match (a.mass_ratio, a.charge_ratio, found) {
        (Some(m), _, _) => {
            need("mass ratio M/C", "mass_ratio_flyer_to_charge", "--mass-ratio", Some(m), None, num)?;
            MassRatio::FlyerToCharge(m)
        }
        (None, Some(r), _) => {
            need("charge ratio C/M", "charge_ratio_charge_to_flyer", "--charge-ratio", Some(r), None, num)?;
            MassRatio::ChargeToFlyer(r)
        }
        (None, None, Some((rec, s))) => {
            let (key, label, v) = match s.mass_ratio.value {
                MassRatio::FlyerToCharge(m) => ("mass_ratio_flyer_to_charge", "mass ratio M/C", m),
                MassRatio::ChargeToFlyer(r) => ("charge_ratio_charge_to_flyer", "charge ratio C/M", r),
            };
            inputs.push(label, key, v, num(v), from_file(&rec.name, &s.mass_ratio.source));
            s.mass_ratio.value
        }
        (None, None, None) => {
            return Err(Fail::input(
                "--mass-ratio (M/C) or --charge-ratio (C/M) is required here: give one, or name a set-up file with --setup",
            ))
        }
    };
    let setup = ExplosiveSetup {
        gurney_velocity: Velocity::from_m_s(g),
        mass_ratio: ratio,
        detonation_velocity: Velocity::from_m_s(vd),
        preset_angle: Angle::from_radians(alpha),
    };
    let est = explosive_estimate(&setup).map_err(setup::process_fail)?;
    let check = match window {
        Some(w) => Some(oblique_window::classify::classify_explained(
            w,
            &w.setup()?,
            &est.collision,
        )?),
        None => None,
    };
    let col = &est.collision;
    if a.json {
        let mut o = Map::new();
        o.insert("model".into(), json!("explosive"));
        o.insert("impact".into(), json!(true));
        o.insert("impact_velocity_m_s".into(), sig(est.impact_velocity.si()));
        o.insert("convention".into(), json!(col.convention.as_str()));
        o.insert("gurney_factor".into(), sig(est.gurney_factor));
        o.insert("collision_angle_deg".into(), sig(col.angle.degrees()));
        o.insert(
            "collision_velocity_m_s".into(),
            sig(col.collision_velocity.si()),
        );
        o.insert("flow_velocity_m_s".into(), sig(col.flow_velocity.si()));
        // Keys of the magnetic estimates that have no meaning here.
        for k in [
            "impact_time_s",
            "peak_current_a",
            "peak_pressure_pa",
            "energy_balance_relative_error",
        ] {
            o.insert(k.into(), Value::Null);
        }
        o.insert("warnings".into(), json!(Vec::<String>::new()));
        o.insert(
            "assumptions".into(),
            json!(ASSUMPTIONS_EXPLOSIVE.trim_start_matches("assumptions: ")),
        );
        inputs_json(&inputs, &mut o);
        o.insert(
            "window_check".into(),
            match (&check, window) {
                (Some(c), Some(w)) => classification_json(w, c),
                _ => Value::Null,
            },
        );
        o.insert("caution".into(), json!(CAUTION));
        return emit_json(&Value::Object(o));
    }
    let mut out = String::from(
        "oblique estimate explosive: Gurney open-faced sandwich and collision kinematics (screening estimate)\n\n",
    );
    out.push_str(&inputs_table(&inputs));
    let rows = vec![
        vec![
            "Gurney factor V / sqrt(2E)".into(),
            fmt::g(est.gurney_factor),
            "open-faced sandwich".into(),
        ],
        vec![
            "flyer (impact) velocity Vp".into(),
            format!("{:.0} m/s", est.impact_velocity.si()),
            "terminal velocity".into(),
        ],
        vec![
            "collision angle beta".into(),
            format!("{:.2} deg", col.angle.degrees()),
            "from the kinematics".into(),
        ],
        vec![
            "collision-point velocity Vc".into(),
            format!("{:.0} m/s", col.collision_velocity.si()),
            if alpha == 0.0 {
                "parallel set-up: Vc = Vd".into()
            } else {
                "inclined set-up".into()
            },
        ],
        vec![
            "flow velocity Vf".into(),
            format!("{:.0} m/s", col.flow_velocity.si()),
            "bisector convention".into(),
        ],
    ];
    out.push_str(&format!(
        "\nresult\n{}",
        table(&["quantity", "value", "note"], &rows)
    ));
    if let (Some(w), Some(c)) = (window, &check) {
        out.push_str(&verdict_lines(
            w,
            col.angle.radians(),
            "from the kinematics",
            c,
        ));
    }
    out.push_str(ASSUMPTIONS_EXPLOSIVE);
    out.push('\n');
    out.push_str("caution: explosives kill: their handling, storage and use are for licensed people under local law\n");
    out.push_str(CAUTION);
    out.push('\n');
    emit(&out)
}
