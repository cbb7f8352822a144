//! Flags to typed requests of `oblique_setup` (values already unit-parsed by the flag parsers).

use super::SweepCommon;
use crate::fail::{CmdResult, Fail};
use oblique_core::units::Angle;
use oblique_setup::{AngleGrid, ChargeGrid};

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
