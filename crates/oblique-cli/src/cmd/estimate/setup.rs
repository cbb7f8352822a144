//! From machine files and flags to a validated process set-up, recording where every value came
//! from (flags win over files).

use super::{BankFlags, ChargeFlags, IntegrationFlags, SheetFlags, TubeFlags};
use crate::common::{load_library, user_dirs};
use crate::fail::{CmdResult, Fail};
use oblique_core::process::{
    BarCoil, CapacitorBank, CompressionCoil, IntegrationOptions, ProcessError, PulseSetup, Sheet,
    SheetSetup, Tube, TubeSetup, Workpiece,
};
use oblique_core::units::{Capacitance, Inductance, Length, Resistance, Voltage};
use oblique_window::machine::{MachineRecord, Machines, Valued};
use oblique_window::{Library, PairWindow};
use std::num::NonZeroU32;
use std::path::PathBuf;

/// The material library and the machine files.
pub struct Ctx {
    /// Materials and pair windows.
    pub lib: Library,
    /// Banks, coils, explosive set-ups.
    pub machines: Machines,
}

/// Load both libraries, printing shadowing warnings on stderr.
pub fn load(dirs: &[PathBuf]) -> CmdResult<Ctx> {
    let lib = load_library(dirs)?;
    let machines = Machines::load(&user_dirs(dirs))?;
    for w in &machines.warnings {
        eprintln!("warning: {w}");
    }
    Ok(Ctx { lib, machines })
}

/// One input value: what it is, its SI value, how to show it, where it came from.
#[derive(Debug, Clone)]
pub struct Input {
    /// Human name.
    pub label: String,
    /// JSON key with the SI unit suffix.
    pub key: String,
    /// SI value (NaN for text inputs).
    pub si: f64,
    /// Human display with unit.
    pub shown: String,
    /// Where it came from.
    pub from: String,
}

/// All inputs of an estimate, in order, and warnings about them.
#[derive(Debug, Clone, Default)]
pub struct Inputs(pub Vec<Input>, pub Vec<String>);

/// Marks an efficiency taken from a calibration on another workpiece.
pub const MISMATCH: &str = "calibrated on another workpiece";

/// The warning printed when a stored efficiency comes from a shot on another workpiece.
pub const MISMATCH_WARNING: &str = "the stored efficiency was fitted on another flyer material or thickness; the coupling depends on both, so calibrate again with this workpiece before relying on it";

/// The warning printed with every estimate whose efficiency was not fitted to a measured shot.
pub const UNCALIBRATED: &str = "efficiency not calibrated (eta = 1): the model has not been anchored to a measured shot on this machine and coil, and lumped models usually overestimate; treat the velocity as an upper estimate and calibrate (oblique calibrate) before relying on it";

impl Inputs {
    /// The warnings about the inputs: an uncalibrated efficiency, one calibrated on another
    /// workpiece, and any recorded with the inputs (large compression, ...).
    pub fn efficiency_warnings(&self) -> Vec<String> {
        let mut w = Vec::new();
        if self.uncalibrated() {
            w.push(UNCALIBRATED.to_string());
        }
        if self.calibration_mismatch() {
            w.push(MISMATCH_WARNING.to_string());
        }
        w.extend(self.1.iter().cloned());
        w
    }

    /// Whether the efficiency comes from a calibration on another workpiece.
    pub fn calibration_mismatch(&self) -> bool {
        self.0
            .iter()
            .any(|i| i.key == "efficiency" && i.from.contains(MISMATCH))
    }

    /// Whether the efficiency is the uncalibrated default.
    pub fn uncalibrated(&self) -> bool {
        self.0
            .iter()
            .any(|i| i.key == "efficiency" && i.from.starts_with("default 1, uncalibrated"))
    }

    /// Record a value.
    pub fn push(&mut self, label: &str, key: &str, si: f64, shown: String, from: String) {
        self.0.push(Input {
            label: label.into(),
            key: key.into(),
            si,
            shown,
            from,
        });
    }

    /// The standoff given by `--standoff` (m).
    pub fn standoff_flag(&mut self, standoff: f64) {
        self.push(
            "standoff",
            "standoff_m",
            standoff,
            fmt::mm(standoff),
            "flag --standoff".into(),
        );
    }
}

/// Human forms of SI values.
pub mod fmt {
    /// Capacitance in uF.
    pub fn uf(v: f64) -> String {
        format!("{} uF", g(v * 1e6))
    }
    /// Voltage in kV.
    pub fn kv(v: f64) -> String {
        format!("{} kV", g(v / 1e3))
    }
    /// Inductance in nH.
    pub fn nh(v: f64) -> String {
        format!("{} nH", g(v * 1e9))
    }
    /// Resistance in mohm.
    pub fn mohm(v: f64) -> String {
        format!("{} mohm", g(v * 1e3))
    }
    /// Length in mm.
    pub fn mm(v: f64) -> String {
        format!("{} mm", g(v * 1e3))
    }
    /// Energy in kJ.
    pub fn kj(v: f64) -> String {
        format!("{} kJ", g(v / 1e3))
    }
    /// A number with up to 4 significant digits, no trailing zeros.
    pub fn g(v: f64) -> String {
        if v == 0.0 || !v.is_finite() {
            return format!("{v}");
        }
        let digits = (3 - v.abs().log10().floor() as i32).clamp(0, 9) as usize;
        let s = format!("{v:.digits$}");
        if s.contains('.') {
            s.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            s
        }
    }
}

fn file_from(rec: &MachineRecord, source: &str) -> String {
    format!("{} ({source})", rec.name)
}

/// Pick a flag value over a file value; record it; error naming the flag when neither exists.
#[allow(clippy::too_many_arguments)]
fn pick<T: Copy>(
    inputs: &mut Inputs,
    label: &str,
    key: &str,
    flag: &str,
    flag_value: Option<f64>,
    file: Option<(&MachineRecord, &Valued<T>)>,
    si: impl Fn(T) -> f64,
    shown: fn(f64) -> String,
    file_hint: &str,
) -> CmdResult<f64> {
    let (v, from) = match (flag_value, file) {
        (Some(v), Some((rec, _))) => (v, format!("flag {flag} (overrides {})", rec.name)),
        (Some(v), None) => (v, format!("flag {flag}")),
        (None, Some((rec, f))) => (si(f.value), file_from(rec, &f.source)),
        (None, None) => {
            return Err(Fail::input(format!(
                "{flag} is required here ({label}): give it, or {file_hint}"
            )))
        }
    };
    inputs.push(label, key, v, shown(v), from);
    Ok(v)
}

/// The bank and where its values came from.
pub struct BankPick {
    /// The bank (rating included when known).
    pub bank: CapacitorBank,
    /// The machine file, if one was named.
    pub record: Option<MachineRecord>,
    /// Where the rating came from, if there is one.
    pub rating_from: Option<String>,
    /// Flags that overrode file values.
    pub overrides: Vec<String>,
}

/// Resolve the bank from `--machine` and the bank flags.
pub fn bank(ctx: &Ctx, f: &BankFlags, inputs: &mut Inputs) -> CmdResult<BankPick> {
    let found = match &f.machine {
        Some(n) => Some(
            ctx.machines
                .bank(n)
                .map_err(|m| Fail::input(format!("--machine: {m}")))?,
        ),
        None => None,
    };
    let hint = "name a bank file with --machine";
    let c = pick(
        inputs,
        "bank capacitance",
        "capacitance_f",
        "--capacitance",
        f.capacitance,
        found.map(|(r, b)| (r, &b.capacitance)),
        Capacitance::si,
        fmt::uf,
        hint,
    )?;
    let rating = match (f.rated_voltage, found) {
        (None, None) => {
            inputs.push(
                "bank rated voltage",
                "rated_voltage_v",
                f64::NAN,
                "unknown".into(),
                "not given: no rating check (give --rated-voltage or --machine)".into(),
            );
            None
        }
        _ => Some(pick(
            inputs,
            "bank rated voltage",
            "rated_voltage_v",
            "--rated-voltage",
            f.rated_voltage,
            found.map(|(r, b)| (r, &b.max_voltage)),
            Voltage::si,
            fmt::kv,
            hint,
        )?),
    };
    let l = pick(
        inputs,
        "bank inductance",
        "bank_inductance_h",
        "--bank-inductance",
        f.bank_inductance,
        found.map(|(r, b)| (r, &b.inductance)),
        Inductance::si,
        fmt::nh,
        "name a bank file with --machine (or derive L from a ring-down record: `oblique calibrate ring-down`)",
    )?;
    let r = pick(
        inputs,
        "bank resistance",
        "bank_resistance_ohm",
        "--bank-resistance",
        f.bank_resistance,
        found.map(|(r, b)| (r, &b.resistance)),
        Resistance::si,
        fmt::mohm,
        "name a bank file with --machine (or derive R from a ring-down record: `oblique calibrate ring-down`)",
    )?;
    let rating_from = rating.and_then(|_| {
        inputs
            .0
            .iter()
            .find(|i| i.key == "rated_voltage_v")
            .map(|i| i.from.clone())
    });
    let mut overrides = Vec::new();
    if found.is_some() {
        for (flag, v) in [
            ("--capacitance", f.capacitance),
            ("--rated-voltage", f.rated_voltage),
            ("--bank-inductance", f.bank_inductance),
            ("--bank-resistance", f.bank_resistance),
        ] {
            if v.is_some() {
                overrides.push(flag.to_string());
            }
        }
    }
    Ok(BankPick {
        bank: CapacitorBank {
            capacitance: Capacitance::from_f(c),
            max_voltage: rating.map(Voltage::from_v),
            inductance: Inductance::from_h(l),
            resistance: Resistance::from_ohm(r),
        },
        record: found.map(|(r, _)| r.clone()),
        rating_from,
        overrides,
    })
}

/// The charging voltage from `--charge-voltage` or `--energy`, checked against the rating.
pub fn charge(b: &BankPick, f: &ChargeFlags, inputs: &mut Inputs) -> CmdResult<Voltage> {
    let (u, flag) = match (f.charge_voltage, f.energy) {
        (Some(u), _) => (u, "--charge-voltage"),
        (None, Some(e)) => ((2.0 * e / b.bank.capacitance.si()).sqrt(), "--energy"),
        (None, None) => {
            return Err(Fail::input(
                "give --charge-voltage (e.g. 8kV) or --energy (e.g. 10kJ)",
            ))
        }
    };
    check_rating(b, u, flag)?;
    inputs.push(
        "charging voltage",
        "charge_voltage_v",
        u,
        fmt::kv(u),
        format!("flag {flag}"),
    );
    Ok(Voltage::from_v(u))
}

/// Refuse a charging voltage above the bank's rating, naming the flag and the rating's origin.
pub fn check_rating(b: &BankPick, u: f64, flag: &str) -> CmdResult {
    if let Some(rating) = b.bank.max_voltage {
        if u > rating.si() * (1.0 + 1e-12) {
            return Err(Fail::input(format!(
                "{flag}: charging voltage {} exceeds the bank's rated voltage {} (from {})\n  hint: stay at or below the rating; the rating protects people and the bank",
                fmt::kv(u),
                fmt::kv(rating.si()),
                b.rating_from.as_deref().unwrap_or("the bank")
            )));
        }
    }
    Ok(())
}

/// The pair window named by `--pair`, if any.
pub fn pair<'a>(ctx: &'a Ctx, name: &Option<String>) -> CmdResult<Option<&'a PairWindow>> {
    match name {
        Some(n) => Ok(Some(
            ctx.lib
                .pair(n)
                .map_err(|m| Fail::input(format!("--pair: {m}")))?,
        )),
        None => Ok(None),
    }
}

/// The flyer material and thickness from flags or the pair window.
fn flyer(
    ctx: &Ctx,
    window: Option<&PairWindow>,
    id: &Option<String>,
    thickness: Option<f64>,
    label: &str,
    inputs: &mut Inputs,
) -> CmdResult<(Workpiece, String, f64)> {
    let (id, id_from) = match (id, window) {
        (Some(id), _) => (id.clone(), "flag --flyer".to_string()),
        (None, Some(w)) => (
            w.flyer.material.id.clone(),
            format!("pair window {}", w.name),
        ),
        (None, None) => {
            return Err(Fail::input(
                "--flyer is required here: give a material id (e.g. aa6061-t6; `oblique material list`) or --pair",
            ))
        }
    };
    if let (Some(w), true) = (window, id_from.starts_with("flag")) {
        if w.flyer.material.id != id {
            eprintln!(
                "warning: --flyer {id} differs from the flyer {} of pair window {}",
                w.flyer.material.id, w.name
            );
        }
    }
    let rec = ctx
        .lib
        .material(&id)
        .map_err(|m| Fail::input(format!("--flyer: {m}")))?;
    let wp = Workpiece::from_material(&rec.material)
        .map_err(|e| Fail::input(format!("--flyer {id}: {e}")))?;
    inputs.0.push(Input {
        label: "flyer material".into(),
        key: "flyer".into(),
        si: f64::NAN,
        shown: id.clone(),
        from: id_from,
    });
    let (h, h_from) = match (thickness, window) {
        (Some(h), _) => (h, "flag --flyer-thickness".to_string()),
        (None, Some(w)) => (w.flyer_thickness.si(), format!("pair window {}", w.name)),
        (None, None) => {
            return Err(Fail::input(
                "--flyer-thickness is required here: give it (e.g. 1mm) or --pair",
            ))
        }
    };
    inputs.push(label, "flyer_thickness_m", h, fmt::mm(h), h_from);
    inputs.push(
        "flyer density",
        "flyer_density_kg_m3",
        wp.density.si(),
        format!("{} kg/m^3", fmt::g(wp.density.si())),
        format!("material {id}"),
    );
    inputs.push(
        "flyer flow stress (yield strength)",
        "flyer_flow_stress_pa",
        wp.flow_stress.si(),
        format!("{} MPa", fmt::g(wp.flow_stress.si() / 1e6)),
        format!("material {id}"),
    );
    inputs.push(
        "flyer electrical conductivity",
        "flyer_conductivity_s_m",
        wp.conductivity.si(),
        format!("{} MS/m", fmt::g(wp.conductivity.si() / 1e6)),
        format!("material {id}"),
    );
    Ok((wp, id, h))
}

/// The parts of a tube set-up other than voltage, standoff and efficiency.
pub struct TubeParts {
    /// Bank.
    pub bank: BankPick,
    /// Coil.
    pub coil: CompressionCoil,
    /// Coil file name, if any.
    pub coil_name: Option<String>,
    /// Tube.
    pub tube: Tube,
    /// Flyer material id.
    pub flyer: String,
}

/// Resolve a tube set-up's parts.
pub fn tube_parts(
    ctx: &Ctx,
    b: &BankFlags,
    t: &TubeFlags,
    window: Option<&PairWindow>,
    inputs: &mut Inputs,
) -> CmdResult<TubeParts> {
    let bank = bank(ctx, b, inputs)?;
    let found = match &t.coil {
        Some(n) => Some(
            ctx.machines
                .compression_coil(n)
                .map_err(|m| Fail::input(format!("--coil: {m}")))?,
        ),
        None => None,
    };
    let hint = "name a compression coil file with --coil";
    let rc = pick(
        inputs,
        "coil bore radius",
        "coil_bore_radius_m",
        "--coil-bore",
        t.coil_bore,
        found.map(|(r, c)| (r, &c.bore_radius)),
        Length::si,
        fmt::mm,
        hint,
    )?;
    let l = pick(
        inputs,
        "coil length",
        "coil_length_m",
        "--coil-length",
        t.coil_length,
        found.map(|(r, c)| (r, &c.length)),
        Length::si,
        fmt::mm,
        hint,
    )?;
    let x = extra_inductance(
        inputs,
        t.coil_inductance,
        found.map(|(r, c)| (r, &c.extra_inductance)),
    )?;
    let (wp, flyer, h) = flyer(
        ctx,
        window,
        &t.flyer,
        t.flyer_thickness,
        "tube wall thickness",
        inputs,
    )?;
    let r0 = t
        .tube_outer_radius
        .ok_or_else(|| Fail::input("--tube-outer-radius is required for mpw-tube (e.g. 20mm)"))?;
    inputs.push(
        "tube outer radius",
        "tube_outer_radius_m",
        r0,
        fmt::mm(r0),
        "flag --tube-outer-radius".into(),
    );
    if rc <= r0 {
        let from = inputs
            .0
            .iter()
            .find(|i| i.key == "coil_bore_radius_m")
            .map_or(String::new(), |i| i.from.clone());
        return Err(Fail::input(format!(
            "--coil-bore: the coil bore radius {} (from {from}) must exceed the tube's outer radius {} (--tube-outer-radius)\n  hint: the tube must fit inside the coil with a gap; --coil-bore is a radius, not a diameter",
            fmt::mm(rc),
            fmt::mm(r0)
        )));
    }
    if h >= r0 {
        return Err(Fail::input(format!(
            "--flyer-thickness: the wall {} must be thinner than the tube's outer radius {} (--tube-outer-radius)",
            fmt::mm(h),
            fmt::mm(r0)
        )));
    }
    Ok(TubeParts {
        bank,
        coil: CompressionCoil {
            bore_radius: Length::from_m(rc),
            length: Length::from_m(l),
            extra_inductance: Inductance::from_h(x),
        },
        coil_name: t.coil.clone(),
        tube: Tube {
            outer_radius: Length::from_m(r0),
            wall_thickness: Length::from_m(h),
            material: wp,
        },
        flyer,
    })
}

fn extra_inductance(
    inputs: &mut Inputs,
    flag: Option<f64>,
    file: Option<(&MachineRecord, &Valued<Inductance>)>,
) -> CmdResult<f64> {
    let (x, from) = match (flag, file) {
        (Some(x), Some((rec, _))) => (
            x,
            format!("flag --coil-inductance (overrides {})", rec.name),
        ),
        (Some(x), None) => (x, "flag --coil-inductance".to_string()),
        (None, Some((rec, v))) => (v.value.si(), file_from(rec, &v.source)),
        (None, None) => (
            0.0,
            "not given: 0 assumed (give --coil-inductance for terminals and leads)".to_string(),
        ),
    };
    inputs.push(
        "coil extra inductance",
        "coil_extra_inductance_h",
        x,
        fmt::nh(x),
        from,
    );
    Ok(x)
}

/// The parts of a sheet set-up other than voltage, standoff and efficiency.
pub struct SheetParts {
    /// Bank.
    pub bank: BankPick,
    /// Coil.
    pub coil: BarCoil,
    /// Coil file name, if any.
    pub coil_name: Option<String>,
    /// Sheet.
    pub sheet: Sheet,
    /// Initial gap.
    pub initial_gap: Length,
    /// Flyer material id.
    pub flyer: String,
}

/// Resolve a sheet set-up's parts.
pub fn sheet_parts(
    ctx: &Ctx,
    b: &BankFlags,
    s: &SheetFlags,
    window: Option<&PairWindow>,
    inputs: &mut Inputs,
) -> CmdResult<SheetParts> {
    let bank = bank(ctx, b, inputs)?;
    let found = match &s.coil {
        Some(n) => Some(
            ctx.machines
                .bar_coil(n)
                .map_err(|m| Fail::input(format!("--coil: {m}")))?,
        ),
        None => None,
    };
    let hint = "name a bar coil file with --coil";
    let l = pick(
        inputs,
        "bar coil length",
        "coil_length_m",
        "--coil-length",
        s.coil_length,
        found.map(|(r, c)| (r, &c.length)),
        Length::si,
        fmt::mm,
        hint,
    )?;
    let w = pick(
        inputs,
        "bar coil width",
        "coil_width_m",
        "--coil-width",
        s.coil_width,
        found.map(|(r, c)| (r, &c.width)),
        Length::si,
        fmt::mm,
        hint,
    )?;
    let x = extra_inductance(
        inputs,
        s.coil_inductance,
        found.map(|(r, c)| (r, &c.extra_inductance)),
    )?;
    let g0 = s.initial_gap.ok_or_else(|| {
        Fail::input("--initial-gap is required for mpw-sheet (coil-to-sheet insulation, e.g. 0.5mm; 0mm allowed)")
    })?;
    inputs.push(
        "initial coil-to-sheet gap",
        "initial_gap_m",
        g0,
        fmt::mm(g0),
        "flag --initial-gap".into(),
    );
    let (wp, flyer, h) = flyer(
        ctx,
        window,
        &s.flyer,
        s.flyer_thickness,
        "sheet thickness",
        inputs,
    )?;
    Ok(SheetParts {
        bank,
        coil: BarCoil {
            length: Length::from_m(l),
            width: Length::from_m(w),
            extra_inductance: Inductance::from_h(x),
        },
        coil_name: s.coil.clone(),
        sheet: Sheet {
            thickness: Length::from_m(h),
            material: wp,
        },
        initial_gap: Length::from_m(g0),
        flyer,
    })
}

/// A tube set-up at a voltage and standoff (not validated).
pub fn tube_setup(p: &TubeParts, u: Voltage, g: f64, eta: f64) -> PulseSetup {
    PulseSetup::Tube(TubeSetup {
        bank: p.bank.bank,
        coil: p.coil,
        tube: p.tube,
        standoff: Length::from_m(g),
        charging_voltage: u,
        efficiency: eta,
    })
}

/// A sheet set-up at a voltage and standoff (not validated).
pub fn sheet_setup(p: &SheetParts, u: Voltage, g: f64, eta: f64) -> PulseSetup {
    PulseSetup::Sheet(SheetSetup {
        bank: p.bank.bank,
        coil: p.coil,
        sheet: p.sheet,
        initial_gap: p.initial_gap,
        standoff: Length::from_m(g),
        charging_voltage: u,
        efficiency: eta,
    })
}

/// Refuse a tube standoff the geometry cannot hold.
pub fn check_tube_standoff(p: &TubeParts, g: f64) -> CmdResult {
    let inner = p.tube.outer_radius.si() - p.tube.wall_thickness.si();
    if g >= inner {
        return Err(Fail::input(format!(
            "--standoff: {} must be smaller than the tube's inner radius {} (the rod needs a positive radius)",
            fmt::mm(g),
            fmt::mm(inner)
        )));
    }
    Ok(())
}

/// A warning when the wall must travel more than a quarter of the tube's outer radius: the thin
/// ring model ignores wall thickening limits, wrinkling and buckling at such compression
/// (common practice: crimp and weld joints use standoffs of a few percent of the radius).
pub fn compression_warning(p: &TubeParts, g: f64, inputs: &mut Inputs) {
    let r = p.tube.outer_radius.si();
    if g > 0.25 * r {
        let w = format!(
            "large radial compression: a standoff of {} is {:.0} % of the tube's outer radius; the thin-ring model ignores wall thickening limits, wrinkling and buckling there",
            fmt::mm(g),
            100.0 * g / r
        );
        if !inputs.1.contains(&w) {
            inputs.1.push(w);
        }
    }
}

/// The efficiency: flag, else the bank's stored calibration for this model and coil, else 1.
pub fn efficiency(
    flag: Option<f64>,
    bank: &BankPick,
    model: &str,
    coil: Option<&str>,
    workpiece: (&str, f64),
    inputs: &mut Inputs,
) -> f64 {
    let (eta, from) = if let Some(e) = flag {
        (e, "flag --efficiency".to_string())
    } else if let Some((rec, c)) = bank
        .record
        .as_ref()
        .and_then(|r| r.calibration_for(model, coil).map(|c| (r, c)))
    {
        let (flyer_now, thickness_now) = workpiece;
        let other_flyer = c.flyer.as_deref().is_some_and(|f| f != flyer_now);
        let other_thickness = c
            .flyer_thickness
            .is_some_and(|t| (t.si() - thickness_now).abs() > 1e-3 * thickness_now);
        let mismatch = if other_flyer || other_thickness {
            format!(
                "; {MISMATCH}: calibrated on {} {}, this estimate is for {flyer_now} {}",
                c.flyer.as_deref().unwrap_or("?"),
                c.flyer_thickness.map_or("?".into(), |t| fmt::mm(t.si())),
                fmt::mm(thickness_now)
            )
        } else {
            String::new()
        };
        (
            c.efficiency,
            format!(
                "calibration stored in {} ({}: {} measured at {}, standoff {}; {}){mismatch}",
                rec.name,
                c.date,
                format_args!("{} m/s", fmt::g(c.measured_velocity.si())),
                fmt::kv(c.charge_voltage.si()),
                fmt::mm(c.standoff.si()),
                c.source
            ),
        )
    } else {
        let note = match &bank.record {
            Some(r) if !r.calibrations.is_empty() => format!(
                "default 1, uncalibrated ({} stores calibrations, none for {model} with coil {})",
                r.name,
                coil.unwrap_or("given by flags")
            ),
            _ => "default 1, uncalibrated".to_string(),
        };
        (1.0, note)
    };
    inputs.push("efficiency eta", "efficiency", eta, fmt::g(eta), from);
    eta
}

/// Integration settings.
pub fn options(f: &IntegrationFlags, history: bool) -> IntegrationOptions {
    IntegrationOptions {
        steps_per_period: f.steps_per_period,
        max_periods: f.max_periods,
        sample_every: if history { Some(NonZeroU32::MIN) } else { None },
    }
}

/// A process error as a message for the user, naming the flags involved where it can.
pub fn process_fail(e: ProcessError) -> Fail {
    let hint = match &e {
        ProcessError::Geometry { what, .. } if what.contains("bore") => {
            "\n  hint: check --coil-bore (a radius) and --tube-outer-radius"
        }
        ProcessError::Geometry { what, .. } if what.contains("standoff") => {
            "\n  hint: check --standoff against the tube's inner radius"
        }
        ProcessError::Geometry { .. } => "\n  hint: check --flyer-thickness and --tube-outer-radius",
        ProcessError::VoltageAboveRating { .. } => {
            "\n  hint: lower --charge-voltage (or --energy) to the rating"
        }
        ProcessError::NotUnderdamped { .. } => {
            "\n  hint: check --bank-resistance and the inductances (--bank-inductance, --coil-inductance)"
        }
        ProcessError::Physics(oblique_core::PhysicsError::OutOfDomain { quantity, .. })
            if quantity.contains("detonation velocity") =>
        {
            "\n  hint: the flyer would outrun the detonation: check --gurney-velocity against --detonation-velocity, and --mass-ratio or --charge-ratio (a larger flyer-to-charge mass ratio slows the flyer)"
        }
        ProcessError::Physics(oblique_core::PhysicsError::OutOfDomain { quantity, .. })
            if quantity.contains("collision angle") =>
        {
            "\n  hint: the resulting collision angle is not below 90 deg: check --preset-angle and the flyer velocity (--gurney-velocity, --mass-ratio)"
        }
        ProcessError::Physics(_) => "",
        _ => "",
    };
    Fail::input(format!("{e}{hint}"))
}
