//! Dialect stage of the reading pipeline: how the text is written.
//!
//! A NUL byte marks a binary file (refused with its line and character) and the first
//! quote is noted for the scan; the delimiter comes from the options, a `sep=` first line
//! or detection (`crate::text::detect_delimiter`); the header row is read (a
//! whitespace-delimited header may keep single spaces); and the decimal convention is
//! settled from the [`Marks`] the scan saw in the number cells: one convention per file.
//! The decoding of the bytes (UTF-8, UTF-16, latin-1) happens in the source stage.

use super::{DecimalMark, ImportOptions};
use crate::error::Error;
use crate::mapping::Mark;
use crate::text::{self, Delimiter, Reader};

fn binary(file: &str, text: &str, start: usize) -> Error {
    let (line, character) = text::find_nul(text, start).unwrap_or((1, 1));
    Error::Binary {
        file: file.to_string(),
        line,
        character,
    }
}

/// The first quote at or after `start`, once the text is known to hold no NUL byte (else
/// [`Error::Binary`]). `clean`: the text is known to hold neither (see
/// `source::read_file`).
pub(super) fn first_quote(
    file: &str,
    text: &str,
    start: usize,
    clean: bool,
) -> Result<Option<usize>, Error> {
    // One pass finds the first NUL byte (a binary file) and the first quote.
    let bytes = text.as_bytes();
    let scan = if clean {
        None
    } else {
        memchr::memchr2(0, b'"', &bytes[start..])
    };
    Ok(match scan {
        None => None,
        Some(i) if bytes[start + i] == 0 => return Err(binary(file, text, start)),
        Some(i) => {
            if memchr::memchr(0, &bytes[start + i..]).is_some() {
                return Err(binary(file, text, start));
            }
            Some(start + i)
        }
    })
}

/// The header row and the dialect it was read in.
pub(super) struct Header {
    pub(super) delimiter: Delimiter,
    /// Commas in number cells may be decimal marks (not with a comma delimiter, nor with
    /// [`DecimalMark::Point`]).
    pub(super) comma_ok: bool,
    /// Physical line of the header.
    pub(super) header_line: usize,
    /// Header cells as typed (trimmed).
    pub(super) headers: Vec<String>,
    /// Byte offset of the first line after the header.
    pub(super) data_start: usize,
    /// Physical line of the header (the line before `data_start`).
    pub(super) first_line: usize,
}

/// Finds the delimiter and reads the header row from `text[start..]`.
pub(super) fn read_header(
    file: &str,
    text: &str,
    start: usize,
    o: &ImportOptions,
) -> Result<Header, Error> {
    // A first line "sep=;" (written by some spreadsheet programs) names the delimiter.
    let (start, skipped, sep) = text::separator_line(text, start);
    let delimiter = o
        .delimiter
        .or(sep)
        .unwrap_or_else(|| text::detect_delimiter(text, start));
    let comma_ok = match o.decimal {
        DecimalMark::Point => false,
        DecimalMark::Comma | DecimalMark::Auto => delimiter != Delimiter::Comma,
    };
    let mut reader = Reader::new(
        text,
        start,
        delimiter,
        o.max_line_bytes,
        o.max_columns,
        file,
    )
    .starting_after_line(skipped);
    let Some(head) = reader.next_record()? else {
        return Err(Error::Empty {
            file: file.to_string(),
        });
    };
    let header_line = head.line;
    let mut headers: Vec<String> = reader
        .spans
        .iter()
        .map(|s| s.unescaped(text).trim().to_string())
        .collect();
    if delimiter == Delimiter::Whitespace {
        // Headers may hold single spaces ("ln K", "T (K)"); data cells never do. Choose the
        // reading of the header whose column count matches the first data row.
        let merged = text::merge_whitespace_header(headers.clone());
        let line = &text[head.start as usize..head.end as usize];
        let wide = text::split_wide(line);
        let mut peek = Reader::new(
            text,
            reader.position(),
            delimiter,
            o.max_line_bytes,
            o.max_columns,
            file,
        );
        let data_cols = match peek.next_record() {
            Ok(Some(_)) => Some(peek.spans.len()),
            _ => None,
        };
        headers = match data_cols {
            Some(n) if headers.len() == n => headers,
            Some(n) if merged.len() == n => merged,
            Some(n) if wide.len() == n => wide,
            _ => merged,
        };
    }
    Ok(Header {
        delimiter,
        comma_ok,
        header_line,
        headers,
        data_start: reader.position(),
        first_line: reader.line(),
    })
}

/// Where a number cell with a decimal mark was seen.
#[derive(Debug, Clone, PartialEq)]
pub(super) struct MarkAt {
    line: usize,
    /// 0-based column.
    column: usize,
    cell: String,
}

/// The first cell with a decimal point, with an unambiguous decimal comma, and with a comma
/// that may be a thousands separator, in one part of the file (kept while reading, so the
/// one-convention rule needs no second pass).
#[derive(Debug, Clone, Default, PartialEq)]
pub(super) struct Marks {
    point: Option<MarkAt>,
    comma: Option<MarkAt>,
    ambiguous: Option<MarkAt>,
}

/// Why the decimal convention could not be settled.
pub(super) struct MarkFault {
    at: MarkAt,
    message: String,
}

impl Marks {
    #[inline]
    pub(super) fn note(&mut self, mark: Mark, line: usize, column: usize, cell: &str) {
        let slot = match mark {
            Mark::None => return,
            Mark::Point => &mut self.point,
            Mark::Comma => &mut self.comma,
            Mark::AmbiguousComma => &mut self.ambiguous,
        };
        if slot.is_none() {
            *slot = Some(MarkAt {
                line,
                column,
                cell: cell.trim().to_string(),
            });
        }
    }

    /// Keeps the earlier of each kind (`later` comes from further down the file).
    pub(super) fn merge(&mut self, later: Marks) {
        for (a, b) in [
            (&mut self.point, later.point),
            (&mut self.comma, later.comma),
            (&mut self.ambiguous, later.ambiguous),
        ] {
            if a.is_none() {
                *a = b;
            }
        }
    }

    /// Whether commas are decimal marks in this file, or the cell that breaks the
    /// one-convention rule. `comma_ok`: commas may be decimal marks at all.
    fn decide(&self, stated: DecimalMark, comma_ok: bool) -> Result<bool, MarkFault> {
        if !comma_ok {
            return Ok(false);
        }
        let first_comma = match (&self.comma, &self.ambiguous) {
            (Some(a), Some(b)) => Some(if (b.line, b.column) < (a.line, a.column) {
                b
            } else {
                a
            }),
            (a, b) => a.as_ref().or(b.as_ref()),
        };
        const STATE: &str =
            "one decimal convention per file: correct the cell, or state the decimal mark (point or comma)";
        match (stated, &self.point, first_comma) {
            (DecimalMark::Comma, Some(p), _) => Err(MarkFault {
                at: p.clone(),
                message: "a decimal point, but the decimal mark is stated to be a comma; write it with a comma, or state the decimal mark as point".to_string(),
            }),
            (DecimalMark::Comma, None, _) => Ok(true),
            (_, Some(p), Some(c)) => {
                let (at, other, this_mark, other_mark) = if (p.line, p.column) < (c.line, c.column) {
                    (c, p, "comma", "point")
                } else {
                    (p, c, "point", "comma")
                };
                Err(MarkFault {
                    at: at.clone(),
                    message: format!(
                        "a decimal {this_mark}, but line {}, column {} ('{}') uses a decimal {other_mark}; {STATE}",
                        other.line,
                        other.column + 1,
                        other.cell
                    ),
                })
            }
            (_, Some(_), None) => Ok(false),
            (_, None, Some(_)) if self.comma.is_some() => Ok(true),
            (_, None, Some(a)) => Err(MarkFault {
                at: a.clone(),
                message: format!(
                    "the comma may be a decimal comma or a thousands separator, and no other cell settles which; {STATE}"
                ),
            }),
            (_, None, None) => Ok(false),
        }
    }
}

/// Whether commas are decimal marks in this file, from the marks the scan saw; a cell that
/// breaks the one-convention rule is [`Error::DecimalMark`] with its line and column.
pub(super) fn decimal_comma(
    marks: &Marks,
    stated: DecimalMark,
    comma_ok: bool,
    file: &str,
    headers: &[String],
) -> Result<bool, Error> {
    marks
        .decide(stated, comma_ok)
        .map_err(|fault| Error::DecimalMark {
            file: file.to_string(),
            line: fault.at.line,
            column: fault.at.column + 1,
            header: headers.get(fault.at.column).cloned().unwrap_or_default(),
            cell: fault.at.cell,
            message: fault.message,
        })
}
