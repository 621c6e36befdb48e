//! Which solver path computes a fit, and what each path hands to the rest of the pipeline.
//! Well-behaved data take the streaming path of [`crate::fast`] (one QR for both models, no
//! n×p matrix); everything else, errors included, the general solver of
//! [`crate::least_squares`]. [`Engine`] hides the difference from [`super::fit`]: the
//! solution with its weight sums, the temperature range, the per-point diagnostics and the
//! other model's χ² for the comparison, each read from whichever path ran.

use super::comparison::chi2_on_points;
use super::inputs::{design, prepare};
use super::statistics::WeightSums;
use crate::diagnostics::{diagnose_points, DiagnosticsSummary, PointContext, PointDiagnostics};
use crate::error::Error;
use crate::fast::FastFit;
use crate::least_squares::{solve, LinearFit};
use crate::measurement::Measurement;
use crate::model::{FitOptions, Model, Weighting};
use nalgebra::DMatrix;
use std::borrow::Cow;

/// Internal: how a fit was computed, and what its diagnostics pass reads.
pub(super) enum Engine {
    /// The streaming path of [`crate::fast`].
    Fast(FastFit),
    /// The general solver, with the used ln K.
    General { solved: Solved, y: Vec<f64> },
}

/// Internal: a solved model on the used points.
pub(crate) struct Solved {
    pub(crate) lin: LinearFit,
    pub(crate) weights: Option<Vec<f64>>,
    pub(crate) used: Vec<usize>,
}

/// Validates points and options, and solves one model on the included points.
pub(crate) fn solve_model(
    points: &[Measurement],
    options: &FitOptions,
    model: Model,
) -> Result<Solved, Error> {
    let prepared = prepare(points, options, model)?;
    let x = design(points, &prepared.used, model, options.t_ref_k);
    let lin = solve(&x, &prepared.y, prepared.weights.as_deref())?;
    Ok(Solved {
        lin,
        weights: prepared.weights,
        used: prepared.used,
    })
}

impl Engine {
    /// Runs the streaming path when allowed and it accepts the data, the general solver
    /// otherwise. The inputs must already have passed [`super::inputs::check_inputs`].
    pub(super) fn run(
        points: &[Measurement],
        options: &FitOptions,
        allow_streaming: bool,
    ) -> Result<Engine, Error> {
        let fast = if allow_streaming {
            FastFit::try_new(points, options)
        } else {
            None
        };
        Ok(match fast {
            Some(fast) => Engine::Fast(fast),
            None => {
                let solved = solve_model(points, options, options.model)?;
                let y: Vec<f64> = solved.used.iter().map(|&i| points[i].ln_k).collect();
                Engine::General { solved, y }
            }
        })
    }

    /// The solution of the fitted model (without per-point vectors on the streaming path),
    /// whether it was weighted, and the weight sums its statistics need.
    pub(super) fn solution(&self, options: &FitOptions) -> (Cow<'_, LinearFit>, bool, WeightSums) {
        match self {
            Engine::Fast(f) => {
                let fast_lin = LinearFit {
                    coefficients: f.coefficients(),
                    unscaled_covariance: f.unscaled_covariance(),
                    fitted: Vec::new(),
                    residuals: Vec::new(),
                    leverages: Vec::new(),
                    rss: f.rss,
                    n: f.n(),
                    p: options.model.n_params(),
                };
                let weighted = options.weighting == Weighting::InverseVariance;
                let sums = WeightSums {
                    n: f.n(),
                    weighted,
                    tss: f.tss,
                    sum_ln_w: f.sum_ln_w,
                };
                (Cow::Owned(fast_lin), weighted, sums)
            }
            Engine::General { solved, y } => (
                Cow::Borrowed(&solved.lin),
                solved.weights.is_some(),
                WeightSums::new(solved.weights.as_deref(), y),
            ),
        }
    }

    /// Lowest and highest used temperature, Σwᵢ and Σwᵢ/Tᵢ over the used points.
    pub(super) fn temperatures(&self, points: &[Measurement]) -> (f64, f64, f64, f64) {
        match self {
            Engine::Fast(f) => (f.t_min, f.t_max, f.sum_w, f.sum_w_inv_t),
            Engine::General { solved, .. } => {
                let mut t_min_k = f64::INFINITY;
                let mut t_max_k = f64::NEG_INFINITY;
                let mut sum_w = 0.0;
                let mut sum_w_inv_t = 0.0;
                for (r, &i) in solved.used.iter().enumerate() {
                    let t = points[i].t_k;
                    t_min_k = t_min_k.min(t);
                    t_max_k = t_max_k.max(t);
                    let w = solved.weights.as_ref().map_or(1.0, |w| w[r]);
                    sum_w += w;
                    sum_w_inv_t += w / t;
                }
                (t_min_k, t_max_k, sum_w, sum_w_inv_t)
            }
        }
    }

    /// Per-point diagnostics of every point, with what the warnings need from them.
    #[allow(clippy::too_many_arguments)]
    pub(super) fn diagnose(
        &self,
        points: &[Measurement],
        options: &FitOptions,
        lin: &LinearFit,
        cov: &DMatrix<f64>,
        s2: f64,
        variance_scale: f64,
        weighted: bool,
        sum_w: f64,
    ) -> (Vec<PointDiagnostics>, DiagnosticsSummary) {
        match self {
            Engine::Fast(f) => {
                let ctx = PointContext::new(
                    lin,
                    cov,
                    s2,
                    variance_scale,
                    weighted,
                    if weighted { sum_w / lin.n as f64 } else { 1.0 },
                    options.thresholds,
                );
                f.diagnose(points, options, &ctx)
            }
            Engine::General { solved, .. } => {
                let d = diagnose_points(points, solved, options, cov, variance_scale, s2);
                let mut summary = DiagnosticsSummary::default();
                for p in &d {
                    summary.note(p);
                }
                (d, summary)
            }
        }
    }

    /// χ² of `other` on the same used points and weights: the streaming path's second
    /// model when it is that one, the general solver otherwise.
    pub(super) fn chi2_of(
        &self,
        points: &[Measurement],
        options: &FitOptions,
        other: Model,
    ) -> Result<f64, Error> {
        match self {
            Engine::Fast(f) if f.other_model == Some(other) => {
                f.rss_other.ok_or(Error::TooFewPoints {
                    available: f.n(),
                    needed: other.n_params() + 1,
                })
            }
            _ => chi2_on_points(points, options, other),
        }
    }
}
