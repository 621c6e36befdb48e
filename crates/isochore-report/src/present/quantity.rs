//! Values of K shown in the quantity the chemist entered: a K_d file gets K_d in its
//! concentration unit, a pKa file pKa, a K file K written ×10ⁿ. The fit works in ln K; the
//! conversion back is the fit crate's ([`QuantityKind::from_ln_k`]); here only the name, the
//! unit, the order of an interval's ends and how the numbers are written.

use super::names::T_HM;
use super::number::{fixed, times_ten_with, Exponent};
use super::units::show_t;
use isochore_fit::{QuantityKind, TemperatureUnit, VantHoffFit};

/// The quantity's symbol for sentences and rows: "K", "ln K", "log₁₀ K", "K_d", "ΔG°", and
/// for pK the name the file's header gave it ("pKa", "pKa2", "pKw"; "pK" otherwise).
pub fn quantity_symbol(kind: QuantityKind, header: &str) -> String {
    match kind {
        QuantityKind::K => "K".into(),
        QuantityKind::LnK => "ln K".into(),
        QuantityKind::Log10K => "log₁₀ K".into(),
        QuantityKind::PK => {
            let word: String = header
                .trim()
                .chars()
                .take_while(|c| c.is_alphanumeric())
                .collect();
            if word.to_lowercase().starts_with("pk") && word.len() <= 6 {
                word
            } else {
                "pK".into()
            }
        }
        QuantityKind::DissociationConstant(_) => "K_d".into(),
        QuantityKind::DeltaG(_) => "ΔG°".into(),
    }
}

/// The quantity's unit symbol ("nM", "kJ/mol"), or "" for a dimensionless one.
pub fn quantity_unit(kind: QuantityKind) -> &'static str {
    match kind {
        QuantityKind::DissociationConstant(u) => u.symbol(),
        QuantityKind::DeltaG(e) => e.symbol(),
        _ => "",
    }
}

/// A value of the quantity as written for people: K and K_d to four significant digits in
/// ×10ⁿ notation where large or small ("3.121 × 10⁶"), logarithms and pK to three decimals,
/// ΔG° to two.
pub fn write_quantity(kind: QuantityKind, v: f64) -> String {
    write_quantity_with(kind, v, Exponent::Superscript)
}

/// As [`write_quantity`], the power of ten written as `exponent` says (the window: caret).
pub fn write_quantity_with(kind: QuantityKind, v: f64, exponent: Exponent) -> String {
    match kind {
        QuantityKind::K | QuantityKind::DissociationConstant(_) => times_ten_with(v, 4, exponent),
        QuantityKind::LnK | QuantityKind::Log10K | QuantityKind::PK => fixed(v, 3),
        QuantityKind::DeltaG(_) => fixed(v, 2),
    }
}

/// A value of ln K with an interval (low, high) at `t_k`, in the quantity: (value, low,
/// high) with low ≤ high (K_d, pK and ΔG° fall as K rises, so the ends swap).
pub fn from_ln_k(kind: QuantityKind, ln_k: f64, interval: (f64, f64), t_k: f64) -> (f64, f64, f64) {
    let v = kind.from_ln_k(ln_k, t_k);
    let a = kind.from_ln_k(interval.0, t_k);
    let b = kind.from_ln_k(interval.1, t_k);
    (v, a.min(b), a.max(b))
}

/// "K_d = 45.20 nM, 95% CI [38.10, 53.61] nM": a value of ln K with its interval, in the
/// quantity.
pub fn quantity_with_interval(
    kind: QuantityKind,
    symbol: &str,
    ln_k: f64,
    interval: (f64, f64),
    t_k: f64,
    level_percent: &str,
) -> String {
    let (v, lo, hi) = from_ln_k(kind, ln_k, interval, t_k);
    let unit = quantity_unit(kind);
    let sp = if unit.is_empty() { "" } else { " " };
    format!(
        "{symbol} = {}{sp}{unit}, {level_percent}% CI [{}, {}]{sp}{unit}",
        write_quantity(kind, v),
        write_quantity(kind, lo),
        write_quantity(kind, hi),
    )
}

/// The results rows of the constant in the file's quantity at θ and at T_hm, each as
/// [quantity, value, SE, CI low, CI high, unit]: "K_d at θ = 25.00 °C", "45.20", "", "38.10",
/// "53.61", "nM". The SE is left blank: the interval of K (or K_d) is not symmetric. A ΔG°
/// file gets no rows here (ΔG° has its own).
pub fn constant_rows(
    fit: &VantHoffFit,
    kind: QuantityKind,
    symbol: &str,
    tu: TemperatureUnit,
) -> Vec<Vec<String>> {
    constant_values(fit, kind, symbol, tu)
        .into_iter()
        .map(|(name, v, lo, hi)| {
            vec![
                name,
                write_quantity(kind, v),
                String::new(),
                write_quantity(kind, lo),
                write_quantity(kind, hi),
                quantity_unit(kind).to_string(),
            ]
        })
        .collect()
}

/// The numbers of [`constant_rows`], unformatted (for the results CSV): (quantity, value,
/// CI low, CI high) in the file's quantity and unit.
pub fn constant_values(
    fit: &VantHoffFit,
    kind: QuantityKind,
    symbol: &str,
    tu: TemperatureUnit,
) -> Vec<(String, f64, f64, f64)> {
    if matches!(kind, QuantityKind::DeltaG(_)) {
        return Vec::new();
    }
    let mut rows = Vec::new();
    for (at, t) in [("θ", fit.at_reference().t_k), (T_HM, fit.at_harmonic().t_k)] {
        let Ok(p) = fit.predict(t) else { continue };
        let (v, lo, hi) = from_ln_k(kind, p.ln_k.value, (p.ln_k.ci.low, p.ln_k.ci.high), t);
        rows.push((format!("{symbol} at {at} = {}", show_t(t, tu)), v, lo, hi));
    }
    rows
}

#[cfg(test)]
mod tests {
    use super::*;
    use isochore_fit::ConcentrationUnit;

    #[test]
    fn a_kd_file_gets_kd_in_its_unit_and_a_pka_file_pka() {
        let nm = QuantityKind::DissociationConstant(ConcentrationUnit::Nanomolar);
        // K = 10⁸ (dimensionless, c° = 1 M) is K_d = 10⁻⁸ M = 10 nM; by hand.
        let ln_k = 1e8_f64.ln();
        let (v, lo, hi) = from_ln_k(nm, ln_k, (ln_k - 0.1, ln_k + 0.1), 298.15);
        assert!((v - 10.0).abs() < 1e-9, "{v}");
        // The larger K is the smaller K_d: the ends swap. e^±0.1 by hand: 1.10517, 0.904837.
        assert!((lo - 10.0 * (-0.1_f64).exp()).abs() < 1e-9);
        assert!((hi - 10.0 * 0.1_f64.exp()).abs() < 1e-9);
        assert_eq!(
            quantity_with_interval(nm, "K_d", ln_k, (ln_k - 0.1, ln_k + 0.1), 298.15, "95"),
            "K_d = 10.00 nM, 95% CI [9.048, 11.05] nM"
        );
        // pKa 4.76 is K = 10^-4.76; the header's name is kept.
        let ln_k = -4.76 * std::f64::consts::LN_10;
        assert_eq!(quantity_symbol(QuantityKind::PK, "pKa"), "pKa");
        assert_eq!(quantity_symbol(QuantityKind::PK, "pKa2 "), "pKa2");
        assert_eq!(quantity_symbol(QuantityKind::PK, "minus log K"), "pK");
        assert_eq!(
            quantity_with_interval(QuantityKind::PK, "pKa", ln_k, (ln_k, ln_k), 298.15, "95"),
            "pKa = 4.760, 95% CI [4.760, 4.760]"
        );
        // K itself in ×10ⁿ: 3.121 × 10⁶.
        assert_eq!(write_quantity(QuantityKind::K, 3.121e6), "3.121 × 10⁶");
    }
}
