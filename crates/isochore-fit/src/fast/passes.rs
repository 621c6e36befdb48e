//! The residual passes of the streaming path: χ² of each tracked model from the residuals
//! themselves (not from the triangle), and the semi-normal refinement steps.

use super::*;

/// The used points' rows as the passes form them: the points, their ln(T/θ)
/// ([`logs_of`]), θ, the weighting and the number of used points.
pub(super) struct Rows<'a> {
    pub(super) points: &'a [Measurement],
    /// ln(T/θ) of every point when the fit keeps them.
    pub(super) logs: Option<&'a [f64]>,
    pub(super) theta: f64,
    pub(super) weighted: bool,
    /// Used points.
    pub(super) n: usize,
    /// Whole blocks from which a pass is shared with a second thread.
    pub(super) split_blocks: usize,
}

impl Rows<'_> {
    /// The rows of the used points from point `from` on, formed by [`Row::of`], to `f` a
    /// block of at most [`BLOCK`] at a time, in order, until `blocks` blocks have gone.
    fn blocks(&self, from: usize, blocks: usize, mut f: impl FnMut(&[Row])) {
        let zero = Row {
            c0: 0.0,
            c2: 0.0,
            sw: 0.0,
            y: 0.0,
        };
        let mut buf = [zero; BLOCK];
        let mut m = 0;
        let mut left = blocks;
        let points = self.points.iter().enumerate().skip(from);
        for (i, pt) in points.filter(|(_, p)| p.included) {
            let l = log_at(self.logs, i, pt, self.theta);
            // A used point of a weighted fit has σ here (the read pass refused otherwise).
            let Some((row, _)) = Row::of(pt, l, self.theta, self.weighted) else {
                continue;
            };
            buf[m] = row;
            m += 1;
            if m == BLOCK {
                f(&buf);
                m = 0;
                left -= 1;
                if left == 0 {
                    return;
                }
            }
        }
        if m > 0 {
            f(&buf[..m]);
        }
    }

    /// The index of the point that is used point number `used` (0-based), or the number of
    /// points when there are not so many.
    fn point_of_used(&self, used: usize) -> usize {
        if self.n == self.points.len() {
            return used.min(self.n);
        }
        self.points
            .iter()
            .enumerate()
            .filter(|(_, p)| p.included)
            .nth(used)
            .map_or(self.points.len(), |(i, _)| i)
    }
}

/// max |βⱼ Dⱼ| over the first p entries (the size in scaled units).
pub(super) fn amax(v: &[f64; 3], p: usize, scale: &[f64; 3]) -> f64 {
    (0..p).map(|j| (v[j] * scale[j]).abs()).fold(0.0, f64::max)
}

/// Residuals s = b − Aβ of one block (columns `cols`, `m` rows) into `out`: in twice the
/// working precision when the model is refined, plainly otherwise.
fn block_residuals(
    cols: &[[f64; BLOCK]; 4],
    m: usize,
    sub: &Sub,
    split_beta: &[(f64, f64, f64); 3],
    out: &mut [f64],
) {
    let b = &cols[3][..m];
    if sub.refined {
        for (k, o) in out.iter_mut().enumerate() {
            let mut hi = b[k];
            let mut lo = 0.0;
            for j in 0..sub.p {
                let (nb, bh, bl) = split_beta[j];
                let (h, r) = two_prod_split(cols[j][k], nb, bh, bl);
                let (q, t) = two_sum(hi, h);
                hi = q;
                lo += t + r;
            }
            *o = hi + lo;
        }
    } else {
        for (k, o) in out.iter_mut().enumerate() {
            let mut acc = 0.0;
            for j in 0..sub.p {
                acc += cols[j][k] * -sub.beta[j];
            }
            *o = b[k] + acc;
        }
    }
}

/// One block's terms of a pass for each tracked model (at most two): Σs² of the block and
/// its g = Aᵀs, each taken from the block alone, so that adding them in block order gives
/// the sums of a pass made in one go.
#[derive(Clone, Copy, Default)]
struct BlockSums {
    ss: [f64; 2],
    g: [[f64; 3]; 2],
}

/// The terms of a block of rows for the tracks not yet done.
fn block_sums(chunk: &[Row], tracks: &[Track]) -> BlockSums {
    let m = chunk.len();
    let mut cols = [[0.0f64; BLOCK]; 4];
    let mut res = [0.0f64; BLOCK];
    // The weighted block, column by column, so the loops below vectorise.
    for (k, row) in chunk.iter().enumerate() {
        let (a, b) = row.weighted();
        cols[0][k] = a[0];
        cols[1][k] = a[1];
        cols[2][k] = a[2];
        cols[3][k] = b;
    }
    let mut out = BlockSums::default();
    for (i, t) in tracks.iter().enumerate().filter(|(_, t)| !t.done) {
        let res = &mut res[..m];
        block_residuals(&cols, m, &t.sub, &t.split, res);
        out.ss[i] = dot(res, res);
        if t.refine {
            for j in 0..t.sub.p {
                out.g[i][j] = dot(&cols[j][..m], res);
            }
        }
    }
    out
}

/// Adds a block's terms to the tracks' sums, in block order.
fn add_block(tracks: &mut [Track], b: &BlockSums) {
    for (i, t) in tracks.iter_mut().enumerate().filter(|(_, t)| !t.done) {
        t.ss += b.ss[i];
        if t.refine {
            for j in 0..t.sub.p {
                t.g[j] += b.g[i][j];
            }
        }
    }
}

/// Residual passes for every model at once. A model that needs no refinement gets its χ²
/// from the first pass. One that does is refined by corrected semi-normal equations:
/// s = b − Aβ in twice the working precision, g = Aᵀs (blocked sums keep its rounding at the
/// level of s's own), δ = R⁻¹R⁻ᵀg, stopping as `least_squares` does; the χ² at β + δ is
/// Σs² − ‖R⁻ᵀg‖² (exact for the least-squares correction), so no extra pass is needed.
/// Returns Σ w(y − ȳ_w)² from the first pass; `None` if anything is not finite.
///
/// From `rows.split_blocks` blocks on, the later half of the blocks of a pass is taken by a
/// second thread, which keeps each block's terms; they are added after this thread's, in
/// block order, so every sum is the one a single thread makes. Σ w(y − ȳ_w)², a sum row by
/// row, is continued here over the later half (its terms are cheap).
pub(super) fn residual_passes(
    rows: &Rows<'_>,
    tracks: &mut [Track],
    scale: &[f64; 3],
    mean: f64,
) -> Option<f64> {
    let blocks = rows.n.div_ceil(BLOCK);
    let half = blocks / 2;
    let split = (blocks >= rows.split_blocks.max(2)).then(|| rows.point_of_used(half * BLOCK));
    let mut tss = 0.0;
    let tss_of = |tss: &mut f64, chunk: &[Row]| {
        for row in chunk {
            let d = (row.y - mean) * row.sw;
            *tss += d * d;
        }
    };
    for step in 0..=MAX_REFINEMENT_STEPS {
        for t in tracks.iter_mut() {
            t.ss = 0.0;
            t.g = [0.0; 3];
        }
        let frozen: &[Track] = tracks;
        let later = |from: usize| {
            let mut sums = Vec::with_capacity(blocks - half);
            rows.blocks(from, usize::MAX, |chunk| {
                sums.push(block_sums(chunk, frozen))
            });
            sums
        };
        let (first, rest) = match split {
            Some(from) => std::thread::scope(|scope| {
                let other = std::thread::Builder::new()
                    .name("isochore-residuals".into())
                    .spawn_scoped(scope, move || later(from));
                let mut first = Vec::with_capacity(half);
                rows.blocks(0, half, |chunk| {
                    first.push(block_sums(chunk, frozen));
                    if step == 0 {
                        tss_of(&mut tss, chunk);
                    }
                });
                let rest = match other {
                    Ok(h) => h.join().unwrap_or_else(|e| std::panic::resume_unwind(e)),
                    Err(_) => later(from),
                };
                (first, rest)
            }),
            None => {
                let mut first = Vec::with_capacity(blocks);
                rows.blocks(0, usize::MAX, |chunk| {
                    first.push(block_sums(chunk, frozen));
                    if step == 0 {
                        tss_of(&mut tss, chunk);
                    }
                });
                (first, Vec::new())
            }
        };
        if let (Some(from), 0) = (split, step) {
            // Only √w and ln K of each row (as `Row::of` forms them) enter this sum.
            for pt in rows.points[from..].iter().filter(|p| p.included) {
                let (_, sw) = weight_and_root(pt, rows.weighted)?;
                let d = (pt.ln_k - mean) * sw;
                tss += d * d;
            }
        }
        for b in first.iter().chain(&rest) {
            add_block(tracks, b);
        }
        for t in tracks.iter_mut().filter(|t| !t.done) {
            let p = t.sub.p;
            if !t.refine || step == MAX_REFINEMENT_STEPS {
                t.rss = t.ss;
                t.done = true;
                continue;
            }
            let (u, dx) = t.sub.correction(&t.g);
            let size = amax(&dx, p, scale);
            if !size.is_finite() || size >= t.previous {
                t.rss = t.ss;
                t.done = true;
                continue;
            }
            for j in 0..p {
                t.sub.beta[j] += dx[j];
            }
            t.split = t.sub.split_neg_beta();
            let drop: f64 = u[..p].iter().map(|v| v * v).sum();
            t.rss = (t.ss - drop).max(0.0);
            let rate = size / t.previous;
            t.previous = size;
            if size * rate <= f64::EPSILON * amax(&t.sub.beta, p, scale) {
                t.done = true;
            }
        }
        if tracks.iter().all(|t| t.done) {
            break;
        }
    }
    let finite = tracks
        .iter()
        .all(|t| t.rss.is_finite() && t.sub.beta.iter().all(|v| v.is_finite()));
    (finite && tss.is_finite()).then_some(tss)
}
