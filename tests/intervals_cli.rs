//! `vhfit fit --intervals delta|monte-carlo|bootstrap --draws N --seed S` (issue 13, item
//! 6): the default JSON only gains `method`, a resampled run records its method, draws and
//! seed and gives the same numbers as the library, the text says which method made the
//! intervals, and bad settings are usage errors (exit 2) in words.

use crate::cli::{demo, json_of, run};
use isochore_fit::intervals::{monte_carlo, IntervalOptions};

#[test]
fn the_default_json_marks_every_interval_delta_and_has_no_intervals_object() {
    let path = demo("acid_pka.csv");
    let j = json_of(&run(&["fit", &path, "--json", "--summary"]));
    for (k, v) in j["params"].as_object().unwrap() {
        assert_eq!(v["method"], "delta", "{k}");
    }
    if !j["t_at_k1"].is_null() {
        assert_eq!(j["t_at_k1"]["method"], "fieller");
    }
    assert!(j.get("intervals").is_none());
    // --intervals delta is the default, byte for byte.
    let a = run(&["fit", &path, "--json"]);
    let b = run(&["fit", &path, "--json", "--intervals", "delta"]);
    assert_eq!(a.stdout, b.stdout);
}

#[test]
fn monte_carlo_json_records_its_run_and_matches_the_library() {
    let path = demo("acid_pka.csv");
    let args = [
        "fit",
        path.as_str(),
        "--json",
        "--summary",
        "--intervals",
        "monte-carlo",
        "--draws",
        "2000",
        "--seed",
        "42",
    ];
    let j = json_of(&run(&args));
    assert_eq!(j["intervals"]["method"], "monte_carlo");
    assert_eq!(j["intervals"]["draws"], 2000);
    assert_eq!(j["intervals"]["seed"], 42);
    let h = &j["params"]["delta_h"];
    assert_eq!(h["method"], "monte_carlo");
    // The same run through the library: the same numbers, to the last digit.
    let fit = crate::cli::library_fit(&path, &[], isochore_fit::FitOptions::default());
    let imp = isochore_data::import_path(&path, &isochore_data::ImportOptions::default())
        .expect("demo imports");
    let measurements = imp.series[0].measurements().expect("rows convert");
    let lib = monte_carlo(
        &measurements,
        &fit,
        None,
        &IntervalOptions {
            draws: 2000,
            seed: 42,
            ..Default::default()
        },
    )
    .unwrap();
    let q = lib.get("delta_h").unwrap();
    assert_eq!(h["se"].as_f64(), Some(q.interval.se));
    assert_eq!(h["ci_low"].as_f64(), Some(q.interval.ci_low));
    assert_eq!(h["ci_high"].as_f64(), Some(q.interval.ci_high));
    // The same seed, the same document.
    assert_eq!(run(&args).stdout, run(&args).stdout);
}

#[test]
fn bootstrap_text_says_which_method_made_the_intervals() {
    let path = demo("acid_pka.csv");
    let out = run(&["fit", &path, "--intervals", "bootstrap", "--draws", "500"]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains(
            "95% intervals by bootstrap of leverage-corrected residuals, 500 draws, seed 1"
        ),
        "{text}"
    );
    assert!(text.contains("bootstrap BCa") || text.contains("bootstrap percentile"));
    assert!(text.contains("the table above is the delta method's"));
}

#[test]
fn bad_interval_settings_are_usage_errors_in_words() {
    let path = demo("acid_pka.csv");
    for (args, words) in [
        (
            vec!["--intervals", "monte-carlo", "--draws", "0"],
            "at least 1 draw",
        ),
        (
            vec!["--intervals", "bootstrap", "--draws", "1000001"],
            "at most 1000000",
        ),
        (
            vec!["--intervals", "monte-carlo", "--seed", "twelve"],
            "not a seed",
        ),
        (vec!["--intervals", "guess"], "invalid value"),
        (vec!["--draws", "100"], "the delta method draws nothing"),
        (
            vec!["--intervals", "monte-carlo", "--bootstrap-scheme", "wild"],
            "--intervals bootstrap only",
        ),
    ] {
        let mut all = vec!["fit", path.as_str()];
        all.extend(args.iter().copied());
        let out = run(&all);
        assert_eq!(out.status.code(), Some(2), "{all:?}: {out:?}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(err.contains(words), "{all:?}: {err}");
    }
}

#[test]
fn the_bootstrap_refuses_too_few_points() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("three.csv");
    // Three invented points for a two-parameter model: the bootstrap needs four.
    std::fs::write(&file, "T (K),K\n290,2.0\n300,1.5\n310,1.2\n").unwrap();
    let f = file.display().to_string();
    let out = run(&["fit", &f, "--unweighted", "--intervals", "bootstrap"]);
    assert_eq!(out.status.code(), Some(2), "{out:?}");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("at least 4 used points"), "{err}");
    // Monte Carlo works on the same file.
    let out = run(&[
        "fit",
        &f,
        "--unweighted",
        "--intervals",
        "monte-carlo",
        "--draws",
        "100",
    ]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
}

#[test]
fn monte_carlo_draws_the_temperatures_when_sigma_t_is_given() {
    let path = demo("acid_pka.csv");
    let base = [
        "fit",
        path.as_str(),
        "--json",
        "--summary",
        "--intervals",
        "monte-carlo",
        "--draws",
        "3000",
    ];
    let without = json_of(&run(&base));
    let mut args = base.to_vec();
    args.extend(["--sigma-t", "0.5K"]);
    let with = json_of(&run(&args));
    let said = with["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .any(|w| w.as_str().unwrap().contains("temperatures were drawn"));
    assert!(said, "{}", with["warnings"]);
    // The draws are centred on the fit with errors in T (issue 13): its ΔH° is the value
    // quoted, beside the same block as without --intervals.
    let h = &with["params"]["delta_h"];
    assert_eq!(h["method"], "monte_carlo");
    assert_eq!(
        h["value"],
        with["errors_in_t"]["params"]["delta_h"]["value"]
    );
    assert_ne!(h["value"], without["params"]["delta_h"]["value"]);
    // σ(T) = 0.5 K adds (ΔH°/R)·σT/T² to each σ(ln K): ΔH°'s SD of draws grows here.
    let sd = |j: &serde_json::Value| j["params"]["delta_h"]["se"].as_f64().unwrap();
    assert!(
        sd(&with) > sd(&without),
        "{} vs {}",
        sd(&with),
        sd(&without)
    );
}

#[test]
fn a_report_has_the_methods_paragraph_and_the_comparison_table() {
    let dir = tempfile::tempdir().unwrap();
    let md = dir.path().join("acid.md");
    let path = demo("acid_pka.csv");
    let out = run(&[
        "fit",
        &path,
        "--intervals",
        "monte-carlo",
        "--draws",
        "1000",
        "--seed",
        "7",
        "--report",
        md.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let text = std::fs::read_to_string(&md).unwrap();
    for words in [
        "Intervals by resampling",
        "1000 draws each from seed 7",
        "GUM Supplement 1",
        "Bootstrap of leverage-corrected residuals: new data sets",
        "| quantity | value | delta method | Monte Carlo |",
        "too narrow",
    ] {
        assert!(text.contains(words), "no “{words}” in\n{text}");
    }
    // The delta method alone: no such section.
    let plain = dir.path().join("plain.md");
    let out = run(&["fit", &path, "--report", plain.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    assert!(!std::fs::read_to_string(&plain)
        .unwrap()
        .contains("Intervals by resampling"));
}

/// Issue 13: `--intervals` with `--calorimetric` writes both (the comparisons stay the
/// delta method's: the rest of the document is the run's, unchanged); with `--share` the
/// joint fit is resampled (`joint_intervals_cli` checks its numbers).
#[test]
fn intervals_go_with_calorimetric_values_and_with_joint_fits() {
    let path = demo("binding_qx7_halo2.csv");
    let base = [
        "fit",
        path.as_str(),
        "--model",
        "cp",
        "--json",
        "--summary",
        "--intervals",
        "bootstrap",
        "--draws",
        "400",
    ];
    let with = |extra: &[&str]| {
        let args: Vec<&str> = base.iter().chain(extra).copied().collect();
        let out = run(&args);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        json_of(&out)
    };
    let mut both = with(&["--calorimetric", "25C:-40.0:0.5"]);
    let cal = both
        .as_object_mut()
        .unwrap()
        .remove("calorimetric")
        .unwrap();
    assert_eq!(cal.as_array().unwrap().len(), 1);
    // ΔH_vH in the comparison is the delta method's.
    assert_eq!(cal[0]["delta_h_vh"]["method"], "delta");
    assert_eq!(both, with(&[]));
    assert_eq!(both["intervals"]["method"], "bootstrap");

    let multi = demo("ligands_px_orrin3.csv");
    let out = run(&[
        "fit",
        &multi,
        "--model",
        "cp",
        "--share",
        "delta_cp",
        "--intervals",
        "monte-carlo",
        "--draws",
        "400",
        "--json",
        "--summary",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j = json_of(&out);
    assert_eq!(j["intervals"]["method"], "monte_carlo");
    assert_eq!(j["params"]["delta_cp"]["method"], "monte_carlo");
}
