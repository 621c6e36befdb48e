//! The van 't Hoff plot: ln K against 10³/T with the temperature on a second axis, the
//! fit line, the shaded confidence band and dashed prediction band, used points filled,
//! excluded points hollow, flagged points ringed, one colour and marker shape per series.
//! Hovering shows the row and its diagnostics; clicking a point includes or excludes it
//! (the same command as the table's checkbox) and offers a field for the reason.
//! Series above [`DECIMATE_ABOVE`] points are drawn through the min/max envelope.

use crate::app::Cx;
use crate::command::Command;
use crate::doc::Entry;
use crate::fitting::Analysis;
use crate::panels::style;
use egui::{Color32, RichText};
use egui_plot::{
    AxisHints, Line, LineStyle, MarkerShape, Plot, PlotPoint, PlotPoints, PlotTransform, PlotUi,
    Points, Polygon, VPlacement,
};
use isochore_analysis::RowNumber;
use std::sync::Arc;

/// Series with more points than this are drawn decimated (min/max per pixel column).
pub const DECIMATE_ABOVE: usize = 4000;

/// Pointer distance in points within which a marker counts as hovered.
pub const PICK_RADIUS: f32 = 10.0;

/// A point just excluded from the plot, waiting for an optional reason.
#[derive(Debug, Clone)]
pub struct ReasonPrompt {
    /// Series id.
    pub series: u64,
    /// Row index.
    pub row: usize,
    /// Text typed so far.
    pub text: String,
}

/// The plot's own state.
#[derive(Debug, Default)]
pub struct PlotPanel {
    /// Plot-to-screen transform of the last frame (for picking, and for tests).
    pub transform: Option<PlotTransform>,
    /// The reason field offered after excluding a point.
    pub reason_prompt: Option<ReasonPrompt>,
    /// Markers drawn in the last frame (for the benchmark and the status line).
    pub drawn_markers: usize,
    /// How each series' markers were drawn in the last frame (for tests of the marker
    /// rules: one colour–shape pair per series, excluded points hollow).
    pub drawn_styles: Vec<DrawnMarks>,
}

/// How one series' markers were drawn in a frame.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DrawnMarks {
    /// Series id.
    pub series: u64,
    /// The series' colour.
    pub color: Color32,
    /// The series' marker shape.
    pub shape: MarkerShape,
    /// Used points drawn, filled.
    pub used_filled: usize,
    /// Excluded points drawn, hollow, in the same shape and colour.
    pub excluded_hollow: usize,
}

/// One drawable point: (series id, first row, point, x = 10³/T, y = ln K).
#[derive(Debug, Clone, Copy)]
struct Mark {
    series: u64,
    row: usize,
    point: usize,
    x: f64,
    y: f64,
}

impl PlotPanel {
    /// Where 0-based row `row` of a series sits on screen, from the last frame's
    /// transform and the latest analysis.
    pub fn screen_pos(&self, a: &Analysis, row: usize) -> Option<egui::Pos2> {
        let k = a.point_of_row.get(row).copied().flatten()?;
        let m = a.measurements.get(k)?;
        let t = self.transform.as_ref()?;
        Some(t.position_from_point(&PlotPoint::new(1e3 / m.t_k, m.ln_k)))
    }

    /// Draws the plot and the reason prompt.
    pub fn ui(&mut self, ui: &mut egui::Ui, cx: &mut Cx<'_>) {
        let active = cx.series();
        let t_unit = active.map_or(isochore_fit::TemperatureUnit::Celsius, |s| {
            s.data.settings.temperature_unit
        });
        let level = active.map_or(0.95, |s| s.options().level);
        let level_text = isochore_report::present::percent(level);
        ui.horizontal_wrapped(|ui| {
            ui.heading("Van 't Hoff plot");
            ui.label(
                RichText::new(format!(
                    "filled = used · hollow = excluded · ring = flagged · shaded = {level_text} % confidence band · dashed = {level_text} % prediction band · click a point to leave it out or take it back",
                ))
                .small()
                .weak(),
            );
        });
        let shown: Vec<(usize, &Entry, Arc<Analysis>)> = cx
            .project
            .series
            .iter()
            .enumerate()
            .filter(|(_, s)| s.data.shown || Some(s.id) == cx.active)
            .filter_map(|(i, s)| cx.fitter.get(s.id).map(|a| (i, s, a)))
            .collect();
        // The key: one marker and name per series drawn (a legend inside the plot would
        // cover points; the caption above says what fill, rings, shading and dashes mean).
        ui.horizontal_wrapped(|ui| {
            for (i, s, a) in &shown {
                let text = match &a.fit {
                    Ok(_) => s.name().to_string(),
                    Err(_) => format!("{} (no fit)", s.name()),
                };
                // Marker and name as one unbreakable piece: the line wraps between
                // entries, never between a marker and its name.
                ui.scope(|ui| {
                    ui.style_mut().wrap_mode = Some(egui::TextWrapMode::Extend);
                    ui.horizontal(|ui| {
                        style::marker_swatch(ui, *i);
                        ui.label(RichText::new(text).small());
                    });
                });
                ui.add_space(10.0);
            }
        });
        let mut extent: Option<[f64; 4]> = None;
        for (_, _, a) in &shown {
            if let Some(e) = a.extent {
                extent = Some(match extent {
                    None => e,
                    Some(x) => [
                        x[0].min(e[0]),
                        x[1].max(e[1]),
                        x[2].min(e[2]),
                        x[3].max(e[3]),
                    ],
                });
            }
        }
        let has_data = extent.is_some();
        let top_axis = AxisHints::new_x()
            .label(isochore_report::present::names::t_axis(t_unit))
            .placement(VPlacement::Top)
            .label_spacing(38.0..=54.0)
            // The grid's marks are round in 1000/T, not in T: the top axis keeps their
            // room but writes nothing; round temperatures are drawn after the plot.
            .formatter(|_, _| String::new());
        let bottom_axis = style::x_axis(isochore_report::present::names::INVERSE_T_AXIS);
        let mut plot = Plot::new("vant_hoff_plot")
            .custom_x_axes(vec![bottom_axis, top_axis])
            .custom_y_axes(vec![style::y_axis("ln K")])
            .show_x(false)
            .show_y(false)
            .allow_double_click_reset(true);
        if let Some(e) = extent {
            let pad_x = (e[1] - e[0]).abs().max(1e-6) * 0.05;
            let pad_y = (e[3] - e[2]).abs().max(1e-6) * 0.08;
            plot = plot
                .include_x(e[0] - pad_x)
                .include_x(e[1] + pad_x)
                .include_y(e[2] - pad_y)
                .include_y(e[3] + pad_y);
        }
        let dark = cx.dark;
        let highlight: Vec<(u64, usize)> = [cx.links.hovered, cx.links.selected]
            .into_iter()
            .flatten()
            .collect();
        let mut marks: Vec<Mark> = Vec::new();
        let mut drawn = 0usize;
        let mut styles = Vec::new();
        let resp = plot.show(ui, |pu| {
            let bounds = pu.plot_bounds();
            let width_px = pu.transform().frame().width().max(1.0) as usize;
            for (i, s, a) in &shown {
                let color = style::series_color(*i);
                let shape = style::series_shape(*i);
                draw_fit(pu, s, a, color, level, dark);
                let (used, excluded) =
                    draw_points(pu, s, a, color, shape, dark, &bounds, width_px, &mut marks);
                drawn += used + excluded;
                styles.push(DrawnMarks {
                    series: s.id,
                    color,
                    shape,
                    used_filled: used,
                    excluded_hollow: excluded,
                });
            }
            for (sid, row) in &highlight {
                if let Some(m) = marks.iter().find(|m| m.series == *sid && m.row == *row) {
                    pu.points(
                        Points::new("", PlotPoints::new(vec![[m.x, m.y]]))
                            .shape(MarkerShape::Circle)
                            .filled(false)
                            .radius(11.0)
                            .color(style::highlight_color(dark))
                            .allow_hover(false),
                    );
                }
            }
        });
        self.drawn_markers = drawn;
        self.drawn_styles = styles;
        if has_data {
            temperature_ticks(ui, &resp.transform, t_unit);
        }
        self.transform = Some(resp.transform);
        let response = resp.response.clone();
        let picked = response
            .hover_pos()
            .and_then(|p| pick(&marks, &resp.transform, p));
        if let Some(m) = picked {
            cx.links.next_hover = Some((m.series, m.row));
            if let Some(s) = cx.project.get(m.series) {
                let a = cx.fitter.get(m.series);
                response.clone().on_hover_ui_at_pointer(|ui| {
                    point_card(ui, s, a.as_deref(), m.row, m.point, dark);
                });
            }
        }
        if response.clicked() {
            let at = response.interact_pointer_pos().or(response.hover_pos());
            if let Some(m) = at.and_then(|p| pick(&marks, &resp.transform, p)) {
                if let Some(s) = cx.project.get(m.series) {
                    let include = !s.is_included(m.row);
                    let rows = cx
                        .fitter
                        .get(m.series)
                        .and_then(|a| a.point_rows.get(m.point).cloned())
                        .unwrap_or_else(|| vec![m.row]);
                    for row in rows {
                        cx.out.push(Command::SetExclusion {
                            series: m.series,
                            row,
                            exclusion: (!include).then(|| (String::new(), cx.stamp.clone())),
                        });
                    }
                    cx.links.selected = Some((m.series, m.row));
                    self.reason_prompt = (!include).then(|| ReasonPrompt {
                        series: m.series,
                        row: m.row,
                        text: String::new(),
                    });
                }
            }
        }
        self.prompt(ui.ctx(), cx);
    }

    fn prompt(&mut self, ctx: &egui::Context, cx: &mut Cx<'_>) {
        let Some(p) = self.reason_prompt.as_mut() else {
            return;
        };
        let mut close = false;
        let mut save = false;
        egui::Window::new(format!("Row {} excluded", RowNumber::from_index(p.row)))
            .collapsible(false)
            .resizable(false)
            .anchor(egui::Align2::CENTER_TOP, [0.0, 80.0])
            .show(ctx, |ui| {
                ui.label("Reason (optional), kept with the project and the report:");
                let r = ui.add(
                    egui::TextEdit::singleline(&mut p.text)
                        .hint_text("e.g. air bubble in the cell")
                        .desired_width(300.0),
                );
                r.widget_info(|| {
                    egui::WidgetInfo::labeled(egui::Role::TextInput, true, "exclusion reason")
                });
                if r.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter)) {
                    save = true;
                }
                ui.horizontal(|ui| {
                    if ui.button("Record reason").clicked() {
                        save = true;
                    }
                    if ui.button("No reason").clicked() {
                        close = true;
                    }
                });
            });
        if save {
            // The exclusion itself is applied after the frame that made it; keep its time.
            let at = cx
                .project
                .get(p.series)
                .and_then(|s| s.exclusion(p.row))
                .map_or_else(|| cx.stamp.clone(), |e| e.at.clone());
            if !p.text.trim().is_empty() {
                cx.out.push(Command::SetExclusion {
                    series: p.series,
                    row: p.row,
                    exclusion: Some((p.text.trim().to_string(), at)),
                });
            }
            close = true;
        }
        if close {
            self.reason_prompt = None;
        }
    }
}

fn pick(marks: &[Mark], t: &PlotTransform, p: egui::Pos2) -> Option<Mark> {
    marks
        .iter()
        .map(|m| {
            (
                m,
                t.position_from_point(&PlotPoint::new(m.x, m.y)).distance(p),
            )
        })
        .filter(|(_, d)| *d <= PICK_RADIUS)
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(m, _)| *m)
}

fn draw_fit(pu: &mut PlotUi<'_>, s: &Entry, a: &Analysis, color: Color32, level: f64, dark: bool) {
    if a.band.len() < 2 {
        return;
    }
    let ci_name = format!(
        "{} — {} % confidence band",
        s.name(),
        isochore_report::present::percent(level)
    );
    // A dark background needs a stronger tint for the band to read.
    let fill = color.gamma_multiply(if dark { 0.38 } else { 0.22 });
    for w in a.band.windows(2) {
        let (p, q) = (&w[0], &w[1]);
        let quad = vec![
            [1e3 * p.inv_t, p.ci_low],
            [1e3 * q.inv_t, q.ci_low],
            [1e3 * q.inv_t, q.ci_high],
            [1e3 * p.inv_t, p.ci_high],
        ];
        pu.polygon(
            Polygon::new(ci_name.clone(), PlotPoints::new(quad))
                .fill_color(fill)
                .stroke(egui::Stroke::NONE)
                .allow_hover(false),
        );
    }
    let line: Vec<[f64; 2]> = a.band.iter().map(|b| [1e3 * b.inv_t, b.ln_k]).collect();
    pu.line(
        Line::new(format!("{} — fit", s.name()), PlotPoints::new(line))
            .color(color)
            .width(2.0)
            .allow_hover(false),
    );
    let pi_name = format!(
        "{} — {} % prediction band",
        s.name(),
        isochore_report::present::percent(level)
    );
    for upper in [false, true] {
        let pts: Vec<[f64; 2]> = a
            .band
            .iter()
            .map(|b| [1e3 * b.inv_t, if upper { b.pi_high } else { b.pi_low }])
            .collect();
        pu.line(
            Line::new(pi_name.clone(), PlotPoints::new(pts))
                .color(color)
                .width(1.2)
                .style(LineStyle::Dashed { length: 8.0 })
                .allow_hover(false),
        );
    }
}

#[allow(clippy::too_many_arguments)]
fn draw_points(
    pu: &mut PlotUi<'_>,
    s: &Entry,
    a: &Analysis,
    color: Color32,
    shape: MarkerShape,
    dark: bool,
    bounds: &egui_plot::PlotBounds,
    width_px: usize,
    marks: &mut Vec<Mark>,
) -> (usize, usize) {
    let m = &a.measurements;
    if m.is_empty() {
        return (0, 0);
    }
    let mut used = Vec::new();
    let mut excluded = Vec::new();
    let mut flagged = Vec::new();
    let mut all = Vec::new();
    let mut push = |k: usize| {
        let Some(mm) = m.get(k) else {
            return;
        };
        let xy = [1e3 / mm.t_k, mm.ln_k];
        all.push(xy);
        if mm.included {
            used.push(xy);
        } else {
            excluded.push(xy);
        }
        if a.flagged.get(k).copied().unwrap_or(false) {
            flagged.push(xy);
        }
        let row = a
            .point_rows
            .get(k)
            .and_then(|r| r.first().copied())
            .unwrap_or(k);
        marks.push(Mark {
            series: s.id,
            row,
            point: k,
            x: xy[0],
            y: xy[1],
        });
    };
    if m.len() > DECIMATE_ABOVE {
        let ext = a.extent.unwrap_or([0.0, 1.0, 0.0, 1.0]);
        let (mut lo, mut hi) = (bounds.min()[0], bounds.max()[0]);
        if !(bounds.is_valid_x() && hi > lo) {
            lo = ext[0];
            hi = ext[1];
        }
        let kept = a.vh_index.envelope(lo, hi, width_px);
        for i in kept {
            push(i as usize);
        }
    } else {
        for i in 0..m.len() {
            push(i);
        }
    }
    let large = m.len() > DECIMATE_ABOVE;
    let radius = if large { 1.5 } else { 4.5 };
    if large {
        style::envelope_fill(pu, &format!("{} — envelope", s.name()), all, color);
    }
    let n = (used.len(), excluded.len());
    pu.points(
        Points::new(format!("{} — used", s.name()), PlotPoints::new(used))
            .shape(shape)
            .color(color)
            .filled(true)
            .radius(radius)
            .allow_hover(false),
    );
    if !excluded.is_empty() {
        pu.points(
            Points::new(
                format!("{} — excluded", s.name()),
                PlotPoints::new(excluded),
            )
            .shape(shape)
            .color(color)
            .filled(false)
            .radius(radius + 0.5)
            .allow_hover(false),
        );
    }
    if !flagged.is_empty() {
        pu.points(
            Points::new("flagged point", PlotPoints::new(flagged))
                .shape(MarkerShape::Circle)
                .color(style::flag_ring_color(dark))
                // Thousands of rings would merge into blots: on a large series a
                // flagged point is a small dot in the flag colour instead.
                .filled(large)
                .radius(if large { radius } else { radius + 4.0 })
                .allow_hover(false),
        );
    }
    n
}

/// The hover card: the row as typed, and what isochore-fit says about its point.
pub fn point_card(
    ui: &mut egui::Ui,
    s: &Entry,
    a: Option<&Analysis>,
    row: usize,
    point: usize,
    dark: bool,
) {
    if row >= s.n_rows() {
        return;
    }
    ui.strong(format!("{} — row {}", s.name(), RowNumber::from_index(row)));
    let tu = s.data.settings.temperature_unit;
    let m = a.and_then(|a| a.measurements.get(point));
    egui::Grid::new("point_card").num_columns(2).show(ui, |ui| {
        for c in s.value_columns() {
            ui.label(s.header(c));
            ui.label(s.cell(row, c));
            ui.end_row();
        }
        if let Some(m) = m {
            ui.label("T");
            ui.label(format!(
                "{} {} = {} K",
                style::fixed(tu.from_kelvin(m.t_k), 2),
                tu.symbol(),
                style::fixed(m.t_k, 2)
            ));
            ui.end_row();
        }
        let d = a
            .and_then(|a| a.fit.as_deref().ok())
            .and_then(|f| f.point(point));
        if let Some(d) = d {
            ui.label("ln K (fit)");
            ui.label(format!(
                "{} ({})",
                style::fixed(d.ln_k, 3),
                style::fixed(d.fitted, 3)
            ));
            ui.end_row();
            ui.label("leverage");
            ui.label(style::fixed(d.leverage, 3));
            ui.end_row();
            if let Some(t) = d.student_ext.or(d.prediction_residual) {
                ui.label(isochore_report::present::names::STUDENTIZED_SHORT);
                ui.label(style::fixed(t, 2));
                ui.end_row();
            }
            if let Some(c) = d.cooks_d {
                ui.label("Cook's D");
                ui.label(style::fixed(c, 3));
                ui.end_row();
            }
            if d.flags.any() {
                ui.label("flags");
                let words: Vec<&str> = d
                    .flags
                    .kinds()
                    .iter()
                    .map(|k| match k {
                        isochore_fit::FlagKind::Outlier => "outlier",
                        isochore_fit::FlagKind::HighLeverage => "high leverage",
                        isochore_fit::FlagKind::Influential => "influential",
                    })
                    .collect();
                ui.colored_label(style::flag_color(dark), words.join(", "));
                ui.end_row();
            }
        }
    });
    match s.exclusion(row) {
        None => {
            ui.label("Used in the fit. Click to exclude it.");
        }
        Some(e) if e.reason.is_empty() => {
            ui.label("Excluded (no reason given). Click to use it again.");
        }
        Some(e) => {
            ui.label(format!("Excluded: {}. Click to use it again.", e.reason));
        }
    }
    if let Some(c) = s.note_column() {
        let note = s.cell(row, c);
        if !note.is_empty() {
            ui.label(RichText::new(format!("note: {note}")).italics());
        }
    }
}

/// The top axis: round temperatures in the display unit at their places on 1000/T (the
/// rule of the report's figures, `isochore_report::figures::temperature_keys`), thinned
/// to every second, fifth… key until they stand 44 points apart.
fn temperature_ticks(
    ui: &egui::Ui,
    t: &egui_plot::PlotTransform,
    unit: isochore_fit::TemperatureUnit,
) {
    let b = t.bounds();
    let (x0, x1) = (b.min()[0], b.max()[0]);
    if !(x0 > 0.0 && x1 > x0) {
        return;
    }
    let (keys, decimals) = isochore_report::figures::temperature_keys(x0, x1, unit);
    let frame = *t.frame();
    let xs: Vec<(f32, f64)> = keys
        .iter()
        .map(|&k| (t.position_from_point_x(k), k))
        .filter(|(x, _)| *x >= frame.left() && *x <= frame.right())
        .collect();
    let gap = xs
        .windows(2)
        .map(|w| (w[1].0 - w[0].0).abs())
        .fold(f32::INFINITY, f32::min);
    let every = [1usize, 2, 5, 10]
        .into_iter()
        .find(|n| gap * *n as f32 >= 44.0)
        .unwrap_or(20);
    let painter = ui.painter();
    let color = ui.visuals().text_color();
    let font = egui::TextStyle::Body.resolve(ui.style());
    for (i, (x, k)) in xs.iter().enumerate() {
        if i % every != 0 {
            continue;
        }
        let top = frame.top();
        painter.line_segment(
            [egui::pos2(*x, top), egui::pos2(*x, top - 4.0)],
            egui::Stroke::new(1.0, color),
        );
        painter.text(
            egui::pos2(*x, top - 5.0),
            egui::Align2::CENTER_BOTTOM,
            style::fixed(unit.from_kelvin(1e3 / k), decimals),
            font.clone(),
            color,
        );
    }
}
