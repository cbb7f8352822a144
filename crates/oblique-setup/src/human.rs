//! Human forms of SI values, as the tables and provenance texts show them.

/// Capacitance in uF.
pub fn uf(v: f64) -> String {
    format!("{} uF", g(v * 1e6))
}
/// Voltage in kV.
pub fn kv(v: f64) -> String {
    format!("{} kV", g(v / 1e3))
}
/// Inductance in nH.
pub fn nh(v: f64) -> String {
    format!("{} nH", g(v * 1e9))
}
/// Resistance in mohm.
pub fn mohm(v: f64) -> String {
    format!("{} mohm", g(v * 1e3))
}
/// Length in mm.
pub fn mm(v: f64) -> String {
    format!("{} mm", g(v * 1e3))
}
/// Energy in kJ.
pub fn kj(v: f64) -> String {
    format!("{} kJ", g(v / 1e3))
}
/// Velocity in m/s.
pub fn m_s(v: f64) -> String {
    format!("{} m/s", g(v))
}
/// A number with up to 4 significant digits, no trailing zeros.
pub fn g(v: f64) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let digits = (3 - v.abs().log10().floor() as i32).clamp(0, 9) as usize;
    let s = format!("{v:.digits$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// `v` rounded to 12 significant digits, so that unit conversions print without float noise
/// (values written into machine files).
pub fn round12(v: f64) -> f64 {
    if v == 0.0 || !v.is_finite() {
        return v;
    }
    let digits = 11 - v.abs().log10().floor() as i32;
    let f = 10f64.powi(digits);
    (v * f).round() / f
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn four_significant_digits_without_trailing_zeros() {
        assert_eq!(g(24.9376), "24.94");
        assert_eq!(g(2700.0), "2700");
        assert_eq!(g(0.5), "0.5");
        assert_eq!(g(0.0), "0");
        assert_eq!(kv(8000.0), "8 kV");
        assert_eq!(mm(2.5e-3), "2.5 mm");
        assert_eq!(round12(0.1 + 0.2), 0.3);
    }
}
