//! The capacitor bank and the series RLC discharge with a fixed load.
//!
//! A bank of capacitance C charged to U0 stores E0 = C U0^2 / 2. Discharged into a fixed series
//! inductance L and resistance R, the current obeys L dI/dt + R I + q/C = 0 with dq/dt = -I,
//! I(0) = 0, q(0) = C U0, whose closed form (elementary circuit theory; `physics-notes.md` §6) is,
//! with a = R / (2L) and w0^2 = 1/(LC):
//!
//! - underdamped (a < w0), w^2 = w0^2 - a^2: I(t) = U0 / (w L) e^(-a t) sin(w t);
//! - critically damped (a = w0): I(t) = (U0 / L) t e^(-a t);
//! - overdamped (a > w0), s^2 = a^2 - w0^2: I(t) = U0 / (s L) e^(-a t) sinh(s t).
//!
//! Every number here is a **screening estimate, not a guarantee**: a real bank has switch,
//! cable and connection losses that vary from shot to shot, and its stored energy can kill.

use super::{check_non_negative, check_positive, ProcessError};
use crate::error::PhysicsError;
use crate::units::{
    Capacitance, Current, Energy, Frequency, Inductance, Resistance, Time, Voltage,
};
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// A capacitor bank: capacitance, optional voltage rating, and its own (internal plus cable)
/// series inductance and resistance.
///
/// Fields are public for configuration files; every function that uses a bank validates it
/// again, so a bank built by hand cannot smuggle an unphysical value into an estimate.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct CapacitorBank {
    /// Total capacitance C.
    pub capacitance: Capacitance,
    /// Rated (maximum) charging voltage, if known. Charging above it is refused.
    pub max_voltage: Option<Voltage>,
    /// Series inductance of the bank, switch and cables, without the coil.
    pub inductance: Inductance,
    /// Series resistance of the whole discharge loop (may be zero for an ideal check).
    pub resistance: Resistance,
}

impl CapacitorBank {
    /// A validated bank.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] (wrapped) for a capacitance, inductance or rating that is
    /// not finite and positive, or a resistance that is negative or not finite.
    pub fn new(
        capacitance: Capacitance,
        max_voltage: Option<Voltage>,
        inductance: Inductance,
        resistance: Resistance,
    ) -> Result<Self, ProcessError> {
        let bank = Self {
            capacitance,
            max_voltage,
            inductance,
            resistance,
        };
        bank.validate()?;
        Ok(bank)
    }

    /// Check every field.
    ///
    /// # Errors
    /// As [`CapacitorBank::new`].
    pub fn validate(&self) -> Result<(), ProcessError> {
        check_positive("bank capacitance", self.capacitance.si(), "F")?;
        check_positive("bank inductance", self.inductance.si(), "H")?;
        check_non_negative("bank resistance", self.resistance.si(), "ohm")?;
        if let Some(u) = self.max_voltage {
            check_positive("bank rated voltage", u.si(), "V")?;
        }
        Ok(())
    }

    /// Check a charging voltage: finite, positive, and not above the rating when one is given.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] (wrapped) or [`ProcessError::VoltageAboveRating`].
    pub fn check_voltage(&self, charging_voltage: Voltage) -> Result<Voltage, ProcessError> {
        self.validate()?;
        let u0 = check_positive("charging voltage", charging_voltage.si(), "V")?;
        if let Some(rating) = self.max_voltage {
            if u0 > rating.si() {
                return Err(ProcessError::VoltageAboveRating {
                    voltage: charging_voltage,
                    rating,
                });
            }
        }
        Ok(charging_voltage)
    }

    /// Stored energy E0 = C U0^2 / 2 (elementary; `physics-notes.md` §6).
    ///
    /// # Errors
    /// As [`CapacitorBank::check_voltage`].
    pub fn stored_energy(&self, charging_voltage: Voltage) -> Result<Energy, ProcessError> {
        let u0 = self.check_voltage(charging_voltage)?.si();
        Ok(Energy::from_j(0.5 * self.capacitance.si() * u0 * u0))
    }

    /// The charging voltage that stores `energy`: U0 = sqrt(2 E0 / C) (inverse of
    /// [`CapacitorBank::stored_energy`]).
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] (wrapped) for a non-positive energy, or
    /// [`ProcessError::VoltageAboveRating`] when that voltage exceeds the rating.
    pub fn voltage_for_energy(&self, energy: Energy) -> Result<Voltage, ProcessError> {
        self.validate()?;
        let e = check_positive("stored energy", energy.si(), "J")?;
        self.check_voltage(Voltage::from_v((2.0 * e / self.capacitance.si()).sqrt()))
    }

    /// The discharge circuit with a fixed load inductance in series (coil, leads; zero for a
    /// short-circuit ring-down).
    ///
    /// # Errors
    /// As [`CapacitorBank::validate`], or a negative load inductance.
    pub fn circuit(&self, load_inductance: Inductance) -> Result<RlcCircuit, ProcessError> {
        self.validate()?;
        let extra = check_non_negative("load inductance", load_inductance.si(), "H")?;
        RlcCircuit::new(
            self.capacitance,
            Inductance::from_h(self.inductance.si() + extra),
            self.resistance,
        )
    }
}

/// How a series RLC circuit discharges.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Damping {
    /// R < 2 sqrt(L/C): the current rings.
    Underdamped,
    /// R = 2 sqrt(L/C) to within a relative 1e-12 on the discriminant.
    Critical,
    /// R > 2 sqrt(L/C): the current rises and decays without changing sign.
    Overdamped,
}

/// A validated series RLC circuit with fixed elements (see the module documentation for the
/// closed forms).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct RlcCircuit {
    capacitance: Capacitance,
    inductance: Inductance,
    resistance: Resistance,
}

/// Relative size of the discriminant w0^2 - a^2 below which the circuit counts as critical.
const CRITICAL_TOLERANCE: f64 = 1e-12;

impl RlcCircuit {
    /// A validated circuit.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] (wrapped) for C or L not finite and positive, or R negative
    /// or not finite.
    pub fn new(
        capacitance: Capacitance,
        inductance: Inductance,
        resistance: Resistance,
    ) -> Result<Self, ProcessError> {
        check_positive("capacitance", capacitance.si(), "F")?;
        check_positive("inductance", inductance.si(), "H")?;
        check_non_negative("resistance", resistance.si(), "ohm")?;
        Ok(Self {
            capacitance,
            inductance,
            resistance,
        })
    }

    /// Capacitance C.
    pub fn capacitance(&self) -> Capacitance {
        self.capacitance
    }
    /// Inductance L.
    pub fn inductance(&self) -> Inductance {
        self.inductance
    }
    /// Resistance R.
    pub fn resistance(&self) -> Resistance {
        self.resistance
    }

    /// a = R / (2 L), in 1/s.
    fn a(&self) -> f64 {
        self.resistance.si() / (2.0 * self.inductance.si())
    }
    /// w0^2 = 1 / (L C), in 1/s^2.
    fn w0_sq(&self) -> f64 {
        1.0 / (self.inductance.si() * self.capacitance.si())
    }
    /// w0^2 - a^2.
    fn discriminant(&self) -> f64 {
        let a = self.a();
        self.w0_sq() - a * a
    }

    /// The damping regime.
    pub fn damping(&self) -> Damping {
        let d = self.discriminant();
        if d.abs() <= CRITICAL_TOLERANCE * self.w0_sq() {
            Damping::Critical
        } else if d > 0.0 {
            Damping::Underdamped
        } else {
            Damping::Overdamped
        }
    }

    /// Critical resistance 2 sqrt(L / C).
    pub fn critical_resistance(&self) -> Resistance {
        Resistance::from_ohm(2.0 * (self.inductance.si() / self.capacitance.si()).sqrt())
    }

    /// Undamped natural frequency f0 = 1 / (2 pi sqrt(L C)).
    pub fn undamped_frequency(&self) -> Frequency {
        Frequency::from_hz(self.w0_sq().sqrt() / (2.0 * PI))
    }

    /// Damped ring frequency f = w / (2 pi), w^2 = 1/(LC) - (R/2L)^2; `None` unless
    /// underdamped.
    pub fn ring_frequency(&self) -> Option<Frequency> {
        match self.damping() {
            Damping::Underdamped => {
                Some(Frequency::from_hz(self.discriminant().sqrt() / (2.0 * PI)))
            }
            _ => None,
        }
    }

    /// Damped ring period T = 1 / f; `None` unless underdamped.
    pub fn ring_period(&self) -> Option<Time> {
        self.ring_frequency().map(|f| Time::from_s(1.0 / f.si()))
    }

    /// Amplitude decay time 1/a = 2 L / R; `None` for R = 0.
    pub fn decay_time(&self) -> Option<Time> {
        let a = self.a();
        (a > 0.0).then(|| Time::from_s(1.0 / a))
    }

    /// Ratio I1/I2 of two successive same-sign current peaks one ring period apart:
    /// e^(a T) (exact for the underdamped closed form: the peaks sit where tan(w t) = w / a,
    /// exactly one period apart). `None` unless underdamped.
    pub fn same_sign_peak_ratio(&self) -> Option<f64> {
        self.ring_period().map(|t| (self.a() * t.si()).exp())
    }

    /// Closed-form discharge current at time t after the switch closes, for charging voltage U0
    /// (module documentation; elementary circuit theory, `physics-notes.md` §6). A screening
    /// estimate, not a guarantee: real switches and cables add losses and inductance.
    ///
    /// # Errors
    /// [`PhysicsError::OutOfDomain`] (wrapped) for U0 not finite and positive or t negative or
    /// not finite.
    pub fn current(&self, charging_voltage: Voltage, time: Time) -> Result<Current, ProcessError> {
        let u0 = check_positive("charging voltage", charging_voltage.si(), "V")?;
        let t = check_non_negative("time", time.si(), "s")?;
        Ok(Current::from_a(self.current_unchecked(u0, t)))
    }

    /// The closed form without checks (t >= 0, u0 finite).
    pub(crate) fn current_unchecked(&self, u0: f64, t: f64) -> f64 {
        let l = self.inductance.si();
        let a = self.a();
        let decay = (-a * t).exp();
        match self.damping() {
            Damping::Underdamped => {
                let w = self.discriminant().sqrt();
                u0 / (w * l) * decay * (w * t).sin()
            }
            Damping::Critical => u0 / l * t * decay,
            Damping::Overdamped => {
                let s = (-self.discriminant()).sqrt();
                // e^(-a t) sinh(s t) written without overflow for large t.
                u0 / (2.0 * s * l) * ((-(a - s) * t).exp() - (-(a + s) * t).exp())
            }
        }
    }

    /// Time and value of the first current maximum for charging voltage U0: dI/dt = 0 at
    /// t = atan(w / a) / w (underdamped), 1 / a (critical), atanh(s / a) / s (overdamped)
    /// (differentiating the closed forms). A screening estimate, not a guarantee.
    ///
    /// # Errors
    /// As [`RlcCircuit::current`]; a lossless circuit (R = 0) peaks at a quarter period.
    pub fn first_peak(&self, charging_voltage: Voltage) -> Result<(Time, Current), ProcessError> {
        let u0 = check_positive("charging voltage", charging_voltage.si(), "V")?;
        let a = self.a();
        let t = match self.damping() {
            Damping::Underdamped => {
                let w = self.discriminant().sqrt();
                w.atan2(a) / w
            }
            Damping::Critical => 1.0 / a,
            Damping::Overdamped => {
                let s = (-self.discriminant()).sqrt();
                (s / a).atanh() / s
            }
        };
        Ok((
            Time::from_s(t),
            Current::from_a(self.current_unchecked(u0, t)),
        ))
    }
}

/// L and R identified from a ring-down record, with the simple (undamped) approximation beside
/// the exact inverse.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct RingDownFit {
    /// Exact loop inductance L = 1 / (C (w^2 + a^2)).
    pub inductance: Inductance,
    /// Exact loop resistance R = 2 L a.
    pub resistance: Resistance,
    /// The simple estimate L = 1 / (4 pi^2 f^2 C), which treats the measured (damped) frequency
    /// as the undamped one.
    pub simple_inductance: Inductance,
    /// The simple estimate R = 2 L_simple ln(I1/I2) / T.
    pub simple_resistance: Resistance,
    /// (L_simple - L) / L = (a / w)^2 = (ln(I1/I2) / (2 pi))^2: how far the simple estimate is
    /// off (dimensionless; the same for R).
    pub simple_relative_error: f64,
    /// The identified circuit, ready for [`RlcCircuit::current`].
    pub circuit: RlcCircuit,
}

/// Identify the loop inductance and resistance from a ring-down record: the measured ring
/// frequency f (the damped frequency, from the spacing of zero crossings or of same-sign
/// peaks) and the ratio I1/I2 of two successive **same-sign** current peaks one period apart.
///
/// For I(t) = U0/(w L) e^(-a t) sin(w t) the same-sign peaks are exactly one damped period
/// T = 1/f apart and their ratio is exactly e^(a T), so a = f ln(I1/I2). The simple relations
/// of `physics-notes.md` §6, L = 1/(4 pi^2 f^2 C) and R = 2 L ln(I1/I2) / T, use w = 2 pi f as if
/// it were the undamped w0; since w0^2 = w^2 + a^2, the exact inverse (derived here from the
/// closed form) is
///
/// L = 1 / (C (w^2 + a^2)),  R = 2 L a,  w = 2 pi f, a = f ln(I1/I2),
///
/// and the simple L is too large by the factor 1 + (ln(I1/I2) / (2 pi))^2 (1.2 % for a ratio of
/// 2). Both are returned. The identified L and R are those of the whole loop as it was during the
/// record (bank, cables and whatever coil or short was connected). A screening estimate, not a
/// guarantee: the peak ratio of a noisy record is uncertain, and R is sensitive to it.
///
/// # Errors
/// [`PhysicsError::OutOfDomain`] (wrapped) for C or f not finite and positive, or a peak ratio
/// below 1 or not finite (a ratio of exactly 1 means a lossless loop, R = 0).
pub fn identify_ring_down(
    capacitance: Capacitance,
    ring_frequency: Frequency,
    peak_ratio: f64,
) -> Result<RingDownFit, ProcessError> {
    let c = check_positive("capacitance", capacitance.si(), "F")?;
    let f = check_positive("ring frequency", ring_frequency.si(), "Hz")?;
    if !(peak_ratio.is_finite() && peak_ratio >= 1.0) {
        return Err(PhysicsError::OutOfDomain {
            quantity: "same-sign peak ratio I1/I2",
            value: peak_ratio,
            unit: "",
            allowed: "[1, +inf)",
        }
        .into());
    }
    let log_ratio = peak_ratio.ln();
    let w = 2.0 * PI * f;
    let a = f * log_ratio;
    let inductance = 1.0 / (c * (w * w + a * a));
    let resistance = 2.0 * inductance * a;
    let simple_inductance = 1.0 / (w * w * c);
    let simple_resistance = 2.0 * simple_inductance * log_ratio * f;
    let circuit = RlcCircuit::new(
        capacitance,
        Inductance::from_h(inductance),
        Resistance::from_ohm(resistance),
    )?;
    Ok(RingDownFit {
        inductance: Inductance::from_h(inductance),
        resistance: Resistance::from_ohm(resistance),
        simple_inductance: Inductance::from_h(simple_inductance),
        simple_resistance: Resistance::from_ohm(simple_resistance),
        simple_relative_error: (a / w).powi(2),
        circuit,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use proptest::prelude::*;

    fn rlc(c: f64, l: f64, r: f64) -> RlcCircuit {
        RlcCircuit::new(
            Capacitance::from_f(c),
            Inductance::from_h(l),
            Resistance::from_ohm(r),
        )
        .expect("valid test circuit")
    }

    /// E0 = C U0^2 / 2 by independent arithmetic: 300 uF at 9 kV -> 0.5 * 3e-4 * 8.1e7 = 12150 J.
    #[test]
    fn stored_energy_and_its_inverse() {
        let bank = CapacitorBank::new(
            Capacitance::from_f(300e-6),
            Some(Voltage::from_v(10e3)),
            Inductance::from_h(30e-9),
            Resistance::from_ohm(3e-3),
        )
        .unwrap();
        let e = bank.stored_energy(Voltage::from_v(9e3)).unwrap();
        assert_relative_eq!(e.si(), 12150.0, max_relative = 1e-12);
        let u = bank.voltage_for_energy(e).unwrap();
        assert_relative_eq!(u.si(), 9e3, max_relative = 1e-12);
    }

    #[test]
    fn bad_bank_inputs_are_errors() {
        assert!(CapacitorBank::new(
            Capacitance::from_f(-300e-6),
            None,
            Inductance::from_h(30e-9),
            Resistance::from_ohm(3e-3),
        )
        .is_err());
        assert!(CapacitorBank::new(
            Capacitance::from_f(300e-6),
            None,
            Inductance::from_h(f64::NAN),
            Resistance::from_ohm(3e-3),
        )
        .is_err());
        assert!(CapacitorBank::new(
            Capacitance::from_f(300e-6),
            None,
            Inductance::from_h(30e-9),
            Resistance::from_ohm(-1e-3),
        )
        .is_err());
        let bank = CapacitorBank::new(
            Capacitance::from_f(300e-6),
            Some(Voltage::from_v(10e3)),
            Inductance::from_h(30e-9),
            Resistance::from_ohm(3e-3),
        )
        .unwrap();
        assert!(matches!(
            bank.stored_energy(Voltage::from_v(12e3)),
            Err(ProcessError::VoltageAboveRating { .. })
        ));
        assert!(matches!(
            bank.voltage_for_energy(Energy::from_j(20e3)),
            Err(ProcessError::VoltageAboveRating { .. })
        ));
        assert!(bank.stored_energy(Voltage::from_v(0.0)).is_err());
        let c = rlc(300e-6, 40e-9, 3e-3);
        assert!(c
            .current(Voltage::from_v(1e3), Time::from_s(-1e-6))
            .is_err());
    }

    /// The closed forms satisfy I(0) = 0 and L dI/dt(0) = U0 (the full capacitor voltage across
    /// the inductance at the first instant), in all three regimes; checked by a finite
    /// difference.
    #[test]
    fn closed_forms_start_correctly() {
        let u0 = 1000.0;
        for r in [3e-3, 2.0 * (40e-9f64 / 300e-6).sqrt(), 0.1] {
            let c = rlc(300e-6, 40e-9, r);
            assert_eq!(c.current_unchecked(u0, 0.0), 0.0);
            let h = 1e-12;
            let slope = c.current_unchecked(u0, h) / h;
            assert_relative_eq!(slope * 40e-9, u0, max_relative = 1e-4);
        }
        assert_eq!(
            rlc(300e-6, 40e-9, 2.0 * (40e-9f64 / 300e-6).sqrt()).damping(),
            Damping::Critical
        );
        assert_eq!(rlc(300e-6, 40e-9, 0.1).damping(), Damping::Overdamped);
    }

    /// Near critical damping the three closed forms agree (continuity of the solution in R).
    #[test]
    fn regimes_join_continuously() {
        let (c, l): (f64, f64) = (300e-6, 40e-9);
        let rc = 2.0 * (l / c).sqrt();
        let t = 5e-6;
        let crit = rlc(c, l, rc).current_unchecked(1000.0, t);
        let under = rlc(c, l, rc * (1.0 - 1e-6)).current_unchecked(1000.0, t);
        let over = rlc(c, l, rc * (1.0 + 1e-6)).current_unchecked(1000.0, t);
        assert_relative_eq!(under, crit, max_relative = 1e-4);
        assert_relative_eq!(over, crit, max_relative = 1e-4);
    }

    /// Ring-down identification on a constructed example (values invented for the test):
    /// C = 300 uF, L = 45 nH, R = 6 mohm. The ring frequency and the same-sign peak ratio are
    /// read off the closed form itself (peaks located by its derivative, the second one period
    /// later), then L and R are recovered by the exact inverse. The simple relation overstates
    /// L by (ln(I1/I2) / 2 pi)^2, as derived in [`identify_ring_down`].
    #[test]
    fn ring_down_recovers_a_constructed_circuit() {
        let (c, l, r) = (300e-6, 45e-9, 6e-3);
        let circuit = rlc(c, l, r);
        let u0 = Voltage::from_v(5e3);
        let f = circuit.ring_frequency().unwrap();
        let period = 1.0 / f.si();
        let (t1, i1) = circuit.first_peak(u0).unwrap();
        let i2 = circuit
            .current(u0, Time::from_s(t1.si() + period))
            .unwrap()
            .si();
        // The peak found is a maximum: neighbours are lower.
        let below = circuit.current_unchecked(u0.si(), t1.si() * 0.99);
        let above = circuit.current_unchecked(u0.si(), t1.si() * 1.01);
        assert!(below < i1.si() && above < i1.si());
        let ratio = i1.si() / i2;
        let fit = identify_ring_down(Capacitance::from_f(c), f, ratio).unwrap();
        assert_relative_eq!(fit.inductance.si(), l, max_relative = 1e-9);
        assert_relative_eq!(fit.resistance.si(), r, max_relative = 1e-9);
        let expected_bias = (ratio.ln() / (2.0 * PI)).powi(2);
        assert_relative_eq!(
            fit.simple_inductance.si() / l - 1.0,
            expected_bias,
            max_relative = 1e-6
        );
        assert_relative_eq!(
            fit.simple_relative_error,
            expected_bias,
            max_relative = 1e-9
        );
        assert_relative_eq!(
            circuit.same_sign_peak_ratio().unwrap(),
            ratio,
            max_relative = 1e-9
        );
    }

    #[test]
    fn ring_down_rejects_bad_input() {
        let c = Capacitance::from_f(300e-6);
        assert!(identify_ring_down(c, Frequency::from_hz(40e3), 0.9).is_err());
        assert!(identify_ring_down(c, Frequency::from_hz(40e3), f64::NAN).is_err());
        assert!(identify_ring_down(c, Frequency::from_hz(0.0), 2.0).is_err());
        assert!(
            identify_ring_down(Capacitance::from_f(-1.0), Frequency::from_hz(1.0), 2.0).is_err()
        );
        let lossless = identify_ring_down(c, Frequency::from_hz(40e3), 1.0).unwrap();
        assert_eq!(lossless.resistance.si(), 0.0);
    }

    proptest! {
        /// Round trip for any underdamped loop: closed form -> (f, I1/I2) -> (L, R).
        #[test]
        fn ring_down_round_trip(c in 20e-6f64..2e-3, l in 5e-9f64..2e-6, frac in 0.0f64..0.9) {
            let r = frac * 2.0 * (l / c).sqrt();
            let circuit = rlc(c, l, r);
            let f = circuit.ring_frequency().unwrap();
            let ratio = circuit.same_sign_peak_ratio().unwrap();
            let fit = identify_ring_down(Capacitance::from_f(c), f, ratio).unwrap();
            prop_assert!((fit.inductance.si() / l - 1.0).abs() < 1e-9);
            prop_assert!((fit.resistance.si() - r).abs() <= 1e-9 * (l / c).sqrt());
        }

        /// The underdamped current never exceeds the lossless amplitude U0 sqrt(C/L).
        #[test]
        fn current_bounded_by_lossless_amplitude(c in 20e-6f64..2e-3, l in 5e-9f64..2e-6, frac in 0.0f64..3.0, tf in 0.0f64..5.0) {
            let r = frac * 2.0 * (l / c).sqrt();
            let circuit = rlc(c, l, r);
            let t = tf * 2.0 * PI * (l * c).sqrt();
            let i = circuit.current_unchecked(1.0, t);
            prop_assert!(i.is_finite());
            prop_assert!(i.abs() <= (c / l).sqrt() * (1.0 + 1e-9));
        }
    }
}
