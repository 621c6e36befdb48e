//! Which solver computes a fit, and the one interface through which the rest of the pipeline
//! reads it ([`SolvedFit`]). Well-behaved data of a model that streams take the streaming
//! path of [`crate::fast`] (one QR for the linear and constant-ΔCp° models, no n×p matrix);
//! everything else, errors included, the general Householder-QR solver of
//! [`crate::least_squares`], which takes any number of columns. Both implement [`SolvedFit`]:
//! the solution with its weight sums, the temperature range, the per-point diagnostics and
//! another model's χ² for the comparison.

use super::comparison::chi2_on_points;
use super::inputs::{check_counts_of_used, check_inputs, design, prepare};
use super::statistics::WeightSums;
use crate::diagnostics::{diagnose_points, DiagnosticsSummary, PointContext, PointStore};
use crate::error::Error;
use crate::fast::FastFit;
use crate::least_squares::{solve, LinearFit};
use crate::measurement::{Given, Measurement};
use crate::model::{FitOptions, Model, Weighting};
use nalgebra::DMatrix;
use std::borrow::Cow;

/// Internal: the one interface of a solved fit, whichever solver made it. The pipeline in
/// [`super::fit`] reads everything through it: the solution with its weight sums, the
/// temperature range, the per-point diagnostics and another model's χ² on the same points.
pub(super) trait SolvedFit {
    /// The solution of the fitted model (without per-point vectors on the streaming path),
    /// whether it was weighted, and the weight sums its statistics need.
    fn solution(&self, options: &FitOptions) -> (Cow<'_, LinearFit>, bool, WeightSums);

    /// Lowest and highest used temperature, Σwᵢ and Σwᵢ/Tᵢ over the used points.
    fn temperatures(&self, points: &[Measurement]) -> (f64, f64, f64, f64);

    /// Per-point diagnostics of every point (kept, or computed on demand), with what the
    /// warnings need from them. With `split`, a pass over the points may be shared with a
    /// second thread (the same results: each point's numbers depend on that point only).
    #[allow(clippy::too_many_arguments)]
    fn diagnose(
        &self,
        points: Given<'_>,
        options: &FitOptions,
        lin: &LinearFit,
        cov: &DMatrix<f64>,
        s2: f64,
        variance_scale: f64,
        weighted: bool,
        sum_w: f64,
        split: bool,
    ) -> (PointStore, DiagnosticsSummary);

    /// Another model's χ² that the solver gave on the way, if any.
    fn known_chi2(&self) -> Option<(Model, f64)>;

    /// Every point's ln(T/θ), when the solver keeps them while the fit runs.
    fn logs(&self) -> Option<&[f64]> {
        None
    }

    /// χ² of `other` on the same used points and weights.
    fn chi2_of(
        &self,
        points: &[Measurement],
        options: &FitOptions,
        other: Model,
    ) -> Result<f64, Error>;
}

/// The general solver's fit, with the used ln K.
pub(super) struct General {
    solved: Solved,
    y: Vec<f64>,
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

/// Solves with the streaming path of [`crate::fast`] when allowed and it accepts the data
/// (the model [streams](crate::Model::streams) and the numbers are well behaved), with the
/// general solver of [`crate::least_squares`] otherwise. The options must already be valid.
/// The inputs are checked here as [`check_inputs`] checks them: the streaming path checks
/// every point's values in its first pass (it declines any fault), so only the counts are
/// left ([`check_counts_of_used`]); the general path runs [`check_inputs`] first, which names the
/// first fault. `second_core_free`: no other work of the fit's (the comparison's χ²) runs
/// beside it, so the streaming path may keep the points' logarithms and share its passes
/// with a second thread ([`FastFit::try_new_with`]).
pub(super) fn run(
    points: &[Measurement],
    options: &FitOptions,
    allow_streaming: bool,
    second_core_free: bool,
) -> Result<Box<dyn SolvedFit>, Error> {
    if allow_streaming {
        let split = second_core_free.then_some(crate::fast::SPLIT_POINTS);
        if let Some(fast) = FastFit::try_new_with(points, options, split) {
            check_counts_of_used(points, fast.n(), options, options.model)?;
            return Ok(Box::new(fast));
        }
    }
    check_inputs(points, options, options.model)?;
    let solved = solve_model(points, options, options.model)?;
    let y: Vec<f64> = solved.used.iter().map(|&i| points[i].ln_k).collect();
    Ok(Box::new(General { solved, y }))
}

impl SolvedFit for FastFit {
    fn known_chi2(&self) -> Option<(Model, f64)> {
        self.other_model.zip(self.rss_other)
    }

    fn logs(&self) -> Option<&[f64]> {
        self.logs.as_deref()
    }

    fn solution(&self, options: &FitOptions) -> (Cow<'_, LinearFit>, bool, WeightSums) {
        let f = self;
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

    fn temperatures(&self, _points: &[Measurement]) -> (f64, f64, f64, f64) {
        (self.t_min, self.t_max, self.sum_w, self.sum_w_inv_t)
    }

    fn diagnose(
        &self,
        points: Given<'_>,
        options: &FitOptions,
        lin: &LinearFit,
        cov: &DMatrix<f64>,
        s2: f64,
        variance_scale: f64,
        weighted: bool,
        sum_w: f64,
        split: bool,
    ) -> (PointStore, DiagnosticsSummary) {
        let ctx = PointContext::new(
            lin,
            cov,
            s2,
            variance_scale,
            weighted,
            if weighted { sum_w / lin.n as f64 } else { 1.0 },
            options.thresholds,
        );
        let (points, summary, flagged) =
            FastFit::diagnose(self, points.to_shared(), options, ctx, split);
        (
            PointStore::OnDemand {
                points: Box::new(points),
                cache: std::sync::OnceLock::new(),
                flagged,
            },
            summary,
        )
    }

    fn chi2_of(
        &self,
        points: &[Measurement],
        options: &FitOptions,
        other: Model,
    ) -> Result<f64, Error> {
        if self.other_model == Some(other) {
            self.rss_other.ok_or(Error::TooFewPoints {
                available: self.n(),
                needed: other.n_params() + 1,
            })
        } else {
            chi2_on_points(points, options, other, false)
        }
    }
}

impl SolvedFit for General {
    fn known_chi2(&self) -> Option<(Model, f64)> {
        None
    }

    fn solution(&self, _options: &FitOptions) -> (Cow<'_, LinearFit>, bool, WeightSums) {
        (
            Cow::Borrowed(&self.solved.lin),
            self.solved.weights.is_some(),
            WeightSums::new(self.solved.weights.as_deref(), &self.y),
        )
    }

    fn temperatures(&self, points: &[Measurement]) -> (f64, f64, f64, f64) {
        let solved = &self.solved;
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

    fn diagnose(
        &self,
        points: Given<'_>,
        options: &FitOptions,
        _lin: &LinearFit,
        cov: &DMatrix<f64>,
        s2: f64,
        variance_scale: f64,
        _weighted: bool,
        _sum_w: f64,
        _split: bool,
    ) -> (PointStore, DiagnosticsSummary) {
        let d = diagnose_points(
            points.slice(),
            &self.solved,
            options,
            cov,
            variance_scale,
            s2,
        );
        let mut summary = DiagnosticsSummary::default();
        for p in &d {
            summary.note(p);
        }
        (PointStore::Kept(d), summary)
    }

    fn chi2_of(
        &self,
        points: &[Measurement],
        options: &FitOptions,
        other: Model,
    ) -> Result<f64, Error> {
        chi2_on_points(points, options, other, false)
    }
}
