"""Reference values for tests/global_combos.rs (isochore-fit): every shared/free combination
of the constant-ΔCp° model's three parameters (ΔH°(θ), ΔS°(θ), ΔCp°) over two series, fitted
by statsmodels WLS (weights 1/σ²) and OLS on the equivalent block design, θ = 298.15 K.

The block design is written here from the model equation alone (README of isochore-fit):
    ln K = −ΔH°(θ)/(RT) + ΔS°(θ)/R + ΔCp°·(θ/T − 1 + ln(T/θ))/R
A shared parameter has one column carrying its term in every series' rows; a per-series
parameter has one column per series, zero in the other series' rows. Columns are in the
library's order (parameters in the model's order; a per-series parameter's columns in series
order). To keep the solve well conditioned, each column is divided by its largest magnitude
before fitting and the estimates and covariance are mapped back exactly (β = Dβ', C = DC'D).

For each combination with at least one shared parameter, the equality test compares it
(restricted) with the fit where every parameter is per series (full) by
RegressionResults.compare_f_test (F, p, df_num, df_den), cross-checked with
scipy.stats.f.sf. Each fit is also solved by numpy.linalg.lstsq and the script asserts
agreement to 1e-11 relative.

Data: the two invented series of tests/global.rs (make_global.py).

Run:  python3 make_global_combos.py > global_combos.txt
"""

import itertools

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
KEYS = ["delta_h", "delta_s", "delta_cp"]


def terms(t):
    return [-1.0 / (R * t), 1.0 / R, (THETA / t - 1.0 + np.log(t / THETA)) / R]


def design(shared):
    cols = []
    for k in range(3):
        if shared[k]:
            cols.append([terms(t)[k] for (ts, _, _) in SERIES for t in ts])
        else:
            for s in range(len(SERIES)):
                cols.append([terms(t)[k] if si == s else 0.0
                             for si, (ts, _, _) in enumerate(SERIES) for t in ts])
    return np.array(cols).T


Y = np.array([y for (_, ys, _) in SERIES for y in ys])
W = np.array([1.0 / s**2 for (_, _, ss) in SERIES for s in ss])


def fit(shared, weighted):
    x = design(shared)
    d = np.abs(x).max(axis=0)
    xs = x / d
    model = sm.WLS(Y, xs, weights=W) if weighted else sm.OLS(Y, xs)
    res = model.fit()
    beta = res.params / d
    cov = res.cov_params() / np.outer(d, d)
    # Cross-check the estimates with numpy's least squares on the √w-scaled design.
    sw = np.sqrt(W) if weighted else np.ones_like(Y)
    alt = np.linalg.lstsq(xs * sw[:, None], Y * sw, rcond=None)[0] / d
    assert np.allclose(alt, beta, rtol=1e-11, atol=0), (shared, weighted, alt, beta)
    return res, beta, np.sqrt(np.diag(cov))


def out(name, values):
    print(name + " " + " ".join(repr(float(v)) for v in np.atleast_1d(values)))


def code(shared):
    return "".join("s" if x else "p" for x in shared)


print(f"# statsmodels {statsmodels.__version__}, numpy {np.__version__}, scipy {scipy.__version__}")
print("# key: {w|u}_{sharing}_{est|se|f}; sharing: one letter per parameter (ΔH°, ΔS°, ΔCp°),")
print("# s shared, p per series; est and se in the library's column order;")
print("# f = F, p, df_num, df_den of the combination against every parameter per series")
for weighted in (True, False):
    full, _, _ = fit((False, False, False), weighted)
    for shared in itertools.product((False, True), repeat=3):
        res, beta, se = fit(shared, weighted)
        name = ("w_" if weighted else "u_") + code(shared)
        out(name + "_est", beta)
        out(name + "_se", se)
        out(name + "_chi2", res.ssr)
        if any(shared):
            f, p, df = full.compare_f_test(res)
            dfd = full.df_resid
            assert abs(stats.f.sf(f, df, dfd) - p) <= 1e-12 * max(p, 1e-300)
            out(name + "_f", [f, p, df, dfd])
