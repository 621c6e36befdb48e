//! A report set draws and rasterises each figure once for all its formats: every file it
//! writes must be the same bytes `write_report` writes for that format alone. The PDF is
//! not byte-for-byte repeatable even from one format alone (printpdf names its objects
//! differently from run to run), so for it the pages and every embedded image's stream
//! (the figures' pixels as compressed) are compared, read with lopdf. The PDF's images are
//! the PNG files' compressed rows at full size, and its fonts are subsets.

use crate::render::input;
use isochore_report::{
    report_set_plan, write_report, write_report_set, write_reports, ReportFormat,
};

#[test]
fn every_file_of_a_set_is_what_its_format_alone_writes() {
    let inp = input("shared figures");
    let set = tempfile::tempdir().unwrap();
    let alone = tempfile::tempdir().unwrap();
    let written = write_report_set(&inp, set.path(), "r").unwrap();
    let mut each = Vec::new();
    for (format, name) in report_set_plan("r") {
        each.extend(write_report(&inp, format, &alone.path().join(name)).unwrap());
    }
    same_files(&written, &each, alone.path());
}

#[test]
fn a_chosen_subset_is_written_as_its_formats_alone_write_it() {
    // The window's export: some formats of the set (here the PDF and the PNG figures, the
    // two that share the rasters), each reported once as written.
    let inp = input("chosen formats");
    let plan: Vec<(ReportFormat, String)> = report_set_plan("c")
        .into_iter()
        .filter(|(f, _)| matches!(f, ReportFormat::Pdf | ReportFormat::FigurePng(_)))
        .collect();
    assert_eq!(plan.len(), 5);
    let dir = tempfile::tempdir().unwrap();
    let alone = tempfile::tempdir().unwrap();
    let seen = std::sync::Mutex::new(Vec::new());
    let written = write_reports(&inp, dir.path(), plan.clone(), &|p| {
        seen.lock().unwrap().extend_from_slice(p)
    })
    .unwrap();
    let mut seen = seen.into_inner().unwrap();
    seen.sort();
    let mut sorted = written.clone();
    sorted.sort();
    assert_eq!(seen, sorted, "each file reported once as written");
    for ((format, name), path) in plan.iter().zip(&written) {
        assert_eq!(path.file_name().unwrap().to_string_lossy(), name.as_str());
        write_report(&inp, *format, &alone.path().join(name)).unwrap();
        let (a, b) = (
            std::fs::read(path).unwrap(),
            std::fs::read(alone.path().join(name)).unwrap(),
        );
        if *format == ReportFormat::Pdf {
            assert_eq!(pdf_pages_and_images(&a), pdf_pages_and_images(&b));
        } else {
            assert!(a == b, "{name} differs");
        }
    }
    // Only the tables: no figure is drawn, and the files are the same as alone.
    let tables: Vec<(ReportFormat, String)> = report_set_plan("t")
        .into_iter()
        .filter(|(f, _)| matches!(f, ReportFormat::DataCsv | ReportFormat::ResultsCsv))
        .collect();
    let written = write_reports(&inp, dir.path(), tables.clone(), &|_| {}).unwrap();
    assert_eq!(written.len(), 2);
    for ((format, name), path) in tables.iter().zip(&written) {
        write_report(&inp, *format, &alone.path().join(name)).unwrap();
        assert_eq!(
            std::fs::read(path).unwrap(),
            std::fs::read(alone.path().join(name)).unwrap()
        );
    }
}

/// Checks that a report set wrote the files each format writes alone (`each`, in the folder
/// `alone`), in the same order (13 of them), with the same bytes; a PDF (not byte-for-byte
/// repeatable) by its pages and its four image streams.
pub(crate) fn same_files(
    written: &[std::path::PathBuf],
    each: &[std::path::PathBuf],
    alone: &std::path::Path,
) {
    let names = |paths: &[std::path::PathBuf]| -> Vec<String> {
        paths
            .iter()
            .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
            .collect()
    };
    assert_eq!(names(written), names(each));
    assert_eq!(written.len(), 13, "{written:?}");
    for p in written {
        let name = p.file_name().unwrap();
        let a = std::fs::read(p).unwrap();
        let b = std::fs::read(alone.join(name)).unwrap();
        if name.to_string_lossy().ends_with(".pdf") {
            let (pages_a, images_a) = pdf_pages_and_images(&a);
            let (pages_b, images_b) = pdf_pages_and_images(&b);
            assert_eq!(pages_a, pages_b);
            assert_eq!(images_a.len(), 4);
            assert!(images_a == images_b, "the PDF's figures differ");
        } else {
            assert!(a == b, "{} differs", name.to_string_lossy());
        }
    }
}

/// The number of pages and every image stream's bytes (sorted) of a PDF.
pub(crate) fn pdf_pages_and_images(bytes: &[u8]) -> (usize, Vec<Vec<u8>>) {
    let doc = lopdf::Document::load_mem(bytes).expect("the PDF reads back");
    let mut images: Vec<Vec<u8>> = doc
        .objects
        .values()
        .filter_map(|o| o.as_stream().ok())
        .filter(|s| {
            s.dict
                .get(b"Subtype")
                .and_then(|t| t.as_name())
                .is_ok_and(|n| n == b"Image")
        })
        .map(|s| s.content.clone())
        .collect();
    images.sort();
    (doc.get_pages().len(), images)
}

/// The concatenated IDAT data of a PNG file (its zlib stream) and its IHDR width, height,
/// bit depth and colour type (PNG specification, W3C 2003, 5.3 and 11.2.2).
fn png_idat(png: &[u8]) -> (Vec<u8>, u32, u32, u8, u8) {
    assert!(png.starts_with(b"\x89PNG\r\n\x1a\n"));
    let (mut at, mut idat, mut ihdr) = (8, Vec::new(), None);
    while at + 12 <= png.len() {
        let len = u32::from_be_bytes(png[at..at + 4].try_into().unwrap()) as usize;
        let body = &png[at + 8..at + 8 + len];
        match &png[at + 4..at + 8] {
            b"IHDR" => {
                let w = u32::from_be_bytes(body[..4].try_into().unwrap());
                let h = u32::from_be_bytes(body[4..8].try_into().unwrap());
                ihdr = Some((w, h, body[8], body[9]));
            }
            b"IDAT" => idat.extend_from_slice(body),
            _ => {}
        }
        at += 12 + len;
    }
    let (w, h, depth, colour) = ihdr.expect("an IHDR chunk");
    (idat, w, h, depth, colour)
}

#[test]
fn the_pdf_embeds_the_png_files_pixels_and_font_subsets() {
    let inp = input("pdf figures");
    let dir = tempfile::tempdir().unwrap();
    let written = write_report_set(&inp, dir.path(), "r").unwrap();
    let mut idats: Vec<Vec<u8>> = Vec::new();
    for p in written
        .iter()
        .filter(|p| p.extension().is_some_and(|e| e == "png"))
    {
        let (idat, w, h, depth, colour) = png_idat(&std::fs::read(p).unwrap());
        // 760 × 520 SVG pixels at 2.6: 1976 × 1352, 8-bit RGB (colour type 2).
        assert_eq!((w, h, depth, colour), (1976, 1352, 8, 2), "{}", p.display());
        idats.push(idat);
    }
    assert_eq!(idats.len(), 4);
    idats.sort();
    let pdf = std::fs::read(dir.path().join("r.pdf")).unwrap();
    let doc = lopdf::Document::load_mem(&pdf).unwrap();
    let streams: Vec<&lopdf::Stream> = doc
        .objects
        .values()
        .filter_map(|o| o.as_stream().ok())
        .collect();
    let int = |d: &lopdf::Dictionary, k: &[u8]| d.get(k).and_then(|v| v.as_i64()).unwrap();
    let mut images = Vec::new();
    for s in streams.iter().filter(|s| {
        s.dict
            .get(b"Subtype")
            .and_then(|t| t.as_name())
            .is_ok_and(|n| n == b"Image")
    }) {
        // Full size, RGB, Flate with the PNG predictors: the PNG file's rows as they are
        // (ISO 32000-1, 7.4.4.4, Table 8: Predictor ≥ 10 means each row carries its PNG
        // filter type).
        assert_eq!(
            (int(&s.dict, b"Width"), int(&s.dict, b"Height")),
            (1976, 1352)
        );
        assert_eq!(int(&s.dict, b"BitsPerComponent"), 8);
        assert_eq!(
            s.dict.get(b"ColorSpace").unwrap().as_name().unwrap(),
            b"DeviceRGB"
        );
        assert_eq!(
            s.dict.get(b"Filter").unwrap().as_name().unwrap(),
            b"FlateDecode"
        );
        let parms = s.dict.get(b"DecodeParms").unwrap().as_dict().unwrap();
        assert_eq!(int(parms, b"Predictor"), 15);
        assert_eq!(int(parms, b"Colors"), 3);
        assert_eq!(int(parms, b"BitsPerComponent"), 8);
        assert_eq!(int(parms, b"Columns"), 1976);
        images.push(s.content.clone());
    }
    images.sort();
    assert!(
        images == idats,
        "the PDF's images are not the PNG files' IDAT streams"
    );
    // The embedded fonts are subsets: DejaVu Sans is 759,720 bytes and its bold 708,920
    // (assets/fonts); each embedded program (its uncompressed /Length1) is far smaller.
    let fonts: Vec<i64> = streams
        .iter()
        .filter_map(|s| s.dict.get(b"Length1").ok().and_then(|v| v.as_i64().ok()))
        .collect();
    assert_eq!(fonts.len(), 2, "{fonts:?}");
    assert!(fonts.iter().all(|&n| n > 1_000 && n < 150_000), "{fonts:?}");
}
