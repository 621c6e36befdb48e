//! Drawing many points fast: for each pixel column of the plot keep only the lowest and
//! highest point, so a million-point series draws as at most two points per column and
//! still shows its full visual envelope (every column's extent is exact; no outlier
//! disappears). This is a rendering step, not a statistic.

/// Reduces points sorted by x to at most two per pixel column in `[x_min, x_max]`.
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
        let col = (((x - x_min) / span) * columns as f64).floor() as usize;
        let col = col.min(columns - 1);
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
}
