//! The left panel: the list of series ([`crate::panels::series_list`]) and the active
//! series' settings — model, θ, confidence level, weighting,
//! σ convention, units for results, the thermometer uncertainty σ(T), flag thresholds and
//! the interval method (delta method, Monte Carlo, bootstrap; draws; generator start value,
//! [`crate::panels::intervals`]). Every change is one undoable
//! command.

use crate::app::Cx;
use crate::command::Command;
use crate::panels::style;
use isochore_fit::{EnergyUnit, Model, SigmaConvention, TemperatureUnit, Weighting};
use isochore_report::present::names;

/// Text being typed into a numeric setting, committed on Enter or when focus leaves.
#[derive(Debug, Default)]
pub struct SettingsPanel {
    buffers: std::collections::HashMap<&'static str, String>,
    /// The last typing error, in words.
    pub error: Option<String>,
    /// The list of series above the settings.
    pub list: crate::panels::series_list::SeriesList,
    /// The interval method, draws and generator start value being typed.
    pub intervals: crate::panels::intervals::IntervalFields,
}

impl SettingsPanel {
    /// Draws the panel.
    pub fn ui(&mut self, ui: &mut egui::Ui, cx: &mut Cx<'_>) {
        ui.heading("Series");
        self.list.ui(ui, cx);
        let Some(s) = cx.series() else {
            return;
        };
        let id = s.id;
        let cur = s.data.settings;
        let mut new = cur;
        ui.separator();
        ui.heading("Settings");
        ui.label(egui::RichText::new(s.name()).italics());
        egui::Grid::new("settings_grid")
            .num_columns(2)
            .spacing([8.0, 6.0])
            .show(ui, |ui| {
                ui.label("Model");
                let combo = egui::ComboBox::from_id_salt("model")
                    .selected_text(model_name(cur.fit.model))
                    .show_ui(ui, |ui| {
                        for &m in Model::all() {
                            ui.selectable_value(&mut new.fit.model, m, model_name(m))
                                .on_hover_text(m.describe());
                        }
                    });
                combo.response.widget_info(|| {
                    egui::WidgetInfo::labeled(egui::Role::ComboBox, true, "model")
                });
                ui.end_row();

                ui.label("θ (ΔCp° model)").on_hover_text(
                    "Reference temperature at which ΔH° and ΔS° are quoted in the ΔCp° model",
                );
                let theta = cur.temperature_unit.from_kelvin(cur.fit.t_ref_k);
                if let Some(v) = self.number(ui, "theta", "θ", theta, 2, cur.temperature_unit.symbol()) {
                    new.fit.t_ref_k = cur.temperature_unit.to_kelvin(v);
                }
                ui.end_row();

                ui.label("Confidence level");
                if let Some(v) = self.number(ui, "level", "confidence level", cur.fit.level * 100.0, 1, "%") {
                    new.fit.level = v / 100.0;
                }
                ui.end_row();

                ui.label("Weighting");
                let combo = egui::ComboBox::from_id_salt("weighting")
                    .selected_text(weighting_name(cur.fit.weighting))
                    .show_ui(ui, |ui| {
                        for w in [Weighting::InverseVariance, Weighting::Unweighted] {
                            ui.selectable_value(&mut new.fit.weighting, w, weighting_name(w));
                        }
                    });
                combo.response.widget_info(|| {
                    egui::WidgetInfo::labeled(egui::Role::ComboBox, true, names::WEIGHTING)
                });
                ui.end_row();

                ui.label("Extreme temperatures").on_hover_text(
                    "Temperatures (and θ) below 1 K or above 10 000 K are refused as a likely typing or unit mistake unless confirmed here",
                );
                ui.checkbox(
                    &mut new.fit.allow_extreme_temperatures,
                    "accept below 1 K or above 10 000 K",
                );
                ui.end_row();

                ui.label("σ convention").on_hover_text(format!(
                    "{}: {}. {}: {}.",
                    names::sigma_convention(SigmaConvention::ScaledByFit),
                    names::sigma_convention_effect(SigmaConvention::ScaledByFit),
                    names::sigma_convention(SigmaConvention::Absolute),
                    names::sigma_convention_effect(SigmaConvention::Absolute),
                ));
                let combo = egui::ComboBox::from_id_salt("convention")
                    .selected_text(convention_name(cur.fit.convention))
                    .show_ui(ui, |ui| {
                        for c in SigmaConvention::ALL {
                            ui.selectable_value(&mut new.fit.convention, c, convention_name(c));
                        }
                    });
                combo.response.widget_info(|| {
                    egui::WidgetInfo::labeled(egui::Role::ComboBox, true, names::SIGMA_CONVENTION)
                });
                ui.end_row();

                ui.label("Energy unit");
                let combo = egui::ComboBox::from_id_salt("energy")
                    .selected_text(cur.energy_unit.symbol())
                    .show_ui(ui, |ui| {
                        for e in [EnergyUnit::KilojoulePerMole, EnergyUnit::KilocaloriePerMole] {
                            ui.selectable_value(&mut new.energy_unit, e, e.symbol());
                        }
                    });
                combo.response.widget_info(|| {
                    egui::WidgetInfo::labeled(egui::Role::ComboBox, true, "energy unit")
                });
                ui.end_row();

                ui.label("Temperatures in");
                let combo = egui::ComboBox::from_id_salt("tunit")
                    .selected_text(cur.temperature_unit.symbol())
                    .show_ui(ui, |ui| {
                        for t in [TemperatureUnit::Celsius, TemperatureUnit::Kelvin] {
                            ui.selectable_value(&mut new.temperature_unit, t, t.symbol());
                        }
                    });
                combo.response.widget_info(|| {
                    egui::WidgetInfo::labeled(egui::Role::ComboBox, true, "temperature unit")
                });
                ui.end_row();

                ui.label(capitalised(names::THERMOMETER_UNCERTAINTY)).on_hover_text(format!(
                    "{} of every temperature, in K (0.1 °C is 0.1 K); empty: errors in K only. With it the fit allows for errors in T as well as in K ({} for the linear model, {} for the others)",
                    names::SIGMA_T,
                    names::errors_in_t_method(isochore_fit::errors_in_t::ErrorsInTMethod::York),
                    names::errors_in_t_method(
                        isochore_fit::errors_in_t::ErrorsInTMethod::OrthogonalDistance
                    ),
                ));
                if let Some(v) = self.optional_number(
                    ui,
                    "sigma_t",
                    names::THERMOMETER_UNCERTAINTY,
                    cur.thermometer_uncertainty_k,
                    "K",
                ) {
                    new.thermometer_uncertainty_k = v;
                }
                ui.end_row();
            });
        ui.add_space(6.0);
        ui.label(egui::RichText::new("Flag a point when").strong());
        egui::Grid::new("threshold_grid")
            .num_columns(2)
            .spacing([8.0, 6.0])
            .show(ui, |ui| {
                let t = cur.fit.thresholds;
                ui.label(format!("|{}| >", names::STUDENTIZED_SHORT));
                if let Some(v) = self.number(
                    ui,
                    "t_out",
                    &format!("{} threshold", names::STUDENTIZED_SHORT),
                    t.outlier_studentized,
                    2,
                    "",
                ) {
                    new.fit.thresholds.outlier_studentized = v;
                }
                ui.end_row();
                ui.label("leverage > factor × p/n");
                if let Some(v) =
                    self.number(ui, "t_lev", "leverage factor", t.leverage_factor, 2, "")
                {
                    new.fit.thresholds.leverage_factor = v;
                }
                ui.end_row();
                ui.label("Cook's D > factor / n");
                if let Some(v) = self.number(ui, "t_cook", "Cook's D factor", t.cooks_factor, 2, "")
                {
                    new.fit.thresholds.cooks_factor = v;
                }
                ui.end_row();
            });
        ui.add_space(6.0);
        ui.label(egui::RichText::new("Intervals").strong());
        egui::Grid::new("intervals_grid")
            .num_columns(2)
            .spacing([8.0, 6.0])
            .show(ui, |ui| {
                self.intervals
                    .rows(ui, cur.intervals, &mut new.intervals, &mut self.error);
            });
        if let Some(e) = &self.error {
            ui.colored_label(style::flag_color(cx.dark), e);
        }
        let only_intervals = {
            let mut c = cur;
            c.intervals = new.intervals;
            c == new
        };
        if new != cur && only_intervals {
            // Only the interval setting changed: no refit.
            self.error = None;
            cx.out.push(Command::SetIntervals {
                series: id,
                request: new.intervals,
            });
        } else if new != cur {
            if let Err(e) = new.fit.validate() {
                self.error = Some(e.to_string());
            } else {
                self.error = None;
                cx.out.push(Command::SetSettings {
                    series: id,
                    settings: new,
                });
            }
        }
    }

    /// A number field (named `label` in the accessibility tree) that returns a value when
    /// the typing is committed.
    fn number(
        &mut self,
        ui: &mut egui::Ui,
        key: &'static str,
        label: &str,
        current: f64,
        decimals: usize,
        unit: &str,
    ) -> Option<f64> {
        let mut result = None;
        ui.horizontal(|ui| {
            let shown = style::fixed(current, decimals);
            let buf = self.buffers.entry(key).or_insert_with(|| shown.clone());
            let resp = ui.add(egui::TextEdit::singleline(buf).desired_width(70.0));
            // Named for screen readers and tests; the grid's label cell is not linked to it.
            resp.widget_info(|| egui::WidgetInfo::labeled(egui::Role::TextInput, true, label));
            if resp.lost_focus() {
                match buf.trim().replace(',', ".").parse::<f64>() {
                    Ok(v) if v.is_finite() => {
                        if (v - current).abs() > 1e-12 * current.abs().max(1.0) {
                            result = Some(v);
                        }
                    }
                    _ => {
                        self.error = Some(format!("'{}' is not a number", buf.trim()));
                        *buf = shown.clone();
                    }
                }
            } else if !resp.has_focus() {
                *buf = shown;
            }
            if !unit.is_empty() {
                ui.label(unit);
            }
        });
        result
    }
}

impl SettingsPanel {
    /// A number field that may be empty (named `label` in the accessibility tree): returns
    /// `Some(None)` when emptied, `Some(Some(v))` when a positive number is committed, and
    /// refuses zero, negative and non-numbers in words.
    fn optional_number(
        &mut self,
        ui: &mut egui::Ui,
        key: &'static str,
        label: &str,
        current: Option<f64>,
        unit: &str,
    ) -> Option<Option<f64>> {
        let mut result = None;
        ui.horizontal(|ui| {
            let shown = current.map(|v| style::fixed(v, 3)).unwrap_or_default();
            let buf = self.buffers.entry(key).or_insert_with(|| shown.clone());
            let resp = ui.add(egui::TextEdit::singleline(buf).desired_width(70.0));
            resp.widget_info(|| egui::WidgetInfo::labeled(egui::Role::TextInput, true, label));
            if resp.lost_focus() {
                let text = buf.trim().replace(',', ".");
                match text.parse::<f64>() {
                    _ if text.is_empty() => {
                        if current.is_some() {
                            result = Some(None);
                        }
                    }
                    Ok(v) if v.is_finite() && v > 0.0 => {
                        if current != Some(v) {
                            result = Some(Some(v));
                        }
                    }
                    _ => {
                        self.error = Some(format!(
                            "{label}: '{}' is not a positive number of kelvin (leave it empty for errors in K only)",
                            buf.trim()
                        ));
                        *buf = shown.clone();
                    }
                }
            } else if !resp.has_focus() {
                *buf = shown;
            }
            ui.label(unit);
        });
        result
    }
}

/// "Thermometer uncertainty" from "thermometer uncertainty": a label at the start of a row.
fn capitalised(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(f) => f.to_uppercase().collect::<String>() + c.as_str(),
        None => String::new(),
    }
}

/// The model's name in the chooser: the presentation module's label ("ΔCp° model"); its
/// description is the hover text.
pub fn model_name(m: Model) -> String {
    isochore_report::present::model_label(m)
}

fn weighting_name(w: Weighting) -> &'static str {
    names::weighting(w == Weighting::InverseVariance)
}

fn convention_name(c: SigmaConvention) -> &'static str {
    names::sigma_convention(c)
}
