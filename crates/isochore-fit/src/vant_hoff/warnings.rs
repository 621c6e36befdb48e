//! Cautions in words: the [`Warning`] type with its [`WarningKind`], the thresholds that
//! raise them, and [`cautions`], which reads a finished fit (and what the diagnostics pass
//! noticed) and writes the sentences shown to the chemist next to the numbers, in a fixed
//! order.

use super::result::VantHoffFit;
use crate::error::counted;
use crate::model::SigmaConvention;
use serde::{Deserialize, Serialize};

/// |corr(ΔH°, ΔS°)| above which a warning explains the correlation (common practice:
/// van 't Hoff fits over a narrow 1/T range are nearly always this correlated).
pub const STRONG_CORRELATION: f64 = 0.95;

/// Fewer residual degrees of freedom than this earns a "few points" warning (common practice).
pub const FEW_DOF: usize = 3;

/// What a warning is about, for callers that react to kinds rather than text.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum WarningKind {
    /// Few degrees of freedom: intervals are wide and diagnostics weak.
    FewPoints,
    /// ΔH° and ΔS° strongly correlated.
    StrongCorrelation,
    /// At least one point flagged as outlier, high leverage or influential.
    FlaggedPoints,
    /// The linear model is used but the data support curvature (ΔCp° ≠ 0).
    CurvatureIgnored,
    /// The ΔCp° model is used but the data do not support it.
    CurvatureUnsupported,
    /// Under absolute σ, the scatter is inconsistent with the stated uncertainties.
    ScatterVersusSigma,
    /// A requested setting was not applicable and was ignored.
    SettingIgnored,
    /// A value is undefined (reported as null).
    Undefined,
    /// A narrow temperature range.
    NarrowRange,
    /// A prediction outside the measured range.
    Extrapolation,
    /// A confidence interval (of a temperature for a target K) that the data cannot bound on
    /// one side or both.
    UnboundedInterval,
}

/// A caution in words, next to the numbers it qualifies.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Warning {
    /// What it is about.
    pub kind: WarningKind,
    /// The sentence shown to the chemist.
    pub message: String,
}

impl Warning {
    /// Builds a warning.
    pub fn new(kind: WarningKind, message: impl Into<String>) -> Self {
        Warning {
            kind,
            message: message.into(),
        }
    }
}

/// The warnings of a finished fit, in their fixed order: a setting ignored, few points,
/// strong correlation, flagged points, a narrow range, curvature, scatter against σ, and
/// undefined values. `flagged` and `leverage_one` come from the diagnostics pass.
pub(super) fn cautions(fit: &VantHoffFit, flagged: usize, leverage_one: bool) -> Vec<Warning> {
    let mut warnings = Vec::new();
    let model = fit.options.model;
    let p = fit.params.len();
    let dof = fit.dof;
    let corr_h_s = fit.corr_h_s;
    let (t_min_k, t_max_k) = (fit.t_min_k, fit.t_max_k);
    if fit.options.convention == SigmaConvention::Absolute && !fit.weighted {
        warnings.push(Warning::new(
            WarningKind::SettingIgnored,
            "absolute σ was asked for but the fit is unweighted; the covariance is scaled by the residual variance instead",
        ));
    }
    if dof < FEW_DOF {
        warnings.push(Warning::new(
            WarningKind::FewPoints,
            format!(
                "only {} used for {} parameters ({}): intervals are wide and point diagnostics are weak",
                counted(fit.n_used, "point", "points"),
                p,
                counted(dof, "degree of freedom", "degrees of freedom")
            ),
        ));
    }
    if corr_h_s.abs() > STRONG_CORRELATION {
        warnings.push(Warning::new(
            WarningKind::StrongCorrelation,
            format!(
                "ΔH° and ΔS° are strongly correlated (r = {corr_h_s:.4}); their separate intervals overstate what is known jointly — quote the covariance, or ΔH° with ΔG° at T_hm (the weighted harmonic-mean temperature), where ΔG° is uncorrelated with ΔH° (exactly so for the linear model)"
            ),
        ));
    }
    if flagged > 0 {
        warnings.push(Warning::new(
            WarningKind::FlaggedPoints,
            format!(
                "{} flagged as outlier, high leverage or influential; inspect {} before trusting the result",
                counted(flagged, "point", "points"),
                if flagged == 1 { "it" } else { "them" }
            ),
        ));
    }
    if t_max_k - t_min_k < 10.0 {
        warnings.push(Warning::new(
            WarningKind::NarrowRange,
            format!(
                "the measured range is only {:.1} K wide; ΔH° from so narrow a range is poorly determined",
                t_max_k - t_min_k
            ),
        ));
    }
    let theta = fit.options.t_ref_k;
    if fit.is_extrapolation(theta) {
        warnings.push(Warning::new(
            WarningKind::Extrapolation,
            format!(
                "the reference temperature θ = {} K lies outside the measured range {:.2}–{:.2} K: the values quoted at θ are extrapolations, valid only if the model holds there ({}); a θ inside the range, near T_hm = {:.2} K, is better determined",
                crate::error::short(theta),
                t_min_k,
                t_max_k,
                model.assumption(),
                fit.t_harmonic_k
            ),
        ));
    }
    if let Some(c) = &fit.comparison {
        let ladder = model.ladder();
        let rank = |m| ladder.iter().position(|&l| l == m);
        if let (Some(fitted), Some(preferred)) = (rank(model), rank(c.preferred)) {
            if preferred > fitted {
                warnings.push(Warning::new(
                    WarningKind::CurvatureIgnored,
                    format!(
                        "the van 't Hoff plot curves ({}); the {} model ignores this — consider the {} model",
                        step_verdict(c, |s| s.larger == c.preferred),
                        model.short_name(),
                        c.preferred.short_name()
                    ),
                ));
            } else if preferred < fitted {
                // The first term the data do not support is the one the preferred model lacks.
                let p = c.preferred.n_params();
                let symbol = model.params().get(p).map_or("term", |i| i.symbol);
                warnings.push(Warning::new(
                    WarningKind::CurvatureUnsupported,
                    format!(
                        "the data do not support a non-zero {symbol} ({}); the {} model is simpler and its ΔH° more precise",
                        step_verdict(c, |s| s.smaller == c.preferred),
                        c.preferred.short_name()
                    ),
                ));
            }
        }
    }
    if let Some(pv) = fit.stats.chi2_p_value {
        if pv < 0.001 {
            warnings.push(Warning::new(
                WarningKind::ScatterVersusSigma,
                format!(
                    "the scatter is larger than the stated σ allow (reduced χ² = {:.2}, p = {pv:.2e}); intervals that take σ as known standard uncertainties are too narrow — take σ as relative weights only, or revisit σ",
                    fit.stats.reduced_chi2
                ),
            ));
        } else if pv > 0.999 {
            warnings.push(Warning::new(
                WarningKind::ScatterVersusSigma,
                format!(
                    "the scatter is much smaller than the stated σ imply (reduced χ² = {:.2}); the σ may be overestimated",
                    fit.stats.reduced_chi2
                ),
            ));
        }
    }
    if fit.stats.r2.is_nan() {
        warnings.push(Warning::new(
            WarningKind::Undefined,
            "every used ln K is the same, so R² is undefined (reported as null)",
        ));
    }
    if dof == 0 {
        warnings.push(Warning::new(
            WarningKind::Undefined,
            "no residual degree of freedom: the reduced χ², residual SD and adjusted R² are undefined (reported as null) and the point diagnostics are empty",
        ));
    }
    if leverage_one {
        warnings.push(Warning::new(
            WarningKind::Undefined,
            "a point has leverage 1 (the fit passes through it); its studentized residual and Cook's distance are undefined",
        ));
    }
    if let Some(t) = fit.t_at_k1 {
        if let Some(w) = unbounded_interval("the temperature where K = 1", &t, fit.options.level) {
            warnings.push(w);
        }
    }
    warnings
}

/// The warning for an interval of a temperature (`what`) with an infinite end, if it has one.
pub fn unbounded_interval(what: &str, t: &super::Estimate, level: f64) -> Option<Warning> {
    let side = match (t.ci_low.is_finite(), t.ci_high.is_finite()) {
        (true, true) => return None,
        (true, false) => {
            "unbounded above: no temperature is too high to be consistent with the data"
        }
        (false, true) => "unbounded below: it reaches down towards 0 K",
        (false, false) => "unbounded on both sides: the data say nothing about it",
    };
    Some(Warning::new(
        WarningKind::UnboundedInterval,
        format!(
            "the {}% interval of {what} (Fieller) is {side}; quote the interval, not the value ± SE",
            super::comparison::percent(level)
        ),
    ))
}

/// The verdict of the ladder step that `which` picks, or the whole verdict if none does.
fn step_verdict(
    c: &super::ModelComparison,
    which: impl Fn(&super::ComparisonStep) -> bool,
) -> &str {
    c.steps
        .iter()
        .find(|s| which(s))
        .map_or(c.verdict.as_str(), |s| s.verdict.as_str())
}
