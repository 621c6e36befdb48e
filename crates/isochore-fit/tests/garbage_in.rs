//! Garbage in: every public entry point is fed NaN, infinities, non-positive temperatures,
//! zero or negative σ, empty and one-point inputs, huge and tiny magnitudes and impossible
//! confidence levels. Each call must return a typed error or finite results; nothing may
//! panic, and a fit that succeeds never carries NaN in an estimate.

use isochore_fit::two_point::{enthalpy_from_pairs, predict_k, StatePoint};
use isochore_fit::{
    compare_models, fit, Estimate, FitOptions, Measurement, Model, SigmaConvention, VantHoffFit,
    Weighting, GAS_CONSTANT,
};
use proptest::prelude::*;

const NASTY: [f64; 12] = [
    f64::NAN,
    f64::INFINITY,
    f64::NEG_INFINITY,
    -1.0,
    0.0,
    -0.0,
    f64::MIN_POSITIVE,
    5e-324,
    1e-300,
    1e300,
    f64::MAX,
    -f64::MAX,
];

const LEVELS: [f64; 8] = [
    0.0,
    1.0,
    f64::NAN,
    -0.5,
    1.5,
    f64::INFINITY,
    1e-300,
    0.999_999_999,
];

fn good_points() -> Vec<Measurement> {
    [278.15, 288.15, 298.15, 308.15, 318.15, 328.15]
        .iter()
        .enumerate()
        .map(|(i, &t)| {
            let wobble = [0.01, -0.02, 0.015, 0.0, -0.01, 0.02][i];
            Measurement::new(t, -30e3 / (GAS_CONSTANT * t) + 10.0 / GAS_CONSTANT + wobble)
                .with_sigma(0.02 + 0.01 * i as f64)
        })
        .collect()
}

fn finite(e: &Estimate) -> bool {
    e.value.is_finite() && e.se.is_finite() && e.ci_low.is_finite() && e.ci_high.is_finite()
}

/// What a successful fit must satisfy.
fn check_fit(f: &VantHoffFit) {
    for p in f.params() {
        assert!(finite(&p.estimate), "{p:?}");
    }
    for row in f.covariance() {
        assert!(row.iter().all(|v| v.is_finite()), "{:?}", f.covariance());
    }
    for t in [&f.at_reference(), &f.at_harmonic()] {
        assert!(
            finite(&t.delta_h) && finite(&t.delta_s) && finite(&t.delta_g),
            "{t:?}"
        );
    }
    assert!(f.stats().chi2.is_finite() && f.stats().chi2 >= 0.0);
    assert!(f.stats().log_likelihood.is_finite() && f.stats().bic.is_finite());
    for d in f.points() {
        assert!(d.fitted.is_finite() && d.residual.is_finite() && d.leverage.is_finite());
        for v in [
            d.student_int,
            d.student_ext,
            d.cooks_d,
            d.dffits,
            d.prediction_residual,
        ]
        .into_iter()
        .flatten()
        {
            assert!(v.is_finite(), "{d:?}");
        }
    }
    if let Some(c) = &f.comparison() {
        assert!(
            !c.f_statistic.is_nan() && (0.0..=1.0).contains(&c.f_p_value),
            "{c:?}"
        );
    }
    // Everything derived from a valid fit, at any input.
    for t in NASTY.iter().chain(&[1.0, 298.15, 1e4]) {
        if let Ok(p) = f.predict(*t) {
            assert!(p.ln_k.value.is_finite() && p.k.value.is_finite() && p.k.se.is_finite());
            assert!(p.ln_k.pi.low.is_finite() && p.k.pi.high.is_finite());
        }
        if let Ok(e) = f.temperature_for_k(*t) {
            // Fieller's interval may be unbounded (an infinite end), never NaN, and a finite
            // end is above 0 K.
            assert!(
                e.value.is_finite() && e.value > 0.0 && e.se.is_finite(),
                "{e:?}"
            );
            for b in [e.ci_low, e.ci_high] {
                assert!(!b.is_nan() && (b.is_infinite() || b > 0.0), "{e:?}");
            }
            assert!(e.ci_low <= e.value && e.value <= e.ci_high, "{e:?}");
        }
    }
    for b in f.bands(&NASTY) {
        assert!(b.ln_k.is_finite() && b.ci_low.is_finite() && b.pi_high.is_finite());
    }
    for b in f.band_grid(50, f64::NAN) {
        assert!(b.ln_k.is_finite());
    }
    assert!(f.band_grid(0, -1.0).len() <= 2);
    for level in LEVELS.iter().chain(&[0.95]) {
        for n in [0, 1, 3, 100] {
            if let Ok(poly) = f.ellipse(*level, n) {
                assert!(poly.iter().flatten().all(|v| v.is_finite()));
            }
        }
    }
    assert!(f
        .ellipse(0.95, usize::MAX)
        .map_or(true, |p| p.len() <= 65_536));
}

fn all_options() -> Vec<FitOptions> {
    let mut out = Vec::new();
    for model in [Model::LINEAR, Model::CONSTANT_CP] {
        for weighting in [Weighting::InverseVariance, Weighting::Unweighted] {
            for convention in [SigmaConvention::ScaledByFit, SigmaConvention::Absolute] {
                out.push(FitOptions {
                    model,
                    weighting,
                    convention,
                    ..FitOptions::default()
                });
            }
        }
    }
    out
}

fn try_everything(points: &[Measurement]) {
    for o in all_options() {
        if let Ok(f) = fit(points, &o) {
            check_fit(&f);
        }
        if let Ok(Some(c)) = compare_models(points, &o) {
            assert!(!c.f_statistic.is_nan() && (0.0..=1.0).contains(&c.f_p_value));
        }
    }
}

#[test]
fn empty_and_one_point_are_refused() {
    for o in all_options() {
        assert!(fit(&[], &o).is_err());
        assert!(fit(&good_points()[..1], &o).is_err());
        assert!(matches!(compare_models(&[], &o), Ok(None)));
    }
}

#[test]
fn every_bad_value_in_every_field() {
    let base = good_points();
    for v in NASTY {
        for field in 0..3 {
            let mut pts = base.clone();
            match field {
                0 => pts[2].t_k = v,
                1 => pts[2].ln_k = v,
                _ => pts[2].sigma_ln_k = Some(v),
            }
            try_everything(&pts);
            // Non-finite values and non-positive T or σ are typed errors naming point 3.
            let bad = !v.is_finite() || (field != 1 && v <= 0.0);
            if bad {
                let e = fit(&pts, &FitOptions::default()).unwrap_err();
                assert!(e.to_string().starts_with("point 3:"), "{e}");
            }
        }
    }
}

#[test]
fn impossible_options_are_refused() {
    for level in LEVELS {
        let o = FitOptions {
            level,
            ..FitOptions::default()
        };
        let ok = level > 0.0 && level < 1.0;
        assert_eq!(fit(&good_points(), &o).is_ok(), ok, "level {level}");
    }
    for theta in NASTY {
        let o = FitOptions {
            model: Model::CONSTANT_CP,
            t_ref_k: theta,
            ..FitOptions::default()
        };
        if let Ok(f) = fit(&good_points(), &o) {
            check_fit(&f);
        }
    }
    let mut o = FitOptions::default();
    o.thresholds.leverage_factor = 0.0;
    assert!(fit(&good_points(), &o).is_err());
}

#[test]
fn huge_and_tiny_magnitudes() {
    for scale in [1e-300, 1e-30, 1e30, 1e300] {
        // Temperatures scaled: absurd but positive and finite.
        let pts: Vec<Measurement> = good_points()
            .iter()
            .map(|m| Measurement {
                t_k: m.t_k * scale,
                ..*m
            })
            .collect();
        try_everything(&pts);
        // ln K scaled.
        let pts: Vec<Measurement> = good_points()
            .iter()
            .map(|m| Measurement {
                ln_k: m.ln_k * scale,
                ..*m
            })
            .collect();
        try_everything(&pts);
        // σ scaled.
        let pts: Vec<Measurement> = good_points()
            .iter()
            .map(|m| m.with_sigma(m.sigma_ln_k.unwrap() * scale))
            .collect();
        try_everything(&pts);
    }
    // Exact data (χ² = 0 to rounding) and identical ln K everywhere.
    let flat: Vec<Measurement> = good_points()
        .iter()
        .map(|m| Measurement { ln_k: 1.0, ..*m })
        .collect();
    try_everything(&flat);
}

/// Relative closeness for the scaling checks below (rounding only: the scalings are powers
/// of ten applied to well-conditioned data).
fn rel_close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-9 * a.abs().max(b.abs()).max(f64::MIN_POSITIVE)
}

#[test]
fn valid_scaled_inputs_fit_and_scale_as_they_must() {
    // ln K and σ(ln K) multiplied by a power of ten are ordinary inputs: every option must
    // fit them, and the results must move as the algebra says (the estimates are linear in
    // ln K; a common factor on every σ cancels from the weights under the scaled-by-fit
    // convention and multiplies the SEs under the absolute one).
    for o in all_options() {
        let base = fit(&good_points(), &o).expect("the unscaled points fit");
        for scale in [1e-30, 1e-3, 1e3, 1e30] {
            let what = format!(
                "{:?}/{:?}/{:?} at scale {scale}",
                o.model, o.weighting, o.convention
            );
            let ln_k: Vec<Measurement> = good_points()
                .iter()
                .map(|m| Measurement {
                    ln_k: m.ln_k * scale,
                    sigma_ln_k: m.sigma_ln_k.map(|s| s * scale),
                    ..*m
                })
                .collect();
            let f = fit(&ln_k, &o).unwrap_or_else(|e| panic!("ln K and σ scaled, {what}: {e}"));
            check_fit(&f);
            for (a, b) in f.params().iter().zip(base.params()) {
                assert!(
                    rel_close(a.estimate.value, b.estimate.value * scale),
                    "{what}: {a:?} vs {b:?}"
                );
                assert!(
                    rel_close(a.estimate.se, b.estimate.se * scale),
                    "{what}: {a:?} vs {b:?}"
                );
            }
            let sigma: Vec<Measurement> = good_points()
                .iter()
                .map(|m| m.with_sigma(m.sigma_ln_k.unwrap() * scale))
                .collect();
            let f = fit(&sigma, &o).unwrap_or_else(|e| panic!("σ scaled, {what}: {e}"));
            check_fit(&f);
            let se_factor = match (o.weighting, o.convention) {
                (Weighting::InverseVariance, SigmaConvention::Absolute) => scale,
                _ => 1.0,
            };
            for (a, b) in f.params().iter().zip(base.params()) {
                assert!(
                    rel_close(a.estimate.value, b.estimate.value),
                    "{what}: {a:?} vs {b:?}"
                );
                assert!(
                    rel_close(a.estimate.se, b.estimate.se * se_factor),
                    "{what}: {a:?} vs {b:?}"
                );
            }
        }
    }
}

#[test]
fn degenerate_designs() {
    // All at one temperature, or two temperatures for the three-parameter model.
    let same: Vec<Measurement> = (0..5).map(|i| Measurement::new(300.0, i as f64)).collect();
    try_everything(&same);
    let two: Vec<Measurement> = (0..6)
        .map(|i| Measurement::new(if i % 2 == 0 { 290.0 } else { 310.0 }, i as f64 * 0.1))
        .collect();
    try_everything(&two);
    // Temperatures equal to within rounding.
    let close: Vec<Measurement> = (0..5)
        .map(|i| Measurement::new(300.0 * (1.0 + i as f64 * f64::EPSILON), i as f64))
        .collect();
    try_everything(&close);
    // Everything excluded.
    let none: Vec<Measurement> = good_points().iter().map(|m| m.excluded()).collect();
    for o in all_options() {
        assert!(fit(&none, &o).is_err());
    }
}

#[test]
fn two_point_garbage() {
    let good = StatePoint {
        t_k: 298.15,
        sigma_t_k: 0.1,
        k: 0.15,
        sigma_ln_k: 0.01,
    };
    let mut inputs = vec![good];
    for v in NASTY {
        inputs.push(StatePoint { t_k: v, ..good });
        inputs.push(StatePoint { k: v, ..good });
        inputs.push(StatePoint {
            sigma_t_k: v,
            ..good
        });
        inputs.push(StatePoint {
            sigma_ln_k: v,
            ..good
        });
    }
    let check = |e: &Estimate| assert!(finite(e), "{e:?}");
    for a in &inputs {
        for v in NASTY.iter().chain(&[350.0, 0.95]) {
            for level in LEVELS.iter().chain(&[0.95]) {
                if let Ok(r) = predict_k(*a, *v, 0.0, 57.2e3, 1e3, *level) {
                    check(&r.ln_k2);
                    check(&r.k2);
                }
                if let Ok(r) = predict_k(*a, 350.0, 0.1, *v, *v, *level) {
                    check(&r.ln_k2);
                    check(&r.k2);
                }
            }
        }
        for b in &inputs {
            for level in [0.95, f64::NAN, 1.0] {
                if let Ok(r) = enthalpy_from_pairs(*a, *b, level) {
                    check(&r.delta_h);
                    check(&r.delta_s);
                }
            }
        }
    }
    // Equal temperatures are a typed error, not a division by zero.
    assert!(enthalpy_from_pairs(good, StatePoint { k: 2.0, ..good }, 0.95).is_err());
}

/// 64 cases, or `PROPTEST_CASES` when set (for longer local runs).
fn cases() -> u32 {
    std::env::var("PROPTEST_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(64)
}

/// Any f64 at all, including NaN, infinities and subnormals.
fn any_value() -> impl Strategy<Value = f64> {
    prop_oneof![
        any::<f64>(),
        prop::sample::select(NASTY.to_vec()),
        250.0..400.0f64,
        -50.0..50.0f64,
        1e-3..1.0f64,
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: cases(), ..ProptestConfig::default() })]

    #[test]
    fn random_garbage_never_panics(
        rows in prop::collection::vec((any_value(), any_value(), any_value(), any::<bool>()), 0..9)
    ) {
        let pts: Vec<Measurement> = rows
            .iter()
            .map(|&(t, y, s, inc)| Measurement { t_k: t, ln_k: y, sigma_ln_k: Some(s), included: inc || t > 300.0 })
            .collect();
        try_everything(&pts);
    }
}
