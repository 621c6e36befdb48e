//! The static figures of a report, drawn with plotters into SVG and rasterised to PNG with
//! resvg: the van 't Hoff plot (fit, shaded confidence band, dashed prediction band, hollow
//! excluded points, ringed flagged points, temperature on the top axis), the residual plot,
//! the influence plot (leverage against studentized residual with Cook's-distance contours)
//! and the joint ΔH°–ΔS° confidence ellipse.
//!
//! One drawing path serves both formats: the SVG is the figure, and the PNG is that SVG
//! rendered by resvg with the bundled DejaVu Sans, so the two never disagree and no system
//! font lookup is needed. Colours come from a colour-blind-safe set (blue,
//! orange, bluish green, grey) and every distinction is also carried by shape or line style.

use crate::fonts;
use crate::present::{self, fixed};
use crate::{ReportError, ReportInput};
use isochore_fit::influence::{cooks_contour_external, influence_coordinates, FlagLimits};
use isochore_fit::TemperatureUnit;
use plotters::chart::SeriesAnno;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// Width of every figure in SVG pixels.
pub const WIDTH: u32 = 760;
/// Height of every figure in SVG pixels.
pub const HEIGHT: u32 = 520;
/// PNG scale factor: 760 × 2.6 = 1976 pixels, i.e. 300 dpi at 16.7 cm wide.
pub const PNG_SCALE: f32 = 2.6;
/// Resolution recorded in the PNG files, dots per inch.
pub const PNG_DPI: f64 = 300.0;

const FIT_BLUE: RGBColor = RGBColor(0, 92, 158);
const BAND_SKY: RGBColor = RGBColor(86, 180, 233);
const ORANGE: RGBColor = RGBColor(230, 159, 0);
const GREEN: RGBColor = RGBColor(0, 140, 100);
const INK: RGBColor = RGBColor(30, 30, 30);
const GREY: RGBColor = RGBColor(110, 110, 110);

const FONT: &str = "sans-serif";
const TICK_SIZE: u32 = 16;
const DESC_SIZE: u32 = 18;
const NOTE_SIZE: u32 = 14;

/// Above this many drawable points a series is drawn as its envelope: for each of
/// [`ENVELOPE_COLUMNS`] columns of the plot, one bar from the lowest to the highest point
/// in it. A million points then cost a few hundred SVG elements (resvg refuses documents of
/// millions of nodes), and every column's extent is still exact, so no outlier disappears.
pub const ENVELOPE_ABOVE: usize = 2000;
/// Columns of an envelope: about one per 1.6 SVG pixels of plot width.
pub const ENVELOPE_COLUMNS: usize = 400;

/// The envelope of `points` over `columns` equal columns spanning `[x0, x1]`: for each
/// column holding a point, its centre and the lowest and highest y. Non-finite points are
/// left out. A rendering step, not a statistic: one pass, no sorting.
pub fn column_envelope(
    points: impl IntoIterator<Item = (f64, f64)>,
    (x0, x1): (f64, f64),
    columns: usize,
) -> Vec<(f64, f64, f64)> {
    let columns = columns.max(1);
    let span = x1 - x0;
    let mut lo = vec![f64::INFINITY; columns];
    let mut hi = vec![f64::NEG_INFINITY; columns];
    for (x, y) in points {
        if !(x.is_finite() && y.is_finite()) {
            continue;
        }
        let c = if span > 0.0 && span.is_finite() {
            (((x - x0) / span) * columns as f64).floor()
        } else {
            0.0
        };
        let c = (c.max(0.0) as usize).min(columns - 1);
        lo[c] = lo[c].min(y);
        hi[c] = hi[c].max(y);
    }
    (0..columns)
        .filter(|&c| lo[c] <= hi[c])
        .map(|c| {
            let xc = if span > 0.0 && span.is_finite() {
                x0 + span * (c as f64 + 0.5) / columns as f64
            } else {
                x0
            };
            (xc, lo[c], hi[c])
        })
        .collect()
}

/// Draws the envelope of `points` (see [`column_envelope`]) as one bar per column, each
/// at least a few pixels tall so a column holding a single value still shows.
fn draw_envelope<'a, 'b, 'c, CT>(
    chart: &'c mut ChartContext<'a, SVGBackend<'b>, CT>,
    points: &[(f64, f64)],
    style: ShapeStyle,
) -> Result<&'c mut SeriesAnno<'a, SVGBackend<'b>>, ReportError>
where
    CT: CoordTranslate<From = (f64, f64)>,
{
    let xr = finite_range(points.iter().map(|p| p.0)).unwrap_or((0.0, 1.0));
    let bars: Vec<_> = column_envelope(points.iter().copied(), xr, ENVELOPE_COLUMNS)
        .into_iter()
        .map(|(x, lo, hi)| {
            let (_, py_lo) = chart.plotting_area().map_coordinate(&(x, lo));
            let (_, py_hi) = chart.plotting_area().map_coordinate(&(x, hi));
            EmptyElement::at((x, lo))
                + PathElement::new(vec![(0, 2), (0, py_hi - py_lo - 2)], style)
        })
        .collect();
    chart.draw_series(bars).map_err(fe)
}

/// At most two points per envelope column (its lowest and highest), for marking flagged
/// points of a large series without drawing every one.
fn envelope_extremes(points: &[(f64, f64)]) -> Vec<(f64, f64)> {
    if points.len() <= ENVELOPE_ABOVE {
        return points.to_vec();
    }
    let Some((x0, x1)) = finite_range(points.iter().map(|p| p.0)) else {
        return Vec::new();
    };
    let columns = ENVELOPE_COLUMNS;
    let span = x1 - x0;
    let mut lo: Vec<Option<(f64, f64)>> = vec![None; columns];
    let mut hi: Vec<Option<(f64, f64)>> = vec![None; columns];
    for &(x, y) in points.iter().filter(|p| p.0.is_finite() && p.1.is_finite()) {
        let c = if span > 0.0 {
            ((((x - x0) / span) * columns as f64).floor().max(0.0) as usize).min(columns - 1)
        } else {
            0
        };
        if lo[c].is_none_or(|p| y < p.1) {
            lo[c] = Some((x, y));
        }
        if hi[c].is_none_or(|p| y > p.1) {
            hi[c] = Some((x, y));
        }
    }
    lo.into_iter()
        .zip(hi)
        .flat_map(|(a, b)| {
            let b = if a == b { None } else { b };
            [a, b]
        })
        .flatten()
        .collect()
}

/// Which figure: the four of a single fit's report ([`FigureKind::ALL`]) and the four of
/// a joint fit's ([`FigureKind::JOINT`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum FigureKind {
    /// ln K against 1000/T with fit, confidence and prediction bands.
    VantHoff,
    /// Residuals against temperature.
    Residuals,
    /// Studentized residual against leverage with Cook's-distance contours.
    Influence,
    /// Joint confidence regions of ΔH° with ΔS° and of ΔH° with ΔG° at T_hm, side by side.
    Ellipse,
    /// A joint fit: every series' points with the line the joint fit gives it.
    SeriesVantHoff,
    /// A joint fit: the residuals of each series in a panel of its own.
    SeriesResiduals,
    /// A joint fit's compensation analysis: ΔH° against ΔS° with each series' region.
    CompensationEntropy,
    /// A joint fit's compensation analysis: ΔH° against ΔG°(T_hm) with each series' region.
    CompensationGibbs,
}

impl FigureKind {
    /// Every figure, in report order.
    pub const ALL: [FigureKind; 4] = [
        FigureKind::VantHoff,
        FigureKind::Residuals,
        FigureKind::Influence,
        FigureKind::Ellipse,
    ];

    /// The figures of a joint fit's report, in report order (the compensation figures
    /// only with three or more series).
    pub const JOINT: [FigureKind; 4] = [
        FigureKind::SeriesVantHoff,
        FigureKind::SeriesResiduals,
        FigureKind::CompensationEntropy,
        FigureKind::CompensationGibbs,
    ];

    /// Short name used in file names: "vanthoff", "residuals", "influence", "ellipse".
    pub fn key(self) -> &'static str {
        match self {
            FigureKind::VantHoff => "vanthoff",
            FigureKind::Residuals => "residuals",
            FigureKind::Influence => "influence",
            FigureKind::Ellipse => "ellipse",
            FigureKind::SeriesVantHoff => "vanthoff-by-series",
            FigureKind::SeriesResiduals => "residuals-by-series",
            FigureKind::CompensationEntropy => "compensation-dh-ds",
            FigureKind::CompensationGibbs => "compensation-dh-dg",
        }
    }

    /// A title for people.
    pub fn title(self) -> &'static str {
        match self {
            FigureKind::VantHoff => "Van 't Hoff plot",
            FigureKind::Residuals => "Residuals",
            FigureKind::Influence => "Influence",
            FigureKind::Ellipse => "Joint confidence regions: ΔH°–ΔS° and ΔH°–ΔG° at T_hm",
            FigureKind::SeriesVantHoff => "Van 't Hoff plot by series",
            FigureKind::SeriesResiduals => "Residuals by series",
            FigureKind::CompensationEntropy => "ΔH° against ΔS°",
            FigureKind::CompensationGibbs => "ΔH° against ΔG°(T_hm)",
        }
    }
}

fn fe<E: std::fmt::Debug>(e: E) -> ReportError {
    ReportError::Figure(format!("{e:?}"))
}

/// Draws one figure as an SVG document.
///
/// # Errors
/// [`ReportError::Figure`] when plotters fails (for example, no finite data to draw).
pub fn figure_svg(input: &ReportInput, kind: FigureKind) -> Result<String, ReportError> {
    fonts::register_for_plotters();
    let mut buf = String::new();
    {
        let root = SVGBackend::with_string(&mut buf, (WIDTH, HEIGHT)).into_drawing_area();
        root.fill(&WHITE).map_err(fe)?;
        match kind {
            FigureKind::VantHoff => vant_hoff(&root, input)?,
            FigureKind::Residuals => residuals(&root, input)?,
            FigureKind::Influence => influence(&root, input)?,
            FigureKind::Ellipse => ellipse(&root, input)?,
            joint => {
                return Err(ReportError::Input(format!(
                    "the figure “{}” belongs to the report of a joint fit",
                    joint.title()
                )))
            }
        }
        root.present().map_err(fe)?;
    }
    Ok(buf)
}

/// Draws one figure as a PNG at publication resolution ([`PNG_SCALE`] × the SVG size,
/// tagged [`PNG_DPI`] dots per inch).
///
/// # Errors
/// As [`figure_svg`], or when rasterising fails.
pub fn figure_png(input: &ReportInput, kind: FigureKind) -> Result<Vec<u8>, ReportError> {
    svg_to_png(&figure_svg(input, kind)?, PNG_SCALE)
}

/// Rasterises an SVG document with the bundled fonts at `scale`, on white.
///
/// # Errors
/// [`ReportError::Figure`] when the SVG cannot be parsed or the image is empty.
pub fn svg_to_png(svg: &str, scale: f32) -> Result<Vec<u8>, ReportError> {
    encode_png(&rasterise(svg, scale)?)
}

/// Rasterises an SVG document with the bundled fonts at `scale`, on white (the pixels
/// [`svg_to_png`] encodes).
///
/// # Errors
/// [`ReportError::Figure`] when the SVG cannot be parsed or the image is empty.
pub(crate) fn rasterise(svg: &str, scale: f32) -> Result<resvg::tiny_skia::Pixmap, ReportError> {
    rasterise_into(svg, scale, None)
}

/// As [`rasterise`], drawing into `spare` when it has the right size (the previous figure's
/// raster, whose memory the process already has: on this project's 2-core machine the
/// kernel's zeroing of a fresh 10 MB raster took longer than drawing the figure). The
/// pixels are the same either way: the raster is filled white first.
///
/// # Errors
/// As [`rasterise`].
pub(crate) fn rasterise_into(
    svg: &str,
    scale: f32,
    spare: Option<resvg::tiny_skia::Pixmap>,
) -> Result<resvg::tiny_skia::Pixmap, ReportError> {
    use resvg::{tiny_skia, usvg};
    let opt = usvg::Options {
        fontdb: fonts::font_database(),
        font_family: fonts::FAMILY.to_string(),
        ..usvg::Options::default()
    };
    let tree = usvg::Tree::from_str(svg, &opt).map_err(fe)?;
    let size = tree.size();
    let w = (size.width() * scale).ceil() as u32;
    let h = (size.height() * scale).ceil() as u32;
    let mut pixmap = match spare {
        Some(p) if (p.width(), p.height()) == (w, h) => p,
        _ => tiny_skia::Pixmap::new(w, h)
            .ok_or_else(|| ReportError::Figure("empty figure".to_string()))?,
    };
    pixmap.fill(tiny_skia::Color::WHITE);
    resvg::render(
        &tree,
        tiny_skia::Transform::from_scale(scale, scale),
        &mut pixmap.as_mut(),
    );
    Ok(pixmap)
}

fn finite_range(values: impl Iterator<Item = f64>) -> Option<(f64, f64)> {
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for v in values.filter(|v| v.is_finite()) {
        lo = lo.min(v);
        hi = hi.max(v);
    }
    (lo <= hi).then_some((lo, hi))
}

fn padded((lo, hi): (f64, f64), frac: f64) -> (f64, f64) {
    let span = if hi > lo {
        hi - lo
    } else {
        lo.abs().max(1.0) * 0.1
    };
    (lo - span * frac, hi + span * frac)
}

/// Decimals for tick labels over a span (about six ticks).
fn tick_decimals(span: f64) -> usize {
    let step = span / 6.0;
    if !(step.is_finite() && step > 0.0) {
        return 2;
    }
    (-step.log10().floor()).clamp(0.0, 6.0) as usize
}

/// Round temperatures (in `unit`) to label the top axis, as positions on 1000/T between
/// `x0` and `x1`, with the number of decimals to write them with. The window's van 't Hoff
/// plot labels its top axis with the same temperatures.
pub fn temperature_keys(x0: f64, x1: f64, unit: TemperatureUnit) -> (Vec<f64>, usize) {
    let t_hi = unit.from_kelvin(1000.0 / x0);
    let t_lo = unit.from_kelvin(1000.0 / x1);
    let span = (t_hi - t_lo).abs();
    let steps = [
        0.1, 0.2, 0.5, 1.0, 2.0, 5.0, 10.0, 20.0, 25.0, 50.0, 100.0, 200.0, 500.0,
    ];
    let step = steps
        .iter()
        .copied()
        .find(|s| span / s <= 7.0)
        .unwrap_or(1000.0);
    let decimals = if step < 1.0 { 1 } else { 0 };
    let mut keys = Vec::new();
    let mut t = (t_lo.min(t_hi) / step).ceil() * step;
    while t <= t_lo.max(t_hi) + 1e-9 && keys.len() < 40 {
        let k = unit.to_kelvin(t);
        if k > 0.0 {
            keys.push(1000.0 / k);
        }
        t += step;
    }
    (keys, decimals)
}

type Area<'a> = DrawingArea<SVGBackend<'a>, plotters::coord::Shift>;

/// The plot corner with the fewest points (positions normalised to the axes), for the legend.
fn emptiest_corner(points: &[(f64, f64)], x: (f64, f64), y: (f64, f64)) -> SeriesLabelPosition {
    let norm = |p: &(f64, f64)| ((p.0 - x.0) / (x.1 - x.0), (p.1 - y.0) / (y.1 - y.0));
    let corners = [
        (SeriesLabelPosition::UpperRight, 0.55, 1.0, 0.62, 1.0),
        (SeriesLabelPosition::UpperLeft, 0.0, 0.45, 0.62, 1.0),
        (SeriesLabelPosition::LowerRight, 0.55, 1.0, 0.0, 0.38),
        (SeriesLabelPosition::LowerLeft, 0.0, 0.45, 0.0, 0.38),
    ];
    let mut best = (usize::MAX, SeriesLabelPosition::UpperRight);
    for (pos, xa, xb, ya, yb) in corners {
        let n = points
            .iter()
            .map(norm)
            .filter(|(u, v)| *u >= xa && *u <= xb && *v >= ya && *v <= yb)
            .count();
        if n < best.0 {
            best = (n, pos);
        }
    }
    best.1
}

/// What differs between the figures' frames; everything else (margins, grid, fonts, tick
/// labels with decimals suited to the span) is shared by [`framed_chart`].
struct Frame<'t> {
    x: (f64, f64),
    y: (f64, f64),
    x_desc: &'t str,
    y_desc: &'t str,
    /// Width of the left label area in pixels.
    left: u32,
    /// Top margin in pixels (room for a second axis above the plot).
    top: u32,
    /// Decimals of the y tick labels, when not chosen from the span.
    y_decimals: Option<usize>,
}

type Chart<'a, 'b> = ChartContext<
    'a,
    SVGBackend<'b>,
    Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
>;

/// A chart on `root` with the house frame drawn: light grid, axis titles, tick labels.
fn framed_chart<'a, 'b>(root: &'a Area<'b>, f: Frame<'_>) -> Result<Chart<'a, 'b>, ReportError> {
    let ((x0, x1), (y0, y1)) = (f.x, f.y);
    let mut chart = ChartBuilder::on(root)
        .margin(14)
        .margin_right(24)
        .margin_top(f.top)
        .set_label_area_size(LabelAreaPosition::Left, f.left)
        .set_label_area_size(LabelAreaPosition::Bottom, 58)
        .build_cartesian_2d(x0..x1, y0..y1)
        .map_err(fe)?;
    let xd = tick_decimals(x1 - x0);
    let yd = f.y_decimals.unwrap_or_else(|| tick_decimals(y1 - y0));
    chart
        .configure_mesh()
        .x_desc(f.x_desc)
        .y_desc(f.y_desc)
        .x_label_formatter(&|v| fixed(*v, xd))
        .y_label_formatter(&|v| fixed(*v, yd))
        .label_style((FONT, TICK_SIZE))
        .axis_desc_style((FONT, DESC_SIZE))
        .bold_line_style(RGBColor(200, 200, 200).stroke_width(1))
        .light_line_style(TRANSPARENT)
        .draw()
        .map_err(fe)?;
    Ok(chart)
}

/// Draws the key of the series that carry a label, in the house style, at `position`.
fn draw_key<'a, 'b: 'a>(
    chart: &mut Chart<'a, 'b>,
    position: SeriesLabelPosition,
) -> Result<(), ReportError> {
    chart
        .configure_series_labels()
        .position(position)
        .margin(12)
        .label_font((FONT, NOTE_SIZE))
        .background_style(WHITE.mix(0.9))
        .border_style(RGBColor(160, 160, 160))
        .draw()
        .map_err(fe)
}

/// The top axis of a van 't Hoff plot: round temperatures in `tu`, placed on the 1000/T
/// scale of `chart` between `x0` and `x1`, with the axis title above them.
fn top_temperature_axis(
    root: &Area,
    chart: &Chart<'_, '_>,
    (x0, x1): (f64, f64),
    y1: f64,
    tu: TemperatureUnit,
) -> Result<(), ReportError> {
    let (keys, t_dec) = temperature_keys(x0, x1, tu);
    let tick_style = (FONT, TICK_SIZE).into_font().color(&INK);
    let (left, top) = chart.backend_coord(&(x0, y1));
    let (right, _) = chart.backend_coord(&(x1, y1));
    root.draw(&PathElement::new(
        vec![(left, top), (right, top)],
        INK.stroke_width(1),
    ))
    .map_err(fe)?;
    for k in &keys {
        let (px, _) = chart.backend_coord(&(*k, y1));
        root.draw(&PathElement::new(
            vec![(px, top), (px, top - 6)],
            INK.stroke_width(1),
        ))
        .map_err(fe)?;
        let label = fixed(tu.from_kelvin(1000.0 / k), t_dec);
        root.draw(&Text::new(
            label,
            (px, top - 9),
            tick_style.clone().pos(Pos::new(HPos::Center, VPos::Bottom)),
        ))
        .map_err(fe)?;
    }
    root.draw(&Text::new(
        crate::present::names::t_axis(tu),
        ((left + right) / 2, top - 32),
        (FONT, DESC_SIZE)
            .into_font()
            .color(&INK)
            .pos(Pos::new(HPos::Center, VPos::Bottom)),
    ))
    .map_err(fe)
}

fn no_data(root: &Area, what: &str) -> Result<(), ReportError> {
    root.draw(&Text::new(
        format!("no {what} to draw"),
        (40, (HEIGHT / 2) as i32),
        (FONT, DESC_SIZE).into_font().color(&GREY),
    ))
    .map_err(fe)
}

mod joint;
mod marks;
mod plots;
mod png_file;

pub(crate) use png_file::{encode_png, idat_stream, IdatStream};

pub(crate) use joint::joint_figure_svg;

use marks::{draw_flag_rings, draw_labels, draw_points, draw_used_envelope, Rings};
use plots::{ellipse, influence, residuals, vant_hoff};

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn envelope_keeps_every_columns_extremes() {
        // 10,000 points on a saw-tooth with two planted outliers; the envelope over 50
        // columns must hold, per column, exactly the lowest and highest y of the points
        // whose x falls in it (checked by a direct scan), and both outliers.
        let mut pts: Vec<(f64, f64)> = (0..10_000)
            .map(|i| (i as f64 / 10_000.0, ((i * 37) % 101) as f64 / 100.0))
            .collect();
        pts[1234].1 = 40.0;
        pts[8765].1 = -40.0;
        pts.push((f64::NAN, 1e9)); // not drawable: ignored
        let env = column_envelope(pts.iter().copied(), (0.0, 1.0), 50);
        assert_eq!(env.len(), 50);
        for (c, &(xc, lo, hi)) in env.iter().enumerate() {
            let inside: Vec<f64> = pts
                .iter()
                .filter(|p| p.0.is_finite() && ((p.0 * 50.0).floor() as usize).min(49) == c)
                .map(|p| p.1)
                .collect();
            let want_lo = inside.iter().copied().fold(f64::INFINITY, f64::min);
            let want_hi = inside.iter().copied().fold(f64::NEG_INFINITY, f64::max);
            assert_eq!((lo, hi), (want_lo, want_hi), "column {c}");
            assert!((xc - (c as f64 + 0.5) / 50.0).abs() < 1e-12);
        }
        assert!(env.iter().any(|e| e.2 == 40.0) && env.iter().any(|e| e.1 == -40.0));
        // The flagged-point extremes: at most two per column, the outliers among them.
        let ext = envelope_extremes(&pts[..10_000]);
        assert!(ext.len() <= 2 * ENVELOPE_COLUMNS);
        assert!(ext.contains(&pts[1234]) && ext.contains(&pts[8765]));
    }

    #[test]
    fn temperature_keys_are_round_celsius() {
        // 1000/T from 3.0 to 3.6 K⁻¹ spans about 4.6 °C to 60.2 °C.
        let (keys, dec) = temperature_keys(3.0, 3.6, TemperatureUnit::Celsius);
        assert_eq!(dec, 0);
        let temps: Vec<f64> = keys
            .iter()
            .map(|k| TemperatureUnit::Celsius.from_kelvin(1000.0 / k))
            .collect();
        assert!(temps.len() >= 3 && temps.len() <= 8, "{temps:?}");
        for t in temps {
            assert!((t / 10.0 - (t / 10.0).round()).abs() < 1e-9, "{t}");
        }
    }
}
