//! The HTML report: one self-contained page (inline CSS and SVG figures, no scripts, no
//! network), every piece of text from the data escaped so a hostile series name shows as
//! text.

use crate::content::{Block, Table};
use crate::document::Document;
use crate::{ReportError, ReportInput};
use std::fmt::Write;

const STYLE: &str = "
body{font-family:'DejaVu Sans',Verdana,sans-serif;max-width:60rem;margin:2rem auto;padding:0 1rem;color:#1e1e1e;line-height:1.45}
h1{font-size:1.6rem;margin-bottom:.2rem}
p.lead{font-size:1.05rem;color:#333;border-left:4px solid #005c9e;padding-left:.6rem}
h2{font-size:1.2rem;border-bottom:1px solid #bbb;padding-bottom:.15rem;margin-top:2rem}
table{border-collapse:collapse;margin:.6rem 0;font-size:.85rem}
th,td{border:1px solid #ccc;padding:.2rem .5rem;vertical-align:top}
th{background:#eef3f8;text-align:left}
td.n{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}
p.note{font-size:.8rem;color:#555;margin-top:0}
div.warn{border:2px solid #e69f00;background:#fff8e6;padding:.4rem .8rem;margin:.6rem 0}
div.warn ul{margin:.2rem 0;padding-left:1.2rem}
figure{margin:1rem 0}
figure svg{max-width:100%;height:auto;border:1px solid #ddd}
figcaption{font-size:.85rem;color:#333}
pre.eq{background:#f5f5f5;padding:.5rem;overflow-x:auto}
.scroll{overflow-x:auto}
";

fn esc(s: &str) -> String {
    html_escape::encode_text(s).into_owned()
}

fn table(out: &mut String, t: &Table) {
    out.push_str("<div class=\"scroll\"><table>\n<thead><tr>");
    for h in &t.header {
        let _ = write!(out, "<th>{}</th>", esc(h));
    }
    out.push_str("</tr></thead>\n<tbody>\n");
    for row in &t.rows {
        out.push_str("<tr>");
        for (i, c) in row.iter().enumerate() {
            if t.numeric.get(i).copied().unwrap_or(false) {
                let _ = write!(out, "<td class=\"n\">{}</td>", esc(c));
            } else {
                let _ = write!(out, "<td>{}</td>", esc(c));
            }
        }
        out.push_str("</tr>\n");
    }
    out.push_str("</tbody></table></div>\n");
    if let Some(n) = &t.note {
        let _ = writeln!(out, "<p class=\"note\">{}</p>", esc(n));
    }
}

/// Strips the XML declaration so the SVG can sit inside HTML.
fn inline_svg(svg: &str) -> &str {
    match svg.find("<svg") {
        Some(i) => &svg[i..],
        None => svg,
    }
}

pub(crate) fn render(input: &ReportInput) -> Result<String, ReportError> {
    render_document(&Document::of(input))
}

/// The HTML page of any report's blocks (a single fit's or a joint fit's).
pub(crate) fn render_document(doc: &Document<'_>) -> Result<String, ReportError> {
    let mut out = String::with_capacity(256 * 1024);
    let _ = write!(
        out,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<meta name=\"generator\" content=\"isochore {}\">\n<title>{}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n",
        html_escape::encode_double_quoted_attribute(doc.program_version),
        esc(doc.title)
    );
    for block in doc.blocks.iter().cloned() {
        match block {
            Block::Title(t) => {
                let _ = writeln!(out, "<h1>{}</h1>", esc(&t));
            }
            Block::Lead(t) => {
                let _ = writeln!(out, "<p class=\"lead\">{}</p>", esc(&t));
            }
            Block::Heading(t) => {
                let _ = writeln!(out, "<h2>{}</h2>", esc(&t));
            }
            Block::Paragraph(t) => {
                let _ = writeln!(out, "<p>{}</p>", esc(&t));
            }
            Block::Equation(t) => {
                let _ = writeln!(out, "<pre class=\"eq\">{}</pre>", esc(&t));
            }
            Block::Bullets(items) => {
                out.push_str("<ul>\n");
                for i in items {
                    let _ = writeln!(out, "<li>{}</li>", esc(&i));
                }
                out.push_str("</ul>\n");
            }
            Block::Warnings(items) => {
                out.push_str("<div class=\"warn\"><strong>Warnings from the fit</strong>\n<ul>\n");
                for i in items {
                    let _ = writeln!(out, "<li>{}</li>", esc(&i));
                }
                out.push_str("</ul></div>\n");
            }
            Block::Table(t) => table(&mut out, &t),
            Block::Figure(kind, caption) => {
                let svg = (doc.figure_svg)(kind)?;
                let _ = writeln!(
                    out,
                    "<figure>\n{}\n<figcaption><strong>{}.</strong> {}</figcaption>\n</figure>",
                    inline_svg(&svg),
                    esc(kind.title()),
                    esc(&caption)
                );
            }
        }
    }
    out.push_str("</body>\n</html>\n");
    Ok(out)
}
