//! The export dialog: a folder (suggested next to the project, never a data file's path),
//! the data sets to report (the shown ones unless the chemist ticks others) and the formats
//! (HTML and PDF, or the last choice, remembered between runs). The files are written on a
//! worker thread ([`crate::export::ExportJob`]) while the dialog shows how far it got.

use crate::context::Cx;
use crate::export::{default_folder, ExportFormat, ExportJob, FormatSet};
use crate::panels::style;
use egui::RichText;
use std::path::PathBuf;

/// Where egui remembers the last choice of formats (kept between runs).
const FORMATS_KEY: &str = "isochore-export-formats";
/// Where egui remembers the analyst's name.
const ANALYST_KEY: &str = "isochore-export-analyst";

/// The export dialog's state.
#[derive(Debug, Default)]
pub struct ExportDialog {
    /// The dialog is open.
    pub open: bool,
    /// The folder typed or suggested.
    pub folder: String,
    /// The project file the folder was suggested for (a new suggestion when it changes).
    suggested_for: Option<Option<PathBuf>>,
    /// The data sets chosen (window ids); `None` until the dialog first opens.
    pub series: Option<Vec<u64>>,
    /// The formats chosen; `None` until read from egui's memory.
    pub formats: Option<FormatSet>,
    /// The analyst's name, written in the report (remembered between runs).
    pub analyst: Option<String>,
    /// A free-text note for the report.
    pub record_note: String,
    /// The running export.
    pub job: Option<ExportJob>,
    /// An error, in words.
    pub error: Option<String>,
    /// The last export's result, in words.
    pub note: Option<String>,
    /// The "Calorimetric ΔH°" window's "Use the calorimetric values in the fit", copied in
    /// every frame: the reports then carry that fit.
    pub calorimetric_in_fit: bool,
    focus: bool,
}

impl ExportDialog {
    /// Opens the dialog; the data sets chosen start as the shown ones.
    pub fn ask(&mut self) {
        self.open = true;
        self.series = None;
        self.error = None;
        self.focus = true;
    }

    /// Whether an export is being written.
    pub fn running(&self) -> bool {
        self.job.is_some()
    }

    /// Draws the dialog and follows the running export.
    pub fn window(&mut self, ctx: &egui::Context, cx: &mut Cx<'_>) {
        self.follow(ctx);
        if !self.open {
            return;
        }
        let project = cx.project;
        if self.suggested_for.as_ref() != Some(&project.path) {
            self.folder = default_folder(project).display().to_string();
            self.suggested_for = Some(project.path.clone());
        }
        let series = self.series.get_or_insert_with(|| {
            project
                .series
                .iter()
                .filter(|s| s.data.shown)
                .map(|s| s.id)
                .collect()
        });
        let formats = self.formats.get_or_insert_with(|| {
            ctx.data_mut(|d| d.get_persisted::<u8>(egui::Id::unique(FORMATS_KEY)))
                .map_or_else(FormatSet::default, FormatSet)
        });
        let analyst = self.analyst.get_or_insert_with(|| {
            ctx.data_mut(|d| d.get_persisted::<String>(egui::Id::unique(ANALYST_KEY)))
                .unwrap_or_default()
        });
        let flag = style::flag_color(cx.dark);
        let mut open = true;
        let mut go = false;
        let running = self.job.as_ref().map(ExportJob::progress);
        egui::Window::new("Export report and figures")
            .open(&mut open)
            .collapsible(false)
            .default_width(560.0)
            .anchor(egui::Align2::CENTER_CENTER, [0.0, 0.0])
            .show(ctx, |ui| {
                ui.label("Folder (created if missing); each data set's files are named after its source file:");
                ui.horizontal(|ui| {
                    let r = ui.add(
                        egui::TextEdit::singleline(&mut self.folder)
                            .hint_text("/path/to/folder")
                            .desired_width(400.0),
                    );
                    r.widget_info(|| {
                        egui::WidgetInfo::labeled(egui::Role::TextInput, true, "path")
                    });
                    if std::mem::take(&mut self.focus) {
                        r.request_focus();
                    }
                    if ui.button("Browse…").clicked() {
                        match rfd::FileDialog::new().pick_folder() {
                            Some(p) => self.folder = p.display().to_string(),
                            None => {
                                self.error = Some(
                                    "No folder was chosen (or this desktop has no file dialog): type the path instead."
                                        .into(),
                                );
                            }
                        }
                    }
                });
                ui.add_space(4.0);
                ui.label(RichText::new("Data sets").strong());
                for (i, s) in project.series.iter().enumerate() {
                    let mut on = series.contains(&s.id);
                    ui.horizontal(|ui| {
                        style::marker_swatch(ui, i);
                        let label = if s.data.shown {
                            s.name().to_string()
                        } else {
                            format!("{} (hidden in the plot)", s.name())
                        };
                        if ui.checkbox(&mut on, label).changed() {
                            if on {
                                series.push(s.id);
                            } else {
                                series.retain(|&id| id != s.id);
                            }
                        }
                    });
                }
                ui.add_space(4.0);
                ui.label(RichText::new("Formats").strong());
                ui.horizontal_wrapped(|ui| {
                    for f in ExportFormat::ALL {
                        let mut on = formats.contains(f);
                        if ui.checkbox(&mut on, f.label()).changed() {
                            formats.set(f, on);
                            let bits = formats.0;
                            ctx.data_mut(|d| d.insert_persisted(egui::Id::unique(FORMATS_KEY), bits));
                        }
                    }
                });
                ui.add_space(4.0);
                ui.label(RichText::new("Lab record (written under the report's title)").strong());
                egui::Grid::new("export_record").num_columns(2).show(ui, |ui| {
                    ui.label("analyst");
                    let r = ui.add(
                        egui::TextEdit::singleline(analyst)
                            .hint_text("optional")
                            .desired_width(300.0),
                    );
                    r.widget_info(|| {
                        egui::WidgetInfo::labeled(egui::Role::TextInput, true, "analyst name")
                    });
                    if r.changed() {
                        let name = analyst.clone();
                        ctx.data_mut(|d| d.insert_persisted(egui::Id::unique(ANALYST_KEY), name));
                    }
                    ui.end_row();
                    ui.label("note");
                    let r = ui.add(
                        egui::TextEdit::multiline(&mut self.record_note)
                            .hint_text("optional: sample, instrument, purpose…")
                            .desired_rows(2)
                            .desired_width(300.0),
                    );
                    r.widget_info(|| {
                        egui::WidgetInfo::labeled(egui::Role::TextInput, true, "report note")
                    });
                    ui.end_row();
                });
                ui.label(
                    RichText::new(format!(
                        "The report also records the date and time, and vhfit {}.",
                        isochore_analysis::VERSION
                    ))
                    .small()
                    .weak(),
                );
                ui.add_space(4.0);
                ui.horizontal(|ui| {
                    let ready = running.is_none() && !self.folder.trim().is_empty();
                    if ui.add_enabled(ready, egui::Button::new("Export")).clicked() {
                        go = true;
                    }
                    if let Some((done, total)) = running {
                        ui.add(
                            egui::ProgressBar::new(done as f32 / total.max(1) as f32)
                                .desired_width(240.0)
                                .text(format!("{done} of {total} written")),
                        );
                    }
                });
                if let Some(e) = &self.error {
                    ui.colored_label(flag, e);
                }
                if let Some(n) = &self.note {
                    ui.label(n);
                }
            });
        if go {
            let chosen = series.clone();
            let folder = PathBuf::from(self.folder.trim());
            self.note = None;
            match ExportJob::start(
                project,
                cx.fitter,
                &chosen,
                &folder,
                crate::export::Choices {
                    formats: *formats,
                    analyst,
                    note: &self.record_note,
                    calorimetric_in_fit: self.calorimetric_in_fit,
                },
            ) {
                Ok(job) => {
                    self.job = Some(job);
                    self.error = None;
                    ctx.request_repaint();
                }
                Err(e) => self.error = Some(e),
            }
        }
        if !open {
            self.open = false;
        }
    }

    /// Takes the running export's outcome when it is done; asks for frames meanwhile.
    fn follow(&mut self, ctx: &egui::Context) {
        let Some(job) = &self.job else {
            return;
        };
        match job.poll() {
            Some(Ok(note)) => {
                self.note = Some(note);
                self.error = None;
                self.job = None;
            }
            Some(Err(e)) => {
                self.error = Some(e);
                self.job = None;
            }
            None => ctx.request_repaint_after(std::time::Duration::from_millis(50)),
        }
    }
}
