"""Reference numbers for tests/calorimetric_cli.rs::
a_single_series_with_a_heat_capacity_is_fitted_with_its_calorimetric_values (issue 12): the
demo's invented binding series (assets/demo/binding_qx7_halo2.csv, K_d in nM with its SD)
fitted with the constant-ΔCp° model (θ = 298.15 K) together with three invented calorimetric
values as observations of ΔH°(T), by statsmodels WLS on the stacked design:
    ln K_i   = -ΔH°(θ)/(R T_i) + ΔS°(θ)/R + ΔCp°/R · (θ/T_i − 1 + ln(T_i/θ)),
               weight 1/σ(ln K_i)²,  ln K = -ln(K_d · 1e-9),  σ = SD/K_d
    ΔH_cal,j = ΔH°(θ) + ΔCp° (T_j − θ),   weight 1/u_j²
(ΔH°(T) = ΔH°(θ) + ΔCp°(T − θ), ΔS°(T) = ΔS°(θ) + ΔCp° ln(T/θ), ln K = −ΔG°/(RT): textbook
thermodynamics, common practice.) SEs scaled by the residual variance (σ are relative
weights, the default). Writes single_calorimetric_cp.txt beside this script.

Run: python3 make_single_calorimetric_cp.py   (statsmodels 0.15.0, numpy 2.4.6)
"""
import csv
import math
import os
import numpy as np
import statsmodels
import statsmodels.api as sm

R = 8.314462618  # J/(mol K), CODATA 2018
THETA = 298.15  # K, the reference temperature of the command line's default
HERE = os.path.dirname(os.path.abspath(__file__))
DEMO = os.path.join(HERE, "..", "..", "..", "assets", "demo", "binding_qx7_halo2.csv")
# T/K, ΔH_cal, u in J/mol (invented): 15 °C, 25 °C, 35 °C
CAL = [(288.15, -33500.0, 600.0), (298.15, -40000.0, 500.0), (308.15, -47000.0, 800.0)]

rows, y, w = [], [], []
with open(DEMO, encoding="utf-8") as f:
    lines = [l for l in f if not l.startswith("#")]
for r in csv.DictReader(lines):
    t = float(r["T (°C)"]) + 273.15
    kd, sd = float(r["Kd (nM)"]), float(r["sd_Kd (nM)"])
    rows.append([-1.0 / (R * t), 1.0 / R, (THETA / t - 1.0 + math.log(t / THETA)) / R])
    y.append(-math.log(kd * 1e-9))
    w.append(1.0 / (sd / kd) ** 2)
for t, h, u in CAL:
    rows.append([1.0, 0.0, t - THETA])
    y.append(h)
    w.append(1.0 / u**2)
res = sm.WLS(np.array(y), np.array(rows), weights=np.array(w)).fit()
out = os.path.join(HERE, "single_calorimetric_cp.txt")
with open(out, "w") as f:
    f.write(f"# statsmodels {statsmodels.__version__}, numpy {np.__version__}\n")
    f.write("# columns: delta_h, delta_s, delta_cp at theta = 298.15 K (SI); scaled SEs;"
            " chi2 = sum of w r^2\n")
    f.write("params " + " ".join(repr(float(v)) for v in res.params) + "\n")
    f.write("bse " + " ".join(repr(float(v)) for v in res.bse) + "\n")
    f.write(f"chi2 {float(np.sum(np.array(w) * res.resid ** 2))!r}\n")
    f.write(f"dof {float(res.df_resid)!r}\n")
print(open(out).read())
