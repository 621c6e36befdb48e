//! The status bar (file name, unsaved marker, fits in progress, messages) and the dialogs
//! that protect unsaved work: the close question and the crash-recovery offer.

use crate::app::{Action, Cx, Recovery};
use crate::command::History;
use egui::{Context, Ui};

/// Draws the status bar with messages and fits in progress.
pub fn status_bar(
    root: &mut Ui,
    cx: &mut Cx<'_>,
    history: &History,
    messages: &mut Vec<String>,
    recoveries: &[Recovery],
) {
    egui::Panel::bottom("status").show(root, |ui| {
        for r in recoveries {
            ui.horizontal_wrapped(|ui| {
                ui.colored_label(
                    crate::panels::style::flag_color(cx.dark),
                    format!(
                        "Unsaved work from an earlier session was found: {}, autosaved {} ({}).",
                        r.name(),
                        r.when(),
                        r.path.display()
                    ),
                );
                if ui.button("Restore it").clicked() {
                    cx.actions.push(Action::Recover(r.path.clone()));
                }
                if ui.button("Discard it").clicked() {
                    cx.actions.push(Action::DiscardRecovery(r.path.clone()));
                }
            });
        }
        let mut dismiss = None;
        for (i, m) in messages.iter().enumerate() {
            ui.horizontal_wrapped(|ui| {
                ui.colored_label(crate::panels::style::flag_color(cx.dark), "⚠");
                ui.label(egui::RichText::new(m).strong());
                if ui.small_button("Dismiss").clicked() {
                    dismiss = Some(i);
                }
            });
        }
        if let Some(i) = dismiss {
            messages.remove(i);
        }
        ui.horizontal(|ui| {
            let name = cx
                .project
                .path
                .as_ref()
                .and_then(|p| p.file_name())
                .map_or("untitled project".to_string(), |n| {
                    n.to_string_lossy().into_owned()
                });
            ui.label(name);
            if history.dirty() {
                ui.label("• unsaved changes");
            }
            for r in cx.fitter.running(&cx.project.series) {
                ui.separator();
                ui.spinner();
                ui.label(format!(
                    "refitting {} points… {:.1} s",
                    r.rows,
                    (cx.now - r.since).max(0.0)
                ));
            }
        });
    });
}

/// Asks before the window closes with unsaved changes.
pub fn close_dialog(ctx: &Context, cx: &mut Cx<'_>, open: &mut bool) {
    if !*open {
        return;
    }
    let modal = egui::Modal::new(egui::Id::unique("close_question")).show(ctx, |ui| {
        ui.heading("Unsaved changes");
        ui.label("This project has changes that are not saved.");
        ui.horizontal(|ui| {
            if ui.button("Save and close").clicked() {
                cx.actions.push(Action::SaveAndQuit);
            }
            if ui.button("Close without saving").clicked() {
                cx.actions.push(Action::QuitDiscarding);
            }
            if ui.button("Keep working").clicked() {
                *open = false;
            }
        });
    });
    if modal.should_close() {
        *open = false;
    }
}
