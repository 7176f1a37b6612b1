#!/usr/bin/python3
"""Reference values for tests/engine/fit/fit_test.cpp, computed at test time with Debian's python3-scipy
and numpy -- never with strewn itself. Writes JSON.

Sources:
  normal     numpy mean and covariance (ddof = 1); Hotelling's T^2 with its F(2, n-2) p-value
             (scipy.stats.f.sf) and the mean region radius (scipy.stats.f.ppf); the chi-square
             interval for the circular-equivalent sigma, nu s^2 / sigma^2 ~ chi^2_nu with
             Satterthwaite's nu = (n-1)(l1+l2)^2/(l1^2+l2^2) from numpy's eigenvalues of S
             (scipy.stats.chi2.ppf), two-sided and the one-sided upper bound; the Kolmogorov-Smirnov statistic of the squared Mahalanobis
             distances against chi^2_2 (scipy.stats.kstest).
  counts     Clopper-Pearson interval from scipy.stats.beta.ppf, two-sided and the one-sided
             bounds at alpha.
  outliers   the cut-off on d^2: (n-1)^2/n times scipy.stats.beta.ppf(1 - 0.01/n, 1, (n-3)/2)
             (Wilks 1963; Gnanadesikan & Kettenring 1972), and the same from the Beta(1, b)
             closed form 1 - (0.01/n)^(1/b) in mpmath at 40 digits.
  censored   the closed-form MLE sigma^2 = (sum r^2 + m a^2) / (2 n_measured) and the
             likelihood-ratio interval solved with scipy.optimize.brentq; the one-sided upper
             bound where 2 n (u - 1 - ln u) = scipy.stats.norm.ppf(0.95)^2, u < 1.
"""
import json
import sys
import mpmath
import numpy as np
from scipy import stats, optimize

mpmath.mp.dps = 40

rng = np.random.default_rng(20261202)
out = {"normal": [], "counts": [], "censored": [], "outliers": []}

for n, mean, cov in [(12, [0.3, -0.2], [[0.04, 0.01], [0.01, 0.02]]),
                     (40, [5.0, 6.0], [[1.0, -0.3], [-0.3, 0.5]]),
                     (250, [0.0, 0.0], [[2.5, 0.0], [0.0, 2.5]])]:
    pts = rng.multivariate_normal(mean, cov, size=n)
    aim = [0.0, 0.0]
    m = pts.mean(axis=0)
    S = np.cov(pts.T, ddof=1)
    d = m - aim
    t2 = n * d @ np.linalg.solve(S, d)
    p_bias = stats.f.sf((n - 2) / (2 * (n - 1)) * t2, 2, n - 2)
    r2 = 2 * (n - 1) / (n * (n - 2)) * stats.f.ppf(0.95, 2, n - 2)
    s = np.sqrt(np.trace(S) / 2)
    l1, l2 = np.linalg.eigvalsh(S)
    dof = (n - 1) * (l1 + l2) ** 2 / (l1 ** 2 + l2 ** 2)
    lo = s * np.sqrt(dof / stats.chi2.ppf(0.975, dof))
    hi = s * np.sqrt(dof / stats.chi2.ppf(0.025, dof))
    upper = s * np.sqrt(dof / stats.chi2.ppf(0.05, dof))
    d2 = np.einsum("ij,ij->i", pts - m, np.linalg.solve(S, (pts - m).T).T)
    ks = stats.kstest(d2, "chi2", args=(2,)).statistic
    out["normal"].append({"points": pts.tolist(), "aim": aim, "mean": m.tolist(), "cov": S.tolist(), "t2": t2,
                          "no_bias_p": p_bias, "mean_region_r2": r2, "sigma": s, "sigma_ci": [lo, hi],
                          "sigma_dof": dof, "sigma_upper": upper,
                          "ks": ks})

for k, n, conf in [(0, 20, 0.95), (7, 20, 0.95), (20, 20, 0.95), (412, 1000, 0.99), (1, 3, 0.9)]:
    a = 1 - conf
    lo = 0.0 if k == 0 else stats.beta.ppf(a / 2, k, n - k + 1)
    hi = 1.0 if k == n else stats.beta.ppf(1 - a / 2, k + 1, n - k)
    low1 = 0.0 if k == 0 else stats.beta.ppf(a, k, n - k + 1)
    high1 = 1.0 if k == n else stats.beta.ppf(1 - a, k + 1, n - k)
    out["counts"].append({"k": k, "n": n, "confidence": conf, "low": lo, "high": hi,
                          "low_one_sided": low1, "high_one_sided": high1})

for n in [4, 5, 7, 12, 16, 20, 40, 250, 100000]:
    closed = (n - 1) ** 2 / mpmath.mpf(n) * (1 - mpmath.power(mpmath.mpf("0.01") / n, mpmath.mpf(2) / (n - 3)))
    out["outliers"].append({"n": n, "d2": (n - 1) ** 2 / n * stats.beta.ppf(1 - 0.01 / n, 1, (n - 3) / 2),
                            "d2_mpmath": float(closed)})

for n_meas, m, a, s_true in [(30, 4, 1.5, 0.8), (200, 60, 1.0, 1.0), (5, 0, 3.0, 1.0)]:
    r = s_true * np.sqrt(-2 * np.log(rng.uniform(size=n_meas * 3)))
    r = r[r <= a][:n_meas]
    theta = (np.sum(r ** 2) + m * a * a) / (2 * len(r))
    c = stats.chi2.ppf(0.95, 1)
    g = lambda u: 2 * len(r) * (u - 1 - np.log(u)) - c
    u_lo = optimize.brentq(g, 1e-9, 1.0, xtol=1e-15)
    u_hi = optimize.brentq(g, 1.0, 1e6, xtol=1e-12)
    c1 = stats.norm.ppf(0.95) ** 2
    u_up = optimize.brentq(lambda u: 2 * len(r) * (u - 1 - np.log(u)) - c1, 1e-9, 1.0, xtol=1e-15)
    out["censored"].append({"radii": r.tolist(), "outside": m, "radius": a, "sigma": float(np.sqrt(theta)),
                            "sigma_ci": [float(np.sqrt(theta / u_hi)), float(np.sqrt(theta / u_lo))],
                            "sigma_upper": float(np.sqrt(theta / u_up))})

# The exact case counts (tests/engine/fit/fit_test.cpp requires them too); a censored draw must keep its
# n_measured radii.
assert [len(out[k]) for k in ("normal", "counts", "outliers", "censored")] == [3, 5, 9, 3], out.keys()
assert [len(c["radii"]) for c in out["censored"]] == [30, 200, 5]

with open(sys.argv[1], "w") as f:
    json.dump(out, f)
print(f"wrote fit references to {sys.argv[1]}")
