//! A published pair of tables fitted together (issue 12 checks): pKw of H₂O and of D₂O at
//! 0–60 °C, with the constant-ΔCp° model, ΔH°(θ) and ΔS°(θ) per series and ΔCp° shared, and
//! the test of that shared ΔCp° against one per series.
//!
//! Data: −log Kw every 5 °C from the table "Ionization constant of normal and heavy water",
//! CRC Handbook of Chemistry and Physics, section 8 (86th ed., 2005): H₂O from the critical
//! evaluation of Marshall & Franck, J. Phys. Chem. Ref. Data 10, 295 (1981); D₂O from Mesmer &
//! Herting, J. Solution Chem. 7, 901 (1978). Three decimals as printed.
//!
//! Reference values: statsmodels 0.15.0 OLS (numpy 2.4.6, scipy 1.17.1) on the equivalent
//! block design, written by `tests/data/water_pkw/make_pkw_pair.py` into `pkw_pair.txt`
//! (run 2026-12-02). Physical sanity bands are from memory and say so.

use crate::common::{reference_table, REL};
use isochore_fit::global::{fit_global, test_equal_across_series};
use isochore_fit::{
    FitOptions, Measurement, Model, QuantityKind, SeriesInput, Sharing, SharingMap,
    TemperatureUnit, Weighting,
};

const T_C: [f64; 13] = [
    0.0, 5.0, 10.0, 15.0, 20.0, 25.0, 30.0, 35.0, 40.0, 45.0, 50.0, 55.0, 60.0,
];
/// Marshall & Franck (1981), via the CRC Handbook table named above.
const PKW_H2O: [f64; 13] = [
    14.938, 14.727, 14.528, 14.340, 14.163, 13.995, 13.836, 13.685, 13.542, 13.405, 13.275, 13.152,
    13.034,
];
/// Mesmer & Herting (1978), via the CRC Handbook table named above.
const PKW_D2O: [f64; 13] = [
    15.972, 15.743, 15.527, 15.324, 15.132, 14.951, 14.779, 14.616, 14.462, 14.316, 14.176, 14.044,
    13.918,
];

fn series(pkw: &[f64]) -> Vec<Measurement> {
    T_C.iter()
        .zip(pkw)
        .map(|(&c, &pk)| {
            let t = TemperatureUnit::Celsius.to_kelvin(c);
            Measurement::new(t, QuantityKind::PK.to_ln_k(pk, t).unwrap())
        })
        .collect()
}

fn close(what: &str, got: f64, want: f64) {
    let scale = got.abs().max(want.abs());
    assert!(
        (got - want).abs() <= REL * scale,
        "{what}: got {got:.17e}, want {want:.17e}"
    );
}

#[test]
fn water_and_heavy_water_with_a_shared_delta_cp() {
    let table = reference_table("water_pkw/pkw_pair.txt");
    let (h, d) = (series(&PKW_H2O), series(&PKW_D2O));
    let inputs = [SeriesInput::new("H2O", &h), SeriesInput::new("D2O", &d)];
    let options = FitOptions {
        model: Model::CONSTANT_CP,
        t_ref_k: 298.15,
        weighting: Weighting::Unweighted,
        ..FitOptions::default()
    };
    let sharing = SharingMap::per_series().with("delta_cp", Sharing::Shared);
    let f = fit_global(&inputs, &sharing, &options).unwrap();
    for (j, e) in f.estimates().iter().enumerate() {
        close(&format!("estimate {j}"), e.value, table["shared_est"][j]);
        close(&format!("SE {j}"), e.se, table["shared_se"][j]);
    }
    close("χ²", f.statistics().chi2, table["shared_chi2"][0]);

    let t = test_equal_across_series(&inputs, &sharing, &["delta_cp"], &options).unwrap();
    let r = &table["f_test"];
    close("F", t.f_statistic(), r[0]);
    close("p", t.p_value(), r[1]);
    assert_eq!((t.df_num() as f64, t.df_den() as f64), (r[2], r[3]));
    for (j, e) in t.full().estimates().iter().enumerate() {
        close(&format!("full estimate {j}"), e.value, table["full_est"][j]);
        close(&format!("full SE {j}"), e.se, table["full_se"][j]);
    }
    // The two solvents' ΔCp° differ (statsmodels' p above is about 1e-5): the verdict says so.
    assert!(t.rejects_equality());
    assert!(t
        .verdict()
        .starts_with("ΔCp° differs between the series (F = "));

    // Sanity, from memory: ΔH° of ionization of H₂O at 25 °C is about 55.8 kJ/mol and ΔCp°
    // about −220 J/(mol·K); D₂O's ΔH° is a few kJ/mol larger.
    let dh_h2o = t.full().estimate("delta_h", 0).unwrap().value;
    let dh_d2o = t.full().estimate("delta_h", 1).unwrap().value;
    let dcp_h2o = t.full().estimate("delta_cp", 0).unwrap().value;
    assert!((55.3e3..56.3e3).contains(&dh_h2o), "ΔH°(H2O) = {dh_h2o}");
    assert!(dh_d2o - dh_h2o > 2e3 && dh_d2o - dh_h2o < 7e3);
    assert!((-240.0..-200.0).contains(&dcp_h2o), "ΔCp°(H2O) = {dcp_h2o}");
    // The difference ΔH°(D2O) − ΔH°(H2O) in the joint fit excludes zero.
    let diff = f.difference("delta_h", 1, 0).unwrap().estimate;
    assert!(diff.ci_low > 0.0);
}
