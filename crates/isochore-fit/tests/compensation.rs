//! Enthalpy–entropy compensation (issue 12 checks): a synthetic set of six series built
//! with a known compensation temperature β = 360 K, where the regression finds β inside its
//! interval, the interval excludes T_hm (Krug–Hunter–Grieger) and Exner's lines meet near
//! 360 K; and a set of pure noise (six series with one true ΔH° and ΔS°), where the
//! interval includes T_hm and no compensation is claimed.
//!
//! The noise comes from a small xorshift generator with a fixed starting state written in
//! this file, so every run sees the same numbers; the expectations (β = 360 K, T_hm of the
//! temperatures) follow from the construction, not from a run of this code.

use isochore_fit::global::{compensation, exner_test, fit_global, CompensationPoint};
use isochore_fit::{
    FitOptions, Measurement, Model, SeriesInput, SharingMap, Weighting, GAS_CONSTANT,
};

/// xorshift64* with Box–Muller: standard normal numbers from a fixed starting state.
struct Noise(u64);

impl Noise {
    fn uniform(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        let v = self.0.wrapping_mul(0x2545_F491_4F6C_DD1D);
        ((v >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }
    fn normal(&mut self) -> f64 {
        let (u, v) = (self.uniform(), self.uniform());
        (-2.0 * u.ln()).sqrt() * (std::f64::consts::TAU * v).cos()
    }
}

const SIGMA: f64 = 0.01;

fn temperatures() -> Vec<f64> {
    (0..9).map(|i| 278.15 + 5.0 * i as f64).collect()
}

/// One series with ΔH° and ΔS° (linear model) and normal noise of SD `SIGMA` in ln K.
fn series(dh: f64, ds: f64, noise: &mut Noise) -> Vec<Measurement> {
    temperatures()
        .into_iter()
        .map(|t| {
            let ln_k = -dh / (GAS_CONSTANT * t) + ds / GAS_CONSTANT + SIGMA * noise.normal();
            Measurement::new(t, ln_k).with_sigma(SIGMA)
        })
        .collect()
}

/// T_hm of the design: every series has the same temperatures and σ, so
/// T_hm = n / Σ(1/T) (the definition with equal weights).
fn t_hm() -> f64 {
    let t = temperatures();
    t.len() as f64 / t.iter().map(|t| 1.0 / t).sum::<f64>()
}

fn options() -> FitOptions {
    FitOptions {
        model: Model::LINEAR,
        weighting: Weighting::InverseVariance,
        ..FitOptions::default()
    }
}

#[test]
fn a_set_built_with_beta_360_k_shows_it() {
    let beta = 360.0;
    let mut noise = Noise(0x9E37_79B9_7F4A_7C15);
    let sets: Vec<Vec<Measurement>> = (0..6)
        .map(|s| {
            let ds = -40.0 + 12.0 * s as f64;
            series(-20e3 + beta * ds, ds, &mut noise)
        })
        .collect();
    let labels = ["L1", "L2", "L3", "L4", "L5", "L6"];
    let inputs: Vec<SeriesInput<'_>> = sets
        .iter()
        .zip(labels)
        .map(|(m, l)| SeriesInput::new(l, m))
        .collect();
    let f = fit_global(&inputs, &SharingMap::per_series(), &options()).unwrap();
    assert!((f.t_harmonic_k(0).unwrap() - t_hm()).abs() < 1e-9);
    let points = CompensationPoint::from_fit(&f, 298.15);
    assert_eq!(points.len(), 6);
    let c = compensation(&points, t_hm(), 0.95).unwrap();
    assert!(
        c.ci_low < beta && beta < c.ci_high,
        "β = {} [{}, {}]",
        c.beta,
        c.ci_low,
        c.ci_high
    );
    assert!(c.excludes_t_hm, "{}", c.verdict);
    assert!(c.verdict.contains("excludes the harmonic-mean temperature"));
    assert!(c.verdict.contains("proves nothing by itself"));

    let e = exner_test(&inputs, Weighting::InverseVariance, 0.95).unwrap();
    assert_eq!((e.df_num, e.df_den), (4, 54 - 12));
    assert!(
        e.p_value > 0.05,
        "lines built through one point: {}",
        e.verdict
    );
    let t_iso = e.t_iso_k.expect("a positive common temperature");
    assert!((t_iso - beta).abs() < 20.0, "T_iso = {t_iso}");
}

#[test]
fn pure_noise_shows_no_compensation() {
    let mut noise = Noise(0xD1B5_4A32_D192_ED03);
    let sets: Vec<Vec<Measurement>> = (0..6).map(|_| series(-30e3, -50.0, &mut noise)).collect();
    let inputs: Vec<SeriesInput<'_>> = sets.iter().map(|m| SeriesInput::new("", m)).collect();
    let f = fit_global(&inputs, &SharingMap::per_series(), &options()).unwrap();
    let points = CompensationPoint::from_fit(&f, 298.15);
    // The estimates are strongly correlated, as the caution says.
    for p in &points {
        assert!(p.cov_hs / (p.se_h * p.se_s) > 0.99);
    }
    let c = compensation(&points, t_hm(), 0.95).unwrap();
    assert!(!c.excludes_t_hm, "{}", c.verdict);
    assert!(c.verdict.contains("no evidence of compensation"));
    assert!(c.verdict.contains("proves nothing by itself"));
}

#[test]
fn too_few_series_are_refused_in_words() {
    let mut noise = Noise(7);
    let sets: Vec<Vec<Measurement>> = (0..2).map(|_| series(-30e3, -50.0, &mut noise)).collect();
    let inputs: Vec<SeriesInput<'_>> = sets.iter().map(|m| SeriesInput::new("", m)).collect();
    let f = fit_global(&inputs, &SharingMap::per_series(), &options()).unwrap();
    let points = CompensationPoint::from_fit(&f, 298.15);
    let e = compensation(&points, t_hm(), 0.95).unwrap_err();
    assert!(e.to_string().contains("at least three series"), "{e}");
    let e = exner_test(&inputs, Weighting::InverseVariance, 0.95).unwrap_err();
    assert!(e.to_string().contains("at least three series"), "{e}");
}

/// York's regression on Pearson's data with York's weights, the classic test of
/// errors-in-both-variables fitting: slope −0.4805 and intercept 5.4799, with standard errors
/// 0.0706 and 0.3592 after scaling by √(S/(n − 2)) (York, Evensen, Martínez & Delgado, Am. J.
/// Phys. 72, 367, 2004; the values from memory, to the four decimals quoted there).
#[test]
fn york_regression_on_pearsons_data() {
    let x = [0.0, 0.9, 1.8, 2.6, 3.3, 4.4, 5.2, 6.1, 6.5, 7.4];
    let y = [5.9, 5.4, 4.4, 4.6, 3.5, 3.7, 2.8, 2.8, 2.4, 1.5];
    let wx = [
        1000.0, 1000.0, 500.0, 800.0, 200.0, 80.0, 60.0, 20.0, 1.8, 1.0,
    ];
    let wy = [1.0, 1.8, 4.0, 8.0, 20.0, 20.0, 70.0, 70.0, 100.0, 500.0];
    let points: Vec<CompensationPoint> = (0..10)
        .map(|i| CompensationPoint {
            label: format!("{}", i + 1),
            delta_h: y[i],
            delta_s: x[i],
            se_h: 1.0 / f64::sqrt(wy[i]),
            se_s: 1.0 / f64::sqrt(wx[i]),
            cov_hs: 0.0,
        })
        .collect();
    let c = compensation(&points, 1.0, 0.95).unwrap();
    assert!((c.beta - -0.4805).abs() < 6e-5, "slope {}", c.beta);
    assert!((c.alpha - 5.4799).abs() < 6e-5, "intercept {}", c.alpha);
    assert!(
        (c.se_beta - 0.0706).abs() < 6e-5,
        "SE of the slope {}",
        c.se_beta
    );
}
