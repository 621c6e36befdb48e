//! The README's promises about the command line, one test each: the JSON null rules
//! (`sigma_ln_k` in an unweighted fit, excluded points' diagnostics, `aicc` and
//! `model_comparison` with three points, `t_at_k1`, `predict`'s `extrapolated` and
//! `warning`), `fit` on project files, report formats chosen by the suffix, file-order row
//! numbers in an unsorted file, the source's SHA-256 in the report, an A4 PDF with numbered
//! pages, the ΔCp° model's temperature for a target K (with its standard error, and "no
//! root"), a newer project refused and left byte for byte as it was, and the numbers of the
//! text table.
//!
//! Reference values come from statsmodels 0.15.0 (numpy 2.4.6), run by hand with the
//! script in `tests/data/promises_reference.py`, from the `sha256sum` command, or from the
//! library itself where the promise is that the command line and the library agree.

use crate::cli::{close, demo, json_of, library_fit, run, DEMOS};
use isochore_data::{import_path, ImportOptions, Project, SCHEMA_VERSION};
use isochore_fit::{fit, EnergyUnit, FitOptions, Model, TemperatureUnit, VantHoffFit, Weighting};
use serde_json::Value;
use std::path::{Path, PathBuf};

/// R, CODATA 2018 (8.314462618 J mol⁻¹ K⁻¹, exact since the 2019 SI); written out rather
/// than taken from the library so the test's model equation stands on its own.
const R: f64 = 8.314_462_618;

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn s(p: &Path) -> String {
    p.to_string_lossy().into_owned()
}

fn ok_json(args: &[&str]) -> Value {
    let out = run(args);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    json_of(&out)
}

fn ok_text(args: &[&str]) -> String {
    let out = run(args);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).expect("utf-8 output")
}

fn f(v: &Value) -> f64 {
    v.as_f64()
        .unwrap_or_else(|| panic!("expected a number, got {v}"))
}

fn warnings(j: &Value) -> Vec<String> {
    j["warnings"]
        .as_array()
        .expect("warnings is an array")
        .iter()
        .map(|w| w.as_str().expect("warnings are strings").to_string())
        .collect()
}

/// An unweighted file (no uncertainty column) whose rows are NOT in temperature order.
const UNSORTED: &str = "T (°C),K\n25,0.71\n10,1.20\n35,0.52\n15,1.01\n30,0.60\n20,0.85\n";

#[test]
fn unsorted_unweighted_file_keeps_file_rows_and_null_sigma() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "unsorted.csv", UNSORTED);
    let j = ok_json(&["fit", &s(&p), "--json"]);
    // statsmodels 0.15.0 OLS of ln K on [−1/(RT), 1/R] (tests/data/promises_reference.py).
    let h_ref = -24564.32021057816; // statsmodels 0.15.0, OLS params[0]
    let h_se_ref = 256.6182948333547; // statsmodels 0.15.0, OLS bse[0]
    let s_ref = -85.20264402174962; // statsmodels 0.15.0, OLS params[1]
    let s_se_ref = 0.8690680707036903; // statsmodels 0.15.0, OLS bse[1]
    let h = &j["params"]["delta_h"];
    assert!(close(f(&h["value"]), h_ref, 1e-9), "{h}");
    assert!(close(f(&h["se"]), h_se_ref, 1e-8), "{h}");
    let sp = &j["params"]["delta_s"];
    assert!(close(f(&sp["value"]), s_ref, 1e-9), "{sp}");
    assert!(close(f(&sp["se"]), s_se_ref, 1e-8), "{sp}");
    assert!(
        warnings(&j).iter().any(|w| w.contains("unweighted")),
        "the unweighted fit says so: {:?}",
        warnings(&j)
    );
    // Leverage and Cook's distance in FILE order, from statsmodels 0.15.0
    // OLSInfluence.hat_matrix_diag / cooks_distance[0].
    let leverage_ref = [
        0.1835929216145087,
        0.5401310296058615,
        0.5079057774986433,
        0.29302566470383695,
        0.2968962255461669,
        0.17844838103098826,
    ];
    let cooks_ref = [
        0.042352377961358684,
        0.41780256002315486,
        0.696530077966114,
        0.10603448802644226,
        0.4445426679877943,
        0.11355782439828513,
    ];
    // The file's own rows: (°C, K) of data row 1, 2, … as typed above.
    let file_rows = [
        (25.0, 0.71),
        (10.0, 1.20),
        (35.0, 0.52),
        (15.0, 1.01),
        (30.0, 0.60),
        (20.0, 0.85),
    ];
    let points = j["points"].as_array().unwrap();
    assert_eq!(points.len(), 6);
    let mut seen = [false; 6];
    for p in points {
        let row = p["row"].as_u64().unwrap() as usize;
        assert!((1..=6).contains(&row), "{p}");
        seen[row - 1] = true;
        let (tc, k) = file_rows[row - 1];
        assert!(close(f(&p["t_k"]), tc + 273.15, 1e-12), "row {row}: {p}");
        assert!(close(f(&p["ln_k"]), f64::ln(k), 1e-12), "row {row}: {p}");
        assert!(p["sigma_ln_k"].is_null(), "unweighted: {p}");
        assert!(
            close(f(&p["leverage"]), leverage_ref[row - 1], 1e-8),
            "row {row}: {p}"
        );
        assert!(
            close(f(&p["cooks_d"]), cooks_ref[row - 1], 1e-7),
            "row {row}: {p}"
        );
    }
    assert!(seen.iter().all(|&x| x), "every file row appears once");
    // --exclude takes the FILE row too: row 2 is the 10 °C point, wherever it sorts.
    let j = ok_json(&["fit", &s(&p), "--json", "--exclude", "2"]);
    let excluded: Vec<&Value> = j["points"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|p| p["used"] == false)
        .collect();
    assert_eq!(excluded.len(), 1);
    assert_eq!(excluded[0]["row"], 2);
    assert!(close(f(&excluded[0]["t_k"]), 283.15, 1e-12));
    // The text table names the same row and its physical line (header is line 1).
    let text = ok_text(&["fit", &s(&p), "--exclude", "2"]);
    assert!(text.contains("row 2 (line 3)"), "{text}");
}

#[test]
fn three_points_give_null_aicc_and_model_comparison() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(
        dir.path(),
        "three.csv",
        "T (°C),K,sigma_K\n10,1.20,0.05\n20,0.85,0.04\n30,0.60,0.03\n",
    );
    let j = ok_json(&["fit", &s(&p), "--json"]);
    assert_eq!(j["n_used"], 3);
    assert!(j["aicc"].is_null(), "AICc needs n > k + 1: {}", j["aicc"]);
    assert!(j["model_comparison"].is_null(), "{}", j["model_comparison"]);
    assert!(j["bic"].is_number());
    let text = ok_text(&["fit", &s(&p)]);
    assert!(
        text.contains("model comparison: not possible"),
        "the table says why: {text}"
    );
    // Four points: the comparison exists but its ΔAICc is null (the ΔCp° model's AICc needs
    // n > 5), never a number standing in for "undefined".
    let p = write(
        dir.path(),
        "four.csv",
        "T (°C),K,sigma_K\n10,1.20,0.05\n20,0.85,0.04\n30,0.60,0.03\n40,0.45,0.03\n",
    );
    let j = ok_json(&["fit", &s(&p), "--json"]);
    assert!(
        j["model_comparison"].is_object(),
        "{}",
        j["model_comparison"]
    );
    assert!(j["model_comparison"]["delta_aicc"].is_null());
    assert!(j["model_comparison"]["f_p_value"].is_number());
}

#[test]
fn excluded_points_have_fitted_and_residual_but_null_diagnostics() {
    let path = demo("acid_pka.csv");
    let j = ok_json(&["fit", &path, "--json", "--exclude", "3,7"]);
    let lib = library_fit(&path, &[3, 7], FitOptions::default());
    let points = j["points"].as_array().unwrap();
    assert_eq!(points.len(), 12);
    for (p, d) in points.iter().zip(lib.points()) {
        let row = p["row"].as_u64().unwrap();
        let excluded = row == 3 || row == 7;
        assert_eq!(p["used"], !excluded, "{p}");
        // fitted and residual always: the fit line at the point (library's numbers).
        assert!(close(f(&p["fitted"]), d.fitted, 1e-12), "{p}");
        assert!(close(f(&p["residual"]), d.residual, 1e-9), "{p}");
        for key in ["student_int", "student_ext", "cooks_d", "dffits"] {
            if excluded {
                assert!(p[key].is_null(), "row {row}: {key} must be null: {p}");
            } else {
                assert!(p[key].is_number(), "row {row}: {key} must be a number: {p}");
            }
        }
    }
    // The fitted value of an excluded point is the line through the others: ln K̂ = −ΔH°/(RT)
    // + ΔS°/R from the JSON's own parameters (linear model, definition).
    let h = f(&j["params"]["delta_h"]["value"]);
    let sv = f(&j["params"]["delta_s"]["value"]);
    let p3 = &points[2];
    let t = f(&p3["t_k"]);
    assert!(close(f(&p3["fitted"]), -h / (R * t) + sv / R, 1e-10));
}

#[test]
fn t_at_k1_is_null_when_k_never_reaches_one() {
    // An exothermic reaction with a positive ΔS° (ΔH° ≈ −20 kJ/mol, ΔS° ≈ +50 J/(mol·K),
    // invented): ln K = −ΔH°/(RT) + ΔS°/R > 0 at every positive T, so K = 1 has no
    // temperature.
    let dir = tempfile::tempdir().unwrap();
    let p = write(
        dir.path(),
        "exo.csv",
        "T (°C),K\n10,2.084e+06\n15,1.64e+06\n20,1.51e+06\n25,1.29e+06\n30,1.132e+06\n35,9.999e+05\n40,8.514e+05\n",
    );
    let j = ok_json(&["fit", &s(&p), "--json"]);
    let h = f(&j["params"]["delta_h"]["value"]);
    let sv = f(&j["params"]["delta_s"]["value"]);
    assert!(
        h < 0.0 && sv > 0.0,
        "the data are what they claim: {h}, {sv}"
    );
    assert!(j["t_at_k1"].is_null(), "{}", j["t_at_k1"]);
    let lib = library_fit(&s(&p), &[], FitOptions::default());
    assert!(lib.t_at_k1().is_none());
    // Where it exists it is {value, se, extrapolated}.
    let j = ok_json(&["fit", &demo("binding_qx7_halo2.csv"), "--json", "--summary"]);
    let t1 = &j["t_at_k1"];
    assert!(t1["value"].is_number() && t1["se"].is_number() && t1["extrapolated"].is_boolean());
}

#[test]
fn predict_marks_extrapolation_and_warns_only_then() {
    let path = demo("acid_pka.csv");
    let j = ok_json(&["predict", &path, "--at", "25,90", "--json"]);
    let (lo, hi) = (f(&j["t_min_k"]), f(&j["t_max_k"]));
    // The demo file's own range: 278.15 to 333.15 K (assets/demo/acid_pka.csv).
    assert!(close(lo, 278.15, 1e-12) && close(hi, 333.15, 1e-12));
    let inside = &j["predictions"][0];
    assert!(close(f(&inside["t_k"]), 298.15, 1e-12));
    assert_eq!(inside["extrapolated"], false);
    assert!(inside["warning"].is_null(), "{}", inside["warning"]);
    let outside = &j["predictions"][1];
    assert!(close(f(&outside["t_k"]), 363.15, 1e-12));
    assert_eq!(outside["extrapolated"], true);
    let w = outside["warning"].as_str().expect("a warning in words");
    assert!(w.contains("363.15") && w.contains("extrapolation"), "{w}");
    assert!(
        w.contains("278.15") && w.contains("333.15"),
        "names the range: {w}"
    );
    // Every interval of a prediction is {value, se, ci_low, ci_high[, pi_low, pi_high]}.
    for key in ["ln_k", "k"] {
        for part in ["value", "se", "ci_low", "ci_high", "pi_low", "pi_high"] {
            assert!(inside[key][part].is_number(), "{key}.{part}");
        }
    }
    for key in ["delta_g", "delta_h", "delta_s"] {
        for part in ["value", "se", "ci_low", "ci_high"] {
            assert!(inside[key][part].is_number(), "{key}.{part}");
        }
    }
}

/// A project with the two demos as data sets: an exclusion with a reason in the first, the
/// ΔCp° model and a 90 % level in the second.
fn demo_project(dir: &Path) -> (PathBuf, Project) {
    let mut project =
        Project::from_import(&import_path(demo(DEMOS[1]), &ImportOptions::default()).unwrap());
    project.add_import(&import_path(demo(DEMOS[0]), &ImportOptions::default()).unwrap());
    project.series[0]
        .exclude(7, "baseline drift during titration", "2026-12-02T10:00:00Z")
        .unwrap();
    project.series[1].settings.fit.model = Model::CONSTANT_CP;
    project.series[1].settings.fit.level = 0.9;
    let path = dir.join("demo.isochore.json");
    project.save_atomic(&path).unwrap();
    (path, project)
}

fn project_fit(project: &Project, i: usize) -> VantHoffFit {
    let series = &project.series[i];
    let m = series.measurements().unwrap();
    let mut o = series.settings.fit;
    if m.iter().all(|p| p.sigma_ln_k.is_none()) {
        o.weighting = Weighting::Unweighted;
    }
    fit(&m, &o).unwrap()
}

#[test]
fn fit_reads_project_files_with_their_exclusions_and_settings() {
    let dir = tempfile::tempdir().unwrap();
    let (path, project) = demo_project(dir.path());
    let j = ok_json(&["fit", &s(&path), "--json"]);
    let arr = j.as_array().expect("two data sets give an array");
    assert_eq!(arr.len(), 2);
    for (i, item) in arr.iter().enumerate() {
        let lib = project_fit(&project, i);
        assert_eq!(item["source"], s(&path).as_str());
        assert_eq!(item["model"], lib.model().key());
        assert_eq!(item["level"], lib.options().level);
        assert_eq!(item["n_used"].as_u64().unwrap() as usize, lib.n_used());
        assert!(close(
            f(&item["params"]["delta_h"]["value"]),
            lib.delta_h().value,
            1e-12
        ));
        assert!(close(
            f(&item["params"]["delta_h"]["se"]),
            lib.delta_h().se,
            1e-12
        ));
    }
    assert_eq!(arr[0]["points"][0]["series"], "binding_qx7_halo2");
    assert_eq!(arr[1]["points"][0]["series"], "acid_pka");
    assert_eq!(arr[0]["points"][6]["row"], 7);
    assert_eq!(
        arr[0]["points"][6]["used"], false,
        "the project's exclusion"
    );
    assert_eq!(arr[0]["n_used"], 9);
    assert_eq!(arr[1]["model"], "cp");
    assert_eq!(arr[1]["level"], 0.9);
    assert!(arr[1]["params"]["delta_cp"]["value"].is_number());
    // Against the same data fitted from the CSV without the project: the exclusion moved ΔH°.
    let plain = library_fit(&demo(DEMOS[1]), &[], FitOptions::default());
    assert!(f(&arr[0]["params"]["delta_h"]["value"]) != plain.delta_h().value);
    // --exclude adds to the project's exclusions; the reason of each is in the text table.
    let one = dir.path().join("one.isochore.json");
    let mut single = project.clone();
    single.series.truncate(1);
    single.save_atomic(&one).unwrap();
    let text = ok_text(&["fit", &s(&one), "--exclude", "2"]);
    assert!(
        text.contains("row 7 (line 9): baseline drift during titration"),
        "{text}"
    );
    assert!(
        text.contains("row 2 (line 4): excluded on the command line"),
        "{text}"
    );
    // The project file itself is read, never written.
    let before = std::fs::read(&one).unwrap();
    let _ = ok_json(&["fit", &s(&one), "--json", "--summary"]);
    assert_eq!(std::fs::read(&one).unwrap(), before);
}

#[test]
fn a_newer_project_is_refused_and_left_byte_for_byte() {
    let dir = tempfile::tempdir().unwrap();
    let (path, project) = demo_project(dir.path());
    let mut v: Value = serde_json::from_str(&project.to_json()).unwrap();
    v["schema_version"] = Value::from(SCHEMA_VERSION + 1);
    let text = serde_json::to_string_pretty(&v).unwrap();
    std::fs::write(&path, &text).unwrap();
    let listing = |d: &Path| {
        let mut names: Vec<String> = std::fs::read_dir(d)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        names.sort();
        names
    };
    let before = listing(dir.path());
    let report = dir.path().join("r.html");
    let (ps, rs) = (s(&path), s(&report));
    for args in [
        vec!["fit", ps.as_str(), "--json"],
        vec!["fit", ps.as_str()],
        vec!["predict", ps.as_str(), "--at", "25"],
        vec!["fit", ps.as_str(), "--report", rs.as_str()],
    ] {
        let out = run(&args);
        assert_eq!(out.status.code(), Some(1), "{args:?}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(err.contains("newer"), "{args:?}: {err}");
        assert!(err.contains("demo.isochore.json"), "names the file: {err}");
        assert_eq!(
            std::fs::read_to_string(&path).unwrap(),
            text,
            "{args:?}: the file is left as it was"
        );
        assert_eq!(listing(dir.path()), before, "{args:?}: nothing added");
    }
}

#[test]
fn report_format_follows_the_suffix() {
    let path = demo("acid_pka.csv");
    for ext in ["html", "md", "csv", "svg", "png", "pdf"] {
        let dir = tempfile::tempdir().unwrap();
        // `r.csv` is the results table (tests/headless.rs); `r-data.csv` the data table.
        let name = match ext {
            "csv" => "r-data.csv".to_string(),
            _ => format!("r.{ext}"),
        };
        let target = dir.path().join(name);
        let out = run(&["fit", &path, "--summary", "--report", &s(&target)]);
        assert_eq!(
            out.status.code(),
            Some(0),
            "{ext}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        let bytes = std::fs::read(&target).unwrap_or_else(|e| panic!("{ext}: {e}"));
        // The report files, leaving out the manifest the command line keeps of the files
        // it wrote (".isochore-written", isochore_report::guard).
        let mut names: Vec<String> = std::fs::read_dir(dir.path())
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .filter(|n| n != ".isochore-written")
            .collect();
        names.sort();
        let text = || String::from_utf8(bytes.clone()).expect("text formats are UTF-8");
        match ext {
            "html" => {
                let t = text();
                assert!(t.starts_with("<!DOCTYPE html>"), "{}", &t[..60]);
                assert!(t.trim_end().ends_with("</html>"));
                assert!(t.contains("<svg"), "figures inline");
                assert_eq!(names, ["r.html"]);
            }
            "md" => {
                let t = text();
                assert!(t.starts_with("# "), "a Markdown title: {}", &t[..60]);
                assert!(t.contains("\n## "), "Markdown sections");
                assert!(t.contains("\n| "), "Markdown tables");
                assert!(!t.contains("<html"), "not HTML");
                assert!(t.contains("](r-vanthoff.svg)"), "figures beside it");
                // The Markdown and its four figures, nothing else.
                assert_eq!(
                    names,
                    [
                        "r-ellipse.svg",
                        "r-influence.svg",
                        "r-residuals.svg",
                        "r-vanthoff.svg",
                        "r.md"
                    ]
                );
                for n in &names[..4] {
                    let svg = std::fs::read_to_string(dir.path().join(n)).unwrap();
                    roxmltree::Document::parse(&svg).expect("figure SVG parses");
                }
            }
            "csv" => {
                let t = text();
                let header = t.lines().next().unwrap();
                assert!(
                    header.starts_with("row,line,") && header.contains(",t_k,ln_k,"),
                    "the data table: {header}"
                );
                let cols = header.split(',').count();
                assert_eq!(t.lines().count(), 13, "a header and 12 rows");
                // Every data line has as many fields as the header (no quoted commas in
                // this demo's numeric rows before the flags column).
                for l in t.lines().skip(1) {
                    assert!(l.split(',').count() >= cols, "{l}");
                }
                assert_eq!(names, ["r-data.csv"]);
            }
            "svg" => {
                let t = text();
                let doc = roxmltree::Document::parse(&t).expect("SVG parses");
                assert_eq!(doc.root_element().tag_name().name(), "svg");
                assert_eq!(
                    doc.root_element().tag_name().namespace(),
                    Some("http://www.w3.org/2000/svg")
                );
                assert!(doc.descendants().count() > 20);
                assert_eq!(names, ["r.svg"]);
            }
            "png" => {
                // PNG signature, then the IHDR chunk (ISO/IEC 15948 §5.2, §11.2.2).
                assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
                assert_eq!(&bytes[12..16], b"IHDR");
                let width = u32::from_be_bytes([bytes[16], bytes[17], bytes[18], bytes[19]]);
                assert!(width >= 1900, "300 dpi: {width}");
                assert_eq!(&bytes[bytes.len() - 8..bytes.len() - 4], b"IEND");
                assert_eq!(names, ["r.png"]);
            }
            "pdf" => {
                assert!(bytes.starts_with(b"%PDF-"));
                lopdf::Document::load_mem(&bytes).expect("lopdf opens it");
                assert_eq!(names, ["r.pdf"]);
            }
            _ => unreachable!(),
        }
    }
}

/// SHA-256 of a file from the system's own tool, independent of the program's hashing.
fn sha256_by_tool(path: &Path) -> String {
    let out = std::process::Command::new("sha256sum")
        .arg(path)
        .output()
        .or_else(|_| {
            std::process::Command::new("shasum")
                .args(["-a", "256"])
                .arg(path)
                .output()
        })
        .expect("sha256sum (coreutils) or shasum is needed for this test");
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    let hex = text.split_whitespace().next().unwrap().to_ascii_lowercase();
    assert_eq!(hex.len(), 64, "{text}");
    hex
}

#[test]
fn reports_record_the_source_sha256() {
    let dir = tempfile::tempdir().unwrap();
    for name in DEMOS {
        let path = demo(name);
        let digest = sha256_by_tool(Path::new(&path));
        for ext in ["html", "md"] {
            let target = dir.path().join(format!("r.{ext}"));
            let _ = ok_text(&["fit", &path, "--summary", "--report", &s(&target)]);
            let text = std::fs::read_to_string(&target).unwrap();
            assert!(
                text.to_ascii_lowercase().contains(&digest),
                "{name} {ext}: no {digest}"
            );
        }
    }
    // Through a project, the digest is still that of the original data file.
    let (project, _) = demo_project(dir.path());
    let mut one = Project::load(&project).unwrap();
    one.series.truncate(1);
    let p1 = dir.path().join("one.isochore.json");
    one.save_atomic(&p1).unwrap();
    let target = dir.path().join("p.html");
    let _ = ok_text(&["fit", &s(&p1), "--report", &s(&target)]);
    let html = std::fs::read_to_string(&target).unwrap();
    assert!(html.contains(&sha256_by_tool(Path::new(&demo(DEMOS[1])))));
}

/// A page's MediaBox, its own or inherited from the page tree.
fn media_box(doc: &lopdf::Document, page: lopdf::ObjectId) -> Vec<f64> {
    let mut id = page;
    loop {
        let dict = doc.get_dictionary(id).unwrap();
        if let Ok(b) = dict.get(b"MediaBox") {
            let arr = match b {
                lopdf::Object::Reference(r) => doc.get_object(*r).unwrap().as_array().unwrap(),
                o => o.as_array().unwrap(),
            };
            return arr
                .iter()
                .map(|o| match o {
                    lopdf::Object::Integer(i) => *i as f64,
                    lopdf::Object::Real(r) => f64::from(*r),
                    other => panic!("MediaBox entry {other:?}"),
                })
                .collect();
        }
        id = dict
            .get(b"Parent")
            .and_then(lopdf::Object::as_reference)
            .expect("a page without MediaBox has a parent that gives it");
    }
}

#[test]
fn pdf_is_a4_with_numbered_pages() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("r.pdf");
    let _ = ok_text(&[
        "fit",
        &demo("binding_qx7_halo2.csv"),
        "--report",
        &s(&target),
    ]);
    let doc = lopdf::Document::load(&target).unwrap();
    let pages = doc.get_pages();
    let n = pages.len();
    assert!(n >= 2, "a real document: {n} page(s)");
    for (&number, &id) in &pages {
        // A4 is 210 × 297 mm (ISO 216) = 595.28 × 841.89 pt at 72 pt per inch.
        let b = media_box(&doc, id);
        assert_eq!(b.len(), 4);
        assert!(b[0].abs() < 0.01 && b[1].abs() < 0.01, "{b:?}");
        assert!((b[2] - b[0] - 595.28).abs() < 0.5, "width {b:?}");
        assert!((b[3] - b[1] - 841.89).abs() < 0.5, "height {b:?}");
        let text = doc
            .extract_text(&[number])
            .unwrap_or_else(|e| panic!("page {number}: no text: {e}"));
        let label = format!("page {number} of {n}");
        assert!(
            text.contains(&label),
            "page {number} carries '{label}': {text:?}"
        );
    }
}

/// ln K(T) of the constant-ΔCp° model from ΔH°(θ), ΔS°(θ), ΔCp° (textbook integration of
/// the van 't Hoff equation with ΔH°(T) = ΔH°(θ) + ΔCp°(T − θ); from memory):
/// ln K = −ΔH°(θ)/(RT) + ΔS°(θ)/R + ΔCp°/R · (ln(T/θ) + θ/T − 1).
fn ln_k_cp(b: [f64; 3], theta: f64, t: f64) -> f64 {
    -b[0] / (R * t) + b[1] / R + b[2] / R * ((t / theta).ln() + theta / t - 1.0)
}

/// Every root of ln K(T) = target in [lo, hi], by a scan of 20 000 steps and bisection.
fn roots(b: [f64; 3], theta: f64, target: f64, lo: f64, hi: f64) -> Vec<f64> {
    let g = |t: f64| ln_k_cp(b, theta, t) - target;
    let n = 20_000;
    let mut out = Vec::new();
    let step = (hi - lo) / n as f64;
    for i in 0..n {
        let (mut a, mut c) = (lo + step * i as f64, lo + step * (i + 1) as f64);
        if g(a).signum() == g(c).signum() {
            continue;
        }
        for _ in 0..200 {
            let m = 0.5 * (a + c);
            if g(m).signum() == g(a).signum() {
                a = m;
            } else {
                c = m;
            }
        }
        out.push(0.5 * (a + c));
    }
    out
}

fn params3(j: &Value) -> [f64; 3] {
    let p = &j["params"];
    [
        f(&p["delta_h"]["value"]),
        f(&p["delta_s"]["value"]),
        f(&p["delta_cp"]["value"]),
    ]
}

#[test]
fn cp_model_temperature_for_a_target_k_with_its_standard_error() {
    let path = demo("acid_pka.csv");
    let target_k: f64 = 5e-8; // pKa 7.30, inside the demo's range (7.62 to 6.80)
    let fitted = ok_json(&["fit", &path, "--json", "--model", "cp", "--summary"]);
    let b = params3(&fitted);
    let theta = f(&fitted["t_ref_k"]);
    let cov: Vec<Vec<f64>> = fitted["cov"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r.as_array().unwrap().iter().map(f).collect())
        .collect();
    let j = ok_json(&[
        "predict", &path, "--model", "cp", "--at", "25", "--for-k", "5e-8", "--json",
    ]);
    let t = f(&j["for_k"]["t_k"]["value"]);
    let se = f(&j["for_k"]["t_k"]["se"]);
    assert_eq!(j["for_k"]["extrapolated"], false);
    // The temperature really solves ln K(T) = ln K_target on the reported curve…
    assert!(
        (ln_k_cp(b, theta, t) - target_k.ln()).abs() < 1e-8,
        "ln K({t}) = {} vs {}",
        ln_k_cp(b, theta, t),
        target_k.ln()
    );
    // …and is, of the roots in the searched range (a third of the lowest to three times the
    // highest measured temperature), found independently, the one inside the data: the
    // curve turns over and comes back to the target near 874 K, far outside 278–333 K.
    let all = roots(b, theta, target_k.ln(), 278.15 / 3.0, 333.15 * 3.0);
    assert!(!all.is_empty() && all.len() <= 2, "{all:?}");
    let inside: Vec<f64> = all
        .iter()
        .copied()
        .filter(|r| (278.15..=333.15).contains(r))
        .collect();
    assert_eq!(inside.len(), 1, "{all:?}");
    assert!((inside[0] - t).abs() < 1e-6, "{all:?} vs {t}");
    // Standard error by the delta method with a numerical gradient of the root with respect
    // to (ΔH°, ΔS°, ΔCp°), each root found again by the test's own bisection.
    let root_of = |bb: [f64; 3]| {
        let r = roots(bb, theta, target_k.ln(), t - 20.0, t + 20.0);
        assert_eq!(r.len(), 1);
        r[0]
    };
    let mut grad = [0.0; 3];
    for (i, g) in grad.iter_mut().enumerate() {
        let h = 1e-4 * cov[i][i].sqrt();
        let (mut up, mut down) = (b, b);
        up[i] += h;
        down[i] -= h;
        *g = (root_of(up) - root_of(down)) / (2.0 * h);
    }
    let var: f64 = (0..3)
        .flat_map(|a| (0..3).map(move |c| (a, c)))
        .map(|(a, c)| grad[a] * cov[a][c] * grad[c])
        .sum();
    assert!(close(se, var.sqrt(), 1e-4), "SE {se} vs {}", var.sqrt());
    // The library gives the same answer.
    let lib = library_fit(
        &path,
        &[],
        FitOptions {
            model: Model::CONSTANT_CP,
            ..FitOptions::default()
        },
    );
    let e = lib.temperature_for_k(target_k).unwrap();
    assert!(close(t, e.value, 1e-12) && close(se, e.se, 1e-10));
    // The text says the same temperature (the demo's unit is K).
    let text = ok_text(&[
        "predict",
        &path,
        "--model",
        "cp",
        "--at",
        "25",
        "--for-k",
        "5e-8",
        "--temp-unit",
        "K",
    ]);
    // "temperature where pKa = 7.301 (K = 5.000 × 10⁻⁸): 295.33 K (SE 0.27 K; …)".
    let want = format!(": {:.2} K (SE {:.2} K", t, se);
    assert!(text.contains(&want), "{want} in\n{text}");
}

/// Invented data whose ln K has a maximum near 0 at 25 °C (ΔH°(θ) ≈ 0, ΔS°(θ) ≈ 0,
/// ΔCp° ≈ −1000 J/(mol·K)), K ≤ 1 everywhere.
const HUMP: &str = "T (°C),K,sigma_K\n5,0.7432,0.0074\n10,0.8521,0.0085\n15,0.9291,0.0093\n\
20,0.9741,0.0097\n25,0.9955,0.0100\n30,0.9739,0.0097\n35,0.9379,0.0094\n40,0.8788,0.0088\n\
45,0.7765,0.0078\n";

#[test]
fn cp_model_says_no_root_when_k_is_out_of_reach() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "hump.csv", HUMP);
    let fitted = ok_json(&["fit", &s(&p), "--json", "--model", "cp", "--summary"]);
    // statsmodels 0.15.0 WLS, weights 1/σ_lnK², same design (tests/data/promises_reference.py).
    let b_ref = [61.4130361690982, 0.16781502110160326, -972.8857412823895];
    let se_ref = [141.99205461688595, 0.474540853551534, 24.784180414413868];
    let b = params3(&fitted);
    for (i, key) in ["delta_h", "delta_s", "delta_cp"].into_iter().enumerate() {
        // ΔH°(θ) and ΔS°(θ) are near zero, so compare on the scale of their SE.
        assert!(
            (b[i] - b_ref[i]).abs() < 1e-7 * se_ref[i],
            "{key}: {} vs statsmodels {}",
            b[i],
            b_ref[i]
        );
        let se = f(&fitted["params"][key]["se"]);
        assert!(
            close(se, se_ref[i], 1e-7),
            "{key} SE: {se} vs {}",
            se_ref[i]
        );
    }
    assert!(fitted["t_at_k1"].is_null(), "K stays below 1 here");
    let theta = f(&fitted["t_ref_k"]);
    // Independent check that K = 10 is never reached: the largest ln K over the searched
    // range (and far beyond) stays below ln 10.
    let max = (1..=100_000)
        .map(|i| ln_k_cp(b, theta, 10.0 + i as f64 * 0.02))
        .fold(f64::NEG_INFINITY, f64::max);
    assert!(max < 10f64.ln(), "{max}");
    let j = ok_json(&[
        "predict",
        &s(&p),
        "--model",
        "cp",
        "--at",
        "25",
        "--for-k",
        "10",
        "--json",
    ]);
    assert!(j["for_k"]["t_k"].is_null(), "{}", j["for_k"]);
    let err = j["for_k"]["error"].as_str().expect("the reason in words");
    assert!(err.contains("never reaches"), "{err}");
    let text = ok_text(&[
        "predict",
        &s(&p),
        "--model",
        "cp",
        "--at",
        "25",
        "--for-k",
        "10",
    ]);
    assert!(text.contains("never reaches 10"), "{text}");
    let lib = library_fit(
        &s(&p),
        &[],
        FitOptions {
            model: Model::CONSTANT_CP,
            ..FitOptions::default()
        },
    );
    assert!(lib.temperature_for_k(10.0).is_err());
    // A target under the maximum has two roots, one on each side; the answer is one of them
    // and is the library's.
    let j = ok_json(&[
        "predict",
        &s(&p),
        "--model",
        "cp",
        "--at",
        "25",
        "--for-k",
        "0.9",
        "--json",
    ]);
    let t = f(&j["for_k"]["t_k"]["value"]);
    let all = roots(b, theta, 0.9f64.ln(), 278.15 / 3.0, 318.15 * 3.0);
    assert_eq!(all.len(), 2, "{all:?}");
    assert!(
        all.iter().any(|r| (r - t).abs() < 1e-6),
        "{t} not in {all:?}"
    );
    assert!(close(t, lib.temperature_for_k(0.9).unwrap().value, 1e-12));
}

/// A number printed with some decimals, and the half unit of its last digit.
fn printed(cell: &str) -> (f64, f64) {
    let c = cell.trim().trim_start_matches('±').trim();
    let v: f64 = c
        .parse()
        .unwrap_or_else(|_| panic!("'{cell}' is not a number"));
    let decimals = c.split_once('.').map_or(0, |(_, d)| d.len());
    (
        v,
        0.5 * 10f64.powi(-(decimals as i32)) * (1.0 + 1e-9) + 1e-12,
    )
}

fn assert_printed(cell: &str, want: f64, what: &str) {
    let (v, tol) = printed(cell);
    assert!(
        (v - want).abs() <= tol,
        "{what}: printed {cell}, library {want}"
    );
}

/// The columns of the results table: quantity, value, ± SE, [low, high], unit.
fn result_rows(text: &str) -> Vec<[String; 5]> {
    let mut rows = Vec::new();
    let mut inside = false;
    for line in text.lines() {
        if line.trim_start().starts_with("quantity") {
            inside = true;
            continue;
        }
        if inside {
            if line.trim().is_empty() {
                break;
            }
            let cols: Vec<String> = line
                .split("  ")
                .map(str::trim)
                .filter(|c| !c.is_empty())
                .map(String::from)
                .collect();
            // The constant in the file's quantity has no SE (its interval is not
            // symmetric), and a pKa no unit: [quantity, value, [low, high], unit?].
            if cols.len() < 5 && !cols[0].starts_with('Δ') && !cols[0].starts_with('T') {
                assert!(cols.len() >= 3, "{line:?} → {cols:?}");
                let unit = cols.get(3).cloned().unwrap_or_default();
                rows.push([
                    cols[0].clone(),
                    cols[1].clone(),
                    String::new(),
                    cols[2].clone(),
                    unit,
                ]);
                continue;
            }
            assert_eq!(cols.len(), 5, "{line:?} → {cols:?}");
            rows.push([
                cols[0].clone(),
                cols[1].clone(),
                cols[2].clone(),
                cols[3].clone(),
                cols[4].clone(),
            ]);
        }
    }
    rows
}

fn statistic<'a>(text: &'a str, name: &str) -> &'a str {
    text.lines()
        .find_map(|l| {
            let t = l.trim_start();
            t.strip_prefix(name)
                .filter(|rest| rest.starts_with("  "))
                .map(str::trim)
        })
        .unwrap_or_else(|| panic!("no statistic '{name}' in\n{text}"))
}

#[test]
fn text_table_numbers_match_the_library() {
    let mut compared = 0;
    for name in DEMOS {
        let path = demo(name);
        // The file's temperature unit: the acid demo is in K, the binding demo in °C.
        let unit = if name == "acid_pka.csv" {
            TemperatureUnit::Kelvin
        } else {
            TemperatureUnit::Celsius
        };
        for (model, energy) in [
            (Model::LINEAR, EnergyUnit::KilojoulePerMole),
            (Model::CONSTANT_CP, EnergyUnit::KilojoulePerMole),
            (Model::LINEAR, EnergyUnit::KilocaloriePerMole),
        ] {
            let lib = library_fit(
                &path,
                &[],
                FitOptions {
                    model,
                    ..FitOptions::default()
                },
            );
            let mut args = vec!["fit", path.as_str()];
            if model == Model::CONSTANT_CP {
                args.extend(["--model", "cp"]);
            }
            // 1 kJ = 1000 J; 1 kcal (thermochemical) = 4184 J exactly (NIST SP 811, B.8).
            let (per, e_unit) = if energy == EnergyUnit::KilocaloriePerMole {
                args.extend(["--energy", "kcal"]);
                (4184.0, "kcal/mol")
            } else {
                (1000.0, "kJ/mol")
            };
            let (s_per, s_unit) = if energy == EnergyUnit::KilocaloriePerMole {
                (4.184, "cal/(mol·K)")
            } else {
                (1.0, "J/(mol·K)")
            };
            let text = ok_text(&args);
            let rows = result_rows(&text);
            assert!(rows.len() >= 6, "{text}");
            for r in &rows {
                let [q, v, se, ci, u] = r;
                let (lo, hi) = ci
                    .trim_start_matches('[')
                    .trim_end_matches(']')
                    .split_once(", ")
                    .unwrap_or_else(|| panic!("{ci}"));
                if se.is_empty() {
                    // The constant in the file's quantity at θ or T_hm, by hand from the
                    // library's ln K there: pKa = −ln K / ln 10; K_d = c°/K with c° = 1 M
                    // = 10⁹ nM (definitions; the binding demo is in nM).
                    let at = if q.contains("T_hm") {
                        lib.at_harmonic().t_k
                    } else {
                        lib.at_reference().t_k
                    };
                    let p = lib.predict(at).unwrap().ln_k;
                    let (value, a, b, want_unit) = if q.starts_with("pKa") {
                        let f = |l: f64| -l / std::f64::consts::LN_10;
                        (f(p.value), f(p.ci.high), f(p.ci.low), "")
                    } else {
                        assert!(q.starts_with("K_d"), "{q}");
                        let f = |l: f64| 1e9 * (-l).exp();
                        (f(p.value), f(p.ci.high), f(p.ci.low), "nM")
                    };
                    assert_eq!(u, want_unit, "{name}: {q}");
                    assert_printed(v, value, q);
                    assert_printed(lo, a, q);
                    assert_printed(hi, b, q);
                    compared += 1;
                    continue;
                }
                let (est, scale, want_unit, offset) = if q.starts_with("ΔCp°") {
                    (lib.delta_cp().unwrap(), s_per, s_unit, 0.0)
                } else if q.starts_with("T where K = 1") {
                    let off = if unit == TemperatureUnit::Celsius {
                        273.15
                    } else {
                        0.0
                    };
                    let u_t = if off > 0.0 { "°C" } else { "K" };
                    (lib.t_at_k1().unwrap(), 1.0, u_t, off)
                } else if q.starts_with("T where ΔH° = 0") {
                    // ΔCp° models: the library's T₀ with Fieller's interval, in the unit.
                    let off = if unit == TemperatureUnit::Celsius {
                        273.15
                    } else {
                        0.0
                    };
                    let u_t = if off > 0.0 { "°C" } else { "K" };
                    let z = lib.temperature_where_delta_h_is_zero().unwrap();
                    (z.estimate, 1.0, u_t, off)
                } else {
                    let at = if q.contains("T_hm") {
                        &lib.at_harmonic()
                    } else {
                        assert!(q.contains("θ"), "{q}");
                        &lib.at_reference()
                    };
                    // The temperature in the label.
                    let label_t = q.split(" = ").nth(1).unwrap();
                    let (num_t, _) = label_t.split_once(' ').unwrap();
                    let want_t = if unit == TemperatureUnit::Celsius {
                        at.t_k - 273.15
                    } else {
                        at.t_k
                    };
                    assert_printed(num_t, want_t, q);
                    if q.starts_with("ΔH°") {
                        (at.delta_h, per, e_unit, 0.0)
                    } else if q.starts_with("ΔS°") {
                        (at.delta_s, s_per, s_unit, 0.0)
                    } else {
                        assert!(q.starts_with("ΔG°"), "{q}");
                        (at.delta_g, per, e_unit, 0.0)
                    }
                };
                assert_eq!(u, want_unit, "{name}: {q}");
                assert_printed(v, est.value / scale - offset, q);
                assert_printed(se, est.se / scale, q);
                // An unbounded end of Fieller's interval is printed as "—" (a warning says
                // so in words); a bounded one as its number.
                for (cell, end) in [(lo, est.ci_low), (hi, est.ci_high)] {
                    if end.is_finite() {
                        assert_printed(cell, end / scale - offset, q);
                    } else {
                        assert_eq!(cell.trim(), "—", "{name}: {q}");
                    }
                }
                compared += 1;
            }
            assert_eq!(
                statistic(&text, "points used / given"),
                format!("{} / {}", lib.n_used(), lib.n_total())
            );
            assert_eq!(
                statistic(&text, "residual degrees of freedom"),
                lib.dof().to_string()
            );
            assert_printed(statistic(&text, "χ²"), lib.stats().chi2, "χ²");
            assert_printed(
                statistic(&text, "reduced χ²"),
                lib.stats().reduced_chi2,
                "reduced χ²",
            );
            assert_printed(statistic(&text, "R²"), lib.stats().r2, "R²");
            assert_printed(statistic(&text, "BIC"), lib.stats().bic, "BIC");
            assert_printed(statistic(&text, "AICc"), lib.stats().aicc.unwrap(), "AICc");
            assert_printed(
                statistic(&text, "corr(ΔH°, ΔS°) at θ"),
                lib.corr_h_s(),
                "corr",
            );
            compared += 1;
        }
    }
    // 2 demos × 3 runs × (6 or more result rows + 1 statistics block).
    assert!(compared >= 2 * 3 * 7, "{compared}");
}
