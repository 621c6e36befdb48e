//! The general solver's χ² of a model on the caller's points with no n × p matrix: two
//! numbers per point (ln(T/θ) and √w, the row's costliest entries to form), four when the
//! solution is refined: [`weighted_rss_streamed`] gives the same bits as
//! [`super::weighted_rss_formed`] (nalgebra's Householder QR of the √w-scaled,
//! column-equilibrated design) by doing nalgebra's arithmetic in nalgebra's order, one pass
//! over the points per sum.
//!
//! After k reflections a row's entries are a function of its own original entries (formed
//! again from its temperature, ln(T/θ) and √w) and a few numbers per reflection: the column's
//! signed norm, the two divisors that normalise the axis, the sign and one factor per later
//! column. Only the sums need the whole column, and they are taken as nalgebra takes them
//! (`Matrix::dotx`: eight partial sums over the leading multiple of eight rows of the view,
//! combined in pairs, then the remaining rows in order; see [`Lanes`]). For each column:
//! one pass for its squared norm, one for the norm of the unscaled axis, one for the dot
//! products with the later columns and with √w·y (nalgebra's `q_tr_mul` applies the same
//! reflections to it, so it is one more column); a pass forms only the slots it reads, and
//! eight rows at a time, lane by lane ([`LANES`]), so its arithmetic vectorises. Then one
//! pass for the residuals and χ².
//! Refinement (most large data sets ask for it) is `refined_solution`'s, step by step, with
//! its two vectors r and f kept: one pass for f = b − r − Ax and g = −Aᵀr, and one pass per
//! reflection for Qᵀf, f being one more column.
//!
//! Anything out of the ordinary (a zero or non-finite column, rank deficiency) returns
//! `None`, and the caller takes the stored-matrix path, which reports the error.

// Slots of a row and entries of the triangle are clearest indexed.
#![allow(clippy::needless_range_loop)]

use super::{
    dot2, power_of_two_near, qr_error_bound, rank_tolerance, refinement_needed, two_prod, two_sum,
    MAX_REFINEMENT_STEPS,
};
use crate::measurement::Measurement;
use crate::model::Model;
use nalgebra::{DMatrix, DVector};
use rows::{lane, sqrt_weight, Block, Formula, Lanes, Reflection, Source, LANES};

mod rows;

/// Most design columns of a streamed χ².
pub(crate) const MAX_STREAMED_COLUMNS: usize = 4;

/// The columns, √w·y (after the last column) and the refinement's f (reflected as
/// `q_tr_mul` reflects it, in the last slot, [`F`]).
const SLOTS: usize = MAX_STREAMED_COLUMNS + 2;

/// The slot of the refinement's f.
const F: usize = SLOTS - 1;

/// χ² of `model`'s weighted least-squares fit to the included `points` (weights 1/σ² when
/// `weighted`, else 1), θ = `theta`: the same bits as [`super::weighted_rss_formed`] on the
/// same points, with memory for two numbers per point (ln(T/θ) and √w; four when refined) instead
/// of the design, its factorised copy and six vectors. `None` when the stored-matrix path is needed: more than
/// [`MAX_STREAMED_COLUMNS`] columns, anything not finite, a zero column or rank deficiency.
pub(crate) fn weighted_rss_streamed(
    model: Model,
    theta: f64,
    points: &[Measurement],
    weighted: bool,
) -> Option<f64> {
    let p = model.n_params();
    if p == 0 || p > MAX_STREAMED_COLUMNS {
        return None;
    }
    let n = points.iter().filter(|pt| pt.included).count();
    if n < p {
        return None;
    }
    let mut src = Source {
        points,
        logs: Vec::with_capacity(n),
        model,
        formula: if model == Model::CLARKE_GLEW {
            Formula::ClarkeGlew
        } else {
            Formula::Other
        },
        theta,
        weighted,
        p,
        inv_scale: [1.0; MAX_STREAMED_COLUMNS],
    };
    let mut scale = [1.0; MAX_STREAMED_COLUMNS];
    // ln(T/θ) and √w of each used point (the one logarithm, division and root of its row
    // that every pass would repeat), with the checks on σ and ln K of `solve_impl`.
    for pt in points.iter().filter(|pt| pt.included) {
        let sw = if weighted {
            sqrt_weight(pt.sigma_ln_k.unwrap_or(f64::NAN))
        } else {
            1.0
        };
        src.logs.push([(pt.t_k / theta).ln(), sw]);
        if !(sw.is_finite() && sw > 0.0 && pt.ln_k.is_finite()) {
            return None;
        }
    }
    // The column scale of `column_scale`: each column's largest |√w·x| (every entry
    // finite), then its sum of squares relative to that, in row order. The scale is 1 so
    // far, so a block's entries are √w·x itself.
    let mut big = [0.0f64; MAX_STREAMED_COLUMNS];
    let mut finite = true;
    src.original_rows(|_, m, v| {
        for j in 0..p {
            for x in &v[j][..m] {
                finite &= x.is_finite();
                big[j] = big[j].max(x.abs());
            }
        }
    });
    if !finite || big[..p].iter().any(|&b| b == 0.0 || !b.is_finite()) {
        return None;
    }
    let mut sum = [0.0f64; MAX_STREAMED_COLUMNS];
    src.original_rows(|_, m, v| {
        for j in 0..p {
            for x in &v[j][..m] {
                sum[j] += (x / big[j]).powi(2);
            }
        }
    });
    for j in 0..p {
        scale[j] = power_of_two_near(big[j] * sum[j].sqrt()).unwrap_or(1.0);
        src.inv_scale[j] = 1.0 / scale[j];
    }
    let slots = p + 1;

    // Householder QR (nalgebra's `QR::new`), with √w·y carried as one more column
    // (`q_tr_mul`).
    let mut refl: Vec<Reflection> = Vec::with_capacity(p);
    let mut r = DMatrix::<f64>::zeros(p, p);
    let mut qtb = DVector::<f64>::zeros(p);
    // Column k after k reflections (rows k on): formed by a pass for the first column, then
    // each next one from it and from what the dot-product pass saw of the next column
    // (`next`), by reflection k as `Reflection::apply` makes it, so the next column needs
    // no pass of its own; read by the passes for its squared norm and the norm of its axis.
    // Later the refinement's r and f (so they add nothing to the peak when the solution is
    // refined).
    let mut column: Vec<f64> = Vec::with_capacity(n);
    let mut next: Vec<f64> = Vec::with_capacity(n);
    src.rows(
        0,
        &refl,
        1,
        false,
        |_, _, _| (),
        |_, _, m, v| column.extend_from_slice(&v[0][..m]),
    );
    for k in 0..p {
        let len = n - k;
        let mut sq = Lanes::new(len);
        for (b, block) in column.chunks(LANES).enumerate() {
            let mut t = [0.0; LANES];
            for (t, x) in t.iter_mut().zip(block) {
                *t = x * x;
            }
            sq.push_block(b * LANES, block.len(), &t);
        }
        let sq = sq.total();
        let norm = sq.sqrt();
        let x0 = src.row(k, &refl, k + 1, false, |_, _, _| ())[k];
        let (modulus, sign0) = if x0 >= 0.0 { (x0, 1.0) } else { (-x0, -1.0) };
        let signed_norm = sign0 * norm;
        let factor = (sq + modulus * norm) * 2.0;
        if !(factor.is_finite() && factor != 0.0) {
            return None;
        }
        let sf = factor.sqrt();
        let mut nsq = Lanes::new(len);
        for (b, block) in column.chunks(LANES).enumerate() {
            let (rel, m) = (b * LANES, block.len());
            let mut x = [0.0; LANES];
            x[..m].copy_from_slice(block);
            if rel == 0 {
                x[0] += signed_norm;
            }
            let mut t = [0.0; LANES];
            for (t, x) in t.iter_mut().zip(&x) {
                let u = x / sf;
                *t = u * u;
            }
            nsq.push_block(rel, m, &t);
        }
        let nrm = nsq.total().sqrt();
        if !(nrm.is_finite() && nrm != 0.0) {
            return None;
        }
        let reflection_norm = -signed_norm;
        let sign = reflection_norm.signum();
        let mut dots: [Lanes; SLOTS] = std::array::from_fn(|_| Lanes::new(len));
        next.clear();
        src.rows(
            k,
            &refl,
            slots,
            false,
            |_, _, _| (),
            |rel, _, m, v| {
                if k == 0 {
                    // Every entry and √w·y finite (the first pass that forms them all).
                    finite &= v[..slots]
                        .iter()
                        .all(|x| x[..m].iter().all(|x| x.is_finite()));
                }
                if k + 1 < p {
                    next.extend_from_slice(&v[k + 1][..m]);
                }
                let mut x = v[k];
                if rel == 0 {
                    x[0] += signed_norm;
                }
                let mut axis = [0.0; LANES];
                for (a, x) in axis.iter_mut().zip(&x) {
                    *a = x / sf / nrm;
                }
                for j in k + 1..slots {
                    let mut t = [0.0; LANES];
                    for ((t, a), e) in t.iter_mut().zip(&axis).zip(&v[j]) {
                        *t = a * e;
                    }
                    dots[j].push_block(rel, m, &t);
                }
            },
        );
        if !finite {
            return None;
        }
        let mut this = Reflection {
            signed_norm,
            sf,
            nrm,
            sign,
            factor: [0.0; SLOTS],
        };
        for (j, d) in dots.into_iter().enumerate().skip(k + 1).take(slots - k - 1) {
            let m_two = sign * -2.0;
            this.factor[j] = (d.total() - 0.0) * m_two;
        }
        refl.push(this);
        // Row k is final: R's row k and (Qᵀb)ₖ; R's diagonal is |signed norm| (`QR::r`).
        let v = src.row(k, &refl, slots, false, |_, _, _| ());
        r[(k, k)] = reflection_norm.abs();
        for j in k + 1..p {
            r[(k, j)] = v[j];
        }
        qtb[k] = v[p];
        if k + 1 < p {
            // Column k + 1 after reflection k, rows k + 1 on (none of them the first row of
            // reflection k's view), over column k in place.
            let t = &refl[k];
            for j in 0..len - 1 {
                let axis = column[j + 1] / t.sf / t.nrm;
                column[j] = t.factor[k + 1] * axis * 1.0 + t.sign * next[j + 1];
            }
            column.truncate(len - 1);
        }
    }
    #[cfg(test)]
    LAST_QR.with(|c| *c.borrow_mut() = Some((r.clone(), qtb.clone(), scale)));
    // The rank test of `factorised`.
    let max_diag = (0..p).map(|j| r[(j, j)].abs()).fold(0.0, f64::max);
    let tolerance = rank_tolerance(n);
    if (0..p).any(|j| {
        let d = r[(j, j)].abs();
        d.is_nan() || d <= tolerance * max_diag
    }) {
        return None;
    }
    // `refined_solution` up to its error bound.
    let x = r.solve_upper_triangular(&qtb)?;
    if x.iter().any(|v| !v.is_finite()) {
        return None;
    }
    let mut x = x;
    let neg_x: Vec<f64> = x.iter().map(|v| -v).collect();
    let residual = |v: &[f64; SLOTS], neg_x: &[f64]| {
        v[p] + v[..p].iter().zip(neg_x).map(|(r, c)| r * c).sum::<f64>()
    };
    let mut ss = -0.0f64;
    src.original_rows(|_, m, v| {
        for i in 0..m {
            let res = residual(&lane(v, i), &neg_x);
            ss += res * res;
        }
    });
    let bound = qr_error_bound(&r, x.norm(), ss.sqrt(), p);
    if refinement_needed(bound) {
        // Björck's refinement as `refined_solution` takes it, with its residuals r and f
        // kept (two numbers per point); f goes through the reflections as one more column
        // for Qᵀf. A step's update of r is made in the next pass that reads it.
        let mut res = column;
        res.clear();
        res.resize(n, 0.0);
        let mut f = next;
        f.clear();
        f.resize(n, 0.0);
        // The last step's δx, not yet added into `res`.
        let mut pending: Option<Vec<f64>> = None;
        let mut first = true;
        let mut previous = x.amax();
        for _ in 0..MAX_REFINEMENT_STEPS {
            let neg_x: Vec<f64> = x.iter().map(|v| -v).collect();
            let mut g_hi = [0.0; MAX_STREAMED_COLUMNS];
            let mut g_lo = [0.0; MAX_STREAMED_COLUMNS];
            ss = -0.0;
            src.original_rows(|row, m, v| {
                for (i, v) in (row..row + m).zip((0..m).map(|l| lane(v, l))) {
                    let v = &v;
                    let ri = &mut res[i];
                    if first {
                        *ri = residual(v, &neg_x);
                    } else if let Some(dx) = &pending {
                        let adx: f64 = v[..p].iter().zip(dx).map(|(r, d)| r * d).sum();
                        *ri += f[i] - adx;
                    }
                    let ri = *ri;
                    ss += ri * ri;
                    let (b_minus_r, e0) = two_sum(v[p], -ri);
                    f[i] = dot2(b_minus_r, &v[..p], &neg_x) + e0;
                    for j in 0..p {
                        let (h, e1) = two_prod(-v[j], ri);
                        let (q, e2) = two_sum(g_hi[j], h);
                        g_hi[j] = q;
                        g_lo[j] += e1 + e2;
                    }
                }
            });
            first = false;
            pending = None;
            let g = DVector::from_iterator(p, g_hi.iter().zip(&g_lo).take(p).map(|(h, l)| h + l));
            let d1 = r.tr_solve_upper_triangular(&g)?;
            // Qᵀf, one reflection at a time.
            let init = |row: usize, m: usize, v: &mut Block| {
                v[F][..m].copy_from_slice(&f[row..row + m]);
            };
            let mut qtf = DVector::<f64>::zeros(p);
            for k in 0..p {
                let mut dot = Lanes::new(n - k);
                let (signed_norm, sf, nrm) = (refl[k].signed_norm, refl[k].sf, refl[k].nrm);
                src.rows(k, &refl[..k], k + 1, true, init, |rel, _, m, v| {
                    let mut x = v[k];
                    if rel == 0 {
                        x[0] += signed_norm;
                    }
                    let mut t = [0.0; LANES];
                    for ((t, x), e) in t.iter_mut().zip(&x).zip(&v[F]) {
                        *t = x / sf / nrm * e;
                    }
                    dot.push_block(rel, m, &t);
                });
                let m_two = refl[k].sign * -2.0;
                refl[k].factor[F] = (dot.total() - 0.0) * m_two;
                qtf[k] = src.row(k, &refl[..=k], k + 1, true, init)[F];
            }
            let dx = r.solve_upper_triangular(&(qtf - &d1))?;
            let size = dx.amax();
            if !size.is_finite() || size >= previous {
                break;
            }
            x += &dx;
            pending = Some(dx.iter().copied().collect());
            let rate = size / previous;
            previous = size;
            if size * rate <= f64::EPSILON * x.amax() {
                break;
            }
        }
        if let Some(dx) = &pending {
            ss = -0.0;
            src.original_rows(|row, m, v| {
                for (i, l) in (row..row + m).zip(0..m) {
                    let v = lane(v, l);
                    let adx: f64 = v[..p].iter().zip(dx).map(|(r, d)| r * d).sum();
                    let ri = res[i] + (f[i] - adx);
                    ss += ri * ri;
                }
            });
        }
    }
    // The checks of `factorised` on χ² and the coefficients in raw units.
    let coefficients_finite = (0..p).all(|j| (x[j] / scale[j]).is_finite());
    (ss.is_finite() && coefficients_finite).then_some(ss)
}

/// The last factor, Qᵀb and column scale (tests only).
#[cfg(test)]
type Factor = (DMatrix<f64>, DVector<f64>, [f64; MAX_STREAMED_COLUMNS]);

#[cfg(test)]
thread_local! {
    /// The last factor, Qᵀb and column scale (for the tests against nalgebra).
    static LAST_QR: std::cell::RefCell<Option<Factor>> =
        const { std::cell::RefCell::new(None) };
}

#[cfg(test)]
mod tests;
