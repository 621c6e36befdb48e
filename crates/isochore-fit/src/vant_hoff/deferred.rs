//! The estimates first, the model comparison a moment later: [`fit_estimates_first`] is
//! [`super::fit`] without the χ² of the ladder's models that its solver does not give on
//! the way (on a large data set the Clarke–Glew χ² is a second solve over every point),
//! returning a [`PendingComparison`] to run on any thread (with the stored-matrix solver, or
//! streamed over the points in less memory); [`VantHoffFit::complete_comparison`]
//! then puts the comparison and the cautions that depend on it in place. The completed fit
//! is `fit`'s, number for number and word for word (tested), so a window can show the
//! estimates of a refit at once and the comparison when it is ready.

use super::comparison::{chi2_on_points, ladder_comparison};
use super::statistics::WeightSums;
use super::{fit_threads, warnings, ModelComparison, VantHoffFit, PARALLEL_POINTS};
use crate::error::Error;
use crate::measurement::{Given, Measurement};
use crate::model::{FitOptions, Model};
use std::sync::Arc;

/// What the model comparison of a fit still needs: the χ² its solver gave, the sums every
/// model's statistics share, and what the cautions need from the point diagnostics.
pub struct PendingComparison {
    pub(super) options: FitOptions,
    pub(super) sums: WeightSums,
    /// χ² of the fitted model.
    pub(super) rss: f64,
    /// Another model's χ² the solver gave on the way (the streaming path's pair).
    pub(super) known: Option<(Model, f64)>,
    pub(super) flagged: usize,
    pub(super) leverage_one: bool,
}

impl std::fmt::Debug for PendingComparison {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("PendingComparison")
            .field("model", &self.options.model)
            .field("n", &self.sums.n)
            .finish_non_exhaustive()
    }
}

/// A comparison made from a [`PendingComparison`], for [`VantHoffFit::complete_comparison`].
#[derive(Debug, Clone)]
pub struct CompletedComparison {
    comparison: Option<ModelComparison>,
    flagged: usize,
    leverage_one: bool,
}

impl PendingComparison {
    /// Solves the other models of the ladder on `points` (the points the fit was given) as
    /// `fit` does (the stored-matrix solver: 80 bytes a point while it runs) and makes the
    /// comparison.
    pub fn run(self, points: &[Measurement]) -> CompletedComparison {
        self.run_with(points, false)
    }

    /// [`PendingComparison::run`] with the other models' χ² streamed over the points
    /// (`least_squares::streamed`: the same bits, 24 bytes a point instead of 80, about
    /// twice the time).
    pub fn run_lean(self, points: &[Measurement]) -> CompletedComparison {
        self.run_with(points, true)
    }

    fn run_with(self, points: &[Measurement], lean: bool) -> CompletedComparison {
        let model = self.options.model;
        let comparison = ladder_comparison(&model.ladder(), &self.sums, &self.options, |m| {
            if m == model {
                Ok(self.rss)
            } else if let Some((_, chi2)) = self.known.filter(|(k, _)| *k == m) {
                Ok(chi2)
            } else {
                chi2_on_points(points, &self.options, m, lean)
            }
        });
        CompletedComparison {
            comparison,
            flagged: self.flagged,
            leverage_one: self.leverage_one,
        }
    }
}

impl VantHoffFit {
    /// Puts a comparison made from this fit's [`PendingComparison`] in place, with the
    /// cautions written again (those a caller put in front are kept in front).
    pub fn complete_comparison(&mut self, done: CompletedComparison) {
        self.comparison = done.comparison;
        self.comparison_pending = false;
        let keep = self.warnings.len().saturating_sub(self.own_warnings);
        let own = warnings::cautions(self, done.flagged, done.leverage_one);
        self.warnings.truncate(keep);
        self.own_warnings = own.len();
        self.warnings.extend(own);
    }
}

/// [`super::fit`] with the model comparison left for later when it needs another model
/// solved on a large data set (at least 20 000 points): the fit (its `comparison()` then
/// `None` and [`VantHoffFit::comparison_pending`] true) and what the comparison still needs.
/// Smaller data sets get the complete fit and `None`. The points are shared as in
/// [`super::fit_shared`].
///
/// # Errors
/// As [`super::fit`].
pub fn fit_estimates_first(
    points: &Arc<Vec<Measurement>>,
    options: &FitOptions,
) -> Result<(VantHoffFit, Option<PendingComparison>), Error> {
    fit_threads(Given::Shared(points), options, true, PARALLEL_POINTS, true)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::{fit, Model, Warning, WarningKind};

    #[test]
    fn the_completed_fit_is_fit_s() {
        // Gently curved invented data with scatter and unequal σ, one point left out, over
        // the size from which the comparison is left for later.
        let mut pts = crate::vant_hoff::tests::curved_points(25_000);
        pts[7].included = false;
        for model in [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW] {
            let opts = FitOptions {
                model,
                ..FitOptions::default()
            };
            let whole = fit(&pts, &opts).unwrap();
            let shared = Arc::new(pts.clone());
            let (mut first, pending) = fit_estimates_first(&shared, &opts).unwrap();
            assert!(first.comparison_pending() && first.comparison().is_none());
            assert_eq!(first.params, whole.params, "{}", model.key());
            first.prepend_warning(Warning::new(WarningKind::SettingIgnored, "caller's"));
            let mut lean = first.clone();
            let (_, again) = fit_estimates_first(&shared, &opts).unwrap();
            lean.complete_comparison(again.expect("left for later").run_lean(&pts));
            first.complete_comparison(pending.expect("left for later").run(&pts));
            assert_eq!(lean.comparison(), whole.comparison(), "{}", model.key());
            assert_eq!(&lean.warnings()[1..], whole.warnings(), "{}", model.key());
            assert!(!first.comparison_pending());
            assert_eq!(first.comparison(), whole.comparison(), "{}", model.key());
            assert_eq!(first.warnings()[0].message, "caller's");
            assert_eq!(&first.warnings()[1..], whole.warnings(), "{}", model.key());
            assert_eq!(
                serde_json::to_string(&first.points_iter().nth(3)).unwrap(),
                serde_json::to_string(&whole.points_iter().nth(3)).unwrap()
            );
            // The estimates' diagnostics pass is shared between two threads: the same
            // flagged points, in order (the linear fit of curved data flags some).
            assert_eq!(
                first.flagged_points(),
                whole.flagged_points(),
                "{}",
                model.key()
            );
            if model == Model::LINEAR {
                assert!(!whole.flagged_points().is_empty());
            }
        }
        // A small set is fitted whole.
        let small_set = Arc::new(pts[..100].to_vec());
        let (small, none) = fit_estimates_first(&small_set, &FitOptions::default()).unwrap();
        assert!(none.is_none() && !small.comparison_pending() && small.comparison().is_some());
    }
}
