//! Checks the importer against the fixture folders at the repository root:
//! `tests/data/import/` (good files in every dialect, each with `<file>.expected.json` holding
//! the values it must give, computed independently by `make_fixtures.py` from the unit
//! definitions cited there) and `tests/data/bad/` (one fault per file; `expected.json` lists
//! the message fragments, with line and column, each must give).

use isochore_data::{import_path, Import, ImportOptions, Replicates};
use serde_json::Value;
use std::path::PathBuf;

/// Every good fixture in `tests/data/import/` (the files `make_fixtures.py` writes). A file
/// lost, or one added without being listed here, fails the test.
const GOOD_FILES: [&str; 17] = [
    "comma_celsius_kd_crlf.csv",
    "excel_sep_line.csv",
    "latin1_degree_micro.csv",
    "mixed_good_and_bad_rows.csv",
    "no_unit_celsius.csv",
    "no_unit_kelvin.csv",
    "pipe_fahrenheit_ka.txt",
    "quoted_multiline_note.csv",
    "semicolon_decimal_comma_bom.csv",
    "series_replicates_relative.csv",
    "slash_units_dg_kj.csv",
    "tab_kelvin_logk.tsv",
    "trailing_delimiter_kd_first.csv",
    "underscore_celsius_dg_kcal.csv",
    "underscore_kelvin_kd_pm.csv",
    "utf16le_tab.txt",
    "whitespace_instrument.txt",
];

/// Every bad fixture in `tests/data/bad/` (the files `make_bad.py` writes, each with its
/// entry in `expected.json`). A file lost, or one added without being listed here, fails.
const BAD_FILES: [&str; 31] = [
    "binary_image.png",
    "comment_then_header_only.csv",
    "dg_without_unit.csv",
    "duplicate_header.csv",
    "empty.csv",
    "header_only.csv",
    "header_without_line_break.csv",
    "inf.csv",
    "k_negative.csv",
    "k_zero.csv",
    "kd_negative.csv",
    "kd_without_unit.csv",
    "minus_300_celsius.csv",
    "nan.csv",
    "negative_kelvin.csv",
    "no_temperature_column.csv",
    "nul_bytes.csv",
    "one_row.csv",
    "one_temperature.csv",
    "only_comments.csv",
    "ragged.csv",
    "sigma_negative.csv",
    "sigma_zero.csv",
    "temperature_unit_unclear.csv",
    "ten_thousand_columns.csv",
    "text_in_number.csv",
    "two_quantity_columns.csv",
    "uncertainty_of_other_quantity.csv",
    "unknown_concentration_unit.csv",
    "unknown_temperature_unit.csv",
    "very_long_line.csv",
];

fn data_dir(sub: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../../tests/data")
        .join(sub)
}

fn close(a: f64, b: f64, what: &str, file: &str) {
    let tol = 1e-12 * a.abs().max(b.abs()).max(1.0);
    assert!(
        (a - b).abs() <= tol,
        "{file}: {what}: got {a}, expected {b}"
    );
}

/// The fixture files of `dir` (not the `.json` expectations or the `.py` generators), checked
/// to be exactly the names in `pinned`.
fn fixture_files(dir: &PathBuf, pinned: &[&str]) -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .expect("fixture folder")
        .map(|e| e.expect("entry").path())
        .filter(|p| {
            let n = p.file_name().unwrap().to_string_lossy().to_string();
            !n.ends_with(".json") && !n.ends_with(".py")
        })
        .collect();
    v.sort();
    let names: Vec<String> = v
        .iter()
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    assert_eq!(
        names,
        pinned,
        "the fixture files of {} differ from the list in fixtures.rs",
        dir.display()
    );
    v
}

fn check_mapping(imp: &Import, exp: &Value, file: &str) {
    assert_eq!(imp.delimiter.name(), exp["delimiter"], "{file}: delimiter");
    assert_eq!(
        imp.decimal_comma,
        exp["decimal_comma"].as_bool().unwrap(),
        "{file}: decimal comma"
    );
    let headers: Vec<String> = exp["headers"]
        .as_array()
        .unwrap()
        .iter()
        .map(|h| h.as_str().unwrap().to_string())
        .collect();
    assert_eq!(imp.headers, headers, "{file}: headers");
    let t = &exp["temperature"];
    let m = &imp.mapping;
    assert_eq!(
        m.temperature.column as u64,
        t["column"].as_u64().unwrap(),
        "{file}"
    );
    assert_eq!(
        serde_json::to_value(m.temperature.unit).unwrap(),
        t["unit"],
        "{file}: temperature unit"
    );
    assert_eq!(
        m.temperature.assumed,
        t["assumed"].as_bool().unwrap(),
        "{file}"
    );
    let q = &exp["quantity"];
    assert_eq!(
        m.quantity.column as u64,
        q["column"].as_u64().unwrap(),
        "{file}"
    );
    assert_eq!(m.quantity.kind.label(), q["label"], "{file}: quantity");
    match (&m.uncertainty, &exp["uncertainty"]) {
        (None, Value::Null) => {}
        (Some(u), e) if !e.is_null() => {
            assert_eq!(u.column as u64, e["column"].as_u64().unwrap(), "{file}");
            let relative = matches!(u.kind, isochore_data::UncertaintyKind::RelativePercent);
            assert_eq!(
                relative,
                e["relative"].as_bool().unwrap(),
                "{file}: relative σ"
            );
        }
        (got, want) => panic!("{file}: uncertainty {got:?}, expected {want}"),
    }
    if let Some(sc) = exp.get("series_column") {
        assert_eq!(
            m.series.map(|c| c as u64),
            sc.as_u64(),
            "{file}: series column"
        );
    }
}

#[test]
fn good_files_give_the_expected_values() {
    let dir = data_dir("import");
    let files = fixture_files(&dir, &GOOD_FILES);
    assert_eq!(files.len(), 17);
    for path in files {
        let file = path.file_name().unwrap().to_string_lossy().to_string();
        let exp_path = dir.join(format!("{file}.expected.json"));
        let exp: Value =
            serde_json::from_str(&std::fs::read_to_string(&exp_path).expect("expected json"))
                .expect("valid json");
        let imp = match import_path(&path, &ImportOptions::default()) {
            Ok(i) => i,
            Err(e) => panic!("{file}: {e}"),
        };
        check_mapping(&imp, &exp, &file);
        let series = exp["series"].as_array().unwrap();
        assert_eq!(
            imp.series.len(),
            series.len(),
            "{file}: number of data sets"
        );
        for (s, es) in imp.series.iter().zip(series) {
            assert_eq!(s.name, es["name"], "{file}: data set name");
            let rows = es["rows"].as_array().unwrap();
            let read = s.converted().unwrap();
            assert_eq!(read.len(), rows.len(), "{file}: rows of '{}'", s.name);
            for (k, (r, er)) in read.iter().zip(rows).enumerate() {
                assert_eq!(
                    r.line() as u64,
                    er["line"].as_u64().unwrap(),
                    "{file}: line"
                );
                assert_eq!(r.row(), k + 1, "{file}: row number");
                close(r.t_k, er["t_k"].as_f64().unwrap(), "T", &file);
                close(r.ln_k, er["ln_k"].as_f64().unwrap(), "ln K", &file);
                match (r.sigma_ln_k(), er["sigma_ln_k"].as_f64()) {
                    (None, None) => {}
                    (Some(a), Some(b)) => close(a, b, "σ(ln K)", &file),
                    (a, b) => panic!("{file}: line {}: σ {a:?} vs {b:?}", r.line()),
                }
                assert_eq!(s.note(r), er["note"].as_str(), "{file}: note");
            }
        }
        let rejected = exp["rejected"].as_array().unwrap();
        assert_eq!(
            imp.rejected.len(),
            rejected.len(),
            "{file}: {:?}",
            imp.rejected
        );
        for (r, er) in imp.rejected.iter().zip(rejected) {
            assert_eq!(r.line as u64, er["line"].as_u64().unwrap(), "{file}");
            assert_eq!(r.column.map(|c| c as u64), er["column"].as_u64(), "{file}");
            assert!(r.message().starts_with(&format!("line {}", r.line)));
        }
        if let Some(avg) = exp.get("averaged") {
            let o = ImportOptions {
                replicates: Replicates::Average,
                ..ImportOptions::default()
            };
            let imp = import_path(&path, &o).unwrap();
            for s in &imp.series {
                let want = avg[&s.name].as_array().unwrap();
                let pts = s.points().unwrap();
                assert_eq!(
                    pts.len(),
                    want.len(),
                    "{file}: averaged points of {}",
                    s.name
                );
                for (p, w) in pts.iter().zip(want) {
                    close(
                        p.measurement.t_k,
                        w["t_k"].as_f64().unwrap(),
                        "mean T",
                        &file,
                    );
                    close(
                        p.measurement.ln_k,
                        w["ln_k"].as_f64().unwrap(),
                        "mean ln K",
                        &file,
                    );
                    close(
                        p.measurement.sigma_ln_k.unwrap(),
                        w["sigma_ln_k"].as_f64().unwrap(),
                        "σ of mean",
                        &file,
                    );
                    assert_eq!(p.rows.len() as u64, w["rows"].as_u64().unwrap());
                }
            }
        }
    }
}

#[test]
fn bad_files_give_the_expected_messages() {
    let dir = data_dir("bad");
    let expected: Value = serde_json::from_str(
        &std::fs::read_to_string(dir.join("expected.json")).expect("expected.json"),
    )
    .unwrap();
    let expected = expected.as_object().unwrap();
    let files = fixture_files(&dir, &BAD_FILES);
    assert_eq!(files.len(), 31);
    // expected.json names exactly these files: an entry whose file was lost fails too.
    let mut keys: Vec<&str> = expected.keys().map(String::as_str).collect();
    keys.sort_unstable();
    assert_eq!(keys, BAD_FILES, "expected.json and the bad fixtures differ");
    for path in files {
        let file = path.file_name().unwrap().to_string_lossy().to_string();
        let fragments = expected
            .get(&file)
            .unwrap_or_else(|| panic!("{file} has no entry in expected.json"));
        let message = match import_path(&path, &ImportOptions::default()) {
            Err(e) => e.to_string(),
            Ok(imp) => match imp.strict() {
                Err(e) => e.to_string(),
                Ok(_) => panic!("{file}: accepted without complaint"),
            },
        };
        for f in fragments.as_array().unwrap() {
            let f = f.as_str().unwrap();
            assert!(
                message.contains(f),
                "{file}: message\n  {message}\nlacks\n  {f}"
            );
        }
    }
}
