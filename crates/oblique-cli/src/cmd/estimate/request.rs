//! Flags to typed requests of `oblique_setup` (values already unit-parsed by the flag parsers).

use super::{BankFlags, ChargeFlags, IntegrationFlags, SheetFlags, SweepCommon, TubeFlags};
use crate::fail::{CmdResult, Fail};
use oblique_core::units::{Angle, Capacitance, Energy, Inductance, Length, Resistance, Voltage};
use oblique_setup::{
    AngleGrid, BankRequest, Charge, ChargeGrid, Integration, MagneticRequest, SheetRequest,
    TubeRequest,
};

impl BankFlags {
    /// The bank request.
    pub fn request(&self) -> BankRequest {
        BankRequest {
            machine: self.machine.clone(),
            capacitance: self.capacitance.map(Capacitance::from_f),
            rated_voltage: self.rated_voltage.map(Voltage::from_v),
            inductance: self.bank_inductance.map(Inductance::from_h),
            resistance: self.bank_resistance.map(Resistance::from_ohm),
        }
    }
}

impl TubeFlags {
    /// The tube request with its bank.
    pub fn request(&self, bank: &BankFlags) -> MagneticRequest {
        MagneticRequest::Tube(TubeRequest {
            bank: bank.request(),
            coil: self.coil.clone(),
            coil_bore: self.coil_bore.map(Length::from_m),
            coil_length: self.coil_length.map(Length::from_m),
            coil_inductance: self.coil_inductance.map(Inductance::from_h),
            flyer: self.flyer.clone(),
            flyer_thickness: self.flyer_thickness.map(Length::from_m),
            tube_outer_radius: self.tube_outer_radius.map(Length::from_m),
        })
    }
}

impl SheetFlags {
    /// The sheet request with its bank.
    pub fn request(&self, bank: &BankFlags) -> MagneticRequest {
        MagneticRequest::Sheet(SheetRequest {
            bank: bank.request(),
            coil: self.coil.clone(),
            coil_length: self.coil_length.map(Length::from_m),
            coil_width: self.coil_width.map(Length::from_m),
            coil_inductance: self.coil_inductance.map(Inductance::from_h),
            initial_gap: self.initial_gap.map(Length::from_m),
            flyer: self.flyer.clone(),
            flyer_thickness: self.flyer_thickness.map(Length::from_m),
        })
    }
}

impl ChargeFlags {
    /// The charging voltage or the stored energy (clap requires one of them).
    pub fn charge(&self) -> CmdResult<Charge> {
        match (self.charge_voltage, self.energy) {
            (Some(u), _) => Ok(Charge::Voltage(Voltage::from_v(u))),
            (None, Some(e)) => Ok(Charge::Energy(Energy::from_j(e))),
            (None, None) => Err(Fail::input(
                "give --charge-voltage (e.g. 8kV) or --energy (e.g. 10kJ)",
            )),
        }
    }
}

impl IntegrationFlags {
    /// The integration settings.
    pub fn integration(&self) -> Integration {
        Integration {
            steps_per_period: self.steps_per_period,
            max_periods: self.max_periods,
        }
    }
}

impl SweepCommon {
    /// The voltage or energy grid (clap requires one of them).
    pub fn charge_grid(&self) -> CmdResult<ChargeGrid> {
        match (&self.charge_voltage, &self.energy) {
            (Some(g), _) => Ok(ChargeGrid::Voltages(g.clone())),
            (None, Some(g)) => Ok(ChargeGrid::Energies(g.clone())),
            (None, None) => Err(Fail::input(
                "give --charge-voltage (e.g. 6kV..12kV) or --energy (e.g. 5kJ..20kJ)",
            )),
        }
    }

    /// The angles of the window check, if given.
    pub fn angle_grid(&self) -> Option<AngleGrid> {
        match (self.angle, &self.angle_per_standoff) {
            (Some(a), _) => Some(AngleGrid::Same(Angle::from_radians(a))),
            (None, Some(g)) => Some(AngleGrid::PerStandoff(g.clone())),
            (None, None) => None,
        }
    }
}
