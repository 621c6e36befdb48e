//! The bundled fonts (DejaVu Sans regular and bold, under the permissive DejaVu/Bitstream
//! Vera licence in `assets/fonts/`) and their registration with the figure and PDF code, so
//! ΔH°, °C, ⁻¹ and ± render the same on every machine without system font lookup.

use std::sync::OnceLock;

/// DejaVu Sans, regular.
pub(crate) static REGULAR: &[u8] = include_bytes!("../assets/fonts/DejaVuSans.ttf");
/// DejaVu Sans, bold.
pub(crate) static BOLD: &[u8] = include_bytes!("../assets/fonts/DejaVuSans-Bold.ttf");

/// The family name the figures ask for.
pub(crate) const FAMILY: &str = "DejaVu Sans";

/// Registers the fonts with plotters' text measurement once per process.
pub(crate) fn register_for_plotters() {
    static ONCE: OnceLock<()> = OnceLock::new();
    ONCE.get_or_init(|| {
        use plotters::style::FontStyle;
        for name in ["sans-serif", FAMILY] {
            // Both fonts are valid TrueType files compiled into the binary; a failure here
            // would only make text measurement fall back, never panic.
            let _ = plotters::style::register_font(name, FontStyle::Normal, REGULAR);
            let _ = plotters::style::register_font(name, FontStyle::Bold, BOLD);
        }
    });
}

/// A font database holding only the bundled fonts, for rasterising SVG.
pub(crate) fn font_database() -> std::sync::Arc<resvg::usvg::fontdb::Database> {
    static DB: OnceLock<std::sync::Arc<resvg::usvg::fontdb::Database>> = OnceLock::new();
    DB.get_or_init(|| {
        let mut db = resvg::usvg::fontdb::Database::new();
        db.load_font_data(REGULAR.to_vec());
        db.load_font_data(BOLD.to_vec());
        db.set_sans_serif_family(FAMILY);
        std::sync::Arc::new(db)
    })
    .clone()
}

/// Advance widths of the regular or bold font, for laying out PDF text.
pub(crate) struct Metrics {
    face: ttf_parser::Face<'static>,
    units_per_em: f32,
}

impl Metrics {
    /// Metrics of the regular (`bold == false`) or bold face.
    pub(crate) fn new(bold: bool) -> Option<Metrics> {
        let face = ttf_parser::Face::parse(if bold { BOLD } else { REGULAR }, 0).ok()?;
        let units_per_em = face.units_per_em() as f32;
        Some(Metrics { face, units_per_em })
    }

    /// Width of `text` at `size` points, in points.
    pub(crate) fn width(&self, text: &str, size: f32) -> f32 {
        let units: f32 = text
            .chars()
            .map(|c| {
                self.face
                    .glyph_index(c)
                    .and_then(|g| self.face.glyph_hor_advance(g))
                    .unwrap_or((self.units_per_em * 0.6) as u16) as f32
            })
            .sum();
        units * size / self.units_per_em
    }
}
