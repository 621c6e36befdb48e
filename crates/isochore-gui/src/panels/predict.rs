//! The prediction tool: K, ln K and ΔG° at any temperature with confidence and prediction
//! intervals from the active fit; the temperature at which K reaches a target; and the
//! two-point van 't Hoff calculation from two (T, K) pairs. All numbers come from
//! isochore-fit; this panel only reads the typed inputs. Typed temperatures are in the
//! active series' unit; when that unit changes (the setting, or another series made
//! active), every typed temperature is converted so that it still means the same
//! temperature, as θ does.

use crate::app::Cx;
use crate::panels::style;
use egui::RichText;
use isochore_fit::two_point::{enthalpy_from_pairs, StatePoint};
use isochore_fit::TemperatureUnit;
use isochore_report::present;

/// What the chemist typed.
#[derive(Debug, Clone)]
pub struct PredictPanel {
    /// Temperature for the prediction, in the series' display unit.
    pub t_text: String,
    /// Target K.
    pub k_text: String,
    /// Two-point inputs: T₁, K₁, σ(ln K₁), T₂, K₂, σ(ln K₂) (temperatures in the display unit).
    pub two_point: [String; 6],
    /// The unit the typed temperatures are in (the active series' unit when last drawn).
    pub t_unit: Option<TemperatureUnit>,
    /// The two-point uncertainties are u(K), in the unit of K, rather than σ(ln K) (the
    /// command line takes either too: --u-k1 or --sigma-ln-k1).
    pub two_point_u_of_k: bool,
}

impl Default for PredictPanel {
    fn default() -> Self {
        PredictPanel {
            t_text: "37".into(),
            // Empty until the chemist asks: a fixed default such as K = 1 lands far outside
            // most data (e.g. above 1000 °C for a nanomolar binder) and reads as nonsense.
            k_text: String::new(),
            two_point: [
                "25".into(),
                "1.0e6".into(),
                "0.05".into(),
                "37".into(),
                "4.0e5".into(),
                "0.05".into(),
            ],
            t_unit: None,
            two_point_u_of_k: false,
        }
    }
}

/// The prediction's row in the quantity the file gave, when that is not K, ln K or ΔG°
/// (shown anyway): "K_d  159.5 nM (144.6 … 175.9)  115.2 … 220.7".
fn quantity_row(
    ui: &mut egui::Ui,
    data: &isochore_data::DataSet,
    p: &isochore_fit::derived::Prediction,
) {
    use isochore_fit::QuantityKind;
    use isochore_report::present::quantity;
    let kind = data.mapping.quantity.kind;
    if matches!(
        kind,
        QuantityKind::K | QuantityKind::LnK | QuantityKind::DeltaG(_)
    ) {
        return;
    }
    let header = data
        .headers
        .get(data.mapping.quantity.column)
        .map_or("", String::as_str);
    let unit = quantity::quantity_unit(kind);
    let sp = if unit.is_empty() { "" } else { " " };
    let w =
        |v: f64| quantity::write_quantity_with(kind, v, isochore_report::present::Exponent::Caret);
    let ln = &p.ln_k;
    let (v, lo, hi) = quantity::from_ln_k(kind, ln.value, (ln.ci.low, ln.ci.high), p.t_k);
    let (_, plo, phi) = quantity::from_ln_k(kind, ln.value, (ln.pi.low, ln.pi.high), p.t_k);
    ui.label(quantity::quantity_symbol(kind, header));
    ui.label(format!("{}{sp}{unit} ({} … {})", w(v), w(lo), w(hi)));
    ui.label(format!("{} … {}", w(plo), w(phi)));
    ui.end_row();
}

/// "temperature where K_d = 100.0 nM (K = 1.000 × 10⁷):" for a target K, when the file's
/// quantity is a K_d, pK or log K (it does not depend on the temperature).
fn target_in_quantity(data: &isochore_data::DataSet, k: f64) -> Option<String> {
    use isochore_fit::QuantityKind;
    use isochore_report::present::{quantity, times_ten_with, Exponent};
    let kind = data.mapping.quantity.kind;
    if matches!(
        kind,
        QuantityKind::K | QuantityKind::LnK | QuantityKind::DeltaG(_)
    ) || !(k.is_finite() && k > 0.0)
    {
        return None;
    }
    let header = data
        .headers
        .get(data.mapping.quantity.column)
        .map_or("", String::as_str);
    let unit = quantity::quantity_unit(kind);
    // K_d, pK and log K do not depend on T; the temperature passed is not used.
    let value =
        quantity::write_quantity_with(kind, kind.from_ln_k(k.ln(), 298.15), Exponent::Caret);
    Some(format!(
        "temperature where {} = {value}{}{unit} (K = {}):",
        quantity::quantity_symbol(kind, header),
        if unit.is_empty() { "" } else { " " },
        times_ten_with(k, 4, Exponent::Caret)
    ))
}

/// One row of the prediction grid: the value with its confidence interval, then the
/// prediction interval, the bounds written by `fmt`.
fn interval_row(
    ui: &mut egui::Ui,
    name: &str,
    v: &isochore_fit::derived::ValuePrediction,
    value: String,
    fmt: &dyn Fn(f64) -> String,
) {
    ui.label(name);
    ui.label(format!("{value} ({} … {})", fmt(v.ci.low), fmt(v.ci.high)));
    ui.label(format!("{} … {}", fmt(v.pi.low), fmt(v.pi.high)));
    ui.end_row();
}

fn num(s: &str) -> Result<f64, String> {
    match s.trim().replace(',', ".").parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        _ => Err(format!("'{}' is not a number", s.trim())),
    }
}

impl PredictPanel {
    /// Converts every typed temperature (the prediction's T, the two pairs' T) from the
    /// unit it was typed in to `unit`, so that it keeps its meaning; a field that does not
    /// hold a number is left as typed.
    pub fn follow_unit(&mut self, unit: TemperatureUnit) {
        let Some(old) = self.t_unit.replace(unit) else {
            return;
        };
        if old == unit {
            return;
        }
        let [t1, _, _, t2, _, _] = &mut self.two_point;
        for text in [&mut self.t_text, t1, t2] {
            if let Ok(v) = num(text) {
                *text = present::number::plain(unit.from_kelvin(old.to_kelvin(v)), 6);
            }
        }
    }

    /// Draws the tool.
    pub fn ui(&mut self, ui: &mut egui::Ui, cx: &mut Cx<'_>) {
        ui.heading("Predict");
        let flag = style::flag_color(cx.dark);
        let Some(s) = cx.series() else {
            return;
        };
        let tu = s.data.settings.temperature_unit;
        self.follow_unit(tu);
        let eu = present::energy(s.data.settings.energy_unit);
        let a = cx.fitter.get(s.id);
        let fit = a.as_ref().and_then(|a| a.fit.as_deref().ok());
        ui.horizontal(|ui| {
            let name = ui.label("at T =");
            ui.add(egui::TextEdit::singleline(&mut self.t_text).desired_width(60.0))
                .labelled_by(name.id);
            ui.label(tu.symbol());
        });
        if let Some(fit) = fit {
            match num(&self.t_text)
                .and_then(|t| fit.predict(tu.to_kelvin(t)).map_err(|e| e.to_string()))
            {
                Ok(p) => {
                    let lvl = present::level_percent(fit);
                    egui::Grid::new("prediction")
                        .num_columns(3)
                        .striped(true)
                        .show(ui, |ui| {
                            ui.strong("");
                            ui.strong(format!("value ({lvl} % CI)"));
                            ui.strong(format!("{lvl} % PI"));
                            ui.end_row();
                            // K as a chemist writes it: 3.121 × 10^6, not 3.121e6 (the
                            // window's font has no superscript minus).
                            let caret = isochore_report::present::Exponent::Caret;
                            let k3 = |x: f64| isochore_report::present::times_ten_with(x, 3, caret);
                            let fix3 = |x: f64| style::fixed(x, 3);
                            let k = isochore_report::present::times_ten_with(p.k.value, 4, caret);
                            interval_row(ui, "K", &p.k, k, &k3);
                            interval_row(ui, "ln K", &p.ln_k, fix3(p.ln_k.value), &fix3);
                            quantity_row(ui, &s.data, &p);
                            let g = eu.estimate(p.delta_g);
                            ui.label("ΔG°");
                            ui.label(format!(
                                "{} {} ({} … {})",
                                style::sig(g.value, 4),
                                eu.symbol,
                                style::sig(g.ci_low, 4),
                                style::sig(g.ci_high, 4)
                            ));
                            ui.label("");
                            ui.end_row();
                        });
                    // What made these intervals (issue 13: every interval names its method).
                    ui.label(
                        RichText::new(format!(
                            "CI and PI by the {}",
                            present::names::interval_method(
                                isochore_fit::intervals::IntervalMethod::Delta
                            )
                        ))
                        .small()
                        .weak(),
                    );
                    if let Some(w) = &p.warning {
                        ui.horizontal_wrapped(|ui| {
                            ui.colored_label(flag, "⚠");
                            ui.label(w);
                        });
                    }
                }
                Err(e) => {
                    ui.colored_label(flag, e);
                }
            }
            ui.add_space(4.0);
            ui.horizontal(|ui| {
                ui.label("T where K =");
                let r = ui.add(
                    egui::TextEdit::singleline(&mut self.k_text)
                        .hint_text("target K")
                        .desired_width(70.0),
                );
                r.widget_info(|| {
                    egui::WidgetInfo::labeled(egui::Role::TextInput, true, "target K")
                });
            });
            // Nothing is shown until a target is typed.
            let target = (!self.k_text.trim().is_empty()).then(|| {
                num(&self.k_text).and_then(|k| fit.temperature_for_k(k).map_err(|e| e.to_string()))
            });
            match target {
                None => {}
                Some(Ok(t)) => {
                    if fit.is_extrapolation(t.value) {
                        ui.horizontal_wrapped(|ui| {
                            ui.colored_label(flag, "⚠");
                            ui.label("far outside the measured temperatures: an extrapolation");
                        });
                    }
                    // The target also in the file's quantity ("temperature where K_d = 100.0 nM
                    // (K = 1.000 × 10⁷):"), when that is not K, ln K or ΔG°.
                    if let Some(words) = num(&self.k_text)
                        .ok()
                        .and_then(|k| target_in_quantity(&s.data, k))
                    {
                        ui.label(words);
                    }
                    ui.label(format!(
                        "T = {} (SE {} K, CI {} … {})",
                        present::show_t(t.value, tu),
                        style::sig(t.se, 2),
                        style::fixed(tu.from_kelvin(t.ci_low), 1),
                        present::show_t_with(t.ci_high, tu, 1),
                    ));
                    ui.label(
                        RichText::new(format!(
                            "CI by {}'s method",
                            present::names::interval_method(
                                isochore_fit::intervals::IntervalMethod::Fieller
                            )
                        ))
                        .small()
                        .weak(),
                    );
                }
                Some(Err(e)) => {
                    ui.colored_label(flag, e);
                }
            }
        } else {
            ui.label("No fit to predict from.");
        }
        ui.add_space(6.0);
        ui.collapsing("Two-point calculation", |ui| {
            ui.label(
                RichText::new(
                    "ΔH° and ΔS° from two (T, K) pairs, assuming ΔH° constant between them.",
                )
                .small(),
            );
            ui.horizontal(|ui| {
                ui.label("uncertainty given as");
                ui.radio_value(&mut self.two_point_u_of_k, false, "σ(ln K)");
                ui.radio_value(&mut self.two_point_u_of_k, true, "u(K)");
            });
            let u_of_k = self.two_point_u_of_k;
            let unc = move |v: f64| {
                if u_of_k {
                    isochore_analysis::KUncertainty::OfK(v)
                } else {
                    isochore_analysis::KUncertainty::OfLnK(v)
                }
            };
            let unc_symbol = unc(0.0).symbol();
            egui::Grid::new("two_point").num_columns(4).show(ui, |ui| {
                ui.label("");
                ui.label(isochore_report::present::names::t_axis(tu));
                ui.label("K");
                ui.label(unc_symbol);
                ui.end_row();
                for (k, name) in ["pair 1", "pair 2"].iter().enumerate() {
                    ui.label(*name);
                    for (j, column) in ["T", "K", unc_symbol].iter().enumerate() {
                        ui.add(
                            egui::TextEdit::singleline(&mut self.two_point[3 * k + j])
                                .desired_width(64.0),
                        )
                        .accessible_name(format!("{name} {column}"));
                    }
                    ui.end_row();
                }
            });
            let level = s.options().level;
            let parse = |k: usize| -> Result<StatePoint, String> {
                let value = num(&self.two_point[3 * k + 1])?;
                Ok(StatePoint {
                    t_k: tu.to_kelvin(num(&self.two_point[3 * k])?),
                    sigma_t_k: 0.0,
                    k: value,
                    sigma_ln_k: unc(num(&self.two_point[3 * k + 2])?).sigma_ln_k(value)?,
                })
            };
            let res = parse(0).and_then(|a| {
                let b = parse(1)?;
                enthalpy_from_pairs(a, b, level).map_err(|e| e.to_string())
            });
            match res {
                Ok(r) => {
                    let energy_unit = s.data.settings.energy_unit;
                    let (eu, su) = (
                        present::energy(energy_unit),
                        present::per_kelvin(energy_unit),
                    );
                    let h = eu.estimate(r.delta_h);
                    let sd = su.estimate(r.delta_s);
                    ui.label(format!(
                        "ΔH° = {} ± {} {}   ΔS° = {} ± {} {}",
                        style::sig(h.value, 4),
                        style::sig(h.se, 2),
                        eu.symbol,
                        style::sig(sd.value, 4),
                        style::sig(sd.se, 2),
                        su.symbol
                    ));
                }
                Err(e) => {
                    ui.colored_label(flag, e);
                }
            }
        });
    }
}
