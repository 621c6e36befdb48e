//! Drawing many points fast: for each pixel column of the plot keep only the lowest and
//! highest point, so a million-point series draws as at most two points per column and
//! still shows its full visual envelope (every column's extent is exact; no outlier
//! disappears). This is a rendering step, not a statistic.
//!
//! [`EnvelopeIndex`] keeps the points sorted by x with the lowest and highest point of
//! every block of [`BLOCK`] consecutive points, built once per fit (off the UI thread for
//! large series). A view then costs a binary search per pixel column plus one step per
//! block, instead of a pass over every visible point, so panning a million points stays
//! within a frame; the result is the same, point for point, as a full scan.

/// Points per block of the summary.
pub const BLOCK: usize = 64;

/// Points sorted by x, with the extremes of each block of [`BLOCK`] points.
#[derive(Debug, Clone, Default)]
pub struct EnvelopeIndex {
    xs: Vec<f64>,
    ys: Vec<f64>,
    ids: Vec<u32>,
    /// Per block: positions (in sorted order) of its first lowest and first highest y.
    blocks: Vec<(u32, u32)>,
}

impl EnvelopeIndex {
    /// Builds the index from `(id, x, y)` triples; points with a non-finite coordinate are
    /// left out (they cannot be drawn). Ties in x keep the ids in ascending order.
    pub fn new(points: impl IntoIterator<Item = (u32, f64, f64)>) -> Self {
        let mut pts: Vec<(u32, f64, f64)> = points
            .into_iter()
            .filter(|(_, x, y)| x.is_finite() && y.is_finite())
            .collect();
        sort_by_x_then_id(&mut pts);
        Self::from_sorted(pts)
    }

    /// Builds the index from `(id, x, y)` triples already in the order [`EnvelopeIndex::new`]
    /// sorts them into (x ascending, ties by id), skipping the sort; points with a
    /// non-finite coordinate are left out, as there. Given such an order, the index is the
    /// same as `new` builds from the same points (a refit reuses the order of its points by
    /// temperature, which an exclusion does not change).
    pub fn from_sorted(points: impl IntoIterator<Item = (u32, f64, f64)>) -> Self {
        let points = points.into_iter();
        let room = points.size_hint().0;
        let (mut xs, mut ys, mut ids) = (
            Vec::with_capacity(room),
            Vec::with_capacity(room),
            Vec::with_capacity(room),
        );
        for (id, x, y) in points.filter(|(_, x, y)| x.is_finite() && y.is_finite()) {
            ids.push(id);
            xs.push(x);
            ys.push(y);
        }
        debug_assert!((1..ids.len()).all(|i| by_x_then_id(
            &(ids[i - 1], xs[i - 1], 0.0),
            &(ids[i], xs[i], 0.0)
        )
        .is_lt()));
        let blocks = ys
            .chunks(BLOCK)
            .enumerate()
            .map(|(b, chunk)| {
                let (lo, hi) = extremes(chunk, 0, chunk.len());
                ((b * BLOCK + lo) as u32, (b * BLOCK + hi) as u32)
            })
            .collect();
        EnvelopeIndex {
            xs,
            ys,
            ids,
            blocks,
        }
    }

    /// The ids of the points in the index's order (x ascending, ties by id).
    pub fn ids(&self) -> &[u32] {
        &self.ids
    }

    /// Number of drawable points.
    pub fn len(&self) -> usize {
        self.xs.len()
    }

    /// Whether there is nothing to draw.
    pub fn is_empty(&self) -> bool {
        self.xs.is_empty()
    }

    /// The smallest and largest x.
    pub fn x_range(&self) -> Option<(f64, f64)> {
        Some((*self.xs.first()?, *self.xs.last()?))
    }

    /// The ids of at most two points per pixel column in `[x_min, x_max]`, split into
    /// `columns` equal columns: each column's lowest and highest point (one when they
    /// coincide), columns left to right, the lower first. Identical to [`envelope`] over
    /// the same points.
    pub fn envelope(&self, x_min: f64, x_max: f64, columns: usize) -> Vec<u32> {
        let columns = columns.max(1);
        let span = x_max - x_min;
        let mut out = Vec::new();
        if self.xs.is_empty() || !span.is_finite() || span <= 0.0 {
            return out;
        }
        let scale = columns as f64 / span;
        let col_of = |x: f64| column(x, x_min, scale, columns);
        let start = self.xs.partition_point(|&x| x < x_min);
        let end = self.xs.partition_point(|&x| x <= x_max);
        out.reserve(2 * columns.min(end.saturating_sub(start)));
        let mut a = start;
        while a < end {
            let c = col_of(self.xs[a]);
            let b = gallop(&self.xs, a, end, |x| col_of(x) <= c);
            let (lo, hi) = self.extremes_between(a, b);
            out.push(self.ids[lo]);
            if hi != lo {
                out.push(self.ids[hi]);
            }
            a = b;
        }
        out
    }

    /// Positions of the first lowest and first highest y in `a..b` (non-empty).
    fn extremes_between(&self, a: usize, b: usize) -> (usize, usize) {
        let first_full = a.div_ceil(BLOCK);
        let last_full = b / BLOCK;
        if first_full >= last_full {
            return extremes(&self.ys, a, b);
        }
        let ys = &self.ys;
        let (mut lo, mut hi) = if a < first_full * BLOCK {
            extremes(ys, a, first_full * BLOCK)
        } else {
            let (l, h) = self.blocks[first_full];
            (l as usize, h as usize)
        };
        let mut take = |l: usize, h: usize| {
            if ys[l] < ys[lo] {
                lo = l;
            }
            if ys[h] > ys[hi] {
                hi = h;
            }
        };
        for &(l, h) in &self.blocks[first_full..last_full] {
            take(l as usize, h as usize);
        }
        if last_full * BLOCK < b {
            let (l, h) = extremes(ys, last_full * BLOCK, b);
            take(l, h);
        }
        (lo, hi)
    }
}

/// The order of the index: x ascending (`total_cmp`), ties by id. A total order, so every
/// sort of the same points gives the same sequence whatever order they arrive in.
pub fn by_x_then_id(a: &(u32, f64, f64), b: &(u32, f64, f64)) -> std::cmp::Ordering {
    a.1.total_cmp(&b.1).then(a.0.cmp(&b.0))
}

/// Sorts points into the index's order ([`by_x_then_id`]). Many points whose ids ascend (as
/// a fit's points arrive) are sorted by a stable radix sort of x's bits (six passes of 11
/// bits; a pass is skipped when every point has the same digit), which keeps equal x in id
/// order and so gives exactly what the comparison sort gives, in a fraction of the time at
/// 10⁶ points; anything else by the comparison sort.
pub fn sort_by_x_then_id(pts: &mut Vec<(u32, f64, f64)>) {
    const RADIX_FROM: usize = 1 << 14;
    const BITS: u32 = 11;
    const PASSES: usize = 6; // 6 × 11 ≥ 64
    const BUCKETS: usize = 1 << BITS;
    if pts.len() < RADIX_FROM || !pts.windows(2).all(|w| w[0].0 < w[1].0) {
        pts.sort_by(by_x_then_id);
        return;
    }
    // The bits of x as an unsigned number in `f64::total_cmp`'s order.
    let key = |x: f64| {
        let b = x.to_bits();
        if b >> 63 == 1 {
            !b
        } else {
            b | (1 << 63)
        }
    };
    let digit = |x: f64, pass: usize| ((key(x) >> (pass as u32 * BITS)) as usize) & (BUCKETS - 1);
    let mut counts = vec![[0usize; BUCKETS]; PASSES];
    for p in pts.iter() {
        for (pass, c) in counts.iter_mut().enumerate() {
            c[digit(p.1, pass)] += 1;
        }
    }
    let n = pts.len();
    let mut scratch: Vec<(u32, f64, f64)> = vec![(0, 0.0, 0.0); n];
    for (pass, c) in counts.iter().enumerate() {
        if c.contains(&n) {
            continue; // every point has this digit: the pass would change nothing
        }
        let mut start = [0usize; BUCKETS];
        let mut sum = 0;
        for (s, &k) in start.iter_mut().zip(c.iter()) {
            *s = sum;
            sum += k;
        }
        for p in pts.iter() {
            let d = digit(p.1, pass);
            scratch[start[d]] = *p;
            start[d] += 1;
        }
        std::mem::swap(pts, &mut scratch);
    }
}

/// The first position in `a..end` where `inside` turns false, given it holds at `a` and
/// is monotone: steps of doubling length from `a`, then a binary search. The next column
/// boundary is near, so this reads memory close to `a` (cache-friendly) instead of
/// bisecting the whole array.
fn gallop(xs: &[f64], a: usize, end: usize, inside: impl Fn(f64) -> bool) -> usize {
    let mut lo = a + 1;
    let mut step = 1;
    let hi = loop {
        let probe = a + step;
        if probe >= end {
            break end;
        }
        if !inside(xs[probe]) {
            break probe;
        }
        lo = probe + 1;
        step *= 2;
    };
    lo + xs[lo..hi].partition_point(|&x| inside(x))
}

/// The pixel column of `x`, with `scale` = columns / span (callers keep `x` ≥ `x_min`, so
/// truncation is the floor; a NaN lands in column 0).
fn column(x: f64, x_min: f64, scale: f64, columns: usize) -> usize {
    (((x - x_min) * scale) as usize).min(columns - 1)
}

/// Positions of the first lowest and first highest value in `ys[a..b]` (non-empty).
fn extremes(ys: &[f64], a: usize, b: usize) -> (usize, usize) {
    let (mut lo, mut hi) = (a, a);
    for i in a + 1..b {
        if ys[i] < ys[lo] {
            lo = i;
        }
        if ys[i] > ys[hi] {
            hi = i;
        }
    }
    (lo, hi)
}

/// Reduces points sorted by x to at most two per pixel column in `[x_min, x_max]` by one
/// pass over the visible points (the reference for [`EnvelopeIndex::envelope`]).
///
/// `order` lists indices into `xs`/`ys` sorted by x; `columns` is the plot width in
/// pixels. Points outside the x range are skipped, and non-finite ones ignored. Each
/// column yields its min-y and max-y points (one when they coincide). Returns indices.
pub fn envelope(
    xs: &dyn Fn(usize) -> f64,
    ys: &dyn Fn(usize) -> f64,
    order: &[u32],
    x_min: f64,
    x_max: f64,
    columns: usize,
) -> Vec<u32> {
    let columns = columns.max(1);
    let span = x_max - x_min;
    if order.is_empty() || !span.is_finite() || span <= 0.0 {
        return Vec::new();
    }
    // First index with x ≥ x_min.
    let start = order.partition_point(|&i| xs(i as usize) < x_min);
    let mut out = Vec::with_capacity(2 * columns);
    let mut current: Option<usize> = None;
    let (mut lo, mut hi) = (0u32, 0u32);
    let (mut lo_y, mut hi_y) = (f64::INFINITY, f64::NEG_INFINITY);
    let flush = |out: &mut Vec<u32>, lo: u32, hi: u32| {
        if lo == hi {
            out.push(lo);
        } else {
            out.push(lo);
            out.push(hi);
        }
    };
    for &i in &order[start..] {
        let x = xs(i as usize);
        if x > x_max {
            break;
        }
        let y = ys(i as usize);
        if !y.is_finite() || !x.is_finite() {
            continue;
        }
        let col = column(x, x_min, columns as f64 / span, columns);
        if current != Some(col) {
            if current.is_some() {
                flush(&mut out, lo, hi);
            }
            current = Some(col);
            lo = i;
            hi = i;
            lo_y = y;
            hi_y = y;
        } else {
            if y < lo_y {
                lo_y = y;
                lo = i;
            }
            if y > hi_y {
                hi_y = y;
                hi = i;
            }
        }
    }
    if current.is_some() {
        flush(&mut out, lo, hi);
    }
    out
}
#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keeps_the_extremes_of_every_column() {
        // 10 000 points on a saw-tooth, 100 columns: each column must keep its own min and max.
        let n = 10_000usize;
        let xs: Vec<f64> = (0..n).map(|i| i as f64 / n as f64).collect();
        let ys: Vec<f64> = (0..n).map(|i| ((i * 7919) % 101) as f64).collect();
        let order: Vec<u32> = (0..n as u32).collect();
        let kept = envelope(&|i| xs[i], &|i| ys[i], &order, 0.0, 1.0, 100);
        assert!(kept.len() <= 200);
        for col in 0..100 {
            let in_col: Vec<usize> = (0..n)
                .filter(|&i| (xs[i] * 100.0) as usize == col)
                .collect();
            let max = in_col.iter().map(|&i| ys[i]).fold(f64::MIN, f64::max);
            let min = in_col.iter().map(|&i| ys[i]).fold(f64::MAX, f64::min);
            let kept_col: Vec<f64> = kept
                .iter()
                .filter(|&&i| (xs[i as usize] * 100.0) as usize == col)
                .map(|&i| ys[i as usize])
                .collect();
            assert!(
                kept_col.contains(&max) && kept_col.contains(&min),
                "column {col}"
            );
        }
    }

    #[test]
    fn empty_or_degenerate_ranges_give_nothing() {
        let xs = [1.0, 2.0];
        let order = [0u32, 1];
        assert!(envelope(&|i| xs[i], &|i| xs[i], &order, 3.0, 3.0, 10).is_empty());
        assert!(envelope(&|i| xs[i], &|i| xs[i], &[], 0.0, 3.0, 10).is_empty());
        assert_eq!(
            envelope(&|i| xs[i], &|i| xs[i], &order, 0.0, 3.0, 0).len(),
            2
        );
    }

    #[test]
    fn the_index_gives_the_same_points_as_a_full_scan() {
        // Deterministic scattered data with repeated x and y values (ties) and a few
        // non-finite values, queried over many ranges and widths.
        let n = 20_000usize;
        let mut state: u64 = 0x9e37_79b9_7f4a_7c15;
        let mut next = || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            state
        };
        let mut xs: Vec<f64> = (0..n).map(|_| (next() % 5_000) as f64 / 100.0).collect();
        let mut ys: Vec<f64> = (0..n).map(|_| (next() % 300) as f64 - 150.0).collect();
        ys[17] = f64::NAN;
        ys[4_000] = f64::INFINITY;
        xs[99] = f64::NAN;
        let mut order: Vec<u32> = (0..n as u32)
            .filter(|&i| !xs[i as usize].is_nan())
            .collect();
        order.sort_by(|&a, &b| xs[a as usize].total_cmp(&xs[b as usize]).then(a.cmp(&b)));
        let index = EnvelopeIndex::new((0..n).map(|i| (i as u32, xs[i], ys[i])));
        assert_eq!(index.len(), n - 3);
        assert_eq!(index.x_range(), Some((0.0, 49.99)));
        for (lo, hi, cols) in [
            (0.0, 49.99, 1000),
            (0.0, 49.99, 1),
            (3.3, 3.31, 640),
            (-10.0, 80.0, 777),
            (12.345, 40.0, 64),
            (20.0, 20.5, 5000),
            (60.0, 70.0, 100),
        ] {
            let full = envelope(&|i| xs[i], &|i| ys[i], &order, lo, hi, cols);
            assert_eq!(
                index.envelope(lo, hi, cols),
                full,
                "range {lo}..{hi}, {cols} columns"
            );
        }
        assert!(index.envelope(5.0, 5.0, 10).is_empty());
        assert!(EnvelopeIndex::default().envelope(0.0, 1.0, 10).is_empty());
        // 20 000 points with ascending ids take the radix sort: the same order as the
        // comparison sort, ties in x (many here), NaN, ±∞, ±0 and negative x included.
        let mut pts: Vec<(u32, f64, f64)> =
            (0..n).map(|i| (i as u32, xs[i] - 25.0, ys[i])).collect();
        pts[5].1 = f64::NEG_INFINITY;
        pts[6].1 = f64::INFINITY;
        pts[7].1 = -0.0;
        pts[8].1 = 0.0;
        pts[9].1 = -f64::NAN;
        let mut by_comparison = pts.clone();
        by_comparison.sort_by(by_x_then_id);
        sort_by_x_then_id(&mut pts);
        assert!(pts
            .iter()
            .zip(&by_comparison)
            .all(|(a, b)| a.0 == b.0 && a.1.to_bits() == b.1.to_bits()));
        // The same points handed over already in order give the same index.
        let sorted =
            EnvelopeIndex::from_sorted(order.iter().map(|&i| (i, xs[i as usize], ys[i as usize])));
        assert_eq!(sorted.ids(), index.ids());
        for (lo, hi, cols) in [(0.0, 49.99, 1000), (3.3, 3.31, 640)] {
            assert_eq!(sorted.envelope(lo, hi, cols), index.envelope(lo, hi, cols));
        }
    }
}
