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

/// The superscript form of an integer exponent: −12 → "⁻¹²".
fn superscript(n: i64) -> String {
    const DIGITS: [char; 10] = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];
    let mut s = String::new();
    if n < 0 {
        s.push('⁻');
    }
    for c in n.unsigned_abs().to_string().chars() {
        s.push(c.to_digit(10).map_or(c, |d| DIGITS[d as usize]));
    }
    s
}

/// `v` to `digits` significant digits as a chemist writes a constant: plainly between
/// 10⁻³ and 10⁴ ("0.0123", "4567"), otherwise in ×10ⁿ notation ("3.12 × 10⁶",
/// "4.5 × 10⁻⁹"), never "3.121e6"; "0" for zero and "—" when not finite. For readable
/// output only: JSON keeps plain numbers.
///
/// ```
/// use isochore_report::present::times_ten;
/// assert_eq!(times_ten(3.121e6, 3), "3.12 × 10⁶");
/// ```
pub fn times_ten(v: f64, digits: usize) -> String {
    times_ten_with(v, digits, Exponent::Superscript)
}

/// How [`times_ten_with`] writes the power of ten.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Exponent {
    /// "10⁻⁵", for documents and the terminal.
    Superscript,
    /// "10^-5", for the window, whose font has no superscript minus.
    Caret,
}

/// As [`times_ten`], the power of ten written as `exponent` says: "3.12 × 10^6" with
/// [`Exponent::Caret`].
pub fn times_ten_with(v: f64, digits: usize, exponent: Exponent) -> String {
    if !v.is_finite() {
        return MISSING.to_string();
    }
    if v == 0.0 {
        return "0".to_string();
    }
    let digits = digits.max(1);
    // The exponent after rounding to `digits` significant digits, read from Rust's own
    // exponent form so that 9.996e6 to 3 digits becomes 1.00 × 10⁷, not 10.0 × 10⁶.
    let e_form = format!("{:.*e}", digits - 1, v);
    let (mantissa, exp) = e_form.split_once('e').unwrap_or((e_form.as_str(), "0"));
    let exp: i64 = exp.parse().unwrap_or(0);
    if (-3..4).contains(&exp) {
        // Decimals from the rounded exponent, so 99.999 999 to 4 digits is "100.0".
        return fixed(v, (digits as i64 - 1 - exp).max(0) as usize);
    }
    match exponent {
        Exponent::Superscript => format!("{mantissa} × 10{}", superscript(exp)),
        Exponent::Caret => format!("{mantissa} × 10^{exp}"),
    }
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

/// A number as a chemist would type it into a field: at most `max_decimals` places and no
/// trailing zeros ("310.15", not "310.150000"), "—" when not finite. Used when the window
/// rewrites a typed value in another unit.
///
/// ```
/// use isochore_report::present::number::plain;
/// assert_eq!(plain(37.0 + 273.15, 6), "310.15");
/// assert_eq!(plain(25.0, 6), "25");
/// ```
pub fn plain(v: f64, max_decimals: usize) -> String {
    let s = fixed(v, max_decimals);
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
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
    fn constants_are_written_times_ten_to_the_n() {
        // Worked by hand: 3 121 000 = 3.121 × 10⁶, to 3 digits 3.12 × 10⁶.
        assert_eq!(times_ten(3_121_000.0, 3), "3.12 × 10⁶");
        assert_eq!(times_ten(3_121_000.0, 4), "3.121 × 10⁶");
        // 0.000 000 004 5 = 4.5 × 10⁻⁹.
        assert_eq!(times_ten(4.5e-9, 2), "4.5 × 10⁻⁹");
        // 9 996 000 to 3 digits rounds up into the next power: 1.00 × 10⁷.
        assert_eq!(times_ten(9_996_000.0, 3), "1.00 × 10⁷");
        // 2.5 × 10¹², and a negative value with the minus of every other number here.
        assert_eq!(times_ten(2.5e12, 2), "2.5 × 10¹²");
        assert_eq!(times_ten(-1.5e-4, 3), "-1.50 × 10⁻⁴");
        // Between 10⁻³ and 10⁴ a number is written plainly.
        assert_eq!(times_ten(1234.0, 4), "1234");
        assert_eq!(times_ten(0.0123, 3), "0.0123");
        assert_eq!(times_ten(9999.4, 4), "9999");
        // 9999.6 to 4 digits is 10 000: ×10⁴.
        assert_eq!(times_ten(9999.6, 4), "1.000 × 10⁴");
        // 99.999 999 99 to 4 digits is 100.0 (rounding carries into the next decade).
        assert_eq!(times_ten(99.999_999_99, 4), "100.0");
        assert_eq!(times_ten(0.0, 3), "0");
        assert_eq!(times_ten(f64::NAN, 3), "—");
        assert!(!times_ten(3.121e6, 4).contains('e'));
        // The window's form: the same digits, the power after a caret.
        assert_eq!(times_ten_with(4.5e-9, 2, Exponent::Caret), "4.5 × 10^-9");
        assert_eq!(times_ten_with(3.121e6, 3, Exponent::Caret), "3.12 × 10^6");
        assert_eq!(times_ten_with(1234.0, 4, Exponent::Caret), "1234");
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
