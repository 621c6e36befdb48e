"""Reference values for tests/water_pair.rs (isochore-fit): pKw of H2O and of D2O at 0-60 °C,
the published pair of tables from two critical evaluations, fitted together with the
constant-ΔCp° model (θ = 298.15 K) by statsmodels OLS on the equivalent block design:
per-series ΔH°(θ) and ΔS°(θ) with ΔCp° shared, and ΔCp° per series (the full fit), and the
extra-sum-of-squares F-test of the shared ΔCp° (RegressionResults.compare_f_test,
cross-checked with scipy.stats.f.sf).

Data: -log Kw (molality basis, saturated vapour pressure) every 5 °C from the table
"Ionization constant of normal and heavy water" of the CRC Handbook of Chemistry and Physics
(section 8, 86th ed., 2005), which gives H2O from Marshall & Franck, J. Phys. Chem. Ref. Data
10, 295 (1981) and D2O from Mesmer & Herting, J. Solution Chem. 7, 901 (1978); three decimals
as printed. ln K = -pKw ln 10.

The design is written from the model equation (README of isochore-fit); its columns are
divided by their largest magnitude before the fit and the estimates and covariance mapped
back exactly.

Run:  python3 make_pkw_pair.py > pkw_pair.txt
"""

import numpy as np
import scipy
import statsmodels
import statsmodels.api as sm
from scipy import stats

R = 8.314462618
THETA = 298.15
T_C = [0, 5, 10, 15, 20, 25, 30, 35, 40, 45, 50, 55, 60]
PKW_H2O = [14.938, 14.727, 14.528, 14.340, 14.163, 13.995, 13.836, 13.685, 13.542, 13.405,
           13.275, 13.152, 13.034]
PKW_D2O = [15.972, 15.743, 15.527, 15.324, 15.132, 14.951, 14.779, 14.616, 14.462, 14.316,
           14.176, 14.044, 13.918]
SERIES = [PKW_H2O, PKW_D2O]


def terms(t):
    return [-1.0 / (R * t), 1.0 / R, (THETA / t - 1.0 + np.log(t / THETA)) / R]


def design(shared_cp):
    rows = []
    for s in range(2):
        for tc in T_C:
            x = terms(tc + 273.15)
            row = [0.0] * (5 if shared_cp else 6)
            row[s] = x[0]          # ΔH°(θ) of series s
            row[2 + s] = x[1]      # ΔS°(θ) of series s
            if shared_cp:
                row[4] = x[2]
            else:
                row[4 + s] = x[2]
            rows.append(row)
    return np.array(rows)


Y = np.array([-pk * np.log(10.0) for pks in SERIES for pk in pks])


def fit(shared_cp):
    x = design(shared_cp)
    d = np.abs(x).max(axis=0)
    res = sm.OLS(Y, x / d).fit()
    beta = res.params / d
    se = np.sqrt(np.diag(res.cov_params())) / d
    return res, beta, se


def out(name, values):
    print(name + " " + " ".join(repr(float(v)) for v in np.atleast_1d(values)))


print(f"# statsmodels {statsmodels.__version__}, numpy {np.__version__}, scipy {scipy.__version__}")
print("# columns: dH_H2O dH_D2O dS_H2O dS_D2O dCp (shared) | dCp_H2O dCp_D2O (full)")
restricted, b_r, se_r = fit(True)
full, b_f, se_f = fit(False)
out("shared_est", b_r)
out("shared_se", se_r)
out("shared_chi2", restricted.ssr)
out("full_est", b_f)
out("full_se", se_f)
f, p, df = full.compare_f_test(restricted)
assert abs(stats.f.sf(f, df, full.df_resid) - p) <= 1e-12 * p
out("f_test", [f, p, df, full.df_resid])
