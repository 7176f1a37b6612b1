#!/usr/bin/python3
"""Reference probabilities of the profile family (a measured radial rate, linear between rows)
for tests/engine/integrate/profile_reference_test.cpp, computed at test time with Debian's
python3-mpmath -- never with strewn itself.

Each output line:  name;source;rows;head;wind;arc;polygon;p
  rows     d1 v1 d2 v2 ... (metres, rate)
  head     hx hy;  wind  stretch shift downwind_deg;  arc  from_deg to_deg (or 'none')
  polygon  x1 y1 x2 y2 ... (site metres, counter-clockwise)

Source 'polar_quadrature': the model of strewn/profile_spread.hpp written out from its
definition: x = c + A q with c = head + shift w, A = I + (stretch - 1) w w^T, w the downwind unit
vector; q has density v(|q|) / V with V = integral of v(r) 2 pi r dr (by mpmath.quad, not by a
closed form), kept on the wedge of directions of A^-1 (arc rays) and divided by its share. P is
the double integral over A^-1 (polygon - c) in polar coordinates about 0: theta over the wedge
(cut at every vertex direction and where an edge crosses a row's circle, so each piece is
smooth), r over the ray's stretches inside the polygon (even-odd crossings), each by mpmath.quad
at 20 digits.
"""
import sys
import mpmath as mp

from polar_polygon import contains, ray_crossings

mp.mp.dps = 20
out = []


def rate(rows, r):
    if r >= rows[-1][0]:
        return mp.mpf(0)
    if r <= rows[0][0]:
        return mp.mpf(rows[0][1])
    for (d1, v1), (d2, v2) in zip(rows, rows[1:]):
        if d1 <= r <= d2:
            return v1 + (v2 - v1) * (r - d1) / (d2 - d1)
    return mp.mpf(0)


def probability(rows, head, wind, arc, poly):
    stretch, shift, down = [mp.mpf(x) for x in wind]
    w = (mp.cos(down * mp.pi / 180), mp.sin(down * mp.pi / 180))
    c = (head[0] + shift * w[0], head[1] + shift * w[1])
    # A^-1 = I + (1/stretch - 1) w w^T
    k = 1 / stretch - 1
    def inv(x, y):
        d = w[0] * x + w[1] * y
        return (x + k * d * w[0], y + k * d * w[1])
    def fwd_dir(x, y):
        d = w[0] * x + w[1] * y
        return (x + (stretch - 1) * d * w[0], y + (stretch - 1) * d * w[1])
    q = [inv(mp.mpf(x) - c[0], mp.mpf(y) - c[1]) for x, y in poly]
    ds = [mp.mpf(d) for d, _ in rows]
    R = ds[-1]
    V = mp.quad(lambda r: rate(rows, r) * 2 * mp.pi * r, [0] + ds)
    if arc is None:
        t0, t1, share = mp.mpf(0), 2 * mp.pi, mp.mpf(1)
    else:
        a0 = mp.mpf(arc[0]) * mp.pi / 180
        sweep = ((mp.mpf(arc[1]) - mp.mpf(arc[0])) % 360) * mp.pi / 180
        # the calm arc's rays as they fall on the site, then pulled back by A^-1: the calm angles
        t0, t1 = a0, a0 + sweep
        share = sweep / (2 * mp.pi)
        # the wedge is in the calm frame q (A carries rays to rays): nothing else to do
    n = len(q)
    def stretches(th):
        ts = ray_crossings(q, mp.cos(th), mp.sin(th))
        inside0 = winding(0, 0)
        pts = ([mp.mpf(0)] if inside0 else []) + ts
        return [(pts[j], pts[j + 1]) for j in range(0, len(pts) - 1, 2)]
    def winding(px, py):
        return contains(q, px, py)
    def radial(a, b):
        a, b = max(a, 0), min(b, R)
        if b <= a:
            return mp.mpf(0)
        cuts = [a] + [d for d in ds if a < d < b] + [b]
        return mp.quad(lambda r: rate(rows, r) * r, cuts)
    def inner(th):
        return sum(radial(a, b) for a, b in stretches(th))
    cuts = {t0, t1}
    def add_angle(x, y):
        a = mp.atan2(y, x)
        for m in (-2, -1, 0, 1, 2):
            v = a + 2 * mp.pi * m
            if t0 < v < t1:
                cuts.add(v)
    for x, y in q:
        add_angle(x, y)
    for i in range(n):
        (x1, y1), (x2, y2) = q[i], q[(i + 1) % n]
        ex, ey = x2 - x1, y2 - y1
        for d in ds:
            aa, bb, cc = ex * ex + ey * ey, 2 * (x1 * ex + y1 * ey), x1 * x1 + y1 * y1 - d * d
            disc = bb * bb - 4 * aa * cc
            if disc > 0:
                for s in ((-bb - mp.sqrt(disc)) / (2 * aa), (-bb + mp.sqrt(disc)) / (2 * aa)):
                    if 0 <= s <= 1:
                        add_angle(x1 + s * ex, y1 + s * ey)
    cuts = sorted(cuts)
    return mp.quad(inner, cuts) / V / share


def emit(name, rows, head, wind, arc, poly):
    p = probability(rows, head, wind, arc, poly)
    r = " ".join(f"{d!r} {v!r}" for d, v in rows)
    a = "none" if arc is None else f"{arc[0]!r} {arc[1]!r}"
    pts = " ".join(f"{x!r} {y!r}" for x, y in poly)
    out.append(f"{name};polar_quadrature;{r};{head[0]!r} {head[1]!r};{wind[0]!r} {wind[1]!r} {wind[2]!r};{a};{pts};{mp.nstr(p, 18)}")


leg = [(0.5, 9.0), (2.0, 12.0), (4.0, 11.0), (6.0, 12.5), (8.0, 8.0), (10.0, 3.0), (11.0, 0.0)]
cone = [(0.0, 1.0), (10.0, 0.0)]
square = [(-1.0, -1.0), (3.0, -1.0), (3.0, 2.0), (-1.0, 2.0)]
far_tri = [(6.0, 1.0), (12.0, 3.0), (7.0, 7.0)]
across = [(8.0, -3.0), (14.0, -3.0), (14.0, 4.0), (8.0, 4.0)]  # across the wetted edge
star = [(2.0, 0.0), (5.0, 1.5), (2.5, 2.0), (3.0, 6.0), (0.5, 3.0), (-3.0, 4.0), (-1.0, 1.0), (-4.0, -2.0), (1.0, -1.0)]

emit("cone_square", cone, (0.0, 0.0), (1.0, 0.0, 0.0), None, square)
emit("cone_far_triangle", cone, (0.5, -0.5), (1.0, 0.0, 0.0), None, far_tri)
emit("leg_across_edge", leg, (1.0, 0.0), (1.0, 0.0, 0.0), None, across)
emit("leg_star", leg, (0.0, 0.0), (1.0, 0.0, 0.0), None, star)
emit("leg_wind_square", leg, (-2.0, 1.0), (1.3, 0.8, 30.0), None, square)
emit("leg_wind_far", leg, (0.0, 0.0), (1.2, 1.5, 10.0), None, far_tri)
emit("leg_wind_shrink", leg, (0.0, 0.0), (0.8, 0.5, 200.0), None, star)
emit("wedge_quarter_star", leg, (0.0, 0.0), (1.0, 0.0, 0.0), (0.0, 90.0), star)
emit("wedge_half_across", leg, (1.0, 0.0), (1.0, 0.0, 0.0), (-90.0, 90.0), across)
emit("wedge_wide_square", leg, (0.5, 0.5), (1.0, 0.0, 0.0), (120.0, 60.0), square)
emit("wedge_wind_star", cone, (0.0, 0.0), (1.25, 0.6, 45.0), (30.0, 200.0), star)

with open(sys.argv[1], "w") as f:
    f.write("\n".join(out) + "\n")
