//! The draws of a run, kept for a picture of their distribution, and the histogram of one
//! quantity's draws with the interval's ends inside its range.

use super::bca::percentile_sorted;

/// Every draw of every quantity of a run, draw by draw (quantity `k` of draw `i` is
/// `values[i * quantities + k]`; quantities in the order of the run's
/// [`super::IntervalRun::quantities`]). An undefined value is NaN.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Draws {
    quantities: usize,
    values: Vec<f64>,
}

impl Draws {
    pub(crate) fn new(quantities: usize, values: Vec<f64>) -> Draws {
        Draws { quantities, values }
    }

    /// Number of draws.
    pub fn count(&self) -> usize {
        self.values.len().checked_div(self.quantities).unwrap_or(0)
    }

    /// The draws of quantity `k`, in draw order (NaN where undefined); empty for a `k` out
    /// of range.
    pub fn of(&self, k: usize) -> Vec<f64> {
        if k >= self.quantities {
            return Vec::new();
        }
        self.values
            .iter()
            .skip(k)
            .step_by(self.quantities)
            .copied()
            .collect()
    }
}

/// Equal-width bins over the bulk of a sample.
#[derive(Debug, Clone, PartialEq)]
pub struct Histogram {
    /// Left edge of the first bin.
    pub start: f64,
    /// Width of every bin.
    pub width: f64,
    /// Draws in each bin (a value on an inner edge counts in the bin to its right; the last
    /// bin includes its right edge).
    pub counts: Vec<usize>,
    /// Defined draws left of the range.
    pub below: usize,
    /// Defined draws right of the range.
    pub above: usize,
    /// Undefined (NaN) draws.
    pub undefined: usize,
}

impl Histogram {
    /// The centre of bin `i`.
    pub fn centre(&self, i: usize) -> f64 {
        self.start + (i as f64 + 0.5) * self.width
    }

    /// The right edge of the last bin.
    pub fn end(&self) -> f64 {
        self.start + self.width * self.counts.len() as f64
    }
}

/// Share of the draws left outside the range at most at each side (before `marks` widen
/// it): the range is at most the 0.1 % to 99.9 % percentiles, so a few far draws (a root
/// found far away) do not squeeze the bulk into one bin; [`Histogram::below`] and
/// [`Histogram::above`] count them.
pub const TAIL_LEFT_OUT: f64 = 0.001;

/// How far beyond the quartiles the range reaches at most, in interquartile ranges: a
/// heavy tail (the temperature where K = 1 of a nearly flat line) is cut there.
pub const IQR_REACH: f64 = 3.0;

/// The histogram of `values` in `bins` equal bins over their bulk, widened to take in every
/// finite number of `marks` (the estimate, the interval's ends). The bulk is the 0.1 % to
/// 99.9 % percentiles, cut at [`IQR_REACH`] interquartile ranges beyond the quartiles (for
/// normal draws the percentiles, at ±3.1 SD, lie inside that reach of ±4.7 SD). `None` when
/// `bins` is 0 or no value is finite.
pub fn histogram(values: &[f64], marks: &[f64], bins: usize) -> Option<Histogram> {
    let mut v: Vec<f64> = values.iter().copied().filter(|x| x.is_finite()).collect();
    if bins == 0 || v.is_empty() {
        return None;
    }
    let undefined = values.len() - v.len();
    v.sort_by(f64::total_cmp);
    let (q1, q3) = (percentile_sorted(&v, 0.25), percentile_sorted(&v, 0.75));
    let reach = IQR_REACH * (q3 - q1);
    let mut lo = percentile_sorted(&v, TAIL_LEFT_OUT).max(q1 - reach);
    let mut hi = percentile_sorted(&v, 1.0 - TAIL_LEFT_OUT).min(q3 + reach);
    for &m in marks.iter().filter(|m| m.is_finite()) {
        lo = lo.min(m);
        hi = hi.max(m);
    }
    if hi <= lo {
        // Every draw the same: one narrow range about it.
        let pad = 1e-9 * lo.abs().max(1e-300);
        lo -= pad;
        hi += pad;
    }
    let width = (hi - lo) / bins as f64;
    let mut counts = vec![0usize; bins];
    let (mut below, mut above) = (0, 0);
    for &x in &v {
        if x < lo {
            below += 1;
        } else if x > hi {
            above += 1;
        } else {
            let i = (((x - lo) / width) as usize).min(bins - 1);
            counts[i] += 1;
        }
    }
    Some(Histogram {
        start: lo,
        width,
        counts,
        below,
        above,
        undefined,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_draw_is_counted_once() {
        // 1..=1000 and two NaN: the 0.1 % and 99.9 % points are 1.999 and 999.001 (linear
        // interpolation between order statistics, numpy's default), so 1 and 1000 fall
        // outside, the other 998 inside.
        let mut v: Vec<f64> = (1..=1000).map(f64::from).collect();
        v.push(f64::NAN);
        v.push(f64::NAN);
        let h = histogram(&v, &[], 10).unwrap();
        assert_eq!(h.counts.len(), 10);
        assert_eq!((h.below, h.above, h.undefined), (1, 1, 2));
        assert_eq!(h.counts.iter().sum::<usize>(), 998);
        assert!((h.start - 1.999).abs() < 1e-9 && (h.end() - 999.001).abs() < 1e-9);
        // A mark outside widens the range to take it in (and the far draw with it).
        let h = histogram(&v, &[0.0, f64::NAN], 10).unwrap();
        assert_eq!((h.start, h.below), (0.0, 0));
        assert!(histogram(&[f64::NAN], &[], 10).is_none());
        assert!(histogram(&v, &[], 0).is_none());
        // A heavy tail: 1..=100 and ten draws at 10⁶. The 99.9 % point is 10⁶, but the
        // range stops 3 IQR above the upper quartile: numpy.percentile of the 110 values
        // gives q1 = 28.25, q3 = 82.75, so 82.75 + 3 × 54.5 = 246.25.
        let mut tail: Vec<f64> = (1..=100).map(f64::from).collect();
        tail.extend([1e6; 10]);
        let h = histogram(&tail, &[], 20).unwrap();
        assert_eq!(h.above, 10);
        assert!((h.end() - 246.25).abs() < 1e-9, "{}", h.end());
        // All equal: one bin holds them all.
        let h = histogram(&[2.0; 5], &[], 4).unwrap();
        assert_eq!(h.counts.iter().sum::<usize>(), 5);
    }

    #[test]
    fn draws_are_read_back_by_quantity() {
        let d = Draws::new(2, vec![1.0, 10.0, 2.0, 20.0, 3.0, 30.0]);
        assert_eq!(d.count(), 3);
        assert_eq!(d.of(1), vec![10.0, 20.0, 30.0]);
        assert!(d.of(2).is_empty());
    }
}
