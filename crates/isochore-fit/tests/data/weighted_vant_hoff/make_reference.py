"""Reference numbers for the weighted van 't Hoff fixture, computed by a general-purpose
statistics library (statsmodels, from PyPI) so the Rust engine can be checked against an
independent implementation.

Data: ten invented points of an exothermic binding (ln K falling with T), unequal σ(ln K),
with the point at 308.15 K deliberately displaced by about +0.22 (the odd point).

What is computed, for both the linear model (columns -1/(RT), 1/R) and the constant-ΔCp°
model (adds (θ/T - 1 + ln(T/θ))/R, θ = 298.15 K):
  * statsmodels WLS with weights 1/σ²: estimates, standard errors under the scaled
    convention (bse) and under absolute σ (sqrt of the diagonal of normalized_cov_params),
    χ² (ssr), R² (weighted, centred: statsmodels detects the constant column 1/R),
    the log-likelihood, AICc and BIC with k = p + 1 (p coefficients plus the variance);
  * statsmodels OLS on the √w-scaled problem (√w·y on √w·X) and its OLSInfluence:
    leverages, internally and externally studentized residuals, Cook's distances, DFFITS;
  * the F-test of the linear model against the ΔCp° model (RegressionResults.compare_f_test).

Run:  python3 make_reference.py > reference.txt
Needs: numpy, scipy, statsmodels (versions are written into the output).
"""

import math
import sys

import numpy as np
import scipy
import scipy.stats
import statsmodels
import statsmodels.api as sm
from statsmodels.stats.outliers_influence import OLSInfluence
from statsmodels.tools import eval_measures

R = 8.314462618  # J/(mol K), CODATA 2018 (exact in the 2019 SI)
THETA = 298.15   # K

# T/K, ln K, σ(ln K): invented.
DATA = [
    (278.15, 12.0637, 0.03),
    (283.15, 11.8063, 0.02),
    (288.15, 11.5102, 0.05),
    (293.15, 11.2134, 0.025),
    (298.15, 10.9274, 0.02),
    (303.15, 10.5875, 0.04),
    (308.15, 10.5303, 0.03),
    (313.15, 10.0618, 0.06),
    (318.15, 9.6292, 0.035),
    (323.15, 9.2547, 0.08),
]


def g17(v):
    """A float64 with 17 significant digits (always reads back to the same double)."""
    return format(float(v), ".17g")


def fmt(values):
    return " ".join(g17(v) for v in np.atleast_1d(values))


def design(t, model):
    cols = [-1.0 / (R * t), np.full_like(t, 1.0 / R)]
    if model == "cp":
        cols.append((THETA / t - 1.0 + np.log(t / THETA)) / R)
    return np.column_stack(cols)


def main():
    t = np.array([d[0] for d in DATA])
    y = np.array([d[1] for d in DATA])
    s = np.array([d[2] for d in DATA])
    w = 1.0 / s**2
    n = len(t)
    out = sys.stdout
    out.write("# Weighted van 't Hoff fixture: reference values from make_reference.py\n")
    out.write(f"# statsmodels {statsmodels.__version__}, numpy {np.__version__}, "
              f"scipy {scipy.__version__}, python {sys.version.split()[0]}\n")
    out.write("# one key per line, then values (float64 with 17 significant digits)\n")
    out.write(f"theta {g17(THETA)}\n")
    out.write(f"t_k {fmt(t)}\n")
    out.write(f"ln_k {fmt(y)}\n")
    out.write(f"sigma {fmt(s)}\n")
    results = {}
    for model in ("linear", "cp"):
        x = design(t, model)
        p = x.shape[1]
        wls = sm.WLS(y, x, weights=w).fit()
        results[model] = wls
        # Unweighted diagnostics of the √w-scaled problem.
        sw = np.sqrt(w)
        ols = sm.OLS(y * sw, x * sw[:, None]).fit()
        infl = OLSInfluence(ols)
        k = p + 1
        llf = wls.llf
        out.write(f"{model}.params {fmt(wls.params)}\n")
        out.write(f"{model}.se_scaled {fmt(wls.bse)}\n")
        out.write(f"{model}.se_absolute {fmt(np.sqrt(np.diag(wls.normalized_cov_params)))}\n")
        out.write(f"{model}.cov_scaled {fmt(wls.cov_params().ravel())}\n")
        out.write(f"{model}.chi2 {g17(wls.ssr)}\n")
        out.write(f"{model}.r2 {g17(wls.rsquared)}\n")
        out.write(f"{model}.adj_r2 {g17(wls.rsquared_adj)}\n")
        out.write(f"{model}.log_likelihood {g17(llf)}\n")
        out.write(f"{model}.aicc {g17(eval_measures.aicc(llf, n, k))}\n")
        out.write(f"{model}.bic {g17(eval_measures.bic(llf, n, k))}\n")
        out.write(f"{model}.fitted {fmt(wls.fittedvalues)}\n")
        out.write(f"{model}.leverage {fmt(infl.hat_matrix_diag)}\n")
        out.write(f"{model}.student_int {fmt(infl.resid_studentized_internal)}\n")
        out.write(f"{model}.student_ext {fmt(infl.resid_studentized_external)}\n")
        out.write(f"{model}.cooks_d {fmt(infl.cooks_distance[0])}\n")
        out.write(f"{model}.dffits {fmt(infl.dffits[0])}\n")
    # Nested-model F-test: the ΔCp° model against the linear one.
    f_value, p_value, df_diff = results["cp"].compare_f_test(results["linear"])
    assert df_diff == 1
    # The same from the two χ² and scipy's F survival function, as a cross-check.
    chi_lin, chi_cp = results["linear"].ssr, results["cp"].ssr
    f_check = (chi_lin - chi_cp) / (chi_cp / (n - 3))
    p_check = scipy.stats.f.sf(f_check, 1, n - 3)
    assert math.isclose(f_value, f_check, rel_tol=1e-12)
    assert math.isclose(p_value, p_check, rel_tol=1e-9)
    out.write(f"compare.f_statistic {g17(f_value)}\n")
    out.write(f"compare.f_p_value {g17(p_value)}\n")


if __name__ == "__main__":
    main()
