//! The residual passes of the streaming path: χ² of each tracked model from the residuals
//! themselves (not from the triangle), and the semi-normal refinement steps.

use super::*;

/// The rows of the used points, formed by [`Row::of`], to `f` a block of at most
/// [`BLOCK`] at a time, in order.
fn used_blocks(points: &[Measurement], theta: f64, weighted: bool, mut f: impl FnMut(&[Row])) {
    let zero = Row {
        c0: 0.0,
        c2: 0.0,
        sw: 0.0,
        y: 0.0,
    };
    let mut buf = [zero; BLOCK];
    let mut m = 0;
    for pt in points.iter().filter(|p| p.included) {
        // A used point of a weighted fit has σ here (the read pass refused otherwise).
        let Some((row, _)) = Row::of(pt, theta, weighted) else {
            continue;
        };
        buf[m] = row;
        m += 1;
        if m == BLOCK {
            f(&buf);
            m = 0;
        }
    }
    if m > 0 {
        f(&buf[..m]);
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

/// Residual passes for every model at once. A model that needs no refinement gets its χ²
/// from the first pass. One that does is refined by corrected semi-normal equations:
/// s = b − Aβ in twice the working precision, g = Aᵀs (blocked sums keep its rounding at the
/// level of s's own), δ = R⁻¹R⁻ᵀg, stopping as `least_squares` does; the χ² at β + δ is
/// Σs² − ‖R⁻ᵀg‖² (exact for the least-squares correction), so no extra pass is needed.
/// Returns Σ w(y − ȳ_w)² from the first pass; `None` if anything is not finite.
pub(super) fn residual_passes(
    points: &[Measurement],
    theta: f64,
    weighted: bool,
    tracks: &mut [Track],
    scale: &[f64; 3],
    mean: f64,
) -> Option<f64> {
    let mut tss = 0.0;
    for step in 0..=MAX_REFINEMENT_STEPS {
        for t in tracks.iter_mut() {
            t.ss = 0.0;
            t.g = [0.0; 3];
        }
        let mut cols = [[0.0f64; BLOCK]; 4];
        let mut res = [0.0f64; BLOCK];
        used_blocks(points, theta, weighted, |chunk| {
            let m = chunk.len();
            // The weighted block, column by column, so the loops below vectorise.
            for (k, row) in chunk.iter().enumerate() {
                let (a, b) = row.weighted();
                cols[0][k] = a[0];
                cols[1][k] = a[1];
                cols[2][k] = a[2];
                cols[3][k] = b;
            }
            if step == 0 {
                for row in chunk {
                    let d = (row.y - mean) * row.sw;
                    tss += d * d;
                }
            }
            for t in tracks.iter_mut().filter(|t| !t.done) {
                let p = t.sub.p;
                let res = &mut res[..m];
                block_residuals(&cols, m, &t.sub, &t.split, res);
                t.ss += dot(res, res);
                if t.refine {
                    for j in 0..p {
                        t.g[j] += dot(&cols[j][..m], res);
                    }
                }
            }
        });
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
