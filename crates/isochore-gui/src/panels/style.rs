//! Colours and marker shapes shared by the panels; numbers are written by
//! `isochore_report::present` (re-exported here as `sig`, `fixed` and `diag`). Series colours are the
//! Okabe–Ito set, chosen to stay distinct for the common forms of colour blindness; each
//! series also gets its own marker shape so colour is never the only cue.

use egui::Color32;
use egui_plot::MarkerShape;
pub use isochore_report::present::{diag, fixed, sig};

const PALETTE: [Color32; 6] = [
    Color32::from_rgb(0, 114, 178),   // blue
    Color32::from_rgb(213, 94, 0),    // vermillion
    Color32::from_rgb(0, 158, 115),   // bluish green
    Color32::from_rgb(204, 121, 167), // reddish purple
    Color32::from_rgb(86, 180, 233),  // sky blue
    Color32::from_rgb(128, 128, 128), // grey
];

/// Only shapes with a hollow form: an excluded point is drawn as its series' marker,
/// hollow, so a shape drawn with lines alone (asterisk, cross) could not show it.
const SHAPES: [MarkerShape; 7] = [
    MarkerShape::Circle,
    MarkerShape::Square,
    MarkerShape::Diamond,
    MarkerShape::Up,
    MarkerShape::Down,
    MarkerShape::Left,
    MarkerShape::Right,
];

/// The colour of the series at position `index`. Six colours and seven shapes, both
/// taken by position, give 42 series before a colour–shape pair comes back (the pair of
/// `index` is its remainders by 6 and by 7). No series colour is a state's colour: the
/// flag ring is orange ([`flag_ring_color`]), the hover halo black or yellow.
pub fn series_color(index: usize) -> Color32 {
    PALETTE[index % PALETTE.len()]
}

/// The marker shape of the series at position `index`.
pub fn series_shape(index: usize) -> MarkerShape {
    SHAPES[index % SHAPES.len()]
}

/// The colour of the ring around a flagged point, as in the report's figures (orange; a
/// little lighter on the dark theme).
pub fn flag_ring_color(dark: bool) -> Color32 {
    if dark {
        Color32::from_rgb(245, 180, 40)
    } else {
        Color32::from_rgb(230, 159, 0)
    }
}

/// The name of a marker shape, for legends in words.
pub fn shape_name(shape: MarkerShape) -> &'static str {
    match shape {
        MarkerShape::Circle => "circles",
        MarkerShape::Square => "squares",
        MarkerShape::Diamond => "diamonds",
        MarkerShape::Up => "triangles",
        MarkerShape::Down => "inverted triangles",
        MarkerShape::Left => "left-pointing triangles",
        MarkerShape::Right => "right-pointing triangles",
        _ => "markers",
    }
}

/// Draws a series' marker (its shape, in its colour) in a small square, as in the plots:
/// the key beside series names, so that colour is never the only cue.
pub fn marker_swatch(ui: &mut egui::Ui, index: usize) -> egui::Response {
    let (rect, resp) = ui.allocate_exact_size(egui::vec2(14.0, 14.0), egui::Sense::hover());
    let c = rect.center();
    let r = 5.0;
    let color = series_color(index);
    let p = ui.painter();
    let poly = |pts: Vec<egui::Pos2>| egui::Shape::convex_polygon(pts, color, egui::Stroke::NONE);
    match series_shape(index) {
        MarkerShape::Square => {
            p.rect_filled(
                egui::Rect::from_center_size(c, egui::vec2(2.0 * r, 2.0 * r)),
                0.0,
                color,
            );
        }
        MarkerShape::Diamond => {
            p.add(poly(vec![
                c + egui::vec2(0.0, -r),
                c + egui::vec2(r, 0.0),
                c + egui::vec2(0.0, r),
                c + egui::vec2(-r, 0.0),
            ]));
        }
        MarkerShape::Up => {
            p.add(poly(vec![
                c + egui::vec2(0.0, -r),
                c + egui::vec2(r, r),
                c + egui::vec2(-r, r),
            ]));
        }
        MarkerShape::Down => {
            p.add(poly(vec![
                c + egui::vec2(-r, -r),
                c + egui::vec2(r, -r),
                c + egui::vec2(0.0, r),
            ]));
        }
        MarkerShape::Left => {
            p.add(poly(vec![
                c + egui::vec2(-r, 0.0),
                c + egui::vec2(r, -r),
                c + egui::vec2(r, r),
            ]));
        }
        MarkerShape::Right => {
            p.add(poly(vec![
                c + egui::vec2(r, 0.0),
                c + egui::vec2(-r, r),
                c + egui::vec2(-r, -r),
            ]));
        }
        _ => {
            p.circle_filled(c, r, color);
        }
    }
    resp
}

/// Draws a decimated series' envelope as one thin polyline through the kept points in
/// x order (each pixel column's lowest then highest point): the strokes run up and down
/// every column, so the band the million points fill reads as filled, not as two edges.
pub fn envelope_fill(
    pu: &mut egui_plot::PlotUi<'_>,
    name: &str,
    pts: Vec<[f64; 2]>,
    color: Color32,
) {
    if pts.len() < 2 {
        return;
    }
    pu.line(
        egui_plot::Line::new(name.to_string(), egui_plot::PlotPoints::new(pts))
            .color(color.gamma_multiply(0.55))
            .width(1.0)
            .allow_hover(false),
    );
}

/// Axis hints for the workbench's plots: tick labels are kept until they are 38 points
/// apart (x) or 14 (y), so a short axis still shows several numbers (egui_plot's own
/// defaults hide them below 60 and 20 points, which leaves short axes with a lone "0").
pub fn x_axis(label: impl Into<egui::WidgetText>) -> egui_plot::AxisHints<'static> {
    egui_plot::AxisHints::new_x()
        .label(label)
        .label_spacing(38.0..=54.0)
}

/// The y counterpart of [`x_axis`].
pub fn y_axis(label: impl Into<egui::WidgetText>) -> egui_plot::AxisHints<'static> {
    egui_plot::AxisHints::new_y()
        .label(label)
        .label_spacing(14.0..=22.0)
}

/// Grid steps in 1, 2, 5 × 10ⁿ, about five large steps across the visible range (with
/// halves and tenths between): egui_plot's own grid steps by tens, so a short axis over
/// −8 … 8 had only "0" to write. For `Plot::x_grid_spacer` / `y_grid_spacer` through
/// `egui_plot::uniform_grid_spacer`.
pub fn nice_steps(input: egui_plot::GridInput) -> [f64; 3] {
    let span = (input.bounds.1 - input.bounds.0).abs();
    let raw = if span.is_finite() && span > 0.0 {
        span / 5.0
    } else {
        1.0
    };
    let mag = 10f64.powf(raw.log10().floor());
    let large = [1.0, 2.0, 5.0, 10.0]
        .into_iter()
        .map(|m| m * mag)
        .find(|s| *s >= raw)
        .unwrap_or(10.0 * mag);
    [large / 10.0, large / 2.0, large]
}

/// The colour used to mark flagged values (legible on light and dark backgrounds).
pub fn flag_color(dark: bool) -> Color32 {
    if dark {
        Color32::from_rgb(255, 140, 90)
    } else {
        Color32::from_rgb(190, 40, 0)
    }
}

/// The colour of the hover and selection halo.
pub fn highlight_color(dark: bool) -> Color32 {
    if dark {
        Color32::from_rgb(255, 230, 80)
    } else {
        Color32::from_rgb(20, 20, 20)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn grid_steps_are_round_and_about_five_across() {
        let steps = |lo: f64, hi: f64| {
            nice_steps(egui_plot::GridInput {
                bounds: (lo, hi),
                base_step_size: 0.0,
            })
        };
        // −8 … 8 (the influence plot): large steps of 5, so −5, 0 and 5 are written.
        assert_eq!(steps(-8.0, 8.0)[2], 5.0);
        assert_eq!(steps(0.0, 0.55)[2], 0.2);
        assert_eq!(steps(-0.45, 0.12)[2], 0.2);
    }

    #[test]
    fn every_shape_has_a_hollow_form_and_no_pair_repeats_for_42_series() {
        let mut pairs = std::collections::HashSet::new();
        for i in 0..42 {
            let shape = series_shape(i);
            assert!(
                !matches!(
                    shape,
                    MarkerShape::Asterisk | MarkerShape::Cross | MarkerShape::Plus
                ),
                "series {i}: {shape:?} has no hollow form"
            );
            assert!(
                pairs.insert((series_color(i), shape as u8)),
                "series {i} repeats"
            );
            // No series takes a state's colour.
            for dark in [false, true] {
                assert_ne!(series_color(i), flag_ring_color(dark));
                assert_ne!(series_color(i), flag_color(dark));
                assert_ne!(series_color(i), highlight_color(dark));
            }
        }
    }
}
