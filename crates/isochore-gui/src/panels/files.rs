//! File dialogs of the workbench: open (a system dialog when the desktop has one, and
//! always a typed path), save as, and the import preview that shows which column was
//! recognised as what and lets the chemist change it before anything enters the project.
//! The export dialog is `panels::export`.

use crate::app::{Action, Cx};
use crate::command::Command;
use crate::io::{self, ImportFailure, ImportPreview, ImportQuestion, QuestionKind};
use crate::panels::style;
use egui::RichText;
use std::path::PathBuf;

/// Which path dialog is open.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PathDialog {
    /// Open a project or data file.
    Open,
    /// Save the project under a new name.
    SaveAs,
}

/// The files panel's state.
#[derive(Debug, Default)]
pub struct FilesPanel {
    /// The open path dialog.
    pub dialog: Option<PathDialog>,
    /// The typed path.
    pub path_text: String,
    /// The preview awaiting confirmation.
    pub preview: Option<ImportPreview>,
    /// A source refused for its decimal marks or its extreme temperatures, waiting for
    /// the chemist to state the mark or confirm the temperatures.
    pub question: Option<ImportQuestion>,
    /// An error inside a dialog.
    pub error: Option<String>,
    /// The export dialog.
    pub export: crate::panels::export::ExportDialog,
    /// Put the keyboard in the path field on the next frame (a dialog just opened).
    focus_path: bool,
}

impl FilesPanel {
    /// Opens the "open" dialog.
    pub fn ask_open(&mut self) {
        self.dialog = Some(PathDialog::Open);
        self.error = None;
        self.focus_path = true;
    }

    /// Opens the "save as" dialog.
    pub fn ask_save_as(&mut self) {
        self.dialog = Some(PathDialog::SaveAs);
        self.error = None;
        self.focus_path = true;
    }

    /// Opens the export dialog.
    pub fn ask_export(&mut self) {
        self.export.ask();
    }

    /// Shows a preview for confirmation.
    pub fn start_preview(&mut self, preview: ImportPreview) {
        self.preview = Some(preview);
    }

    /// Asks which decimal mark a refused source uses, or whether its extreme temperatures
    /// are meant (isochore-data's message shown).
    pub fn ask(&mut self, question: ImportQuestion) {
        self.question = Some(question);
    }

    /// Draws whichever dialog is open.
    pub fn windows(&mut self, ctx: &egui::Context, cx: &mut Cx<'_>) {
        self.path_window(ctx, cx);
        self.export.window(ctx, cx);
        self.question_window(ctx, cx);
        self.preview_window(ctx, cx);
    }

    fn question_window(&mut self, ctx: &egui::Context, cx: &mut Cx<'_>) {
        let Some(q) = self.question.as_mut() else {
            return;
        };
        let flag = style::flag_color(cx.dark);
        let mut choice = None;
        let mut confirm = false;
        let mut cancel = false;
        let title = match q.kind {
            QuestionKind::DecimalMark => format!("Decimal mark of {}", q.source),
            QuestionKind::ExtremeTemperatures => format!("Temperatures of {}", q.source),
        };
        egui::Window::new(title)
            .collapsible(false)
            .default_width(560.0)
            .anchor(egui::Align2::CENTER_CENTER, [0.0, 0.0])
            .show(ctx, |ui| {
                ui.colored_label(flag, &q.message);
                match q.kind {
                    QuestionKind::DecimalMark => {
                        ui.label(
                            "A file uses one decimal convention throughout. Say which mark \
                             this one uses, and it is read again; a cell written the other \
                             way is then named.",
                        );
                    }
                    QuestionKind::ExtremeTemperatures => {
                        ui.label(
                            "A temperature below 1 K or above 10 000 K is nearly always a \
                             typing or unit mistake (37.0e300 °C, kelvin read as °C). Confirm \
                             only when the data really lie there; the confirmation is kept \
                             with each data set, and its refits accept them too.",
                        );
                    }
                }
                ui.horizontal(|ui| {
                    match q.kind {
                        QuestionKind::DecimalMark => {
                            if ui.button("Read with decimal point (1.5)").clicked() {
                                choice = Some(isochore_data::DecimalMark::Point);
                            }
                            if ui.button("Read with decimal comma (1,5)").clicked() {
                                choice = Some(isochore_data::DecimalMark::Comma);
                            }
                        }
                        QuestionKind::ExtremeTemperatures => {
                            if ui
                                .button("Confirm temperatures outside 1–10 000 K and read again")
                                .clicked()
                            {
                                confirm = true;
                            }
                        }
                    }
                    if ui.button("Cancel").clicked() {
                        cancel = true;
                    }
                });
            });
        let result = match choice {
            Some(mark) => Some(q.retry(mark)),
            None if confirm => Some(q.confirm_extreme()),
            None => None,
        };
        match result {
            Some(Ok(p)) => {
                self.question = None;
                self.error = None;
                self.preview = Some(p);
            }
            Some(Err(ImportFailure::Question(again))) => *q = *again,
            Some(Err(ImportFailure::Message(m))) => q.message = m,
            None if cancel => self.question = None,
            None => {}
        }
    }

    fn path_window(&mut self, ctx: &egui::Context, cx: &mut Cx<'_>) {
        let Some(kind) = self.dialog else {
            return;
        };
        let title = match kind {
            PathDialog::Open => "Open a data file or project",
            PathDialog::SaveAs => "Save project as",
        };
        let mut open = true;
        let mut go: Option<PathBuf> = None;
        egui::Window::new(title)
            .open(&mut open)
            .collapsible(false)
            .default_width(520.0)
            .anchor(egui::Align2::CENTER_CENTER, [0.0, 0.0])
            .show(ctx, |ui| {
                let hint = match kind {
                    PathDialog::Open => "CSV or TSV data, or an .isochore.json project",
                    PathDialog::SaveAs => "a file name ending in .isochore.json",
                };
                ui.label(hint);
                ui.horizontal(|ui| {
                    let r = ui.add(
                        egui::TextEdit::singleline(&mut self.path_text)
                            .hint_text("/path/to/file")
                            .desired_width(360.0),
                    );
                    r.widget_info(|| egui::WidgetInfo::labeled(egui::Role::TextInput, true, "path"));
                    if std::mem::take(&mut self.focus_path) {
                        r.request_focus();
                    }
                    if r.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter)) {
                        go = Some(PathBuf::from(self.path_text.trim()));
                    }
                    if ui.button("Browse…").clicked() {
                        if let Some(p) = system_dialog(kind) {
                            self.path_text = p.display().to_string();
                        } else {
                            self.error = Some("No file dialog is available on this desktop: type the path instead.".into());
                        }
                    }
                });
                let verb = match kind {
                    PathDialog::Open => "Open",
                    PathDialog::SaveAs => "Save",
                };
                if ui.button(verb).clicked() && !self.path_text.trim().is_empty() {
                    go = Some(PathBuf::from(self.path_text.trim()));
                }
                if let Some(e) = &self.error {
                    ui.colored_label(style::flag_color(cx.dark), e);
                }
            });
        if let Some(p) = go {
            let mut p = p;
            match kind {
                PathDialog::Open => {
                    cx.actions.push(Action::Open(p));
                    self.dialog = None;
                }
                PathDialog::SaveAs => {
                    p = io::with_project_suffix(p);
                    cx.actions.push(Action::SaveAs(p));
                    self.dialog = None;
                }
            }
        }
        if !open {
            self.dialog = None;
        }
    }

    fn preview_window(&mut self, ctx: &egui::Context, cx: &mut Cx<'_>) {
        let Some(p) = self.preview.as_mut() else {
            return;
        };
        let mut accept = false;
        let mut cancel = false;
        let mut reimport = false;
        let dark = cx.dark;
        let flag = style::flag_color(dark);
        let problems = p.problems();
        let demo = crate::start::is_demo(cx.project);
        egui::Window::new(format!("Import {}", p.source))
            .collapsible(false)
            .default_width(680.0)
            .anchor(egui::Align2::CENTER_CENTER, [0.0, 0.0])
            .show(ctx, |ui| {
                ui.label(
                    RichText::new("Columns as recognised — change any that are wrong:").strong(),
                );
                if mapping_editor(ui, p) {
                    reimport = true;
                }
                for d in p.import.describe_mapping() {
                    ui.label(RichText::new(d).small());
                }
                // Shown in the rows below, left out of the fit (the note the results carry).
                if let Some(n) =
                    isochore_analysis::unused_columns_note(&p.mapping, &p.import.headers)
                {
                    ui.label(n);
                }
                if reading_choices(ui, p) {
                    reimport = true;
                }
                ui.separator();
                let n_series = p.import.series.len();
                ui.label(format!(
                    "{} rows read in {} data set{}; first rows:",
                    p.accepted_rows(),
                    n_series,
                    if n_series == 1 { "" } else { "s" }
                ));
                egui::ScrollArea::both()
                    .id_salt("preview_scroll")
                    .max_height(220.0)
                    .show(ui, |ui| {
                        egui::Grid::new("preview_grid")
                            .striped(true)
                            .show(ui, |ui| {
                                ui.strong("line");
                                for h in &p.import.headers {
                                    ui.strong(h);
                                }
                                ui.end_row();
                                let rows = (0..p.import.series.len())
                                    .flat_map(|i| p.import.rows_of(i))
                                    .take(8);
                                for r in rows {
                                    ui.label(r.line().to_string());
                                    for c in p.import.cells(r) {
                                        ui.label(c);
                                    }
                                    ui.end_row();
                                }
                            });
                    });
                if !problems.is_empty() {
                    ui.label(
                        RichText::new(format!(
                            "{} could not be read:",
                            isochore_fit::error::counted(problems.len(), "row", "rows")
                        ))
                        .color(flag)
                        .strong(),
                    );
                    for e in problems.iter().take(12) {
                        ui.colored_label(flag, e);
                    }
                }
                if let Some(e) = &self.error {
                    ui.colored_label(flag, e);
                }
                weighting_choice(ui, p, flag);
                if demo {
                    ui.label(
                        "The demo project is open: these data start a new untitled project (Ctrl+Z brings the demo back).",
                    );
                }
                ui.horizontal(|ui| {
                    let label = if problems.is_empty() {
                        "Add to project".to_string()
                    } else {
                        format!("Add the {} readable rows", p.accepted_rows())
                    };
                    if ui.button(label).clicked() {
                        accept = true;
                    }
                    if ui.button("Cancel").clicked() {
                        cancel = true;
                    }
                });
            });
        if reimport {
            match p.reimport() {
                Ok(()) => self.error = None,
                Err(e) => self.error = Some(e),
            }
        }
        if accept {
            let series = p.series();
            let first = series.first().map(|s| s.id);
            if crate::start::is_demo(cx.project) {
                // Not mixed with the demo's invented series: a new untitled project
                // (Ctrl+Z brings the demo back).
                let project = crate::doc::Project {
                    series,
                    ..crate::doc::Project::default()
                };
                cx.out.push(Command::ReplaceProject(Box::new(project)));
            } else {
                let at = cx.project.series.len();
                for (k, s) in series.into_iter().enumerate() {
                    cx.out.push(Command::InsertSeries {
                        at: at + k,
                        series: Box::new(s),
                    });
                }
            }
            if let Some(id) = first {
                cx.actions.push(Action::SetActive(id));
            }
            self.preview = None;
            self.error = None;
        } else if cancel {
            self.preview = None;
            self.error = None;
        }
    }
}

fn decimal_name(d: isochore_data::DecimalMark) -> &'static str {
    match d {
        isochore_data::DecimalMark::Auto => "as the file shows (one convention)",
        isochore_data::DecimalMark::Point => "decimal point (1.5)",
        isochore_data::DecimalMark::Comma => "decimal comma (1,5)",
    }
}

/// The decimal mark and the confirmation of extreme temperatures, each said in words
/// beside its control; returns true when the source must be read again.
fn reading_choices(ui: &mut egui::Ui, p: &mut ImportPreview) -> bool {
    use isochore_data::DecimalMark as D;
    let before = (p.decimal, p.allow_extreme_temperatures);
    ui.horizontal(|ui| {
        ui.label("decimal mark");
        let combo = egui::ComboBox::from_id_salt("map_decimal")
            .selected_text(decimal_name(p.decimal))
            .show_ui(ui, |ui| {
                for d in [D::Auto, D::Point, D::Comma] {
                    ui.selectable_value(&mut p.decimal, d, decimal_name(d));
                }
            });
        combo
            .response
            .widget_info(|| egui::WidgetInfo::labeled(egui::Role::ComboBox, true, "decimal mark"));
    });
    ui.label(
        RichText::new(
            "One decimal convention per file: a cell that mixes marks, or a comma that could \
             be a thousands separator, is refused with its line and column until the mark is stated.",
        )
        .small(),
    );
    ui.checkbox(
        &mut p.allow_extreme_temperatures,
        "accept temperatures below 1 K or above 10 000 K",
    );
    ui.label(
        RichText::new(
            "Such a temperature is nearly always a typing or unit mistake (37.0e300 °C, kelvin \
             read as °C). Tick this only when the data really lie there; the confirmation is \
             kept with the data set, and its refits accept them too.",
        )
        .small(),
    );
    (p.decimal, p.allow_extreme_temperatures) != before
}

/// The empty-σ rule: isochore-data's message (line and column) when a σ column has some
/// empty cells, and the choice to fit unweighted (equal weights, every σ ignored).
fn weighting_choice(ui: &mut egui::Ui, p: &mut ImportPreview, flag: egui::Color32) {
    if let Some(m) = p.sigma_problem() {
        ui.colored_label(flag, m.to_string());
    }
    if p.sigma_problem().is_some() || p.unweighted {
        ui.checkbox(
            &mut p.unweighted,
            "fit unweighted (every point counts the same; every σ is ignored)",
        );
    }
}

/// The mapping editor; returns true when the chemist changed something. Each choice is
/// named in the accessibility tree ("value column", "value kind", …).
fn mapping_editor(ui: &mut egui::Ui, p: &mut ImportPreview) -> bool {
    use isochore_data::{UncertaintyColumn, UncertaintyKind};
    use isochore_fit::{
        ConcentrationUnit as C, EnergyUnit as E, QuantityKind as Q, TemperatureUnit as T,
    };
    let before = p.mapping.clone();
    let headers = p.import.headers.clone();
    let col_name = |c: usize| format!("{} · {}", c + 1, headers.get(c).map_or("", |s| s.as_str()));
    let m = &mut p.mapping;
    egui::Grid::new("mapping_grid")
        .num_columns(3)
        .show(ui, |ui| {
            ui.label("temperature");
            let combo = egui::ComboBox::from_id_salt("map_t")
                .selected_text(col_name(m.temperature.column))
                .show_ui(ui, |ui| {
                    for c in 0..headers.len() {
                        ui.selectable_value(&mut m.temperature.column, c, col_name(c));
                    }
                });
            combo.response.widget_info(|| {
                egui::WidgetInfo::labeled(egui::Role::ComboBox, true, "temperature column")
            });
            let combo = egui::ComboBox::from_id_salt("map_tu")
                .selected_text(m.temperature.unit.symbol())
                .show_ui(ui, |ui| {
                    for u in [T::Celsius, T::Kelvin, T::Fahrenheit] {
                        ui.selectable_value(&mut m.temperature.unit, u, u.symbol());
                    }
                });
            combo.response.widget_info(|| {
                egui::WidgetInfo::labeled(egui::Role::ComboBox, true, "temperature scale")
            });
            ui.end_row();
            ui.label("measured value");
            let combo = egui::ComboBox::from_id_salt("map_v")
                .selected_text(col_name(m.quantity.column))
                .show_ui(ui, |ui| {
                    for c in 0..headers.len() {
                        ui.selectable_value(&mut m.quantity.column, c, col_name(c));
                    }
                });
            combo.response.widget_info(|| {
                egui::WidgetInfo::labeled(egui::Role::ComboBox, true, "value column")
            });
            let combo = egui::ComboBox::from_id_salt("map_kind")
                .selected_text(m.quantity.kind.label())
                .show_ui(ui, |ui| {
                    for k in [
                        Q::K,
                        Q::LnK,
                        Q::Log10K,
                        Q::PK,
                        Q::DissociationConstant(C::Molar),
                        Q::DissociationConstant(C::Millimolar),
                        Q::DissociationConstant(C::Micromolar),
                        Q::DissociationConstant(C::Nanomolar),
                        Q::DissociationConstant(C::Picomolar),
                        Q::DeltaG(E::KilojoulePerMole),
                        Q::DeltaG(E::KilocaloriePerMole),
                    ] {
                        ui.selectable_value(&mut m.quantity.kind, k, k.label());
                    }
                });
            combo.response.widget_info(|| {
                egui::WidgetInfo::labeled(egui::Role::ComboBox, true, "value kind")
            });
            ui.end_row();
            ui.label("uncertainty");
            let mut col = m.uncertainty.map(|u| u.column);
            let combo = egui::ComboBox::from_id_salt("map_s")
                .selected_text(col.map_or("none".into(), col_name))
                .show_ui(ui, |ui| {
                    ui.selectable_value(&mut col, None, "none");
                    for c in 0..headers.len() {
                        ui.selectable_value(&mut col, Some(c), col_name(c));
                    }
                });
            combo.response.widget_info(|| {
                egui::WidgetInfo::labeled(egui::Role::ComboBox, true, "uncertainty column")
            });
            let mut relative = matches!(
                m.uncertainty.map(|u| u.kind),
                Some(UncertaintyKind::RelativePercent)
            );
            ui.checkbox(&mut relative, "in percent of the value");
            m.uncertainty = col.map(|column| UncertaintyColumn {
                column,
                kind: if relative {
                    UncertaintyKind::RelativePercent
                } else {
                    match m.uncertainty.map(|u| u.kind) {
                        Some(UncertaintyKind::Absolute(k))
                            if std::mem::discriminant(&k)
                                == std::mem::discriminant(&m.quantity.kind) =>
                        {
                            UncertaintyKind::Absolute(k)
                        }
                        _ => UncertaintyKind::Absolute(m.quantity.kind),
                    }
                },
            });
            ui.end_row();
        });
    if m.temperature != before.temperature {
        m.temperature.assumed = false;
    }
    // A column just given a role is no longer a note, a data-set column or ignored: the
    // import refuses a column used twice, and those roles have no chooser here.
    let used = [
        Some(m.temperature.column),
        Some(m.quantity.column),
        m.uncertainty.map(|u| u.column),
    ];
    let taken = |c: usize| used.contains(&Some(c));
    if m.note.is_some_and(taken) {
        m.note = None;
    }
    if m.series.is_some_and(taken) {
        m.series = None;
    }
    m.ignored.retain(|&c| !taken(c));
    *m != before
}

/// The desktop's file dialog, when it has one (xdg portal); `None` otherwise.
fn system_dialog(kind: PathDialog) -> Option<PathBuf> {
    let d = rfd::FileDialog::new();
    match kind {
        PathDialog::Open => d
            .add_filter("data or project", &["csv", "tsv", "txt", "json"])
            .pick_file(),
        PathDialog::SaveAs => d.add_filter("project", &["json"]).save_file(),
    }
}
