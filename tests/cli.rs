//! End-to-end checks of the `vhfit` binary: the JSON contract parses and carries the
//! library's numbers, `--exclude` moves ΔH° to the library's value without that point,
//! every report format is produced and readable by an independent parser (lopdf for PDF,
//! roxmltree for SVG), hostile series names stay text, and exit codes are 0/1/2 as promised.

use isochore_data::{import_path, ImportOptions};
use isochore_fit::{fit, FitOptions, VantHoffFit, Weighting};
use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_vhfit"))
}

pub(crate) fn run(args: &[&str]) -> Output {
    bin().args(args).output().expect("the binary runs")
}

pub(crate) fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

pub(crate) fn demo(name: &str) -> String {
    root()
        .join("assets/demo")
        .join(name)
        .to_string_lossy()
        .into_owned()
}

pub(crate) const DEMOS: [&str; 2] = ["acid_pka.csv", "binding_qx7_halo2.csv"];

/// The library's own fit of a file, as the command line should do it (weighted when the
/// file gives uncertainties, unweighted otherwise).
pub(crate) fn library_fit(path: &str, excluded: &[usize], options: FitOptions) -> VantHoffFit {
    let imp = import_path(path, &ImportOptions::default()).expect("demo imports");
    let mut set = imp.series[0].clone();
    for &row in excluded {
        set.exclude(row, "", "").expect("the row exists");
    }
    let m = set.measurements().expect("imported rows convert");
    let mut o = options;
    if m.iter().all(|p| p.sigma_ln_k.is_none()) {
        o.weighting = Weighting::Unweighted;
    }
    fit(&m, &o).expect("demo fits")
}

/// The JSON on stdout. (serde_json cannot write NaN or Infinity, so a text search for them
/// would prove nothing; `undefined_values_are_null_and_named_in_a_warning` tests the rule.)
pub(crate) fn json_of(out: &Output) -> Value {
    let text = String::from_utf8(out.stdout.clone()).expect("utf-8 output");
    serde_json::from_str(&text).unwrap_or_else(|e| panic!("JSON does not parse: {e}\n{text}"))
}

pub(crate) fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * b.abs().max(1e-300)
}

#[test]
fn fit_json_matches_the_library_for_each_demo() {
    for name in DEMOS {
        let path = demo(name);
        let out = run(&["fit", &path, "--json"]);
        assert_eq!(
            out.status.code(),
            Some(0),
            "{name}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        let j = json_of(&out);
        let lib = library_fit(&path, &[], FitOptions::default());
        assert_eq!(j["model"], "linear");
        assert_eq!(j["n_used"].as_u64().unwrap() as usize, lib.n_used());
        assert_eq!(j["dof"].as_u64().unwrap() as usize, lib.dof());
        // The same computation in the same process order: agreement to rounding.
        let h = &j["params"]["delta_h"];
        assert!(close(
            h["value"].as_f64().unwrap(),
            lib.delta_h().value,
            1e-12
        ));
        assert!(close(h["se"].as_f64().unwrap(), lib.delta_h().se, 1e-12));
        assert!(close(
            h["ci_low"].as_f64().unwrap(),
            lib.delta_h().ci_low,
            1e-12
        ));
        let s = &j["params"]["delta_s"];
        assert!(close(
            s["value"].as_f64().unwrap(),
            lib.delta_s().value,
            1e-12
        ));
        assert!(j["params"].get("delta_cp").is_none());
        assert!(close(
            j["cov"][0][1].as_f64().unwrap(),
            lib.covariance()[0][1],
            1e-12
        ));
        assert!(close(
            j["corr_h_s"].as_f64().unwrap(),
            lib.corr_h_s(),
            1e-12
        ));
        assert!(close(j["chi2"].as_f64().unwrap(), lib.stats().chi2, 1e-12));
        let points = j["points"].as_array().unwrap();
        assert_eq!(points.len(), lib.points().len());
        for (i, (p, d)) in points.iter().zip(lib.points()).enumerate() {
            assert_eq!(
                p["row"].as_u64().unwrap() as usize,
                i + 1,
                "rows in file order"
            );
            assert!(close(p["leverage"].as_f64().unwrap(), d.leverage, 1e-12));
            assert!(close(p["residual"].as_f64().unwrap(), d.residual, 1e-9));
            assert!(p["flags"].is_array());
            assert!(p["sigma_ln_k"].is_number(), "the demos are weighted");
        }
        assert_eq!(j["version"], env!("CARGO_PKG_VERSION"));
        assert!(j["warnings"].is_array());
        // The ΔCp° model adds delta_cp and a 3×3 covariance.
        let out = run(&["fit", &path, "--json", "--model", "cp", "--summary"]);
        assert_eq!(out.status.code(), Some(0));
        let j = json_of(&out);
        let lib = library_fit(
            &path,
            &[],
            FitOptions {
                model: isochore_fit::Model::CONSTANT_CP,
                ..FitOptions::default()
            },
        );
        assert!(close(
            j["params"]["delta_cp"]["value"].as_f64().unwrap(),
            lib.delta_cp().unwrap().value,
            1e-10
        ));
        assert_eq!(j["cov"].as_array().unwrap().len(), 3);
        assert!(j.get("points").is_none(), "--summary leaves the points out");
    }
}

#[test]
fn exclude_moves_delta_h_to_the_library_value_without_that_point() {
    let path = demo("binding_qx7_halo2.csv");
    let full = json_of(&run(&["fit", &path, "--json"]));
    let out = run(&["fit", &path, "--json", "--exclude", "3"]);
    assert_eq!(out.status.code(), Some(0));
    let j = json_of(&out);
    let lib = library_fit(&path, &[3], FitOptions::default());
    let h = j["params"]["delta_h"]["value"].as_f64().unwrap();
    assert!(close(h, lib.delta_h().value, 1e-12));
    assert!(h != full["params"]["delta_h"]["value"].as_f64().unwrap());
    assert_eq!(j["points"][2]["used"], false);
    assert_eq!(j["points"][2]["row"], 3);
    assert_eq!(
        j["n_used"].as_u64().unwrap(),
        full["n_used"].as_u64().unwrap() - 1
    );
    // A row that does not exist is refused, naming the series' size.
    let out = run(&["fit", &path, "--exclude", "99"]);
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("row 99"));
}

#[test]
fn options_reach_the_fit() {
    let path = demo("acid_pka.csv");
    let j = json_of(&run(&[
        "fit",
        &path,
        "--json",
        "--level",
        "0.9",
        "--absolute-sigma",
        "--tref",
        "310K",
    ]));
    let lib = library_fit(
        &path,
        &[],
        FitOptions {
            level: 0.9,
            t_ref_k: 310.0,
            convention: isochore_fit::SigmaConvention::Absolute,
            ..FitOptions::default()
        },
    );
    assert_eq!(j["level"], 0.9);
    assert_eq!(j["t_ref_k"], 310.0);
    let h = &j["params"]["delta_h"];
    assert!(close(h["se"].as_f64().unwrap(), lib.delta_h().se, 1e-12));
    assert!(close(
        h["ci_high"].as_f64().unwrap(),
        lib.delta_h().ci_high,
        1e-12
    ));
}

#[test]
fn readable_output_and_batches() {
    let a = demo("acid_pka.csv");
    let b = demo("binding_qx7_halo2.csv");
    let out = run(&["fit", &a, "--energy", "kcal"]);
    assert_eq!(out.status.code(), Some(0));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("ΔH° at θ"), "{text}");
    assert!(text.contains("kcal/mol"), "{text}");
    assert!(text.contains("fit statistics"), "{text}");

    // Two good files and one missing: the good ones are fitted, the missing one named, exit 1.
    let missing = root().join("tests/no-such-file.csv");
    let missing = missing.to_string_lossy();
    let out = run(&["fit", &a, &missing, &b, "--json", "--summary"]);
    assert_eq!(out.status.code(), Some(1));
    let j = json_of(&out);
    let arr = j.as_array().expect("several files give an array");
    assert_eq!(arr.len(), 3);
    assert_eq!(arr[0]["source"], a.as_str());
    assert!(arr[1]["error"].as_str().unwrap().contains("no-such-file"));
    assert_eq!(arr[2]["source"], b.as_str());
    assert!(arr[2]["params"]["delta_h"]["value"].is_number());
    assert!(String::from_utf8_lossy(&out.stderr).contains("no-such-file"));

    let out = run(&["fit", &a, &b]);
    assert_eq!(out.status.code(), Some(0));
    let text = String::from_utf8(out.stdout).unwrap();
    assert_eq!(
        text.lines().count(),
        3,
        "a header and one row per series:\n{text}"
    );
}

#[test]
fn bad_rows_are_refused_with_line_and_column_unless_skipped() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("bad.csv");
    std::fs::write(
        &p,
        "T (°C),K,sigma_K\n10,1.20,0.05\n15,1.0x,0.05\n20,0.85,0.04\n25,0.71,0.04\n30,0.60,0.03\n",
    )
    .unwrap();
    let p = p.to_string_lossy();
    let out = run(&["fit", &p, "--json"]);
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("bad.csv"), "{err}");
    assert!(err.contains("line 3"), "{err}");
    assert!(err.contains("column 2"), "{err}");
    assert!(out.stdout.is_empty());
    let out = run(&["fit", &p, "--json", "--skip-bad-rows"]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j = json_of(&out);
    assert_eq!(j["n_used"], 4);
    let warnings: Vec<&str> = j["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(Value::as_str)
        .collect();
    assert!(
        warnings.iter().any(|w| w.contains("line 3")),
        "{warnings:?}"
    );
}

#[test]
fn usage_errors_exit_2() {
    let a = demo("acid_pka.csv");
    for args in [
        vec!["fit"],
        vec!["fit", a.as_str(), "--level", "1.5"],
        vec!["fit", a.as_str(), "--model", "quadratic"],
        vec!["fit", a.as_str(), "--exclude", "x"],
        vec!["fit", a.as_str(), "--no-such-flag"],
        vec!["predict", a.as_str()],
        vec!["two-point", "--t1", "25", "--k1", "2", "--t2", "35"],
        vec!["nonsense"],
    ] {
        let out = run(&args);
        assert_eq!(
            out.status.code(),
            Some(2),
            "{args:?}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
    assert_eq!(run(&["--help"]).status.code(), Some(0));
    assert_eq!(run(&["--version"]).status.code(), Some(0));
}

#[test]
fn predict_matches_the_library() {
    let path = demo("binding_qx7_halo2.csv");
    let out = run(&["predict", &path, "--at", "37", "--json", "--for-k", "1e7"]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j = json_of(&out);
    let lib = library_fit(&path, &[], FitOptions::default());
    let p = lib.predict(310.15).unwrap();
    let q = &j["predictions"][0];
    assert!(close(q["t_k"].as_f64().unwrap(), 310.15, 1e-12));
    assert!(close(
        q["ln_k"]["value"].as_f64().unwrap(),
        p.ln_k.value,
        1e-12
    ));
    assert!(close(
        q["k"]["pi_high"].as_f64().unwrap(),
        p.k.pi.high,
        1e-10
    ));
    assert!(close(
        q["delta_g"]["se"].as_f64().unwrap(),
        p.delta_g.se,
        1e-10
    ));
    let t = lib.temperature_for_k(1e7).unwrap();
    assert!(close(
        j["for_k"]["t_k"]["value"].as_f64().unwrap(),
        t.value,
        1e-10
    ));
    // Far outside the range: a warning in words.
    let out = run(&["predict", &path, "--at", "90"]);
    assert_eq!(out.status.code(), Some(0));
    assert!(String::from_utf8_lossy(&out.stdout).contains("extrapolation"));
}

#[test]
fn two_point_in_both_directions() {
    // ΔH° from two pairs, then K₂ back from ΔH°: the round trip returns K₂.
    let out = run(&[
        "two-point",
        "--t1",
        "25",
        "--k1",
        "0.15",
        "--t2",
        "56.85",
        "--k2",
        "1.9",
        "--u-k1",
        "0.003",
        "--u-k2",
        "0.05",
        "--json",
    ]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j = json_of(&out);
    let dh = j["delta_h"]["value"].as_f64().unwrap();
    let lib = isochore_fit::two_point::enthalpy_from_pairs(
        isochore_fit::two_point::StatePoint {
            t_k: 298.15,
            sigma_t_k: 0.0,
            k: 0.15,
            sigma_ln_k: 0.003 / 0.15,
        },
        isochore_fit::two_point::StatePoint {
            t_k: 330.0,
            sigma_t_k: 0.0,
            k: 1.9,
            sigma_ln_k: 0.05 / 1.9,
        },
        0.95,
    )
    .unwrap();
    assert!(close(dh, lib.delta_h.value, 1e-9));
    assert!(close(
        j["delta_h"]["se"].as_f64().unwrap(),
        lib.delta_h.se,
        1e-9
    ));
    let kj = format!("{}", dh / 1000.0);
    let out = run(&[
        "two-point",
        "--t1",
        "25",
        "--k1",
        "0.15",
        "--t2",
        "56.85",
        "--delta-h",
        &kj,
        "--json",
    ]);
    assert_eq!(out.status.code(), Some(0));
    let j = json_of(&out);
    assert!(close(j["k2"]["value"].as_f64().unwrap(), 1.9, 1e-9));
}

fn hostile_csv(dir: &Path) -> PathBuf {
    let p = dir.join("hostile.csv");
    std::fs::write(
        &p,
        "series,T (°C),K,sigma_K\n\
         <script>alert(1)</script>,10,1.20,0.05\n\
         <script>alert(1)</script>,15,1.01,0.05\n\
         <script>alert(1)</script>,20,0.85,0.04\n\
         <script>alert(1)</script>,25,0.72,0.04\n\
         <script>alert(1)</script>,30,0.60,0.03\n\
         <script>alert(1)</script>,35,0.52,0.03\n",
    )
    .unwrap();
    p
}

/// Everything in an HTML page that would make a browser fetch something: `<link>`,
/// `<script>`, `<iframe>`, `<object>`, `<embed>`, `@import`, a `src`, `href`, `srcset`,
/// `action` or `poster` whose value is not a `#fragment` or `data:`, a CSS `url(…)` that is
/// not, and any `scheme://` outside an `xmlns` namespace declaration (a name, not a fetch).
pub(crate) fn external_references(html: &str) -> Vec<String> {
    let lower = html.to_ascii_lowercase();
    let mut found = Vec::new();
    let context = |i: usize| {
        let a = lower[..i]
            .char_indices()
            .rev()
            .nth(30)
            .map_or(0, |(j, _)| j);
        let b = lower[i..]
            .char_indices()
            .nth(40)
            .map_or(lower.len(), |(j, _)| i + j);
        lower[a..b].to_string()
    };
    for tag in [
        "<link", "<script", "<iframe", "<object", "<embed", "@import",
    ] {
        for (i, _) in lower.match_indices(tag) {
            found.push(context(i));
        }
    }
    let local = |rest: &str| {
        let v = rest.trim_start_matches(['"', '\'', ' ']);
        v.starts_with('#') || v.starts_with("data:")
    };
    for attr in [
        " src=", " href=", ":href=", " srcset=", " action=", " poster=",
    ] {
        for (i, _) in lower.match_indices(attr) {
            if !local(&lower[i + attr.len()..]) {
                found.push(context(i));
            }
        }
    }
    for (i, _) in lower.match_indices("url(") {
        if !local(&lower[i + 4..]) {
            found.push(context(i));
        }
    }
    for (i, _) in lower.match_indices("://") {
        // Allowed only as the value of xmlns="…" or xmlns:prefix="…".
        let before = &lower[..i];
        let start = before.rfind(['"', '\'']).unwrap_or(0);
        let attr = before[..start].trim_end_matches('=');
        let name_start = attr.rfind([' ', '<', '\n', '\t']).map_or(0, |j| j + 1);
        let name = &attr[name_start..];
        if !(name == "xmlns" || name.starts_with("xmlns:")) || lower[start..i].contains(' ') {
            found.push(context(i));
        }
    }
    found
}

#[test]
fn the_network_check_catches_what_it_should() {
    let clean = r##"<html><style>p{color:#333}</style><body><svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink"><use xlink:href="#m"/><path clip-path="url(#c)"/></svg><a href="#results">x</a><img src="data:image/png;base64,AAAA"></body></html>"##;
    assert_eq!(external_references(clean), Vec::<String>::new());
    for bad in [
        r#"<link rel="stylesheet" href="style.css">"#,
        r#"<style>@import "x.css";</style>"#,
        r#"<style>body{background:url(http://example.org/a.png)}</style>"#,
        r#"<style>body{background:url('https://example.org/a.png')}</style>"#,
        r#"<img src="http://example.org/a.png">"#,
        r#"<img src="//example.org/a.png">"#,
        r#"<script>fetch('x')</script>"#,
        r#"<a href="https://example.org/">see</a>"#,
        r#"<svg xmlns="http://www.w3.org/2000/svg"><image href="http://example.org/a.png"/></svg>"#,
        r#"<p>see https://example.org/</p>"#,
    ] {
        assert!(!external_references(bad).is_empty(), "not caught: {bad}");
    }
}

#[test]
fn every_report_format_is_written_and_readable() {
    let dir = tempfile::tempdir().unwrap();
    let out_dir = dir.path().join("reports");
    let src = hostile_csv(dir.path());
    let out = run(&[
        "fit",
        &src.to_string_lossy(),
        "--exclude",
        "2",
        "--report",
        &out_dir.to_string_lossy(),
    ]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let f = |name: &str| out_dir.join(name);

    // HTML: the hostile name appears escaped, never as a raw tag.
    let html = std::fs::read_to_string(f("hostile.html")).unwrap();
    assert!(html.contains("&lt;script&gt;alert(1)&lt;/script&gt;"));
    assert!(!html.contains("<script"), "no raw <script> in the HTML");
    assert!(html.contains("<svg"), "figures are inline");
    let external = external_references(&html);
    assert!(external.is_empty(), "no network: {external:?}");
    assert!(html.contains("ΔH°") && html.contains("CODATA 2018"));
    assert!(html.contains("excluded on the command line"));

    // Markdown: escaped too, with its figures beside it.
    let md = std::fs::read_to_string(f("hostile.md")).unwrap();
    assert!(!md.contains("<script>"));
    assert!(md.contains("&lt;script&gt;"));
    assert!(md.contains("hostile-vanthoff.svg"));

    // PDF: an independent parser opens it and finds pages.
    let pdf = lopdf::Document::load(f("hostile.pdf")).expect("lopdf opens the PDF");
    assert!(!pdf.get_pages().is_empty());

    // SVG figures parse as XML; PNGs are PNGs at 300 dpi.
    for kind in ["vanthoff", "residuals", "influence", "ellipse"] {
        let svg = std::fs::read_to_string(f(&format!("hostile-{kind}.svg"))).unwrap();
        let doc = roxmltree::Document::parse(&svg).expect("SVG parses");
        assert_eq!(doc.root_element().tag_name().name(), "svg");
        assert!(doc.descendants().count() > 20, "{kind} has content");
        let png = std::fs::read(f(&format!("hostile-{kind}.png"))).unwrap();
        assert_eq!(&png[..8], b"\x89PNG\r\n\x1a\n");
        assert!(png.windows(4).any(|w| w == b"pHYs"));
        let width = u32::from_be_bytes([png[16], png[17], png[18], png[19]]);
        assert!(width >= 1900, "publication width, got {width}");
    }

    // CSV tables: every row, with the exclusion reason.
    let data = std::fs::read_to_string(f("hostile-data.csv")).unwrap();
    assert_eq!(data.lines().count(), 7);
    assert!(data.contains("excluded on the command line"));
    let results = std::fs::read_to_string(f("hostile-results.csv")).unwrap();
    assert!(results.starts_with("quantity,value,se,ci_low,ci_high,unit"));

    // One file by extension.
    let one = dir.path().join("one.pdf");
    let out = run(&[
        "fit",
        &src.to_string_lossy(),
        "--report",
        &one.to_string_lossy(),
    ]);
    assert_eq!(out.status.code(), Some(0));
    assert!(lopdf::Document::load(&one).is_ok());
}

#[test]
fn demo_reports_in_a_batch_folder() {
    let dir = tempfile::tempdir().unwrap();
    let out = run(&[
        "fit",
        &demo("acid_pka.csv"),
        &demo("binding_qx7_halo2.csv"),
        "--report",
        &dir.path().to_string_lossy(),
        "--summary",
    ]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    for stem in ["acid_pka", "binding_qx7_halo2"] {
        let pdf = lopdf::Document::load(dir.path().join(format!("{stem}.pdf"))).unwrap();
        assert!(pdf.get_pages().len() >= 2, "{stem}: a real document");
        let html = std::fs::read_to_string(dir.path().join(format!("{stem}.html"))).unwrap();
        assert!(html.len() > 20_000);
    }
}

#[test]
fn import_test_files_are_fitted_or_refused_cleanly() {
    // Both directions are strict: a file the library reads and fits must be fitted by the
    // command line with the library's numbers (every data set), and a file the library
    // refuses (to read or to fit) must be refused with exit 1 and a message.
    let dir = root().join("tests/data/import");
    let mut files: Vec<PathBuf> = std::fs::read_dir(&dir)
        .unwrap_or_else(|e| panic!("{}: {e}", dir.display()))
        .flatten()
        .map(|e| e.path())
        .filter(|p| {
            let n = p.file_name().unwrap().to_string_lossy();
            p.is_file() && !n.ends_with(".json") && !n.ends_with(".py")
        })
        .collect();
    files.sort();
    let (mut fitted, mut refused) = (0, 0);
    for p in &files {
        let path = p.to_string_lossy().into_owned();
        let out = run(&["fit", &path, "--json", "--summary"]);
        let code = out.status.code();
        let library = import_path(p, &ImportOptions::default())
            .and_then(|i| i.strict())
            .map_err(|e| e.to_string())
            .and_then(|imp| {
                imp.series
                    .iter()
                    .map(|s| {
                        let m = s.measurements().map_err(|e| e.to_string())?;
                        let mut o = FitOptions::default();
                        if m.iter().all(|x| x.sigma_ln_k.is_none()) {
                            o.weighting = Weighting::Unweighted;
                        }
                        fit(&m, &o).map_err(|e| e.to_string())
                    })
                    .collect::<Result<Vec<_>, _>>()
            });
        match library {
            Ok(fits) => {
                assert_eq!(
                    code,
                    Some(0),
                    "{path}: the library fits it, the command line must too: {}",
                    String::from_utf8_lossy(&out.stderr)
                );
                let j = json_of(&out);
                let items: Vec<&Value> = match j.as_array() {
                    Some(a) => a.iter().collect(),
                    None => vec![&j],
                };
                assert_eq!(items.len(), fits.len(), "{path}: one result per data set");
                for (item, lib) in items.iter().zip(&fits) {
                    assert_eq!(item["n_used"].as_u64().unwrap() as usize, lib.n_used());
                    assert!(
                        close(
                            item["params"]["delta_h"]["value"].as_f64().unwrap(),
                            lib.delta_h().value,
                            1e-12
                        ),
                        "{path}"
                    );
                    assert!(close(
                        item["params"]["delta_h"]["se"].as_f64().unwrap(),
                        lib.delta_h().se,
                        1e-12
                    ));
                }
                fitted += 1;
            }
            Err(e) => {
                assert_eq!(
                    code,
                    Some(1),
                    "{path}: the library refuses it ({e}), so must the command line"
                );
                assert!(!out.stderr.is_empty(), "{path}: a message");
                refused += 1;
            }
        }
    }
    // The folder's 17 data files (tests/data/import/make_fixtures.py writes them); only
    // mixed_good_and_bad_rows.csv is refused without --skip-bad-rows.
    assert_eq!(files.len(), 17, "{files:?}");
    assert_eq!((fitted, refused), (16, 1), "{files:?}");
}

#[test]
fn far_temperature_for_k_equal_one_is_called_an_extrapolation() {
    // The binding demo's K stays far above 1 over 5–45 °C, so the temperature where K = 1 lies
    // far outside the data: the number must come with the word, in JSON and in the table.
    let path = demo("binding_qx7_halo2.csv");
    let lib = library_fit(&path, &[], FitOptions::default());
    let t1 = lib
        .t_at_k1()
        .expect("the linear fit crosses K = 1 somewhere");
    assert!(lib.is_extrapolation(t1.value), "{} K", t1.value);
    let j = json_of(&run(&["fit", &path, "--json"]));
    assert!(close(
        j["t_at_k1"]["value"].as_f64().unwrap(),
        t1.value,
        1e-12
    ));
    assert_eq!(j["t_at_k1"]["extrapolated"], true);
    let table = String::from_utf8(run(&["fit", &path]).stdout).unwrap();
    let line = table
        .lines()
        .find(|l| l.contains("K = 1"))
        .unwrap_or_else(|| panic!("no line for K = 1 in\n{table}"));
    assert!(line.contains("extrapolated"), "{line}");
}

#[test]
fn undefined_values_are_null_and_named_in_a_warning() {
    // Every K the same: the total sum of squares is zero, so R² = 1 − χ²/TSS is 0/0, which
    // is undefined (a definition, no reference needed). The JSON must hold null there, and
    // a warning must name the value.
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("flat.csv");
    std::fs::write(
        &p,
        "T (°C),K,sigma_K\n10,0.80,0.02\n20,0.80,0.02\n30,0.80,0.02\n40,0.80,0.02\n",
    )
    .unwrap();
    let out = run(&["fit", &p.to_string_lossy(), "--json"]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j = json_of(&out);
    assert!(j["r2"].is_null(), "R² is undefined here: {}", j["r2"]);
    // The other statistics are defined and present.
    for key in ["chi2", "reduced_chi2", "residual_sd", "bic"] {
        assert!(j[key].is_number(), "{key}: {}", j[key]);
    }
    let warnings: Vec<&str> = j["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(Value::as_str)
        .collect();
    assert!(
        warnings
            .iter()
            .any(|w| w.contains("R²") && w.contains("undefined")),
        "a warning in words names R²: {warnings:?}"
    );
    assert!(
        warnings.iter().any(|w| w.contains("null")
            && w.split(|c: char| !c.is_alphanumeric() && c != '_')
                .any(|x| x == "r2")),
        "a warning names the JSON key r2: {warnings:?}"
    );
    // The text table shows a dash, not NaN.
    let text = String::from_utf8(run(&["fit", &p.to_string_lossy()]).stdout).unwrap();
    let line = text
        .lines()
        .find(|l| l.trim_start().starts_with("R²"))
        .unwrap();
    assert!(!line.contains("NaN") && line.contains('—'), "{line}");
}

#[test]
fn every_bad_test_file_is_refused_with_the_expected_message() {
    // tests/data/bad/expected.json (written by make_bad.py beside it) gives, for each bad
    // file, the fragments its message must hold; the command line must refuse each file
    // with exit 1 and pass those fragments on to stderr.
    let dir = root().join("tests/data/bad");
    let expected: Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("expected.json")).unwrap()).unwrap();
    let expected = expected.as_object().expect("an object of file → fragments");
    let mut files: Vec<String> = std::fs::read_dir(&dir)
        .unwrap()
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n != "expected.json" && !n.ends_with(".py"))
        .collect();
    files.sort();
    let mut listed: Vec<String> = expected.keys().cloned().collect();
    listed.sort();
    assert_eq!(
        files, listed,
        "every bad file has its expected message, and only those"
    );
    for (name, fragments) in expected {
        let path = dir.join(name);
        let out = run(&["fit", &path.to_string_lossy(), "--json"]);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(1), "{name}: {err}");
        assert!(out.stdout.is_empty(), "{name}: nothing on stdout");
        for frag in fragments.as_array().unwrap() {
            let frag = frag.as_str().unwrap();
            assert!(err.contains(frag), "{name}: '{frag}' not in {err}");
        }
    }
}

/// `--tref` follows the one rule for temperatures on the command line (issue 11 item 4): a
/// unit suffix, else `--temp-unit`, whose default is °C; θ at or below 0 K is refused.
#[test]
fn reference_temperature_takes_a_unit_and_defaults_to_celsius() {
    let path = demo("acid_pka.csv");
    let theta = |args: &[&str]| -> f64 {
        let mut all = vec!["fit", path.as_str(), "--json", "--model", "cp"];
        all.extend_from_slice(args);
        json_of(&run(&all))["t_ref_k"].as_f64().unwrap()
    };
    // 25 °C = 298.15 K, 77 °F = 298.15 K (definitions of the scales).
    assert!((theta(&["--tref", "25"]) - 298.15).abs() < 1e-9);
    assert!((theta(&["--tref", "25C"]) - 298.15).abs() < 1e-9);
    assert!((theta(&["--tref", "298.15K"]) - 298.15).abs() < 1e-9);
    assert!((theta(&["--tref", "77F"]) - 298.15).abs() < 1e-9);
    assert!((theta(&["--tref", "310", "--temp-unit", "K"]) - 310.0).abs() < 1e-9);
    for bad in ["-300", "0K", "-500F"] {
        let out = run(&["fit", &path, "--tref", bad]);
        assert_eq!(out.status.code(), Some(2), "{bad}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(
            err.contains("absolute zero") && err.contains("--tref"),
            "{bad}: {err}"
        );
    }
}

/// `--analyst` and `--note` go into the report's record (issue 16 item 8, as the window's
/// fields do); without `--report` they are a usage error, since nothing would record them.
#[test]
fn analyst_and_note_are_recorded_in_the_report() {
    let dir = tempfile::tempdir().unwrap();
    let md = dir.path().join("qx7.md");
    let out = run(&[
        "fit",
        &demo("binding_qx7_halo2.csv"),
        "--report",
        md.to_str().unwrap(),
        "--analyst",
        "R. Okafor",
        "--note",
        "notebook 14, p. 32",
    ]);
    assert!(out.status.success(), "{out:?}");
    let text = std::fs::read_to_string(&md).unwrap();
    assert!(text.contains(" by R. Okafor with vhfit "), "{text}");
    assert!(text.contains("notebook 14, p. 32"), "{text}");
    // Issue 11 item 3: the ΔH°–ΔG°(T_hm) region beside the ΔH°–ΔS° one, with the true
    // sentence: for the linear model ΔG°(T_hm) is uncorrelated with ΔH° (Krug, Hunter &
    // Grieger 1976), while ΔH° and ΔS° stay correlated.
    // (Markdown escapes parentheses.)
    let plain = text.replace('\\', "");
    assert!(
        plain.contains("ΔG° is uncorrelated with ΔH° (r = 0.0000)"),
        "{text}"
    );
    assert!(!text.contains("least correlated"), "{text}");
    let svg = std::fs::read_to_string(dir.path().join("qx7-ellipse.svg")).unwrap();
    assert!(svg.contains("ΔG° at T_hm / (kJ/mol)") && svg.contains("ΔS° / (J/(mol·K))"));
    let out = run(&[
        "fit",
        &demo("binding_qx7_halo2.csv"),
        "--analyst",
        "R. Okafor",
    ]);
    assert_eq!(out.status.code(), Some(2), "{out:?}");
}

/// A summary line of a large data set (whose model comparison is made only as far as its
/// verdict) counts the cautions and flagged points that the JSON of the same fit lists:
/// straight data (the comparison stops at its first step) and doubly curved data (every
/// step is supported), fitted with each model. Invented data.
#[test]
fn a_large_summary_line_counts_the_json_s_cautions() {
    let dir = tempfile::tempdir().unwrap();
    let n = 21_000;
    let write = |name: &str, coefficients: [f64; 4], noise: f64| {
        let mut text = String::from("T (K),ln K,sigma ln K\n");
        for i in 0..n {
            let t = 275.0 + 50.0 * i as f64 / n as f64;
            let x = isochore_fit::Model::CLARKE_GLEW.row(t, 298.15);
            let truth: f64 = x.iter().zip(&coefficients).map(|(x, c)| x * c).sum();
            let wobble = ((i * 7919) % 101) as f64 / 50.0 - 1.0;
            text.push_str(&format!("{t},{},{noise}\n", truth + noise * wobble));
        }
        let p = dir.path().join(name);
        std::fs::write(&p, text).unwrap();
        p.to_string_lossy().into_owned()
    };
    let straight = write("straight.csv", [-40e3, -30.0, 0.0, 0.0], 0.02);
    let curved = write("curved.csv", [-40e3, -30.0, -800.0, 60.0], 0.0005);
    let models = [
        ("linear", isochore_fit::Model::LINEAR),
        ("cp", isochore_fit::Model::CONSTANT_CP),
        ("clarke-glew", isochore_fit::Model::CLARKE_GLEW),
    ];
    let mut curvature_cautions = 0;
    for (name, model) in models {
        let out = run(&["fit", &straight, &curved, "--model", name, "--summary"]);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let table = String::from_utf8(out.stdout).unwrap();
        for (i, path) in [&straight, &curved].into_iter().enumerate() {
            let j = json_of(&run(&["fit", path, "--model", name, "--json", "--summary"]));
            let whole = library_fit(
                path,
                &[],
                FitOptions {
                    model,
                    ..FitOptions::default()
                },
            );
            let line = table.lines().nth(i + 1).expect("a line per file");
            let cells: Vec<&str> = line.split_whitespace().collect();
            let warnings = j["warnings"].as_array().unwrap().len();
            assert_eq!(warnings, whole.warnings().len());
            assert_eq!(
                cells[cells.len() - 1],
                warnings.to_string(),
                "{name}: {line}"
            );
            let flagged = whole.flagged_points().len().to_string();
            assert_eq!(cells[cells.len() - 2], flagged, "{name}: {line}");
            curvature_cautions += whole
                .warnings()
                .iter()
                .filter(|w| {
                    matches!(
                        w.kind,
                        isochore_fit::WarningKind::CurvatureIgnored
                            | isochore_fit::WarningKind::CurvatureUnsupported
                    )
                })
                .count();
        }
    }
    // The curved data's linear and constant-ΔCp° fits carry a caution from the comparison.
    assert!(curvature_cautions >= 2, "{curvature_cautions}");
}
