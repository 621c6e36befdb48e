//! One test for each engine bug found while checking the crate against outside sources
//! (the NIST accuracy, quantile and garbage-in fixes have their tests in `nist_strd.rs`,
//! `src/stats.rs` and `garbage_in.rs`).

use isochore_fit::two_point::{enthalpy_from_pairs, StatePoint};
use isochore_fit::{compare_models, fit, FitOptions, Measurement, Model, Weighting, GAS_CONSTANT};

fn line(temps: &[f64], wobble: &[f64]) -> Vec<Measurement> {
    temps
        .iter()
        .zip(wobble.iter().cycle())
        .map(|(&t, e)| {
            Measurement::new(t, -20e3 / (GAS_CONSTANT * t) + 30.0 / GAS_CONSTANT + e)
                .with_sigma(0.05)
        })
        .collect()
}

#[test]
fn excluded_point_without_sigma_uses_the_typical_weight() {
    // Was: an excluded point with no σ in a weighted fit was given weight 1, i.e.
    // σ(ln K) = 1, so its prediction residual was ~20× too small here.
    let mut pts = line(
        &[280.0, 290.0, 300.0, 310.0, 320.0],
        &[0.03, -0.04, 0.02, 0.05, -0.03],
    );
    pts.push(Measurement::new(305.0, pts[3].ln_k + 0.5).excluded());
    let f = fit(&pts, &FitOptions::default()).unwrap();
    let d = &f.points()[5];
    // Typical σ = 0.05 (n/Σw with every σ 0.05). statsmodels 0.15.0 WLS on the five
    // included points, prediction of a new observation with σ = 0.05 at 305 K:
    // se_obs = 0.0497741912553963, residual 0.672797402217014
    // (tests/data/independent/make_independent.py → independent.txt). With weight 1 the
    // prediction SD was about 20 times larger.
    let want_se = 0.0497741912553963;
    assert!(
        (d.prediction_se - want_se).abs() < 1e-9 * want_se,
        "{}",
        d.prediction_se
    );
    assert!(
        (d.residual - 0.672797402217014).abs() < 1e-9,
        "{}",
        d.residual
    );
    let pr = d.prediction_residual.unwrap();
    assert!((pr - 0.672797402217014 / want_se).abs() < 1e-7, "{pr}");
    assert!(d.flags.outlier);
}

#[test]
fn exact_data_keep_a_defined_correlation() {
    // Was: corr(ΔH°, ΔS°) = 0/0 = NaN when the data are exact (s² = 0; here K = 1 at
    // every temperature, so ln K = 0 and every residual is exactly zero).
    let pts: Vec<Measurement> = [280.0, 290.0, 300.0, 310.0]
        .iter()
        .map(|&t| Measurement::new(t, 0.0))
        .collect();
    let opts = FitOptions {
        weighting: Weighting::Unweighted,
        ..FitOptions::default()
    };
    let f = fit(&pts, &opts).unwrap();
    assert_eq!(f.stats().chi2, 0.0);
    // The correlation of the estimates depends on the design alone (s² cancels):
    // corr(ΔH°, ΔS°) = 0.99928060722411 from statsmodels 0.15.0 OLS covariance on these four
    // temperatures with any ln K (tests/data/independent/make_independent.py →
    // independent.txt).
    assert!(
        (f.corr_h_s() - 0.99928060722411).abs() < 1e-9,
        "{}",
        f.corr_h_s()
    );
}

#[test]
fn both_models_exact_is_no_evidence_of_curvature() {
    // Was: with χ²(linear) = χ²(ΔCp°) = 0 the F statistic was set to +∞ (p = 0), so flat
    // data were declared curved.
    let pts: Vec<Measurement> = [280.0, 290.0, 300.0, 310.0, 320.0]
        .iter()
        .map(|&t| Measurement::new(t, 0.0))
        .collect();
    let opts = FitOptions {
        weighting: Weighting::Unweighted,
        ..FitOptions::default()
    };
    let c = compare_models(&pts, &opts).unwrap().unwrap();
    assert_eq!(c.f_statistic, 0.0);
    assert_eq!(c.preferred, Model::LINEAR);
    assert!((c.f_p_value - 1.0).abs() < 1e-12);
}

#[test]
fn extreme_constants_in_the_two_point_enthalpy() {
    // Was: ln(K₂/K₁) overflowed to +∞ when the ratio exceeds f64, though both logarithms
    // are ordinary numbers.
    let a = StatePoint::exact(300.0, 1e-300);
    let b = StatePoint::exact(310.0, 1e300);
    let e = enthalpy_from_pairs(a, b, 0.95).unwrap();
    let want = GAS_CONSTANT * (1e300f64.ln() - 1e-300f64.ln()) / (1.0 / 300.0 - 1.0 / 310.0);
    assert!((e.delta_h.value - want).abs() < 1e-12 * want);
}

#[test]
fn undefined_statistics_are_said_in_words() {
    // Was: NaN in R² (flat data) or in the reduced χ² (no degree of freedom under absolute
    // σ) with nothing telling the chemist why.
    let flat: Vec<Measurement> = [280.0, 290.0, 300.0, 310.0]
        .iter()
        .map(|&t| Measurement::new(t, 0.0).with_sigma(0.1))
        .collect();
    let f = fit(&flat, &FitOptions::default()).unwrap();
    assert!(f.stats().r2.is_nan());
    assert!(f
        .warnings()
        .iter()
        .any(|w| w.kind == isochore_fit::WarningKind::Undefined && w.message.contains("R²")));
    let two = line(&[290.0, 310.0], &[0.0]);
    let opts = FitOptions {
        convention: isochore_fit::SigmaConvention::Absolute,
        ..FitOptions::default()
    };
    let f = fit(&two, &opts).unwrap();
    assert_eq!(f.dof(), 0);
    assert!(f.delta_h().se.is_finite());
    assert!(f
        .warnings()
        .iter()
        .any(|w| w.kind == isochore_fit::WarningKind::Undefined
            && w.message.contains("degree of freedom")));
}

/// A reference temperature outside the measured range is said in words (issue 11 item 4):
/// the values quoted at θ are extrapolations. Invented data at 60–90 °C.
#[test]
fn a_reference_temperature_outside_the_data_is_named() {
    use isochore_fit::{fit, FitOptions, Measurement, Model, WarningKind, GAS_CONSTANT};
    let pts: Vec<Measurement> = (0..7)
        .map(|i| {
            let t = 333.15 + 5.0 * i as f64;
            let wobble = 0.01 * [1.0, -1.0, 0.5, -0.5, 0.8, -0.2, 0.1][i];
            Measurement::new(t, 30e3 / (GAS_CONSTANT * t) - 40.0 / GAS_CONSTANT + wobble)
                .with_sigma(0.01)
        })
        .collect();
    for model in [Model::LINEAR, Model::CONSTANT_CP] {
        let says = |theta: f64| {
            let f = fit(
                &pts,
                &FitOptions {
                    model,
                    t_ref_k: theta,
                    ..FitOptions::default()
                },
            )
            .unwrap();
            f.warnings()
                .iter()
                .any(|w| w.kind == WarningKind::Extrapolation && w.message.contains("θ ="))
        };
        assert!(says(298.15), "{model:?}");
        assert!(!says(350.0), "{model:?}");
    }
}
