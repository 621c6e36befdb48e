"""Independent reference values for tests/global.rs (isochore-fit): two series fitted in one
block design with a shared ΔCp° and per-series ΔH°(θ) and ΔS°(θ), θ = 298.15 K, computed
with statsmodels WLS/OLS rather than with Isochore's own code.

The design is built here in a different basis from the library's: per series an intercept
α_s and a 1/T slope β_s, and one shared ln T coefficient γ (ln K = α_s + β_s/T + γ ln T).
The thermodynamic parameters follow from it by a fixed linear map J (exact), and so do their
covariance (J C Jᵀ) and standard errors:
    ΔCp° = Rγ,   ΔH°(θ)_s = −Rβ_s + Rγθ,   ΔS°(θ)_s = Rα_s + Rγ(1 + ln θ).
The equality test of ΔCp° across the series compares this fit (restricted) with the fit in
which every series has its own γ_s (full) by RegressionResults.compare_f_test, cross-checked
with scipy.stats.f.sf.

The per-point diagnostics (leverage, externally studentized residual, Cook's distance) are
basis-free but sensitive to the conditioning of the design: statsmodels' OLSInfluence on the
√w-scaled design in this basis agrees with an exact computation to only about 1e-8 relative
(the residuals of a good fit are small differences). So the script also computes them, and χ²
and F, with mpmath at 60 significant digits (normal equations solved in that precision) and
prints those; it asserts that statsmodels agrees with them to 1e-6 relative.

Data: small invented data sets written for this test (plausible binding constants of an
exothermic process with a negative ΔCp°), with unequal σ(ln K) for the weighted case; the
unweighted case fits the same ln K by OLS.

Run:  python3 make_global.py      (needs numpy, scipy, statsmodels, mpmath)
"""

import mpmath as mp
import numpy as np
import scipy
import statsmodels
import statsmodels.api as sm
from scipy import stats

R = 8.314462618  # J/(mol K), CODATA 2018 (the digits the library uses)
THETA = 298.15

T_A = [278.15, 283.15, 288.15, 293.15, 298.15, 303.15, 308.15, 313.15, 318.15, 323.15]
LNK_A = [5.8331, 5.7024, 5.5965, 5.4316, 5.263, 5.1037, 4.9169, 4.6914, 4.4942, 4.273]
SIG_A = [0.010, 0.015, 0.008, 0.012, 0.020, 0.010, 0.009, 0.018, 0.011, 0.014]
T_B = [280.65, 285.65, 290.65, 295.65, 300.65, 305.65, 310.65, 315.65]
LNK_B = [5.7651, 5.7206, 5.6158, 5.5179, 5.4051, 5.2448, 5.1088, 4.9333]
SIG_B = [0.020, 0.012, 0.016, 0.010, 0.025, 0.013, 0.015, 0.011]

SERIES = [(T_A, LNK_A, SIG_A), (T_B, LNK_B, SIG_B)]


def out(name, values):
    values = np.atleast_1d(values)
    # Shortest digits that round-trip to the same double (at most 17 significant).
    print(name + " " + " ".join(repr(float(v)) for v in values))


def design(shared_gamma):
    """Rows series by series; columns α_A, β_A, α_B, β_B, then γ (shared) or γ_A, γ_B."""
    rows = []
    for s, (temps, _, _) in enumerate(SERIES):
        for t in temps:
            row = [0.0] * 4
            row[2 * s] = 1.0
            row[2 * s + 1] = 1.0 / t
            if shared_gamma:
                row.append(np.log(t))
            else:
                g = [0.0, 0.0]
                g[s] = np.log(t)
                row.extend(g)
            rows.append(row)
    return np.array(rows)


def exact(weighted, shared_gamma):
    """χ² and, per point, leverage, externally studentized residual and Cook's distance,
    in 60-digit arithmetic, from the same basis (the decimal inputs read exactly)."""
    mp.mp.dps = 60
    x = design(shared_gamma)
    temps = T_A + T_B
    rows = []
    for i, t in enumerate(temps):
        t = mp.mpf(repr(t))
        row = []
        for v in x[i]:
            if v == 0.0:
                row.append(mp.mpf(0))
            elif v == 1.0:
                row.append(mp.mpf(1))
            elif abs(v - 1.0 / float(t)) < 1e-12:
                row.append(1 / t)
            else:
                row.append(mp.log(t))
        rows.append(row)
    xm = mp.matrix(rows)
    y = mp.matrix([mp.mpf(repr(v)) for v in LNK_A + LNK_B])
    w = [1 / mp.mpf(repr(v)) ** 2 if weighted else mp.mpf(1) for v in SIG_A + SIG_B]
    n, p = xm.rows, xm.cols
    wx = mp.matrix(n, p)
    for i in range(n):
        for j in range(p):
            wx[i, j] = w[i] * xm[i, j]
    xtwx = xm.T * wx
    beta = mp.lu_solve(xtwx, wx.T * y)
    inv = xtwx**-1
    e = y - xm * beta
    chi2 = sum(w[i] * e[i] ** 2 for i in range(n))
    lev, ext, cooks = [], [], []
    for i in range(n):
        xi = xm[i, :]
        h = w[i] * (xi * inv * xi.T)[0]
        r = mp.sqrt(w[i]) * e[i]
        s2 = chi2 / (n - p)
        s2_i = (chi2 - r**2 / (1 - h)) / (n - p - 1)
        lev.append(h)
        ext.append(r / mp.sqrt(s2_i * (1 - h)))
        cooks.append(r**2 * h / (p * s2 * (1 - h) ** 2))
    return chi2, lev, ext, cooks


def agree(name, a, b, rel=1e-6):
    a, b = np.atleast_1d(np.asarray(a, dtype=float)), np.atleast_1d(np.asarray(b, dtype=float))
    worst = np.max(np.abs(a - b) / np.maximum(np.abs(a), np.abs(b)))
    assert worst <= rel, (name, worst)
    print(f"# {name}: statsmodels and 60-digit mpmath agree to {worst:.1e} relative")


def jacobian():
    """Map (α_A, β_A, α_B, β_B, γ) to the library's column order
    (ΔH°_A, ΔH°_B, ΔS°_A, ΔS°_B, ΔCp°)."""
    j = np.zeros((5, 5))
    c_s = R * (1.0 + np.log(THETA))
    # ΔH°_s = −R β_s + R θ γ
    j[0, 1] = -R
    j[0, 4] = R * THETA
    j[1, 3] = -R
    j[1, 4] = R * THETA
    # ΔS°_s = R α_s + R (1 + ln θ) γ
    j[2, 0] = R
    j[2, 4] = c_s
    j[3, 2] = R
    j[3, 4] = c_s
    # ΔCp° = R γ
    j[4, 4] = R
    return j


def case(name, weighted):
    y = np.array(LNK_A + LNK_B)
    w = 1.0 / np.array(SIG_A + SIG_B) ** 2
    x_r = design(True)
    x_f = design(False)
    if weighted:
        restricted = sm.WLS(y, x_r, weights=w).fit()
        full = sm.WLS(y, x_f, weights=w).fit()
        absolute = sm.WLS(y, x_r, weights=w).fit(cov_type="fixed scale", cov_kwds={"scale": 1.0})
    else:
        restricted = sm.OLS(y, x_r).fit()
        full = sm.OLS(y, x_f).fit()
        absolute = None
    j = jacobian()
    est = j @ restricted.params
    cov = j @ restricted.cov_params() @ j.T
    out(f"{name}_estimates", est)
    out(f"{name}_se", np.sqrt(np.diag(cov)))
    out(f"{name}_cov_row_dcp", cov[4])
    if absolute is not None:
        cov_abs = j @ absolute.cov_params() @ j.T
        out(f"{name}_se_absolute", np.sqrt(np.diag(cov_abs)))
    out(f"{name}_chi2", restricted.ssr)
    n, k = len(y), x_r.shape[1] + 1
    aicc = -2.0 * restricted.llf + 2.0 * k + 2.0 * k * (k + 1) / (n - k - 1)
    out(f"{name}_aicc_k_p_plus_1", aicc)
    # Diagnostics of the √w-scaled problem (the ordinary ones of the whitened OLS).
    sw = np.sqrt(w) if weighted else np.ones_like(y)
    infl = sm.OLS(sw * y, sw[:, None] * x_r).fit().get_influence()
    chi2_r, lev, ext, cooks = exact(weighted, True)
    chi2_f = exact(weighted, False)[0]
    agree(f"{name} chi2", restricted.ssr, float(chi2_r))
    agree(f"{name} leverages", infl.hat_matrix_diag, [float(v) for v in lev])
    agree(f"{name} studentized", infl.resid_studentized_external, [float(v) for v in ext])
    agree(f"{name} Cook", infl.cooks_distance[0], [float(v) for v in cooks])
    out(f"{name}_leverage_mpmath", [float(v) for v in lev])
    out(f"{name}_student_ext_mpmath", [float(v) for v in ext])
    out(f"{name}_cooks_mpmath", [float(v) for v in cooks])
    f_value, p_value, df_diff = full.compare_f_test(restricted)
    f_check = ((restricted.ssr - full.ssr) / df_diff) / (full.ssr / full.df_resid)
    assert abs(f_check - f_value) <= 1e-12 * f_value
    assert abs(stats.f.sf(f_value, df_diff, full.df_resid) - p_value) <= 1e-12
    out(f"{name}_f_test", [f_value, p_value, df_diff, full.df_resid])
    f_exact = ((chi2_r - chi2_f) / df_diff) / (chi2_f / full.df_resid)
    agree(f"{name} F", f_value, float(f_exact))
    out(f"{name}_f_mpmath", float(f_exact))


print(
    f"# statsmodels {statsmodels.__version__}, numpy {np.__version__}, scipy {scipy.__version__},"
    f" mpmath {mp.__version__}"
)
case("weighted", True)
case("unweighted", False)
