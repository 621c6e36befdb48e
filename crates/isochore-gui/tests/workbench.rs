//! Interaction tests of the workbench through egui_kittest (no GPU: kittest drives egui
//! headless and reads the accessibility tree). Each expected number is computed in the
//! test by isochore-fit from the same measurements, so these check that the window shows
//! what the library computes, and that every gesture reaches the document.

use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use isochore_fit::{FitOptions, Model};
use isochore_gui::panels::style::sig;
use isochore_gui::{Prefs, Workbench};
use std::path::PathBuf;

/// The demo's suspicious point: row 7 of the binding series (30 °C, "baseline drift").
const OUTLIER_ROW: usize = 6;

/// A fixed wall clock for exclusion times: 2026-12-01T21:00:00Z.
pub(crate) const CLOCK: i64 = 1_796_158_800;

pub(crate) fn bench() -> Workbench {
    let mut w = Workbench::with_demo(Prefs::default());
    w.block_fits = true;
    w.autosave_dir = None;
    w.fixed_unix_time = Some(CLOCK);
    w
}

pub(crate) fn harness(w: Workbench) -> Harness<'static, Workbench> {
    let mut h = Harness::builder()
        // Tall enough that the results panel's prediction fields, below the two joint
        // regions, are on screen without scrolling (kittest clicks at a node's place).
        .with_size([1600.0, 1600.0])
        .build_ui_state(
            |ui, w: &mut Workbench| {
                let t = ui.input(|i| i.time);
                w.frame(ui, t);
            },
            w,
        );
    h.run_steps(3);
    h
}

/// A file dropped on the window, as egui-winit hands it over (egui-winit's own type for
/// this is private): a path, read from disk when asked.
#[derive(Debug)]
pub(crate) struct DroppedPath(pub(crate) PathBuf);

impl egui::DroppedFile for DroppedPath {
    fn path(&self) -> &std::path::Path {
        &self.0
    }

    fn bytes(&self) -> Result<Vec<u8>, String> {
        std::fs::read(&self.0).map_err(|e| e.to_string())
    }
}

/// What egui-winit puts into the frame's raw input when `path` is dropped on the window.
pub(crate) fn dropped(path: PathBuf) -> egui::DroppedFileHandle {
    std::sync::Arc::new(DroppedPath(path))
}

pub(crate) fn temp_dir(tag: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("isochore-gui-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// The first file in `dir` whose name ends with `suffix` (a report the test wrote).
pub(crate) fn file_ending(dir: &std::path::Path, suffix: &str) -> PathBuf {
    std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok().map(|e| e.path()))
        .find(|p| p.to_string_lossy().ends_with(suffix))
        .unwrap_or_else(|| panic!("no file ending {suffix} in {}", dir.display()))
}

/// The label the results panel gives ΔH° (value in kJ/mol, 4 significant digits).
pub(crate) fn delta_h_label(joules: f64) -> String {
    format!("ΔH° = {} kJ/mol", sig(joules / 1e3, 4))
}

/// ΔH° (and ΔCp°) by isochore-fit for the active series' points, with `exclude` left out.
fn library_fit(w: &Workbench, exclude: Option<usize>, model: Model) -> (f64, Option<f64>) {
    let s = w.project.get(w.active.unwrap()).unwrap();
    let mut m = s.points().unwrap().measurements;
    for (i, x) in m.iter_mut().enumerate() {
        x.included = Some(i) != exclude;
    }
    let opts = FitOptions {
        model,
        ..*s.options()
    };
    let f = isochore_fit::fit(&m, &opts).unwrap();
    (f.delta_h().value, f.delta_cp().map(|c| c.value))
}

fn active_row_excluded(h: &Harness<'_, Workbench>, row: usize) -> Option<String> {
    let w = h.state();
    let s = w.project.get(w.active.unwrap()).unwrap();
    s.exclusion(row).map(|e| e.reason.clone())
}

#[test]
fn demo_shows_the_library_delta_h() {
    let w = bench();
    let (dh, _) = library_fit(&w, None, Model::LINEAR);
    // The invented binding data weaken with temperature (K_d rises), so binding is
    // exothermic: a sign check on the scenario itself.
    assert!(dh < 0.0);
    let h = harness(w);
    let label = delta_h_label(dh);
    h.get_by_label(&label);
}

#[test]
fn excluding_through_the_table_refits_and_undo_restores() {
    let w = bench();
    let (dh_all, _) = library_fit(&w, None, Model::LINEAR);
    let (dh_wo, _) = library_fit(&w, Some(OUTLIER_ROW), Model::LINEAR);
    assert_ne!(delta_h_label(dh_all), delta_h_label(dh_wo));
    let mut h = harness(w);
    h.get_by_label(&format!("use row {}", OUTLIER_ROW + 1))
        .click();
    h.run_steps(3);
    assert_eq!(active_row_excluded(&h, OUTLIER_ROW).as_deref(), Some(""));
    h.get_by_label(&delta_h_label(dh_wo));
    // Undo with Ctrl+Z.
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    h.run_steps(3);
    assert_eq!(active_row_excluded(&h, OUTLIER_ROW), None);
    h.get_by_label(&delta_h_label(dh_all));
    // Redo with Ctrl+Shift+Z.
    h.key_press_modifiers(
        egui::Modifiers::COMMAND | egui::Modifiers::SHIFT,
        egui::Key::Z,
    );
    h.run_steps(3);
    h.get_by_label(&delta_h_label(dh_wo));
}

fn click_at(h: &mut Harness<'_, Workbench>, pos: egui::Pos2) {
    h.input_mut().events.push(egui::Event::PointerMoved(pos));
    h.run_steps(1);
    for pressed in [true, false] {
        h.input_mut().events.push(egui::Event::PointerButton {
            pos,
            button: egui::PointerButton::Primary,
            pressed,
            modifiers: egui::Modifiers::NONE,
        });
        h.run_steps(1);
    }
    h.run_steps(2);
}

#[test]
fn clicking_a_point_on_the_plot_excludes_it_and_records_a_reason() {
    let w = bench();
    let (dh_all, _) = library_fit(&w, None, Model::LINEAR);
    let (dh_wo, _) = library_fit(&w, Some(OUTLIER_ROW), Model::LINEAR);
    let mut h = harness(w);
    let pos = {
        let w = h.state();
        let a = w.fitter.get(w.active.unwrap()).unwrap();
        w.plot.screen_pos(&a, OUTLIER_ROW).expect("plot drawn")
    };
    click_at(&mut h, pos);
    h.get_by_label(&delta_h_label(dh_wo));
    // The reason field is offered; type one and record it.
    h.get_by_label("exclusion reason").click();
    h.run_steps(1);
    h.get_by_label("exclusion reason")
        .type_text("baseline drift");
    h.run_steps(1);
    h.get_by_label("Record reason").click();
    h.run_steps(3);
    assert_eq!(
        active_row_excluded(&h, OUTLIER_ROW).as_deref(),
        Some("baseline drift")
    );
    // Clicking the same (now hollow) point takes it back (the view may have moved).
    let pos = {
        let w = h.state();
        let a = w.fitter.get(w.active.unwrap()).unwrap();
        w.plot.screen_pos(&a, OUTLIER_ROW).expect("plot drawn")
    };
    click_at(&mut h, pos);
    assert_eq!(active_row_excluded(&h, OUTLIER_ROW), None);
    h.get_by_label(&delta_h_label(dh_all));
}

#[test]
fn switching_to_the_cp_model_shows_delta_cp() {
    let w = bench();
    let (_, cp) = library_fit(&w, None, Model::CONSTANT_CP);
    let cp = cp.expect("ΔCp° fitted");
    let label = format!("ΔCp° = {} J/(mol·K)", sig(cp, 4));
    let mut h = harness(w);
    assert!(h.query_by_label(&label).is_none());
    h.get_by_label("model").click();
    h.run_steps(2);
    h.get_by_label(&isochore_report::present::model_label(
        isochore_fit::Model::CONSTANT_CP,
    ))
    .click();
    h.run_steps(3);
    h.get_by_label(&label);
    // One undo brings the linear model back.
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    h.run_steps(3);
    assert!(h.query_by_label(&label).is_none());
}

pub(crate) fn type_path_and_press(
    h: &mut Harness<'_, Workbench>,
    path: &std::path::Path,
    button: &str,
) {
    h.get_by_label("path").click();
    h.run_steps(1);
    // Replace whatever the field holds (the export dialog suggests a folder).
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::A);
    h.run_steps(1);
    h.get_by_label("path")
        .type_text(&path.display().to_string());
    h.run_steps(1);
    h.get_by_label(button).click();
    h.run_steps(3);
    // An export is written on a worker thread: step frames until it is done.
    let start = std::time::Instant::now();
    while h.state().files.export.running() {
        assert!(start.elapsed().as_secs() < 120, "the export did not finish");
        std::thread::sleep(std::time::Duration::from_millis(20));
        h.run_steps(1);
    }
    h.run_steps(2);
}

#[test]
fn a_bad_file_shows_where_and_leaves_the_project_untouched() {
    let dir = temp_dir("bad");
    let path = dir.join("broken.csv");
    std::fs::write(
        &path,
        "T (°C),Kd (nM)\n10,64.9\n15,80.1\n20,abc\n25,120.3\n30,150.2\n",
    )
    .unwrap();
    let w = bench();
    let before = w.project.clone();
    let mut h = harness(w);
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::O);
    h.run_steps(2);
    type_path_and_press(&mut h, &path, "Open");
    // Shown in the window, and worded with file, line, column and the cell.
    assert!(h.query_by_label_contains("line 4, column 2").is_some());
    let problems = h
        .state()
        .files
        .preview
        .as_ref()
        .expect("preview")
        .problems();
    let msg = problems.join("\n");
    assert!(msg.contains("broken.csv: line 4, column 2"), "{msg}");
    assert!(msg.contains("abc"), "{msg}");
    h.get_by_label("Cancel").click();
    h.run_steps(3);
    assert_eq!(h.state().project, before);
    assert!(!h.state().history.dirty());
    // A file that cannot be read at all: the message names it, the project stays.
    let missing = dir.join("no-such-file.csv");
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::O);
    h.run_steps(2);
    type_path_and_press(&mut h, &missing, "Open");
    assert!(h.query_by_label_contains("no-such-file.csv").is_some());
    assert_eq!(h.state().project, before);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn saving_and_reopening_keeps_exclusions_and_reasons() {
    let dir = temp_dir("save");
    let path = dir.join("binding.isochore.json");
    let w = bench();
    let (dh_wo, _) = library_fit(&w, Some(OUTLIER_ROW), Model::LINEAR);
    let mut h = harness(w);
    h.get_by_label(&format!("use row {}", OUTLIER_ROW + 1))
        .click();
    h.run_steps(3);
    // Give the reason in the table's reason cell.
    // The reason column runs on past the table's visible edge (the table scrolls
    // sideways), so the placeholder is clicked on its visible left end, not its centre.
    let r = h.get_by_label("(add a reason)").rect();
    click_at(&mut h, egui::pos2(r.left() + 8.0, r.center().y));
    h.run_steps(2);
    h.get_by_label(&format!("edit row {}", OUTLIER_ROW + 1))
        .type_text("baseline drift");
    h.run_steps(1);
    h.key_press(egui::Key::Enter);
    h.run_steps(3);
    assert_eq!(
        active_row_excluded(&h, OUTLIER_ROW).as_deref(),
        Some("baseline drift")
    );
    h.key_press_modifiers(
        egui::Modifiers::COMMAND | egui::Modifiers::SHIFT,
        egui::Key::S,
    );
    h.run_steps(2);
    type_path_and_press(&mut h, &path, "Save");
    assert!(path.exists());
    assert!(!h.state().history.dirty());

    let mut again = Workbench::new(Prefs::default());
    again.block_fits = true;
    again.open_path(&path);
    again.apply_pending();
    assert!(again.messages.is_empty(), "{:?}", again.messages);
    let s = again.project.get(again.active.unwrap()).unwrap();
    let e = s.exclusion(OUTLIER_ROW).expect("still excluded");
    assert_eq!(e.reason, "baseline drift");
    assert_eq!(e.at, "2026-12-01T21:00:00Z");
    let h2 = harness(again);
    h2.get_by_label(&delta_h_label(dh_wo));
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn unsaved_work_is_autosaved_beside_the_project_and_offered_back() {
    let dir = temp_dir("auto");
    let path = dir.join("work.isochore.json");
    let mut w = bench();
    w.prefs.autosave_secs = 60.0;
    w.save_to(&path);
    assert!(w.messages.is_empty(), "{:?}", w.messages);
    w.push(isochore_gui::command::Command::SetExclusion {
        series: w.active.unwrap(),
        row: 2,
        exclusion: Some(("cloudy sample".into(), "2026-12-01T21:00:00Z".into())),
    });
    w.apply_pending();
    let auto = w.autosave_path().unwrap();
    // Before the interval has passed nothing is written; after it, the autosave appears.
    assert!(!w.autosave_tick());
    assert!(!auto.exists());
    w.set_clock(30.0);
    assert!(!w.autosave_tick());
    w.set_clock(61.0);
    assert!(w.autosave_tick(), "autosave written at {}", auto.display());
    assert!(auto.exists());
    // Nothing new to write: no second autosave.
    w.set_clock(200.0);
    assert!(!w.autosave_tick());
    // A crash now: the next session opens the project and is offered the newer copy.
    let mut next = Workbench::new(Prefs::default());
    next.block_fits = true;
    next.open_path(&path);
    next.apply_pending();
    let r = next.recoveries.first().expect("recovery offered");
    let s = &r.project.series[0];
    assert_eq!(
        s.exclusion(2).map(|e| e.reason.as_str()),
        Some("cloudy sample")
    );
    next.act(isochore_gui::Action::Recover(r.path.clone()));
    next.apply_pending();
    let s = next.project.get(next.active.unwrap()).unwrap();
    assert!(s.exclusion(2).is_some());
    assert!(next.history.dirty());
    assert!(!auto.exists());
    let _ = std::fs::remove_dir_all(&dir);
}

/// Opens a menu and clicks one of its items, as a pointer would.
pub(crate) fn menu_item(h: &mut Harness<'_, Workbench>, menu: &str, item: &str) {
    h.get_by_label(menu).click();
    h.run_steps(2);
    h.get_by_label(item).click();
    h.run_steps(2);
}

/// The value of the first "ΔH° at θ …" row of a results CSV written by isochore-report.
fn delta_h_from_results_csv(text: &str) -> f64 {
    let line = text
        .lines()
        .find(|l| l.starts_with("ΔH° at θ"))
        .unwrap_or_else(|| panic!("no ΔH° row in:\n{text}"));
    // quantity,value,se,ci_low,ci_high,unit — the quantity holds no comma.
    line.split(',').nth(1).unwrap().parse().unwrap()
}

#[test]
fn exporting_through_the_menu_writes_reports_with_the_library_delta_h() {
    let dir = temp_dir("export");
    let out = dir.join("reports");
    let w = bench();
    let (dh, _) = library_fit(&w, None, Model::LINEAR);
    let mut h = harness(w);
    menu_item(&mut h, "File", "Export report and figures…");
    // HTML and PDF are chosen already; every other format too.
    for f in [
        "Markdown report (with SVG figures)",
        "CSV tables (data, results)",
        "figures (PNG, 300 dpi)",
    ] {
        h.get_by_label(f).click();
        h.run_steps(1);
    }
    type_path_and_press(&mut h, &out, "Export");
    // The dialog reports what it wrote.
    assert!(
        h.query_by_label_contains("files written to").is_some(),
        "{:?} / {:?}",
        h.state().files.export.error,
        h.state().files.export.note
    );
    let stem = "binding_qx7_halo2";
    for name in [
        format!("{stem}.html"),
        format!("{stem}.md"),
        format!("{stem}.pdf"),
        format!("{stem}-data.csv"),
        format!("{stem}-results.csv"),
        format!("{stem}-vanthoff.png"),
        format!("{stem}-residuals.png"),
        format!("{stem}-influence.png"),
        format!("{stem}-ellipse.png"),
    ] {
        let p = out.join(&name);
        let len = std::fs::metadata(&p)
            .unwrap_or_else(|e| panic!("{} missing: {e}", p.display()))
            .len();
        assert!(len > 100, "{name} is only {len} bytes");
    }
    // The results table carries the library's ΔH° at full precision (kJ/mol).
    let csv = std::fs::read_to_string(out.join(format!("{stem}-results.csv"))).unwrap();
    let got = delta_h_from_results_csv(&csv);
    assert!(
        (got - dh / 1e3).abs() <= 1e-9 * (dh / 1e3).abs(),
        "report {got} kJ/mol, library {} kJ/mol",
        dh / 1e3
    );
    // The HTML and Markdown reports show the same value, rounded as the report rounds it.
    let s = h.state().project.get(h.state().active.unwrap()).unwrap();
    let fit = h.state().fitter.get(s.id).unwrap();
    let fit = fit.fit.as_deref().unwrap();
    let rows = isochore_report::content::result_rows_for(
        fit,
        s.data.settings.energy_unit,
        s.data.settings.temperature_unit,
    );
    let shown = &rows[0];
    assert!(shown.quantity.starts_with("ΔH°"));
    assert!((shown.estimate.value - dh / 1e3).abs() < 1e-9);
    let value = shown.cells()[0].clone();
    for ext in ["html", "md"] {
        let text = std::fs::read_to_string(out.join(format!("{stem}.{ext}"))).unwrap();
        assert!(text.contains(&value), "{ext} report lacks ΔH° = {value}");
    }
    // The PDF and PNGs are what their names say (file signatures).
    let pdf = std::fs::read(out.join(format!("{stem}.pdf"))).unwrap();
    assert!(pdf.starts_with(b"%PDF-"));
    let png = std::fs::read(out.join(format!("{stem}-vanthoff.png"))).unwrap();
    assert!(png.starts_with(b"\x89PNG\r\n\x1a\n"));
    let _ = std::fs::remove_dir_all(&dir);
}

/// An invented data set, as a spreadsheet puts it on the clipboard (tab-separated).
const PASTED: &str =
    "T/K\tK\n283.15\t5210\n290.15\t4180\n297.15\t3420\n304.15\t2790\n311.15\t2335\n318.15\t1930\n";

/// ΔH° by isochore-fit straight from the numbers of [`PASTED`], with `options`.
fn pasted_delta_h(options: &isochore_fit::FitOptions) -> f64 {
    let m: Vec<isochore_fit::Measurement> = PASTED
        .lines()
        .skip(1)
        .map(|l| {
            let mut c = l.split('\t').map(|x| x.parse::<f64>().unwrap());
            let (t, k) = (c.next().unwrap(), c.next().unwrap());
            isochore_fit::Measurement::new(t, k.ln())
        })
        .collect();
    isochore_fit::fit(&m, options).unwrap().delta_h().value
}

pub(crate) fn accept_import(h: &mut Harness<'_, Workbench>, n_before: usize) -> u64 {
    assert!(h.state().files.preview.is_some(), "no import preview");
    // Data opened while the demo is shown start a new project of their own.
    let n_before = if isochore_gui::start::is_demo(&h.state().project) {
        0
    } else {
        n_before
    };
    // Let the preview window settle its size (it is centred, so it moves while it grows).
    h.run_steps(4);
    h.get_by_label("Add to project").click();
    h.run_steps(3);
    let w = h.state();
    assert_eq!(w.project.series.len(), n_before + 1);
    let s = w.project.series.last().unwrap();
    assert_eq!(w.active, Some(s.id), "the new series is made active");
    s.id
}

#[test]
fn pasting_a_table_imports_it_after_the_preview() {
    let w = bench();
    let n_before = w.project.series.len();
    let mut h = harness(w);
    // What egui-winit turns Ctrl+V into: a paste event with the clipboard's text.
    h.input_mut()
        .events
        .push(egui::Event::Paste(PASTED.to_string()));
    // The paste is read in the first frame; the preview window's first frame is a sizing
    // pass that egui 0.37 leaves out of the accessibility tree, so it shows in the third.
    h.run_steps(3);
    // The preview names the source and the recognised rows before anything is added.
    assert!(h.query_by_label_contains("pasted text").is_some());
    assert!(h.query_by_label_contains("6 rows read").is_some());
    assert_eq!(h.state().project.series.len(), n_before);
    let id = accept_import(&mut h, n_before);
    let w = h.state();
    let s = w.project.get(id).unwrap();
    assert_eq!(s.n_rows(), 6);
    assert_eq!(s.cell(5, 1), "1930");
    // No uncertainty column: equal weights, as the command line does (weights need σ).
    assert_eq!(s.options().weighting, isochore_fit::Weighting::Unweighted);
    let dh = pasted_delta_h(s.options());
    // Invented data with K falling as T rises: exothermic (a sign check on the scenario).
    assert!(dh < 0.0);
    h.get_by_label(&delta_h_label(dh));
    // One undo takes the import back.
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    h.run_steps(3);
    assert_eq!(h.state().project.series.len(), n_before);
}

#[test]
fn a_file_dropped_on_the_window_is_imported() {
    let dir = temp_dir("drop");
    let path = dir.join("dropped.csv");
    std::fs::write(&path, PASTED.replace('\t', ",")).unwrap();
    let w = bench();
    let n_before = w.project.series.len();
    let mut h = harness(w);
    // What egui-winit hands the frame when a file is dropped on the window.
    h.input_mut().dropped_files.push(dropped(path.clone()));
    // As for a paste: the preview window is in the accessibility tree from the third frame.
    h.run_steps(3);
    assert!(h.query_by_label_contains("dropped.csv").is_some());
    let id = accept_import(&mut h, n_before);
    let w = h.state();
    let s = w.project.get(id).unwrap();
    assert_eq!(s.n_rows(), 6);
    assert_eq!(w.prefs.recent.first(), Some(&path), "remembered as recent");
    h.get_by_label(&delta_h_label(pasted_delta_h(s.options())));
    // A dropped file that is not a table: an error naming it, the project untouched.
    let before = h.state().project.clone();
    let junk = dir.join("notes.csv");
    std::fs::write(&junk, "just some words\nand more words\n").unwrap();
    h.input_mut().dropped_files.push(dropped(junk));
    h.run_steps(3);
    let said = format!(
        "{:?} {:?}",
        h.state().messages,
        h.state().files.preview.as_ref().map(|p| p.problems())
    );
    assert!(said.contains("notes.csv"), "{said}");
    assert_eq!(h.state().project, before);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn typing_a_target_k_gives_the_library_temperature() {
    let w = bench();
    let s = w.project.get(w.active.unwrap()).unwrap();
    let tu = s.data.settings.temperature_unit;
    let fit = {
        let m = s.points().unwrap().measurements;
        isochore_fit::fit(&m, s.options()).unwrap()
    };
    // K = 5e6 lies inside the demo's range of K (about 3e6 to 1.5e7): no extrapolation.
    let t = fit.temperature_for_k(5.0e6).unwrap();
    let want = format!("T = {} {}", sig_fixed(tu.from_kelvin(t.value)), tu.symbol());
    let mut h = harness(w);
    // Nothing is claimed before a target is typed.
    assert!(h.query_by_label_contains("T = ").is_none());
    h.get_by_label("target K").click();
    h.run_steps(1);
    h.get_by_label("target K").type_text("5e6");
    h.run_steps(3);
    assert!(
        h.query_by_label_contains(&want).is_some(),
        "no label with {want}"
    );
    assert!(h.query_by_label_contains("extrapolation").is_none());
    // The demo is a K_d file in nM: the target is said in K_d too, K_d = c°/K =
    // 10⁹ nM / 5 × 10⁶ = 200 nM (by hand).
    assert!(
        h.query_by_label_contains("temperature where K_d = 200.0 nM (K = 5.000 × 10^6):")
            .is_some(),
        "no K_d target"
    );
    // A typing error is said, not hidden.
    h.get_by_label("target K").type_text("x");
    h.run_steps(3);
    assert!(h.query_by_label_contains("is not a number").is_some());
}

/// Two decimals, as the prediction panel writes temperatures.
fn sig_fixed(x: f64) -> String {
    isochore_gui::panels::style::fixed(x, 2)
}
