//! When σ are known standard uncertainties (absolute σ, weighted), the likelihood is χ²
//! itself: ln L = −χ²/2 − Σ ln(σᵢ√(2π)), the information criteria count only the p
//! coefficients, and a ladder step is the likelihood-ratio test Δχ² ~ χ²(q). Reference
//! values: scipy 1.17.1 / numpy 2.4.6, computed on 2026-12-02 as Σ scipy.stats.norm.logpdf
//! (y, ŷ, σ) with ŷ from numpy.linalg.lstsq on the √w-scaled design, AICc = −2 ln L + 2p +
//! 2p(p+1)/(n−p−1), BIC = −2 ln L + p ln n, and scipy.stats.chi2.sf(Δχ², 1). The data are
//! invented for this test: ΔH° = −45 kJ/mol, ΔS° = −60 J/(mol K), ΔCp° = −600 J/(mol K) at
//! θ = 298.15 K, plus a fixed scatter of about one σ.

use isochore_fit::{fit, FitOptions, Measurement, Model, SigmaConvention, StepTest};

const Y: [f64; 9] = [
    12.081645369378341,
    11.74528699480137,
    11.535955411406828,
    11.22369163407506,
    10.960454192934572,
    10.587126561870454,
    10.311523823176568,
    9.961398656972298,
    9.660446732556277,
];
const SIGMA: [f64; 9] = [0.02, 0.05, 0.03, 0.04, 0.02, 0.05, 0.03, 0.04, 0.02];

fn points() -> Vec<Measurement> {
    (0..9)
        .map(|i| Measurement::new(278.15 + 5.0 * i as f64, Y[i]).with_sigma(SIGMA[i]))
        .collect()
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs().max(1e-300)
}

#[test]
fn information_criteria_count_only_the_coefficients() {
    // (model, χ², ln L, AICc, BIC) from scipy (see the module comment).
    for (model, chi2, ll, aicc, bic) in [
        (
            Model::LINEAR,
            59.146772126255975,
            -6.665431854201257,
            19.330863708402514,
            17.725312863074954,
        ),
        (
            Model::CONSTANT_CP,
            4.195365426090302,
            20.81027149588158,
            -30.82054299176316,
            -35.0288692597545,
        ),
    ] {
        let f = fit(
            &points(),
            &FitOptions {
                model,
                convention: SigmaConvention::Absolute,
                ..FitOptions::default()
            },
        )
        .unwrap();
        let s = f.stats();
        assert_eq!(s.k, model.n_params());
        assert!(rel(s.chi2, chi2) < 1e-9, "{model:?} χ² {}", s.chi2);
        assert!(
            rel(s.log_likelihood, ll) < 1e-9,
            "{model:?} ln L {}",
            s.log_likelihood
        );
        assert!(
            rel(s.aicc.unwrap(), aicc) < 1e-9,
            "{model:?} AICc {:?}",
            s.aicc
        );
        assert!(rel(s.bic, bic) < 1e-9, "{model:?} BIC {}", s.bic);
        // The same data with σ scaled by the fit count the variance too (k = p + 1).
        let scaled = fit(
            &points(),
            &FitOptions {
                model,
                ..FitOptions::default()
            },
        )
        .unwrap();
        assert_eq!(scaled.stats().k, model.n_params() + 1);
        assert!(rel(scaled.stats().aicc.unwrap(), aicc) > 1e-3);
    }
}

#[test]
fn a_ladder_step_is_the_likelihood_ratio_test() {
    let f = fit(
        &points(),
        &FitOptions {
            convention: SigmaConvention::Absolute,
            ..FitOptions::default()
        },
    )
    .unwrap();
    let c = f.comparison().unwrap();
    let step = &c.steps[0];
    assert_eq!(step.test, StepTest::LikelihoodRatio);
    // Δχ² = χ²_linear − χ²_cp and its χ²(1) tail, scipy.
    assert!(
        rel(step.f_statistic, 54.95140670016567) < 1e-9,
        "{}",
        step.f_statistic
    );
    assert!(
        rel(step.f_p_value, 1.2354692678387126e-13) < 1e-6,
        "{}",
        step.f_p_value
    );
    // ΔAICc from the two scipy AICc values above.
    let want = -30.82054299176316 - 19.330863708402514;
    assert!(rel(step.delta_aicc.unwrap(), want) < 1e-9);
    assert!(
        step.supported && step.verdict.contains("Δχ² test"),
        "{}",
        step.verdict
    );
    // Scaled by the fit, the same step is the F-test.
    let scaled = fit(&points(), &FitOptions::default()).unwrap();
    assert_eq!(scaled.comparison().unwrap().steps[0].test, StepTest::FTest);
}
