//! From library files and request values to a process set-up, recording where every value came
//! from (request values win over files).

use crate::error::{SetupError, SetupResult};
use crate::human;
use crate::inputs::{InputValue, Inputs, Provenance, StoredCalibration, Unit, WorkpieceMismatch};
use crate::request::{field, BankRequest, Charge, MagneticRequest, SheetRequest, TubeRequest};
use oblique_core::process::{
    BarCoil, CapacitorBank, CompressionCoil, PulseSetup, Sheet, SheetSetup, Tube, TubeSetup,
    Workpiece,
};
use oblique_core::units::{Capacitance, Inductance, Length, Resistance, Voltage};
use oblique_window::machine::{MachineRecord, Machines, Valued};
use oblique_window::{Library, PairWindow};

/// The material library (materials, pair windows) and the machine files (banks, coils,
/// explosive set-ups) that requests are resolved against.
#[derive(Debug, Clone)]
pub struct Catalog {
    /// Materials and pair windows.
    pub library: Library,
    /// Banks, coils, explosive set-ups.
    pub machines: Machines,
}

impl Catalog {
    /// Both libraries, already loaded (their warnings are the caller's to show).
    #[must_use]
    pub fn new(library: Library, machines: Machines) -> Self {
        Self { library, machines }
    }

    /// The built-in libraries only.
    ///
    /// # Errors
    /// [`SetupError::Library`] if a built-in file does not load (a build defect).
    pub fn builtin() -> SetupResult<Self> {
        Ok(Self {
            library: Library::load(&[])?,
            machines: Machines::load(&[])?,
        })
    }

    /// The pair window of this name, if a name is given.
    ///
    /// # Errors
    /// [`SetupError::Unknown`] for a name the library does not hold.
    pub fn pair(&self, name: Option<&str>) -> SetupResult<Option<&PairWindow>> {
        name.map(|n| {
            self.library
                .pair(n)
                .map_err(|m| SetupError::unknown(field::PAIR, m))
        })
        .transpose()
    }
}

/// The magnetic pulse models.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MagneticModel {
    /// A tube compressed onto a rod by a single-turn coil.
    Tube,
    /// A sheet driven off a flat one-turn bar coil.
    Sheet,
}

impl MagneticModel {
    /// The model's id (`mpw-tube`, `mpw-sheet`), as stored with calibrations.
    #[must_use]
    pub fn id(self) -> &'static str {
        match self {
            MagneticModel::Tube => "mpw-tube",
            MagneticModel::Sheet => "mpw-sheet",
        }
    }

    /// What the model describes, in a few words.
    #[must_use]
    pub fn title(self) -> &'static str {
        match self {
            MagneticModel::Tube => "tube compression in a single-turn coil",
            MagneticModel::Sheet => "sheet driven off a flat one-turn bar coil",
        }
    }

    /// The model's assumptions, in one line starting `assumptions: `.
    #[must_use]
    pub fn assumptions(self) -> &'static str {
        match self {
            MagneticModel::Tube => crate::ASSUMPTIONS_TUBE,
            MagneticModel::Sheet => crate::ASSUMPTIONS_SHEET,
        }
    }
}

/// The bank and where its values came from.
#[derive(Debug, Clone)]
pub struct ResolvedBank<'a> {
    /// The bank (rating included when known).
    pub bank: CapacitorBank,
    /// The machine file, if one was named.
    pub record: Option<&'a MachineRecord>,
    /// Where the rating came from, if there is one.
    pub rating_from: Option<String>,
    /// Fields whose values overrode the file's.
    pub overrides: Vec<&'static str>,
}

impl ResolvedBank<'_> {
    /// Refuse a charging voltage above the bank's rating, naming `field` and the rating's
    /// origin.
    ///
    /// # Errors
    /// [`SetupError::Invalid`] above the rating.
    pub fn check_rating(&self, u: f64, field: &'static str) -> SetupResult {
        if let Some(rating) = self.bank.max_voltage {
            if u > rating.si() * (1.0 + 1e-12) {
                return Err(SetupError::above_rating(
                    field,
                    u,
                    rating.si(),
                    self.rating_from.as_deref().unwrap_or("the bank"),
                ));
            }
        }
        Ok(())
    }

    /// The charging voltage of `charge` (from the energy through the capacitance), checked
    /// against the rating and recorded.
    ///
    /// # Errors
    /// [`SetupError::Invalid`] above the rating.
    pub(crate) fn charge(&self, charge: Charge, inputs: &mut Inputs) -> SetupResult<Voltage> {
        let (u, field) = match charge {
            Charge::Voltage(u) => (u.si(), field::CHARGE_VOLTAGE),
            Charge::Energy(e) => (
                (2.0 * e.si() / self.bank.capacitance.si()).sqrt(),
                field::ENERGY,
            ),
        };
        self.check_rating(u, field)?;
        inputs.quantity(
            "charging voltage",
            "charge_voltage_v",
            u,
            Unit::Kilovolt,
            Provenance::Given {
                field,
                overrides: None,
            },
        );
        Ok(Voltage::from_v(u))
    }
}

fn file_from(rec: &MachineRecord, source: &str) -> Provenance {
    Provenance::File {
        name: rec.name.clone(),
        source: source.to_string(),
    }
}

/// Pick a given value over a file value; record it; a message naming the field when neither
/// exists.
#[allow(clippy::too_many_arguments)]
fn pick<T: Copy>(
    inputs: &mut Inputs,
    label: &'static str,
    key: &'static str,
    field: &'static str,
    given: Option<f64>,
    file: Option<(&MachineRecord, &Valued<T>)>,
    si: impl Fn(T) -> f64,
    unit: Unit,
    file_hint: &str,
) -> SetupResult<f64> {
    let (v, from) = match (given, file) {
        (Some(v), Some((rec, _))) => (
            v,
            Provenance::Given {
                field,
                overrides: Some(rec.name.clone()),
            },
        ),
        (Some(v), None) => (
            v,
            Provenance::Given {
                field,
                overrides: None,
            },
        ),
        (None, Some((rec, f))) => (si(f.value), file_from(rec, &f.source)),
        (None, None) => {
            return Err(SetupError::missing(
                field,
                format!("{field} is required here ({label}): give it, or {file_hint}"),
            ))
        }
    };
    inputs.quantity(label, key, v, unit, from);
    Ok(v)
}

/// Resolve the bank from its file and values.
///
/// # Errors
/// An unknown or wrong file, a value neither given nor in the file.
pub fn resolve_bank<'a>(
    catalog: &'a Catalog,
    f: &BankRequest,
    inputs: &mut Inputs,
) -> SetupResult<ResolvedBank<'a>> {
    let found = f
        .machine
        .as_deref()
        .map(|n| {
            catalog
                .machines
                .bank(n)
                .map_err(|m| SetupError::unknown(field::MACHINE, m))
        })
        .transpose()?;
    let hint = "name a bank file with --machine";
    let c = pick(
        inputs,
        "bank capacitance",
        "capacitance_f",
        field::CAPACITANCE,
        f.capacitance.map(Capacitance::si),
        found.map(|(r, b)| (r, &b.capacitance)),
        Capacitance::si,
        Unit::Microfarad,
        hint,
    )?;
    let rating = match (f.rated_voltage, found) {
        (None, None) => {
            inputs.push(
                "bank rated voltage",
                "rated_voltage_v",
                InputValue::Unknown,
                Provenance::NotGiven("no rating check (give --rated-voltage or --machine)"),
            );
            None
        }
        _ => Some(pick(
            inputs,
            "bank rated voltage",
            "rated_voltage_v",
            field::RATED_VOLTAGE,
            f.rated_voltage.map(Voltage::si),
            found.map(|(r, b)| (r, &b.max_voltage)),
            Voltage::si,
            Unit::Kilovolt,
            hint,
        )?),
    };
    let l = pick(
        inputs,
        "bank inductance",
        "bank_inductance_h",
        field::BANK_INDUCTANCE,
        f.inductance.map(Inductance::si),
        found.map(|(r, b)| (r, &b.inductance)),
        Inductance::si,
        Unit::Nanohenry,
        "name a bank file with --machine (or derive L from a ring-down record: `oblique calibrate ring-down`)",
    )?;
    let r = pick(
        inputs,
        "bank resistance",
        "bank_resistance_ohm",
        field::BANK_RESISTANCE,
        f.resistance.map(Resistance::si),
        found.map(|(r, b)| (r, &b.resistance)),
        Resistance::si,
        Unit::Milliohm,
        "name a bank file with --machine (or derive R from a ring-down record: `oblique calibrate ring-down`)",
    )?;
    let rating_from =
        rating.and_then(|_| inputs.get("rated_voltage_v").map(|i| i.from.to_string()));
    let mut overrides = Vec::new();
    if found.is_some() {
        for (name, given) in [
            (field::CAPACITANCE, f.capacitance.is_some()),
            (field::RATED_VOLTAGE, f.rated_voltage.is_some()),
            (field::BANK_INDUCTANCE, f.inductance.is_some()),
            (field::BANK_RESISTANCE, f.resistance.is_some()),
        ] {
            if given {
                overrides.push(name);
            }
        }
    }
    Ok(ResolvedBank {
        bank: CapacitorBank {
            capacitance: Capacitance::from_f(c),
            max_voltage: rating.map(Voltage::from_v),
            inductance: Inductance::from_h(l),
            resistance: Resistance::from_ohm(r),
        },
        record: found.map(|(r, _)| r),
        rating_from,
        overrides,
    })
}

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

/// Record the standoff as given.
pub(crate) fn standoff_input(inputs: &mut Inputs, g: f64) {
    inputs.quantity(
        "standoff",
        "standoff_m",
        g,
        Unit::Millimetre,
        Provenance::Given {
            field: field::STANDOFF,
            overrides: None,
        },
    );
}
