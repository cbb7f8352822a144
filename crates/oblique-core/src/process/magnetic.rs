//! Lumped, time-integrated models of magnetic pulse welding.
//!
//! One circuit and one moving wall (tube) or sheet, coupled through the position-dependent
//! inductance of the gap between coil and workpiece (`physics-notes.md` §6; the form follows the
//! lumped models of Al-Hassani et al. 1974 and Jablonski & Winkler 1978, cited there from memory):
//!
//! - circuit: d(L(x) I)/dt + R I + q/C = 0, dq/dt = -I, with L(x) = L_fixed + L_gap(x), so
//!   L dI/dt = q/C - R I - I (dL/dx) v;
//! - force on the workpiece from the field energy: F = (1/2) I^2 dL/dx, which for both
//!   geometries equals the magnetic pressure p = B^2 / (2 mu0) times the loaded area;
//! - skin-depth reduction of the push: f_s = 1 - exp(-2 h / delta), delta = sqrt(2 / (w mu0
//!   sigma)), w = 1 / sqrt(L(x) C) the instantaneous undamped angular frequency (from memory,
//!   `physics-notes.md` §6);
//! - calibration factor eta (default 1): the workpiece receives F_w = eta f_s F, and the rest
//!   (1 - eta f_s) F v is booked as a separate loss, "withheld" work;
//! - wall motion: m dv/dt = F_w - F_y(x) while moving (rigid-plastic: at rest until F_w
//!   exceeds F_y), with F_y = 0 for a sheet.
//!
//! **Tube compression** in a single-turn coil (or field-shaper bore) of bore radius r_c and length
//! l around a tube of outer radius r0 and wall h0: r(x) = r0 - x, L_gap = mu0 pi (r_c^2 - r^2)/l,
//! dL/dx = 2 mu0 pi r / l, B = mu0 I / l. The hoop flow stress resists with the pressure
//! sigma_y h / r (thin ring), and the wall thickens as it moves in, h r = h0 r0 (volume of a thin
//! ring of fixed length), so the ring mass m = rho 2 pi r0 h0 l stays constant and the
//! per-area equation rho h dv/dt = p_eff - sigma_y h / r of `physics-notes.md` §6 becomes exactly
//! m dv/dt = F_w - 2 pi l sigma_y h0 r0 / r. Its plastic work, 2 pi l h0 r0 sigma_y ln(r0/r), is the
//! hoop-strain work of the ring (derived here).
//!
//! **Sheet** over a flat one-turn bar coil of length l and width w, initial gap g0:
//! L_gap = mu0 l (g0 + x) / w, dL/dx = mu0 l / w, B = mu0 I / w, m = rho h l w, unresisted.
//!
//! Integration: classical fixed-step fourth-order Runge-Kutta on (q, I, x, v) and three loss
//! integrals, step = damped ring period at x = 0 divided by
//! [`IntegrationOptions::steps_per_period`]. The step that crosses the standoff is re-taken
//! with a shortened step found by the Illinois variant of regula falsi, so impact time and state
//! are those of x = standoff exactly (to 1e-12 relative).
//!
//! Every result is a **screening estimate, not a guarantee**: real coils have end effects and
//! field leakage, real workpieces bend, neck and heat, and the bank can kill.

use super::circuit::CapacitorBank;
use super::{check_non_negative, check_positive, ProcessError, MU0};
use crate::error::PhysicsError;
use crate::material::Material;
use crate::units::{
    Current, Density, ElectricalConductivity, Energy, Frequency, Inductance, Length, MagneticField,
    Pressure, Resistance, Time, Velocity, Voltage,
};
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;
use std::fmt;
use std::num::NonZeroU32;

/// The default efficiency factor eta: the model as derived, uncalibrated.
pub const DEFAULT_EFFICIENCY: f64 = 1.0;

/// The workpiece (tube or sheet) material as these models need it.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Workpiece {
    /// Density rho.
    pub density: Density,
    /// Flow stress sigma_y resisting hoop compression of a tube (ignored for sheets, may be 0).
    /// The quasi-static yield strength underestimates the flow stress at these strain rates;
    /// the efficiency calibration absorbs part of that.
    pub flow_stress: Pressure,
    /// Electrical conductivity sigma (for the skin depth).
    pub conductivity: ElectricalConductivity,
}

impl Workpiece {
    /// A validated workpiece material.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] (wrapped) for a density or conductivity not finite and
    /// positive, or a flow stress negative or not finite.
    pub fn new(
        density: Density,
        flow_stress: Pressure,
        conductivity: ElectricalConductivity,
    ) -> Result<Self, ProcessError> {
        let w = Self {
            density,
            flow_stress,
            conductivity,
        };
        w.validate()?;
        Ok(w)
    }

    /// From a library material: its density, its 0.2 % yield strength as flow stress, and its
    /// electrical conductivity.
    ///
    /// # Errors
    /// As [`Workpiece::new`].
    pub fn from_material(material: &Material) -> Result<Self, ProcessError> {
        Self::new(
            material.density(),
            material.yield_strength,
            material.electrical_conductivity,
        )
    }

    /// Check every field.
    ///
    /// # Errors
    /// As [`Workpiece::new`].
    pub fn validate(&self) -> Result<(), ProcessError> {
        check_positive("workpiece density", self.density.si(), "kg/m^3")?;
        check_non_negative("workpiece flow stress", self.flow_stress.si(), "Pa")?;
        check_positive(
            "workpiece electrical conductivity",
            self.conductivity.si(),
            "S/m",
        )?;
        Ok(())
    }
}

/// A single-turn compression coil, or the working bore of a field shaper treated as one.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct CompressionCoil {
    /// Bore radius r_c (inner radius of the turn or of the field-shaper bore).
    pub bore_radius: Length,
    /// Axial length l of the working zone (the length of tube that is driven).
    pub length: Length,
    /// Fixed inductance in series outside the working gap: coil terminals, leads, field-shaper
    /// leakage. Added to the bank's inductance. May be zero.
    pub extra_inductance: Inductance,
}

/// The tube being compressed.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Tube {
    /// Outer radius r0.
    pub outer_radius: Length,
    /// Wall thickness h0.
    pub wall_thickness: Length,
    /// Material.
    pub material: Workpiece,
}

/// Tube compression onto a rod (or inner tube): bank, coil, tube, standoff and shot settings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct TubeSetup {
    /// The capacitor bank.
    pub bank: CapacitorBank,
    /// The coil or field-shaper bore.
    pub coil: CompressionCoil,
    /// The tube (flyer).
    pub tube: Tube,
    /// Radial gap g between the tube's inner surface and the rod: the wall travels g to impact.
    pub standoff: Length,
    /// Charging voltage U0.
    pub charging_voltage: Voltage,
    /// Efficiency factor eta in (0, 1] multiplying the pressure that reaches the wall (default
    /// [`DEFAULT_EFFICIENCY`]; fitted by [`crate::process::calibrate_efficiency`]).
    pub efficiency: f64,
}

/// A flat one-turn bar coil under a sheet.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct BarCoil {
    /// Length l of the bar (along the current).
    pub length: Length,
    /// Width w of the bar (the driven sheet strip is l x w).
    pub width: Length,
    /// Fixed inductance in series outside the working gap (return conductor, leads). May be 0.
    pub extra_inductance: Inductance,
}

/// The sheet being driven.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Sheet {
    /// Thickness h.
    pub thickness: Length,
    /// Material (its flow stress is not used: the sheet is unresisted).
    pub material: Workpiece,
}

/// A sheet driven off a flat bar coil onto a parent plate.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct SheetSetup {
    /// The capacitor bank.
    pub bank: CapacitorBank,
    /// The bar coil.
    pub coil: BarCoil,
    /// The sheet (flyer).
    pub sheet: Sheet,
    /// Initial gap g0 between coil surface and sheet (insulation); may be zero.
    pub initial_gap: Length,
    /// Distance the sheet travels to the parent plate.
    pub standoff: Length,
    /// Charging voltage U0.
    pub charging_voltage: Voltage,
    /// Efficiency factor eta in (0, 1] (see [`TubeSetup::efficiency`]).
    pub efficiency: f64,
}

/// Either magnetic pulse set-up.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum PulseSetup {
    /// Tube compression.
    Tube(TubeSetup),
    /// Sheet on a flat bar coil.
    Sheet(SheetSetup),
}

fn geometry(what: &'static str, detail: String) -> ProcessError {
    ProcessError::Geometry { what, detail }
}

fn check_efficiency(eta: f64) -> Result<f64, ProcessError> {
    if eta.is_finite() && eta > 0.0 && eta <= 1.0 {
        Ok(eta)
    } else {
        Err(PhysicsError::OutOfDomain {
            quantity: "efficiency factor eta",
            value: eta,
            unit: "",
            allowed: "(0, 1]",
        }
        .into())
    }
}

impl TubeSetup {
    /// A validated tube set-up with efficiency 1.
    ///
    /// # Errors
    /// As [`TubeSetup::validate`].
    pub fn new(
        bank: CapacitorBank,
        coil: CompressionCoil,
        tube: Tube,
        standoff: Length,
        charging_voltage: Voltage,
    ) -> Result<Self, ProcessError> {
        let s = Self {
            bank,
            coil,
            tube,
            standoff,
            charging_voltage,
            efficiency: DEFAULT_EFFICIENCY,
        };
        s.validate()?;
        Ok(s)
    }

    /// Check every input and the geometry: coil bore > tube outer radius, wall thickness <
    /// outer radius, 0 < standoff < inner radius (the rod keeps a positive radius), charging
    /// voltage within the rating, eta in (0, 1], and an underdamped circuit at rest.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] (wrapped), [`ProcessError::Geometry`],
    /// [`ProcessError::VoltageAboveRating`] or [`ProcessError::NotUnderdamped`].
    pub fn validate(&self) -> Result<(), ProcessError> {
        self.bank.check_voltage(self.charging_voltage)?;
        let rc = check_positive("coil bore radius", self.coil.bore_radius.si(), "m")?;
        check_positive("coil length", self.coil.length.si(), "m")?;
        check_non_negative(
            "coil extra inductance",
            self.coil.extra_inductance.si(),
            "H",
        )?;
        let r0 = check_positive("tube outer radius", self.tube.outer_radius.si(), "m")?;
        let h = check_positive("tube wall thickness", self.tube.wall_thickness.si(), "m")?;
        self.tube.material.validate()?;
        let g = check_positive("standoff", self.standoff.si(), "m")?;
        check_efficiency(self.efficiency)?;
        if rc <= r0 {
            return Err(geometry(
                "the coil bore radius must exceed the tube's outer radius",
                format!("bore radius {rc} m, tube outer radius {r0} m"),
            ));
        }
        if h >= r0 {
            return Err(geometry(
                "the wall thickness must be smaller than the tube's outer radius",
                format!("wall {h} m, outer radius {r0} m"),
            ));
        }
        if g >= r0 - h {
            return Err(geometry(
                "the standoff must be smaller than the tube's inner radius (the rod needs a \
                 positive radius)",
                format!("standoff {g} m, inner radius {} m", r0 - h),
            ));
        }
        Plant::tube(self)?;
        Ok(())
    }

    /// Stored energy at the charging voltage, C U0^2 / 2.
    ///
    /// # Errors
    /// As [`CapacitorBank::stored_energy`].
    pub fn stored_energy(&self) -> Result<Energy, ProcessError> {
        self.bank.stored_energy(self.charging_voltage)
    }

    /// Gap inductance at rest, mu0 pi (r_c^2 - r0^2) / l (`physics-notes.md` §6, from memory).
    pub fn gap_inductance(&self) -> Inductance {
        let rc = self.coil.bore_radius.si();
        let r0 = self.tube.outer_radius.si();
        Inductance::from_h(MU0 * PI * (rc * rc - r0 * r0) / self.coil.length.si())
    }
}

impl SheetSetup {
    /// A validated sheet set-up with efficiency 1.
    ///
    /// # Errors
    /// As [`SheetSetup::validate`].
    pub fn new(
        bank: CapacitorBank,
        coil: BarCoil,
        sheet: Sheet,
        initial_gap: Length,
        standoff: Length,
        charging_voltage: Voltage,
    ) -> Result<Self, ProcessError> {
        let s = Self {
            bank,
            coil,
            sheet,
            initial_gap,
            standoff,
            charging_voltage,
            efficiency: DEFAULT_EFFICIENCY,
        };
        s.validate()?;
        Ok(s)
    }

    /// Check every input: positive coil length and width, sheet thickness and standoff;
    /// non-negative initial gap and extra inductance; voltage within the rating; eta in (0, 1];
    /// an underdamped circuit at rest.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] (wrapped), [`ProcessError::VoltageAboveRating`] or
    /// [`ProcessError::NotUnderdamped`].
    pub fn validate(&self) -> Result<(), ProcessError> {
        self.bank.check_voltage(self.charging_voltage)?;
        check_positive("bar coil length", self.coil.length.si(), "m")?;
        check_positive("bar coil width", self.coil.width.si(), "m")?;
        check_non_negative(
            "coil extra inductance",
            self.coil.extra_inductance.si(),
            "H",
        )?;
        check_positive("sheet thickness", self.sheet.thickness.si(), "m")?;
        self.sheet.material.validate()?;
        check_non_negative("initial coil-to-sheet gap", self.initial_gap.si(), "m")?;
        check_positive("standoff", self.standoff.si(), "m")?;
        check_efficiency(self.efficiency)?;
        Plant::sheet(self)?;
        Ok(())
    }

    /// Stored energy at the charging voltage, C U0^2 / 2.
    ///
    /// # Errors
    /// As [`CapacitorBank::stored_energy`].
    pub fn stored_energy(&self) -> Result<Energy, ProcessError> {
        self.bank.stored_energy(self.charging_voltage)
    }

    /// Gap inductance at rest, mu0 l g0 / w (`physics-notes.md` §6, from memory).
    pub fn gap_inductance(&self) -> Inductance {
        Inductance::from_h(
            MU0 * self.coil.length.si() * self.initial_gap.si() / self.coil.width.si(),
        )
    }
}

impl PulseSetup {
    /// Check every input (see [`TubeSetup::validate`], [`SheetSetup::validate`]).
    ///
    /// # Errors
    /// As those.
    pub fn validate(&self) -> Result<(), ProcessError> {
        match self {
            PulseSetup::Tube(s) => s.validate(),
            PulseSetup::Sheet(s) => s.validate(),
        }
    }

    /// The bank.
    pub fn bank(&self) -> &CapacitorBank {
        match self {
            PulseSetup::Tube(s) => &s.bank,
            PulseSetup::Sheet(s) => &s.bank,
        }
    }

    /// The charging voltage.
    pub fn charging_voltage(&self) -> Voltage {
        match self {
            PulseSetup::Tube(s) => s.charging_voltage,
            PulseSetup::Sheet(s) => s.charging_voltage,
        }
    }

    /// The standoff.
    pub fn standoff(&self) -> Length {
        match self {
            PulseSetup::Tube(s) => s.standoff,
            PulseSetup::Sheet(s) => s.standoff,
        }
    }

    /// The efficiency factor eta.
    pub fn efficiency(&self) -> f64 {
        match self {
            PulseSetup::Tube(s) => s.efficiency,
            PulseSetup::Sheet(s) => s.efficiency,
        }
    }

    /// The same set-up at another charging voltage (not validated here).
    pub fn with_charging_voltage(&self, voltage: Voltage) -> Self {
        let mut s = *self;
        match &mut s {
            PulseSetup::Tube(t) => t.charging_voltage = voltage,
            PulseSetup::Sheet(t) => t.charging_voltage = voltage,
        }
        s
    }

    /// The same set-up at another standoff (not validated here).
    pub fn with_standoff(&self, standoff: Length) -> Self {
        let mut s = *self;
        match &mut s {
            PulseSetup::Tube(t) => t.standoff = standoff,
            PulseSetup::Sheet(t) => t.standoff = standoff,
        }
        s
    }

    /// The same set-up with another efficiency factor (not validated here).
    pub fn with_efficiency(&self, efficiency: f64) -> Self {
        let mut s = *self;
        match &mut s {
            PulseSetup::Tube(t) => t.efficiency = efficiency,
            PulseSetup::Sheet(t) => t.efficiency = efficiency,
        }
        s
    }

    /// The workpiece thickness at rest.
    fn thickness(&self) -> Length {
        match self {
            PulseSetup::Tube(s) => s.tube.wall_thickness,
            PulseSetup::Sheet(s) => s.sheet.thickness,
        }
    }
}

/// Settings of the time integration.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct IntegrationOptions {
    /// RK4 steps per damped ring period of the circuit at rest (at least 50).
    pub steps_per_period: u32,
    /// Length of the time window, in damped ring periods at rest; no impact inside it is
    /// reported as [`ImpactOutcome::NoImpact`].
    pub max_periods: f64,
    /// Record a history sample every this many steps (plus the first and last state); `None`
    /// records nothing (faster, used by the sweeps).
    pub sample_every: Option<NonZeroU32>,
}

impl Default for IntegrationOptions {
    /// 400 steps per period, a window of 3 periods, a sample at every step.
    fn default() -> Self {
        Self {
            steps_per_period: 400,
            max_periods: 3.0,
            sample_every: Some(NonZeroU32::MIN),
        }
    }
}

impl IntegrationOptions {
    /// Check the settings: 50 <= steps_per_period <= 1e6, 0 < max_periods <= 1000.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] (wrapped).
    pub fn validate(&self) -> Result<(), ProcessError> {
        if !(50..=1_000_000).contains(&self.steps_per_period) {
            return Err(PhysicsError::OutOfDomain {
                quantity: "steps per period",
                value: f64::from(self.steps_per_period),
                unit: "",
                allowed: "[50, 1e6]",
            }
            .into());
        }
        if !(self.max_periods.is_finite() && self.max_periods > 0.0 && self.max_periods <= 1000.0) {
            return Err(PhysicsError::OutOfDomain {
                quantity: "time window in periods",
                value: self.max_periods,
                unit: "",
                allowed: "(0, 1000]",
            }
            .into());
        }
        Ok(())
    }
}

/// Why the workpiece did not reach the parent.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum NoImpactReason {
    /// The effective pressure never exceeded the flow-stress resistance: the wall never moved.
    NeverMoved,
    /// The wall moved, then came to rest short of the parent.
    Stopped,
    /// Still moving when the time window ended (raise the window, or the standoff is long).
    StillMovingAtWindowEnd,
}

impl fmt::Display for NoImpactReason {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            NoImpactReason::NeverMoved => "the workpiece never started to move",
            NoImpactReason::Stopped => "the workpiece stopped short of the parent",
            NoImpactReason::StillMovingAtWindowEnd => {
                "the workpiece was still in flight when the time window ended"
            }
        })
    }
}

/// What happened at one standoff.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum ImpactOutcome {
    /// The workpiece reached the parent.
    Impact {
        /// Time of impact after the switch closed.
        time: Time,
        /// Impact velocity Vp (normal to the workpiece surface).
        velocity: Velocity,
        /// The current had already changed sign once (impact after the first half-wave).
        after_first_half_wave: bool,
    },
    /// It did not.
    NoImpact {
        /// Why.
        reason: NoImpactReason,
        /// Distance travelled by the end of the integration.
        travel: Length,
        /// Velocity at the end of the integration.
        velocity: Velocity,
        /// End of the integration: the end of the window, or the moment the workpiece was at
        /// rest and the energy left in the circuit could provably no longer move it.
        end_time: Time,
    },
}

impl ImpactOutcome {
    /// The impact velocity, if there was an impact.
    pub fn impact_velocity(&self) -> Option<Velocity> {
        match self {
            ImpactOutcome::Impact { velocity, .. } => Some(*velocity),
            ImpactOutcome::NoImpact { .. } => None,
        }
    }
}

/// Something the user should look at; the estimate is still returned.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum ProcessWarning {
    /// Impact came after the first current zero (common practice is to impact within the first
    /// half-wave, `physics-notes.md` §6): the field has already reversed and the pressure has
    /// passed through zero; shorten the standoff or raise the energy.
    ImpactAfterFirstHalfWave {
        /// Impact time.
        impact_time: Time,
        /// Time of the first current zero.
        first_current_zero: Time,
    },
    /// The skin depth at the initial ring frequency exceeds the workpiece thickness: much of
    /// the field diffuses through, the push is weak and the result sensitive to the skin-depth
    /// law; use a driver sheet of a good conductor (copper, aluminium) or a higher frequency.
    SkinDepthExceedsThickness {
        /// Skin depth at the initial ring frequency.
        skin_depth: Length,
        /// Workpiece thickness.
        thickness: Length,
    },
    /// The energy balance did not close to 1 % (a numerical problem: raise the steps per
    /// period).
    EnergyBalanceOpen {
        /// |E0 - sum of terms| / E0.
        relative_error: f64,
    },
}

impl fmt::Display for ProcessWarning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ProcessWarning::ImpactAfterFirstHalfWave {
                impact_time,
                first_current_zero,
            } => write!(
                f,
                "impact at {:.2} us comes after the first current zero at {:.2} us: aim for \
                 impact within the first half-wave",
                impact_time.si() * 1e6,
                first_current_zero.si() * 1e6
            ),
            ProcessWarning::SkinDepthExceedsThickness {
                skin_depth,
                thickness,
            } => write!(
                f,
                "skin depth {:.3} mm exceeds the workpiece thickness {:.3} mm: consider a driver \
                 sheet of a good conductor",
                skin_depth.mm(),
                thickness.mm()
            ),
            ProcessWarning::EnergyBalanceOpen { relative_error } => write!(
                f,
                "energy balance open by {:.2} %: raise the steps per period",
                relative_error * 100.0
            ),
        }
    }
}

/// Where the stored energy went, at the end of the integration (impact, or the end of the
/// window). stored = capacitor + field + resistive + kinetic + plastic + withheld, to within
/// `relative_error`.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct EnergyBalance {
    /// Initially stored, C U0^2 / 2.
    pub stored: Energy,
    /// Left in the capacitor, q^2 / (2C).
    pub capacitor: Energy,
    /// Left in the magnetic field, L(x) I^2 / 2.
    pub field: Energy,
    /// Dissipated in R, integral of R I^2 dt.
    pub resistive: Energy,
    /// Kinetic energy of the workpiece, m v^2 / 2.
    pub kinetic: Energy,
    /// Plastic work against the flow stress (tube only).
    pub plastic: Energy,
    /// Work of the field withheld from the workpiece by the skin-depth factor and eta,
    /// integral of (1 - eta f_s) F v dt.
    pub withheld: Energy,
    /// |stored - sum of the other terms| / stored.
    pub relative_error: f64,
}

/// One sample of the time history.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct PulseSample {
    /// Time after the switch closed.
    pub time: Time,
    /// Circuit current.
    pub current: Current,
    /// Field in the gap, mu0 |I| / l (tube) or mu0 |I| / w (sheet).
    pub field: MagneticField,
    /// Magnetic pressure B^2 / (2 mu0), before the skin-depth factor and eta.
    pub magnetic_pressure: Pressure,
    /// Pressure that reaches the workpiece, eta f_s B^2 / (2 mu0).
    pub effective_pressure: Pressure,
    /// Distance travelled x.
    pub travel: Length,
    /// Workpiece velocity v.
    pub velocity: Velocity,
    /// Circuit inductance L(x).
    pub inductance: Inductance,
}

/// The result of one magnetic pulse estimate. A screening estimate, not a guarantee.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PulseEstimate {
    /// Impact, or why not.
    pub outcome: ImpactOutcome,
    /// Stored energy C U0^2 / 2.
    pub stored_energy: Energy,
    /// Circuit inductance at rest, L_fixed + L_gap(0).
    pub initial_inductance: Inductance,
    /// Damped ring frequency at rest.
    pub ring_frequency: Frequency,
    /// Skin depth in the workpiece at the initial undamped angular frequency.
    pub skin_depth: Length,
    /// Skin-depth factor 1 - exp(-2h/delta) at rest.
    pub skin_factor: f64,
    /// Largest |I| up to the end of the integration.
    pub peak_current: Current,
    /// Largest field in the gap.
    pub peak_field: MagneticField,
    /// Largest magnetic pressure B^2/(2 mu0).
    pub peak_pressure: Pressure,
    /// Largest pressure reaching the workpiece, eta f_s B^2/(2 mu0).
    pub peak_effective_pressure: Pressure,
    /// Time of the first current zero, if it came before the end of the integration.
    pub first_current_zero: Option<Time>,
    /// Energy bookkeeping at the end of the integration.
    pub energy: EnergyBalance,
    /// Warnings.
    pub warnings: Vec<ProcessWarning>,
    /// Sampled history (empty when sampling was off).
    pub history: Vec<PulseSample>,
}

impl PulseEstimate {
    /// The impact velocity, if there was an impact.
    pub fn impact_velocity(&self) -> Option<Velocity> {
        self.outcome.impact_velocity()
    }

    /// Velocity against travelled distance, from the history (empty without one). For exact
    /// values at chosen distances use [`crate::process::velocity_against_distance`].
    pub fn velocity_against_travel(&self) -> Vec<(Length, Velocity)> {
        self.history
            .iter()
            .map(|s| (s.travel, s.velocity))
            .collect()
    }
}

mod integrator;
pub(crate) use integrator::{run, Plant};

/// Estimate one magnetic pulse shot: integrate the coupled circuit and workpiece from the
/// closing of the switch to impact at the set-up's standoff (or to the end of the window),
/// with histories, peaks, the energy balance and warnings (module documentation for the
/// equations and sources).
///
/// This is a **screening estimate, not a guarantee**: the lumped one-dimensional model ignores
/// coil end effects, field leakage, bending and heating of the workpiece and rate effects on
/// the flow stress; calibrate it on a measured shot ([`crate::process::calibrate_efficiency`])
/// before trusting its numbers, and never use it to decide whether a set-up is safe to fire.
///
/// # Errors
/// Any validation error of the set-up or options; [`ProcessError::NonFinite`] if the
/// integration breaks down.
pub fn estimate(
    setup: &PulseSetup,
    options: &IntegrationOptions,
) -> Result<PulseEstimate, ProcessError> {
    options.validate()?;
    let plant = Plant::from_setup(setup)?;
    let target = setup.standoff().si();
    let run = run(&plant, &[target], options)?;
    let outcome = run
        .outcomes
        .first()
        .copied()
        .ok_or(ProcessError::NoConvergence {
            what: "magnetic pulse integration",
            iterations: 0,
        })?;
    let l0 = plant.inductance(0.0);
    let skin_depth = plant.skin_depth(l0);
    let thickness = setup.thickness();
    let energy = plant.energy_balance(&run.final_state);

    let mut warnings = Vec::new();
    if let ImpactOutcome::Impact {
        time,
        after_first_half_wave: true,
        ..
    } = outcome
    {
        if let Some(z) = run.first_zero {
            warnings.push(ProcessWarning::ImpactAfterFirstHalfWave {
                impact_time: time,
                first_current_zero: Time::from_s(z),
            });
        }
    }
    if skin_depth > thickness.si() {
        warnings.push(ProcessWarning::SkinDepthExceedsThickness {
            skin_depth: Length::from_m(skin_depth),
            thickness,
        });
    }
    if energy.relative_error > 0.01 {
        warnings.push(ProcessWarning::EnergyBalanceOpen {
            relative_error: energy.relative_error,
        });
    }
    let peak_b = plant.b_per_amp * run.peak_current;
    Ok(PulseEstimate {
        outcome,
        stored_energy: energy.stored,
        initial_inductance: Inductance::from_h(l0),
        ring_frequency: Frequency::from_hz(plant.ring_omega() / (2.0 * PI)),
        skin_depth: Length::from_m(skin_depth),
        skin_factor: plant.skin_factor(l0, 0.0),
        peak_current: Current::from_a(run.peak_current),
        peak_field: MagneticField::from_t(peak_b),
        peak_pressure: Pressure::from_pa(peak_b * peak_b / (2.0 * MU0)),
        peak_effective_pressure: Pressure::from_pa(run.peak_effective_pressure),
        first_current_zero: run.first_zero.map(Time::from_s),
        energy,
        warnings,
        history: run.history,
    })
}

impl TubeSetup {
    /// [`estimate`] for this set-up. A screening estimate, not a guarantee.
    ///
    /// # Errors
    /// As [`estimate`].
    pub fn estimate(&self, options: &IntegrationOptions) -> Result<PulseEstimate, ProcessError> {
        estimate(&PulseSetup::Tube(*self), options)
    }
}

impl SheetSetup {
    /// [`estimate`] for this set-up. A screening estimate, not a guarantee.
    ///
    /// # Errors
    /// As [`estimate`].
    pub fn estimate(&self, options: &IntegrationOptions) -> Result<PulseEstimate, ProcessError> {
        estimate(&PulseSetup::Sheet(*self), options)
    }
}

#[cfg(test)]
pub(crate) mod tests;
