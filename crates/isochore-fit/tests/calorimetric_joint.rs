//! The optional joint fit in which calorimetric enthalpies constrain ΔH°(θ) and ΔCp°
//! (issue 12 item 3): two weighted series with ΔCp° shared and three calorimetric values as
//! extra ΔH°(T) observations, against statsmodels WLS on the stacked design written from the
//! model's equations (`tests/data/independent/make_calorimetric_joint.py` into
//! `calorimetric_joint.txt`, statsmodels 0.15.0, numpy 2.4.6, run 2026-12-03): estimates,
//! SEs under both σ conventions, χ² and degrees of freedom to 1e-9. Bad input is refused in
//! words. Test data: the invented series of make_global.py and invented calorimetric values.

use crate::common::reference_table;
use isochore_fit::calorimetric::CalorimetricValue;
use isochore_fit::global::{
    fit_global_with_calorimetric, CalorimetricObservation, SeriesInput, Sharing, SharingMap,
};
use isochore_fit::{FitOptions, Measurement, Model, SigmaConvention, Weighting};

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

fn series(t: &[f64], y: &[f64], s: &[f64]) -> Vec<Measurement> {
    t.iter()
        .zip(y)
        .zip(s)
        .map(|((&t, &y), &s)| Measurement::new(t, y).with_sigma(s))
        .collect()
}

fn cal() -> Vec<CalorimetricObservation> {
    // The script's CAL: (series, T / K, ΔH_cal / (J/mol), u / (J/mol)).
    [
        (0, 298.15, -25400.0, 300.0),
        (0, 310.15, -32300.0, 450.0),
        (1, 298.15, -18000.0, 250.0),
    ]
    .iter()
    .map(|&(series, t_k, delta_h, u)| CalorimetricObservation {
        series,
        value: CalorimetricValue { t_k, delta_h, u },
    })
    .collect()
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-9 * b.abs().max(1e-300)
}

#[test]
fn calorimetric_rows_in_the_design_match_statsmodels() {
    let table = reference_table("independent/calorimetric_joint.txt");
    let (a, b) = (series(&T_A, &LNK_A, &SIG_A), series(&T_B, &LNK_B, &SIG_B));
    let inputs = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
    let sharing = SharingMap::per_series().with("delta_cp", Sharing::Shared);
    for (convention, se_key) in [
        (SigmaConvention::ScaledByFit, "bse_scaled"),
        (SigmaConvention::Absolute, "bse_known"),
    ] {
        let options = FitOptions {
            model: Model::CONSTANT_CP,
            convention,
            ..FitOptions::default()
        };
        let f = fit_global_with_calorimetric(&inputs, &sharing, &options, &cal()).unwrap();
        let (params, se) = (&table["params"], &table[se_key]);
        assert_eq!(f.estimates().len(), 5);
        for (j, e) in f.estimates().iter().enumerate() {
            assert!(close(e.value, params[j]), "{j}: {} {}", e.value, params[j]);
            assert!(close(e.se, se[j]), "{j} {se_key}: {} {}", e.se, se[j]);
        }
        assert!(close(f.statistics().chi2, table["chi2"][0]));
        assert_eq!(f.dof() as f64, table["dof"][0]);
        assert_eq!((f.n_ln_k(), f.n_calorimetric()), (18, 3));
        assert!(close(f.estimate("delta_cp", 1).unwrap().value, params[4]));
    }
}

#[test]
fn calorimetric_constraints_refuse_bad_input_in_words() {
    let (a, b) = (series(&T_A, &LNK_A, &SIG_A), series(&T_B, &LNK_B, &SIG_B));
    let inputs = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
    let sharing = SharingMap::per_series().with("delta_cp", Sharing::Shared);
    let weighted = FitOptions {
        model: Model::CONSTANT_CP,
        ..FitOptions::default()
    };
    let unweighted = FitOptions {
        weighting: Weighting::Unweighted,
        ..weighted
    };
    let e = fit_global_with_calorimetric(&inputs, &sharing, &unweighted, &cal()).unwrap_err();
    assert!(e.to_string().contains("weighted fit"), "{e}");
    let e = fit_global_with_calorimetric(&inputs, &sharing, &weighted, &[]).unwrap_err();
    assert!(e.to_string().contains("no calorimetric value"), "{e}");
    let mut bad = cal();
    bad[1].series = 5;
    let e = fit_global_with_calorimetric(&inputs, &sharing, &weighted, &bad).unwrap_err();
    assert!(e.to_string().contains("series 6"), "{e}");
    let mut bad = cal();
    bad[0].value.u = 0.0;
    let e = fit_global_with_calorimetric(&inputs, &sharing, &weighted, &bad).unwrap_err();
    assert!(e.to_string().contains("above 0"), "{e}");
}
