//! The PNG files of the rasterised figures, and the compressed pixels a PDF embeds from them.
//!
//! A figure is drawn on white, so every pixel is opaque: the file is then 8-bit RGB (colour
//! type 2), whose pixels decode to exactly the RGBA the rasteriser made with alpha 255. The
//! rows are filtered adaptively and compressed with the `png` crate's fast DEFLATE
//! (fdeflate); the pixels are the ones a slower setting would store, only the bytes differ.
//! The zlib stream of such a file (its IDAT chunks) is also a valid PDF image stream (Flate
//! with the PNG predictors, ISO 32000-1 §7.4.4.4), so the PDF embeds the very bytes of the
//! PNG file without compressing anything again ([`idat_stream`]).

use crate::ReportError;
use resvg::tiny_skia::Pixmap;
use std::io::Write;

use super::PNG_DPI;

/// Encodes a rasterised figure as a PNG file tagged [`PNG_DPI`] dots per inch.
///
/// # Errors
/// [`ReportError::Figure`] when encoding fails.
pub(crate) fn encode_png(pixmap: &Pixmap) -> Result<Vec<u8>, ReportError> {
    let fe = |e: png::EncodingError| ReportError::Figure(format!("PNG encoding: {e}"));
    let (w, h) = (pixmap.width(), pixmap.height());
    // Alpha of every pixel ANDed, a block at a time (no early exit inside a block, so the
    // loop vectorises).
    let opaque = pixmap
        .data()
        .chunks(1 << 14)
        .all(|block| block.chunks_exact(4).fold(255u8, |a, p| a & p[3]) == 255);
    let mut out = Vec::with_capacity(w as usize * h as usize / 4);
    {
        let mut encoder = png::Encoder::new(&mut out, w, h);
        encoder.set_color(if opaque {
            png::ColorType::Rgb
        } else {
            png::ColorType::Rgba
        });
        encoder.set_depth(png::BitDepth::Eight);
        encoder.set_compression(png::Compression::Fast);
        encoder.set_filter(png::Filter::Adaptive);
        let ppm = (PNG_DPI / 0.0254).round() as u32;
        encoder.set_pixel_dims(Some(png::PixelDimensions {
            xppu: ppm,
            yppu: ppm,
            unit: png::Unit::Meter,
        }));
        let mut writer = encoder.write_header().map_err(fe)?;
        let mut stream = writer.stream_writer_with_size(1 << 18).map_err(fe)?;
        let io = |e: std::io::Error| ReportError::Figure(format!("PNG encoding: {e}"));
        if opaque {
            // Alpha 255 everywhere: the premultiplied pixels are the straight ones.
            // Each pixel's four bytes are copied 3 bytes apart, the next pixel overwriting
            // the alpha (one spare byte at the end for the last).
            let mut row = vec![0; w as usize * 3 + 1];
            for line in pixmap.data().chunks_exact(w as usize * 4) {
                for (i, rgba) in line.chunks_exact(4).enumerate() {
                    row[3 * i..3 * i + 4].copy_from_slice(rgba);
                }
                stream.write_all(&row[..w as usize * 3]).map_err(io)?;
            }
        } else {
            let straight = pixmap.clone().take_demultiplied();
            stream.write_all(&straight).map_err(io)?;
        }
        stream.finish().map_err(fe)?;
    }
    Ok(out)
}

/// The compressed pixels of an 8-bit RGB PNG file, ready to be a PDF image stream.
pub(crate) struct IdatStream {
    /// Pixels per row.
    pub width: u32,
    /// Rows.
    pub height: u32,
    /// The zlib stream of the IDAT chunks, rows filtered with the PNG filters.
    pub zlib: Vec<u8>,
}

/// The IDAT stream of a PNG file when a PDF can embed it as it stands: 8-bit RGB, not
/// interlaced, every chunk's CRC-32 right. `None` for anything else (the caller decodes).
pub(crate) fn idat_stream(png: &[u8]) -> Option<IdatStream> {
    const SIGNATURE: &[u8] = b"\x89PNG\r\n\x1a\n";
    let mut rest = png.strip_prefix(SIGNATURE)?;
    let mut header = None;
    let mut zlib = Vec::new();
    while rest.len() >= 12 {
        let len = u32::from_be_bytes(rest[..4].try_into().ok()?) as usize;
        let kind = &rest[4..8];
        let body = rest.get(8..8 + len)?;
        let crc = u32::from_be_bytes(rest.get(8 + len..12 + len)?.try_into().ok()?);
        if crc32fast::hash(&rest[4..8 + len]) != crc {
            return None;
        }
        match kind {
            b"IHDR" if body.len() == 13 => {
                let w = u32::from_be_bytes(body[..4].try_into().ok()?);
                let h = u32::from_be_bytes(body[4..8].try_into().ok()?);
                // Bit depth 8, colour type 2 (RGB), compression 0, filter 0, no interlace.
                if body[8..] != [8, 2, 0, 0, 0] {
                    return None;
                }
                header = Some((w, h));
            }
            b"IDAT" => zlib.extend_from_slice(body),
            b"IEND" => break,
            _ => {}
        }
        rest = &rest[12 + len..];
    }
    let (width, height) = header?;
    (!zlib.is_empty()).then_some(IdatStream {
        width,
        height,
        zlib,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Antialiased shapes in several colours, a half-transparent one over another, and text:
    /// the kinds of pixel the figures hold.
    const SVG: &str = r##"<svg xmlns="http://www.w3.org/2000/svg" width="120" height="80">
        <rect x="10.3" y="5.7" width="50" height="30" fill="#56B4E9" fill-opacity="0.35"/>
        <circle cx="40" cy="40" r="17.2" fill="none" stroke="#E69F00" stroke-width="2.5"/>
        <path d="M0 70 L120 10" stroke="#005C9E" stroke-width="1.3" stroke-dasharray="4 3"/>
        <text x="12" y="75" font-size="11" font-family="sans-serif">ΔH° ± 1.0 χ²</text>
    </svg>"##;

    fn decode(png_bytes: &[u8]) -> (png::ColorType, Vec<u8>) {
        let mut reader = png::Decoder::new(std::io::Cursor::new(png_bytes))
            .read_info()
            .unwrap();
        let mut buf = vec![0; reader.output_buffer_size().unwrap()];
        let info = reader.next_frame(&mut buf).unwrap();
        buf.truncate(info.buffer_size());
        (info.color_type, buf)
    }

    fn rgba(png_bytes: &[u8]) -> Vec<u8> {
        match decode(png_bytes) {
            (png::ColorType::Rgba, px) => px,
            (png::ColorType::Rgb, px) => px
                .chunks_exact(3)
                .flat_map(|p| [p[0], p[1], p[2], 255])
                .collect(),
            (other, _) => panic!("unexpected colour type {other:?}"),
        }
    }

    #[test]
    fn png_decodes_to_the_rasters_pixels() {
        let pixmap = super::super::rasterise(SVG, 2.6).unwrap();
        let ours = encode_png(&pixmap).unwrap();
        // The rasteriser's straight RGBA, and tiny-skia's own encoder (the bytes written
        // before the fast setting): the same pixels, decoded by the png crate's decoder.
        let straight = pixmap.clone().take_demultiplied();
        assert_eq!(rgba(&ours), straight);
        assert_eq!(rgba(&pixmap.encode_png().unwrap()), straight);
        // On white every pixel is opaque, so the file is RGB.
        assert_eq!(decode(&ours).0, png::ColorType::Rgb);
        // 300 dpi = 11811 pixels per metre (PNG specification, W3C 2003, 11.3.5.3 pHYs).
        let reader = png::Decoder::new(std::io::Cursor::new(&ours[..]))
            .read_info()
            .unwrap();
        let dims = reader.info().pixel_dims.unwrap();
        assert_eq!(
            (dims.xppu, dims.yppu, dims.unit),
            (11811, 11811, png::Unit::Meter)
        );
    }

    #[test]
    fn transparent_pixels_keep_their_alpha() {
        let mut pixmap = Pixmap::new(7, 5).unwrap();
        pixmap.fill(resvg::tiny_skia::Color::from_rgba8(200, 100, 50, 128));
        let ours = encode_png(&pixmap).unwrap();
        assert_eq!(decode(&ours).0, png::ColorType::Rgba);
        assert_eq!(rgba(&ours), pixmap.clone().take_demultiplied());
        // Not embeddable as it stands: a PDF image has no alpha channel.
        assert!(idat_stream(&ours).is_none());
    }

    #[test]
    fn idat_stream_is_the_files_filtered_rows() {
        let pixmap = super::super::rasterise(SVG, 1.0).unwrap();
        let ours = encode_png(&pixmap).unwrap();
        let s = idat_stream(&ours).unwrap();
        assert_eq!((s.width, s.height), (pixmap.width(), pixmap.height()));
        // Inflated, the stream is one filter byte (0–4) and 3·width bytes per row
        // (PNG specification, 7.2 and 9.2).
        let rows = inflate(&s.zlib);
        assert_eq!(rows.len(), s.height as usize * (1 + 3 * s.width as usize));
        assert!(rows
            .chunks_exact(1 + 3 * s.width as usize)
            .all(|r| r[0] <= 4));
        // A damaged chunk is refused rather than embedded.
        let mut bad = ours.clone();
        let at = bad.windows(4).position(|w| w == b"IDAT").unwrap() + 6;
        bad[at] ^= 0x55;
        assert!(idat_stream(&bad).is_none());
    }

    /// Inflates a zlib stream (flate2, a general-purpose zlib implementation).
    fn inflate(zlib: &[u8]) -> Vec<u8> {
        use std::io::Read;
        let mut out = Vec::new();
        flate2::read::ZlibDecoder::new(zlib)
            .read_to_end(&mut out)
            .unwrap();
        out
    }
}
