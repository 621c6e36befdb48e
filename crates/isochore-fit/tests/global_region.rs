//! What the joint report's figures and calorimetric table ask of a joint fit: a joint fit
//! of one series with every parameter per series is the single fit (the README's
//! definition), so its fitted ln K, its ΔH°–ΔS° region at θ and its calorimetric comparison
//! must be the single fit's ([`VantHoffFit::ellipse`], the fitted values,
//! [`compare_calorimetric`]) — an independent path through the single-fit code. At the
//! series' harmonic-mean temperature the ΔH°–ΔG° region of the linear model is an ellipse
//! with axes along ΔH° and ΔG° (ΔH° and ΔG°(T_hm) uncorrelated; Krug, Hunter & Grieger
//! 1976).

use isochore_fit::calorimetric::{
    compare_calorimetric, compare_calorimetric_series, CalorimetricValue,
};
use isochore_fit::global::{fit_global, SeriesInput, SharingMap};
use isochore_fit::{fit, FitOptions, Measurement, Model, GAS_CONSTANT};

fn series() -> Vec<Measurement> {
    (0..9)
        .map(|i| {
            let t = 280.0 + 5.0 * i as f64;
            // Invented: ΔH° = −35 kJ/mol, ΔS° = −20 J/(mol K), ΔCp° = −0.6 kJ/(mol K)
            // about 298.15 K, with an alternating ±0.01 in ln K and σ = 0.02.
            let ln_k = -(-35e3) / (GAS_CONSTANT * t)
                + -20.0 / GAS_CONSTANT
                + -600.0 * (298.15 / t - 1.0 + (t / 298.15).ln()) / GAS_CONSTANT
                + if i % 2 == 0 { 0.01 } else { -0.01 };
            Measurement::new(t, ln_k).with_sigma(0.02)
        })
        .collect()
}

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * a.abs().max(b.abs()).max(1.0)
}

#[test]
fn one_series_joint_fit_draws_what_the_single_fit_draws() {
    for model in [Model::LINEAR, Model::CONSTANT_CP] {
        let pts = series();
        let opts = FitOptions {
            model,
            ..FitOptions::default()
        };
        let single = fit(&pts, &opts).unwrap();
        let joint = fit_global(
            &[SeriesInput::new("only", &pts)],
            &SharingMap::per_series(),
            &opts,
        )
        .unwrap();
        for p in single.points() {
            let e = joint.ln_k_at(0, p.t_k).unwrap();
            assert!(close(e.value, p.fitted, 1e-9), "{} {}", e.value, p.fitted);
        }
        let a = single.ellipse(0.95, 64).unwrap();
        let b = joint.h_s_region(0, opts.t_ref_k, 0.95, 64).unwrap();
        for (u, v) in a.iter().zip(&b) {
            assert!(
                close(u[0], v[0], 1e-7) && close(u[1], v[1], 1e-7),
                "{u:?} {v:?}"
            );
        }
        let cal = [
            CalorimetricValue {
                t_k: 298.15,
                delta_h: -34e3,
                u: 400.0,
            },
            // Outside the fitted 280–320 K: an extrapolation in both.
            CalorimetricValue {
                t_k: 340.0,
                delta_h: -60e3,
                u: 900.0,
            },
        ];
        let x = compare_calorimetric(&single, &cal).unwrap();
        let y = compare_calorimetric_series(&joint, 0, &cal).unwrap();
        for (x, y) in x.iter().zip(&y) {
            assert!(close(x.difference.value, y.difference.value, 1e-9));
            assert!(close(x.difference.se, y.difference.se, 1e-9));
            assert!(close(x.z, y.z, 1e-9));
            assert_eq!(x.extrapolated, y.extrapolated);
        }
        assert!(!y[0].extrapolated && y[1].extrapolated);
        assert!(compare_calorimetric_series(&joint, 1, &cal).is_err());
        assert!(joint.h_s_region(3, 298.15, 0.95, 64).is_err());
    }
}

#[test]
fn delta_h_and_delta_g_at_t_hm_have_an_upright_region() {
    let pts = series();
    let opts = FitOptions::default(); // the linear model
    let joint = fit_global(
        &[SeriesInput::new("only", &pts)],
        &SharingMap::per_series(),
        &opts,
    )
    .unwrap();
    let t_hm = joint.t_harmonic_k(0).unwrap();
    let poly = joint.h_g_region(0, t_hm, t_hm, 0.95, 400).unwrap();
    // Uncorrelated: the extremes in ΔH° sit at the centre's ΔG° (to the polygon's step).
    let g0 = joint.delta_g_at(0, t_hm).unwrap();
    let right = poly.iter().max_by(|a, b| a[0].total_cmp(&b[0])).unwrap();
    assert!(
        (right[1] - g0.value).abs() < 1e-6 * g0.se.max(1.0),
        "{right:?}"
    );
}
