//! Writing a full report set ([`crate::write_report_set`], and a joint fit's,
//! [`crate::write_joint_report_set`]) with each figure drawn once.
//!
//! Written one format at a time, a set draws every figure four times as SVG (the Markdown's
//! files, the HTML page, the PNG file, the PDF) and rasterises and PNG-encodes it twice (the
//! PNG file and the PDF). Here each figure is drawn, rasterised and encoded once, the four
//! side by side on the machine's cores; then the files are written side by side: the
//! Markdown's SVG files and the HTML from the same SVG text, the PNG files, and the PDF,
//! which embeds each PNG file's compressed pixels as they stand. Every file is what
//! [`crate::write_report`] (or `write_joint_report`) writes for its format
//! (tests/report_set.rs).

use crate::document::Document;
use crate::figures::{encode_png, figure_svg, rasterise_into, FigureKind, PNG_SCALE};
use crate::{csv_tables, html, markdown, paths_with_figures, pdf, write_atomic};
use crate::{ReportError, ReportFormat, ReportInput};
use rayon::prelude::*;
use std::path::{Path, PathBuf};

/// What a report set is made of: its figures and how each of its files is made. A single
/// fit's report ([`SetSource::single`]) and a joint fit's (`crate::joint`) fill it.
pub(crate) struct SetSource<'a> {
    /// The figures the set holds, in the Markdown's order.
    pub figures: Vec<FigureKind>,
    /// Draws one figure as SVG.
    pub figure_svg: &'a (dyn Fn(FigureKind) -> Result<String, ReportError> + Sync),
    /// The document the HTML and the PDF lay out.
    pub document: &'a (dyn Fn() -> Document<'a> + Sync),
    /// The Markdown, its figures linked as `<stem>-<kind>.svg`.
    pub markdown: &'a (dyn Fn(&str) -> String + Sync),
    /// The data CSV and the results CSV.
    pub csv: &'a (dyn Fn(ReportFormat) -> Result<Vec<u8>, ReportError> + Sync),
}

impl SetSource<'_> {
    /// Writes a single fit's report set.
    pub fn write_single(
        input: &ReportInput,
        dir: &Path,
        plan: Vec<(ReportFormat, String)>,
        on_written: &(dyn Fn(&[PathBuf]) + Sync),
    ) -> Result<Vec<PathBuf>, ReportError> {
        let source = SetSource {
            figures: FigureKind::ALL.to_vec(),
            figure_svg: &|kind| figure_svg(input, kind),
            document: &|| Document::of(input),
            markdown: &|stem| markdown::render(input, stem),
            csv: &|format| match format {
                ReportFormat::DataCsv => csv_tables::data_csv(input),
                _ => csv_tables::results_csv(input),
            },
        };
        write(&source, dir, plan, on_written)
    }
}

/// One figure, drawn once: its SVG text and its PNG file (rasterised at [`PNG_SCALE`] and
/// encoded once; the raster itself is dropped as soon as it is encoded).
struct Drawn {
    kind: FigureKind,
    svg: String,
    png: Vec<u8>,
}

/// The figures of a report, each drawn, rasterised and encoded once.
struct Figures(Vec<Drawn>);

impl Figures {
    fn draw(source: &SetSource<'_>) -> Result<Figures, ReportError> {
        // As many runs as the pool has threads, each drawing its figures in turn into one
        // raster (a raster of the right size is reused), so only that many are allocated.
        let per_run = source
            .figures
            .len()
            .div_ceil(rayon::current_num_threads().max(1))
            .max(1);
        let runs = source
            .figures
            .par_chunks(per_run)
            .map(|kinds| {
                let mut spare = None;
                kinds
                    .iter()
                    .map(|&kind| {
                        let svg = (source.figure_svg)(kind)?;
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
                "the figure “{}” is not one of this report's",
                kind.title()
            ))
        })
    }

    /// The report's document, its figures taken from here.
    fn document<'s: 'b, 'b>(&'b self, source: &SetSource<'s>) -> Document<'b> {
        let mut doc: Document<'b> = (source.document)();
        doc.figure_svg = Box::new(move |kind| Ok(self.get(kind)?.svg.clone()));
        doc
    }
}

/// Writes the plan's files into `dir` (see [`crate::write_report_set`]).
pub(crate) fn write(
    source: &SetSource<'_>,
    dir: &Path,
    plan: Vec<(ReportFormat, String)>,
    on_written: &(dyn Fn(&[PathBuf]) + Sync),
) -> Result<Vec<PathBuf>, ReportError> {
    // Only tables asked for: no figure is drawn.
    let tables_only = plan
        .iter()
        .all(|(f, _)| matches!(f, ReportFormat::DataCsv | ReportFormat::ResultsCsv));
    let figures = if tables_only {
        Figures(Vec::new())
    } else {
        Figures::draw(source)?
    };
    // The PDF takes longest: started first, it overlaps the rest.
    let mut plan: Vec<(usize, (ReportFormat, String))> = plan.into_iter().enumerate().collect();
    plan.sort_by_key(|(_, (format, _))| *format != ReportFormat::Pdf);
    let mut parts: Vec<(usize, Vec<PathBuf>)> = plan
        .into_par_iter()
        .map(|(i, (format, name))| {
            let written = write_one(source, &figures, format, &dir.join(name))?;
            on_written(&written);
            Ok((i, written))
        })
        .collect::<Result<_, ReportError>>()?;
    // Back into the plan's order.
    parts.sort_by_key(|(i, _)| *i);
    Ok(parts.into_iter().flat_map(|(_, p)| p).collect())
}

fn write_one(
    source: &SetSource<'_>,
    figures: &Figures,
    format: ReportFormat,
    path: &Path,
) -> Result<Vec<PathBuf>, ReportError> {
    let bytes = match format {
        ReportFormat::Markdown => {
            let paths = paths_with_figures(format, path, &source.figures);
            let stem = crate::markdown_stem(path);
            for (&kind, p) in source.figures.iter().zip(&paths) {
                write_atomic(p, figures.get(kind)?.svg.as_bytes())?;
            }
            write_atomic(path, (source.markdown)(&stem).as_bytes())?;
            return Ok(paths);
        }
        ReportFormat::Html => html::render_document(&figures.document(source))?.into_bytes(),
        ReportFormat::Pdf => pdf::render_document_with(&figures.document(source), &|kind| {
            Ok(figures.get(kind)?.png.clone())
        })?,
        ReportFormat::DataCsv | ReportFormat::ResultsCsv => (source.csv)(format)?,
        ReportFormat::FigureSvg(kind) => figures.get(kind)?.svg.clone().into_bytes(),
        ReportFormat::FigurePng(kind) => figures.get(kind)?.png.clone(),
    };
    write_atomic(path, &bytes)?;
    Ok(vec![path.to_path_buf()])
}
