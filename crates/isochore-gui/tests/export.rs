//! The export dialog (issue 16 item 7): it asks for a folder and suggests one next to the
//! project, never the data file just opened; it writes the shown data sets in HTML and
//! PDF unless the chemist chooses others, and a hidden data set only when ticked; the
//! files are written on a worker thread while the dialog shows its progress.

use crate::workbench::{bench, harness, menu_item, temp_dir, type_path_and_press};
use egui_kittest::kittest::Queryable;

fn names(dir: &std::path::Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n != isochore_report::MANIFEST)
        .collect();
    v.sort();
    v
}

#[test]
fn the_folder_is_suggested_beside_the_project_not_a_data_file() {
    let dir = temp_dir("export-folder");
    let mut w = bench();
    // The open dialog last held a data file's path, and the project has a file.
    w.files.path_text = dir.join("titration.csv").display().to_string();
    w.project.path = Some(dir.join("lab.isochore.json"));
    let mut h = harness(w);
    menu_item(&mut h, "File", "Export report and figures…");
    let folder = h.state().files.export.folder.clone();
    assert_eq!(folder, dir.join("lab reports").display().to_string());
    assert!(!folder.ends_with(".csv"));
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn only_shown_data_sets_in_html_and_pdf_unless_chosen() {
    let dir = temp_dir("export-choice");
    let w = bench();
    // The demo shows the binding data set and hides the acid one.
    let hidden: Vec<String> = w
        .project
        .series
        .iter()
        .filter(|s| !s.data.shown)
        .map(|s| s.name().to_string())
        .collect();
    assert_eq!(hidden.len(), 1);
    let mut h = harness(w);
    menu_item(&mut h, "File", "Export report and figures…");
    let first = dir.join("first");
    type_path_and_press(&mut h, &first, "Export");
    assert!(
        h.query_by_label_contains("2 files written to").is_some(),
        "{:?} / {:?}",
        h.state().files.export.error,
        h.state().files.export.note
    );
    assert_eq!(
        names(&first),
        ["binding_qx7_halo2.html", "binding_qx7_halo2.pdf"]
    );
    // Tick the hidden data set, drop PDF, add the CSV tables.
    h.get_by_label(&format!("{} (hidden in the plot)", hidden[0]))
        .click();
    h.get_by_label("PDF report").click();
    h.get_by_label("CSV tables (data, results)").click();
    h.run_steps(2);
    let second = dir.join("second");
    type_path_and_press(&mut h, &second, "Export");
    assert_eq!(
        names(&second),
        [
            "acid_pka-data.csv",
            "acid_pka-results.csv",
            "acid_pka.html",
            "binding_qx7_halo2-data.csv",
            "binding_qx7_halo2-results.csv",
            "binding_qx7_halo2.html",
        ],
        "{:?}",
        h.state().files.export.error
    );
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn export_runs_off_the_ui_thread_with_progress() {
    let dir = temp_dir("export-thread");
    let mut h = harness(bench());
    menu_item(&mut h, "File", "Export report and figures…");
    h.get_by_label("figures (PNG, 300 dpi)").click();
    h.run_steps(1);
    h.get_by_label("path").click();
    h.run_steps(1);
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::A);
    h.get_by_label("path").type_text(&dir.display().to_string());
    h.run_steps(1);
    h.get_by_label("Export").click();
    h.run_steps(1);
    // The frame that started it returned while the files are still being written (a PDF
    // and four 300-dpi figures take far longer than a frame): the dialog shows progress.
    let job = h
        .state()
        .files
        .export
        .job
        .as_ref()
        .expect("no export running");
    let (done, total) = job.progress();
    // HTML, PDF and four figures of one data set.
    assert_eq!(total, 6);
    assert!(done < total);
    h.get_by_label_contains("written");
    let start = std::time::Instant::now();
    while h.state().files.export.running() {
        assert!(start.elapsed().as_secs() < 120);
        std::thread::sleep(std::time::Duration::from_millis(20));
        h.run_steps(1);
    }
    h.run_steps(1);
    assert!(h.state().files.export.error.is_none());
    assert_eq!(names(&dir).len(), 6);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn the_analyst_and_note_typed_go_into_the_report() {
    let dir = temp_dir("export-record");
    let mut h = harness(bench());
    menu_item(&mut h, "File", "Export report and figures…");
    h.get_by_label("analyst name").click();
    h.run_steps(1);
    h.get_by_label("analyst name").type_text("R. Vance");
    h.run_steps(1);
    h.get_by_label("report note").click();
    h.run_steps(1);
    h.get_by_label("report note")
        .type_text("buffer B, second run");
    h.run_steps(1);
    type_path_and_press(&mut h, &dir, "Export");
    let html = std::fs::read_to_string(dir.join("binding_qx7_halo2.html")).unwrap();
    // The record line: the time of the export (isochore-analysis' clock), the analyst and
    // the program's version.
    let version = isochore_analysis::VERSION;
    assert!(html.contains(" UTC by R. Vance with vhfit "), "{html}");
    assert!(html.contains(&format!("with vhfit {version}.")));
    assert!(html.contains("Note: buffer B, second run"));
    let _ = std::fs::remove_dir_all(&dir);
}
