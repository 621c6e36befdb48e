//! Calorimetric ΔH° in the window (issue 12): each series keeps its calorimetric values
//! ΔH_cal(T) ± u (saved with its data set in the project file). The editor lists them, adds
//! one typed in the series' display units or loads a calorimetric file (rows naming the
//! series or none, in place of the series' values), removes one — every change an undoable
//! [`Command::SetCalorimetric`].
//! The comparison with the van 't Hoff ΔH°(T) — the difference with its interval and z, the
//! ratio ΔH_vH/ΔH_cal with Fieller's interval, the verdict and the caution about coupled
//! equilibria — is isochore-analysis' (`calorimetric::compare_single`, `compare_joint`);
//! labels and cells are `present`'s. The "Calorimetric ΔH°" window (View menu) shows the
//! active series against its own fit; the "fit together" view shows every chosen series
//! against the joint fit with the same editor.

use crate::command::Command;
use crate::context::Cx;
use crate::doc::Entry;
use egui::RichText;
use isochore_analysis::calorimetric::{
    compare_single, entry_from_display, fit_data_set_with_calorimetric, rows_for_series,
};
use isochore_fit::calorimetric::{CalorimetricComparison, COUPLED_EQUILIBRIA_CAUTION};
use isochore_fit::global::{CalorimetricJointFit, GlobalError, GlobalFit};
use isochore_fit::{EnergyUnit, TemperatureUnit};
use isochore_report::present::{self, joint as pj, names};
use std::collections::HashMap;

/// What is being typed for one series: a new value and a calorimetric file's path, and the
/// last refusal in words.
#[derive(Debug, Clone, Default)]
pub struct Fields {
    /// Temperature, in the series' temperature unit.
    pub t: String,
    /// ΔH_cal, in the series' energy unit.
    pub delta_h: String,
    /// u, in the series' energy unit.
    pub u: String,
    /// A calorimetric file to load.
    pub path: String,
    /// Why the last value or file was refused.
    pub error: Option<String>,
}

/// The editor of series `s`'s calorimetric values: the list (each with a button that
/// removes it), fields for a new one and a calorimetric file. Proposes commands in `out`.
pub fn editor(ui: &mut egui::Ui, out: &mut Vec<Command>, s: &Entry, f: &mut Fields) {
    let (tu, eu) = (
        s.data.settings.temperature_unit,
        s.data.settings.energy_unit,
    );
    let e = present::energy(eu);
    let values = &s.data.calorimetric;
    if values.is_empty() {
        ui.label("No calorimetric value yet.");
    }
    let mut remove = None;
    egui::Grid::new(("calorimetric_values", s.id))
        .striped(true)
        .show(ui, |ui| {
            for (i, v) in values.iter().enumerate() {
                ui.label(present::show_t(v.t_k, tu));
                ui.label(format!(
                    "ΔH_cal = {} {}",
                    present::plus_minus(e.from_si(v.delta_h_cal), e.from_si(v.u_cal)),
                    e.symbol
                ));
                if ui.button(format!("Remove value {}", i + 1)).clicked() {
                    remove = Some(i);
                }
                ui.end_row();
            }
        });
    if let Some(i) = remove {
        let mut v = values.clone();
        v.remove(i);
        out.push(Command::SetCalorimetric {
            series: s.id,
            values: v,
        });
    }
    ui.horizontal(|ui| {
        field(ui, &format!("T / {}", tu.symbol()), &mut f.t, 60.0);
        field(
            ui,
            &format!("ΔH_cal / ({})", e.symbol),
            &mut f.delta_h,
            70.0,
        );
        field(ui, &format!("u / ({})", e.symbol), &mut f.u, 50.0);
        if ui.button("Add calorimetric value").clicked() {
            match entry_from_display(&f.t, &f.delta_h, &f.u, tu, eu) {
                Ok(v) => {
                    let mut all = values.clone();
                    all.push(v);
                    out.push(Command::SetCalorimetric {
                        series: s.id,
                        values: all,
                    });
                    f.error = None;
                }
                Err(why) => f.error = Some(why),
            }
        }
    });
    ui.horizontal(|ui| {
        field(ui, "calorimetric file", &mut f.path, 220.0);
        if ui.button("Browse…").clicked() {
            if let Some(p) = rfd::FileDialog::new().pick_file() {
                f.path = p.display().to_string();
            }
        }
        let load = ui.button("Load calorimetric file").on_hover_text(
            "Replaces this series' values with the file's rows that name it or no series",
        );
        if load.clicked() {
            match load_file(&f.path, s) {
                Ok(v) => {
                    out.push(Command::SetCalorimetric {
                        series: s.id,
                        values: v,
                    });
                    f.error = None;
                }
                Err(why) => f.error = Some(why),
            }
        }
    });
    if let Some(why) = &f.error {
        ui.colored_label(ui.visuals().error_fg_color, why);
    }
}

/// The file's rows that name series `s` or no series (they replace the series' values:
/// loading the same file twice does not double them).
fn load_file(path: &str, s: &Entry) -> Result<Vec<isochore_data::SavedCalorimetric>, String> {
    if path.trim().is_empty() {
        return Err("Give the calorimetric file's path (or Browse…).".into());
    }
    let rows = isochore_data::calorimetric::read_calorimetric(std::path::Path::new(path.trim()))
        .map_err(|e| e.to_string())?;
    let found = rows_for_series(&rows, s.name());
    if found.is_empty() {
        return Err(format!(
            "{}: no row names series '{}' (and none names no series)",
            path.trim(),
            s.name()
        ));
    }
    Ok(found)
}

fn field(ui: &mut egui::Ui, label: &str, text: &mut String, width: f32) {
    let name = ui.label(label);
    ui.add(egui::TextEdit::singleline(text).desired_width(width))
        .labelled_by(name.id);
}

/// The comparisons, one row each after its series' label, with each verdict and the
/// caution about coupled equilibria once.
pub fn comparisons(
    ui: &mut egui::Ui,
    id: &str,
    rows: &[(String, &CalorimetricComparison)],
    e: EnergyUnit,
    tu: TemperatureUnit,
    level: f64,
) {
    if rows.is_empty() {
        return;
    }
    egui::Grid::new(id).striped(true).show(ui, |ui| {
        for h in pj::calorimetric_header(e, level) {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for (label, c) in rows {
            ui.label(label);
            for cell in pj::calorimetric_cells(c, e, tu) {
                ui.label(cell);
            }
            ui.end_row();
        }
    });
    for (label, c) in rows {
        ui.label(format!("{label}: {}.", pj::verdict_words(c)));
    }
    ui.label(format!("Caution: {COUPLED_EQUILIBRIA_CAUTION}."));
}

/// The "Calorimetric ΔH°" window: the active series' values and their comparison with its
/// own fit.
#[derive(Default)]
pub struct CalorimetricPanel {
    /// Whether the window is open.
    pub open: bool,
    /// Show the series fitted with its calorimetric values as observations of ΔH°(T).
    pub in_fit: bool,
    fields: HashMap<u64, Fields>,
    /// The last fit with calorimetric values: (series id, revision, every value's bits),
    /// the fit of ln K alone in the joint form, and the fit with the values (or why none).
    fitted: Option<(SingleKey, SingleFit)>,
}

/// What a fit with calorimetric values was made from.
type SingleKey = (u64, u64, Vec<[u64; 3]>);

/// The fit of ln K alone (in the joint form) and the fit with the calorimetric values, or
/// why they could not be made.
type SingleFit = Result<(GlobalFit, CalorimetricJointFit), GlobalError>;

/// The fit with the calorimetric values as observations of ΔH°(T) beside `alone` (the same
/// series, ln K alone), one row per parameter, with χ² and the caution: the single series'
/// window and the joint view alike.
pub fn constrained_table(
    ui: &mut egui::Ui,
    id: &str,
    c: &CalorimetricJointFit,
    alone: &GlobalFit,
    labels: &[String],
    e: EnergyUnit,
    tu: TemperatureUnit,
) {
    ui.label(format!(
        "{}, beside the fit of ln K alone:",
        pj::CONSTRAINED_FIT
    ));
    egui::Grid::new(id).striped(true).show(ui, |ui| {
        for h in pj::constrained_header(alone.options().level) {
            ui.label(RichText::new(h).strong());
        }
        ui.end_row();
        for r in pj::constrained_rows(c, alone, labels, e, tu) {
            for cell in pj::constrained_cells(&r) {
                ui.label(cell);
            }
            ui.end_row();
        }
    });
    ui.label(pj::constrained_summary(c));
}

impl CalorimetricPanel {
    /// Draws the window (when open).
    pub fn show(&mut self, ctx: &egui::Context, cx: &mut Cx<'_>) {
        if !self.open {
            return;
        }
        let mut open = true;
        egui::Window::new(names::CALORIMETRIC)
            .open(&mut open)
            .default_size([760.0, 420.0])
            .vscroll(true)
            .show(ctx, |ui| self.contents(ui, cx));
        self.open = open;
    }

    fn contents(&mut self, ui: &mut egui::Ui, cx: &mut Cx<'_>) {
        let (project, fitter) = (cx.project, cx.fitter);
        let Some(s) = cx.active.and_then(|id| project.get(id)) else {
            ui.label("No series.");
            return;
        };
        ui.label(RichText::new(format!("Series “{}”", s.name())).strong());
        let f = self.fields.entry(s.id).or_default();
        editor(ui, cx.out, s, f);
        if s.data.calorimetric.is_empty() {
            return;
        }
        ui.separator();
        let Some(a) = fitter.get(s.id) else {
            return;
        };
        let fit = match &a.fit {
            Ok(fit) => fit,
            Err(e) => {
                ui.label(format!("No fit to compare with: {e}"));
                return;
            }
        };
        ui.label(
            RichText::new("Compared with the van 't Hoff ΔH°(T) of this series' fit").strong(),
        );
        match compare_single(fit, &s.data) {
            Ok(c) => {
                let rows: Vec<(String, &CalorimetricComparison)> =
                    c.iter().map(|x| (s.name().to_string(), x)).collect();
                comparisons(
                    ui,
                    "calorimetric_single",
                    &rows,
                    s.data.settings.energy_unit,
                    s.data.settings.temperature_unit,
                    fit.options().level,
                );
            }
            Err(e) => {
                ui.colored_label(ui.visuals().error_fg_color, e);
            }
        }
        ui.checkbox(&mut self.in_fit, "Use the calorimetric values in the fit");
        if !self.in_fit {
            return;
        }
        let bits: Vec<[u64; 3]> = s
            .data
            .calorimetric
            .iter()
            .map(|v| [v.t_k.to_bits(), v.delta_h_cal.to_bits(), v.u_cal.to_bits()])
            .collect();
        let key: SingleKey = (s.id, s.rev, bits);
        if self.fitted.as_ref().is_none_or(|(k, _)| *k != key) {
            let r = fit_data_set_with_calorimetric(&s.data, s.name());
            self.fitted = Some((key, r));
        }
        match &self.fitted {
            Some((_, Ok((alone, with)))) => constrained_table(
                ui,
                "single_constrained",
                with,
                alone,
                &[s.name().to_string()],
                s.data.settings.energy_unit,
                s.data.settings.temperature_unit,
            ),
            Some((_, Err(e))) => {
                ui.colored_label(ui.visuals().error_fg_color, format!("Not fitted: {e}"));
            }
            None => {}
        }
    }

    /// The fit with calorimetric values shown, if any (tests).
    pub fn fitted(&self) -> Option<&CalorimetricJointFit> {
        self.fitted
            .as_ref()
            .and_then(|(_, r)| r.as_ref().ok())
            .map(|(_, with)| with)
    }
}
