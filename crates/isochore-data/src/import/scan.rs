//! Scan stage of the reading pipeline: the row scanner.
//!
//! Reads every data row after the header, converts its cells (`crate::mapping`), sorts it
//! into its data set or into the rejected rows with line, column and reason, and notes
//! the decimal marks of the number cells for the dialect stage. The speed of the import
//! lives here: data over [`TWO_THREADS_ABOVE`] without quotes are read in two halves on two
//! threads (the second numbering its lines itself) and joined with one parallel move;
//! rows are reserved ahead, data set names are compared by a [`NameKey`] of their length
//! and first and last eight bytes, and each data set's temperature range is kept while
//! reading so that no second pass is needed.

use super::dialect::Marks;
use super::series::{new_series, Row, Scanned};
use super::ImportOptions;
use crate::error::{Error, RejectedRow, RowProblem};
use crate::mapping::{convert_cells, mark_of, ColumnMapping};
use crate::text::{self, Delimiter, Reader, Span};
use rayon::prelude::*;
use std::collections::HashMap;

/// Data larger than this (bytes) and free of quotes is read in two halves on two threads.
pub const TWO_THREADS_ABOVE: usize = 1 << 20;

/// What one pass over (part of) the data rows needs.
#[derive(Clone, Copy)]
pub(super) struct Scan<'a> {
    pub(super) file: &'a str,
    pub(super) text: &'a str,
    pub(super) delimiter: Delimiter,
    pub(super) o: &'a ImportOptions,
    pub(super) mapping: &'a ColumnMapping,
    pub(super) headers: &'a [String],
    pub(super) comma_ok: bool,
    pub(super) default_name: &'a str,
    pub(super) quote_free: bool,
    /// Where `text` starts in the file's text (a piece of a file read in pieces, see
    /// `super::stream`; 0 otherwise): added to each row's byte range.
    pub(super) offset: u32,
    /// Rows of the data set before this part (a piece of a file read in pieces; 0
    /// otherwise): added to each row's number.
    pub(super) rows_before: u32,
}

/// The rows read from one part of the data.
pub(super) struct Chunk {
    pub(super) series: Vec<Scanned>,
    /// The lowest and highest temperature (K) of each data set's rows, aligned with
    /// `series` (taken while reading, so that no second pass over the rows is needed).
    pub(super) ranges: Vec<(f64, f64)>,
    pub(super) rejected: Vec<RejectedRow>,
    pub(super) any_data: bool,
    /// The first cell of each kind of decimal mark.
    pub(super) marks: Marks,
    /// Rows written to the caller's buffer rather than to the data set (see
    /// `Scan::one_set`); 0 once joined.
    pub(super) in_sink: usize,
}

/// What a part of a file read in pieces is given to work with (see `super::stream`), so
/// that the thread reading it allocates nothing while its rows are ordinary (with huge
/// pages, a thread's first allocation costs an arena of the allocator's and 2 MiB or more):
/// the buffer for a record's cells, room for one data set and its range, and the data set
/// itself, all made by the caller. [`Scan::run`] gives back the buffer; the data set, if
/// used, comes back in the findings.
pub(super) struct Kit {
    pub(super) spans: Vec<Span>,
    pub(super) series: Vec<Scanned>,
    pub(super) ranges: Vec<(f64, f64)>,
    pub(super) set: Option<Scanned>,
}

impl Scan<'_> {
    /// Reads every data row from `data_start` (the line after the header; `first_line` is
    /// the header's physical line). `first_quote`: the first quote in the text, if any
    /// (from the dialect stage). Data over [`TWO_THREADS_ABOVE`] without quotes are read in
    /// two halves on two threads and joined.
    pub(super) fn read_all(
        self,
        data_start: usize,
        first_line: usize,
        first_quote: Option<usize>,
    ) -> Result<Chunk, Error> {
        let (text, bytes) = (self.text, self.text.as_bytes());
        // Large files without quotes are read in two halves on two threads: with no quotes,
        // every line break ends a record, so the halves can be cut at any line break.
        let data_len = text.len() - data_start;
        let quote_free = match first_quote {
            None => true,
            Some(q) if q >= data_start => false,
            Some(_) => memchr::memchr(b'"', &bytes[data_start..]).is_none(),
        };
        let ctx = Scan { quote_free, ..self };
        let cut = if data_len > TWO_THREADS_ABOVE && quote_free {
            let mid = data_start + data_len / 2;
            memchr::memchr(b'\n', &bytes[mid..]).map(|i| mid + i + 1)
        } else {
            None
        };
        // Room for this many rows per data set (a data line takes at least a few bytes; this
        // covers the usual 20 to 60): the first part reserves for the whole file, so that the
        // second can be appended without moving the first.
        let reserve = |bytes: usize| if bytes > (1 << 20) { bytes / 16 } else { 0 };
        let chunk = match cut {
            None => ctx.run(
                data_start,
                text.len(),
                first_line,
                reserve(data_len),
                None,
                None,
            )?,
            // One data set (no series column): both halves write into one buffer.
            Some(cut) if ctx.mapping.series.is_none() => {
                ctx.one_set(data_start, cut, first_line)?
            }
            Some(cut) => {
                // The second half first counts the lines of the first (to number its own).
                let second_half = || {
                    let lines_before = memchr::memchr_iter(b'\n', &bytes[data_start..cut]).count();
                    let n = text.len() - cut;
                    ctx.run(
                        cut,
                        text.len(),
                        first_line + lines_before,
                        reserve(n),
                        None,
                        None,
                    )
                };
                let (a, b) = std::thread::scope(|sc| {
                    let second = std::thread::Builder::new()
                        .spawn_scoped(sc, second_half)
                        .ok();
                    let a = ctx.run(data_start, cut, first_line, reserve(data_len), None, None);
                    let b = match second {
                        Some(h) => h.join().unwrap_or_else(|_| second_half()),
                        None => second_half(),
                    };
                    (a, b)
                });
                let mut a = a?;
                a.append(b?);
                a
            }
        };
        Ok(chunk)
    }
}

impl Chunk {
    /// Appends a later part, merging data sets by name and renumbering rows.
    pub(super) fn append(&mut self, later: Chunk) {
        self.any_data |= later.any_data;
        self.marks.merge(later.marks);
        self.rejected.extend(later.rejected);
        for (s, (lo, hi)) in later.series.into_iter().zip(later.ranges) {
            match self.series.iter().position(|m| m.name == s.name) {
                Some(i) => {
                    let r = &mut self.ranges[i];
                    *r = (r.0.min(lo), r.1.max(hi));
                    // Moved and renumbered in one pass, on all cores: the first touch of
                    // each new page is most of the cost.
                    let m = &mut self.series[i];
                    let base = m.rows.len() as u32;
                    m.notes
                        .extend(s.notes.into_iter().map(|(r, n)| (r + base, n)));
                    m.rows.par_extend(s.rows.into_par_iter().map(|mut r| {
                        r.row += base;
                        r
                    }));
                }
                None => {
                    self.series.push(s);
                    self.ranges.push((lo, hi));
                }
            }
        }
    }
}

impl Scan<'_> {
    /// The two halves of the data of a file with one data set (no series column), read on
    /// two threads into one buffer of rows: each half fills its own part of it, made for
    /// as many rows as the half has line breaks, and the second half's rows are then moved
    /// down over the room the first half did not use (none when every line was a row) and
    /// renumbered in place. Rows are thus never held twice: joining two separate lists
    /// needed a third copy of the second half's rows (20 MB more at the peak of a
    /// 10⁶-row file). A line ended by a lone carriage return can make a half read more
    /// rows than it has line feeds; those go to the half's own list, and the rows are then
    /// joined by copying.
    fn one_set(&self, data_start: usize, cut: usize, first_line: usize) -> Result<Chunk, Error> {
        let bytes = self.text.as_bytes();
        let lines = |part: &[u8]| memchr::memchr_iter(b'\n', part).count();
        let (l1, l2) = rayon::join(
            || lines(&bytes[data_start..cut]),
            || lines(&bytes[cut..]) + 1,
        );
        // Written on both cores: the first touch of each page is most of the cost.
        let mut all: Vec<Row> = Vec::with_capacity(l1 + l2);
        all.par_extend(rayon::iter::repeat_n(Row::EMPTY, l1 + l2));
        let (lo, hi) = all.split_at_mut(l1);
        let (a, b) = std::thread::scope(|sc| {
            let second = std::thread::Builder::new()
                .spawn_scoped(sc, || {
                    self.run(cut, self.text.len(), first_line + l1, 0, Some(hi), None)
                })
                .ok();
            let a = self.run(data_start, cut, first_line, 0, Some(lo), None);
            let b = match second {
                Some(h) => h.join().ok(),
                None => None,
            };
            (a, b)
        });
        let mut a = a?;
        let mut b = match b {
            Some(b) => b?,
            // The thread could not be started or failed: read the second half here.
            None => {
                let hi = &mut all[l1..];
                self.run(cut, self.text.len(), first_line + l1, 0, Some(hi), None)?
            }
        };
        let (k1, k2) = (a.in_sink, b.in_sink);
        let over = |c: &Chunk| c.series.first().map_or(0, |s| s.rows.len());
        let first_len = k1 + over(&a);
        let rows = if over(&a) == 0 && over(&b) == 0 {
            if k1 < l1 {
                all.copy_within(l1..l1 + k2, k1);
            }
            all.truncate(k1 + k2);
            let base = first_len as u32;
            all[k1..].par_iter_mut().for_each(|r| r.row += base);
            all
        } else {
            let take = |c: &mut Chunk| c.series.first_mut().map(|s| std::mem::take(&mut s.rows));
            let mut rows = Vec::with_capacity(first_len + k2 + over(&b));
            rows.extend_from_slice(&all[..k1]);
            rows.extend(take(&mut a).unwrap_or_default());
            let second = all[l1..l1 + k2]
                .iter()
                .copied()
                .chain(take(&mut b).unwrap_or_default());
            rows.extend(second.map(|mut r| {
                r.row += first_len as u32;
                r
            }));
            rows
        };
        a.any_data |= b.any_data;
        a.marks.merge(b.marks);
        a.rejected.extend(b.rejected);
        let notes_b = b.series.first_mut().map(|s| std::mem::take(&mut s.notes));
        if a.series.is_empty() {
            a.series = b.series;
            a.ranges = b.ranges;
        } else if let Some(&(lo, hi)) = b.ranges.first() {
            let r = &mut a.ranges[0];
            *r = (r.0.min(lo), r.1.max(hi));
        }
        if let Some(s) = a.series.first_mut() {
            let base = first_len as u32;
            s.notes.extend(
                notes_b
                    .unwrap_or_default()
                    .into_iter()
                    .map(|(r, n)| (r + base, n)),
            );
            s.rows = rows;
        }
        a.in_sink = 0;
        Ok(a)
    }

    /// Reads the records in `text[start..end]`; `line` is the physical line before `start`.
    /// Each of the first eight data sets reserves room for `reserve` rows: pages never
    /// written are never touched (so cost no memory), and growing by copying is avoided.
    /// The room left over is given back in the series stage (`series::assemble`).
    /// `sink`: with one data set (no series column), the rows are written here first (the
    /// count in [`Chunk::in_sink`]), and only those beyond its length into the data set.
    /// `kit`: what to work with instead of allocating (see [`Kit`]).
    pub(super) fn run(
        &self,
        start: usize,
        end: usize,
        line: usize,
        reserve: usize,
        mut sink: Option<&mut [Row]>,
        mut kit: Option<&mut Kit>,
    ) -> Result<Chunk, Error> {
        let (text, o, mapping) = (self.text, self.o, self.mapping);
        let mut reader = Reader::new(
            &text[..end],
            start,
            self.delimiter,
            o.max_line_bytes,
            o.max_columns,
            self.file,
        )
        .starting_after_line(line)
        .without_quotes(self.quote_free);
        let ncols = self.headers.len();
        let mut series: Vec<Scanned> = Vec::new();
        let mut ranges: Vec<(f64, f64)> = Vec::new();
        if let Some(k) = kit.as_deref_mut() {
            reader = reader.with_spans(std::mem::take(&mut k.spans));
            series = std::mem::take(&mut k.series);
            ranges = std::mem::take(&mut k.ranges);
        }
        let none = (f64::INFINITY, f64::NEG_INFINITY);
        let mut index: HashMap<String, usize> = HashMap::new();
        // The names of the data sets in a form compared without a call (see `NameKey`).
        let mut keys: Vec<NameKey> = Vec::new();
        let mut last = 0usize;
        let mut rejected = Vec::new();
        let mut any_data = false;
        let mut marks = Marks::default();
        let mut in_sink = 0usize;
        // The number cells whose decimal marks are watched (only where a comma could be one).
        let watched_cells = [
            mapping.temperature.column,
            mapping.quantity.column,
            mapping.uncertainty.map_or(usize::MAX, |u| u.column),
        ];
        let watched = &watched_cells[..if mapping.uncertainty.is_some() { 3 } else { 2 }];
        let watch = self.comma_ok;
        // Columns that may be missing at the end of a short row.
        let optional = |c: usize| {
            Some(c) == mapping.note
                || mapping.ignored.contains(&c)
                || mapping.uncertainty.map(|u| u.column) == Some(c)
        };
        let empty = Span {
            start: 0,
            end: 0,
            escaped: false,
        };
        while let Some(rec) = reader.next_record()? {
            any_data = true;
            let spans = &reader.spans;
            let found = spans.len();
            if found != ncols {
                let ok = if found < ncols {
                    (found..ncols).all(optional)
                } else {
                    spans[ncols..].iter().all(|s| text::is_blank(s.raw(text)))
                };
                if !ok {
                    rejected.push(RejectedRow {
                        line: rec.line,
                        column: None,
                        header: None,
                        cell: None,
                        problem: RowProblem::Ragged {
                            expected: ncols,
                            found,
                        },
                    });
                    continue;
                }
            }
            let cell = |i: usize| spans.get(i).unwrap_or(&empty).raw(text);
            let si =
                match mapping.series {
                    None => {
                        if series.is_empty() {
                            let set = kit.as_deref_mut().and_then(|k| k.set.take());
                            series.push(set.unwrap_or_else(|| {
                                new_series(self.default_name.to_string(), reserve)
                            }));
                            ranges.push(none);
                        }
                        0
                    }
                    Some(c) => {
                        let span = spans.get(c).unwrap_or(&empty);
                        let owned;
                        let name = if span.escaped {
                            owned = span.unescaped(text);
                            owned.trim()
                        } else {
                            text::trim(span.raw(text))
                        };
                        let name = if name.is_empty() {
                            self.default_name
                        } else {
                            name
                        };
                        let key = NameKey::of(name);
                        let is = |i: usize| {
                            keys.get(i) == Some(&key) && (key.len <= 16 || series[i].name == name)
                        };
                        if is(last) {
                            last
                        } else if let Some(i) = if series.len() <= 16 {
                            (0..series.len()).find(|&i| is(i))
                        } else {
                            index.get(name).copied()
                        } {
                            last = i;
                            i
                        } else {
                            series.push(new_series(
                                name.to_string(),
                                if series.len() < 8 { reserve } else { 0 },
                            ));
                            keys.push(key);
                            ranges.push(none);
                            index.insert(name.to_string(), series.len() - 1);
                            last = series.len() - 1;
                            last
                        }
                    }
                };
            match convert_cells(mapping, self.comma_ok, o.allow_extreme_temperatures, cell) {
                Ok(c) => {
                    if watch {
                        for &col in watched {
                            let text = cell(col);
                            marks.note(mark_of(text), rec.line, col, text);
                        }
                    }
                    let s = &mut series[si];
                    let row = self.rows_before + (in_sink + s.rows.len()) as u32 + 1;
                    if let Some(n) = mapping.note.and_then(|n| spans.get(n)) {
                        if !text::is_blank(n.raw(text)) {
                            s.notes.push((row, n.unescaped(text).trim().to_string()));
                        }
                    }
                    let r = &mut ranges[si];
                    if c.t_k < r.0 {
                        r.0 = c.t_k;
                    }
                    if c.t_k > r.1 {
                        r.1 = c.t_k;
                    }
                    let r = Row {
                        t_k: c.t_k,
                        ln_k: c.ln_k,
                        sigma: c.sigma_ln_k.unwrap_or(f64::NAN),
                        line: rec.line as u32,
                        row,
                        start: rec.start + self.offset,
                        end: rec.end + self.offset,
                    };
                    match sink.as_deref_mut().and_then(|k| k.get_mut(in_sink)) {
                        Some(slot) if s.rows.is_empty() => {
                            *slot = r;
                            in_sink += 1;
                        }
                        _ => s.rows.push(r),
                    }
                }
                Err((col, problem)) => {
                    rejected.push(RejectedRow {
                        line: rec.line,
                        column: Some(col + 1),
                        header: self.headers.get(col).cloned(),
                        cell: Some(cell(col).trim().to_string()),
                        problem,
                    });
                }
            }
        }
        if let Some(k) = kit {
            k.spans = std::mem::take(&mut reader.spans);
        }
        Ok(Chunk {
            series,
            ranges,
            rejected,
            any_data,
            marks,
            in_sink,
        })
    }
}

/// A data set name as its length and its first and last eight bytes: two names of at most
/// 16 bytes (the usual 'sample_3', 'pH 7.4, 25 mM') are equal exactly when their keys
/// are, and telling them apart takes three compares instead of a call to compare memory,
/// once per row of a file whose data sets are interleaved. Longer names with equal keys
/// are then compared in full.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct NameKey {
    len: usize,
    head: u64,
    tail: u64,
}

impl NameKey {
    #[inline]
    fn of(name: &str) -> NameKey {
        let b = name.as_bytes();
        let word = |part: &[u8]| {
            let mut w = [0u8; 8];
            w[..part.len()].copy_from_slice(part);
            u64::from_le_bytes(w)
        };
        let n = b.len();
        if n >= 8 {
            NameKey {
                len: n,
                head: word(&b[..8]),
                tail: word(&b[n - 8..]),
            }
        } else {
            NameKey {
                len: n,
                head: word(b),
                tail: 0,
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::import::{import_text, ImportOptions};

    #[test]
    fn long_names_alike_at_both_ends_are_different_data_sets() {
        // Same length, same first and last eight bytes, different middle.
        let (a, b) = ("condition-A-pH7.4-25C", "condition-B-pH7.4-25C");
        assert_eq!(NameKey::of(a), NameKey::of(b));
        assert_ne!(NameKey::of("sample_1"), NameKey::of("sample_2"));
        assert_ne!(NameKey::of("s1"), NameKey::of("s1 "));
        let mut text = String::from("sample,T (K),ln K\n");
        for i in 0..6 {
            let name = if i % 2 == 0 { a } else { b };
            text.push_str(&format!("{name},{},{}\n", 280 + i, i));
        }
        let imp = import_text("x.csv", &text, &ImportOptions::default()).unwrap();
        let sets: Vec<(&str, usize)> = imp
            .series
            .iter()
            .map(|s| (s.name.as_str(), s.len()))
            .collect();
        assert_eq!(sets, [(a, 3), (b, 3)]);
        assert_eq!(imp.series[1].converted().unwrap()[0].line(), 3);
    }
}
