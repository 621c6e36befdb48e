"""Reference numbers for tests/joint_cli.rs::two_point_series_join_when_the_sharing_allows
(issue 12): a series of two points fitted together with one of four, ΔH° shared (linear
van 't Hoff model, ln K = -ΔH°/(R T) + ΔS°_s/R), by statsmodels WLS with weights 1/σ² on
the block design written from the model's equation. Invented data. Writes
two_point_joint.txt beside this script.

Run: python3 make_two_point_joint.py   (statsmodels 0.15.0, numpy 2.4.6)
"""
import os
import numpy as np
import statsmodels
import statsmodels.api as sm

R = 8.314462618  # J/(mol K), CODATA 2018
A = [(283.15, 4.6052, 0.02), (303.15, 3.9120, 0.02)]
B = [(283.15, 5.2983, 0.03), (293.15, 4.9416, 0.02), (303.15, 4.6052, 0.025), (313.15, 4.2485, 0.03)]

rows, y, w = [], [], []
for s, series in enumerate([A, B]):
    for t, lnk, sig in series:
        x = [-1.0 / (R * t), 0.0, 0.0]
        x[1 + s] = 1.0 / R
        rows.append(x)
        y.append(lnk)
        w.append(1.0 / sig**2)
res = sm.WLS(np.array(y), np.array(rows), weights=np.array(w)).fit()
out = os.path.join(os.path.dirname(os.path.abspath(__file__)), "two_point_joint.txt")
with open(out, "w") as f:
    f.write(f"# statsmodels {statsmodels.__version__}, numpy {np.__version__}\n")
    f.write("# columns: delta_h (shared), delta_s [a2], delta_s [b4]; SI\n")
    f.write("params " + " ".join(repr(float(v)) for v in res.params) + "\n")
    f.write("bse " + " ".join(repr(float(v)) for v in res.bse) + "\n")
    f.write(f"dof {float(res.df_resid)!r}\n")
print(open(out).read())
