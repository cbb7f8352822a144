//! A bounded fuzz run of the quantity parser: arbitrary text and mutations of good inputs give a
//! finite SI value or an error, never a panic; a value that parses is finite. `FUZZ_CASES`
//! (default 512) sets the number of cases.

use oblique_core::units::{parse_quantity, QuantityKind};
use proptest::prelude::*;

const KINDS: &[QuantityKind] = &[
    QuantityKind::Velocity,
    QuantityKind::Angle,
    QuantityKind::Length,
    QuantityKind::Capacitance,
    QuantityKind::Voltage,
    QuantityKind::Inductance,
    QuantityKind::Resistance,
    QuantityKind::Energy,
    QuantityKind::Frequency,
    QuantityKind::Dimensionless,
];

const SEEDS: &[&str] = &[
    "350m/s",
    "0.35 km/s",
    "12deg",
    "12°",
    "0.21rad",
    "1.5mm",
    "200uF",
    "200µF",
    "8kV",
    "40 nH",
    "4 mohm",
    "21.6 kJ",
    "45kHz",
    "1e3",
    "-0",
    "1.5e-3 m",
    "12 kV",
    ".5mm",
    "5.mm",
];

const BITS: &[&str] = &[
    "e",
    "E",
    "+",
    "-",
    ".",
    " ",
    "\u{a0}",
    "°",
    "µ",
    "1e308",
    "1e-400",
    "NaN",
    "inf",
    "/",
    "^2",
    "k",
    "M",
    "G",
    "m",
    "u",
    "0x",
    "_",
    ",",
    "\u{0}",
    "\u{202e}",
    "999999999999",
];

fn cases() -> u32 {
    std::env::var("FUZZ_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(512)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: cases(), failure_persistence: None, ..ProptestConfig::default() })]

    #[test]
    fn arbitrary_text_never_panics(s in "\\PC{0,40}", k in 0usize..10) {
        if let Ok(v) = parse_quantity(&s, KINDS[k]) {
            prop_assert!(v.is_finite(), "'{s}' gave {v}");
        }
    }

    #[test]
    fn mutated_inputs_never_panic(seed in 0usize..19, inserts in proptest::collection::vec((any::<usize>(), 0usize..26), 0..6), cut in any::<usize>(), k in 0usize..10) {
        let mut s = SEEDS[seed].to_string();
        for (at, b) in inserts {
            let mut at = at % (s.len() + 1);
            while !s.is_char_boundary(at) {
                at -= 1;
            }
            s.insert_str(at, BITS[b]);
        }
        let mut cut = cut % (s.len() + 1);
        while !s.is_char_boundary(cut) {
            cut -= 1;
        }
        for text in [s.as_str(), &s[..cut], &s[cut..]] {
            if let Ok(v) = parse_quantity(text, KINDS[k]) {
                prop_assert!(v.is_finite(), "'{text}' gave {v}");
            }
        }
    }
}
