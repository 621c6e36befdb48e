//! A PDF report's figures: each figure's PNG file, embedded as an image XObject. An 8-bit
//! RGB file's IDAT stream goes in as it stands (Flate with the PNG predictors); anything
//! else is decoded and handed to printpdf.

use crate::figures::IdatStream;
use crate::ReportError;
use printpdf::{DictItem, ExternalStream, ExternalXObject, Px, RawImage};
use std::collections::BTreeMap;

/// Dots per inch of the figures on the page (the PNG files' resolution).
pub(crate) const FIGURE_DPI: f32 = 300.0;

/// An image XObject holding a PNG file's IDAT stream: Flate with the PNG predictors
/// (`/Predictor 15`: each row starts with its PNG filter type), three 8-bit colours per
/// pixel (ISO 32000-1, 7.4.4.4 and 8.9.5). The pixels are the PNG file's, at its full size.
pub(crate) fn image_xobject(s: IdatStream) -> ExternalXObject {
    let name = |n: &str| DictItem::Name(n.as_bytes().to_vec());
    let int = |i: u32| DictItem::Int(i64::from(i));
    let parms = BTreeMap::from([
        ("Predictor".to_string(), DictItem::Int(15)),
        ("Colors".to_string(), DictItem::Int(3)),
        ("BitsPerComponent".to_string(), DictItem::Int(8)),
        ("Columns".to_string(), int(s.width)),
    ]);
    let dict = BTreeMap::from([
        ("Type".to_string(), name("XObject")),
        ("Subtype".to_string(), name("Image")),
        ("Width".to_string(), int(s.width)),
        ("Height".to_string(), int(s.height)),
        ("ColorSpace".to_string(), name("DeviceRGB")),
        ("BitsPerComponent".to_string(), DictItem::Int(8)),
        ("Filter".to_string(), name("FlateDecode")),
        ("DecodeParms".to_string(), DictItem::Dict { map: parms }),
    ]);
    ExternalXObject {
        stream: ExternalStream {
            dict,
            content: s.zlib,
            compress: false,
        },
        width: Some(Px(s.width as usize)),
        height: Some(Px(s.height as usize)),
        dpi: Some(FIGURE_DPI),
    }
}

/// The pixels of a figure's PNG file (RGBA, as decoded from it), for a file a PDF cannot
/// embed as it stands.
pub(crate) fn image_of_png(png: &[u8]) -> Result<RawImage, ReportError> {
    let mut warn = Vec::new();
    RawImage::decode_from_bytes(png, &mut warn).map_err(ReportError::Pdf)
}
