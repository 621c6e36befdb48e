//! The two-point van 't Hoff calculation a chemist does by hand, with the uncertainty
//! propagated to first order (delta method) from every input that has one.
//!
//! Both directions assume ΔH° constant between the two temperatures. Intervals use the
//! normal distribution because the inputs are standard uncertainties, not fits with
//! residual degrees of freedom.

use crate::error::Error;
use crate::model::TEMPERATURE_RESOLUTION_K;
use crate::stats::normal_quantile;
use crate::units::check_temperature;
use crate::vant_hoff::Estimate;
use crate::GAS_CONSTANT;
use serde::{Deserialize, Serialize};

/// Whether two temperatures in kelvin are closer than the resolution
/// [`TEMPERATURE_RESOLUTION_K`] (1 mK), the rule `fit` uses to count distinct temperatures.
pub fn indistinguishable(a_k: f64, b_k: f64) -> bool {
    (a_k - b_k).abs() < TEMPERATURE_RESOLUTION_K
}

/// One (T, K) pair with optional standard uncertainties.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct StatePoint {
    /// Temperature, K.
    pub t_k: f64,
    /// Standard uncertainty of T, K (0 if exact).
    pub sigma_t_k: f64,
    /// Equilibrium constant K (> 0).
    pub k: f64,
    /// Standard uncertainty of ln K (0 if exact); σ(K)/K to first order.
    pub sigma_ln_k: f64,
}

impl StatePoint {
    /// A pair with no uncertainty.
    pub fn exact(t_k: f64, k: f64) -> Self {
        StatePoint {
            t_k,
            sigma_t_k: 0.0,
            k,
            sigma_ln_k: 0.0,
        }
    }

    fn validate(&self) -> Result<(), Error> {
        check_temperature(self.t_k)?;
        if !self.k.is_finite() {
            return Err(Error::NonFinite {
                what: "K",
                index: None,
            });
        }
        if self.k <= 0.0 {
            return Err(Error::NonPositiveConstant {
                index: None,
                value: self.k,
            });
        }
        for s in [self.sigma_t_k, self.sigma_ln_k] {
            if !s.is_finite() || s < 0.0 {
                return Err(Error::NonPositiveSigma {
                    index: None,
                    value: s,
                });
            }
        }
        Ok(())
    }
}

/// K₂ predicted at T₂ from one measured pair and ΔH°.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct TwoPointK {
    /// ln K₂ with SE and interval.
    pub ln_k2: Estimate,
    /// K₂ (interval = exp of the ln K₂ interval; SE = K₂ × SE(ln K₂)).
    pub k2: Estimate,
}

/// ΔH° (and ΔS°) from two measured pairs.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct TwoPointEnthalpy {
    /// ΔH°, J/mol.
    pub delta_h: Estimate,
    /// ΔS°, J mol⁻¹ K⁻¹, from the same two pairs.
    pub delta_s: Estimate,
}

fn overflow() -> Error {
    Error::NoSolution(
        "the result is too large to represent; check that the two temperatures differ by more than rounding and the values are sensible".into(),
    )
}

fn level_z(level: f64) -> Result<f64, Error> {
    crate::model::check_level(level)?;
    Ok(normal_quantile(0.5 + level / 2.0))
}

/// K at `t2_k` from a measured pair and ΔH° ± σ.
///
/// # Formula
/// ```text
/// ln K₂ = ln K₁ − (ΔH°/R)(1/T₂ − 1/T₁)
/// σ²(ln K₂) = σ²(ln K₁) + (σ_ΔH/R)²(1/T₂ − 1/T₁)² + (ΔH°/(R T₁²))² σ²(T₁) + (ΔH°/(R T₂²))² σ²(T₂)
/// ```
///
/// # Errors
/// Invalid temperatures, K, uncertainties or level; [`Error::NoSolution`] when the result
/// overflows.
pub fn predict_k(
    known: StatePoint,
    t2_k: f64,
    sigma_t2_k: f64,
    delta_h: f64,
    sigma_delta_h: f64,
    level: f64,
) -> Result<TwoPointK, Error> {
    known.validate()?;
    check_temperature(t2_k)?;
    if !delta_h.is_finite() {
        return Err(Error::NonFinite {
            what: "ΔH°",
            index: None,
        });
    }
    for s in [sigma_t2_k, sigma_delta_h] {
        if !s.is_finite() || s < 0.0 {
            return Err(Error::NonPositiveSigma {
                index: None,
                value: s,
            });
        }
    }
    let z = level_z(level)?;
    let r = GAS_CONSTANT;
    let d = 1.0 / t2_k - 1.0 / known.t_k;
    let ln_k2 = known.k.ln() - delta_h / r * d;
    let var = known.sigma_ln_k.powi(2)
        + (sigma_delta_h / r * d).powi(2)
        + (delta_h / (r * known.t_k * known.t_k) * known.sigma_t_k).powi(2)
        + (delta_h / (r * t2_k * t2_k) * sigma_t2_k).powi(2);
    if !(ln_k2.is_finite() && var.is_finite()) {
        return Err(overflow());
    }
    let ln = Estimate::symmetric(ln_k2, var.sqrt(), z);
    if !ln.ci_high.exp().is_finite() {
        return Err(Error::NoSolution(format!(
            "K₂ is too large to represent (ln K₂ = {ln_k2:.1}); quote ln K₂ instead"
        )));
    }
    let k2 = Estimate {
        value: ln_k2.exp(),
        se: ln_k2.exp() * ln.se,
        ci_low: ln.ci_low.exp(),
        ci_high: ln.ci_high.exp(),
    };
    Ok(TwoPointK { ln_k2: ln, k2 })
}

/// ΔH° and ΔS° from two measured pairs.
///
/// # Formula
/// ```text
/// ΔH° = R ln(K₂/K₁) / (1/T₁ − 1/T₂),    ΔS° = R ln K₁ + ΔH°/T₁
/// ```
/// with first-order propagation of σ(ln K₁), σ(ln K₂), σ(T₁), σ(T₂) (independent).
///
/// # Errors
/// Invalid inputs, or [`Error::SingleTemperature`] when T₁ and T₂ differ by less than
/// [`TEMPERATURE_RESOLUTION_K`]; [`Error::NoSolution`]
/// when the result overflows (temperatures equal to within rounding).
pub fn enthalpy_from_pairs(
    a: StatePoint,
    b: StatePoint,
    level: f64,
) -> Result<TwoPointEnthalpy, Error> {
    a.validate()?;
    b.validate()?;
    let z = level_z(level)?;
    let r = GAS_CONSTANT;
    let d = 1.0 / a.t_k - 1.0 / b.t_k;
    if d == 0.0 || indistinguishable(a.t_k, b.t_k) {
        return Err(Error::SingleTemperature);
    }
    // ln K₂ − ln K₁ rather than ln(K₂/K₁): the ratio of extreme constants can overflow.
    let l = b.k.ln() - a.k.ln();
    let dh = r * l / d;
    // Partial derivatives of ΔH°.
    let dh_dlnk1 = -r / d;
    let dh_dlnk2 = r / d;
    let dh_dt1 = r * l / (d * d * a.t_k * a.t_k);
    let dh_dt2 = -r * l / (d * d * b.t_k * b.t_k);
    let var_h = (dh_dlnk1 * a.sigma_ln_k).powi(2)
        + (dh_dlnk2 * b.sigma_ln_k).powi(2)
        + (dh_dt1 * a.sigma_t_k).powi(2)
        + (dh_dt2 * b.sigma_t_k).powi(2);
    // ΔS° = R ln K₁ + ΔH°/T₁.
    let ds = r * a.k.ln() + dh / a.t_k;
    let ds_dlnk1 = r + dh_dlnk1 / a.t_k;
    let ds_dlnk2 = dh_dlnk2 / a.t_k;
    let ds_dt1 = dh_dt1 / a.t_k - dh / (a.t_k * a.t_k);
    let ds_dt2 = dh_dt2 / a.t_k;
    let var_s = (ds_dlnk1 * a.sigma_ln_k).powi(2)
        + (ds_dlnk2 * b.sigma_ln_k).powi(2)
        + (ds_dt1 * a.sigma_t_k).powi(2)
        + (ds_dt2 * b.sigma_t_k).powi(2);
    if ![dh, ds, var_h, var_s].iter().all(|v| v.is_finite()) {
        return Err(overflow());
    }
    Ok(TwoPointEnthalpy {
        delta_h: Estimate::symmetric(dh, var_h.sqrt(), z),
        delta_s: Estimate::symmetric(ds, var_s.sqrt(), z),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn directions_are_inverse_and_derivatives_match_finite_differences() {
        let a = StatePoint {
            t_k: 298.15,
            sigma_t_k: 0.1,
            k: 0.15,
            sigma_ln_k: 0.02,
        };
        let b = StatePoint {
            t_k: 330.0,
            sigma_t_k: 0.2,
            k: 1.9,
            sigma_ln_k: 0.03,
        };
        let e = enthalpy_from_pairs(a, b, 0.95).unwrap();
        let k = predict_k(
            StatePoint::exact(a.t_k, a.k),
            b.t_k,
            0.0,
            e.delta_h.value,
            0.0,
            0.95,
        )
        .unwrap();
        assert!((k.k2.value - b.k).abs() < 1e-12 * b.k);
        // Finite-difference check of σ(ΔH°) with respect to T₂ alone.
        let only_t2 = StatePoint {
            sigma_ln_k: 0.0,
            sigma_t_k: 0.0,
            ..a
        };
        let b_t = StatePoint {
            sigma_ln_k: 0.0,
            ..b
        };
        let se = enthalpy_from_pairs(only_t2, b_t, 0.95).unwrap().delta_h.se;
        let h = 1e-4;
        let f = |t2: f64| {
            enthalpy_from_pairs(only_t2, StatePoint { t_k: t2, ..b_t }, 0.95)
                .unwrap()
                .delta_h
                .value
        };
        let deriv = (f(b.t_k + h) - f(b.t_k - h)) / (2.0 * h);
        assert!((se - deriv.abs() * b.sigma_t_k).abs() < 1e-6 * se);
        assert!(enthalpy_from_pairs(a, StatePoint { t_k: a.t_k, ..b }, 0.95).is_err());
    }
}
