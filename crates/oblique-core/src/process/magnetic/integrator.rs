//! The integrator of the lumped magnetic pulse models: the set-up reduced to the numbers the
//! equations use ([`Plant`]), fixed-step fourth-order Runge-Kutta with the impact step re-taken
//! by the Illinois variant of regula falsi, and the bookkeeping of one run ([`Run`]). The
//! equations are stated in the parent module's documentation.

use super::*;

#[derive(Debug, Clone, Copy)]
pub(super) enum Geom {
    /// k = mu0 pi / l; rc2 = r_c^2; fy0 = 2 pi l sigma_y h0 r0.
    Tube {
        k: f64,
        rc2: f64,
        r0: f64,
        h0: f64,
        fy0: f64,
    },
    /// k = mu0 l / w.
    Sheet { k: f64, g0: f64, h: f64 },
}

/// The set-up reduced to the numbers the equations use (SI, validated).
#[derive(Debug, Clone, Copy)]
pub(crate) struct Plant {
    geom: Geom,
    c: f64,
    inv_c: f64,
    r: f64,
    l_fixed: f64,
    u0: f64,
    inv_mass: f64,
    mass: f64,
    eta: f64,
    /// 2 / (mu0 sigma): delta^2 = k_delta / w = k_delta sqrt(L C).
    k_delta: f64,
    /// B = b_per_amp |I|.
    pub(super) b_per_amp: f64,
    /// Workpiece held still (infinitely heavy): a check of the circuit alone.
    held: bool,
}

pub(super) const Q: usize = 0;
pub(super) const I: usize = 1;
pub(super) const X: usize = 2;
pub(super) const V: usize = 3;
pub(super) const WR: usize = 4;
pub(super) const WP: usize = 5;
pub(super) const WW: usize = 6;
type State = [f64; 7];

impl Plant {
    pub(super) fn check_underdamped(self) -> Result<Self, ProcessError> {
        let l0 = self.inductance(0.0);
        let critical = 2.0 * (l0 / self.c).sqrt();
        if self.r >= critical {
            return Err(ProcessError::NotUnderdamped {
                resistance: Resistance::from_ohm(self.r),
                critical: Resistance::from_ohm(critical),
            });
        }
        Ok(self)
    }

    pub(crate) fn tube(s: &TubeSetup) -> Result<Self, ProcessError> {
        let l = s.coil.length.si();
        let r0 = s.tube.outer_radius.si();
        let h0 = s.tube.wall_thickness.si();
        let rc = s.coil.bore_radius.si();
        let m = &s.tube.material;
        let mass = m.density.si() * 2.0 * PI * r0 * h0 * l;
        Self {
            geom: Geom::Tube {
                k: MU0 * PI / l,
                rc2: rc * rc,
                r0,
                h0,
                fy0: 2.0 * PI * l * m.flow_stress.si() * h0 * r0,
            },
            c: s.bank.capacitance.si(),
            inv_c: 1.0 / s.bank.capacitance.si(),
            r: s.bank.resistance.si(),
            l_fixed: s.bank.inductance.si() + s.coil.extra_inductance.si(),
            u0: s.charging_voltage.si(),
            inv_mass: 1.0 / mass,
            mass,
            eta: s.efficiency,
            k_delta: 2.0 / (MU0 * m.conductivity.si()),
            b_per_amp: MU0 / l,
            held: false,
        }
        .check_underdamped()
    }

    pub(crate) fn sheet(s: &SheetSetup) -> Result<Self, ProcessError> {
        let l = s.coil.length.si();
        let w = s.coil.width.si();
        let h = s.sheet.thickness.si();
        let m = &s.sheet.material;
        let mass = m.density.si() * h * l * w;
        Self {
            geom: Geom::Sheet {
                k: MU0 * l / w,
                g0: s.initial_gap.si(),
                h,
            },
            c: s.bank.capacitance.si(),
            inv_c: 1.0 / s.bank.capacitance.si(),
            r: s.bank.resistance.si(),
            l_fixed: s.bank.inductance.si() + s.coil.extra_inductance.si(),
            u0: s.charging_voltage.si(),
            inv_mass: 1.0 / mass,
            mass,
            eta: s.efficiency,
            k_delta: 2.0 / (MU0 * m.conductivity.si()),
            b_per_amp: MU0 / w,
            held: false,
        }
        .check_underdamped()
    }

    /// Build from a validated set-up.
    pub(crate) fn from_setup(setup: &PulseSetup) -> Result<Self, ProcessError> {
        setup.validate()?;
        match setup {
            PulseSetup::Tube(s) => Self::tube(s),
            PulseSetup::Sheet(s) => Self::sheet(s),
        }
    }

    /// The same plant at another charging voltage (already checked by the caller).
    pub(crate) fn with_u0(mut self, u0: f64) -> Self {
        self.u0 = u0;
        self
    }

    /// (L_gap, dL/dx) at travel x.
    #[inline]
    pub(super) fn gap(&self, x: f64) -> (f64, f64) {
        match self.geom {
            Geom::Tube { k, rc2, r0, .. } => {
                let r = r0 - x;
                (k * (rc2 - r * r), 2.0 * k * r)
            }
            Geom::Sheet { k, g0, .. } => (k * (g0 + x), k),
        }
    }

    #[inline]
    pub(super) fn inductance(&self, x: f64) -> f64 {
        self.l_fixed + self.gap(x).0
    }

    /// Workpiece thickness at travel x (thin-ring volume conservation for the tube).
    #[inline]
    pub(super) fn thickness(&self, x: f64) -> f64 {
        match self.geom {
            Geom::Tube { r0, h0, .. } => h0 * r0 / (r0 - x),
            Geom::Sheet { h, .. } => h,
        }
    }

    /// Flow-stress resisting force at travel x.
    #[inline]
    pub(super) fn resist(&self, x: f64) -> f64 {
        match self.geom {
            Geom::Tube { r0, fy0, .. } => fy0 / (r0 - x),
            Geom::Sheet { .. } => 0.0,
        }
    }

    /// Skin depth at inductance l: delta = sqrt(2 / (w mu0 sigma)), w = 1/sqrt(L C).
    #[inline]
    pub(super) fn skin_depth(&self, l: f64) -> f64 {
        (self.k_delta * (l * self.c).sqrt()).sqrt()
    }

    /// f_s = 1 - exp(-2 h / delta).
    #[inline]
    pub(super) fn skin_factor(&self, l: f64, x: f64) -> f64 {
        -(-2.0 * self.thickness(x) / self.skin_depth(l)).exp_m1()
    }

    /// Time derivative of the state.
    #[inline]
    pub(super) fn deriv(&self, s: &State) -> State {
        let (q, i, x, v) = (s[Q], s[I], s[X], s[V]);
        let (lg, dl) = self.gap(x);
        let l = self.l_fixed + lg;
        let force = 0.5 * i * i * dl;
        let drive = self.eta * self.skin_factor(l, x) * force;
        let resist = self.resist(x);
        let acc = if self.held {
            0.0
        } else if v > 0.0 || drive > resist {
            (drive - resist) * self.inv_mass
        } else {
            0.0
        };
        let di = (q * self.inv_c - self.r * i - i * dl * v) / l;
        [
            -i,
            di,
            v,
            acc,
            self.r * i * i,
            resist * v,
            (force - drive) * v,
        ]
    }

    /// One classical RK4 step of size h.
    #[inline]
    pub(super) fn rk4(&self, s: &State, h: f64) -> State {
        let k1 = self.deriv(s);
        let s2 = axpy(s, 0.5 * h, &k1);
        let k2 = self.deriv(&s2);
        let s3 = axpy(s, 0.5 * h, &k2);
        let k3 = self.deriv(&s3);
        let s4 = axpy(s, h, &k3);
        let k4 = self.deriv(&s4);
        let mut out = *s;
        for j in 0..7 {
            out[j] += h / 6.0 * (k1[j] + 2.0 * k2[j] + 2.0 * k3[j] + k4[j]);
        }
        out
    }

    /// The rigid-plastic wall cannot move backwards: a step that overshoots the stop to a
    /// small negative velocity is brought to rest and that kinetic energy booked as plastic work.
    #[inline]
    pub(super) fn stop_if_reversed(&self, s: &mut State) {
        if s[V] < 0.0 {
            s[WP] += 0.5 * self.mass * s[V] * s[V];
            s[V] = 0.0;
        }
    }

    /// At rest, can the circuit ever push the workpiece again? While it rests the circuit is a
    /// passive RLC whose energy E = q^2/(2C) + L I^2/2 never grows, so I^2 <= 2E/L and the
    /// drive is at most eta (E/L) dL/dx (f_s <= 1). If that does not exceed the flow-stress
    /// force the wall stays put for good (a rigorous bound, so stopping early changes no
    /// result).
    pub(super) fn cannot_restart(&self, s: &State) -> bool {
        let (lg, dl) = self.gap(s[X]);
        let l = self.l_fixed + lg;
        let e = 0.5 * s[Q] * s[Q] * self.inv_c + 0.5 * l * s[I] * s[I];
        self.eta * (e / l) * dl <= self.resist(s[X])
    }

    /// The same plant with the workpiece held still.
    #[cfg(test)]
    pub(crate) fn held(mut self) -> Self {
        self.held = true;
        self
    }

    pub(super) fn initial_state(&self) -> State {
        [self.c * self.u0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0]
    }

    /// Damped angular frequency at rest (the plant is underdamped by construction).
    pub(super) fn ring_omega(&self) -> f64 {
        let l0 = self.inductance(0.0);
        let a = self.r / (2.0 * l0);
        (1.0 / (l0 * self.c) - a * a).sqrt()
    }

    pub(super) fn sample(&self, t: f64, s: &State) -> PulseSample {
        let l = self.inductance(s[X]);
        let b = self.b_per_amp * s[I].abs();
        let p = b * b / (2.0 * MU0);
        PulseSample {
            time: Time::from_s(t),
            current: Current::from_a(s[I]),
            field: MagneticField::from_t(b),
            magnetic_pressure: Pressure::from_pa(p),
            effective_pressure: Pressure::from_pa(self.eta * self.skin_factor(l, s[X]) * p),
            travel: Length::from_m(s[X]),
            velocity: Velocity::from_m_s(s[V]),
            inductance: Inductance::from_h(l),
        }
    }

    pub(super) fn energy_balance(&self, s: &State) -> EnergyBalance {
        let stored = 0.5 * self.c * self.u0 * self.u0;
        let capacitor = 0.5 * s[Q] * s[Q] * self.inv_c;
        let field = 0.5 * self.inductance(s[X]) * s[I] * s[I];
        let kinetic = 0.5 * self.mass * s[V] * s[V];
        let sum = capacitor + field + s[WR] + kinetic + s[WP] + s[WW];
        EnergyBalance {
            stored: Energy::from_j(stored),
            capacitor: Energy::from_j(capacitor),
            field: Energy::from_j(field),
            resistive: Energy::from_j(s[WR]),
            kinetic: Energy::from_j(kinetic),
            plastic: Energy::from_j(s[WP]),
            withheld: Energy::from_j(s[WW]),
            relative_error: (stored - sum).abs() / stored,
        }
    }

    /// The shortened step from `s` (at the start of a step of size h) that lands exactly on
    /// x = target, x(s) < target <= x(rk4(s, h)). Illinois regula falsi on the step fraction.
    pub(super) fn land_on(&self, s: &State, h: f64, target: f64, x_end: f64) -> (f64, State) {
        let (mut lo, mut f_lo) = (0.0, s[X] - target);
        let (mut hi, mut f_hi) = (1.0, x_end - target);
        let mut best = (1.0, self.rk4(s, h));
        let tol = 1e-12 * target.abs().max(1e-12);
        let mut side = 0i8;
        for _ in 0..100 {
            let theta = if f_hi != f_lo {
                (lo - f_lo * (hi - lo) / (f_hi - f_lo)).clamp(lo, hi)
            } else {
                0.5 * (lo + hi)
            };
            let st = self.rk4(s, theta * h);
            let f = st[X] - target;
            best = (theta, st);
            if f.abs() <= tol || hi - lo <= 1e-15 {
                break;
            }
            if f < 0.0 {
                lo = theta;
                f_lo = f;
                if side == -1 {
                    f_hi *= 0.5;
                }
                side = -1;
            } else {
                hi = theta;
                f_hi = f;
                if side == 1 {
                    f_lo *= 0.5;
                }
                side = 1;
            }
        }
        (best.0 * h, best.1)
    }
}

#[inline]
pub(super) fn axpy(s: &State, h: f64, k: &State) -> State {
    let mut out = *s;
    for j in 0..7 {
        out[j] += h * k[j];
    }
    out
}

pub(super) fn check_finite(s: &State, t: f64) -> Result<(), ProcessError> {
    const NAMES: [&str; 7] = [
        "charge",
        "current",
        "travel",
        "velocity",
        "resistive loss",
        "plastic work",
        "withheld work",
    ];
    match s.iter().position(|v| !v.is_finite()) {
        Some(j) => Err(ProcessError::NonFinite {
            what: NAMES[j],
            time: Time::from_s(t),
        }),
        None => Ok(()),
    }
}

/// What one integration produced.
pub(crate) struct Run {
    /// One outcome per target, in the order of the (ascending) targets.
    pub outcomes: Vec<ImpactOutcome>,
    pub first_zero: Option<f64>,
    pub peak_current: f64,
    pub peak_effective_pressure: f64,
    pub final_state: State,
    pub history: Vec<PulseSample>,
}

/// Integrate until the workpiece has reached every target distance (ascending, positive) or
/// the window ends. Options must be validated by the caller.
pub(crate) fn run(
    plant: &Plant,
    targets: &[f64],
    options: &IntegrationOptions,
) -> Result<Run, ProcessError> {
    let period = 2.0 * PI / plant.ring_omega();
    let h = period / f64::from(options.steps_per_period);
    // The window is a whole number of steps (rounded up).
    let n_steps = (options.max_periods * f64::from(options.steps_per_period)).ceil() as u64;
    let every = options.sample_every.map(|n| u64::from(n.get()));

    let mut s = plant.initial_state();
    let mut t = 0.0;
    let mut outcomes = Vec::with_capacity(targets.len());
    let mut next = 0usize;
    let mut first_zero: Option<f64> = None;
    let mut peak_current = 0.0f64;
    let mut peak_eff = 0.0f64;
    let mut moved = false;
    let mut history = Vec::new();
    if every.is_some() {
        history.reserve((n_steps / every.unwrap_or(1)).min(1 << 16) as usize + 2);
        history.push(plant.sample(t, &s));
    }

    let track_peaks = |s: &State, peak_current: &mut f64, peak_eff: &mut f64| {
        let i = s[I].abs();
        if i > *peak_current {
            *peak_current = i;
        }
        let b = plant.b_per_amp * i;
        let l = plant.inductance(s[X]);
        let pe = plant.eta * plant.skin_factor(l, s[X]) * b * b / (2.0 * MU0);
        if pe > *peak_eff {
            *peak_eff = pe;
        }
    };

    let mut step: u64 = 0;
    while next < targets.len() && step < n_steps {
        let mut s_new = plant.rk4(&s, h);
        check_finite(&s_new, t + h)?;
        if first_zero.is_none() && s[I] > 0.0 && s_new[I] <= 0.0 {
            first_zero = Some(t + h * s[I] / (s[I] - s_new[I]));
        }
        // Every target crossed inside this step, each landed on exactly.
        while next < targets.len() && s_new[X] >= targets[next] {
            let (dt, st) = plant.land_on(&s, h, targets[next], s_new[X]);
            let t_hit = t + dt;
            outcomes.push(ImpactOutcome::Impact {
                time: Time::from_s(t_hit),
                velocity: Velocity::from_m_s(st[V]),
                after_first_half_wave: first_zero.is_some_and(|z| z < t_hit),
            });
            next += 1;
            if next == targets.len() {
                // The run ends at the last impact: that state closes the bookkeeping.
                track_peaks(&st, &mut peak_current, &mut peak_eff);
                if every.is_some() {
                    history.push(plant.sample(t_hit, &st));
                }
                if first_zero.is_some_and(|z| z > t_hit) {
                    first_zero = None;
                }
                return Ok(Run {
                    outcomes,
                    first_zero,
                    peak_current,
                    peak_effective_pressure: peak_eff,
                    final_state: st,
                    history,
                });
            }
        }
        plant.stop_if_reversed(&mut s_new);
        if s_new[V] > 0.0 {
            moved = true;
        }
        s = s_new;
        t += h;
        step += 1;
        track_peaks(&s, &mut peak_current, &mut peak_eff);
        let at_rest_for_good = !plant.held && s[V] == 0.0 && plant.cannot_restart(&s);
        if let Some(k) = every {
            if step.is_multiple_of(k) || step == n_steps || at_rest_for_good {
                history.push(plant.sample(t, &s));
            }
        }
        if at_rest_for_good {
            break;
        }
    }

    let reason = if !moved {
        NoImpactReason::NeverMoved
    } else if s[V] <= 0.0 {
        NoImpactReason::Stopped
    } else {
        NoImpactReason::StillMovingAtWindowEnd
    };
    while outcomes.len() < targets.len() {
        outcomes.push(ImpactOutcome::NoImpact {
            reason,
            travel: Length::from_m(s[X]),
            velocity: Velocity::from_m_s(s[V]),
            end_time: Time::from_s(t),
        });
    }
    Ok(Run {
        outcomes,
        first_zero,
        peak_current,
        peak_effective_pressure: peak_eff,
        final_state: s,
        history,
    })
}
