//! The comparison of the linear and constant-ΔCp° models on the same used points and
//! weights: the F-test for the extra parameter, ΔAICc, the preferred model and a verdict in
//! words ([`ModelComparison`]); [`compare_models`] runs it on its own, and [`super::fit`]
//! runs it with the other model's χ² from whichever engine fitted.

use super::inputs::{design, prepare};
use super::statistics::{statistics, WeightSums};
use crate::error::Error;
use crate::least_squares::weighted_rss;
use crate::measurement::Measurement;
use crate::model::{FitOptions, Model, SigmaConvention};
use crate::stats::f_upper_tail;
use serde::{Deserialize, Serialize};

/// The verdict of the model comparison.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModelComparison {
    /// F statistic for adding ΔCp° to the linear model.
    pub f_statistic: f64,
    /// Its p-value from F(1, n − 3).
    pub f_p_value: f64,
    /// AICc(ΔCp° model) − AICc(linear); negative favours ΔCp°. `None` with too few points.
    pub delta_aicc: Option<f64>,
    /// The model the evidence prefers.
    pub preferred: Model,
    /// The verdict in plain words.
    pub verdict: String,
}

/// Compares the linear and constant-ΔCp° models on the same included points with the same
/// weights: an F-test for the extra parameter and the difference in AICc.
///
/// Returns `Ok(None)` when there are too few points for the ΔCp° model to leave a residual
/// degree of freedom (fewer than 4 used points).
///
/// # Formula
/// ```text
/// F = (χ²_lin − χ²_cp) / (χ²_cp / (n − 3)),   p = P(F(1, n − 3) ≥ F)
/// ΔAICc = AICc_cp − AICc_lin
/// ```
/// The ΔCp° model is preferred when p < 0.05 and ΔAICc < 0 (or ΔAICc is unavailable); the
/// linear model otherwise. Both numbers are reported so the chemist can judge.
///
/// # Errors
/// As [`super::fit`].
pub fn compare_models(
    points: &[Measurement],
    options: &FitOptions,
) -> Result<Option<ModelComparison>, Error> {
    let n_used = points.iter().filter(|p| p.included).count();
    if n_used < 4 {
        return Ok(None);
    }
    let prepared = prepare(points, options, Model::Linear)?;
    let w = prepared.weights.as_deref();
    let theta = options.t_ref_k;
    let x_lin = design(points, &prepared.used, Model::Linear, theta);
    let chi2_lin = weighted_rss(&x_lin, &prepared.y, w)?;
    let x_cp = design(points, &prepared.used, Model::ConstantCp, theta);
    let chi2_cp = match weighted_rss(&x_cp, &prepared.y, w) {
        Ok(c) => c,
        Err(Error::RankDeficient { .. }) | Err(Error::TooFewPoints { .. }) => return Ok(None),
        Err(e) => return Err(e),
    };
    let sums = WeightSums::new(w, &prepared.y);
    Ok(Some(comparison_from(
        chi2_lin,
        chi2_cp,
        &sums,
        options.convention,
    )))
}

/// The comparison of the linear and ΔCp° models from their χ² on the same points.
pub(super) fn comparison_from(
    chi2_lin: f64,
    chi2_cp: f64,
    sums: &WeightSums,
    convention: SigmaConvention,
) -> ModelComparison {
    let s_lin = statistics(chi2_lin, 2, sums, convention);
    let s_cp = statistics(chi2_cp, 3, sums, convention);
    let dof_cp = sums.n as f64 - 3.0;
    let drop = (s_lin.chi2 - s_cp.chi2).max(0.0);
    // With χ²_cp = 0 the ΔCp° model is exact: any drop is infinitely significant, and no
    // drop at all (both models exact) is no evidence.
    let f_statistic = if s_cp.chi2 > 0.0 {
        drop / (s_cp.chi2 / dof_cp)
    } else if drop > 0.0 {
        f64::INFINITY
    } else {
        0.0
    };
    let f_p_value = f_upper_tail(f_statistic, 1.0, dof_cp).unwrap_or(1.0);
    let delta_aicc = match (s_cp.aicc, s_lin.aicc) {
        (Some(a), Some(b)) => Some(a - b),
        _ => None,
    };
    let supports = f_p_value < 0.05 && delta_aicc.is_none_or(|d| d < 0.0);
    let preferred = if supports {
        Model::ConstantCp
    } else {
        Model::Linear
    };
    let aicc_text = match delta_aicc {
        Some(d) => format!("ΔAICc = {d:+.2}"),
        None => "ΔAICc unavailable with so few points".to_string(),
    };
    let verdict = if supports {
        format!(
            "curvature is supported: adding ΔCp° improves the fit (F-test {}, {aicc_text})",
            format_p(f_p_value)
        )
    } else if f_p_value < 0.05 {
        format!("evidence for curvature is mixed: the F-test says yes ({}) but {aicc_text} favours the linear model", format_p(f_p_value))
    } else {
        format!(
            "no evidence of curvature: ΔCp° does not improve the fit (F-test {}, {aicc_text})",
            format_p(f_p_value)
        )
    };
    ModelComparison {
        f_statistic,
        f_p_value,
        delta_aicc,
        preferred,
        verdict,
    }
}

/// Formats a p-value for people: "p = 0.123", or "p < 0.001".
pub fn format_p(p: f64) -> String {
    if p < 0.001 {
        "p < 0.001".to_string()
    } else {
        format!("p = {p:.3}")
    }
}
