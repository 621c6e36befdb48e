//! Points on a figure: error bars, used and excluded points, flag rings, and the envelopes
//! that stand for the points of a large series.

use super::*;

/// Draws error bars, used points (filled), excluded points (hollow), flag rings and row
/// labels for excluded or flagged points, with legend entries for what is present.
pub(super) fn draw_points<'a, 'b, CT>(
    chart: &mut ChartContext<'a, SVGBackend<'b>, CT>,
    input: &ReportInput,
    pos: impl Fn(&isochore_fit::PointDiagnostics) -> (f64, f64),
    sigma: impl Fn(&isochore_fit::PointDiagnostics) -> Option<f64>,
) -> Result<(), ReportError>
where
    CT: CoordTranslate<From = (f64, f64)>,
{
    let pts = input.fit.points();
    let finite = |p: &&isochore_fit::PointDiagnostics| {
        let (x, y) = pos(p);
        x.is_finite() && y.is_finite()
    };
    if pts.iter().filter(finite).count() > ENVELOPE_ABOVE {
        return draw_many_points(chart, input, pos);
    }
    let bars: Vec<PathElement<(f64, f64)>> = pts
        .iter()
        .filter_map(|p| {
            let (x, y) = pos(p);
            let s = sigma(p)?;
            (x.is_finite() && y.is_finite() && s.is_finite()).then(|| {
                PathElement::new(vec![(x, y - s), (x, y + s)], INK.mix(0.7).stroke_width(2))
            })
        })
        .collect();
    chart.draw_series(bars).map_err(fe)?;
    if pts.iter().filter(finite).any(|p| p.used) {
        chart
            .draw_series(
                pts.iter()
                    .filter(finite)
                    .filter(|p| p.used)
                    .map(|p| Circle::new(pos(p), 5, INK.filled())),
            )
            .map_err(fe)?
            .label("used point")
            .legend(|(x, y)| Circle::new((x + 11, y), 5, INK.filled()));
    }
    if pts.iter().filter(finite).any(|p| !p.used) {
        chart
            .draw_series(
                pts.iter()
                    .filter(finite)
                    .filter(|p| !p.used)
                    .map(|p| Circle::new(pos(p), 6, INK.stroke_width(2))),
            )
            .map_err(fe)?
            .label("excluded point")
            .legend(|(x, y)| Circle::new((x + 11, y), 6, INK.stroke_width(2)));
    }
    let flagged: Vec<(f64, f64)> = pts
        .iter()
        .filter(finite)
        .filter(|p| p.flags.any())
        .map(&pos)
        .collect();
    if !flagged.is_empty() {
        draw_flag_rings(chart, &flagged, Rings::Each, "flagged point".into())?;
    }
    // Row labels for the points a reader will look for.
    let labels: Vec<_> = input
        .rows
        .iter()
        .zip(pts)
        .filter(|(_, p)| finite(p) && (!p.used || p.flags.any()))
        .take(60)
        .map(|(r, p)| (pos(p), format!("row {}", r.row)))
        .collect();
    draw_labels(chart, labels)
}

/// Writes a short label beside each point, each placed where it overlaps no label already
/// written and stays inside the plotting area (above right, below right, above left, below
/// left; a label with no free place is left out rather than drawn over another).
pub(super) fn draw_labels<'a, 'b, CT>(
    chart: &mut ChartContext<'a, SVGBackend<'b>, CT>,
    labels: Vec<((f64, f64), String)>,
) -> Result<(), ReportError>
where
    CT: CoordTranslate<From = (f64, f64)>,
{
    let (xr, yr) = chart.plotting_area().get_pixel_range();
    let h = NOTE_SIZE as i32;
    let mut taken: Vec<(i32, i32, i32, i32)> = Vec::new();
    let mut placed = Vec::new();
    for (at, text) in labels {
        let (px, py) = chart.plotting_area().map_coordinate(&at);
        // DejaVu Sans averages a little under 0.6 em per character.
        let w = (text.chars().count() as f32 * NOTE_SIZE as f32 * 0.6).ceil() as i32;
        // Clear of a flag ring (radius 8 at this scale) as well as of the point.
        let tries = [(12, -h - 6), (12, 6), (-w - 12, -h - 6), (-w - 12, 6)];
        let free = tries.into_iter().find(|&(dx, dy)| {
            let b = (px + dx, py + dy, px + dx + w, py + dy + h);
            b.0 >= xr.start
                && b.2 <= xr.end
                && b.1 >= yr.start
                && b.3 <= yr.end
                && !taken
                    .iter()
                    .any(|t| b.0 < t.2 && t.0 < b.2 && b.1 < t.3 && t.1 < b.3)
        });
        if let Some((dx, dy)) = free {
            taken.push((px + dx, py + dy, px + dx + w, py + dy + h));
            placed.push(
                EmptyElement::at(at)
                    + Text::new(text, (dx, dy), (FONT, NOTE_SIZE).into_font().color(&GREY)),
            );
        }
    }
    chart.draw_series(placed).map_err(fe)?;
    Ok(())
}

/// How flagged points are ringed: one large ring around each point of a small series, or
/// small rings at the extremes of each envelope column of a large one.
#[derive(Clone, Copy, PartialEq, Eq)]
pub(super) enum Rings {
    /// Every point, ringed wide.
    Each,
    /// The column extremes of a large series ([`envelope_extremes`]), ringed small.
    Extremes,
}

/// Rings flagged points in the flag colour, with the key entry `label`.
pub(super) fn draw_flag_rings<'a, 'b, CT>(
    chart: &mut ChartContext<'a, SVGBackend<'b>, CT>,
    flagged: &[(f64, f64)],
    rings: Rings,
    label: String,
) -> Result<(), ReportError>
where
    CT: CoordTranslate<From = (f64, f64)>,
{
    let (points, radius, width) = match rings {
        Rings::Each => (flagged.to_vec(), 11, 3),
        Rings::Extremes => (envelope_extremes(flagged), 6, 2),
    };
    chart
        .draw_series(
            points
                .into_iter()
                .map(|p| Circle::new(p, radius, ORANGE.stroke_width(width))),
        )
        .map_err(fe)?
        .label(label)
        .legend(|(x, y)| Circle::new((x + 11, y), 8, ORANGE.stroke_width(3)));
    Ok(())
}

/// Draws the used points of a large series as their envelope, with its key entry.
pub(super) fn draw_used_envelope<'a, 'b, CT>(
    chart: &mut ChartContext<'a, SVGBackend<'b>, CT>,
    used: &[(f64, f64)],
) -> Result<(), ReportError>
where
    CT: CoordTranslate<From = (f64, f64)>,
{
    let style = INK.mix(0.6).stroke_width(2);
    draw_envelope(chart, used, style)?
        .label(format!("used points ({}, range per column)", used.len()))
        .legend(move |(x, y)| PathElement::new(vec![(x + 11, y - 7), (x + 11, y + 7)], style));
    Ok(())
}

/// A large series: used and excluded points as envelopes (no error bars, no row labels),
/// flagged points as rings at the extremes of each column of flagged points.
pub(super) fn draw_many_points<'a, 'b, CT>(
    chart: &mut ChartContext<'a, SVGBackend<'b>, CT>,
    input: &ReportInput,
    pos: impl Fn(&isochore_fit::PointDiagnostics) -> (f64, f64),
) -> Result<(), ReportError>
where
    CT: CoordTranslate<From = (f64, f64)>,
{
    let pts = input.fit.points();
    let used: Vec<(f64, f64)> = pts.iter().filter(|p| p.used).map(&pos).collect();
    let excluded: Vec<(f64, f64)> = pts.iter().filter(|p| !p.used).map(&pos).collect();
    let flagged: Vec<(f64, f64)> = pts.iter().filter(|p| p.flags.any()).map(&pos).collect();
    if !used.is_empty() {
        draw_used_envelope(chart, &used)?;
    }
    if !excluded.is_empty() {
        let style = GREY.stroke_width(2);
        draw_envelope(chart, &excluded, style)?
            .label(format!("excluded points ({})", excluded.len()))
            .legend(move |(x, y)| PathElement::new(vec![(x + 11, y - 7), (x + 11, y + 7)], style));
    }
    if !flagged.is_empty() {
        let label = if flagged.len() > ENVELOPE_ABOVE {
            format!("flagged points ({}; extremes shown)", flagged.len())
        } else {
            "flagged point".to_string()
        };
        draw_flag_rings(chart, &flagged, Rings::Extremes, label)?;
    }
    Ok(())
}
