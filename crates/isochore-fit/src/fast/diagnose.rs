//! The per-point diagnostics of the streaming path, computed on demand.
//!
//! A fit on the streaming path keeps no record per point: [`OnDemand`] holds the points it
//! was fitted to (another reference to the caller's when they are shared, see
//! [`crate::fit_shared`]; a copy otherwise) and the few numbers every point's diagnostics
//! share (the coefficients, R⁻¹, the [`PointContext`]). A point's [`PointDiagnostics`] are
//! computed from them when asked for, with the arithmetic of [`diagnose_one`] and of the fit
//! itself (the design row from the temperature, √w from σ as the read pass forms them), so
//! they are the same numbers, bit for bit, as records written once at the fit. A million
//! shared points then cost nothing beside the caller's, instead of 168 MB of records.
//!
//! Points go through in groups of [`GROUP`]: the cheap per-point sums first, then the
//! square roots and divisions of the studentized residuals, Cook's distance and DFFITS as
//! plain loops over arrays (so they pipeline and vectorise), then the records. Every
//! number of a point depends on that point only, so a group of one gives the same bits.

use super::*;
use std::sync::Arc;

/// The diagnostics of a streaming fit, computed from the points it was fitted to.
#[derive(Debug, Clone)]
pub(crate) struct OnDemand {
    /// Every point as the fit was given it (shared with the caller or copied).
    points: Arc<Vec<Measurement>>,
    ctx: PointContext,
    beta: [f64; 3],
    r_inv: [[f64; 3]; 3],
    p: usize,
    theta: f64,
    model: Model,
    /// Weights 1/σ² were applied (√w then comes from σ; 1 otherwise).
    weighted: bool,
}

impl OnDemand {
    /// The on-demand diagnostics of `fit`, made of `points`.
    pub(crate) fn new(
        fit: &FastFit,
        points: Arc<Vec<Measurement>>,
        options: &FitOptions,
        ctx: PointContext,
    ) -> OnDemand {
        OnDemand {
            points,
            ctx,
            beta: fit.fitted.beta,
            r_inv: fit.fitted.r_inv,
            p: fit.fitted.p,
            theta: options.t_ref_k,
            model: options.model,
            weighted: options.weighting == Weighting::InverseVariance,
        }
    }

    /// Number of points (used and excluded).
    pub(crate) fn len(&self) -> usize {
        self.points.len()
    }

    /// Diagnostics of point `i`, if there is one.
    pub(crate) fn point(&self, i: usize) -> Option<PointDiagnostics> {
        if i >= self.len() {
            return None;
        }
        let mut g = Group::default();
        let mut out = None;
        self.group(i, 1, None, &mut g, &mut |d| out = Some(d));
        out
    }

    /// Calls `f` with the diagnostics of every point in `range`, in order.
    pub(crate) fn for_each(
        &self,
        range: std::ops::Range<usize>,
        f: &mut dyn FnMut(PointDiagnostics),
    ) {
        self.for_each_with(range, None, f);
    }

    /// [`OnDemand::for_each`], with every point's ln(T/θ) ([`logs_of`]) given or not; `f`
    /// is generic, so that a caller that reads a few fields of each record (the fit's
    /// summary pass) gets them without the others being made.
    fn for_each_with<F: FnMut(PointDiagnostics) + ?Sized>(
        &self,
        range: std::ops::Range<usize>,
        logs: Option<&[f64]>,
        f: &mut F,
    ) {
        let end = range.end.min(self.len());
        let mut g = Group::default();
        let mut start = range.start;
        while start < end {
            let len = GROUP.min(end - start);
            self.group(start, len, logs, &mut g, f);
            start += len;
        }
    }

    /// The diagnostics of points `start..start + len` (`len` ≤ [`GROUP`]) into `f`, with
    /// every point's ln(T/θ) from `logs` when given (else taken here, the same number).
    fn group<F: FnMut(PointDiagnostics) + ?Sized>(
        &self,
        start: usize,
        len: usize,
        logs: Option<&[f64]>,
        g: &mut Group,
        f: &mut F,
    ) {
        let ctx = &self.ctx;
        let p = self.p;
        let pf = p as f64;
        let beta = self.beta;
        let ri = &self.r_inv;
        let theta = self.theta;
        let stats_defined = ctx.dof >= 1.0 && ctx.s2 > 0.0;
        let dof_s2 = ctx.dof * ctx.s2;
        let ms = &self.points[start..start + len];
        // Per-point sums.
        for (k, m) in ms.iter().enumerate() {
            if !m.included {
                g.used[k] = false;
                continue;
            }
            g.used[k] = true;
            // The design row and √w as every pass of the fit forms them.
            let l = log_at(logs, start + k, m, theta);
            let Some((row, _)) = Row::of(m, l, theta, self.weighted) else {
                g.used[k] = false;
                continue;
            };
            let sw = row.sw;
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
            g.rw[k] = sw * e;
        }
        // Roots and quotients, branch-free over the group.
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
        // Records.
        for (k, m) in ms.iter().enumerate() {
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
                diagnose_one(ctx, i, m, &self.model.row(m.t_k, theta), None)
            };
            f(d);
        }
    }
}

impl FastFit {
    /// The on-demand diagnostics of this fit, made of `points` (those it was fitted to), with what the warnings need from them and the indices of the points
    /// carrying any flag, gathered in one pass that keeps no record. With `split`, the
    /// second half of the points is taken by a second thread (when one can be started):
    /// every point's numbers depend on that point only and the halves' summaries combine
    /// exactly ([`DiagnosticsSummary::then`]), so the results are the same.
    pub(crate) fn diagnose(
        &self,
        points: Arc<Vec<Measurement>>,
        options: &FitOptions,
        ctx: PointContext,
        split: bool,
    ) -> (OnDemand, DiagnosticsSummary, Vec<usize>) {
        let od = OnDemand::new(self, points, options, ctx);
        let pass = |range: std::ops::Range<usize>| {
            let mut summary = DiagnosticsSummary::default();
            let mut flagged = Vec::new();
            od.for_each_with(range, self.logs.as_deref(), &mut |d| {
                summary.note(&d);
                if d.flags.any() {
                    flagged.push(d.index);
                }
            });
            (summary, flagged)
        };
        let n = od.len();
        let (summary, flagged) = if split && n >= 2 * GROUP {
            let mid = n / 2;
            std::thread::scope(|scope| {
                let later = std::thread::Builder::new()
                    .name("isochore-diagnostics".into())
                    .spawn_scoped(scope, || pass(mid..n));
                let (first, mut flagged) = pass(0..mid);
                let (second, more) = match later {
                    Ok(h) => h.join().unwrap_or_else(|e| std::panic::resume_unwind(e)),
                    Err(_) => pass(mid..n),
                };
                flagged.extend(more);
                (first.then(second), flagged)
            })
        } else {
            pass(0..n)
        };
        (od, summary, flagged)
    }
}
