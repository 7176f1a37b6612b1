#!/usr/bin/python3
"""Reference probabilities of the profile family over polygons whose straight edges stress the
exact method's closed form for profile edges (engine/src/integrate/exact/family_segment.cpp):
edges that pass within 1e-9 of the head, graze a row's circle, cross steep pieces of the rate,
lie in the last sliver before the wetted radius, and profiles whose rate rises outwards. For
tests/engine/integrate/profile_reference_test.cpp, computed at test time with Debian's
python3-mpmath -- never with strewn itself.

Each output line:  name;source;rows;head;wind;polygon;p
  rows     d1 v1 d2 v2 ... (metres, rate);  head hx hy;  wind stretch shift downwind_deg
  polygon  x1 y1 x2 y2 ... (site metres, counter-clockwise)

Source 'polar_exact_radial': P = (1 / V) double integral of v(r) r dr dtheta over the polygon
pulled back by the wind's A^-1 (the model of strewn/profile_spread.hpp written out from its
definition, as in make_profile_references.py), in polar coordinates about the head. The radial
integral is done exactly: v is linear between rows, so integral of v(s) s ds over a piece is
a0 s^2 / 2 + b s^3 / 3 (a0 + b s the rate on the piece), summed in 30-digit arithmetic; the
angle by mpmath.quad, cut at every vertex direction and wherever an edge crosses a row's circle.
"""
import sys
import mpmath as mp

from polar_polygon import contains, ray_crossings

mp.mp.dps = 30
out = []


def radial_mass(rows, rho):
    """Integral from 0 to rho of v(s) s ds (exact, piecewise polynomial)."""
    rho = mp.mpf(rho)
    d0, v0 = mp.mpf(rows[0][0]), mp.mpf(rows[0][1])
    total = v0 * min(rho, d0) ** 2 / 2
    for (d1, v1), (d2, v2) in zip(rows, rows[1:]):
        d1, v1, d2, v2 = (mp.mpf(x) for x in (d1, v1, d2, v2))
        if rho <= d1:
            break
        hi = min(rho, d2)
        b = (v2 - v1) / (d2 - d1)
        a0 = v1 - b * d1
        total += a0 * (hi ** 2 - d1 ** 2) / 2 + b * (hi ** 3 - d1 ** 3) / 3
    return total


def probability(rows, head, wind, poly):
    stretch, shift, down = [mp.mpf(x) for x in wind]
    w = (mp.cos(down * mp.pi / 180), mp.sin(down * mp.pi / 180))
    c = (head[0] + shift * w[0], head[1] + shift * w[1])
    k = 1 / stretch - 1  # A^-1 = I + (1/stretch - 1) w w^T

    def inv(x, y):
        d = w[0] * x + w[1] * y
        return (x + k * d * w[0], y + k * d * w[1])

    q = [inv(mp.mpf(x) - c[0], mp.mpf(y) - c[1]) for x, y in poly]
    n = len(q)
    ds = [mp.mpf(d) for d, _ in rows]
    total = radial_mass(rows, ds[-1])

    origin_inside = contains(q, 0, 0)

    def inner(th):
        ts = ray_crossings(q, mp.cos(th), mp.sin(th))
        pts = ([mp.mpf(0)] if origin_inside else []) + ts
        return sum(radial_mass(rows, pts[j + 1]) - radial_mass(rows, pts[j]) for j in range(0, len(pts) - 1, 2))

    cuts = set()
    for x, y in q:
        cuts.add(mp.atan2(y, x))
    for i in range(n):
        (x1, y1), (x2, y2) = q[i], q[(i + 1) % n]
        ex, ey = x2 - x1, y2 - y1
        aa, bb = ex * ex + ey * ey, 2 * (x1 * ex + y1 * ey)
        # the foot of the perpendicular, where r is smallest along the edge
        s = -bb / (2 * aa)
        if 0 < s < 1:
            cuts.add(mp.atan2(y1 + s * ey, x1 + s * ex))
        for d in ds:
            cc = x1 * x1 + y1 * y1 - d * d
            disc = bb * bb - 4 * aa * cc
            if disc > 0:
                for s in ((-bb - mp.sqrt(disc)) / (2 * aa), (-bb + mp.sqrt(disc)) / (2 * aa)):
                    if 0 <= s <= 1:
                        cuts.add(mp.atan2(y1 + s * ey, x1 + s * ex))
    # The whole turn, cut at every direction above (the ray's stretches vanish where the
    # polygon is not).
    cuts = [-mp.pi] + sorted(a for a in cuts if -mp.pi < a < mp.pi) + [mp.pi]
    return mp.quad(inner, cuts) / (2 * mp.pi * total)


def emit(name, rows, head, wind, poly):
    p = probability(rows, head, wind, poly)
    r = " ".join(f"{d!r} {v!r}" for d, v in rows)
    pts = " ".join(f"{x!r} {y!r}" for x, y in poly)
    out.append(f"{name};polar_exact_radial;{r};{head[0]!r} {head[1]!r};{wind[0]!r} {wind[1]!r} {wind[2]!r};{pts};{mp.nstr(p, 20)}")


calm = (1.0, 0.0, 0.0)
leg = [(0.5, 9.0), (2.0, 12.0), (4.0, 11.0), (6.0, 12.5), (8.0, 8.0), (10.0, 3.0), (11.0, 0.0)]
steep = [(0.0, 10.0), (4.9, 10.0), (5.0, 0.0)]              # a drop to 0 over the last 2% of R
ring = [(0.0, 0.0), (3.0, 2.0), (6.0, 9.0), (7.0, 4.0), (8.0, 0.0)]  # rising outwards
flat_step = [(0.0, 4.0), (6.0, 4.0)]                        # constant, a step at R

# Edges through the whole range of the leg, the head inside a non-convex polygon.
emit("leg_star_inside", leg, (0.0, 0.0), calm,
     [(2.0, 0.0), (9.0, 1.5), (2.5, 2.0), (3.0, 10.0), (0.5, 3.0), (-7.0, 4.0), (-1.0, 1.0), (-8.0, -6.0), (1.0, -1.0)])
# An edge 1e-9 m from the head (the near form and a sweep of almost pi along one edge).
emit("leg_edge_by_head", leg, (0.0, 0.0), calm, [(-3.0, 1e-9), (3.0, 1e-9), (2.0, 3.0), (-2.0, 2.5)])
# A tiny triangle next to the head (p ~ 1e-9).
emit("leg_tiny_by_head", leg, (0.0, 0.0), calm, [(1e-4, 1e-4), (3e-4, 1e-4), (2e-4, 2.5e-4)])
# An edge grazing the circle of the row at 4 m from outside (1e-7 m away) and one from inside.
emit("leg_grazing_row", leg, (0.0, 0.0), calm, [(-3.0, 4.0000001), (3.0, 4.0000001), (3.0, 6.0), (-3.0, 6.0)])
emit("leg_grazing_inside", leg, (0.0, 0.0), calm, [(-3.0, 5.9999999), (3.0, 5.9999999), (3.0, 7.0), (-3.0, 7.0)])
# The steep last piece: a strip across it and a sliver in its last 1% (p small).
emit("steep_strip", steep, (0.0, 0.0), calm, [(4.8, -1.0), (5.3, -1.0), (5.3, 1.0), (4.8, 1.0)])
emit("steep_sliver", steep, (0.0, 0.0), calm, [(4.99, -0.05), (5.2, -0.05), (5.2, 0.05), (4.99, 0.05)])
# A ring profile (rate rising outwards) under a wind, a square off the head.
emit("ring_wind_square", ring, (0.5, -0.5), (1.3, 0.7, 40.0), [(1.0, 1.0), (6.0, 0.5), (6.5, 5.0), (0.5, 6.0)])
# A constant rate ending in a step: a thin strip far out along a chord.
emit("flat_step_chord", flat_step, (0.0, 0.0), calm, [(-8.0, 5.5), (8.0, 5.5), (8.0, 5.6), (-8.0, 5.6)])
# The leg under a stretching wind, a long thin strip crossing every row's circle.
emit("leg_wind_strip", leg, (1.0, 2.0), (1.2, 1.0, 300.0), [(-12.0, 0.3), (12.0, 0.2), (12.0, 0.5), (-12.0, 0.6)])

with open(sys.argv[1], "w") as f:
    f.write("\n".join(out) + "\n")
