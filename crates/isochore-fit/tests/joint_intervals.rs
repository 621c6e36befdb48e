//! Monte Carlo and bootstrap intervals of a joint fit (issue 13 with issue 12's joint fits):
//! the Monte Carlo SDs converge to the joint fit's delta-method SEs on a linear two-series
//! problem, the results do not depend on the number of threads, one series alone gives the
//! single-series run, the bootstrap is near the delta method on well-behaved data, and bad
//! settings are refused.

use isochore_fit::global::{fit_global, GlobalFit, SeriesInput, Sharing, SharingMap};
use isochore_fit::intervals::{
    joint_bootstrap, joint_monte_carlo, monte_carlo, BootstrapScheme, IntervalError,
    IntervalOptions, JointRun, JointTarget, Progress,
};
use isochore_fit::{fit, FitOptions, Measurement, SigmaConvention, GAS_CONSTANT};

/// Two invented series of 10 points each, 10–55 °C: ΔH° = −30 and −42 kJ/mol, one
/// ΔS° = −40 J/(mol K), σ(ln K) = 0.03, with fixed made-up errors of that size.
pub fn two_series() -> (Vec<Measurement>, Vec<Measurement>) {
    const ERR: [f64; 20] = [
        0.021, -0.034, 0.008, 0.045, -0.012, -0.027, 0.031, 0.002, -0.041, 0.017, 0.025, -0.006,
        -0.019, 0.038, -0.029, 0.011, -0.003, 0.022, -0.036, 0.014,
    ];
    let make = |dh: f64, off: usize| -> Vec<Measurement> {
        (0..10)
            .map(|i| {
                let t = 283.15 + 45.0 * i as f64 / 9.0;
                let ln_k = -dh / (GAS_CONSTANT * t) + -40.0 / GAS_CONSTANT + ERR[off + i];
                Measurement::new(t, ln_k).with_sigma(0.03)
            })
            .collect()
    };
    (make(-30e3, 0), make(-42e3, 10))
}

fn joint(a: &[Measurement], b: &[Measurement], convention: SigmaConvention) -> GlobalFit {
    let series = [SeriesInput::new("A", a), SeriesInput::new("B", b)];
    let sharing = SharingMap::per_series().with("delta_s", Sharing::Shared);
    let o = FitOptions {
        convention,
        ..FitOptions::default()
    };
    fit_global(&series, &sharing, &o).unwrap()
}

fn opts(draws: usize, seed: u64) -> IntervalOptions {
    IntervalOptions {
        draws,
        seed,
        ..Default::default()
    }
}

/// The Monte Carlo error of a sample SD of M draws: SD(s) ≈ σ √((κ − 1)/(4M)) with κ the
/// kurtosis of the draws (large-sample theory; common practice): κ = 3 for normal draws,
/// 3 + 6/(ν − 4) for Student's t with ν degrees of freedom. The SEs are compared within
/// four of these.
fn within_mc_error(sd: f64, want: f64, draws: usize, kurtosis: f64) -> bool {
    (sd - want).abs() <= 4.0 * want * ((kurtosis - 1.0) / (4.0 * draws as f64)).sqrt()
}

#[test]
fn joint_monte_carlo_sds_converge_to_the_delta_method_ses() {
    let (a, b) = two_series();
    let series = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
    let draws = 40_000;
    // Known σ: every quantity is linear in ln K, so the draws are normal with the delta
    // method's SD exactly; only the Monte Carlo error separates them.
    let f = joint(&a, &b, SigmaConvention::Absolute);
    let run = joint_monte_carlo(&series, &f, &opts(draws, 5), &Progress::new()).unwrap();
    // Columns: ΔH° of A, ΔH° of B, ΔS° shared; then ΔH°(A) − ΔH°(B).
    assert_eq!(
        run.targets,
        vec![
            JointTarget::Series {
                key: "delta_h",
                series: 0
            },
            JointTarget::Series {
                key: "delta_h",
                series: 1
            },
            JointTarget::Shared { key: "delta_s" },
            JointTarget::Difference {
                key: "delta_h",
                a: 0,
                b: 1
            },
        ]
    );
    for q in &run.run.quantities {
        let want = q.quantity.delta.se;
        assert!(
            within_mc_error(q.interval.se, want, draws, 3.0),
            "{}: MC {} vs delta {want}",
            q.quantity.key,
            q.interval.se
        );
        assert_eq!(q.interval.value, q.quantity.delta.value);
        assert_eq!(q.undefined, 0);
    }
    // The difference's delta SE is the joint covariance's (ΔH° of A and B are correlated
    // through the shared ΔS°), not the two SEs in quadrature.
    let diff = run
        .get(&JointTarget::Difference {
            key: "delta_h",
            a: 0,
            b: 1,
        })
        .unwrap();
    assert_eq!(
        diff.quantity.delta,
        f.difference("delta_h", 0, 1).unwrap().estimate
    );

    // σ as relative weights: the scale is drawn from its χ² law, so each draw is Student's
    // t with ν = 20 − 3 = 17 degrees of freedom about the fit, whose SD is the delta SE
    // times √(ν/(ν − 2)) (the t distribution's variance, from memory) and whose 2.5 % and
    // 97.5 % points are the delta method's t interval.
    let f = joint(&a, &b, SigmaConvention::ScaledByFit);
    assert_eq!(f.dof(), 17);
    let nu = 17.0_f64;
    let run = joint_monte_carlo(&series, &f, &opts(draws, 6), &Progress::new()).unwrap();
    for q in &run.run.quantities {
        let want = q.quantity.delta.se * (nu / (nu - 2.0)).sqrt();
        assert!(
            within_mc_error(q.interval.se, want, draws, 3.0 + 6.0 / (nu - 4.0)),
            "{}: MC {} vs {want}",
            q.quantity.key,
            q.interval.se
        );
        let half = q.quantity.delta.ci_high - q.quantity.delta.value;
        let (lo, hi) = (
            q.interval.value - q.interval.ci_low,
            q.interval.ci_high - q.interval.value,
        );
        // The ends of a 40 000-draw percentile interval at 2.5 %: within 3 % of the
        // t interval's half-width.
        assert!((lo / half - 1.0).abs() < 0.03, "{}", q.quantity.key);
        assert!((hi / half - 1.0).abs() < 0.03, "{}", q.quantity.key);
    }
}

#[test]
fn joint_runs_do_not_depend_on_the_number_of_threads() {
    let (a, b) = two_series();
    let series = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
    let f = joint(&a, &b, SigmaConvention::ScaledByFit);
    let o = opts(3_001, 977);
    let run_all = || -> Vec<JointRun> {
        vec![
            joint_monte_carlo(&series, &f, &o, &Progress::new()).unwrap(),
            joint_bootstrap(
                &series,
                &f,
                BootstrapScheme::Residuals,
                &o,
                &Progress::new(),
            )
            .unwrap(),
            joint_bootstrap(&series, &f, BootstrapScheme::Wild, &o, &Progress::new()).unwrap(),
        ]
    };
    let pool = |n| {
        rayon::ThreadPoolBuilder::new()
            .num_threads(n)
            .build()
            .unwrap()
    };
    let one = pool(1).install(run_all);
    let two = pool(2).install(run_all);
    assert_eq!(one, two);
    assert_eq!(one[0].run.seed, 977);
    assert_eq!(one[0].draws.count(), 3_001);
    // Another generator start value gives other draws.
    let other = joint_monte_carlo(&series, &f, &opts(3_001, 978), &Progress::new()).unwrap();
    assert_ne!(one[0].draws, other.draws);
    // The bootstrap has a BCa interval for every quantity (all linear, none undefined).
    assert!(one[1].run.quantities.iter().all(|q| q.bca.is_some()));
}

#[test]
fn one_series_alone_gives_the_single_series_run() {
    // A joint "fit" of one series with every parameter its own is the single fit; each draw
    // reads the same numbers in the same order, so the runs agree to rounding.
    let (a, _) = two_series();
    let o = FitOptions::default();
    let single = fit(&a, &o).unwrap();
    let g = fit_global(&[SeriesInput::new("A", &a)], &SharingMap::per_series(), &o).unwrap();
    let run = monte_carlo(&a, &single, None, &opts(2_000, 11)).unwrap();
    let jr = joint_monte_carlo(
        &[SeriesInput::new("A", &a)],
        &g,
        &opts(2_000, 11),
        &Progress::new(),
    )
    .unwrap();
    for (k, key) in ["delta_h", "delta_s"].iter().enumerate() {
        let s = run.get(key).unwrap().interval;
        let j = jr.run.quantities[k].interval;
        for (x, y) in [
            (s.value, j.value),
            (s.se, j.se),
            (s.ci_low, j.ci_low),
            (s.ci_high, j.ci_high),
        ] {
            assert!(
                (x - y).abs() <= 1e-9 * x.abs().max(1.0),
                "{key}: {x} vs {y}"
            );
        }
    }
}

#[test]
fn bad_joint_settings_are_refused() {
    let (a, b) = two_series();
    let series = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
    let f = joint(&a, &b, SigmaConvention::ScaledByFit);
    let p = Progress::new();
    assert_eq!(
        joint_monte_carlo(&series, &f, &opts(0, 1), &p).unwrap_err(),
        IntervalError::NoDraws
    );
    assert!(matches!(
        joint_bootstrap(&series, &f, BootstrapScheme::Residuals, &opts(0, 1), &p),
        Err(IntervalError::NoDraws)
    ));
    assert!(matches!(
        joint_bootstrap(&series, &f, BootstrapScheme::Cases, &opts(100, 1), &p),
        Err(IntervalError::NotForJointFit(_))
    ));
    // Other series than the fit's.
    assert!(matches!(
        joint_monte_carlo(&series[..1], &f, &opts(100, 1), &p),
        Err(IntervalError::PointsDoNotMatchFit { .. })
    ));
    // A cancelled run stops.
    let cancelled = Progress::new();
    cancelled.cancel();
    assert_eq!(
        joint_monte_carlo(&series, &f, &opts(1000, 1), &cancelled).unwrap_err(),
        IntervalError::Cancelled
    );
}

#[test]
fn joint_bootstrap_is_near_the_delta_method_on_well_behaved_data() {
    // Residuals with the leverage correction have about the variance of the errors, so the
    // SD of the bootstrap values is near the delta SE (which uses the same scatter); BCa is
    // defined and contains the estimate.
    let (a, b) = two_series();
    let series = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
    let f = joint(&a, &b, SigmaConvention::ScaledByFit);
    for scheme in [BootstrapScheme::Residuals, BootstrapScheme::Wild] {
        let run = joint_bootstrap(&series, &f, scheme, &opts(4_000, 3), &Progress::new()).unwrap();
        for q in &run.run.quantities {
            // Seen: 0.99-1.01 (residuals), 0.97-1.00 (wild); the Monte Carlo error of 4000
            // draws is about 1 %, so 10 % leaves room for the schemes' own bias only.
            let ratio = q.interval.se / q.quantity.delta.se;
            assert!(
                (ratio - 1.0).abs() < 0.10,
                "{scheme:?} {}: {ratio}",
                q.quantity.key
            );
            let bca = q.bca.expect("BCa defined");
            assert!(bca.ci_low < bca.value && bca.value < bca.ci_high);
        }
    }
}
