//! End-to-end checks of a fit with errors in T (issue 13 item 4): `--sigma-t` and a σ(T)
//! column chosen with `--column sigma-t=COLUMN` give the library's fit with errors in T in
//! the JSON's `errors_in_t` block and a readable block that names the method and the
//! comparison with the fit in K only; without σ(T) the JSON has no such block; a bad σ(T)
//! (≤ 0, a bad cell) is refused in words with the file, line and column.
//!
//! Test inputs: the invented binding demo shipped in assets/demo, and small invented files.

use super::cli::{close, demo, json_of, run};
use isochore_data::{import_path, ImportOptions};
use isochore_fit::errors_in_t::fit_errors_in_t;
use isochore_fit::{FitOptions, Model};
use std::io::Write;

#[test]
fn one_thermometer_uncertainty_follows_the_library() {
    let path = demo("binding_qx7_halo2.csv");
    for (model, method, flag) in [
        (Model::LINEAR, "york", "0.2K"),
        (Model::CONSTANT_CP, "orthogonal_distance", "0.36F"),
    ] {
        let out = run(&[
            "fit",
            &path,
            "--model",
            model.cli_name(),
            "--sigma-t",
            flag,
            "--json",
        ]);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let j = json_of(&out);
        let e = &j["errors_in_t"];
        assert_eq!(e["method"], method);
        // 0.36 °F is 0.2 K (5/9, the definition of the Fahrenheit degree).
        assert!(close(e["sigma_t_k"]["min"].as_f64().unwrap(), 0.2, 1e-12));
        let m = import_path(&path, &ImportOptions::default())
            .unwrap()
            .series[0]
            .measurements()
            .unwrap();
        let opts = FitOptions {
            model,
            ..FitOptions::default()
        };
        let lib = fit_errors_in_t(&m, &vec![0.2; m.len()], &opts).unwrap();
        for p in lib.params() {
            let got = &e["params"][p.key()];
            assert!(close(
                got["value"].as_f64().unwrap(),
                p.estimate.value,
                1e-12
            ));
            assert!(close(got["se"].as_f64().unwrap(), p.estimate.se, 1e-12));
        }
        assert_eq!(e["points"].as_array().unwrap().len(), m.len());
        assert!(e["comparison"]
            .as_str()
            .unwrap()
            .starts_with("allowing for σ(T) = 0.2 K"));
        // The text names the method and the comparison.
        let out = run(&["fit", &path, "--model", model.cli_name(), "--sigma-t", flag]);
        let text = String::from_utf8_lossy(&out.stdout);
        assert!(text.contains("fit with errors in T"), "{text}");
        let words = if method == "york" {
            "York's fit"
        } else {
            "orthogonal-distance fit"
        };
        assert!(
            text.contains(words) && text.contains("allowing for σ(T)"),
            "{text}"
        );
    }
    // Without σ(T): no block.
    let j = json_of(&run(&["fit", &path, "--json"]));
    assert!(j.get("errors_in_t").is_none());
}

fn file(text: &str) -> tempfile::NamedTempFile {
    let mut f = tempfile::Builder::new().suffix(".csv").tempfile().unwrap();
    f.write_all(text.as_bytes()).unwrap();
    f
}

#[test]
fn a_sigma_t_column_and_bad_values() {
    let f = file("T (°C),pKa,sd,u(T)\n10,7.60,0.01,0.1\n20,7.45,0.01,0.1\n30,7.31,0.01,0.2\n40,7.18,0.01,0.1\n50,7.06,0.01,0.3\n");
    let p = f.path().to_string_lossy().into_owned();
    let out = run(&["fit", &p, "--column", "sigma-t=u(T)", "--json", "--summary"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j = json_of(&out);
    assert!(close(
        j["errors_in_t"]["sigma_t_k"]["max"].as_f64().unwrap(),
        0.3,
        1e-12
    ));
    // The column without the role: kept but not used, as before.
    let j = json_of(&run(&["fit", &p, "--json", "--summary"]));
    assert!(j.get("errors_in_t").is_none());
    // σ(T) ≤ 0 on the command line.
    for bad in ["0", "-0.1K"] {
        let out = run(&["fit", &p, &format!("--sigma-t={bad}")]);
        assert!(!out.status.success());
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(
            err.contains("--sigma-t") && err.contains("positive"),
            "{err}"
        );
    }
    // An empty and a non-positive cell: file, line and column named.
    for (cell, words) in [("", "empty"), ("-0.1", "zero or negative")] {
        let f = file(&format!(
            "T (°C),pKa,sd,u(T)\n10,7.60,0.01,0.1\n20,7.45,0.01,0.1\n30,7.31,0.01,{cell}\n40,7.18,0.01,0.1\n"
        ));
        let p = f.path().to_string_lossy().into_owned();
        let out = run(&["fit", &p, "--column", "sigma-t=4"]);
        assert!(!out.status.success());
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(
            err.contains(&p) && err.contains("line 4, column 4 ('u(T)')") && err.contains(words),
            "{err}"
        );
    }
}

/// Issue 13: the report of a fit with σ(T) has the section on the fit with errors in T,
/// with the same comparison sentence as the JSON and the text (one function, the fit's).
#[test]
fn the_report_has_the_fit_with_errors_in_t() {
    let path = demo("binding_qx7_halo2.csv");
    let dir = tempfile::tempdir().unwrap();
    for (model, method) in [("linear", "York's fit"), ("cp", "orthogonal-distance fit")] {
        let md = dir.path().join(format!("{model}.md"));
        let out = run(&[
            "fit",
            &path,
            "--model",
            model,
            "--sigma-t",
            "0.2K",
            "--report",
            &md.to_string_lossy(),
        ]);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let report = std::fs::read_to_string(&md).unwrap();
        assert!(report.contains("## Fit with errors in T"), "{report}");
        assert!(report.contains(method), "{report}");
        let j = json_of(&run(&[
            "fit",
            &path,
            "--model",
            model,
            "--sigma-t",
            "0.2K",
            "--json",
        ]));
        let sentence = j["errors_in_t"]["comparison"].as_str().unwrap();
        // The text prints it as it is; the report capitalises it and escapes Markdown.
        let text = String::from_utf8_lossy(
            &run(&["fit", &path, "--model", model, "--sigma-t", "0.2K"]).stdout,
        )
        .into_owned();
        assert!(text.contains(sentence), "{text}");
        let escaped = sentence[1..]
            .replace('(', "\\(")
            .replace(')', "\\)")
            .replace('+', "\\+");
        assert!(report.contains(&escaped), "{report}\n{escaped}");
        // ΔH° with errors in T in kJ/mol as the JSON gives it (J/mol).
        let h = &j["errors_in_t"]["params"]["delta_h"];
        let shown = isochore_report::present::plus_minus(
            h["value"].as_f64().unwrap() / 1000.0,
            h["se"].as_f64().unwrap() / 1000.0,
        );
        assert!(report.contains(&shown), "{report}\n{shown}");
    }
    // Without σ(T): no section.
    let md = dir.path().join("plain.md");
    run(&["fit", &path, "--report", &md.to_string_lossy()]);
    let report = std::fs::read_to_string(&md).unwrap();
    assert!(!report.contains("errors in T"), "{report}");
}

/// Issue 13: the `errors_in_t` block is written beside `--intervals` and `--calorimetric`
/// too, the same block as without them, and the rest of each document is unchanged.
#[test]
fn errors_in_t_json_goes_with_intervals_and_calorimetric_values() {
    let path = demo("binding_qx7_halo2.csv");
    let base = ["fit", path.as_str(), "--model", "cp", "--json", "--summary"];
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
    let alone = with(&["--sigma-t", "0.2K"]);
    let block = alone["errors_in_t"].clone();
    assert_eq!(block["method"], "orthogonal_distance");

    // With calorimetric values: the calorimetric document, plus the same block.
    let cal = ["--calorimetric", "25C:-40.0:0.5"];
    let mut both = with(&[cal[0], cal[1], "--sigma-t", "0.2K"]);
    assert_eq!(both["errors_in_t"], block);
    assert!(both["calorimetric"].is_array());
    both.as_object_mut().unwrap().remove("errors_in_t");
    assert_eq!(both, with(&cal));

    // With Monte Carlo: the run's document, plus the same block.
    let mc = ["--intervals", "monte-carlo", "--draws", "400"];
    let j = with(&[mc[0], mc[1], mc[2], mc[3], "--sigma-t", "0.2K"]);
    assert_eq!(j["errors_in_t"], block);
    assert_eq!(j["intervals"]["method"], "monte_carlo");
    assert_eq!(j["params"]["delta_h"]["method"], "monte_carlo");
    // And with the bootstrap, which resamples the fit in K only: its document is the same
    // with or without σ(T), but for the block.
    let boot = ["--intervals", "bootstrap", "--draws", "300"];
    let mut j = with(&[boot[0], boot[1], boot[2], boot[3], "--sigma-t", "0.2K"]);
    assert_eq!(j["errors_in_t"], block);
    j.as_object_mut().unwrap().remove("errors_in_t");
    assert_eq!(j, with(&boot));
}

/// Issue 13: a report of a resampled run with σ(T) has both sections and says that Monte
/// Carlo's numbers belong to the fit with errors in T.
#[test]
fn a_resampled_report_with_sigma_t_says_which_fit_monte_carlo_follows() {
    let path = demo("acid_pka.csv");
    let dir = tempfile::tempdir().unwrap();
    let md = dir.path().join("r.md");
    let out = run(&[
        "fit",
        &path,
        "--sigma-t",
        "0.2K",
        "--intervals",
        "monte-carlo",
        "--draws",
        "500",
        "--report",
        &md.to_string_lossy(),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let report = std::fs::read_to_string(&md).unwrap();
    assert!(report.contains("## Intervals by resampling"), "{report}");
    assert!(report.contains("## Fit with errors in T"), "{report}");
    assert!(
        report.contains("belong to the fit with errors in T"),
        "{report}"
    );
}
