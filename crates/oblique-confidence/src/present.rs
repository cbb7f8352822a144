//! Numbers and texts as shown to people (the CLI prints these; the report can too).

/// A number with about four significant digits, no trailing zeros.
pub fn num(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    let digits = (3 - x.abs().log10().floor() as i32).clamp(0, 9) as usize;
    let s = format!("{x:.digits$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// An interval with open ends written as such: `[0.61, 0.85]`, `[0.61, unbounded)`.
pub fn interval(low: Option<f64>, high: Option<f64>) -> String {
    format!(
        "{}, {}",
        low.map_or("(unbounded".into(), |l| format!("[{}", num(l))),
        high.map_or("unbounded)".into(), |h| format!("{}]", num(h)))
    )
}

/// A probability as a percentage with one decimal (`97.3 %`), `< 0.1 %` and `> 99.9 %` at
/// the ends.
pub fn percent(p: f64) -> String {
    if p > 0.0 && p < 0.0005 {
        "< 0.1 %".into()
    } else if p < 1.0 && p > 0.9995 {
        "> 99.9 %".into()
    } else {
        format!("{:.1} %", 100.0 * p)
    }
}

/// The caution every probability carries.
pub const CAUTION: &str = "Screening estimate, not a guarantee: the probability is conditional on the model and on the distributions stated (docs/theory.md §15), and leaves out what they do not cover. Pulsed power at lethal voltages, stored energy, explosives and flying parts are involved in every real shot: follow local codes and licensed practice.";

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_read_well() {
        assert_eq!(num(0.11), "0.11");
        assert_eq!(num(572.04), "572");
        assert_eq!(num(1.0), "1");
        assert_eq!(num(0.0123456), "0.01235");
        assert_eq!(interval(Some(0.5), None), "[0.5, unbounded)");
        assert_eq!(percent(0.97349), "97.3 %");
        assert_eq!(percent(0.99999), "> 99.9 %");
    }
}
