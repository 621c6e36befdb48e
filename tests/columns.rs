//! Files as labs write them (issue 11 item 6): columns the importer does not know are kept
//! (with the data, out of the fit, named in one note), a `name` column labels the data sets,
//! and the command line chooses columns by name or number, gives the temperature unit of a
//! header without one, and fits a file that has σ unweighted.

use crate::cli::{close, json_of, run};
use serde_json::Value;
use std::path::{Path, PathBuf};

/// pKa at 10, 20, 30, 40 °C, invented for these tests, with free columns around them.
const LAB_FILE: &str = "operator,name,T (°C),pKa,u(pKa),date,instrument\n\
AB,MOPS,10,7.412,0.010,2026-11-02,pH-3\n\
AB,MOPS,20,7.288,0.010,2026-11-02,pH-3\n\
CD,MOPS,30,7.170,0.012,2026-11-03,pH-3\n\
CD,MOPS,40,7.061,0.012,2026-11-03,pH-3\n";

/// The same numbers alone, as the importer has always read them.
const PLAIN_FILE: &str =
    "T (°C),pKa,u(pKa)\n10,7.412,0.010\n20,7.288,0.010\n30,7.170,0.012\n40,7.061,0.012\n";

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn fit_json(args: &[&str]) -> Value {
    let mut all = vec!["fit"];
    all.extend_from_slice(args);
    all.push("--json");
    let out = run(&all);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    json_of(&out)
}

fn delta_h(doc: &Value) -> f64 {
    doc["params"]["delta_h"]["value"]
        .as_f64()
        .unwrap_or_else(|| panic!("no ΔH° in {doc}"))
}

#[test]
fn unknown_columns_are_kept_out_of_the_fit_and_named_once() {
    let dir = tempfile::tempdir().unwrap();
    let lab = write(dir.path(), "lab.csv", LAB_FILE);
    let plain = write(dir.path(), "plain.csv", PLAIN_FILE);
    let a = fit_json(&[&lab.to_string_lossy()]);
    let b = fit_json(&[&plain.to_string_lossy()]);
    // Same numbers as the file without the free columns.
    assert!(close(delta_h(&a), delta_h(&b), 1e-12), "{a}\n{b}");
    // The `name` column names the data set.
    assert_eq!(a["points"][0]["series"], "MOPS", "{a}");
    let warnings = a["warnings"].to_string();
    assert!(
        warnings.contains("columns kept but not used: operator, date, instrument"),
        "{warnings}"
    );
    assert_eq!(
        warnings.matches("kept but not used").count(),
        1,
        "{warnings}"
    );
    // The report's data table carries the free columns' cells.
    let data = dir.path().join("lab-data.csv");
    let out = run(&[
        "fit",
        &lab.to_string_lossy(),
        "--report",
        &data.to_string_lossy(),
    ]);
    assert_eq!(out.status.code(), Some(0));
    let table = std::fs::read_to_string(&data).unwrap();
    assert!(
        table.lines().next().unwrap().contains("operator"),
        "{table}"
    );
    assert!(
        table.contains("2026-11-03") && table.contains("pH-3"),
        "{table}"
    );
}
