//! Numerically hostile inputs (issue 17): each test is a small input of its own that the
//! library used to fit or to refuse with the wrong cause. Distinct temperatures decide
//! identifiability, implausible temperatures and θ need confirmation, σ whose weight cannot
//! be formed is named as such, a level too close to 1 is named, the extrapolation test is
//! relative, and an ill-conditioned design is not blamed on a point's temperature.

use isochore_fit::{
    count_distinct_temperatures, fit, Error, FitOptions, Measurement, Model, SigmaConvention,
    Weighting, MAX_LEVEL, TEMPERATURE_RESOLUTION_K,
};

/// ln K of ΔH° = −40 kJ/mol, ΔS° = −60 J/(mol K), ΔCp° = cp about θ = 298.15 K (the model's
/// own formula is the definition of the data here; only refusals are tested).
fn ln_k(t: f64, cp: f64) -> f64 {
    let theta = 298.15;
    let x = Model::CONSTANT_CP.row(t, theta);
    x[0] * -40e3 + x[1] * -60.0 + x[2] * cp
}

/// `per` rows at each temperature, with a tiny alternating wobble in ln K (rounding-size
/// noise) and σ = 0.01.
fn repeats(temps: &[f64], per: usize) -> Vec<Measurement> {
    let mut v = Vec::new();
    for &t in temps {
        for i in 0..per {
            let wobble = if i % 2 == 0 { 1e-13 } else { -1e-13 };
            v.push(Measurement::new(t, ln_k(t, -500.0) + wobble).with_sigma(0.01));
        }
    }
    v
}

fn cp() -> FitOptions {
    FitOptions {
        model: Model::CONSTANT_CP,
        ..FitOptions::default()
    }
}

#[test]
fn cp_model_on_two_temperatures_is_refused_whatever_the_number_of_repeats() {
    // Issue 17 item 5: 5,000 rows at each of two temperatures used to give ΔCp° with a tiny
    // SE from rounding noise, while 1,000 pairs were refused as singular.
    for per in [1_000, 5_000] {
        let pts = repeats(&[288.15, 308.15], per);
        for convention in [SigmaConvention::ScaledByFit, SigmaConvention::Absolute] {
            let o = FitOptions { convention, ..cp() };
            match fit(&pts, &o) {
                Err(Error::TooFewTemperatures {
                    distinct: 2,
                    parameters: 3,
                    needed,
                    ..
                }) => {
                    assert!(needed >= 3);
                    let msg = fit(&pts, &o).unwrap_err().to_string();
                    assert!(msg.contains("distinct temperature"), "{msg}");
                    assert!(msg.contains("0.001 K"), "the resolution is stated: {msg}");
                }
                other => panic!("{per} repeats, {convention:?}: {other:?}"),
            }
        }
    }
}

#[test]
fn an_error_estimate_needs_one_temperature_more_than_parameters() {
    // p = 3 distinct temperatures fit the ΔCp° model exactly through the group means: no
    // error estimate from the scatter (refused), while absolute σ gives one from σ.
    let pts = repeats(&[283.15, 298.15, 313.15], 4);
    assert!(matches!(
        fit(&pts, &cp()),
        Err(Error::TooFewTemperatures {
            distinct: 3,
            needed: 4,
            ..
        })
    ));
    let abs = FitOptions {
        convention: SigmaConvention::Absolute,
        ..cp()
    };
    assert!(fit(&pts, &abs).is_ok());
    // A fourth temperature settles it.
    let pts = repeats(&[283.15, 293.15, 303.15, 313.15], 4);
    let f = fit(&pts, &cp()).unwrap();
    assert!((f.delta_cp().unwrap().value + 500.0).abs() < 1e-3);
}

#[test]
fn temperatures_closer_than_the_resolution_count_as_one() {
    assert_eq!(TEMPERATURE_RESOLUTION_K, 1e-3);
    // 0.4 mK apart: one temperature; 2 mK apart: two.
    let t = [300.0, 300.0004, 300.0, 300.0002];
    assert_eq!(count_distinct_temperatures(t, 10), 1);
    assert_eq!(count_distinct_temperatures([300.0, 300.002], 10), 2);
    // Three temperatures for the linear model, one of them split by 1e-10 K: two distinct.
    let pts: Vec<Measurement> = [290.0, 300.0, 300.0000000001, 290.0]
        .iter()
        .map(|&t| Measurement::new(t, ln_k(t, 0.0)))
        .collect();
    let o = FitOptions {
        weighting: Weighting::Unweighted,
        ..FitOptions::default()
    };
    assert!(matches!(
        fit(&pts, &o),
        Err(Error::TooFewTemperatures { distinct: 2, .. })
    ));
}

#[test]
fn implausible_temperatures_are_refused_unless_confirmed() {
    // Issue 17 item 7: temperatures from 1e-10 to 1e20 K used to be fitted.
    let temps = [1e-10, 300.0, 310.0, 320.0, 1e20];
    let pts: Vec<Measurement> = temps
        .iter()
        .map(|&t| Measurement::new(t, 1.0 + 1e-3 * (t.ln())).with_sigma(0.1))
        .collect();
    let e = fit(&pts, &FitOptions::default()).unwrap_err();
    assert!(
        matches!(e, Error::ImplausibleTemperature { index: Some(0), kelvin } if kelvin == 1e-10),
        "{e:?}"
    );
    assert!(e.to_string().starts_with("point 1:"), "{e}");
    // The cause and the way out in words; no front end's flag (DEVELOPERS.md).
    assert!(e.to_string().contains("confirm such temperatures"), "{e}");
    assert!(!e.to_string().contains("--"), "{e}");
    // The point above the range is named too.
    let e = fit(&pts[1..], &FitOptions::default()).unwrap_err();
    assert!(
        matches!(e, Error::ImplausibleTemperature { index: Some(3), .. }),
        "{e:?}"
    );
    // An excluded implausible point is still a typing mistake to report.
    let mut ex = pts.clone();
    ex[0].included = false;
    assert!(matches!(
        fit(&ex, &FitOptions::default()),
        Err(Error::ImplausibleTemperature { index: Some(0), .. })
    ));
}

#[test]
fn reference_temperature_outside_the_range_names_theta() {
    let pts = repeats(&[283.15, 293.15, 303.15, 313.15], 1);
    for theta in [1e-300, 0.5, 2e4, 1e300, 1e308] {
        let o = FitOptions {
            t_ref_k: theta,
            ..cp()
        };
        let e = fit(&pts, &o).unwrap_err();
        assert!(
            matches!(e, Error::ImplausibleReferenceTemperature(t) if t == theta),
            "θ = {theta}: {e:?}"
        );
        let msg = e.to_string();
        assert!(msg.contains("θ"), "{msg}");
        assert!(!msg.contains("units") && !msg.contains("distinct"), "{msg}");
        assert!(!msg.contains("--"), "no command-line flag: {msg}");
        // At most 6 significant digits of the value.
        assert!(msg.len() < 300, "{msg}");
    }
    // Confirmed, an extreme θ is taken as asked (θ = 0.5 K is a finite computation).
    let o = FitOptions {
        t_ref_k: 0.5,
        allow_extreme_temperatures: true,
        ..cp()
    };
    assert!(!matches!(
        fit(&pts, &o),
        Err(Error::ImplausibleReferenceTemperature(_))
    ));
}

#[test]
fn sigma_whose_weight_cannot_be_formed_is_named_as_such() {
    // Issue 17 item 12: σ = 1e300 was "uncertainty 0 is not positive" and σ = 1e-300 "weight
    // is not a finite number".
    for (sigma, word) in [(1e300, "large"), (1e-300, "small")] {
        let mut pts = repeats(&[283.15, 293.15, 303.15, 313.15], 1);
        pts[2].sigma_ln_k = Some(sigma);
        let e = fit(&pts, &FitOptions::default()).unwrap_err();
        assert!(
            matches!(e, Error::SigmaOutOfRange { index: Some(2), value } if value == sigma),
            "{e:?}"
        );
        let msg = e.to_string();
        assert!(msg.starts_with("point 3:"), "{msg}");
        assert!(msg.contains(word), "{msg}");
        assert!(
            !msg.contains("not positive") && !msg.contains("not a finite"),
            "{msg}"
        );
    }
}

#[test]
fn a_level_too_close_to_one_is_named() {
    let pts = repeats(&[283.15, 293.15, 303.15, 313.15], 1);
    let o = FitOptions {
        level: 0.999_999_999_999_999_9,
        ..FitOptions::default()
    };
    let e = fit(&pts, &o).unwrap_err();
    assert!(matches!(e, Error::LevelTooCloseToOne(_)), "{e:?}");
    let msg = e.to_string();
    assert!(msg.contains("too close to 1"), "{msg}");
    assert!(!msg.contains("units"), "{msg}");
    // The largest level accepted still gives finite intervals with 2 degrees of freedom.
    let o = FitOptions {
        level: MAX_LEVEL,
        ..FitOptions::default()
    };
    let f = fit(&pts, &o).unwrap();
    assert!(f.delta_h().ci_high.is_finite());
}

#[test]
fn extrapolation_is_relative_to_the_range() {
    // Issue 17 item 9: with points from 1e-10 K, 1.18e-11 K was "not extrapolated" because
    // the test allowed an absolute 1e-9 K.
    let temps = [1e-10, 1.0, 300.0, 1e4];
    let pts: Vec<Measurement> = temps
        .iter()
        .enumerate()
        .map(|(i, &t)| Measurement::new(t, 0.01 * i as f64).with_sigma(0.1))
        .collect();
    let o = FitOptions {
        allow_extreme_temperatures: true,
        ..FitOptions::default()
    };
    let f = fit(&pts, &o).unwrap();
    assert_eq!(f.t_min_k(), 1e-10);
    assert!(f.is_extrapolation(1.18e-11));
    assert!(f.is_extrapolation(9.9e-11));
    assert!(!f.is_extrapolation(1e-10));
    assert!(!f.is_extrapolation(2.5e-10));
    // At ordinary temperatures a conversion's rounding is still inside.
    let pts = repeats(&[283.15, 293.15, 303.15, 313.15], 1);
    let f = fit(&pts, &FitOptions::default()).unwrap();
    assert!(!f.is_extrapolation(313.15 * (1.0 + 1e-15)));
    assert!(f.is_extrapolation(313.16));
    assert!(f.is_extrapolation(f64::NAN));
}

#[test]
fn an_ordinary_point_is_not_blamed_for_an_ill_conditioned_design() {
    // Issue 17 item 12: ordinary temperatures with θ confirmed far from the data used to get
    // "the model cannot be evaluated at 300 K (too far from any sensible temperature)".
    let pts = repeats(&[283.15, 293.15, 300.0, 303.15, 313.15], 1);
    for theta in [1e300, 1e200, 1e100, 1e-300, 1e-200] {
        let o = FitOptions {
            t_ref_k: theta,
            allow_extreme_temperatures: true,
            ..cp()
        };
        match fit(&pts, &o) {
            Err(e) => {
                let msg = e.to_string();
                assert!(!msg.contains("sensible temperature"), "{msg}");
                assert!(!msg.contains("far outside the plausible range"), "{msg}");
                assert!(
                    msg.contains("θ far from the data") || msg.contains("ill-conditioned"),
                    "θ = {theta}: {msg}"
                );
            }
            // A tiny θ makes the ΔCp° column large but still independent.
            Ok(f) => assert!(theta < 1.0 && f.delta_h().value.is_finite()),
        }
    }
}
