"""Reference values for fits with errors in T (tests/errors_in_t.rs), written to
errors_in_t.txt as `key value...` lines, 17 significant digits.

Run: python3 make_errors_in_t.py > errors_in_t.txt   (pip install numpy scipy odrpack)

Independent of Isochore's code:
- York's straight line (York et al., Am. J. Phys. 72, 367, 2004, Section III, r = 0), coded
  here from the paper's equations in numpy and iterated until the slope repeats; checked
  against ODRPACK (the PyPI package `odrpack`, the successor of scipy.odr) on the same line,
  whose objective is the same for a straight line.
- The orthogonal-distance fit of the constant-dCp model in T (not in 1/T), by ODRPACK with
  analytic Jacobians and tight tolerances, and by scipy.odr as a second program.
  `cov_beta` is ODRPACK's unscaled covariance ("known standard uncertainties");
  `sd_beta` = sqrt(diag(cov_beta) * res_var) with res_var = S/(n - p) ("relative weights").
"""
import sys
import numpy as np
import odrpack
import scipy
import warnings
with warnings.catch_warnings():
    warnings.simplefilter("ignore", DeprecationWarning)
    import scipy.odr

R = 8.314462618  # CODATA 2018, J/(mol K)
THETA = 298.15


def out(key, values):
    vals = np.atleast_1d(np.asarray(values, dtype=float)).ravel()
    print(key, " ".join(repr(float(v)) for v in vals))


def york(x, y, sx, sy):
    """York et al. 2004, Section III, steps 1-8, r = 0."""
    wx, wy = 1 / sx**2, 1 / sy**2
    b = np.polyfit(x, y, 1)[0]
    for it in range(100000):
        W = wx * wy / (wx + b * b * wy)
        xb, yb = np.sum(W * x) / np.sum(W), np.sum(W * y) / np.sum(W)
        U, V = x - xb, y - yb
        beta = W * (U / wy + b * V / wx)
        nb = np.sum(W * beta * V) / np.sum(W * beta * U)
        if nb == b:
            break
        b = nb
    W = wx * wy / (wx + b * b * wy)
    xb, yb = np.sum(W * x) / np.sum(W), np.sum(W * y) / np.sum(W)
    U, V = x - xb, y - yb
    beta = W * (U / wy + b * V / wx)
    a = yb - b * xb
    xa = xb + beta
    xm = np.sum(W * xa) / np.sum(W)
    u = xa - xm
    vb = 1 / np.sum(W * u * u)
    va = 1 / np.sum(W) + xm * xm * vb
    S = np.sum(W * (y - a - b * x) ** 2)
    return a, b, va, vb, -xm * vb, S, xa


def line_odrpack(x, y, sx, sy, beta0):
    f = lambda x, b: b[0] + b[1] * x
    jb = lambda x, b: np.vstack([np.ones_like(x), x])
    jx = lambda x, b: np.full_like(x, b[1])
    r = odrpack.odr_fit(f, x, y, np.array(beta0, float), weight_x=1 / sx**2,
                        weight_y=1 / sy**2, jac_beta=jb, jac_x=jx, maxit=1000,
                        sstol=1e-15, partol=1e-15)
    return r


print(f"# numpy {np.__version__}, scipy {scipy.__version__}, odrpack {odrpack.__version__}, python {sys.version.split()[0]}")
print("# key value...  (written by make_errors_in_t.py)")

# 1. Pearson's data with York's weights (York, Can. J. Phys. 44, 1079, 1966, Table I).
px = np.array([0.0, 0.9, 1.8, 2.6, 3.3, 4.4, 5.2, 6.1, 6.5, 7.4])
py = np.array([5.9, 5.4, 4.4, 4.6, 3.5, 3.7, 2.8, 2.8, 2.4, 1.5])
pwx = np.array([1000.0, 1000.0, 500.0, 800.0, 200.0, 80.0, 60.0, 20.0, 1.8, 1.0])
pwy = np.array([1.0, 1.8, 4.0, 8.0, 20.0, 20.0, 70.0, 70.0, 100.0, 500.0])
a, b, va, vb, cab, S, xa = york(px, py, 1 / np.sqrt(pwx), 1 / np.sqrt(pwy))
r = line_odrpack(px, py, 1 / np.sqrt(pwx), 1 / np.sqrt(pwy), [a, b])
# ODRPACK stops on its sum-of-squares test with the slope 1.6e-9 from the stationary point
# York's iteration finds (S is flat there to 1 ulp): agreement to 1e-7 of the SE.
assert abs(r.beta[0] - a) < 1e-7 * np.sqrt(va) and abs(r.beta[1] - b) < 1e-7 * np.sqrt(vb), (r.beta, a, b)
assert abs(np.sqrt(r.cov_beta[1, 1]) / np.sqrt(vb) - 1) < 1e-7, (r.cov_beta, vb)
out("pearson.intercept", a)
out("pearson.slope", b)
out("pearson.se_unscaled", [np.sqrt(va), np.sqrt(vb)])
out("pearson.se_scaled", [np.sqrt(va * S / 8), np.sqrt(vb * S / 8)])
out("pearson.cov_ab", cab)
out("pearson.chi2", S)
out("pearson.odrpack_se_unscaled", np.sqrt(np.diag(r.cov_beta)))
out("pearson.odrpack_sd_beta", r.sd_beta)

# 2. An invented van 't Hoff data set with a thermometer uncertainty: linear model by York
#    in x = 1/T, y = ln K, sx = sT/T^2.
T = np.array([278.15, 283.15, 288.15, 293.15, 298.15, 303.15, 308.15, 313.15, 318.15])
noise = np.array([0.021, -0.034, 0.008, 0.027, -0.015, -0.024, 0.036, -0.011, 0.005])
sy = np.array([0.02, 0.02, 0.025, 0.02, 0.03, 0.02, 0.025, 0.03, 0.02])
sT = np.array([0.3, 0.2, 0.3, 0.25, 0.3, 0.2, 0.3, 0.35, 0.3])
# ln K = -dH/(R T) + dS/R with dH = -42 kJ/mol, dS = -85 J/(mol K):
lin_y = -(-42e3) / (R * T) + (-85.0) / R + noise
out("linear.t_k", T)
out("linear.ln_k", lin_y)
out("linear.sigma_ln_k", sy)
out("linear.sigma_t_k", sT)
a, b, va, vb, cab, S, xa = york(1 / T, lin_y, sT / T**2, sy)
n = len(T)
out("linear.york.params", [-R * b, R * a])
out("linear.york.se_unscaled", [R * np.sqrt(vb), R * np.sqrt(va)])
out("linear.york.se_scaled", [R * np.sqrt(vb * S / (n - 2)), R * np.sqrt(va * S / (n - 2))])
out("linear.york.chi2", S)
out("linear.york.t_adjusted", 1 / xa)

# 3. The constant-dCp model with the same temperatures and uncertainties, in T itself:
#    ln K = -dH/(R T) + dS/R + dCp (theta/T - 1 + ln(T/theta))/R.
def cp_f(T, b):
    return -b[0] / (R * T) + b[1] / R + b[2] * (THETA / T - 1 + np.log(T / THETA)) / R


def cp_jb(T, b):
    return np.vstack([-1 / (R * T), np.full_like(T, 1 / R), (THETA / T - 1 + np.log(T / THETA)) / R])


def cp_jx(T, b):
    # d lnK/dT = dH(T)/(R T^2), dH(T) = b0 + b2 (T - theta)
    return (b[0] + b[2] * (T - THETA)) / (R * T**2)


cp_true = np.array([-35e3, -40.0, -900.0])
cp_y = cp_f(T, cp_true) + noise
# Start from the weighted fit in K only.
X = cp_jb(T, cp_true).T
w = 1 / sy
beta0 = np.linalg.lstsq(X * w[:, None], cp_y * w, rcond=None)[0]
r = odrpack.odr_fit(cp_f, T, cp_y, beta0, weight_x=1 / sT**2, weight_y=1 / sy**2,
                    jac_beta=cp_jb, jac_x=cp_jx, maxit=1000, sstol=1e-15, partol=1e-15)
assert r.success, r.stopreason
# scipy.odr on the same problem, a second program.
model = scipy.odr.Model(lambda b, x: cp_f(x, b), fjacb=lambda b, x: cp_jb(x, b),
                        fjacd=lambda b, x: cp_jx(x, b))
data = scipy.odr.RealData(T, cp_y, sx=sT, sy=sy)
o = scipy.odr.ODR(data, model, beta0=beta0, maxit=1000, sstol=1e-15, partol=1e-15)
o.set_job(deriv=3)
so = o.run()
rel = np.max(np.abs(so.beta - r.beta) / np.sqrt(np.diag(r.cov_beta)))
assert rel < 1e-6, (so.beta, r.beta)
out("cp.ln_k", cp_y)
out("cp.params", r.beta)
out("cp.se_unscaled", np.sqrt(np.diag(r.cov_beta)))
out("cp.sd_beta", r.sd_beta)
out("cp.cov_unscaled", r.cov_beta)
out("cp.chi2", r.sum_square)
out("cp.t_adjusted", r.xplusd)
out("cp.scipy_odr.params", so.beta)
out("cp.scipy_odr.sd_beta", so.sd_beta)
out("cp.k_only.params", beta0)
