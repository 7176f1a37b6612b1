#!/usr/bin/python3
"""Reference probabilities of the Student-t and uniform families for
tests/engine/integrate/family_reference_test.cpp, computed at test time with Debian's python3-mpmath
and numpy -- never with strewn itself.

Each output line:  name;source;family;nu;mx;my;sxx;sxy;syy;shape;numbers...;p;q
shape is 'polygon' (x1 y1 x2 y2 ...) or 'disk' (cx cy r); family 'student_t' or 'uniform'.

Sources (both 30-digit mpmath quadrature over vertical strips, in whitened coordinates
z = L^-1 (x - m), L the Cholesky factor of the scale matrix, cut at every vertex and, for the
uniform, where an edge crosses the circle, so that each strip's integrand is smooth):
  t_conditional  the bivariate t with nu degrees of freedom and identity scale is
                 X ~ t_nu and Y | X = x ~ t_(nu+1) scaled by sqrt((nu + x^2) / (nu + 1))
                 (Kotz & Nadarajah, "Multivariate t distributions", 2004, section 1.11), so
                 P = int f_nu(x) [F_(nu+1)(y_hi / s(x)) - F_(nu+1)(y_lo / s(x))] dx with the t CDF
                 from the regularised incomplete beta function (Abramowitz & Stegun 26.7.1).
                 (Debian's scipy 1.10 has no multivariate_t.cdf; see CHECKS.md.)
  uniform_area   uniform over the whitened disk of radius 2: P = area(region & disk) / (4 pi),
                 the area as int of the length of each vertical chord inside both.
"""
import sys
import numpy as np
import mpmath as mp

mp.mp.dps = 30
rng = np.random.default_rng(20261203)
out = []


def t_cdf(t, nu):
    t, nu = mp.mpf(t), mp.mpf(nu)
    tail = mp.betainc(nu / 2, mp.mpf(1) / 2, 0, nu / (nu + t * t), regularized=True) / 2
    return 1 - tail if t >= 0 else tail


def t_pdf(x, nu):
    nu = mp.mpf(nu)
    return mp.gamma((nu + 1) / 2) / (mp.sqrt(nu * mp.pi) * mp.gamma(nu / 2)) * (1 + x * x / nu) ** (-(nu + 1) / 2)


def crossings(loops, x):
    """Sorted y where the vertical line at x crosses the loops' edges (even-odd pairs are inside)."""
    ys = []
    for pts in loops:
        n = len(pts)
        for i in range(n):
            (x1, y1), (x2, y2) = pts[i], pts[(i + 1) % n]
            if (x1 <= x < x2) or (x2 <= x < x1):
                ys.append(y1 + (y2 - y1) * (x - x1) / (x2 - x1))
    ys.sort()
    return [(ys[k], ys[k + 1]) for k in range(0, len(ys) - 1, 2)]


def whiten(points, mean, L):
    Linv = mp.inverse(mp.matrix(L))
    out_pts = []
    for (x, y) in points:
        v = Linv * mp.matrix([[mp.mpf(x) - mean[0]], [mp.mpf(y) - mean[1]]])
        out_pts.append((v[0], v[1]))
    return out_pts


def t_polygon(loops, nu):
    xs = sorted({p[0] for pts in loops for p in pts})
    def f(x):
        s = mp.sqrt((nu + x * x) / (nu + 1))
        return t_pdf(x, nu) * sum(t_cdf(hi / s, nu + 1) - t_cdf(lo / s, nu + 1) for lo, hi in crossings(loops, x))
    return mp.quad(f, xs)


def t_disk(c, R, nu):
    cx, cy = c
    def f(x):
        h = mp.sqrt(max(R * R - (x - cx) ** 2, 0))
        s = mp.sqrt((nu + x * x) / (nu + 1))
        return t_pdf(x, nu) * (t_cdf((cy + h) / s, nu + 1) - t_cdf((cy - h) / s, nu + 1))
    return mp.quad(f, [cx - R, cx, cx + R])


def uniform_polygon(loops):
    xs = {p[0] for pts in loops for p in pts if abs(p[0]) < 2}
    xs |= {mp.mpf(-2), mp.mpf(2)}
    for pts in loops:  # where edges cross the circle of radius 2
        n = len(pts)
        for i in range(n):
            (x1, y1), (x2, y2) = pts[i], pts[(i + 1) % n]
            dx, dy = x2 - x1, y2 - y1
            a, b, c = dx * dx + dy * dy, 2 * (x1 * dx + y1 * dy), x1 * x1 + y1 * y1 - 4
            disc = b * b - 4 * a * c
            if a > 0 and disc > 0:
                for t in ((-b - mp.sqrt(disc)) / (2 * a), (-b + mp.sqrt(disc)) / (2 * a)):
                    if 0 <= t <= 1:
                        xs.add(x1 + t * dx)
    xs = sorted(x for x in xs if -2 <= x <= 2)
    def f(x):
        h = mp.sqrt(max(4 - x * x, 0))
        return sum(max(min(hi, h) - max(lo, -h), 0) for lo, hi in crossings(loops, x))
    return mp.quad(f, xs) / (4 * mp.pi)


def emit(name, source, family, nu, mean, cov, shape, numbers, p, q):
    nums = " ".join(repr(float(v)) for v in numbers)
    out.append(f"{name};{source};{family};{nu!r};{mean[0]!r};{mean[1]!r};{cov[0][0]!r};{cov[0][1]!r};"
               f"{cov[1][1]!r};{shape};{nums};{mp.nstr(p, 22)};{mp.nstr(q, 22)}")


def random_spread():
    s1, s2 = 10 ** rng.uniform(-0.5, 0.5, 2)
    rho = rng.uniform(-0.8, 0.8)
    return [[s1 * s1, rho * s1 * s2], [rho * s1 * s2, s2 * s2]]


def cholesky(cov):
    l00 = mp.sqrt(cov[0][0])
    l10 = cov[0][1] / l00
    return [[l00, 0], [l10, mp.sqrt(cov[1][1] - l10 * l10)]]


def random_polygon(scale, centre, n):
    # A star-shaped (possibly non-convex) polygon, counter-clockwise; no gap between angles of
    # pi or more, where an edge would pass behind the centre and the polygon could cross itself.
    while True:
        angles = np.sort(rng.uniform(0, 2 * np.pi, n))
        gaps = np.diff(np.concatenate([angles, [angles[0] + 2 * np.pi]]))
        if gaps.max() < 0.9 * np.pi:
            break
    radii = scale * rng.uniform(0.4, 1.0, n)
    return [(float(centre[0] + r * np.cos(a)), float(centre[1] + r * np.sin(a))) for a, r in zip(angles, radii)]


# --- Student-t over polygons (near, far, heavy and light tails) -----------------------------
for i in range(16):
    nu = float([0.5, 1.0, 2.0, 3.0, 4.0, 10.0, 30.0][i % 7])
    cov = random_spread()
    mean = (float(rng.uniform(-1, 1)), float(rng.uniform(-1, 1)))
    dist = [0.0, 0.5, 2.0, 6.0, 30.0][i % 5]
    ang = rng.uniform(0, 2 * np.pi)
    centre = (mean[0] + dist * np.cos(ang), mean[1] + dist * np.sin(ang))
    pts = random_polygon(float(rng.uniform(0.3, 3.0)), centre, int(rng.integers(3, 9)))
    z = whiten(pts, mean, cholesky(cov))
    p = t_polygon([z], mp.mpf(nu))
    emit(f"t_polygon_{i}", "t_conditional", "student_t", nu, mean, cov, "polygon",
         [c for pt in pts for c in pt], p, 1 - p)

# --- Student-t over disks under a circular scale ---------------------------------------------
for i in range(8):
    nu = float([0.7, 1.5, 3.0, 8.0][i % 4])
    s = float(10 ** rng.uniform(-0.5, 0.5))
    d = float([0.0, 0.3, 1.5, 5.0, 40.0, 0.9, 3.0, 12.0][i]) * s
    R = float(rng.uniform(0.2, 3.0)) * s
    ang = rng.uniform(0, 2 * np.pi)
    c = (d * np.cos(ang), d * np.sin(ang))
    p = t_disk((mp.mpf(c[0]) / s, mp.mpf(c[1]) / s), mp.mpf(R) / s, mp.mpf(nu))
    if d == 0.0:  # the reference itself against the closed form 1 - (1 + R^2/nu)^(-nu/2) (CHECKS.md)
        closed = 1 - (1 + (mp.mpf(R) / s) ** 2 / nu) ** (-mp.mpf(nu) / 2)
        assert abs(p - closed) < mp.mpf(10) ** -25 * closed, (p, closed)
    emit(f"t_disk_{i}", "t_conditional", "student_t", nu, (0.0, 0.0), [[s * s, 0.0], [0.0, s * s]], "disk",
         (c[0], c[1], R), p, 1 - p)

# --- Student-t over rectangles, p from about 0.3 down to 1e-12 -------------------------------
# Axis-aligned rectangles in the site frame under a correlated scale (so that whitened they are
# parallelograms), at whole and fractional nu (the closed form and quadrature paths of the
# exact method), placed along a direction at whitened distances that take p down the tail.
for i, (nu, dist) in enumerate([(1.0, 0.3), (2.5, 4.0), (4.0, 40.0), (4.0, 300.0), (6.5, 60.0), (30.0, 14.0)]):
    cov = [[1.44, 0.5], [0.5, 0.49]]
    mean = (0.3, -0.2)
    L = cholesky(cov)
    ang = 0.4 + 0.9 * i
    wc = (dist * np.cos(ang), dist * np.sin(ang))
    cx, cy = float(mean[0] + L[0][0] * wc[0]), float(mean[1] + L[1][0] * wc[0] + L[1][1] * wc[1])
    w, d = 1.0 + 0.3 * i, 0.6 + 0.2 * i
    pts = [(cx - w / 2, cy - d / 2), (cx + w / 2, cy - d / 2), (cx + w / 2, cy + d / 2), (cx - w / 2, cy + d / 2)]
    p = t_polygon([whiten(pts, mean, L)], mp.mpf(nu))
    emit(f"t_rectangle_{i}", "t_conditional", "student_t", nu, mean, cov, "polygon",
         [c for pt in pts for c in pt], p, 1 - p)

# --- uniform over polygons: inside, across the edge, outside --------------------------------
for i in range(10):
    cov = random_spread()
    mean = (float(rng.uniform(-1, 1)), float(rng.uniform(-1, 1)))
    L = cholesky(cov)
    dist = [0.0, 0.8, 1.6, 2.2, 1.0][i % 5]
    ang = rng.uniform(0, 2 * np.pi)
    # Placed in whitened units, so that the polygon meets the disk of radius 2 as intended.
    wc = (dist * np.cos(ang), dist * np.sin(ang))
    wpts = random_polygon(float(rng.uniform(0.3, 1.5)), wc, int(rng.integers(3, 9)))
    pts = [(float(mean[0] + L[0][0] * x), float(mean[1] + L[1][0] * x + L[1][1] * y)) for x, y in wpts]
    z = whiten(pts, mean, L)
    p = uniform_polygon([z])
    emit(f"uniform_polygon_{i}", "uniform_area", "uniform", 0.0, mean, cov, "polygon",
         [c for pt in pts for c in pt], p, 1 - p)

assert len(out) == 40, len(out)
with open(sys.argv[1], "w") as f:
    f.write("\n".join(out) + "\n")
