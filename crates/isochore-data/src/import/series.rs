//! Series stage of the reading pipeline: the data sets.
//!
//! The scan keeps the accepted [`Row`]s (40 bytes each) of each data set in a [`Scanned`],
//! with its note cells; [`assemble`] completes what the scan read and checks each data
//! set's size and temperatures, and [`Scanned::into_data_set`] makes it a
//! [`DataSet`](crate::DataSet). [`make_points`] turns rows into the fit's [`Point`]s,
//! exclusions applied and replicates grouped; the averaging arithmetic itself is
//! [`isochore_fit::average_replicates`].

use super::{ImportOptions, Replicates, SourceInfo};
use crate::dataset::{DataSet, SeriesSettings};
use crate::error::{Error, RejectedRow};
use crate::mapping::ColumnMapping;
use isochore_fit::{average_replicates, Measurement};

/// One accepted row, converted to the fitting scale.
///
/// Kept in 40 bytes (a 10⁶-row file holds a million of them): line and row numbers are
/// stored as `u32` (files are limited to 4 GiB), an absent σ as NaN, and the note cell in
/// the data set ([`DataSet::note`]).
#[derive(Debug, Clone, Copy)]
pub struct Row {
    /// Temperature in kelvin.
    pub t_k: f64,
    /// ln K (association sense for K_d, see `isochore_fit::units`).
    pub ln_k: f64,
    /// σ(ln K), NaN when absent (a present σ is finite and > 0).
    pub(super) sigma: f64,
    pub(super) line: u32,
    pub(super) row: u32,
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
    /// A placeholder, for room filled before the rows are read.
    pub(super) const EMPTY: Row = Row {
        t_k: 0.0,
        ln_k: 0.0,
        sigma: f64::NAN,
        line: 0,
        row: 0,
        start: 0,
        end: 0,
    };

    /// A row converted from cells kept as typed (no byte range in an import's text).
    pub(crate) fn new(t_k: f64, ln_k: f64, sigma: Option<f64>, line: usize, row: usize) -> Row {
        Row {
            t_k,
            ln_k,
            sigma: sigma.unwrap_or(f64::NAN),
            line: u32::try_from(line).unwrap_or(u32::MAX),
            row: u32::try_from(row).unwrap_or(u32::MAX),
            start: 0,
            end: 0,
        }
    }

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

/// One data set as the scan reads it: its rows and note cells (made a [`DataSet`] by
/// [`Scanned::into_data_set`] once the whole file is read).
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct Scanned {
    /// Its name: the series cell, or the file name without extension.
    pub name: String,
    /// Accepted rows in file order.
    pub rows: Vec<Row>,
    /// The non-empty note cells: (1-based row number, note), in row order.
    pub notes: Vec<(u32, String)>,
}

/// What every data set of one file shares.
pub(super) struct FileInfo<'a> {
    pub source: &'a SourceInfo,
    pub headers: &'a [String],
    pub header_line: usize,
    pub mapping: &'a ColumnMapping,
    pub comma_ok: bool,
    pub options: &'a ImportOptions,
}

impl Scanned {
    /// The data set: the file's headers, mapping and decimal convention, settings at their
    /// defaults with the import's replicate handling, and the rows read (no cells).
    pub(super) fn into_data_set(self, f: &FileInfo<'_>) -> DataSet {
        let mut d = DataSet::new(
            self.name,
            f.source.clone(),
            f.headers.to_vec(),
            f.mapping.clone(),
        );
        d.header_line = f.header_line;
        d.decimal_comma = f.comma_ok;
        d.settings = SeriesSettings {
            replicates: f.options.replicates,
            replicate_tolerance_k: f.options.replicate_tolerance_k,
            ..SeriesSettings::default()
        };
        d.read = self.rows;
        d.read_notes = self.notes;
        d
    }
}

/// Builds points from converted rows (of an import or of cells kept as typed). With
/// [`Replicates::Average`] the included rows are grouped by temperature (within `tol` of
/// the group's lowest) and each group becomes one point by
/// [`isochore_fit::average_replicates`]; excluded rows stay their own points.
pub(crate) fn make_points(
    rows: &[Row],
    excluded: &[usize],
    mode: Replicates,
    tol: f64,
) -> Vec<Point> {
    // One sorted copy, so that a look-up is a binary search rather than a scan of every
    // exclusion for every row (10⁶ rows with many exclusions).
    let mut sorted_excluded = excluded.to_vec();
    sorted_excluded.sort_unstable();
    let is_excluded = |r: usize| sorted_excluded.binary_search(&r).is_ok();
    let single = |r: &Row| Point {
        measurement: Measurement {
            t_k: r.t_k,
            ln_k: r.ln_k,
            sigma_ln_k: r.sigma_ln_k(),
            included: !is_excluded(r.row()),
        },
        rows: vec![r.row()],
    };
    match mode {
        Replicates::Keep => rows.iter().map(single).collect(),
        Replicates::Average => {
            // Group included rows by temperature, in order of first appearance.
            let mut order: Vec<usize> = (0..rows.len())
                .filter(|&i| !is_excluded(rows[i].row()))
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
                let replicates: Vec<Measurement> = g
                    .iter()
                    .map(|&i| Measurement {
                        t_k: rows[i].t_k,
                        ln_k: rows[i].ln_k,
                        sigma_ln_k: rows[i].sigma_ln_k(),
                        included: true,
                    })
                    .collect();
                let Some(measurement) = average_replicates(&replicates) else {
                    continue;
                };
                let mut rs: Vec<usize> = g.iter().map(|&i| rows[i].row()).collect();
                rs.sort_unstable();
                tagged.push((
                    first,
                    Point {
                        measurement,
                        rows: rs,
                    },
                ));
            }
            for (i, r) in rows.iter().enumerate() {
                if is_excluded(r.row()) {
                    tagged.push((i, single(r)));
                }
            }
            tagged.sort_by_key(|(i, _)| *i);
            tagged.into_iter().map(|(_, p)| p).collect()
        }
    }
}

pub(super) fn new_series(name: String, capacity: usize) -> Scanned {
    Scanned {
        name,
        rows: Vec::with_capacity(capacity),
        notes: Vec::new(),
    }
}

/// Completes the data sets the scan read: gives back the room reserved for rows that never
/// came, gives a file whose every row was rejected its one (empty) data set, and checks
/// that each data set has `min_points` rows and more than one temperature (`ranges` holds
/// each one's lowest and highest temperature, aligned with `series`).
///
/// # Errors
/// [`Error::TooFewPoints`] (quoting `rejected`) or [`Error::SingleTemperature`].
pub(super) fn assemble(
    file: &str,
    o: &ImportOptions,
    default_name: String,
    mut series: Vec<Scanned>,
    mut ranges: Vec<(f64, f64)>,
    rejected: &[RejectedRow],
) -> Result<Vec<Scanned>, Error> {
    // Give back the room reserved for rows that never came (it was never touched, so this
    // moves nothing).
    for s in &mut series {
        if s.rows.capacity() - s.rows.len() > 4096 {
            s.rows.shrink_to_fit();
        }
    }
    if series.is_empty() {
        series.push(new_series(default_name, 0));
        ranges.push((f64::INFINITY, f64::NEG_INFINITY));
    }
    for (s, &(lo, hi)) in series.iter().zip(&ranges) {
        if s.rows.len() < o.min_points.max(1) {
            return Err(Error::TooFewPoints {
                file: file.to_string(),
                series: s.name.clone(),
                found: s.rows.len(),
                needed: o.min_points.max(1),
                rejected: rejected.to_vec(),
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
    Ok(series)
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
}
