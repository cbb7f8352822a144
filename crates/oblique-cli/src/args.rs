//! Argument groups shared by several subcommands (the velocity convention, the point's
//! velocity, criterion constant overrides). No subcommand module is imported from here.

use crate::qarg;
use clap::{Args, ValueEnum};
use oblique_core::CriteriaConfig;

/// The velocity convention, as a flag value.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ConventionArg {
    /// Vp bisects the normals of flyer and parent, beta/2 from each (explosive welding).
    Bisector,
    /// Vp normal to the flyer (magnetic pulse, foil actuator).
    NormalToFlyer,
    /// Vp normal to the parent plate.
    NormalToParent,
}

impl From<ConventionArg> for oblique_core::Convention {
    fn from(c: ConventionArg) -> Self {
        match c {
            ConventionArg::Bisector => oblique_core::Convention::Bisector,
            ConventionArg::NormalToFlyer => oblique_core::Convention::NormalToFlyer,
            ConventionArg::NormalToParent => oblique_core::Convention::NormalToParent,
        }
    }
}

/// The welding process, as a flag value.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ProcessArg {
    /// Magnetic pulse welding.
    MagneticPulse,
    /// Explosive welding.
    Explosive,
    /// Vaporizing foil actuator welding.
    FoilActuator,
    /// Laser impact welding.
    Laser,
    /// Gas gun.
    GasGun,
    /// Anything else.
    Other,
}

impl ProcessArg {
    /// The word used in files (`oblique_window::pair::PROCESSES`).
    pub fn as_str(self) -> &'static str {
        match self {
            ProcessArg::MagneticPulse => "magnetic-pulse",
            ProcessArg::Explosive => "explosive",
            ProcessArg::FoilActuator => "foil-actuator",
            ProcessArg::Laser => "laser",
            ProcessArg::GasGun => "gas-gun",
            ProcessArg::Other => "other",
        }
    }
}

/// Where the point's velocity comes from.
#[derive(Debug, Clone, Args)]
#[group(required = true, multiple = false)]
pub struct VelocityInput {
    /// Impact (flyer) velocity Vp, e.g. 350m/s or 0.35km/s.
    #[arg(long, value_name = "SPEED", allow_hyphen_values = true, value_parser = qarg::positive_velocity)]
    pub velocity: Option<f64>,
    /// Collision-point velocity Vc along the parent, e.g. 2.4km/s (Vp then follows from the convention).
    #[arg(long = "collision-velocity", value_name = "SPEED", allow_hyphen_values = true, value_parser = qarg::positive_velocity)]
    pub collision_velocity: Option<f64>,
}

/// Criterion constants that can be overridden from the command line.
#[derive(Debug, Clone, Default, Args)]
pub struct ConstantArgs {
    /// Deribas constant k (default 0.6, carefully cleaned surfaces; up to 1.2).
    #[arg(long = "deribas-k", value_name = "K", allow_hyphen_values = true, value_parser = qarg::deribas_k)]
    pub deribas_k: Option<f64>,
    /// Wittman melting constant N (default 0.11).
    #[arg(long = "wittman-n", value_name = "N", allow_hyphen_values = true, value_parser = qarg::wittman_n)]
    pub wittman_n: Option<f64>,
    /// Required multiple of the Hugoniot elastic limit for the pressure limit (default 5).
    #[arg(long = "hel-multiple", value_name = "M", allow_hyphen_values = true, value_parser = qarg::hel_multiple)]
    pub hel_multiple: Option<f64>,
}

impl ConstantArgs {
    /// Whether any constant is set on the command line.
    #[must_use]
    pub fn any(&self) -> bool {
        self.deribas_k.is_some() || self.wittman_n.is_some() || self.hel_multiple.is_some()
    }

    /// Apply the command-line constant overrides to a criteria configuration.
    #[must_use]
    pub fn apply(&self, mut cfg: CriteriaConfig) -> CriteriaConfig {
        if let Some(k) = self.deribas_k {
            cfg.deribas_k = k;
        }
        if let Some(n) = self.wittman_n {
            cfg.wittman_n = n;
        }
        if let Some(m) = self.hel_multiple {
            cfg.hel_multiple = m;
        }
        cfg
    }
}
