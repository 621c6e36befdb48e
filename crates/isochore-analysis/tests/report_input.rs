//! The report input both front ends write reports from: title, program line, rows and the
//! settings recorded.

use crate::common::{csv, file};
use isochore_analysis::{load, report_input, Overrides, VERSION};

#[test]
fn the_report_input_pairs_rows_with_the_fit_and_names_the_program_once() {
    let (_d, path) = file("acid.csv", &csv(["", "", "", ""]));
    let o = Overrides {
        with_cells: true,
        ..Overrides::default()
    };
    let set = &load(&path, &o).unwrap()[0];
    let fit = set.fit().unwrap();
    let extra = [("command line".to_string(), "vhfit fit acid.csv".to_string())];
    let input = report_input(set, fit, &extra);
    input.validate().unwrap();
    assert_eq!(input.title, "Van 't Hoff analysis: acid");
    // The report writes "vhfit <version>": the version alone, never "isochore isochore …".
    assert_eq!(input.program_version, VERSION);
    assert!(!input.program_version.contains("isochore"));
    assert_eq!(input.rows.len(), 4);
    assert_eq!(input.rows[3].row, 4);
    assert_eq!(input.rows[3].cells, ["308.15", "7.18", ""]);
    assert_eq!(input.source_name, "acid.csv");
    let names: Vec<&str> = input.settings.iter().map(|(k, _)| k.as_str()).collect();
    assert_eq!(names, ["replicates", "command line", "reading"]);
}
