//! The command line on its own: without a display it says so in one line and points to
//! `vhfit --help`; `--report` writes what the file name says.

use crate::cli::{demo, run};
use std::process::Command;

#[test]
fn without_a_display_the_window_is_refused_in_one_line() {
    let out = Command::new(env!("CARGO_BIN_EXE_vhfit"))
        .env_remove("DISPLAY")
        .env_remove("WAYLAND_DISPLAY")
        .output()
        .expect("the binary runs");
    let err = String::from_utf8_lossy(&out.stderr);
    assert_ne!(out.status.code(), Some(0), "{err}");
    assert!(out.status.code().is_some(), "ended by a signal: {err}");
    assert!(out.stdout.is_empty());
    assert!(err.ends_with('\n'), "ends with a newline: {err:?}");
    assert_eq!(err.lines().count(), 1, "one line: {err:?}");
    assert!(err.contains("no display"), "{err}");
    assert!(err.contains("vhfit --help"), "{err}");
    assert!(!err.contains(".rs"), "no source path: {err}");
}

#[test]
fn report_csv_is_the_results_table_and_data_csv_the_data_table() {
    let dir = tempfile::tempdir().unwrap();
    let src = demo("acid_pka.csv");
    let results = dir.path().join("acid.csv");
    let data = dir.path().join("acid-data.csv");
    for target in [&results, &data] {
        let out = run(&["fit", &src, "--report", &target.to_string_lossy()]);
        assert_eq!(
            out.status.code(),
            Some(0),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
    let r = std::fs::read_to_string(&results).unwrap();
    assert!(
        r.starts_with("quantity,value,se,ci_low,ci_high,unit"),
        "{r}"
    );
    let d = std::fs::read_to_string(&data).unwrap();
    assert!(!d.starts_with("quantity,"), "{d}");
    // One line per data row of the demo file plus the header.
    let rows = std::fs::read_to_string(&src)
        .unwrap()
        .lines()
        .filter(|l| l.starts_with(|c: char| c.is_ascii_digit() || c == '-'))
        .count();
    assert_eq!(d.lines().count(), rows + 1, "{d}");
}
