//! What the HTML, Markdown and PDF writers lay out: a report's blocks with its title,
//! program version, running footer and a way to draw each figure it names. A single fit's
//! report ([`Document::of`]) and a joint fit's (`crate::joint`) are both documents, so the
//! two kinds of report share every writer and look alike.

use crate::content::{build, Block};
use crate::figures::{figure_svg, FigureKind};
use crate::{ReportError, ReportInput};

/// Draws one figure of a document as SVG.
pub(crate) type FigureFn<'a> = dyn Fn(FigureKind) -> Result<String, ReportError> + 'a;

/// A report ready to be laid out.
pub(crate) struct Document<'a> {
    /// The title (HTML `<title>`, PDF document title).
    pub title: &'a str,
    /// The program version (HTML generator tag).
    pub program_version: &'a str,
    /// The left part of the PDF's running footer.
    pub footer: String,
    /// The blocks, in reading order.
    pub blocks: Vec<Block>,
    /// Draws the figures the blocks name.
    pub figure_svg: Box<FigureFn<'a>>,
}

impl<'a> Document<'a> {
    /// The document of a single fit's report.
    pub fn of(input: &'a ReportInput) -> Document<'a> {
        Document {
            title: &input.title,
            program_version: &input.program_version,
            footer: format!("Isochore report · {}", input.series_name),
            blocks: build(input),
            figure_svg: Box::new(move |kind| figure_svg(input, kind)),
        }
    }
}
