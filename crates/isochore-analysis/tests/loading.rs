//! Reading inputs into data sets: rows numbered from 1 in one place, exclusions with their
//! reasons, project files recognised by name, overrides laid over a project's settings.

use crate::common::{csv, file};
use isochore_analysis::{load, Exclusions, LoadError, Overrides, RowNumber};
use isochore_fit::{Model, Weighting};

fn excluding(rows: &[usize]) -> Overrides {
    Overrides {
        exclude: Exclusions {
            rows: rows.iter().map(|&r| RowNumber::new(r).unwrap()).collect(),
            reason: "bubble in the cell".into(),
            at: "2026-12-02T14:00:00Z".into(),
        },
        with_cells: true,
        ..Overrides::default()
    }
}

#[test]
fn rows_are_numbered_from_one_with_their_lines_cells_and_reasons() {
    let (_d, path) = file("acid.csv", &format!("# a comment\n{}", csv(["0.01"; 4])));
    let set = &load(&path, &excluding(&[2])).unwrap()[0];
    let rows: Vec<usize> = set.rows.iter().map(|o| o.row.get()).collect();
    assert_eq!(rows, [1, 2, 3, 4]);
    // Line 1 is the comment, line 2 the header: data row 1 is line 3.
    assert_eq!(set.rows.get(0).unwrap().line, 3);
    assert_eq!(set.rows.get(0).unwrap().cells, ["278.15", "7.62", "0.01"]);
    assert!(!set.measurements[1].included);
    assert_eq!(
        set.rows.get(1).unwrap().exclusion_reason,
        Some("bubble in the cell")
    );
    assert_eq!(set.rows.get(0).unwrap().exclusion_reason, None);
    assert_eq!(set.measurements.len(), set.rows.len());
}

#[test]
fn a_row_beyond_the_data_set_is_named() {
    let (_d, path) = file("acid.csv", &csv(["0.01"; 4]));
    match load(&path, &excluding(&[5])) {
        Err(LoadError::NoSuchRow { row, rows, .. }) => assert_eq!((row.get(), rows), (5, 4)),
        other => panic!("{other:?}"),
    }
}

#[test]
fn bad_rows_refuse_the_file_unless_skipped() {
    let text = "temp/K,pKa,u(pKa)\n278.15,7.62,0.01\n288.15,abc,0.01\n298.15,7.31,0.01\n308.15,7.18,0.01\n";
    let (_d, path) = file("bad.csv", text);
    let e = load(&path, &Overrides::default()).unwrap_err();
    assert!(
        matches!(&e, LoadError::BadRows { rejected, .. } if rejected[0].line == 3),
        "{e:?}"
    );
    let skip = Overrides {
        skip_bad_rows: true,
        ..Overrides::default()
    };
    let set = &load(&path, &skip).unwrap()[0];
    assert_eq!(set.measurements.len(), 3);
    assert!(
        set.warnings[0].starts_with("skipped line 3"),
        "{:?}",
        set.warnings
    );
}

#[test]
fn a_project_file_is_read_with_its_exclusions_and_overrides() {
    let (dir, data) = file("acid.csv", &csv(["0.01"; 4]));
    let imp = isochore_data::import_path(&data, &Default::default()).unwrap();
    let mut project = isochore_data::Project::from_import(&imp);
    project.series[0]
        .exclude(3, "leaky seal", "2026-12-02T14:00:00Z")
        .unwrap();
    let path = dir.path().join("p.isochore.json");
    project.save_atomic(&path).unwrap();
    let o = Overrides {
        model: Some(Model::CONSTANT_CP),
        ..Overrides::default()
    };
    let set = &load(&path, &o).unwrap()[0];
    assert_eq!(set.options.model, Model::CONSTANT_CP);
    assert_eq!(set.options.weighting, Weighting::InverseVariance);
    assert!(!set.measurements[2].included);
    assert_eq!(set.rows.get(2).unwrap().row, RowNumber::new(3).unwrap());
    assert_eq!(
        set.rows.get(2).unwrap().exclusion_reason,
        Some("leaky seal")
    );
    assert_eq!(
        set.settings[0],
        ("project file".to_string(), path.display().to_string())
    );
    assert_eq!(set.file_name, "acid.csv");
}

#[test]
fn an_empty_project_is_refused() {
    let (dir, _) = file("x.txt", "");
    let path = dir.path().join("empty.isochore.json");
    isochore_data::Project::new().save_atomic(&path).unwrap();
    let e = load(&path, &Overrides::default()).unwrap_err();
    assert!(
        e.to_string().ends_with("the project holds no data sets"),
        "{e}"
    );
}

/// The command line's two ways in give the same prepared set: the file read as text (the
/// importer's rows, no cells kept) and a project built from it and saved (the cells
/// converted again), with the same row excluded and its reason, lines and cells.
#[test]
fn a_file_and_the_project_built_from_it_load_the_same() {
    let (dir, data) = file("acid.csv", &format!("# pKa run\n{}", csv(["0.01"; 4])));
    let o = excluding(&[2]);
    let from_text = load(&data, &o).unwrap();
    let imp = isochore_data::import_path(&data, &Default::default()).unwrap();
    let path = dir.path().join("acid.isochore.json");
    isochore_data::Project::from_import(&imp)
        .save_atomic(&path)
        .unwrap();
    let from_project = load(&path, &o).unwrap();
    assert_eq!(from_text.len(), 1);
    assert_eq!(from_project.len(), 1);
    let (a, b) = (&from_text[0], &from_project[0]);
    assert_eq!(a.measurements, b.measurements);
    assert_eq!(a.rows, b.rows, "rows, lines, cells and exclusion reasons");
    assert_eq!(a.options, b.options);
    assert_eq!(
        (&a.series, &a.file_name, &a.sha256),
        (&b.series, &b.file_name, &b.sha256)
    );
    assert_eq!(a.conversions, b.conversions);
    assert!(!a.measurements[1].included);
    assert_eq!(
        a.rows.get(1).unwrap().exclusion_reason,
        Some("bubble in the cell")
    );
    // Line 1 is the comment, line 2 the header: data row 1 is line 3.
    assert_eq!(a.rows.get(0).unwrap().line, 3);
}
