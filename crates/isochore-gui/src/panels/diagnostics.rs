//! Two small plots under the van 't Hoff plot, linked to it and to the table: residuals
//! (ln K − fit) against temperature, and the influence view — leverage against the
//! externally studentized residual (the one the outlier flag tests), with contours of Cook's
//! distance from isochore-fit.
//! Hovering a point here highlights it everywhere.

use crate::app::Cx;
use crate::panels::style;
use egui::RichText;
use egui_plot::{HLine, Line, LineStyle, Plot, PlotPoint, Points, VLine};
use isochore_report::present::{self, names};

/// The diagnostic plots' state: the decimated rows of a large series, kept while the
/// analysis and the plot width stay the same (both plots always show the whole series).
#[derive(Debug, Default)]
pub struct DiagnosticsPanel {
    decimated: Option<Decimated>,
    /// The residual plot's y-range as last drawn (read by tests).
    pub residual_y: Option<[f64; 2]>,
    /// The influence plot's points as last drawn: (point index, [leverage h, y]) — the y
    /// is what the flag rule tests (read by tests).
    pub influence_drawn: Vec<(usize, [f64; 2])>,
}

/// The points of the residual and influence plots of a large series, with their
/// diagnostics (computed once from the fit, `VantHoffFit::point`), for one analysis and
/// width.
#[derive(Debug)]
struct Decimated {
    /// (series id, analysis revision, pixel columns).
    key: (u64, u64, usize),
    residual: std::sync::Arc<Vec<isochore_fit::PointDiagnostics>>,
    influence: std::sync::Arc<Vec<isochore_fit::PointDiagnostics>>,
}

impl DiagnosticsPanel {
    /// Draws both plots side by side.
    pub fn ui(&mut self, ui: &mut egui::Ui, cx: &mut Cx<'_>) {
        let Some(s) = cx.series() else {
            return;
        };
        let Some(a) = cx.fitter.get(s.id) else {
            return;
        };
        let Ok(fit) = a.fit.as_deref() else {
            return;
        };
        if a.plots_pending {
            // A large refit shows its estimates first; these plots' indexes follow.
            ui.weak("The residual and influence plots follow in a moment.");
            return;
        }
        let idx = cx.project.index_of(s.id).unwrap_or(0);
        let color = style::series_color(idx);
        let shape = style::series_shape(idx);
        let dark = cx.dark;
        let flag = style::flag_color(dark);
        let hl = style::highlight_color(dark);
        let tu = s.data.settings.temperature_unit;
        let px = (ui.available_width() / 2.0).max(100.0) as usize;
        // Large series: the min/max envelope per pixel column along each plot's x axis.
        let key = (s.id, a.rev, px);
        let cached = if a.resid_index.is_empty() {
            None
        } else {
            match &self.decimated {
                Some(d) if d.key == key => Some((d.residual.clone(), d.influence.clone())),
                _ => {
                    let of = |rows: Vec<usize>| {
                        std::sync::Arc::new(
                            rows.into_iter()
                                .filter_map(|i| fit.point(i))
                                .collect::<Vec<_>>(),
                        )
                    };
                    let residual = of(whole_envelope(&a.resid_index, px));
                    let influence = of(whole_envelope(&a.infl_index, px));
                    self.decimated = Some(Decimated {
                        key,
                        residual: residual.clone(),
                        influence: influence.clone(),
                    });
                    Some((residual, influence))
                }
            }
        };
        // A small series draws every point (its records are made once and kept).
        let (resid_pts, infl_pts): (&[isochore_fit::PointDiagnostics], &[_]) = match &cached {
            Some((r, i)) => (r, i),
            None => (fit.points(), fit.points()),
        };
        let highlight: Vec<usize> = [cx.links.hovered, cx.links.selected]
            .into_iter()
            .flatten()
            .filter(|(sid, _)| *sid == s.id)
            .filter_map(|(_, r)| a.point_of_row.get(r).copied().flatten())
            .collect();
        let look = Look {
            color,
            shape,
            flag: style::flag_ring_color(dark),
            highlight: hl,
            large: !a.resid_index.is_empty(),
        };
        let h = ui.available_height().max(120.0);
        let w = ui.available_width();
        let mut hovered: Option<usize> = None;
        ui.horizontal(|ui| {
            let half = (w / 2.0 - 8.0).max(150.0);
            // Residuals against T.
            ui.vertical(|ui| {
                ui.set_width(half);
                // The used points set the y-range; an excluded point beyond it is drawn
                // at the edge, so it cannot squash the used points onto zero.
                let (lo, hi) = used_span(resid_pts);
                let beyond = resid_pts
                    .iter()
                    .filter(|d| !d.used && !(lo..=hi).contains(&d.residual))
                    .count();
                ui.horizontal(|ui| {
                    ui.label(RichText::new("Residuals against temperature").strong());
                    if beyond > 0 {
                        ui.label(
                            RichText::new(format!(
                                "{} beyond the range drawn at the edge",
                                isochore_fit::error::counted(
                                    beyond,
                                    "excluded point",
                                    "excluded points"
                                )
                            ))
                            .small()
                            .weak(),
                        );
                    }
                });
                let m = Marks::collect(resid_pts, &highlight, |d| {
                    let y = if d.used {
                        d.residual
                    } else {
                        d.residual.clamp(lo, hi)
                    };
                    Some([tu.from_kelvin(d.t_k), y])
                });
                let resp = Plot::new("residual_plot")
                    // What the title left (it may wrap to two lines when narrow).
                    .height((h - ui.min_rect().height() - 4.0).max(100.0))
                    .custom_x_axes(vec![style::x_axis(names::t_axis(tu))])
                    .custom_y_axes(vec![style::y_axis("ln K − fit")])
                    .y_grid_spacer(egui_plot::uniform_grid_spacer(style::nice_steps))
                    .show_x(false)
                    .show_y(false)
                    .show(ui, |pu| {
                        pu.hline(HLine::new("", 0.0).color(color).width(1.0));
                        draw_marks(pu, &look, &m);
                    });
                let b = resp.transform.bounds();
                self.residual_y = Some([b.min()[1], b.max()[1]]);
                if let Some(p) = resp.response.hover_pos() {
                    hovered = nearest(&m.all, &resp.transform, p);
                }
            });
            // Influence: leverage against the externally studentized residual.
            ui.vertical(|ui| {
                ui.set_width(half);
                ui.horizontal_wrapped(|ui| {
                    ui.label(
                        RichText::new(format!(
                            "Influence: leverage against {}",
                            names::STUDENTIZED
                        ))
                        .strong(),
                    );
                    ui.label(RichText::new(contour_key(&a.cooks_contours)).small().weak());
                });
                let m = Marks::collect(
                    infl_pts,
                    &highlight,
                    isochore_fit::influence::influence_coordinates,
                );
                self.influence_drawn = m.all.clone();
                let lev_threshold = isochore_fit::influence::FlagLimits::of(fit).leverage;
                let max_h = m.all.iter().map(|q| q.1[0]).fold(lev_threshold, f64::max);
                // Contours are cut a little above the largest residual, so they do not
                // stretch the axis (and squeeze the points) far beyond the data.
                let r_lim = m.all.iter().map(|q| q.1[1].abs() * 1.2).fold(3.0, f64::max);
                let resp = Plot::new("influence_plot")
                    // What the title left (it may wrap to two lines when narrow).
                    .height((h - ui.min_rect().height() - 4.0).max(100.0))
                    .custom_x_axes(vec![style::x_axis("leverage h")])
                    .x_grid_spacer(egui_plot::uniform_grid_spacer(style::nice_steps))
                    .y_grid_spacer(egui_plot::uniform_grid_spacer(style::nice_steps))
                    .custom_y_axes(vec![style::y_axis(names::STUDENTIZED_SHORT)])
                    .include_x(0.0)
                    .include_x((max_h * 1.15).min(1.0))
                    .include_y(-2.5)
                    .include_y(2.5)
                    .show_x(false)
                    .show_y(false)
                    .show(ui, |pu| {
                        let x_max = (max_h * 1.15).min(1.0);
                        for (i, (d, curve)) in a.cooks_contours.iter().enumerate() {
                            let upper: Vec<[f64; 2]> = curve
                                .iter()
                                .filter(|q| q[0] <= x_max && q[1] <= r_lim)
                                .copied()
                                .collect();
                            let lower: Vec<[f64; 2]> =
                                upper.iter().map(|q| [q[0], -q[1]]).collect();
                            let d = present::fixed(*d, 2);
                            // The first contour is the flag rule's level (factor/n); the
                            // two are told apart by their dashes and named in the key above
                            // (a label on the plot sat where the curves meet, and was
                            // hard to read on the dark theme).
                            let rule = if i == 0 { " (flag limit)" } else { "" };
                            let name = format!("Cook's D = {d}{rule}");
                            let dashes = if i == 0 {
                                LineStyle::Dashed { length: 10.0 }
                            } else {
                                LineStyle::Dashed { length: 3.0 }
                            };
                            pu.line(
                                Line::new(name.clone(), upper)
                                    .style(dashes)
                                    .color(egui::Color32::GRAY)
                                    .allow_hover(false),
                            );
                            pu.line(
                                Line::new(name, lower)
                                    .style(dashes)
                                    .color(egui::Color32::GRAY)
                                    .allow_hover(false),
                            );
                        }
                        pu.vline(
                            VLine::new("leverage flag", lev_threshold)
                                .color(flag.gamma_multiply(0.6))
                                .style(LineStyle::Dotted { spacing: 4.0 }),
                        );
                        draw_marks(pu, &look, &m);
                    });
                if let Some(p) = resp.response.hover_pos() {
                    hovered = hovered.or(nearest(&m.all, &resp.transform, p));
                }
            });
        });
        if let Some(k) = hovered {
            let row = a
                .point_rows
                .get(k)
                .and_then(|r| r.first().copied())
                .unwrap_or(k);
            cx.links.next_hover = Some((s.id, row));
        }
    }
}

/// How the points of both plots are drawn.
struct Look {
    color: egui::Color32,
    shape: egui_plot::MarkerShape,
    flag: egui::Color32,
    highlight: egui::Color32,
    /// A decimated series: envelope fill, small dots, flagged points as dots.
    large: bool,
}

/// The points of one diagnostic plot, sorted into what is drawn how.
struct Marks {
    /// Every drawn point with its index, in x order (picking, and a large series' envelope).
    all: Vec<(usize, [f64; 2])>,
    used: Vec<[f64; 2]>,
    excluded: Vec<[f64; 2]>,
    flagged: Vec<[f64; 2]>,
    highlighted: Vec<[f64; 2]>,
}

impl Marks {
    /// The points, placed by `at` (`None`: not drawn on this plot).
    fn collect(
        points: &[isochore_fit::PointDiagnostics],
        highlight: &[usize],
        at: impl Fn(&isochore_fit::PointDiagnostics) -> Option<[f64; 2]>,
    ) -> Self {
        let mut m = Marks {
            all: Vec::with_capacity(points.len()),
            used: Vec::new(),
            excluded: Vec::new(),
            flagged: Vec::new(),
            highlighted: Vec::new(),
        };
        for d in points {
            let Some(p) = at(d) else {
                continue;
            };
            if d.used {
                m.used.push(p);
            } else {
                m.excluded.push(p);
            }
            if d.flags.any() {
                m.flagged.push(p);
            }
            if highlight.contains(&d.index) {
                m.highlighted.push(p);
            }
            m.all.push((d.index, p));
        }
        m
    }
}

/// The points of one diagnostic plot: used filled, excluded hollow, flagged ringed (dots
/// in the flag colour on a large series, where rings would merge), highlighted haloed.
fn draw_marks(pu: &mut egui_plot::PlotUi<'_>, look: &Look, m: &Marks) {
    let radius = if look.large { 1.5 } else { 3.5 };
    if look.large {
        let all = m.all.iter().map(|(_, p)| *p).collect();
        style::envelope_fill(pu, "envelope", all, look.color);
    }
    pu.points(
        Points::new("used", m.used.clone())
            .shape(look.shape)
            .color(look.color)
            .radius(radius),
    );
    if !m.excluded.is_empty() {
        pu.points(
            Points::new("excluded", m.excluded.clone())
                .shape(look.shape)
                .color(look.color)
                .filled(false)
                .radius(radius + 0.5),
        );
    }
    if !m.flagged.is_empty() {
        pu.points(
            Points::new("flagged", m.flagged.clone())
                .color(look.flag)
                .filled(look.large)
                .radius(if look.large { radius } else { 8.0 }),
        );
    }
    if !m.highlighted.is_empty() {
        pu.points(
            Points::new("", m.highlighted.clone())
                .color(look.highlight)
                .filled(false)
                .radius(10.0),
        );
    }
}

/// The influence plot's key in words: the line style of each Cook's-distance contour with
/// its level (the first is the flag rule's), the leverage flag and the ring.
fn contour_key(contours: &[(f64, Vec<[f64; 2]>)]) -> String {
    let mut parts: Vec<String> = contours
        .iter()
        .enumerate()
        .map(|(i, (d, _))| {
            let d = present::fixed(*d, 2);
            if i == 0 {
                format!("long dashes: Cook's D = {d} (flag limit)")
            } else {
                format!("short dashes: Cook's D = {d}")
            }
        })
        .collect();
    parts.push("dotted: leverage flag".into());
    parts.push("ring: flagged".into());
    parts.join(" · ")
}

/// The y-span of the residual plot: the used points' residuals and zero, with a margin
/// (a tenth of the span each side, at least 0.05 in ln K when all lie on the fit).
pub fn used_span(points: &[isochore_fit::PointDiagnostics]) -> (f64, f64) {
    let (lo, hi) = points
        .iter()
        .filter(|d| d.used && d.residual.is_finite())
        .fold((0.0f64, 0.0f64), |(lo, hi), d| {
            (lo.min(d.residual), hi.max(d.residual))
        });
    let pad = ((hi - lo) * 0.1).max(0.05);
    (lo - pad, hi + pad)
}

/// The envelope of a whole index across `px` pixel columns, as point indices.
fn whole_envelope(index: &crate::decimate::EnvelopeIndex, px: usize) -> Vec<usize> {
    index.x_range().map_or_else(Vec::new, |(lo, hi)| {
        // All at one x: a single column.
        let hi = if hi > lo { hi } else { lo + 1.0 };
        index
            .envelope(lo, hi, px)
            .into_iter()
            .map(|i| i as usize)
            .collect()
    })
}

fn nearest(
    marks: &[(usize, [f64; 2])],
    t: &egui_plot::PlotTransform,
    p: egui::Pos2,
) -> Option<usize> {
    marks
        .iter()
        .map(|(i, q)| {
            (
                *i,
                t.position_from_point(&PlotPoint::new(q[0], q[1]))
                    .distance(p),
            )
        })
        .filter(|(_, d)| *d <= crate::panels::vh_plot::PICK_RADIUS)
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(i, _)| i)
}
