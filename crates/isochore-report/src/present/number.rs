//! How numbers are written, for every front end: fixed decimals, significant digits, the
//! decimals an estimate gets from its standard error, diagnostics in a table cell and a
//! confidence level as a percentage. One rule for all: a number that is not finite shows
//! as "—", and a value that rounds to zero never shows a minus sign ("-0.00" is "0.00").

/// The mark shown for a number that is not finite (NaN, ±∞) or not defined.
pub const MISSING: &str = "—";

/// `v` with `decimals` places, or "—" when it is not finite. A value that rounds to zero
/// is written without a sign.
///
/// ```
/// use isochore_report::present::fixed;
/// assert_eq!(fixed(2.5, 2), "2.50");
/// assert_eq!(fixed(-0.0004, 3), "0.000");
/// assert_eq!(fixed(f64::NAN, 2), "—");
/// ```
pub fn fixed(v: f64, decimals: usize) -> String {
    if !v.is_finite() {
        return MISSING.to_string();
    }
    let s = format!("{v:.decimals$}");
    match s.strip_prefix('-') {
        Some(rest) if rest.chars().all(|c| c == '0' || c == '.') => rest.to_string(),
        _ => s,
    }
}

/// `v` with about `digits` significant digits, in exponent form (`1.00e-7`) when its
/// magnitude is below 10⁻⁴ or at least 10⁶; "0" for zero, "—" when not finite.
pub fn sig(v: f64, digits: usize) -> String {
    if !v.is_finite() {
        return MISSING.to_string();
    }
    if v == 0.0 {
        return "0".to_string();
    }
    let mag = v.abs().log10().floor() as i64;
    if !(-4..6).contains(&mag) {
        return format!("{:.*e}", digits.saturating_sub(1), v);
    }
    let d = (digits as i64 - 1 - mag).max(0) as usize;
    fixed(v, d)
}

/// The number of decimals that shows `se` to two significant digits (0 to 8); 3 when `se`
/// is not a positive finite number. An estimate and its interval take the same decimals.
pub fn decimals_for(se: f64) -> usize {
    if !(se.is_finite() && se > 0.0) {
        return 3;
    }
    let d = 1 - se.log10().floor() as i64;
    d.clamp(0, 8) as usize
}

/// A diagnostic value for a table cell: three decimals, or two significant digits when it
/// is smaller than 0.01 in magnitude (leverages of a large series are of order p/n).
pub fn diag(v: f64) -> String {
    if v != 0.0 && v.abs() < 0.01 {
        sig(v, 2)
    } else {
        fixed(v, 3)
    }
}

/// A confidence level (0.95) as a percentage without a needless ".0": "95", "99.5".
pub fn percent(level: f64) -> String {
    fixed(level * 100.0, 1).trim_end_matches(".0").to_string()
}

/// "value ± SE" with the decimals the SE calls for ([`decimals_for`]).
pub fn plus_minus(value: f64, se: f64) -> String {
    let d = decimals_for(se);
    format!("{} ± {}", fixed(value, d), fixed(se, d))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn significant_digits_round_half_away_and_switch_to_exponents() {
        // 4 significant digits of −48.2371 are −48.24; of 0.012345 to 3, 0.0123.
        assert_eq!(sig(-48.2371, 4), "-48.24");
        assert_eq!(sig(0.012345, 3), "0.0123");
        assert_eq!(sig(123_456.0, 3), "123456");
        // Beyond the plain range: exponent form with digits − 1 decimals.
        assert_eq!(sig(1.0e-7, 3), "1.00e-7");
        assert_eq!(sig(2.5e6, 2), "2.5e6");
        assert_eq!(sig(0.0, 4), "0");
    }

    #[test]
    fn negative_zero_never_shows_a_sign() {
        assert_eq!(fixed(-0.0, 2), "0.00");
        assert_eq!(fixed(-0.004, 2), "0.00");
        assert_eq!(fixed(-0.005_1, 2), "-0.01");
        assert_eq!(fixed(-0.4, 0), "0");
        assert_eq!(sig(-0.0, 3), "0");
        assert_eq!(plus_minus(-0.0004, 0.012), "0.000 ± 0.012");
    }

    #[test]
    fn non_finite_numbers_show_as_a_dash() {
        for v in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            assert_eq!(fixed(v, 2), "—");
            assert_eq!(sig(v, 4), "—");
            assert_eq!(diag(v), "—");
        }
        // An SE that is not finite still leaves the estimate readable, to 3 decimals.
        assert_eq!(decimals_for(f64::NAN), 3);
        assert_eq!(plus_minus(1.5, f64::INFINITY), "1.500 ± —");
    }

    #[test]
    fn estimates_take_two_significant_digits_of_their_se() {
        assert_eq!(decimals_for(1.3), 1);
        assert_eq!(decimals_for(0.0123), 3);
        assert_eq!(decimals_for(25.0), 0);
        assert_eq!(decimals_for(1e-12), 8);
        assert_eq!(plus_minus(-48.2371, 0.91), "-48.24 ± 0.91");
    }

    #[test]
    fn diagnostics_and_levels() {
        assert_eq!(diag(0.4751), "0.475");
        assert_eq!(diag(4.0e-6), "4.0e-6");
        assert_eq!(diag(0.0012), "0.0012");
        assert_eq!(diag(0.0), "0.000");
        assert_eq!(percent(0.95), "95");
        assert_eq!(percent(0.995), "99.5");
        assert_eq!(percent(0.9), "90");
    }
}
