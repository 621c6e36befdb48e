//! The list of series at the top of the left panel: choose the active one, show or hide it
//! on the plots, rename it (double-click, or "Rename…" in its context menu) and remove it
//! (context menu). Each change is one undoable command. With no series, the list says how
//! to bring data in and offers the demo project one click away.

use crate::app::{Action, Cx};
use crate::command::Command;
use crate::panels::style;

/// A series whose name is being typed.
#[derive(Debug, Clone)]
pub struct Renaming {
    /// Series id.
    pub series: u64,
    /// The name typed so far.
    pub text: String,
    /// Focus has been requested.
    pub focused: bool,
}

/// The list's own state.
#[derive(Debug, Default)]
pub struct SeriesList {
    /// The series being renamed.
    pub renaming: Option<Renaming>,
}

impl SeriesList {
    /// Starts renaming a series (used by the list and by tests).
    pub fn start_rename(&mut self, series: u64, name: &str) {
        self.renaming = Some(Renaming {
            series,
            text: name.to_string(),
            focused: false,
        });
    }

    /// Draws the list.
    pub fn ui(&mut self, ui: &mut egui::Ui, cx: &mut Cx<'_>) {
        if cx.project.series.is_empty() {
            ui.label("No data yet: open a CSV or TSV file (Open… in the File menu), drop one on the window, or paste a table with Ctrl+V.");
            if ui.button("Open the demo project").clicked() {
                cx.actions.push(Action::Demo);
            }
        }
        for (i, s) in cx.project.series.iter().enumerate() {
            ui.horizontal(|ui| {
                let mut shown = s.data.shown;
                let r = ui.checkbox(&mut shown, "");
                let label = format!("show series {}", s.name());
                r.widget_info(|| {
                    egui::WidgetInfo::selected(egui::Role::CheckBox, true, shown, &label)
                });
                if r.changed() {
                    cx.out.push(Command::SetShown {
                        series: s.id,
                        shown,
                    });
                }
                style::marker_swatch(ui, i);
                if let Some(r) = self.renaming.as_mut().filter(|r| r.series == s.id) {
                    let resp = ui.add(egui::TextEdit::singleline(&mut r.text).desired_width(150.0));
                    resp.widget_info(|| {
                        egui::WidgetInfo::labeled(egui::Role::TextInput, true, "rename series")
                    });
                    if !r.focused {
                        resp.request_focus();
                        r.focused = true;
                    } else if resp.lost_focus() {
                        let cancelled = ui.input(|i| i.key_pressed(egui::Key::Escape));
                        let name = r.text.trim().to_string();
                        if !cancelled && !name.is_empty() && name != s.name() {
                            cx.out.push(Command::Rename {
                                series: s.id,
                                name,
                            });
                        }
                        self.renaming = None;
                    }
                    return;
                }
                let active = cx.active == Some(s.id);
                let resp = ui
                    .selectable_label(active, s.name())
                    .on_hover_text(format!(
                        "{} rows; drawn as {}. Double-click to rename; right-click to rename or remove.",
                        s.n_rows(),
                        style::shape_name(style::series_shape(i))
                    ));
                if resp.double_clicked() {
                    self.start_rename(s.id, s.name());
                } else if resp.clicked() {
                    cx.actions.push(Action::SetActive(s.id));
                }
                resp.context_menu(|ui| {
                    if ui.button("Rename…").clicked() {
                        self.start_rename(s.id, s.name());
                        ui.close();
                    }
                    if ui.button("Remove series").clicked() {
                        cx.out.push(Command::RemoveSeries { series: s.id });
                        ui.close();
                    }
                });
            });
        }
    }
}
