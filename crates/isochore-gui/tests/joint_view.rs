//! The "fit together" view (issue 12): opened from View ▸ "Fit series together…" on the
//! demo's invented ligand series (assets/demo/ligands_px_orrin3.csv, four data sets in one
//! file, fitted with the ΔCp° model), it shows the verdict of the test of equality that
//! isochore-analysis' `fit_joint` gives for the same data sets and sharing — ΔCp° shared
//! (no evidence that it differs) and, after the checkboxes are changed, ΔH° shared (rejected:
//! the ligands' enthalpies differ by tens of kJ/mol by construction, make_demo.py).

use crate::workbench::{harness, menu_item, CLOCK};
use egui::accesskit::Role;
use egui_kittest::kittest::Queryable;
use isochore_analysis::joint::fit_joint;
use isochore_analysis::{Overrides, PreparedSet};
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
