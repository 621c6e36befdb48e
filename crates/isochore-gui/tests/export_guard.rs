//! The window's export goes through the same overwrite guard as the command line: a file
//! isochore did not write is never replaced, while its own unchanged reports are.

use crate::workbench::{bench, harness, menu_item, temp_dir, type_path_and_press};
use egui_kittest::kittest::Queryable;

/// The stem the demo's binding series exports under: its source file's name, as the
/// command line names reports (isochore-analysis).
const STEM: &str = "binding_qx7_halo2";

#[test]
fn export_never_replaces_a_file_isochore_did_not_write() {
    let dir = temp_dir("export-guard");
    // A file of the user's that happens to carry a report's name (HTML and PDF are the
    // formats an export starts with).
    let theirs = dir.join(format!("{STEM}.pdf"));
    std::fs::write(&theirs, "T,K\n25,1\n").unwrap();
    let mut h = harness(bench());
    menu_item(&mut h, "File", "Export report and figures…");
    type_path_and_press(&mut h, &dir, "Export");
    let error = h.state().files.export.error.clone().unwrap_or_default();
    assert!(
        error.contains("No report was written") && error.contains("was not written by isochore"),
        "{error:?} / {:?}",
        h.state().files.export.note
    );
    assert_eq!(std::fs::read_to_string(&theirs).unwrap(), "T,K\n25,1\n");
    // Nothing else was written: the user's file is alone in the folder.
    let names: Vec<_> = std::fs::read_dir(&dir).unwrap().flatten().collect();
    assert_eq!(names.len(), 1, "{names:?}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_second_export_replaces_the_first_one_s_unchanged_files() {
    let dir = temp_dir("export-again");
    for round in 0..2 {
        // A fresh window each time: the dialog's path field keeps what was typed before.
        let mut h = harness(bench());
        menu_item(&mut h, "File", "Export report and figures…");
        type_path_and_press(&mut h, &dir, "Export");
        assert!(
            h.state().files.export.error.is_none()
                && h.query_by_label_contains("files written to").is_some(),
            "round {round}: {:?}",
            h.state().files.export.error
        );
    }
    assert!(dir.join(isochore_report::MANIFEST).is_file());
    // A report edited by hand since is the user's now, and is kept.
    let html = dir.join(format!("{STEM}.html"));
    std::fs::write(&html, "my notes").unwrap();
    let mut h = harness(bench());
    menu_item(&mut h, "File", "Export report and figures…");
    type_path_and_press(&mut h, &dir, "Export");
    let error = h.state().files.export.error.clone().unwrap_or_default();
    assert!(
        error.contains("was changed since isochore wrote it"),
        "{error:?}"
    );
    assert_eq!(std::fs::read_to_string(&html).unwrap(), "my notes");
    let _ = std::fs::remove_dir_all(&dir);
}
