//! End-to-end checks of `vhfit fit --calorimetric T:ΔH:u` (issue 12): the JSON carries the
//! library's ΔH°(T) at each calorimetric temperature, the difference's SE follows the
//! propagation rule, the text says the caution in words, and a malformed item is a usage
//! error (exit 2).
//!
//! Test inputs: the invented binding demo shipped in assets/demo.

use super::cli::{close, demo, json_of, library_fit, run};
use isochore_fit::{FitOptions, Model};

#[test]
fn calorimetric_json_follows_the_library() {
    let path = demo("binding_qx7_halo2.csv");
    let out = run(&[
        "fit",
        &path,
        "--model",
        "cp",
        "--calorimetric",
        "25C:-40:0.5,310.15K:-45:1",
        "--json",
        "--summary",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j = json_of(&out);
    let fit = library_fit(
        &path,
        &[],
        FitOptions {
            model: Model::CONSTANT_CP,
            ..FitOptions::default()
        },
    );
    let c = j["calorimetric"].as_array().expect("a calorimetric array");
    assert_eq!(c.len(), 2);
    for (x, (t, h, u)) in c
        .iter()
        .zip([(298.15, -40e3, 500.0), (310.15, -45e3, 1000.0)])
    {
        let vh = fit.delta_h_at(t);
        assert!(close(x["t_k"].as_f64().unwrap(), t, 1e-12));
        assert!(close(x["delta_h_cal"].as_f64().unwrap(), h, 1e-12));
        assert!(close(
            x["delta_h_vh"]["value"].as_f64().unwrap(),
            vh.value,
            1e-9
        ));
        let se = (vh.se * vh.se + u * u).sqrt();
        assert!(close(x["difference"]["se"].as_f64().unwrap(), se, 1e-9));
        assert!(close(x["ratio"].as_f64().unwrap(), vh.value / h, 1e-9));
        assert!(x["verdict"]
            .as_str()
            .unwrap()
            .contains("coupled equilibria"));
    }
    // The single fit's own fields are still there.
    assert_eq!(j["model"], "cp");
    assert!(j["params"]["delta_h"]["value"].is_number());
}

#[test]
fn calorimetric_text_and_refusals() {
    let path = demo("binding_qx7_halo2.csv");
    let out = run(&["fit", &path, "--calorimetric", "25C:-40:0.5"]);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("calorimetric ΔH° compared with the van 't Hoff ΔH°"),
        "{text}"
    );
    assert!(text.contains("Fieller"), "{text}");
    for bad in ["25C:-40", "25C:x:1", "25C:-40:-1", "0K:-40:1"] {
        let out = run(&["fit", &path, "--calorimetric", bad]);
        assert_eq!(out.status.code(), Some(2), "{bad}");
    }
}

/// With --report the single fit's report has a "Calorimetric ΔH°" section whose ΔH_vH and
/// ΔH_cal cells are the text output's numbers, each verdict and the caution in words.
#[test]
fn calorimetric_values_appear_in_the_single_report() {
    let path = demo("binding_qx7_halo2.csv");
    let dir = std::env::temp_dir().join(format!("isochore-cal-report-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let md = dir.join("one.md");
    let md_s = md.to_string_lossy().into_owned();
    let args = ["fit", &path, "--calorimetric", "25C:-40:0.5,35C:-47:0.8"];
    let text = String::from_utf8(run(&args).stdout).unwrap();
    let mut with_report = args.to_vec();
    with_report.extend(["--report", &md_s]);
    let out = run(&with_report);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let report = std::fs::read_to_string(&md).unwrap();
    let section = report
        .split("## Calorimetric ΔH°")
        .nth(1)
        .unwrap_or_else(|| panic!("no calorimetric section in\n{report}"));
    // "ΔH_vH = a ± b kJ/mol, ΔH_cal = c ± d kJ/mol" of each text line, in the table.
    let lines: Vec<&str> = text.lines().filter(|l| l.contains("ΔH_vH = ")).collect();
    assert_eq!(lines.len(), 2, "{text}");
    for l in lines {
        let vh = l
            .split("ΔH_vH = ")
            .nth(1)
            .unwrap()
            .split(" kJ/mol")
            .next()
            .unwrap();
        let cal = l
            .split("ΔH_cal = ")
            .nth(1)
            .unwrap()
            .split(" kJ/mol")
            .next()
            .unwrap();
        assert!(
            section.lines().any(|r| r.contains(vh) && r.contains(cal)),
            "{vh} / {cal} not in\n{section}"
        );
    }
    assert!(section.contains("Fieller"), "{section}");
    assert!(section.contains("coupled equilibria"), "{section}");
    // Without calorimetric values, no such section.
    let plain = dir.join("plain.md");
    let out = run(&["fit", &path, "--report", &plain.to_string_lossy()]);
    assert!(out.status.success());
    assert!(!std::fs::read_to_string(&plain)
        .unwrap()
        .contains("Calorimetric ΔH°"));
}

/// One `value ± SE  [low, high]` of the text, as numbers with the decimals each is shown to.
fn shown_numbers(cell: &str) -> Vec<(f64, usize)> {
    let t: Vec<&str> = cell.split_whitespace().collect();
    let i = t.iter().position(|x| *x == "±").expect("value ± SE");
    [t[i - 1], t[i + 1], t[i + 2], t[i + 3]]
        .iter()
        .map(|x| {
            let x = x.trim_matches(|c| c == '[' || c == ']' || c == ',');
            let d = x.split('.').nth(1).map_or(0, str::len);
            (x.parse().unwrap_or_else(|_| panic!("{x} in {cell}")), d)
        })
        .collect()
}

/// The text's `value ± SE  [low, high]` is the JSON's `{value, se, ci_low, ci_high}` (SI,
/// divided by `scale` for the display unit), each rounded to the decimals shown.
fn text_is_json(cell: &str, e: &serde_json::Value, scale: f64) {
    for ((shown, d), key) in shown_numbers(cell)
        .into_iter()
        .zip(["value", "se", "ci_low", "ci_high"])
    {
        let v = e[key].as_f64().unwrap() / scale;
        let half = 0.5 * 10f64.powi(-(d as i32)) * (1.0 + 1e-9);
        assert!(
            (v - shown).abs() <= half,
            "{key}: {v} shown as {shown} in {cell}"
        );
    }
}

/// `--calorimetric-in-fit` without `--share` (issue 12): the binding demo with −40.0 ± 0.5
/// kJ/mol at 25 °C and −47.0 ± 0.8 kJ/mol at 35 °C (invented) fitted together with ln K
/// through isochore-analysis' `fit_single_with_calorimetric` (the window's), against
/// statsmodels 0.15.0 WLS on the stacked design (tests/data/independent/
/// make_single_calorimetric.py → single_calorimetric.txt, scaled SEs) to 1e-9; the text's
/// numbers are the JSON's; the same values from a file give the same output; unweighted,
/// refused in words.
#[test]
fn a_single_series_is_fitted_with_its_calorimetric_values() {
    let path = demo("binding_qx7_halo2.csv");
    let cal = "25C:-40:0.5,35C:-47:0.8";
    let args = ["fit", &path, "--calorimetric", cal, "--calorimetric-in-fit"];
    let mut json_args = args.to_vec();
    json_args.extend(["--json", "--summary"]);
    let out = run(&json_args);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j = json_of(&out);
    let c = &j["calorimetric_fit"];
    // single_calorimetric.txt (statsmodels 0.15.0): params, bse, chi2, dof.
    let line = reference("single_calorimetric.txt");
    let (params, bse) = (line("params"), line("bse"));
    let rel = 1e-9; // the project's bar (issue 10), not a reference value
    let p = &c["series_params"][0]["params"];
    assert_eq!(c["series_params"][0]["series"], "binding_qx7_halo2");
    assert_eq!(c["params"], serde_json::json!({}), "nothing is shared");
    for (k, key) in ["delta_h", "delta_s"].into_iter().enumerate() {
        assert!(close(num(&p[key]["value"]), params[k], rel), "{key}: {p}");
        assert!(close(num(&p[key]["se"]), bse[k], rel), "{key}: {p}");
    }
    assert!(close(num(&c["chi2"]), line("chi2")[0], rel), "{c}");
    assert_eq!(c["dof"].as_u64(), Some(line("dof")[0] as u64));
    assert_eq!(c["n_ln_k"], 10);
    assert_eq!(c["n_calorimetric"], 2);
    assert_eq!(c["columns"].as_array().unwrap().len(), 2);
    // The fit of ln K alone is the plain fit's, unchanged, and the comparisons stay.
    assert!(j["calorimetric"].as_array().is_some_and(|a| a.len() == 2));
    let plain = json_of(&run(&["fit", &path, "--json", "--summary"]));
    assert_eq!(j["params"], plain["params"]);

    // The text: each parameter with the calorimetric values | ln K alone, the same numbers.
    let out = run(&args);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    let block = text
        .split("fit with the calorimetric values as observations of ΔH°(T)")
        .nth(1)
        .unwrap_or_else(|| panic!("no constrained block in\n{text}"));
    for (symbol, key, scale) in [("ΔH°", "delta_h", 1000.0), ("ΔS°", "delta_s", 1.0)] {
        let row = block
            .lines()
            .find(|l| l.trim_start().starts_with(symbol))
            .unwrap_or_else(|| panic!("no {symbol} row in\n{block}"));
        let (with, alone) = row.split_once(" | ").expect("two columns");
        text_is_json(with, &p[key], scale);
        text_is_json(alone, &plain["params"][key], scale);
    }
    assert!(
        block.contains("2 calorimetric values, 10 degrees of freedom"),
        "{block}"
    );

    // The same values from a calorimetric file: the same output.
    let dir = std::env::temp_dir().join(format!("isochore-cal-single-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let file = dir.join("itc.csv");
    std::fs::write(
        &file,
        "# invented\nT (°C),ΔH (kJ/mol),u (kJ/mol)\n25,-40,0.5\n35,-47,0.8\n",
    )
    .unwrap();
    let file = file.to_string_lossy().into_owned();
    let from_file = run(&[
        "fit",
        &path,
        "--calorimetric-file",
        &file,
        "--calorimetric-in-fit",
    ]);
    assert_eq!(String::from_utf8(from_file.stdout).unwrap(), text);

    // Unweighted: refused in words, the rest printed; in JSON null with the reason.
    let mut unweighted = args.to_vec();
    unweighted.push("--unweighted");
    let out = run(&unweighted);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains(
            "not fitted: calorimetric values can constrain the fit only when every ln K has its σ"
        ),
        "{text}"
    );
    assert!(text.contains("calorimetric ΔH° compared with the van 't Hoff ΔH°"));
    json_args.push("--unweighted");
    let j = json_of(&run(&json_args));
    assert!(j["calorimetric_fit"].is_null());
    assert!(j["warnings"].as_array().unwrap().iter().any(|w| w
        .as_str()
        .unwrap()
        .contains("only when every ln K has its σ")));

    // One value: the counts in the right number (10 ln K + 1 − 2 columns = 9).
    let out = run(&[
        "fit",
        &path,
        "--calorimetric",
        "25C:-40:0.5",
        "--calorimetric-in-fit",
    ]);
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("over 10 ln K points and 1 calorimetric value, 9 degrees of freedom"),
        "{text}"
    );

    // Without values: a usage error in words; without the option, no object.
    let out = run(&["fit", &path, "--calorimetric-in-fit"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("needs calorimetric values"));
    let j = json_of(&run(&[
        "fit",
        &path,
        "--calorimetric",
        cal,
        "--json",
        "--summary",
    ]));
    assert!(j.get("calorimetric_fit").is_none());
}

/// A line of a reference file of tests/data/independent (`params …`, `bse …`, `chi2 …`,
/// `dof …`) as numbers.
fn reference(file: &str) -> impl Fn(&str) -> Vec<f64> {
    let text =
        std::fs::read_to_string(super::cli::root().join("tests/data/independent").join(file))
            .unwrap_or_else(|e| panic!("{file}: {e}"));
    let file = file.to_string();
    move |name: &str| {
        text.lines()
            .find_map(|l| l.strip_prefix(&format!("{name} ")))
            .unwrap_or_else(|| panic!("no {name} in {file}"))
            .split_whitespace()
            .map(|x| x.parse().unwrap())
            .collect()
    }
}

/// With ΔCp° (`--model cp`, θ = 298.15 K) three calorimetric values at 15, 25 and 35 °C
/// (invented) constrain ΔH°(θ) and ΔCp° together: against statsmodels 0.15.0 WLS on the
/// stacked design (tests/data/independent/make_single_calorimetric_cp.py →
/// single_calorimetric_cp.txt, scaled SEs) to 1e-9.
#[test]
fn a_single_series_with_a_heat_capacity_is_fitted_with_its_calorimetric_values() {
    let path = demo("binding_qx7_halo2.csv");
    let out = run(&[
        "fit",
        &path,
        "--model",
        "cp",
        "--calorimetric",
        "15C:-33.5:0.6,25C:-40:0.5,35C:-47:0.8",
        "--calorimetric-in-fit",
        "--json",
        "--summary",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j = json_of(&out);
    assert_eq!(j["t_ref_k"].as_f64(), Some(298.15));
    let c = &j["calorimetric_fit"];
    let line = reference("single_calorimetric_cp.txt");
    let (params, bse) = (line("params"), line("bse"));
    let rel = 1e-9; // the project's bar (issue 10), not a reference value
    let p = &c["series_params"][0]["params"];
    for (k, key) in ["delta_h", "delta_s", "delta_cp"].into_iter().enumerate() {
        assert!(close(num(&p[key]["value"]), params[k], rel), "{key}: {p}");
        assert!(close(num(&p[key]["se"]), bse[k], rel), "{key}: {p}");
    }
    assert!(close(num(&c["chi2"]), line("chi2")[0], rel), "{c}");
    assert_eq!(c["dof"].as_u64(), Some(line("dof")[0] as u64));
    assert_eq!(c["n_calorimetric"], 3);
}

fn num(v: &serde_json::Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

/// `--calorimetric-in-fit --report` (issue 12): the Markdown report's "Calorimetric ΔH°"
/// section holds the series fitted with its values beside ln K alone, with the same
/// numbers as the text output (each rounded as shown), χ² and the degrees of freedom in the
/// same words; the results CSV holds the fit's rows at full precision, against statsmodels
/// 0.15.0 WLS on the stacked design (single_calorimetric.txt) to 1e-9. Without the option,
/// the section has no such table; the stderr note that sent readers to the text is gone.
#[test]
fn the_single_report_shows_the_fit_with_the_calorimetric_values() {
    let path = demo("binding_qx7_halo2.csv");
    let cal = "25C:-40:0.5,35C:-47:0.8";
    let dir =
        std::env::temp_dir().join(format!("isochore-cal-in-fit-report-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let md = dir.join("with.md");
    let md_arg = md.to_string_lossy().into_owned();
    let args = [
        "fit",
        &path,
        "--calorimetric",
        cal,
        "--calorimetric-in-fit",
        "--report",
        &md_arg,
    ];
    let out = run(&args);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(
        !String::from_utf8_lossy(&out.stderr).contains("text and JSON output only"),
        "the old note is gone"
    );
    let text = String::from_utf8(out.stdout).unwrap();
    let block = text
        .split("fit with the calorimetric values as observations of ΔH°(T)")
        .nth(1)
        .unwrap_or_else(|| panic!("no constrained block in\n{text}"));
    // The Markdown without its escapes.
    let report = std::fs::read_to_string(&md).unwrap().replace('\\', "");
    let section = report
        .split("## Calorimetric ΔH°")
        .nth(1)
        .and_then(|s| s.split("\n## ").next())
        .unwrap_or_else(|| panic!("no calorimetric section in\n{report}"));
    assert!(
        section.contains("| parameter | series | with ΔH_cal: value ± SE | 95% CI | ln K alone: value ± SE | 95% CI | unit |"),
        "{section}"
    );
    for symbol in ["ΔH°", "ΔS°"] {
        let text_row = block
            .lines()
            .find(|l| l.trim_start().starts_with(symbol))
            .unwrap_or_else(|| panic!("no {symbol} row in\n{block}"));
        let (text_with, text_alone) = text_row.split_once(" | ").expect("two columns");
        let md_row = section
            .lines()
            .find(|l| l.starts_with(&format!("| {symbol} | binding_qx7_halo2 |")))
            .unwrap_or_else(|| panic!("no {symbol} row in\n{section}"));
        let cells: Vec<&str> = md_row.split('|').map(str::trim).collect();
        // cells: "", parameter, series, with, CI, alone, CI, unit, "".
        let md_with = format!("{} {}", cells[3], cells[4]);
        let md_alone = format!("{} {}", cells[5], cells[6]);
        assert_eq!(
            shown_numbers(&md_with),
            shown_numbers(text_with),
            "{md_row}"
        );
        assert_eq!(
            shown_numbers(&md_alone),
            shown_numbers(text_alone),
            "{md_row}"
        );
        assert!(text_with.trim_end().ends_with(cells[7]), "{text_row}");
    }
    // χ² and the degrees of freedom in the same words, χ² to the 4 decimals shown of
    // single_calorimetric.txt (statsmodels 0.15.0: 98.34556427896956, dof 10).
    let line = reference("single_calorimetric.txt");
    let summary = format!(
        "χ² = {:.4} over 10 ln K points and 2 calorimetric values, {} degrees of freedom.",
        line("chi2")[0],
        line("dof")[0]
    );
    assert!(block.contains(&summary), "{summary} not in\n{block}");
    assert!(section.contains(&summary), "{summary} not in\n{section}");
    assert!(section.contains("pulls ΔH° towards itself"), "{section}");

    // The results CSV: "ΔH° with ΔH_cal" and "ΔS° with ΔH_cal" at full precision (kJ/mol and
    // J/(mol·K)), χ² and the degrees of freedom.
    let csv = dir.join("with.csv");
    let mut csv_args = args.to_vec();
    let csv_arg = csv.to_string_lossy().into_owned();
    *csv_args.last_mut().unwrap() = &csv_arg;
    assert!(run(&csv_args).status.success());
    let csv = std::fs::read_to_string(&csv).unwrap();
    let cell = |name: &str, col: usize| -> f64 {
        let row = csv
            .lines()
            .find(|l| l.starts_with(&format!("{name},")))
            .unwrap_or_else(|| panic!("no {name} in\n{csv}"));
        row.split(',').nth(col).unwrap().parse().unwrap()
    };
    let (params, bse) = (line("params"), line("bse"));
    let rel = 1e-9; // the project's bar (issue 10), not a reference value
    assert!(close(cell("ΔH° with ΔH_cal", 1) * 1000.0, params[0], rel));
    assert!(close(cell("ΔH° with ΔH_cal", 2) * 1000.0, bse[0], rel));
    assert!(close(cell("ΔS° with ΔH_cal", 1), params[1], rel));
    assert!(close(cell("ΔS° with ΔH_cal", 2), bse[1], rel));
    assert!(close(cell("χ² with ΔH_cal", 1), line("chi2")[0], rel));
    assert_eq!(cell("degrees of freedom with ΔH_cal", 1), line("dof")[0]);

    // Without --calorimetric-in-fit: the comparisons, but no such table.
    let plain = dir.join("plain.md");
    let out = run(&[
        "fit",
        &path,
        "--calorimetric",
        cal,
        "--report",
        &plain.to_string_lossy(),
    ]);
    assert!(out.status.success());
    let plain = std::fs::read_to_string(&plain).unwrap().replace('\\', "");
    assert!(plain.contains("## Calorimetric ΔH°"));
    assert!(!plain.contains("with ΔH_cal"), "{plain}");
    assert!(!plain.contains("beside the fit of ln K alone"), "{plain}");
    let _ = std::fs::remove_dir_all(&dir);
}
