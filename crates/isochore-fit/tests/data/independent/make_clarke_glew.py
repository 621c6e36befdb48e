"""Independent reference values for tests/clarke_glew.rs and tests/extension.rs (isochore-fit),
computed with statsmodels / numpy / scipy rather than with Isochore's own formulas.

Clarke–Glew (ΔCp° linear in T) is fitted here in the basis 1, 1/T, ln T, T:
    ln K = a + b/T + c ln T + d T
so that, by differentiating (van 't Hoff, Gibbs–Helmholtz):
    ΔH°(T)  = R T² d(ln K)/dT = R (−b + c T + d T²)
    ΔCp°(T) = dΔH°/dT        = R (c + 2 d T)
    dΔCp°/dT                 = 2 R d
    ΔS°(T)  = ΔH°/T + R ln K  = R (a + c + c ln T + 2 d T)
Each is linear in (a, b, c, d), so its standard error is the exact delta method g·Cov·gᵀ on
the statsmodels covariance. The constant-ΔCp° model is the same with d = 0 and the linear
model with c = d = 0. The library's own basis is (ΔH°(θ), ΔS°(θ), ΔCp°(θ), dΔCp°/dT).

Model comparison, per ladder step (linear ⊂ constant ΔCp° ⊂ Clarke–Glew):
    F, p, dof: RegressionResults.compare_f_test(smaller)
    AICc: statsmodels.tools.eval_measures.aicc(llf, nobs, k) with k = p + 1 (the p
          coefficients and the variance σ², as in src/vant_hoff/statistics.rs);
    ΔAICc = AICc(larger) − AICc(smaller).

The extension toy model (tests/extension.rs) has ΔH°(T) = ΔH°(θ) + A ((T − θ)/τ)³ with
τ = 10 K; its ln K column for A is computed here by numerical quadrature of the van 't Hoff
equation, (1/R) ∫_θ^T ((u − θ)/τ)³ / u² du (scipy.integrate.quad), not by the closed form the
test file writes, and fitted in the basis 1, 1/T, that column.

In the raw basis 1, 1/T, ln T, T the problem is so ill conditioned that statsmodels' Clarke–Glew
estimates are good to only about 3e-9; the fits are therefore done in the scaled basis 1, 1/τ, ln τ, τ with
τ = T/θ (the same column space) and mapped back, and every estimate and SE is checked against
a 60-digit mpmath solve of the raw basis (mpmath 1.3.0); they agree to 1.3e-10 or better. The
per-point diagnostics (leverage, studentized residuals, Cook's distance) depend on the column
space only; statsmodels' OLSInfluence computes them from an orthonormal basis of it (numpy's
Householder QR of the scaled design) to 1.2e-10 of the 60-digit values, where on the design
itself it is good to only 7.5e-8.

Run:  python3 make_clarke_glew.py > clarke_glew.txt
      (needs numpy, scipy, statsmodels, iapws, mpmath)
"""

import sys

import iapws
import mpmath as mp
import numpy as np
import scipy
import statsmodels
import statsmodels.api as sm
from iapws import IAPWS95
from iapws._iapws import _Kw
from scipy import integrate, stats
from statsmodels.stats.outliers_influence import OLSInfluence
from statsmodels.tools.eval_measures import aicc

R = 8.314462618  # J/(mol K), CODATA 2018 (the digits the library uses)
LN10 = np.log(10.0)
THETA = 298.15
HERE = __file__.rsplit("/", 1)[0] if "/" in __file__ else "."

# ADA, N-(2-acetamido)iminodiacetic acid, reaction (3) HL⁻ = H⁺ + L²⁻ at I = 0: pK at twelve
# temperatures, as tabulated in R. N. Goldberg, N. Kishore and R. M. Lennen, "Thermodynamic
# quantities for the ionization reactions of buffers", J. Phys. Chem. Ref. Data 31 (2002)
# 231–370, ADA entry, table "Values from literature" (continued), p. 242, from the
# electrochemical-cell (no liquid junction) study the compilation cites as 81ROY/GIB.
# The same page lists for that study, adjusted to 298.15 K and I = 0: pK = 6.844,
# ΔrH° = 12.23 kJ/mol, ΔrCp° = −144 J K⁻¹ mol⁻¹ (calculated, it says, from the temperature
# dependence of the pKs); the sign of ΔrCp° is lost in the stored text we read and is
# negative by the pKs themselves (the constant-ΔCp° fit below gives −144.4).
ADA_T_K = [278.15, 283.15, 288.15, 293.15, 298.15, 303.15,
           308.15, 310.15, 313.15, 318.15, 323.15, 328.15]
ADA_PK = [7.011, 6.968, 6.924, 6.884, 6.844, 6.796,
          6.780, 6.763, 6.749, 6.723, 6.704, 6.678]


def out(name, *values):
    print(name + " " + " ".join(f"{v:.17g}" for v in values))


def thermo_rows(t, n):
    """Rows g with quantity = g·β in the basis (a, b, c, d)[:n]."""
    dh = np.array([0.0, -R, R * t, R * t * t])[:n]
    ds = np.array([R, 0.0, R * (1.0 + np.log(t)), 2.0 * R * t])[:n]
    dcp = np.array([0.0, 0.0, R, 2.0 * R * t])[:n]
    slope = np.array([0.0, 0.0, 0.0, 2.0 * R])[:n]
    return dh, ds, dcp, slope


def design(t, n):
    """Columns 1, 1/τ, ln τ, τ with τ = T/θ: the same column space as 1, 1/T, ln T, T, but
    scaled so that the normal equations are well conditioned."""
    tau = t / THETA
    cols = [np.ones_like(t), 1.0 / tau, np.log(tau), tau][:n]
    return np.column_stack(cols)


# β_raw = UNSCALE · β_τ maps the coefficients of 1, 1/τ, ln τ, τ to those of 1, 1/T, ln T, T:
# b/τ = (bθ)/T, c ln τ = c ln T − c ln θ, d τ = (d/θ) T.
UNSCALE = np.array([
    [1.0, 0.0, -np.log(THETA), 0.0],
    [0.0, THETA, 0.0, 0.0],
    [0.0, 0.0, 1.0, 0.0],
    [0.0, 0.0, 0.0, 1.0 / THETA],
])


def exact_check(t, ln_k, n, rows, est, se, ssr, infl):
    """The same least squares in 60-digit arithmetic (mpmath normal equations on the raw basis
    1, 1/T, ln T, T, from the same float inputs): the statsmodels estimates, SEs and residual
    sum of squares must agree to 5e-10 relative (the largest difference is printed at the end
    of the output; the tests compare at 1e-9)."""
    mp.mp.dps = 60
    x = mp.matrix([[mp.mpf(1), 1 / mp.mpf(ti), mp.log(mp.mpf(ti)), mp.mpf(ti)][:n] for ti in t])
    y = mp.matrix([mp.mpf(v) for v in ln_k])
    xtx = x.T * x
    beta = mp.lu_solve(xtx, x.T * y)
    res = y - x * beta
    ssr_mp = sum(r**2 for r in res)
    s2 = ssr_mp / (len(t) - n)
    cov = mp.inverse(xtx) * s2
    worst = abs(float((ssr - ssr_mp) / ssr_mp))
    for g, e, s in zip(rows, est, se):
        gm = mp.matrix([[mp.mpf(v) for v in g]])
        e_mp = (gm * beta)[0]
        s_mp = mp.sqrt((gm * cov * gm.T)[0])
        worst = max(worst, abs(float((e - e_mp) / e_mp)), abs(float((s - s_mp) / s_mp)))
    assert worst < 5e-10, worst
    CHECKS.append(worst)
    diag_check(x, y, infl)


def diag_check(x, y, infl):
    """The per-point diagnostics in 60-digit arithmetic: h = diag X (XᵀX)⁻¹ Xᵀ,
    r = e/(s √(1 − h)), the externally studentized r √((m − 1)/(m − r²)) with m = n − p,
    D = r² h/(p (1 − h)); statsmodels' OLSInfluence must agree to 5e-10 relative."""
    n_obs, p = x.rows, x.cols
    xtx_inv = mp.inverse(x.T * x)
    res = y - x * (xtx_inv * (x.T * y))
    m = n_obs - p
    s_mp = mp.sqrt(sum(e**2 for e in res) / m)
    h = [(x[i, :] * xtx_inv * x[i, :].T)[0] for i in range(n_obs)]
    r_int = [res[i] / (s_mp * mp.sqrt(1 - h[i])) for i in range(n_obs)]
    r_ext = [ri * mp.sqrt((m - 1) / (m - ri**2)) for ri in r_int]
    cooks = [ri**2 * hi / (p * (1 - hi)) for ri, hi in zip(r_int, h)]
    got = [infl.hat_matrix_diag, infl.resid_studentized_internal,
           infl.resid_studentized_external, infl.cooks_distance[0]]
    worst = 0.0
    for sm_vals, mp_vals in zip(got, [h, r_int, r_ext, cooks]):
        big = max(abs(v) for v in mp_vals)
        for v, w in zip(sm_vals, mp_vals):
            worst = max(worst, abs(float((v - w) / max(abs(w), 1e-3 * big))))
    assert worst < 5e-10, worst
    DIAG_CHECKS.append(worst)


def ladder(name, t, ln_k):
    fits = {}
    for key, n in (("linear", 2), ("cp", 3), ("clarke_glew", 4)):
        f = sm.OLS(ln_k, design(t, n)).fit()
        fits[key] = f
        u = UNSCALE[:n, :n]
        beta = u @ f.params
        cov = u @ f.cov_params() @ u.T
        dh, ds, dcp, slope = thermo_rows(THETA, n)
        rows = [dh, ds, dcp, slope][:n]
        est = [g @ beta for g in rows]
        se = [np.sqrt(g @ cov @ g) for g in rows]
        # The per-point diagnostics depend on the column space only; statsmodels computes them
        # far more accurately from an orthonormal basis of it (numpy's Householder QR of the
        # scaled design) than from the design itself (7.5e-8 against 1e-12 or so).
        q, _ = np.linalg.qr(design(t, n))
        fq = sm.OLS(ln_k, q).fit()
        infl = OLSInfluence(fq)
        exact_check(t, ln_k, n, rows, est, se, f.ssr, infl)
        # The library's parameter order: ΔH°(θ), ΔS°(θ), ΔCp°(θ), dΔCp°/dT.
        out(f"{name}.{key}.params", *est)
        out(f"{name}.{key}.se", *se)
        g = np.array(rows)
        out(f"{name}.{key}.cov", *(g @ cov @ g.T).ravel())
        out(f"{name}.{key}.chi2", f.ssr)
        out(f"{name}.{key}.log_likelihood", f.llf)
        out(f"{name}.{key}.aicc", aicc(f.llf, f.nobs, n + 1))
        out(f"{name}.{key}.bic", -2 * f.llf + (n + 1) * np.log(f.nobs))
        out(f"{name}.{key}.r2", f.rsquared)
        # ΔH° and ΔCp° at 318.15 K, away from θ.
        dh45, _, dcp45, _ = thermo_rows(318.15, n)
        out(f"{name}.{key}.dh_318.15", dh45 @ beta, np.sqrt(dh45 @ cov @ dh45))
        out(f"{name}.{key}.dcp_318.15", dcp45 @ beta, np.sqrt(dcp45 @ cov @ dcp45))
        out(f"{name}.{key}.fitted", *fq.fittedvalues)
        out(f"{name}.{key}.leverage", *infl.hat_matrix_diag)
        out(f"{name}.{key}.student_int", *infl.resid_studentized_internal)
        out(f"{name}.{key}.student_ext", *infl.resid_studentized_external)
        out(f"{name}.{key}.cooks_d", *infl.cooks_distance[0])
    for small, big in (("linear", "cp"), ("cp", "clarke_glew")):
        fb, fs = fits[big], fits[small]
        f_stat, p, dof = fb.compare_f_test(fs)
        # Cross-check of compare_f_test with the formula and scipy.
        f_hand = (fs.ssr - fb.ssr) / (fb.ssr / fb.df_resid)
        assert abs(f_hand - f_stat) <= 1e-12 * f_stat
        assert abs(stats.f.sf(f_hand, 1, fb.df_resid) - p) <= 1e-12 * max(p, 1e-300)
        d_aicc = aicc(fb.llf, fb.nobs, fb.df_model + 2) - aicc(fs.llf, fs.nobs, fs.df_model + 2)
        out(f"{name}.step.{small}.{big}", f_stat, p, dof, fb.df_resid, d_aicc)


def ada():
    t = np.array(ADA_T_K)
    ln_k = -np.array(ADA_PK) * LN10
    out("ada.t_k", *t)
    out("ada.ln_k", *ln_k)
    ladder("ada", t, ln_k)


def water():
    rows = [l.split() for l in open(f"{HERE}/../water_pkw/pkw_iapws.txt")
            if l.strip() and not l.startswith("#")]
    t = np.array([273.15 + float(r[0]) for r in rows])
    ln_k = -np.array([float(r[2]) for r in rows]) * LN10
    ladder("water", t, ln_k)

    # The formulation's own ΔH°, ΔCp° and dΔCp°/dT at 25 °C, 0.1 MPa (central differences
    # of IAPWS R11-07 as implemented by iapws).
    def lnkw(tk):
        return -_Kw(IAPWS95(T=tk, P=0.1).rho, tk) * LN10

    def dh(tk, h=0.01):
        return R * tk * tk * (lnkw(tk + h) - lnkw(tk - h)) / (2 * h)

    def dcp(tk, h=0.5):
        return (dh(tk + h) - dh(tk - h)) / (2 * h)

    out("water.formulation.dh_298.15", dh(298.15))
    out("water.formulation.dcp_298.15", dcp(298.15))
    out("water.formulation.dcp_slope_298.15", (dcp(303.15) - dcp(293.15)) / 10.0)


CHECKS = []
DIAG_CHECKS = []

TAU = 10.0  # K, the toy model's fixed temperature scale


def toy_column(t):
    """(1/R) ∫_θ^T ((u − θ)/τ)³ / u² du by adaptive quadrature."""
    return np.array([
        integrate.quad(lambda u: ((u - THETA) / TAU) ** 3 / u**2, THETA, tk,
                       epsabs=0.0, epsrel=1e-13, limit=200)[0] / R
        for tk in t
    ])


def toy():
    """The extension test's toy model (cubic ΔH°) fitted to the water data."""
    rows = [l.split() for l in open(f"{HERE}/../water_pkw/pkw_iapws.txt")
            if l.strip() and not l.startswith("#")]
    t = np.array([273.15 + float(r[0]) for r in rows])
    ln_k = -np.array([float(r[2]) for r in rows]) * LN10
    x = np.column_stack([np.ones_like(t), 1 / t, toy_column(t)])
    f = sm.OLS(ln_k, x).fit()
    a, b, amp = f.params
    # ln K = a + b/T + A g(T) with g(θ) = 0: ΔH°(θ) = −R b, ΔS°(θ) = R ln K(θ) + ΔH°(θ)/θ = R a.
    g = np.array([[0, -R, 0], [R, 0, 0], [0, 0, 1.0]])
    cov = g @ f.cov_params() @ g.T
    se = np.sqrt(np.diag(cov))
    # The same toy fit in 60-digit arithmetic, its column by mpmath quadrature.
    mp.mp.dps = 60
    th, tau, r = mp.mpf(THETA), mp.mpf(TAU), mp.mpf(R)
    col = [mp.quad(lambda u: ((u - th) / tau) ** 3 / u**2, [th, mp.mpf(tk)]) / r for tk in t]
    xm = mp.matrix([[1, 1 / mp.mpf(tk), c] for tk, c in zip(t, col)])
    ym = mp.matrix([mp.mpf(v) for v in ln_k])
    bm = mp.lu_solve(xm.T * xm, xm.T * ym)
    cm = mp.inverse(xm.T * xm) * (sum(e**2 for e in ym - xm * bm) / (len(t) - 3))
    est_mp = [-r * bm[1], r * bm[0], bm[2]]
    se_mp = [r * mp.sqrt(cm[1, 1]), r * mp.sqrt(cm[0, 0]), mp.sqrt(cm[2, 2])]
    worst = max(abs(float((v - w) / w)) for v, w in
                zip([-R * b, R * a, amp, *se], [*est_mp, *se_mp]))
    assert worst < 5e-10, worst
    CHECKS.append(worst)
    q, _ = np.linalg.qr(x)
    fq = sm.OLS(ln_k, q).fit()
    infl = OLSInfluence(fq)
    diag_check(xm, ym, infl)
    out("toy.params", -R * b, R * a, amp)
    out("toy.se", *se)
    out("toy.chi2", f.ssr)
    out("toy.aicc", aicc(f.llf, f.nobs, 4))
    out("toy.fitted", *fq.fittedvalues)
    out("toy.leverage", *infl.hat_matrix_diag)
    out("toy.student_ext", *infl.resid_studentized_external)
    out("toy.cooks_d", *infl.cooks_distance[0])
    lin = sm.OLS(ln_k, x[:, :2]).fit()
    f_stat, p, dof = f.compare_f_test(lin)
    d_aicc = aicc(f.llf, f.nobs, 4) - aicc(lin.llf, lin.nobs, 3)
    out("toy.step.linear", f_stat, p, dof, f.df_resid, d_aicc)
    # ΔH°(T) and ΔCp°(T) at 318.15 K: ΔH° = −R b + A ((T − θ)/τ)³, ΔCp° = 3A (T − θ)²/τ³.
    tt = 318.15
    gh = np.array([0, -R, ((tt - THETA) / TAU) ** 3])
    gc = np.array([0, 0, 3 * (tt - THETA) ** 2 / TAU**3])
    cv = f.cov_params()
    out("toy.dh_318.15", gh @ f.params, np.sqrt(gh @ cv @ gh))
    out("toy.dcp_318.15", gc @ f.params, np.sqrt(gc @ cv @ gc))
    # Prediction at 310.15 K: mean, its SE, 95 % confidence and prediction intervals
    # (t with n − 3 dof; a new observation has the fit's residual variance).
    tp = 310.15
    xp = np.array([[1.0, 1 / tp, toy_column([tp])[0]]])
    pr = f.get_prediction(xp)
    ci = pr.conf_int(alpha=0.05)[0]
    pi = pr.conf_int(obs=True, alpha=0.05)[0]
    out("toy.predict_310.15", pr.predicted_mean[0], pr.se_mean[0], ci[0], ci[1], pi[0], pi[1])


if __name__ == "__main__":
    print(f"# numpy {np.__version__}, scipy {scipy.__version__}, statsmodels "
          f"{statsmodels.__version__}, iapws {iapws.__version__}, python {sys.version.split()[0]}")
    print("# key value...  (17 significant digits; written by make_clarke_glew.py)")
    ada()
    water()
    toy()
    print(f"# largest relative difference of the statsmodels estimates, SEs and χ² from a 60-digit "
          f"mpmath solve: {max(CHECKS):.1e}")
    print(f"# largest relative difference of the statsmodels (OLSInfluence) leverages, studentized "
          f"residuals and Cook's distances from the 60-digit solve: {max(DIAG_CHECKS):.1e}")
