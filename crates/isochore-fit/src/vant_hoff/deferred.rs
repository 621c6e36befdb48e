//! The estimates first, the model comparison a moment later: [`fit_estimates_first`] is
//! [`super::fit`] without the χ² of the ladder's models that its solver does not give on
//! the way (on a large data set the Clarke–Glew χ² is a second solve over every point),
//! returning a [`PendingComparison`] to run on any thread (with the stored-matrix solver, or
//! streamed over the points in less memory); [`VantHoffFit::complete_comparison`]
//! then puts the comparison and the cautions that depend on it in place. The completed fit
//! is `fit`'s, number for number and word for word (tested), so a window can show the
//! estimates of a refit at once and the comparison when it is ready.

use super::comparison::{chi2_on_points, ladder_comparison, Reach};
use super::statistics::WeightSums;
use super::{shared_in_mode, warnings, Mode, ModelComparison, VantHoffFit};
use crate::error::Error;
use crate::measurement::Measurement;
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
        let ladder = model.ladder();
        let comparison = ladder_comparison(&ladder, &self.sums, &self.options, Reach::Whole, |m| {
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
        self.write_cautions(done.flagged, done.leverage_one);
    }

    /// Writes the fit's own cautions (again), after those a caller put in front.
    pub(super) fn write_cautions(&mut self, flagged: usize, leverage_one: bool) {
        let keep = self.warnings.len().saturating_sub(self.own_warnings);
        let own = warnings::cautions(self, flagged, leverage_one);
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
    shared_in_mode(points, options, Mode::EstimatesFirst)
}

/// [`super::fit_shared`] for an output that shows the estimates, the statistics, the
/// flagged points and the cautions but none of the model comparison's numbers (the command
/// line's summary table): on a large data set (at least 20 000 points) the comparison is
/// made only as far as its verdict. The ladder is climbed as [`super::fit`] climbs it but
/// stops after the first step that is not supported; the preferred model and the words of
/// the cautions (which quote the last supported step and the first unsupported one) are
/// then `fit`'s, and no later model is solved: a linear fit of data that show no curvature
/// solves no Clarke–Glew model. When the verdict does need a model the solver did not give,
/// that model's χ² is solved on a second thread while the diagnostics pass runs. The fit's
/// `comparison()` is then `None` and [`VantHoffFit::comparison_pending`] true (the numbers
/// of its later steps were not made); smaller data sets get `fit`'s whole comparison.
///
/// # Errors
/// As [`super::fit`].
pub fn fit_to_verdict(
    points: &Arc<Vec<Measurement>>,
    options: &FitOptions,
) -> Result<VantHoffFit, Error> {
    shared_in_mode(points, options, Mode::Verdict).map(|(f, _)| f)
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

    /// Invented points from Clarke–Glew coefficients (ΔH°, ΔS°, ΔCp°, dΔCp°/dT at 298.15 K)
    /// with a deterministic scatter of about `noise` in ln K and unequal σ.
    fn points_of(n: usize, coefficients: [f64; 4], noise: f64) -> Vec<Measurement> {
        (0..n)
            .map(|i| {
                let t = 275.0 + 50.0 * i as f64 / n as f64;
                let x = Model::CLARKE_GLEW.row(t, 298.15);
                let truth: f64 = x.iter().zip(&coefficients).map(|(x, c)| x * c).sum();
                let wobble = ((i * 7919) % 101) as f64 / 50.0 - 1.0;
                Measurement::new(t, truth + noise * wobble)
                    .with_sigma(noise * (1.0 + 0.2 * (i % 3) as f64))
            })
            .collect()
    }

    #[test]
    fn the_verdict_alone_gives_fit_s_cautions_and_leaves_the_comparison_pending() {
        // Straight, gently curved (ΔCp° only) and doubly curved (dΔCp°/dT too) invented
        // data, fitted with each model: every step of the ladder supported or not.
        let sets = [
            points_of(22_000, [-40e3, -30.0, 0.0, 0.0], 0.02),
            points_of(22_000, [-40e3, -30.0, -800.0, 0.0], 0.002),
            points_of(22_000, [-40e3, -30.0, -800.0, 60.0], 0.0005),
        ];
        let mut preferred = Vec::new();
        for pts in &sets {
            for model in [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW] {
                let opts = FitOptions {
                    model,
                    ..FitOptions::default()
                };
                let whole = fit(pts, &opts).unwrap();
                let f = fit_to_verdict(&Arc::new(pts.clone()), &opts).unwrap();
                assert_eq!(f.warnings(), whole.warnings(), "{}", model.key());
                assert!(f.comparison_pending() && f.comparison().is_none());
                assert_eq!(f.params, whole.params, "{}", model.key());
                assert_eq!(f.flagged_points(), whole.flagged_points());
                preferred.push(whole.comparison().unwrap().preferred);
            }
        }
        // The sets do reach each model of the ladder.
        for m in [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW] {
            assert!(preferred.contains(&m), "{} never preferred", m.key());
        }
    }

    #[test]
    fn the_verdict_solves_no_model_after_the_first_unsupported_step() {
        let pts = points_of(200, [-40e3, -30.0, 0.0, 0.0], 0.02);
        let opts = FitOptions::default();
        let prepared = super::super::inputs::prepare(&pts, &opts, Model::LINEAR).unwrap();
        let sums = WeightSums::new(prepared.weights.as_deref(), &prepared.y);
        let ladder = Model::LINEAR.ladder();
        let asked = std::cell::RefCell::new(Vec::new());
        let chi2 = |m: Model| {
            asked.borrow_mut().push(m);
            chi2_on_points(&pts, &opts, m, false)
        };
        let verdict = ladder_comparison(&ladder, &sums, &opts, Reach::Verdict, chi2).unwrap();
        assert!(!verdict.steps[0].supported, "straight data: no ΔCp°");
        assert_eq!(verdict.steps.len(), 1);
        assert_eq!(*asked.borrow(), [Model::LINEAR, Model::CONSTANT_CP]);
        let whole = ladder_comparison(&ladder, &sums, &opts, Reach::Whole, chi2).unwrap();
        assert_eq!(whole.steps.len(), 2);
        assert_eq!(whole.steps[0], verdict.steps[0]);
        assert_eq!(whole.preferred, verdict.preferred);
    }
}
