//! What several test modules share: reading a table of reference values, the IAPWS water
//! data, unweighted options, and the 1e-9 comparison against an outside library.

use isochore_fit::{FitOptions, Measurement, Model, QuantityKind, TemperatureUnit, Weighting};
use std::collections::HashMap;

/// Relative agreement required against an outside library: a project requirement (set in
/// issue 2), not a reference value; each caller names its reference.
pub const REL: f64 = 1e-9;

/// A table of reference values under `tests/data/`: one `key value…` line each, `#` for
/// comments.
pub fn reference_table(relative: &str) -> HashMap<String, Vec<f64>> {
    let path = format!("{}/tests/data/{relative}", env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(&path)
        .unwrap_or_else(|e| panic!("fixture {path} is part of the crate: {e}"));
    let mut out = HashMap::new();
    for (i, line) in text.lines().enumerate() {
        let line = line.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        let mut tokens = line.split_whitespace();
        let key = tokens.next().unwrap().to_string();
        let values: Vec<f64> = tokens
            .map(|t| {
                t.parse()
                    .unwrap_or_else(|e| panic!("{path}: line {}: '{t}': {e}", i + 1))
            })
            .collect();
        out.insert(key, values);
    }
    out
}

/// pKw of liquid water at 0.1 MPa, 0–60 °C every 5 °C: IAPWS R11-07(2019) (Bandura & Lvov)
/// as implemented by the PyPI package iapws 1.5.5, written by
/// `tests/data/water_pkw/make_pkw.py` into `pkw_iapws.txt`.
pub fn iapws_water() -> Vec<Measurement> {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/water_pkw/pkw_iapws.txt"
    );
    let text = std::fs::read_to_string(path).expect("fixture pkw_iapws.txt is part of the crate");
    text.lines()
        .filter(|l| !l.trim().is_empty() && !l.starts_with('#'))
        .map(|l| {
            let v: Vec<f64> = l.split_whitespace().map(|t| t.parse().unwrap()).collect();
            let t_k = TemperatureUnit::Celsius.to_kelvin(v[0]);
            Measurement::new(t_k, QuantityKind::PK.to_ln_k(v[2], t_k).unwrap())
        })
        .collect()
}

/// Equal weights, the default θ (298.15 K) and level.
pub fn unweighted(model: Model) -> FitOptions {
    FitOptions {
        model,
        weighting: Weighting::Unweighted,
        ..FitOptions::default()
    }
}

/// |got − want| ≤ REL·|want|; entries far below the largest of their vector (a residual that
/// happens to be near zero) are held to REL of 1e-3 of that largest instead.
pub fn check(what: &str, got: &[f64], want: &[f64]) {
    assert_eq!(got.len(), want.len(), "{what}: length");
    let big = want.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    for (i, (g, w)) in got.iter().zip(want).enumerate() {
        let tol = REL * w.abs().max(1e-3 * big);
        assert!(
            (g - w).abs() <= tol,
            "{what}[{i}]: got {g:.17e}, statsmodels {w:.17e}, rel. diff {:.2e}",
            (g - w).abs() / w.abs()
        );
    }
}
