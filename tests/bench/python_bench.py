#!/usr/bin/env python3
"""The strewn Python module against the best scipy routes, side by side in one run (issue 20).

1. One polygon probability: strewn.probability (exact) against scipy.special.owens_t vectorised
   over the edges (whitening, winding number, one T(h, a) pair per edge: the classic polygon
   method, written below), on an 8-vertex polygon near the mean, the same polygon in the tail
   (p ~ 4e-10) and far in it (p ~ 1.5e-21), and a 200-gon (an ellipse's polygon) holding the mean. Accuracy of both against a 40-digit mpmath reference
   (the same boundary integral per edge by mpmath.quad, with whitening in mpmath).
2. A map: strewn.probability_at of a person disk on a 512 x 512 grid (rel_tol 1e-6) against a
   Monte Carlo map: N samples of the model in a scipy.spatial.cKDTree, counted within the disk
   about every cell centre (query_ball_point, return_length). Accuracy of both against strewn
   at rel_tol 1e-12 on a sample of cells (the exact method is checked against 40-digit
   references by the test suite).

Timing by timeit (best of several repeats). Run with Debian's python3 and the build tree:
    PYTHONPATH=build/python /usr/bin/python3 tests/bench/python_bench.py [--samples 10000000]
"""
import argparse
import math
import os
import timeit

import numpy as np
from scipy import special, spatial

import strewn

try:
    import mpmath
except ImportError:  # the accuracy columns need it (python3-mpmath)
    mpmath = None


# --- the best scipy route for a polygon --------------------------------------------------------

def scipy_polygon_probability(mean, cov, vertices):
    """P(X in polygon), X ~ N(mean, cov), by Owen's T over the edges (scipy.special.owens_t).

    Whitened edges A -> B at distance h from the origin with tangential coordinates t1, t2
    contribute s [T(h, t2 / h) - T(h, t1 / h)] to (1 / 2 pi) * loop integral of exp(-r^2 / 2)
    dtheta (s the sign of A x B); P = winding number - that sum."""
    L = np.linalg.cholesky(cov)
    z = np.linalg.solve(L, (np.asarray(vertices, float) - mean).T).T
    a, b = z, np.roll(z, -1, axis=0)
    d = b - a
    length = np.hypot(d[:, 0], d[:, 1])
    u = d / length[:, None]
    cross = a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0]
    h = np.abs(cross) / length
    t1 = np.einsum("ij,ij->i", a, u)
    t2 = np.einsum("ij,ij->i", b, u)
    ok = h > 0
    hh = np.where(ok, h, 1.0)
    tail = np.sign(cross) * (special.owens_t(hh, t2 / hh) - special.owens_t(hh, t1 / hh))
    tail = np.where(ok, tail, 0.0)
    angles = np.arctan2(cross, np.einsum("ij,ij->i", a, b))
    winding = round(angles.sum() / (2 * math.pi))
    return winding - tail.sum()


def mp_polygon_probability(mean, cov, vertices, dps=40):
    """The same boundary integral in 40-digit arithmetic: per edge the integral of
    exp(-(h^2 + t^2) / 2) h / (h^2 + t^2) dt / (2 pi) by mpmath.quad, no cancellation."""
    with mpmath.workdps(dps):
        c = [[mpmath.mpf(cov[0][0]), mpmath.mpf(cov[0][1])], [mpmath.mpf(cov[1][0]), mpmath.mpf(cov[1][1])]]
        l00 = mpmath.sqrt(c[0][0])
        l10 = c[1][0] / l00
        l11 = mpmath.sqrt(c[1][1] - l10 ** 2)
        pts = []
        for x, y in vertices:
            dx, dy = mpmath.mpf(x) - mpmath.mpf(mean[0]), mpmath.mpf(y) - mpmath.mpf(mean[1])
            z0 = dx / l00
            pts.append((z0, (dy - l10 * z0) / l11))
        total, angle = mpmath.mpf(0), mpmath.mpf(0)
        for k in range(len(pts)):
            (ax, ay), (bx, by) = pts[k], pts[(k + 1) % len(pts)]
            dx, dy = bx - ax, by - ay
            ln = mpmath.sqrt(dx * dx + dy * dy)
            cross = ax * by - ay * bx
            angle += mpmath.atan2(cross, ax * bx + ay * by)
            h = abs(cross) / ln
            if h == 0:
                continue
            t1 = (ax * dx + ay * dy) / ln
            t2 = (bx * dx + by * dy) / ln
            f = lambda t: mpmath.exp(-(h * h + t * t) / 2) * h / (h * h + t * t)
            total += mpmath.sign(cross) * mpmath.quad(f, [t1, (t1 + t2) / 2, t2]) / (2 * mpmath.pi)
        winding = int(mpmath.nint(angle / (2 * mpmath.pi)))
        return winding - total


def best_seconds(fn, number):
    return min(timeit.repeat(fn, number=number, repeat=5)) / number


def polygon_cases():
    mean, cov = np.array([0.0, 6.0]), np.array([[0.09, 0.03], [0.03, 0.04]])
    octagon = [(0.1, 5.7), (0.5, 5.8), (0.8, 6.1), (0.7, 6.5), (0.4, 6.7), (0.0, 6.6), (-0.2, 6.3), (-0.1, 5.9)]
    tail = [(x + 2.0, y + 0.4) for x, y in octagon]
    far = [(x + 3.0, y + 0.6) for x, y in octagon]
    t = 2 * math.pi * np.arange(200) / 200
    gon = [(0.2 + 0.5 * math.cos(a), 6.1 + 0.35 * math.sin(a)) for a in t]
    return mean, cov, [("8-vertex polygon", octagon), ("8-vertex polygon, tail", tail),
                       ("8-vertex polygon, far tail", far), ("200-gon", gon)]


def bench_polygons():
    mean, cov, cases = polygon_cases()
    model = strewn.Normal(mean, cov)
    print("1. One polygon: strewn.probability (exact, rel_tol 1e-8) vs scipy owens_t over edges")
    print(f"{'case':28} {'p':>10} {'strewn us':>10} {'scipy us':>10} {'ratio':>7} "
          f"{'strewn rel err':>15} {'scipy rel err':>14} {'strewn bound':>13}")
    for name, poly in cases:
        region = strewn.Region.polygon(poly)
        r = strewn.probability(model, region)
        s = scipy_polygon_probability(mean, cov, poly)
        n = 2000 if len(poly) < 50 else 200
        t_strewn = best_seconds(lambda: strewn.probability(model, region), n)
        t_scipy = best_seconds(lambda: scipy_polygon_probability(mean, cov, poly), max(n // 10, 20))
        if mpmath is not None:
            ref = mp_polygon_probability(mean, cov.tolist(), poly)
            e_strewn = float(abs(mpmath.mpf(r.p) - ref) / ref)
            e_scipy = float(abs(mpmath.mpf(s) - ref) / ref)
            acc = f"{e_strewn:15.2e} {e_scipy:14.2e}"
        else:
            acc = f"{'(no mpmath)':>15} {'':>14}"
        print(f"{name:28} {r.p:10.3e} {1e6 * t_strewn:10.2f} {1e6 * t_scipy:10.1f} {t_scipy / t_strewn:6.0f}x "
              f"{acc} {r.abs_err / r.p:13.1e}")


def bench_map(samples, cells):
    model = strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0)
    radius = 0.25
    person = strewn.Region.disk((0.0, 0.0), radius)
    h = 4.0 / cells  # exactly representable for cells a power of two: rows are exact runs
    xs = -2.0 + h * np.arange(cells)
    ys = 4.0 + h * np.arange(cells)
    x, y = np.meshgrid(xs, ys)
    print(f"\n2. Map of a person disk (radius {radius} m) on a {cells} x {cells} grid, {os.cpu_count()} core(s)")
    t_strewn = best_seconds(lambda: strewn.probability_at(model, person, x, y, rel_tol=1e-6), 1)
    res = strewn.probability_at(model, person, x, y, rel_tol=1e-6)
    rng = np.random.default_rng(20261203)

    def monte_carlo():
        pts = rng.multivariate_normal(model.mean, model.cov, size=samples)
        tree = spatial.cKDTree(pts)
        counts = tree.query_ball_point(np.column_stack([x.ravel(), y.ravel()]), radius, return_length=True,
                                       workers=-1)
        return counts.reshape(x.shape) / samples
    t_mc = min(timeit.repeat(monte_carlo, number=1, repeat=1))
    mc = monte_carlo()
    # Accuracy on every 16th cell where p >= 1e-3, against strewn at rel_tol 1e-12.
    sel = (slice(None, None, 16), slice(None, None, 16))
    ref = strewn.probability_at(model, person, x[sel], y[sel], rel_tol=1e-12).p
    mask = ref >= 1e-3
    e_strewn = np.max(np.abs(res.p[sel][mask] - ref[mask]) / ref[mask])
    e_mc = np.median(np.abs(mc[sel][mask] - ref[mask]) / ref[mask])
    e_mc_max = np.max(np.abs(mc[sel][mask] - ref[mask]) / ref[mask])
    print(f"strewn.probability_at (rel_tol 1e-6): {t_strewn:8.3f} s, max rel err {e_strewn:.1e} "
          f"(bound max {np.max(res.abs_err / np.maximum(res.p, 1e-300) * (res.p >= 1e-3)):.1e}), "
          f"all converged: {bool(res.converged.all())}")
    print(f"Monte Carlo {samples:.0e} samples + cKDTree: {t_mc:8.3f} s, rel err median {e_mc:.1e}, "
          f"max {e_mc_max:.1e} (cells with p >= 1e-3)")
    print(f"ratio (Monte Carlo time / strewn time): {t_mc / t_strewn:.0f}x")


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--samples", type=int, default=10_000_000, help="Monte Carlo samples of the map")
    ap.add_argument("--cells", type=int, default=512, help="cells per side of the map grid")
    args = ap.parse_args()
    print(f"strewn {strewn.__version__}, numpy {np.__version__}, scipy {__import__('scipy').__version__}")
    bench_polygons()
    bench_map(args.samples, args.cells)


if __name__ == "__main__":
    main()
