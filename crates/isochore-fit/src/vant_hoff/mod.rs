//! The van 't Hoff fit: estimates of (ΔH°, ΔS°[, ΔCp°]) with their covariance, fit
//! statistics, per-point diagnostics, warnings in words, and the comparison of the
//! linear and constant-ΔCp° models on the same points.
//!
//! [`fit`] is the pipeline, in this order: validate the input once (`inputs`), let an
//! engine solve it (`engines`: the streaming path or the general solver), score it
//! (`statistics`), assemble the result (`result`) with its per-point diagnostics, compare
//! it with the other model (`comparison`) and write the cautions (`warnings`).
//! Derived quantities (predictions, bands, the confidence ellipse, temperatures for a
//! target K) are methods on [`VantHoffFit`] in [`crate::derived`].

mod comparison;
mod deferred;
mod engines;
pub(crate) mod inputs;
mod result;
mod statistics;
mod warnings;

pub use comparison::{
    compare_models, format_p, ComparisonStep, ModelComparison, StepTest, LADDER_ALPHA,
};
pub use deferred::{fit_estimates_first, fit_to_verdict, CompletedComparison, PendingComparison};
pub use result::{Estimate, Parameter, ThermoAt, VantHoffFit};
pub use statistics::FitStatistics;
pub use warnings::{unbounded_interval, Warning, WarningKind, FEW_DOF, STRONG_CORRELATION};

pub(crate) use comparison::percent as comparison_percent;
pub(crate) use engines::Solved;
#[cfg(test)]
pub(crate) use inputs::design;

use crate::error::Error;
use crate::measurement::{Given, Measurement};
use crate::model::{is_plausible_temperature, FitOptions, Model};
use comparison::{chi2_on_valid_points, ladder_comparison, Reach};
use std::sync::Arc;

/// From this many points on, the other models of the ladder are solved on a second thread.
const PARALLEL_POINTS: usize = 20_000;

/// How a large data set's fit (from [`PARALLEL_POINTS`]) makes its model comparison.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Mode {
    /// Whole, the other ladder models solved on a second thread from the start ([`fit`]).
    Whole,
    /// Left for later: the fit and a [`PendingComparison`] ([`fit_estimates_first`]).
    EstimatesFirst,
    /// Only as far as its verdict, for the cautions ([`fit_to_verdict`]).
    Verdict,
}

pub(crate) use statistics::{score, Scored, WeightSums};

/// Fits a van 't Hoff model by weighted least squares and computes every diagnostic.
///
/// # Formula
/// ```text
/// ln Kᵢ = xᵢ(Tᵢ)·β + εᵢ,   Var εᵢ = s² σᵢ²  (scaled)  or  σᵢ² (absolute)
/// Cov β̂ = s² (XᵀWX)⁻¹ with s² = χ²/(n − p)  (scaled),   (XᵀWX)⁻¹  (absolute)
/// ```
/// where xᵢ is [`crate::Model::row`], W = diag(1/σᵢ²) (identity when unweighted), χ² = Σ wᵢ eᵢ².
/// Intervals: β̂ⱼ ± t_{(1+level)/2, n−p} SEⱼ (scaled) or ± z_{(1+level)/2} SEⱼ (absolute).
///
/// Excluded points (`included == false`) take no part in the estimates but are returned
/// with a predicted value and a prediction-standardised residual.
///
/// # Errors
/// Any invalid point or option ([`Error::NonFinite`], [`Error::NonPositiveTemperature`],
/// [`Error::NonPositiveSigma`], [`Error::InvalidLevel`], …); [`Error::MissingSigma`] for a
/// weighted fit with a used point lacking σ; [`Error::TooFewPoints`] when fewer than p + 1
/// points are used (p under absolute σ); [`Error::SingleTemperature`]; [`Error::RankDeficient`];
/// [`Error::NoSolution`] when the numbers overflow (absurd units or reference temperature).
///
/// # Examples
/// ```
/// use isochore_fit::{fit, FitOptions, Measurement, Weighting, GAS_CONSTANT};
/// // Exact data with ΔH° = 40 kJ/mol, ΔS° = 100 J/(mol K).
/// let pts: Vec<Measurement> = [280.0, 290.0, 300.0, 310.0]
///     .iter()
///     .map(|&t| Measurement::new(t, -40e3 / (GAS_CONSTANT * t) + 100.0 / GAS_CONSTANT))
///     .collect();
/// let opts = FitOptions { weighting: Weighting::Unweighted, ..FitOptions::default() };
/// let f = fit(&pts, &opts).unwrap();
/// assert!((f.delta_h().value - 40e3).abs() < 1e-6);
/// ```
pub fn fit(points: &[Measurement], options: &FitOptions) -> Result<VantHoffFit, Error> {
    fit_with(points, options, true)
}

/// [`fit`] of points the caller shares: the same fit, but one whose per-point diagnostics are
/// computed on demand (a large data set of well-behaved numbers) holds another reference to
/// `points` instead of its own copy of them, so a million points are held once.
///
/// # Errors
/// As [`fit`].
pub fn fit_shared(
    points: &Arc<Vec<Measurement>>,
    options: &FitOptions,
) -> Result<VantHoffFit, Error> {
    shared_in_mode(points, options, Mode::Whole).map(|(f, _)| f)
}

/// A fit of shared points with the streaming path allowed, its comparison made as `mode`
/// says ([`fit_shared`], [`fit_estimates_first`], [`fit_to_verdict`]).
fn shared_in_mode(
    points: &Arc<Vec<Measurement>>,
    options: &FitOptions,
    mode: Mode,
) -> Result<(VantHoffFit, Option<PendingComparison>), Error> {
    fit_threads(Given::Shared(points), options, true, PARALLEL_POINTS, mode)
}

/// [`fit`], with the streaming path allowed or not (tests compare the two).
pub(crate) fn fit_with(
    points: &[Measurement],
    options: &FitOptions,
    allow_streaming: bool,
) -> Result<VantHoffFit, Error> {
    fit_threads(
        Given::Borrowed(points),
        options,
        allow_streaming,
        PARALLEL_POINTS,
        Mode::Whole,
    )
    .map(|(f, _)| f)
}

/// [`fit_with`], the other ladder models solved on a second thread from `parallel_points`
/// points on (tests compare it with one thread); from that size on, with
/// [`Mode::EstimatesFirst`] they are not solved and the comparison is returned pending
/// instead ([`fit_estimates_first`]), with [`Mode::Verdict`] only those the verdict needs
/// are ([`fit_to_verdict`]).
fn fit_threads(
    given: Given<'_>,
    options: &FitOptions,
    allow_streaming: bool,
    parallel_points: usize,
    mode: Mode,
) -> Result<(VantHoffFit, Option<PendingComparison>), Error> {
    let model = options.model;
    let points = given.slice();
    // Well-behaved data take the streaming path (one QR for both models, no n×p matrix);
    // everything else, errors included, the general one. The rules of identifiability and
    // plausibility hold on both paths: the points are checked by the solver
    // (`engines::run`), on the streaming path in its first pass. The thread beside checks
    // only its own model's counts: should a value be at fault, its χ² is not used, as the
    // fit returns the error.
    options.validate()?;
    // A large data set's ladder models that no streaming pass covers (Clarke–Glew beside a
    // linear fit) are solved on a second thread while this one solves the fitted model: the
    // same arithmetic on the same points, so the same numbers, in about half the time. The
    // solver's arithmetic is streamed over the points there (`lean`), so no n × p design
    // and its factorised copy are allocated beside the fit.
    std::thread::scope(|scope| {
        let beside = (mode == Mode::Whole && points.len() >= parallel_points).then(|| {
            scope.spawn(|| {
                model
                    .ladder()
                    .into_iter()
                    .filter(|&m| m != model && !(model.streams() && m.streams()))
                    .map(|m| (m, chi2_on_valid_points(points, options, m, None)))
                    .collect::<Vec<_>>()
            })
        });
        // Joined only when the comparison needs it: the fit's diagnostics pass runs
        // meanwhile.
        let join = move || {
            beside
                .map(|h| h.join().unwrap_or_else(|e| std::panic::resume_unwind(e)))
                .unwrap_or_default()
        };
        assemble(given, options, allow_streaming, parallel_points, mode, join)
    })
}

/// The fit of [`fit_threads`] from the solver on: statistics, diagnostics, warnings and the
/// comparison, with the χ² of the models solved beside it from `beside` (called once, when
/// the comparison needs them).
fn assemble(
    given: Given<'_>,
    options: &FitOptions,
    allow_streaming: bool,
    parallel_points: usize,
    mode: Mode,
    beside: impl FnOnce() -> Vec<(Model, Result<f64, Error>)>,
) -> Result<(VantHoffFit, Option<PendingComparison>), Error> {
    let model = options.model;
    let points = given.slice();
    let large = points.len() >= parallel_points;
    let defer = mode != Mode::Whole;
    // With the other ladder models solved beside (a large data set, not deferred), the
    // second core is theirs.
    let second_core_free = defer || !large;
    let engine = engines::run(points, options, allow_streaming, second_core_free);
    let engine = engine?;
    let (lin, weighted, sums) = engine.solution(options);
    let lin = lin.as_ref();
    let p = lin.p;
    let dof = lin.dof();
    let Scored {
        stats,
        s2,
        variance_scale,
        critical_value,
        cov,
    } = score(lin, &sums, options);
    let covariance: Vec<Vec<f64>> = (0..p)
        .map(|a| (0..p).map(|b| cov[(a, b)]).collect())
        .collect();
    let params: Vec<Parameter> = (0..p)
        .map(|j| Parameter {
            info: &model.params()[j],
            estimate: Estimate::symmetric(lin.coefficients[j], cov[(j, j)].sqrt(), critical_value),
        })
        .collect();
    // The scale s² cancels in a correlation; taking it from (XᵀWX)⁻¹ keeps it defined
    // when the data are exact (s² = 0).
    let uc = &lin.unscaled_covariance;
    let corr_h_s = uc[(0, 1)] / (uc[(0, 0)] * uc[(1, 1)]).sqrt();

    // Temperature range and weighted harmonic mean.
    let (t_min_k, t_max_k, sum_w, sum_w_inv_t) = engine.temperatures(points);
    let t_harmonic_k = sum_w / sum_w_inv_t;

    // New-observation variance: s² × (typical σ² = n/Σw) weighted, s² unweighted.
    let typical_sigma2 = if weighted { lin.n as f64 / sum_w } else { 1.0 };
    let new_observation_variance = variance_scale * typical_sigma2;

    // The χ² the solver gave: the fitted model's and the one it gave on the way.
    let rss = lin.rss;
    let known_pair = engine.known_chi2();
    let known = move |m: Model| {
        if m == model {
            Some(rss)
        } else {
            known_pair.filter(|(k, _)| *k == m).map(|(_, c)| c)
        }
    };
    let ladder = model.ladder();
    // The verdict's comparison from those χ² alone, unless it needs another model's (the
    // data support a step whose larger model the solver did not give): that is solved on a
    // second thread while this one makes the diagnostics.
    let (mut verdict, needs_more) = if mode == Mode::Verdict && large {
        verdict_from(&ladder, &sums, options, known)
    } else {
        (None, false)
    };
    // The solver's logarithms, when it kept them, serve the streamed χ² too (8 bytes a point
    // fewer).
    let logs = engine.logs();
    let ((points_diag, summary), climbed) = std::thread::scope(|scope| {
        let climb = needs_more.then(|| {
            scope.spawn(|| {
                ladder_comparison(&ladder, &sums, options, Reach::Verdict, |m| {
                    match known(m) {
                        Some(c) => Ok(c),
                        None => chi2_on_valid_points(points, options, m, logs),
                    }
                })
            })
        });
        let diagnosed = engine.diagnose(
            given,
            options,
            lin,
            &cov,
            s2,
            variance_scale,
            weighted,
            sum_w,
            // The comparison left for later, or needing nothing more: the other core is idle
            // until the estimates are out.
            defer && large && climb.is_none(),
        );
        let climbed = climb.map(|h| h.join().unwrap_or_else(|e| std::panic::resume_unwind(e)));
        (diagnosed, climbed)
    });
    if let Some(c) = climbed {
        verdict = c;
    }
    if let Some((index, t_k)) = summary.first_bad {
        // An ordinary temperature that cannot be evaluated points at the design, not at the
        // temperature.
        if is_plausible_temperature(t_k) {
            return Err(Error::IllConditioned { index, kelvin: t_k });
        }
        return Err(Error::NoSolution(format!(
            "point {}: the model cannot be evaluated at {} K (far outside the plausible range {} to {} K); correct or remove the point",
            index + 1,
            crate::error::short(t_k),
            crate::model::MIN_PLAUSIBLE_K,
            crate::model::MAX_PLAUSIBLE_K
        )));
    }

    let mut out = VantHoffFit {
        options: *options,
        n_used: lin.n,
        n_total: points.len(),
        dof,
        weighted,
        params,
        covariance,
        corr_h_s,
        stats,
        critical_value,
        new_observation_variance,
        variance_scale,
        t_min_k,
        t_max_k,
        t_harmonic_k,
        at_reference: ThermoAt::placeholder(options.t_ref_k),
        at_harmonic: ThermoAt::placeholder(t_harmonic_k),
        t_at_k1: None,
        points: points_diag,
        points_finite: summary.not_finite == 0,
        comparison: None,
        warnings: Vec::new(),
        own_warnings: 0,
        comparison_pending: false,
    };
    out.at_reference = out.thermo_at(options.t_ref_k);
    out.at_harmonic = out.thermo_at(t_harmonic_k);
    if !out.all_estimates_finite() {
        return Err(Error::NoSolution(
            "the numbers are too large or too small to compute with; check the units (temperatures in kelvin, ln K rather than K, σ of ln K) and the reference temperature".into(),
        ));
    }
    out.t_at_k1 = out.temperature_for_k(1.0).ok();
    if mode == Mode::Verdict && large {
        // The cautions from the verdict; the comparison itself, whose later steps were not
        // made, is not kept.
        out.comparison = verdict;
        out.write_cautions(summary.flagged, summary.leverage_one);
        out.comparison = None;
        out.comparison_pending = true;
        return Ok((out, None));
    }
    if mode == Mode::EstimatesFirst && large {
        let pending = PendingComparison {
            options: *options,
            sums,
            rss,
            known: known_pair,
            flagged: summary.flagged,
            leverage_one: summary.leverage_one,
        };
        out.comparison_pending = true;
        out.write_cautions(summary.flagged, summary.leverage_one);
        return Ok((out, Some(pending)));
    }
    // The comparison needs only each ladder model's χ² on the same points and weights.
    let mut beside = beside();
    out.comparison = ladder_comparison(&ladder, &sums, options, Reach::Whole, |m| {
        if m == model {
            Ok(lin.rss)
        } else if let Some(i) = beside.iter().position(|(b, _)| *b == m) {
            beside.swap_remove(i).1
        } else {
            engine.chi2_of(points, options, m)
        }
    });

    out.write_cautions(summary.flagged, summary.leverage_one);
    Ok((out, None))
}

/// The comparison of `ladder` as far as its verdict ([`Reach::Verdict`]) from the χ² that
/// `known` gives, and whether the verdict needs a model's χ² that it does not give (the
/// comparison is then cut short there and must be made again with that χ²).
fn verdict_from(
    ladder: &[Model],
    sums: &WeightSums,
    options: &FitOptions,
    known: impl Fn(Model) -> Option<f64>,
) -> (Option<ModelComparison>, bool) {
    let mut needs_more = false;
    let verdict = ladder_comparison(ladder, sums, options, Reach::Verdict, |m| {
        known(m).ok_or_else(|| {
            needs_more = true;
            // Stops the climb here; the message is never shown.
            Error::NoSolution(String::new())
        })
    });
    (verdict, needs_more)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::{Model, GAS_CONSTANT};

    fn exact(dh: f64, ds: f64, temps: &[f64]) -> Vec<Measurement> {
        temps
            .iter()
            .map(|&t| {
                Measurement::new(t, -dh / (GAS_CONSTANT * t) + ds / GAS_CONSTANT).with_sigma(0.05)
            })
            .collect()
    }

    #[test]
    fn the_flag_caution_counts_only_used_points() {
        // ΔH° = −30 kJ/mol, ΔS° = −20 J/(mol K), with ±0.01 of alternating scatter; the
        // fifth point is 2 units off in ln K (invented).
        let temps = [280.0, 285.0, 290.0, 295.0, 300.0, 305.0, 310.0, 315.0];
        let mut pts = exact(-30e3, -20.0, &temps);
        for (i, p) in pts.iter_mut().enumerate() {
            p.ln_k += if i % 2 == 0 { 0.01 } else { -0.01 };
        }
        pts[4].ln_k += 2.0;
        let flagged = |f: &VantHoffFit| {
            f.warnings()
                .iter()
                .any(|w| w.kind == WarningKind::FlaggedPoints)
        };
        let all = fit(&pts, &FitOptions::default()).unwrap();
        assert!(all.points()[4].flags.any());
        assert!(flagged(&all));
        // Excluded, it is still marked an outlier for the table, but the caution is gone.
        pts[4].included = false;
        let used = fit(&pts, &FitOptions::default()).unwrap();
        assert!(used.points()[4].flags.outlier);
        assert!(used
            .points()
            .iter()
            .filter(|d| d.used)
            .all(|d| !d.flags.any()));
        assert!(!flagged(&used), "{:?}", used.warnings());
    }

    /// `n` gently curved invented points (ΔCp° = −300 J/(mol K)) with scatter and unequal
    /// σ, 280–320 K.
    pub(super) fn curved_points(n: usize) -> Vec<Measurement> {
        (0..n)
            .map(|i| {
                let t = 280.0 + 40.0 * i as f64 / n as f64;
                let x = Model::CONSTANT_CP.row(t, 298.15);
                let noise = 0.01 * ((i * 7919) % 13) as f64 / 13.0 - 0.005;
                Measurement::new(t, x[0] * -30e3 + x[1] * -20.0 + x[2] * -300.0 + noise)
                    .with_sigma(0.01 + 0.001 * (i % 5) as f64)
            })
            .collect()
    }

    /// `fit` of `pts` with `model` on one thread and with the other models beside it (from
    /// any size).
    fn serial_and_beside(pts: &[Measurement], model: Model) -> (VantHoffFit, VantHoffFit) {
        let opts = FitOptions {
            model,
            ..FitOptions::default()
        };
        let serial = fit_threads(Given::Borrowed(pts), &opts, true, usize::MAX, Mode::Whole)
            .unwrap()
            .0;
        let beside = fit_threads(Given::Borrowed(pts), &opts, true, 0, Mode::Whole)
            .unwrap()
            .0;
        (serial, beside)
    }

    #[test]
    fn a_shared_fit_holds_the_caller_s_points_and_gives_fit_s_numbers() {
        // A set the streaming path takes (its diagnostics computed on demand), one point
        // left out: `fit_shared` gives `fit`'s numbers, bit for bit (Debug prints every f64
        // exactly), and holds a second reference to the points instead of a copy, given up
        // with the fit.
        let mut pts = curved_points(5_000);
        pts[11].included = false;
        let shared = Arc::new(pts.clone());
        for model in [Model::LINEAR, Model::CONSTANT_CP] {
            let opts = FitOptions {
                model,
                ..FitOptions::default()
            };
            let copied = fit(&pts, &opts).unwrap();
            let held = fit_shared(&shared, &opts).unwrap();
            assert_eq!(Arc::strong_count(&shared), 2, "{}", model.key());
            let all = |f: &VantHoffFit| format!("{:?}", f.points_iter().collect::<Vec<_>>());
            assert_eq!(all(&held), all(&copied), "{}", model.key());
            assert_eq!(format!("{:?}", held.params), format!("{:?}", copied.params));
            assert_eq!(held.comparison(), copied.comparison(), "{}", model.key());
            assert_eq!(held.warnings(), copied.warnings(), "{}", model.key());
            drop(held);
            assert_eq!(Arc::strong_count(&shared), 1, "{}", model.key());
        }
    }

    #[test]
    fn models_solved_beside_the_fit_give_the_serial_numbers() {
        let pts = curved_points(3000);
        for model in [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW] {
            let (serial, beside) = serial_and_beside(&pts, model);
            let (a, b) = (serial.comparison().unwrap(), beside.comparison().unwrap());
            assert_eq!(a.steps.len(), 2, "{}", model.key());
            assert_eq!(a, b, "{}", model.key());
        }
    }

    #[test]
    fn the_streamed_chi2_beside_a_large_fit_gives_the_stored_solver_s_comparison() {
        // From `STREAMED_CHI2_POINTS` on, the Clarke–Glew χ² beside a linear or ΔCp° fit is
        // streamed over the points; serially `fit` takes it from the stored solver. The two
        // comparisons agree to the bit (Debug prints every f64 exactly), a point left out.
        let mut pts = curved_points(comparison::STREAMED_CHI2_POINTS + 11);
        pts[7] = pts[7].excluded();
        // The streamed path answers here (it does not fall back to the stored solver).
        let theta = FitOptions::default().t_ref_k;
        let streamed =
            crate::least_squares::weighted_rss_streamed(Model::CLARKE_GLEW, theta, &pts, true);
        assert!(streamed.is_some());
        for model in [Model::LINEAR, Model::CONSTANT_CP] {
            let (serial, beside) = serial_and_beside(&pts, model);
            let (a, b) = (serial.comparison().unwrap(), beside.comparison().unwrap());
            assert_eq!(a.steps.len(), 2, "{}", model.key());
            assert_eq!(format!("{a:?}"), format!("{b:?}"), "{}", model.key());
            assert_eq!(serial.warnings(), beside.warnings(), "{}", model.key());
        }
    }

    #[test]
    fn the_thread_beside_checks_the_counts_of_its_own_model() {
        // A large set at four temperatures (invented, with replicates): enough for the
        // linear and constant-ΔCp° fits, too few for Clarke–Glew's error estimate (five).
        // The thread beside the fit checks only the counts, for its own model, so the
        // ladder stops where the serial fit's stops; and with a fifth temperature it goes on.
        let mut pts = curved_points(comparison::STREAMED_CHI2_POINTS + 11);
        for (i, p) in pts.iter_mut().enumerate() {
            p.t_k = [285.0, 295.0, 305.0, 315.0][i % 4];
        }
        let five = {
            let mut five = pts.clone();
            five[3].t_k = 300.0;
            five
        };
        for (pts, steps) in [(&pts, 1), (&five, 2)] {
            let (serial, beside) = serial_and_beside(pts, Model::LINEAR);
            let (a, b) = (serial.comparison().unwrap(), beside.comparison().unwrap());
            assert_eq!(a.steps.len(), steps);
            assert_eq!(format!("{a:?}"), format!("{b:?}"));
            assert_eq!(serial.warnings(), beside.warnings());
        }
    }

    #[test]
    fn too_few_and_single_temperature() {
        let opts = FitOptions::default();
        let pts = exact(1e4, 10.0, &[290.0, 300.0]);
        assert!(matches!(fit(&pts, &opts), Err(Error::TooFewPoints { .. })));
        let pts = exact(1e4, 10.0, &[300.0, 300.0, 300.0, 300.0]);
        assert_eq!(fit(&pts, &opts).unwrap_err(), Error::SingleTemperature);
        let mut pts = exact(1e4, 10.0, &[290.0, 300.0, 310.0]);
        pts[1].sigma_ln_k = None;
        assert_eq!(
            fit(&pts, &opts).unwrap_err(),
            Error::MissingSigma { index: 1 }
        );
    }

    #[test]
    fn cp_model_recovers_curved_exact_data() {
        // Exact ΔCp° data: ΔH°(θ) = −20 kJ/mol, ΔS°(θ) = −30 J/(mol K), ΔCp° = −800 J/(mol K).
        let theta = 298.15;
        let temps = [278.0, 283.0, 288.0, 293.0, 298.0, 303.0, 308.0, 313.0];
        let pts: Vec<Measurement> = temps
            .iter()
            .map(|&t| {
                let x = Model::CONSTANT_CP.row(t, theta);
                Measurement::new(t, x[0] * -20e3 + x[1] * -30.0 + x[2] * -800.0).with_sigma(0.02)
            })
            .collect();
        let opts = FitOptions {
            model: Model::CONSTANT_CP,
            ..FitOptions::default()
        };
        let f = fit(&pts, &opts).unwrap();
        assert!((f.delta_h().value + 20e3).abs() < 1e-6 * 20e3);
        assert!((f.delta_cp().unwrap().value + 800.0).abs() < 1e-6 * 800.0);
    }
}
