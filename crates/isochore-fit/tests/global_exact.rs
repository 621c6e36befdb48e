//! Exact properties of a joint fit (issue 12 checks) that need no reference value: the
//! harmonic-mean temperature is Σw/Σ(w/T), ΔH° and ΔG°(T_hm) are uncorrelated (Krug,
//! Hunter & Grieger 1976), a difference between series has the variance the joint
//! covariance gives it, the equality verdict agrees with its p-value, and series over
//! temperature ranges that do not overlap earn a warning in words.
//!
//! Test inputs: invented series (ln K to four decimals) with unequal σ(ln K).

use isochore_fit::global::{fit_global, test_equal_across_series};
use isochore_fit::{FitOptions, Measurement, Model, SeriesInput, Sharing, SharingMap};

const T_A: [f64; 6] = [278.15, 285.15, 293.15, 301.15, 310.15, 318.15];
const Y_A: [f64; 6] = [4.9012, 4.7433, 4.5839, 4.4051, 4.2418, 4.0843];
const S_A: [f64; 6] = [0.012, 0.020, 0.009, 0.015, 0.011, 0.025];
const T_B: [f64; 5] = [283.15, 291.15, 299.15, 307.15, 315.15];
const Y_B: [f64; 5] = [6.1205, 5.8714, 5.6390, 5.4122, 5.2001];
const S_B: [f64; 5] = [0.010, 0.018, 0.014, 0.009, 0.016];

fn series(t: &[f64], y: &[f64], s: &[f64]) -> Vec<Measurement> {
    t.iter()
        .zip(y)
        .zip(s)
        .map(|((&t, &y), &s)| Measurement::new(t, y).with_sigma(s))
        .collect()
}

fn options(model: Model) -> FitOptions {
    FitOptions {
        model,
        ..FitOptions::default()
    }
}

#[test]
fn harmonic_mean_temperature_is_the_weighted_formula() {
    let (a, b) = (series(&T_A, &Y_A, &S_A), series(&T_B, &Y_B, &S_B));
    let inputs = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
    let sharing = SharingMap::per_series().with("delta_cp", Sharing::Shared);
    let f = fit_global(&inputs, &sharing, &options(Model::CONSTANT_CP)).unwrap();
    for (s, (t, sig)) in [(&T_A[..], &S_A[..]), (&T_B[..], &S_B[..])]
        .into_iter()
        .enumerate()
    {
        // T_hm = Σw / Σ(w/T), w = 1/σ² (the definition, issue 12).
        let sw: f64 = sig.iter().map(|s| 1.0 / (s * s)).sum();
        let swt: f64 = t.iter().zip(sig).map(|(t, s)| 1.0 / (s * s * t)).sum();
        let want = sw / swt;
        let got = f.t_harmonic_k(s).unwrap();
        assert!((got - want).abs() <= 1e-12 * want, "{got} vs {want}");
    }
}

/// With ΔH° constant (the linear model) and every parameter per series, ΔG°(T_hm) of each
/// series is uncorrelated with its ΔH°: Cov = Var ΔH° − T_hm Cov(ΔH°, ΔS°) = 0 exactly.
#[test]
fn delta_h_and_delta_g_at_t_hm_are_uncorrelated() {
    let (a, b) = (series(&T_A, &Y_A, &S_A), series(&T_B, &Y_B, &S_B));
    let inputs = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
    let f = fit_global(&inputs, &SharingMap::per_series(), &options(Model::LINEAR)).unwrap();
    for s in 0..2 {
        let t_hm = f.t_harmonic_k(s).unwrap();
        let h = f.delta_h_at(s, t_hm).unwrap();
        let g = f.delta_g_at(s, t_hm).unwrap();
        let r = f.h_g_covariance_at(s, t_hm).unwrap() / (h.se * g.se);
        assert!(r.abs() < 1e-12, "series {s}: r = {r:e}");
        // And away from T_hm they are correlated (the property is not trivially zero).
        let r_far = f.h_g_covariance_at(s, t_hm + 40.0).unwrap()
            / (h.se * f.delta_g_at(s, t_hm + 40.0).unwrap().se);
        assert!(r_far.abs() > 0.1, "series {s}: r at T_hm + 40 K = {r_far}");
    }
}

#[test]
fn differences_take_their_variance_from_the_joint_covariance() {
    let (a, b) = (series(&T_A, &Y_A, &S_A), series(&T_B, &Y_B, &S_B));
    let inputs = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
    let sharing = SharingMap::per_series().with("delta_cp", Sharing::Shared);
    let f = fit_global(&inputs, &sharing, &options(Model::CONSTANT_CP)).unwrap();
    let d = f.difference("delta_h", 0, 1).unwrap();
    let (ha, hb) = (
        f.estimate("delta_h", 0).unwrap(),
        f.estimate("delta_h", 1).unwrap(),
    );
    assert!((d.estimate.value - (ha.value - hb.value)).abs() <= 1e-9 * ha.value.abs());
    // Columns: ΔH°_A 0, ΔH°_B 1 (parameter-major, series order).
    let c = f.covariance();
    let var = c[0][0] + c[1][1] - 2.0 * c[0][1];
    assert!((d.estimate.se - var.sqrt()).abs() <= 1e-12 * var.sqrt());
    let half = f.critical_value() * d.estimate.se;
    assert!((d.estimate.ci_high - d.estimate.value - half).abs() <= 1e-9 * half);
    // A shared parameter does not differ, exactly.
    let z = f.difference("delta_cp", 0, 1).unwrap();
    assert_eq!((z.estimate.value, z.estimate.se), (0.0, 0.0));
    // Every per-series parameter, each pair once; the shared one left out.
    let keys: Vec<&str> = f.differences().iter().map(|d| d.key).collect();
    assert_eq!(keys, ["delta_h", "delta_s"]);
    assert!(f.difference("delta_q", 0, 1).is_none());
    assert!(f.difference("delta_h", 0, 2).is_none());
}

#[test]
fn verdict_follows_the_p_value() {
    let (a, b) = (series(&T_A, &Y_A, &S_A), series(&T_B, &Y_B, &S_B));
    let inputs = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
    // The two series have clearly different ΔH° (about 15 and 21 kJ/mol from the end points).
    let t = test_equal_across_series(
        &inputs,
        &SharingMap::per_series(),
        &["delta_h"],
        &options(Model::LINEAR),
    )
    .unwrap();
    assert!(t.p_value() < 0.05);
    assert!(t.rejects_equality());
    assert!(t
        .verdict()
        .starts_with("ΔH° differs between the series (F = "));
    // The same series shifted in ln K only: ΔH° equal, ΔS° different.
    let b2: Vec<Measurement> = a
        .iter()
        .map(|m| Measurement::new(m.t_k, m.ln_k + 0.5).with_sigma(m.sigma_ln_k.unwrap()))
        .collect();
    let inputs = [SeriesInput::new("A", &a), SeriesInput::new("A+", &b2)];
    let t = test_equal_across_series(
        &inputs,
        &SharingMap::per_series(),
        &["delta_h"],
        &options(Model::LINEAR),
    )
    .unwrap();
    assert!(t.p_value() > 0.999, "identical slopes: p = {}", t.p_value());
    assert!(!t.rejects_equality());
    assert!(t.verdict().starts_with("no evidence that ΔH° differs"));
}

#[test]
fn disjoint_ranges_are_warned_and_overlapping_ones_are_not() {
    let a = series(&T_A, &Y_A, &S_A);
    let hot_t: Vec<f64> = T_B.iter().map(|t| t + 60.0).collect();
    let hot = series(&hot_t, &Y_B, &S_B);
    let b = series(&T_B, &Y_B, &S_B);
    let sharing = SharingMap::per_series().with("delta_h", Sharing::Shared);
    let far = fit_global(
        &[SeriesInput::new("cold", &a), SeriesInput::new("hot", &hot)],
        &sharing,
        &options(Model::LINEAR),
    )
    .unwrap();
    assert_eq!(far.warnings().len(), 1);
    assert!(far.warnings()[0].contains("do not overlap"));
    assert!(far.warnings()[0].contains("\"hot\""));
    let near = fit_global(
        &[SeriesInput::new("A", &a), SeriesInput::new("B", &b)],
        &sharing,
        &options(Model::LINEAR),
    )
    .unwrap();
    assert!(near.warnings().is_empty());
}
