//! The van 't Hoff ΔH° against calorimetric values (issue 12 checks): with ΔCp° in the
//! model the comparison is made at each calorimetric temperature, the difference and its SE
//! follow the propagation rule, the ratio's Fieller interval holds the ratio, and a value
//! outside the fitted temperatures is named in words as an extrapolation.
//!
//! Test inputs: an exact invented series (ΔH°(298.15 K) = 40 kJ/mol, ΔS° = 100 J/(mol·K),
//! ΔCp° = −1 kJ/(mol·K)) with a small alternating perturbation so that the fit has a scatter.

use isochore_fit::calorimetric::{compare_calorimetric, CalorimetricValue};
use isochore_fit::{fit, FitOptions, Measurement, Model, Weighting, GAS_CONSTANT};

const THETA: f64 = 298.15;

fn data() -> Vec<Measurement> {
    (0..10)
        .map(|i| {
            let t = 283.15 + 3.0 * i as f64;
            // Constant-ΔCp° van 't Hoff equation (the model's own form, README).
            let ln_k = -40e3 / (GAS_CONSTANT * t)
                + 100.0 / GAS_CONSTANT
                + -1000.0 * (THETA / t - 1.0 + (t / THETA).ln()) / GAS_CONSTANT
                + if i % 2 == 0 { 0.004 } else { -0.004 };
            Measurement::new(t, ln_k)
        })
        .collect()
}

#[test]
fn comparison_takes_delta_cp_into_account() {
    let f = fit(
        &data(),
        &FitOptions {
            model: Model::CONSTANT_CP,
            weighting: Weighting::Unweighted,
            ..FitOptions::default()
        },
    )
    .unwrap();
    // ΔH°(310.15 K) = 40 kJ/mol − 1 kJ/(mol K) × 12 K = 28 kJ/mol by construction; a
    // calorimeter that measures 28.0 ± 0.5 kJ/mol there agrees.
    let cal = [
        CalorimetricValue {
            t_k: 310.15,
            delta_h: 28e3,
            u: 500.0,
        },
        CalorimetricValue {
            t_k: 298.15,
            delta_h: 20e3,
            u: 500.0,
        },
        CalorimetricValue {
            t_k: 340.0,
            delta_h: -500.0,
            u: 500.0,
        },
    ];
    let c = compare_calorimetric(&f, &cal).unwrap();
    let vh = f.delta_h_at(310.15);
    assert!((c[0].van_t_hoff.value - vh.value).abs() < 1e-9);
    assert!(
        (vh.value - 28e3).abs() < 300.0,
        "ΔH°(310.15 K) = {}",
        vh.value
    );
    let se = (vh.se * vh.se + 500.0 * 500.0).sqrt();
    assert!((c[0].difference.se - se).abs() <= 1e-12 * se);
    assert!((c[0].z - (vh.value - 28e3) / se).abs() < 1e-12);
    assert!(c[0].p_value > 0.05, "{}", c[0].verdict);
    let (lo, hi) = c[0].ratio_ci.unwrap();
    assert!(lo < c[0].ratio && c[0].ratio < hi && lo < 1.0 && 1.0 < hi);
    assert!(!c[0].extrapolated);
    // 20 kJ/mol against 40 at θ: the enthalpies differ, and the ratio is near 2.
    assert!(c[1].p_value < 1e-6 && c[1].verdict.contains("the two enthalpies differ"));
    assert!((c[1].ratio - 2.0).abs() < 0.05);
    // 340 K lies beyond the fitted 283–310 K: said in words. ΔH_cal within one u of zero: no
    // bounded ratio interval.
    assert!(c[2].extrapolated);
    assert!(c[2].verdict.contains("extrapolation"));
    assert!(c[2].ratio_ci.is_none());
    for x in &c {
        assert!(x.verdict.contains("coupled equilibria"));
    }
    let bad = [CalorimetricValue {
        t_k: -1.0,
        delta_h: 1.0,
        u: 1.0,
    }];
    assert!(compare_calorimetric(&f, &bad).is_err());
    let bad = [CalorimetricValue {
        t_k: 300.0,
        delta_h: 1.0,
        u: -1.0,
    }];
    assert!(compare_calorimetric(&f, &bad).is_err());
}
