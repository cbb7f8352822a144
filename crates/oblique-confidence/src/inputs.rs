//! The sampled inputs of a window and a scatter: each with its distribution and where the
//! distribution comes from.

use crate::priors::{self, Constant};
use crate::scatter::{Point, Scatter};
use oblique_core::CriterionId;
use oblique_window::PairWindow;
use serde::Serialize;

/// Which plate a material property belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Plate {
    /// The flyer.
    Flyer,
    /// The parent plate.
    Parent,
    /// Both plates are the same material: one draw serves both.
    Both,
}

impl Plate {
    fn key(self) -> &'static str {
        match self {
            Plate::Flyer => "flyer",
            Plate::Parent => "parent",
            Plate::Both => "plates",
        }
    }
}

/// What an input is.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum InputKind {
    /// The velocity as given.
    Velocity,
    /// The collision angle.
    Angle,
    /// A criterion constant.
    Constant {
        /// Which.
        constant: Constant,
    },
    /// A material property.
    Property {
        /// Whose.
        plate: Plate,
        /// Index in [`priors::PROPERTIES`].
        index: usize,
    },
}

/// A distribution, written so that one standard normal variate z gives one value.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Distribution {
    /// mean + sd z.
    Normal {
        /// Mean.
        mean: f64,
        /// Standard deviation.
        sd: f64,
    },
    /// median exp(sigma z).
    LogNormal {
        /// Median.
        median: f64,
        /// Standard deviation of the logarithm.
        sigma: f64,
    },
    /// median exp(sigma z) with one sigma below the median and another above (a fit's
    /// interval that is not symmetric in the logarithm, or bounded on one side only).
    SplitLogNormal {
        /// Median.
        median: f64,
        /// Standard deviation of the logarithm below the median.
        below: f64,
        /// Standard deviation of the logarithm above the median.
        above: f64,
    },
}

impl Distribution {
    /// The value for the standard normal variate `z`.
    #[inline]
    pub fn value(&self, z: f64) -> f64 {
        match *self {
            Distribution::Normal { mean, sd } => mean + sd * z,
            Distribution::LogNormal { median, sigma } => median * (sigma * z).exp(),
            Distribution::SplitLogNormal {
                median,
                below,
                above,
            } => median * (if z < 0.0 { below } else { above } * z).exp(),
        }
    }

    /// In words.
    pub fn text(&self, unit: &str) -> String {
        let n = crate::present::num;
        let sep = if unit.is_empty() { "" } else { " " };
        match *self {
            Distribution::Normal { mean, sd } => {
                format!(
                    "normal, mean {}{sep}{unit}, sd {}{sep}{unit}",
                    n(mean),
                    n(sd)
                )
            }
            Distribution::LogNormal { median, sigma } => format!(
                "log-normal, median {}{sep}{unit}, sd {} %",
                n(median),
                n(100.0 * sigma)
            ),
            Distribution::SplitLogNormal {
                median,
                below,
                above,
            } => format!(
                "log-normal from a fit, median {}{sep}{unit}, sd {} % below and {} % above",
                n(median),
                n(100.0 * below),
                n(100.0 * above)
            ),
        }
    }
}

/// One sampled input.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Input {
    /// What it is.
    pub kind: InputKind,
    /// Its id in JSON (`velocity`, `angle`, `deribas_k`, `flyer.hugoniot_c0`, ...).
    pub id: String,
    /// In words.
    pub label: String,
    /// The distribution.
    pub distribution: Distribution,
    /// Its unit in the description.
    pub unit: &'static str,
    /// Where the distribution comes from.
    pub basis: String,
}

/// The constant's value in use and its distribution: fitted (from the pair file's `fitted`
/// section) or the prior around the value in use.
pub fn constant_distribution(
    window: &PairWindow,
    constant: Constant,
    value_in_use: f64,
) -> (Distribution, String) {
    let (prior, basis) = constant.prior();
    if let Some((fit, f)) = window
        .fitted
        .as_ref()
        .and_then(|f| f.constant(constant.key()).map(|c| (f, c)))
    {
        // The fitted value is the one in use unless a flag overrode it; then the prior applies.
        #[allow(clippy::float_cmp)]
        if f.value == value_in_use {
            let z = crate::quantile::normal(0.5 + fit.level / 2.0);
            // A side's spread is measured only when the interval is bounded on both sides: in a
            // one-sided interval the value is where the trials stop (the value in use moved to
            // the interval's end), not a best estimate, so a spread read from the distance to
            // that end would be zero or arbitrary. Then both sides take the prior spread.
            let two_sided = f.low.is_some() && f.high.is_some();
            let spread = |d: f64| if two_sided && d > 0.0 { d / z } else { prior };
            let below = f.low.map_or(prior, |lo| spread((f.value / lo).ln()));
            let above = f.high.map_or(prior, |hi| spread((hi / f.value).ln()));
            let mut basis = format!(
                "fitted to {} trials on {} ({} % interval {}); {}",
                fit.observations,
                fit.date,
                crate::present::num(100.0 * fit.level),
                crate::present::interval(f.low, f.high),
                if two_sided {
                    "spreads from the interval"
                } else {
                    "a one-sided interval: the prior spread on both sides"
                }
            );
            if fit.observations != window.observations.len() {
                basis.push_str(&format!(
                    "; the file now holds {} trials (fit again)",
                    window.observations.len()
                ));
            }
            return (
                Distribution::SplitLogNormal {
                    median: f.value,
                    below,
                    above,
                },
                basis,
            );
        }
    }
    (
        Distribution::LogNormal {
            median: value_in_use,
            sigma: prior,
        },
        basis.to_string(),
    )
}

/// The value in use of a constant in a window's configuration.
pub fn constant_in_use(window: &PairWindow, constant: Constant) -> f64 {
    match constant {
        Constant::DeribasK => window.criteria.deribas_k,
        Constant::WittmanN => window.criteria.wittman_n,
        Constant::HelMultiple => window.criteria.hel_multiple,
        Constant::JettingFactor => 1.0,
    }
}

pub(crate) fn enabled(window: &PairWindow, id: CriterionId) -> bool {
    let c = &window.criteria;
    match id {
        CriterionId::DeribasLower => c.deribas_enabled,
        CriterionId::StrengthLower => c.strength_enabled,
        CriterionId::PressureLower => c.pressure_enabled,
        CriterionId::MeltingUpper => c.melting_enabled,
        CriterionId::Jetting => c.jetting_enabled,
        CriterionId::WavyTransition => false, // informational: never decides a verdict
    }
}

/// The nominal SI values of the sampled properties of a material, in [`priors::PROPERTIES`]
/// order.
pub(crate) fn property_values(m: &oblique_core::Material) -> [f64; 11] {
    [
        m.hugoniot.density.si(),
        m.hugoniot.c0.si(),
        m.hugoniot.s,
        m.vickers_hardness.si(),
        m.yield_strength.si(),
        m.tensile_strength.si(),
        m.bulk_modulus.si(),
        m.shear_modulus.si(),
        m.melting_temperature.si(),
        m.thermal_conductivity.si(),
        m.specific_heat.si(),
    ]
}

const PROPERTY_UNITS: [&str; 11] = [
    "kg/m3", "m/s", "", "Pa", "Pa", "Pa", "Pa", "Pa", "K", "W/(m K)", "J/(kg K)",
];

/// Every input sampled for `point` under `scatter` against `window`, in sampling order: the
/// velocity and the angle (when scattered), then, with model uncertainty on, the constants of
/// the enabled criteria and the material properties those criteria use.
pub fn inputs(window: &PairWindow, point: &Point, scatter: &Scatter) -> Vec<Input> {
    let mut out = Vec::new();
    let v = point.velocity_m_s();
    if let Some(s) = scatter.velocity {
        let sd = s.at(v);
        if sd > 0.0 {
            let which = match point.velocity {
                crate::scatter::PointVelocity::Impact(_) => "impact velocity Vp",
                crate::scatter::PointVelocity::Collision(_) => "collision-point velocity Vc",
            };
            out.push(Input {
                kind: InputKind::Velocity,
                id: "velocity".into(),
                label: format!("{which} ({} convention)", point.convention),
                distribution: Distribution::Normal { mean: v, sd },
                unit: "m/s",
                basis: format!("stated: --velocity-sd {}", s.text()),
            });
        }
    }
    if let Some(a) = scatter.angle.filter(|a| a.radians() > 0.0) {
        out.push(Input {
            kind: InputKind::Angle,
            id: "angle".into(),
            label: "collision angle".into(),
            distribution: Distribution::Normal {
                mean: point.angle_rad.to_degrees(),
                sd: a.degrees(),
            },
            unit: "deg",
            basis: format!(
                "stated: --angle-sd {} deg",
                crate::present::num(a.degrees())
            ),
        });
    }
    if !scatter.model {
        return out;
    }
    for c in Constant::ALL {
        if !enabled(window, c.criterion()) {
            continue;
        }
        let (distribution, basis) = constant_distribution(window, c, constant_in_use(window, c));
        out.push(Input {
            kind: InputKind::Constant { constant: c },
            id: c.key().into(),
            label: c.words().trim_start_matches("the ").to_string(),
            distribution,
            unit: "",
            basis,
        });
    }
    let same = window.flyer.material.id == window.parent.material.id;
    let plates: &[(Plate, &oblique_window::MaterialRecord)] = if same {
        &[(Plate::Both, &window.flyer)]
    } else {
        &[
            (Plate::Flyer, &window.flyer),
            (Plate::Parent, &window.parent),
        ]
    };
    for (plate, record) in plates {
        let values = property_values(&record.material);
        for (k, (field, default, default_basis)) in priors::PROPERTIES.iter().enumerate() {
            let used = CriterionId::ALL
                .into_iter()
                .any(|id| enabled(window, id) && priors::criterion_uses(id, k));
            if !used {
                continue;
            }
            let from_file = record
                .sources
                .get(field)
                .and_then(|p| p.relative_spread.map(|s| (s, p.key.clone())));
            let (sigma, basis) = match from_file {
                Some((s, key)) => (
                    s,
                    format!(
                        "material file: spread {} % (source {key})",
                        crate::present::num(100.0 * s)
                    ),
                ),
                None => (*default, format!("default: {default_basis}")),
            };
            if sigma <= 0.0 {
                continue;
            }
            out.push(Input {
                kind: InputKind::Property {
                    plate: *plate,
                    index: k,
                },
                id: format!("{}.{field}", plate.key()),
                label: format!(
                    "{} of {} ({})",
                    priors::property_words(field),
                    record.material.id,
                    match plate {
                        Plate::Flyer => "flyer",
                        Plate::Parent => "parent",
                        Plate::Both => "both plates",
                    }
                ),
                distribution: Distribution::LogNormal {
                    median: values[k],
                    sigma,
                },
                unit: PROPERTY_UNITS[k],
                basis,
            });
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use oblique_window::pair::{Fitted, FittedValue};

    fn with_fit(k: FittedValue) -> PairWindow {
        let lib = oblique_window::Library::load(&[]).expect("built-in library");
        let mut w = lib.pair("demo-al6061-on-cu").expect("demo pair").clone();
        w.criteria.deribas_k = k.value;
        w.fitted = Some(Fitted {
            date: "2026-12-01".into(),
            method: "test".into(),
            observations: w.observations.len(),
            level: 0.95,
            deribas_k: Some(k),
            wittman_n: None,
            hel_multiple: None,
        });
        w
    }

    /// A constant at the end of a one-sided interval keeps the prior spread on both sides (the
    /// distance to that end, zero, is no measured spread); a two-sided interval gives its own.
    #[test]
    fn one_sided_fits_keep_the_prior_spread() {
        let (prior, _) = Constant::DeribasK.prior();
        let w = with_fit(FittedValue {
            value: 0.68,
            low: None,
            high: Some(0.68),
        });
        let (d, basis) = constant_distribution(&w, Constant::DeribasK, 0.68);
        assert_eq!(
            d,
            Distribution::SplitLogNormal {
                median: 0.68,
                below: prior,
                above: prior
            }
        );
        assert!(basis.contains("one-sided"), "{basis}");
        let w = with_fit(FittedValue {
            value: 0.8,
            low: Some(0.7),
            high: Some(0.9),
        });
        let (d, basis) = constant_distribution(&w, Constant::DeribasK, 0.8);
        let z = crate::quantile::normal(0.975);
        let Distribution::SplitLogNormal { below, above, .. } = d else {
            panic!("{d:?}")
        };
        approx::assert_relative_eq!(below, (0.8f64 / 0.7).ln() / z, max_relative = 1e-12);
        approx::assert_relative_eq!(above, (0.9f64 / 0.8).ln() / z, max_relative = 1e-12);
        assert!(basis.contains("spreads from the interval"), "{basis}");
    }
}
