//! Parsing and validation of a machine file: every sourced value, the bank, coils, explosive
//! set-ups and stored calibrations, each problem at its field.

use super::*;

fn sourced(
    c: &mut Collector<'_>,
    field: &str,
    e: &SourcedEntry,
    kind: QuantityKind,
    domain: Domain,
) -> Option<Valued<f64>> {
    if e.source.trim().is_empty() {
        c.push(
            &format!("{field}.source"),
            "every value needs a source",
            Some("name the datasheet, drawing or record, e.g. \"nameplate\"".into()),
        );
    }
    let v = c.quantity(&format!("{field}.value"), &e.value, kind)?;
    let ok = match domain {
        Domain::Positive => v > 0.0,
        Domain::NonNegative => v >= 0.0,
        Domain::PresetAngle => (0.0..std::f64::consts::FRAC_PI_2).contains(&v),
    };
    if !ok {
        let allowed = match domain {
            Domain::Positive => "must be above zero",
            Domain::NonNegative => "must not be negative",
            Domain::PresetAngle => "must be in [0, 90) deg",
        };
        c.push(
            &format!("{field}.value"),
            format!("'{}' {allowed}", e.value),
            None,
        );
        return None;
    }
    Some(Valued {
        value: v,
        source: e.source.clone(),
    })
}

fn map<T>(v: Valued<f64>, f: impl FnOnce(f64) -> T) -> Valued<T> {
    Valued {
        value: f(v.value),
        source: v.source,
    }
}

fn bank_spec(c: &mut Collector<'_>, b: &BankEntry) -> Option<BankSpec> {
    let cap = sourced(
        c,
        "bank.capacitance",
        &b.capacitance,
        QuantityKind::Capacitance,
        Domain::Positive,
    );
    let umax = sourced(
        c,
        "bank.max_voltage",
        &b.max_voltage,
        QuantityKind::Voltage,
        Domain::Positive,
    );
    let l = b.inductance.as_ref().and_then(|e| {
        sourced(
            c,
            "bank.inductance",
            e,
            QuantityKind::Inductance,
            Domain::Positive,
        )
    });
    let r = b.resistance.as_ref().and_then(|e| {
        sourced(
            c,
            "bank.resistance",
            e,
            QuantityKind::Resistance,
            Domain::NonNegative,
        )
    });
    let mut ring = None;
    if let Some(rd) = &b.ring_down {
        let f = c.quantity(
            "bank.ring_down.frequency",
            &rd.frequency,
            QuantityKind::Frequency,
        );
        let ratio = c.quantity(
            "bank.ring_down.peak_ratio",
            &rd.peak_ratio,
            QuantityKind::Dimensionless,
        );
        if rd.source.trim().is_empty() {
            c.push(
                "bank.ring_down.source",
                "the ring-down record needs a source",
                Some("name the scope file or logbook page".into()),
            );
        }
        if let Some(d) = &rd.date {
            if !is_iso_date(d) {
                c.push(
                    "bank.ring_down.date",
                    format!("'{d}' is not a date YYYY-MM-DD"),
                    None,
                );
            }
        }
        if let (Some(f), Some(ratio), Some(cap)) = (f, ratio, &cap) {
            match identify_ring_down(Capacitance::from_f(cap.value), Frequency::from_hz(f), ratio) {
                Ok(fit) => {
                    ring = Some(RingDown {
                        frequency: Frequency::from_hz(f),
                        peak_ratio: ratio,
                        load: rd.load.clone(),
                        date: rd.date.clone(),
                        source: rd.source.clone(),
                        fit,
                    });
                }
                Err(e) => c.push("bank.ring_down", e.to_string(), None),
            }
        }
    }
    let derived = |what: &str, rd: &RingDown| {
        format!(
            "{what} (exact form) from {}: {} kHz, peak ratio {}",
            rd.source,
            rd.frequency.si() / 1e3,
            rd.peak_ratio
        )
    };
    let inductance = match (l, &ring) {
        (Some(l), _) => Some(map(l, Inductance::from_h)),
        (None, Some(rd)) => Some(Valued {
            value: rd.fit.inductance,
            source: derived("derived", rd),
        }),
        (None, None) => {
            if b.ring_down.is_none() && b.inductance.is_none() {
                c.push(
                    "bank",
                    "the bank needs an inductance or a ring-down record",
                    Some("add `inductance: (value: \"40 nH\", source: \"...\")` or `ring_down: (frequency: ..., peak_ratio: ..., source: ...)`".into()),
                );
            }
            None
        }
    };
    let resistance = match (r, &ring) {
        (Some(r), _) => Some(map(r, Resistance::from_ohm)),
        (None, Some(rd)) => Some(Valued {
            value: rd.fit.resistance,
            source: derived("derived", rd),
        }),
        (None, None) => {
            if b.ring_down.is_none() && b.resistance.is_none() {
                c.push(
                    "bank",
                    "the bank needs a resistance or a ring-down record",
                    Some("add `resistance: (value: \"4 mohm\", source: \"...\")` or a ring_down record".into()),
                );
            }
            None
        }
    };
    let max_current = b.max_current.as_ref().and_then(|e| {
        sourced(
            c,
            "bank.max_current",
            e,
            QuantityKind::Current,
            Domain::Positive,
        )
    });
    let max_energy = b.max_energy.as_ref().and_then(|e| {
        sourced(
            c,
            "bank.max_energy",
            e,
            QuantityKind::Energy,
            Domain::Positive,
        )
    });
    Some(BankSpec {
        max_current: max_current.map(|v| map(v, oblique_core::units::Current::from_a)),
        max_energy: max_energy.map(|v| map(v, oblique_core::units::Energy::from_j)),
        capacitance: map(cap?, Capacitance::from_f),
        max_voltage: map(umax?, Voltage::from_v),
        inductance: inductance?,
        resistance: resistance?,
        ring_down: ring,
    })
}

fn compression_spec(
    c: &mut Collector<'_>,
    e: &CompressionCoilEntry,
) -> Option<CompressionCoilSpec> {
    let rc = sourced(
        c,
        "compression_coil.bore_radius",
        &e.bore_radius,
        QuantityKind::Length,
        Domain::Positive,
    );
    let l = sourced(
        c,
        "compression_coil.length",
        &e.length,
        QuantityKind::Length,
        Domain::Positive,
    );
    let x = sourced(
        c,
        "compression_coil.extra_inductance",
        &e.extra_inductance,
        QuantityKind::Inductance,
        Domain::NonNegative,
    );
    Some(CompressionCoilSpec {
        bore_radius: map(rc?, Length::from_m),
        length: map(l?, Length::from_m),
        extra_inductance: map(x?, Inductance::from_h),
    })
}

fn bar_spec(c: &mut Collector<'_>, e: &BarCoilEntry) -> Option<BarCoilSpec> {
    let l = sourced(
        c,
        "bar_coil.length",
        &e.length,
        QuantityKind::Length,
        Domain::Positive,
    );
    let w = sourced(
        c,
        "bar_coil.width",
        &e.width,
        QuantityKind::Length,
        Domain::Positive,
    );
    let x = sourced(
        c,
        "bar_coil.extra_inductance",
        &e.extra_inductance,
        QuantityKind::Inductance,
        Domain::NonNegative,
    );
    Some(BarCoilSpec {
        length: map(l?, Length::from_m),
        width: map(w?, Length::from_m),
        extra_inductance: map(x?, Inductance::from_h),
    })
}

fn explosive_spec(c: &mut Collector<'_>, e: &ExplosiveEntry) -> Option<ExplosiveSpec> {
    let g = sourced(
        c,
        "explosive.gurney_velocity",
        &e.gurney_velocity,
        QuantityKind::Velocity,
        Domain::Positive,
    );
    let vd = sourced(
        c,
        "explosive.detonation_velocity",
        &e.detonation_velocity,
        QuantityKind::Velocity,
        Domain::Positive,
    );
    let ratio = match (&e.flyer_to_charge, &e.charge_to_flyer) {
        (Some(m), None) => sourced(
            c,
            "explosive.flyer_to_charge",
            m,
            QuantityKind::Dimensionless,
            Domain::Positive,
        )
        .map(|v| map(v, MassRatio::FlyerToCharge)),
        (None, Some(r)) => sourced(
            c,
            "explosive.charge_to_flyer",
            r,
            QuantityKind::Dimensionless,
            Domain::Positive,
        )
        .map(|v| map(v, MassRatio::ChargeToFlyer)),
        (Some(_), Some(_)) => {
            c.push(
                "explosive.charge_to_flyer",
                "give the mass ratio one way only",
                Some("keep either `flyer_to_charge` (M/C) or `charge_to_flyer` (C/M)".into()),
            );
            None
        }
        (None, None) => {
            c.push(
                "explosive",
                "the mass ratio is missing",
                Some("add `flyer_to_charge: (value: \"1.2\", source: \"...\")` (M/C) or `charge_to_flyer` (C/M)".into()),
            );
            None
        }
    };
    let alpha = sourced(
        c,
        "explosive.preset_angle",
        &e.preset_angle,
        QuantityKind::Angle,
        Domain::PresetAngle,
    );
    Some(ExplosiveSpec {
        gurney_velocity: map(g?, Velocity::from_m_s),
        detonation_velocity: map(vd?, Velocity::from_m_s),
        mass_ratio: ratio?,
        preset_angle: map(alpha?, Angle::from_radians),
    })
}

fn calibration(c: &mut Collector<'_>, i: usize, e: &CalibrationEntry) -> Option<Calibration> {
    let p = format!("calibrations[{i}]");
    let eta = c.quantity(
        &format!("{p}.efficiency"),
        &e.efficiency,
        QuantityKind::Dimensionless,
    );
    if let Some(eta) = eta {
        if !(eta > 0.0 && eta <= 1.0) {
            c.push(
                &format!("{p}.efficiency"),
                format!("efficiency {eta} is outside (0, 1]"),
                None,
            );
        }
    }
    if !CALIBRATION_MODELS.contains(&e.model.as_str()) {
        c.push(
            &format!("{p}.model"),
            format!("unknown model '{}'", e.model),
            Some(format!("one of {}", CALIBRATION_MODELS.join(", "))),
        );
    }
    if !is_iso_date(&e.date) {
        c.push(
            &format!("{p}.date"),
            format!("'{}' is not a date YYYY-MM-DD", e.date),
            None,
        );
    }
    if e.source.trim().is_empty() {
        c.push(
            &format!("{p}.source"),
            "a calibration needs the source of its measurement",
            None,
        );
    }
    let v = c.quantity(
        &format!("{p}.measured_velocity"),
        &e.measured_velocity,
        QuantityKind::Velocity,
    );
    let u = c.quantity(
        &format!("{p}.charge_voltage"),
        &e.charge_voltage,
        QuantityKind::Voltage,
    );
    let g = c.quantity(&format!("{p}.standoff"), &e.standoff, QuantityKind::Length);
    let h = match &e.flyer_thickness {
        Some(t) => Some(c.quantity(&format!("{p}.flyer_thickness"), t, QuantityKind::Length)?),
        None => None,
    };
    let vu = e.velocity_uncertainty.as_deref().and_then(|t| {
        let field = format!("{p}.velocity_uncertainty");
        let rel = match t.trim().strip_suffix('%') {
            Some(pct) => pct.trim().parse::<f64>().ok().map(|x| x / 100.0),
            None => c
                .quantity(&field, t, QuantityKind::Velocity)
                .and_then(|a| v.map(|v| a / v)),
        };
        match rel {
            Some(r) if (0.0..=1.0).contains(&r) => Some(r),
            _ => {
                c.push(
                    &field,
                    format!("'{t}' is not a velocity uncertainty between 0 and the velocity"),
                    Some("write it like \"3 %\" or \"12 m/s\"".into()),
                );
                None
            }
        }
    });
    let eta = eta.filter(|x| *x > 0.0 && *x <= 1.0)?;
    Some(Calibration {
        index: i,
        efficiency: eta,
        model: e.model.clone(),
        coil: e.coil.clone(),
        date: e.date.clone(),
        measured_velocity: Velocity::from_m_s(v?),
        charge_voltage: Voltage::from_v(u?),
        standoff: Length::from_m(g?),
        flyer: e.flyer.clone(),
        flyer_thickness: h.map(Length::from_m),
        settings: e.settings.clone(),
        velocity_uncertainty: vu,
        source: e.source.clone(),
    })
}

/// Parse and validate a machine file.
///
/// # Errors
/// Every problem found, each with file, line, column and field.
pub fn parse_machine_file(
    origin: Origin,
    text: &str,
) -> Result<(MachineFile, MachineRecord), Diagnostics> {
    let file = origin.display.clone();
    // A byte-order mark (some editors write one) is not RON: read past it.
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let parsed: MachineFile = parse_ron(&file, text)?;
    let mut c = Collector::new(&file, text);
    c.check_placeholders();
    c.check_format(&parsed.format, MACHINE_FORMAT);
    c.check_name(&parsed.name, "name", "shop-bank-300uf");
    if parsed.maintainer.trim().is_empty() {
        c.push(
            "maintainer",
            "say who maintains the file",
            Some("a person or team, e.g. \"pulse lab, J. Doe\"".into()),
        );
    }
    if parsed.revisions.is_empty() {
        c.push(
            "revisions",
            "at least one revision is needed",
            Some("add `revisions: [(date: \"2026-12-01\", note: \"created\")]`".into()),
        );
    }
    for (i, r) in parsed.revisions.iter().enumerate() {
        if !is_iso_date(&r.date) {
            c.push(
                &format!("revisions[{i}].date"),
                format!("'{}' is not a date YYYY-MM-DD", r.date),
                None,
            );
        }
    }
    let given = [
        parsed.bank.is_some(),
        parsed.compression_coil.is_some(),
        parsed.bar_coil.is_some(),
        parsed.explosive.is_some(),
    ]
    .iter()
    .filter(|b| **b)
    .count();
    if given != 1 {
        c.push(
            "name",
            format!("a machine file describes exactly one thing, found {given}"),
            Some("give one of `bank`, `compression_coil`, `bar_coil` or `explosive`; put each in its own file".into()),
        );
    }
    let item = if let Some(b) = &parsed.bank {
        bank_spec(&mut c, b).map(|s| MachineItem::Bank(Box::new(s)))
    } else if let Some(e) = &parsed.compression_coil {
        compression_spec(&mut c, e).map(MachineItem::CompressionCoil)
    } else if let Some(e) = &parsed.bar_coil {
        bar_spec(&mut c, e).map(MachineItem::BarCoil)
    } else if let Some(e) = &parsed.explosive {
        explosive_spec(&mut c, e).map(MachineItem::Explosive)
    } else {
        None
    };
    if !parsed.calibrations.is_empty() && parsed.bank.is_none() {
        c.push(
            "calibrations",
            "only a bank file stores calibrations",
            Some("move them to the bank's file".into()),
        );
    }
    let calibrations: Vec<Calibration> = parsed
        .calibrations
        .iter()
        .enumerate()
        .filter_map(|(i, e)| calibration(&mut c, i, e))
        .collect();
    let problems = c.problems.len();
    c.finish()?;
    let Some(item) = item else {
        // Every path that yields no item recorded a problem; this is only a safety net.
        return Err(Diagnostics(vec![Diagnostic {
            file,
            line: 1,
            col: 1,
            field: String::new(),
            message: format!("the file describes nothing usable ({problems} problem(s))"),
            hint: None,
        }]));
    };
    let record = MachineRecord {
        name: parsed.name.clone(),
        description: parsed.description.clone(),
        invented: parsed.invented.clone(),
        maintainer: parsed.maintainer.clone(),
        revisions: parsed.revisions.clone(),
        item,
        calibrations,
        origin,
    };
    Ok((parsed, record))
}
