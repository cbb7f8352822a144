//! Number parsing, correctly rounded (the same result and grammar as `str::parse::<f64>`): the
//! `fast-float2` crate, with one hand-written path in front of it for the commonest shape,
//! `[-+]digits[.digits]`, where a measurement shows it faster (see `plain_decimal`).

/// Parse a decimal number; the result is the same as `str::parse::<f64>` (correctly
/// rounded, the same grammar). Surrounding ASCII spaces are allowed. `None` if the text is not
/// a finite number.
#[inline]
pub fn parse_number(bytes: &[u8]) -> Option<f64> {
    // A field with spaces around it is no plain decimal: the slow path trims it.
    match plain_decimal(bytes) {
        Some(v) => Some(v),
        None => parse_number_slow(bytes),
    }
}

/// Everything but the plain shape: spaces around the number, exponents, long mantissas, and
/// what is not a number.
#[cold]
#[inline(never)]
fn parse_number_slow(bytes: &[u8]) -> Option<f64> {
    let b = trim_spaces(bytes);
    if let Some(v) = plain_decimal(b) {
        return Some(v);
    }
    match fast_float2::parse::<f64, _>(b) {
        // fast-float2 (like std) also reads "inf", "infinity" and "nan": refuse them.
        Ok(v) if v.is_finite() => Some(v),
        _ => None,
    }
}

/// Why a field is not a number, for the message about its row: empty, a unit written in
/// the field (it belongs in the header, as in `cell`), or not a finite number.
pub fn number_reason(text: &[u8], cell: &str) -> String {
    let t = String::from_utf8_lossy(trim_spaces(text)).into_owned();
    if t.is_empty() {
        "empty: every row needs a value here (fill it in, or take the row out)".into()
    } else if t.starts_with(|c: char| c.is_ascii_digit() || c == '-' || c == '+' || c == '.')
        && t.chars().any(|c| c.is_alphabetic())
        && !t.to_ascii_lowercase().starts_with("inf")
        && !t.to_ascii_lowercase().starts_with("nan")
    {
        format!("'{t}' is not a plain number (the unit belongs in the header, as in {cell})")
    } else {
        format!("'{t}' is not a finite number (write a plain decimal such as 12.5 or 1.25e1)")
    }
}

/// Trim ASCII spaces and tabs.
#[inline]
pub fn trim_spaces(b: &[u8]) -> &[u8] {
    let blank = |c: u8| c == b' ' || c == b'\t';
    match (b.first(), b.last()) {
        // Nothing to trim: the common case, two tests.
        (Some(&f), Some(&l)) if !blank(f) && !blank(l) => b,
        _ => trim_blank_ends(b),
    }
}

fn trim_blank_ends(b: &[u8]) -> &[u8] {
    let mut s = 0;
    let mut e = b.len();
    while s < e && (b[s] == b' ' || b[s] == b'\t') {
        s += 1;
    }
    while e > s && (b[e - 1] == b' ' || b[e - 1] == b'\t') {
        e -= 1;
    }
    &b[s..e]
}

/// Powers of ten that are exact doubles (Clinger's fast path; `plain_row` divides by the same).
pub(super) const EXACT_POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// The commonest shape, `[-+]digits[.digits]`, in one pass over the bytes with no index
/// bookkeeping: each byte is a digit, the first point, or the end of this path (an exponent or
/// anything else goes on to `fast-float2`). Clinger's fast path: at most 19 digits forming an
/// integer of at most 2^53 and at most 22 decimals make one exact integer divided by one exact
/// power of ten, so one correctly rounded division gives the correctly rounded result.
///
/// Kept by measurement: every number field of the 2 000 000-row benchmark file
/// (`bench/gen_interface.py`), parsed in a loop on one core, best of 15 passes (2026-12-04,
/// the 2-core VM of `docs/performance.md`, other builds running): `parse_number` (this path)
/// 4.0 ns a field, `fast-float2` 0.2.4 5.5 ns, `lexical-core` 1.0 6.1 ns, std 11.0 ns (`cd bench/micro && cargo run --release`).
#[inline(always)]
fn plain_decimal(b: &[u8]) -> Option<f64> {
    let (mant, frac, neg) = plain_digits(b)?;
    let v = mant as f64 / EXACT_POW10[frac];
    Some(if neg { -v } else { v })
}

/// Whether `bytes` is a number [`parse_number`] reads (the same answer as
/// `parse_number(bytes).is_some()`), without the conversion: for a column that is only checked
/// (the time), the plain shape costs no division.
#[inline(always)]
pub fn is_number(bytes: &[u8]) -> bool {
    match plain_digits(bytes) {
        Some(_) => true,
        None => parse_number_slow(bytes).is_some(),
    }
}

/// The digits of the plain shape of [`plain_decimal`]: (mantissa, decimals, negative) when
/// the text has that shape and the conversion is exact, `None` otherwise.
#[inline(always)]
fn plain_digits(b: &[u8]) -> Option<(u64, usize, bool)> {
    let (neg, rest) = match b.split_first() {
        Some((b'-', r)) => (true, r),
        Some((b'+', r)) => (false, r),
        _ => (false, b),
    };
    // The integer digits, then (after a point) the fraction's: each loop tests one range per
    // byte, and the digit counts come from where the loops stop.
    let mut mant: u64 = 0;
    let mut int = rest;
    while let Some((&c, tail)) = int.split_first() {
        let d = c.wrapping_sub(b'0');
        if d > 9 {
            break;
        }
        mant = mant.wrapping_mul(10).wrapping_add(u64::from(d));
        int = tail;
    }
    let int_digits = rest.len() - int.len();
    let frac = match int.split_first() {
        None => 0,
        Some((b'.', fraction)) => {
            for &c in fraction {
                let d = c.wrapping_sub(b'0');
                if d > 9 {
                    return None;
                }
                mant = mant.wrapping_mul(10).wrapping_add(u64::from(d));
            }
            fraction.len()
        }
        Some(_) => return None,
    };
    let digits = int_digits + frac;
    if digits == 0 || digits > 19 || mant > (1u64 << 53) || frac > 22 {
        return None;
    }
    Some((mant, frac, neg))
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    #[test]
    fn numbers() {
        for (t, v) in [
            ("1", 1.0),
            (" 2.5 ", 2.5),
            ("-0.125", -0.125),
            ("1e3", 1000.0),
            ("+.5", 0.5),
            ("5.", 5.0),
            ("1.5E-2", 0.015),
            ("0.000", 0.0),
        ] {
            assert_eq!(parse_number(t.as_bytes()), Some(v), "{t}");
        }
        // Past the fast path's limits (20 digits, 2^53 + 1, a long exponent): fast-float2
        // decides, as std would.
        for (t, v) in [
            ("12345678901234567890", 12345678901234567890.0),
            ("9007199254740993", 9007199254740993.0),
            ("0.00000000000000000000000001", 1e-26),
            ("1e000000000000000000003", 1000.0),
        ] {
            assert_eq!(parse_number(t.as_bytes()), Some(v), "{t}");
        }
        for t in [
            "", "abc", "1.5 mm", "inf", "NaN", "1e", "--1", "1e400", ".", "1.2.3", "1e+", "e5",
            "-", "1 2",
        ] {
            assert_eq!(parse_number(t.as_bytes()), None, "{t}");
            assert!(!is_number(t.as_bytes()), "{t}");
        }
        for t in [
            "1",
            " 2.5 ",
            "-0.125",
            "1e3",
            "+.5",
            "5.",
            "12345678901234567890",
        ] {
            assert!(is_number(t.as_bytes()), "{t}");
        }
    }

    proptest! {
        /// Both paths give exactly what std's parser gives.
        #[test]
        fn fast_parse_matches_std(m in 0u64..10_000_000_000_000_000, e in -30i32..30, neg in any::<bool>(), dot in 0usize..20) {
            let mut digits = m.to_string();
            if dot < digits.len() {
                digits.insert(digits.len() - dot, '.');
            }
            let text = format!("{}{}e{}", if neg { "-" } else { "" }, digits, e);
            let want: f64 = text.parse().unwrap();
            prop_assert_eq!(parse_number(text.as_bytes()).map(f64::to_bits), Some(want.to_bits()), "{}", text);
            let plain = format!("{}{}", if neg { "-" } else { "" }, digits);
            let want: f64 = plain.parse().unwrap();
            prop_assert_eq!(parse_number(plain.as_bytes()).map(f64::to_bits), Some(want.to_bits()), "{}", plain);
        }

        /// `is_number` answers as `parse_number` does, on any short text of number-like bytes.
        #[test]
        fn is_number_matches_parse(t in "[-+0-9.eE a]{0,24}") {
            prop_assert_eq!(is_number(t.as_bytes()), parse_number(t.as_bytes()).is_some(), "{}", t);
        }

        #[test]
        fn any_float_round_trips(x in any::<f64>()) {
            prop_assume!(x.is_finite());
            let text = format!("{x}");
            prop_assert_eq!(parse_number(text.as_bytes()), Some(x));
            let text = format!("{x:e}");
            prop_assert_eq!(parse_number(text.as_bytes()), Some(x));
        }
    }
}
