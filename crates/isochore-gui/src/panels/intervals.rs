//! Intervals by Monte Carlo or the bootstrap in the window (issue 13 item 6): the setting
//! (which method, how many draws, the generator's start value: one undoable settings
//! change, drawn by the settings panel through [`IntervalFields`]) and, in the results
//! panel, the run of the active series ([`IntervalsPanel`]): a progress bar with Cancel
//! while it runs, then every quantity's interval with the method that made it beside the
//! delta method's, and histograms of the draws with the interval's ends marked. The numbers
//! come from [`crate::intervals_run`] (isochore-analysis and isochore-fit); the labels from
//! `present`.

use crate::actions::Action;
use crate::app::Cx;
use crate::intervals_run::{IntervalOutcome, RunState};
use crate::panels::style;
use egui::RichText;
use egui_plot::{Bar, BarChart, LineStyle, Plot, VLine};
use isochore_fit::intervals::{
    check_draws, BootstrapScheme, IntervalChoice, IntervalRequest, QuantityKind, Resampling,
};
use isochore_fit::{EnergyUnit, ParamDimension, TemperatureUnit};
use isochore_report::present::{self, intervals::interval_rows, names};

/// The choices of the interval setting, in the chooser's order.
pub const CHOICES: [IntervalChoice; 5] = [
    IntervalChoice::Delta,
    IntervalChoice::MonteCarlo,
    IntervalChoice::Bootstrap(BootstrapScheme::Residuals),
    IntervalChoice::Bootstrap(BootstrapScheme::Wild),
    IntervalChoice::Bootstrap(BootstrapScheme::Cases),
];

/// "Intervals by" from "intervals by": a label at the start of a row.
fn capitalised(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(f) => f.to_uppercase().collect::<String>() + c.as_str(),
        None => String::new(),
    }
}

/// Text being typed into the draws and start-value fields.
#[derive(Debug, Default)]
pub struct IntervalFields {
    draws: Option<String>,
    seed: Option<String>,
}

impl IntervalFields {
    /// The rows of the interval setting in a two-column grid: the method chooser, then the
    /// draws and the generator's start value (greyed out for the delta method). Writes a
    /// committed change into `new`; a refused entry goes to `error` in words.
    pub fn rows(
        &mut self,
        ui: &mut egui::Ui,
        cur: IntervalRequest,
        new: &mut IntervalRequest,
        error: &mut Option<String>,
    ) {
        ui.label(capitalised(names::INTERVALS_BY)).on_hover_text(
            "What makes the intervals of the results: the delta method (first order, the fit's own), \
             parametric Monte Carlo (GUM Supplement 1: the data drawn from their stated \
             uncertainties and refitted) or the bootstrap (new data sets made from the fit's own \
             residuals or points). Monte Carlo and the bootstrap run off the window's thread.",
        );
        let combo = egui::ComboBox::from_id_salt("interval_method")
            .selected_text(names::interval_choice(cur.choice))
            .width(150.0)
            .show_ui(ui, |ui| {
                for c in CHOICES {
                    ui.selectable_value(&mut new.choice, c, names::interval_choice(c));
                }
            });
        combo.response.widget_info(|| {
            egui::WidgetInfo::labeled(egui::Role::ComboBox, true, names::INTERVALS_BY)
        });
        ui.end_row();
        let resampling = cur.choice != IntervalChoice::Delta;
        ui.label(capitalised(names::DRAWS)).on_hover_text(format!(
            "Number of draws of Monte Carlo or the bootstrap, 1 to {}; 10 000 are usually plenty",
            isochore_fit::intervals::MAX_DRAWS
        ));
        if let Some(v) = integer(
            ui,
            &mut self.draws,
            names::DRAWS,
            cur.draws as u64,
            resampling,
            error,
        ) {
            match usize::try_from(v).map_err(|_| ()).and_then(|d| {
                check_draws(d).map_err(|e| *error = Some(e.to_string()))?;
                Ok(d)
            }) {
                Ok(d) => new.draws = d,
                Err(()) => {
                    if error.is_none() {
                        *error = Some(format!("{v} draws are too many"));
                    }
                }
            }
        }
        ui.end_row();
        ui.label(capitalised(names::SEED)).on_hover_text(
            "The generator's start value: the same value, draws and data give the same intervals, \
             here and on the command line (--seed); it is saved with the project",
        );
        if let Some(v) = integer(ui, &mut self.seed, names::SEED, cur.seed, resampling, error) {
            new.seed = v;
        }
        ui.end_row();
    }
}

/// A whole-number field named `label`, returning a committed value that differs from
/// `current`.
fn integer(
    ui: &mut egui::Ui,
    buf: &mut Option<String>,
    label: &str,
    current: u64,
    enabled: bool,
    error: &mut Option<String>,
) -> Option<u64> {
    let shown = current.to_string();
    let text = buf.get_or_insert_with(|| shown.clone());
    let resp = ui.add_enabled(
        enabled,
        egui::TextEdit::singleline(text).desired_width(110.0),
    );
    resp.widget_info(|| egui::WidgetInfo::labeled(egui::Role::TextInput, enabled, label));
    let mut out = None;
    if resp.lost_focus() {
        let typed: String = text.trim().chars().filter(|c| *c != ' ').collect();
        match typed.parse::<u64>() {
            Ok(v) if v != current => {
                *error = None;
                out = Some(v);
            }
            Ok(_) => {}
            Err(_) => {
                *error = Some(format!(
                    "{label}: '{}' is not a whole number of 0 or more",
                    text.trim()
                ));
                *text = shown;
            }
        }
    } else if !resp.has_focus() {
        *text = shown;
    }
    out
}

/// The block of the results panel for a resampling setting.
#[derive(Debug, Default)]
pub struct IntervalsPanel {
    /// The histograms drawn in the last frame: the quantity's label and its number of bars
    /// (for tests).
    pub drawn_histograms: Vec<(String, usize)>,
}

impl IntervalsPanel {
    /// Draws the run of the active series (nothing for the delta method).
    pub fn ui(&mut self, ui: &mut egui::Ui, cx: &mut Cx<'_>) {
        self.drawn_histograms.clear();
        let Some(s) = cx.series() else {
            return;
        };
        let Some((request, state)) = cx.intervals.state(s.id) else {
            return;
        };
        let (id, energy, tu) = (
            s.id,
            s.data.settings.energy_unit,
            s.data.settings.temperature_unit,
        );
        let current = cx.intervals.is_current(id, s.rev);
        let flag = style::flag_color(cx.dark);
        ui.separator();
        if !matches!(state, RunState::Done(_)) {
            ui.label(
                RichText::new(format!(
                    "Intervals by {}",
                    names::interval_choice(request.choice)
                ))
                .strong(),
            );
        }
        match state {
            RunState::Running(job) => {
                let (done, total) = job.progress();
                ui.horizontal(|ui| {
                    let bar = egui::ProgressBar::new(done as f32 / total.max(1) as f32)
                        .desired_width(200.0)
                        .text(format!("{done} of {total} {}", names::DRAWS));
                    ui.add(bar);
                    if ui.button("Cancel").clicked() {
                        cx.actions.push(Action::CancelIntervals(id));
                    }
                });
                ui.label(
                    RichText::new("Until it finishes, every interval above is the delta method's.")
                        .small()
                        .weak(),
                );
            }
            RunState::Cancelled => {
                ui.label("Cancelled: every interval above is the delta method's.");
                if ui.button("Run again").clicked() {
                    cx.actions.push(Action::RunIntervalsAgain(id));
                }
            }
            RunState::Failed(e) => {
                ui.colored_label(flag, format!("No intervals by resampling: {e}"));
            }
            RunState::Done(o) => {
                if !current {
                    ui.label(RichText::new("from before the last change").small().weak());
                }
                self.finished(ui, o, energy, tu, flag);
            }
        }
    }

    fn finished(
        &mut self,
        ui: &mut egui::Ui,
        o: &IntervalOutcome,
        energy: EnergyUnit,
        tu: TemperatureUnit,
        flag: egui::Color32,
    ) {
        let run = &o.run;
        let level = present::percent(run.level);
        let method = names::interval_choice(o.request.choice);
        ui.label(
            RichText::new(format!(
                "{level} % CI ({method}, {} {})",
                run.draws,
                names::DRAWS
            ))
            .strong(),
        );
        ui.label(
            RichText::new(present::intervals::method_line(run))
                .small()
                .weak(),
        );
        let rows = interval_rows(&o.fit, run, energy, tu);
        egui::Grid::new("resampled_grid")
            .num_columns(3)
            .striped(true)
            .spacing([8.0, 2.0])
            .show(ui, |ui| {
                ui.strong("");
                ui.strong("made by");
                ui.strong(format!("{level} % CI"));
                ui.end_row();
                // The unit under the quantity's name and the method before the interval, so
                // what made each interval stays in view in a narrow panel; the delta
                // method's (or Fieller's) below each, weaker.
                for r in &rows {
                    // Labels that never wrap: a grid cell is as narrow as the last frame's.
                    let plain =
                        |ui: &mut egui::Ui, t: RichText| ui.add(egui::Label::new(t).extend());
                    ui.vertical(|ui| {
                        plain(
                            ui,
                            RichText::new(r.quantity.replacen(" at ", "\nat ", 1)).strong(),
                        );
                        if !r.unit.is_empty() {
                            plain(ui, RichText::new(&r.unit).small().weak());
                        }
                    });
                    ui.vertical(|ui| {
                        plain(ui, RichText::new(r.method));
                        plain(ui, RichText::new(r.delta_method).weak());
                    });
                    ui.vertical(|ui| {
                        let l = plain(ui, RichText::new(&r.interval).monospace());
                        l.widget_info(|| {
                            egui::WidgetInfo::labeled(
                                egui::Role::Label,
                                true,
                                format!("{}: {} {} ({})", r.quantity, r.interval, r.unit, r.method),
                            )
                        });
                        plain(ui, RichText::new(&r.delta).monospace().weak());
                    });
                    ui.end_row();
                }
            });
        // Wrapped at the visible edge of the panel (which scrolls sideways).
        let visible = (ui.clip_rect().right() - ui.cursor().left() - 8.0).max(160.0);
        // Each quantity named as in the rows, not by its JSON key.
        for w in &present::intervals::run_warnings(&o.fit, run, tu) {
            ui.scope(|ui| {
                ui.set_max_width(visible);
                ui.horizontal_wrapped(|ui| {
                    ui.colored_label(flag, "⚠");
                    ui.label(RichText::new(w).small());
                });
            });
        }
        // The report's methods paragraph: what was drawn, how each interval is read, and the
        // caution about the bootstrap with few points (so open for the bootstrap).
        egui::CollapsingHeader::new("How these intervals were made")
            .default_open(matches!(run.resampling, Resampling::Bootstrap(_)))
            .show(ui, |ui| {
                // Inside the header's indent: the visible width from here.
                ui.set_max_width((ui.clip_rect().right() - ui.cursor().left() - 8.0).max(160.0));
                ui.label(
                    RichText::new(present::intervals::methods_paragraph(
                        &o.fit,
                        std::slice::from_ref(run),
                    ))
                    .small(),
                );
            });
        ui.add_space(4.0);
        let drawn = &mut self.drawn_histograms;
        egui::CollapsingHeader::new("Histograms of the draws")
            .default_open(true)
            .show(ui, |ui| {
                ui.label(
                    RichText::new("solid lines: the interval's ends; dashed: the estimate")
                        .small()
                        .weak(),
                );
                histograms(ui, o, &rows, energy, flag, drawn);
            });
    }
}

/// One histogram of draws per pictured quantity, in display units; records each in `drawn`.
fn histograms(
    ui: &mut egui::Ui,
    o: &IntervalOutcome,
    rows: &[present::intervals::IntervalRow],
    energy: EnergyUnit,
    flag: egui::Color32,
    drawn: &mut Vec<(String, usize)>,
) {
    let run = &o.run;
    for (k, h) in &o.histograms {
        let q = &run.quantities[*k];
        let Some(row) = rows.get(*k) else {
            continue;
        };
        let scale = si_per_unit(&o.fit, q.quantity.kind, energy);
        let best = q.best();
        // A compound unit in parentheses (present's rule); a plain one after a comma, since
        // "T where K = 1 / K" would read as a division.
        let axis = if row.unit.is_empty() {
            row.quantity.clone()
        } else if row.unit.contains(['/', '·']) {
            names::quantity_axis(&row.quantity, &row.unit)
        } else {
            format!("{}, in {}", row.quantity, row.unit)
        };
        let bars: Vec<Bar> = h
            .counts
            .iter()
            .enumerate()
            .map(|(i, &c)| Bar::new(h.centre(i) / scale, c as f64).width(h.width / scale))
            .collect();
        let n = bars.len();
        let visible = (ui.clip_rect().right() - ui.cursor().left() - 8.0).max(160.0);
        Plot::new(("draws_histogram", q.quantity.key.as_str()))
            .height(110.0)
            .width(visible)
            .x_axis_label(axis)
            .show_y(false)
            .show_x(false)
            .y_axis_min_width(24.0)
            .x_grid_spacer(egui_plot::uniform_grid_spacer(style::nice_steps))
            .allow_scroll(false)
            .allow_drag(false)
            .allow_zoom(false)
            .show(ui, |pu| {
                pu.bar_chart(
                    BarChart::new(row.quantity.clone(), bars).color(style::series_color(0)),
                );
                for (name, x) in [
                    ("interval low end", best.ci_low),
                    ("interval high end", best.ci_high),
                ] {
                    if x.is_finite() {
                        pu.vline(VLine::new(name, x / scale).color(flag).width(1.5));
                    }
                }
                pu.vline(
                    VLine::new("estimate", best.value / scale)
                        .style(LineStyle::dashed_loose())
                        .width(1.0),
                );
            });
        let outside = h.below + h.above;
        if outside > 0 || h.undefined > 0 {
            let mut note = Vec::new();
            if outside > 0 {
                note.push(format!(
                    "{outside} of {} draws lie beyond the range shown",
                    run.draws
                ));
            }
            if h.undefined > 0 {
                note.push(format!("{} had no value", h.undefined));
            }
            ui.label(RichText::new(note.join("; ")).small().weak());
        }
        drawn.push((row.quantity.clone(), n));
    }
}

/// SI units per display unit of a quantity of a run: energies and entropies in the chosen
/// energy unit (present's units), K and temperatures as they are.
fn si_per_unit(fit: &isochore_fit::VantHoffFit, kind: QuantityKind, e: EnergyUnit) -> f64 {
    let d = match kind {
        QuantityKind::Parameter { index } => Some(fit.params()[index].info.dimension),
        QuantityKind::DeltaG { .. } | QuantityKind::DeltaH { .. } => Some(ParamDimension::Energy),
        QuantityKind::DeltaS { .. } => Some(ParamDimension::Entropy),
        QuantityKind::K { .. }
        | QuantityKind::TemperatureForK { .. }
        | QuantityKind::TemperatureDeltaHZero => None,
    };
    d.map_or(1.0, |d| present::unit_of(d, e).si_per_unit)
}
