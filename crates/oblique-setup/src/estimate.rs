//! One magnetic pulse estimate: resolve the request, run the core's model, check the impact
//! against the pair window at the user's angle.

use crate::error::{SetupError, SetupResult};
use crate::inputs::Inputs;
use crate::parts::resolve_parts;
use crate::request::{field, EstimateRequest};
use crate::resolve::{standoff_input, Catalog, MagneticModel};
use oblique_core::process::{estimate, IntegrationOptions, PulseEstimate, PulseSetup};
use oblique_core::units::{Angle, Velocity};
use oblique_core::{Collision, Convention, PhysicsError};
use oblique_window::advice::explain_in;
use oblique_window::classify::{classify, Classification};
use oblique_window::PairWindow;

/// A magnetic set-up resolved from a request: the model's input and where each value came
/// from. Not yet validated by the model.
#[derive(Debug, Clone)]
pub struct ResolvedSetup<'a> {
    /// Which model.
    pub model: MagneticModel,
    /// The pair window to check against, if one was named.
    pub window: Option<&'a PairWindow>,
    /// The collision angle from the geometry, if given.
    pub angle: Option<Angle>,
    /// Every input with its provenance, and warnings about them.
    pub inputs: Inputs,
    /// The model's input.
    pub setup: PulseSetup,
    /// The integration settings.
    pub options: IntegrationOptions,
}

/// A resolved set-up, its estimate and (with a window and an angle, on impact) the verdict.
#[derive(Debug, Clone)]
pub struct PulseReport<'a> {
    /// The set-up.
    pub setup: ResolvedSetup<'a>,
    /// The model's result.
    pub estimate: PulseEstimate,
    /// The window check at the user's angle, when there is an impact, a window and an angle.
    pub check: Option<Classification>,
    /// The weld probability at the estimated point under the velocity's uncertainty, with the
    /// basis of its spread, once computed (`crate::uncertainty::estimate_probability`).
    pub probability: Option<(oblique_confidence::WeldProbability, String)>,
}

/// Resolve an estimate request against the catalog: pair window, bank, coil, workpiece, charge,
/// standoff, efficiency, in that order (the first problem is reported).
///
/// `notes` receives warnings for the person as they arise; they are kept when a later step
/// fails.
///
/// # Errors
/// Unknown names, missing values, a charge above the rating, a geometry that does not hold,
/// each naming its field.
pub fn resolve_estimate<'a>(
    catalog: &'a Catalog,
    request: &EstimateRequest,
    notes: &mut Vec<String>,
) -> SetupResult<ResolvedSetup<'a>> {
    let window = catalog.pair(request.pair.as_deref())?;
    let mut inputs = Inputs::default();
    let parts = resolve_parts(catalog, &request.process, window, &mut inputs, notes)?;
    let u = parts.bank.charge(request.charge, &mut inputs)?;
    let g = request.standoff.si();
    parts.check_standoff(g)?;
    parts.compression_warning(g, &mut inputs);
    standoff_input(&mut inputs, g);
    let eta = parts.efficiency(request.efficiency, &mut inputs);
    Ok(ResolvedSetup {
        model: parts.model,
        window,
        angle: request.angle,
        inputs,
        setup: parts.setup(u, g, eta),
        options: request.integration.options(request.history),
    })
}

/// Validate the integration settings, naming both fields.
pub(crate) fn validate_options(o: &IntegrationOptions) -> SetupResult {
    o.validate()
        .map_err(|e| SetupError::invalid(field::INTEGRATION, e))
}

impl<'a> ResolvedSetup<'a> {
    /// The workpiece (wall or sheet) thickness (m).
    #[must_use]
    pub fn thickness(&self) -> f64 {
        match &self.setup {
            PulseSetup::Tube(t) => t.tube.wall_thickness.si(),
            PulseSetup::Sheet(t) => t.sheet.thickness.si(),
        }
    }

    /// Validate the set-up and the settings, and run the model. A screening estimate, not a
    /// guarantee.
    ///
    /// # Errors
    /// [`SetupError::Process`] when the model refuses the set-up, [`SetupError::Invalid`] for
    /// integration settings out of range.
    pub fn estimate(&self) -> SetupResult<PulseEstimate> {
        self.setup.validate()?;
        validate_options(&self.options)?;
        Ok(estimate(&self.setup, &self.options)?)
    }

    /// The window check of an estimate at the user's angle (with `explain`), when there is a
    /// window, an angle and an impact.
    ///
    /// # Errors
    /// [`SetupError::Physics`] when the point cannot be evaluated.
    pub fn check(&self, est: &PulseEstimate) -> SetupResult<Option<Classification>> {
        match (self.angle, self.window, est.impact_velocity()) {
            (Some(angle), Some(w), Some(vp)) => {
                let mut c = classify_impact(w, vp.si(), angle.radians())?;
                // Headroom in the convention of the model's Vp, as the sweep gives it.
                explain_in(w, &w.setup()?, &mut c, Convention::NormalToFlyer);
                Ok(Some(c))
            }
            _ => Ok(None),
        }
    }

    /// [`Self::estimate`] then [`Self::check`].
    ///
    /// # Errors
    /// As both.
    pub fn run(self) -> SetupResult<PulseReport<'a>> {
        let estimate = self.estimate()?;
        let check = self.check(&estimate)?;
        Ok(PulseReport {
            setup: self,
            estimate,
            check,
            probability: None,
        })
    }
}

/// Classify an impact of velocity `vp` (m/s, normal to the flyer as the magnetic models give
/// it) at the user's collision angle (rad) against the window.
///
/// # Errors
/// [`PhysicsError`] when the collision or the window cannot be evaluated.
pub fn classify_impact(
    window: &PairWindow,
    vp: f64,
    angle: f64,
) -> Result<Classification, PhysicsError> {
    let col = Collision::from_impact(
        Convention::NormalToFlyer,
        Velocity::from_m_s(vp),
        Angle::from_radians(angle),
    )?;
    let setup = window.setup()?;
    classify(window, &setup, &col)
}
