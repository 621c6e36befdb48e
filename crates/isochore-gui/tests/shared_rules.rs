//! The window follows the command line's rules (isochore-analysis): a data set that asks for
//! 1/σ² weights but gives no σ at all — here a σ column whose every cell is empty, in a
//! project — is fitted with equal weights and says so, instead of being refused; σ in some
//! rows only is still refused with its line and column.

use isochore_gui::doc::Entry;
use isochore_gui::fitting::{analyse, Remedy};

/// pKa at four temperatures (invented).
const ROWS: [(f64, f64); 4] = [
    (278.15, 7.62),
    (288.15, 7.45),
    (298.15, 7.31),
    (308.15, 7.18),
];

fn series(sigma: [&str; 4]) -> Entry {
    let mut text = String::from("temp/K,pKa,u(pKa)\n");
    for (i, (t, p)) in ROWS.iter().enumerate() {
        text.push_str(&format!("{t},{p},{}\n", sigma[i]));
    }
    let imp = isochore_data::import_text("acid.csv", &text, &Default::default()).unwrap();
    let data = isochore_data::Project::from_import(&imp).series.remove(0);
    // As a project saved elsewhere would hold it: 1/σ² weights asked for.
    assert_eq!(
        data.settings.fit.weighting,
        isochore_fit::Weighting::InverseVariance
    );
    Entry::new(data)
}

/// ΔH° of the unweighted line ln K = a + b/T: −R·b, b = Σ(x−x̄)(y−ȳ)/Σ(x−x̄)² (ordinary least
/// squares, common practice), ln K = −pKa·ln 10, R = 8.314462618 J mol⁻¹ K⁻¹ (CODATA 2018).
fn ols_delta_h() -> f64 {
    let x: Vec<f64> = ROWS.iter().map(|(t, _)| 1.0 / t).collect();
    let y: Vec<f64> = ROWS
        .iter()
        .map(|(_, p)| -p * std::f64::consts::LN_10)
        .collect();
    let (mx, my) = (x.iter().sum::<f64>() / 4.0, y.iter().sum::<f64>() / 4.0);
    let sxy: f64 = x.iter().zip(&y).map(|(a, b)| (a - mx) * (b - my)).sum();
    let sxx: f64 = x.iter().map(|a| (a - mx) * (a - mx)).sum();
    -8.314_462_618 * sxy / sxx
}

#[test]
fn an_empty_sigma_column_is_fitted_unweighted_and_says_so() {
    let a = analyse(&series(["", "", "", ""]));
    let fit = a.fit.as_deref().expect("fitted, not refused");
    assert!(!fit.weighted());
    let dh = fit.params()[0].estimate.value;
    assert!((dh - ols_delta_h()).abs() < 1e-6 * dh.abs(), "{dh}");
    assert!(
        fit.warnings()
            .iter()
            .any(|w| w.message == isochore_analysis::weighting::NO_SIGMA_NOTE),
        "{:?}",
        fit.warnings()
    );
}

#[test]
fn sigma_in_some_rows_only_is_still_refused_with_its_line() {
    let a = analyse(&series(["0.01", "", "0.01", "0.01"]));
    let e = a.fit.as_deref().expect_err("refused");
    assert!(e.contains("line 3"), "{e}");
    assert_eq!(a.remedy, Some(Remedy::FitUnweighted));
}
