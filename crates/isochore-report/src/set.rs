//! Writing a full report set ([`crate::write_report_set`]) with each figure drawn once.
//!
//! Written one format at a time, a set draws every figure four times as SVG (the Markdown's
//! files, the HTML page, the PNG file, the PDF) and rasterises and PNG-encodes it twice (the
//! PNG file and the PDF). Here each figure is drawn, rasterised and encoded once, the four
//! side by side on the machine's cores; then the files are written side by side: the
//! Markdown's SVG files and the HTML from the same SVG text, the PNG files, and the PDF,
//! which embeds each PNG file's compressed pixels as they stand. Every file is what
//! [`crate::write_report`] writes for its format (tests/report_set.rs).

use crate::document::Document;
use crate::figures::{encode_png, figure_svg, rasterise_into, FigureKind, PNG_SCALE};
use crate::{csv_tables, html, markdown, pdf, report_paths, write_atomic};
use crate::{ReportError, ReportFormat, ReportInput};
use rayon::prelude::*;
use std::path::{Path, PathBuf};

/// One figure, drawn once: its SVG text and its PNG file (rasterised at [`PNG_SCALE`] and
/// encoded once; the raster itself is dropped as soon as it is encoded).
struct Drawn {
    kind: FigureKind,
    svg: String,
    png: Vec<u8>,
}

/// The figures of a single fit's report, each drawn, rasterised and encoded once.
struct Figures(Vec<Drawn>);

impl Figures {
    fn draw(input: &ReportInput) -> Result<Figures, ReportError> {
        // As many runs as the pool has threads, each drawing its figures in turn into one
        // raster (all four are the same size), so only that many rasters are allocated.
        let per_run = FigureKind::ALL
            .len()
            .div_ceil(rayon::current_num_threads().max(1));
        let runs = FigureKind::ALL
            .par_chunks(per_run)
            .map(|kinds| {
                let mut spare = None;
                kinds
                    .iter()
                    .map(|&kind| {
                        let svg = figure_svg(input, kind)?;
                        let raster = rasterise_into(&svg, PNG_SCALE, spare.take())?;
                        let png = encode_png(&raster)?;
                        spare = Some(raster);
                        Ok(Drawn { kind, svg, png })
                    })
                    .collect::<Result<Vec<_>, ReportError>>()
            })
            .collect::<Result<Vec<_>, ReportError>>()?;
        Ok(Figures(runs.into_iter().flatten().collect()))
    }

    fn get(&self, kind: FigureKind) -> Result<&Drawn, ReportError> {
        self.0.iter().find(|d| d.kind == kind).ok_or_else(|| {
            ReportError::Input(format!(
                "the figure “{}” belongs to the report of a joint fit",
                kind.title()
            ))
        })
    }

    /// The report's document, its figures taken from here.
    fn document<'a>(&'a self, input: &'a ReportInput) -> Document<'a> {
        let mut doc = Document::of(input);
        doc.figure_svg = Box::new(move |kind| Ok(self.get(kind)?.svg.clone()));
        doc
    }
}

/// Writes the plan's files into `dir` (see [`crate::write_report_set`]).
pub(crate) fn write(
    input: &ReportInput,
    dir: &Path,
    plan: Vec<(ReportFormat, String)>,
) -> Result<Vec<PathBuf>, ReportError> {
    let figures = Figures::draw(input)?;
    // The PDF takes longest: started first, it overlaps the rest.
    let mut plan: Vec<(usize, (ReportFormat, String))> = plan.into_iter().enumerate().collect();
    plan.sort_by_key(|(_, (format, _))| *format != ReportFormat::Pdf);
    let mut parts: Vec<(usize, Vec<PathBuf>)> = plan
        .into_par_iter()
        .map(|(i, (format, name))| Ok((i, write_one(input, &figures, format, &dir.join(name))?)))
        .collect::<Result<_, ReportError>>()?;
    // Back into the plan's order.
    parts.sort_by_key(|(i, _)| *i);
    Ok(parts.into_iter().flat_map(|(_, p)| p).collect())
}

fn write_one(
    input: &ReportInput,
    figures: &Figures,
    format: ReportFormat,
    path: &Path,
) -> Result<Vec<PathBuf>, ReportError> {
    let bytes = match format {
        ReportFormat::Markdown => {
            let paths = report_paths(format, path);
            let stem = crate::markdown_stem(path);
            for (kind, p) in FigureKind::ALL.into_iter().zip(&paths) {
                write_atomic(p, figures.get(kind)?.svg.as_bytes())?;
            }
            write_atomic(path, markdown::render(input, &stem).as_bytes())?;
            return Ok(paths);
        }
        ReportFormat::Html => html::render_document(&figures.document(input))?.into_bytes(),
        ReportFormat::Pdf => pdf::render_document_with(&figures.document(input), &|kind| {
            Ok(figures.get(kind)?.png.clone())
        })?,
        ReportFormat::DataCsv => csv_tables::data_csv(input)?,
        ReportFormat::ResultsCsv => csv_tables::results_csv(input)?,
        ReportFormat::FigureSvg(kind) => figures.get(kind)?.svg.clone().into_bytes(),
        ReportFormat::FigurePng(kind) => figures.get(kind)?.png.clone(),
    };
    write_atomic(path, &bytes)?;
    Ok(vec![path.to_path_buf()])
}
