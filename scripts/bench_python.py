#!/usr/bin/env python3
"""The comparison script of issue 14: what a chemist's pandas + statsmodels script does
with the same CSV as `vhfit fit FILE --summary` — read the file, convert °C to K and K to
ln K with σ(ln K) = σ_K/K, weighted least squares of ln K on 1/T (the linear van 't Hoff
model, weights 1/σ²), ΔH° = −R·slope and ΔS° = R·intercept with their standard errors,
leverage, studentized residuals and Cook's distance with flags, and a printed summary.

It is timed as a whole process by scripts/bench_speed.sh (start-up and imports included,
as `vhfit` is); `--phases` also prints the time of each step on stderr.

Usage: python3 scripts/bench_python.py FILE.csv [--phases]
(pip install pandas statsmodels)
"""

import sys
import time

t0 = time.perf_counter()
import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
import statsmodels.api as sm  # noqa: E402

R = 8.314462618  # J mol⁻¹ K⁻¹, CODATA 2018


def main() -> None:
    path = sys.argv[1]
    phases = "--phases" in sys.argv
    marks = [("imports", time.perf_counter())]
    df = pd.read_csv(path)
    marks.append(("read_csv", time.perf_counter()))
    t_k = df.iloc[:, 0].to_numpy() + 273.15
    k = df.iloc[:, 1].to_numpy()
    sigma_ln_k = df.iloc[:, 2].to_numpy() / k
    y = np.log(k)
    x = sm.add_constant(1.0 / t_k)
    fit = sm.WLS(y, x, weights=1.0 / sigma_ln_k**2).fit()
    marks.append(("WLS", time.perf_counter()))
    # Per-point diagnostics of the weighted fit, by hand on the whitened problem
    # (statsmodels' OLSInfluence does not whiten a WLS fit's design): leverage,
    # internally and externally studentized residuals, Cook's distance; flags at the
    # common thresholds |t| > 3, h > 2p/n, D > 4/n.
    n, p = x.shape
    xw = x * np.sqrt(fit.model.weights)[:, None]
    leverage = np.einsum("ij,jk,ik->i", xw, np.linalg.inv(xw.T @ xw), xw)
    s2 = fit.ssr / (n - p)
    r = fit.wresid / np.sqrt(s2 * (1 - leverage))
    s2_i = (fit.ssr - fit.wresid**2 / (1 - leverage)) / (n - p - 1)
    t = fit.wresid / np.sqrt(s2_i * (1 - leverage))
    cooks = r**2 * leverage / (p * (1 - leverage))
    flagged = int(
        np.count_nonzero((np.abs(t) > 3) | (leverage > 2 * p / n) | (cooks > 4 / n))
    )
    marks.append(("diagnostics", time.perf_counter()))
    dh, ds = -R * fit.params[1], R * fit.params[0]
    se_h, se_s = R * fit.bse[1], R * fit.bse[0]
    print(
        f"n = {n}  ΔH° = {dh / 1e3:.5f} ± {se_h / 1e3:.5f} kJ/mol  "
        f"ΔS° = {ds:.4f} ± {se_s:.4f} J/(mol K)  R² = {fit.rsquared:.5f}  "
        f"flagged {flagged}"
    )
    if phases:
        prev = t0
        for name, t in marks:
            print(f"{name:12s} {1e3 * (t - prev):8.1f} ms", file=sys.stderr)
            prev = t


if __name__ == "__main__":
    main()
