"""BCa fixture for tests/bca_scipy.rs: scipy.stats.bootstrap's BCa interval (scipy 1.17.1,
numpy 2.4.6) of ΔH° from the unweighted van 't Hoff line, on an invented data set, with the
resample indices scipy drew written out so the Rust test refits the very same resamples.

The data handed to scipy are the point indices 0..n-1 themselves: the resamples scipy draws
of them are the resample indices, which the statistic records as it is called. The
statistic is ΔH° = -R * slope of ln K on 1/T (ordinary least squares).

Run: python3 make_bca.py > bca_scipy.txt   (pip install scipy numpy)
"""

import numpy as np
import scipy
from scipy import stats

R = 8.314462618  # J/(mol K), CODATA 2018
# Invented: ΔH° = -35 kJ/mol, ΔS° = -50 J/(mol K), with skewed made-up errors.
T = np.array([278.15, 283.15, 288.15, 293.15, 298.15, 303.15, 308.15, 313.15, 318.15, 323.15])
ERR = np.array([0.02, -0.01, 0.00, 0.15, -0.03, 0.01, -0.02, 0.00, 0.09, -0.04])
LNK = -(-35e3) / (R * T) + (-50.0) / R + ERR

seen = []


def delta_h(idx, axis=-1):
    idx = np.asarray(idx)
    seen.append(idx.copy())
    j = idx.astype(np.int64)
    x = 1.0 / T[j]
    y = LNK[j]
    xm = x.mean(axis=-1, keepdims=True)
    ym = y.mean(axis=-1, keepdims=True)
    slope = ((x - xm) * (y - ym)).sum(axis=-1) / ((x - xm) ** 2).sum(axis=-1)
    return -R * slope


B = 2000
LEVEL = 0.95
res = stats.bootstrap(
    (np.arange(len(T), dtype=float),),
    delta_h,
    n_resamples=B,
    confidence_level=LEVEL,
    method="BCa",
    batch=B,
    rng=np.random.default_rng(20261203),
)
boot_idx = [s for s in seen if s.ndim == 2 and s.shape == (B, len(T))]
assert len(boot_idx) == 1, [s.shape for s in seen]
idx = boot_idx[0].astype(np.int64)
theta_b = delta_h(idx)
assert np.array_equal(theta_b, res.bootstrap_distribution)
theta_hat = delta_h(np.arange(len(T)))
jack = np.array([delta_h(np.delete(np.arange(len(T)), i)) for i in range(len(T))])

print(f"# scipy {scipy.__version__}, numpy {np.__version__}; made by make_bca.py")
print(f"level {LEVEL}")
print("t_k " + " ".join(repr(float(v)) for v in T))
print("ln_k " + " ".join(repr(float(v)) for v in LNK))
print(f"theta_hat {float(theta_hat)!r}")
print("jackknife " + " ".join(repr(float(v)) for v in jack))
print(f"bca_low {float(res.confidence_interval.low)!r}")
print(f"bca_high {float(res.confidence_interval.high)!r}")
print(f"boot_se {float(res.standard_error)!r}")
for b in range(B):
    print(f"idx{b} " + " ".join(str(int(v)) for v in idx[b]) + f" {float(theta_b[b])!r}")
