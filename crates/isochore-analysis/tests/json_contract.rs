//! The JSON contract: parameters written by looping over the fit's parameters (a fourth
//! parameter appears under its key with no new code), undefined numbers as null with a
//! warning naming them (the rule of `Nulls`, which every document is built through), points
//! numbered from 1.

use crate::common::{csv, file};
use isochore_analysis::json::{write_error, FitJson, Nulls};
use isochore_analysis::{load, Overrides, VERSION};
use isochore_fit::{Estimate, Model};
use serde_json::Value;

fn document(set: &isochore_analysis::PreparedSet, fit: &isochore_fit::VantHoffFit) -> Value {
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
    let mut n = Nulls::new();
    let undefined = Estimate {
        value: f64::NAN,
        se: 1.0,
        ci_low: 0.0,
        ci_high: 2.0,
    };
    let e = n.estimate("delta_s", &undefined);
    // A null value has null statistics.
    assert_eq!(
        (e.value, e.se, e.ci_low, e.ci_high),
        (None, None, None, None)
    );
    let wide = Estimate {
        value: 1.0,
        se: f64::INFINITY,
        ci_low: f64::NEG_INFINITY,
        ci_high: 3.0,
    };
    let e = n.estimate("delta_h", &wide);
    assert_eq!(
        (e.value, e.se, e.ci_low, e.ci_high),
        (Some(1.0), None, None, Some(3.0))
    );
    assert_eq!(n.num(|| "cov[0][1]".into(), f64::NAN), None);
    assert_eq!(n.num(|| unreachable!(), 2.5), Some(2.5));
    assert_eq!(n.opt(|| unreachable!(), None), None);
    let text = serde_json::to_string(&e).unwrap();
    assert_eq!(
        text,
        r#"{"value":1.0,"se":null,"ci_low":null,"ci_high":3.0,"method":"delta"}"#
    );
    let w = n.warning().unwrap();
    for name in [
        "delta_s (value and all its statistics)",
        "delta_h.se",
        "delta_h.ci_low",
        "cov[0][1]",
    ] {
        assert!(w.contains(name), "{name} in {w}");
    }
    assert!(!w.contains("delta_h.ci_high"), "{w}");
    assert_eq!(Nulls::new().warning(), None);
}

#[test]
fn a_finite_fit_has_no_null_and_no_undefined_warning() {
    let (_d, path) = file("acid.csv", &csv(["0.01", "0.02", "0.01", "0.02"]));
    let set = &load(&path, &Overrides::default()).unwrap()[0];
    let fit = set.fit().unwrap();
    let doc = document(set, &fit);
    for (k, v) in doc["params"].as_object().unwrap() {
        assert!(v["value"].is_number() && v["se"].is_number(), "{k}: {v}");
    }
    assert!(!doc["warnings"].to_string().contains("undefined value"));
    // Without points, neither "points" nor "source" is written.
    let summary = serde_json::to_value(FitJson::new(set, &fit, None, false)).unwrap();
    assert!(summary.get("points").is_none() && summary.get("source").is_none());
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
