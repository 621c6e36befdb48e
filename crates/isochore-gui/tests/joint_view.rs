//! The "fit together" view (issue 12): opened from View ▸ "Fit series together…" on the
//! demo's invented ligand series (assets/demo/ligands_px_orrin3.csv, four data sets in one
//! file, fitted with the ΔCp° model), it shows the verdict of the test of equality that
//! isochore-analysis' `fit_joint` gives for the same data sets and sharing — ΔCp° shared
//! (no evidence that it differs) and, after the checkboxes are changed, ΔH° shared (rejected:
//! the ligands' enthalpies differ by tens of kJ/mol by construction, make_demo.py).
//! The ligand demo (File menu) brings the same series with their invented calorimetric
//! values; the "Calorimetric ΔH°" window adds, removes and undoes values and shows the
//! library's comparison; the view's model chooser and its fit with the calorimetric values
//! give the library's numbers.

use crate::workbench::{harness, menu_item, CLOCK};
use egui::accesskit::Role;
use egui::{Key, Modifiers};
use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use isochore_analysis::calorimetric::compare_single;
use isochore_analysis::joint::{fit_joint, fit_with_calorimetric};
use isochore_analysis::{Overrides, PreparedSet};
use isochore_fit::calorimetric::COUPLED_EQUILIBRIA_CAUTION;
use isochore_fit::Model;
use isochore_gui::{Prefs, Workbench};

fn ligand_bench() -> Workbench {
    let text = include_str!("../../../assets/demo/ligands_px_orrin3.csv");
    let imp = isochore_data::import_text(
        "ligands_px_orrin3.csv",
        text,
        &isochore_data::ImportOptions::default(),
    )
    .unwrap();
    let mut data = isochore_data::Project::new();
    data.add_import(&imp);
    for s in &mut data.series {
        s.settings.fit.model = Model::CONSTANT_CP;
    }
    let mut w = Workbench::new(Prefs::default());
    w.block_fits = true;
    w.autosave_dir = None;
    w.fixed_unix_time = Some(CLOCK);
    w.replace_project(isochore_gui::doc::Project::from_data(data, None), false);
    w
}

/// The library's verdict for the workbench's series with `shared` shared.
fn library_verdict(w: &Workbench, shared: &str) -> String {
    let sets: Vec<PreparedSet> = w
        .project
        .series
        .iter()
        .map(|s| PreparedSet::from_data_set(&s.data, s.name(), &Overrides::default()).unwrap())
        .collect();
    fit_joint(&sets, &[shared.to_string()])
        .unwrap()
        .equality
        .unwrap()
        .verdict()
}

#[test]
fn fit_together_shows_the_library_verdict() {
    let mut h = harness(ligand_bench());
    assert_eq!(h.state().project.series.len(), 4);
    menu_item(&mut h, "View", "Fit series together…");
    h.run_steps(3);
    let want = library_verdict(h.state(), "delta_cp");
    assert!(want.starts_with("no evidence that ΔCp° differs"), "{want}");
    h.get_by_label(&want);
    assert_eq!(h.state().joint.verdict().as_deref(), Some(want.as_str()));
    // Share ΔH° instead of ΔCp°: the view refits and shows the library's rejection.
    h.get_by_label("ΔCp° shared").click();
    h.run_steps(2);
    h.get_by_label("ΔH° shared").click();
    h.run_steps(3);
    let want = library_verdict(h.state(), "delta_h");
    assert!(want.contains("sharing is rejected"), "{want}");
    h.get_by_label(&want);
    // Unticking a series to leave one asks for two in words, and nothing is fitted.
    for name in ["PX-12", "PX-13", "PX-14"] {
        // The view's checkbox (the series list names the series in a label of its own).
        h.get_by_role_and_label(Role::CheckBox, name).click();
        h.run_steps(2);
    }
    h.get_by_label("Tick two or more series to fit them together.");
    assert_eq!(h.state().joint.verdict(), None);
}

/// The ligand demo (File ▸ "Demo ligand series (fit together)"): its series as the
/// view's, each with its calorimetric values already kept with it.
fn ligand_demo() -> Harness<'static, Workbench> {
    let mut h = harness(crate::workbench::bench());
    menu_item(&mut h, "File", "Demo ligand series (fit together)");
    h.run_steps(3);
    h
}

#[test]
fn the_ligand_demo_opens_with_its_calorimetric_values() {
    let h = ligand_demo();
    let w = h.state();
    let names: Vec<&str> = w.project.series.iter().map(|s| s.name()).collect();
    assert_eq!(names, ["PX-11", "PX-12", "PX-13", "PX-14"]);
    // assets/demo/ligands_px_orrin3_itc.csv: two values for PX-11, one for each other.
    let counts: Vec<usize> = w
        .project
        .series
        .iter()
        .map(|s| s.data.calorimetric.len())
        .collect();
    assert_eq!(counts, [2, 1, 1, 1]);
    assert!(w
        .project
        .series
        .iter()
        .all(|s| s.options().model == Model::CONSTANT_CP));
    // Still a demo: data opened now start a project of their own.
    assert!(isochore_gui::start::is_demo(&w.project));
    // The project file keeps the values (isochore-data's SavedCalorimetric, SI).
    let json = w.project.to_data().to_json();
    assert!(
        json.contains("\"delta_h_cal\": -45100.0"),
        "PX-13's −45.1 kJ/mol"
    );
    // The window's report of PX-11 (the export's input) carries its two comparisons, the
    // library's, in a section of their own.
    let s = &w.project.series[0];
    let a = w.fitter.get(s.id).unwrap();
    let input = isochore_gui::io::report_input(s, &a).unwrap();
    let want = compare_single(a.fit.as_deref().unwrap(), &s.data).unwrap();
    assert_eq!(input.calorimetric, want);
    assert_eq!(want.len(), 2);
    let md = isochore_report::render_markdown(&input, "fig").unwrap();
    assert!(md.contains("## Calorimetric ΔH°"), "{md}");
}

/// Clicks the text field labelled `label`, empties it and types `text`.
fn type_into(h: &mut Harness<'_, Workbench>, label: &str, text: &str) {
    h.get_by_role_and_label(Role::TextInput, label).click();
    h.run_steps(1);
    h.key_press_modifiers(Modifiers::COMMAND, Key::A);
    h.key_press(Key::Backspace);
    h.run_steps(1);
    if !text.is_empty() {
        h.get_by_role_and_label(Role::TextInput, label)
            .type_text(text);
        h.run_steps(1);
    }
}

/// A value typed in the "Calorimetric ΔH°" window is added to the active series (an
/// undoable change), a refusal is said in words, and the comparison shown is
/// isochore-analysis' for the series' own fit.
#[test]
fn calorimetric_values_are_typed_compared_and_undone() {
    let mut h = ligand_demo();
    menu_item(&mut h, "View", "Calorimetric ΔH°…");
    h.run_steps(3);
    let id = h.state().active.unwrap();
    let values =
        |h: &Harness<'_, Workbench>| h.state().project.get(id).unwrap().data.calorimetric.clone();
    assert_eq!(values(&h).len(), 2);
    // The library's verdict for PX-11 at 25 °C, as the window shows it.
    let verdict = {
        let w = h.state();
        let s = w.project.get(id).unwrap();
        let a = w.fitter.get(id).unwrap();
        let fit = a.fit.as_deref().unwrap();
        let c = compare_single(fit, &s.data).unwrap();
        let v = c[0]
            .verdict
            .trim_end_matches(COUPLED_EQUILIBRIA_CAUTION)
            .trim_end_matches("; ")
            .to_string();
        format!("PX-11: {v}.")
    };
    h.get_by_label(&verdict);
    h.get_by_label_contains("Caution: the van 't Hoff and calorimetric enthalpies differ");
    // A new value at 31 °C: −67.0 ± 0.7 kJ/mol.
    type_into(&mut h, "T / °C", "31");
    type_into(&mut h, "ΔH_cal / (kJ/mol)", "-67.0");
    type_into(&mut h, "u / (kJ/mol)", "0.7");
    h.get_by_label("Add calorimetric value").click();
    h.run_steps(3);
    let v = values(&h);
    assert_eq!(v.len(), 3);
    // 31 °C = 304.15 K; kJ/mol to J/mol (SI units, from memory).
    assert!((v[2].t_k - 304.15).abs() < 1e-9 && (v[2].delta_h_cal + 67_000.0).abs() < 1e-6);
    assert!((v[2].u_cal - 700.0).abs() < 1e-9);
    // Ctrl+Z takes it away again; "Remove value 1" removes the first.
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
    assert_eq!(values(&h).len(), 2);
    h.get_by_label("Remove value 1").click();
    h.run_steps(3);
    let left = values(&h);
    assert_eq!(left.len(), 1);
    assert!((left[0].t_k - 310.15).abs() < 1e-9, "the 37 °C value stays");
    // A temperature that is not a number is refused in words, nothing added.
    type_into(&mut h, "T / °C", "");
    type_into(&mut h, "T / °C", "x");
    h.get_by_label("Add calorimetric value").click();
    h.run_steps(3);
    assert_eq!(values(&h).len(), 1);
    assert!(h
        .query_all_by_label_contains("is not a number")
        .next()
        .is_some());
    // A calorimetric file: its rows naming PX-11 (or none) replace the series' values,
    // read by isochore-data in SI (25 °C = 298.15 K, 37 °C = 310.15 K).
    let dir = crate::workbench::temp_dir("calorimetric-file");
    let file = dir.join("itc.csv");
    std::fs::write(
        &file,
        "series,T (°C),ΔH (kJ/mol),u (kJ/mol)\nPX-11,25,-62.4,0.6\nPX-12,25,-51.8,0.5\n,37,-72.3,0.8\n",
    )
    .unwrap();
    type_into(&mut h, "calorimetric file", &file.display().to_string());
    h.get_by_label("Load calorimetric file").click();
    h.run_steps(3);
    let v = values(&h);
    let temps: Vec<f64> = v.iter().map(|x| x.t_k).collect();
    assert_eq!(temps.len(), 2, "{temps:?}");
    assert!((temps[0] - 298.15).abs() < 1e-9 && (temps[1] - 310.15).abs() < 1e-9);
    assert!((v[0].delta_h_cal + 62_400.0).abs() < 1e-6);
    // Loading it again replaces rather than doubles; Ctrl+Z twice returns to one value.
    h.get_by_label("Load calorimetric file").click();
    h.run_steps(3);
    assert_eq!(values(&h).len(), 2);
    for _ in 0..2 {
        h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
        h.run_steps(3);
    }
    assert_eq!(values(&h).len(), 1);
}

/// The view's model chooser fits every series with the model chosen (the library's joint
/// fit with that model for each data set), and with "use the calorimetric values" the
/// fit shown is isochore-analysis' `fit_with_calorimetric`.
#[test]
fn the_joint_view_chooses_its_model_and_fits_the_calorimetric_values() {
    let mut h = ligand_demo();
    menu_item(&mut h, "View", "Fit series together…");
    h.run_steps(3);
    h.get_by_role_and_label(Role::ComboBox, "joint model")
        .click();
    h.run_steps(2);
    h.get_by_role_and_label(Role::Button, "linear").click();
    h.run_steps(3);
    assert_eq!(h.state().joint.model, Some(Model::LINEAR));
    // The linear model has no ΔCp° to share: share ΔH°.
    h.get_by_label("ΔH° shared").click();
    h.run_steps(3);
    let overrides = Overrides {
        model: Some(Model::LINEAR),
        ..Overrides::default()
    };
    let sets: Vec<PreparedSet> = h
        .state()
        .project
        .series
        .iter()
        .map(|s| PreparedSet::from_data_set(&s.data, s.name(), &overrides).unwrap())
        .collect();
    let joint = fit_joint(&sets, &["delta_h".to_string()]).unwrap();
    let want = joint.equality.as_ref().unwrap().verdict();
    assert_eq!(h.state().joint.verdict().as_deref(), Some(want.as_str()));
    // The fit with the calorimetric values, as the library makes it.
    h.state_mut().joint.calorimetric_in_fit = true;
    h.run_steps(3);
    let values: Vec<_> = h
        .state()
        .project
        .series
        .iter()
        .map(|s| isochore_analysis::calorimetric::values(&s.data))
        .collect();
    let lib = fit_with_calorimetric(&sets, &joint, &values).unwrap();
    let shown = h
        .state()
        .joint
        .calorimetric_fit()
        .expect("a fit with ΔH_cal");
    assert_eq!(shown.estimates(), lib.estimates());
    assert_eq!(shown.n_calorimetric(), 5);
}

/// The view writes the joint report into a folder (the command line's `--report DIR` for a
/// joint fit): every format of isochore-report's plan, the Markdown with the calorimetric
/// comparison of the ligand demo; a folder holding a `joint-fit.md` that isochore did not
/// write is refused in words and the file left as it was.
#[test]
fn the_joint_view_writes_the_joint_report() {
    let mut h = ligand_demo();
    menu_item(&mut h, "View", "Fit series together…");
    h.run_steps(3);
    let dir = crate::workbench::temp_dir("joint-report");
    type_into(&mut h, "joint report folder", &dir.display().to_string());
    h.get_by_label("Write joint report").click();
    let mut outcome = None;
    // A debug build draws the PDF and PNG figures slowly: wait up to five minutes.
    for _ in 0..3000 {
        h.run_steps(1);
        if let Some(o) = h.state().joint.export_outcome.clone() {
            outcome = Some(o);
            break;
        }
        std::thread::sleep(std::time::Duration::from_millis(100));
    }
    let outcome = outcome.expect("the export finished");
    assert!(outcome.is_ok(), "{outcome:?}");
    let md = std::fs::read_to_string(dir.join("joint-fit.md")).unwrap();
    assert!(md.contains("## Calorimetric ΔH°"), "{md}");
    for name in [
        "joint-fit.html",
        "joint-fit.pdf",
        "joint-fit-data.csv",
        "joint-fit-results.csv",
    ] {
        assert!(dir.join(name).is_file(), "{name}");
    }
    // A file of someone else's where the report would go: nothing is written.
    let other = crate::workbench::temp_dir("joint-report-other");
    std::fs::write(other.join("joint-fit.md"), "mine").unwrap();
    h.state_mut().joint.export_folder = other.display().to_string();
    h.get_by_label("Write joint report").click();
    h.run_steps(3);
    let refused = h.state().joint.export_outcome.clone().unwrap();
    assert!(refused.unwrap_err().starts_with("No report was written"));
    assert_eq!(
        std::fs::read_to_string(other.join("joint-fit.md")).unwrap(),
        "mine"
    );
    assert!(!other.join("joint-fit.html").exists());
}

/// A single series fitted with its calorimetric values as observations of ΔH° (the
/// "Calorimetric ΔH°" window's "Use the calorimetric values in the fit"): the binding demo
/// with −40.0 ± 0.5 kJ/mol at 25 °C and −47.0 ± 0.8 kJ/mol at 35 °C (invented), against
/// statsmodels 0.15.0 WLS on the stacked design (tests/data/independent/
/// make_single_calorimetric.py → single_calorimetric.txt, scaled SEs) to 1e-9.
#[test]
fn a_single_series_is_fitted_with_its_calorimetric_values() {
    let w = crate::workbench::bench();
    let id = w.active.unwrap();
    let mut h = harness(w);
    let value = |t_k, delta_h_cal, u_cal| isochore_data::SavedCalorimetric {
        t_k,
        delta_h_cal,
        u_cal,
    };
    h.state_mut()
        .push(isochore_gui::command::Command::SetCalorimetric {
            series: id,
            values: vec![
                value(298.15, -40_000.0, 500.0),
                value(308.15, -47_000.0, 800.0),
            ],
        });
    h.run_steps(2);
    menu_item(&mut h, "View", "Calorimetric ΔH°…");
    h.run_steps(2);
    h.get_by_label("Use the calorimetric values in the fit")
        .click();
    h.run_steps(3);
    let fit = h.state().calorimetric.fitted().expect("a fit with ΔH_cal");
    // single_calorimetric.txt: ΔH°, ΔS° and their SEs; 12 rows, 2 columns.
    let want = [
        (-42199.80212609279, 1271.545061937142),
        (-11.39266306458515, 4.300249834446576),
    ];
    let close = |a: f64, b: f64| (a - b).abs() <= 1e-9 * b.abs(); // the project's bar
    for (e, (v, se)) in fit.estimates().iter().zip(want) {
        assert!(
            close(e.value, v) && close(e.se, se),
            "{e:?} against {v} ± {se}"
        );
    }
    assert!(close(fit.statistics().chi2, 98.34556427896956));
    assert_eq!(fit.dof(), 10);
    assert!(h
        .query_all_by_label_contains("ln K alone: value ± SE")
        .next()
        .is_some());

    // The export carries that fit (the command line's --calorimetric-in-fit --report): the
    // results CSV's "ΔH° with ΔH_cal" row is the window's estimate; with the choice off,
    // there is no such row.
    use isochore_gui::export::{ExportFormat, ExportJob, FormatSet};
    assert!(h.state().files.export.calorimetric_in_fit);
    let want_dh = fit.estimates()[0].value;
    let w = h.state();
    let mut formats = FormatSet(0);
    formats.set(ExportFormat::Tables, true);
    let results = |in_fit: bool, name: &str| -> String {
        let dir = crate::workbench::temp_dir(name);
        let choices = isochore_gui::export::Choices {
            calorimetric_in_fit: in_fit,
            ..isochore_gui::export::Choices::formats(formats)
        };
        ExportJob::start(&w.project, &w.fitter, &[id], &dir, choices)
            .and_then(ExportJob::wait)
            .unwrap();
        let csv = crate::workbench::file_ending(&dir, "-results.csv");
        let text = std::fs::read_to_string(csv).unwrap();
        let _ = std::fs::remove_dir_all(&dir);
        text
    };
    let with = results(true, "export-calorimetric-in-fit");
    let row = with
        .lines()
        .find(|l| l.starts_with("ΔH° with ΔH_cal"))
        .unwrap_or_else(|| panic!("{with}"));
    let dh: f64 = row.split(',').nth(1).unwrap().parse().unwrap();
    // The CSV's unit is the series' (kJ/mol for the binding demo) or J/mol.
    assert!(
        close(dh * 1000.0, want_dh) || close(dh, want_dh),
        "{row} against {want_dh}"
    );
    assert!(with.contains("calorimetric values in the fit,2"), "{with}");
    let without = results(false, "export-calorimetric-off");
    assert!(!without.contains("with ΔH_cal"), "{without}");
}

/// The compensation plots of the "fit together" view (three or more series): the ligand
/// demo's four series (ΔCp° shared) each drawn with its joint confidence region on both
/// plots (ΔH° against ΔS° and against ΔG° at T_hm), in four different series colours, and
/// the compensation line whose slope, converted back from the display units, is the β of
/// isochore-analysis' `fit_joint` for the same data sets; T_hm the separate fits'.
#[test]
fn the_joint_view_draws_the_compensation_plots() {
    let mut h = ligand_demo();
    menu_item(&mut h, "View", "Fit series together…");
    h.run_steps(3);
    let w = h.state();
    let sets: Vec<PreparedSet> = w
        .project
        .series
        .iter()
        .map(|s| PreparedSet::from_data_set(&s.data, s.name(), &Overrides::default()).unwrap())
        .collect();
    let joint = fit_joint(&sets, &["delta_cp".to_string()]).unwrap();
    let beta = joint
        .compensation
        .as_ref()
        .and_then(|c| c.beta.as_ref())
        .expect("the library finds β for the ligand demo");
    let t_hm = joint.equality.as_ref().unwrap().full().t_harmonic_all_k();
    let drawn = w
        .joint
        .drawn_compensation
        .clone()
        .expect("the compensation plots were drawn");
    for regions in [&drawn.entropy_regions, &drawn.gibbs_regions] {
        let labels: Vec<&str> = regions.iter().map(|r| r.0.as_str()).collect();
        assert_eq!(labels, ["PX-11", "PX-12", "PX-13", "PX-14"]);
        assert!(regions.iter().all(|r| r.2 >= 3), "{regions:?}");
        let mut colours: Vec<_> = regions.iter().map(|r| r.1).collect();
        colours.dedup();
        assert_eq!(colours.len(), 4, "one colour per series");
    }
    // The drawn ends, display units: ΔS° in J/(mol·K) per kelvin of the energy unit, ΔH°
    // in the energy unit (present::energy / per_kelvin); the slope back in SI is β, K.
    let e = w.project.series[0].data.settings.energy_unit;
    let (eu, su) = (
        isochore_report::present::energy(e),
        isochore_report::present::per_kelvin(e),
    );
    let [a, b] = drawn.beta_line.expect("the β line was drawn");
    let slope = (b[1] - a[1]) * eu.si_per_unit / ((b[0] - a[0]) * su.si_per_unit);
    assert!(
        ((slope - beta.beta) / beta.beta).abs() < 1e-9,
        "drawn slope {slope} K against β {} K",
        beta.beta
    );
    assert_eq!(
        drawn.beta_slope_k.map(|k| (k - slope).abs() < 1e-9),
        Some(true)
    );
    assert_eq!(drawn.t_hm_k, t_hm);
    // The legend names the line in the one vocabulary.
    let want = isochore_report::present::names::beta_line(beta.beta);
    assert!(
        h.query_all_by_label_contains(&want).next().is_some(),
        "{want} in the legend"
    );
}
