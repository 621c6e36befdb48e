//! The menu bar: File, Edit, View. Items only queue actions; the app carries them out.

use crate::app::{Action, Cx, Prefs};
use crate::command::History;
use crate::panels::files::FilesPanel;
use crate::panels::joint::JointPanel;
use egui::Ui;

/// Draws the menu bar.
pub fn menu_bar(
    root: &mut Ui,
    cx: &mut Cx<'_>,
    prefs: &mut Prefs,
    history: &History,
    files: &mut FilesPanel,
    joint: &mut JointPanel,
    calorimetric: &mut crate::panels::calorimetric::CalorimetricPanel,
) {
    egui::Panel::top("menu").show(root, |ui| {
        egui::MenuBar::new().ui(ui, |ui| {
            ui.menu_button("File", |ui| {
                if ui.button("New project").clicked() {
                    cx.actions.push(Action::New);
                    ui.close();
                }
                if ui
                    .add(egui::Button::new("Open…").shortcut_text("Ctrl+O"))
                    .clicked()
                {
                    files.ask_open();
                    ui.close();
                }
                ui.menu_button("Open recent", |ui| {
                    if prefs.recent.is_empty() {
                        ui.label("(none yet)");
                    }
                    for p in prefs.recent.clone() {
                        if ui.button(p.display().to_string()).clicked() {
                            cx.actions.push(Action::Open(p));
                            ui.close();
                        }
                    }
                });
                if ui.button("Demo project").clicked() {
                    cx.actions.push(Action::Demo);
                    ui.close();
                }
                if ui.button("Demo ligand series (fit together)").clicked() {
                    // Undoable, as the demo project is; the first series becomes active.
                    // The bundled files are read as the demo's are (a refusal: a build fault).
                    if let Ok(p) = crate::io::ligand_demo_project() {
                        cx.out
                            .push(crate::command::Command::ReplaceProject(Box::new(p)));
                    }
                    ui.close();
                }
                ui.separator();
                if ui
                    .add(egui::Button::new("Save").shortcut_text("Ctrl+S"))
                    .clicked()
                {
                    cx.actions.push(Action::Save);
                    ui.close();
                }
                if ui
                    .add(egui::Button::new("Save as…").shortcut_text("Ctrl+Shift+S"))
                    .clicked()
                {
                    files.ask_save_as();
                    ui.close();
                }
                ui.separator();
                if ui.button("Export report and figures…").clicked() {
                    files.ask_export();
                    ui.close();
                }
            });
            ui.menu_button("Edit", |ui| {
                let undo = match history.undo_label() {
                    Some(l) => format!("Undo {l}"),
                    None => "Undo".into(),
                };
                if ui
                    .add_enabled(
                        history.undo_label().is_some(),
                        egui::Button::new(undo).shortcut_text("Ctrl+Z"),
                    )
                    .clicked()
                {
                    cx.actions.push(Action::Undo);
                    ui.close();
                }
                let redo = match history.redo_label() {
                    Some(l) => format!("Redo {l}"),
                    None => "Redo".into(),
                };
                if ui
                    .add_enabled(
                        history.redo_label().is_some(),
                        egui::Button::new(redo).shortcut_text("Ctrl+Shift+Z"),
                    )
                    .clicked()
                {
                    cx.actions.push(Action::Redo);
                    ui.close();
                }
            });
            ui.menu_button("View", |ui| {
                ui.checkbox(&mut prefs.show_table, "Measurements table");
                ui.checkbox(&mut prefs.show_diagnostics, "Residual and influence plots");
                ui.checkbox(&mut prefs.show_results, "Results and predictions");
                ui.separator();
                if ui.button("Fit series together…").clicked() {
                    joint.open_with_all(cx.project);
                    ui.close();
                }
                if ui
                    .button(format!(
                        "{}…",
                        isochore_report::present::names::CALORIMETRIC
                    ))
                    .clicked()
                {
                    calorimetric.open = true;
                    ui.close();
                }
                ui.separator();
                ui.checkbox(&mut prefs.dark, "Dark theme");
            });
        });
    });
}
