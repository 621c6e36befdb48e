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
const CLOCK: i64 = 1_796_158_800;

fn bench() -> Workbench {
    let mut w = Workbench::with_demo(Prefs::default());
    w.block_fits = true;
    w.autosave_dir = None;
    w.fixed_unix_time = Some(CLOCK);
    w
}

fn harness(w: Workbench) -> Harness<'static, Workbench> {
    let mut h = Harness::builder().with_size([1600.0, 1300.0]).build_state(
        |ctx, w: &mut Workbench| {
            let t = ctx.input(|i| i.time);
            w.frame(ctx, t);
        },
        w,
    );
    h.run_steps(3);
    h
}

fn temp_dir(tag: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("isochore-gui-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// The label the results panel gives ΔH° (value in kJ/mol, 4 significant digits).
fn delta_h_label(joules: f64) -> String {
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
    let (dh, _) = library_fit(&w, None, Model::Linear);
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
    let (dh_all, _) = library_fit(&w, None, Model::Linear);
    let (dh_wo, _) = library_fit(&w, Some(OUTLIER_ROW), Model::Linear);
    assert_ne!(delta_h_label(dh_all), delta_h_label(dh_wo));
    let mut h = harness(w);
    h.get_by_label(&format!("include row {}", OUTLIER_ROW + 1))
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
    let (dh_all, _) = library_fit(&w, None, Model::Linear);
    let (dh_wo, _) = library_fit(&w, Some(OUTLIER_ROW), Model::Linear);
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
    let (_, cp) = library_fit(&w, None, Model::ConstantCp);
    let cp = cp.expect("ΔCp° fitted");
    let label = format!("ΔCp° = {} J/(mol·K)", sig(cp, 4));
    let mut h = harness(w);
    assert!(h.query_by_label(&label).is_none());
    h.get_by_label("model").click();
    h.run_steps(2);
    h.get_by_label("with ΔCp° (curved)").click();
    h.run_steps(3);
    h.get_by_label(&label);
    // One undo brings the linear model back.
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    h.run_steps(3);
    assert!(h.query_by_label(&label).is_none());
}

fn type_path_and_press(h: &mut Harness<'_, Workbench>, path: &std::path::Path, button: &str) {
    h.get_by_label("path").click();
    h.run_steps(1);
    h.get_by_label("path")
        .type_text(&path.display().to_string());
    h.run_steps(1);
    h.get_by_label(button).click();
    h.run_steps(3);
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
    let (dh_wo, _) = library_fit(&w, Some(OUTLIER_ROW), Model::Linear);
    let mut h = harness(w);
    h.get_by_label(&format!("include row {}", OUTLIER_ROW + 1))
        .click();
    h.run_steps(3);
    // Give the reason in the table's reason cell.
    h.get_by_label("(add a reason)").click();
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
    let r = next.recovery.as_ref().expect("recovery offered");
    let s = &r.project.series[0];
    assert_eq!(
        s.exclusion(2).map(|e| e.reason.as_str()),
        Some("cloudy sample")
    );
    next.act(isochore_gui::Action::Recover);
    next.apply_pending();
    let s = next.project.get(next.active.unwrap()).unwrap();
    assert!(s.exclusion(2).is_some());
    assert!(next.history.dirty());
    assert!(!auto.exists());
    let _ = std::fs::remove_dir_all(&dir);
}
