//! The results of the active series as isochore-fit gives them: ΔH°, ΔS°, ΔG°(θ) and ΔCp°
//! with standard error and confidence interval in the chosen units, the temperature where
//! ΔH° = 0 (ΔCp° models) with Fieller's interval and its words, the ΔH°–ΔS°
//! correlation with its joint confidence ellipse, fit statistics, the linear-vs-ΔCp°
//! comparison in words, and every warning beside the numbers it qualifies.

use crate::app::Cx;
use crate::command::Command;
use crate::fitting::Remedy;
use crate::panels::{settings::model_name, style};
use egui::RichText;
use egui_plot::{Line, Plot, PlotPoints, Points};
use isochore_fit::{VantHoffFit, WarningKind, Weighting};
use isochore_report::present::{self, names};

/// The results panel.
#[derive(Debug, Default)]
pub struct ResultsPanel {
    /// The intervals by Monte Carlo or the bootstrap, below the table (nothing for the
    /// delta method).
    pub intervals: crate::panels::intervals::IntervalsPanel,
}

impl ResultsPanel {
    /// Draws the results of the active series.
    pub fn ui(&mut self, ui: &mut egui::Ui, cx: &mut Cx<'_>) {
        ui.heading("Results");
        let Some(s) = cx.series() else {
            ui.label("No series.");
            return;
        };
        let Some(a) = cx.fitter.get(s.id) else {
            return;
        };
        let comparison_pending = cx.fitter.comparison_pending(s.id);
        let flag = style::flag_color(cx.dark);
        let fit = match &a.fit {
            Ok(f) => f,
            Err(e) => {
                ui.colored_label(flag, format!("No fit: {e}"));
                let (id, mut settings) = (s.id, s.data.settings);
                let mut apply = false;
                match a.remedy {
                    Some(Remedy::FitUnweighted) => {
                        ui.label(
                            "Fitting unweighted gives every point the same weight and ignores \
                             every σ; the intervals then come from the scatter.",
                        );
                        if ui.button("Fit unweighted").clicked() {
                            settings.fit.weighting = Weighting::Unweighted;
                            apply = true;
                        }
                    }
                    Some(Remedy::ConfirmExtremeTemperatures) => {
                        ui.label(
                            "A temperature below 1 K or above 10 000 K (or such a θ) is nearly \
                             always a typing or unit mistake. Confirm only when the data \
                             really lie there; the setting is kept with the series.",
                        );
                        if ui
                            .button("Confirm temperatures outside 1–10 000 K")
                            .clicked()
                        {
                            settings.fit.allow_extreme_temperatures = true;
                            apply = true;
                        }
                    }
                    // Settled elsewhere: the decimal mark in the import preview, bad rows
                    // by editing them in the table.
                    Some(Remedy::StateDecimalMark | Remedy::SkipBadRows) | None => {}
                }
                if apply {
                    cx.out.push(Command::SetSettings {
                        series: id,
                        settings,
                    });
                }
                return;
            }
        };
        if a.rev != s.rev {
            ui.horizontal(|ui| {
                ui.spinner();
                ui.label("refitting — numbers below are from before the last change");
            });
        }
        let energy_unit = s.data.settings.energy_unit;
        let (eu, su) = (
            present::energy(energy_unit),
            present::per_kelvin(energy_unit),
        );
        let tu = s.data.settings.temperature_unit;
        let level = present::level_percent(fit);
        ui.label(format!("{} · {}", s.name(), model_name(fit.model())))
            .on_hover_text(fit.model().describe());
        let warn = |k: WarningKind| fit.warnings().iter().any(|w| w.kind == k);
        let corr_warn = warn(WarningKind::StrongCorrelation);
        egui::Grid::new("results_grid")
            .num_columns(4)
            .striped(true)
            .spacing([10.0, 4.0])
            .show(ui, |ui| {
                ui.strong("");
                ui.strong("value");
                ui.strong("SE");
                // Which method made the intervals of this table, under the header.
                ui.vertical(|ui| {
                    ui.strong(format!("{level} % CI"));
                    ui.label(
                        RichText::new(names::interval_method(
                            isochore_fit::intervals::IntervalMethod::Delta,
                        ))
                        .small(),
                    );
                });
                ui.end_row();
                // Every parameter of the model, then ΔG° at θ and at T_hm; "at θ = …" on a
                // second line, so the names of the table keep the panel narrow.
                for r in present::parameter_rows(fit, energy_unit, tu) {
                    let shown = r.quantity.replacen(" at ", "\nat ", 1);
                    let label = ui.label(RichText::new(shown).strong());
                    if corr_warn && r.is_enthalpy_or_entropy() {
                        label.on_hover_text(
                            "strongly correlated with the other parameter: see below",
                        );
                    }
                    let value = r.value_with_unit();
                    let v = ui.label(RichText::new(value.clone()).monospace());
                    v.widget_info(|| {
                        egui::WidgetInfo::labeled(
                            egui::Role::Label,
                            true,
                            format!("{} = {value}", r.quantity),
                        )
                    });
                    ui.label(RichText::new(r.se_short()).monospace());
                    ui.label(RichText::new(r.interval_short()).monospace());
                    ui.end_row();
                }
                // The constant in the file's own quantity (K_d in nM, pKa, K) at θ and T_hm;
                // no SE: its interval is not symmetric.
                let kind = s.data.mapping.quantity.kind;
                let header = s
                    .data
                    .headers
                    .get(s.data.mapping.quantity.column)
                    .map_or("", String::as_str);
                let symbol = present::quantity::quantity_symbol(kind, header);
                let unit = present::quantity::quantity_unit(kind);
                let w = |x: f64| {
                    present::quantity::write_quantity_with(kind, x, present::Exponent::Caret)
                };
                for (name, v, lo, hi) in present::quantity::constant_values(fit, kind, &symbol, tu)
                {
                    ui.label(RichText::new(name.replacen(" at ", "\nat ", 1)).strong());
                    let value = format!("{} {unit}", w(v)).trim_end().to_string();
                    let l = ui.label(RichText::new(value.clone()).monospace());
                    l.widget_info(|| {
                        egui::WidgetInfo::labeled(
                            egui::Role::Label,
                            true,
                            format!("{name} = {value}"),
                        )
                    });
                    ui.label("");
                    ui.label(RichText::new(format!("{} … {}", w(lo), w(hi))).monospace());
                    ui.end_row();
                }
                // ΔCp° models: the temperature where ΔH° changes sign, with Fieller's
                // interval (the method named under it); its words below the table.
                if let Some(r) = present::delta_h_zero_row(fit, tu) {
                    let shown = r.quantity.replace(", ", ",\n").replace("; ", ";\n");
                    ui.label(RichText::new(shown).strong());
                    let value = r.value_with_unit();
                    let v = ui.label(RichText::new(value.clone()).monospace());
                    v.widget_info(|| {
                        egui::WidgetInfo::labeled(
                            egui::Role::Label,
                            true,
                            format!("{} = {value}", r.quantity),
                        )
                    });
                    ui.label(RichText::new(r.se_short()).monospace());
                    ui.vertical(|ui| {
                        ui.label(RichText::new(r.interval_short()).monospace());
                        ui.label(
                            RichText::new(names::interval_method(
                                isochore_fit::intervals::IntervalMethod::Fieller,
                            ))
                            .small(),
                        );
                    });
                    ui.end_row();
                }
            });
        if let Some(words) = fit.delta_h_zero_words_in(|t| present::show_t(t, tu)) {
            ui.label(RichText::new(format!("{words}.")).small());
        }
        ui.label(
            RichText::new(format!(
                "{}; there ΔG° is {}: quote ΔH° with ΔG° at T_hm.",
                names::T_HM_MEANING,
                if fit.corr_h_g_harmonic().abs() < 1e-6 {
                    "uncorrelated with ΔH°"
                } else {
                    "far less correlated with ΔH° than ΔS° is (r below; zero only without ΔCp°)"
                }
            ))
            .small()
            .weak(),
        );
        self.intervals.ui(ui, cx);
        ui.add_space(6.0);
        ui.horizontal(|ui| {
            ui.label(format!(
                "corr(ΔH°, ΔS°) = {}",
                style::fixed(fit.corr_h_s(), 4)
            ));
            if corr_warn {
                ui.colored_label(flag, "⚠ strongly correlated");
            }
        });
        if let Some(ell) = &a.ellipse {
            let pts: Vec<[f64; 2]> = ell
                .iter()
                .map(|p| [eu.from_si(p[0]), su.from_si(p[1])])
                .collect();
            let centre = [
                eu.from_si(fit.delta_h().value),
                su.from_si(fit.delta_s().value),
            ];
            let labels = (
                names::quantity_axis("ΔH°", eu.symbol),
                names::quantity_axis("ΔS°", su.symbol),
            );
            region_plot(ui, "hs_ellipse", pts, centre, labels, &level);
        }
        if let Some(region) = &a.h_g_region {
            let t_hm = fit.t_harmonic_k();
            ui.add_space(4.0);
            ui.label(format!(
                "corr(ΔH°, ΔG° at T_hm) = {}",
                style::fixed(fit.corr_h_g_harmonic(), 4)
            ));
            let pts: Vec<[f64; 2]> = region
                .iter()
                .map(|p| [eu.from_si(p[0]), eu.from_si(p[1])])
                .collect();
            let centre = [
                eu.from_si(fit.delta_h_at(t_hm).value),
                eu.from_si(fit.delta_g(t_hm).value),
            ];
            let labels = (
                names::quantity_axis("ΔH°", eu.symbol),
                names::quantity_axis("ΔG° at T_hm", eu.symbol),
            );
            region_plot(ui, "hg_region", pts, centre, labels, &level);
        }
        if let Some(e) = &a.errors_in_t {
            errors_in_t_block(ui, e, energy_unit, flag);
        }
        ui.add_space(6.0);
        ui.collapsing("Fit statistics", |ui| stats_grid(ui, fit, tu));
        if let Some(c) = fit.comparison() {
            ui.add_space(4.0);
            ui.label(RichText::new("Which model?").strong());
            // Step by step (each step's verdict in its own words), then the answer.
            for step in &c.steps {
                ui.label(&step.verdict);
                ui.label(RichText::new(present::step_summary(step)).small());
            }
            if c.steps.iter().any(|s| s.delta_aicc.is_some()) {
                ui.label(RichText::new(names::DELTA_AICC_SIGN).small().weak());
            }
            ui.label(names::data_support(present::model_name(c.preferred)));
        } else if comparison_pending {
            ui.add_space(4.0);
            ui.label(RichText::new("Which model?").strong());
            ui.label("Being worked out: the estimates above are final, the comparison follows.");
        }
        if !fit.warnings().is_empty() {
            ui.add_space(4.0);
            ui.label(RichText::new("Warnings").strong());
            for w in fit.warnings() {
                ui.horizontal_wrapped(|ui| {
                    ui.colored_label(flag, "⚠");
                    // Temperatures in the display unit, as on the rest of the screen.
                    ui.label(present::units::warning_in_unit(w, fit, tu));
                });
            }
        }
    }
}

/// The fit with errors in T beside the fit in K only: which method made the numbers, each
/// parameter with its SE, and the comparison in isochore-fit's words.
fn errors_in_t_block(
    ui: &mut egui::Ui,
    e: &Result<isochore_fit::errors_in_t::ErrorsInTFit, String>,
    energy_unit: isochore_fit::EnergyUnit,
    flag: egui::Color32,
) {
    ui.add_space(6.0);
    let mut title = names::ERRORS_IN_T.to_string();
    if let Some(first) = title.get(..1) {
        title = first.to_uppercase() + &title[1..];
    }
    ui.label(RichText::new(title).strong());
    let f = match e {
        Ok(f) => f,
        Err(msg) => {
            ui.colored_label(flag, msg);
            return;
        }
    };
    ui.label(format!(
        "{} — numbers by {}",
        f.sigma_t().describe(),
        names::errors_in_t_method(f.method())
    ));
    egui::Grid::new("errors_in_t_grid")
        .num_columns(3)
        .spacing([10.0, 2.0])
        .show(ui, |ui| {
            for (p, k) in f.params().iter().zip(f.k_only().params()) {
                let u = present::unit_of(p.info.dimension, energy_unit);
                let (w, ko) = (u.estimate(p.estimate), u.estimate(k.estimate));
                ui.label(RichText::new(p.info.symbol).strong());
                ui.label(
                    RichText::new(format!(
                        "{} {}",
                        present::plus_minus(w.value, w.se),
                        u.symbol
                    ))
                    .monospace(),
                );
                ui.label(
                    RichText::new(format!(
                        "{}: {}",
                        names::K_ONLY,
                        present::plus_minus(ko.value, ko.se)
                    ))
                    .small(),
                );
                ui.end_row();
            }
        });
    ui.label(RichText::new(f.comparison()).small());
}

/// A joint confidence region (closed polygon, display units) with its centre: tall enough
/// for the y-axis label, as wide as the visible panel (the panel scrolls sideways, so the
/// plot must not take the scroll area's width), round steps on both axes (egui_plot's
/// decades left only "0").
fn region_plot(
    ui: &mut egui::Ui,
    id: &str,
    pts: Vec<[f64; 2]>,
    centre: [f64; 2],
    (x_label, y_label): (String, String),
    level: &str,
) {
    let visible = (ui.clip_rect().right() - ui.cursor().left() - 8.0).max(160.0);
    Plot::new(id)
        .height(190.0)
        .width(visible)
        .x_grid_spacer(egui_plot::uniform_grid_spacer(style::nice_steps))
        .y_grid_spacer(egui_plot::uniform_grid_spacer(style::nice_steps))
        .x_axis_label(x_label)
        .y_axis_label(y_label)
        .show_x(false)
        .show_y(false)
        .allow_scroll(false)
        .show(ui, |pu| {
            pu.line(
                Line::new(format!("{level} % joint region"), PlotPoints::new(pts))
                    .allow_hover(false),
            );
            pu.points(Points::new("estimate", PlotPoints::new(vec![centre])).radius(3.0));
        });
}

/// The fit statistics in the window's short form ([`present::compact_statistics_rows`]).
fn stats_grid(ui: &mut egui::Ui, fit: &VantHoffFit, tu: isochore_fit::TemperatureUnit) {
    egui::Grid::new("stats_grid")
        .num_columns(2)
        .striped(true)
        .show(ui, |ui| {
            for (k, v) in present::compact_statistics_rows(fit, tu) {
                ui.label(k);
                ui.label(RichText::new(v).monospace());
                ui.end_row();
            }
        });
}
