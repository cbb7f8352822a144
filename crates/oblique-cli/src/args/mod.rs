//! Argument groups shared by several subcommands (the velocity convention, the point's
//! velocity, criterion constant overrides). No subcommand module is imported from here.

pub mod point;
pub mod process;

pub use point::{PointArgs, WindowArgs};

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

/// On or off.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum OnOff {
    /// On.
    On,
    /// Off.
    Off,
}

/// The stated scatter of a point and the sampling settings of its weld probability.
#[derive(Debug, Clone, Default, Args)]
pub struct ScatterArgs {
    /// One standard deviation of the velocity, relative (5%) or absolute (20m/s); asks for the
    /// weld probability.
    #[arg(long = "velocity-sd", value_name = "SD", allow_hyphen_values = true, value_parser = qarg::velocity_sd)]
    pub velocity_sd: Option<oblique_confidence::VelocitySpread>,
    /// One standard deviation of the collision angle, e.g. 1deg; asks for the weld probability.
    #[arg(long = "angle-sd", value_name = "ANGLE", allow_hyphen_values = true, value_parser = qarg::angle_sd)]
    pub angle_sd: Option<f64>,
    /// Number of samples of the weld probability (1 to 10000000).
    #[arg(long, value_name = "N", value_parser = qarg::samples)]
    pub samples: Option<usize>,
    /// Seed of the random streams (a whole number; default 1): the same seed gives the same
    /// numbers.
    #[arg(long, value_name = "S", allow_hyphen_values = true, value_parser = qarg::seed)]
    pub seed: Option<u64>,
    /// Sample the criterion constants and the material properties too (docs/theory.md §15);
    /// default on.
    #[arg(
        long = "model-uncertainty",
        value_enum,
        ignore_case = true,
        value_name = "ON|OFF"
    )]
    pub model_uncertainty: Option<OnOff>,
}

impl ScatterArgs {
    /// True when any of the flags was given: the weld probability is asked for.
    pub fn asked(&self) -> bool {
        self.velocity_sd.is_some()
            || self.angle_sd.is_some()
            || self.samples.is_some()
            || self.seed.is_some()
            || self.model_uncertainty.is_some()
    }

    /// The scatter, with defaults for what was not given.
    pub fn scatter(&self) -> oblique_confidence::Scatter {
        oblique_confidence::Scatter {
            velocity: self.velocity_sd,
            angle: self.angle_sd.map(oblique_core::units::Angle::from_radians),
            model: self.model_uncertainty != Some(OnOff::Off),
        }
    }

    /// The sampling settings, `default_samples` when --samples is not given.
    pub fn sampling(&self, default_samples: usize) -> oblique_confidence::Sampling {
        oblique_confidence::Sampling {
            samples: self.samples.unwrap_or(default_samples),
            seed: self
                .seed
                .unwrap_or(oblique_confidence::scatter::DEFAULT_SEED),
            threads: None,
        }
    }
}

impl ScatterArgs {
    /// The stated scatter of a process estimate (defaults left to `oblique_setup`).
    pub fn process(&self) -> oblique_setup::uncertainty::ProcessScatter {
        oblique_setup::uncertainty::ProcessScatter {
            velocity: self.velocity_sd,
            angle: self.angle_sd.map(oblique_core::units::Angle::from_radians),
            model: self.model_uncertainty.map(|m| m == OnOff::On),
            samples: self.samples,
            seed: self.seed,
        }
    }
}
