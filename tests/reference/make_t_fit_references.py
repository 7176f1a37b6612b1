#!/usr/bin/python3
"""Reference values for tests/engine/fit/student_t_fit_test.cpp, computed at test time with Debian's
python3-scipy and numpy -- never with strewn itself. Writes JSON.

Source: direct numerical maximisation of the bivariate t log-likelihood, the sum of
scipy.stats.multivariate_t.logpdf (scipy >= 1.6) over the impacts, by scipy.optimize.minimize
(BFGS, then Nelder-Mead from its answer) over the location, the log-Cholesky factor of the scale
matrix and, for the profile fit, log nu bounded to [log 1, log 100] (L-BFGS-B). No EM: an
independent route to the same maximum.
  fixed_nu   data sets with nu held at 3 and at 12: location, scale matrix, log-likelihood
  free_nu    the same data with nu free in [1, 100]: nu, location, scale, log-likelihood
  profile    the profile log-likelihood of a scale figure psi (sigma = sqrt(trace / 2), the
             scale's major or minor semi-axis) at psi = 0.85 and 1.2 times its estimate, for the
             first two free_nu data sets: the same maximisation with the figure held at psi (the
             scale written as R(theta) diag(a^2, b^2) R(theta)^T with the free axis through a
             logistic), from several starts in nu, the best kept; the log-likelihood here from the
             density's formula, checked against multivariate_t.logpdf
  containment  the radius r holding a share p of a centred elliptical t (scale semi-axes a, b):
             the root of P(r) = (2 / pi) int_0^{pi/2} G(r / s(phi)) dphi = p, with
             s^2 = a^2 cos^2 phi + b^2 sin^2 phi and G(x) = 1 - (1 + x^2 / nu)^(-nu / 2) the bivariate
             t's radial CDF (the angle is uniform in whitened coordinates), by mpmath.quad
             (tanh-sinh, 40 digits, split where the integrand turns near phi = pi/2) and
             mpmath.findroot (bisection-safe Anderson) between the circular radii of b and a.
"""
import json
import sys
import mpmath as mp
import numpy as np
from scipy import stats, optimize

rng = np.random.default_rng(20261203)


def t_sample(n, mean, scale, nu):
    z = rng.multivariate_normal([0, 0], scale, size=n)
    w = rng.chisquare(nu, size=n)
    return np.asarray(mean) + z / np.sqrt(w / nu)[:, None]


def unpack(theta):
    mu = theta[0:2]
    L = np.array([[np.exp(theta[2]), 0.0], [theta[3], np.exp(theta[4])]])
    return mu, L @ L.T


def loglik(pts, mu, S, nu):
    return float(np.sum(stats.multivariate_t.logpdf(pts, loc=mu, shape=S, df=nu)))


def start(pts):
    m = pts.mean(axis=0)
    S = np.cov(pts.T, ddof=0)
    L = np.linalg.cholesky(S)
    return np.array([m[0], m[1], np.log(L[0, 0]), L[1, 0], np.log(L[1, 1])])


def maximise(f, x0, bounds=None):
    if bounds is None:
        r = optimize.minimize(f, x0, method="BFGS", options={"gtol": 1e-9, "maxiter": 10000})
        r = optimize.minimize(f, r.x, method="Nelder-Mead",
                              options={"xatol": 1e-11, "fatol": 1e-13, "maxiter": 40000, "maxfev": 40000})
    else:
        r = optimize.minimize(f, x0, method="L-BFGS-B", bounds=bounds,
                              options={"ftol": 1e-15, "gtol": 1e-10, "maxiter": 20000})
    return r.x


out = {"fixed_nu": [], "free_nu": []}
cases = [(60, [1.0, -2.0], [[0.5, 0.15], [0.15, 0.2]], 3.0),
         (150, [500000.0, 5400000.0], [[2.0, -0.4], [-0.4, 1.0]], 6.0),
         (40, [0.0, 0.0], [[1.0, 0.0], [0.0, 1.0]], 1e9)]  # the last one normal data
for n, mean, scale, true_nu in cases:
    pts = t_sample(n, mean, scale, true_nu) if true_nu < 1e8 else rng.multivariate_normal(mean, scale, size=n)
    origin = pts.mean(axis=0)
    rel = pts - origin  # the optimiser works relative to the sample mean; results shifted back
    for nu in (3.0, 12.0):
        x = maximise(lambda th: -loglik(rel, *unpack(th), nu), start(rel))
        mu, S = unpack(x)
        out["fixed_nu"].append({"points": pts.tolist(), "nu": nu, "mean": (mu + origin).tolist(), "scale": S.tolist(),
                                "log_likelihood": loglik(rel, mu, S, nu)})
    best = None
    for nu0 in (1.5, 4.0, 15.0, 60.0):
        th0 = np.append(start(rel), np.log(nu0))
        bounds = [(None, None)] * 5 + [(0.0, np.log(100.0))]
        x = maximise(lambda th: -loglik(rel, *unpack(th[:5]), np.exp(th[5])), th0, bounds)
        ll = loglik(rel, *unpack(x[:5]), np.exp(x[5]))
        if best is None or ll > best[0]:
            best = (ll, x)
    mu, S = unpack(best[1][:5])
    out["free_nu"].append({"points": pts.tolist(), "nu": float(np.exp(best[1][5])), "mean": (mu + origin).tolist(),
                           "scale": S.tolist(), "log_likelihood": best[0]})



def loglik_fast(pts, mu, S, nu):
    # log f = -log(2 pi) - log det S / 2 - (nu + 2) / 2 log(1 + d^2 / nu) (the 2-D t's density)
    d = pts - mu
    Si = np.linalg.inv(S)
    d2 = np.einsum("ij,jk,ik->i", d, Si, d)
    return float(-len(pts) * np.log(2 * np.pi) - 0.5 * len(pts) * np.log(np.linalg.det(S))
                 - 0.5 * (nu + 2) * np.sum(np.log1p(d2 / nu)))


def figure_scale(kind, psi, theta, u):
    c, s = np.cos(theta), np.sin(theta)
    R = np.array([[c, -s], [s, c]])
    g = 1.0 / (1.0 + np.exp(-u))
    if kind == "sigma_major":
        a2, b2 = psi ** 2, (psi * g) ** 2
    elif kind == "sigma_minor":
        a2, b2 = (psi / g) ** 2, psi ** 2
    else:  # sigma: a^2 + b^2 = 2 psi^2
        a2, b2 = 2 * psi ** 2 * g, 2 * psi ** 2 * (1 - g)
    return R @ np.diag([a2, b2]) @ R.T


out["profile"] = []
for case in out["free_nu"][:2]:
    pts = np.asarray(case["points"])
    origin = pts.mean(axis=0)
    rel = pts - origin
    S_hat = np.asarray(case["scale"])
    mu_hat = np.asarray(case["mean"]) - origin
    nu_hat = case["nu"]
    assert abs(loglik_fast(rel, mu_hat, S_hat, nu_hat) - loglik(rel, mu_hat, S_hat, nu_hat)) < 1e-9 * abs(case["log_likelihood"])
    w, V = np.linalg.eigh(S_hat)
    theta_hat = np.arctan2(V[1, 1], V[0, 1])  # the major axis's direction
    estimates = {"sigma": np.sqrt(np.trace(S_hat) / 2), "sigma_major": np.sqrt(w[1]), "sigma_minor": np.sqrt(w[0])}
    for kind, est in estimates.items():
        for factor in (0.85, 1.2):
            psi = est * factor
            best = None
            for nu0 in (nu_hat, 1.5, 4.0, 15.0, 60.0):
                for u0 in (-1.0, 0.5, 2.0):
                    x0 = np.array([mu_hat[0], mu_hat[1], theta_hat, u0, np.log(min(max(nu0, 1.0), 100.0))])
                    f = lambda th: -loglik_fast(rel, th[:2], figure_scale(kind, psi, th[2], th[3]), np.exp(th[4]))
                    bounds = [(None, None)] * 4 + [(0.0, np.log(100.0))]
                    x = optimize.minimize(f, x0, method="L-BFGS-B", bounds=bounds,
                                          options={"ftol": 1e-15, "gtol": 1e-10, "maxiter": 20000}).x
                    x = optimize.minimize(f, x, method="Powell", bounds=bounds,
                                          options={"xtol": 1e-10, "ftol": 1e-14, "maxiter": 40000}).x
                    ll = -f(x)
                    if best is None or ll > best:
                        best = ll
            out["profile"].append({"points": case["points"], "figure": kind, "psi": float(psi),
                                   "profile_log_likelihood": best})


def containment(a, b, nu, p):
    mp.mp.dps = 40
    a, b, nu, p = mp.mpf(a), mp.mpf(b), mp.mpf(nu), mp.mpf(p)
    # The integrand changes over a width b / a of angle before pi / 2: break the range there.
    e = b / a
    cuts = sorted({mp.mpf(0), mp.pi / 2} | {mp.pi / 2 - c * e for c in (1, 4, 16, 64, 256, 1024) if c * e < mp.pi / 2})

    def prob(r):
        g = lambda phi: 1 - (1 + r * r / (nu * (a * a * mp.cos(phi) ** 2 + b * b * mp.sin(phi) ** 2))) ** (-nu / 2)
        return 2 / mp.pi * mp.quad(g, cuts)

    k = mp.sqrt(nu * ((1 - p) ** (-2 / nu) - 1))  # the circular radius quantile
    r = mp.findroot(lambda r: prob(r) - p, (b * k, a * k), solver="anderson", tol=mp.mpf(10) ** -30)
    return float(r)


out["containment"] = []
# Axis ratios from nearly circular to 1e6:1 (impacts along a line), nu from 0.5 to the range's cap, CEP, R95, and
# shares from 1e-6 to 1 - 1e-9 (where P or Q computed as 1 minus the other would lose digits).
for a, b, nu, p in [(1.0, 0.6, 3.0, 0.5), (1.0, 0.6, 3.0, 0.95), (1.0, 0.6, 10.0, 0.95), (1.0, 0.6, 100.0, 0.95),
                    (2.0, 0.2, 1.0, 0.5), (2.0, 0.2, 2.5, 0.95), (1.0, 0.1, 5.0, 0.99), (1.0, 0.999, 30.0, 0.5),
                    (3.7, 1.2, 1.5, 0.05), (1.0, 0.01, 4.0, 0.95), (1.0, 0.001, 4.0, 0.95),
                    (1.0, 0.5, 4.0, 1e-6), (1.0, 0.5, 4.0, 1 - 1e-9), (1.0, 0.3, 0.5, 0.95),
                    (1.0, 1e-4, 3.0, 0.5), (1.0, 1e-4, 3.0, 0.95), (1.0, 1e-6, 1.5, 0.95), (2.0, 2e-5, 10.0, 0.05)]:
    out["containment"].append({"a": a, "b": b, "nu": nu, "fraction": p, "radius": containment(a, b, nu, p)})

with open(sys.argv[1], "w") as f:
    json.dump(out, f)
