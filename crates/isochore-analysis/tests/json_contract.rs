//! The JSON contract: parameters written by looping over the fit's parameters (a fourth
//! parameter appears under its key with no new code), undefined numbers as null with a
//! warning naming them, points numbered from 1.

use crate::common::{csv, file};
use isochore_analysis::json::{write_error, FitJson};
use isochore_analysis::{load, Overrides, VERSION};
use isochore_fit::Model;
use serde_json::Value;

fn document(set: &isochore_analysis::DataSet, fit: &isochore_fit::VantHoffFit) -> Value {
    serde_json::to_value(FitJson::new(set, fit, Some("in.csv"), true)).unwrap()
}

/// Ten invented points on a gently curved ln K(T), enough for four parameters.
fn curved() -> String {
    let mut s = String::from("T (K),ln K\n");
    for i in 0..10 {
        let t = 275.0 + 8.0 * i as f64;
        let x = 1000.0 / t;
        let ln_k = -3.0 + 2.0 * x - 0.3 * x * x + 0.002 * (i as f64).sin();
        s.push_str(&format!("{t},{ln_k}\n"));
    }
    s
}

#[test]
fn every_parameter_of_the_model_is_written_under_its_key() {
    let (_d, path) = file("curved.csv", &curved());
    let o = Overrides {
        model: Some(Model::CLARKE_GLEW),
        ..Overrides::default()
    };
    let set = &load(&path, &o).unwrap()[0];
    let fit = set.fit().unwrap();
    let doc = document(set, &fit);
    assert_eq!(doc["model"], "clarke_glew");
    let params = doc["params"].as_object().unwrap();
    let keys: Vec<&str> = Model::CLARKE_GLEW.params().iter().map(|p| p.key).collect();
    assert_eq!(params.len(), keys.len());
    for (p, key) in fit.params().iter().zip(&keys) {
        // The JSON holds the library's estimate under the parameter's key (the definition).
        assert_eq!(
            params[*key]["value"].as_f64(),
            Some(p.estimate.value),
            "{key}"
        );
        assert_eq!(params[*key]["se"].as_f64(), Some(p.estimate.se), "{key}");
    }
    assert!(params.contains_key("delta_cp_slope"));
    assert_eq!(doc["cov"].as_array().unwrap().len(), 4);
    assert_eq!(doc["version"], VERSION);
    assert_eq!(doc["source"], "in.csv");
    let rows: Vec<u64> = doc["points"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| p["row"].as_u64().unwrap())
        .collect();
    assert_eq!(rows, (1..=10).collect::<Vec<u64>>());
}

#[test]
fn undefined_numbers_are_null_and_named_in_a_warning() {
    let (_d, path) = file("acid.csv", &csv(["0.01", "0.02", "0.01", "0.02"]));
    let set = &load(&path, &Overrides::default()).unwrap()[0];
    let mut fit = set.fit().unwrap();
    fit.params[1].estimate.value = f64::NAN;
    fit.params[0].estimate.se = f64::INFINITY;
    fit.covariance[0][1] = f64::NAN;
    fit.points[2].leverage = f64::NAN;
    let doc = document(set, &fit);
    assert!(doc["params"]["delta_s"]["value"].is_null());
    assert!(
        doc["params"]["delta_s"]["se"].is_null(),
        "a null value has null statistics"
    );
    assert!(doc["params"]["delta_h"]["se"].is_null());
    assert!(doc["params"]["delta_h"]["value"].is_number());
    assert!(doc["cov"][0][1].is_null());
    assert!(doc["points"][2]["leverage"].is_null());
    let warnings: Vec<&str> = doc["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(Value::as_str)
        .collect();
    let last = warnings.last().unwrap();
    for name in [
        "delta_h.se",
        "delta_s (value and all its statistics)",
        "cov[0][1]",
        "points[row 3].leverage",
    ] {
        assert!(last.contains(name), "{name} in {last}");
    }
    // Without points, the points' undefined values are not named.
    let summary = serde_json::to_value(FitJson::new(set, &fit, None, false)).unwrap();
    assert!(summary.get("points").is_none() && summary.get("source").is_none());
    let text = summary["warnings"].to_string();
    assert!(!text.contains("points[row 3]"), "{text}");
}

#[test]
fn an_error_entry_has_source_and_error() {
    let mut out = Vec::new();
    write_error(&mut out, "a.csv", "no data rows to fit").unwrap();
    let v: Value = serde_json::from_slice(&out).unwrap();
    assert_eq!(
        v,
        serde_json::json!({"source": "a.csv", "error": "no data rows to fit"})
    );
}
