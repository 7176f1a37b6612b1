#!/usr/bin/python3
# 30-digit mpmath references of family_properties_test's "cubature's estimate covers the kinks
# its rule could straddle" (run by hand with Debian's /usr/bin/python3: prints each case's p).
# The uniform: the area of the whitened polygon inside the disk of radius 2, segment by segment,
# over 4 pi. The profiles (rows at whitened 0, 2/3, 4/3, 2 with rates 5, 7, 4 and 0 or 2): the
# boundary form, the integral of G(rho) dtheta / (2 pi) along each edge's part inside the wedge,
# by tanh-sinh between the edge's crossings of the rows, divided by the wedge's whitened share.
# Whitening by the Cholesky factor of the covariance (p does not depend on the choice).
from mpmath import mp, mpf, sqrt, atan2, pi, quad, cos, sin
mp.dps = 30
def seg_disk(a, b, R):
    # signed area of triangle (0, a, b) intersected with disk radius R
    ax, ay = a; bx, by = b
    dx, dy = bx-ax, by-ay
    A = dx*dx+dy*dy; B = 2*(ax*dx+ay*dy); C = ax*ax+ay*ay-R*R
    ts = [mpf(0)]
    disc = B*B-4*A*C
    if disc > 0:
        sq = sqrt(disc)
        for t in ((-B-sq)/(2*A), (-B+sq)/(2*A)):
            if 0 < t < 1: ts.append(t)
    ts.append(mpf(1)); ts.sort()
    tot = mpf(0)
    for t0, t1 in zip(ts, ts[1:]):
        p = (ax+t0*dx, ay+t0*dy); q = (ax+t1*dx, ay+t1*dy)
        tm = (t0+t1)/2; mx, my = ax+tm*dx, ay+tm*dy
        if mx*mx+my*my <= R*R:
            tot += (p[0]*q[1]-p[1]*q[0])/2
        else:
            ang = atan2(p[0]*q[1]-p[1]*q[0], p[0]*q[0]+p[1]*q[1])
            tot += R*R*ang/2
    return tot
def p_uniform(cov, mean, pts):
    c00, c11, c01 = [mpf(x) for x in cov]
    l00 = sqrt(c00); l10 = c01/l00; l11 = sqrt(c11 - l10*l10)
    ys = []
    for x, y in pts:
        dx = mpf(x)-mpf(mean[0]); dy = mpf(y)-mpf(mean[1])
        y0 = dx/l00; y1 = (dy - l10*y0)/l11
        ys.append((y0, y1))
    s = sum(seg_disk(ys[i], ys[(i+1)%len(ys)], mpf(2)) for i in range(len(ys)))
    return abs(s)/(4*pi)
R_ = [mpf(0), mpf(2)/3, mpf(4)/3, mpf(2)]
def rates(kind):
    return [mpf(5), mpf(7), mpf(4), mpf(0) if kind == 1 else mpf(2)]
def make_G(kind):
    v = rates(kind)
    def piece(i, a, b):  # integral of v(r) r dr over [a, b] within piece i
        s = (v[i+1]-v[i])/(R_[i+1]-R_[i]); a0 = v[i]-s*R_[i]
        return a0*(b*b-a*a)/2 + s*(b**3-a**3)/3
    Z = sum(piece(i, R_[i], R_[i+1]) for i in range(3))
    def G(r):
        if r >= 2: return mpf(1)
        tot = mpf(0)
        for i in range(3):
            if r <= R_[i]: break
            tot += piece(i, R_[i], min(r, R_[i+1]))
        return tot/Z
    return G
def whiten(cov, mean, pts):
    c00, c11, c01 = [mpf(x) for x in cov]
    l00 = sqrt(c00); l10 = c01/l00; l11 = sqrt(c11 - l10*l10)
    def w(x, y):
        dx = mpf(x)-mpf(mean[0]); dy = mpf(y)-mpf(mean[1])
        y0 = dx/l00; return (y0, (dy - l10*y0)/l11)
    return w
def p_profile(cov, mean, arc, kind, pts):
    G = make_G(kind)
    w = whiten(cov, mean, pts)
    P = [w(*p) for p in pts]
    wedge = None
    if arc[1] > 0:
        f = mpf(arc[0])*pi/180; sw = mpf(arc[1])*pi/180
        c00, c11, c01 = [mpf(x) for x in cov]
        # whitened directions of the wedge's rays (direction vectors, mean subtracted)
        l00 = sqrt(c00); l10 = c01/l00; l11 = sqrt(c11 - l10*l10)
        def wd(t):
            x, y = cos(t), sin(t); y0 = x/l00; return (y0, (y - l10*y0)/l11)
        a, b = wd(f), wd(f+sw)
        wf = atan2(a[1], a[0]); ws = atan2(a[0]*b[1]-a[1]*b[0], a[0]*b[0]+a[1]*b[1])
        if ws < 0: ws += 2*pi
        if sw > pi and ws < pi: ws += 2*pi
        wedge = (wf, ws)
    def inside_wedge(x, y):
        if wedge is None: return True
        a = atan2(y, x) - wedge[0]
        a = a % (2*pi)
        return a <= wedge[1]
    total = mpf(0)
    n = len(P)
    for k in range(n):
        A = P[k]; B = P[(k+1) % n]
        dx, dy = B[0]-A[0], B[1]-A[1]
        L2 = dx*dx+dy*dy
        cr = A[0]*dy - A[1]*dx   # cross(P(t), B - A), constant along the edge
        cuts = [mpf(0), mpf(1)]
        tc = -(A[0]*dx+A[1]*dy)/L2
        if 0 < tc < 1: cuts.append(tc)
        for r in R_[1:]:
            Bq = 2*(A[0]*dx+A[1]*dy); Cq = A[0]**2+A[1]**2-r*r; disc = Bq*Bq-4*L2*Cq
            if disc > 0:
                for t in ((-Bq-sqrt(disc))/(2*L2), (-Bq+sqrt(disc))/(2*L2)):
                    if 0 < t < 1: cuts.append(t)
        if wedge is not None:
            for ang in (wedge[0], wedge[0]+wedge[1]):
                d = (cos(ang), sin(ang)); den = d[0]*dy - d[1]*dx
                if den != 0:
                    t = -(d[0]*A[1]-d[1]*A[0])/den
                    if 0 < t < 1: cuts.append(t)
        cuts.sort()
        for t0, t1 in zip(cuts, cuts[1:]):
            if t1 <= t0: continue
            tm = (t0+t1)/2
            if not inside_wedge(A[0]+tm*dx, A[1]+tm*dy): continue
            def integrand(t):
                x = A[0]+t*dx; y = A[1]+t*dy; rr = x*x+y*y
                return G(sqrt(rr))*cr/rr
            total += quad(integrand, [t0, t1])
    share = 1 if wedge is None else wedge[1]/(2*pi)
    return abs(total)/(2*pi)/share
uniform_cases = {
 "seed 2, trial 1604": ((2.5636801013835817e-05, 0.00020063691353184389, -6.5424715381497236e-06), (508747.09962773439, 5000992.2042788556),
    [(508747.12329856644, 5000992.1741277669), (508747.11600643548, 5000992.2380118687), (508747.06859813846, 5000992.1934909206), (508747.08208924654, 5000992.1645664778), (508747.10915155348, 5000992.1313408231)]),
 "seed 2, trial 1640": ((4.9699435683607547, 10.110384847046252, -6.3410983690021823), (0.13227533205225683, 0.18646817217470885),
    [(0.13227533205225683, 0.18646817217470885), (-8.9658540464926162, 13.296664186099054), (-17.374136825374674, 10.521574737600655), (-18.385696471394638, 0.96209425359499523), (-8.9522338955207132, -1.1199726068759244)]),
}
# The profiles' covariances, means and wedges as the engine builds them from the test's
# profile_spread arguments (Gaussian::covariance(), ScatterFamily::arc_from_deg/arc_sweep_deg).
profile_cases = {
 "seed 8, trial 369": dict(cov=(150.49978222880512, 183.95289051645031, -17.167560485859937), mean=(-0.2664902852272415, 2.224409921882907), arc=(0, 0), kind=1, pts=[(14.261154232367293, 5.1828739372185142),(4.003327046173613, 10.31459956940764),(-1.8523207346081199, 10.193427772571294),(-1.6158805148713906, 5.1828739372185142),(-4.5557087020496105, -4.5100852103132683),(5.4340049280240228, -2.4268584756005458),]),
 "seed 11, trial 1835": dict(cov=(0.0079176365877066217, 0.0099187783408199864, 0.0029338632989671979), mean=(0.66327078774325887, 0.41821810721204927), arc=(47.76697222816739, 275.98686107853325), kind=3, pts=[(0.66339233856543911, 0.41838798635898344),(0.63934579471698882, 0.33082441233475779),(0.59805383809146551, 0.32872574759484258),(0.56185034241998566, 0.32573595138071432),(0.56234069720785773, 0.28953245570923447),(0.54255635149866432, 0.23403496911643326),(0.59805383809146551, 0.26333064705597897),(0.65362202673075831, 0.23396426706994164),]),
}
for k, (cov, mean, pts) in uniform_cases.items():
    print(k, mp.nstr(p_uniform(cov, mean, pts), 20))
for k, c in profile_cases.items():
    print(k, mp.nstr(p_profile(**c), 20))
