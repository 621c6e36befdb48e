//! The figures of a joint fit's report: the van 't Hoff plot of every series with the line
//! the joint fit gives each, the residuals of each series in a panel of its own, and the
//! two compensation plots (ΔH° against ΔS° and against ΔG°(T_hm)) with each series' joint
//! confidence region. Series are told apart by colour and marker shape together.

use super::*;
use crate::joint::JointReportInput;
use plotters::element::{Drawable, PointCollection};
use plotters_backend::{BackendCoord, DrawingErrorKind};

/// Series colours (Okabe–Ito, colour-blind safe), in order; shapes cycle alongside.
const SERIES_COLOURS: [RGBColor; 6] = [
    RGBColor(0, 114, 178),
    RGBColor(213, 94, 0),
    RGBColor(0, 158, 115),
    RGBColor(204, 121, 167),
    RGBColor(230, 159, 0),
    RGBColor(86, 180, 233),
];

/// Marker shapes: circle, triangle, square, diamond.
const SHAPES: usize = 4;

fn colour(s: usize) -> RGBColor {
    SERIES_COLOURS[s % SERIES_COLOURS.len()]
}

/// Series `s`'s marker at `at` (data coordinates, or pixels inside a legend), filled for a
/// used point and hollow for an excluded one: the series' colour and shape.
#[derive(Clone, Copy)]
struct Marker<C> {
    at: C,
    s: usize,
    filled: bool,
}

impl<'a, C> PointCollection<'a, C> for &'a Marker<C> {
    type Point = &'a C;
    type IntoIter = std::iter::Once<&'a C>;
    fn point_iter(self) -> Self::IntoIter {
        std::iter::once(&self.at)
    }
}

impl<C, DB: DrawingBackend> Drawable<DB> for Marker<C> {
    fn draw<I: Iterator<Item = BackendCoord>>(
        &self,
        mut pos: I,
        backend: &mut DB,
        _: (u32, u32),
    ) -> Result<(), DrawingErrorKind<DB::ErrorType>> {
        let Some((x, y)) = pos.next() else {
            return Ok(());
        };
        let col = colour(self.s);
        let style = if self.filled {
            col.filled()
        } else {
            col.stroke_width(2)
        };
        let outline = |v: &[(i32, i32)]| -> Vec<(i32, i32)> {
            v.iter()
                .chain(v.first())
                .map(|(a, b)| (x + a, y + b))
                .collect()
        };
        match (self.s / SERIES_COLOURS.len() + self.s) % SHAPES {
            0 => backend.draw_circle((x, y), 5, &style, self.filled),
            1 => {
                let v = [(0, -7), (6, 4), (-6, 4)];
                if self.filled {
                    backend.fill_polygon(outline(&v), &style)
                } else {
                    backend.draw_path(outline(&v), &style)
                }
            }
            2 => backend.draw_rect((x - 5, y - 5), (x + 5, y + 5), &style, self.filled),
            _ => {
                let v = [(0, -7), (7, 0), (0, 7), (-7, 0)];
                if self.filled {
                    backend.fill_polygon(outline(&v), &style)
                } else {
                    backend.draw_path(outline(&v), &style)
                }
            }
        }
    }
}

/// Draws series `s`'s marker at each of `points` (data coordinates).
fn draw_markers<'a, 'b: 'a>(
    chart: &mut Chart<'a, 'b>,
    s: usize,
    points: &[(f64, f64)],
    filled: bool,
) -> Result<(), ReportError> {
    chart
        .draw_series(
            points
                .iter()
                .filter(|p| p.0.is_finite() && p.1.is_finite())
                .map(|&at| Marker { at, s, filled }),
        )
        .map_err(fe)?;
    Ok(())
}

/// Draws one joint figure as an SVG document.
///
/// # Errors
/// [`ReportError::Figure`] when drawing fails; [`ReportError::Input`] for a single fit's
/// figure kind.
pub(crate) fn joint_figure_svg(
    input: &JointReportInput,
    kind: FigureKind,
) -> Result<String, ReportError> {
    fonts::register_for_plotters();
    let n = input.series.len().max(1) as u32;
    let height = match kind {
        FigureKind::SeriesResiduals => (80 + 130 * n).max(HEIGHT),
        _ => HEIGHT,
    };
    let mut buf = String::new();
    {
        let root = SVGBackend::with_string(&mut buf, (WIDTH, height)).into_drawing_area();
        root.fill(&WHITE).map_err(fe)?;
        match kind {
            FigureKind::SeriesVantHoff => series_vant_hoff(&root, input)?,
            FigureKind::SeriesResiduals => series_residuals(&root, input)?,
            FigureKind::CompensationEntropy => compensation_plot(&root, input, false)?,
            FigureKind::CompensationGibbs => compensation_plot(&root, input, true)?,
            single => {
                return Err(ReportError::Input(format!(
                    "the figure “{}” belongs to the report of a single fit",
                    single.title()
                )))
            }
        }
        root.present().map_err(fe)?;
    }
    Ok(buf)
}

fn series_vant_hoff(root: &Area, input: &JointReportInput) -> Result<(), ReportError> {
    let fit = &input.fit;
    let all = (0..fit.n_series()).flat_map(|s| fit.points(s).unwrap_or(&[]).iter());
    let Some(xr) = finite_range(all.clone().map(|p| 1000.0 / p.t_k)) else {
        return no_data(root, "points");
    };
    let (x0, x1) = padded(xr, 0.06);
    let lines: Vec<Vec<(f64, f64)>> = (0..fit.n_series())
        .map(|s| {
            let (lo, hi) = fit.t_range_k(s).unwrap_or((f64::NAN, f64::NAN));
            (0..=80)
                .filter_map(|i| {
                    let x = 1000.0 / hi + (1000.0 / lo - 1000.0 / hi) * i as f64 / 80.0;
                    let y = fit.ln_k_at(s, 1000.0 / x)?.value;
                    (x.is_finite() && y.is_finite()).then_some((x, y))
                })
                .collect()
        })
        .collect();
    let ys = all
        .flat_map(|p| {
            let s = p.sigma_ln_k.unwrap_or(0.0);
            [p.ln_k - s, p.ln_k + s]
        })
        .chain(lines.iter().flatten().map(|p| p.1));
    let Some(yr) = finite_range(ys) else {
        return no_data(root, "values");
    };
    let (y0, y1) = padded(yr, 0.08);
    let tu = input.temperature_unit;
    let mut chart = framed_chart(
        root,
        Frame {
            x: (x0, x1),
            y: (y0, y1),
            x_desc: crate::present::names::INVERSE_T_AXIS,
            y_desc: "ln K",
            left: 72,
            top: 70,
            y_decimals: None,
        },
    )?;
    top_temperature_axis(root, &chart, (x0, x1), y1, tu)?;
    let mut occupied = Vec::new();
    for (s, series) in input.series.iter().enumerate() {
        let col = colour(s);
        let pts = fit.points(s).unwrap_or(&[]);
        let bars: Vec<PathElement<(f64, f64)>> = pts
            .iter()
            .filter_map(|p| {
                let sg = p.sigma_ln_k?;
                let x = 1000.0 / p.t_k;
                (x.is_finite() && sg.is_finite()).then(|| {
                    PathElement::new(
                        vec![(x, p.ln_k - sg), (x, p.ln_k + sg)],
                        col.mix(0.7).stroke_width(2),
                    )
                })
            })
            .collect();
        chart.draw_series(bars).map_err(fe)?;
        chart
            .draw_series(LineSeries::new(lines[s].clone(), col.stroke_width(2)))
            .map_err(fe)?
            .label(series.label.clone())
            .legend(move |(x, y)| {
                EmptyElement::at((x, y))
                    + PathElement::new(vec![(0, 0), (22, 0)], col.stroke_width(2))
                    + Marker {
                        at: (11, 0),
                        s,
                        filled: true,
                    }
            });
        let used: Vec<(f64, f64)> = pts
            .iter()
            .filter(|p| p.used)
            .map(|p| (1000.0 / p.t_k, p.ln_k))
            .collect();
        let excluded: Vec<(f64, f64)> = pts
            .iter()
            .filter(|p| !p.used)
            .map(|p| (1000.0 / p.t_k, p.ln_k))
            .collect();
        draw_markers(&mut chart, s, &used, true)?;
        draw_markers(&mut chart, s, &excluded, false)?;
        occupied.extend(used);
        occupied.extend(excluded);
        occupied.extend(lines[s].iter().step_by(8));
    }
    draw_key(&mut chart, emptiest_corner(&occupied, (x0, x1), (y0, y1)))
}

fn series_residuals(root: &Area, input: &JointReportInput) -> Result<(), ReportError> {
    let fit = &input.fit;
    let tu = input.temperature_unit;
    let n = fit.n_series();
    let all: Vec<&isochore_fit::PointDiagnostics> = (0..n)
        .flat_map(|s| fit.points(s).unwrap_or(&[]).iter())
        .collect();
    let Some(xr) = finite_range(all.iter().map(|p| tu.from_kelvin(p.t_k))) else {
        return no_data(root, "points");
    };
    let (x0, x1) = padded(xr, 0.05);
    // One scale for every panel, set by the used points (an excluded point far off would
    // flatten every panel; it is drawn at the edge instead).
    let m = finite_range(all.iter().filter(|p| p.used).flat_map(|p| {
        let s = p.sigma_ln_k.unwrap_or(0.0);
        [(p.residual - s).abs(), (p.residual + s).abs()]
    }))
    .map_or(1.0, |r| r.1)
    .max(1e-9)
        * 1.2;
    let (_, h) = root.dim_in_pixel();
    let body = root.margin(10, 0, 0, 0);
    let (panels_area, bottom) = body.split_vertically(h as i32 - 70);
    // Equal plots: the last panel is taller by the x labels it alone carries.
    let each = (h as i32 - 70 - 10 - 26) / n.max(1) as i32;
    let breaks: Vec<i32> = (1..n.max(1) as i32).map(|i| i * each).collect();
    let panels = panels_area.split_by_breakpoints(Vec::<i32>::new(), breaks);
    let yd = tick_decimals(2.0 * m).max(1);
    let last = panels.len().saturating_sub(1);
    for (s, area) in panels.iter().enumerate() {
        let series = &input.series[s];
        let mut chart = ChartBuilder::on(area)
            .margin_left(14)
            .margin_right(24)
            .margin_top(6)
            .margin_bottom(6)
            .set_label_area_size(LabelAreaPosition::Left, 80)
            .set_label_area_size(LabelAreaPosition::Bottom, if s == last { 26 } else { 0 })
            .build_cartesian_2d(x0..x1, -m..m)
            .map_err(fe)?;
        let xd = tick_decimals(x1 - x0);
        chart
            .configure_mesh()
            .y_labels(5)
            .x_labels(8)
            .y_desc("residual")
            .axis_desc_style((FONT, NOTE_SIZE))
            .x_label_formatter(&|v| {
                if s == last {
                    fixed(*v, xd)
                } else {
                    String::new()
                }
            })
            .y_label_formatter(&|v| fixed(*v, yd))
            .label_style((FONT, TICK_SIZE))
            .bold_line_style(RGBColor(215, 215, 215).stroke_width(1))
            .light_line_style(TRANSPARENT)
            .draw()
            .map_err(fe)?;
        chart
            .draw_series(std::iter::once(PathElement::new(
                vec![(x0, 0.0), (x1, 0.0)],
                GREY.stroke_width(1),
            )))
            .map_err(fe)?;
        let col = colour(s);
        let pts = fit.points(s).unwrap_or(&[]);
        let clip = |v: f64| v.clamp(-m, m);
        let bars: Vec<PathElement<(f64, f64)>> = pts
            .iter()
            .filter_map(|p| {
                let sg = p.sigma_ln_k?;
                let x = tu.from_kelvin(p.t_k);
                sg.is_finite().then(|| {
                    PathElement::new(
                        vec![(x, clip(p.residual - sg)), (x, clip(p.residual + sg))],
                        col.mix(0.7).stroke_width(2),
                    )
                })
            })
            .collect();
        chart.draw_series(bars).map_err(fe)?;
        let at = |p: &&isochore_fit::PointDiagnostics| (tu.from_kelvin(p.t_k), clip(p.residual));
        let used: Vec<(f64, f64)> = pts.iter().filter(|p| p.used).map(|p| at(&p)).collect();
        let excluded: Vec<(f64, f64)> = pts.iter().filter(|p| !p.used).map(|p| at(&p)).collect();
        draw_markers(&mut chart, s, &used, true)?;
        draw_markers(&mut chart, s, &excluded, false)?;
        // The series' name in the panel's upper left, on a white ground.
        let (px, py) = chart.backend_coord(&(x0, m));
        let label = series.label.clone();
        let w = (label.chars().count() as f32 * NOTE_SIZE as f32 * 0.62) as i32 + 34;
        root.draw(&Rectangle::new(
            [(px + 6, py + 4), (px + 6 + w, py + 24)],
            WHITE.mix(0.85).filled(),
        ))
        .map_err(fe)?;
        root.draw(&Marker {
            at: (px + 18, py + 14),
            s,
            filled: true,
        })
        .map_err(fe)?;
        root.draw(&Text::new(
            label,
            (px + 30, py + 6),
            (FONT, NOTE_SIZE + 1).into_font().color(&INK),
        ))
        .map_err(fe)?;
    }
    let (bw, _) = bottom.dim_in_pixel();
    bottom
        .draw(&Text::new(
            crate::present::names::t_axis(tu),
            ((bw / 2) as i32 + 40, 30),
            (FONT, DESC_SIZE)
                .into_font()
                .color(&INK)
                .pos(Pos::new(HPos::Center, VPos::Center)),
        ))
        .map_err(fe)?;
    bottom
        .draw(&Text::new(
            "residual ln K − fitted, by series (common scale)",
            ((bw / 2) as i32 + 40, 56),
            (FONT, NOTE_SIZE)
                .into_font()
                .color(&GREY)
                .pos(Pos::new(HPos::Center, VPos::Center)),
        ))
        .map_err(fe)?;
    Ok(())
}

/// ΔH° (y) against ΔS° at θ, or against ΔG° at the T_hm of all points (`gibbs`), with each
/// series' joint confidence region from the separate fits.
fn compensation_plot(
    root: &Area,
    input: &JointReportInput,
    gibbs: bool,
) -> Result<(), ReportError> {
    let (Some(c), Some(t)) = (&input.compensation, &input.equality) else {
        return no_data(
            root,
            "compensation analysis (three or more series are needed)",
        );
    };
    let full = t.full();
    let level = full.options().level;
    let theta = full.options().t_ref_k;
    let t_hm = full.t_harmonic_all_k();
    let eu = present::energy(input.energy_unit);
    let su = present::per_kelvin(input.energy_unit);
    let xu = if gibbs { eu } else { su };
    let mut regions: Vec<Vec<(f64, f64)>> = Vec::new();
    let mut centres: Vec<(f64, f64)> = Vec::new();
    for (s, p) in c.points.iter().enumerate() {
        let poly = if gibbs {
            full.h_g_region(s, theta, t_hm, level, 120)
        } else {
            full.h_s_region(s, theta, level, 120)
        };
        let poly: Vec<(f64, f64)> = poly
            .map(|v| {
                v.iter()
                    .map(|q| (xu.from_si(q[1]), eu.from_si(q[0])))
                    .collect()
            })
            .unwrap_or_default();
        regions.push(poly);
        let x = if gibbs {
            full.delta_g_at(s, t_hm).map_or(f64::NAN, |g| g.value)
        } else {
            p.delta_s
        };
        centres.push((xu.from_si(x), eu.from_si(p.delta_h)));
    }
    let every = regions.iter().flatten().chain(centres.iter());
    let (Some(xr), Some(yr)) = (
        finite_range(every.clone().map(|p| p.0)),
        finite_range(every.map(|p| p.1)),
    ) else {
        return no_data(root, "confidence regions");
    };
    let (x0, x1) = padded(xr, 0.12);
    let (y0, y1) = padded(yr, 0.12);
    let names_at = if gibbs { t_hm } else { theta };
    let x_desc = crate::present::names::compensation_x_axis(
        gibbs,
        names_at,
        input.temperature_unit,
        xu.symbol,
    );
    let y_desc = crate::present::names::compensation_h_axis(eu.symbol);
    let mut chart = framed_chart(
        root,
        Frame {
            x: (x0, x1),
            y: (y0, y1),
            x_desc: &x_desc,
            y_desc: &y_desc,
            left: 84,
            top: 14,
            y_decimals: None,
        },
    )?;
    if !gibbs {
        // A straight line y = through.1 + k (x − through.0) (k in display units), cut to
        // the plot's box: two end points, so a dashed line stays straight.
        let clip_line = |k: f64, through: (f64, f64)| -> Vec<(f64, f64)> {
            let y = |x: f64| through.1 + k * (x - through.0);
            let x_at = |yv: f64| through.0 + (yv - through.1) / k;
            let (mut a, mut b) = (x0, x1);
            if k != 0.0 {
                let (xa, xb) = (x_at(y0), x_at(y1));
                a = a.max(xa.min(xb));
                b = b.min(xa.max(xb));
            }
            if a < b {
                vec![(a, y(a)), (b, y(b))]
            } else {
                Vec::new()
            }
        };
        let per = su.si_per_unit / eu.si_per_unit;
        let n = centres.len() as f64;
        let mean = (
            centres.iter().map(|p| p.0).sum::<f64>() / n,
            centres.iter().map(|p| p.1).sum::<f64>() / n,
        );
        let grey_line = clip_line(t_hm * per, mean);
        if grey_line.len() >= 2 {
            chart
                .draw_series(DashedLineSeries::new(grey_line, 9, 6, GREY.stroke_width(2)))
                .map_err(fe)?
                .label(crate::present::names::t_hm_slope_line(t_hm))
                .legend(|(x, y)| {
                    DashedPathElement::new(vec![(x, y), (x + 22, y)], 6, 4, GREY.stroke_width(2))
                });
        }
        if let Some(b) = &c.beta {
            // ΔH° = α + β ΔS° in SI, drawn in display units.
            let line = clip_line(b.beta * per, (0.0, b.alpha / eu.si_per_unit));
            if line.len() >= 2 {
                chart
                    .draw_series(LineSeries::new(line, INK.stroke_width(2)))
                    .map_err(fe)?
                    .label(crate::present::names::beta_line(b.beta))
                    .legend(|(x, y)| {
                        PathElement::new(vec![(x, y), (x + 22, y)], INK.stroke_width(2))
                    });
            }
        }
    }
    for (s, poly) in regions.iter().enumerate() {
        let col = colour(s);
        if poly.len() >= 3 {
            chart
                .draw_series(std::iter::once(Polygon::new(
                    poly.clone(),
                    col.mix(0.22).filled(),
                )))
                .map_err(fe)?;
            let mut closed = poly.clone();
            closed.push(poly[0]);
            chart
                .draw_series(LineSeries::new(closed, col.stroke_width(2)))
                .map_err(fe)?
                .label(input.series[s].label.clone())
                .legend(move |(x, y)| {
                    EmptyElement::at((x, y))
                        + Rectangle::new([(0, -6), (22, 6)], col.mix(0.22).filled())
                        + Marker {
                            at: (11, 0),
                            s,
                            filled: true,
                        }
                });
        }
        draw_markers(&mut chart, s, &centres[s..=s], true)?;
    }
    let labels: Vec<((f64, f64), String)> = centres
        .iter()
        .zip(&input.series)
        .map(|(c, s)| (*c, s.label.clone()))
        .collect();
    marks::draw_labels(&mut chart, labels)?;
    let mut occupied: Vec<(f64, f64)> = regions.iter().flatten().copied().collect();
    occupied.extend(centres.iter().copied());
    draw_key(&mut chart, emptiest_corner(&occupied, (x0, x1), (y0, y1)))
}
