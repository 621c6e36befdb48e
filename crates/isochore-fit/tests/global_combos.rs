//! Every shared/free combination of the constant-ΔCp° model's parameters over two series
//! (issue 12 checks) against statsmodels on the equivalent block design: estimates, standard
//! errors and χ² of each joint fit, and F, p and degrees of freedom of its test of equality
//! against the fit with every parameter per series, weighted (WLS, w = 1/σ²) and unweighted
//! (OLS), to 1e-9 relative.
//!
//! Reference values: statsmodels 0.15.0 (PyPI; numpy 2.4.6, scipy 1.17.1), written by
//! `tests/data/independent/make_global_combos.py` into `global_combos.txt` (run 2026-12-02;
//! the F-tests are `RegressionResults.compare_f_test`, cross-checked there with
//! scipy.stats.f.sf, and every solve with numpy.linalg.lstsq). Test inputs: the two invented
//! series of `tests/global.rs`.

use crate::common::{reference_table, REL};
use isochore_fit::global::{fit_global, EqualityTest};
use isochore_fit::{FitOptions, Measurement, Model, SeriesInput, Sharing, SharingMap, Weighting};

const T_A: [f64; 10] = [
    278.15, 283.15, 288.15, 293.15, 298.15, 303.15, 308.15, 313.15, 318.15, 323.15,
];
const LNK_A: [f64; 10] = [
    5.8331, 5.7024, 5.5965, 5.4316, 5.263, 5.1037, 4.9169, 4.6914, 4.4942, 4.273,
];
const SIG_A: [f64; 10] = [
    0.010, 0.015, 0.008, 0.012, 0.020, 0.010, 0.009, 0.018, 0.011, 0.014,
];
const T_B: [f64; 8] = [
    280.65, 285.65, 290.65, 295.65, 300.65, 305.65, 310.65, 315.65,
];
const LNK_B: [f64; 8] = [
    5.7651, 5.7206, 5.6158, 5.5179, 5.4051, 5.2448, 5.1088, 4.9333,
];
const SIG_B: [f64; 8] = [0.020, 0.012, 0.016, 0.010, 0.025, 0.013, 0.015, 0.011];

const KEYS: [&str; 3] = ["delta_h", "delta_s", "delta_cp"];

fn series(t: &[f64], y: &[f64], s: &[f64]) -> Vec<Measurement> {
    t.iter()
        .zip(y)
        .zip(s)
        .map(|((&t, &y), &s)| Measurement::new(t, y).with_sigma(s))
        .collect()
}

fn close(what: &str, got: f64, want: f64) {
    let scale = got.abs().max(want.abs());
    assert!(
        (got - want).abs() <= REL * scale,
        "{what}: got {got:.17e}, want {want:.17e} (rel {:.3e})",
        (got - want).abs() / scale
    );
}

#[test]
fn every_sharing_combination_equals_statsmodels() {
    let table = reference_table("independent/global_combos.txt");
    let (a, b) = (series(&T_A, &LNK_A, &SIG_A), series(&T_B, &LNK_B, &SIG_B));
    let inputs = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
    let mut checked = 0;
    for (prefix, weighting) in [
        ("w", Weighting::InverseVariance),
        ("u", Weighting::Unweighted),
    ] {
        let options = FitOptions {
            model: Model::CONSTANT_CP,
            t_ref_k: 298.15,
            weighting,
            ..FitOptions::default()
        };
        let full = fit_global(&inputs, &SharingMap::per_series(), &options).unwrap();
        for mask in 0..8u8 {
            let mut sharing = SharingMap::per_series();
            let mut code = String::new();
            for (k, key) in KEYS.iter().enumerate() {
                let shared = mask & (4 >> k) != 0;
                code.push(if shared { 's' } else { 'p' });
                if shared {
                    sharing.set(key, Sharing::Shared);
                }
            }
            let name = format!("{prefix}_{code}");
            let want = |what: &str| -> &Vec<f64> {
                table
                    .get(&format!("{name}_{what}"))
                    .unwrap_or_else(|| panic!("{name}_{what} in global_combos.txt"))
            };
            let f = fit_global(&inputs, &sharing, &options).unwrap();
            let est = want("est");
            let se = want("se");
            assert_eq!(f.estimates().len(), est.len(), "{name}: columns");
            for (j, e) in f.estimates().iter().enumerate() {
                close(&format!("{name} estimate {j}"), e.value, est[j]);
                close(&format!("{name} SE {j}"), e.se, se[j]);
            }
            close(&format!("{name} χ²"), f.statistics().chi2, want("chi2")[0]);
            if mask != 0 {
                let t = EqualityTest::between(f, full.clone()).unwrap();
                let r = want("f");
                close(&format!("{name} F"), t.f_statistic(), r[0]);
                close(&format!("{name} p"), t.p_value(), r[1]);
                assert_eq!(t.df_num() as f64, r[2], "{name}: df_num");
                assert_eq!(t.df_den() as f64, r[3], "{name}: df_den");
            }
            checked += 1;
        }
    }
    assert_eq!(checked, 16);
}
