//! The streaming path against the general solver, output by output.

use super::*;
use crate::least_squares::{solve, weighted_rss};
use crate::model::SigmaConvention;
use crate::vant_hoff::design;

/// Curved, noisy, unequally weighted data with one excluded point (invented).
fn data(n: usize) -> Vec<Measurement> {
    let mut u = 0.25f64;
    (0..n)
        .map(|i| {
            u = (u + 0.618_033_988_749_894_9) % 1.0;
            let t = 278.15 + 60.0 * (i as f64 + u) / n as f64;
            let x = Model::CONSTANT_CP.row(t, 298.15);
            let sigma = 0.02 + 0.06 * u;
            let m = Measurement::new(
                t,
                x[0] * -45e3 + x[1] * -60.0 + x[2] * -600.0 + sigma * (u - 0.5) * 3.0,
            )
            .with_sigma(sigma);
            if i == 3 {
                m.excluded()
            } else {
                m
            }
        })
        .collect()
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs().max(1e-300)
}

/// The options of both streaming models, weighted and not.
fn streaming_options() -> impl Iterator<Item = FitOptions> {
    [Model::LINEAR, Model::CONSTANT_CP]
        .into_iter()
        .flat_map(|model| {
            [Weighting::InverseVariance, Weighting::Unweighted]
                .into_iter()
                .map(move |weighting| FitOptions {
                    model,
                    weighting,
                    ..FitOptions::default()
                })
        })
}

#[test]
fn streaming_path_agrees_with_the_general_solver() {
    // The general Householder solver (nalgebra QR with augmented-system refinement) is
    // the reference; both are least squares, so they agree to rounding.
    for n in [6usize, 50, 3000] {
        let pts = data(n);
        for opts in streaming_options() {
            let (model, weighting) = (opts.model, opts.weighting);
            let fast = FastFit::try_new(&pts, &opts).expect("streaming path taken");
            let used: Vec<usize> = (0..n).filter(|&i| pts[i].included).collect();
            let y: Vec<f64> = used.iter().map(|&i| pts[i].ln_k).collect();
            let w: Option<Vec<f64>> = (weighting == Weighting::InverseVariance).then(|| {
                used.iter()
                    .map(|&i| 1.0 / pts[i].sigma_ln_k.unwrap().powi(2))
                    .collect()
            });
            let x = design(&pts, &used, model, 298.15);
            let general = solve(&x, &y, w.as_deref()).unwrap();
            for (a, b) in fast.coefficients().iter().zip(&general.coefficients) {
                assert!(rel(*a, *b) < 1e-10, "n={n} {model:?}: {a} vs {b}");
            }
            assert!(rel(fast.rss, general.rss) < 1e-10);
            let uc = fast.unscaled_covariance();
            for (a, b) in uc.iter().zip(general.unscaled_covariance.iter()) {
                assert!(rel(*a, *b) < 1e-9, "{a} vs {b}");
            }
            let other = if model == Model::LINEAR {
                Model::CONSTANT_CP
            } else {
                Model::LINEAR
            };
            let xo = design(&pts, &used, other, 298.15);
            let rss_o = weighted_rss(&xo, &y, w.as_deref()).unwrap();
            assert!(rel(fast.rss_other.unwrap(), rss_o) < 1e-10);
            // Leverages through the full fit.
            let f = crate::fit(&pts, &opts).unwrap();
            let lev: Vec<f64> = f
                .points()
                .iter()
                .filter(|d| d.used)
                .map(|d| d.leverage)
                .collect();
            for (a, b) in lev.iter().zip(&general.leverages) {
                assert!((a - b).abs() < 1e-12, "{a} vs {b}");
            }
        }
    }
}

#[test]
fn every_output_agrees_with_the_general_path() {
    // The whole fit, diagnostics and comparison included, through both engines.
    let close = |a: f64, b: f64| (a - b).abs() <= 1e-9 * b.abs().max(1e-6);
    let opt_close = |a: Option<f64>, b: Option<f64>| match (a, b) {
        (Some(a), Some(b)) => close(a, b),
        (None, None) => true,
        _ => false,
    };
    for n in [5usize, 40, 2000] {
        let mut pts = data(n);
        pts[1].ln_k += 0.5; // an outlier, so flags are exercised
        for model in [Model::LINEAR, Model::CONSTANT_CP] {
            for weighting in [Weighting::InverseVariance, Weighting::Unweighted] {
                for convention in [SigmaConvention::ScaledByFit, SigmaConvention::Absolute] {
                    let opts = FitOptions {
                        model,
                        weighting,
                        convention,
                        ..FitOptions::default()
                    };
                    assert!(FastFit::try_new(&pts, &opts).is_some());
                    let a = crate::vant_hoff::fit_with(&pts, &opts, true).unwrap();
                    let b = crate::vant_hoff::fit_with(&pts, &opts, false).unwrap();
                    for (x, y) in a.params.iter().zip(&b.params) {
                        assert!(close(x.estimate.value, y.estimate.value));
                        assert!(close(x.estimate.se, y.estimate.se));
                    }
                    assert!(close(a.stats.chi2, b.stats.chi2));
                    assert!(close(a.stats.r2, b.stats.r2));
                    assert!(close(a.stats.log_likelihood, b.stats.log_likelihood));
                    let (ca, cb) = (a.comparison.clone().unwrap(), b.comparison.clone().unwrap());
                    assert!(close(ca.f_statistic, cb.f_statistic), "{ca:?} {cb:?}");
                    assert_eq!(ca.preferred, cb.preferred);
                    assert_eq!(a.warnings.len(), b.warnings.len());
                    for (x, y) in a.points().iter().zip(b.points()) {
                        assert_eq!((x.index, x.used, x.flags), (y.index, y.used, y.flags));
                        for (u, v) in [
                            (x.fitted, y.fitted),
                            (x.residual, y.residual),
                            (x.weighted_residual, y.weighted_residual),
                            (x.leverage, y.leverage),
                            (x.prediction_se, y.prediction_se),
                        ] {
                            assert!(close(u, v), "n={n} point {}: {u} vs {v}", x.index);
                        }
                        for (u, v) in [
                            (x.student_int, y.student_int),
                            (x.student_ext, y.student_ext),
                            (x.cooks_d, y.cooks_d),
                            (x.dffits, y.dffits),
                            (x.prediction_residual, y.prediction_residual),
                        ] {
                            assert!(opt_close(u, v), "n={n} point {}: {u:?} vs {v:?}", x.index);
                        }
                    }
                }
            }
        }
    }
}

#[test]
fn hard_cases_take_the_general_path() {
    let pts = data(20);
    let opts = FitOptions::default();
    // Two temperatures only: the ΔCp° column of the comparison is dependent.
    let two: Vec<Measurement> = pts
        .iter()
        .enumerate()
        .map(|(i, m)| Measurement {
            t_k: if i % 2 == 0 { 290.0 } else { 300.0 },
            ..*m
        })
        .collect();
    assert!(FastFit::try_new(&two, &opts).is_none());
    // Two temperatures leave the linear model no error estimate from the scatter …
    assert!(matches!(
        crate::fit(&two, &opts),
        Err(crate::Error::TooFewTemperatures { distinct: 2, .. })
    ));
    // … but with absolute σ it is fitted, and the ΔCp° comparison is left out.
    let absolute = FitOptions {
        convention: crate::SigmaConvention::Absolute,
        ..opts
    };
    assert!(crate::fit(&two, &absolute).unwrap().comparison.is_none());
    // A missing σ and a bad level are reported by the one validation before either path.
    let mut missing = pts.clone();
    missing[5].sigma_ln_k = None;
    assert_eq!(
        crate::fit(&missing, &opts).unwrap_err(),
        crate::Error::MissingSigma { index: 5 }
    );
    let bad = FitOptions { level: 2.0, ..opts };
    assert_eq!(
        crate::fit(&pts, &bad).unwrap_err(),
        crate::Error::InvalidLevel(2.0)
    );
}

#[test]
fn diagnostics_on_demand_are_the_same_numbers_however_they_are_asked_for() {
    // One point at a time, one pass, and the whole slice: the same records, bit for bit
    // (Debug prints every f64 exactly), for a weighted and an unweighted fit with an
    // excluded point (invented data).
    for weighting in [Weighting::InverseVariance, Weighting::Unweighted] {
        let pts = data(300);
        let opts = FitOptions {
            weighting,
            ..FitOptions::default()
        };
        let f = crate::fit(&pts, &opts).unwrap();
        let pass: Vec<_> = f.points_iter().collect();
        assert_eq!(f.points_iter().len(), pts.len());
        let one: Vec<_> = (0..pts.len()).map(|i| f.point(i).unwrap()).collect();
        assert!(f.point(pts.len()).is_none());
        let flagged = f.flagged_points();
        let whole = f.points().to_vec();
        assert_eq!(format!("{pass:?}"), format!("{whole:?}"));
        assert_eq!(format!("{one:?}"), format!("{whole:?}"));
        assert_eq!(
            format!("{f:?}").matches("PointDiagnostics").count(),
            pts.len()
        );
        let again: Vec<usize> = whole
            .iter()
            .filter(|d| d.flags.any())
            .map(|d| d.index)
            .collect();
        // The flagged points found by the fit's own pass (kept, not made again) are those
        // of the records, and there are some to find.
        assert_eq!(flagged, again);
        assert!(!flagged.is_empty());
        assert!(!whole[3].used && whole[3].prediction_residual.is_some());
        // The fit's own finding that every number is finite agrees with the records.
        let finite = |v: f64| v.is_finite();
        let seen = whole.iter().all(|d| {
            [
                d.t_k,
                d.ln_k,
                d.fitted,
                d.residual,
                d.weighted_residual,
                d.leverage,
            ]
            .into_iter()
            .all(finite)
                && [
                    d.sigma_ln_k,
                    d.student_int,
                    d.student_ext,
                    d.cooks_d,
                    d.dffits,
                ]
                .into_iter()
                .all(|v| v.is_none_or(finite))
        });
        assert!(seen && f.points_finite());
        // The general solver's records agree to rounding.
        let general = crate::vant_hoff::fit_with(&pts, &opts, false).unwrap();
        for (a, b) in whole.iter().zip(general.points()) {
            assert_eq!((a.index, a.used, a.flags), (b.index, b.used, b.flags));
            assert!((a.leverage - b.leverage).abs() < 1e-9, "{a:?} {b:?}");
            assert!((a.residual - b.residual).abs() < 1e-9, "{a:?} {b:?}");
        }
    }
}

#[test]
fn a_fault_in_any_value_sends_the_fit_to_the_check_that_names_it() {
    // Each fault `check_inputs` reports, in the fifth of 40 invented points (and in an
    // excluded point where it applies to every point): the streaming path declines, and
    // the fit's error is `check_inputs`' own, naming the point.
    let pts = data(40);
    let opts = FitOptions::default();
    assert!(FastFit::try_new(&pts, &opts).is_some());
    // Each fault, and whether it is one in an excluded point too.
    type Fault = (fn(&mut Measurement), bool);
    let faults: [Fault; 8] = [
        (|m| m.t_k = f64::NAN, true),
        (|m| m.t_k = -3.0, true),
        (|m| m.t_k = 20_000.0, true),
        (|m| m.ln_k = f64::INFINITY, true),
        (|m| m.sigma_ln_k = Some(f64::NAN), true),
        (|m| m.sigma_ln_k = Some(-0.1), true),
        (|m| m.sigma_ln_k = Some(1e-160), false),
        (|m| m.sigma_ln_k = None, false),
    ];
    for (k, (fault, also_excluded)) in faults.iter().enumerate() {
        for excluded in [false, true] {
            let mut bad = pts.clone();
            fault(&mut bad[4]);
            bad[4].included = !excluded;
            let expected = crate::vant_hoff::inputs::check_inputs(&bad, &opts, opts.model);
            assert_eq!(expected.is_err(), !excluded || *also_excluded, "fault {k}");
            if expected.is_err() {
                assert!(FastFit::try_new(&bad, &opts).is_none(), "fault {k}");
                assert!(!bad[4].is_valid() || k >= 6 || k == 2, "fault {k}");
                assert_eq!(crate::fit(&bad, &opts).err(), expected.err(), "fault {k}");
            }
        }
    }
    // Extreme temperatures allowed: 20 000 K is no fault.
    let mut hot = pts.clone();
    hot[4].t_k = 20_000.0;
    let allow = FitOptions {
        allow_extreme_temperatures: true,
        ..opts
    };
    assert!(crate::vant_hoff::inputs::check_inputs(&hot, &allow, allow.model).is_ok());
}

#[test]
fn passes_shared_with_a_second_thread_give_one_thread_s_bits() {
    // Over the size from which the logarithms and the residual passes are shared, with
    // points left out here and there (the second thread's first point is then found by
    // counting), weighted and not, both models: every number the passes make is the
    // single thread's, to the bit, with the logarithms kept or taken by each pass.
    let mut pts = data(SPLIT_POINTS + 4_321);
    for i in (0..pts.len()).step_by(101) {
        pts[i].included = false;
    }
    for opts in streaming_options() {
        let (model, weighting) = (opts.model, opts.weighting);
        let shared = FastFit::try_new(&pts, &opts).expect("streaming path taken");
        let single = FastFit::try_new_with(&pts, &opts, Some(usize::MAX)).expect("taken");
        let nothing_kept = FastFit::try_new_with(&pts, &opts, None).expect("taken");
        let bits = |f: &FastFit| {
            let mut v: Vec<u64> = [
                f.rss,
                f.rss_other.unwrap_or(f64::NAN),
                f.sum_w,
                f.sum_ln_w,
                f.tss,
                f.sum_w_inv_t,
                f.t_min,
                f.t_max,
            ]
            .iter()
            .map(|v| v.to_bits())
            .collect();
            v.extend(f.fitted.beta.iter().map(|b| b.to_bits()));
            v
        };
        assert_eq!(bits(&shared), bits(&single), "{model:?} {weighting:?}");
        assert_eq!(
            bits(&shared),
            bits(&nothing_kept),
            "{model:?} {weighting:?}"
        );
        assert!(nothing_kept.logs.is_none());
        let logs =
            |f: &FastFit| -> Vec<u64> { f.logs.iter().flatten().map(|l| l.to_bits()).collect() };
        assert_eq!(logs(&shared), logs(&single));
        let taken: Vec<u64> = pts
            .iter()
            .map(|p| (p.t_k / 298.15).ln().to_bits())
            .collect();
        assert_eq!(logs(&shared), taken);
        assert!(
            shared.fitted.refined,
            "the refinement's passes are exercised"
        );
    }
}
