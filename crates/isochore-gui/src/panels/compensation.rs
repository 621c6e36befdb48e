//! The compensation plots of the "fit together" view (issue 12, three or more series), as
//! the joint report's figures draw them: ΔH° at θ against ΔS° at θ and against ΔG° at
//! T_hm (of every series' used points), each series' estimate from the separate fits with
//! its joint confidence region (isochore-fit's `GlobalFit::h_s_region` and `h_g_region`),
//! and on the ΔH°–ΔS° plot the compensation line of slope β (York regression, from
//! isochore-analysis' `CompensationAnalysis`) beside the reference line of slope T_hm.
//! Series in the view's colours and shapes; labels from `present::names`. A view: the
//! regions, β and T_hm are the libraries'; the window only converts units and places lines.

use crate::panels::style;
use egui::{Color32, RichText};
use egui_plot::{Line, LineStyle, Plot, PlotPoint, PlotPoints, Points, Polygon, Text};
use isochore_analysis::joint::JointAnalysis;
use isochore_fit::{EnergyUnit, TemperatureUnit};
use isochore_report::present::{self, names};

/// Vertices of each drawn confidence region (as the report's figures).
const VERTICES: usize = 120;

/// A straight line's two ends, display units.
type Ends = [[f64; 2]; 2];

/// A series' region (vertices, display units) and its estimate.
type Region = (Vec<[f64; 2]>, [f64; 2]);

/// A line of a plot: its ends (`None`: it misses the plot), its legend name, dashed or not.
type PlotLine = (Option<Ends>, String, bool);

/// Both compensation plots of one joint analysis, in display units (made once per fit).
pub(crate) struct CompensationPlots {
    labels: Vec<String>,
    /// Per series: the ΔH°–ΔS° region as (ΔS°, ΔH°) vertices and its centre.
    entropy: Vec<Region>,
    /// Per series: the ΔH°–ΔG°(T_hm) region as (ΔG°, ΔH°) vertices and its centre.
    gibbs: Vec<Region>,
    /// β and α (SI) of ΔH° = α + βΔS°, when the analysis has them.
    beta: Option<(f64, f64)>,
    theta_k: f64,
    t_hm_k: f64,
    level_percent: String,
    energy: EnergyUnit,
    temperature: TemperatureUnit,
}

/// What the compensation plots drew in the last frame (for tests, as the van 't Hoff
/// plot's `drawn_styles`).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct DrawnCompensation {
    /// Each region drawn on the ΔH°–ΔS° plot: series label, colour, number of vertices.
    pub entropy_regions: Vec<(String, Color32, usize)>,
    /// Each region drawn on the ΔH°–ΔG°(T_hm) plot: series label, colour, vertices.
    pub gibbs_regions: Vec<(String, Color32, usize)>,
    /// The ends of the β line drawn, display units (ΔS°, ΔH°).
    pub beta_line: Option<[[f64; 2]; 2]>,
    /// The drawn β line's slope converted back to SI: ΔH° per ΔS°, K.
    pub beta_slope_k: Option<f64>,
    /// The T_hm the plots name, K.
    pub t_hm_k: f64,
}

impl CompensationPlots {
    /// The plots of `a`'s compensation analysis, `None` without one (fewer than three
    /// series, or no separate fits).
    pub(crate) fn new(a: &JointAnalysis, energy: EnergyUnit, tu: TemperatureUnit) -> Option<Self> {
        let c = a.compensation.as_ref()?;
        let full = a.equality.as_ref()?.full();
        let level = full.options().level;
        let theta = full.options().t_ref_k;
        let t_hm = full.t_harmonic_all_k();
        let eu = present::energy(energy);
        let su = present::per_kelvin(energy);
        let mut entropy = Vec::new();
        let mut gibbs = Vec::new();
        for (s, p) in c.points.iter().enumerate() {
            let h = eu.from_si(p.delta_h);
            let hs = full
                .h_s_region(s, theta, level, VERTICES)
                .unwrap_or_default();
            entropy.push((
                hs.iter()
                    .map(|q| [su.from_si(q[1]), eu.from_si(q[0])])
                    .collect(),
                [su.from_si(p.delta_s), h],
            ));
            let hg = full
                .h_g_region(s, theta, t_hm, level, VERTICES)
                .unwrap_or_default();
            let g = full.delta_g_at(s, t_hm).map_or(f64::NAN, |g| g.value);
            gibbs.push((
                hg.iter()
                    .map(|q| [eu.from_si(q[1]), eu.from_si(q[0])])
                    .collect(),
                [eu.from_si(g), h],
            ));
        }
        Some(Self {
            labels: a.labels.clone(),
            entropy,
            gibbs,
            beta: c.beta.as_ref().map(|b| (b.beta, b.alpha)),
            theta_k: theta,
            t_hm_k: t_hm,
            level_percent: present::number::percent(level),
            energy,
            temperature: tu,
        })
    }

    /// Draws both plots side by side under a key of the series; returns what was drawn.
    pub(crate) fn show(&self, ui: &mut egui::Ui) -> DrawnCompensation {
        let eu = present::energy(self.energy);
        let su = present::per_kelvin(self.energy);
        let mut drawn = DrawnCompensation {
            t_hm_k: self.t_hm_k,
            ..DrawnCompensation::default()
        };
        ui.label(
            RichText::new(format!(
                "Each series from its separate fit, with its {} % joint confidence region. {}.",
                self.level_percent,
                names::T_HM_MEANING.replace("used points", "used points of every series")
            ))
            .small()
            .weak(),
        );
        ui.horizontal_wrapped(|ui| {
            for (s, label) in self.labels.iter().enumerate() {
                style::marker_swatch(ui, s);
                ui.label(RichText::new(label).small());
                ui.add_space(10.0);
            }
        });
        // ΔH° = α + βΔS° (SI) in display units: slope β·su/eu through (0, α/eu).
        let per = su.si_per_unit / eu.si_per_unit;
        let y_axis = names::compensation_h_axis(eu.symbol);
        ui.columns(2, |cols| {
            let x_axis =
                names::compensation_x_axis(false, self.theta_k, self.temperature, su.symbol);
            let extent = extent(&self.entropy);
            let mut lines = Vec::new();
            if let Some(((x0, x1), (y0, y1))) = extent {
                let n = self.entropy.len() as f64;
                let mean = self
                    .entropy
                    .iter()
                    .fold([0.0, 0.0], |m, (_, c)| [m[0] + c[0] / n, m[1] + c[1] / n]);
                let reference = clip_line(self.t_hm_k * per, mean, (x0, x1), (y0, y1));
                lines.push((reference, names::t_hm_slope_line(self.t_hm_k), true));
                if let Some((beta, alpha)) = self.beta {
                    let l = clip_line(
                        beta * per,
                        [0.0, alpha / eu.si_per_unit],
                        (x0, x1),
                        (y0, y1),
                    );
                    if let Some([a, b]) = l {
                        drawn.beta_line = Some([a, b]);
                        drawn.beta_slope_k = Some((b[1] - a[1]) / (b[0] - a[0]) / per);
                    }
                    lines.push((l, names::beta_line(beta), false));
                }
            }
            drawn.entropy_regions = self.plot(
                &mut cols[0],
                "compensation_entropy",
                &self.entropy,
                (x_axis, &y_axis),
                &lines,
            );
            let g_axis = names::compensation_x_axis(true, self.t_hm_k, self.temperature, eu.symbol);
            drawn.gibbs_regions = self.plot(
                &mut cols[1],
                "compensation_gibbs",
                &self.gibbs,
                (g_axis, &y_axis),
                &[],
            );
        });
        drawn
    }

    /// One plot: each series' region (filled, in its colour) and estimate (its marker),
    /// and `lines` (ends, legend name, dashed).
    fn plot(
        &self,
        ui: &mut egui::Ui,
        id: &str,
        regions: &[Region],
        (x_axis, y_axis): (String, &str),
        lines: &[PlotLine],
    ) -> Vec<(String, Color32, usize)> {
        let mut drawn = Vec::new();
        let ink = ui.visuals().strong_text_color();
        // 12 % room each side (as the report), for the names beside the estimates.
        let ((x0, x1), (y0, y1)) = extent(regions).unwrap_or(((0.0, 0.0), (0.0, 0.0)));
        Plot::new(id)
            .include_x(x0)
            .include_x(x1)
            .include_y(y0)
            .include_y(y1)
            .height(300.0)
            .x_grid_spacer(egui_plot::uniform_grid_spacer(style::nice_steps))
            .y_grid_spacer(egui_plot::uniform_grid_spacer(style::nice_steps))
            .x_axis_label(x_axis)
            .y_axis_label(y_axis)
            // The legend names the lines only (upper left: with a positive slope the lines
            // leave that corner empty); each series is named below right of its estimate
            // (off a rising line).
            .legend(egui_plot::Legend::default().position(egui_plot::Corner::LeftTop))
            .allow_scroll(false)
            .show(ui, |pu| {
                for (s, (poly, centre)) in regions.iter().enumerate() {
                    let color = style::series_color(s);
                    let label = &self.labels[s];
                    if poly.len() >= 3 {
                        pu.polygon(
                            Polygon::new("", PlotPoints::new(poly.clone()))
                                .fill_color(color.gamma_multiply(0.22))
                                .stroke(egui::Stroke::new(1.5, color))
                                .allow_hover(false),
                        );
                        drawn.push((label.clone(), color, poly.len()));
                    }
                    pu.points(
                        Points::new("", PlotPoints::new(vec![*centre]))
                            .shape(style::series_shape(s))
                            .color(color)
                            .filled(true)
                            .radius(5.0),
                    );
                    pu.text(
                        Text::new(
                            "",
                            PlotPoint::new(centre[0], centre[1]),
                            RichText::new(format!("     {label}")).small().color(color),
                        )
                        .anchor(egui::Align2::LEFT_TOP),
                    );
                }
                for (ends, name, dashed) in lines {
                    let Some(ends) = ends else { continue };
                    let line = Line::new(name.clone(), PlotPoints::new(ends.to_vec())).width(2.0);
                    pu.line(if *dashed {
                        line.color(Color32::GRAY).style(LineStyle::dashed_loose())
                    } else {
                        line.color(ink)
                    });
                }
            });
        drawn
    }
}

/// The padded extent (x, y) of the regions and centres: 12 % each side, as the report.
fn extent(regions: &[Region]) -> Option<((f64, f64), (f64, f64))> {
    let all = regions
        .iter()
        .flat_map(|(p, c)| p.iter().chain(std::iter::once(c)))
        .filter(|p| p[0].is_finite() && p[1].is_finite());
    let (mut x0, mut x1, mut y0, mut y1) = (
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    );
    for p in all {
        x0 = x0.min(p[0]);
        x1 = x1.max(p[0]);
        y0 = y0.min(p[1]);
        y1 = y1.max(p[1]);
    }
    if !(x0 < x1 && y0 < y1) {
        return None;
    }
    let (dx, dy) = (0.12 * (x1 - x0), 0.12 * (y1 - y0));
    Some(((x0 - dx, x1 + dx), (y0 - dy, y1 + dy)))
}

/// The straight line y = through.y + k (x − through.x) cut to the box (two ends), `None`
/// when it misses the box.
fn clip_line(
    k: f64,
    through: [f64; 2],
    (x0, x1): (f64, f64),
    (y0, y1): (f64, f64),
) -> Option<Ends> {
    let y = |x: f64| through[1] + k * (x - through[0]);
    let (mut a, mut b) = (x0, x1);
    if k != 0.0 && k.is_finite() {
        let (xa, xb) = (
            through[0] + (y0 - through[1]) / k,
            through[0] + (y1 - through[1]) / k,
        );
        a = a.max(xa.min(xb));
        b = b.min(xa.max(xb));
    }
    (a < b).then(|| [[a, y(a)], [b, y(b)]])
}
