//! The results of the active series as isochore-fit gives them: ΔH°, ΔS°, ΔG°(θ) and ΔCp°
//! with standard error and confidence interval in the chosen units, the ΔH°–ΔS°
//! correlation with its joint confidence ellipse, fit statistics, the linear-vs-ΔCp°
//! comparison in words, and every warning beside the numbers it qualifies.

use crate::app::Cx;
use crate::command::Command;
use crate::fitting::Remedy;
use crate::panels::{settings::model_name, style};
use egui::RichText;
use egui_plot::{Line, Plot, PlotPoints, Points};
use isochore_fit::{EnergyUnit, Estimate, VantHoffFit, WarningKind, Weighting};

/// The results panel (no state of its own).
#[derive(Debug, Default)]
pub struct ResultsPanel;

/// Factor from J/mol to the chosen energy unit, and from J/(mol·K) to the matching
/// entropy unit (J/(mol·K) with kJ/mol, cal/(mol·K) with kcal/mol).
pub fn unit_factors(e: EnergyUnit) -> (f64, f64, &'static str, &'static str) {
    match e {
        EnergyUnit::KilocaloriePerMole => (
            1.0 / e.joules_per_mole(),
            1000.0 / e.joules_per_mole(),
            "kcal/mol",
            "cal/(mol·K)",
        ),
        EnergyUnit::JoulePerMole => (1.0, 1.0, "J/mol", "J/(mol·K)"),
        EnergyUnit::KilojoulePerMole => (1.0 / e.joules_per_mole(), 1.0, "kJ/mol", "J/(mol·K)"),
    }
}

/// "−48.2 ± 1.3" style text of an estimate in display units (for tests and the report line).
pub fn estimate_text(e: Estimate, factor: f64) -> String {
    let e = e.scaled(factor);
    format!("{} ± {}", style::sig(e.value, 4), style::sig(e.se, 2))
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
                    None => {}
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
        let (ef, sf, eu, su) = unit_factors(s.data.settings.energy_unit);
        let tu = s.data.settings.temperature_unit;
        let level = fit.options.level * 100.0;
        ui.label(format!("{} · {}", s.name(), model_name(fit.model())));
        let theta = fit.at_reference.t_k;
        let warn = |k: WarningKind| fit.warnings.iter().any(|w| w.kind == k);
        let corr_warn = warn(WarningKind::StrongCorrelation);
        egui::Grid::new("results_grid")
            .num_columns(4)
            .striped(true)
            .spacing([10.0, 4.0])
            .show(ui, |ui| {
                ui.strong("");
                ui.strong("value");
                ui.strong("SE");
                ui.strong(format!("{level:.0} % CI"));
                ui.end_row();
                let theta_txt =
                    format!("{} {}", style::fixed(tu.from_kelvin(theta), 2), tu.symbol());
                let row = |ui: &mut egui::Ui,
                           name: String,
                           e: Estimate,
                           f: f64,
                           unit: &str,
                           warn: bool| {
                    let e = e.scaled(f);
                    let label = ui.label(RichText::new(name.clone()).strong());
                    if warn {
                        label.on_hover_text(
                            "strongly correlated with the other parameter: see below",
                        );
                    }
                    let value = format!("{} {unit}", style::sig(e.value, 4));
                    let v = ui.label(RichText::new(value.clone()).monospace());
                    v.widget_info(|| {
                        egui::WidgetInfo::labeled(
                            egui::Role::Label,
                            true,
                            format!("{name} = {value}"),
                        )
                    });
                    ui.label(RichText::new(style::sig(e.se, 2)).monospace());
                    ui.label(
                        RichText::new(format!(
                            "{} … {}",
                            style::sig(e.ci_low, 4),
                            style::sig(e.ci_high, 4)
                        ))
                        .monospace(),
                    );
                    ui.end_row();
                };
                let suffix = if fit.model() == isochore_fit::Model::ConstantCp {
                    format!(" ({theta_txt})")
                } else {
                    String::new()
                };
                row(ui, format!("ΔH°{suffix}"), fit.delta_h(), ef, eu, corr_warn);
                row(ui, format!("ΔS°{suffix}"), fit.delta_s(), sf, su, corr_warn);
                row(
                    ui,
                    format!("ΔG° ({theta_txt})"),
                    fit.at_reference.delta_g,
                    ef,
                    eu,
                    false,
                );
                if let Some(cp) = fit.delta_cp() {
                    row(ui, "ΔCp°".into(), cp, sf, su, false);
                }
                let th = fit.t_harmonic_k;
                row(
                    ui,
                    format!(
                        "ΔG° ({} {})",
                        style::fixed(tu.from_kelvin(th), 1),
                        tu.symbol()
                    ),
                    fit.at_harmonic.delta_g,
                    ef,
                    eu,
                    false,
                );
            });
        ui.label(
            RichText::new(
                "The last ΔG° is at the weighted mean temperature of the data, where it is known best.",
            )
            .small()
            .weak(),
        );
        ui.add_space(6.0);
        ui.horizontal(|ui| {
            ui.label(format!(
                "corr(ΔH°, ΔS°) = {}",
                style::fixed(fit.corr_h_s, 4)
            ));
            if corr_warn {
                ui.colored_label(flag, "⚠ strongly correlated");
            }
        });
        if let Some(ell) = &a.ellipse {
            let pts: Vec<[f64; 2]> = ell.iter().map(|p| [p[0] * ef, p[1] * sf]).collect();
            let centre = [fit.delta_h().value * ef, fit.delta_s().value * sf];
            Plot::new("hs_ellipse")
                .height(140.0)
                .x_axis_label(format!("ΔH° / {eu}"))
                .y_axis_label(format!("ΔS° / {su}"))
                .show_x(false)
                .show_y(false)
                .allow_scroll(false)
                .show(ui, |pu| {
                    pu.line(
                        Line::new(format!("{level:.0} % joint region"), PlotPoints::new(pts))
                            .allow_hover(false),
                    );
                    pu.points(Points::new("estimate", PlotPoints::new(vec![centre])).radius(3.0));
                });
        }
        ui.add_space(6.0);
        ui.collapsing("Fit statistics", |ui| stats_grid(ui, fit, tu));
        if let Some(c) = &fit.comparison {
            ui.add_space(4.0);
            ui.label(RichText::new("Linear or with ΔCp°?").strong());
            ui.label(&c.verdict);
            ui.label(
                RichText::new(format!(
                    "F = {}, {}{}",
                    style::sig(c.f_statistic, 3),
                    isochore_fit::vant_hoff::format_p(c.f_p_value),
                    c.delta_aicc.map_or(String::new(), |d| format!(
                        ", ΔAICc = {}",
                        style::fixed(d, 2)
                    ))
                ))
                .small(),
            );
        }
        if !fit.warnings.is_empty() {
            ui.add_space(4.0);
            ui.label(RichText::new("Cautions").strong());
            for w in &fit.warnings {
                ui.horizontal_wrapped(|ui| {
                    ui.colored_label(flag, "⚠");
                    ui.label(&w.message);
                });
            }
        }
    }
}

fn stats_grid(ui: &mut egui::Ui, fit: &VantHoffFit, tu: isochore_fit::TemperatureUnit) {
    let st = &fit.stats;
    egui::Grid::new("stats_grid")
        .num_columns(2)
        .striped(true)
        .show(ui, |ui| {
            let mut kv = |k: &str, v: String| {
                ui.label(k);
                ui.label(RichText::new(v).monospace());
                ui.end_row();
            };
            kv(
                "points used / given",
                format!("{} / {}", fit.n_used, fit.n_total),
            );
            kv("degrees of freedom", fit.dof.to_string());
            kv(
                "weighting",
                if fit.weighted {
                    "1/σ²".into()
                } else {
                    "equal".into()
                },
            );
            kv("χ²", style::sig(st.chi2, 4));
            kv("reduced χ²", style::sig(st.reduced_chi2, 4));
            kv("residual SD", style::sig(st.residual_sd, 3));
            kv(
                "R² (adjusted)",
                format!(
                    "{} ({})",
                    style::fixed(st.r2, 5),
                    style::fixed(st.adj_r2, 5)
                ),
            );
            kv("AICc", st.aicc.map_or("—".into(), |a| style::fixed(a, 2)));
            kv("BIC", style::fixed(st.bic, 2));
            if let Some(p) = st.chi2_p_value {
                kv("χ² against stated σ", isochore_fit::vant_hoff::format_p(p));
            }
            kv(
                "range of T",
                format!(
                    "{} – {} {}",
                    style::fixed(tu.from_kelvin(fit.t_min_k), 1),
                    style::fixed(tu.from_kelvin(fit.t_max_k), 1),
                    tu.symbol()
                ),
            );
            if let Some(t1) = fit.t_at_k1 {
                kv(
                    "T where K = 1",
                    format!(
                        "{} {}",
                        style::fixed(tu.from_kelvin(t1.value), 1),
                        tu.symbol()
                    ),
                );
            }
        });
}
