//! The streaming path of a van 't Hoff fit, for data that need no special care.
//!
//! Both models share their first two design columns, −1/(RT) and 1/R, so one Householder QR
//! of the augmented matrix `W^{1/2} [c₀ c₁ c₂ y]` yields, in its leading blocks, the
//! triangular factor and `Qᵀb` of the linear model and of the constant-ΔCp° model at once
//! (a reflection for column j touches only rows ≥ j). The QR is built while the points are
//! read, a block of rows at a time: the 4×4 triangle so far is stacked on the next block
//! and four Householder reflections reduce the stack back to a triangle (tall-skinny QR).
//! No n×p matrix, no Q and no normal equations are formed; each used point is kept as four
//! numbers (1/T-column, ΔCp°-column, √w, ln K) for the later passes.
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
//! errors never reach this path: the one validation both paths share
//! ([`crate::vant_hoff::check_inputs`]) reports them first. The refinement settings (error
//! bound, threshold, step limit, power-of-two scaling) are those of `least_squares`.
//!
//! Passes over the data: one to read and factorise; one per refinement step
//! (usually none or one, both models together); one for the residual sums of squares of
//! both models; one to write the per-point diagnostics.

// Indexing by row and column is the clearest way to write 3×3 and 4×4 triangular algebra.
#![allow(clippy::needless_range_loop)]

use crate::diagnostics::{diagnose_one, DiagnosticsSummary, Flags, PointContext, PointDiagnostics};
use crate::least_squares::{
    first_order_bound, power_of_two_near, rank_tolerance, refinement_needed, split, two_prod_split,
    two_sum, MAX_REFINEMENT_STEPS,
};
use crate::measurement::Measurement;
use crate::model::{FitOptions, Model, Weighting};
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
    /// The weighted row (√w·c₀, √w·c₁, √w·c₂) and √w·y, formed as the general path forms them.
    #[inline]
    fn weighted(&self) -> ([f64; 3], f64) {
        (
            [self.c0 * self.sw, C1 * self.sw, self.c2 * self.sw],
            self.y * self.sw,
        )
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
    rows: Vec<Row>,
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
}

impl FastFit {
    /// Number of used points.
    pub(crate) fn n(&self) -> usize {
        self.rows.len()
    }

    /// Coefficients of the fitted model.
    pub(crate) fn coefficients(&self) -> Vec<f64> {
        self.fitted.beta[..self.fitted.p].to_vec()
    }

    /// Unscaled covariance of the fitted model.
    pub(crate) fn unscaled_covariance(&self) -> DMatrix<f64> {
        self.fitted.unscaled_covariance()
    }

    /// Tries the streaming path; `None` sends the caller to the general path.
    ///
    /// The points and options must have passed [`crate::vant_hoff::check_inputs`], the one
    /// validation both paths share (valid values and options, enough used points and
    /// distinct temperatures, a σ with a normal weight on every used point of a weighted
    /// fit); this path repeats none of it.
    pub(crate) fn try_new(points: &[Measurement], options: &FitOptions) -> Option<FastFit> {
        if !options.model.streams() {
            return None;
        }
        let weighted = options.weighting == Weighting::InverseVariance;
        let theta = options.t_ref_k;
        let mut rows = Vec::with_capacity(points.len());
        let mut r4 = [[0.0f64; 4]; 4];
        let mut block = [[0.0f64; BLOCK]; 4];
        let mut m = 0;
        let mut sumsq = [0.0f64; 4];
        let mut max_abs = [0.0f64; 4];
        let (mut sum_w, mut sum_wy, mut sum_w_inv_t) = (0.0, 0.0, 0.0);
        let mut log_w = LogSum::default();
        let mut t_min = f64::INFINITY;
        let mut t_max = f64::NEG_INFINITY;
        for pt in points {
            if !pt.included {
                continue;
            }
            let (w, sw) = if weighted {
                let s = pt.sigma_ln_k?;
                let w = 1.0 / (s * s);
                (w, w.sqrt())
            } else {
                (1.0, 1.0)
            };
            let mut x = [0.0; 3];
            Model::CONSTANT_CP.row_into(pt.t_k, theta, &mut x);
            debug_assert_eq!(x[1], C1);
            let row = Row {
                c0: x[0],
                c2: x[2],
                sw,
                y: pt.ln_k,
            };
            rows.push(row);
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
        if m > 0 {
            absorb(&mut r4, &mut block, m);
        }
        let n = rows.len();
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
        let tss = residual_passes(&rows, &mut tracks, &scale, mean)?;
        let mut tracks = tracks.into_iter();
        let first = tracks.next()?;
        let (fitted, rss) = (first.sub, first.rss);
        let rss_other = tracks.next().map(|t| t.rss);
        Some(FastFit {
            rows,
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
        })
    }

    /// Per-point diagnostics in input order, with what the warnings need from them.
    ///
    /// Points go through in groups of [`GROUP`]: the cheap per-point sums first, then the
    /// square roots and divisions of the studentized residuals, Cook's distance and DFFITS
    /// as plain loops over arrays (so they pipeline and vectorise), then the records. The
    /// arithmetic is that of [`diagnose_one`], which excluded points still take.
    pub(crate) fn diagnose(
        &self,
        points: &[Measurement],
        options: &FitOptions,
        ctx: &PointContext,
    ) -> (Vec<PointDiagnostics>, DiagnosticsSummary) {
        let sub = &self.fitted;
        let p = sub.p;
        let pf = p as f64;
        let beta = sub.beta;
        let ri = &sub.r_inv;
        let theta = options.t_ref_k;
        let mut used_rows = self.rows.iter();
        let mut out = Vec::with_capacity(points.len());
        let mut summary = DiagnosticsSummary::default();
        let stats_defined = ctx.dof >= 1.0 && ctx.s2 > 0.0;
        let dof_s2 = ctx.dof * ctx.s2;
        let mut g = Group::default();
        for (start, chunk) in points.chunks(GROUP).enumerate() {
            let start = start * GROUP;
            // Per-point sums.
            for (k, m) in chunk.iter().enumerate() {
                let row = if m.included { used_rows.next() } else { None };
                let Some(row) = row else {
                    g.used[k] = false;
                    continue;
                };
                g.used[k] = true;
                let x = [row.c0, C1, row.c2];
                let fitted: f64 = (0..p).map(|j| x[j] * beta[j]).sum();
                let e = m.ln_k - fitted;
                // hᵢ = ‖R⁻ᵀ aᵢ‖² with aᵢ the weighted row (R⁻¹ upper triangular).
                let (a, _) = row.weighted();
                let s0 = ri[0][0] * a[0];
                let s1 = ri[0][1] * a[0] + ri[1][1] * a[1];
                let mut h = s0 * s0 + s1 * s1;
                if p == 3 {
                    let s2 = ri[0][2] * a[0] + ri[1][2] * a[1] + ri[2][2] * a[2];
                    h += s2 * s2;
                }
                let sigma = if ctx.weighted { m.sigma_ln_k } else { None };
                g.inv_w[k] = sigma.map_or(ctx.typical_inv_w, |s| s * s);
                g.quad[k] = crate::diagnostics::quadratic(&ctx.cov, &x, p);
                g.h[k] = h.min(1.0);
                g.e[k] = e;
                g.fitted[k] = fitted;
                g.rw[k] = row.sw * e;
            }
            // Roots and quotients, branch-free over the group.
            let len = chunk.len();
            for k in 0..len {
                g.pse[k] = (ctx.variance_scale * g.inv_w[k] + g.quad[k]).sqrt();
                let omh = 1.0 - g.h[k];
                g.omh[k] = omh;
                let rq = g.rw[k] / omh.sqrt();
                let t_int = rq * ctx.inv_s;
                g.t_int[k] = t_int;
                g.cook[k] = t_int * t_int * g.h[k] / (pf * omh);
                let s2_i = (dof_s2 - rq * rq) * ctx.inv_dof_less_one;
                g.s2_i[k] = s2_i;
                let t_ext = rq / s2_i.sqrt();
                g.t_ext[k] = t_ext;
                g.dffits[k] = t_ext * (g.h[k] / omh).sqrt();
            }
            // Records, written straight into the output.
            out.extend(chunk.iter().enumerate().map(|(k, m)| {
                let i = start + k;
                let d = if g.used[k] {
                    let good = |v: f64| v.is_finite().then_some(v);
                    let h = g.h[k];
                    let mut d = PointDiagnostics {
                        index: i,
                        t_k: m.t_k,
                        ln_k: m.ln_k,
                        sigma_ln_k: if ctx.weighted { m.sigma_ln_k } else { None },
                        used: true,
                        fitted: g.fitted[k],
                        residual: g.e[k],
                        weighted_residual: g.rw[k],
                        leverage: h,
                        student_int: None,
                        student_ext: None,
                        cooks_d: None,
                        dffits: None,
                        prediction_se: g.pse[k],
                        prediction_residual: None,
                        flags: Flags::default(),
                    };
                    if stats_defined && g.omh[k] > 1e-10 {
                        d.student_int = good(g.t_int[k]);
                        d.cooks_d = good(g.cook[k]);
                        if ctx.dof >= 2.0 && g.s2_i[k] > 0.0 {
                            d.student_ext = good(g.t_ext[k]);
                            d.dffits = good(g.dffits[k]);
                        }
                    }
                    d.flags.outlier = d.student_ext.is_some_and(|t| t.abs() > ctx.outlier);
                    d.flags.high_leverage = h > ctx.leverage_limit;
                    d.flags.influential = d.cooks_d.is_some_and(|c| c > ctx.cooks_limit);
                    d
                } else {
                    diagnose_one(ctx, i, m, &options.model.row(m.t_k, theta), None)
                };
                summary.note(&d);
                d
            }));
        }
        (out, summary)
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

/// max |βⱼ Dⱼ| over the first p entries (the size in scaled units).
fn amax(v: &[f64; 3], p: usize, scale: &[f64; 3]) -> f64 {
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
fn residual_passes(rows: &[Row], tracks: &mut [Track], scale: &[f64; 3], mean: f64) -> Option<f64> {
    let mut tss = 0.0;
    for step in 0..=MAX_REFINEMENT_STEPS {
        for t in tracks.iter_mut() {
            t.ss = 0.0;
            t.g = [0.0; 3];
        }
        let mut cols = [[0.0f64; BLOCK]; 4];
        let mut res = [0.0f64; BLOCK];
        for chunk in rows.chunks(BLOCK) {
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::least_squares::{solve, weighted_rss};
    use crate::model::SigmaConvention;
    use crate::vant_hoff::design;

    /// Curved, noisy, unequally weighted data with one excluded point (invented).
    fn data(n: usize) -> Vec<Measurement> {
        let mut u = 0.25f64;
        (0..n)
            .map(|i| {
                u = (u + 0.618_033_988_749_894_9) % 1.0;
                let t = 278.15 + 60.0 * (i as f64 + u) / n as f64;
                let x = Model::CONSTANT_CP.row(t, 298.15);
                let sigma = 0.02 + 0.06 * u;
                let m = Measurement::new(
                    t,
                    x[0] * -45e3 + x[1] * -60.0 + x[2] * -600.0 + sigma * (u - 0.5) * 3.0,
                )
                .with_sigma(sigma);
                if i == 3 {
                    m.excluded()
                } else {
                    m
                }
            })
            .collect()
    }

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs().max(1e-300)
    }

    #[test]
    fn streaming_path_agrees_with_the_general_solver() {
        // The general Householder solver (nalgebra QR with augmented-system refinement) is
        // the reference; both are least squares, so they agree to rounding.
        for n in [6usize, 50, 3000] {
            let pts = data(n);
            for model in [Model::LINEAR, Model::CONSTANT_CP] {
                for weighting in [Weighting::InverseVariance, Weighting::Unweighted] {
                    let opts = FitOptions {
                        model,
                        weighting,
                        ..FitOptions::default()
                    };
                    let fast = FastFit::try_new(&pts, &opts).expect("streaming path taken");
                    let used: Vec<usize> = (0..n).filter(|&i| pts[i].included).collect();
                    let y: Vec<f64> = used.iter().map(|&i| pts[i].ln_k).collect();
                    let w: Option<Vec<f64>> =
                        (weighting == Weighting::InverseVariance).then(|| {
                            used.iter()
                                .map(|&i| 1.0 / pts[i].sigma_ln_k.unwrap().powi(2))
                                .collect()
                        });
                    let x = design(&pts, &used, model, 298.15);
                    let general = solve(&x, &y, w.as_deref()).unwrap();
                    for (a, b) in fast.coefficients().iter().zip(&general.coefficients) {
                        assert!(rel(*a, *b) < 1e-10, "n={n} {model:?}: {a} vs {b}");
                    }
                    assert!(rel(fast.rss, general.rss) < 1e-10);
                    let uc = fast.unscaled_covariance();
                    for (a, b) in uc.iter().zip(general.unscaled_covariance.iter()) {
                        assert!(rel(*a, *b) < 1e-9, "{a} vs {b}");
                    }
                    let other = if model == Model::LINEAR {
                        Model::CONSTANT_CP
                    } else {
                        Model::LINEAR
                    };
                    let xo = design(&pts, &used, other, 298.15);
                    let rss_o = weighted_rss(&xo, &y, w.as_deref()).unwrap();
                    assert!(rel(fast.rss_other.unwrap(), rss_o) < 1e-10);
                    // Leverages through the full fit.
                    let f = crate::fit(&pts, &opts).unwrap();
                    let lev: Vec<f64> = f
                        .points
                        .iter()
                        .filter(|d| d.used)
                        .map(|d| d.leverage)
                        .collect();
                    for (a, b) in lev.iter().zip(&general.leverages) {
                        assert!((a - b).abs() < 1e-12, "{a} vs {b}");
                    }
                }
            }
        }
    }

    #[test]
    fn every_output_agrees_with_the_general_path() {
        // The whole fit, diagnostics and comparison included, through both engines.
        let close = |a: f64, b: f64| (a - b).abs() <= 1e-9 * b.abs().max(1e-6);
        let opt_close = |a: Option<f64>, b: Option<f64>| match (a, b) {
            (Some(a), Some(b)) => close(a, b),
            (None, None) => true,
            _ => false,
        };
        for n in [5usize, 40, 2000] {
            let mut pts = data(n);
            pts[1].ln_k += 0.5; // an outlier, so flags are exercised
            for model in [Model::LINEAR, Model::CONSTANT_CP] {
                for weighting in [Weighting::InverseVariance, Weighting::Unweighted] {
                    for convention in [SigmaConvention::ScaledByFit, SigmaConvention::Absolute] {
                        let opts = FitOptions {
                            model,
                            weighting,
                            convention,
                            ..FitOptions::default()
                        };
                        assert!(FastFit::try_new(&pts, &opts).is_some());
                        let a = crate::vant_hoff::fit_with(&pts, &opts, true).unwrap();
                        let b = crate::vant_hoff::fit_with(&pts, &opts, false).unwrap();
                        for (x, y) in a.params.iter().zip(&b.params) {
                            assert!(close(x.estimate.value, y.estimate.value));
                            assert!(close(x.estimate.se, y.estimate.se));
                        }
                        assert!(close(a.stats.chi2, b.stats.chi2));
                        assert!(close(a.stats.r2, b.stats.r2));
                        assert!(close(a.stats.log_likelihood, b.stats.log_likelihood));
                        let (ca, cb) = (a.comparison.unwrap(), b.comparison.unwrap());
                        assert!(close(ca.f_statistic, cb.f_statistic), "{ca:?} {cb:?}");
                        assert_eq!(ca.preferred, cb.preferred);
                        assert_eq!(a.warnings.len(), b.warnings.len());
                        for (x, y) in a.points.iter().zip(&b.points) {
                            assert_eq!((x.index, x.used, x.flags), (y.index, y.used, y.flags));
                            for (u, v) in [
                                (x.fitted, y.fitted),
                                (x.residual, y.residual),
                                (x.weighted_residual, y.weighted_residual),
                                (x.leverage, y.leverage),
                                (x.prediction_se, y.prediction_se),
                            ] {
                                assert!(close(u, v), "n={n} point {}: {u} vs {v}", x.index);
                            }
                            for (u, v) in [
                                (x.student_int, y.student_int),
                                (x.student_ext, y.student_ext),
                                (x.cooks_d, y.cooks_d),
                                (x.dffits, y.dffits),
                                (x.prediction_residual, y.prediction_residual),
                            ] {
                                assert!(opt_close(u, v), "n={n} point {}: {u:?} vs {v:?}", x.index);
                            }
                        }
                    }
                }
            }
        }
    }

    #[test]
    fn hard_cases_take_the_general_path() {
        let pts = data(20);
        let opts = FitOptions::default();
        // Two temperatures only: the ΔCp° column of the comparison is dependent.
        let two: Vec<Measurement> = pts
            .iter()
            .enumerate()
            .map(|(i, m)| Measurement {
                t_k: if i % 2 == 0 { 290.0 } else { 300.0 },
                ..*m
            })
            .collect();
        assert!(FastFit::try_new(&two, &opts).is_none());
        // Two temperatures leave the linear model no error estimate from the scatter …
        assert!(matches!(
            crate::fit(&two, &opts),
            Err(crate::Error::TooFewTemperatures { distinct: 2, .. })
        ));
        // … but with absolute σ it is fitted, and the ΔCp° comparison is left out.
        let absolute = FitOptions {
            convention: crate::SigmaConvention::Absolute,
            ..opts
        };
        assert!(crate::fit(&two, &absolute).unwrap().comparison.is_none());
        // A missing σ and a bad level are reported by the one validation before either path.
        let mut missing = pts.clone();
        missing[5].sigma_ln_k = None;
        assert_eq!(
            crate::fit(&missing, &opts).unwrap_err(),
            crate::Error::MissingSigma { index: 5 }
        );
        let bad = FitOptions { level: 2.0, ..opts };
        assert_eq!(
            crate::fit(&pts, &bad).unwrap_err(),
            crate::Error::InvalidLevel(2.0)
        );
    }
}
