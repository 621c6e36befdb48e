//! Import of a delimited text file (or pasted text) into data sets of measurements.
//!
//! [`import_path`], [`import_bytes`] and [`import_text`] decode the bytes, detect the
//! dialect, read the header into a [`ColumnMapping`] (or take the caller's), then convert
//! every row. Good rows go into [`DataSet`]s (one per distinct value of the series column,
//! holding the converted rows without copying their cells);
//! rows with a bad cell go into [`Import::rejected`] with line, column and reason. Faults
//! of the whole file (empty, header only, unknown header, size limits, too few points,
//! one temperature) are an [`Error`].
//!
//! The reading is a pipeline, one stage per file: `source` (the bytes, size limits,
//! decoding, SHA-256), `dialect` (binary check, delimiter, header row, decimal mark),
//! `unit_guess` (a temperature column without a unit), `scan` (the row scanner, where the
//! speed tricks live) and `series` (the data sets and their points). This file holds the
//! options, the [`Import`] result and the order of the stages (`parse`).

mod dialect;
mod scan;
mod series;
mod source;
mod stream;
mod unit_guess;

pub use scan::TWO_THREADS_ABOVE;
pub(crate) use series::make_points;
pub use series::{Point, Row};
pub use source::{import_bytes, import_path, import_text, sha256_hex, SourceInfo};
pub use stream::{import_path_rows, PIECES_ABOVE};

use crate::assign::ColumnChoice;
use crate::dataset::DataSet;
use crate::error::{Error, RejectedRow};
use crate::header;
use crate::mapping::ColumnMapping;
use crate::text::{Delimiter, Reader};
use isochore_fit::TemperatureUnit;
use serde::{Deserialize, Serialize};

/// How the decimal mark is chosen. One convention holds for the whole file.
///
/// With a comma delimiter only '.' can be a decimal mark. Otherwise, under `Auto`, the
/// number cells decide: all points, or all commas. A file that mixes the two, or whose
/// only commas could also be thousands separators (`1,500`: one to three digits, a comma,
/// three digits), is refused with the line and column of the cell at fault, and the user
/// states the convention (`Point` or `Comma`). The check is made while the rows are read.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum DecimalMark {
    /// Decided by the file: a comma inside a number is a decimal mark unless the delimiter
    /// is a comma; mixed or ambiguous marks are refused.
    #[default]
    Auto,
    /// Only '.' is a decimal mark; a comma in a number cell makes it not a number.
    Point,
    /// ',' is the decimal mark (`1,500` is 1.5); a cell with '.' is refused. Not possible
    /// with a comma delimiter.
    Comma,
}

/// What to do with replicates: rows of one data set whose temperatures agree within
/// [`ImportOptions::replicate_tolerance_k`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum Replicates {
    /// Every row is its own point (the default).
    #[default]
    Keep,
    /// Replicates become one point: the mean temperature and the mean ln K, inverse-variance
    /// weighted when every replicate has σ (then σ = 1/√Σw); otherwise the plain mean with
    /// σ = s/√n from the spread (none when n = 1 or the spread is zero).
    Average,
}

/// Options of an import. `Default` gives automatic detection and generous limits.
#[derive(Debug, Clone, PartialEq)]
pub struct ImportOptions {
    /// The delimiter, or `None` to detect it (tab, semicolon, comma, pipe, whitespace).
    pub delimiter: Option<Delimiter>,
    /// The decimal mark.
    pub decimal: DecimalMark,
    /// Replicate handling, carried into each data set's settings.
    pub replicates: Replicates,
    /// Temperatures closer than this (K) are replicates (default 0.05 K).
    pub replicate_tolerance_k: f64,
    /// Largest file accepted, in bytes (default 256 MiB; at most 4 GiB − 1).
    pub max_file_bytes: u64,
    /// Longest line accepted, in bytes (default 64 KiB).
    pub max_line_bytes: usize,
    /// Most cells accepted in a row (default 256).
    pub max_columns: usize,
    /// Fewest usable points a data set needs (default 3; 2 allows the two-point estimate).
    pub min_points: usize,
    /// Keep a column whose header is not recognised (`operator`, `date`, …) as a column kept
    /// but not used (the default: it is shown with the data, left out of the fit, and
    /// [`ColumnMapping::unused_columns`] names it); false refuses such a file.
    pub ignore_unknown_columns: bool,
    /// Columns chosen by the caller (`temperature=T_degC`, `K=3`), laid over what the
    /// headers say; each chosen column replaces the one the headers gave that role. Not used
    /// with [`ImportOptions::mapping`].
    pub columns: Vec<ColumnChoice>,
    /// The scale of a temperature column whose header carries no unit (instead of inferring
    /// it from the values). A header that states another unit is refused. Not used with
    /// [`ImportOptions::mapping`].
    pub temperature_unit: Option<TemperatureUnit>,
    /// Use this mapping instead of reading the headers.
    pub mapping: Option<ColumnMapping>,
    /// Accept temperatures outside the plausible range 1 to 10 000 K (the user confirms
    /// them); by default such a row is rejected with its line and column.
    pub allow_extreme_temperatures: bool,
}

impl Default for ImportOptions {
    fn default() -> Self {
        ImportOptions {
            delimiter: None,
            decimal: DecimalMark::Auto,
            replicates: Replicates::Keep,
            replicate_tolerance_k: 0.05,
            max_file_bytes: 256 << 20,
            max_line_bytes: 64 << 10,
            max_columns: 256,
            min_points: 3,
            ignore_unknown_columns: true,
            columns: Vec::new(),
            temperature_unit: None,
            mapping: None,
            allow_extreme_temperatures: false,
        }
    }
}

/// The result of an import: the data sets, the rejected rows and what was detected.
#[derive(Debug, Clone, PartialEq)]
pub struct Import {
    /// Where the data came from.
    pub source: SourceInfo,
    /// Header cells as typed (trimmed).
    pub headers: Vec<String>,
    /// Physical line of the header.
    pub header_line: usize,
    /// What each column means.
    pub mapping: ColumnMapping,
    /// The delimiter used.
    pub delimiter: Delimiter,
    /// True when commas inside numbers are read as decimal marks and the file uses them.
    pub decimal_comma: bool,
    /// The data sets, in order of first appearance, holding the converted rows (not the
    /// cells: see [`Import::data_sets_with_cells`]).
    pub series: Vec<DataSet>,
    /// Rows not accepted, in file order, with reasons.
    pub rejected: Vec<RejectedRow>,
    pub(crate) comma_ok: bool,
    pub(crate) text: String,
}

impl Import {
    /// The data sets with the cells of every row as typed, as a project saves them (the
    /// converted rows are then dropped: the cells are the source of truth).
    pub fn data_sets_with_cells(&self) -> Vec<DataSet> {
        self.series
            .iter()
            .map(|s| {
                let mut d = s.without_rows();
                d.set_raw_rows(
                    s.read
                        .iter()
                        .map(|r| crate::dataset::RawRow {
                            line: r.line(),
                            cells: self.cells(r),
                        })
                        .collect(),
                );
                d
            })
            .collect()
    }

    /// The rows the reader kept for data set `index` (converted, with their lines; their
    /// cells come from [`Import::cells`]), borrowed without a copy.
    pub fn rows_of(&self, index: usize) -> &[Row] {
        self.series.get(index).map_or(&[], |s| &s.read)
    }

    /// The cells of an accepted row of this import exactly as typed (quotes removed,
    /// doubled quotes undone); none when the text was not kept ([`Import::has_text`]).
    pub fn cells(&self, row: &Row) -> Vec<String> {
        let Ok(mut r) = self.reader_at(row.start as usize, row.end as usize) else {
            return Vec::new();
        };
        match r.next_record() {
            Ok(Some(_)) => r.spans.iter().map(|s| s.unescaped(&self.text)).collect(),
            _ => Vec::new(),
        }
    }

    fn reader_at(&self, start: usize, end: usize) -> Result<Reader<'_>, ()> {
        let text = self.text.get(..end).ok_or(())?;
        Ok(Reader::new(
            text,
            start,
            self.delimiter,
            usize::MAX,
            usize::MAX,
            &self.source.name,
        ))
    }

    /// Whether the file's text is kept, so that [`Import::cells`] can give a row's cells
    /// (not after [`import_path_rows`] read a large file in pieces).
    pub fn has_text(&self) -> bool {
        !self.text.is_empty()
    }

    /// Whether commas in number cells are decimal marks in this import (stored in projects
    /// so that the raw cells are read the same way again).
    pub fn comma_is_decimal(&self) -> bool {
        self.comma_ok
    }

    /// Every rejected row as a full message, starting with the file name, e.g.
    /// `data.csv: line 14, column 2 ('Kd (nM)'): 'abc' is not a number; …`.
    pub fn rejected_messages(&self) -> Vec<String> {
        self.rejected
            .iter()
            .map(|r| format!("{}: {}", self.source.name, r.message()))
            .collect()
    }

    /// The mapping in words, one line per column (see [`ColumnMapping::describe`]).
    pub fn describe_mapping(&self) -> Vec<String> {
        self.mapping.describe(&self.headers)
    }

    /// The rule for empty uncertainty cells ([`DataSet::check_sigma`]) over every data set:
    /// a file where one data set has σ in some rows only is refused for a weighted fit.
    ///
    /// # Errors
    /// [`Error::MissingSigma`].
    pub fn check_sigma(&self) -> Result<(), Error> {
        self.series.iter().try_for_each(DataSet::check_sigma)
    }

    /// The data set with this name.
    pub fn series_named(&self, name: &str) -> Option<&DataSet> {
        self.series.iter().find(|s| s.name == name)
    }

    /// Strict reading: the import itself if no row was rejected, otherwise the first
    /// rejected row as an error.
    pub fn strict(self) -> Result<Import, Error> {
        match self.rejected.first() {
            None => Ok(self),
            Some(r) => Err(Error::Row {
                file: self.source.name.clone(),
                rejected: Box::new(r.clone()),
            }),
        }
    }
}

struct Parsed {
    headers: Vec<String>,
    header_line: usize,
    mapping: ColumnMapping,
    delimiter: Delimiter,
    decimal_comma: bool,
    comma_ok: bool,
    series: Vec<series::Scanned>,
    rejected: Vec<RejectedRow>,
}

fn stem(name: &str) -> String {
    let base = name.rsplit(['/', '\\']).next().unwrap_or(name);
    match base.rfind('.') {
        Some(i) if i > 0 => base[..i].to_string(),
        _ => base.to_string(),
    }
}

/// The reading pipeline over decoded text: dialect and header, mapping, unit guess, scan,
/// decimal convention, data sets. `clean`: the text is known to hold no NUL byte and no
/// quote (see `source::read_file`).
fn parse(
    file: &str,
    text: &str,
    start: usize,
    clean: bool,
    o: &ImportOptions,
) -> Result<Parsed, Error> {
    let first_quote = dialect::first_quote(file, text, start, clean)?;
    let dialect::Header {
        delimiter,
        comma_ok,
        header_line,
        headers,
        data_start,
        first_line,
    } = dialect::read_header(file, text, start, o)?;
    let (mut mapping, t_known) = match &o.mapping {
        Some(m) => {
            m.check(headers.len())
                .map_err(|message| Error::InvalidMapping {
                    file: file.to_string(),
                    message,
                })?;
            (m.clone(), true)
        }
        None => {
            let d = header::detect(&headers, file, header_line, o)?;
            (d.mapping, d.temperature_unit_known)
        }
    };
    if !t_known {
        unit_guess::decide_temperature_unit(
            file,
            text,
            data_start,
            delimiter,
            o,
            &headers,
            header_line,
            &mut mapping,
        )?;
    }
    let default_name = stem(file);
    let chunk = scan::Scan {
        file,
        text,
        delimiter,
        o,
        mapping: &mapping,
        headers: &headers,
        comma_ok,
        default_name: &default_name,
        quote_free: false,
        offset: 0,
        rows_before: 0,
    }
    .read_all(data_start, first_line, first_quote)?;
    let header = Parsed {
        headers,
        header_line,
        mapping,
        delimiter,
        decimal_comma: false,
        comma_ok,
        series: Vec::new(),
        rejected: Vec::new(),
    };
    complete(file, o, header, default_name, chunk)
}

/// The stages after the scan: the decimal convention from the marks seen, a file without
/// data rows refused, the data sets completed and checked. `header`: what the dialect
/// stage and the mapping gave (its `series`, `rejected` and `decimal_comma` are filled
/// here); `chunk`: every data row read.
fn complete(
    file: &str,
    o: &ImportOptions,
    header: Parsed,
    default_name: String,
    chunk: scan::Chunk,
) -> Result<Parsed, Error> {
    let scan::Chunk {
        series,
        ranges,
        rejected,
        any_data,
        marks,
        ..
    } = chunk;
    let Parsed {
        headers,
        header_line,
        mapping,
        delimiter,
        comma_ok,
        ..
    } = header;
    // One decimal convention per file, decided from the marks seen while reading.
    let decimal_comma = dialect::decimal_comma(&marks, o.decimal, comma_ok, file, &headers)?;
    // Projects read their cells again with the convention found: a file of decimal points
    // keeps commas out.
    let comma_ok = comma_ok && (decimal_comma || o.decimal == DecimalMark::Comma);
    if !any_data {
        return Err(Error::HeaderOnly {
            file: file.to_string(),
            line: header_line,
        });
    }
    let series = series::assemble(file, o, default_name, series, ranges, &rejected)?;
    Ok(Parsed {
        headers,
        header_line,
        mapping,
        delimiter,
        decimal_comma,
        comma_ok,
        series,
        rejected,
    })
}
