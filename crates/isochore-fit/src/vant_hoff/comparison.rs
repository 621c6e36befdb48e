//! The comparison of nested models on the same used points and weights, step by step up
//! the ladder (linear ⊂ constant ΔCp° ⊂ Clarke–Glew for the shipped models; see
//! [`Model::ladder`]): for each step the extra-sum-of-squares F-test, ΔAICc, whether the
//! extra term is resolved, and a verdict in words ([`ComparisonStep`]); the preferred model
//! climbs the ladder while each step is supported ([`ModelComparison`]).
//! [`compare_models`] runs it on its own, and [`super::fit`] runs it with the χ² its engine
//! already has.

use super::inputs::{check_counts, check_inputs, prepare};
use super::statistics::{statistics, WeightSums};
use crate::error::Error;
use crate::least_squares::{weighted_rss_formed, weighted_rss_streamed_with_logs};
use crate::measurement::Measurement;
use crate::model::{FitOptions, Model, SigmaConvention, Weighting};
use crate::stats::{chi2_upper_tail, f_upper_tail};
use serde::Serialize;

/// Significance level of the F-test in the ladder's rule, 0.05 (common practice).
pub const LADDER_ALPHA: f64 = 0.05;

/// The test of one ladder step.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum StepTest {
    /// σ scaled by the fit: the extra-sum-of-squares F-test.
    FTest,
    /// σ known (absolute σ, weighted): the likelihood-ratio test with known variances,
    /// Δχ² = χ²_s − χ²_l against χ²(q).
    LikelihoodRatio,
}

/// One step of the ladder: a model against the next larger one that extends it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ComparisonStep {
    /// The smaller model.
    pub smaller: Model,
    /// The larger model (it extends the smaller).
    pub larger: Model,
    /// Keys of the parameters the larger model adds.
    pub added: Vec<&'static str>,
    /// Which test: the F-test when the fit scales σ, the likelihood ratio when σ is known.
    pub test: StepTest,
    /// The test statistic: F = ((χ²_s − χ²_l)/q) / (χ²_l/(n − p_l)), q the number of added
    /// parameters; or Δχ² = χ²_s − χ²_l when σ is known.
    pub f_statistic: f64,
    /// P(F(q, n − p_l) ≥ F), or P(χ²(q) ≥ Δχ²) when σ is known.
    pub f_p_value: f64,
    /// q, the numerator degrees of freedom.
    pub df_extra: usize,
    /// n − p_l, the denominator degrees of freedom.
    pub df_residual: usize,
    /// AICc(larger) − AICc(smaller); negative favours the larger. `None` with too few points.
    pub delta_aicc: Option<f64>,
    /// Whether the evidence supports the larger model (p < 0.05 and ΔAICc < 0 or unavailable).
    pub supported: bool,
    /// Whether the added term is resolved: its interval at the fit's level excludes zero
    /// (for one added term under the scaled convention this is F above the critical F, since
    /// t² = F; under absolute σ it is the χ² drop above z²).
    pub resolved: bool,
    /// The verdict in plain words.
    pub verdict: String,
}

/// The verdict of the model comparison along the ladder.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ModelComparison {
    /// Test statistic of the first step (linear against constant ΔCp° for the shipped
    /// models): F, or Δχ² when σ is known (see [`ComparisonStep::test`]).
    pub f_statistic: f64,
    /// Its p-value.
    pub f_p_value: f64,
    /// ΔAICc of the first step; negative favours the larger model. `None` with too few points.
    pub delta_aicc: Option<f64>,
    /// The model the evidence prefers: the ladder is climbed while each step is supported.
    pub preferred: Model,
    /// The verdict in plain words (every step's, in order).
    pub verdict: String,
    /// Every step that the points allow, simplest first.
    pub steps: Vec<ComparisonStep>,
}

/// From this many points on, the lean [`chi2_on_points`] streams the solver over the points.
pub(super) const STREAMED_CHI2_POINTS: usize = 20_000;

/// Compares the models of the fitted model's ladder on the same included points with the
/// same weights: an F-test for each added term and the difference in AICc.
///
/// Returns `Ok(None)` when there are too few points for even the first step to leave a
/// residual degree of freedom (fewer than 4 used points for the shipped models).
///
/// # Formula
/// ```text
/// F = ((χ²_s − χ²_l)/q) / (χ²_l / (n − p_l)),   p = P(F(q, n − p_l) ≥ F)
/// ΔAICc = AICc_l − AICc_s
/// ```
/// The larger model of a step is supported when p < 0.05 and ΔAICc < 0 (or ΔAICc is
/// unavailable). Both numbers are reported so the chemist can judge.
///
/// # Errors
/// As [`super::fit`] for the smallest model of the ladder.
pub fn compare_models(
    points: &[Measurement],
    options: &FitOptions,
) -> Result<Option<ModelComparison>, Error> {
    let ladder = options.model.ladder();
    let (Some(&root), Some(&next)) = (ladder.first(), ladder.get(1)) else {
        return Ok(None);
    };
    // Too few points for the first step to leave a residual degree of freedom: nothing to
    // compare (and nothing to validate against).
    let n_used = points.iter().filter(|p| p.included).count();
    if n_used <= next.n_params() {
        return Ok(None);
    }
    let prepared = prepare(points, options, root)?;
    let sums = WeightSums::new(prepared.weights.as_deref(), &prepared.y);
    let chi2 = |m: Model| chi2_on_points(points, options, m, true);
    Ok(ladder_comparison(
        &ladder,
        &sums,
        options,
        Reach::Whole,
        chi2,
    ))
}

/// χ² of `model` on the included points with the options' weights, by the general solver.
/// `lean`: on a large data set (at least [`STREAMED_CHI2_POINTS`] points) the solver's
/// arithmetic is streamed over the points ([`weighted_rss_streamed`]: the same bits, with
/// ln(T/θ), r and f per point in memory instead of the design, its factorised copy and six
/// vectors, 24 MB instead of 80 MB at 10⁶ points), at about twice the time.
pub(super) fn chi2_on_points(
    points: &[Measurement],
    options: &FitOptions,
    model: Model,
    lean: bool,
) -> Result<f64, Error> {
    chi2_checked(points, options, model, lean, false, None)
}

/// [`chi2_on_points`] streamed (`lean`) on points whose values [`check_inputs`] has passed
/// with the same options for the fitted model: only the counts are checked again for
/// `model` ([`check_counts`]), not every point.
pub(super) fn chi2_on_valid_points(
    points: &[Measurement],
    options: &FitOptions,
    model: Model,
    logs: Option<&[f64]>,
) -> Result<f64, Error> {
    chi2_checked(points, options, model, true, true, logs)
}

fn chi2_checked(
    points: &[Measurement],
    options: &FitOptions,
    model: Model,
    lean: bool,
    values_checked: bool,
    logs: Option<&[f64]>,
) -> Result<f64, Error> {
    if lean && points.len() >= STREAMED_CHI2_POINTS {
        if values_checked {
            check_counts(points, options, model)?;
        } else {
            check_inputs(points, options, model)?;
        }
        let weighted = options.weighting == Weighting::InverseVariance;
        let theta = options.t_ref_k;
        if let Some(chi2) = weighted_rss_streamed_with_logs(model, theta, points, weighted, logs) {
            return Ok(chi2);
        }
    }
    let prepared = prepare(points, options, model)?;
    // The used temperatures only: the design's rows are formed from them when needed (a
    // 10⁶-point Clarke–Glew design is 32 MB, and the general solver keeps its own copy).
    let t_k: Vec<f64> = prepared.used.iter().map(|&i| points[i].t_k).collect();
    drop(prepared.used);
    weighted_rss_formed(model, options.t_ref_k, &t_k, prepared.y, prepared.weights)
}

/// How far up the ladder a comparison goes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Reach {
    /// Every step the points allow.
    Whole,
    /// Up to the first step that is not supported: the preferred model and the words of
    /// the cautions (which quote the last supported step and the first unsupported one)
    /// need no later step, so no later model is solved.
    Verdict,
}

/// The comparison along `ladder`, with `chi2` giving each model's χ² on the same points.
/// The ladder stops at the first model that has no residual degree of freedom or cannot be
/// solved, and with [`Reach::Verdict`] after the first unsupported step; `None` when no
/// step is possible.
pub(super) fn ladder_comparison(
    ladder: &[Model],
    sums: &WeightSums,
    options: &FitOptions,
    reach: Reach,
    mut chi2: impl FnMut(Model) -> Result<f64, Error>,
) -> Option<ModelComparison> {
    let mut steps: Vec<ComparisonStep> = Vec::new();
    let mut prev: Option<(Model, f64)> = None;
    for &m in ladder {
        if sums.n <= m.n_params() {
            break;
        }
        if reach == Reach::Verdict && steps.last().is_some_and(|s| !s.supported) {
            break;
        }
        let Ok(c) = chi2(m) else { break };
        if let Some((s, cs)) = prev {
            steps.push(step(s, cs, m, c, sums, options));
        }
        prev = Some((m, c));
    }
    let first = steps.first()?;
    let mut preferred = first.smaller;
    for s in &steps {
        if !s.supported {
            break;
        }
        preferred = s.larger;
    }
    let verdict = if steps.len() == 1 {
        first.verdict.clone()
    } else {
        steps
            .iter()
            .map(|s| {
                format!(
                    "{} → {}: {}",
                    s.smaller.short_name(),
                    s.larger.short_name(),
                    s.verdict
                )
            })
            .collect::<Vec<_>>()
            .join("; ")
    };
    Some(ModelComparison {
        f_statistic: first.f_statistic,
        f_p_value: first.f_p_value,
        delta_aicc: first.delta_aicc,
        preferred,
        verdict,
        steps,
    })
}

/// One step from `smaller` (χ² `chi2_s`) to `larger` (χ² `chi2_l`).
fn step(
    smaller: Model,
    chi2_s: f64,
    larger: Model,
    chi2_l: f64,
    sums: &WeightSums,
    options: &FitOptions,
) -> ComparisonStep {
    let (ps, pl) = (smaller.n_params(), larger.n_params());
    let q = pl.saturating_sub(ps).max(1);
    let s_s = statistics(chi2_s, ps, sums, options.convention);
    let s_l = statistics(chi2_l, pl, sums, options.convention);
    let dof_l = sums.n as f64 - pl as f64;
    let drop = (s_s.chi2 - s_l.chi2).max(0.0);
    let known_sigma = options.convention == SigmaConvention::Absolute && sums.weighted;
    let (test, f_statistic, f_p_value) = if known_sigma {
        // Known variances: Δχ² is the likelihood-ratio statistic, χ²(q) under the smaller.
        let p = chi2_upper_tail(drop, q as f64).unwrap_or(1.0);
        (StepTest::LikelihoodRatio, drop, p)
    } else {
        // With χ²_l = 0 the larger model is exact: any drop is infinitely significant, and
        // no drop at all (both models exact) is no evidence.
        let f = if s_l.chi2 > 0.0 {
            (drop / q as f64) / (s_l.chi2 / dof_l)
        } else if drop > 0.0 {
            f64::INFINITY
        } else {
            0.0
        };
        (
            StepTest::FTest,
            f,
            f_upper_tail(f, q as f64, dof_l).unwrap_or(1.0),
        )
    };
    let delta_aicc = match (s_l.aicc, s_s.aicc) {
        (Some(a), Some(b)) => Some(a - b),
        _ => None,
    };
    let supported = f_p_value < LADDER_ALPHA && delta_aicc.is_none_or(|d| d < 0.0);
    // For one added term the test is the square of the term's own t (z when σ is known),
    // so the term's interval at the fit's level spans zero exactly when p ≥ 1 − level.
    let resolved = f_p_value < 1.0 - options.level;
    let added: Vec<&'static str> = larger.params()[ps.min(pl)..]
        .iter()
        .map(|p| p.key)
        .collect();
    let symbols: Vec<&'static str> = larger.params()[ps.min(pl)..]
        .iter()
        .map(|p| p.symbol)
        .collect();
    let symbols = symbols.join(" and ");
    let phrase = larger.spec().evidence_phrase();
    let aicc_text = match delta_aicc {
        Some(d) => format!("ΔAICc = {d:+.2}"),
        None => "ΔAICc unavailable with so few points".to_string(),
    };
    let test_name = match test {
        StepTest::FTest => "F-test",
        StepTest::LikelihoodRatio => "Δχ² test",
    };
    let mut verdict = if supported {
        format!(
            "{phrase} is supported: adding {symbols} improves the fit ({test_name} {}, {aicc_text})",
            format_p(f_p_value)
        )
    } else if f_p_value < LADDER_ALPHA {
        format!(
            "evidence for {phrase} is mixed: the {test_name} says yes ({}) but {aicc_text} favours the {} model",
            format_p(f_p_value),
            smaller.short_name()
        )
    } else {
        format!(
            "no evidence of {phrase}: {symbols} does not improve the fit ({test_name} {}, {aicc_text})",
            format_p(f_p_value)
        )
    };
    if !resolved {
        verdict.push_str(&format!(
            "; the data cannot resolve {symbols}: its {}% interval spans zero",
            percent(options.level)
        ));
    }
    ComparisonStep {
        smaller,
        larger,
        added,
        test,
        f_statistic,
        f_p_value,
        df_extra: q,
        df_residual: dof_l.max(0.0) as usize,
        delta_aicc,
        supported,
        resolved,
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

/// A confidence level as a percentage without needless digits: 0.95 → "95", 0.955 → "95.5".
pub(crate) fn percent(level: f64) -> String {
    let p = level * 100.0;
    let t = format!("{p:.6}");
    t.trim_end_matches('0').trim_end_matches('.').to_string()
}
