//! The PDF report: A4 pages laid out like a document (title, headings, wrapped paragraphs,
//! ruled tables that break across pages with their header repeated, figures at 300 dpi with
//! captions (each the pixels of its PNG file, embedded without compressing them again), a running footer with page numbers), written with printpdf and the bundled
//! DejaVu Sans so every symbol (ΔH°, °C, ⁻¹, ±, χ²) renders.
//!
//! The layout engine here is deliberately small: a cursor moving down the page, text
//! measured with the font's own advance widths, a new page when the next piece would not fit.

use crate::content::{Block, Table};
use crate::document::Document;
use crate::figures::{idat_stream, svg_to_png, FigureKind, PNG_SCALE};
use crate::fonts::Metrics;
use crate::pdf_figures::{self, FIGURE_DPI};
use crate::pdf_fonts;
use crate::{ReportError, ReportInput};
use printpdf::{
    Color, FontId, Line, LinePoint, Mm, Op, PaintMode, PdfDocument, PdfFont, PdfFontHandle,
    PdfPage, PdfSaveOptions, Point, Pt, Rect, Rgb, TextItem, XObjectId, XObjectTransform,
};
use std::collections::BTreeSet;

const PAGE_W: f32 = 595.28;
const PAGE_H: f32 = 841.89;
const MARGIN_X: f32 = 56.7;
const MARGIN_TOP: f32 = 56.7;
const MARGIN_BOTTOM: f32 = 64.0;
const BODY: f32 = 9.5;
const SMALL: f32 = 8.0;
/// Figure aspect ratio (height / width), for keeping headings with their figures.
const HEIGHT_OVER_WIDTH: f32 = crate::figures::HEIGHT as f32 / crate::figures::WIDTH as f32;

fn rgb(r: u8, g: u8, b: u8) -> Color {
    Color::Rgb(Rgb::new(
        r as f32 / 255.0,
        g as f32 / 255.0,
        b as f32 / 255.0,
        None,
    ))
}

fn pt(x: f32, y: f32) -> Point {
    Point { x: Pt(x), y: Pt(y) }
}

struct Layout {
    doc: PdfDocument,
    regular: FontId,
    bold: FontId,
    /// The characters shown in the regular and the bold font, for subsetting them.
    used: [BTreeSet<char>; 2],
    m_regular: Metrics,
    m_bold: Metrics,
    pages: Vec<Vec<Op>>,
    ops: Vec<Op>,
    /// Distance of the cursor from the top edge, pt.
    y: f32,
}

impl Layout {
    fn width(&self) -> f32 {
        PAGE_W - 2.0 * MARGIN_X
    }

    fn measure(&self, s: &str, size: f32, bold: bool) -> f32 {
        if bold {
            self.m_bold.width(s, size)
        } else {
            self.m_regular.width(s, size)
        }
    }

    fn new_page(&mut self) {
        let ops = std::mem::take(&mut self.ops);
        self.pages.push(ops);
        self.y = MARGIN_TOP;
    }

    fn ensure(&mut self, h: f32) {
        if self.y + h > PAGE_H - MARGIN_BOTTOM && self.y > MARGIN_TOP + 1.0 {
            self.new_page();
        }
    }

    /// Text with its top at `top` (from the page top), left at `x`.
    fn text(&mut self, x: f32, top: f32, s: &str, size: f32, bold: bool, color: Color) {
        let baseline = PAGE_H - top - size * 0.82;
        let font = if bold { &self.bold } else { &self.regular };
        self.used[usize::from(bold)].extend(s.chars());
        self.ops.extend([
            Op::SaveGraphicsState,
            Op::SetFillColor { col: color },
            Op::StartTextSection,
            Op::SetFont {
                font: PdfFontHandle::External(font.clone()),
                size: Pt(size),
            },
            Op::SetTextCursor {
                pos: pt(x, baseline),
            },
            Op::ShowText {
                items: vec![TextItem::Text(s.to_string())],
            },
            Op::EndTextSection,
            Op::RestoreGraphicsState,
        ]);
    }

    fn rect(&mut self, x: f32, top: f32, w: f32, h: f32, color: Color) {
        self.ops.extend([
            Op::SaveGraphicsState,
            Op::SetFillColor { col: color },
            Op::DrawRectangle {
                rectangle: Rect {
                    x: Pt(x),
                    y: Pt(PAGE_H - top - h),
                    width: Pt(w),
                    height: Pt(h),
                    mode: Some(PaintMode::Fill),
                    winding_order: None,
                },
            },
            Op::RestoreGraphicsState,
        ]);
    }

    fn rule(&mut self, x0: f32, x1: f32, top: f32, thickness: f32, color: Color) {
        self.ops.extend([
            Op::SaveGraphicsState,
            Op::SetOutlineColor { col: color },
            Op::SetOutlineThickness { pt: Pt(thickness) },
            Op::DrawLine {
                line: Line {
                    points: vec![
                        LinePoint {
                            p: pt(x0, PAGE_H - top),
                            bezier: false,
                        },
                        LinePoint {
                            p: pt(x1, PAGE_H - top),
                            bezier: false,
                        },
                    ],
                    is_closed: false,
                },
            },
            Op::RestoreGraphicsState,
        ]);
    }

    /// Greedy word wrap to `width`; over-long words are broken by characters.
    fn wrap(&self, s: &str, width: f32, size: f32, bold: bool) -> Vec<String> {
        let mut lines = Vec::new();
        let mut cur = String::new();
        for word in s.split_whitespace() {
            let candidate = if cur.is_empty() {
                word.to_string()
            } else {
                format!("{cur} {word}")
            };
            if self.measure(&candidate, size, bold) <= width {
                cur = candidate;
                continue;
            }
            if !cur.is_empty() {
                lines.push(std::mem::take(&mut cur));
            }
            if self.measure(word, size, bold) <= width {
                cur = word.to_string();
            } else {
                for c in word.chars() {
                    let mut next = cur.clone();
                    next.push(c);
                    if self.measure(&next, size, bold) > width && !cur.is_empty() {
                        lines.push(std::mem::take(&mut cur));
                        cur.push(c);
                    } else {
                        cur = next;
                    }
                }
            }
        }
        if !cur.is_empty() || lines.is_empty() {
            lines.push(cur);
        }
        lines
    }

    fn paragraph(&mut self, s: &str, size: f32, bold: bool, indent: f32, color: Color) {
        let lh = size * 1.38;
        let lines = self.wrap(s, self.width() - indent, size, bold);
        for l in lines {
            self.ensure(lh);
            let y = self.y;
            self.text(MARGIN_X + indent, y, &l, size, bold, color.clone());
            self.y += lh;
        }
        self.y += size * 0.6;
    }

    fn heading(&mut self, s: &str) {
        // Keep a heading with at least a few lines of what follows.
        self.ensure(18.0 + 60.0);
        self.y += 8.0;
        let y = self.y;
        self.text(MARGIN_X, y, s, 12.5, true, rgb(0, 70, 125));
        self.y += 12.5 * 1.3;
        let y = self.y;
        self.rule(MARGIN_X, PAGE_W - MARGIN_X, y, 0.6, rgb(170, 170, 170));
        self.y += 6.0;
    }

    fn bullets(&mut self, items: &[String], color: Color) {
        let lh = BODY * 1.38;
        for it in items {
            let lines = self.wrap(it, self.width() - 14.0, BODY, false);
            for (i, l) in lines.iter().enumerate() {
                self.ensure(lh);
                let y = self.y;
                if i == 0 {
                    self.text(MARGIN_X + 3.0, y, "•", BODY, false, color.clone());
                }
                self.text(MARGIN_X + 14.0, y, l, BODY, false, color.clone());
                self.y += lh;
            }
            self.y += 2.0;
        }
        self.y += BODY * 0.4;
    }

    fn warnings(&mut self, items: &[String]) {
        let lh = BODY * 1.38;
        let mut lines: Vec<(bool, String)> = vec![(true, "Warnings from the fit".to_string())];
        for it in items {
            for (i, l) in self
                .wrap(it, self.width() - 30.0, BODY, false)
                .into_iter()
                .enumerate()
            {
                lines.push((i == 0, l));
            }
        }
        // Draw in chunks that fit on the current page.
        let mut k = 0;
        while k < lines.len() {
            self.ensure(lh + 8.0);
            let room = ((PAGE_H - MARGIN_BOTTOM - self.y - 8.0) / lh)
                .floor()
                .max(1.0) as usize;
            let chunk = &lines[k..(k + room).min(lines.len())];
            let h = chunk.len() as f32 * lh + 8.0;
            let top = self.y;
            self.rect(MARGIN_X, top, self.width(), h, rgb(255, 248, 230));
            self.rect(MARGIN_X, top, 3.5, h, rgb(230, 159, 0));
            let mut y = top + 4.0;
            for (j, (first, l)) in chunk.iter().enumerate() {
                let heading = k == 0 && j == 0;
                if !heading && *first {
                    self.text(MARGIN_X + 12.0, y, "•", BODY, false, rgb(30, 30, 30));
                }
                let x = if heading {
                    MARGIN_X + 10.0
                } else {
                    MARGIN_X + 22.0
                };
                self.text(x, y, l, BODY, heading, rgb(30, 30, 30));
                y += lh;
            }
            self.y = top + h + 2.0;
            k += chunk.len();
        }
        self.y += BODY * 0.6;
    }

    fn table(&mut self, t: &Table) {
        let avail = self.width();
        let pad = 4.0;
        let natural = |size: f32, this: &Layout| -> Vec<f32> {
            (0..t.header.len())
                .map(|c| {
                    let h = this.measure(&t.header[c], size, true);
                    let body = t
                        .rows
                        .iter()
                        .map(|r| this.measure(r.get(c).map_or("", |s| s.as_str()), size, false))
                        .fold(0.0f32, f32::max);
                    h.max(body) + 2.0 * pad
                })
                .collect()
        };
        let mut size = SMALL;
        let mut widths = natural(size, self);
        while widths.iter().sum::<f32>() > avail && size > 6.0 {
            size -= 0.5;
            widths = natural(size, self);
        }
        let total: f32 = widths.iter().sum();
        if total > avail {
            // Still too wide: share the width out, capping the widest columns, and wrap.
            let fair = avail / widths.len() as f32;
            let small: f32 = widths.iter().filter(|w| **w <= fair).sum();
            let n_big = widths.iter().filter(|w| **w > fair).count().max(1) as f32;
            let big_share = ((avail - small) / n_big).max(fair * 0.5);
            for w in widths.iter_mut() {
                if *w > fair {
                    *w = big_share;
                }
            }
        }
        let lh = size * 1.3;
        let cell_lines = |this: &Layout, text: &str, w: f32, bold: bool| -> Vec<String> {
            if this.measure(text, size, bold) <= w - 2.0 * pad {
                vec![text.to_string()]
            } else {
                this.wrap(text, w - 2.0 * pad, size, bold)
            }
        };
        let header_lines: Vec<Vec<String>> = t
            .header
            .iter()
            .zip(&widths)
            .map(|(h, w)| cell_lines(self, h, *w, true))
            .collect();
        let header_h = header_lines.iter().map(|l| l.len()).max().unwrap_or(1) as f32 * lh + 4.0;
        let draw_header = |this: &mut Layout| {
            let top = this.y;
            let total: f32 = widths.iter().sum();
            this.rect(MARGIN_X, top, total, header_h, rgb(232, 240, 248));
            let mut x = MARGIN_X;
            for (c, lines) in header_lines.iter().enumerate() {
                for (i, l) in lines.iter().enumerate() {
                    this.text(
                        x + pad,
                        top + 2.0 + i as f32 * lh,
                        l,
                        size,
                        true,
                        rgb(20, 20, 20),
                    );
                }
                x += widths[c];
            }
            this.y += header_h;
            let y = this.y;
            this.rule(MARGIN_X, MARGIN_X + total, y, 0.8, rgb(120, 120, 120));
        };
        self.ensure(header_h + 2.0 * lh);
        draw_header(self);
        let total: f32 = widths.iter().sum();
        for row in &t.rows {
            let lines: Vec<Vec<String>> = row
                .iter()
                .zip(&widths)
                .map(|(c, w)| cell_lines(self, c, *w, false))
                .collect();
            let h = lines.iter().map(|l| l.len()).max().unwrap_or(1) as f32 * lh + 3.0;
            if self.y + h > PAGE_H - MARGIN_BOTTOM {
                self.new_page();
                draw_header(self);
            }
            let top = self.y;
            let mut x = MARGIN_X;
            for (c, cl) in lines.iter().enumerate() {
                let right = t.numeric.get(c).copied().unwrap_or(false);
                for (i, l) in cl.iter().enumerate() {
                    let tx = if right {
                        x + widths[c] - pad - self.measure(l, size, false)
                    } else {
                        x + pad
                    };
                    self.text(
                        tx,
                        top + 1.5 + i as f32 * lh,
                        l,
                        size,
                        false,
                        rgb(20, 20, 20),
                    );
                }
                x += widths[c];
            }
            self.y += h;
            let y = self.y;
            self.rule(MARGIN_X, MARGIN_X + total, y, 0.3, rgb(200, 200, 200));
        }
        self.y += 4.0;
        if let Some(n) = &t.note {
            self.paragraph(n, SMALL, false, 0.0, rgb(85, 85, 85));
        } else {
            self.y += BODY * 0.6;
        }
    }

    fn figure(
        &mut self,
        png_of: &FigurePng<'_>,
        kind: FigureKind,
        caption: &str,
    ) -> Result<(), ReportError> {
        let (id, w_px, h_px) = self.add_png(&png_of(kind)?)?;
        // Fit the available width; at 300 dpi the figure is about 16.7 cm wide.
        let natural_w = w_px / FIGURE_DPI * 72.0;
        let scale = (self.width() / natural_w).min(1.0);
        let w = natural_w * scale;
        let h = h_px / FIGURE_DPI * 72.0 * scale;
        let caption_lines = self.wrap(caption, self.width(), SMALL, false).len() as f32;
        self.ensure(h + caption_lines * SMALL * 1.38 + 14.0);
        let x = MARGIN_X + (self.width() - w) / 2.0;
        let top = self.y;
        self.ops.push(Op::UseXobject {
            id,
            transform: XObjectTransform {
                translate_x: Some(Pt(x)),
                translate_y: Some(Pt(PAGE_H - top - h)),
                scale_x: Some(scale),
                scale_y: Some(scale),
                dpi: Some(FIGURE_DPI),
                ..XObjectTransform::default()
            },
        });
        self.y += h + 6.0;
        let text = format!("{}. {caption}", kind.title());
        self.paragraph(&text, SMALL, false, 0.0, rgb(60, 60, 60));
        Ok(())
    }

    /// Adds a figure's PNG file as an image of the document: an RGB file's compressed
    /// pixels as they stand ([`pdf_figures::image_xobject`]), anything else decoded and handed to
    /// printpdf. Returns the image and its size in pixels.
    fn add_png(&mut self, png: &[u8]) -> Result<(XObjectId, f32, f32), ReportError> {
        Ok(match idat_stream(png) {
            Some(s) => {
                let (w, h) = (s.width as f32, s.height as f32);
                (self.doc.add_xobject(&pdf_figures::image_xobject(s)), w, h)
            }
            None => {
                let image = pdf_figures::image_of_png(png)?;
                let (w, h) = (image.width as f32, image.height as f32);
                (self.doc.add_image(&image), w, h)
            }
        })
    }
}

pub(crate) fn render(input: &ReportInput) -> Result<Vec<u8>, ReportError> {
    render_document(&Document::of(input))
}

/// One figure's PNG file (at [`PNG_SCALE`]), the bytes the figure files hold.
pub(crate) type FigurePng<'a> = dyn Fn(FigureKind) -> Result<Vec<u8>, ReportError> + 'a;

/// The PDF of any report's blocks (a single fit's or a joint fit's).
pub(crate) fn render_document(source: &Document<'_>) -> Result<Vec<u8>, ReportError> {
    render_document_with(source, &|kind| {
        svg_to_png(&(source.figure_svg)(kind)?, PNG_SCALE)
    })
}

/// The PDF of a document whose figures are the PNG files `png_of` gives: a report set
/// passes the files it encoded once (the bytes [`render_document`] gets by rasterising and
/// encoding each figure itself), and their compressed pixels go into the PDF as they are.
pub(crate) fn render_document_with(
    source: &Document<'_>,
    png_of: &FigurePng<'_>,
) -> Result<Vec<u8>, ReportError> {
    let doc = PdfDocument::new(source.title);
    // The fonts are added once the text is known, cut down to the glyphs it uses.
    let (regular, bold) = (FontId::new(), FontId::new());
    let (Some(m_regular), Some(m_bold)) = (Metrics::new(false), Metrics::new(true)) else {
        return Err(ReportError::Pdf(
            "the bundled font metrics could not be read".into(),
        ));
    };
    let mut l = Layout {
        doc,
        regular,
        bold,
        used: [BTreeSet::new(), BTreeSet::new()],
        m_regular,
        m_bold,
        pages: Vec::new(),
        ops: Vec::new(),
        y: MARGIN_TOP,
    };
    let ink = rgb(30, 30, 30);
    let next_blocks = &source.blocks;
    for (i, block) in source.blocks.iter().cloned().enumerate() {
        // Keep a heading on the same page as a figure that follows it, with the
        // paragraphs between them.
        if matches!(block, Block::Heading(_)) {
            let mut between = 0.0;
            for next in &next_blocks[i + 1..] {
                match next {
                    Block::Paragraph(t) => {
                        let lines = l.wrap(t, l.width(), BODY, false).len() as f32;
                        between += lines * BODY * 1.38 + BODY * 0.6;
                    }
                    Block::Figure(..) => {
                        l.ensure(40.0 + between + l.width() * HEIGHT_OVER_WIDTH + 40.0);
                        break;
                    }
                    _ => break,
                }
            }
        }
        match block {
            Block::Title(t) => {
                l.paragraph(&t, 18.0, true, 0.0, rgb(0, 50, 95));
            }
            Block::Lead(t) => {
                l.paragraph(&t, 10.5, false, 0.0, rgb(50, 50, 50));
                let y = l.y;
                l.rule(MARGIN_X, PAGE_W - MARGIN_X, y, 1.2, rgb(0, 92, 158));
                l.y += 8.0;
            }
            Block::Heading(t) => l.heading(&t),
            Block::Paragraph(t) => l.paragraph(&t, BODY, false, 0.0, ink.clone()),
            Block::Equation(t) => l.paragraph(&t, BODY, false, 18.0, rgb(0, 50, 95)),
            Block::Bullets(items) => l.bullets(&items, ink.clone()),
            Block::Warnings(items) => l.warnings(&items),
            Block::Table(t) => l.table(&t),
            Block::Figure(kind, caption) => l.figure(png_of, kind, &caption)?,
        }
    }
    l.new_page();
    let n = l.pages.len();
    let footer_left = source.footer.clone();
    let pages_ops = std::mem::take(&mut l.pages);
    let mut pages = Vec::with_capacity(n);
    for (i, ops) in pages_ops.into_iter().enumerate() {
        l.ops = ops;
        let top = PAGE_H - MARGIN_BOTTOM + 22.0;
        l.rule(
            MARGIN_X,
            PAGE_W - MARGIN_X,
            top - 5.0,
            0.4,
            rgb(170, 170, 170),
        );
        let mut left = footer_left.clone();
        while l.measure(&left, SMALL, false) > l.width() * 0.7 && left.chars().count() > 4 {
            left = left
                .chars()
                .take(left.chars().count() - 2)
                .collect::<String>();
            left.push('…');
            left = left.replace("……", "…");
        }
        l.text(MARGIN_X, top, &left, SMALL, false, rgb(90, 90, 90));
        let right = format!("page {} of {n}", i + 1);
        let rw = l.measure(&right, SMALL, false);
        l.text(
            PAGE_W - MARGIN_X - rw,
            top,
            &right,
            SMALL,
            false,
            rgb(90, 90, 90),
        );
        let ops = std::mem::take(&mut l.ops);
        pages.push(PdfPage::new(Mm(210.0), Mm(297.0), ops));
    }
    for (id, bold) in [(l.regular.clone(), false), (l.bold.clone(), true)] {
        let font = pdf_fonts::embedded(bold, &l.used[usize::from(bold)])?;
        l.doc.resources.fonts.map.insert(id, PdfFont::new(font));
    }
    let mut warnings = Vec::new();
    let bytes = l.doc.with_pages(pages).save(
        &PdfSaveOptions {
            subset_fonts: true,
            ..PdfSaveOptions::default()
        },
        &mut warnings,
    );
    Ok(bytes)
}
