//! The fonts a PDF report embeds: the bundled DejaVu Sans regular and bold, each cut down to
//! the glyphs the document's text uses (allsorts' subsetter, the one printpdf itself uses
//! when built with its layout engine).
//!
//! printpdf without its layout engine embeds a font whole: the two fonts were 1.47 MB of
//! every PDF (740 KB compressed) and compressing them at zlib's best level took a quarter of
//! a report set's time. A subset keeps each used glyph's outline and advance width and maps
//! the same characters to it (a Unicode cmap), so the pages look the same and their text
//! reads back the same (printpdf writes the ToUnicode map from the characters shown).

use crate::fonts;
use crate::ReportError;
use printpdf::ParsedFont;
use std::collections::BTreeSet;

/// Tables kept in a subset: the minimal set of an OpenType font (cmap, head, hhea, hmtx,
/// maxp, name, OS/2, post) and the TrueType instructions (cvt, fpgm, prep) some viewers use
/// when drawing small text on screen; glyf and loca are always written.
fn tables() -> Vec<u32> {
    use allsorts::tag;
    vec![
        tag::CMAP,
        tag::HEAD,
        tag::HHEA,
        tag::HMTX,
        tag::MAXP,
        tag::NAME,
        tag::OS_2,
        tag::POST,
        tag::CVT,
        tag::FPGM,
        tag::PREP,
    ]
}

/// The bytes of `font` (a TrueType file) with only the glyphs of `chars` (and .notdef).
///
/// # Errors
/// The subsetter's message when the font cannot be read or written.
pub(crate) fn subset(font: &[u8], chars: &BTreeSet<char>) -> Result<Vec<u8>, String> {
    use allsorts::binary::read::ReadScope;
    use allsorts::font_data::FontData;
    use allsorts::subset::{CmapTarget, SubsetProfile};
    let face = ttf_parser::Face::parse(font, 0).map_err(|e| e.to_string())?;
    // .notdef first (the subsetter requires it), then each used glyph once.
    let used: BTreeSet<u16> = chars
        .iter()
        .filter_map(|&c| face.glyph_index(c))
        .map(|g| g.0)
        .filter(|&g| g != 0)
        .collect();
    let ids: Vec<u16> = std::iter::once(0).chain(used).collect();
    let scope = ReadScope::new(font);
    let data = scope.read::<FontData<'_>>().map_err(|e| e.to_string())?;
    let provider = data.table_provider(0).map_err(|e| e.to_string())?;
    allsorts::subset::subset(
        &provider,
        &ids,
        &SubsetProfile::Custom(tables()),
        CmapTarget::Unicode,
    )
    .map_err(|e| e.to_string())
}

/// The font printpdf embeds for the bundled regular or bold face and the characters a
/// document shows in it: the subset, or the whole font should subsetting fail.
///
/// # Errors
/// [`ReportError::Pdf`] when not even the whole font can be parsed.
pub(crate) fn embedded(bold: bool, chars: &BTreeSet<char>) -> Result<ParsedFont, ReportError> {
    let whole = if bold { fonts::BOLD } else { fonts::REGULAR };
    let mut warnings = Vec::new();
    if let Ok(bytes) = subset(whole, chars) {
        if let Some(font) = ParsedFont::from_bytes(&bytes, 0, &mut warnings) {
            return Ok(font);
        }
    }
    ParsedFont::from_bytes(whole, 0, &mut warnings).ok_or_else(|| {
        ReportError::Pdf(format!(
            "the bundled {} font could not be parsed",
            if bold { "bold" } else { "regular" }
        ))
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn subset_keeps_each_used_glyph_and_its_width() {
        let text = "ΔH° = −31.2 ± 0.4 kJ/mol, χ² at 25 °C, K⁻¹ … page 1 of 7";
        let chars: BTreeSet<char> = text.chars().collect();
        for font in [fonts::REGULAR, fonts::BOLD] {
            let bytes = subset(font, &chars).unwrap();
            assert!(bytes.len() * 10 < font.len(), "{} bytes", bytes.len());
            let whole = ttf_parser::Face::parse(font, 0).unwrap();
            let part = ttf_parser::Face::parse(&bytes, 0).unwrap();
            for c in chars.iter().copied().filter(|c| !c.is_whitespace()) {
                let (g0, g1) = (whole.glyph_index(c).unwrap(), part.glyph_index(c));
                let g1 = g1.unwrap_or_else(|| panic!("{c:?} lost"));
                assert_eq!(
                    whole.glyph_hor_advance(g0),
                    part.glyph_hor_advance(g1),
                    "{c:?}"
                );
                assert_eq!(
                    whole.glyph_bounding_box(g0),
                    part.glyph_bounding_box(g1),
                    "{c:?}"
                );
            }
            // A character the text does not use is gone.
            assert!(part.glyph_index('Z').is_none());
            assert_eq!(part.units_per_em(), whole.units_per_em());
        }
    }

    #[test]
    fn embedded_font_parses() {
        let chars: BTreeSet<char> = "Van 't Hoff plot".chars().collect();
        assert!(embedded(false, &chars).is_ok());
        assert!(embedded(true, &chars).is_ok());
    }
}
