//! The weighting rule: one answer for a file read by the command line and for the same data
//! set in the window's document (a project series).

use crate::common::{csv, file, unweighted_delta_h};
use isochore_analysis::weighting::{for_data_set, NO_SIGMA_NOTE};
use isochore_analysis::{load, Overrides, SigmaCoverage};
use isochore_fit::{FitOptions, Weighting};

#[test]
fn coverage_of_sigma_cells() {
    assert_eq!(
        SigmaCoverage::of([Some(0.1), Some(0.2)]),
        SigmaCoverage::Every
    );
    assert_eq!(SigmaCoverage::of([None, None]), SigmaCoverage::None);
    assert_eq!(SigmaCoverage::of([Some(0.1), None]), SigmaCoverage::Partial);
    assert_eq!(SigmaCoverage::of([]), SigmaCoverage::None);
}

#[test]
fn an_empty_sigma_column_is_fitted_unweighted_with_a_note_by_both_front_ends() {
    let (_d, path) = file("empty.csv", &csv(["", "", "", ""]));
    let sets = load(&path, &Overrides::default()).unwrap();
    let set = &sets[0];
    assert_eq!(set.options.weighting, Weighting::Unweighted);
    assert!(
        set.warnings.iter().any(|w| w == NO_SIGMA_NOTE),
        "{:?}",
        set.warnings
    );
    let fit = set.fit().unwrap();
    assert!(!fit.weighted());
    let dh = fit.params()[0].estimate.value;
    assert!((dh - unweighted_delta_h()).abs() < 1e-6 * dh.abs(), "{dh}");

    // The same data set as the window keeps it (a project series asking for 1/σ² weights).
    let imp = isochore_data::import_path(&path, &Default::default()).unwrap();
    let series = isochore_data::Project::from_import(&imp).series.remove(0);
    assert_eq!(series.settings.fit.weighting, Weighting::InverseVariance);
    let w = for_data_set(&series, series.settings.fit).unwrap();
    assert_eq!(w.options.weighting, Weighting::Unweighted);
    assert_eq!(w.note, Some(NO_SIGMA_NOTE));
}

#[test]
fn no_sigma_column_is_the_same_as_an_empty_one() {
    let text = "temp/K,pKa\n278.15,7.62\n288.15,7.45\n298.15,7.31\n308.15,7.18\n";
    let (_d, path) = file("none.csv", text);
    let set = &load(&path, &Overrides::default()).unwrap()[0];
    assert_eq!(set.options.weighting, Weighting::Unweighted);
    let dh = set.fit().unwrap().params()[0].estimate.value;
    assert!((dh - unweighted_delta_h()).abs() < 1e-6 * dh.abs());
}

#[test]
fn sigma_in_some_rows_only_is_refused_with_line_and_column_unless_unweighted() {
    let (_d, path) = file("gaps.csv", &csv(["0.01", "0.01", "", "0.01"]));
    let e = load(&path, &Overrides::default()).unwrap_err();
    let m = e.to_string();
    // Line 4 of the file (header on line 1), column 3.
    assert!(m.contains("line 4") && m.contains("column 3"), "{m}");
    assert!(m.starts_with(&path.display().to_string()), "{m}");
    assert_eq!(e.remedy(), Some(isochore_analysis::Remedy::FitUnweighted));

    let imp = isochore_data::import_path(&path, &Default::default()).unwrap();
    let series = isochore_data::Project::from_import(&imp).series.remove(0);
    let w = for_data_set(&series, series.settings.fit).unwrap_err();
    assert!(w.to_string().contains("line 4"), "{w}");

    let unweighted = Overrides {
        unweighted: true,
        ..Overrides::default()
    };
    let set = &load(&path, &unweighted).unwrap()[0];
    assert_eq!(set.options.weighting, Weighting::Unweighted);
    assert!(set.warnings.is_empty(), "{:?}", set.warnings);
    let opts = FitOptions {
        weighting: Weighting::Unweighted,
        ..series.settings.fit
    };
    assert_eq!(for_data_set(&series, opts).unwrap().note, None);
}

#[test]
fn a_full_sigma_column_is_weighted() {
    let (_d, path) = file("full.csv", &csv(["0.01", "0.02", "0.01", "0.02"]));
    let set = &load(&path, &Overrides::default()).unwrap()[0];
    assert_eq!(set.options.weighting, Weighting::InverseVariance);
    assert!(set.warnings.is_empty());
    assert!(set.fit().unwrap().weighted());
}
