//! The per-point diagnostics pass of the streaming path: points in groups, the cheap sums
//! first, then the studentized residuals, Cook's distance and DFFITS as plain loops.

use super::*;

impl FastFit {
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
