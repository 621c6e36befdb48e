//! Monte Carlo with σ(T) (issue 13): the draws are centred on the fit with errors in T and
//! refitted by it, so on a nearly linear problem with known σ the SD of the draws tends to
//! that fit's own standard errors — York's (York et al. 2004) for the linear model, the
//! orthogonal-distance fit's (its Jacobian; checked against scipy's ODR in
//! `errors_in_t.rs`) for the ΔCp° model — within the Monte Carlo error, and the values
//! quoted are its estimates, not the fit in K only's.

use isochore_fit::errors_in_t::fit_errors_in_t;
use isochore_fit::intervals::{monte_carlo, IntervalOptions, IntervalRun};
use isochore_fit::{fit, FitOptions, Measurement, Model, SigmaConvention};

use super::intervals::twenty;

/// The SD of a sample SD of M normal draws is σ/√(2(M − 1)) (large-M normal theory; common
/// practice): the Monte Carlo error the SDs are compared within (4 of them).
fn within_mc_error(sd: f64, want: f64, draws: usize) -> bool {
    (sd - want).abs() <= 4.0 * want / (2.0 * (draws as f64 - 1.0)).sqrt()
}

fn run(model: Model, sigma_t: f64, draws: usize) -> (IntervalRun, Vec<(f64, f64)>, Vec<f64>) {
    let pts: Vec<Measurement> = twenty(model);
    let o = FitOptions {
        model,
        convention: SigmaConvention::Absolute,
        ..FitOptions::default()
    };
    let k_only = fit(&pts, &o).unwrap();
    let st = vec![sigma_t; pts.len()];
    let eiv = fit_errors_in_t(&pts, &st, &o).unwrap();
    let r = monte_carlo(
        &pts,
        &k_only,
        Some(&st),
        &IntervalOptions {
            draws,
            seed: 2024,
            ..Default::default()
        },
    )
    .unwrap();
    let want = eiv
        .params()
        .iter()
        .map(|p| (p.estimate.value, p.estimate.se))
        .collect();
    let k_se = k_only.params().iter().map(|p| p.estimate.se).collect();
    (r, want, k_se)
}

#[test]
fn york_draws_have_york_standard_errors() {
    // σ(T) = 0.5 K moves ln K by (ΔH°/RT²)·σT ≈ 0.027 at 298 K, as much as σ(ln K) = 0.03:
    // York's SEs are well above the K-only fit's, so the test tells the two apart.
    let draws = 20_000;
    let (r, want, k_se) = run(Model::LINEAR, 0.5, draws);
    for (j, key) in ["delta_h", "delta_s"].iter().enumerate() {
        let q = r.get(key).unwrap();
        let (value, se) = want[j];
        assert_eq!(q.interval.value, value, "{key}: centred on York's estimate");
        assert_eq!(q.quantity.delta.se, se, "{key}: York's SE beside the draws");
        eprintln!(
            "York {key}: SD of draws {} SE {se} K-only SE {}",
            q.interval.se, k_se[j]
        );
        assert!(se > 1.2 * k_se[j], "{key}: {se} vs K-only {}", k_se[j]);
        assert!(
            within_mc_error(q.interval.se, se, draws),
            "{key}: SD of draws {} against York's SE {se}",
            q.interval.se
        );
        // The draws' mean is near the estimate (a few SE/√M).
        assert!(
            (q.mean - value).abs() < 5.0 * se / (draws as f64).sqrt(),
            "{key}"
        );
    }
    assert!(
        r.warnings.iter().any(|w| w.contains("York")),
        "{:?}",
        r.warnings
    );
}

#[test]
fn orthogonal_distance_draws_have_its_standard_errors() {
    let draws = 4_000;
    let (r, want, _) = run(Model::CONSTANT_CP, 0.5, draws);
    for (j, key) in ["delta_h", "delta_s", "delta_cp"].iter().enumerate() {
        let q = r.get(key).unwrap();
        let (value, se) = want[j];
        assert_eq!(q.interval.value, value, "{key}");
        eprintln!("ODR {key}: SD of draws {} SE {se}", q.interval.se);
        assert!(
            within_mc_error(q.interval.se, se, draws),
            "{key}: SD of draws {} against the orthogonal-distance SE {se}",
            q.interval.se
        );
    }
    assert!(
        r.warnings.iter().any(|w| w.contains("orthogonal-distance")),
        "{:?}",
        r.warnings
    );
}
