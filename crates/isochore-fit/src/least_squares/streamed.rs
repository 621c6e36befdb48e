//! The general solver's χ² of a model on the caller's points with no n × p matrix: one
//! number per point (ln(T/θ), the row's costliest entry to form):
//! [`weighted_rss_streamed`] gives the same bits as
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
//! four rows at a time, lane by lane ([`LANES`]), so its arithmetic vectorises; when every
//! point is used and there are many, the passes of these sums are shared with a second
//! thread, each taking one half of every group of eight rows (`Source::lane_sums`: each of
//! the eight partial sums gets the same terms in the same order). Then one
//! pass for the residuals and χ² (and the first refinement step's g = −Aᵀr). Nothing else is
//! kept per point: a column after k reflections and √w are formed again by every pass that
//! reads them.
//! Refinement (most large data sets ask for it) is `refined_solution`'s, step by step: one
//! pass for g = −Aᵀr (but the first), and one pass per reflection for Qᵀf, f being one more
//! column; r and f are formed again for each row from the steps so far (see `Steps`) instead
//! of being kept.
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
use std::borrow::Cow;
use std::ops::Range;

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
/// same points, with memory for one number per point (ln(T/θ)) instead of the design, its
/// factorised copy and six vectors. `None` when the stored-matrix path is needed: more than
/// [`MAX_STREAMED_COLUMNS`] columns, anything not finite, a zero column or rank deficiency.
#[cfg(test)]
pub(crate) fn weighted_rss_streamed(
    model: Model,
    theta: f64,
    points: &[Measurement],
    weighted: bool,
) -> Option<f64> {
    weighted_rss_streamed_with_logs(model, theta, points, weighted, None)
}

/// [`weighted_rss_streamed`] with every point's ln(T/θ) given when the caller has them
/// (`(t_k / theta).ln()`, as the fit's streaming path keeps them): then, when every point
/// is used, they are read from the caller's memory instead of taken again and kept here.
pub(crate) fn weighted_rss_streamed_with_logs(
    model: Model,
    theta: f64,
    points: &[Measurement],
    weighted: bool,
    logs: Option<&[f64]>,
) -> Option<f64> {
    let p = model.n_params();
    if p == 0 || p > MAX_STREAMED_COLUMNS {
        return None;
    }
    let n = points.iter().filter(|pt| pt.included).count();
    if n < p {
        return None;
    }
    let logs = logs.filter(|l| l.len() == points.len());
    let borrowed = logs.filter(|_| n == points.len());
    // ln(T/θ) of each used point (the logarithm of its row, which every pass would repeat),
    // with the checks on σ and ln K of `solve_impl` (√w is formed again by every pass).
    let mut own = Vec::with_capacity(if borrowed.is_some() { 0 } else { n });
    for (i, pt) in points.iter().enumerate().filter(|(_, pt)| pt.included) {
        let sw = if weighted {
            sqrt_weight(pt.sigma_ln_k.unwrap_or(f64::NAN))
        } else {
            1.0
        };
        if borrowed.is_none() {
            own.push(logs.map_or_else(|| (pt.t_k / theta).ln(), |l| l[i]));
        }
        if !(sw.is_finite() && sw > 0.0 && pt.ln_k.is_finite()) {
            return None;
        }
    }
    let mut src = Source {
        points,
        logs: borrowed.map_or(Cow::Owned(own), Cow::Borrowed),
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
    // Column k after k reflections (rows k on) is formed again by each pass that reads it
    // (its squared norm, the norm of its axis), as `Reflection::apply` makes it: nothing is
    // kept per point but ln(T/θ) and √w.
    let no_f = |_: usize, _: Range<usize>, _: &mut Block| ();
    for k in 0..p {
        let [sq] = src.lane_sums(k, &refl, k + 1, false, no_f, |_, lanes, v, [t]| {
            for i in lanes {
                t[i] = v[k][i] * v[k][i];
            }
            true
        })?;
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
        let [nsq] = src.lane_sums(k, &refl, k + 1, false, no_f, |rel, lanes, v, [t]| {
            let mut x = v[k];
            if rel == 0 {
                x[0] += signed_norm;
            }
            for i in lanes {
                let u = x[i] / sf;
                t[i] = u * u;
            }
            true
        })?;
        let nrm = nsq.total().sqrt();
        if !(nrm.is_finite() && nrm != 0.0) {
            return None;
        }
        let reflection_norm = -signed_norm;
        let sign = reflection_norm.signum();
        // With the first column, every entry and √w·y checked finite (the first pass that
        // forms them all).
        let dots: [Lanes; SLOTS] =
            src.lane_sums(k, &refl, slots, false, no_f, |rel, lanes, v, t| {
                let good = k > 0
                    || v[..slots]
                        .iter()
                        .all(|x| x[lanes.clone()].iter().all(|x| x.is_finite()));
                let mut x = v[k];
                if rel == 0 {
                    x[0] += signed_norm;
                }
                let mut axis = [0.0; LANES];
                for (a, x) in axis.iter_mut().zip(&x) {
                    *a = x / sf / nrm;
                }
                for j in k + 1..slots {
                    for i in lanes.clone() {
                        t[j][i] = axis[i] * v[j][i];
                    }
                }
                good
            })?;
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
    // χ² at the solution, and g = −Aᵀr as the refinement's first step takes it (that step
    // then needs no pass of its own).
    let mut ss = -0.0f64;
    let mut grad = Gradient::default();
    src.original_rows(|_, m, v| {
        for i in 0..m {
            let v = lane(v, i);
            let res = v[p] + row_dot(&v, &neg_x);
            ss += res * res;
            grad.add(&v, res, p);
        }
    });
    let bound = qr_error_bound(&r, x.norm(), ss.sqrt(), p);
    #[cfg(test)]
    LAST_STEPS.with(|c| c.set(0));
    if refinement_needed(bound) {
        // Björck's refinement as `refined_solution` takes it. Its two vectors r and f are
        // not kept: a row's r and f after the steps so far are formed again from the row,
        // the solutions and the corrections ([`Steps::row`]), in the arithmetic the kept
        // vectors had (the same bits); f goes through the reflections as one more column
        // for Qᵀf. A step's correction of r is made in the next pass that reads it.
        let mut steps = Steps {
            p,
            neg_x: Vec::new(),
            dx: Vec::new(),
        };
        let mut previous = x.amax();
        let mut first = Some(grad);
        for _ in 0..MAX_REFINEMENT_STEPS {
            steps.neg_x.push(x.iter().map(|v| -v).collect());
            let grad = match first.take() {
                // The first step's r is the residual just summed, at the same x.
                Some(grad) => grad,
                None => {
                    let mut grad = Gradient::default();
                    ss = -0.0;
                    src.original_rows(|_, m, v| {
                        for l in 0..m {
                            let v = lane(v, l);
                            let (ri, _) = steps.row(&v);
                            ss += ri * ri;
                            grad.add(&v, ri, p);
                        }
                    });
                    grad
                }
            };
            let g = grad.total(p);
            let d1 = r.tr_solve_upper_triangular(&g)?;
            // Qᵀf, one reflection at a time; each row's f formed from its original slots
            // before the reflections reach it.
            let init = |_: usize, lanes: Range<usize>, v: &mut Block| {
                for l in lanes {
                    v[F][l] = steps.row(&lane(v, l)).1;
                }
            };
            let mut qtf = DVector::<f64>::zeros(p);
            for k in 0..p {
                let (signed_norm, sf, nrm) = (refl[k].signed_norm, refl[k].sf, refl[k].nrm);
                let [dot] =
                    src.lane_sums(k, &refl[..k], k + 1, true, init, |rel, lanes, v, [t]| {
                        let mut x = v[k];
                        if rel == 0 {
                            x[0] += signed_norm;
                        }
                        for i in lanes {
                            t[i] = x[i] / sf / nrm * v[F][i];
                        }
                        true
                    })?;
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
            steps.dx.push(dx.iter().copied().collect());
            let rate = size / previous;
            previous = size;
            if size * rate <= f64::EPSILON * x.amax() {
                break;
            }
        }
        #[cfg(test)]
        LAST_STEPS.with(|c| c.set(steps.neg_x.len()));
        if steps.dx.len() == steps.neg_x.len() {
            // The last correction, not yet made in r: χ² at the final solution.
            let dx = steps.dx.pop().unwrap_or_default();
            ss = -0.0;
            src.original_rows(|_, m, v| {
                for l in 0..m {
                    let v = lane(v, l);
                    let (ri, fi) = steps.row(&v);
                    let adx = row_dot(&v, &dx);
                    let ri = ri + (fi - adx);
                    ss += ri * ri;
                }
            });
        }
    }
    // The checks of `factorised` on χ² and the coefficients in raw units.
    let coefficients_finite = (0..p).all(|j| (x[j] / scale[j]).is_finite());
    (ss.is_finite() && coefficients_finite).then_some(ss)
}

/// Σⱼ vⱼ cⱼ over a row's first `c.len()` slots (its columns), summed in order: Ax of a
/// row, or Aδx.
#[inline]
fn row_dot(v: &[f64; SLOTS], c: &[f64]) -> f64 {
    v.iter().zip(c).map(|(r, c)| r * c).sum()
}

/// g = −Aᵀr summed as `refined_solution` sums it: each term's error-free product and sum,
/// the errors added apart.
#[derive(Default)]
struct Gradient {
    hi: [f64; MAX_STREAMED_COLUMNS],
    lo: [f64; MAX_STREAMED_COLUMNS],
}

impl Gradient {
    /// Adds row `v`'s terms with residual `ri`.
    #[inline]
    fn add(&mut self, v: &[f64; SLOTS], ri: f64, p: usize) {
        for j in 0..p {
            let (h, e1) = two_prod(-v[j], ri);
            let (q, e2) = two_sum(self.hi[j], h);
            self.hi[j] = q;
            self.lo[j] += e1 + e2;
        }
    }

    /// The sum.
    fn total(&self, p: usize) -> DVector<f64> {
        DVector::from_iterator(p, self.hi.iter().zip(&self.lo).take(p).map(|(h, l)| h + l))
    }
}

/// The refinement so far: the solution of each step (negated) and the correction made after
/// it, from which a row's r and f are formed again.
struct Steps {
    p: usize,
    /// −x of each step, the current one last.
    neg_x: Vec<Vec<f64>>,
    /// The correction δx made after each step (one fewer than `neg_x` while a step runs).
    dx: Vec<Vec<f64>>,
}

impl Steps {
    /// A row's r and f at the current step, as the kept vectors of `refined_solution` held
    /// them: r = b − Ax at the first step, then r ← r + (f − Aδx) after each correction; f
    /// = (b − r) − Ax in twice the working precision.
    #[inline]
    fn row(&self, v: &[f64; SLOTS]) -> (f64, f64) {
        let p = self.p;
        let f_of = |ri: f64, neg_x: &[f64]| {
            let (b_minus_r, e0) = two_sum(v[p], -ri);
            dot2(b_minus_r, &v[..p], neg_x) + e0
        };
        let first = &self.neg_x[0];
        let mut ri = v[p] + row_dot(v, first);
        let mut fi = f_of(ri, first);
        for (neg_x, dx) in self.neg_x[1..].iter().zip(&self.dx) {
            let adx = row_dot(v, dx);
            ri += fi - adx;
            fi = f_of(ri, neg_x);
        }
        (ri, fi)
    }
}

/// The last factor, Qᵀb and column scale (tests only).
#[cfg(test)]
type Factor = (DMatrix<f64>, DVector<f64>, [f64; MAX_STREAMED_COLUMNS]);

#[cfg(test)]
thread_local! {
    /// The last factor, Qᵀb and column scale (for the tests against nalgebra).
    static LAST_QR: std::cell::RefCell<Option<Factor>> =
        const { std::cell::RefCell::new(None) };
    /// The refinement steps of the last solution that got as far (0: not refined).
    static LAST_STEPS: std::cell::Cell<usize> = const { std::cell::Cell::new(0) };
}

#[cfg(test)]
mod tests;
