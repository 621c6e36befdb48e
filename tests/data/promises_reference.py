"""Reference values for tests/promises.rs, computed with statsmodels (run by hand, not by
the test suite): python3 tests/data/promises_reference.py. Printed 2026-12-02 with
statsmodels 0.15.0, numpy 2.4.6."""
import numpy as np
import statsmodels
import statsmodels.api as sm

R = 8.314462618  # J/(mol K), CODATA 2018
print("statsmodels", statsmodels.__version__, "numpy", np.__version__)
# A: unsorted, unweighted
tc = np.array([25,10,35,15,30,20.0]); K = np.array([0.71,1.20,0.52,1.01,0.60,0.85])
T = tc + 273.15; y = np.log(K)
X = np.column_stack([-1/(R*T), np.full_like(T, 1/R)])
r = sm.OLS(y, X).fit()
print("A params", repr(r.params.tolist()), "bse", repr(r.bse.tolist()))
infl = r.get_influence()
print("A leverage", repr(infl.hat_matrix_diag.tolist()))
print("A cooks", repr(infl.cooks_distance[0].tolist()))
print("A rstud_ext", repr(infl.resid_studentized_external.tolist()))
# E: hump, constant-dCp model at theta = 298.15 K, WLS with w = 1/sigma_lnK^2, sigma_lnK = sigma_K/K
th = 298.15
tc = np.array([5,10,15,20,25,30,35,40,45.0]); T = tc + 273.15
K = np.array([0.7432,0.8521,0.9291,0.9741,0.9955,0.9739,0.9379,0.8788,0.7765])
sK = np.array([0.0074,0.0085,0.0093,0.0097,0.0100,0.0097,0.0094,0.0088,0.0078])
y = np.log(K); s = sK / K
X = np.column_stack([-1/(R*T), np.full_like(T, 1/R), (np.log(T/th) + th/T - 1)/R])
r = sm.WLS(y, X, weights=1/s**2).fit()
print("E params", repr(r.params.tolist()), "bse", repr(r.bse.tolist()))
