//! Property tests (proptest, 64 cases each): exact data give back their parameters; one
//! constant factor on every weight changes nothing that should not change; the order of
//! the rows changes nothing; every unit conversion round-trips.

use isochore_fit::{
    fit, ConcentrationUnit, EnergyUnit, FitOptions, Measurement, Model, QuantityKind,
    SigmaConvention, TemperatureUnit, VantHoffFit, Weighting,
};
use proptest::prelude::*;

const THETA: f64 = 298.15;

fn config() -> ProptestConfig {
    ProptestConfig {
        // 64 cases, or `PROPTEST_CASES` when set (for longer local runs).
        cases: std::env::var("PROPTEST_CASES")
            .ok()
            .and_then(|v| v.parse().ok())
            .unwrap_or(64),
        ..ProptestConfig::default()
    }
}

/// 5–20 temperatures spread over at least 30 K between 263 and 393 K (sorted gaps ≥ 0.5 K),
/// with σ(ln K) between 0.005 and 0.2.
fn design() -> impl Strategy<Value = Vec<(f64, f64)>> {
    (263.0..330.0f64, 30.0..63.0f64, 5usize..=20)
        .prop_flat_map(|(t0, span, n)| {
            (
                Just(t0),
                Just(span),
                prop::collection::vec((0.0..1.0f64, 0.005..0.2f64), n),
            )
        })
        .prop_map(|(t0, span, raw)| {
            let n = raw.len();
            raw.iter()
                .enumerate()
                .map(|(i, &(jitter, s))| {
                    // Evenly spaced slots with a jitter inside each: distinct temperatures.
                    let slot = span / (n - 1) as f64;
                    let t = t0 + slot * i as f64 + 0.4 * slot * (jitter - 0.5);
                    (t, s)
                })
                .collect()
        })
}

fn noisy(design: &[(f64, f64)], beta: [f64; 3], noise: &[f64]) -> Vec<Measurement> {
    design
        .iter()
        .zip(noise.iter().cycle())
        .map(|(&(t, s), e)| {
            let x = Model::CONSTANT_CP.row(t, THETA);
            let y = x[0] * beta[0] + x[1] * beta[1] + x[2] * beta[2] + e * s;
            Measurement::new(t, y).with_sigma(s)
        })
        .collect()
}

fn opts(model: Model, convention: SigmaConvention) -> FitOptions {
    FitOptions {
        model,
        convention,
        t_ref_k: THETA,
        ..FitOptions::default()
    }
}

fn close(a: f64, b: f64, rel: f64, floor: f64) -> bool {
    (a - b).abs() <= rel * b.abs().max(floor)
}

/// Everything a fit reports about its parameters and points, compared.
fn same_fit(a: &VantHoffFit, b: &VantHoffFit, rel: f64) -> Result<(), TestCaseError> {
    for (x, y) in a.params().iter().zip(b.params()) {
        prop_assert!(
            close(x.estimate.value, y.estimate.value, rel, 1.0),
            "{x:?} vs {y:?}"
        );
        prop_assert!(
            close(x.estimate.se, y.estimate.se, rel, 1e-12),
            "{x:?} vs {y:?}"
        );
    }
    prop_assert!(close(a.stats().r2, b.stats().r2, rel, 1.0));
    prop_assert!(close(a.t_harmonic_k(), b.t_harmonic_k(), rel, 1.0));
    Ok(())
}

proptest! {
    #![proptest_config(config())]

    #[test]
    fn exact_data_return_their_parameters(
        d in design(),
        dh in -150e3..150e3f64,
        ds in -300.0..300.0f64,
        dcp in -3000.0..3000.0f64,
    ) {
        for model in [Model::LINEAR, Model::CONSTANT_CP] {
            if model == Model::CONSTANT_CP && d.len() < 4 {
                continue;
            }
            let cp = if model == Model::LINEAR { 0.0 } else { dcp };
            let pts = noisy(&d, [dh, ds, cp], &[0.0]);
            for weighting in [Weighting::InverseVariance, Weighting::Unweighted] {
                let f = fit(&pts, &FitOptions { weighting, ..opts(model, SigmaConvention::ScaledByFit) }).unwrap();
                let got = f.coefficients();
                // 1e-9 relative (a project requirement set in issue 2); floors of 1 J/mol, 1e-3 J/(mol K), 1e-2 J/(mol K)
                // for parameters drawn near zero.
                prop_assert!(close(got[0], dh, 1e-9, 1e3), "ΔH° {} vs {dh}", got[0]);
                prop_assert!(close(got[1], ds, 1e-9, 1.0), "ΔS° {} vs {ds}", got[1]);
                if model == Model::CONSTANT_CP {
                    prop_assert!(close(got[2], cp, 1e-9, 10.0), "ΔCp° {} vs {cp}", got[2]);
                }
            }
        }
    }

    #[test]
    fn one_factor_on_all_weights_changes_nothing(
        d in design(),
        noise in prop::collection::vec(-2.0..2.0f64, 7),
        log_factor in -6.0..6.0f64,
    ) {
        let factor = 10f64.powf(log_factor);
        let pts = noisy(&d, [-40e3, -50.0, -400.0], &noise);
        // σ → σ·c means every weight × 1/c².
        let scaled: Vec<Measurement> = pts
            .iter()
            .map(|m| m.with_sigma(m.sigma_ln_k.unwrap() * factor))
            .collect();
        for model in [Model::LINEAR, Model::CONSTANT_CP] {
            if d.len() < 5 {
                continue;
            }
            let a = fit(&pts, &opts(model, SigmaConvention::ScaledByFit)).unwrap();
            let b = fit(&scaled, &opts(model, SigmaConvention::ScaledByFit)).unwrap();
            same_fit(&a, &b, 1e-9)?;
            for (x, y) in a.points().iter().zip(b.points()) {
                prop_assert!(close(x.leverage, y.leverage, 1e-9, 1e-6));
                // s₍ᵢ₎² = (χ² − rᵢ²/(1 − hᵢ))/(n − p − 1) cancels when one point carries
                // nearly all of χ² with few degrees of freedom: the rounding of s₍ᵢ₎² grows
                // like t², so the bound does too (a point with t = 7190 at 5 points and 3
                // parameters differed by 5e-4 relative between the two scalings).
                let t = y.student_ext.unwrap_or(0.0);
                prop_assert!(close(x.student_ext.unwrap_or(0.0), t, 1e-6 + 1e-10 * t * t, 1e-6));
                // Cook's D carries 1/(1 − hᵢ)², which magnifies rounding in 1 − hᵢ;
                let amplify = (1.0 - x.leverage).powi(-2);
                // Tiny values are held to an absolute bound: a residual is only known to
                // ~ε·|ln K|.
                prop_assert!(close(x.cooks_d.unwrap_or(0.0), y.cooks_d.unwrap_or(0.0), 1e-9 * amplify, 1e-3));
            }
            // Under absolute σ the estimates stay, and the SEs scale with c.
            let a = fit(&pts, &opts(model, SigmaConvention::Absolute)).unwrap();
            let b = fit(&scaled, &opts(model, SigmaConvention::Absolute)).unwrap();
            for (x, y) in a.params().iter().zip(b.params()) {
                prop_assert!(close(y.estimate.value, x.estimate.value, 1e-9, 1.0));
                prop_assert!(close(y.estimate.se, x.estimate.se * factor, 1e-9, 1e-12));
            }
        }
    }

    #[test]
    fn row_order_changes_nothing(
        d in design(),
        noise in prop::collection::vec(-2.0..2.0f64, 5),
        perm_key in prop::collection::vec(any::<u32>(), 20),
        exclude in 0usize..20,
    ) {
        let mut pts = noisy(&d, [25e3, 80.0, -900.0], &noise);
        if pts.len() >= 6 {
            let k = exclude % pts.len();
            pts[k].included = false;
        }
        // A permutation: sort the indices by random keys.
        let mut order: Vec<usize> = (0..pts.len()).collect();
        order.sort_by_key(|&i| (perm_key[i], i));
        let shuffled: Vec<Measurement> = order.iter().map(|&i| pts[i]).collect();
        for model in [Model::LINEAR, Model::CONSTANT_CP] {
            let (Ok(a), Ok(b)) = (
                fit(&pts, &opts(model, SigmaConvention::ScaledByFit)),
                fit(&shuffled, &opts(model, SigmaConvention::ScaledByFit)),
            ) else {
                continue;
            };
            same_fit(&a, &b, 1e-9)?;
            prop_assert!(close(a.stats().chi2, b.stats().chi2, 1e-9, 1e-12));
            // Diagnostics move with their points.
            for (new_pos, &old) in order.iter().enumerate() {
                let x = &a.points()[old];
                let y = &b.points()[new_pos];
                prop_assert_eq!(y.index, new_pos);
                prop_assert_eq!(x.t_k, y.t_k);
                prop_assert!(close(x.fitted, y.fitted, 1e-10, 1.0));
                prop_assert!(close(x.leverage, y.leverage, 1e-9, 1e-6));
                prop_assert!(close(x.student_int.unwrap_or(0.0), y.student_int.unwrap_or(0.0), 1e-8, 1e-6));
                prop_assert!(close(x.prediction_residual.unwrap_or(0.0), y.prediction_residual.unwrap_or(0.0), 1e-8, 1e-6));
                prop_assert_eq!(x.flags, y.flags);
            }
        }
    }

    #[test]
    fn temperatures_round_trip(kelvin in 1e-3..1e5f64) {
        for unit in [TemperatureUnit::Kelvin, TemperatureUnit::Celsius, TemperatureUnit::Fahrenheit] {
            let v = unit.from_kelvin(kelvin);
            prop_assert!(close(unit.to_kelvin(v), kelvin, 1e-12, 1.0), "{unit:?}");
            // A difference of 1 degree on the scale is 1 K or 5/9 K.
            let d = unit.difference_to_kelvin(1.0);
            prop_assert!(close(unit.to_kelvin(v + 1.0) - unit.to_kelvin(v), d, 1e-9, 1.0));
        }
    }

    #[test]
    fn every_quantity_kind_round_trips(
        ln_k in -60.0..60.0f64,
        t in 200.0..500.0f64,
        sigma_ln_k in 1e-4..0.5f64,
    ) {
        let mut kinds = vec![QuantityKind::K, QuantityKind::LnK, QuantityKind::Log10K, QuantityKind::PK];
        for u in [
            ConcentrationUnit::Molar,
            ConcentrationUnit::Millimolar,
            ConcentrationUnit::Micromolar,
            ConcentrationUnit::Nanomolar,
            ConcentrationUnit::Picomolar,
        ] {
            kinds.push(QuantityKind::DissociationConstant(u));
        }
        for e in [EnergyUnit::JoulePerMole, EnergyUnit::KilojoulePerMole, EnergyUnit::KilocaloriePerMole] {
            kinds.push(QuantityKind::DeltaG(e));
        }
        for kind in kinds {
            let v = kind.from_ln_k(ln_k, t);
            let back = kind.to_ln_k(v, t).unwrap();
            prop_assert!(close(back, ln_k, 1e-12, 1.0), "{kind:?}: {back} vs {ln_k}");
            let s = kind.sigma_from_ln_k(v, sigma_ln_k, t);
            let s_back = kind.sigma_to_ln_k(v, s, t).unwrap();
            prop_assert!(close(s_back, sigma_ln_k, 1e-12, 0.0), "{kind:?} σ");
        }
    }

    #[test]
    fn energies_round_trip(j in -1e7..1e7f64) {
        for unit in [EnergyUnit::JoulePerMole, EnergyUnit::KilojoulePerMole, EnergyUnit::KilocaloriePerMole] {
            prop_assert!(close(unit.to_joules(unit.from_joules(j)), j, 1e-14, 1e-300));
        }
        // 1 kcal = 4.184 kJ (thermochemical calorie, exact by definition: NIST SP 811, 2008,
        // appendix B.8, section from memory); asserted exactly, so the International Table 4.1868 kJ fails.
        prop_assert!(close(EnergyUnit::KilocaloriePerMole.to_joules(1.0), 4184.0, 0.0, 1.0));
    }
}
