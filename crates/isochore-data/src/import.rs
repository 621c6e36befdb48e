//! Import of a delimited text file (or pasted text) into data sets of measurements.
//!
//! [`import_path`], [`import_bytes`] and [`import_text`] decode the bytes, detect the
//! dialect, read the header into a [`ColumnMapping`] (or take the caller's), then convert
//! every row. Good rows go into [`Series`] (one per distinct value of the series column);
//! rows with a bad cell go into [`Import::rejected`] with line, column and reason. Faults
//! of the whole file (empty, header only, unknown header, size limits, too few points,
//! one temperature) are an [`Error`].

use crate::error::{Error, RejectedRow, RowProblem};
use crate::header;
use crate::mapping::{convert_cells, mark_of, ColumnMapping, Mark};
use crate::text::{self, Delimiter, Reader, Record, Span};
use isochore_fit::{Measurement, TemperatureUnit};
use rayon::prelude::*;
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};
use std::collections::HashMap;
use std::io::Read;
use std::path::Path;

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
    /// Replicate handling, carried into each [`Series`].
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
    /// Treat unrecognised headers as unused columns instead of an error.
    pub ignore_unknown_columns: bool,
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
            ignore_unknown_columns: false,
            mapping: None,
            allow_extreme_temperatures: false,
        }
    }
}

/// Where the data came from.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct SourceInfo {
    /// The file name (or the name given to pasted text).
    pub name: String,
    /// The full path, when read from a file.
    #[serde(default)]
    pub path: Option<String>,
    /// SHA-256 of the bytes as read, in lower-case hex.
    pub sha256: String,
    /// Size in bytes.
    pub bytes: u64,
}

/// One accepted row, converted to the fitting scale.
///
/// Kept in 40 bytes (a 10⁶-row file holds a million of them): line and row numbers are
/// stored as `u32` (files are limited to 4 GiB), an absent σ as NaN, and the note cell in
/// the data set ([`Series::note`]).
#[derive(Debug, Clone, Copy)]
pub struct Row {
    /// Temperature in kelvin.
    pub t_k: f64,
    /// ln K (association sense for K_d, see `isochore_fit::units`).
    pub ln_k: f64,
    /// σ(ln K), NaN when absent (a present σ is finite and > 0).
    sigma: f64,
    line: u32,
    row: u32,
    pub(crate) start: u32,
    pub(crate) end: u32,
}

/// Rows are equal when every value is, an absent σ included (NaN stands for it).
impl PartialEq for Row {
    fn eq(&self, other: &Row) -> bool {
        self.t_k == other.t_k
            && self.ln_k == other.ln_k
            && self.sigma_ln_k() == other.sigma_ln_k()
            && (self.line, self.row, self.start, self.end)
                == (other.line, other.row, other.start, other.end)
    }
}

impl Row {
    /// Physical 1-based line in the file.
    #[inline]
    pub fn line(&self) -> usize {
        self.line as usize
    }

    /// 1-based number of this row among the accepted rows of its data set.
    #[inline]
    pub fn row(&self) -> usize {
        self.row as usize
    }

    /// σ(ln K), when the file gives an uncertainty for this row.
    #[inline]
    pub fn sigma_ln_k(&self) -> Option<f64> {
        (!self.sigma.is_nan()).then_some(self.sigma)
    }

    /// The converted values of this row.
    pub fn converted(&self) -> ConvertedRow {
        ConvertedRow {
            row: self.row(),
            t_k: self.t_k,
            ln_k: self.ln_k,
            sigma_ln_k: self.sigma_ln_k(),
        }
    }
}

/// One point for the fit, with the data rows it stands for (one row, or several averaged
/// replicates).
#[derive(Debug, Clone, PartialEq)]
pub struct Point {
    /// The point.
    pub measurement: Measurement,
    /// 1-based row numbers (see [`Row::row`]) it was made from.
    pub rows: Vec<usize>,
}

/// One row converted to the fitting scale, identified by its 1-based row number.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ConvertedRow {
    /// 1-based row number in its data set.
    pub row: usize,
    /// Temperature in kelvin.
    pub t_k: f64,
    /// ln K.
    pub ln_k: f64,
    /// σ(ln K), if known.
    pub sigma_ln_k: Option<f64>,
}

/// One data set.
#[derive(Debug, Clone, PartialEq)]
pub struct Series {
    /// Its name: the series cell, or the file name without extension.
    pub name: String,
    /// Accepted rows in file order.
    pub rows: Vec<Row>,
    /// Replicate handling.
    pub replicates: Replicates,
    /// Replicate temperature tolerance in K.
    pub replicate_tolerance_k: f64,
    /// The non-empty note cells: (1-based row number, note), in row order.
    notes: Vec<(u32, String)>,
}

impl Series {
    /// The note cell of a row (trimmed), when the file has a note column and the cell is
    /// not empty.
    pub fn note(&self, row: &Row) -> Option<&str> {
        self.notes
            .binary_search_by_key(&row.row, |(r, _)| *r)
            .ok()
            .map(|i| self.notes[i].1.as_str())
    }

    /// The points for the fit. `excluded` lists 1-based row numbers to leave out; they stay
    /// in the result, one point each, with `included = false`. With
    /// [`Replicates::Average`] the included rows at one temperature become one point.
    pub fn points(&self, excluded: &[usize]) -> Vec<Point> {
        let rows: Vec<ConvertedRow> = self.rows.iter().map(Row::converted).collect();
        make_points(&rows, excluded, self.replicates, self.replicate_tolerance_k)
    }

    /// The first row without σ, when some other row of the data set has one (the rule of
    /// [`Import::check_sigma`]).
    pub fn first_row_missing_sigma(&self) -> Option<&Row> {
        let first_missing = self.rows.iter().find(|r| r.sigma.is_nan())?;
        self.rows
            .iter()
            .any(|r| !r.sigma.is_nan())
            .then_some(first_missing)
    }

    /// The measurements for the fit (see [`Series::points`]).
    pub fn measurements(&self, excluded: &[usize]) -> Vec<Measurement> {
        self.points(excluded)
            .into_iter()
            .map(|p| p.measurement)
            .collect()
    }
}

/// Builds points from converted rows; shared with project files.
pub(crate) fn make_points(
    rows: &[ConvertedRow],
    excluded: &[usize],
    mode: Replicates,
    tol: f64,
) -> Vec<Point> {
    let is_excluded = |r: usize| excluded.contains(&r);
    let single = |r: &ConvertedRow| Point {
        measurement: Measurement {
            t_k: r.t_k,
            ln_k: r.ln_k,
            sigma_ln_k: r.sigma_ln_k,
            included: !is_excluded(r.row),
        },
        rows: vec![r.row],
    };
    match mode {
        Replicates::Keep => rows.iter().map(single).collect(),
        Replicates::Average => {
            // Group included rows by temperature, in order of first appearance.
            let mut order: Vec<usize> = (0..rows.len())
                .filter(|&i| !is_excluded(rows[i].row))
                .collect();
            order.sort_by(|&a, &b| rows[a].t_k.total_cmp(&rows[b].t_k).then(a.cmp(&b)));
            let mut groups: Vec<Vec<usize>> = Vec::new();
            for i in order {
                match groups.last_mut() {
                    Some(g) if (rows[i].t_k - rows[g[0]].t_k).abs() <= tol => g.push(i),
                    _ => groups.push(vec![i]),
                }
            }
            let mut tagged: Vec<(usize, Point)> = Vec::new();
            for g in groups {
                let first = g.iter().copied().min().unwrap_or(0);
                let n = g.len() as f64;
                let t = g.iter().map(|&i| rows[i].t_k).sum::<f64>() / n;
                let all_sigma = g.iter().all(|&i| rows[i].sigma_ln_k.is_some());
                let (ln_k, sigma) = if g.len() == 1 {
                    (rows[g[0]].ln_k, rows[g[0]].sigma_ln_k)
                } else if all_sigma {
                    let w: Vec<f64> = g
                        .iter()
                        .map(|&i| {
                            let s = rows[i].sigma_ln_k.unwrap_or(1.0);
                            1.0 / (s * s)
                        })
                        .collect();
                    let sw: f64 = w.iter().sum();
                    let m = g
                        .iter()
                        .zip(&w)
                        .map(|(&i, wi)| wi * rows[i].ln_k)
                        .sum::<f64>()
                        / sw;
                    (m, Some(1.0 / sw.sqrt()))
                } else {
                    let m = g.iter().map(|&i| rows[i].ln_k).sum::<f64>() / n;
                    let ss = g.iter().map(|&i| (rows[i].ln_k - m).powi(2)).sum::<f64>();
                    let sd = (ss / (n - 1.0)).sqrt();
                    let se = sd / n.sqrt();
                    (m, (se.is_finite() && se > 0.0).then_some(se))
                };
                let mut rs: Vec<usize> = g.iter().map(|&i| rows[i].row).collect();
                rs.sort_unstable();
                tagged.push((
                    first,
                    Point {
                        measurement: Measurement {
                            t_k: t,
                            ln_k,
                            sigma_ln_k: sigma,
                            included: true,
                        },
                        rows: rs,
                    },
                ));
            }
            for (i, r) in rows.iter().enumerate() {
                if is_excluded(r.row) {
                    tagged.push((i, single(r)));
                }
            }
            tagged.sort_by_key(|(i, _)| *i);
            tagged.into_iter().map(|(_, p)| p).collect()
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
    /// The data sets, in order of first appearance.
    pub series: Vec<Series>,
    /// Rows not accepted, in file order, with reasons.
    pub rejected: Vec<RejectedRow>,
    pub(crate) comma_ok: bool,
    pub(crate) text: String,
}

impl Import {
    /// The cells of an accepted row exactly as typed (quotes removed, doubled quotes undone).
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

    /// The rule for empty uncertainty cells, for a weighted fit: a data set whose σ column
    /// is entirely empty has no uncertainties (it is fitted unweighted, see the README); a
    /// data set with σ in some rows and an empty σ cell in another is refused, naming the
    /// line and column of the first empty cell. Fitting unweighted ignores σ, so a caller
    /// that fits unweighted need not call this.
    ///
    /// # Errors
    /// [`Error::MissingSigma`].
    pub fn check_sigma(&self) -> Result<(), Error> {
        let Some(u) = self.mapping.uncertainty else {
            return Ok(());
        };
        for s in &self.series {
            if let Some(r) = s.first_row_missing_sigma() {
                return Err(Error::MissingSigma {
                    file: self.source.name.clone(),
                    series: s.name.clone(),
                    line: r.line(),
                    column: u.column + 1,
                    header: self.headers.get(u.column).cloned().unwrap_or_default(),
                });
            }
        }
        Ok(())
    }

    /// The data set with this name.
    pub fn series_named(&self, name: &str) -> Option<&Series> {
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

/// Imports a file.
///
/// # Errors
/// See [`Error`]: I/O, size limits, header faults, too few points, one temperature.
pub fn import_path(path: impl AsRef<Path>, options: &ImportOptions) -> Result<Import, Error> {
    let path = path.as_ref();
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| path.display().to_string());
    let io = |e: std::io::Error| Error::Io {
        path: path.display().to_string(),
        message: e.to_string(),
    };
    let limit = effective_limit(options);
    let file = std::fs::File::open(path).map_err(io)?;
    let size = file.metadata().map_err(io)?.len();
    if size > limit {
        return Err(Error::FileTooLarge {
            file: name,
            bytes: size,
            limit,
        });
    }
    let (bytes, clean) = read_file(file, size, limit).map_err(io)?;
    import_owned(
        &name,
        Some(path.display().to_string()),
        bytes,
        clean,
        options,
    )
}

/// Files larger than this (bytes) are read in two halves on two threads.
const PARALLEL_READ_ABOVE: u64 = 4 << 20;

/// Reads the whole file (at most `limit + 1` bytes, so that a file that grew past the
/// limit is still caught). A large file is read in two halves at once: copying from the
/// page cache and the first touch of each fresh page then happen on two cores, and each
/// thread also looks for NUL bytes and quotes in its half while it is in the cache. The
/// flag returned is true when the file was read that way and has neither.
fn read_file(file: std::fs::File, size: u64, limit: u64) -> std::io::Result<(Vec<u8>, bool)> {
    if size > PARALLEL_READ_ABOVE {
        #[cfg(unix)]
        {
            use std::os::unix::fs::FileExt;
            // Zeroed memory from the allocator costs nothing until it is written.
            let mut bytes = vec![0u8; size as usize];
            let mid = bytes.len() / 2;
            let (lo, hi) = bytes.split_at_mut(mid);
            let f = &file;
            let clean = |half: &[u8]| memchr::memchr2(0, b'"', half).is_none();
            let (ok, clean) = std::thread::scope(|sc| {
                let second = std::thread::Builder::new()
                    .spawn_scoped(sc, move || {
                        f.read_exact_at(hi, mid as u64).map(|()| clean(hi))
                    })
                    .ok();
                let first = f.read_exact_at(lo, 0).map(|()| clean(lo));
                let second = match second {
                    Some(h) => h.join().ok().and_then(Result::ok),
                    None => None,
                };
                match (first, second) {
                    (Ok(a), Some(b)) => (true, a && b),
                    _ => (false, false),
                }
            });
            if ok {
                // Anything written after `size` was taken from the metadata.
                let mut rest = &file;
                std::io::Seek::seek(&mut rest, std::io::SeekFrom::Start(size))?;
                let more = rest
                    .take(limit + 1 - size.min(limit + 1))
                    .read_to_end(&mut bytes)?;
                return Ok((bytes, clean && more == 0));
            }
            // The file changed size while it was read: read it again from the start.
            let mut again = &file;
            std::io::Seek::seek(&mut again, std::io::SeekFrom::Start(0))?;
        }
    }
    let mut bytes = Vec::with_capacity(size as usize + 1);
    file.take(limit + 1).read_to_end(&mut bytes)?;
    Ok((bytes, false))
}

/// Imports bytes (for example a file already in memory). `name` is used in messages.
///
/// # Errors
/// As [`import_path`].
pub fn import_bytes(name: &str, bytes: &[u8], options: &ImportOptions) -> Result<Import, Error> {
    if bytes.len() as u64 > effective_limit(options) {
        return Err(Error::FileTooLarge {
            file: name.to_string(),
            bytes: bytes.len() as u64,
            limit: effective_limit(options),
        });
    }
    import_owned(name, None, bytes.to_vec(), false, options)
}

/// Imports text pasted from a spreadsheet or typed in. `name` is used in messages.
///
/// # Errors
/// As [`import_path`].
pub fn import_text(name: &str, text: &str, options: &ImportOptions) -> Result<Import, Error> {
    import_bytes(name, text.as_bytes(), options)
}

fn effective_limit(o: &ImportOptions) -> u64 {
    o.max_file_bytes.min(u32::MAX as u64 - 1)
}

/// SHA-256 of bytes in lower-case hex.
pub fn sha256_hex(bytes: &[u8]) -> String {
    let digest = Sha256::digest(bytes);
    let mut s = String::with_capacity(64);
    for b in digest.iter() {
        s.push_str(&format!("{b:02x}"));
    }
    s
}

/// `clean`: the bytes are known to hold no NUL byte and no quote.
fn import_owned(
    name: &str,
    path: Option<String>,
    bytes: Vec<u8>,
    clean: bool,
    options: &ImportOptions,
) -> Result<Import, Error> {
    let n_bytes = bytes.len() as u64;
    let limit = effective_limit(options);
    if n_bytes > limit {
        return Err(Error::FileTooLarge {
            file: name.to_string(),
            bytes: n_bytes,
            limit,
        });
    }
    // Hash now unless the text will be the very same bytes (then hash in parallel).
    let utf16 = bytes.starts_with(&[0xFF, 0xFE]) || bytes.starts_with(&[0xFE, 0xFF]);
    let early_hash = utf16.then(|| sha256_hex(&bytes));
    let (text, start, early_hash, clean) = match text::decode(bytes) {
        // The very same bytes (or a part of them, after a byte-order mark).
        (t, s, None) if !utf16 => (t, s, early_hash, clean),
        (t, s, None) => (t, s, early_hash, false),
        (t, s, Some(original)) => (t, s, Some(sha256_hex(&original)), false),
    };
    if text.len() as u64 > limit {
        return Err(Error::FileTooLarge {
            file: name.to_string(),
            bytes: text.len() as u64,
            limit,
        });
    }
    let (sha, parsed) = std::thread::scope(|s| {
        let worker = if early_hash.is_none() && text.len() > (1 << 20) {
            std::thread::Builder::new()
                .spawn_scoped(s, || sha256_hex(text.as_bytes()))
                .ok()
        } else {
            None
        };
        let parsed = parse(name, &text, start, clean, options);
        let sha = match (early_hash, worker) {
            (Some(h), _) => h,
            (None, Some(w)) => w.join().unwrap_or_else(|_| sha256_hex(text.as_bytes())),
            (None, None) => sha256_hex(text.as_bytes()),
        };
        (sha, parsed)
    });
    let p = parsed?;
    Ok(Import {
        source: SourceInfo {
            name: name.to_string(),
            path,
            sha256: sha,
            bytes: n_bytes,
        },
        headers: p.headers,
        header_line: p.header_line,
        mapping: p.mapping,
        delimiter: p.delimiter,
        decimal_comma: p.decimal_comma,
        series: p.series,
        rejected: p.rejected,
        comma_ok: p.comma_ok,
        text,
    })
}

struct Parsed {
    headers: Vec<String>,
    header_line: usize,
    mapping: ColumnMapping,
    delimiter: Delimiter,
    decimal_comma: bool,
    comma_ok: bool,
    series: Vec<Series>,
    rejected: Vec<RejectedRow>,
}

/// Data larger than this (bytes) and free of quotes is read in two halves on two threads.
pub const TWO_THREADS_ABOVE: usize = 1 << 20;

fn stem(name: &str) -> String {
    let base = name.rsplit(['/', '\\']).next().unwrap_or(name);
    match base.rfind('.') {
        Some(i) if i > 0 => base[..i].to_string(),
        _ => base.to_string(),
    }
}

fn binary(file: &str, text: &str, start: usize) -> Error {
    let (line, character) = text::find_nul(text, start).unwrap_or((1, 1));
    Error::Binary {
        file: file.to_string(),
        line,
        character,
    }
}

/// `clean`: the text is known to hold no NUL byte and no quote (see [`read_file`]).
fn parse(
    file: &str,
    text: &str,
    start: usize,
    clean: bool,
    o: &ImportOptions,
) -> Result<Parsed, Error> {
    // One pass finds the first NUL byte (a binary file) and the first quote.
    let bytes = text.as_bytes();
    let scan = if clean {
        None
    } else {
        memchr::memchr2(0, b'"', &bytes[start..])
    };
    let first_quote = match scan {
        None => None,
        Some(i) if bytes[start + i] == 0 => return Err(binary(file, text, start)),
        Some(i) => {
            if memchr::memchr(0, &bytes[start + i..]).is_some() {
                return Err(binary(file, text, start));
            }
            Some(start + i)
        }
    };
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
            let d = header::detect(&headers, file, header_line, o.ignore_unknown_columns)?;
            (d.mapping, d.temperature_unit_known)
        }
    };
    let data_start = reader.position();
    if !t_known {
        decide_temperature_unit(
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
    let ctx = Scan {
        file,
        text,
        delimiter,
        o,
        mapping: &mapping,
        headers: &headers,
        comma_ok,
        default_name: &default_name,
        quote_free: false,
    };
    // Large files without quotes are read in two halves on two threads: with no quotes,
    // every line break ends a record, so the halves can be cut at any line break.
    let data_len = text.len() - data_start;
    let quote_free = match first_quote {
        None => true,
        Some(q) if q >= data_start => false,
        Some(_) => memchr::memchr(b'"', &bytes[data_start..]).is_none(),
    };
    let ctx = Scan { quote_free, ..ctx };
    let cut = if data_len > TWO_THREADS_ABOVE && quote_free {
        let mid = data_start + data_len / 2;
        memchr::memchr(b'\n', &bytes[mid..]).map(|i| mid + i + 1)
    } else {
        None
    };
    let first_line = reader.line();
    // Room for this many rows per data set (a data line takes at least a few bytes; this
    // covers the usual 20 to 60): the first part reserves for the whole file, so that the
    // second can be appended without moving the first.
    let reserve = |bytes: usize| if bytes > (1 << 20) { bytes / 16 } else { 0 };
    let chunk = match cut {
        None => ctx.run(data_start, text.len(), first_line, reserve(data_len))?,
        Some(cut) => {
            // The second half first counts the lines of the first (to number its own).
            let second_half = || {
                let lines_before = memchr::memchr_iter(b'\n', &bytes[data_start..cut]).count();
                let n = text.len() - cut;
                ctx.run(cut, text.len(), first_line + lines_before, reserve(n))
            };
            let (a, b) = std::thread::scope(|sc| {
                let second = std::thread::Builder::new()
                    .spawn_scoped(sc, second_half)
                    .ok();
                let a = ctx.run(data_start, cut, first_line, reserve(data_len));
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
    let Chunk {
        mut series,
        mut ranges,
        rejected,
        any_data,
        marks,
    } = chunk;
    // One decimal convention per file, decided from the marks seen while reading.
    let decimal_comma = match marks.decide(o.decimal, comma_ok) {
        Ok(c) => c,
        Err(fault) => {
            return Err(Error::DecimalMark {
                file: file.to_string(),
                line: fault.at.line,
                column: fault.at.column + 1,
                header: headers.get(fault.at.column).cloned().unwrap_or_default(),
                cell: fault.at.cell,
                message: fault.message,
            })
        }
    };
    // Projects read their cells again with the convention found: a file of decimal points
    // keeps commas out.
    let comma_ok = comma_ok && (decimal_comma || o.decimal == DecimalMark::Comma);
    // Give back the room reserved for rows that never came (it was never touched, so this
    // moves nothing).
    for s in &mut series {
        if s.rows.capacity() - s.rows.len() > 4096 {
            s.rows.shrink_to_fit();
        }
    }
    if !any_data {
        return Err(Error::HeaderOnly {
            file: file.to_string(),
            line: header_line,
        });
    }
    if series.is_empty() {
        series.push(new_series(default_name, o, 0));
        ranges.push((f64::INFINITY, f64::NEG_INFINITY));
    }
    for (s, &(lo, hi)) in series.iter().zip(&ranges) {
        if s.rows.len() < o.min_points.max(1) {
            return Err(Error::TooFewPoints {
                file: file.to_string(),
                series: s.name.clone(),
                found: s.rows.len(),
                needed: o.min_points.max(1),
                rejected: rejected.clone(),
            });
        }
        if hi - lo <= o.replicate_tolerance_k.max(0.0) && s.rows.len() > 1 {
            return Err(Error::SingleTemperature {
                file: file.to_string(),
                series: s.name.clone(),
                kelvin: lo,
            });
        }
    }
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

/// What one pass over (part of) the data rows needs.
struct Scan<'a> {
    file: &'a str,
    text: &'a str,
    delimiter: Delimiter,
    o: &'a ImportOptions,
    mapping: &'a ColumnMapping,
    headers: &'a [String],
    comma_ok: bool,
    default_name: &'a str,
    quote_free: bool,
}

/// The rows read from one part of the data.
struct Chunk {
    series: Vec<Series>,
    /// The lowest and highest temperature (K) of each data set's rows, aligned with
    /// `series` (taken while reading, so that no second pass over the rows is needed).
    ranges: Vec<(f64, f64)>,
    rejected: Vec<RejectedRow>,
    any_data: bool,
    /// The first cell of each kind of decimal mark.
    marks: Marks,
}

/// Where a number cell with a decimal mark was seen.
#[derive(Debug, Clone, PartialEq)]
struct MarkAt {
    line: usize,
    /// 0-based column.
    column: usize,
    cell: String,
}

/// The first cell with a decimal point, with an unambiguous decimal comma, and with a comma
/// that may be a thousands separator, in one part of the file (kept while reading, so the
/// one-convention rule needs no second pass).
#[derive(Debug, Clone, Default, PartialEq)]
struct Marks {
    point: Option<MarkAt>,
    comma: Option<MarkAt>,
    ambiguous: Option<MarkAt>,
}

/// Why the decimal convention could not be settled.
struct MarkFault {
    at: MarkAt,
    message: String,
}

impl Marks {
    #[inline]
    fn note(&mut self, mark: Mark, line: usize, column: usize, cell: &str) {
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
    fn merge(&mut self, later: Marks) {
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

impl Chunk {
    /// Appends a later part, merging data sets by name and renumbering rows.
    fn append(&mut self, later: Chunk) {
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
    /// Reads the records in `text[start..end]`; `line` is the physical line before `start`.
    /// Each of the first eight data sets reserves room for `reserve` rows: pages never
    /// written are never touched (so cost no memory), and growing by copying is avoided.
    /// The room left over is given back in [`parse`].
    fn run(&self, start: usize, end: usize, line: usize, reserve: usize) -> Result<Chunk, Error> {
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
        let mut series: Vec<Series> = Vec::new();
        let mut ranges: Vec<(f64, f64)> = Vec::new();
        let none = (f64::INFINITY, f64::NEG_INFINITY);
        let mut index: HashMap<String, usize> = HashMap::new();
        // The names of the data sets in a form compared without a call (see `NameKey`).
        let mut keys: Vec<NameKey> = Vec::new();
        let mut last = 0usize;
        let mut rejected = Vec::new();
        let mut any_data = false;
        let mut marks = Marks::default();
        // The number cells whose decimal marks are watched (only where a comma could be one).
        let mut watched: Vec<usize> = vec![mapping.temperature.column, mapping.quantity.column];
        if let Some(u) = mapping.uncertainty {
            watched.push(u.column);
        }
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
            let si = match mapping.series {
                None => {
                    if series.is_empty() {
                        series.push(new_series(self.default_name.to_string(), o, reserve));
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
                            o,
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
                        for &col in &watched {
                            let text = cell(col);
                            marks.note(mark_of(text), rec.line, col, text);
                        }
                    }
                    let s = &mut series[si];
                    let row = s.rows.len() as u32 + 1;
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
                    s.rows.push(Row {
                        t_k: c.t_k,
                        ln_k: c.ln_k,
                        sigma: c.sigma_ln_k.unwrap_or(f64::NAN),
                        line: rec.line as u32,
                        row,
                        start: rec.start,
                        end: rec.end,
                    });
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
        Ok(Chunk {
            series,
            ranges,
            rejected,
            any_data,
            marks,
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

fn new_series(name: String, o: &ImportOptions, capacity: usize) -> Series {
    Series {
        name,
        rows: Vec::with_capacity(capacity),
        replicates: o.replicates,
        replicate_tolerance_k: o.replicate_tolerance_k,
        notes: Vec::new(),
    }
}

/// The rule for a temperature column without a unit (stated in the README): if every
/// readable value is below 150 the column is °C; if every value is at least 200 it is K;
/// otherwise the file must say.
#[allow(clippy::too_many_arguments)]
fn decide_temperature_unit(
    file: &str,
    text: &str,
    data_start: usize,
    delimiter: Delimiter,
    o: &ImportOptions,
    headers: &[String],
    header_line: usize,
    mapping: &mut ColumnMapping,
) -> Result<(), Error> {
    let mut r = Reader::new(
        text,
        data_start,
        delimiter,
        o.max_line_bytes,
        o.max_columns,
        file,
    );
    let tc = mapping.temperature.column;
    let comma_ok = delimiter != Delimiter::Comma && o.decimal != DecimalMark::Point;
    let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
    while let Some(Record { .. }) = r.next_record()? {
        if let Some(s) = r.spans.get(tc) {
            if let Ok(v) = crate::mapping::parse_number(s.raw(text), comma_ok) {
                lo = lo.min(v);
                hi = hi.max(v);
            }
        }
    }
    let unit = if hi < 150.0 {
        TemperatureUnit::Celsius
    } else if lo >= 200.0 {
        TemperatureUnit::Kelvin
    } else {
        return Err(Error::MissingUnit {
            file: file.to_string(),
            line: header_line,
            column: tc + 1,
            header: headers.get(tc).cloned().unwrap_or_default(),
            hint: format!(
                "the temperature has no unit and its values ({lo} to {hi}) do not tell °C from K; write the unit in the header, e.g. 'T (°C)' or 'T/K'"
            ),
        });
    };
    mapping.temperature.unit = unit;
    mapping.temperature.assumed = true;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_row_takes_forty_bytes_and_keeps_an_absent_sigma() {
        // A million rows of a large file: 40 MB, not the 80 MB of the first layout.
        assert_eq!(std::mem::size_of::<Row>(), 40);
        let mut r = Row {
            t_k: 300.0,
            ln_k: 1.0,
            sigma: f64::NAN,
            line: 2,
            row: 1,
            start: 0,
            end: 0,
        };
        assert_eq!(r.sigma_ln_k(), None);
        assert_eq!(r, r.clone(), "an absent σ equals itself");
        r.sigma = 0.1;
        assert_eq!(r.sigma_ln_k(), Some(0.1));
        assert_eq!((r.line(), r.row()), (2, 1));
    }

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
            .map(|s| (s.name.as_str(), s.rows.len()))
            .collect();
        assert_eq!(sets, [(a, 3), (b, 3)]);
        assert_eq!(imp.series[1].rows[0].line(), 3);
    }
}
