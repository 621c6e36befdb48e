//! Goodness-of-fit numbers shared by every model: χ², the reduced χ² and residual SD, the
//! weighted R² and adjusted R², the Gaussian log-likelihood with AICc and BIC, and under
//! absolute σ the χ² tail probability. [`WeightSums`] holds the sums over the used points
//! that a model's statistics need besides its χ², so the model comparison can score the
//! other model on the same points without refitting anything else.

use crate::least_squares::LinearFit;
use crate::model::{FitOptions, SigmaConvention};
use crate::stats::{chi2_upper_tail, normal_quantile, t_quantile};
use nalgebra::DMatrix;
use serde::{Deserialize, Serialize};

/// Goodness-of-fit numbers.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct FitStatistics {
    /// χ² = Σ wᵢ eᵢ² (the plain residual sum of squares when unweighted).
    pub chi2: f64,
    /// χ² / (n − p).
    pub reduced_chi2: f64,
    /// Residual standard deviation √(χ²/(n − p)): in ln K units when unweighted, in units of
    /// σ when weighted.
    pub residual_sd: f64,
    /// Weighted coefficient of determination 1 − χ²/Σ wᵢ (yᵢ − ȳ_w)².
    pub r2: f64,
    /// Adjusted R² = 1 − (1 − R²)(n − 1)/(n − p).
    pub adj_r2: f64,
    /// Gaussian log-likelihood. When the fit scales σ, the variance is estimated and counts
    /// as a parameter (k = p + 1); when σ are known standard uncertainties (absolute σ,
    /// weighted), ln L = −χ²/2 − (n/2) ln 2π + ½ Σ ln wᵢ and k = p.
    pub log_likelihood: f64,
    /// The number of estimated parameters k the information criteria count.
    pub k: usize,
    /// Small-sample Akaike criterion; `None` when n − k − 1 ≤ 0.
    pub aicc: Option<f64>,
    /// Bayesian (Schwarz) criterion.
    pub bic: f64,
    /// Under the absolute-σ convention, P(χ²_{n−p} ≥ χ²): a tiny value says the stated
    /// uncertainties are too small for the scatter. `None` otherwise.
    pub chi2_p_value: Option<f64>,
}

/// Sums over the used points that every model's statistics share.
pub(crate) struct WeightSums {
    /// Used points.
    pub(crate) n: usize,
    /// Whether weights 1/σ² were applied.
    pub(crate) weighted: bool,
    /// Σ wᵢ (yᵢ − ȳ_w)².
    pub(crate) tss: f64,
    /// Σ ln wᵢ.
    pub(crate) sum_ln_w: f64,
}

impl WeightSums {
    pub(crate) fn new(weights: Option<&[f64]>, y: &[f64]) -> Self {
        let (sum_w, sum_wy, sum_ln_w) = match weights {
            Some(w) => w.iter().zip(y).fold((0.0, 0.0, 0.0), |(a, b, c), (w, y)| {
                (a + w, b + w * y, c + w.ln())
            }),
            None => (y.len() as f64, y.iter().sum(), 0.0),
        };
        let mean = sum_wy / sum_w;
        let tss = match weights {
            Some(w) => w.iter().zip(y).map(|(w, y)| w * (y - mean).powi(2)).sum(),
            None => y.iter().map(|y| (y - mean).powi(2)).sum(),
        };
        WeightSums {
            n: y.len(),
            weighted: weights.is_some(),
            tss,
            sum_ln_w,
        }
    }
}

/// Fit statistics for a model with `p` coefficients and weighted residual sum of squares
/// `chi2` on the used points summarised by `sums`.
pub(crate) fn statistics(
    chi2: f64,
    p: usize,
    sums: &WeightSums,
    convention: SigmaConvention,
) -> FitStatistics {
    let n = sums.n as f64;
    let dof = n - p as f64;
    let p = p as f64;
    let tss = sums.tss;
    let sum_ln_w = sums.sum_ln_w;
    let reduced = chi2 / dof;
    let r2 = if tss > 0.0 {
        1.0 - chi2 / tss
    } else {
        f64::NAN
    };
    let adj_r2 = 1.0 - (1.0 - r2) * (n - 1.0) / dof;
    let two_pi = 2.0 * std::f64::consts::PI;
    let known_sigma = convention == SigmaConvention::Absolute && sums.weighted;
    let (log_likelihood, k) = if known_sigma {
        // σᵢ² = 1/wᵢ known: the likelihood is χ² itself, and only the p coefficients are
        // estimated.
        (-0.5 * chi2 - 0.5 * n * two_pi.ln() + 0.5 * sum_ln_w, p)
    } else {
        // σᵢ² = σ²/wᵢ with σ² estimated by RSS/n (floored so exact data give a large finite
        // value rather than infinity), and counted as a parameter.
        let sigma2 = (chi2 / n).max(f64::MIN_POSITIVE);
        (
            -0.5 * n * ((two_pi * sigma2).ln() + 1.0) + 0.5 * sum_ln_w,
            p + 1.0,
        )
    };
    let aic = 2.0 * k - 2.0 * log_likelihood;
    let aicc = if n - k - 1.0 > 0.0 {
        Some(aic + 2.0 * k * (k + 1.0) / (n - k - 1.0))
    } else {
        None
    };
    let bic = k * n.ln() - 2.0 * log_likelihood;
    let chi2_p_value = match (convention, sums.weighted) {
        (SigmaConvention::Absolute, true) if dof > 0.0 => chi2_upper_tail(chi2, dof),
        _ => None,
    };
    FitStatistics {
        chi2,
        reduced_chi2: reduced,
        residual_sd: reduced.sqrt(),
        r2,
        adj_r2,
        log_likelihood,
        k: k as usize,
        aicc,
        bic,
        chi2_p_value,
    }
}

/// A solved fit scored: its statistics, the variance s², the covariance multiplier, the
/// critical value of its intervals and the scaled covariance. One scoring for every fit, of
/// one series or several.
pub(crate) struct Scored {
    /// Goodness of fit.
    pub(crate) stats: FitStatistics,
    /// s² = χ²/(n − p).
    pub(crate) s2: f64,
    /// s² under the scaled convention, 1 under absolute σ.
    pub(crate) variance_scale: f64,
    /// Student's t (scaled) or normal (absolute σ) two-sided critical value at the level.
    pub(crate) critical_value: f64,
    /// Covariance of the coefficients, (XᵀWX)⁻¹ × the multiplier.
    pub(crate) cov: DMatrix<f64>,
}

/// Scores the solved fit `lin` on the points summarised by `sums`.
///
/// # Formula
/// ```text
/// Cov β̂ = s² (XᵀWX)⁻¹ with s² = χ²/(n − p), intervals ± t_{(1+level)/2, n−p} SE  (scaled)
/// Cov β̂ = (XᵀWX)⁻¹, intervals ± z_{(1+level)/2} SE                              (absolute σ, weighted)
/// ```
pub(crate) fn score(lin: &LinearFit, sums: &WeightSums, options: &FitOptions) -> Scored {
    let stats = statistics(lin.rss, lin.p, sums, options.convention);
    let absolute = options.convention == SigmaConvention::Absolute && sums.weighted;
    let s2 = stats.reduced_chi2;
    let variance_scale = if absolute { 1.0 } else { s2 };
    let critical_value = if absolute {
        normal_quantile(0.5 + options.level / 2.0)
    } else {
        t_quantile(0.5 + options.level / 2.0, lin.dof() as f64)
    };
    let cov = &lin.unscaled_covariance * variance_scale;
    Scored {
        stats,
        s2,
        variance_scale,
        critical_value,
        cov,
    }
}
