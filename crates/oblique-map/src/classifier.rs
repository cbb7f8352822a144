//! A lean per-point classifier for the weld map: the same verdicts, binding limits and margins as
//! `oblique_window::classify::classify_with_jetting`, without its per-point allocations (the
//! reason text, the criterion and boundary vectors), and with the jetting critical angle taken
//! from an `oblique_core::jetting_table::JettingTable`.
//!
//! Exactness: every limit is computed with the same floating-point operations as the core and
//! window crates (the tests below compare bit for bit against `classify_with_jetting` given the
//! same jetting assessment). The table is used only where it cannot change a verdict: a point
//! whose angle lies within the table's error bound of the interpolated critical angle is
//! re-solved directly, so the jetting verdict is always that of the direct solve; only the
//! reported critical angle and jetting margin of the other points carry the table's error
//! (at most `JettingTable::ERROR_BOUND_DEG`).
//!
//! The validity domain (`oblique_core::ValidityDomain`) is checked with the same operations
//! as the core, so a row outside it is `outside-domain` exactly when `check` says so; its
//! limits are still computed (extrapolated) and written.

use oblique_core::criteria::{
    deribas_coefficient, melting_coefficient, melting_divisor, relative_margin,
};
use oblique_core::hugoniot::impedance_match;
use oblique_core::jetting::{critical_angle, JettingAssessment, JettingRegime, MixedRule};
use oblique_core::jetting_table::{JettingTable, Lookup};
use oblique_core::units::{Angle, Velocity};
use oblique_core::{Collision, Convention, CriterionId, DomainQuantity, PairSetup, PhysicsError};
use oblique_window::boundary::{Plane, WeldSide};
use oblique_window::classify::{limit_label, LimitRef, Prediction};
use oblique_window::PairWindow;
use std::sync::OnceLock;

/// What the velocity column holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum VelocityKind {
    /// Impact (flyer) velocity Vp in the window's convention.
    Impact,
    /// Collision-point velocity Vc (geometry; the same in every convention).
    Collision,
}

/// How the jetting critical angle is obtained.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum JettingMode {
    /// Table with direct re-solve near the limit (the default).
    Table,
    /// Direct solve for every point.
    Direct,
}

/// One decisive limit of the window, in output order.
#[derive(Debug, Clone)]
pub struct LimitInfo {
    /// Which limit.
    pub limit: LimitRef,
    /// Label as in `check` (criterion id, or `boundary "label"`).
    pub label: String,
    /// Short id for the per-row output: the criterion id, or `boundary-N` (1-based).
    pub id: String,
    /// Column name stem: `margin_deribas_lower`, `margin_boundary_1`, ...
    pub column: String,
    /// Unit of the margin as computed (deg, m/s or Pa).
    pub unit: &'static str,
}

/// The output unit of a margin column, which fixes its factor and decimals.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MarginUnit {
    /// m/s, 1 decimal.
    MetresPerSecond,
    /// deg, 3 decimals.
    Degrees,
    /// GPa (from Pa), 3 decimals.
    Gigapascals,
}

impl MarginUnit {
    /// The unit as written in the map.
    pub fn as_str(self) -> &'static str {
        match self {
            Self::MetresPerSecond => "m/s",
            Self::Degrees => "deg",
            Self::Gigapascals => "GPa",
        }
    }

    /// Factor from the computed unit, and decimals.
    pub fn factor_decimals(self) -> (f64, usize) {
        match self {
            Self::MetresPerSecond => (1.0, 1),
            Self::Degrees => (1.0, 3),
            Self::Gigapascals => (1e-9, 3),
        }
    }
}

impl LimitInfo {
    /// The unit of this limit's margin in the map (GPa for a pressure, else as computed).
    pub fn margin_unit(&self) -> MarginUnit {
        match self.unit {
            "Pa" => MarginUnit::Gigapascals,
            "deg" => MarginUnit::Degrees,
            _ => MarginUnit::MetresPerSecond,
        }
    }

    /// This limit's margin column in the map, unit included (`margin_jetting[deg]`).
    pub fn map_column(&self) -> String {
        format!("{}[{}]", self.column, self.margin_unit().as_str())
    }
}

/// The margin column stem of a criterion (`margin_deribas_lower`): what `--columns` names it.
pub(crate) fn criterion_column(id: CriterionId) -> String {
    format!("margin_{}", id.as_str().replace('-', "_"))
}

struct FastBoundary {
    plane: Plane,
    side: WeldSide,
    /// (independent, dependent) in the units of `Boundary::evaluate`: (m/s, deg) for
    /// above/below, (deg, m/s) for left/right.
    points: Vec<(f64, f64)>,
}

/// The classification of one point. Margins are in `Classifier::limits` order, in the units of
/// `LimitInfo::unit`; NaN for a boundary that does not span the point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Point {
    /// Impact velocity Vp (window convention), m/s.
    pub vp: f64,
    /// Collision-point velocity Vc, m/s.
    pub vc: f64,
    /// Flow velocity Vf, m/s.
    pub vf: f64,
    /// Collision angle, degrees.
    pub beta_deg: f64,
    /// Impact pressure, Pa.
    pub pressure: f64,
    /// Jetting critical angle used, degrees (0 in the subsonic regimes).
    pub jetting_deg: f64,
    /// Regime of the jetting test.
    pub regime: JettingRegime,
    /// Which streams flow in above their C0: bit 0 the flyer, bit 1 the parent (1 or 2: a
    /// mixed case).
    pub sonic: u8,
    /// The bounds of the validity domain the point misses: bit k for quantity k of
    /// `DomainQuantity::ALL`; 0 inside the domain.
    pub domain_exits: u8,
    /// The jetting test was solved directly for this point.
    pub jetting_direct: bool,
    /// The verdict.
    pub verdict: Prediction,
    /// Index into `Classifier::limits` of the binding limit.
    pub binding: Option<usize>,
    /// Its relative margin.
    pub binding_relative: f64,
    /// Some boundary does not span the point.
    pub outside_trial_data: bool,
    /// Bit k set: limit k (index into `Classifier::limits`) fails, for k below 64 (a limit from
    /// 64 on is a user boundary, which fails exactly when its margin is negative).
    pub failing: u64,
}

impl Point {
    /// Whether limit `k` fails at this point (`margins` as the classification wrote them).
    #[inline]
    pub fn fails(&self, k: usize, margins: &[f64]) -> bool {
        match 1u64.checked_shl(k as u32) {
            Some(bit) => self.failing & bit != 0,
            // Only user boundaries come this far: they fail exactly when the margin is below 0.
            None => margins.get(k).is_some_and(|m| *m < 0.0),
        }
    }
}

/// Everything fixed for a window, precomputed once.
pub struct Classifier {
    setup: PairSetup,
    convention: Convention,
    kind: VelocityKind,
    cfg: oblique_core::CriteriaConfig,
    mode: JettingMode,
    /// Built (lazily, node by node) on the first row with supersonic inflow (never for all-subsonic inputs); `None`
    /// inside if the build failed, and then every supersonic row is solved directly.
    table: OnceLock<Option<JettingTable>>,
    /// The governing (larger) Deribas coefficient k sqrt(Hv / rho) of the two plates: the
    /// limit is this over Vc, and dividing by the same Vc keeps the order, so the result is
    /// bit for bit the larger of the two plates' limits.
    deribas: f64,
    /// The governing (smaller) Wittman melting coefficient; the limit is this over
    /// `melting_divisor(Vc)`, as for `deribas`.
    melting: f64,
    /// The governing (larger) strength limit of the two plates, m/s.
    strength: f64,
    /// The governing (larger) pressure limit of the two plates, Pa.
    pressure: f64,
    boundaries: Vec<FastBoundary>,
    /// The impedance match's constants, in the operations of `oblique_core::hugoniot::
    /// impedance_match` (see [`Impedance`]).
    impedance: Impedance,
    /// The decisive limits, in the order `classify_with_jetting` ranks them.
    pub limits: Vec<LimitInfo>,
    criteria: Vec<CriterionId>,
    /// The validity domain's bounds, (min, max) per quantity of `DomainQuantity::ALL` (open
    /// where the domain has no bound; the Mach bounds as speeds, bound times C0, as the core
    /// compares them), and the bits of the bounds the pair itself misses.
    domain: [(f64, f64); 5],
    pair_exits: u8,
    /// C0 of the flyer and of the parent, m/s.
    c0: (f64, f64),
}

impl Classifier {
    /// Precompute for `window` (criteria already final). The jetting table (mode
    /// [`JettingMode::Table`]) is created when the first row with supersonic inflow needs it,
    /// and solves each node the first time a row falls in one of its cells.
    ///
    /// # Errors
    /// A physics error in the window's materials or constants.
    pub fn new(
        window: &PairWindow,
        kind: VelocityKind,
        mode: JettingMode,
    ) -> Result<Self, PhysicsError> {
        let setup = window.setup()?;
        let cfg = window.criteria.clone();
        cfg.validate()?;
        let (df, dp) = (
            deribas_coefficient(&setup.flyer, cfg.deribas_k),
            deribas_coefficient(&setup.parent, cfg.deribas_k),
        );
        let h = setup.flyer_thickness;
        let (mf, mp) = (
            melting_coefficient(&setup.flyer, h, cfg.wittman_n, cfg.wittman_form),
            melting_coefficient(&setup.parent, h, cfg.wittman_n, cfg.wittman_form),
        );
        let strength = (
            oblique_core::criteria::strength_velocity(&setup.flyer),
            oblique_core::criteria::strength_velocity(&setup.parent),
        );
        let pressure = (
            cfg.hel_multiple * setup.flyer.hugoniot_elastic_limit().si(),
            cfg.hel_multiple * setup.parent.hugoniot_elastic_limit().si(),
        );
        let criteria: Vec<CriterionId> = CriterionId::ALL
            .into_iter()
            .filter(|id| {
                *id != CriterionId::WavyTransition
                    && match id {
                        CriterionId::DeribasLower => cfg.deribas_enabled,
                        CriterionId::StrengthLower => cfg.strength_enabled,
                        CriterionId::PressureLower => cfg.pressure_enabled,
                        CriterionId::MeltingUpper => cfg.melting_enabled,
                        CriterionId::Jetting => cfg.jetting_enabled,
                        CriterionId::WavyTransition => false,
                    }
            })
            .collect();
        let mut limits: Vec<LimitInfo> = criteria
            .iter()
            .map(|id| LimitInfo {
                limit: LimitRef::Criterion(*id),
                label: id.as_str().to_string(),
                id: id.as_str().to_string(),
                column: criterion_column(*id),
                unit: match id {
                    CriterionId::DeribasLower | CriterionId::Jetting => "deg",
                    CriterionId::PressureLower => "Pa",
                    _ => "m/s",
                },
            })
            .collect();
        let boundaries: Vec<FastBoundary> = window
            .boundaries
            .iter()
            .map(|b| FastBoundary {
                plane: b.plane,
                side: b.weld_side,
                points: b
                    .points
                    .iter()
                    .map(|(x, a)| {
                        if b.weld_side.along_velocity() {
                            (x.si(), a.degrees())
                        } else {
                            (a.degrees(), x.si())
                        }
                    })
                    .collect(),
            })
            .collect();
        for (i, b) in window.boundaries.iter().enumerate() {
            let limit = LimitRef::Boundary(i);
            limits.push(LimitInfo {
                label: limit_label(window, &limit),
                id: format!("boundary-{}", i + 1),
                limit,
                column: format!("margin_boundary_{}", i + 1),
                unit: if b.weld_side.along_velocity() {
                    "deg"
                } else {
                    "m/s"
                },
            });
        }
        let mut domain = [(f64::NEG_INFINITY, f64::INFINITY); 5];
        let mut pair_exits = 0u8;
        let c0 = (setup.flyer.hugoniot.c0.si(), setup.parent.hugoniot.c0.si());
        for (k, q) in DomainQuantity::ALL.into_iter().enumerate() {
            if let Some(b) = window.domain.bound(q) {
                domain[k] = match q {
                    // The same products as `ValidityDomain::raw`.
                    DomainQuantity::ParentMach => (b.min * c0.1, b.max * c0.1),
                    DomainQuantity::FlyerMach => (b.min * c0.0, b.max * c0.0),
                    _ => (b.min, b.max),
                };
            }
        }
        for e in window.domain.pair_exits(&setup) {
            if let Some(k) = DomainQuantity::ALL.iter().position(|q| *q == e.quantity) {
                pair_exits |= 1 << k;
            }
        }
        let impedance = Impedance::new(&setup.flyer.hugoniot, &setup.parent.hugoniot);
        Ok(Self {
            impedance,
            domain,
            pair_exits,
            c0,
            setup,
            convention: window.convention,
            kind,
            cfg,
            mode,
            table: OnceLock::new(),
            deribas: if df >= dp { df } else { dp },
            melting: if mf <= mp { mf } else { mp },
            strength: if strength.0 >= strength.1 {
                strength.0
            } else {
                strength.1
            },
            pressure: if pressure.0 >= pressure.1 {
                pressure.0
            } else {
                pressure.1
            },
            boundaries,
            limits,
            criteria,
        })
    }

    /// What the velocity column holds.
    pub fn kind(&self) -> VelocityKind {
        self.kind
    }

    /// Whether the window has user boundaries (then `outside_trial_data` is meaningful).
    pub fn has_boundaries(&self) -> bool {
        !self.boundaries.is_empty()
    }

    /// Whether the jetting criterion is on.
    pub fn jetting_enabled(&self) -> bool {
        self.cfg.jetting_enabled
    }

    /// The jetting table, if it was built (some row had supersonic inflow).
    pub fn table(&self) -> Option<&JettingTable> {
        self.table.get().and_then(Option::as_ref)
    }

    /// Whether the table is used at all (jetting on, not `--exact-jetting`).
    pub fn uses_table(&self) -> bool {
        self.cfg.jetting_enabled && self.mode == JettingMode::Table
    }

    fn table_for_supersonic(&self) -> Option<&JettingTable> {
        if !self.uses_table() {
            return None;
        }
        self.table
            .get_or_init(|| {
                // Lazy: only the nodes the data visit are solved (0 threads = on demand).
                JettingTable::new(
                    self.setup.flyer.hugoniot,
                    self.setup.parent.hugoniot,
                    self.cfg.mixed_jetting,
                    0,
                )
                .ok()
            })
            .as_ref()
    }

    /// The collision for a velocity (m/s, of this classifier's kind) and angle (rad).
    ///
    /// # Errors
    /// Out-of-domain velocity or angle.
    #[inline]
    pub fn collision(&self, velocity: f64, angle_rad: f64) -> Result<Collision, PhysicsError> {
        let beta = Angle::from_radians(angle_rad);
        let deg = beta.degrees();
        if velocity.is_finite() && velocity > 0.0 && deg.is_finite() && deg > 0.0 && deg < 90.0 {
            return Ok(self.collision_in_domain(velocity, beta));
        }
        match self.kind {
            VelocityKind::Impact => {
                Collision::from_impact(self.convention, Velocity::from_m_s(velocity), beta)
            }
            VelocityKind::Collision => Collision::from_collision_velocity(
                self.convention,
                Velocity::from_m_s(velocity),
                beta,
            ),
        }
    }

    /// [`Collision::from_impact`] or [`Collision::from_collision_velocity`] for a velocity
    /// and angle already checked to be in their domain: the same operations on the same values
    /// (the same bits, tested), without the checks and their error values.
    #[inline(always)]
    fn collision_in_domain(&self, velocity: f64, beta: Angle) -> Collision {
        // Vc / Vp and Vf / Vc as `Convention` computes them (one match, so that the sine and
        // cosine of one angle can be one libm call, as in the core).
        let (vc_over_vp, vf_over_vc) = match self.convention {
            Convention::Bisector => (1.0 / (2.0 * (beta.radians() / 2.0).sin()), 1.0),
            Convention::NormalToFlyer => (1.0 / beta.sin(), beta.cos()),
            Convention::NormalToParent => (1.0 / beta.tan(), 1.0 / beta.cos()),
        };
        let (vp, vc) = match self.kind {
            VelocityKind::Impact => (velocity, velocity * vc_over_vp),
            VelocityKind::Collision => (velocity / vc_over_vp, velocity),
        };
        Collision {
            convention: self.convention,
            impact_velocity: Velocity::from_m_s(vp),
            angle: beta,
            collision_velocity: Velocity::from_m_s(vc),
            flow_velocity: Velocity::from_m_s(vc * vf_over_vc),
        }
    }

    /// The jetting assessment of a collision, and whether it was solved directly. Inlined into
    /// the row so that the assessment stays in registers (returned through memory it was
    /// written field by field and read back whole, a store-forwarding stall); the direct solve
    /// and the mixed case are out of line.
    #[inline(always)]
    fn jetting(&self, c: &Collision) -> Result<(JettingAssessment, bool), PhysicsError> {
        let vf = c.flow_velocity;
        let vc = c.collision_velocity;
        // The subsonic regimes, exactly as the direct solve decides them (no table needed).
        let positive = vf.si() > 0.0 && vc.si() > 0.0 && vf.si().is_finite() && vc.si().is_finite();
        let (fs, ps) = (vf.si() > self.c0.0, vc.si() > self.c0.1);
        if positive && !self.cfg.jetting_enabled {
            return Ok((
                Self::jetting_not_asked(fs, ps, self.cfg.mixed_jetting),
                false,
            ));
        }
        if positive && !ps {
            if fs && self.cfg.mixed_jetting == MixedRule::SupersonicSidePolar {
                return self.mixed_jetting(c);
            }
            return Ok((
                JettingAssessment::any_angle(JettingRegime::SubsonicParent, fs, false),
                false,
            ));
        }
        if positive && !fs {
            if self.cfg.mixed_jetting == MixedRule::SupersonicSidePolar {
                return self.mixed_jetting(c);
            }
            return Ok((
                JettingAssessment::any_angle(JettingRegime::SubsonicFlyer, false, true),
                false,
            ));
        }
        if let Some(t) = self.table_for_supersonic() {
            match t.lookup(vf.si(), vc.si()) {
                Lookup::Subsonic(regime) => {
                    return Ok((JettingAssessment::any_angle(regime, fs, ps), false))
                }
                Lookup::Table(rad) => {
                    let crit = Angle::from_radians(rad);
                    if (c.angle.degrees() - crit.degrees()).abs() > JettingTable::ERROR_BOUND_DEG {
                        return Ok((
                            JettingAssessment::from_polar(
                                JettingRegime::Supersonic,
                                rad,
                                true,
                                true,
                                None,
                            ),
                            false,
                        ));
                    }
                }
                Lookup::Mixed(..) | Lookup::OutsideDomain => {}
            }
        }
        self.jetting_direct(c)
    }

    /// The jetting assessment of a window whose jetting criterion is off: nothing reads its
    /// critical angle (no margin, no ranking, no column), so it is not solved and is NaN. The
    /// regime and which streams flow in above their C0 are those of the direct solve, decided by
    /// the same comparisons (`ShockPolar::new`: supersonic iff V > C0; the parent tested first),
    /// so the summary's counts of supersonic and mixed rows stay exact. Before, every row with a
    /// supersonic stream was solved directly here: 1.2 us a row on average over the benchmark
    /// file, 20 times the whole classification (bench/classify).
    #[inline(always)]
    fn jetting_not_asked(fs: bool, ps: bool, rule: MixedRule) -> JettingAssessment {
        let regime = match (fs, ps) {
            (true, true) => JettingRegime::Supersonic,
            (_, false) => JettingRegime::SubsonicParent,
            (false, true) => JettingRegime::SubsonicFlyer,
        };
        JettingAssessment {
            regime,
            critical_angle: Angle::from_radians(f64::NAN),
            flyer_supersonic: fs,
            parent_supersonic: ps,
            none_below_90: false,
            mixed_rule: (fs != ps).then_some(rule),
        }
    }

    /// The critical angle solved directly (near the limit, outside the table, or without one).
    #[cold]
    #[inline(never)]
    fn jetting_direct(&self, c: &Collision) -> Result<(JettingAssessment, bool), PhysicsError> {
        let direct = critical_angle(
            &self.setup.flyer.hugoniot,
            &self.setup.parent.hugoniot,
            c.flow_velocity,
            c.collision_velocity,
            self.cfg.mixed_jetting,
        )?;
        Ok((direct, true))
    }

    /// The mixed case under the conservative polar rule: the supersonic stream's own polar,
    /// from the table's one-dimensional part, re-solved directly near the limit.
    #[cold]
    #[inline(never)]
    fn mixed_jetting(&self, c: &Collision) -> Result<(JettingAssessment, bool), PhysicsError> {
        let (vf, vc) = (c.flow_velocity, c.collision_velocity);
        if let Some(t) = self.table_for_supersonic() {
            if let Lookup::Mixed(regime, rad) = t.lookup_mixed(vf.si(), vc.si()) {
                let crit = Angle::from_radians(rad);
                if (c.angle.degrees() - crit.degrees()).abs() > JettingTable::ERROR_BOUND_DEG {
                    return Ok((
                        JettingAssessment::from_polar(
                            regime,
                            rad,
                            vf.si() > self.c0.0,
                            vc.si() > self.c0.1,
                            Some(MixedRule::SupersonicSidePolar),
                        ),
                        false,
                    ));
                }
            }
        }
        self.jetting_direct(c)
    }

    /// The bounds of the validity domain the point (Vp, Vc, Vf m/s, beta deg) misses, as bits
    /// of `DomainQuantity::ALL`: the same values and comparisons as
    /// `oblique_core::ValidityDomain::check` (`ValidityDomain::raw`).
    #[inline(always)]
    fn domain_exits(&self, vp: f64, vc: f64, vf: f64, beta_deg: f64) -> u8 {
        let d = &self.domain;
        let out = |v: f64, (lo, hi): (f64, f64)| u8::from(!(v >= lo && v <= hi));
        self.pair_exits
            | out(beta_deg, d[0])
            | out(vp, d[1]) << 1
            | out(vc, d[2]) << 2
            | out(vf, d[3]) << 3
    }

    /// Classify one point; `margins` receives one value per limit (resized to one slot per limit and overwritten).
    ///
    /// # Errors
    /// As `classify_with_jetting` (a relation that cannot be evaluated), plus out-of-domain
    /// velocity or angle.
    #[inline]
    pub fn classify(
        &self,
        velocity: f64,
        angle_rad: f64,
        margins: &mut Vec<f64>,
    ) -> Result<Point, PhysicsError> {
        let beta = Angle::from_radians(angle_rad);
        let deg = beta.degrees();
        // In the domain (the map's rows always are): the collision in registers, no error value
        // to pass through memory.
        let c = if velocity.is_finite() && velocity > 0.0 && deg > 0.0 && deg < 90.0 {
            self.collision_in_domain(velocity, beta)
        } else {
            self.collision(velocity, angle_rad)?
        };
        let (jet, direct) = self.jetting(&c)?;
        self.classify_collision_inline(&c, jet, direct, margins)
    }

    /// Classify a point given by its impact velocity Vp (m/s, window convention) whatever the
    /// velocity kind of the input (for the window-plane plot).
    ///
    /// # Errors
    /// As [`Self::classify`].
    pub fn classify_impact(
        &self,
        vp: f64,
        angle_rad: f64,
        margins: &mut Vec<f64>,
    ) -> Result<Point, PhysicsError> {
        let c = Collision::from_impact(
            self.convention,
            Velocity::from_m_s(vp),
            Angle::from_radians(angle_rad),
        )?;
        let (jet, direct) = self.jetting(&c)?;
        self.classify_collision(&c, jet, direct, margins)
    }

    /// Classify a collision (already in the window's convention) with a given jetting
    /// assessment.
    ///
    /// # Errors
    /// As `classify_with_jetting`.
    pub fn classify_collision(
        &self,
        c: &Collision,
        jet: JettingAssessment,
        jetting_direct: bool,
        margins: &mut Vec<f64>,
    ) -> Result<Point, PhysicsError> {
        self.classify_collision_inline(c, jet, jetting_direct, margins)
    }

    /// [`Self::classify_collision`] in line (the map's rows): the assessment and the point stay
    /// in registers rather than passing through memory.
    #[inline(always)]
    fn classify_collision_inline(
        &self,
        c: &Collision,
        jet: JettingAssessment,
        jetting_direct: bool,
        margins: &mut Vec<f64>,
    ) -> Result<Point, PhysicsError> {
        // One slot per limit, written by index (sized once, then reused row after row: the
        // resize, out of line, only when the length differs).
        if margins.len() != self.limits.len() {
            margins.resize(self.limits.len(), f64::NAN);
        }
        let (f, p) = (&self.setup.flyer, &self.setup.parent);
        let vp = c.impact_velocity;
        let vc = c.collision_velocity;
        let beta_deg = c.angle.degrees();
        let pressure = self.impedance.pressure(vp.si()).ok_or_else(|| {
            // The checked relation words the error.
            impedance_match(&f.hugoniot, &p.hugoniot, vp)
                .err()
                .unwrap_or(PhysicsError::NoConvergence {
                    what: "impedance matching",
                    iterations: 0,
                })
        })?;
        let mut rank = Ranking::new();
        let at = (vp.si(), vc.si(), beta_deg);
        self.criteria_margins(at, pressure, &jet, margins, &mut rank)?;
        let outside_trial_data = self.boundary_margins(at, margins, &mut rank);
        let domain_exits = self.domain_exits(vp.si(), vc.si(), c.flow_velocity.si(), beta_deg);
        Ok(Point {
            vp: vp.si(),
            vc: vc.si(),
            vf: c.flow_velocity.si(),
            beta_deg,
            pressure,
            jetting_deg: if jet.none_below_90 {
                f64::NAN
            } else {
                jet.critical_angle.degrees()
            },
            regime: jet.regime,
            sonic: u8::from(jet.flyer_supersonic) | u8::from(jet.parent_supersonic) << 1,
            domain_exits,
            jetting_direct,
            verdict: if domain_exits == 0 {
                rank.verdict()
            } else {
                Prediction::OutsideDomain
            },
            binding: rank.best.map(|b| b.0),
            binding_relative: rank.best.map_or(f64::NAN, |b| b.1),
            outside_trial_data,
            failing: rank.failing,
        })
    }

    /// A head-on row (collision angle 0): no collision point, no limit applies; the verdict
    /// `head-on` (not welded), the 1-D impact pressure at `vp` (m/s, the impact velocity:
    /// normal to both plates in every convention), every margin NaN.
    ///
    /// # Errors
    /// A velocity the impedance matching refuses.
    #[cold]
    pub fn head_on(&self, vp: f64, margins: &mut Vec<f64>) -> Result<Point, PhysicsError> {
        margins.clear();
        margins.resize(self.limits.len(), f64::NAN);
        let impact = impedance_match(
            &self.setup.flyer.hugoniot,
            &self.setup.parent.hugoniot,
            Velocity::from_m_s(vp),
        )?;
        Ok(Point {
            vp,
            vc: f64::NAN,
            vf: f64::NAN,
            beta_deg: 0.0,
            pressure: impact.pressure.si(),
            jetting_deg: f64::NAN,
            regime: JettingRegime::SubsonicParent,
            sonic: 0,
            domain_exits: 0,
            jetting_direct: false,
            verdict: Prediction::HeadOn,
            binding: None,
            binding_relative: f64::NAN,
            outside_trial_data: false,
            failing: 0,
        })
    }

    /// The margins of the enabled criteria at (Vp m/s, Vc m/s, beta deg), each taken into
    /// `rank` in the order `classify_with_jetting` ranks them (`CriterionId::ALL`): a straight
    /// line of tests on the window's switches, each well predicted, rather than a loop with a
    /// match on the criterion.
    #[inline(always)]
    fn criteria_margins(
        &self,
        (vp, vc, beta_deg): (f64, f64, f64),
        pressure: f64,
        jet: &JettingAssessment,
        margins: &mut [f64],
        rank: &mut Ranking,
    ) -> Result<(), PhysicsError> {
        let cfg = &self.cfg;
        let mut k = 0;
        // (value, limit, margin, satisfied, a ceiling) of the next criterion, as k.
        let mut take = |value: f64, limit: f64, margin: f64, satisfied: bool, ceiling: bool| {
            if !(value.is_finite() && limit.is_finite()) {
                return Err(PhysicsError::NoConvergence {
                    what: "criterion evaluation (non-finite value)",
                    iterations: 0,
                });
            }
            if let Some(slot) = margins.get_mut(k) {
                *slot = margin;
            }
            rank.consider(k, relative_margin(margin, limit), satisfied, ceiling);
            k += 1;
            Ok(())
        };
        if cfg.deribas_enabled {
            let limit = (self.deribas / vc).to_degrees();
            take(beta_deg, limit, beta_deg - limit, beta_deg >= limit, false)?;
        }
        if cfg.strength_enabled {
            let limit = self.strength;
            take(vp, limit, vp - limit, vp >= limit, false)?;
        }
        if cfg.pressure_enabled {
            let limit = self.pressure;
            take(pressure, limit, pressure - limit, pressure >= limit, false)?;
        }
        if cfg.melting_enabled {
            let limit = self.melting / melting_divisor(vc, cfg.wittman_form);
            take(vp, limit, limit - vp, vp <= limit, true)?;
        }
        if cfg.jetting_enabled {
            let limit = jet.critical_angle.degrees();
            take(beta_deg, limit, beta_deg - limit, beta_deg > limit, false)?;
        }
        Ok(())
    }

    /// The margins of the user boundaries at (Vp m/s, Vc m/s, beta deg), taken into `rank`
    /// after the criteria; whether some boundary does not span the point.
    #[inline(always)]
    fn boundary_margins(
        &self,
        (vp, vc, deg): (f64, f64, f64),
        margins: &mut [f64],
        rank: &mut Ranking,
    ) -> bool {
        let mut outside = false;
        let n_crit = self.criteria.len();
        for (i, b) in self.boundaries.iter().enumerate() {
            let v = match b.plane {
                Plane::AngleImpactVelocity => vp,
                Plane::AngleCollisionVelocity => vc,
            };
            let (limit, margin) = if b.side.along_velocity() {
                let lim = interpolate_sorted(&b.points, v);
                (
                    lim,
                    lim.map(|l| {
                        if b.side == WeldSide::Above {
                            deg - l
                        } else {
                            l - deg
                        }
                    }),
                )
            } else {
                let lim = interpolate_sorted(&b.points, deg);
                (
                    lim,
                    lim.map(|l| {
                        if b.side == WeldSide::Right {
                            v - l
                        } else {
                            l - v
                        }
                    }),
                )
            };
            match (margin, limit) {
                (Some(m), Some(l)) => {
                    if let Some(slot) = margins.get_mut(n_crit + i) {
                        *slot = m;
                    }
                    rank.consider(
                        n_crit + i,
                        relative_margin(m, l),
                        m >= 0.0,
                        b.side.is_velocity_ceiling(),
                    );
                }
                _ => {
                    if let Some(slot) = margins.get_mut(n_crit + i) {
                        *slot = f64::NAN;
                    }
                    outside = true;
                }
            }
        }
        outside
    }
}

/// `oblique_window::boundary::interpolate` for the points of a loaded boundary, which run
/// strictly upwards along x (the pair's validation refuses any other order, and reverses a
/// line given downwards): there the partition point is the count of points below x, taken
/// here by a plain loop that stays in line (the slice's binary search was called out of line
/// per row). The same index, the same operations, the same bits (tested against
/// `interpolate`).
#[inline(always)]
fn interpolate_sorted(points: &[(f64, f64)], x: f64) -> Option<f64> {
    let first = points.first()?;
    let last = points.last()?;
    if !(x >= first.0 && x <= last.0) {
        return None;
    }
    let below = points.iter().take_while(|p| p.0 < x).count();
    let k = below.max(1).min(points.len() - 1);
    let (x0, y0) = points[k - 1];
    let (x1, y1) = points[k];
    if x1 == x0 {
        return Some(y0);
    }
    Some(y0 + (y1 - y0) * (x - x0) / (x1 - x0))
}

/// The constants of `oblique_core::hugoniot::impedance_match` for one pair, grouped as its
/// operations group them (`b = r1 c1 + r2 c2 + 2 r1 s1 v` is `(r1 c1 + r2 c2) + (2 r1 s1) v`
/// left to right), so that the pressure has the same bits (tested).
#[derive(Debug, Clone, Copy)]
struct Impedance {
    r1: f64,
    c1: f64,
    s1: f64,
    r2: f64,
    c2: f64,
    s2: f64,
    /// r2 s2 - r1 s1.
    a: f64,
    /// r1 c1 + r2 c2.
    b0: f64,
    /// 2 r1 s1.
    b1: f64,
}

impl Impedance {
    fn new(
        flyer: &oblique_core::hugoniot::Hugoniot,
        target: &oblique_core::hugoniot::Hugoniot,
    ) -> Self {
        let (r1, c1, s1) = (flyer.density.si(), flyer.c0.si(), flyer.s);
        let (r2, c2, s2) = (target.density.si(), target.c0.si(), target.s);
        Self {
            r1,
            c1,
            s1,
            r2,
            c2,
            s2,
            a: r2 * s2 - r1 * s1,
            b0: r1 * c1 + r2 * c2,
            b1: 2.0 * r1 * s1,
        }
    }

    /// The impact pressure (Pa) at closing velocity `v` (m/s); `None` where
    /// `impedance_match` fails (v not positive and finite, a negative discriminant).
    #[inline(always)]
    fn pressure(&self, v: f64) -> Option<f64> {
        if !(v.is_finite() && v > 0.0) {
            return None;
        }
        let b = self.b0 + self.b1 * v;
        let c = self.r1 * (self.c1 * v + self.s1 * v * v);
        let disc = b * b + 4.0 * self.a * c;
        if !(disc >= 0.0) {
            return None;
        }
        let u2 = 2.0 * c / (b + disc.sqrt());
        Some(self.r2 * (self.c2 + self.s2 * u2) * u2)
    }
}

/// The running verdict of one point while its limits are taken in order: which fail, whether
/// only velocity ceilings do, and the binding limit (the smallest relative margin).
struct Ranking {
    inside: bool,
    only_ceilings_fail: bool,
    best: Option<(usize, f64)>,
    failing: u64,
}

impl Ranking {
    #[inline(always)]
    fn new() -> Self {
        Self {
            inside: true,
            only_ceilings_fail: true,
            best: None,
            failing: 0,
        }
    }

    /// Take limit `k` with its relative margin `rel`; `sat`: satisfied; `ceiling`: a velocity
    /// ceiling.
    #[inline(always)]
    fn consider(&mut self, k: usize, rel: f64, sat: bool, ceiling: bool) {
        if !sat {
            self.failing |= 1u64.checked_shl(k as u32).unwrap_or(0);
            self.inside = false;
            if !ceiling {
                self.only_ceilings_fail = false;
            }
        }
        // `min_by(total_cmp)` keeps the first of equal minima.
        match self.best {
            Some((_, b)) if rel.total_cmp(&b) != std::cmp::Ordering::Less => {}
            _ => self.best = Some((k, rel)),
        }
    }

    /// Welded when every limit holds; melted when only velocity ceilings fail; else not
    /// welded.
    #[inline(always)]
    fn verdict(&self) -> Prediction {
        if self.inside {
            Prediction::Welded
        } else if self.only_ceilings_fail {
            Prediction::Melted
        } else {
            Prediction::NotWelded
        }
    }
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;
    use oblique_core::WittmanForm;
    use oblique_window::classify::{classify, classify_with_jetting};
    use oblique_window::pair::{parse_pair_file, Origin};
    use oblique_window::Library;
    use proptest::prelude::*;
    use std::sync::OnceLock;

    /// A test window with boundaries of every side in both planes and a changed constant.
    const WINDOW: &str = r#"(
    format: "oblique-window/1",
    name: "map-test-al-on-cu",
    description: "test window for the map classifier (invented boundaries)",
    invented: "invented for tests",
    flyer: "aa6061-t6",
    parent: "cu-c11000",
    flyer_thickness: "1.0 mm",
    convention: "normal-to-flyer",
    maintainer: "tests",
    criteria: (
        deribas_lower: (enabled: true, k: 0.8, reason: "test"),
    ),
    boundaries: [
        (label: "right", plane: "angle-impact-velocity", weld_side: "right",
         points: [("395 m/s", "5 deg"), ("372 m/s", "12 deg"), ("365 m/s", "18 deg"), ("380 m/s", "24 deg")],
         provenance: "invented"),
        (label: "below", plane: "angle-impact-velocity", weld_side: "below",
         points: [("340 m/s", "23 deg"), ("450 m/s", "25 deg"), ("560 m/s", "26 deg")],
         provenance: "invented"),
        (label: "left vc", plane: "angle-collision-velocity", weld_side: "left",
         points: [("6000 m/s", "4 deg"), ("5000 m/s", "20 deg")],
         provenance: "invented"),
        (label: "above vc", plane: "angle-collision-velocity", weld_side: "above",
         points: [("1000 m/s", "6 deg"), ("3000 m/s", "3 deg")],
         provenance: "invented"),
    ],
)"#;

    pub(crate) fn test_window() -> &'static PairWindow {
        static W: OnceLock<PairWindow> = OnceLock::new();
        W.get_or_init(|| {
            let lib = Library::load(&[]).expect("built-in library");
            let origin = Origin {
                display: "test".into(),
                path: None,
                sha256: String::new(),
            };
            parse_pair_file(origin, WINDOW, &lib.materials)
                .expect("test window parses")
                .1
        })
    }

    fn classifier(kind: VelocityKind) -> &'static Classifier {
        static C: [OnceLock<Classifier>; 2] = [OnceLock::new(), OnceLock::new()];
        let k = usize::from(kind == VelocityKind::Collision);
        C[k].get_or_init(|| Classifier::new(test_window(), kind, JettingMode::Table).unwrap())
    }

    fn check_against_window(vp: f64, beta_deg: f64) -> Result<(), TestCaseError> {
        let w = test_window();
        let cl = classifier(VelocityKind::Impact);
        let mut margins = Vec::new();
        let c = cl.collision(vp, beta_deg.to_radians()).unwrap();
        let (jet, direct) = cl.jetting(&c).unwrap();
        let got = cl
            .classify_collision(&c, jet, direct, &mut margins)
            .unwrap();
        let setup = w.setup().unwrap();
        // Same jetting assessment: everything bit for bit.
        let want = classify_with_jetting(w, &setup, &c, jet).unwrap();
        prop_assert_eq!(got.verdict, want.prediction);
        prop_assert_eq!(
            got.binding.map(|b| cl.limits[b].limit.clone()),
            want.binding.clone()
        );
        prop_assert_eq!(
            got.binding_relative.to_bits(),
            want.binding_relative_margin.unwrap_or(f64::NAN).to_bits()
        );
        prop_assert_eq!(got.outside_trial_data, want.outside_trial_data);
        // The same failing limits, in the same order.
        let failing: Vec<LimitRef> = (0..cl.limits.len())
            .filter(|&k| got.fails(k, &margins))
            .map(|k| cl.limits[k].limit.clone())
            .collect();
        prop_assert_eq!(failing, want.failing.clone());
        prop_assert_eq!(
            got.pressure.to_bits(),
            want.evaluation.impact.pressure.si().to_bits()
        );
        for (info, m) in cl.limits.iter().zip(&margins) {
            let expected = match &info.limit {
                LimitRef::Criterion(id) => want.evaluation.criterion(*id).map(|r| r.margin),
                LimitRef::Boundary(i) => want.boundaries[*i].margin,
            };
            match expected {
                Some(e) => prop_assert_eq!(m.to_bits(), e.to_bits(), "{}", info.label),
                None => prop_assert!(m.is_nan()),
            }
        }
        // The direct solve everywhere: the same verdict (the table never decides a near call).
        let exact = classify(w, &setup, &c).unwrap();
        prop_assert_eq!(got.verdict, exact.prediction);
        let jet_margin = exact
            .evaluation
            .criterion(CriterionId::Jetting)
            .unwrap()
            .margin;
        let ours = margins[cl
            .limits
            .iter()
            .position(|l| l.limit == LimitRef::Criterion(CriterionId::Jetting))
            .unwrap()];
        prop_assert!((ours - jet_margin).abs() <= JettingTable::ERROR_BOUND_DEG);
        Ok(())
    }

    /// The governing coefficient over Vc is bit for bit the governing plate's limit, for both
    /// Wittman forms and any k (division by the same positive Vc keeps the order).
    #[test]
    fn governing_coefficients_are_bit_identical() {
        let w = test_window();
        let s = w.setup().unwrap();
        for form in [WittmanForm::A, WittmanForm::B] {
            for (k, n) in [(0.6, 0.11), (1.2, 0.05)] {
                let mut win = w.clone();
                win.criteria.deribas_k = k;
                win.criteria.wittman_n = n;
                win.criteria.wittman_form = form;
                let cl = Classifier::new(&win, VelocityKind::Impact, JettingMode::Table).unwrap();
                for vc in [900.0, 2500.0, 7321.5, 15_000.0] {
                    let v = Velocity::from_m_s(vc);
                    let h = s.flyer_thickness;
                    let mf = oblique_core::criteria::melting_velocity(&s.flyer, v, h, n, form);
                    let mp = oblique_core::criteria::melting_velocity(&s.parent, v, h, n, form);
                    let want = if mf <= mp { mf } else { mp };
                    let got = cl.melting / melting_divisor(vc, form);
                    assert_eq!(got.to_bits(), want.to_bits());
                    let df = oblique_core::criteria::deribas_angle(&s.flyer, v, k).to_degrees();
                    let dp = oblique_core::criteria::deribas_angle(&s.parent, v, k).to_degrees();
                    let want = if df >= dp { df } else { dp };
                    assert_eq!((cl.deribas / vc).to_degrees().to_bits(), want.to_bits());
                }
            }
        }
    }

    proptest! {
        /// The map's kinematics and impedance match give the core's bits, in every convention
        /// and for both velocity kinds.
        #[test]
        fn kinematics_and_pressure_are_the_cores(v in 1.0f64..20_000.0, beta in 0.01f64..89.99) {
            let w = test_window();
            for conv in [Convention::Bisector, Convention::NormalToFlyer, Convention::NormalToParent] {
                let mut win = w.clone();
                win.convention = conv;
                for kind in [VelocityKind::Impact, VelocityKind::Collision] {
                    let cl = Classifier::new(&win, kind, JettingMode::Table).unwrap();
                    let a = Angle::from_radians(beta.to_radians());
                    let want = match kind {
                        VelocityKind::Impact => Collision::from_impact(conv, Velocity::from_m_s(v), a),
                        VelocityKind::Collision => Collision::from_collision_velocity(conv, Velocity::from_m_s(v), a),
                    }.unwrap();
                    let got = cl.collision(v, beta.to_radians()).unwrap();
                    prop_assert_eq!(got.impact_velocity.si().to_bits(), want.impact_velocity.si().to_bits());
                    prop_assert_eq!(got.collision_velocity.si().to_bits(), want.collision_velocity.si().to_bits());
                    prop_assert_eq!(got.flow_velocity.si().to_bits(), want.flow_velocity.si().to_bits());
                    let s = win.setup().unwrap();
                    let p = impedance_match(&s.flyer.hugoniot, &s.parent.hugoniot, want.impact_velocity).unwrap();
                    prop_assert_eq!(cl.impedance.pressure(want.impact_velocity.si()).map(f64::to_bits), Some(p.pressure.si().to_bits()));
                }
            }
        }
    }

    proptest! {
        /// The in-line interpolation gives `interpolate`'s bits on strictly increasing points
        /// (as every loaded boundary has them), inside, at and outside the span.
        #[test]
        fn interpolate_sorted_is_interpolate(
            start in -50.0f64..50.0,
            steps in prop::collection::vec((0.001f64..20.0, -100.0f64..100.0), 1..8),
            y0 in -100.0f64..100.0,
            t in -0.2f64..1.2,
            at_node in 0usize..10,
        ) {
            let mut points = vec![(start, y0)];
            for (dx, y) in &steps {
                let x = points[points.len() - 1].0 + dx;
                points.push((x, *y));
            }
            prop_assume!(points.windows(2).all(|w| w[1].0 > w[0].0));
            let (a, b) = (points[0].0, points[points.len() - 1].0);
            let node = points[at_node % points.len()].0;
            for x in [a + t * (b - a), node, a, b, f64::NAN] {
                prop_assert_eq!(
                    interpolate_sorted(&points, x).map(f64::to_bits),
                    oblique_window::boundary::interpolate(&points, x).map(f64::to_bits),
                    "{}", x
                );
            }
        }
    }

    #[test]
    fn out_of_domain_points_keep_their_errors() {
        let cl = classifier(VelocityKind::Impact);
        let mut m = Vec::new();
        for (v, deg) in [
            (-1.0, 10.0),
            (f64::NAN, 10.0),
            (400.0, 0.0),
            (400.0, 90.0),
            (400.0, f64::NAN),
        ] {
            assert!(
                cl.classify(v, f64::to_radians(deg), &mut m).is_err(),
                "{v} {deg}"
            );
        }
        assert!(cl.impedance.pressure(0.0).is_none());
    }

    #[test]
    fn limits_in_window_order() {
        let cl = classifier(VelocityKind::Impact);
        let labels: Vec<&str> = cl.limits.iter().map(|l| l.label.as_str()).collect();
        assert_eq!(
            labels,
            [
                "deribas-lower",
                "strength-lower",
                "pressure-lower",
                "melting-upper",
                "jetting",
                "boundary \"right\"",
                "boundary \"below\"",
                "boundary \"left vc\"",
                "boundary \"above vc\""
            ]
        );
        assert_eq!(cl.limits[5].column, "margin_boundary_1");
    }

    #[test]
    fn collision_velocity_kind_keeps_the_geometry() {
        let cl = classifier(VelocityKind::Collision);
        let mut m = Vec::new();
        let p = cl.classify(2303.5, 10f64.to_radians(), &mut m).unwrap();
        assert!((p.vp - 400.0).abs() < 0.1, "{}", p.vp);
    }

    /// The test window with its jetting criterion off, under each mixed rule, and its
    /// classifier.
    fn jetting_off(rule: MixedRule) -> &'static (PairWindow, Classifier) {
        static C: [OnceLock<(PairWindow, Classifier)>; 2] = [OnceLock::new(), OnceLock::new()];
        let k = usize::from(rule == MixedRule::SupersonicSidePolar);
        C[k].get_or_init(|| {
            let mut w = test_window().clone();
            w.criteria.jetting_enabled = false;
            w.criteria.mixed_jetting = rule;
            let cl = Classifier::new(&w, VelocityKind::Impact, JettingMode::Table).unwrap();
            (w, cl)
        })
    }

    /// Jetting off: no solve, and every output but the critical angle (not written when the
    /// criterion is off) is what the direct solve's assessment gives, bit for bit; the verdict
    /// is the window crate's.
    fn check_jetting_off(vp: f64, beta_deg: f64, rule: MixedRule) -> Result<(), TestCaseError> {
        let (w, cl) = jetting_off(rule);
        let (mut m_got, mut m_want) = (Vec::new(), Vec::new());
        let got = cl.classify(vp, beta_deg.to_radians(), &mut m_got).unwrap();
        let c = cl.collision(vp, beta_deg.to_radians()).unwrap();
        let setup = w.setup().unwrap();
        let direct = critical_angle(
            &setup.flyer.hugoniot,
            &setup.parent.hugoniot,
            c.flow_velocity,
            c.collision_velocity,
            rule,
        )
        .unwrap();
        let want = cl
            .classify_collision(&c, direct, false, &mut m_want)
            .unwrap();
        prop_assert!(!got.jetting_direct);
        prop_assert!(got.jetting_deg.is_nan());
        prop_assert_eq!(got.regime, direct.regime);
        prop_assert_eq!(got.sonic, want.sonic);
        prop_assert_eq!(got.verdict, want.verdict);
        prop_assert_eq!(got.binding, want.binding);
        prop_assert_eq!(
            got.binding_relative.to_bits(),
            want.binding_relative.to_bits()
        );
        prop_assert_eq!(got.failing, want.failing);
        prop_assert_eq!(got.outside_trial_data, want.outside_trial_data);
        prop_assert_eq!(got.domain_exits, want.domain_exits);
        prop_assert_eq!(got.pressure.to_bits(), want.pressure.to_bits());
        prop_assert_eq!(
            m_got.iter().map(|m| m.to_bits()).collect::<Vec<_>>(),
            m_want.iter().map(|m| m.to_bits()).collect::<Vec<_>>()
        );
        prop_assert!(cl.limits.iter().all(|l| l.id != "jetting"));
        prop_assert_eq!(got.verdict, classify(w, &setup, &c).unwrap().prediction);
        Ok(())
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(300))]
        /// Both regimes and the mixed case (small angles are supersonic, larger ones not).
        #[test]
        fn jetting_off_is_not_solved(
            vp in 50.0f64..1200.0,
            beta in prop_oneof![0.3f64..8.0, 0.3f64..60.0],
            polar in any::<bool>(),
        ) {
            let rule = if polar { MixedRule::SupersonicSidePolar } else { MixedRule::EitherSubsonic };
            check_jetting_off(vp, beta, rule)?;
        }
    }

    /// The ranges `jetting_off_is_not_solved` draws from reach every regime (else it would test
    /// less than it says): a grid over the same ranges.
    #[test]
    fn jetting_off_cases_reach_every_regime() {
        let (_, cl) = jetting_off(MixedRule::SupersonicSidePolar);
        let mut m = Vec::new();
        let mut seen = [false; 3];
        for vp in (50..1200).step_by(10) {
            for tenth in (3..600).step_by(7) {
                let p = cl.classify(vp as f64, (tenth as f64 / 10.0).to_radians(), &mut m);
                let p = p.unwrap();
                seen[match p.regime {
                    JettingRegime::SubsonicParent => 0,
                    JettingRegime::SubsonicFlyer => 1,
                    JettingRegime::Supersonic => 2,
                }] = true;
            }
        }
        assert_eq!(seen, [true; 3]);
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(600))]
        /// Magnetic-pulse range, where the jetting regimes change.
        #[test]
        fn same_as_the_window_crate(vp in 50.0f64..1200.0, beta in 0.3f64..60.0) {
            check_against_window(vp, beta)?;
        }

        /// Small angles: supersonic inflow, the jetting table at work.
        #[test]
        fn same_as_the_window_crate_supersonic(vp in 100.0f64..900.0, beta in 0.5f64..8.0) {
            check_against_window(vp, beta)?;
        }
    }
}
