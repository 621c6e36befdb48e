"""Reference numbers for isochore-gui/tests/joint_view.rs::
a_single_series_is_fitted_with_its_calorimetric_values (issue 12): the demo's invented
binding series (assets/demo/binding_qx7_halo2.csv, K_d in nM with its SD) fitted with the
linear van 't Hoff model together with two invented calorimetric values as observations of
ΔH° (constant in this model), by statsmodels WLS on the stacked design:
    ln K_i  = -ΔH°/(R T_i) + ΔS°/R,   weight 1/σ(ln K_i)²,  ln K = -ln(K_d · 1e-9), σ = SD/K_d
    ΔH_cal,j = ΔH°,                    weight 1/u_j²
SEs scaled by the residual variance (σ are relative weights, the default). Writes
single_calorimetric.txt beside this script.

Run: python3 make_single_calorimetric.py   (statsmodels 0.15.0, numpy 2.4.6)
"""
import csv
import math
import os
import numpy as np
import statsmodels
import statsmodels.api as sm

R = 8.314462618  # J/(mol K), CODATA 2018
HERE = os.path.dirname(os.path.abspath(__file__))
DEMO = os.path.join(HERE, "..", "..", "..", "assets", "demo", "binding_qx7_halo2.csv")
CAL = [(298.15, -40000.0, 500.0), (308.15, -47000.0, 800.0)]  # T/K, ΔH_cal, u in J/mol

rows, y, w = [], [], []
with open(DEMO, encoding="utf-8") as f:
    lines = [l for l in f if not l.startswith("#")]
for r in csv.DictReader(lines):
    t = float(r["T (°C)"]) + 273.15
    kd, sd = float(r["Kd (nM)"]), float(r["sd_Kd (nM)"])
    rows.append([-1.0 / (R * t), 1.0 / R])
    y.append(-math.log(kd * 1e-9))
    w.append(1.0 / (sd / kd) ** 2)
for t, h, u in CAL:
    rows.append([1.0, 0.0])
    y.append(h)
    w.append(1.0 / u**2)
res = sm.WLS(np.array(y), np.array(rows), weights=np.array(w)).fit()
out = os.path.join(HERE, "single_calorimetric.txt")
with open(out, "w") as f:
    f.write(f"# statsmodels {statsmodels.__version__}, numpy {np.__version__}\n")
    f.write("# columns: delta_h, delta_s (SI); scaled SEs; chi2 = sum of w r^2\n")
    f.write("params " + " ".join(repr(float(v)) for v in res.params) + "\n")
    f.write("bse " + " ".join(repr(float(v)) for v in res.bse) + "\n")
    f.write(f"chi2 {float(np.sum(np.array(w) * res.resid ** 2))!r}\n")
    f.write(f"dof {float(res.df_resid)!r}\n")
print(open(out).read())
