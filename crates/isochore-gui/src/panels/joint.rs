//! The "fit together" view (issue 12): the project's series chosen by checkboxes, each
//! parameter of the model shared by all or fitted per series, and the joint fit of
//! isochore-analysis (`joint::fit_joint`, the command line's `--share`) drawn — every series
//! with the line the joint fit gives it on one van 't Hoff plot, the residuals by series,
//! the shared and per-series estimates, the differences between series and the test of
//! equality's verdict. The model is chosen here for every series (the models the fit crate
//! ships). Each chosen series' calorimetric values can be edited here (the same editor as
//! the "Calorimetric ΔH°" window) and are compared with its ΔH°(T) in the joint fit; the
//! joint fit with the calorimetric values as observations of ΔH°(T) is shown beside the fit
//! of ln K alone when asked for. A view: every number is the library's, every label
//! `present`'s.

use crate::context::Cx;
use crate::joint_export::JointExport;
use crate::panels::calorimetric::{comparisons, editor, Fields};
use crate::panels::compensation::{CompensationPlots, DrawnCompensation};
use crate::panels::style;
use egui::RichText;
use egui_plot::{Line, Plot, PlotPoints, Points};
use isochore_analysis::calorimetric::{compare_joint, values};
use isochore_analysis::joint::{fit_joint, fit_with_calorimetric, JointAnalysis};
use isochore_analysis::{Overrides, PreparedSet};
use isochore_fit::calorimetric::{CalorimetricComparison, CalorimetricValue};
use isochore_fit::global::{CalorimetricJointFit, GlobalError};
use isochore_fit::{EnergyUnit, Model, TemperatureUnit};
use isochore_report::present::{joint as pj, model_name, names};
use std::collections::HashMap;

/// A joint fit with the display units of its first series, and the data sets it was made
/// from (for the fit with calorimetric values).
struct Joint {
    analysis: JointAnalysis,
    sets: Vec<PreparedSet>,
    energy: EnergyUnit,
    temperature: TemperatureUnit,
    /// The compensation plots (three or more series).
    compensation: Option<CompensationPlots>,
}

/// What the last joint fit was made from: each chosen series' id and revision, the shared
/// keys and the model's key.
type Key = (Vec<(u64, u64)>, Vec<String>, &'static str);

/// What the last fit with calorimetric values was made from: the joint fit's key and every
/// value's bits.
type CalKey = (Key, Vec<[u64; 3]>);

/// The "fit together" window.
#[derive(Default)]
pub struct JointPanel {
    /// Whether the window is open.
    pub open: bool,
    /// The ids of the series ticked, in the project's order.
    pub chosen: Vec<u64>,
    /// The keys of the parameters ticked "shared".
    pub shared: Vec<String>,
    /// The model fitted to every series (`None`: the first chosen series' own).
    pub model: Option<Model>,
    /// Show the joint fit with the calorimetric values as observations of ΔH°(T).
    pub calorimetric_in_fit: bool,
    last: Option<(Key, Result<Joint, String>)>,
    constrained: Option<(CalKey, Result<CalorimetricJointFit, GlobalError>)>,
    fields: HashMap<u64, Fields>,
    /// The folder the joint report is written into.
    pub export_folder: String,
    export: Option<JointExport>,
    /// What the last joint report export did, in words (`Err` for a refusal or failure).
    pub export_outcome: Option<Result<String, String>>,
    /// What the compensation plots drew in the last frame (`None`: no plots shown).
    pub drawn_compensation: Option<DrawnCompensation>,
}

impl JointPanel {
    /// Opens the window with every series of `project` ticked and nothing shared yet
    /// (except ΔCp° where the first series' model has it).
    pub fn open_with_all(&mut self, project: &crate::doc::Project) {
        self.open = true;
        self.chosen = project.series.iter().map(|s| s.id).collect();
        if self.shared.is_empty() {
            if let Some(first) = project.series.first() {
                let model = self.model.unwrap_or(first.options().model);
                if model.params().iter().any(|p| p.key == "delta_cp") {
                    self.shared.push("delta_cp".into());
                }
            }
        }
    }

    /// The verdict of the test of equality shown, if a joint fit is on screen.
    pub fn verdict(&self) -> Option<String> {
        match &self.last {
            Some((_, Ok(j))) => j.analysis.equality.as_ref().map(|t| t.verdict()),
            _ => None,
        }
    }

    /// The fit with the calorimetric values shown, if any (tests).
    pub fn calorimetric_fit(&self) -> Option<&CalorimetricJointFit> {
        self.constrained.as_ref().and_then(|(_, r)| r.as_ref().ok())
    }

    /// Draws the window (when open) over the workbench.
    pub fn show(&mut self, ctx: &egui::Context, cx: &mut Cx<'_>) {
        if !self.open {
            return;
        }
        let mut open = true;
        egui::Window::new("Fit series together")
            .open(&mut open)
            .default_size([920.0, 760.0])
            .vscroll(true)
            .show(ctx, |ui| self.contents(ui, cx));
        self.open = open;
    }

    fn contents(&mut self, ui: &mut egui::Ui, cx: &mut Cx<'_>) {
        let project = cx.project;
        self.chosen.retain(|id| project.get(*id).is_some());
        ui.label(RichText::new("Series").strong());
        ui.horizontal_wrapped(|ui| {
            for (i, s) in project.series.iter().enumerate() {
                let mut on = self.chosen.contains(&s.id);
                style::marker_swatch(ui, i);
                if ui.checkbox(&mut on, s.name()).changed() {
                    if on {
                        self.chosen.push(s.id);
                    } else {
                        self.chosen.retain(|id| *id != s.id);
                    }
                }
            }
        });
        let chosen: Vec<_> = project
            .series
            .iter()
            .filter(|s| self.chosen.contains(&s.id))
            .collect();
        let model: Model = self
            .model
            .or_else(|| chosen.first().map(|s| s.options().model))
            .unwrap_or(Model::LINEAR);
        ui.horizontal(|ui| {
            ui.label(RichText::new("Model").strong());
            let mut m = model;
            let combo = egui::ComboBox::from_id_salt("joint_model")
                .selected_text(model_name(model))
                .show_ui(ui, |ui| {
                    for &x in Model::all() {
                        ui.selectable_value(&mut m, x, model_name(x))
                            .on_hover_text(x.describe());
                    }
                });
            combo.response.widget_info(|| {
                egui::WidgetInfo::labeled(egui::Role::ComboBox, true, "joint model")
            });
            if m != model {
                self.model = Some(m);
            }
        });
        let model = self.model.unwrap_or(model);
        self.shared
            .retain(|k| model.params().iter().any(|p| p.key == k));
        ui.label(RichText::new("Shared by all series (the others are fitted per series)").strong());
        ui.horizontal(|ui| {
            for p in model.params() {
                let mut on = self.shared.iter().any(|k| k == p.key);
                if ui
                    .checkbox(&mut on, format!("{} shared", p.symbol))
                    .changed()
                {
                    if on {
                        self.shared.push(p.key.to_string());
                    } else {
                        self.shared.retain(|k| k != p.key);
                    }
                }
            }
        });
        ui.separator();
        let key: Key = (
            chosen.iter().map(|s| (s.id, s.rev)).collect(),
            self.shared.clone(),
            model.key(),
        );
        if self.last.as_ref().is_none_or(|(k, _)| *k != key) {
            let result = run(&chosen, &self.shared, model);
            self.last = Some((key.clone(), result));
        }
        self.export_row(ui, project, &chosen, model);
        match &self.last {
            Some((_, Err(e))) => {
                self.drawn_compensation = None;
                ui.colored_label(ui.visuals().error_fg_color, e);
            }
            Some((_, Ok(j))) => self.drawn_compensation = show_joint(ui, j),
            None => {}
        }
        ui.separator();
        ui.label(RichText::new(names::CALORIMETRIC).strong());
        for s in &chosen {
            let n = s.data.calorimetric.len();
            egui::CollapsingHeader::new(format!("Calorimetric values of {} ({n})", s.name()))
                .id_salt(("joint_cal", s.id))
                .show(ui, |ui| {
                    editor(ui, cx.out, s, self.fields.entry(s.id).or_default());
                });
        }
        let Some((_, Ok(j))) = &self.last else {
            return;
        };
        let vals: Vec<Vec<CalorimetricValue>> = chosen.iter().map(|s| values(&s.data)).collect();
        if vals.iter().all(Vec::is_empty) {
            ui.label("No calorimetric value for the chosen series.");
            return;
        }
        match compare_joint(&j.analysis, &vals) {
            Ok(c) => {
                let rows: Vec<(String, &CalorimetricComparison)> = c
                    .iter()
                    .enumerate()
                    .flat_map(|(s, cs)| cs.iter().map(move |x| (j.analysis.labels[s].clone(), x)))
                    .collect();
                ui.label("Compared with each series' ΔH°(T) in the joint fit:");
                comparisons(
                    ui,
                    "joint_calorimetric",
                    &rows,
                    j.energy,
                    j.temperature,
                    j.analysis.fit.options().level,
                );
            }
            Err(e) => {
                ui.colored_label(ui.visuals().error_fg_color, e);
            }
        }
        ui.checkbox(
            &mut self.calorimetric_in_fit,
            "Use the calorimetric values in the joint fit",
        );
        if !self.calorimetric_in_fit {
            return;
        }
        let bits: Vec<[u64; 3]> = vals
            .iter()
            .flatten()
            .map(|v| [v.t_k.to_bits(), v.delta_h.to_bits(), v.u.to_bits()])
            .collect();
        let cal_key: CalKey = (key, bits);
        if self.constrained.as_ref().is_none_or(|(k, _)| *k != cal_key) {
            let r = fit_with_calorimetric(&j.sets, &j.analysis, &vals);
            self.constrained = Some((cal_key, r));
        }
        if let Some((_, r)) = &self.constrained {
            show_constrained(ui, j, r);
        }
    }
}

impl JointPanel {
    /// The joint report's folder, "Write joint report" and the outcome in words; the report
    /// holds what the view shows (the calorimetric comparisons, and the fit with the
    /// calorimetric values when it is shown).
    fn export_row(
        &mut self,
        ui: &mut egui::Ui,
        project: &crate::doc::Project,
        chosen: &[&crate::doc::Entry],
        model: Model,
    ) {
        if let Some(r) = self.export.as_ref().and_then(JointExport::poll) {
            self.export = None;
            self.export_outcome = Some(r.map(|written| {
                format!(
                    "Wrote {} files of the joint report into {}.",
                    written.len(),
                    self.export_folder.trim()
                )
            }));
        }
        let Some((_, Ok(j))) = &self.last else {
            return;
        };
        ui.horizontal(|ui| {
            let name = ui.label("joint report folder");
            ui.add(
                egui::TextEdit::singleline(&mut self.export_folder)
                    .hint_text("/path/to/folder")
                    .desired_width(300.0),
            )
            .labelled_by(name.id);
            if ui.button("Browse…").clicked() {
                if let Some(p) = rfd::FileDialog::new().pick_folder() {
                    self.export_folder = p.display().to_string();
                }
            }
            let busy = self.export.is_some();
            if ui
                .add_enabled(!busy, egui::Button::new("Write joint report"))
                .clicked()
            {
                let vals: Vec<Vec<CalorimetricValue>> =
                    chosen.iter().map(|s| values(&s.data)).collect();
                let comparisons = compare_joint(&j.analysis, &vals).unwrap_or_default();
                let constrained = (self.calorimetric_in_fit && vals.iter().any(|v| !v.is_empty()))
                    .then(|| fit_with_calorimetric(&j.sets, &j.analysis, &vals));
                let folder = std::path::PathBuf::from(self.export_folder.trim());
                match JointExport::start(
                    project,
                    chosen,
                    model,
                    &j.analysis,
                    &comparisons,
                    constrained.as_ref(),
                    &folder,
                ) {
                    Ok(x) => {
                        self.export = Some(x);
                        self.export_outcome = None;
                    }
                    Err(e) => self.export_outcome = Some(Err(e)),
                }
            }
            if busy {
                ui.spinner();
                ui.ctx()
                    .request_repaint_after(std::time::Duration::from_millis(50));
            }
        });
        match &self.export_outcome {
            Some(Ok(m)) => {
                ui.label(m);
            }
            Some(Err(e)) => {
                ui.colored_label(ui.visuals().error_fg_color, e);
            }
            None => {}
        }
    }
}

/// The joint fit with the calorimetric values beside the fit of ln K alone, or why there
/// is none.
fn show_constrained(ui: &mut egui::Ui, j: &Joint, r: &Result<CalorimetricJointFit, GlobalError>) {
    match r {
        Ok(c) => crate::panels::calorimetric::constrained_table(
            ui,
            "joint_constrained",
            c,
            &j.analysis.fit,
            &j.analysis.labels,
            j.energy,
            j.temperature,
        ),
        Err(e) => {
            ui.colored_label(ui.visuals().error_fg_color, format!("Not fitted: {e}"));
        }
    }
}

/// The joint fit of the chosen series with `model` (the command line's rule, from
/// isochore-analysis).
fn run(chosen: &[&crate::doc::Entry], shared: &[String], model: Model) -> Result<Joint, String> {
    if chosen.len() < 2 {
        return Err("Tick two or more series to fit them together.".into());
    }
    if shared.is_empty() {
        return Err("Tick a parameter to share.".into());
    }
    let overrides = Overrides {
        model: Some(model),
        ..Overrides::default()
    };
    let sets: Vec<PreparedSet> = chosen
        .iter()
        .map(|s| {
            PreparedSet::from_data_set(&s.data, s.name(), &overrides).map_err(|e| e.to_string())
        })
        .collect::<Result<_, _>>()?;
    let analysis = fit_joint(&sets, shared).map_err(|e| e.to_string())?;
    let energy = chosen[0].data.settings.energy_unit;
    let temperature = chosen[0].data.settings.temperature_unit;
    Ok(Joint {
        compensation: CompensationPlots::new(&analysis, energy, temperature),
        analysis,
        sets,
        energy,
        temperature,
    })
}

/// Draws the joint fit; returns what the compensation plots drew, if shown.
fn show_joint(ui: &mut egui::Ui, j: &Joint) -> Option<DrawnCompensation> {
    let a = &j.analysis;
    let fit = &a.fit;
    let (e, tu) = (j.energy, j.temperature);
    match &a.equality {
        Some(t) => {
            ui.label(RichText::new("Test of equality").strong());
            ui.label(t.verdict());
        }
        None => {
            ui.label("No test of equality: see the warnings.");
        }
    }
    ui.columns(2, |cols| {
        cols[0].label(
            names::INVERSE_T_AXIS.to_string() + " — ln K, each series with its joint-fit line",
        );
        Plot::new("joint_vh")
            .height(260.0)
            .x_axis_label(names::INVERSE_T_AXIS)
            .y_axis_label("ln K")
            .show(&mut cols[0], |pu| {
                for s in 0..fit.n_series() {
                    let color = style::series_color(s);
                    let pts: Vec<[f64; 2]> = fit
                        .points(s)
                        .unwrap_or(&[])
                        .iter()
                        .map(|p| [1000.0 / p.t_k, p.ln_k])
                        .collect();
                    pu.points(
                        Points::new(a.labels[s].clone(), PlotPoints::new(pts))
                            .shape(style::series_shape(s))
                            .color(color)
                            .filled(true)
                            .radius(4.0),
                    );
                    if let Some((lo, hi)) = fit.t_range_k(s) {
                        let line: Vec<[f64; 2]> = (0..=60)
                            .filter_map(|i| {
                                let x = 1000.0 / hi + (1000.0 / lo - 1000.0 / hi) * i as f64 / 60.0;
                                fit.ln_k_at(s, 1000.0 / x).map(|v| [x, v.value])
                            })
                            .collect();
                        pu.line(
                            Line::new(
                                format!("{} — joint fit", a.labels[s]),
                                PlotPoints::new(line),
                            )
                            .color(color),
                        );
                    }
                }
            });
        cols[1].label(format!(
            "residual ln K − fit by series against {}",
            names::t_axis(tu)
        ));
        Plot::new("joint_residuals")
            .height(260.0)
            .x_axis_label(names::t_axis(tu))
            .y_axis_label("ln K − fit")
            .show(&mut cols[1], |pu| {
                for s in 0..fit.n_series() {
                    let pts: Vec<[f64; 2]> = fit
                        .points(s)
                        .unwrap_or(&[])
                        .iter()
                        .map(|p| [tu.from_kelvin(p.t_k), p.residual])
                        .collect();
                    pu.points(
                        Points::new(format!("{} — residuals", a.labels[s]), PlotPoints::new(pts))
                            .shape(style::series_shape(s))
                            .color(style::series_color(s))
                            .filled(true)
                            .radius(4.0),
                    );
                }
            });
    });
    ui.label(RichText::new("Shared").strong());
    egui::Grid::new("joint_shared")
        .striped(true)
        .show(ui, |ui| {
            for r in pj::shared_rows(fit, e, tu) {
                ui.label(&r.quantity);
                ui.label(r.value_with_unit());
                ui.label(format!("SE {}", r.se_short()));
                ui.label(r.interval_short());
                ui.end_row();
            }
        });
    ui.label(RichText::new("Each series (joint fit)").strong());
    egui::Grid::new("joint_series")
        .striped(true)
        .show(ui, |ui| {
            for (s, label) in a.labels.iter().enumerate() {
                for r in pj::series_rows(fit, s, e, tu) {
                    ui.label(label);
                    ui.label(&r.quantity);
                    ui.label(r.value_with_unit());
                    ui.label(format!("SE {}", r.se_short()));
                    ui.label(r.interval_short());
                    ui.end_row();
                }
            }
        });
    let diffs = pj::difference_rows(fit, &a.labels, e, tu);
    if !diffs.is_empty() {
        ui.label(RichText::new("Differences between series (joint covariance)").strong());
        egui::Grid::new("joint_diffs").striped(true).show(ui, |ui| {
            for (pair, r) in diffs {
                ui.label(&r.quantity);
                ui.label(pair);
                ui.label(r.value_with_unit());
                ui.label(format!("SE {}", r.se_short()));
                ui.label(r.interval_short());
                ui.end_row();
            }
        });
    }
    if let Some(t) = &a.equality {
        egui::Grid::new("joint_equality")
            .striped(true)
            .show(ui, |ui| {
                for h in pj::EQUALITY_COLUMNS {
                    ui.label(RichText::new(h).strong());
                }
                ui.end_row();
                for row in pj::equality_side_by_side(t) {
                    for c in row {
                        ui.label(c);
                    }
                    ui.end_row();
                }
            });
    }
    if let Some(c) = &a.compensation {
        ui.label(RichText::new("Enthalpy–entropy compensation").strong());
        if let Some(b) = &c.beta {
            ui.label(&b.verdict);
        }
        if let Some(x) = &c.exner {
            ui.label(&x.verdict);
        }
    }
    let drawn = j.compensation.as_ref().map(|p| p.show(ui));
    if !a.warnings.is_empty() {
        ui.label(RichText::new("Warnings").strong());
        for w in &a.warnings {
            ui.label(w);
        }
    }
    drawn
}
