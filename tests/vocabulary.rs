//! One name for each concept (issue 11, "One vocabulary"; the table is in DEVELOPERS.md):
//! the command line's text, its JSON and a rendered report use the new names, and the old
//! ones are gone. The older flag `--absolute-sigma` is still read, with the same numbers as
//! `--sigma known-uncertainties`.

use crate::cli::{demo, json_of, run};

fn text_of(args: &[&str]) -> String {
    let out = run(args);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    String::from_utf8(out.stdout).expect("utf-8 output")
}

/// Every name in `new` is present and no name in `old` is, in `what`.
fn check_names(what: &str, text: &str, new: &[&str], old: &[&str]) {
    for n in new {
        assert!(text.contains(n), "{what}: no “{n}” in\n{text}");
    }
    for o in old {
        assert!(!text.contains(o), "{what}: the old name “{o}” in\n{text}");
    }
}

#[test]
fn the_sigma_convention_has_one_name_in_flag_and_json() {
    let path = demo("acid_pka.csv");
    let known = json_of(&run(&[
        "fit",
        &path,
        "--json",
        "--sigma",
        "known-uncertainties",
    ]));
    let old_flag = json_of(&run(&["fit", &path, "--json", "--absolute-sigma"]));
    let default = json_of(&run(&["fit", &path, "--json"]));
    assert_eq!(known["sigma_convention"], "known_uncertainties");
    assert_eq!(old_flag["sigma_convention"], "known_uncertainties");
    assert_eq!(default["sigma_convention"], "relative_weights");
    assert_eq!(known["weighting"], "inverse_variance");
    // The hidden old flag means exactly the new one.
    assert_eq!(known["params"], old_flag["params"]);
    assert_ne!(
        known["params"]["delta_h"]["se"],
        default["params"]["delta_h"]["se"]
    );
    let relative = json_of(&run(&[
        "fit",
        &path,
        "--json",
        "--sigma",
        "relative-weights",
    ]));
    assert_eq!(relative["params"], default["params"]);
    // The comparison's answer is named for what the data support.
    let c = &default["model_comparison"];
    assert!(c["supported_by_data"].is_string(), "{c}");
    assert!(c.get("preferred").is_none(), "{c}");
    // A value that is not a convention is refused as bad usage.
    assert_eq!(
        run(&["fit", &path, "--sigma", "absolute"]).status.code(),
        Some(2)
    );
    // The help lists both values with the words of the window.
    let help = text_of(&["fit", "--help"]);
    check_names(
        "fit --help",
        &help,
        &["known-uncertainties", "relative-weights"],
        &["--absolute-sigma"],
    );
}

#[test]
fn the_readable_output_uses_the_names_of_the_table() {
    // The binding demo has a flagged point (row 7), so the flagged list is printed.
    let path = demo("binding_qx7_halo2.csv");
    let text = text_of(&["fit", &path]);
    check_names(
        "vhfit fit",
        &text,
        &[
            "weighted by 1/σ²",
            "σ are relative weights only",
            "ext. stud. residual = ",
            "The data support the",
            "ΔG° at T_hm = ",
            "ΔG° at θ = 25.00 °C",
            "ΔAICc = AICc(larger model) − AICc(smaller model)",
        ],
        &[
            "t_ext",
            "preferred",
            "σ absolute",
            "|t| >",
            "at the mean temperature",
            "scaled convention",
        ],
    );
    let unweighted = text_of(&["fit", &path, "--unweighted"]);
    check_names(
        "vhfit fit --unweighted",
        &unweighted,
        &["unweighted"],
        &["equal weights", "weighted by 1/σ²"],
    );
}

#[test]
fn a_report_uses_the_names_of_the_table() {
    let dir = tempfile::tempdir().unwrap();
    let md = dir.path().join("binding.md");
    let path = demo("binding_qx7_halo2.csv");
    let out = run(&["fit", &path, "--report", md.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    // Markdown escapes punctuation with a backslash; the words are what is checked.
    let text = std::fs::read_to_string(&md).unwrap().replace('\\', "");
    check_names(
        "Markdown report",
        &text,
        &[
            "σ are relative weights only",
            "weighted by 1/σ²",
            "ext. stud. residual",
            "int. stud. residual",
            "externally studentized residual",
            "supported by the data",
            "The data support the",
            "is the weighted harmonic-mean temperature of the used points",
            "ΔAICc = AICc(larger model) − AICc(smaller model)",
            "(kJ/mol)²",
            "(J/(mol·K))²",
        ],
        &[
            "scaled by reduced χ²",
            "stud. res. (",
            "preferred",
            "The evidence prefers",
            "Internally studentized residual against",
            "covariance (SI)",
            "ΔS° / J/(mol·K)",
            "|t| >",
        ],
    );
    // The figures' axes: one name each.
    let mut svgs = String::new();
    for e in std::fs::read_dir(dir.path()).unwrap() {
        let p = e.unwrap().path();
        if p.extension().is_some_and(|x| x == "svg") {
            svgs.push_str(&std::fs::read_to_string(&p).unwrap());
        }
    }
    check_names(
        "report figures",
        &svgs,
        &["1000 K / T", "T / °C"],
        &["temperature /", "10³ K / T"],
    );
    let known = dir.path().join("known.md");
    let out = run(&[
        "fit",
        &path,
        "--sigma",
        "known-uncertainties",
        "--report",
        known.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let text = std::fs::read_to_string(&known).unwrap();
    check_names(
        "Markdown report, σ known",
        &text,
        &["σ are known standard uncertainties"],
        &["absolute"],
    );
}

/// The number after `prefix` in `text` (up to the next space or comma).
fn number_after(text: &str, prefix: &str) -> f64 {
    let rest = text
        .split(prefix)
        .nth(1)
        .unwrap_or_else(|| panic!("no “{prefix}” in\n{text}"));
    let word: String = rest
        .chars()
        .take_while(|c| !c.is_whitespace() && *c != ',')
        .collect();
    word.parse()
        .unwrap_or_else(|e| panic!("“{word}” after “{prefix}”: {e}"))
}

/// Predictions and reports come back in the quantity the file gave (issue 11, "shown as a
/// chemist reads it"): K_d in nM for the binding demo, pKa for the acid demo, and K in
/// ×10ⁿ notation, never "3.121e6".
#[test]
fn results_come_back_in_the_files_own_quantity() {
    let binding = demo("binding_qx7_halo2.csv");
    let text = text_of(&["predict", &binding, "--at", "25C", "--for-k", "1e7"]);
    // ln K at 25 °C from the JSON of the same prediction; K_d = c°/K with c° = 1 M = 10⁹ nM
    // (the definition the import uses, by hand).
    let j = json_of(&run(&["predict", &binding, "--at", "25C", "--json"]));
    let j_binding = j.clone();
    let ln_k = j["predictions"][0]["ln_k"]["value"]
        .as_f64()
        .or_else(|| j["predictions"][0]["ln_k"].as_f64())
        .unwrap_or_else(|| panic!("no ln K in {j}"));
    let kd = number_after(&text, "K_d = ");
    let want = 1e9 * (-ln_k).exp();
    assert!((kd - want).abs() <= 1e-3 * want, "{kd} against {want}");
    assert!(text.contains(" nM, 95% CI ["), "{text}");
    // K itself ×10ⁿ: the binding demo's K at 25 °C is of order 10⁶.
    assert!(text.contains(" × 10⁶"), "{text}");
    assert!(!text.contains("e7") && !text.contains("e6"), "{text}");
    // The target K is said in K_d too: K = 10⁷ is K_d = 100 nM.
    assert!(
        text.contains("temperature where K_d = 100.0 nM (K = 1.000 × 10⁷)"),
        "{text}"
    );

    // The target can be typed in the file's own quantity: K_d = 100 nM is K = 10⁷
    // (K = c°/K_d, c° = 1 M = 10⁹ nM), so the same temperature as --for-k 1e7.
    let by_value = text_of(&["predict", &binding, "--at", "25C", "--for-value", "100"]);
    let line = |t: &str| {
        t.lines()
            .find(|l| l.starts_with("temperature where"))
            .map(str::to_string)
            .unwrap_or_else(|| panic!("no target line in\n{t}"))
    };
    assert_eq!(line(&by_value), line(&text));
    // A pKa target: pKa 5 is K = 10⁻⁵ (pK = −log₁₀ K, definition), the same line as --for-k.
    let acid = demo("acid_pka.csv");
    let by_pka = text_of(&["predict", &acid, "--at", "25C", "--for-value", "5"]);
    let by_k = text_of(&["predict", &acid, "--at", "25C", "--for-k", "1e-5"]);
    assert_eq!(line(&by_pka), line(&by_k));
    assert!(line(&by_pka).contains("pKa = 5.000"), "{by_pka}");
    // A K_d of zero is no K at all: a usage error in words, exit 2.
    let out = run(&["predict", &binding, "--at", "25C", "--for-value", "0"]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("--for-value 0 is not a possible K_d"), "{err}");

    let text = text_of(&["predict", &acid, "--at", "25C"]);
    let j = json_of(&run(&["predict", &acid, "--at", "25C", "--json"]));
    let ln_k = j["predictions"][0]["ln_k"]["value"]
        .as_f64()
        .or_else(|| j["predictions"][0]["ln_k"].as_f64())
        .unwrap_or_else(|| panic!("no ln K in {j}"));
    let pka = number_after(&text, "pKa = ");
    // pKa = −log₁₀ K (definition).
    assert!((pka + ln_k / std::f64::consts::LN_10).abs() < 6e-4, "{pka}");
    assert!(text.contains(" × 10⁻"), "{text}");

    // The report's results give K_d at θ and at T_hm, in nM.
    let dir = tempfile::tempdir().unwrap();
    let md = dir.path().join("b.md");
    let out = run(&["fit", &binding, "--report", md.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let report = std::fs::read_to_string(&md).unwrap().replace('\\', "");
    assert!(report.contains("| K_d at θ = 25.00 °C |"), "{report}");
    assert!(report.contains("| K_d at T_hm = "), "{report}");
    assert!(report.contains("| nM |"), "{report}");

    // The results CSV carries the same row with plain numbers: K_d at θ = 25 °C against
    // c°/K from ln K at 298.15 K (the prediction's JSON above).
    let csv_path = dir.path().join("r.csv");
    let out = run(&["fit", &binding, "--report", csv_path.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(0), "{out:?}");
    let csv = std::fs::read_to_string(&csv_path).unwrap();
    let line = csv
        .lines()
        .find(|l| l.starts_with("K_d at θ = 25.00 °C,"))
        .unwrap_or_else(|| panic!("no K_d row in\n{csv}"));
    let cells: Vec<&str> = line.split(',').collect();
    assert_eq!(cells.last(), Some(&"nM"), "{line}");
    let kd: f64 = cells[1].parse().unwrap();
    let ln_k = j_binding["predictions"][0]["ln_k"]["value"]
        .as_f64()
        .unwrap();
    let want = 1e9 * (-ln_k).exp();
    assert!((kd - want).abs() <= 1e-9 * want, "{kd} against {want}");
}
