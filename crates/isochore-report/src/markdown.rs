//! The Markdown report: the same blocks as the other formats, with figures as relative
//! links to SVG files written beside it, and every piece of text from the data escaped so
//! it cannot become markup or raw HTML.

use crate::content::{build, Block, Table};
use crate::ReportInput;
use std::fmt::Write;

/// Escapes Markdown punctuation and HTML-significant characters; newlines become spaces.
pub(crate) fn esc(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 8);
    for c in s.chars() {
        match c {
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '&' => out.push_str("&amp;"),
            '\\' | '`' | '*' | '_' | '{' | '}' | '[' | ']' | '(' | ')' | '#' | '+' | '!' | '|'
            | '~' => {
                out.push('\\');
                out.push(c);
            }
            '\n' | '\r' => out.push(' '),
            _ => out.push(c),
        }
    }
    out
}

fn table(out: &mut String, t: &Table) {
    let _ = writeln!(
        out,
        "| {} |",
        t.header
            .iter()
            .map(|h| esc(h))
            .collect::<Vec<_>>()
            .join(" | ")
    );
    let _ = writeln!(
        out,
        "|{}|",
        t.numeric
            .iter()
            .map(|n| if *n { "---:" } else { ":---" })
            .collect::<Vec<_>>()
            .join("|")
    );
    for row in &t.rows {
        let cells: Vec<String> = row
            .iter()
            .map(|c| if c.is_empty() { " ".into() } else { esc(c) })
            .collect();
        let _ = writeln!(out, "| {} |", cells.join(" | "));
    }
    if let Some(n) = &t.note {
        let _ = writeln!(out, "\n*{}*", esc(n));
    }
    out.push('\n');
}

pub(crate) fn render(input: &ReportInput, figure_stem: &str) -> String {
    render_blocks(&build(input), figure_stem)
}

/// The Markdown of any report's blocks, figures linked as `<figure_stem>-<kind>.svg`.
pub(crate) fn render_blocks(blocks: &[Block], figure_stem: &str) -> String {
    let mut out = String::new();
    for block in blocks.iter().cloned() {
        match block {
            Block::Title(t) => {
                let _ = writeln!(out, "# {}\n", esc(&t));
            }
            Block::Lead(t) => {
                let _ = writeln!(out, "**{}**\n", esc(&t));
            }
            Block::Heading(t) => {
                let _ = writeln!(out, "## {}\n", esc(&t));
            }
            Block::Paragraph(t) => {
                let _ = writeln!(out, "{}\n", esc(&t));
            }
            Block::Equation(t) => {
                // Inside a code block nothing is interpreted; only fences could break out.
                let _ = writeln!(out, "```text\n{}\n```\n", t.replace("```", "'''"));
            }
            Block::Bullets(items) => {
                for i in items {
                    let _ = writeln!(out, "- {}", esc(&i));
                }
                out.push('\n');
            }
            Block::Warnings(items) => {
                out.push_str("> **Warnings from the fit**\n>\n");
                for i in items {
                    let _ = writeln!(out, "> - {}", esc(&i));
                }
                out.push('\n');
            }
            Block::Table(t) => table(&mut out, &t),
            Block::Figure(kind, caption) => {
                let _ = writeln!(
                    out,
                    "![{}]({}-{}.svg)\n\n*{}.* {}\n",
                    esc(kind.title()),
                    figure_stem.replace(' ', "%20"),
                    kind.key(),
                    esc(kind.title()),
                    esc(&caption)
                );
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::esc;

    #[test]
    fn hostile_text_cannot_become_markup() {
        let e = esc("<script>alert(1)</script> *bold* [x](y) | pipe");
        assert!(!e.contains('<'));
        assert!(e.contains("&lt;script&gt;"));
        assert!(e.contains("\\*bold\\*"));
        assert!(e.contains("\\|"));
    }
}
