"""Polygon helpers shared by the reference scripts that integrate in polar coordinates about a
point (make_profile_references.py, make_profile_edge_references.py), in mpmath arithmetic.

The crossing and even-odd rules are the textbook ones (J. O'Rourke, "Computational Geometry in
C", 2nd ed., 1998, section 7.4, point in polygon by ray crossings), written here so that both
scripts share one copy.
"""


def ray_crossings(q, ux, uy):
    """Sorted distances t > 0 at which the ray t (ux, uy) from the origin crosses the edges of
    the closed polygon q (edges parallel to the ray are skipped; a vertex counts for the edge
    that starts there)."""
    n = len(q)
    ts = []
    for i in range(n):
        (x1, y1), (x2, y2) = q[i], q[(i + 1) % n]
        ex, ey = x2 - x1, y2 - y1
        den = ux * ey - uy * ex
        if den == 0:
            continue
        # x1 + s e = t u
        t = (x1 * ey - y1 * ex) / den
        s = (x1 * uy - y1 * ux) / den
        if 0 <= s < 1 and t > 0:
            ts.append(t)
    ts.sort()
    return ts


def contains(q, px, py):
    """Whether (px, py) is inside the closed polygon q (even-odd rule, ray towards +x)."""
    n = len(q)
    inside = False
    for i in range(n):
        (x1, y1), (x2, y2) = q[i], q[(i + 1) % n]
        if (y1 > py) != (y2 > py):
            xc = x1 + (py - y1) * (x2 - x1) / (y2 - y1)
            if xc > px:
                inside = not inside
    return inside
