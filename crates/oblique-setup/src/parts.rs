//! The coil and workpiece of a magnetic set-up: coil file and values, the flyer from the
//! request or the pair window, the geometry checks; then the set-up at a charge, standoff and
//! efficiency, the efficiency from a stored calibration.

use crate::error::{SetupError, SetupResult};
use crate::human;
use crate::inputs::{InputValue, Inputs, Provenance, StoredCalibration, Unit, WorkpieceMismatch};
use crate::request::{field, MagneticRequest, SheetRequest, TubeRequest};
use crate::resolve::{file_from, pick, resolve_bank, Catalog, MagneticModel, ResolvedBank};
use oblique_core::process::{
    BarCoil, CompressionCoil, PulseSetup, Sheet, SheetSetup, Tube, TubeSetup, Workpiece,
};
use oblique_core::units::{Inductance, Length, Voltage};
use oblique_window::machine::{MachineRecord, Valued};
use oblique_window::PairWindow;

/// The flyer: material and thickness from the request or the pair window.
struct Flyer {
    workpiece: Workpiece,
    id: String,
    thickness: f64,
}

fn flyer(
    catalog: &Catalog,
    window: Option<&PairWindow>,
    id: Option<&str>,
    thickness: Option<Length>,
    label: &'static str,
    inputs: &mut Inputs,
    notes: &mut Vec<String>,
) -> SetupResult<Flyer> {
    let (id, id_from) = match (id, window) {
        (Some(id), _) => (
            id.to_string(),
            Provenance::Given {
                field: field::FLYER,
                overrides: None,
            },
        ),
        (None, Some(w)) => (
            w.flyer.material.id.clone(),
            Provenance::PairWindow(w.name.clone()),
        ),
        (None, None) => {
            return Err(SetupError::missing(
                field::FLYER,
                "--flyer is required here: give a material id (e.g. aa6061-t6; `oblique material list`) or --pair",
            ))
        }
    };
    if let (Some(w), Provenance::Given { .. }) = (window, &id_from) {
        if w.flyer.material.id != id {
            notes.push(format!(
                "--flyer {id} differs from the flyer {} of pair window {}",
                w.flyer.material.id, w.name
            ));
        }
    }
    let rec = catalog
        .library
        .material(&id)
        .map_err(|m| SetupError::unknown(field::FLYER, m))?;
    let wp = Workpiece::from_material(&rec.material).map_err(|e| SetupError::Invalid {
        field: field::FLYER,
        message: format!("--flyer {id}: {e}"),
    })?;
    inputs.push(
        "flyer material",
        "flyer",
        InputValue::Text(id.clone()),
        id_from,
    );
    let (h, h_from) = match (thickness, window) {
        (Some(h), _) => (
            h.si(),
            Provenance::Given {
                field: field::FLYER_THICKNESS,
                overrides: None,
            },
        ),
        (None, Some(w)) => (
            w.flyer_thickness.si(),
            Provenance::PairWindow(w.name.clone()),
        ),
        (None, None) => {
            return Err(SetupError::missing(
                field::FLYER_THICKNESS,
                "--flyer-thickness is required here: give it (e.g. 1mm) or --pair",
            ))
        }
    };
    inputs.quantity(label, "flyer_thickness_m", h, Unit::Millimetre, h_from);
    let material = || Provenance::Material(id.clone());
    inputs.quantity(
        "flyer density",
        "flyer_density_kg_m3",
        wp.density.si(),
        Unit::KilogramPerCubicMetre,
        material(),
    );
    inputs.quantity(
        "flyer flow stress (yield strength)",
        "flyer_flow_stress_pa",
        wp.flow_stress.si(),
        Unit::Megapascal,
        material(),
    );
    inputs.quantity(
        "flyer electrical conductivity",
        "flyer_conductivity_s_m",
        wp.conductivity.si(),
        Unit::MegasiemensPerMetre,
        material(),
    );
    Ok(Flyer {
        workpiece: wp,
        id,
        thickness: h,
    })
}

fn extra_inductance(
    inputs: &mut Inputs,
    given: Option<Inductance>,
    file: Option<(&MachineRecord, &Valued<Inductance>)>,
) -> f64 {
    let (x, from) = match (given.map(Inductance::si), file) {
        (Some(x), Some((rec, _))) => (
            x,
            Provenance::Given {
                field: field::COIL_INDUCTANCE,
                overrides: Some(rec.name.clone()),
            },
        ),
        (Some(x), None) => (
            x,
            Provenance::Given {
                field: field::COIL_INDUCTANCE,
                overrides: None,
            },
        ),
        (None, Some((rec, v))) => (v.value.si(), file_from(rec, &v.source)),
        (None, None) => (
            0.0,
            Provenance::NotGiven("0 assumed (give --coil-inductance for terminals and leads)"),
        ),
    };
    inputs.quantity(
        "coil extra inductance",
        "coil_extra_inductance_h",
        x,
        Unit::Nanohenry,
        from,
    );
    x
}

/// The coil and workpiece of a magnetic set-up.
#[derive(Debug, Clone)]
pub enum Plant {
    /// A compression coil and a tube.
    Tube {
        /// Coil.
        coil: CompressionCoil,
        /// Tube.
        tube: Tube,
    },
    /// A bar coil and a sheet.
    Sheet {
        /// Coil.
        coil: BarCoil,
        /// Sheet.
        sheet: Sheet,
        /// Coil-to-sheet gap at rest.
        initial_gap: Length,
    },
}

/// The parts of a magnetic set-up other than charge, standoff and efficiency.
#[derive(Debug, Clone)]
pub struct ResolvedParts<'a> {
    /// Which model.
    pub model: MagneticModel,
    /// Bank.
    pub bank: ResolvedBank<'a>,
    /// Coil and workpiece.
    pub plant: Plant,
    /// Coil file name, if any.
    pub coil_name: Option<String>,
    /// Flyer material id.
    pub flyer: String,
}

impl ResolvedParts<'_> {
    /// The workpiece (wall or sheet) thickness (m).
    #[must_use]
    pub fn thickness(&self) -> f64 {
        match &self.plant {
            Plant::Tube { tube, .. } => tube.wall_thickness.si(),
            Plant::Sheet { sheet, .. } => sheet.thickness.si(),
        }
    }

    /// The set-up at a charging voltage, standoff and efficiency (not validated).
    #[must_use]
    pub fn setup(&self, u: Voltage, g: f64, eta: f64) -> PulseSetup {
        match &self.plant {
            Plant::Tube { coil, tube } => PulseSetup::Tube(TubeSetup {
                bank: self.bank.bank,
                coil: *coil,
                tube: *tube,
                standoff: Length::from_m(g),
                charging_voltage: u,
                efficiency: eta,
            }),
            Plant::Sheet {
                coil,
                sheet,
                initial_gap,
            } => PulseSetup::Sheet(SheetSetup {
                bank: self.bank.bank,
                coil: *coil,
                sheet: *sheet,
                initial_gap: *initial_gap,
                standoff: Length::from_m(g),
                charging_voltage: u,
                efficiency: eta,
            }),
        }
    }

    /// Refuse a tube standoff the geometry cannot hold (any sheet standoff passes here).
    ///
    /// # Errors
    /// [`SetupError::Invalid`] naming `--standoff`.
    pub fn check_standoff(&self, g: f64) -> SetupResult {
        if let Plant::Tube { tube, .. } = &self.plant {
            let inner = tube.outer_radius.si() - tube.wall_thickness.si();
            if g >= inner {
                return Err(SetupError::invalid(
                    field::STANDOFF,
                    format!(
                        "{} must be smaller than the tube's inner radius {} (the rod needs a positive radius)",
                        human::mm(g),
                        human::mm(inner)
                    ),
                ));
            }
        }
        Ok(())
    }

    /// A warning when a tube wall must travel more than a quarter of the tube's outer radius:
    /// the thin ring model ignores wall thickening limits, wrinkling and buckling at such
    /// compression (common practice: crimp and weld joints use standoffs of a few percent of
    /// the radius).
    pub(crate) fn compression_warning(&self, g: f64, inputs: &mut Inputs) {
        if let Plant::Tube { tube, .. } = &self.plant {
            let r = tube.outer_radius.si();
            if g > 0.25 * r {
                inputs.warn_once(format!(
                    "large radial compression: a standoff of {} is {:.0} % of the tube's outer radius; the thin-ring model ignores wall thickening limits, wrinkling and buckling there",
                    human::mm(g),
                    100.0 * g / r
                ));
            }
        }
    }

    /// The efficiency: given, else the bank file's stored calibration for this model and
    /// coil, else 1; recorded with its origin.
    pub(crate) fn efficiency(&self, given: Option<f64>, inputs: &mut Inputs) -> f64 {
        let model = self.model.id();
        let coil = self.coil_name.as_deref();
        let (eta, from) = if let Some(e) = given {
            (
                e,
                Provenance::Given {
                    field: field::EFFICIENCY,
                    overrides: None,
                },
            )
        } else if let Some((rec, c)) = self
            .bank
            .record
            .and_then(|r| r.calibration_for(model, coil).map(|c| (r, c)))
        {
            let (flyer_now, thickness_now) = (self.flyer.as_str(), self.thickness());
            let other_flyer = c.flyer.as_deref().is_some_and(|f| f != flyer_now);
            let other_thickness = c
                .flyer_thickness
                .is_some_and(|t| (t.si() - thickness_now).abs() > 1e-3 * thickness_now);
            let mismatch = (other_flyer || other_thickness).then(|| WorkpieceMismatch {
                calibrated_flyer: c.flyer.clone(),
                calibrated_thickness: c.flyer_thickness.map(Length::si),
                flyer: flyer_now.to_string(),
                thickness: thickness_now,
            });
            (
                c.efficiency,
                Provenance::Calibration(StoredCalibration {
                    bank: rec.name.clone(),
                    date: c.date.clone(),
                    measured_velocity: c.measured_velocity.si(),
                    charge_voltage: c.charge_voltage.si(),
                    standoff: c.standoff.si(),
                    source: c.source.clone(),
                    velocity_uncertainty: c.velocity_uncertainty,
                    mismatch,
                }),
            )
        } else {
            let others = match self.bank.record {
                Some(r) if !r.calibrations.is_empty() => {
                    Some((r.name.clone(), model.to_string(), coil.map(str::to_string)))
                }
                _ => None,
            };
            (1.0, Provenance::Uncalibrated { others })
        };
        inputs.quantity("efficiency eta", "efficiency", eta, Unit::Number, from);
        eta
    }
}

/// Resolve a magnetic set-up's parts (bank, coil, workpiece) against the catalog.
///
/// `notes` receives warnings for the person as they arise (a flyer that differs from the pair
/// window's); they are kept when a later step fails.
///
/// # Errors
/// Unknown names, missing values, inconsistent geometry, each naming its field.
pub fn resolve_parts<'a>(
    catalog: &'a Catalog,
    request: &MagneticRequest,
    window: Option<&PairWindow>,
    inputs: &mut Inputs,
    notes: &mut Vec<String>,
) -> SetupResult<ResolvedParts<'a>> {
    match request {
        MagneticRequest::Tube(t) => tube_parts(catalog, t, window, inputs, notes),
        MagneticRequest::Sheet(s) => sheet_parts(catalog, s, window, inputs, notes),
    }
}

fn tube_parts<'a>(
    catalog: &'a Catalog,
    t: &TubeRequest,
    window: Option<&PairWindow>,
    inputs: &mut Inputs,
    notes: &mut Vec<String>,
) -> SetupResult<ResolvedParts<'a>> {
    let bank = resolve_bank(catalog, &t.bank, inputs)?;
    let found = t
        .coil
        .as_deref()
        .map(|n| {
            catalog
                .machines
                .compression_coil(n)
                .map_err(|m| SetupError::unknown(field::COIL, m))
        })
        .transpose()?;
    let hint = "name a compression coil file with --coil";
    let rc = pick(
        inputs,
        "coil bore radius",
        "coil_bore_radius_m",
        field::COIL_BORE,
        t.coil_bore.map(Length::si),
        found.map(|(r, c)| (r, &c.bore_radius)),
        Length::si,
        Unit::Millimetre,
        hint,
    )?;
    let l = pick(
        inputs,
        "coil length",
        "coil_length_m",
        field::COIL_LENGTH,
        t.coil_length.map(Length::si),
        found.map(|(r, c)| (r, &c.length)),
        Length::si,
        Unit::Millimetre,
        hint,
    )?;
    let x = extra_inductance(
        inputs,
        t.coil_inductance,
        found.map(|(r, c)| (r, &c.extra_inductance)),
    );
    let fl = flyer(
        catalog,
        window,
        t.flyer.as_deref(),
        t.flyer_thickness,
        "tube wall thickness",
        inputs,
        notes,
    )?;
    let r0 = t.tube_outer_radius.map(Length::si).ok_or_else(|| {
        SetupError::missing(
            field::TUBE_OUTER_RADIUS,
            "--tube-outer-radius is required for mpw-tube (e.g. 20mm)",
        )
    })?;
    inputs.quantity(
        "tube outer radius",
        "tube_outer_radius_m",
        r0,
        Unit::Millimetre,
        Provenance::Given {
            field: field::TUBE_OUTER_RADIUS,
            overrides: None,
        },
    );
    if rc <= r0 {
        let from = inputs
            .get("coil_bore_radius_m")
            .map_or(String::new(), |i| i.from.to_string());
        return Err(SetupError::invalid(
            field::COIL_BORE,
            format!(
                "the coil bore radius {} (from {from}) must exceed the tube's outer radius {} (--tube-outer-radius)\n  hint: the tube must fit inside the coil with a gap; --coil-bore is a radius, not a diameter",
                human::mm(rc),
                human::mm(r0)
            ),
        ));
    }
    if fl.thickness >= r0 {
        return Err(SetupError::invalid(
            field::FLYER_THICKNESS,
            format!(
                "the wall {} must be thinner than the tube's outer radius {} (--tube-outer-radius)",
                human::mm(fl.thickness),
                human::mm(r0)
            ),
        ));
    }
    Ok(ResolvedParts {
        model: MagneticModel::Tube,
        bank,
        plant: Plant::Tube {
            coil: CompressionCoil {
                bore_radius: Length::from_m(rc),
                length: Length::from_m(l),
                extra_inductance: Inductance::from_h(x),
            },
            tube: Tube {
                outer_radius: Length::from_m(r0),
                wall_thickness: Length::from_m(fl.thickness),
                material: fl.workpiece,
            },
        },
        coil_name: t.coil.clone(),
        flyer: fl.id,
    })
}

fn sheet_parts<'a>(
    catalog: &'a Catalog,
    s: &SheetRequest,
    window: Option<&PairWindow>,
    inputs: &mut Inputs,
    notes: &mut Vec<String>,
) -> SetupResult<ResolvedParts<'a>> {
    let bank = resolve_bank(catalog, &s.bank, inputs)?;
    let found = s
        .coil
        .as_deref()
        .map(|n| {
            catalog
                .machines
                .bar_coil(n)
                .map_err(|m| SetupError::unknown(field::COIL, m))
        })
        .transpose()?;
    let hint = "name a bar coil file with --coil";
    let l = pick(
        inputs,
        "bar coil length",
        "coil_length_m",
        field::COIL_LENGTH,
        s.coil_length.map(Length::si),
        found.map(|(r, c)| (r, &c.length)),
        Length::si,
        Unit::Millimetre,
        hint,
    )?;
    let w = pick(
        inputs,
        "bar coil width",
        "coil_width_m",
        field::COIL_WIDTH,
        s.coil_width.map(Length::si),
        found.map(|(r, c)| (r, &c.width)),
        Length::si,
        Unit::Millimetre,
        hint,
    )?;
    let x = extra_inductance(
        inputs,
        s.coil_inductance,
        found.map(|(r, c)| (r, &c.extra_inductance)),
    );
    let g0 = s.initial_gap.map(Length::si).ok_or_else(|| {
        SetupError::missing(
            field::INITIAL_GAP,
            "--initial-gap is required for mpw-sheet (coil-to-sheet insulation, e.g. 0.5mm; 0mm allowed)",
        )
    })?;
    inputs.quantity(
        "initial coil-to-sheet gap",
        "initial_gap_m",
        g0,
        Unit::Millimetre,
        Provenance::Given {
            field: field::INITIAL_GAP,
            overrides: None,
        },
    );
    let fl = flyer(
        catalog,
        window,
        s.flyer.as_deref(),
        s.flyer_thickness,
        "sheet thickness",
        inputs,
        notes,
    )?;
    Ok(ResolvedParts {
        model: MagneticModel::Sheet,
        bank,
        plant: Plant::Sheet {
            coil: BarCoil {
                length: Length::from_m(l),
                width: Length::from_m(w),
                extra_inductance: Inductance::from_h(x),
            },
            sheet: Sheet {
                thickness: Length::from_m(fl.thickness),
                material: fl.workpiece,
            },
            initial_gap: Length::from_m(g0),
        },
        coil_name: s.coil.clone(),
        flyer: fl.id,
    })
}
