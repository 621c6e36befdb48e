//! The fast writer of the points array (`json::write_fit`, `json::calorimetric`, with and
//! without `calorimetric_fit`) against
//! serde_json writing the same typed document: the bytes must be the same, for the cases
//! that put nulls, negative zeros, flags, escapes and the `source` field in the points.

use crate::common::file;
use isochore_analysis::calorimetric::fit_single_with_calorimetric;
use isochore_analysis::json::calorimetric::{
    write_fit_with_calorimetric, write_fit_with_calorimetric_fit, CalorimetricFitJson,
    FitWithCalorimetricFitJson, FitWithCalorimetricJson,
};
use isochore_analysis::json::errors_in_t::FitWithAdditionsJson;
use isochore_analysis::json::{write_fit, FitJson};
use isochore_analysis::{load, Exclusions, Overrides, RowNumber};
use isochore_fit::{calorimetric, Model};

/// Twelve invented points with 3 % scatter and one far-off point (an outlier flag).
fn scattered(name_cell: &str) -> String {
    let mut s = String::from("series,T (K),ln K,sigma\n");
    for i in 0..12 {
        let t = 280.0 + 4.0 * i as f64;
        let noise = [0.03, -0.02, 0.01, -0.04, 0.0, 0.02][i % 6];
        let off = if i == 7 { 0.5 } else { 0.0 };
        let ln_k = 5400.0 / t - 12.0 + noise + off;
        s.push_str(&format!("{name_cell},{t},{ln_k},0.0{}\n", 2 + i % 3));
    }
    s
}

fn overrides(f: impl FnOnce(&mut Overrides)) -> Overrides {
    let mut o = Overrides::default();
    f(&mut o);
    o
}

#[test]
fn streamed_points_are_the_bytes_serde_writes() {
    let cases: Vec<(String, Overrides)> = vec![
        (scattered("plain"), Overrides::default()),
        // A name that needs escapes in JSON (a quote, a backslash, a control character).
        (
            scattered("\"a \"\"q\"\" \\ \u{1}\u{9b} µ°\""),
            Overrides::default(),
        ),
        (scattered("x"), overrides(|o| o.unweighted = true)),
        (
            scattered("x"),
            overrides(|o| {
                o.exclude = Exclusions {
                    rows: vec![RowNumber::new(2).unwrap(), RowNumber::new(8).unwrap()],
                    reason: "test".into(),
                    at: "now".into(),
                }
            }),
        ),
        (
            scattered("x"),
            overrides(|o| o.model = Some(Model::CONSTANT_CP)),
        ),
        // ln K = 0 everywhere: zero and negative-zero fitted values and residuals, null
        // studentized residuals (s = 0).
        (
            "T (K),ln K\n280,0\n290,0\n300,0\n310,0\n320,0\n".to_string(),
            Overrides::default(),
        ),
        (
            "T (K),ln K\n280,-0\n290,0\n300,-0\n310,0\n".to_string(),
            Overrides::default(),
        ),
    ];
    for (i, (text, o)) in cases.iter().enumerate() {
        let (_d, path) = file("in.csv", text);
        let sets = load(&path, o).unwrap();
        for set in &sets {
            let fit = set.fit().unwrap();
            for source in [None, Some("dir/in.csv")] {
                for with_points in [true, false] {
                    let want =
                        serde_json::to_vec(&FitJson::new(set, &fit, source, with_points)).unwrap();
                    let mut got = Vec::new();
                    write_fit(&mut got, set, &fit, source, with_points).unwrap();
                    assert_eq!(
                        String::from_utf8_lossy(&got),
                        String::from_utf8_lossy(&want),
                        "case {i}"
                    );
                }
            }
            // The calorimetric document, whose fit fields are flattened into it.
            let cal = [calorimetric::CalorimetricValue {
                t_k: 298.15,
                delta_h: -45e3,
                u: 500.0,
            }];
            let comparisons = calorimetric::compare_calorimetric(&fit, &cal).unwrap();
            let want = serde_json::to_vec(&FitWithCalorimetricJson {
                fit: FitJson::new(set, &fit, None, true),
                calorimetric: comparisons
                    .iter()
                    .map(isochore_analysis::json::calorimetric::CalorimetricJson::new)
                    .collect(),
            })
            .unwrap();
            let mut got = Vec::new();
            write_fit_with_calorimetric(&mut got, set, &fit, None, true, &comparisons).unwrap();
            assert_eq!(got, want, "case {i}, calorimetric");
            // With `calorimetric_fit` (`--calorimetric-in-fit`), fitted or refused
            // (unweighted): the object a level further down.
            let constrained = fit_single_with_calorimetric(set, &set.series, &cal);
            let mut n = isochore_analysis::json::Nulls::new();
            let labels = [set.series.clone()];
            let mut doc = FitWithCalorimetricFitJson {
                fit: FitWithAdditionsJson::new(
                    set,
                    &fit,
                    None,
                    true,
                    None,
                    Some(&comparisons),
                    None,
                ),
                calorimetric_fit: constrained
                    .as_ref()
                    .ok()
                    .map(|(_, with)| CalorimetricFitJson::new(&mut n, with, &labels)),
            };
            if let Err(e) = &constrained {
                doc.fit.fit.warnings.push(format!(
                    "no fit with the calorimetric values as observations of ΔH°(T): {e}"
                ));
            }
            doc.fit.fit.warnings.extend(n.warning());
            let want = serde_json::to_vec(&doc).unwrap();
            let mut got = Vec::new();
            write_fit_with_calorimetric_fit(
                &mut got,
                set,
                &fit,
                None,
                true,
                None,
                Some(&comparisons),
                None,
                &constrained,
            )
            .unwrap();
            assert_eq!(got, want, "case {i}, calorimetric_fit");
        }
    }
}
