//! The "fit together" view (issue 12): the project's series chosen by checkboxes, each
//! parameter of the model shared by all or fitted per series, and the joint fit of
//! isochore-analysis (`joint::fit_joint`, the command line's `--share`) drawn — every series
//! with the line the joint fit gives it on one van 't Hoff plot, the residuals by series,
//! the shared and per-series estimates, the differences between series and the test of
//! equality's verdict. A view: every number is the library's, every label `present`'s.

use crate::doc::Project;
use crate::panels::style;
use egui::RichText;
use egui_plot::{Line, Plot, PlotPoints, Points};
use isochore_analysis::joint::{fit_joint, JointAnalysis};
use isochore_analysis::{Overrides, PreparedSet};
use isochore_fit::{EnergyUnit, Model, TemperatureUnit};
use isochore_report::present::{joint as pj, names};

/// A joint fit with the display units of its first series.
struct Joint {
    analysis: JointAnalysis,
    energy: EnergyUnit,
    temperature: TemperatureUnit,
}

/// What the last joint fit was made from: each chosen series' id and revision, and the
/// shared keys.
type Key = (Vec<(u64, u64)>, Vec<String>);

/// The "fit together" window.
#[derive(Default)]
pub struct JointPanel {
    /// Whether the window is open.
    pub open: bool,
    /// The ids of the series ticked, in the project's order.
    pub chosen: Vec<u64>,
    /// The keys of the parameters ticked "shared".
    pub shared: Vec<String>,
    last: Option<(Key, Result<Joint, String>)>,
}

impl JointPanel {
    /// Opens the window with every series of `project` ticked and nothing shared yet
    /// (except ΔCp° where the first series' model has it).
    pub fn open_with_all(&mut self, project: &Project) {
        self.open = true;
        self.chosen = project.series.iter().map(|s| s.id).collect();
        if self.shared.is_empty() {
            if let Some(first) = project.series.first() {
                let model = first.options().model;
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

    /// Draws the window (when open) over the workbench.
    pub fn show(&mut self, ctx: &egui::Context, project: &Project) {
        if !self.open {
            return;
        }
        let mut open = true;
        egui::Window::new("Fit series together")
            .open(&mut open)
            .default_size([920.0, 760.0])
            .vscroll(true)
            .show(ctx, |ui| self.contents(ui, project));
        self.open = open;
    }

    fn contents(&mut self, ui: &mut egui::Ui, project: &Project) {
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
        let model: Model = chosen.first().map_or(Model::LINEAR, |s| s.options().model);
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
        );
        if self.last.as_ref().is_none_or(|(k, _)| *k != key) {
            let result = run(&chosen, &self.shared);
            self.last = Some((key, result));
        }
        match &self.last {
            Some((_, Err(e))) => {
                ui.colored_label(ui.visuals().error_fg_color, e);
            }
            Some((_, Ok(j))) => show_joint(ui, j),
            None => {}
        }
    }
}

/// The joint fit of the chosen series (the command line's rule, from isochore-analysis).
fn run(chosen: &[&crate::doc::Entry], shared: &[String]) -> Result<Joint, String> {
    if chosen.len() < 2 {
        return Err("Tick two or more series to fit them together.".into());
    }
    if shared.is_empty() {
        return Err("Tick a parameter to share.".into());
    }
    let sets: Vec<PreparedSet> = chosen
        .iter()
        .map(|s| {
            PreparedSet::from_data_set(&s.data, s.name(), &Overrides::default())
                .map_err(|e| e.to_string())
        })
        .collect::<Result<_, _>>()?;
    let analysis = fit_joint(&sets, shared).map_err(|e| e.to_string())?;
    Ok(Joint {
        analysis,
        energy: chosen[0].data.settings.energy_unit,
        temperature: chosen[0].data.settings.temperature_unit,
    })
}

fn show_joint(ui: &mut egui::Ui, j: &Joint) {
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
    if !a.warnings.is_empty() {
        ui.label(RichText::new("Warnings").strong());
        for w in &a.warnings {
            ui.label(w);
        }
    }
}
