//! Where each point of a [`PreparedSet`](crate::PreparedSet) came from, kept compact.
//!
//! A 10⁶-row file has a million points, and a list of one record per point (row, line, the
//! cells as typed, the exclusion reason: 64 bytes each even with no cells and no reason)
//! took 64 MB. [`Origins`] keeps only what is not implied: the row numbers when they are
//! not 1, 2, 3, … (averaged replicates), the lines as runs of consecutive lines, the cells
//! only when they were asked for, and the exclusion reasons of the points that have one.
//! A file without blank lines or rejected rows then costs a few bytes whatever its size.
//! [`Origins::iter`] and [`Origins::get`] give each point's [`PointOrigin`].

use crate::rows::RowNumber;
use std::fmt;

/// Where one point came from (a view into [`Origins`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PointOrigin<'a> {
    /// The data row that names the point (the first of averaged replicates).
    pub row: RowNumber,
    /// Physical 1-based line of that row in its file (0 when unknown).
    pub line: usize,
    /// The row's cells as typed (empty unless asked for: they cost memory on huge files).
    pub cells: &'a [String],
    /// Why the point is left out, when it is and a reason was given.
    pub exclusion_reason: Option<&'a str>,
}

/// Where each point of a prepared set came from, in point order (see the module
/// documentation). Built with [`Origins::push`].
#[derive(Clone, Default)]
pub struct Origins {
    len: usize,
    /// Row number of each point; empty while every point `i` is row `i + 1`.
    rows: Vec<u32>,
    /// Runs of lines: (first point of the run, its line); the line of a later point of the
    /// run is that line plus its distance from the first.
    lines: Vec<(u32, u32)>,
    /// The cells of each point; empty when none were kept.
    cells: Vec<Vec<String>>,
    /// Exclusion reasons: (point, reason), in point order.
    reasons: Vec<(u32, String)>,
}

fn small(v: usize) -> u32 {
    // Files are limited to 4 GiB, so rows and lines fit; saturate rather than wrap.
    u32::try_from(v).unwrap_or(u32::MAX)
}

impl Origins {
    /// No points; room for the row numbers is not reserved (most data sets need none).
    pub fn new() -> Origins {
        Origins::default()
    }

    /// Appends the next point's origin. `cells` may be empty (none kept); a point whose
    /// cells are kept while earlier ones were not gets empty cells for those.
    pub fn push(
        &mut self,
        row: RowNumber,
        line: usize,
        cells: Vec<String>,
        exclusion_reason: Option<String>,
    ) {
        let i = self.len;
        let r = small(row.get());
        if self.rows.is_empty() {
            if r as usize != i + 1 {
                self.rows.reserve(i + 1);
                self.rows.extend((1..=small(i)).chain([r]));
            }
        } else {
            self.rows.push(r);
        }
        let line = small(line);
        let continues = self.lines.last().is_some_and(|&(first, l)| {
            u64::from(l) + (i as u64 - u64::from(first)) == u64::from(line)
        });
        if !continues {
            self.lines.push((small(i), line));
        }
        if !cells.is_empty() || !self.cells.is_empty() {
            self.cells.resize_with(i, Vec::new);
            self.cells.push(cells);
        }
        if let Some(reason) = exclusion_reason {
            self.reasons.push((small(i), reason));
        }
        self.len += 1;
    }

    /// Number of points.
    pub fn len(&self) -> usize {
        self.len
    }

    /// Whether there are no points.
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// The row that names point `i` (0-based point index).
    pub fn row(&self, i: usize) -> Option<RowNumber> {
        if i >= self.len {
            return None;
        }
        match self.rows.get(i) {
            Some(&r) => RowNumber::new(r as usize),
            None => Some(RowNumber::from_index(i)),
        }
    }

    /// The line of point `i` in its file (0 when unknown).
    pub fn line(&self, i: usize) -> Option<usize> {
        if i >= self.len {
            return None;
        }
        let k = self
            .lines
            .partition_point(|&(first, _)| first as usize <= i);
        let (first, line) = self.lines.get(k.checked_sub(1)?)?;
        Some(*line as usize + (i - *first as usize))
    }

    /// The origin of point `i`.
    pub fn get(&self, i: usize) -> Option<PointOrigin<'_>> {
        Some(PointOrigin {
            row: self.row(i)?,
            line: self.line(i)?,
            cells: self.cells.get(i).map_or(&[], Vec::as_slice),
            exclusion_reason: self
                .reasons
                .binary_search_by_key(&small(i), |(p, _)| *p)
                .ok()
                .map(|k| self.reasons[k].1.as_str()),
        })
    }

    /// Every point's origin, in point order.
    pub fn iter(&self) -> Iter<'_> {
        Iter {
            origins: self,
            next: 0,
            run: 0,
            reason: 0,
        }
    }
}

/// The iterator of [`Origins::iter`]: walks the runs of lines and the reasons alongside
/// the points, so each step is constant time.
#[derive(Clone)]
pub struct Iter<'a> {
    origins: &'a Origins,
    next: usize,
    run: usize,
    reason: usize,
}

impl<'a> Iterator for Iter<'a> {
    type Item = PointOrigin<'a>;

    fn next(&mut self) -> Option<PointOrigin<'a>> {
        let o = self.origins;
        let i = self.next;
        if i >= o.len {
            return None;
        }
        self.next += 1;
        while o
            .lines
            .get(self.run + 1)
            .is_some_and(|&(f, _)| f as usize <= i)
        {
            self.run += 1;
        }
        let line = o
            .lines
            .get(self.run)
            .map_or(0, |&(first, l)| l as usize + (i - first as usize));
        while o
            .reasons
            .get(self.reason)
            .is_some_and(|&(p, _)| (p as usize) < i)
        {
            self.reason += 1;
        }
        let exclusion_reason = o
            .reasons
            .get(self.reason)
            .filter(|(p, _)| *p as usize == i)
            .map(|(_, r)| r.as_str());
        Some(PointOrigin {
            row: match o.rows.get(i) {
                Some(&r) => RowNumber::new(r as usize).unwrap_or(RowNumber::from_index(i)),
                None => RowNumber::from_index(i),
            },
            line,
            cells: o.cells.get(i).map_or(&[], Vec::as_slice),
            exclusion_reason,
        })
    }

    fn size_hint(&self) -> (usize, Option<usize>) {
        let n = self.origins.len - self.next;
        (n, Some(n))
    }
}

impl ExactSizeIterator for Iter<'_> {}

impl<'a> IntoIterator for &'a Origins {
    type Item = PointOrigin<'a>;
    type IntoIter = Iter<'a>;

    fn into_iter(self) -> Iter<'a> {
        self.iter()
    }
}

/// Equal when every point's origin is (however they are stored).
impl PartialEq for Origins {
    fn eq(&self, other: &Origins) -> bool {
        self.len == other.len && self.iter().eq(other.iter())
    }
}

/// Shown as the list of every point's origin.
impl fmt::Debug for Origins {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_list().entries(self.iter()).finish()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn row(n: usize) -> RowNumber {
        RowNumber::new(n).unwrap()
    }

    #[test]
    fn a_plain_file_keeps_one_run_and_no_row_numbers() {
        let mut o = Origins::new();
        for i in 0..1000 {
            o.push(RowNumber::from_index(i), i + 2, Vec::new(), None);
        }
        assert_eq!((o.len(), o.rows.len(), o.lines.len()), (1000, 0, 1));
        assert!(o.cells.is_empty() && o.reasons.is_empty());
        let p = o.get(999).unwrap();
        assert_eq!((p.row.get(), p.line, p.cells.len()), (1000, 1001, 0));
        assert_eq!(o.iter().nth(500).unwrap().line, 502);
        assert_eq!(o.get(1000), None);
    }

    #[test]
    fn every_point_reads_back_as_pushed() {
        // Rows out of order (averaged replicates), lines with gaps and an unknown one,
        // cells from the third point on, two reasons.
        let pushed: Vec<(usize, usize, Vec<String>, Option<String>)> = vec![
            (1, 3, vec![], None),
            (3, 5, vec![], Some("bubble".to_string())),
            (2, 4, vec!["a".to_string(), "b".to_string()], None),
            (4, 0, vec!["c".to_string()], None),
            (5, 0, vec![], Some("seal".to_string())),
            (6, 9, vec![], None),
            (7, 10, vec![], None),
        ];
        let mut o = Origins::new();
        for (r, l, c, e) in &pushed {
            o.push(row(*r), *l, c.clone(), e.clone());
        }
        assert_eq!(o.len(), pushed.len());
        let by_iter: Vec<PointOrigin<'_>> = o.iter().collect();
        for (i, (r, l, c, e)) in pushed.iter().enumerate() {
            let want = PointOrigin {
                row: row(*r),
                line: *l,
                cells: c,
                exclusion_reason: e.as_deref(),
            };
            assert_eq!(o.get(i), Some(want), "point {i} by index");
            assert_eq!(by_iter[i], want, "point {i} by iteration");
        }
        let mut same = Origins::new();
        for (r, l, c, e) in pushed {
            same.push(row(r), l, c, e);
        }
        assert_eq!(o, same);
        same.push(row(8), 11, Vec::new(), None);
        assert_ne!(o, same);
    }
}
