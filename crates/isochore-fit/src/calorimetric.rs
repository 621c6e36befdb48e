//! The van 't Hoff ΔH° against a calorimetric one: ΔH_cal(T) ± u at one or more
//! temperatures compared with the fit's ΔH°(T) at the same temperatures (ΔCp° taken into
//! account through the model's ΔH°(T) row) — the difference with its interval and z, and the
//! ratio ΔH_vH/ΔH_cal with Fieller's interval ([`compare_calorimetric`]).

use crate::error::Error;
use crate::global::GlobalFit;
use crate::stats::{chi2_upper_tail, normal_quantile};
use crate::vant_hoff::{Estimate, VantHoffFit};
use serde::Serialize;

/// One calorimetric enthalpy: ΔH_cal ± u at a temperature.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CalorimetricValue {
    /// Temperature, K.
    pub t_k: f64,
    /// ΔH_cal, J/mol.
    pub delta_h: f64,
    /// Its standard uncertainty, J/mol (0 when exact).
    pub u: f64,
}

/// The caution every comparison carries.
pub const COUPLED_EQUILIBRIA_CAUTION: &str = "the van 't Hoff and calorimetric enthalpies differ when coupled equilibria contribute heat to the calorimetric value (buffer protonation, linked binding, self-association) or when the process is not two-state; in a two-state transition the ratio ΔH_vH/ΔH_cal is read as the size of the cooperative unit";

/// The comparison at one temperature.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CalorimetricComparison {
    /// The calorimetric value compared.
    pub calorimetric: CalorimetricValue,
    /// The van 't Hoff ΔH°(T) with the fit's SE and interval.
    pub van_t_hoff: Estimate,
    /// ΔH_vH − ΔH_cal with SE √(SE_vH² + u²) and a normal interval at the fit's level.
    pub difference: Estimate,
    /// z = difference / SE.
    pub z: f64,
    /// Two-sided P(|Z| ≥ |z|).
    pub p_value: f64,
    /// ΔH_vH / ΔH_cal.
    pub ratio: f64,
    /// Fieller's interval for the ratio; `None` when it is unbounded (ΔH_cal not clearly
    /// different from zero at the level).
    pub ratio_ci: Option<(f64, f64)>,
    /// Whether the temperature lies outside the fitted range (ΔH_vH is then extrapolated).
    pub extrapolated: bool,
    /// The result in words.
    pub verdict: String,
}

/// Compares each calorimetric value with the fit's ΔH°(T) at its temperature.
///
/// # Formula
/// ```text
/// d = ΔH_vH(T) − ΔH_cal,  SE(d) = √(SE_vH(T)² + u²),  z = d/SE(d),  d ± z_{(1+level)/2} SE(d)
/// ratio ρ = ΔH_vH/ΔH_cal; Fieller: (ΔH_vH − ρΔH_cal)² = z²(SE_vH² + ρ²u²)
/// ```
/// The two enthalpies are independent measurements, so their covariance is zero; the
/// interval is normal (u is taken as known).
///
/// # Errors
/// [`Error::NoSolution`] for a temperature at or below 0 K or not finite, a ΔH_cal that is
/// not finite, or a negative or non-finite u.
pub fn compare_calorimetric(
    fit: &VantHoffFit,
    values: &[CalorimetricValue],
) -> Result<Vec<CalorimetricComparison>, Error> {
    let range = (fit.t_min_k(), fit.t_max_k());
    values
        .iter()
        .enumerate()
        .map(|(i, c)| {
            check_value(i, c)?;
            Ok(compare_one(
                fit.delta_h_at(c.t_k),
                c,
                fit.options().level,
                range,
                fit.is_extrapolation(c.t_k),
            ))
        })
        .collect()
}

/// As [`compare_calorimetric`], against series `series` (0-based) of a joint fit: its
/// ΔH°(T) with the SE from the joint covariance, so a shared ΔCp° carries the
/// information of every series into the comparison.
///
/// # Errors
/// As [`compare_calorimetric`]; [`Error::NoSolution`] for a series not in the fit.
pub fn compare_calorimetric_series(
    fit: &GlobalFit,
    series: usize,
    values: &[CalorimetricValue],
) -> Result<Vec<CalorimetricComparison>, Error> {
    let range = fit.t_range_k(series).ok_or_else(|| {
        Error::NoSolution(format!("series {} is not in the joint fit", series + 1))
    })?;
    let tol = crate::derived::EXTRAPOLATION_RELATIVE_TOLERANCE;
    values
        .iter()
        .enumerate()
        .map(|(i, c)| {
            check_value(i, c)?;
            let vh = fit.delta_h_at(series, c.t_k).ok_or_else(|| {
                Error::NoSolution(format!("series {} is not in the joint fit", series + 1))
            })?;
            let extrapolated = c.t_k < range.0 * (1.0 - tol) || c.t_k > range.1 * (1.0 + tol);
            Ok(compare_one(vh, c, fit.options().level, range, extrapolated))
        })
        .collect()
}

fn check_value(i: usize, c: &CalorimetricValue) -> Result<(), Error> {
    if !(c.t_k.is_finite() && c.t_k > 0.0) {
        return Err(Error::NoSolution(format!(
            "calorimetric value {}: the temperature must be above 0 K",
            i + 1
        )));
    }
    if !c.delta_h.is_finite() || !c.u.is_finite() || c.u < 0.0 {
        return Err(Error::NoSolution(format!(
            "calorimetric value {}: ΔH_cal must be a number and its uncertainty a number ≥ 0",
            i + 1
        )));
    }
    Ok(())
}

/// One comparison: `vh` is the van 't Hoff ΔH° at the value's temperature, `range` the
/// fitted temperatures (K) for the extrapolation note.
fn compare_one(
    vh: Estimate,
    c: &CalorimetricValue,
    level: f64,
    range: (f64, f64),
    extrapolated: bool,
) -> CalorimetricComparison {
    let z_crit = normal_quantile(0.5 + level / 2.0);
    let se = (vh.se * vh.se + c.u * c.u).sqrt();
    let d = vh.value - c.delta_h;
    let difference = Estimate::symmetric(d, se, z_crit);
    let z = if se > 0.0 { d / se } else { f64::NAN };
    let p_value = chi2_upper_tail(z * z, 1.0).unwrap_or(f64::NAN);
    let ratio = vh.value / c.delta_h;
    let ratio_ci = fieller(vh.value, vh.se, c.delta_h, c.u, z_crit);
    let pct = crate::vant_hoff::comparison_percent(level);
    let ratio_words = match ratio_ci {
        Some((lo, hi)) => format!("ratio ΔH_vH/ΔH_cal = {ratio:.3} ({pct}% Fieller interval {lo:.3} to {hi:.3})"),
        None => format!("ratio ΔH_vH/ΔH_cal = {ratio:.3} (its Fieller interval is unbounded: ΔH_cal is not clearly different from zero)"),
    };
    let agree = if p_value < 1.0 - level {
        "the two enthalpies differ"
    } else {
        "no evidence that the two enthalpies differ"
    };
    let mut verdict = format!(
        "at {:.2} K, {agree} (ΔH_vH − ΔH_cal = {:.2} ± {:.2} kJ/mol, z = {z:.2}, {}); {ratio_words}",
        c.t_k,
        d / 1000.0,
        se / 1000.0,
        crate::vant_hoff::format_p(p_value)
    );
    if extrapolated {
        verdict.push_str(&format!(
            "; {:.2} K lies outside the fitted temperatures ({:.2} to {:.2} K), so ΔH_vH there is an extrapolation that rests on the model's ΔCp°",
            c.t_k, range.0, range.1
        ));
    }
    verdict.push_str("; ");
    verdict.push_str(COUPLED_EQUILIBRIA_CAUTION);
    CalorimetricComparison {
        calorimetric: *c,
        van_t_hoff: vh,
        difference,
        z,
        p_value,
        ratio,
        ratio_ci,
        extrapolated,
        verdict,
    }
}

/// Fieller's interval for a/b with independent a ± sa, b ± sb at critical value `z`:
/// the ρ with (a − ρb)² ≤ z²(sa² + ρ²sb²). `None` when unbounded (b² ≤ z² sb²).
fn fieller(a: f64, sa: f64, b: f64, sb: f64, z: f64) -> Option<(f64, f64)> {
    let z2 = z * z;
    let qa = b * b - z2 * sb * sb;
    if qa.is_nan() || qa <= 0.0 {
        return None;
    }
    let qb = -2.0 * a * b;
    let qc = a * a - z2 * sa * sa;
    let disc = qb * qb - 4.0 * qa * qc;
    if disc < 0.0 {
        return None;
    }
    let root = disc.sqrt();
    let (r1, r2) = ((-qb - root) / (2.0 * qa), (-qb + root) / (2.0 * qa));
    Some((r1.min(r2), r1.max(r2)))
}

#[cfg(test)]
mod tests {
    use super::fieller;

    /// With no uncertainty in the denominator Fieller's interval is a/b ± z·sa/|b|, and
    /// with none at all it is the point a/b (the definition).
    #[test]
    fn fieller_limits() {
        let (lo, hi) = fieller(10.0, 1.0, 2.0, 0.0, 1.96).unwrap();
        assert!((lo - (5.0 - 0.98)).abs() < 1e-12 && (hi - (5.0 + 0.98)).abs() < 1e-12);
        let (lo, hi) = fieller(10.0, 0.0, 2.0, 0.0, 1.96).unwrap();
        assert!((lo - 5.0).abs() < 1e-12 && (hi - 5.0).abs() < 1e-12);
        assert!(fieller(10.0, 1.0, 0.5, 1.0, 1.96).is_none());
    }
}
