//! Quantiles and tail probabilities of the reference distributions, from statrs.
//!
//! Wrapped so the rest of the crate never sees a statrs constructor error: impossible
//! parameters give `NaN` quantiles or `None` tails, which callers turn into warnings.

use statrs::distribution::{ChiSquared, ContinuousCDF, FisherSnedecor, Normal, StudentsT};

/// Quantile of Student's t with `dof` degrees of freedom at probability `p`.
pub fn t_quantile(p: f64, dof: f64) -> f64 {
    match StudentsT::new(0.0, 1.0, dof) {
        Ok(d) if p > 0.0 && p < 1.0 => d.inverse_cdf(p),
        _ => f64::NAN,
    }
}

/// Quantile of the standard normal distribution at probability `p`.
pub fn normal_quantile(p: f64) -> f64 {
    match Normal::new(0.0, 1.0) {
        Ok(d) if p > 0.0 && p < 1.0 => d.inverse_cdf(p),
        _ => f64::NAN,
    }
}

/// Quantile of F(d1, d2) at probability `p`.
pub fn f_quantile(p: f64, d1: f64, d2: f64) -> f64 {
    match FisherSnedecor::new(d1, d2) {
        Ok(d) if p > 0.0 && p < 1.0 => d.inverse_cdf(p),
        _ => f64::NAN,
    }
}

/// Quantile of χ²(k) at probability `p`.
pub fn chi2_quantile(p: f64, k: f64) -> f64 {
    match ChiSquared::new(k) {
        Ok(d) if p > 0.0 && p < 1.0 => d.inverse_cdf(p),
        _ => f64::NAN,
    }
}

/// Upper tail P(F(d1, d2) ≥ x); `None` for impossible parameters.
pub fn f_upper_tail(x: f64, d1: f64, d2: f64) -> Option<f64> {
    if x.is_infinite() && x > 0.0 {
        return Some(0.0);
    }
    let d = FisherSnedecor::new(d1, d2).ok()?;
    x.is_finite().then(|| d.sf(x.max(0.0)))
}

/// Upper tail P(χ²(k) ≥ x); `None` for impossible parameters.
pub fn chi2_upper_tail(x: f64, k: f64) -> Option<f64> {
    let d = ChiSquared::new(k).ok()?;
    x.is_finite().then(|| d.sf(x.max(0.0)))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn textbook_quantiles() {
        // Student's t table (e.g. any statistics handbook; from memory): t(0.975, 10) = 2.228139,
        // z(0.975) = 1.959964, F(0.95; 2, 10) = 4.102821, χ²(0.95; 2) = 5.991465.
        assert!((t_quantile(0.975, 10.0) - 2.228_139).abs() < 1e-6);
        assert!((normal_quantile(0.975) - 1.959_964).abs() < 1e-6);
        assert!((f_quantile(0.95, 2.0, 10.0) - 4.102_821).abs() < 1e-5);
        assert!((chi2_quantile(0.95, 2.0) - 5.991_465).abs() < 1e-6);
        assert!(t_quantile(0.975, 0.0).is_nan());
        assert!(f_upper_tail(1.0, 1.0, 0.0).is_none());
    }
}
