//! What a series' cells give before any fit, kept for the refits that follow an exclusion
//! ([`Prepared`]), and the points of a refit with their "included" marks ([`Marked`]).
//!
//! A refit's points are the previous analysis' points with the marks of the rows whose
//! exclusion changed set again: the marks of a point that stands for one row are "its row is
//! not excluded", as isochore-data sets them, so only the rows in one list of excluded rows
//! and not in the other change. The vector comes from the analysis before the previous one
//! when it was given back ([`Prepared::give_back`]: no copy, no fresh memory) and is
//! otherwise a copy of the previous analysis' points.

use crate::decimate::{sort_by_x_then_id, EnvelopeIndex};
use crate::doc::Entry;
use isochore_analysis::weighting::Weighed;
use isochore_data::{ColumnMapping, Replicates, SeriesSettings};
use isochore_fit::Measurement;
use std::sync::{Arc, Mutex};

/// What decides how a series' cells convert and are weighted: while it is the same, the
/// converted points of [`Prepared`] still hold (an exclusion changes none of it).
#[derive(Debug, Clone, PartialEq)]
struct PrepKey {
    cells_rev: u64,
    n_rows: usize,
    sha256: String,
    mapping: ColumnMapping,
    decimal_comma: bool,
    settings: SeriesSettings,
}

impl PrepKey {
    fn of(series: &Entry) -> PrepKey {
        let d = &series.data;
        PrepKey {
            cells_rev: series.cells_rev,
            n_rows: series.n_rows(),
            sha256: d.source.sha256.clone(),
            mapping: d.mapping.clone(),
            decimal_comma: d.decimal_comma,
            settings: d.settings,
        }
    }
}

/// Points with "included" marks and the sorted 1-based excluded rows they were marked for.
#[derive(Debug, Clone, Default)]
pub(crate) struct Marked {
    /// The points, one per row where a row converts.
    pub(crate) points: Vec<Measurement>,
    /// The 1-based rows excluded, ascending (`DataSet::excluded_rows`).
    pub(crate) excluded: Vec<usize>,
}

/// What a series' cells give before any fit, kept for the refits that follow an exclusion.
pub(crate) struct Prepared {
    key: PrepKey,
    /// Number of points.
    pub(crate) n_points: usize,
    /// Every point stands for one row (replicates kept): a refit need not regroup rows.
    one_row_each: bool,
    pub(crate) point_rows: Arc<Vec<Vec<usize>>>,
    pub(crate) point_of_row: Arc<Vec<Option<usize>>>,
    /// The weighting rule's decision (isochore-analysis), or its refusal in words.
    pub(crate) weighed: Result<Weighed, String>,
    pub(crate) vh_index: Arc<EnvelopeIndex>,
    pub(crate) extent: Option<[f64; 4]>,
    /// Large series only: the points with a finite temperature, by T and then index (the
    /// residual plot's order, which no refit changes).
    pub(crate) t_order: Vec<u32>,
    pub(crate) large: bool,
    /// Points of an analysis no longer shown, for the next refit to mark again.
    spare: Mutex<Option<Marked>>,
}

/// Only the key: the rest is shown by the analysis' own fields.
impl std::fmt::Debug for Prepared {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Prepared")
            .field("key", &self.key)
            .finish_non_exhaustive()
    }
}

impl Prepared {
    /// What `series` gives before any fit, from its converted points (`measurements`, with
    /// the rows of each in `point_rows` and the point of each row in `point_of_row`).
    pub(crate) fn new(
        series: &Entry,
        measurements: &[Measurement],
        point_rows: Vec<Vec<usize>>,
        point_of_row: Vec<Option<usize>>,
    ) -> Prepared {
        // The weighting rule the command line follows, from isochore-analysis: no σ at all
        // is fitted with equal weights (and says so among the fit's cautions); σ in some rows
        // and an empty σ cell in another is refused with the line and column of that cell,
        // never fitted silently, and fitting unweighted is the way out.
        let weighed = isochore_analysis::weighting::for_data_set(&series.data, *series.options())
            .map_err(|e| e.to_string());
        let large = measurements.len() > crate::panels::vh_plot::DECIMATE_ABOVE;
        let vh_index = if large {
            EnvelopeIndex::new(
                measurements
                    .iter()
                    .enumerate()
                    .map(|(k, m)| (k as u32, 1e3 / m.t_k, m.ln_k)),
            )
        } else {
            EnvelopeIndex::default()
        };
        let t_order = if large {
            let mut order: Vec<(u32, f64, f64)> = measurements
                .iter()
                .enumerate()
                .filter(|(_, m)| m.t_k.is_finite())
                .map(|(k, m)| (k as u32, m.t_k, 0.0))
                .collect();
            sort_by_x_then_id(&mut order);
            order.into_iter().map(|p| p.0).collect()
        } else {
            Vec::new()
        };
        let extent = measurements.iter().fold(None, |acc: Option<[f64; 4]>, m| {
            let x = 1e3 / m.t_k;
            Some(match acc {
                None => [x, x, m.ln_k, m.ln_k],
                Some([a, b, c, d]) => [a.min(x), b.max(x), c.min(m.ln_k), d.max(m.ln_k)],
            })
        });
        Prepared {
            key: PrepKey::of(series),
            n_points: measurements.len(),
            one_row_each: point_rows.iter().all(|r| r.len() == 1),
            point_rows: Arc::new(point_rows),
            point_of_row: Arc::new(point_of_row),
            weighed,
            vh_index: Arc::new(vh_index),
            extent,
            t_order,
            large,
            spare: Mutex::new(None),
        }
    }

    /// Whether a refit of `series` may start from these points: the same cells, mapping and
    /// settings, each point one row (replicates averaged regroup when a row is excluded), and
    /// no fit with errors in T (made by isochore-analysis from the data set itself).
    pub(crate) fn serves(&self, series: &Entry) -> bool {
        let d = &series.data;
        d.settings.replicates == Replicates::Keep
            && d.settings.thermometer_uncertainty_k.is_none()
            && d.mapping.temperature_uncertainty.is_none()
            && self.one_row_each
            && self.key == PrepKey::of(series)
    }

    /// The points marked for the sorted 1-based rows `excluded`, as isochore-data marks them
    /// (a point is left out when its row is excluded), made from `from` (the points of the
    /// shown analysis, marked for `from_excluded`) or from the spare points when there are
    /// some: only the marks of the rows whose exclusion changed are set.
    pub(crate) fn marked(
        &self,
        from: &[Measurement],
        from_excluded: &[usize],
        excluded: Vec<usize>,
    ) -> Marked {
        let spare = self.spare.lock().map_or(None, |mut s| s.take());
        let mut out = match spare {
            Some(s) if s.points.len() == from.len() => s,
            _ => Marked {
                points: from.to_vec(),
                excluded: from_excluded.to_vec(),
            },
        };
        // The rows in one list and not the other, merged from both sorted lists.
        let (old, new) = (&out.excluded, &excluded);
        let (mut i, mut j) = (0, 0);
        let mut changed = Vec::new();
        while i < old.len() || j < new.len() {
            match (old.get(i), new.get(j)) {
                (Some(a), Some(b)) if a == b => (i, j) = (i + 1, j + 1),
                (Some(&a), Some(&b)) if a < b => {
                    changed.push((a, true));
                    i += 1;
                }
                (Some(&a), None) => {
                    changed.push((a, true));
                    i += 1;
                }
                (_, Some(&b)) => {
                    changed.push((b, false));
                    j += 1;
                }
                (None, None) => break,
            }
        }
        for (row, included) in changed {
            let point = row
                .checked_sub(1)
                .and_then(|r| self.point_of_row.get(r).copied().flatten());
            if let Some(m) = point.and_then(|k| out.points.get_mut(k)) {
                m.included = included;
            }
        }
        out.excluded = excluded;
        out
    }

    /// Keeps the points of an analysis no longer shown for the next refit's marks (one set
    /// is kept; a point list of another size is dropped).
    pub(crate) fn give_back(&self, marked: Marked) {
        if marked.points.len() == self.n_points {
            if let Ok(mut s) = self.spare.lock() {
                *s = Some(marked);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// 40 invented rows, ln K = 3000/T − 5 with a deterministic wiggle, σ = 0.03.
    fn entry() -> Entry {
        let mut text = String::from("T (°C),ln K,u(ln K)\n");
        for i in 0..40 {
            let t = 5.0 + i as f64;
            let ln_k = 3000.0 / (t + 273.15) - 5.0 + 0.01 * ((i * 7) % 5) as f64;
            text.push_str(&format!("{t},{ln_k:.6},0.03\n"));
        }
        let imp = isochore_data::import_text("marks.csv", &text, &Default::default())
            .expect("invented data import");
        crate::doc::Project::from_data(isochore_data::Project::from_import(&imp), None).series[0]
            .clone()
    }

    /// The points isochore-data gives with the 1-based rows `rows` excluded (the home of the
    /// rule), written so that every f64 reads back to its bits.
    fn from_the_cells(series: &Entry, rows: &[usize]) -> String {
        let mut s = series.clone();
        for &r in rows {
            s.data
                .exclude(r, "test", "2026-12-03T12:00:00Z")
                .expect("row exists");
        }
        format!("{:?}", s.points().expect("points").measurements)
    }

    #[test]
    fn marks_set_again_are_those_isochore_data_sets() {
        let series = entry();
        let points = series.points().expect("points");
        let shown = points.measurements.clone();
        let prepared = Prepared::new(&series, &shown, points.rows, points.point_of_row);
        assert!(prepared.serves(&series));
        // From the shown points (nothing given back yet).
        let first = prepared.marked(&shown, &[], vec![3, 7, 40]);
        assert_eq!(
            format!("{:?}", first.points),
            from_the_cells(&series, &[3, 7, 40])
        );
        assert_eq!(first.excluded, [3, 7, 40]);
        // From points given back: rows 3 and 40 come back, 1 and 12 go.
        prepared.give_back(first);
        let second = prepared.marked(&shown, &[], vec![1, 7, 12]);
        assert!(
            prepared.spare.lock().expect("lock").is_none(),
            "the spare was used"
        );
        assert_eq!(
            format!("{:?}", second.points),
            from_the_cells(&series, &[1, 7, 12])
        );
        // From the points of an analysis with exclusions, to none.
        let third = prepared.marked(&second.points, &second.excluded, Vec::new());
        assert_eq!(format!("{:?}", third.points), from_the_cells(&series, &[]));
        // A list of another size is not kept.
        prepared.give_back(Marked {
            points: shown[..10].to_vec(),
            excluded: Vec::new(),
        });
        assert!(prepared.spare.lock().expect("lock").is_none());
    }
}
