//! The streaming path of a van 't Hoff fit, for data that need no special care.
//!
//! Both models share their first two design columns, −1/(RT) and 1/R, so one Householder QR
//! of the augmented matrix `W^{1/2} [c₀ c₁ c₂ y]` yields, in its leading blocks, the
//! triangular factor and `Qᵀb` of the linear model and of the constant-ΔCp° model at once
//! (a reflection for column j touches only rows ≥ j). The QR is built while the points are
//! read, a block of rows at a time: the 4×4 triangle so far is stacked on the next block
//! and four Householder reflections reduce the stack back to a triangle (tall-skinny QR).
//! No n×p matrix, no Q and no normal equations are formed, and nothing is kept per point
//! but, when the second core is free, its ln(T/θ) ([`logs_of`], 8 bytes a point while the
//! fit runs): each later pass forms a used point's row (1/T-column, ΔCp°-column, √w, ln K)
//! again from the caller's points, with the same arithmetic ([`Row::of`]).
//!
//! Column scaling by powers of two changes no rounding in a Householder QR, so the factor is
//! computed on the √w-scaled columns and the powers of two (nearest the column norms) enter
//! only the rank test and the error bound, exactly as in [`crate::least_squares`]. When the
//! same first-order error bound asks for it, the solution is refined with residuals
//! `b − Aβ` evaluated in twice the working precision and corrections from the triangular
//! factor (`RᵀR δ = Aᵀs`, the corrected semi-normal equations, which converge like
//! ε·κ²); designs too ill-conditioned for that (κ > ~10⁶), non-finite or extreme numbers
//! and rank deficiency return `None`, and the caller takes the general path of
//! [`crate::least_squares::solve`], which reports errors and handles the hard cases. Input
//! errors never come out of this path: its first pass checks every point's values as
//! `vant_hoff::inputs::check_inputs` does and declines any fault, so that the general
//! path's `check_inputs` names the first. The refinement settings (error
//! bound, threshold, step limit, power-of-two scaling) are those of `least_squares`.
//!
//! Passes over the data: the logarithms (when kept); one to check, read and factorise; one
//! for the residual sums of squares of both models and one per refinement step (usually
//! none or one, both models together); one for the per-point diagnostics' summary. When the
//! second core is free, the logarithms, the residual passes and the diagnostics pass are
//! shared with a second thread, in ways that leave every number the single thread's (see
//! `passes::residual_passes`); the factorisation, whose reflections follow the rows in
//! order, stays on one.

// Indexing by row and column is the clearest way to write 3×3 and 4×4 triangular algebra.
#![allow(clippy::needless_range_loop)]

use crate::diagnostics::{diagnose_one, DiagnosticsSummary, Flags, PointContext, PointDiagnostics};
use crate::least_squares::{
    first_order_bound, power_of_two_near, rank_tolerance, refinement_needed, split, two_prod_split,
    two_sum, MAX_REFINEMENT_STEPS,
};
use crate::measurement::Measurement;
use crate::model::{is_plausible_temperature, FitOptions, Model, Weighting};
use nalgebra::DMatrix;

/// Rows absorbed into the triangle per block (the block stays in the L1 cache).
const BLOCK: usize = 128;

/// Above this estimate of the contraction factor c·ε·κ² of semi-normal refinement the
/// general path is taken instead.
const CSNE_LIMIT: f64 = 1e-3;

/// The constant column 1/R of both models, as [`Model::row`] computes it.
const C1: f64 = 1.0 / crate::GAS_CONSTANT;

/// One used point: the raw design entries that cost something to compute, its √w and ln K.
#[derive(Debug, Clone, Copy)]
struct Row {
    c0: f64,
    c2: f64,
    sw: f64,
    y: f64,
}

impl Row {
    /// The row of an included point: the design entries of the constant-ΔCp° model and
    /// √w = √(1/σ²) (1 unweighted). `None` for a weighted fit's point without σ. Every pass
    /// forms a point's row here, so every pass sees the same numbers.
    /// `l` is the point's ln(T/θ) as [`logs_of`] takes it (the row's logarithm, taken once
    /// for every pass of the fit).
    #[inline]
    fn of(pt: &Measurement, l: f64, theta: f64, weighted: bool) -> Option<(Row, f64)> {
        let (w, sw) = weight_and_root(pt, weighted)?;
        let x = crate::models::constant_cp::row(pt.t_k, theta, l);
        debug_assert_eq!(x[1], C1);
        Some((
            Row {
                c0: x[0],
                c2: x[2],
                sw,
                y: pt.ln_k,
            },
            w,
        ))
    }

    /// The weighted row (√w·c₀, √w·c₁, √w·c₂) and √w·y, formed as the general path forms them.
    #[inline]
    fn weighted(&self) -> ([f64; 3], f64) {
        (
            [self.c0 * self.sw, C1 * self.sw, self.c2 * self.sw],
            self.y * self.sw,
        )
    }
}

/// A point's weight w = 1/σ² and √w (1 and 1 unweighted), as every pass forms them; `None`
/// for a weighted fit's point without σ.
#[inline]
fn weight_and_root(pt: &Measurement, weighted: bool) -> Option<(f64, f64)> {
    if weighted {
        let s = pt.sigma_ln_k?;
        let w = 1.0 / (s * s);
        Some((w, w.sqrt()))
    } else {
        Some((1.0, 1.0))
    }
}

/// From this many points on, the logarithms of [`logs_of`] and the residual passes are
/// shared with a second thread (some milliseconds of work each; a thread costs some tens
/// of microseconds).
pub(crate) const SPLIT_POINTS: usize = 1 << 16;

/// ln(T/θ) of every point, `(t_k / theta).ln()` as [`Model::row_into`] takes it, so that a
/// row formed with it is that row to the bit; taken once for all the passes of a fit (a
/// logarithm costs more than the rest of a row). From `split_points` points on, the
/// second half is taken by a second thread (when one can be started).
pub(crate) fn logs_of(points: &[Measurement], theta: f64, split_points: usize) -> Vec<f64> {
    let fill = |pts: &[Measurement], out: &mut [f64]| {
        for (o, p) in out.iter_mut().zip(pts) {
            *o = (p.t_k / theta).ln();
        }
    };
    let n = points.len();
    let mut logs = vec![0.0; n];
    let mid = if n >= split_points { n / 2 } else { n };
    let (first, second) = logs.split_at_mut(mid);
    let shared = !second.is_empty()
        && std::thread::scope(|scope| {
            let other = std::thread::Builder::new()
                .name("isochore-logs".into())
                .spawn_scoped(scope, || fill(&points[mid..], second));
            fill(&points[..mid], first);
            other
                .map(|h| h.join().unwrap_or_else(|e| std::panic::resume_unwind(e)))
                .is_ok()
        });
    if !shared {
        // One thread (a small set, or no second thread could be started).
        fill(points, &mut logs);
    }
    logs
}

/// Point `i`'s ln(T/θ): from `logs` ([`logs_of`]) when the fit keeps them, else taken here
/// (the same number).
#[inline(always)]
fn log_at(logs: Option<&[f64]>, i: usize, pt: &Measurement, theta: f64) -> f64 {
    match logs {
        Some(l) => l[i],
        None => (pt.t_k / theta).ln(),
    }
}

/// Reduces the stack [R; block] to a triangle by four Householder reflections. `block` holds
/// the rows column by column (`block[j][i]`), `m` rows of it in use.
fn absorb(r: &mut [[f64; 4]; 4], block: &mut [[f64; BLOCK]; 4], m: usize) {
    for j in 0..4 {
        let (head, tail) = block.split_at_mut(j + 1);
        let cj = &head[j][..m];
        let sigma = dot(cj, cj);
        if sigma == 0.0 {
            continue;
        }
        let x0 = r[j][j];
        let norm = (x0 * x0 + sigma).sqrt();
        let alpha = if x0 >= 0.0 { -norm } else { norm };
        let v0 = x0 - alpha;
        // vᵀv = v0² + σ = −2αv0, so τ = 2/vᵀv = −1/(α v0).
        let tau = -1.0 / (alpha * v0);
        r[j][j] = alpha;
        for (off, ck) in tail.iter_mut().enumerate() {
            let k = j + 1 + off;
            let ck = &mut ck[..m];
            let f = tau * (v0 * r[j][k] + dot(cj, ck));
            r[j][k] -= f * v0;
            for (c, v) in ck.iter_mut().zip(cj) {
                *c -= f * v;
            }
        }
    }
}

/// Dot product with four partial sums.
#[inline]
fn dot(a: &[f64], b: &[f64]) -> f64 {
    let mut s = [0.0; 4];
    let ca = a.chunks_exact(4);
    let cb = b.chunks_exact(4);
    let (ra, rb) = (ca.remainder(), cb.remainder());
    for (x, y) in ca.zip(cb) {
        for l in 0..4 {
            s[l] += x[l] * y[l];
        }
    }
    let mut t = (s[0] + s[1]) + (s[2] + s[3]);
    for (x, y) in ra.iter().zip(rb) {
        t += x * y;
    }
    t
}

/// Σ ln wᵢ of positive normal numbers without a logarithm per term: the binary exponents
/// are added as integers and the significands (in [1, 2)) multiplied, renormalised every
/// 256 factors, so one logarithm at the end serves all. The product's rounding
/// (n·ε relative) is an absolute error of n·ε in the sum, no more than adding n rounded
/// logarithms.
#[derive(Debug)]
struct LogSum {
    exponent: i64,
    product: f64,
    count: u32,
}

impl Default for LogSum {
    fn default() -> Self {
        LogSum {
            exponent: 0,
            product: 1.0,
            count: 0,
        }
    }
}

impl LogSum {
    /// Splits a positive normal number into its significand in [1, 2) and exponent.
    #[inline]
    fn split(v: f64) -> (f64, i64) {
        let bits = v.to_bits();
        let e = ((bits >> 52) & 0x7ff) as i64 - 1023;
        let m = f64::from_bits((bits & ((1u64 << 52) - 1)) | (1023u64 << 52));
        (m, e)
    }

    #[inline]
    fn add(&mut self, w: f64) {
        let (m, e) = Self::split(w);
        self.exponent += e;
        self.product *= m;
        self.count += 1;
        if self.count == 256 {
            self.renormalise();
        }
    }

    fn renormalise(&mut self) {
        let (m, e) = Self::split(self.product);
        self.product = m;
        self.exponent += e;
        self.count = 0;
    }

    fn total(&mut self) -> f64 {
        self.renormalise();
        self.product.ln() + self.exponent as f64 * std::f64::consts::LN_2
    }
}

/// One model solved from the shared triangle.
#[derive(Debug, Clone)]
struct Sub {
    p: usize,
    /// Its inverse, upper triangular.
    r_inv: [[f64; 3]; 3],
    /// Coefficients in the raw units.
    beta: [f64; 3],
    /// Whether refinement was applied (then residuals are formed in twice the precision).
    refined: bool,
}

impl Sub {
    /// Solves the leading p×p block; `None` when rank deficient or ill-conditioned beyond
    /// what semi-normal refinement handles.
    fn new(r4: &[[f64; 4]; 4], p: usize, scale: &[f64; 3], n: usize) -> Option<(Sub, bool)> {
        let mut r = [[0.0; 3]; 3];
        for a in 0..p {
            for b in a..p {
                r[a][b] = r4[a][b];
            }
        }
        // Rank test on the scaled factor R̃ = R D⁻¹.
        let diag: Vec<f64> = (0..p).map(|j| (r[j][j] / scale[j]).abs()).collect();
        let max_diag = diag.iter().cloned().fold(0.0, f64::max);
        if diag
            .iter()
            .any(|d| d.is_nan() || *d <= rank_tolerance(n) * max_diag)
        {
            return None;
        }
        // R⁻¹ by columns of back substitution.
        let mut r_inv = [[0.0; 3]; 3];
        for k in 0..p {
            r_inv[k][k] = 1.0 / r[k][k];
            for a in (0..k).rev() {
                let s: f64 = (a + 1..=k).map(|b| r[a][b] * r_inv[b][k]).sum();
                r_inv[a][k] = -s / r[a][a];
            }
        }
        let mut beta = [0.0; 3];
        for a in (0..p).rev() {
            let s: f64 = (a + 1..p).map(|b| r[a][b] * beta[b]).sum();
            beta[a] = (r4[a][3] - s) / r[a][a];
        }
        // Residual norm from the triangle: rows p..3 of Qᵀb.
        let res_norm = (p..4).map(|a| r4[a][3] * r4[a][3]).sum::<f64>().sqrt();
        // Error bound of least_squares, on the scaled factor: ‖R̃‖_F, ‖R̃⁻¹‖_F, x̃ = Dβ.
        let mut r_f = 0.0;
        let mut inv_f = 0.0;
        for a in 0..p {
            for b in a..p {
                r_f += (r[a][b] / scale[b]).powi(2);
                inv_f += (r_inv[a][b] * scale[a]).powi(2);
            }
        }
        let (r_f, inv_f) = (r_f.sqrt(), inv_f.sqrt());
        let kappa = r_f * inv_f;
        let x_norm = (0..p)
            .map(|j| (beta[j] * scale[j]).powi(2))
            .sum::<f64>()
            .sqrt();
        let c = 10.0 * p as f64 * f64::EPSILON;
        let bound = first_order_bound(kappa, r_f, x_norm, res_norm, p);
        let all_finite = beta
            .iter()
            .chain(r_inv.iter().flatten())
            .all(|v| v.is_finite());
        if !all_finite || !kappa.is_finite() {
            return None;
        }
        let refine = refinement_needed(bound);
        if refine && c * kappa * kappa > CSNE_LIMIT {
            return None;
        }
        Some((
            Sub {
                p,
                r_inv,
                beta,
                refined: false,
            },
            refine,
        ))
    }

    /// u = R⁻ᵀ g and δ = R⁻¹ u.
    fn correction(&self, g: &[f64; 3]) -> ([f64; 3], [f64; 3]) {
        let p = self.p;
        let mut u = [0.0; 3];
        for k in 0..p {
            u[k] = (0..=k).map(|a| self.r_inv[a][k] * g[a]).sum();
        }
        let mut d = [0.0; 3];
        for a in 0..p {
            d[a] = (a..p).map(|k| self.r_inv[a][k] * u[k]).sum();
        }
        (u, d)
    }

    /// −β, pre-split for error-free products.
    fn split_neg_beta(&self) -> [(f64, f64, f64); 3] {
        let mut out = [(0.0, 0.0, 0.0); 3];
        for j in 0..self.p {
            let nb = -self.beta[j];
            let (h, l) = split(nb);
            out[j] = (nb, h, l);
        }
        out
    }

    /// (XᵀWX)⁻¹ = R⁻¹R⁻ᵀ in the raw units.
    fn unscaled_covariance(&self) -> DMatrix<f64> {
        let p = self.p;
        DMatrix::from_fn(p, p, |a, b| {
            (a.max(b)..p)
                .map(|k| self.r_inv[a][k] * self.r_inv[b][k])
                .sum()
        })
    }
}

/// A fit made on the streaming path, with what the diagnostics pass needs.
pub(crate) struct FastFit {
    /// Number of used points.
    n: usize,
    fitted: Sub,
    /// χ² of the fitted model.
    pub(crate) rss: f64,
    /// χ² of the other model on the same points, when there are at least 4.
    pub(crate) rss_other: Option<f64>,
    /// Which model `rss_other` belongs to.
    pub(crate) other_model: Option<Model>,
    /// Σw, Σw·y, Σ ln w over the used points.
    pub(crate) sum_w: f64,
    /// Σ ln w (0 unweighted).
    pub(crate) sum_ln_w: f64,
    /// Σ w(y − ȳ_w)².
    pub(crate) tss: f64,
    /// Σ w/T.
    pub(crate) sum_w_inv_t: f64,
    /// Lowest used temperature.
    pub(crate) t_min: f64,
    /// Highest used temperature.
    pub(crate) t_max: f64,
    /// ln(T/θ) of every point ([`logs_of`]) when the fit keeps them, for its own diagnostics
    /// pass; dropped with the fit's solver (the diagnostics asked for later take their
    /// logarithms again).
    pub(crate) logs: Option<Vec<f64>>,
}

impl FastFit {
    /// Number of used points.
    pub(crate) fn n(&self) -> usize {
        self.n
    }

    /// Coefficients of the fitted model.
    pub(crate) fn coefficients(&self) -> Vec<f64> {
        self.fitted.beta[..self.fitted.p].to_vec()
    }

    /// Unscaled covariance of the fitted model.
    pub(crate) fn unscaled_covariance(&self) -> DMatrix<f64> {
        self.fitted.unscaled_covariance()
    }

    /// [`FastFit::try_new_with`] with the second core free (tests).
    #[cfg(test)]
    pub(crate) fn try_new(points: &[Measurement], options: &FitOptions) -> Option<FastFit> {
        Self::try_new_with(points, options, Some(SPLIT_POINTS))
    }

    /// Tries the streaming path; `None` sends the caller to the general path.
    ///
    /// The options must be valid. The first pass checks every point's values as
    /// `vant_hoff::inputs::check_inputs` does (valid values, a plausible temperature unless
    /// extreme ones are allowed, a σ with a normal weight on every used point of a weighted
    /// fit) and returns `None` on any fault; the counts (enough used points and distinct
    /// temperatures) are the caller's to check.
    ///
    /// `split`: `Some(s)`, the points' logarithms are kept (8 bytes a point while the fit
    /// runs) and they and the residual passes are shared with a second thread from `s`
    /// points on; `None` (the other core is busy, with the comparison's χ² say), nothing is
    /// kept and nothing shared: each pass takes its logarithms. The numbers are the same
    /// (tested).
    pub(crate) fn try_new_with(
        points: &[Measurement],
        options: &FitOptions,
        split: Option<usize>,
    ) -> Option<FastFit> {
        if !options.model.streams() {
            return None;
        }
        let weighted = options.weighting == Weighting::InverseVariance;
        let theta = options.t_ref_k;
        // Used points (their rows are formed again by each later pass, not kept).
        let mut n = 0usize;
        let mut r4 = [[0.0f64; 4]; 4];
        let mut block = [[0.0f64; BLOCK]; 4];
        let mut m = 0;
        let mut sumsq = [0.0f64; 4];
        let mut max_abs = [0.0f64; 4];
        let (mut sum_w, mut sum_wy, mut sum_w_inv_t) = (0.0, 0.0, 0.0);
        let mut log_w = LogSum::default();
        let mut t_min = f64::INFINITY;
        let mut t_max = f64::NEG_INFINITY;
        // The checks of `check_inputs` on every point's values, made on the way: any fault
        // and the fit goes the general way, whose `check_inputs` names the first.
        let plausible = !options.allow_extreme_temperatures;
        let mut values_pass = true;
        let logs = split.map(|s| logs_of(points, theta, s));
        for (i, pt) in points.iter().enumerate() {
            values_pass &= pt.is_valid() & (!plausible | is_plausible_temperature(pt.t_k));
            if !pt.included {
                continue;
            }
            let l = log_at(logs.as_deref(), i, pt, theta);
            let (row, w) = Row::of(pt, l, theta, weighted)?;
            // The weight 1/σ² normal (`check_inputs`' test, on the same expression).
            values_pass &= !weighted | w.is_normal();
            n += 1;
            let t = pt.t_k;
            t_min = t_min.min(t);
            t_max = t_max.max(t);
            sum_w += w;
            sum_wy += w * pt.ln_k;
            if weighted {
                log_w.add(w);
            }
            sum_w_inv_t += w / t;
            let (a, b) = row.weighted();
            let vals = [a[0], a[1], a[2], b];
            for j in 0..4 {
                block[j][m] = vals[j];
                sumsq[j] += vals[j] * vals[j];
                max_abs[j] = max_abs[j].max(vals[j].abs());
            }
            m += 1;
            if m == BLOCK {
                absorb(&mut r4, &mut block, m);
                m = 0;
            }
        }
        if !values_pass {
            return None;
        }
        if m > 0 {
            absorb(&mut r4, &mut block, m);
        }
        let sum_ln_w = log_w.total();
        let p = options.model.n_params();
        // Keep to numbers whose squares and sums of squares are safely representable;
        // anything else goes the general way (which scales before squaring).
        for j in 0..4 {
            let big = max_abs[j];
            if !(sumsq[j].is_finite() && big < 1e100 && (big > 1e-100 || j == 3)) {
                return None;
            }
        }
        if r4.iter().flatten().any(|v| !v.is_finite()) {
            return None;
        }
        let mut scale = [1.0; 3];
        for j in 0..3 {
            scale[j] = power_of_two_near(sumsq[j].sqrt())?;
        }
        // The streaming design is the constant-ΔCp° one; the linear model is its leading
        // two columns, and the comparison takes the other of the pair.
        let other_model = if p == Model::LINEAR.n_params() {
            Model::CONSTANT_CP
        } else {
            Model::LINEAR
        };
        let (fitted, refine_fitted) = Sub::new(&r4, p, &scale, n)?;
        let mut tracks = vec![Track::new(fitted, refine_fitted, &scale)];
        if n >= 4 {
            let (o, r) = Sub::new(&r4, other_model.n_params(), &scale, n)?;
            tracks.push(Track::new(o, r, &scale));
        }
        let mean = sum_wy / sum_w;
        let rows = Rows {
            points,
            logs: logs.as_deref(),
            theta,
            weighted,
            n,
            split_blocks: split.map_or(usize::MAX, |s| s / BLOCK),
        };
        let tss = residual_passes(&rows, &mut tracks, &scale, mean)?;
        let mut tracks = tracks.into_iter();
        let first = tracks.next()?;
        let (fitted, rss) = (first.sub, first.rss);
        let rss_other = tracks.next().map(|t| t.rss);
        Some(FastFit {
            n,
            fitted,
            rss,
            rss_other,
            other_model: rss_other.map(|_| other_model),
            sum_w,
            sum_ln_w,
            tss,
            sum_w_inv_t,
            t_min,
            t_max,
            logs,
        })
    }
}

/// Points per group in the diagnostics pass.
const GROUP: usize = 64;

/// Scratch arrays of one group of points in the diagnostics pass.
struct Group {
    used: [bool; GROUP],
    inv_w: [f64; GROUP],
    quad: [f64; GROUP],
    h: [f64; GROUP],
    e: [f64; GROUP],
    fitted: [f64; GROUP],
    rw: [f64; GROUP],
    pse: [f64; GROUP],
    omh: [f64; GROUP],
    t_int: [f64; GROUP],
    cook: [f64; GROUP],
    s2_i: [f64; GROUP],
    t_ext: [f64; GROUP],
    dffits: [f64; GROUP],
}

impl Default for Group {
    fn default() -> Self {
        let z = [0.0; GROUP];
        Group {
            used: [false; GROUP],
            inv_w: z,
            quad: z,
            h: z,
            e: z,
            fitted: z,
            rw: z,
            pse: z,
            omh: z,
            t_int: z,
            cook: z,
            s2_i: z,
            t_ext: z,
            dffits: z,
        }
    }
}

/// One model through the residual passes.
struct Track {
    sub: Sub,
    /// Whether the first-order bound asks for refinement.
    refine: bool,
    /// Finished: `rss` holds χ² at the final coefficients.
    done: bool,
    /// Size of the last correction (initially of the solution), scaled units.
    previous: f64,
    rss: f64,
    /// Σs² and g = Aᵀs of the current pass.
    ss: f64,
    g: [f64; 3],
    split: [(f64, f64, f64); 3],
}

impl Track {
    fn new(mut sub: Sub, refine: bool, scale: &[f64; 3]) -> Self {
        sub.refined = refine;
        let previous = amax(&sub.beta, sub.p, scale);
        let split = sub.split_neg_beta();
        Track {
            sub,
            refine,
            done: false,
            previous,
            rss: 0.0,
            ss: 0.0,
            g: [0.0; 3],
            split,
        }
    }
}

mod diagnose;
mod passes;

pub(crate) use diagnose::OnDemand;

use passes::{amax, residual_passes, Rows};

#[cfg(test)]
mod tests;
