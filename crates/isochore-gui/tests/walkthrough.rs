//! Interaction tests of the fixes from the chemist's walk through the window (issue 16,
//! items 1–6): typed temperatures follow the unit, a table edit follows the series'
//! decimal convention, recovery files are offered at start-up, hiding a series is saved,
//! imports do not mix with the demo, series are renamed and removed, and files are
//! written with the umask's permissions. Expected numbers come from isochore-fit on the
//! same measurements, as in the other interaction tests.

use crate::workbench::{bench, harness, temp_dir};
use egui::accesskit::Role;
use egui::{Key, Modifiers};
use egui_kittest::kittest::{NodeT, Queryable};
use egui_kittest::Harness;
use isochore_gui::command::Command;
use isochore_gui::panels::style::{fixed, sig};
use isochore_gui::start::is_demo;
use isochore_gui::{Prefs, Workbench};
use std::path::{Path, PathBuf};

type H = Harness<'static, Workbench>;

/// Whether some node carries exactly this label.
fn shows(h: &H, label: &str) -> bool {
    h.query_all_by_label(label).next().is_some()
}

/// Replaces the text of the text field named `label` with `text` and presses Enter.
fn retype(h: &mut H, label: &str, text: &str) {
    h.get_by_role_and_label(Role::TextInput, label).click();
    h.run_steps(1);
    h.key_press_modifiers(Modifiers::COMMAND, Key::A);
    h.run_steps(1);
    h.get_by_role_and_label(Role::TextInput, label)
        .type_text(text);
    h.run_steps(1);
    h.key_press(Key::Enter);
    h.run_steps(3);
}

/// Opens the combo box labelled `combo` and picks the entry `choice`.
fn choose(h: &mut H, combo: &str, choice: &str) {
    h.get_by_label(combo).click();
    h.run_steps(2);
    h.get_by_role_and_label(Role::Button, choice).click();
    h.run_steps(3);
}

/// The prediction panel's ln K row ("value (CI low … CI high)", three decimals) for a fit
/// at `t_k` kelvin.
fn ln_k_prediction(f: &isochore_fit::VantHoffFit, t_k: f64) -> String {
    let p = f.predict(t_k).unwrap();
    format!(
        "{} ({} … {})",
        fixed(p.ln_k.value, 3),
        fixed(p.ln_k.ci.low, 3),
        fixed(p.ln_k.ci.high, 3)
    )
}

/// The two-point line the panel shows for (T₁, K₁ = 1.0e6) and (T₂, K₂ = 4.0e5),
/// σ(ln K) = 0.05 each (the panel's starting pairs), by isochore-fit.
fn two_point_line(t1_k: f64, t2_k: f64) -> String {
    use isochore_fit::two_point::{enthalpy_from_pairs, StatePoint};
    let a = StatePoint {
        sigma_ln_k: 0.05,
        ..StatePoint::exact(t1_k, 1.0e6)
    };
    let b = StatePoint {
        sigma_ln_k: 0.05,
        ..StatePoint::exact(t2_k, 4.0e5)
    };
    let r = enthalpy_from_pairs(a, b, 0.95).unwrap();
    let (hh, ss) = (r.delta_h.scaled(1e-3), r.delta_s);
    format!(
        "ΔH° = {} ± {} kJ/mol   ΔS° = {} ± {} J/(mol·K)",
        sig(hh.value, 4),
        sig(hh.se, 2),
        sig(ss.value, 4),
        sig(ss.se, 2)
    )
}

#[test]
fn changing_the_temperature_unit_converts_every_typed_temperature() {
    let w = bench();
    let id = w.active.unwrap();
    let opts = *w.project.get(id).unwrap().options();
    let m = w.project.get(id).unwrap().points().unwrap().measurements;
    let f = isochore_fit::fit(&m, &opts).unwrap();
    let mut h = harness(w);
    h.get_by_label("Two-point calculation").click();
    h.run_steps(3);
    retype(&mut h, "at T =", "37");
    // 37 °C is 310.15 K, 25 °C is 298.15 K (T/K = t/°C + 273.15, the SI definition of
    // the Celsius scale).
    let at_37c = ln_k_prediction(&f, 310.15);
    assert!(shows(&h, &at_37c), "no {at_37c} at 37 °C");
    let pairs = two_point_line(298.15, 310.15);
    assert!(shows(&h, &pairs), "no {pairs}");

    choose(&mut h, "temperature unit", "K");
    let w = h.state();
    assert_eq!(
        w.project.get(id).unwrap().data.settings.temperature_unit,
        isochore_fit::TemperatureUnit::Kelvin
    );
    assert_eq!(w.predict.t_text, "310.15");
    assert_eq!(w.predict.two_point[0], "298.15");
    assert_eq!(w.predict.two_point[3], "310.15");
    // Still the prediction for 310.15 K, not for 37 K.
    assert!(shows(&h, &at_37c), "no {at_37c} after the switch to K");
    assert!(shows(&h, &pairs), "two-point result changed with the unit");

    // Undo brings °C back, and the typed temperatures with it.
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
    assert_eq!(h.state().predict.t_text, "37");
    assert_eq!(h.state().predict.two_point[0], "25");
    assert!(shows(&h, &at_37c));
}

#[test]
fn a_comma_typed_into_a_series_of_decimal_points_is_refused() {
    let w = bench();
    let id = w.active.unwrap();
    // The binding demo is written with decimal points (row 4: 20.0 °C, K_d = 110.73 nM).
    assert!(!w.project.get(id).unwrap().data.decimal_comma);
    let mut h = harness(w);
    h.get_by_label("110.73").click();
    h.run_steps(2);
    retype(&mut h, "edit row 4", "65,000");
    // Refused, with the line and column of the file, not read as 65.000 nM.
    assert_eq!(h.state().project.get(id).unwrap().cell(3, 1), "110.73");
    assert!(!h.state().history.dirty());
    let refusal = h
        .query_all_by_label_contains("the cell was kept")
        .next()
        .map(|n| n.value().or_else(|| n.accesskit_node().label()))
        .expect("a refusal in the table")
        .unwrap_or_default();
    assert!(refusal.contains("'65,000'"), "{refusal}");
    assert!(refusal.contains("line 6, column 2"), "{refusal}");
    assert!(refusal.contains("thousands separator"), "{refusal}");
    // The same number without the separator is taken.
    h.get_by_label("110.73").click();
    h.run_steps(2);
    retype(&mut h, "edit row 4", "65000");
    assert_eq!(h.state().project.get(id).unwrap().cell(3, 1), "65000");
}

/// A demo workbench that excludes row 3 of the binding series ("cloudy sample") and lets
/// the autosave write (through the `Workbench` API: the autosave runs on the app clock),
/// saved first to `saved_as` when given, its untitled autosave going to `data_dir`.
fn leave_autosave(saved_as: Option<&Path>, data_dir: &Path) -> PathBuf {
    let mut w = bench();
    w.autosave_dir = Some(data_dir.to_path_buf());
    if let Some(p) = saved_as {
        w.save_to(p);
    }
    let id = w.active.unwrap();
    w.push(Command::SetExclusion {
        series: id,
        row: 2,
        exclusion: Some(("cloudy sample".into(), "2026-12-01T21:00:00Z".into())),
    });
    w.apply_pending();
    w.set_clock(w.prefs.autosave_secs + 1.0);
    assert!(w.autosave_tick());
    w.autosave_path().unwrap()
}

#[test]
fn every_autosave_found_at_start_up_is_offered_with_its_name_and_time() {
    let dir = temp_dir("offers");
    let data_dir = dir.join("data");
    std::fs::create_dir_all(&data_dir).unwrap();
    let project = dir.join("a.isochore.json");
    let beside = leave_autosave(Some(&project), &data_dir);
    let untitled = leave_autosave(None, &data_dir);
    assert_eq!(beside, dir.join("a.isochore.json.autosave"));
    assert!(untitled.starts_with(&data_dir));

    // The next start shows the demo (not project a), and still offers both.
    let mut prefs = Prefs::default();
    prefs.remember(&project);
    let mut w = Workbench::with_demo(prefs);
    w.block_fits = true;
    w.autosave_dir = Some(data_dir.clone());
    w.offer_recoveries();
    let mut h = harness(w);
    let when = |p: &Path| {
        let t = std::fs::metadata(p).unwrap().modified().unwrap();
        let secs = t.duration_since(std::time::UNIX_EPOCH).unwrap().as_secs();
        isochore_gui::command::rfc3339_utc(secs as i64)
    };
    for (name, auto) in [
        ("a.isochore.json", &beside),
        ("untitled project", &untitled),
    ] {
        let offer = format!(
            "Unsaved work from an earlier session was found: {name}, autosaved {}",
            when(auto)
        );
        assert!(
            h.query_all_by_label_contains(&offer).next().is_some(),
            "no offer: {offer}"
        );
    }
    assert_eq!(h.query_all_by_label("Restore it").count(), 2);

    // Restore project a's work: its path, its exclusion, unsaved; the autosave used up.
    let k = h
        .state()
        .recoveries
        .iter()
        .position(|r| r.name() == "a.isochore.json")
        .unwrap();
    h.query_all_by_label("Restore it").nth(k).unwrap().click();
    h.run_steps(3);
    let w = h.state();
    assert_eq!(w.project.path.as_deref(), Some(project.as_path()));
    let s = w.project.get(w.active.unwrap()).unwrap();
    assert_eq!(s.exclusion(2).unwrap().reason, "cloudy sample");
    assert!(w.history.dirty());
    assert!(!beside.exists());
    // Discard the untitled one: its file goes, the restored work stays.
    h.get_by_label("Discard it").click();
    h.run_steps(3);
    assert!(h.state().recoveries.is_empty());
    assert!(!untitled.exists());
    assert_eq!(h.state().project.path.as_deref(), Some(project.as_path()));
    let _ = std::fs::remove_dir_all(&dir);
}

/// An invented table, as a spreadsheet puts it on the clipboard (tab-separated).
const PASTED: &str = "T/K\tK\n283.15\t5210\n290.15\t4180\n297.15\t3420\n304.15\t2790\n";

#[test]
fn data_opened_over_the_demo_start_a_new_untitled_project() {
    let mut h = harness(bench());
    assert!(is_demo(&h.state().project));
    h.input_mut()
        .events
        .push(egui::Event::Paste(PASTED.to_string()));
    // The preview's first frame is a sizing pass, left out of the accessibility tree.
    h.run_steps(7);
    assert!(
        h.query_all_by_label_contains("The demo project is open")
            .next()
            .is_some(),
        "the preview does not say where the data go"
    );
    h.get_by_label("Add to project").click();
    h.run_steps(3);
    let w = h.state();
    assert_eq!(w.project.series.len(), 1, "mixed with the demo");
    assert_eq!(w.project.series[0].n_rows(), 4);
    assert!(w.project.path.is_none());
    assert!(!is_demo(&w.project));
    // Ctrl+Z brings the demo back, whole.
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
    assert!(is_demo(&h.state().project));
    assert_eq!(h.state().project.series.len(), 2);
    // Data opened into a project of the chemist's own are added to it.
    let mut w = bench();
    let mut own = isochore_gui::doc::Project::default();
    own.series.push(w.project.series.remove(1));
    w.replace_project(own, false);
    assert!(
        is_demo(&w.project),
        "still the demo's data set, never saved"
    );
    w.project.path = Some(PathBuf::from("own.isochore.json"));
    let mut h = harness(w);
    h.input_mut()
        .events
        .push(egui::Event::Paste(PASTED.to_string()));
    h.run_steps(7);
    assert!(h
        .query_all_by_label_contains("The demo project is open")
        .next()
        .is_none());
    h.get_by_label("Add to project").click();
    h.run_steps(3);
    assert_eq!(h.state().project.series.len(), 2);
}

/// Types a series' new name into the rename field, which has the focus already (as
/// after a double-click or "Rename…"), and presses Enter.
fn type_new_name(h: &mut H, name: &str) {
    let field = |h: &H| h.state().settings.list.renaming.is_some();
    assert!(field(h), "no rename field for {name}");
    h.key_press_modifiers(Modifiers::COMMAND, Key::A);
    h.run_steps(1);
    h.get_by_role_and_label(Role::TextInput, "rename series")
        .type_text(name);
    h.run_steps(1);
    h.key_press(Key::Enter);
    h.run_steps(3);
    assert!(!field(h));
}

#[test]
fn a_series_is_renamed_and_removed_with_undo() {
    let w = bench();
    let acid = w.project.series[1].id;
    let a_name = "quillonic acid pKa";
    let name_of = |h: &H| h.state().project.get(acid).map(|s| s.name().to_string());
    let mut h = harness(w);
    // Context menu ▸ Rename…
    h.get_by_label(a_name).click_secondary();
    h.run_steps(2);
    h.get_by_label("Rename…").click();
    h.run_steps(2);
    type_new_name(&mut h, "acid, run B");
    assert_eq!(name_of(&h).as_deref(), Some("acid, run B"));
    assert!(shows(&h, "acid, run B"));
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
    assert_eq!(name_of(&h).as_deref(), Some(a_name));

    // Again (the double-click on a name opens the same field; kittest's clicks do not
    // make an egui double-click, so the test goes through the menu).
    h.get_by_label(a_name).click_secondary();
    h.run_steps(2);
    h.get_by_label("Rename…").click();
    h.run_steps(2);
    type_new_name(&mut h, "acid, run C");
    assert_eq!(name_of(&h).as_deref(), Some("acid, run C"));

    // Context menu ▸ Remove series; undo puts it back where it was, with its name.
    h.get_by_label("acid, run C").click_secondary();
    h.run_steps(2);
    h.get_by_label("Remove series").click();
    h.run_steps(3);
    assert_eq!(h.state().project.series.len(), 1);
    assert!(name_of(&h).is_none());
    assert!(!shows(&h, "acid, run C"));
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
    assert_eq!(h.state().project.series.len(), 2);
    assert_eq!(h.state().project.series[1].id, acid);
    assert_eq!(name_of(&h).as_deref(), Some("acid, run C"));
}

#[test]
fn the_first_start_opens_the_demo_and_later_ones_the_last_project() {
    let dir = temp_dir("starts");
    // First start: the demo.
    let mut w = Workbench::start(Prefs::default(), None, None);
    assert!(is_demo(&w.project));
    assert!(w.prefs.started_before);
    assert!(!w.history.dirty());
    let path = dir.join("mine.isochore.json");
    w.save_to(&path);
    let prefs = w.prefs.clone();
    // Later start: the last project.
    let w = Workbench::start(prefs.clone(), None, None);
    assert_eq!(w.project.path.as_deref(), Some(path.as_path()));
    assert_eq!(w.project.series.len(), 2);
    // The last project gone: an empty window, the demo one click away.
    std::fs::remove_file(&path).unwrap();
    let mut w = Workbench::start(prefs, None, None);
    w.block_fits = true;
    assert!(w.project.series.is_empty());
    assert!(w.messages.is_empty(), "{:?}", w.messages);
    let mut h = harness(w);
    h.get_by_label("Open the demo project").click();
    h.run_steps(3);
    assert!(is_demo(&h.state().project));
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_hidden_series_stays_hidden_after_saving_and_reopening() {
    let dir = temp_dir("shown");
    let path = dir.join("s.isochore.json");
    let w = bench();
    let (b_name, a_name) = ("QX-7 binding Halo-2", "quillonic acid pKa");
    let mut h = harness(w);
    // The demo draws the binding series and hides the acid one: swap them in the list.
    h.get_by_label(&format!("show series {b_name}")).click();
    h.run_steps(3);
    h.get_by_label(&format!("show series {a_name}")).click();
    h.run_steps(3);
    // Saved (through the Workbench API: the save dialog is covered elsewhere).
    h.state_mut().save_to(&path);
    assert!(!h.state().history.dirty());
    // Undo, which tracks the hiding, now differs from the file: unsaved.
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
    assert!(h.state().history.dirty());

    // A new window on the file shows what was saved: binding hidden, acid drawn.
    let mut w = Workbench::new(Prefs::default());
    w.block_fits = true;
    w.open_path(&path);
    w.apply_pending();
    let shown: Vec<(String, bool)> = w
        .project
        .series
        .iter()
        .map(|s| (s.name().to_string(), s.data.shown))
        .collect();
    assert_eq!(
        shown,
        vec![(b_name.to_string(), false), (a_name.to_string(), true)]
    );
    let h = harness(w);
    let ticked = |h: &H, name: &str| {
        h.get_by_label(&format!("show series {name}"))
            .accesskit_node()
            .toggled()
    };
    assert_eq!(ticked(&h, b_name), Some(egui::accesskit::Toggled::False));
    assert_eq!(ticked(&h, a_name), Some(egui::accesskit::Toggled::True));
    let _ = std::fs::remove_dir_all(&dir);
}
