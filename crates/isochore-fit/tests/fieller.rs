//! Fieller's interval for the temperature at a target K, checked against a direct
//! computation: for the linear model, 1/T* = (ΔS° − R ln K_target)/ΔH° is a ratio of two
//! linear combinations of the estimates, and Fieller's interval (Fieller 1954, J. R. Stat.
//! Soc. B 16, 175) is the set of u = 1/T where (N − uD)² ≤ c²(V_NN − 2u V_ND + u² V_DD): the
//! roots of a quadratic in u. The library finds the same set by a search in T, for any
//! model. The data below are small invented sets (for testing only).

use crate::common::unweighted;
use isochore_fit::{fit, Measurement, Model, WarningKind, GAS_CONSTANT};

/// ln K on a straight line in 1/T (ΔH°, ΔS° given) with a fixed, sign-alternating scatter.
fn line(dh: f64, ds: f64, temps: &[f64], scatter: f64) -> Vec<Measurement> {
    temps
        .iter()
        .enumerate()
        .map(|(i, &t)| {
            let wobble = scatter * [0.9, -1.1, 0.4, -0.3, 1.2, -0.8, 0.1, -0.5][i % 8];
            Measurement::new(t, -dh / (GAS_CONSTANT * t) + ds / GAS_CONSTANT + wobble)
        })
        .collect()
}

/// The closed-form Fieller interval for the linear model, in kelvin: (low, high), or None
/// when the quadratic's leading coefficient is not positive (the set is unbounded).
fn fieller_linear(f: &isochore_fit::VantHoffFit, ln_k_target: f64) -> Option<(f64, f64)> {
    let beta = f.coefficients();
    let v = f.covariance();
    let c2 = f.critical_value() * f.critical_value();
    // u = 1/T = N/D, N = ΔS° − R y₀, D = ΔH°.
    let (n, d) = (beta[1] - GAS_CONSTANT * ln_k_target, beta[0]);
    let (vnn, vdd, vnd) = (v[1][1], v[0][0], v[0][1]);
    let a = d * d - c2 * vdd;
    let b = -2.0 * (n * d - c2 * vnd);
    let c = n * n - c2 * vnn;
    if a <= 0.0 {
        return None;
    }
    let disc = (b * b - 4.0 * a * c).sqrt();
    let (u1, u2) = ((-b - disc) / (2.0 * a), (-b + disc) / (2.0 * a));
    assert!(u1 > 0.0 && u2 > u1, "bounded positive interval expected");
    Some((1.0 / u2, 1.0 / u1))
}

#[test]
fn linear_model_matches_the_closed_form() {
    let temps: Vec<f64> = (0..11).map(|i| 280.0 + 5.0 * i as f64).collect();
    for (dh, ds, scatter, target) in [
        (40e3, 100.0, 0.01, 1.0),  // T* = 400 K, beyond the data
        (-30e3, -80.0, 0.02, 2.0), // exothermic
        (25e3, 70.0, 0.05, 0.5),   // wider
        (60e3, 190.0, 0.003, 1.0), // narrow, T* inside the data
    ] {
        let pts = line(dh, ds, &temps, scatter);
        let f = fit(&pts, &unweighted(Model::LINEAR)).unwrap();
        let t = f.temperature_for_k(target).unwrap();
        let (lo, hi) = fieller_linear(&f, target.ln()).expect("bounded");
        assert!((t.ci_low - lo).abs() < 1e-9 * lo, "{} vs {lo}", t.ci_low);
        assert!((t.ci_high - hi).abs() < 1e-9 * hi, "{} vs {hi}", t.ci_high);
        assert!(t.ci_low < t.value && t.value < t.ci_high);
    }
}

#[test]
fn narrow_intervals_agree_with_the_delta_method() {
    // As the scatter shrinks, Fieller's interval tends to T* ± c·SE (delta method): the
    // half-widths agree to first order, their difference falling like the scatter squared.
    let temps: Vec<f64> = (0..11).map(|i| 280.0 + 5.0 * i as f64).collect();
    let mut last = f64::INFINITY;
    for scatter in [1e-2, 1e-3, 1e-4] {
        let pts = line(40e3, 100.0, &temps, scatter);
        let f = fit(&pts, &unweighted(Model::LINEAR)).unwrap();
        let t = f.temperature_for_k(1.0).unwrap();
        let half = f.critical_value() * t.se;
        let up = (t.ci_high - t.value) / half - 1.0;
        let down = (t.value - t.ci_low) / half - 1.0;
        let worst = up.abs().max(down.abs());
        assert!(
            worst < last / 5.0 || worst < 1e-6,
            "scatter {scatter}: {worst}"
        );
        last = worst;
    }
    assert!(last < 1e-3, "{last}");
}

#[test]
fn no_bound_below_zero_kelvin_and_unbounded_is_said() {
    // A nearly flat van 't Hoff line (ΔH° small against its SE): K = 2 is reached at some
    // temperature, but the data cannot bound it. The interval has infinite ends, never a
    // finite bound at or below 0 K, and a warning says so when it is the K = 1 temperature.
    let temps: Vec<f64> = (0..8).map(|i| 290.0 + 5.0 * i as f64).collect();
    let mut unbounded_seen = 0;
    for model in [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW] {
        let pts = line(2e3, 6.0, &temps, 0.05);
        let f = fit(&pts, &unweighted(model)).unwrap();
        for target in [0.5, 1.0, 2.0] {
            if let Ok(t) = f.temperature_for_k(target) {
                assert!(t.value > 0.0);
                for b in [t.ci_low, t.ci_high] {
                    assert!(!b.is_finite() || b > 0.0, "{model:?} {target}: bound {b}");
                }
                assert!(t.ci_low <= t.value && t.value <= t.ci_high);
                unbounded_seen += usize::from(!(t.ci_low.is_finite() && t.ci_high.is_finite()));
            }
        }
        if let Some(t) = f.t_at_k1() {
            let unbounded = !(t.ci_low.is_finite() && t.ci_high.is_finite());
            let said = f
                .warnings()
                .iter()
                .any(|w| w.kind == WarningKind::UnboundedInterval);
            assert_eq!(unbounded, said, "{model:?}: {t:?}");
        }
    }
    // The case is built to be unbounded: it must be for at least the linear model's targets.
    assert!(unbounded_seen >= 3, "{unbounded_seen}");
}
