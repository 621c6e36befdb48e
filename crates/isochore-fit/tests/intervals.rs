//! Monte Carlo and bootstrap intervals (issue 13): Monte Carlo against the delta method on a
//! nearly linear problem, the same results whatever the number of threads, the bootstrap
//! near the delta method on well-behaved data, and bad settings refused.

use isochore_fit::intervals::{
    bootstrap, monte_carlo, BootstrapScheme, IntervalError, IntervalOptions, IntervalRun, MAX_DRAWS,
};
use isochore_fit::{
    fit, FitOptions, Measurement, Model, SigmaConvention, VantHoffFit, GAS_CONSTANT,
};

/// 20 points, 5–60 °C, of an invented binding: ΔH°(θ) = −40 kJ/mol, ΔS° = −60 J/(mol K)
/// (and ΔCp° = −500 J/(mol K) for the ΔCp° model), σ(ln K) = 0.03, with fixed made-up
/// errors of that size.
pub fn twenty(model: Model) -> Vec<Measurement> {
    // A fixed list of ±0.03-sized numbers (invented).
    const ERR: [f64; 20] = [
        0.021, -0.034, 0.008, 0.045, -0.012, -0.027, 0.031, 0.002, -0.041, 0.017, 0.025, -0.006,
        -0.019, 0.038, -0.029, 0.011, -0.003, 0.022, -0.036, 0.014,
    ];
    (0..20)
        .map(|i| {
            let t = 278.15 + 55.0 * i as f64 / 19.0;
            let x = model.row(t, 298.15);
            let beta = [-40e3, -60.0, -500.0];
            let ln_k: f64 = x.iter().zip(&beta).map(|(a, b)| a * b).sum::<f64>() + ERR[i];
            Measurement::new(t, ln_k).with_sigma(0.03)
        })
        .collect()
}

fn fitted(pts: &[Measurement], model: Model, convention: SigmaConvention) -> VantHoffFit {
    let o = FitOptions {
        model,
        convention,
        ..FitOptions::default()
    };
    fit(pts, &o).unwrap()
}

/// The SD of a sample SD of M normal draws is σ/√(2(M − 1)) (large-M normal theory; common
/// practice), which is the Monte Carlo error the SEs are compared within (4 of them).
fn within_mc_error(sd: f64, want: f64, draws: usize) -> bool {
    (sd - want).abs() <= 4.0 * want / (2.0 * (draws as f64 - 1.0)).sqrt()
}

#[test]
fn monte_carlo_converges_to_the_delta_method_when_sigma_are_known() {
    // Linear in β for every quantity but K, T at K = 1 and the ΔH° = 0 temperature, and
    // nearly linear for those at this precision: the delta method is exact for the first
    // and first-order for the others, so with known σ the SD of the draws tends to the
    // delta SE.
    let pts = twenty(Model::CONSTANT_CP);
    let f = fitted(&pts, Model::CONSTANT_CP, SigmaConvention::Absolute);
    let draws = 40_000;
    let run = monte_carlo(
        &pts,
        &f,
        None,
        &IntervalOptions {
            draws,
            ..Default::default()
        },
    )
    .unwrap();
    for q in &run.quantities {
        let want = q.quantity.delta.se;
        let key = q.quantity.key.as_str();
        if key.starts_with("t_") {
            // The temperatures at K = 1 (667 K here, far outside 5–60 °C) and where
            // ΔH° = 0 are ratios: the delta method is first-order for them, and the draws
            // show the curvature (4.18 against 4.12 K for T at K = 1). Within 5 %.
            assert!((q.interval.se / want - 1.0).abs() < 0.05, "{key}");
        } else {
            assert!(
                within_mc_error(q.interval.se, want, draws),
                "{key}: MC {} vs delta {want}",
                q.interval.se
            );
        }
        assert_eq!(q.undefined, 0);
    }
    // The interval of a linear quantity: ±1.96 SE (normal), within the Monte Carlo error of
    // a 2.5 % quantile (√(p(1−p)/M)/φ(z) SEs ≈ 0.016 SE at M = 40 000; allow 0.06 SE).
    let dh = run.get("delta_h").unwrap();
    let e = dh.quantity.delta;
    assert!((dh.interval.ci_low - e.ci_low).abs() < 0.06 * e.se);
    assert!((dh.interval.ci_high - e.ci_high).abs() < 0.06 * e.se);
    assert!(run.warnings.is_empty(), "{:?}", run.warnings);
}

#[test]
fn monte_carlo_under_relative_weights_has_student_t_draws() {
    // Scale drawn as s√(ν/χ²_ν): a linear quantity's draws are s·SE-scaled Student t with
    // ν = n − p, whose SD is SE·√(ν/(ν − 2)) and whose 2.5 % and 97.5 % points are the
    // delta method's t interval.
    let pts = twenty(Model::LINEAR);
    let f = fitted(&pts, Model::LINEAR, SigmaConvention::ScaledByFit);
    let draws = 40_000;
    let run = monte_carlo(
        &pts,
        &f,
        None,
        &IntervalOptions {
            draws,
            ..Default::default()
        },
    )
    .unwrap();
    let nu = f.dof() as f64;
    for key in [
        "delta_h",
        "delta_s",
        "delta_g_at_reference",
        "delta_g_at_t_hm",
    ] {
        let q = run.get(key).unwrap();
        let e = q.quantity.delta;
        let want = e.se * (nu / (nu - 2.0)).sqrt();
        // The SD of a t sample converges more slowly than a normal's; allow 6 normal-theory
        // errors.
        assert!(
            (q.interval.se - want).abs() <= 6.0 * want / (2.0 * (draws as f64 - 1.0)).sqrt(),
            "{key}: {} vs {want}",
            q.interval.se
        );
        assert!((q.interval.ci_low - e.ci_low).abs() < 0.08 * e.se, "{key}");
        assert!(
            (q.interval.ci_high - e.ci_high).abs() < 0.08 * e.se,
            "{key}"
        );
    }
    assert!(run
        .warnings
        .iter()
        .any(|w| w.contains("relative weights only")));
}

#[test]
fn the_bootstrap_agrees_with_the_delta_method_on_well_behaved_data() {
    let pts = twenty(Model::LINEAR);
    let f = fitted(&pts, Model::LINEAR, SigmaConvention::ScaledByFit);
    for scheme in [
        BootstrapScheme::Residuals,
        BootstrapScheme::Wild,
        BootstrapScheme::Cases,
    ] {
        let run = bootstrap(&pts, &f, scheme, &IntervalOptions::default()).unwrap();
        for key in ["delta_h", "delta_s"] {
            let q = run.get(key).unwrap();
            let se = q.quantity.delta.se;
            // The bootstrap SE estimates √((n − p)/n)·(the SE from s²) or so for residuals,
            // and the wild and case SEs are noisier (a sandwich estimate) with 20 points:
            // within 35 % (common practice, not a reference value).
            assert!(
                (q.interval.se / se - 1.0).abs() < 0.35,
                "{scheme:?} {key}: {} vs {se}",
                q.interval.se
            );
            let bca = q.bca.expect("BCa defined");
            assert!(bca.ci_low < q.quantity.delta.value && q.quantity.delta.value < bca.ci_high);
        }
        if scheme == BootstrapScheme::Cases {
            // 20 points: no warning about a small n (below 20 there is one).
            assert!(!run.warnings.iter().any(|w| w.contains("only")));
        }
    }
    let few: Vec<Measurement> = pts[..8].to_vec();
    let f8 = fitted(&few, Model::LINEAR, SigmaConvention::ScaledByFit);
    let run = bootstrap(
        &few,
        &f8,
        BootstrapScheme::Cases,
        &IntervalOptions::default(),
    )
    .unwrap();
    assert!(run
        .warnings
        .iter()
        .any(|w| w.contains("case resampling with only 8 points")));
}

/// Compares two runs exactly, NaN included (through their JSON, where NaN is null).
fn same(a: &IntervalRun, b: &IntervalRun) -> bool {
    serde_json::to_string(a).unwrap() == serde_json::to_string(b).unwrap()
        && a.quantities.iter().zip(&b.quantities).all(|(x, y)| {
            x.interval.se.to_bits() == y.interval.se.to_bits()
                && x.interval.ci_low.to_bits() == y.interval.ci_low.to_bits()
                && x.interval.ci_high.to_bits() == y.interval.ci_high.to_bits()
        })
}

#[test]
fn results_do_not_depend_on_the_number_of_threads() {
    let pts = twenty(Model::CONSTANT_CP);
    let f = fitted(&pts, Model::CONSTANT_CP, SigmaConvention::ScaledByFit);
    let opts = IntervalOptions {
        draws: 3_001,
        seed: 977,
        ..Default::default()
    };
    let sigma_t = vec![0.1; pts.len()];
    let run_all = || -> Vec<IntervalRun> {
        vec![
            monte_carlo(&pts, &f, None, &opts).unwrap(),
            monte_carlo(&pts, &f, Some(&sigma_t), &opts).unwrap(),
            bootstrap(&pts, &f, BootstrapScheme::Residuals, &opts).unwrap(),
            bootstrap(&pts, &f, BootstrapScheme::Wild, &opts).unwrap(),
            bootstrap(&pts, &f, BootstrapScheme::Cases, &opts).unwrap(),
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
    let three = pool(3).install(run_all);
    for ((a, b), c) in one.iter().zip(&two).zip(&three) {
        assert!(same(a, b) && same(a, c), "{:?}", a.resampling);
        assert_eq!(a.seed, 977);
        assert_eq!(a.draws, 3_001);
    }
    // Another seed gives other draws.
    let other = monte_carlo(
        &pts,
        &f,
        None,
        &IntervalOptions {
            seed: 978,
            ..opts.clone()
        },
    )
    .unwrap();
    assert!(!same(&one[0], &other));
    // With σ(T) = 0.1 K the draws are centred on the fit with errors in T (its estimate is
    // the value, its SE beside the draws); under relative weights its SE need not exceed
    // the K-only fit's (the scale S/(n − p) shrinks as σ(T) takes up scatter), so the
    // SDs are not compared here (`intervals_errors_in_t.rs` compares them with known σ).
    let eiv = isochore_fit::errors_in_t::fit_errors_in_t(&pts, &sigma_t, &f.options()).unwrap();
    let h1 = one[1].get("delta_h").unwrap();
    assert_eq!(h1.interval.value, eiv.delta_h().value);
    assert_eq!(h1.quantity.delta, eiv.delta_h());
    assert_ne!(
        h1.interval.value,
        one[0].get("delta_h").unwrap().interval.value
    );
}

#[test]
fn bad_settings_are_refused_in_words() {
    let pts = twenty(Model::LINEAR);
    let f = fitted(&pts, Model::LINEAR, SigmaConvention::ScaledByFit);
    let zero = IntervalOptions {
        draws: 0,
        ..Default::default()
    };
    assert_eq!(
        monte_carlo(&pts, &f, None, &zero),
        Err(IntervalError::NoDraws)
    );
    let many = IntervalOptions {
        draws: MAX_DRAWS + 1,
        ..Default::default()
    };
    let e = bootstrap(&pts, &f, BootstrapScheme::Residuals, &many).unwrap_err();
    assert_eq!(e, IntervalError::TooManyDraws(MAX_DRAWS + 1));
    assert!(e.to_string().contains("at most 1000000"));
    // Three points for a two-parameter model: the bootstrap needs four.
    let three: Vec<Measurement> = pts[..3].to_vec();
    let f3 = fitted(&three, Model::LINEAR, SigmaConvention::ScaledByFit);
    let e = bootstrap(
        &three,
        &f3,
        BootstrapScheme::Wild,
        &IntervalOptions::default(),
    )
    .unwrap_err();
    assert_eq!(
        e,
        IntervalError::TooFewPointsForBootstrap {
            points: 3,
            needed: 4
        }
    );
    assert!(e.to_string().contains("at least 4 used points"));
    // Monte Carlo works with three.
    assert!(monte_carlo(&three, &f3, None, &IntervalOptions::default()).is_ok());
    let mut st = vec![0.1; pts.len()];
    st[4] = 0.0;
    let e = monte_carlo(&pts, &f, Some(&st), &IntervalOptions::default()).unwrap_err();
    assert_eq!(
        e,
        IntervalError::BadSigmaT {
            index: 4,
            value: 0.0
        }
    );
    assert!(e.to_string().starts_with("point 5"));
    assert!(matches!(
        monte_carlo(&pts[1..], &f, None, &IntervalOptions::default()),
        Err(IntervalError::PointsDoNotMatchFit { .. })
    ));
    let _ = GAS_CONSTANT;
}

#[test]
fn an_excluded_point_takes_no_part_in_the_draws() {
    // The draws of a fit with point 6 excluded equal those of the fit without it, bit for
    // bit: each draw draws for the used points only, in input order.
    let pts = twenty(Model::LINEAR);
    let mut with_excluded = pts.clone();
    with_excluded[5] = with_excluded[5].excluded();
    let without: Vec<Measurement> = pts
        .iter()
        .enumerate()
        .filter(|(i, _)| *i != 5)
        .map(|(_, p)| *p)
        .collect();
    let fa = fitted(&with_excluded, Model::LINEAR, SigmaConvention::ScaledByFit);
    let fb = fitted(&without, Model::LINEAR, SigmaConvention::ScaledByFit);
    let o = IntervalOptions {
        draws: 500,
        ..Default::default()
    };
    let a = monte_carlo(&with_excluded, &fa, None, &o).unwrap();
    let b = monte_carlo(&without, &fb, None, &o).unwrap();
    let ra = bootstrap(&with_excluded, &fa, BootstrapScheme::Residuals, &o).unwrap();
    let rb = bootstrap(&without, &fb, BootstrapScheme::Residuals, &o).unwrap();
    for (x, y) in [(&a, &b), (&ra, &rb)] {
        for key in ["delta_h", "delta_s"] {
            let (p, q) = (x.get(key).unwrap(), y.get(key).unwrap());
            // The fits agree to rounding (the engines may differ in the last bits).
            assert!(
                (p.interval.se - q.interval.se).abs() <= 1e-9 * q.interval.se,
                "{key}"
            );
            assert!(
                (p.interval.ci_low - q.interval.ci_low).abs() <= 1e-9 * q.interval.ci_low.abs()
            );
        }
    }
}

#[test]
fn exact_data_give_zero_width_without_panic() {
    // No scatter: s = 0, every draw is the estimate; BCa is undefined (no spread), the
    // percentile interval is the point.
    let pts: Vec<Measurement> = (0..6)
        .map(|i| {
            let t = 280.0 + 8.0 * i as f64;
            Measurement::new(t, 30e3 / (GAS_CONSTANT * t) - 20.0 / GAS_CONSTANT).with_sigma(0.05)
        })
        .collect();
    let f = fitted(&pts, Model::LINEAR, SigmaConvention::ScaledByFit);
    let o = IntervalOptions {
        draws: 200,
        ..Default::default()
    };
    for run in [
        monte_carlo(&pts, &f, None, &o).unwrap(),
        bootstrap(&pts, &f, BootstrapScheme::Wild, &o).unwrap(),
    ] {
        let h = run.get("delta_h").unwrap();
        assert!(h.interval.se.abs() <= 1e-6 * h.quantity.delta.value.abs());
        assert!(h.interval.ci_high - h.interval.ci_low <= 1e-6 * h.quantity.delta.value.abs());
    }
}

#[test]
fn a_watched_run_gives_the_same_intervals_keeps_its_draws_and_can_be_stopped() {
    use isochore_fit::intervals::{bootstrap_with, mean_sd, monte_carlo_with, Progress};
    let pts = twenty(Model::CONSTANT_CP);
    let f = fitted(&pts, Model::CONSTANT_CP, SigmaConvention::ScaledByFit);
    // Not a multiple of the block of draws, so the last block is a short one.
    let o = IntervalOptions {
        draws: 1000,
        seed: 11,
        ..IntervalOptions::default()
    };
    let progress = Progress::new();
    let mc = monte_carlo_with(&pts, &f, None, &o, &progress).unwrap();
    assert_eq!(mc.run, monte_carlo(&pts, &f, None, &o).unwrap());
    assert_eq!(progress.done(), 1000);
    assert_eq!(mc.draws.count(), 1000);
    // The SE of each quantity is the SD of its kept draws (the run's definition).
    for (k, q) in mc.run.quantities.iter().enumerate() {
        let mut v: Vec<f64> = mc
            .draws
            .of(k)
            .into_iter()
            .filter(|x| x.is_finite())
            .collect();
        v.sort_by(f64::total_cmp);
        let (_, sd) = mean_sd(&v);
        assert!(
            (sd - q.interval.se).abs() <= 1e-12 * sd.abs(),
            "{}",
            q.quantity.key
        );
    }
    let progress = Progress::new();
    let b = bootstrap_with(&pts, &f, BootstrapScheme::Wild, &o, &progress).unwrap();
    assert_eq!(
        b.run,
        bootstrap(&pts, &f, BootstrapScheme::Wild, &o).unwrap()
    );
    assert_eq!(progress.done(), 1000);
    // Asked to stop, a run says so and gives no intervals.
    let stopped = Progress::new();
    stopped.cancel();
    assert_eq!(
        monte_carlo_with(&pts, &f, None, &o, &stopped).unwrap_err(),
        IntervalError::Cancelled
    );
    assert_eq!(
        bootstrap_with(&pts, &f, BootstrapScheme::Residuals, &o, &stopped).unwrap_err(),
        IntervalError::Cancelled
    );
    assert_eq!(stopped.done(), 0);
}
