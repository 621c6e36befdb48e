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

/// The same pKa numbers under headers the importer cannot place by itself: a temperature
/// without a unit, a value column named after the instrument, a σ column named "spread".
const ODD_FILE: &str = "operator,temp,reading,spread\n\
AB,283.15,7.412,0.010\n\
AB,293.15,7.288,0.010\n\
CD,303.15,7.170,0.012\n\
CD,313.15,7.061,0.012\n";

#[test]
fn columns_are_chosen_by_name_or_number_on_the_command_line() {
    let dir = tempfile::tempdir().unwrap();
    let odd = write(dir.path(), "odd.csv", ODD_FILE);
    let plain = write(dir.path(), "plain.csv", PLAIN_FILE);
    let odd = odd.to_string_lossy().into_owned();
    // Without choices the file is refused, and the message names the way out.
    let out = run(&["fit", &odd]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{err}");
    assert!(err.contains("--column"), "{err}");
    let want = delta_h(&fit_json(&[&plain.to_string_lossy()]));
    // By header and by number; the temperature header has no unit: K is stated.
    let a = fit_json(&[
        &odd,
        "--column",
        "temperature=temp",
        "--column",
        "pKa=3",
        "--column",
        "sigma=spread",
        "--data-temp-unit",
        "K",
    ]);
    assert!(close(delta_h(&a), want, 1e-12), "{a}");
    assert!(
        a["warnings"]
            .to_string()
            .contains("column kept but not used: operator"),
        "{a}"
    );
    // Without --data-temp-unit, 283–313 is read as kelvin by the value rule (all ≥ 200).
    let b = fit_json(&[&odd, "--column", "pKa=reading", "--column", "sigma=4"]);
    assert!(close(delta_h(&b), want, 1e-12), "{b}");
}

#[test]
fn a_file_with_sigma_is_fitted_unweighted_on_request() {
    let dir = tempfile::tempdir().unwrap();
    let plain = write(dir.path(), "plain.csv", PLAIN_FILE);
    let p = plain.to_string_lossy().into_owned();
    let weighted = fit_json(&[&p]);
    let unweighted = fit_json(&[&p, "--unweighted"]);
    assert_eq!(weighted["weighting"], "inverse_variance");
    assert_eq!(unweighted["weighting"], "unweighted");
    // Ordinary least squares of ln K = −pKa·ln 10 on 1/T (T = t/°C + 273.15), slope = −ΔH°/R,
    // from the four points of PLAIN_FILE with numpy.polyfit run offline
    // (R = 8.314462618 J/(mol·K), CODATA 2018): ΔH° = 19 881.7538 J/mol.
    let dh = delta_h(&unweighted);
    assert!((dh - 19_881.753_8).abs() < 1e-3, "{dh}");
    assert!(
        (delta_h(&weighted) - dh).abs() > 1.0,
        "the weights matter here"
    );
}

#[test]
fn bad_column_choices_name_what_is_wrong() {
    let dir = tempfile::tempdir().unwrap();
    let odd = write(dir.path(), "odd.csv", ODD_FILE);
    let odd = odd.to_string_lossy().into_owned();
    // A column the file does not have: an input error (exit 1, as for --exclude of a row the
    // file does not have), naming the choice and listing the columns.
    let out = run(&[
        "fit",
        &odd,
        "--column",
        "temperature=T_degC",
        "--column",
        "pKa=3",
    ]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{err}");
    assert!(
        err.contains("'temperature=T_degC' names no column"),
        "{err}"
    );
    assert!(
        err.contains("1 'operator', 2 'temp', 3 'reading', 4 'spread'"),
        "{err}"
    );
    let out = run(&[
        "fit",
        &odd,
        "--column",
        "temperature=2",
        "--column",
        "pKa=7",
    ]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{err}");
    assert!(err.contains("'pKa=7' names no column"), "{err}");
    // A temperature unit that does not exist, or a role that is none: usage errors (exit 2,
    // as for --temp-unit), naming the value.
    let out = run(&["fit", &odd, "--column", "pKa=3", "--data-temp-unit", "R"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains("'R'") && err.contains("--data-temp-unit"),
        "{err}"
    );
    let out = run(&["fit", &odd, "--column", "absorbance=3"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("'absorbance' is not a column role"), "{err}");
    // A header that states its unit is not overruled.
    let plain = write(dir.path(), "plain.csv", PLAIN_FILE);
    let out = run(&["fit", &plain.to_string_lossy(), "--data-temp-unit", "K"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{err}");
    assert!(err.contains("column 1 ('T (°C)') states °C"), "{err}");
}

#[test]
fn a_run_column_names_the_data_sets_and_can_be_dropped() {
    let dir = tempfile::tempdir().unwrap();
    // Two runs of the PLAIN_FILE numbers: two data sets of four points each.
    let two = write(
        dir.path(),
        "runs.csv",
        "run,T (°C),pKa\nA,10,7.412\nA,20,7.288\nA,30,7.170\nA,40,7.061\n\
         B,10,7.412\nB,20,7.288\nB,30,7.170\nB,40,7.061\n",
    );
    let out = run(&["fit", &two.to_string_lossy(), "--summary"]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert_eq!(out.status.code(), Some(0), "{text}");
    assert!(
        text.contains("runs.csv  A") && text.contains("runs.csv  B"),
        "{text}"
    );
    // A run number on every row: one point per data set, refused with the way out.
    let each = write(
        dir.path(),
        "each.csv",
        "run,T (°C),pKa\n1,10,7.412\n2,20,7.288\n3,30,7.170\n4,40,7.061\n",
    );
    let each = each.to_string_lossy().into_owned();
    let out = run(&["fit", &each]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{err}");
    assert!(err.contains("--column series=none"), "{err}");
    let plain = write(dir.path(), "plain.csv", PLAIN_FILE);
    let want = delta_h(&fit_json(&[&plain.to_string_lossy()]));
    let one = fit_json(&[&each, "--column", "series=none", "--unweighted"]);
    let unweighted_plain = delta_h(&fit_json(&[&plain.to_string_lossy(), "--unweighted"]));
    assert!(close(delta_h(&one), unweighted_plain, 1e-12), "{one}");
    assert!((want - unweighted_plain).abs() > 1.0);
}

#[test]
fn a_project_keeps_its_columns_and_refuses_column_choices() {
    use isochore_data::{import_path, ImportOptions, Project};
    let dir = tempfile::tempdir().unwrap();
    let plain = write(dir.path(), "plain.csv", PLAIN_FILE);
    let project = Project::from_import(&import_path(&plain, &ImportOptions::default()).unwrap());
    let path = dir.path().join("p.isochore.json");
    project.save_atomic(&path).unwrap();
    let p = path.to_string_lossy().into_owned();
    for extra in [["--column", "pKa=2"], ["--data-temp-unit", "K"]] {
        let out = run(&["fit", &p, extra[0], extra[1]]);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(1), "{err}");
        assert!(
            err.contains("a project keeps the columns it was saved with"),
            "{err}"
        );
    }
    // A missing project is named as missing, not as a project with columns.
    let gone = dir.path().join("gone.isochore.json");
    let out = run(&["fit", &gone.to_string_lossy(), "--column", "pKa=2"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{err}");
    assert!(!err.contains("keeps the columns"), "{err}");
}
