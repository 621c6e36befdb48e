//! The extension point: a fourth model defined in this file alone, implementing
//! [`ModelSpec`] and handed to the library through [`Model::new`], runs through the fit, the
//! per-point diagnostics, prediction, the comparison with the model it extends, and JSON —
//! with no change anywhere in the library.
//!
//! The toy model lets ΔH° vary as a cubic about θ, with a fixed scale τ = 10 K:
//! ```text
//! ΔH°(T)  = ΔH°(θ) + A ((T − θ)/τ)³
//! ΔCp°(T) = 3A (T − θ)²/τ³
//! ΔS°(T)  = ΔS°(θ) + (3A/τ³) [(T² − θ²)/2 − 2θ(T − θ) + θ² ln(T/θ)]
//! ```
//! and extends the linear model (its leading parameters are ΔH° and ΔS°). Its ln K row is the
//! trait's default, −ΔH° row/(RT) + ΔS° row/R.
//!
//! Every expected number comes from an independent computation:
//! `tests/data/independent/make_clarke_glew.py` (statsmodels 0.15.0, numpy 2.4.6, scipy 1.17.1)
//! fits the same data in the basis 1, 1/T, g(T) with the A column g(T) = (1/R) ∫_θ^T
//! ((u − θ)/τ)³/u² du taken by scipy's adaptive quadrature (not by the closed form above),
//! and checks itself against a 60-digit mpmath solve (1.3e-10). The data are the IAPWS water
//! pKw used throughout these tests, exact decimal inputs, so the tolerance is 1e-9 relative.

use crate::common::{check, iapws_water as water, reference_table};
use isochore_fit::models::{DELTA_H, DELTA_S};
use isochore_fit::{fit, FitOptions, Model, ModelSpec, ParamDimension, ParamInfo, Weighting};
use std::collections::HashMap;

fn reference() -> HashMap<String, Vec<f64>> {
    reference_table("independent/clarke_glew.txt")
}

/// The toy model's fixed temperature scale, K.
const TAU: f64 = 10.0;

/// ΔH°(T) = ΔH°(θ) + A((T − θ)/τ)³: a model the library has never heard of.
struct CubicEnthalpy;

/// The amplitude A of the cubic term, J/mol (ΔH°(θ ± τ) − ΔH°(θ) = ±A).
const CUBIC_AMPLITUDE: ParamInfo = ParamInfo {
    key: "cubic_amplitude",
    symbol: "A",
    dimension: ParamDimension::Energy,
    at_reference: false,
};

static PARAMS: [ParamInfo; 3] = [DELTA_H, DELTA_S, CUBIC_AMPLITUDE];

impl ModelSpec for CubicEnthalpy {
    fn key(&self) -> &'static str {
        "cubic_enthalpy_toy"
    }
    fn cli_name(&self) -> &'static str {
        "cubic-enthalpy-toy"
    }
    fn short_name(&self) -> &'static str {
        "cubic-ΔH° toy"
    }
    fn describe(&self) -> &'static str {
        "toy model: ΔH° varies as a cubic about θ"
    }
    fn equation(&self) -> &'static str {
        "ΔH°(T) = ΔH°(θ) + A·((T − θ)/10 K)³"
    }
    fn assumption(&self) -> &'static str {
        "ΔH° assumed cubic in T − θ"
    }
    fn params(&self) -> &'static [ParamInfo] {
        &PARAMS
    }
    fn extends(&self) -> Option<Model> {
        Some(Model::LINEAR)
    }
    fn delta_h_row(&self, t_k: f64, theta: f64, out: &mut [f64]) {
        out.copy_from_slice(&[1.0, 0.0, ((t_k - theta) / TAU).powi(3)]);
    }
    fn delta_s_row(&self, t_k: f64, theta: f64, out: &mut [f64]) {
        let d = t_k - theta;
        let s = 3.0 / TAU.powi(3)
            * (0.5 * (t_k * t_k - theta * theta) - 2.0 * theta * d
                + theta * theta * (t_k / theta).ln());
        out.copy_from_slice(&[0.0, 1.0, s]);
    }
    fn delta_cp_row(&self, t_k: f64, theta: f64, out: &mut [f64]) {
        out.copy_from_slice(&[0.0, 0.0, 3.0 * (t_k - theta).powi(2) / TAU.powi(3)]);
    }
}

/// The toy model's handle.
const TOY: Model = Model::new(&CubicEnthalpy);

fn options() -> FitOptions {
    FitOptions {
        model: TOY,
        weighting: Weighting::Unweighted,
        ..FitOptions::default()
    }
}

#[test]
fn toy_model_fits_like_statsmodels() {
    let r = reference();
    let f = fit(&water(), &options()).unwrap();
    assert_eq!(f.model(), TOY);
    let keys: Vec<&str> = f.params().iter().map(|p| p.key()).collect();
    assert_eq!(keys, ["delta_h", "delta_s", "cubic_amplitude"]);
    check("estimates", &f.coefficients(), &r["toy.params"]);
    let se: Vec<f64> = f.params().iter().map(|p| p.estimate.se).collect();
    check("SE", &se, &r["toy.se"]);
    check("χ²", &[f.stats().chi2], &r["toy.chi2"]);
    check(
        "AICc (k = p + 1)",
        &[f.stats().aicc.unwrap()],
        &r["toy.aicc"],
    );
    // ΔH°(T) away from θ through the model's own ΔH° row: statsmodels' −R b + A((T − θ)/τ)³
    // with the delta-method SE on its covariance.
    let h = f.delta_h_at(318.15);
    check("ΔH°(318.15 K)", &[h.value, h.se], &r["toy.dh_318.15"]);
}

#[test]
fn toy_model_per_point_diagnostics() {
    let r = reference();
    let f = fit(&water(), &options()).unwrap();
    let col = |g: fn(&isochore_fit::PointDiagnostics) -> Option<f64>| -> Vec<f64> {
        f.points().iter().map(|d| g(d).unwrap()).collect()
    };
    check("fitted", &col(|d| Some(d.fitted)), &r["toy.fitted"]);
    check("leverage", &col(|d| Some(d.leverage)), &r["toy.leverage"]);
    check(
        "externally studentized",
        &col(|d| d.student_ext),
        &r["toy.student_ext"],
    );
    check("Cook's distance", &col(|d| d.cooks_d), &r["toy.cooks_d"]);
    // Three parameters: the leverages sum to p (the trace of the hat matrix).
    let trace: f64 = f.points().iter().map(|d| d.leverage).sum();
    assert!((trace - 3.0).abs() < 1e-12, "{trace}");
}

#[test]
fn toy_model_predicts_with_intervals() {
    let r = reference();
    let f = fit(&water(), &options()).unwrap();
    let p = f.predict(310.15).unwrap();
    // statsmodels get_prediction at 310.15 K: mean, SE of the mean, 95 % confidence interval
    // and 95 % prediction interval for one new observation (t with n − 3 dof).
    let want = &r["toy.predict_310.15"];
    check(
        "ln K prediction",
        &[
            p.ln_k.value,
            p.ln_k.se,
            p.ln_k.ci.low,
            p.ln_k.ci.high,
            p.ln_k.pi.low,
            p.ln_k.pi.high,
        ],
        want,
    );
    // K and its intervals are the exponentials (the definition of the K scale).
    check(
        "K prediction",
        &[p.k.value, p.k.ci.low, p.k.ci.high, p.k.pi.low, p.k.pi.high],
        &[
            want[0].exp(),
            want[2].exp(),
            want[3].exp(),
            want[4].exp(),
            want[5].exp(),
        ],
    );
    assert!(!p.extrapolated);
    // Outside 0–60 °C the warning names the toy model's own assumption.
    let far = f.predict(350.0).unwrap();
    assert!(far.extrapolated);
    assert!(
        far.warning
            .as_deref()
            .unwrap()
            .contains("ΔH° assumed cubic in T − θ"),
        "{:?}",
        far.warning
    );
}

#[test]
fn toy_model_is_compared_with_the_model_it_extends() {
    let r = reference();
    let f = fit(&water(), &options()).unwrap();
    let c = f.comparison().expect("13 points allow the step");
    assert_eq!(c.steps.len(), 1, "the toy's ladder is linear → toy");
    let step = &c.steps[0];
    assert_eq!((step.smaller, step.larger), (Model::LINEAR, TOY));
    assert_eq!(step.added, vec!["cubic_amplitude"]);
    // statsmodels compare_f_test (F, p, df_num, df_denom) and ΔAICc with k = p + 1.
    let want = &r["toy.step.linear"];
    check("F", &[step.f_statistic], &want[..1]);
    check("p", &[step.f_p_value], &want[1..2]);
    assert_eq!(step.df_extra as f64, want[2]);
    assert_eq!(step.df_residual as f64, want[3]);
    check("ΔAICc", &[step.delta_aicc.unwrap()], &want[4..5]);
    // p = 1.3e-5 and ΔAICc = −21.3: the cubic term is supported, so the toy is preferred.
    assert!(step.supported && step.resolved, "{}", step.verdict);
    assert_eq!(c.preferred, TOY);
}

#[test]
fn toy_model_fit_serialises_to_json() {
    let r = reference();
    let f = fit(&water(), &options()).unwrap();
    let text = serde_json::to_string(&f).unwrap();
    let v: serde_json::Value = serde_json::from_str(&text).unwrap();
    // The model is written as its key, wherever it appears.
    assert_eq!(v["options"]["model"], "cubic_enthalpy_toy", "{text}");
    assert_eq!(v["comparison"]["preferred"], "cubic_enthalpy_toy");
    assert_eq!(v["comparison"]["steps"][0]["smaller"], "linear");
    // The parameters in the model's order, by key, with the statsmodels values.
    let params = v["params"].as_array().unwrap();
    let names: Vec<&str> = params.iter().map(|p| p["name"].as_str().unwrap()).collect();
    assert_eq!(names, ["delta_h", "delta_s", "cubic_amplitude"]);
    let values: Vec<f64> = params
        .iter()
        .map(|p| p["value"].as_f64().unwrap())
        .collect();
    check("JSON values", &values, &r["toy.params"]);
    let se: Vec<f64> = params.iter().map(|p| p["se"].as_f64().unwrap()).collect();
    check("JSON SEs", &se, &r["toy.se"]);
    // One diagnostics record per point.
    assert_eq!(v["points"].as_array().unwrap().len(), 13);
    // A model handle is read back only for the shipped models: the toy's key is refused with
    // an error naming the known ones, not a panic.
    let err = serde_json::from_str::<Model>("\"cubic_enthalpy_toy\"")
        .unwrap_err()
        .to_string();
    assert!(
        err.contains("unknown model") && err.contains("clarke_glew"),
        "{err}"
    );
}
