//! The one data-set type: a project file written before `DataSet` replaced `ProjectSeries`
//! still loads, with its values, and saves back unchanged but for the new `shown` field;
//! hiding a data set survives save and load; and the measurements of a file read by the
//! importer equal those of a project built from it, saved to disk and loaded again.

use isochore_data::{
    import_path, DataSet, EnergyUnit, ImportOptions, Project, Replicates, Row, SCHEMA_VERSION,
};
use serde_json::Value;
use std::path::PathBuf;

fn data(path: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../../tests/data")
        .join(path)
}

/// The project file kept from before the change (written by `Project::save_atomic` at
/// commit aac99da from `series_replicates_relative.csv` and
/// `semicolon_decimal_comma_bom.csv`, with settings, exclusions and notes; paths removed).
const V1: &str = "project/v1.isochore.json";

fn expected(file: &str) -> Value {
    let text = std::fs::read_to_string(data(&format!("import/{file}.expected.json"))).unwrap();
    serde_json::from_str(&text).unwrap()
}

fn close(a: f64, b: f64, what: &str) {
    assert!(
        (a - b).abs() <= 1e-12 * b.abs().max(1.0),
        "{what}: {a} vs {b}"
    );
}

#[test]
fn a_project_file_from_before_loads_with_its_values() {
    let p = Project::load(data(V1)).unwrap();
    assert_eq!(p.schema_version, SCHEMA_VERSION);
    let names: Vec<&str> = p.series.iter().map(|s| s.name.as_str()).collect();
    assert_eq!(
        names,
        ["wild type", "mutant A", "semicolon_decimal_comma_bom"]
    );
    assert!(p.series.iter().all(|s| s.shown), "no 'shown' key: shown");
    assert!(p.series.iter().all(DataSet::has_cells));
    assert_eq!(p.series[0].settings.replicates, Replicates::Average);
    assert_eq!(
        p.series[1].settings.energy_unit,
        EnergyUnit::KilocaloriePerMole
    );
    assert_eq!(p.series[1].notes, "second lot");
    assert_eq!(p.series[2].settings.fit.model.key(), "cp");
    assert!(p.series[2].decimal_comma);
    assert_eq!(p.series[2].excluded_rows(), [2]);
    // Every row converts to the values make_fixtures.py computed from the definitions it
    // cites (the files' own expected values, independent of this crate).
    for (s, file) in [
        (&p.series[1], "series_replicates_relative.csv"),
        (&p.series[2], "semicolon_decimal_comma_bom.csv"),
    ] {
        let want = expected(file);
        let want = want["series"]
            .as_array()
            .unwrap()
            .iter()
            .find(|w| w["name"] == s.name.as_str())
            .unwrap()["rows"]
            .as_array()
            .unwrap()
            .clone();
        let rows = s.converted().unwrap();
        assert_eq!(rows.len(), want.len(), "{file}");
        for (r, w) in rows.iter().zip(&want) {
            assert_eq!(r.line() as u64, w["line"].as_u64().unwrap(), "{file}");
            close(r.t_k, w["t_k"].as_f64().unwrap(), file);
            close(r.ln_k, w["ln_k"].as_f64().unwrap(), file);
            close(
                r.sigma_ln_k().unwrap(),
                w["sigma_ln_k"].as_f64().unwrap(),
                file,
            );
        }
    }
    // Averaged replicates with row 4 left out: the file's expected means at 10 °C and
    // 20 °C, then row 4 (30 °C) on its own, excluded.
    let want = expected("series_replicates_relative.csv");
    let avg = want["averaged"]["wild type"].as_array().unwrap();
    let pts = p.series[0].points().unwrap();
    assert_eq!(pts.len(), 3);
    for (pt, w) in pts.iter().zip(&avg[..2]) {
        close(
            pt.measurement.ln_k,
            w["ln_k"].as_f64().unwrap(),
            "mean ln K",
        );
        close(
            pt.measurement.sigma_ln_k.unwrap(),
            w["sigma_ln_k"].as_f64().unwrap(),
            "σ of the mean",
        );
        assert!(pt.measurement.included);
    }
    assert_eq!(pts[2].rows, [4]);
    assert!(!pts[2].measurement.included);
    let row4 = &want["series"][0]["rows"][3];
    close(
        pts[2].measurement.ln_k,
        row4["ln_k"].as_f64().unwrap(),
        "row 4",
    );
}

#[test]
fn a_project_file_from_before_round_trips() {
    let dir = tempfile::tempdir().unwrap();
    let before = Project::load(data(V1)).unwrap();
    let path = dir.path().join("again.isochore.json");
    before.save_atomic(&path).unwrap();
    let after = Project::load(&path).unwrap();
    assert_eq!(after, before, "load → save → load gives the same project");
    // The file written is the old one plus `"shown": true` in each data set, and the σ
    // convention under its newer name (commit 041e738: `scaled_by_fit` is written
    // `relative_weights`, `absolute` `known_uncertainties`; both are read): every other key
    // and value is as it was.
    let mut old: Value = serde_json::from_str(&std::fs::read_to_string(data(V1)).unwrap()).unwrap();
    let mut new: Value = serde_json::from_str(&std::fs::read_to_string(&path).unwrap()).unwrap();
    for s in new["series"].as_array_mut().unwrap() {
        assert_eq!(
            s.as_object_mut().unwrap().remove("shown"),
            Some(Value::Bool(true))
        );
    }
    for s in old["series"].as_array_mut().unwrap() {
        let c = &mut s["settings"]["fit"]["convention"];
        let renamed = match c.as_str() {
            Some("scaled_by_fit") => "relative_weights",
            Some("absolute") => "known_uncertainties",
            other => panic!("convention {other:?}"),
        };
        *c = Value::from(renamed);
    }
    assert_eq!(new, old);
}

#[test]
fn the_interval_method_draws_and_generator_start_value_are_kept_through_save_and_load() {
    use isochore_fit::intervals::{BootstrapScheme, IntervalChoice, IntervalRequest};
    let dir = tempfile::tempdir().unwrap();
    let mut p = Project::load(data(V1)).unwrap();
    // A project from before records none: the delta method, 10 000 draws, seed 1.
    assert!(p.series.iter().all(|s| s.settings.intervals.is_default()));
    p.series[0].settings.intervals = IntervalRequest {
        choice: IntervalChoice::MonteCarlo,
        draws: 2500,
        seed: 987_654_321_012,
    };
    p.series[2].settings.intervals = IntervalRequest {
        choice: IntervalChoice::Bootstrap(BootstrapScheme::Wild),
        draws: 400,
        seed: 5,
    };
    let path = dir.path().join("intervals.isochore.json");
    p.save_atomic(&path).unwrap();
    let back = Project::load(&path).unwrap();
    assert_eq!(back, p);
    // Written with the JSON output's keys; the series left at the delta method has none.
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&path).unwrap()).unwrap();
    let ivl = &v["series"][0]["settings"]["intervals"];
    assert_eq!(ivl["method"], "monte_carlo");
    assert_eq!(ivl["draws"], 2500);
    assert_eq!(ivl["seed"], 987_654_321_012u64);
    assert_eq!(
        v["series"][2]["settings"]["intervals"]["scheme"],
        "wild_rademacher"
    );
    assert!(v["series"][1]["settings"].get("intervals").is_none());
}

#[test]
fn a_hidden_data_set_stays_hidden_through_save_and_load() {
    let dir = tempfile::tempdir().unwrap();
    let mut p = Project::load(data(V1)).unwrap();
    p.series[1].shown = false;
    let path = dir.path().join("hidden.isochore.json");
    p.save_atomic(&path).unwrap();
    let back = Project::load(&path).unwrap();
    let shown: Vec<bool> = back.series.iter().map(|s| s.shown).collect();
    assert_eq!(shown, [true, false, true]);
    assert_eq!(back, p);
}

/// Each fixture read by the importer (no cells kept) and as a project built from it, saved
/// and loaded (cells converted again) gives the same measurements, bit for bit, with a row
/// excluded and replicates kept or averaged.
#[test]
fn an_import_and_the_project_built_from_it_give_the_same_measurements() {
    let dir = tempfile::tempdir().unwrap();
    let mut checked = 0;
    for entry in std::fs::read_dir(data("import")).unwrap() {
        let path = entry.unwrap().path();
        let name = path.file_name().unwrap().to_string_lossy().into_owned();
        if name.ends_with(".json") || name.ends_with(".py") {
            continue;
        }
        for replicates in [Replicates::Keep, Replicates::Average] {
            let o = ImportOptions {
                replicates,
                ..ImportOptions::default()
            };
            let mut imp = import_path(&path, &o).unwrap();
            for s in &mut imp.series {
                assert!(!s.has_cells(), "{name}: the importer keeps no cells");
                s.exclude(2, "checked", "2026-12-02T19:00:00Z").unwrap();
            }
            let file = dir.path().join("p.isochore.json");
            Project::from_import(&imp).save_atomic(&file).unwrap();
            let back = Project::load(&file).unwrap();
            assert_eq!(back.series.len(), imp.series.len(), "{name}");
            for (a, b) in imp.series.iter().zip(&back.series) {
                assert!(b.has_cells());
                assert_eq!(
                    a.measurements().unwrap(),
                    b.measurements().unwrap(),
                    "{name}"
                );
                assert_eq!(a.points().unwrap(), b.points().unwrap(), "{name}");
                let (ra, rb) = (a.converted().unwrap(), b.converted().unwrap());
                let notes = |s: &DataSet, rows: &[Row]| -> Vec<Option<String>> {
                    rows.iter().map(|r| s.note(r).map(str::to_string)).collect()
                };
                assert_eq!(notes(a, &ra), notes(b, &rb), "{name}: notes");
                assert_eq!(a.check_sigma().is_ok(), b.check_sigma().is_ok(), "{name}");
                assert_eq!(a.export_csv().unwrap(), b.export_csv().unwrap(), "{name}");
            }
            checked += 1;
        }
    }
    assert_eq!(checked, 2 * 17, "every good fixture, both replicate modes");
}
