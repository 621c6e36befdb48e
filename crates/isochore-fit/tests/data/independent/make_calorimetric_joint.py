"""Independent reference values for tests/calorimetric_joint.rs (isochore-fit): two series
of ln K fitted with the constant-ΔCp° model, ΔCp° shared, per-series ΔH°(θ) and ΔS°(θ)
(θ = 298.15 K), together with three calorimetric enthalpies as extra observations of
ΔH°(T) = ΔH°(θ) + ΔCp°(T − θ) — computed with statsmodels WLS on the stacked design rather
than with Isochore's own code.

The design is written here from the model's equations (README of isochore-fit):
    ln K = −ΔH°(θ)/(RT) + ΔS°(θ)/R + ΔCp°(θ/T − 1 + ln(T/θ))/R,    weight 1/σ(ln K)²
    ΔH_cal(T) = ΔH°(θ) + ΔCp°(T − θ),                              weight 1/u²
columns ΔH°_A, ΔH°_B, ΔS°_A, ΔS°_B, ΔCp° (the library's parameter-major order).
statsmodels' WLS scales the covariance by the residual variance (the library's "σ are
relative weights only"); `cov_params() / scale` is the unscaled covariance ("σ are known
standard uncertainties").

Data: the invented series of make_global.py (T_A, LNK_A, SIG_A; T_B, LNK_B, SIG_B) and three
invented calorimetric values (series A at 298.15 K and 310.15 K, series B at 298.15 K).

Run:  python3 make_calorimetric_joint.py > calorimetric_joint.txt   (numpy, statsmodels)
"""

import numpy as np
import statsmodels
import statsmodels.api as sm

R = 8.314462618  # J/(mol K), CODATA 2018 (the digits the library uses)
THETA = 298.15

T_A = [278.15, 283.15, 288.15, 293.15, 298.15, 303.15, 308.15, 313.15, 318.15, 323.15]
LNK_A = [5.8331, 5.7024, 5.5965, 5.4316, 5.263, 5.1037, 4.9169, 4.6914, 4.4942, 4.273]
SIG_A = [0.010, 0.015, 0.008, 0.012, 0.020, 0.010, 0.009, 0.018, 0.011, 0.014]
T_B = [280.65, 285.65, 290.65, 295.65, 300.65, 305.65, 310.65, 315.65]
LNK_B = [5.7651, 5.7206, 5.6158, 5.5179, 5.4051, 5.2448, 5.1088, 4.9333]
SIG_B = [0.020, 0.012, 0.016, 0.010, 0.025, 0.013, 0.015, 0.011]
# (series, T / K, ΔH_cal / (J/mol), u / (J/mol))
CAL = [(0, 298.15, -25400.0, 300.0), (0, 310.15, -32300.0, 450.0), (1, 298.15, -18000.0, 250.0)]


def out(name, values):
    values = np.atleast_1d(values)
    print(name + " " + " ".join(repr(float(v)) for v in values))


rows, y, w = [], [], []
for s, (temps, lnk, sig) in enumerate([(T_A, LNK_A, SIG_A), (T_B, LNK_B, SIG_B)]):
    for t, l, sg in zip(temps, lnk, sig):
        row = [0.0] * 5
        row[s] = -1.0 / (R * t)
        row[2 + s] = 1.0 / R
        row[4] = (THETA / t - 1.0 + np.log(t / THETA)) / R
        rows.append(row)
        y.append(l)
        w.append(1.0 / sg**2)
for s, t, h, u in CAL:
    row = [0.0] * 5
    row[s] = 1.0
    row[4] = t - THETA
    rows.append(row)
    y.append(h)
    w.append(1.0 / u**2)

res = sm.WLS(np.array(y), np.array(rows), weights=np.array(w)).fit()
print(f"# statsmodels {statsmodels.__version__}, numpy {np.__version__}")
out("params", res.params)
out("bse_scaled", res.bse)
out("bse_known", np.sqrt(np.diag(res.cov_params()) / res.scale))
out("chi2", res.ssr)
out("dof", res.df_resid)
