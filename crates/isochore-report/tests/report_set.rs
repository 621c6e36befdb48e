//! A report set draws and rasterises each figure once for all its formats: every file it
//! writes must be the same bytes `write_report` writes for that format alone. The PDF is
//! not byte-for-byte repeatable even from one format alone (printpdf names its objects
//! differently from run to run), so for it the pages and every embedded image's stream
//! (the figures' pixels as compressed) are compared, read with lopdf.

use crate::render::input;
use isochore_report::{report_set_plan, write_report, write_report_set};

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
    let names = |paths: &[std::path::PathBuf]| -> Vec<String> {
        paths
            .iter()
            .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
            .collect()
    };
    // The same files in the same order…
    assert_eq!(names(&written), names(&each));
    assert_eq!(written.len(), 13, "{written:?}");
    // …with the same bytes.
    for p in &written {
        let name = p.file_name().unwrap();
        let a = std::fs::read(p).unwrap();
        let b = std::fs::read(alone.path().join(name)).unwrap();
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
fn pdf_pages_and_images(bytes: &[u8]) -> (usize, Vec<Vec<u8>>) {
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
