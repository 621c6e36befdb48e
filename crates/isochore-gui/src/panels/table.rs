//! The measurements table: every row with its cells exactly as typed in the file, an
//! include checkbox, the exclusion reason and the diagnostics isochore-fit computed for the
//! point, with flagged cells marked. Cells and reasons are edited in place; a committed
//! edit is one undoable command and refits. Rows are virtualised, so a million rows scroll
//! smoothly.

use crate::app::Cx;
use crate::command::Command;
use crate::panels::style;
use egui::{RichText, Sense};
use egui_extras::{Column, TableBuilder};
use isochore_analysis::RowNumber;
use isochore_report::present::names;

/// What a cell being edited holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EditTarget {
    /// A cell of the file (0-based column).
    Cell(usize),
    /// The exclusion reason.
    Reason,
}

/// A cell being edited.
#[derive(Debug, Clone)]
pub struct Editing {
    /// Series id.
    pub series: u64,
    /// 0-based row.
    pub row: usize,
    /// Which cell.
    pub target: EditTarget,
    /// The text typed so far.
    pub text: String,
    /// Focus has been requested.
    pub focused: bool,
}

/// The table's own state.
#[derive(Debug, Default)]
pub struct TablePanel {
    /// The cell being edited.
    pub editing: Option<Editing>,
    /// The last typing error, in words.
    pub error: Option<String>,
}

const ROW_H: f32 = 22.0;

impl TablePanel {
    /// Starts editing a cell (used by the table and by tests).
    pub fn start_edit(&mut self, series: u64, row: usize, target: EditTarget, text: String) {
        self.editing = Some(Editing {
            series,
            row,
            target,
            text,
            focused: false,
        });
    }

    /// Draws the table.
    pub fn ui(&mut self, ui: &mut egui::Ui, cx: &mut Cx<'_>) {
        let project = cx.project;
        let Some(series) = cx.active.and_then(|id| project.get(id)) else {
            ui.label("No series.");
            return;
        };
        let analysis = cx.fitter.get(series.id);
        let a = analysis.as_deref();
        // Each visible row's diagnostics are computed when drawn (`VantHoffFit::point`), so
        // a large fit's records are never all made on the UI thread.
        let fit = a.and_then(|a| a.fit.as_deref().ok());
        let n_excl = series.data.exclusions.len();
        ui.horizontal(|ui| {
            ui.heading("Measurements");
            ui.label(format!(
                "{} — {} rows, {} excluded",
                series.name(),
                series.n_rows(),
                n_excl
            ));
            if let Some(e) = &self.error {
                ui.colored_label(style::flag_color(cx.dark), e);
            }
        });
        ui.label(
            RichText::new(
                "Click a value or a reason to edit it (Enter keeps, Esc cancels); untick a row to exclude it from the fit.",
            )
            .small()
            .weak(),
        );
        let flag = style::flag_color(cx.dark);
        let value_cols = series.value_columns();
        let note_col = series.note_column();
        let mut headers: Vec<(String, String)> = vec![
            ("#".into(), "row number (file line in the hover)".into()),
            (
                names::USED.into(),
                "ticked: the row is used in the fit; untick to exclude it".into(),
            ),
        ];
        for &c in &value_cols {
            headers.push((series.header(c).to_string(), "as typed in the file".into()));
        }
        // A file of ln K values has a column of that name already: the converted one is
        // then named apart, so "ln K" never heads two columns.
        let is_ln_k = |h: &str| {
            let bare: String = h.chars().filter(|c| c.is_alphanumeric()).collect();
            bare.eq_ignore_ascii_case("lnk")
        };
        let ln_k_header = if headers.iter().any(|(h, _)| is_ln_k(h)) {
            "ln K (converted)"
        } else {
            "ln K"
        };
        let studentized_tip = format!(
            "{} (excluded rows: residual in prediction SDs)",
            names::STUDENTIZED
        );
        for (h, tip) in [
            (ln_k_header, "on the fitting scale"),
            ("leverage", "h: pull of the point on the fit"),
            (names::STUDENTIZED_SHORT, studentized_tip.as_str()),
            ("Cook's D", "influence of the point on the fit"),
            ("reason", "why the row is excluded"),
            ("note", "note from the file"),
        ] {
            headers.push((h.into(), tip.into()));
        }
        let mut commit: Option<(Editing, bool)> = None;
        let sid = series.id;
        // The table is wider than the panel on a small screen: it scrolls sideways, and
        // every column past the first two can be resized.
        egui::ScrollArea::horizontal()
            .id_salt(("measurements_sideways", series.id))
            .show(ui, |ui| {
                let table = TableBuilder::new(ui)
                    .id_salt(("measurements", series.id))
                    .striped(true)
                    .sense(Sense::click())
                    .cell_layout(egui::Layout::left_to_right(egui::Align::Center))
                    .column(Column::exact(44.0))
                    .column(Column::exact(34.0))
                    .columns(
                        Column::initial(92.0)
                            .at_least(60.0)
                            .resizable(true)
                            .clip(true),
                        value_cols.len(),
                    )
                    // Clipped, so a long header (hover for the full name) does not widen them.
                    .columns(
                        Column::initial(80.0)
                            .at_least(60.0)
                            .resizable(true)
                            .clip(true),
                        4,
                    )
                    .column(
                        Column::initial(220.0)
                            .at_least(80.0)
                            .resizable(true)
                            .clip(true),
                    )
                    .column(
                        Column::initial(160.0)
                            .at_least(60.0)
                            .resizable(true)
                            .clip(true),
                    );
                table
                    .header(ROW_H, |mut h| {
                        for (title, tip) in &headers {
                            h.col(|ui| {
                                ui.strong(title).on_hover_text(tip);
                            });
                        }
                    })
                    .body(|body| {
                        body.rows(ROW_H, series.n_rows(), |mut tr| {
                            let i = tr.index();
                            let key = (sid, i);
                            let excl = series.exclusion(i);
                            let point = a.and_then(|a| a.point_of_row.get(i).copied().flatten());
                            let d_owned = point.and_then(|k| fit.and_then(|f| f.point(k)));
                            let d = d_owned.as_ref();
                            tr.set_selected(
                                cx.links.selected == Some(key) || cx.links.hovered == Some(key),
                            );
                            tr.col(|ui| {
                                let r = ui.label(RowNumber::from_index(i).to_string());
                                if let Some(line) = series.line(i) {
                                    r.on_hover_text(format!(
                                        "line {line} of {}",
                                        series.data.source.name
                                    ));
                                }
                            });
                            tr.col(|ui| {
                                let mut inc = excl.is_none();
                                let r = ui.checkbox(&mut inc, "");
                                let label = format!("use row {}", RowNumber::from_index(i));
                                r.widget_info(|| {
                                    egui::WidgetInfo::selected(
                                        egui::Role::CheckBox,
                                        true,
                                        inc,
                                        &label,
                                    )
                                });
                                if r.changed() {
                                    cx.out.push(Command::SetExclusion {
                                        series: sid,
                                        row: i,
                                        exclusion: (!inc)
                                            .then(|| (String::new(), cx.stamp.clone())),
                                    });
                                }
                            });
                            for &c in &value_cols {
                                tr.col(|ui| {
                                    let text = series.cell(i, c).to_string();
                                    self.editable(
                                        ui,
                                        sid,
                                        i,
                                        EditTarget::Cell(c),
                                        text,
                                        false,
                                        &mut commit,
                                    );
                                });
                            }
                            tr.col(|ui| {
                                if let Some(d) = d {
                                    ui.label(style::fixed(d.ln_k, 3));
                                }
                            });
                            let cells = [
                                (
                                    d.map(|d| d.leverage),
                                    d.is_some_and(|d| d.flags.high_leverage),
                                    "high leverage",
                                ),
                                (
                                    d.and_then(|d| d.student_ext.or(d.prediction_residual)),
                                    d.is_some_and(|d| d.flags.outlier),
                                    "outlier",
                                ),
                                (
                                    d.and_then(|d| d.cooks_d),
                                    d.is_some_and(|d| d.flags.influential),
                                    "influential",
                                ),
                            ];
                            for (v, flagged, why) in cells {
                                tr.col(|ui| {
                                    let Some(v) = v else {
                                        ui.weak(isochore_report::present::MISSING);
                                        return;
                                    };
                                    let text = style::diag(v);
                                    if flagged {
                                        ui.label(
                                            RichText::new(format!("{text} ⚑")).color(flag).strong(),
                                        )
                                        .on_hover_text(format!("flagged: {why}"));
                                    } else {
                                        ui.label(text);
                                    }
                                });
                            }
                            tr.col(|ui| match excl {
                                Some(e) => {
                                    let r = e.reason.clone();
                                    self.editable(
                                        ui,
                                        sid,
                                        i,
                                        EditTarget::Reason,
                                        r,
                                        true,
                                        &mut commit,
                                    );
                                }
                                None => {
                                    ui.label("");
                                }
                            });
                            tr.col(|ui| {
                                if let Some(c) = note_col {
                                    let note = series.cell(i, c);
                                    let r = ui.label(RichText::new(note).weak());
                                    if !note.is_empty() {
                                        r.on_hover_text(note);
                                    }
                                }
                            });
                            let resp = tr.response();
                            if resp.hovered() {
                                cx.links.next_hover = Some(key);
                            }
                            if resp.clicked() {
                                cx.links.selected = Some(key);
                            }
                        });
                    });
            });
        if let Some((e, ok)) = commit {
            self.editing = None;
            if ok {
                self.commit(e, cx);
            }
        }
    }

    #[allow(clippy::too_many_arguments)]
    fn editable(
        &mut self,
        ui: &mut egui::Ui,
        series: u64,
        row: usize,
        target: EditTarget,
        text: String,
        placeholder: bool,
        commit: &mut Option<(Editing, bool)>,
    ) {
        let editing_here = self
            .editing
            .as_ref()
            .is_some_and(|e| e.series == series && e.row == row && e.target == target);
        if editing_here {
            let Some(e) = self.editing.as_mut() else {
                return;
            };
            let resp = ui.add(egui::TextEdit::singleline(&mut e.text).desired_width(f32::INFINITY));
            let label = format!("edit row {}", RowNumber::from_index(row));
            resp.widget_info(|| egui::WidgetInfo::labeled(egui::Role::TextInput, true, &label));
            if !e.focused {
                resp.request_focus();
                e.focused = true;
            } else if resp.lost_focus() {
                let cancelled = ui.input(|i| i.key_pressed(egui::Key::Escape));
                *commit = Some((e.clone(), !cancelled));
            }
        } else {
            let shown = if text.is_empty() && placeholder {
                RichText::new("(add a reason)").weak().italics()
            } else {
                RichText::new(text.clone())
            };
            let mut r = ui.add(egui::Label::new(shown).sense(Sense::click()));
            // A clipped reason or value is read in full on hover.
            if !text.is_empty() {
                r = r.on_hover_text(&text);
            }
            if r.clicked() {
                self.start_edit(series, row, target, text);
            }
        }
    }

    fn commit(&mut self, e: Editing, cx: &mut Cx<'_>) {
        let Some(s) = cx.project.get(e.series) else {
            return;
        };
        let text = e.text.trim().to_string();
        match e.target {
            EditTarget::Reason => {
                let at = s
                    .exclusion(e.row)
                    .map_or_else(|| cx.stamp.clone(), |x| x.at.clone());
                if s.exclusion(e.row).is_some_and(|x| x.reason != text) {
                    cx.out.push(Command::SetExclusion {
                        series: e.series,
                        row: e.row,
                        exclusion: Some((text, at)),
                    });
                }
            }
            EditTarget::Cell(column) => {
                if s.cell(e.row, column) == text {
                    return;
                }
                match s.check_edit(e.row, column, &text) {
                    Ok(()) => {
                        self.error = None;
                        cx.out.push(Command::EditCell {
                            series: e.series,
                            row: e.row,
                            column,
                            text,
                        });
                    }
                    Err(msg) => self.error = Some(format!("{msg} — the cell was kept.")),
                }
            }
        }
    }
}
