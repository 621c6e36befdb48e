//! `vhfit fit PROJECT.isochore.json` without `--intervals` runs the interval method the
//! project records for each series (`SeriesSettings::intervals`, chosen in the window:
//! method, bootstrap scheme, draws, generator start value): the same bytes as the explicit
//! `--intervals … --draws … --seed …` run. An explicit option wins; a flag the recorded
//! method would not use is a usage error naming the series.

use crate::cli::{demo, json_of, run};
use isochore_data::{import_path, ImportOptions, Project};
use isochore_fit::intervals::{BootstrapScheme, IntervalChoice, IntervalRequest};
use std::path::Path;

/// A project of one demo file whose series record `intervals`, saved in `dir`.
fn project(dir: &Path, name: &str, file: &str, intervals: IntervalRequest) -> String {
    let mut p = Project::from_import(&import_path(demo(file), &ImportOptions::default()).unwrap());
    for s in &mut p.series {
        s.settings.intervals = intervals;
    }
    let path = dir.join(name);
    p.save_atomic(&path).unwrap();
    path.to_string_lossy().into_owned()
}

/// The Monte Carlo request with `draws` and start value `seed`.
fn monte_carlo(draws: usize, seed: u64) -> IntervalRequest {
    IntervalRequest {
        choice: IntervalChoice::MonteCarlo,
        draws,
        seed,
    }
}

fn stdout(args: &[&str]) -> String {
    let out = run(args);
    assert_eq!(out.status.code(), Some(0), "{args:?}: {out:?}");
    String::from_utf8(out.stdout).unwrap()
}

#[test]
fn a_project_runs_its_recorded_method_as_the_explicit_options_do() {
    let dir = tempfile::tempdir().unwrap();
    let mc = project(
        dir.path(),
        "mc.isochore.json",
        "acid_pka.csv",
        monte_carlo(500, 7),
    );
    let recorded = stdout(&["fit", &mc, "--json"]);
    let explicit = stdout(&[
        "fit",
        &mc,
        "--json",
        "--intervals",
        "monte-carlo",
        "--draws",
        "500",
        "--seed",
        "7",
    ]);
    assert_eq!(recorded, explicit);
    let j = json_of(&run(&["fit", &mc, "--json", "--summary"]));
    assert_eq!(j["intervals"]["method"], "monte_carlo");
    assert_eq!(j["intervals"]["draws"], 500);
    assert_eq!(j["intervals"]["seed"], 7);
    assert_eq!(j["params"]["delta_h"]["method"], "monte_carlo");
    // The text names the run too.
    assert!(stdout(&["fit", &mc])
        .contains("95% intervals by Monte Carlo (GUM Supplement 1), 500 draws, seed 7"));

    // The wild bootstrap with its own draws and start value.
    let wild = project(
        dir.path(),
        "wild.isochore.json",
        "binding_qx7_halo2.csv",
        IntervalRequest {
            choice: IntervalChoice::Bootstrap(BootstrapScheme::Wild),
            draws: 300,
            seed: 11,
        },
    );
    assert_eq!(
        stdout(&["fit", &wild, "--json", "--summary"]),
        stdout(&[
            "fit",
            &wild,
            "--json",
            "--summary",
            "--intervals",
            "bootstrap",
            "--bootstrap-scheme",
            "wild",
            "--draws",
            "300",
            "--seed",
            "11",
        ])
    );
}

#[test]
fn an_explicit_option_wins_over_the_project() {
    let dir = tempfile::tempdir().unwrap();
    let mc = project(
        dir.path(),
        "mc.isochore.json",
        "acid_pka.csv",
        monte_carlo(500, 7),
    );
    let plain = project(
        dir.path(),
        "plain.isochore.json",
        "acid_pka.csv",
        IntervalRequest::default(),
    );
    // --intervals delta: the delta method's document, as of a project recording nothing.
    let delta = stdout(&["fit", &mc, "--json", "--intervals", "delta"]);
    assert!(
        json_of(&run(&["fit", &mc, "--json", "--intervals", "delta"]))
            .get("intervals")
            .is_none()
    );
    assert_eq!(delta, stdout(&["fit", &plain, "--json"]));
    // --seed alone replaces the recorded start value, the recorded method and draws kept.
    assert_eq!(
        stdout(&["fit", &mc, "--json", "--summary", "--seed", "9"]),
        stdout(&[
            "fit",
            &mc,
            "--json",
            "--summary",
            "--intervals",
            "monte-carlo",
            "--draws",
            "500",
            "--seed",
            "9"
        ])
    );
    // --intervals bootstrap: the flags' request (default draws 10000 would be slow; 200).
    let j = json_of(&run(&[
        "fit",
        &mc,
        "--json",
        "--summary",
        "--intervals",
        "bootstrap",
        "--draws",
        "200",
    ]));
    assert_eq!(j["intervals"]["method"], "bootstrap");
    assert_eq!(j["intervals"]["draws"], 200);
    assert_eq!(j["intervals"]["seed"], 1);
}

#[test]
fn a_flag_the_recorded_method_would_not_use_is_a_usage_error() {
    let dir = tempfile::tempdir().unwrap();
    let plain = project(
        dir.path(),
        "plain.isochore.json",
        "acid_pka.csv",
        IntervalRequest::default(),
    );
    let out = run(&["fit", &plain, "--json", "--seed", "3"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains("records the intervals by delta method")
            && err.contains("the delta method draws nothing"),
        "{err}"
    );
    // A data file records nothing: the flag is refused before anything is read, as before.
    let out = run(&["fit", &demo("acid_pka.csv"), "--seed", "3"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("the delta method draws nothing"));
}

/// `stdout` of `args` followed by the explicit Monte Carlo options with `draws` and `seed`.
fn with_monte_carlo(args: &[&str], draws: &str, seed: &str) -> String {
    let flags = [
        "--intervals",
        "monte-carlo",
        "--draws",
        draws,
        "--seed",
        seed,
    ];
    stdout(&[args, &flags[..]].concat())
}

#[test]
fn predict_runs_the_project_s_recorded_method_too() {
    // `vhfit predict PROJECT` without --intervals: the recorded Monte Carlo run, the same
    // bytes as the explicit options; --intervals delta wins; a flag the recorded method
    // would not use is refused naming the series.
    let dir = tempfile::tempdir().unwrap();
    let mc = project(
        dir.path(),
        "mc.isochore.json",
        "acid_pka.csv",
        monte_carlo(400, 5),
    );
    let args = ["predict", mc.as_str(), "--at", "25,40", "--json"];
    let recorded = stdout(&args);
    assert_eq!(recorded, with_monte_carlo(&args, "400", "5"));
    let j: serde_json::Value = serde_json::from_str(&recorded).unwrap();
    assert_eq!(j["intervals"]["method"], "monte_carlo", "{j}");
    assert_eq!(j["intervals"]["draws"], 400);
    let delta = stdout(&[&args[..], &["--intervals", "delta"]].concat());
    assert_ne!(delta, recorded);
    // The same predictions as a project recording nothing (the source differs).
    let plain = project(
        dir.path(),
        "plain.isochore.json",
        "acid_pka.csv",
        IntervalRequest::default(),
    );
    let of = |s: &str| serde_json::from_str::<serde_json::Value>(s).unwrap()["predictions"].clone();
    let plain_out = stdout(&[&["predict", plain.as_str()][..], &args[2..]].concat());
    assert_eq!(of(&delta), of(&plain_out));
    assert_eq!(of(&delta)[0]["k"]["method"], "delta");
    assert_eq!(of(&recorded)[0]["k"]["method"], "monte_carlo");
    let out = run(&["predict", &plain, "--at", "25", "--seed", "3"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains("records the intervals by delta method"),
        "{err}"
    );
}

#[test]
fn a_joint_fit_runs_the_setting_all_its_series_record() {
    // The invented ligand demo's four series in one project, ΔCp° shared: recorded alike,
    // the joint fit runs that setting (the explicit options' bytes); recorded differently,
    // it is refused naming each series with its method.
    let dir = tempfile::tempdir().unwrap();
    let alike = project(
        dir.path(),
        "alike.isochore.json",
        "ligands_px_orrin3.csv",
        monte_carlo(200, 4),
    );
    // The joint fit's options (ΔCp° shared) after the file.
    let share = [
        "--model",
        "cp",
        "--share",
        "delta_cp",
        "--json",
        "--summary",
    ];
    let args = [&["fit", alike.as_str()][..], &share].concat();
    let recorded = stdout(&args);
    assert_eq!(recorded, with_monte_carlo(&args, "200", "4"));
    assert!(recorded.contains("\"monte_carlo\""), "{recorded}");
    // --seed alone replaces the recorded start value for all.
    assert_eq!(
        stdout(&[&args[..], &["--seed", "9"]].concat()),
        with_monte_carlo(&args, "200", "9")
    );

    let mut p = Project::load(std::path::Path::new(&alike)).unwrap();
    p.series[2].settings.intervals = IntervalRequest::default();
    let mixed = dir.path().join("mixed.isochore.json");
    p.save_atomic(&mixed).unwrap();
    let mixed = mixed.to_string_lossy().into_owned();
    let mixed = [&["fit", mixed.as_str()][..], &share].concat();
    let out = run(&mixed);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains("record different interval settings")
            && err.contains("delta method")
            && err.contains("Monte Carlo")
            && err.contains("choose it with --intervals"),
        "{err}"
    );
    // --intervals settles it.
    assert!(run(&[&mixed[..], &["--intervals", "delta"]].concat())
        .status
        .success());
}
