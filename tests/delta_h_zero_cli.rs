//! End-to-end checks of the temperature where ΔH° = 0 (issue 13): for every model with ΔCp°
//! the JSON has `t_delta_h_zero` (the library's value and Fieller's interval, `method`,
//! the words), the text and the reports show the row and the words, and the linear model
//! has none of it. The value is checked against the direct computation from the JSON's own
//! parameters, T₀ = θ − ΔH°(θ)/ΔCp° (Kirchhoff's law integrated at constant ΔCp°).
//!
//! Test inputs: the invented demos shipped in assets/demo.

use super::cli::{close, demo, json_of, run};

#[test]
fn json_text_and_reports_give_the_temperature_where_delta_h_is_zero() {
    let path = demo("acid_pka.csv");
    let out = run(&["fit", &path, "--model", "cp", "--json", "--summary"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j = json_of(&out);
    let z = &j["t_delta_h_zero"];
    let (h, cp) = (
        j["params"]["delta_h"]["value"].as_f64().unwrap(),
        j["params"]["delta_cp"]["value"].as_f64().unwrap(),
    );
    let theta = j["t_ref_k"].as_f64().unwrap();
    // Direct computation: ΔH°(T) = ΔH°(θ) + ΔCp°(T − θ) = 0.
    let direct = theta - h / cp;
    assert!(
        close(z["value"].as_f64().unwrap(), direct, 1e-9),
        "{z} {direct}"
    );
    assert_eq!(z["method"], "fieller");
    let (lo, hi) = (
        z["ci_low"].as_f64().unwrap(),
        z["ci_high"].as_f64().unwrap(),
    );
    assert!(lo < direct && direct < hi, "{z}");
    // Fieller's interval of a ratio is not symmetric about the value.
    assert!(((direct - lo) - (hi - direct)).abs() > 1.0, "{z}");
    // 484 K is far above the data (5–55 °C): an extrapolation, said in the words.
    assert_eq!(z["extrapolated"], true);
    let words = z["words"].as_str().unwrap();
    assert!(
        words.contains("Fieller") && words.contains("outside the measured range"),
        "{words}"
    );

    // Text: the row and the words.
    let out = run(&["fit", &path, "--model", "cp"]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("T where ΔH° = 0, extrapolated"), "{text}");
    assert!(text.contains(words), "{text}");

    // The report: the row in the results table and the words beside it.
    let dir = tempfile::tempdir().unwrap();
    let md = dir.path().join("r.md");
    let out = run(&[
        "fit",
        &path,
        "--model",
        "cp",
        "--report",
        &md.to_string_lossy(),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let report = std::fs::read_to_string(&md).unwrap();
    assert!(report.contains("T where ΔH° = 0, extrapolated"), "{report}");
    assert!(report.contains("Fieller"), "{report}");

    // The linear model: no key, no row, no words.
    let j = json_of(&run(&["fit", &path, "--json", "--summary"]));
    assert!(j.get("t_delta_h_zero").is_none(), "{j}");
    let text = String::from_utf8_lossy(&run(&["fit", &path]).stdout).into_owned();
    assert!(!text.contains("ΔH° = 0"), "{text}");
}

#[test]
fn no_sign_change_and_unresolved_heat_capacity_are_said_in_words() {
    // The binding demo's ΔCp° (−136 ± 776 J/(mol·K)) gives no sign change of ΔH° between
    // T_hm/3 and 3·T_hm: null numbers and the words.
    let path = demo("binding_qx7_halo2.csv");
    let j = json_of(&run(&[
        "fit",
        &path,
        "--model",
        "cp",
        "--json",
        "--summary",
    ]));
    let z = &j["t_delta_h_zero"];
    assert!(z["value"].is_null() && z["ci_low"].is_null(), "{z}");
    assert!(
        z["words"].as_str().unwrap().contains("keeps its sign"),
        "{z}"
    );
    let text = String::from_utf8_lossy(&run(&["fit", &path, "--model", "cp"]).stdout).into_owned();
    assert!(text.contains("ΔH° keeps its sign"), "{text}");
    // The text writes the words' temperatures in the file's unit (°C here); the JSON in K.
    assert!(text.contains(" °C to "), "{text}");
    assert!(z["words"].as_str().unwrap().contains(" K to "), "{z}");

    // A file where ΔH° changes sign inside the data but ΔCp° is not resolved: an unbounded
    // interval, said in words (invented numbers: ΔH°(θ) ≈ 0 and ΔCp° ≈ 0 with scatter).
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("flat.csv");
    std::fs::write(
        &f,
        "T (K),ln K,sd\n280,1.02,0.02\n285,0.99,0.02\n290,1.01,0.02\n295,0.98,0.02\n300,1.00,0.02\n305,1.02,0.02\n310,0.99,0.02\n315,1.01,0.02\n",
    )
    .unwrap();
    let out = run(&[
        "fit",
        &f.to_string_lossy(),
        "--model",
        "cp",
        "--json",
        "--summary",
    ]);
    let j = json_of(&out);
    let z = &j["t_delta_h_zero"];
    // ΔH° crosses zero near 297 K (the fitted curvature is noise), unbounded both sides.
    assert!(z["value"].is_number(), "{z}");
    assert!(z["ci_low"].is_null() && z["ci_high"].is_null(), "{z}");
    let words = z["words"].as_str().unwrap();
    assert!(
        words.contains("not resolved") && words.contains("unbounded"),
        "{words}"
    );
    let text =
        String::from_utf8_lossy(&run(&["fit", &f.to_string_lossy(), "--model", "cp"]).stdout)
            .into_owned();
    assert!(
        text.contains("T where ΔH° = 0; interval unbounded"),
        "{text}"
    );
}

/// With `--intervals`, `t_delta_h_zero` takes the run's interval and value: the fit's own T₀
/// without σ(T) (the same number as the delta-method document's), the fit with errors in
/// T's when Monte Carlo is centred on it (`--sigma-t`).
#[test]
fn resampled_runs_fill_the_temperature_where_delta_h_is_zero() {
    let path = demo("acid_pka.csv");
    let base = ["fit", path.as_str(), "--model", "cp", "--json", "--summary"];
    let with = |extra: &[&str]| {
        let args: Vec<&str> = base.iter().chain(extra).copied().collect();
        json_of(&run(&args))
    };
    let plain = with(&[]);
    let mc = ["--intervals", "monte-carlo", "--draws", "800"];
    let j = with(&mc);
    let quantity = |j: &serde_json::Value| {
        j["intervals"]["quantities"]
            .as_array()
            .unwrap()
            .iter()
            .find(|q| q["key"] == "t_delta_h_zero")
            .unwrap()["estimate"]
            .clone()
    };
    let z = &j["t_delta_h_zero"];
    assert_eq!(z["method"], "monte_carlo");
    assert_eq!(z["value"], plain["t_delta_h_zero"]["value"]);
    assert_eq!(z["ci_low"], quantity(&j)["ci_low"]);
    assert_eq!(z["se"], quantity(&j)["se"]);
    let j = with(&[mc[0], mc[1], mc[2], mc[3], "--sigma-t", "0.5K"]);
    let z = &j["t_delta_h_zero"];
    assert_eq!(z["value"], quantity(&j)["value"]);
    assert_ne!(z["value"], plain["t_delta_h_zero"]["value"]);
}
