"""Independent reference values for handbook.rs, regressions.rs (isochore-fit) and render.rs
(isochore-report), computed with numpy / scipy / statsmodels rather than with Isochore's own
formulas. Each fit is done in a different basis from the library's where one exists (the
heat-capacity model as a + b/T + c ln T; ΔH°, ΔS°, ΔCp° read off it), and the derivatives of
the IAPWS water formulation are taken by central differences of the formulation itself.

Run:  python3 make_independent.py > independent.txt   (needs numpy, scipy, statsmodels, iapws)
"""

import sys

import iapws
import numpy as np
import scipy
import statsmodels
import statsmodels.api as sm
from iapws import IAPWS95
from iapws._iapws import _Kw
from scipy import stats

R = 8.314462618  # J/(mol K), CODATA 2018 (the digits the library uses)
LN10 = np.log(10.0)
HERE = __file__.rsplit("/", 1)[0] if "/" in __file__ else "."


def out(name, value):
    print(f"{name} = {value:.15g}")


def water():
    rows = [l.split() for l in open(f"{HERE}/../water_pkw/pkw_iapws.txt")
            if l.strip() and not l.startswith("#")]
    t = np.array([273.15 + float(r[0]) for r in rows])
    ln_k = -np.array([float(r[2]) for r in rows]) * LN10
    # Constant-ΔCp° model in the basis 1, 1/T, ln T: ln K = a + b/T + c ln T, so
    # ΔH°(T) = R (c T − b) and ΔCp° = R c.
    a, b, c = sm.OLS(ln_k, np.column_stack([np.ones_like(t), 1 / t, np.log(t)])).fit().params
    out("water_cp_model_dH_298.15_J", R * (c * 298.15 - b))
    out("water_cp_model_dH_318.15_J", R * (c * 318.15 - b))
    out("water_cp_model_dCp_J_per_K", R * c)
    near = np.abs(t - 298.15) <= 5 + 1e-9
    fit = sm.OLS(ln_k[near], np.column_stack([np.ones(near.sum()), 1 / t[near]])).fit()
    out("water_linear_20_30C_dH_J", -R * fit.params[1])

    # The formulation's own ΔH° and ΔCp° at 25 °C, 0.1 MPa (central differences).
    def lnkw(tk):
        return -_Kw(IAPWS95(T=tk, P=0.1).rho, tk) * LN10

    def dh(tk, h=0.01):
        return R * tk * tk * (lnkw(tk + h) - lnkw(tk - h)) / (2 * h)

    out("water_formulation_dH_298.15_J", dh(298.15))
    out("water_formulation_dCp_298.15_J_per_K", (dh(298.2) - dh(298.1)) / 0.1)


def tris():
    t = 273.15 + np.array([5.0, 15.0, 25.0, 37.0, 45.0])
    ln_k = -(8.07 - 0.028 * (t - 298.15)) * LN10
    fit = sm.OLS(ln_k, np.column_stack([np.ones_like(t), 1 / t])).fit()
    out("tris_linear_dH_J", -R * fit.params[1])


def dinitrogen_tetroxide():
    dh = (2 * 33.18 - 9.16) * 1e3
    dg = (2 * 51.31 - 97.89) * 1e3
    k298 = np.exp(-dg / (R * 298.15))
    ln_k350 = np.log(k298) - dh / R * (1 / 350 - 1 / 298.15)
    se = 2e3 / R * (1 / 298.15 - 1 / 350)
    z = stats.norm.ppf(0.975)
    out("n2o4_k_298.15", k298)
    out("n2o4_k_350", np.exp(ln_k350))
    out("n2o4_se_ln_k_350", se)
    out("n2o4_k_350_ci_low", np.exp(ln_k350 - z * se))
    out("n2o4_k_350_ci_high", np.exp(ln_k350 + z * se))


def regressions():
    # Correlation of the estimates depends on the design only (s² cancels), so any ln K on
    # these temperatures gives it; corr(ΔH°, ΔS°) = −corr(slope, intercept).
    t = np.array([280.0, 290.0, 300.0, 310.0])
    y = np.random.default_rng(1).normal(size=4)
    cv = sm.OLS(y, np.column_stack([np.ones(4), 1 / t])).fit().cov_params()
    out("exact_data_corr_dH_dS", -cv[0, 1] / np.sqrt(cv[0, 0] * cv[1, 1]))
    # Weighted fit, then the prediction interval of a new observation of σ = 0.05 at 305 K.
    t = np.array([280.0, 290.0, 300.0, 310.0, 320.0])
    e = np.array([0.03, -0.04, 0.02, 0.05, -0.03])
    y = -20e3 / (R * t) + 30 / R + e
    w = np.full(5, 1 / 0.05**2)
    fit = sm.WLS(y, np.column_stack([np.ones(5), 1 / t]), weights=w).fit()
    pred = fit.get_prediction(np.array([[1.0, 1 / 305.0]]))
    se_obs = np.sqrt(pred.se_mean[0] ** 2 + fit.scale * 0.05**2)
    resid = y[3] + 0.5 - pred.predicted_mean[0]
    out("excluded_prediction_se", se_obs)
    out("excluded_residual", resid)


def render():
    t = np.array([283.15, 288.15, 293.15, 298.15, 303.15, 308.15, 313.15])
    wobble = np.array([0.01 if i % 2 == 0 else -0.01 for i in range(7)])
    y = 30e3 / (R * t) - 20 / R + wobble
    keep = np.arange(7) != 3
    fit = sm.WLS(y[keep], np.column_stack([np.ones(6), 1 / t[keep]]),
                 weights=np.full(6, 1 / 0.02**2)).fit()
    out("render_dH_J", -R * fit.params[1])


if __name__ == "__main__":
    print(f"# numpy {np.__version__}, scipy {scipy.__version__}, statsmodels "
          f"{statsmodels.__version__}, iapws {iapws.__version__}, python {sys.version.split()[0]}")
    water()
    tris()
    dinitrogen_tetroxide()
    regressions()
    render()
