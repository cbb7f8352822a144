//! Commented templates of machine files (`oblique new bank|coil|bar-coil|explosive NAME`).
//!
//! A template does not load until it is filled in: every value that must come from the user's
//! own nameplate, drawing or record is `"FILL IN"`, so the library refuses the file (with the
//! place of every such field) instead of estimating with numbers nobody measured.

use crate::write::ron_string;

/// What a template describes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TemplateKind {
    /// A capacitor bank.
    Bank,
    /// A single-turn compression coil or field-shaper bore (tubes).
    CompressionCoil,
    /// A flat one-turn bar coil (sheets).
    BarCoil,
    /// An explosive welding set-up.
    Explosive,
}

/// The text of a template machine file named `name`, maintained by `maintainer`, dated `date`.
#[must_use]
pub fn template(kind: TemplateKind, name: &str, maintainer: &str, date: &str) -> String {
    let body = match kind {
        TemplateKind::Bank => {
            r#"    // The bank. Every value from your own nameplate, datasheet or measurement, with its source.
    bank: (
        capacitance: (value: "FILL IN", source: "FILL IN: nameplate"),          // e.g. "300 uF"
        max_voltage: (value: "FILL IN", source: "FILL IN: rating, datasheet"),  // e.g. "12 kV": a charge above it is refused
        // Give the loop inductance and resistance directly ...
        // inductance: (value: "40 nH", source: "..."),
        // resistance: (value: "4 mohm", source: "..."),
        // ... or a ring-down record with the output shorted, from which both follow:
        ring_down: (frequency: "FILL IN", peak_ratio: "FILL IN", load: "output shorted at the coil terminals",
                    date: "FILL IN", source: "FILL IN: record number"),      // e.g. "45 kHz", "3.0" (I1/I2)
        // Optional ratings from the datasheet (`oblique aim` leaves out set-ups beyond them):
        // max_current: (value: "500 kA", source: "..."),   // first current peak
        // max_energy: (value: "20 kJ", source: "..."),     // stored energy
    ),
    calibrations: [
    ],
"#
        }
        TemplateKind::CompressionCoil => {
            r#"    // A single-turn compression coil or field-shaper bore, from its drawing.
    compression_coil: (
        bore_radius: (value: "FILL IN", source: "FILL IN: drawing"),       // e.g. "21 mm" (a radius, larger than the tube's)
        length: (value: "FILL IN", source: "FILL IN: drawing"),            // e.g. "20 mm", the working length
        extra_inductance: (value: "FILL IN", source: "FILL IN: estimate"), // e.g. "20 nH", terminals and leads
    ),
"#
        }
        TemplateKind::BarCoil => {
            r#"    // A flat one-turn bar coil, from its drawing.
    bar_coil: (
        length: (value: "FILL IN", source: "FILL IN: drawing"),            // e.g. "100 mm"
        width: (value: "FILL IN", source: "FILL IN: drawing"),             // e.g. "20 mm"
        extra_inductance: (value: "FILL IN", source: "FILL IN: estimate"), // e.g. "20 nH", return conductor and leads
    ),
"#
        }
        TemplateKind::Explosive => {
            r#"    // An explosive welding set-up. Explosives are planned, licensed and fired under the
    // explosives law of the site, by licensed shot-firers; these numbers only feed an estimate.
    explosive: (
        gurney_velocity: (value: "FILL IN", source: "FILL IN: supplier or test"),   // e.g. "1500 m/s", sqrt(2E) as laid
        detonation_velocity: (value: "FILL IN", source: "FILL IN: measured"),      // e.g. "2500 m/s"
        flyer_to_charge: (value: "FILL IN", source: "FILL IN: weighed"),           // M/C, e.g. "1.5" (or charge_to_flyer)
        preset_angle: (value: "FILL IN", source: "FILL IN: set-up drawing"),       // e.g. "0 deg" for parallel
    ),
"#
        }
    };
    format!(
        r#"// Machine file for oblique ({kind_word}), made with `oblique new`. Format: docs/process-models.md,
// section "Machine files". Replace every "FILL IN" with your own value and its source: the file
// is refused until then (`oblique pair validate` lists what is left). Never copy values from
// another machine: a wrong capacitance or rating gives wrong estimates and unsafe advice.
(
    format: "oblique-machine/1",
    name: {name_q},
    description: "FILL IN: what it is, where it stands",
    maintainer: {maintainer_q},
    revisions: [
        (date: {date_q}, note: "created from the template of `oblique new`"),
    ],
{body})
"#,
        kind_word = match kind {
            TemplateKind::Bank => "capacitor bank",
            TemplateKind::CompressionCoil => "compression coil",
            TemplateKind::BarCoil => "bar coil",
            TemplateKind::Explosive => "explosive set-up",
        },
        name_q = ron_string(name),
        maintainer_q = ron_string(maintainer),
        date_q = ron_string(date),
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::machine::parse_machine_file;
    use crate::pair::Origin;

    fn origin() -> Origin {
        Origin {
            display: "t.ron".into(),
            path: None,
            sha256: String::new(),
        }
    }

    #[test]
    fn a_template_is_refused_until_filled_and_loads_once_filled() {
        for (kind, fill) in [
            (
                TemplateKind::Bank,
                vec![
                    (
                        "capacitance: (value: \"FILL IN\"",
                        "capacitance: (value: \"300 uF\"",
                    ),
                    (
                        "max_voltage: (value: \"FILL IN\"",
                        "max_voltage: (value: \"12 kV\"",
                    ),
                    ("frequency: \"FILL IN\"", "frequency: \"45 kHz\""),
                    ("peak_ratio: \"FILL IN\"", "peak_ratio: \"3.0\""),
                    ("date: \"FILL IN\"", "date: \"2026-11-01\""),
                ],
            ),
            (
                TemplateKind::CompressionCoil,
                vec![
                    (
                        "bore_radius: (value: \"FILL IN\"",
                        "bore_radius: (value: \"21 mm\"",
                    ),
                    ("length: (value: \"FILL IN\"", "length: (value: \"20 mm\""),
                    (
                        "extra_inductance: (value: \"FILL IN\"",
                        "extra_inductance: (value: \"20 nH\"",
                    ),
                ],
            ),
            (
                TemplateKind::BarCoil,
                vec![
                    ("length: (value: \"FILL IN\"", "length: (value: \"100 mm\""),
                    ("width: (value: \"FILL IN\"", "width: (value: \"20 mm\""),
                    (
                        "extra_inductance: (value: \"FILL IN\"",
                        "extra_inductance: (value: \"20 nH\"",
                    ),
                ],
            ),
            (
                TemplateKind::Explosive,
                vec![
                    (
                        "gurney_velocity: (value: \"FILL IN\"",
                        "gurney_velocity: (value: \"1500 m/s\"",
                    ),
                    (
                        "detonation_velocity: (value: \"FILL IN\"",
                        "detonation_velocity: (value: \"2500 m/s\"",
                    ),
                    (
                        "flyer_to_charge: (value: \"FILL IN\"",
                        "flyer_to_charge: (value: \"1.5\"",
                    ),
                    (
                        "preset_angle: (value: \"FILL IN\"",
                        "preset_angle: (value: \"0 deg\"",
                    ),
                ],
            ),
        ] {
            let text = template(kind, "t", "me", "2026-12-04");
            let err = parse_machine_file(origin(), &text).expect_err("a template is refused");
            assert!(err.to_string().contains("FILL IN"), "{kind:?}: {err}");
            let mut filled = text.clone();
            for (from, to) in fill {
                assert!(filled.contains(from), "{kind:?}: {from}");
                filled = filled.replace(from, to);
            }
            // Values filled, sources and description still the template's: refused.
            let err = parse_machine_file(origin(), &filled).expect_err("placeholders left");
            assert!(err.to_string().contains("placeholder"), "{kind:?}: {err}");
            let filled = filled.replace("\"FILL IN: ", "\"shop record: ");
            parse_machine_file(origin(), &filled)
                .unwrap_or_else(|e| panic!("{kind:?} filled in:\n{e}\n{filled}"));
        }
    }
}
