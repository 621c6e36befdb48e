//! The column mapping: which column holds what, in which unit, and the conversion of one
//! row of cells (as typed) to the fitting scale (T in K, ln K, σ(ln K)).
//!
//! The mapping is what the header recogniser found (module `header`); a caller may inspect
//! it, show it ([`ColumnMapping::describe`]) and override it through
//! [`crate::ImportOptions::mapping`]. Project files store it, and recompute every value
//! from the raw cells with `convert_cells`, so the cells stay the single source of truth.
//! Unit arithmetic itself lives in `isochore_fit::units`.

use crate::error::RowProblem;
use isochore_fit::{QuantityKind, TemperatureUnit};
use serde::{Deserialize, Serialize};

/// Which column holds the temperature, and on which scale.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct TemperatureColumn {
    /// 0-based column index into the headers.
    pub column: usize,
    /// The scale the cells are written in.
    pub unit: TemperatureUnit,
    /// True when the header gave no unit and the scale was inferred from the values (see
    /// the crate README for the rule).
    #[serde(default)]
    pub assumed: bool,
}

/// Which column holds the measured quantity, and what it is.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct QuantityColumn {
    /// 0-based column index into the headers.
    pub column: usize,
    /// What the cells hold (K, ln K, pK, K_d in µM, ΔG° in kJ/mol, …).
    pub kind: QuantityKind,
}

/// What an uncertainty column holds.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", tag = "type", content = "quantity")]
pub enum UncertaintyKind {
    /// An absolute standard uncertainty of the measured quantity, written as this kind.
    /// The kind must be of the same family as the measured column (K_d in any
    /// concentration unit for a K_d column, ΔG° in any energy unit for a ΔG° column, the
    /// very same kind otherwise).
    Absolute(QuantityKind),
    /// A relative standard uncertainty in percent of the measured value.
    RelativePercent,
}

/// Which column holds the uncertainty of the measured quantity.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct UncertaintyColumn {
    /// 0-based column index into the headers.
    pub column: usize,
    /// What the cells hold.
    pub kind: UncertaintyKind,
}

/// What each column of a file means. Column indices are 0-based into the header list;
/// messages show them 1-based.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ColumnMapping {
    /// The temperature column.
    pub temperature: TemperatureColumn,
    /// The measured quantity.
    pub quantity: QuantityColumn,
    /// The uncertainty of the measured quantity, if the file has one.
    #[serde(default)]
    pub uncertainty: Option<UncertaintyColumn>,
    /// A column naming the data set (sample, condition) of each row.
    #[serde(default)]
    pub series: Option<usize>,
    /// A free-text note column.
    #[serde(default)]
    pub note: Option<usize>,
    /// The standard uncertainty of the temperature, σ(T), in the temperature column's unit
    /// (a difference: a σ in °C is the same number in K, one in °F is 5/9 of it in K). Only
    /// a column choice gives this role (`sigma-t=u(T)`); a `u(T)` header alone is kept but
    /// not used, so files read before the role existed fit as they did. Not written when
    /// absent, so older project files save back the same.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub temperature_uncertainty: Option<usize>,
    /// Columns deliberately not used: empty headers, temperature uncertainties, headers not
    /// recognised (kept with the data, see [`crate::ImportOptions::ignore_unknown_columns`]),
    /// and columns whose role a column choice gave to another.
    #[serde(default)]
    pub ignored: Vec<usize>,
}

impl ColumnMapping {
    /// A mapping with just a temperature and a quantity column.
    pub fn new(
        temperature: usize,
        unit: TemperatureUnit,
        quantity: usize,
        kind: QuantityKind,
    ) -> Self {
        ColumnMapping {
            temperature: TemperatureColumn {
                column: temperature,
                unit,
                assumed: false,
            },
            quantity: QuantityColumn {
                column: quantity,
                kind,
            },
            uncertainty: None,
            series: None,
            note: None,
            temperature_uncertainty: None,
            ignored: Vec::new(),
        }
    }

    /// Checks that the columns exist, are distinct, and that the uncertainty kind belongs
    /// to the measured quantity's family. Returns a message on failure.
    pub fn check(&self, n_columns: usize) -> Result<(), String> {
        let mut used: Vec<(usize, &str)> = vec![
            (self.temperature.column, "temperature"),
            (self.quantity.column, "quantity"),
        ];
        if let Some(u) = self.uncertainty {
            used.push((u.column, "uncertainty"));
        }
        if let Some(s) = self.series {
            used.push((s, "series"));
        }
        if let Some(n) = self.note {
            used.push((n, "note"));
        }
        if let Some(c) = self.temperature_uncertainty {
            used.push((c, "temperature uncertainty σ(T)"));
        }
        for (i, &(c, role)) in used.iter().enumerate() {
            if c >= n_columns {
                return Err(format!(
                    "the {role} column is column {} but the file has {}",
                    one_based(c),
                    isochore_fit::error::counted(n_columns, "column", "columns")
                ));
            }
            if let Some(&(_, other)) = used[..i].iter().find(|(c2, _)| *c2 == c) {
                return Err(format!(
                    "column {} is used both as {other} and as {role}",
                    one_based(c)
                ));
            }
        }
        if let Some(UncertaintyColumn {
            kind: UncertaintyKind::Absolute(k),
            ..
        }) = self.uncertainty
        {
            if !same_family(k, self.quantity.kind) {
                return Err(format!(
                    "the uncertainty is given as {} but the measured quantity is {}",
                    k.label(),
                    self.quantity.kind.label()
                ));
            }
        }
        Ok(())
    }

    /// The headers of the columns kept but not used (in neither the temperature, quantity,
    /// uncertainty, data-set nor note role), in column order; columns with an empty header
    /// are left out of the list.
    pub fn unused_columns(&self, headers: &[String]) -> Vec<String> {
        let used = [
            Some(self.temperature.column),
            Some(self.quantity.column),
            self.uncertainty.map(|u| u.column),
            self.series,
            self.note,
            self.temperature_uncertainty,
        ];
        headers
            .iter()
            .enumerate()
            .filter(|(i, h)| !used.contains(&Some(*i)) && !h.trim().is_empty())
            .map(|(_, h)| h.trim().to_string())
            .collect()
    }

    /// One plain sentence per used column, saying what it holds and how it is converted,
    /// e.g. `column 1 'T (°C)': temperature in °C, converted to K (T/K = t/°C + 273.15)`.
    pub fn describe(&self, headers: &[String]) -> Vec<String> {
        let h = |c: usize| headers.get(c).map(String::as_str).unwrap_or("");
        let mut out = Vec::new();
        let t = self.temperature;
        let conv = match t.unit {
            TemperatureUnit::Kelvin => "used as is".to_string(),
            TemperatureUnit::Celsius => "converted to K (T/K = t/°C + 273.15)".to_string(),
            TemperatureUnit::Fahrenheit => {
                "converted to K (T/K = (t/°F + 459.67) × 5/9)".to_string()
            }
        };
        let assumed = if t.assumed {
            " — the header has no unit; the scale was inferred from the values, add a unit to the header to be sure"
        } else {
            ""
        };
        out.push(format!(
            "column {} '{}': temperature in {}, {conv}{assumed}",
            t.column + 1,
            h(t.column),
            t.unit.symbol()
        ));
        let q = self.quantity;
        let qconv = match q.kind {
            QuantityKind::K => "ln K = ln(value)".to_string(),
            QuantityKind::LnK => "used as ln K".to_string(),
            QuantityKind::Log10K => "ln K = value × ln 10".to_string(),
            QuantityKind::PK => "ln K = −value × ln 10".to_string(),
            QuantityKind::DissociationConstant(u) => format!(
                "association constant K = 1 M / K_d, ln K = −ln(value × {:e} mol/L / 1 mol/L)",
                u.mol_per_l()
            ),
            QuantityKind::DeltaG(e) => {
                format!("ln K = −value × {} J/mol / (R T)", e.joules_per_mole())
            }
        };
        out.push(format!(
            "column {} '{}': {}, {qconv}",
            q.column + 1,
            h(q.column),
            q.kind.label()
        ));
        if let Some(u) = self.uncertainty {
            let what = match u.kind {
                UncertaintyKind::Absolute(k) => format!(
                    "standard uncertainty of {}, converted to σ(ln K) by first-order propagation",
                    k.label()
                ),
                UncertaintyKind::RelativePercent => {
                    "standard uncertainty in percent of the value, converted to σ(ln K) by first-order propagation".to_string()
                }
            };
            out.push(format!("column {} '{}': {what}", u.column + 1, h(u.column)));
        }
        if let Some(s) = self.series {
            out.push(format!(
                "column {} '{}': data set name (one data set per distinct name)",
                s + 1,
                h(s)
            ));
        }
        if let Some(n) = self.note {
            out.push(format!("column {} '{}': free-text note", n + 1, h(n)));
        }
        if let Some(c) = self.temperature_uncertainty {
            let conv = match t.unit {
                TemperatureUnit::Fahrenheit => "× 5/9 to K (a temperature difference)",
                TemperatureUnit::Celsius => "the same number in K (a temperature difference)",
                TemperatureUnit::Kelvin => "used as is",
            };
            out.push(format!(
                "column {} '{}': standard uncertainty of the temperature σ(T) in {}, {conv}",
                c + 1,
                h(c),
                t.unit.symbol()
            ));
        }
        for &c in &self.ignored {
            out.push(format!("column {} '{}': kept but not used", c + 1, h(c)));
        }
        out
    }
}

/// True when two quantity kinds are the same quantity (units may differ for K_d and ΔG°).
pub(crate) fn same_family(a: QuantityKind, b: QuantityKind) -> bool {
    std::mem::discriminant(&a) == std::mem::discriminant(&b)
}

/// A 0-based column index shown 1-based, without overflow for any stored index (a project
/// edited by hand may hold 2⁶⁴ − 1).
pub(crate) fn one_based(c: usize) -> u128 {
    c as u128 + 1
}

/// The converted values of one accepted row.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Converted {
    pub t_k: f64,
    pub ln_k: f64,
    pub sigma_ln_k: Option<f64>,
}

/// Parses one number cell. `comma_decimal` lets a comma stand for the decimal point.
/// Leading and trailing spaces, a leading '+', and the Unicode minus sign are accepted.
#[inline(always)]
pub(crate) fn parse_number(cell: &str, comma_decimal: bool) -> Result<f64, RowProblem> {
    match fast_decimal(cell.as_bytes(), comma_decimal) {
        Some(v) => Ok(v),
        None => parse_number_slow(cell, comma_decimal),
    }
}

/// Everything the fast path does not answer: the standard parser, then spaces, the Unicode
/// minus and decimal commas.
#[cold]
#[inline(never)]
fn parse_number_slow(cell: &str, comma_decimal: bool) -> Result<f64, RowProblem> {
    if let Ok(v) = cell.parse::<f64>() {
        return not_underflowed(finite(v)?, cell);
    }
    let s = cell.trim_matches(|c: char| c.is_whitespace());
    if s.is_empty() {
        return Err(RowProblem::Empty);
    }
    if s.len() > 64 {
        return Err(RowProblem::NotANumber);
    }
    let mut buf = [0u8; 64];
    let mut n = 0;
    for ch in s.chars() {
        let b = match ch {
            '\u{2212}' | '\u{2013}' => b'-',
            ',' if comma_decimal => b'.',
            c if c.is_ascii() => c as u8,
            _ => return Err(RowProblem::NotANumber),
        };
        buf[n] = b;
        n += 1;
    }
    let t = std::str::from_utf8(&buf[..n]).map_err(|_| RowProblem::NotANumber)?;
    match t.parse::<f64>() {
        Ok(v) => not_underflowed(finite(v)?, t),
        Err(_) => Err(RowProblem::NotANumber),
    }
}

/// A parsed 0 whose text has a non-zero digit before its exponent underflowed
/// (`1e-400`): that is not the zero the user wrote. (The fast path never underflows: its
/// exponents stay within ±22.)
fn not_underflowed(v: f64, text: &str) -> Result<f64, RowProblem> {
    if v == 0.0 {
        let mantissa = text.split(['e', 'E']).next().unwrap_or("");
        if mantissa.bytes().any(|b| (b'1'..=b'9').contains(&b)) {
            return Err(RowProblem::Underflow);
        }
    }
    Ok(v)
}

/// The decimal mark a number cell uses, for the one-convention-per-file rule.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Mark {
    /// No decimal mark (an integer, or not checked).
    None,
    /// A decimal point.
    Point,
    /// A comma that can only be a decimal comma (e.g. `7,6` or `1,2500`).
    Comma,
    /// A comma that may also be a thousands separator: one to three digits, a comma, and
    /// exactly three digits (`1,500`).
    AmbiguousComma,
}

/// Classifies a number cell that parsed with commas allowed as decimal marks.
pub(crate) fn mark_of(cell: &str) -> Mark {
    let b = cell.trim().as_bytes();
    let Some(c) = memchr::memchr(b',', b) else {
        return if memchr::memchr(b'.', b).is_some() {
            Mark::Point
        } else {
            Mark::None
        };
    };
    let int = match b.first() {
        Some(b'+' | b'-') => &b[1..c],
        _ => &b[..c],
    };
    let frac = &b[c + 1..];
    let digits = |s: &[u8]| s.iter().all(u8::is_ascii_digit);
    if (1..=3).contains(&int.len()) && digits(int) && frac.len() == 3 && digits(frac) {
        Mark::AmbiguousComma
    } else {
        Mark::Comma
    }
}

/// Exact powers of ten representable in an f64 (10^0 … 10^22).
const POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// Clinger's fast path for plain decimals: `[+-]digits[.digits][e[+-]digits]` whose
/// significand fits in 53 bits and whose decimal exponent is within ±22. Then the value is
/// one exact integer times or divided by one exact power of ten, so a single IEEE operation
/// gives the correctly rounded result (the same one `str::parse` gives). Returns `None` for
/// anything else, which then goes to the standard parser.
#[inline(always)]
pub(crate) fn fast_decimal(s: &[u8], comma_decimal: bool) -> Option<f64> {
    let n = s.len();
    if n == 0 || n > 32 {
        return None;
    }
    let mut i = 0;
    let neg = match s[0] {
        b'-' => {
            i = 1;
            true
        }
        b'+' => {
            i = 1;
            false
        }
        _ => false,
    };
    // One loop over the digits before and after the decimal mark (one hard-to-predict
    // exit instead of two). At most 19 digits fit a u64 without overflow; the 53-bit limit
    // is checked once at the end (the significand only grows digit by digit).
    let first = i;
    let mut mant: u64 = 0;
    let mut dot = usize::MAX;
    while i < n {
        let b = s[i];
        let d = b.wrapping_sub(b'0');
        if d <= 9 {
            mant = mant.wrapping_mul(10).wrapping_add(d as u64);
        } else if dot == usize::MAX && (b == b'.' || (comma_decimal && b == b',')) {
            dot = i;
        } else {
            break;
        }
        i += 1;
    }
    let (digits, mut exp) = if dot == usize::MAX {
        (i - first, 0i32)
    } else {
        (i - first - 1, -((i - dot - 1) as i32))
    };
    if digits == 0 || digits > 19 || mant > (1 << 53) {
        return None;
    }
    if i < n && (s[i] | 0x20) == b'e' {
        i += 1;
        let eneg = match s.get(i) {
            Some(b'-') => {
                i += 1;
                true
            }
            Some(b'+') => {
                i += 1;
                false
            }
            _ => false,
        };
        let mut e: i32 = 0;
        let mut digits = false;
        while i < n {
            let d = s[i].wrapping_sub(b'0');
            if d > 9 {
                break;
            }
            digits = true;
            if e < 10_000 {
                e = e * 10 + d as i32;
            }
            i += 1;
        }
        if !digits {
            return None;
        }
        exp += if eneg { -e } else { e };
    }
    if i != n {
        return None;
    }
    let v = mant as f64;
    let r = if mant == 0 || exp == 0 {
        v
    } else if (1..=22).contains(&exp) {
        v * POW10[exp as usize]
    } else if (-22..0).contains(&exp) {
        v / POW10[(-exp) as usize]
    } else {
        return None;
    };
    Some(if neg { -r } else { r })
}

fn finite(v: f64) -> Result<f64, RowProblem> {
    if v.is_finite() {
        Ok(v)
    } else {
        Err(RowProblem::NotFinite)
    }
}

/// Factor turning a value of kind `from` into the units of kind `to` (same family).
#[inline]
fn unit_factor(from: QuantityKind, to: QuantityKind) -> f64 {
    match (from, to) {
        (QuantityKind::DissociationConstant(a), QuantityKind::DissociationConstant(b)) => {
            a.mol_per_l() / b.mol_per_l()
        }
        (QuantityKind::DeltaG(a), QuantityKind::DeltaG(b)) => {
            a.joules_per_mole() / b.joules_per_mole()
        }
        _ => 1.0,
    }
}

/// Converts one row. `cell(i)` returns the text of 0-based column `i`. On failure, returns
/// the 0-based column at fault and the problem.
#[inline]
///
/// A temperature outside 1 to 10 000 K is refused unless `allow_extreme_temperatures`.
pub(crate) fn convert_cells<'a>(
    mapping: &ColumnMapping,
    comma_decimal: bool,
    allow_extreme_temperatures: bool,
    cell: impl Fn(usize) -> &'a str,
) -> Result<Converted, (usize, RowProblem)> {
    let tc = mapping.temperature.column;
    let t_raw = parse_number(cell(tc), comma_decimal).map_err(|p| (tc, p))?;
    let t_k = mapping.temperature.unit.to_kelvin(t_raw);
    if !t_k.is_finite() {
        return Err((tc, RowProblem::NotFinite));
    }
    if t_k <= 0.0 {
        return Err((tc, RowProblem::BelowAbsoluteZero { kelvin: t_k }));
    }
    if !allow_extreme_temperatures && !isochore_fit::is_plausible_temperature(t_k) {
        return Err((tc, RowProblem::ImplausibleTemperature { kelvin: t_k }));
    }
    let qc = mapping.quantity.column;
    let kind = mapping.quantity.kind;
    let q = parse_number(cell(qc), comma_decimal).map_err(|p| (qc, p))?;
    let ln_k = kind.to_ln_k(q, t_k).map_err(|e| (qc, fit_problem(e)))?;
    let sigma_ln_k = match mapping.uncertainty {
        None => None,
        Some(u) => {
            let text = cell(u.column);
            if crate::text::is_blank(text) {
                None
            } else {
                let s = parse_number(text, comma_decimal).map_err(|p| (u.column, p))?;
                if s <= 0.0 {
                    return Err((u.column, RowProblem::NonPositiveSigma));
                }
                let sigma_q = match u.kind {
                    UncertaintyKind::Absolute(k) => s * unit_factor(k, kind),
                    // Relative to the value as written: for K and K_d this gives
                    // σ(ln K) = s/100 exactly; for logarithmic kinds it is the rarely used
                    // "percent of the logarithm", taken literally.
                    UncertaintyKind::RelativePercent => q.abs() * s / 100.0,
                };
                let v = match kind {
                    // Same first-order formula as `QuantityKind::sigma_to_ln_k` (σ/value),
                    // without taking the logarithm a second time; q > 0 was checked above.
                    QuantityKind::K | QuantityKind::DissociationConstant(_) => sigma_q / q,
                    _ => kind
                        .sigma_to_ln_k(q, sigma_q, t_k)
                        .map_err(|e| (u.column, fit_problem(e)))?,
                };
                if !(v.is_finite() && v > 0.0) {
                    return Err((u.column, RowProblem::OutOfRange));
                }
                Some(v)
            }
        }
    };
    Ok(Converted {
        t_k,
        ln_k,
        sigma_ln_k,
    })
}

/// The σ(T) cell of a row in kelvin, for a mapping with a temperature-uncertainty column
/// (`None` without one). The cell is in the temperature column's unit; σ is a difference, so
/// °C and K give the same number and °F is scaled by 5/9. An empty cell, a cell that is not
/// a finite number, and σ(T) ≤ 0 are refused with the column at fault.
pub(crate) fn convert_sigma_t<'a>(
    mapping: &ColumnMapping,
    comma_decimal: bool,
    cell: impl Fn(usize) -> &'a str,
) -> Result<Option<f64>, (usize, RowProblem)> {
    let Some(c) = mapping.temperature_uncertainty else {
        return Ok(None);
    };
    let s = parse_number(cell(c), comma_decimal).map_err(|p| (c, p))?;
    if s <= 0.0 {
        return Err((c, RowProblem::NonPositiveSigma));
    }
    let factor = match mapping.temperature.unit {
        TemperatureUnit::Fahrenheit => 5.0 / 9.0,
        TemperatureUnit::Celsius | TemperatureUnit::Kelvin => 1.0,
    };
    Ok(Some(s * factor))
}

fn fit_problem(e: isochore_fit::Error) -> RowProblem {
    match e {
        isochore_fit::Error::NonPositiveConstant { .. } => RowProblem::NonPositiveConstant,
        isochore_fit::Error::NonPositiveSigma { .. } => RowProblem::NonPositiveSigma,
        isochore_fit::Error::NonPositiveTemperature { kelvin, .. } => {
            RowProblem::BelowAbsoluteZero { kelvin }
        }
        isochore_fit::Error::NonFinite {
            what: "measured value",
            ..
        } => RowProblem::NotFinite,
        _ => RowProblem::OutOfRange,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    #[test]
    fn numbers_as_labs_write_them() {
        // Common practice in lab files: leading '+', spaces, Unicode minus, decimal comma.
        assert_eq!(parse_number("25", false), Ok(25.0));
        assert_eq!(parse_number(" +1.5e3 ", false), Ok(1500.0));
        assert_eq!(parse_number("\u{2212}7.62", false), Ok(-7.62));
        assert_eq!(parse_number("7,62", true), Ok(7.62));
        assert_eq!(parse_number("7,62", false), Err(RowProblem::NotANumber));
        assert_eq!(parse_number("", false), Err(RowProblem::Empty));
        assert_eq!(parse_number("  ", false), Err(RowProblem::Empty));
        assert_eq!(parse_number("NaN", false), Err(RowProblem::NotFinite));
        assert_eq!(parse_number("-inf", false), Err(RowProblem::NotFinite));
        assert_eq!(parse_number("1e400", false), Err(RowProblem::NotFinite));
        assert_eq!(parse_number("1.2.3", false), Err(RowProblem::NotANumber));
        assert_eq!(parse_number("12 nM", false), Err(RowProblem::NotANumber));
    }

    proptest! {
        #![proptest_config(ProptestConfig { cases: 2000, ..ProptestConfig::default() })]

        /// The fast path agrees bit for bit with the standard library's correctly rounded
        /// parser (Rust 1.55+ `str::parse::<f64>`) whenever it answers.
        #[test]
        fn fast_path_matches_std(m in 0u64..(1 << 54), frac in 0u32..20, e in -30i32..30, neg in any::<bool>(), exp_form in any::<bool>()) {
            let digits = m.to_string();
            let cut = digits.len().saturating_sub(frac as usize);
            let mut s = String::new();
            if neg { s.push('-'); }
            s.push_str(&digits[..cut]);
            if cut < digits.len() { s.push('.'); s.push_str(&digits[cut..]); }
            if exp_form { s.push_str(&format!("e{e}")); }
            if let Some(v) = fast_decimal(s.as_bytes(), false) {
                let want: f64 = s.parse().unwrap();
                prop_assert_eq!(v.to_bits(), want.to_bits(), "{}", s);
            }
        }

        /// Short strings of digits, marks and signs (leading zeros, marks at either end,
        /// long significands): the fast path agrees with `str::parse` bit for bit whenever
        /// it answers, refuses what `str::parse` refuses, and answers every plain decimal.
        #[test]
        fn fast_path_matches_std_on_digit_soup(s in "[-+]?[0-9]{0,21}([.][0-9]{0,21})?([eE][-+]?[0-9]{1,3})?") {
            let fast = fast_decimal(s.as_bytes(), false);
            match s.parse::<f64>() {
                Ok(want) => {
                    if let Some(v) = fast {
                        prop_assert_eq!(v.to_bits(), want.to_bits(), "{}", s);
                    }
                }
                Err(_) => prop_assert!(fast.is_none(), "{}", s),
            }
            let digits = s.bytes().filter(u8::is_ascii_digit).count();
            if !s.contains(['e', 'E']) && (1..=15).contains(&digits) {
                prop_assert!(fast.is_some(), "plain decimal {} not answered", s);
            }
        }

        #[test]
        fn parse_number_never_panics(s in ".{0,80}") {
            let _ = parse_number(&s, true);
            let _ = parse_number(&s, false);
        }
    }
}
