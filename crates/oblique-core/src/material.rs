//! Material properties in SI, as the physics needs them. Where the numbers come from (files,
//! sources) is the window crate's business; the core only checks that they are physical.

use crate::error::{positive, PhysicsError};
use crate::hugoniot::Hugoniot;
use crate::units::{
    Density, ElectricalConductivity, Pressure, SpecificHeat, Temperature, ThermalConductivity,
    Velocity,
};
use serde::{Deserialize, Serialize};

/// A metal as the window criteria see it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Material {
    /// Short id, e.g. `aa6061-t6`.
    pub id: String,
    /// Human name with temper, e.g. `Aluminium alloy 6061-T6`.
    pub name: String,
    /// Linear Us-up Hugoniot, including the initial density.
    pub hugoniot: Hugoniot,
    /// Vickers hardness expressed as a stress (HV x 9.80665e6 Pa).
    pub vickers_hardness: Pressure,
    /// 0.2 % yield strength.
    pub yield_strength: Pressure,
    /// Ultimate tensile strength.
    pub tensile_strength: Pressure,
    /// Bulk modulus K.
    pub bulk_modulus: Pressure,
    /// Shear modulus G.
    pub shear_modulus: Pressure,
    /// Melting temperature; the solidus for alloys.
    pub melting_temperature: Temperature,
    /// Thermal conductivity near room temperature.
    pub thermal_conductivity: ThermalConductivity,
    /// Specific heat capacity near room temperature.
    pub specific_heat: SpecificHeat,
    /// Electrical conductivity near room temperature.
    pub electrical_conductivity: ElectricalConductivity,
}

impl Material {
    /// Initial density rho0.
    pub fn density(&self) -> Density {
        self.hugoniot.density
    }

    /// Bulk sound speed as used by the criteria: the Hugoniot intercept C0.
    pub fn sound_speed(&self) -> Velocity {
        self.hugoniot.c0
    }

    /// Hugoniot elastic limit from the yield strength and moduli, HEL = 0.5 (K/G + 4/3) Y0
    /// (uniaxial strain; as quoted by Kore et al. 2010, `physics-notes.md` §4).
    pub fn hugoniot_elastic_limit(&self) -> Pressure {
        let k_over_g = self.bulk_modulus.si() / self.shear_modulus.si();
        Pressure::from_pa(0.5 * (k_over_g + 4.0 / 3.0) * self.yield_strength.si())
    }

    /// Check that every property is finite and positive, and that strengths are ordered.
    ///
    /// # Errors
    /// The first offending property as [`PhysicsError::OutOfDomain`].
    pub fn validate(&self) -> Result<(), PhysicsError> {
        positive("density", self.hugoniot.density.si(), "kg/m^3")?;
        positive("Hugoniot C0", self.hugoniot.c0.si(), "m/s")?;
        positive("Vickers hardness", self.vickers_hardness.si(), "Pa")?;
        positive("yield strength", self.yield_strength.si(), "Pa")?;
        positive("tensile strength", self.tensile_strength.si(), "Pa")?;
        positive("bulk modulus", self.bulk_modulus.si(), "Pa")?;
        positive("shear modulus", self.shear_modulus.si(), "Pa")?;
        positive("melting temperature", self.melting_temperature.si(), "K")?;
        positive(
            "thermal conductivity",
            self.thermal_conductivity.si(),
            "W/(m K)",
        )?;
        positive("specific heat", self.specific_heat.si(), "J/(kg K)")?;
        positive(
            "electrical conductivity",
            self.electrical_conductivity.si(),
            "S/m",
        )?;
        if !(self.hugoniot.s.is_finite() && self.hugoniot.s >= 0.0) {
            return Err(PhysicsError::OutOfDomain {
                quantity: "Hugoniot slope s",
                value: self.hugoniot.s,
                unit: "",
                allowed: "[0, +inf)",
            });
        }
        Ok(())
    }
}
