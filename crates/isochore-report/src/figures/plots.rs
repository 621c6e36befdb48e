//! The four figures: the van 't Hoff plot, the residuals, the influence plot and the joint
//! ΔH°–ΔS° confidence ellipse.

use super::*;

pub(super) fn vant_hoff(root: &Area, input: &ReportInput) -> Result<(), ReportError> {
    let fit = &input.fit;
    let level = present::level_percent(fit);
    let xs = fit.points().iter().map(|p| 1000.0 / p.t_k);
    let Some(xr) = finite_range(xs) else {
        return no_data(root, "points");
    };
    let (x0, x1) = padded(xr, 0.08);
    let grid: Vec<f64> = (0..=160)
        .map(|i| (x0 + (x1 - x0) * i as f64 / 160.0) / 1000.0)
        .collect();
    let bands = fit.bands(&grid);
    let ys = fit
        .points()
        .iter()
        .flat_map(|p| {
            let s = p.sigma_ln_k.unwrap_or(0.0);
            [p.ln_k - s, p.ln_k + s]
        })
        .chain(bands.iter().flat_map(|b| [b.pi_low, b.pi_high]));
    let Some(yr) = finite_range(ys) else {
        return no_data(root, "values");
    };
    let (y0, y1) = padded(yr, 0.06);
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
    top_temperature_axis(root, &chart, (x0, x1), y1, input.temperature_unit)?;

    let x_of = |b: &isochore_fit::BandPoint| b.inv_t * 1000.0;
    // Confidence band, shaded.
    let mut poly: Vec<(f64, f64)> = bands.iter().map(|b| (x_of(b), b.ci_high)).collect();
    poly.extend(bands.iter().rev().map(|b| (x_of(b), b.ci_low)));
    chart
        .draw_series(std::iter::once(Polygon::new(
            poly,
            BAND_SKY.mix(0.38).filled(),
        )))
        .map_err(fe)?
        .label(format!("{level}% confidence band"))
        .legend(|(x, y)| {
            Rectangle::new([(x, y - 6), (x + 22, y + 6)], BAND_SKY.mix(0.38).filled())
        });
    // Prediction band, dashed.
    let dashed = FIT_BLUE.stroke_width(2);
    chart
        .draw_series(DashedLineSeries::new(
            bands
                .iter()
                .map(|b| (x_of(b), b.pi_high))
                .collect::<Vec<_>>(),
            9,
            6,
            dashed,
        ))
        .map_err(fe)?
        .label(format!("{level}% prediction band"))
        .legend(move |(x, y)| DashedPathElement::new(vec![(x, y), (x + 22, y)], 6, 4, dashed));
    chart
        .draw_series(DashedLineSeries::new(
            bands
                .iter()
                .map(|b| (x_of(b), b.pi_low))
                .collect::<Vec<_>>(),
            9,
            6,
            dashed,
        ))
        .map_err(fe)?;
    // The fit.
    chart
        .draw_series(LineSeries::new(
            bands.iter().map(|b| (x_of(b), b.ln_k)),
            FIT_BLUE.stroke_width(3),
        ))
        .map_err(fe)?
        .label("fit")
        .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 22, y)], FIT_BLUE.stroke_width(3)));
    draw_points(
        &mut chart,
        input,
        |p| (1000.0 / p.t_k, p.ln_k),
        |p| p.sigma_ln_k,
    )?;
    let mut occupied: Vec<(f64, f64)> = fit
        .points()
        .iter()
        .map(|p| (1000.0 / p.t_k, p.ln_k))
        .collect();
    occupied.extend(
        bands
            .iter()
            .step_by(8)
            .flat_map(|b| [(x_of(b), b.pi_low), (x_of(b), b.pi_high), (x_of(b), b.ln_k)]),
    );
    draw_key(&mut chart, emptiest_corner(&occupied, (x0, x1), (y0, y1)))
}

pub(super) fn residuals(root: &Area, input: &ReportInput) -> Result<(), ReportError> {
    let fit = &input.fit;
    let tu = input.temperature_unit;
    let Some(xr) = finite_range(fit.points().iter().map(|p| tu.from_kelvin(p.t_k))) else {
        return no_data(root, "points");
    };
    let (x0, x1) = padded(xr, 0.08);
    let ys = fit.points().iter().flat_map(|p| {
        let s = p.sigma_ln_k.unwrap_or(0.0);
        [p.residual - s, p.residual + s]
    });
    let (ylo, yhi) = finite_range(ys).unwrap_or((-1.0, 1.0));
    let m = ylo.abs().max(yhi.abs()).max(1e-9) * 1.18;
    let (y0, y1) = (-m, m);
    let mut chart = framed_chart(
        root,
        Frame {
            x: (x0, x1),
            y: (y0, y1),
            x_desc: &crate::present::names::t_axis(tu),
            y_desc: "residual ln K − fitted",
            left: 80,
            top: 14,
            y_decimals: None,
        },
    )?;
    chart
        .draw_series(std::iter::once(PathElement::new(
            vec![(x0, 0.0), (x1, 0.0)],
            FIT_BLUE.stroke_width(2),
        )))
        .map_err(fe)?;
    draw_points(
        &mut chart,
        input,
        |p| (tu.from_kelvin(p.t_k), p.residual),
        |p| p.sigma_ln_k,
    )?;
    let occupied: Vec<(f64, f64)> = fit
        .points()
        .iter()
        .map(|p| (tu.from_kelvin(p.t_k), p.residual))
        .collect();
    draw_key(&mut chart, emptiest_corner(&occupied, (x0, x1), (y0, y1)))
}

pub(super) fn influence(root: &Area, input: &ReportInput) -> Result<(), ReportError> {
    let fit = &input.fit;
    // The limits and contours come from the fit crate, as the diagnostics applied them.
    let limits = FlagLimits::of(fit);
    let h_thr = limits.leverage;
    let used: Vec<(usize, f64, f64, bool)> = input
        .rows
        .iter()
        .zip(fit.points())
        .filter_map(|(r, d)| {
            let [h, t] = influence_coordinates(d)?;
            Some((r.row, h, t, d.flags.any()))
        })
        .collect();
    if used.is_empty() {
        return no_data(root, "studentized residuals (too few degrees of freedom)");
    }
    let h_max = used.iter().map(|u| u.1).fold(0.0f64, f64::max);
    let x1 = (h_max.max(h_thr) * 1.15).clamp(0.05, 1.0);
    let r_max = used.iter().map(|u| u.2.abs()).fold(0.0f64, f64::max);
    let ylim = (r_max * 1.15).max(limits.studentized + 0.6);
    let mut chart = framed_chart(
        root,
        Frame {
            x: (0.0, x1),
            y: (-ylim, ylim),
            x_desc: "leverage h",
            y_desc: crate::present::names::STUDENTIZED,
            left: 72,
            top: 14,
            y_decimals: Some(1),
        },
    )?;
    // Reference lines: residual ±threshold, leverage threshold.
    let dotted = GREY.stroke_width(2);
    for y in [limits.studentized, -limits.studentized, 0.0] {
        chart
            .draw_series(DashedLineSeries::new(vec![(0.0, y), (x1, y)], 3, 5, dotted))
            .map_err(fe)?;
    }
    if h_thr < x1 {
        chart
            .draw_series(DashedLineSeries::new(
                vec![(h_thr, -ylim), (h_thr, ylim)],
                3,
                5,
                dotted,
            ))
            .map_err(fe)?;
    }
    // Cook's distance contours at the flag limit and at D = 1, 200 leverages across the plot.
    // Each is named in the key, told apart by its dashes: a label on the plot would sit
    // where the curves converge, and a curve would strike through it.
    for (i, d) in limits.contour_levels().into_iter().enumerate() {
        let style = GREEN.stroke_width(2);
        let (dash, gap) = if i == 0 { (12, 5) } else { (4, 4) };
        let upper = cooks_contour_external(d, fit.params().len(), fit.dof(), x1 / 200.0, x1, 200);
        let curve = |sign: f64| -> Vec<(f64, f64)> {
            upper
                .iter()
                .map(|&[h, r]| (h, sign * r))
                .filter(|(_, r)| r.abs() <= ylim)
                .collect()
        };
        for sign in [1.0, -1.0] {
            let c = curve(sign);
            if c.len() < 2 {
                continue;
            }
            let s = chart
                .draw_series(DashedLineSeries::new(c.clone(), dash, gap, style))
                .map_err(fe)?;
            if sign > 0.0 {
                let text = if i == 0 {
                    format!("Cook's D = {} (flag limit)", fixed(d, 2))
                } else {
                    format!("Cook's D = {}", fixed(d, 2))
                };
                s.label(text).legend(move |(x, y)| {
                    DashedPathElement::new(vec![(x, y), (x + 22, y)], dash, gap, style)
                });
            }
        }
    }
    let flagged: Vec<(f64, f64)> = used.iter().filter(|u| u.3).map(|u| (u.1, u.2)).collect();
    if used.len() > ENVELOPE_ABOVE {
        let all: Vec<(f64, f64)> = used.iter().map(|u| (u.1, u.2)).collect();
        draw_used_envelope(&mut chart, &all)?;
        if !flagged.is_empty() {
            let label = format!("flagged points ({})", flagged.len());
            draw_flag_rings(&mut chart, &flagged, Rings::Extremes, label)?;
        }
        let occupied = envelope_extremes(&all);
        return draw_key(
            &mut chart,
            emptiest_corner(&occupied, (0.0, x1), (-ylim, ylim)),
        );
    }
    chart
        .draw_series(
            used.iter()
                .map(|&(_, h, r, _)| Circle::new((h, r), 5, INK.filled())),
        )
        .map_err(fe)?
        .label("used point")
        .legend(|(x, y)| Circle::new((x + 11, y), 5, INK.filled()));
    if !flagged.is_empty() {
        draw_flag_rings(&mut chart, &flagged, Rings::Each, "flagged point".into())?;
    }
    if used.len() <= 40 {
        let labels = used.iter().map(|&(row, h, r, _)| ((h, r), row.to_string()));
        draw_labels(&mut chart, labels.collect())?;
    }
    let occupied: Vec<(f64, f64)> = used.iter().map(|u| (u.1, u.2)).collect();
    draw_key(
        &mut chart,
        emptiest_corner(&occupied, (0.0, x1), (-ylim, ylim)),
    )
}

pub(super) fn ellipse(root: &Area, input: &ReportInput) -> Result<(), ReportError> {
    let fit = &input.fit;
    let eu = present::energy(input.energy_unit);
    let su = present::per_kelvin(input.energy_unit);
    let level = fit.options().level;
    // Left: ΔH° with ΔS° at θ (a needle when they are strongly correlated); right: ΔH°
    // with ΔG° at T_hm, where ΔG° is uncorrelated with ΔH° for the linear model (Krug,
    // Hunter & Grieger 1976), the pair worth quoting.
    let (left, right) = root.split_horizontally(WIDTH / 2);
    match fit.ellipse(level, 180) {
        Ok(poly) => {
            let pts: Vec<(f64, f64)> = poly
                .iter()
                .map(|v| (eu.from_si(v[0]), su.from_si(v[1])))
                .collect();
            let centre = (
                eu.from_si(fit.delta_h().value),
                su.from_si(fit.delta_s().value),
            );
            region_panel(
                &left,
                input,
                &pts,
                centre,
                (
                    &crate::present::names::quantity_axis("ΔH°", eu.symbol),
                    &crate::present::names::quantity_axis("ΔS°", su.symbol),
                ),
                fit.corr_h_s(),
            )?;
        }
        Err(_) => no_data(&left, "ΔH°–ΔS° region (degenerate covariance)")?,
    }
    match fit.h_g_region(level, 180) {
        Ok(poly) => {
            let t = fit.t_harmonic_k();
            let pts: Vec<(f64, f64)> = poly
                .iter()
                .map(|v| (eu.from_si(v[0]), eu.from_si(v[1])))
                .collect();
            let centre = (
                eu.from_si(fit.delta_h_at(t).value),
                eu.from_si(fit.delta_g(t).value),
            );
            region_panel(
                &right,
                input,
                &pts,
                centre,
                (
                    &crate::present::names::quantity_axis("ΔH°", eu.symbol),
                    &crate::present::names::quantity_axis("ΔG° at T_hm", eu.symbol),
                ),
                fit.corr_h_g_harmonic(),
            )
        }
        Err(_) => no_data(&right, "ΔH°–ΔG° region (degenerate covariance)"),
    }
}

/// One joint confidence region (display units) with its estimate and correlation r.
fn region_panel(
    root: &Area,
    input: &ReportInput,
    pts: &[(f64, f64)],
    centre: (f64, f64),
    (x_desc, y_desc): (&str, &str),
    r: f64,
) -> Result<(), ReportError> {
    let fit = &input.fit;
    let Some(xr) = finite_range(pts.iter().map(|p| p.0)) else {
        return no_data(root, "confidence region");
    };
    let Some(yr) = finite_range(pts.iter().map(|p| p.1)) else {
        return no_data(root, "confidence region");
    };
    let (x0, x1) = padded(xr, 0.12);
    // Room above the region for the key.
    let (y0, y1) = padded(yr, 0.12);
    let y1 = y1 + (y1 - y0) * 0.35;
    let mut chart = framed_chart(
        root,
        Frame {
            x: (x0, x1),
            y: (y0, y1),
            x_desc,
            y_desc,
            left: 80,
            top: 14,
            y_decimals: None,
        },
    )?;
    let level = present::level_percent(fit);
    chart
        .draw_series(std::iter::once(Polygon::new(
            pts.to_vec(),
            BAND_SKY.mix(0.35).filled(),
        )))
        .map_err(fe)?
        .label(format!("{level}% joint region"))
        .legend(|(x, y)| {
            Rectangle::new([(x, y - 6), (x + 22, y + 6)], BAND_SKY.mix(0.35).filled())
        });
    let mut closed = pts.to_vec();
    closed.push(pts[0]);
    chart
        .draw_series(LineSeries::new(closed, FIT_BLUE.stroke_width(2)))
        .map_err(fe)?;
    chart
        .draw_series(std::iter::once(Cross::new(centre, 7, INK.stroke_width(2))))
        .map_err(fe)?
        .label(format!("estimate (r = {})", fixed(r, 4)))
        .legend(|(x, y)| Cross::new((x + 11, y), 6, INK.stroke_width(2)));
    draw_key(&mut chart, SeriesLabelPosition::UpperLeft)
}
