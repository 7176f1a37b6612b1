"""strewn.probability against independent references: scipy.stats.multivariate_normal.cdf on
rectangles, scipy.special.owens_t on wedges, published closed forms on disks and ring sectors."""
import math

import numpy as np
import pytest
from scipy import special, stats

import strewn


def rectangle_probability_scipy(mean, cov, lo, hi):
    """P(lo <= X <= hi) by scipy's multivariate normal CDF with a lower limit (Genz's
    algorithm; abseps and releps pushed to 1e-14)."""
    return stats.multivariate_normal.cdf(hi, mean, cov, lower_limit=lo, abseps=1e-14, releps=1e-14)


RECTANGLE_CASES = [
    # mean, covariance (m^2), lower corner, upper corner (m)
    ((0.0, 0.0), [[1.0, 0.0], [0.0, 1.0]], (-1.0, -0.5), (0.7, 2.0)),
    ((0.3, 6.0), [[0.09, 0.03], [0.03, 0.04]], (0.2, 5.8), (1.1, 6.4)),
    ((0.0, 0.0), [[4.0, -1.5], [-1.5, 1.0]], (0.5, 0.5), (3.0, 1.5)),
    ((1.0, -2.0), [[0.25, 0.0], [0.0, 2.25]], (1.5, -1.0), (2.5, 3.0)),
]


@pytest.mark.parametrize("mean,cov,lo,hi", RECTANGLE_CASES)
def test_rectangles_match_scipy_multivariate_normal_cdf(mean, cov, lo, hi):
    # Source: scipy.stats.multivariate_normal.cdf (Genz's bivariate algorithm); its own error is
    # about 1e-15 in two dimensions (measured differences up to 5.6e-16), so 2e-15 absolute is
    # allowed on top of strewn's bound.
    ref = rectangle_probability_scipy(mean, cov, lo, hi)
    model = strewn.Normal(mean, cov)
    centre = ((lo[0] + hi[0]) / 2, (lo[1] + hi[1]) / 2)
    r = strewn.probability(model, strewn.Region.rectangle(centre, hi[0] - lo[0], hi[1] - lo[1]))
    assert r.status == "converged" and r.method == "exact"
    assert abs(r.p - ref) <= r.abs_err + 2e-15, (r.p, ref, r.abs_err)
    assert abs(r.q - (1 - ref)) <= r.q_abs_err + 2e-15
    # The same rectangle as a polygon gives the same probability.
    poly = strewn.Region.polygon([lo, (hi[0], lo[1]), hi, (lo[0], hi[1])])
    assert abs(strewn.probability(model, poly).p - r.p) <= 2 * r.abs_err + 1e-16


@pytest.mark.parametrize("h,a", [(0.5, 0.5), (1.0, 1.0), (2.0, 0.3), (3.0, 2.5), (5.0, 0.8), (8.0, 0.2)])
def test_wedges_match_scipy_owens_t(h, a):
    # Source: Owen (1956): T(h, a) = P(X > h, 0 < Y < a X) for independent standard normals;
    # reference scipy.special.owens_t. The wedge is cut at x = h + 40 (Q(h + 40) < 1e-300).
    far = h + 40.0
    wedge = strewn.Region.polygon([(h, 0.0), (far, 0.0), (far, a * far), (h, a * h)])
    ref = special.owens_t(h, a)
    r = strewn.probability(strewn.Normal((0, 0), np.eye(2)), wedge, rel_tol=1e-10)
    assert r.status == "converged"
    assert abs(r.p - ref) <= r.abs_err + 1e-14 * ref, (r.p, ref, r.abs_err)
    assert r.abs_err <= 1e-10 * ref


def test_wedge_under_a_correlated_spread_matches_owens_t():
    # The same Owen's T wedge pushed through x = m + L z (L lower triangular): the probability is
    # invariant. Source: scipy.special.owens_t(1.5, 0.7).
    L = np.array([[0.3, 0.0], [0.12, 0.2]])
    m = np.array([2.0, 5.0])
    h, a, far = 1.5, 0.7, 41.5
    z = np.array([(h, 0.0), (far, 0.0), (far, a * far), (h, a * h)])
    x = z @ L.T + m
    r = strewn.probability(strewn.Normal(m, L @ L.T), strewn.Region.polygon(x))
    assert abs(r.p - special.owens_t(h, a)) <= r.abs_err + 1e-15


def test_disk_and_ring_sector_closed_forms():
    # Source: Rayleigh distribution: P(r1 <= |Z| <= r2, angle in a sector of width w) =
    # (exp(-r1^2/2) - exp(-r2^2/2)) w / (2 pi) for a standard circular normal (sigma 0.5 here).
    s = 0.5
    model = strewn.Normal.from_axes((1.0, 2.0), s, s, 0.0)
    r = strewn.probability(model, strewn.Region.disk((1.0, 2.0), 0.8))
    assert abs(r.p - (-math.expm1(-0.5 * (0.8 / s) ** 2))) <= r.abs_err + 1e-16
    sector = strewn.Region.ring_sector((1.0, 2.0), 0.3, 1.1, 20.0, 110.0)
    ref = (math.exp(-0.5 * (0.3 / s) ** 2) - math.exp(-0.5 * (1.1 / s) ** 2)) * 90.0 / 360.0
    r = strewn.probability(model, sector)
    assert abs(r.p - ref) <= r.abs_err + 1e-16


def test_spread_factories_follow_their_definitions():
    # Sources: CEP = sigma sqrt(2 ln 2); R95 = sigma sqrt(-2 ln 0.05); fraction p within a:
    # sigma = a / sqrt(-2 ln(1 - p)) (Rayleigh); a disk of radius CEP about the mean holds 1/2.
    assert strewn.Normal.from_cep((0, 0), 1.0).axes[0] == pytest.approx(1 / math.sqrt(2 * math.log(2)), rel=1e-15)
    assert strewn.Normal.from_r95((0, 0), 1.0).axes[0] == pytest.approx(1 / math.sqrt(-2 * math.log(0.05)), rel=1e-15)
    n = strewn.Normal.from_fraction((0, 0), 0.9, 0.5)
    assert n.axes[0] == pytest.approx(0.5 / math.sqrt(-2 * math.log(0.1)), rel=1e-15)
    r = strewn.probability(strewn.Normal.from_cep((3, 4), 0.7), strewn.Region.disk((3, 4), 0.7))
    assert abs(r.p - 0.5) <= r.p_abs_err
    axes = strewn.Normal.from_axes((0, 6), 0.3, 0.18, 80.0)
    assert axes.axes == pytest.approx((0.3, 0.18, 80.0), rel=1e-13)
    np.testing.assert_allclose(axes.mean, [0, 6])


def test_mixture_is_the_weighted_sum():
    # Source: definition of a mixture; each component's bound adds with its weight.
    core = strewn.Normal.from_axes((0, 6), 0.30, 0.18, 80)
    wild = strewn.Normal.from_axes((0, 6), 0.9, 0.9, 0)
    mix = strewn.Mixture([(0.95, core), (0.05, wild)])
    door = strewn.Region.rectangle((1.0, 6.0), 0.9, 2.0)
    a, b, m = (strewn.probability(x, door) for x in (core, wild, mix))
    assert abs(m.p - (0.95 * a.p + 0.05 * b.p)) <= m.abs_err + 0.95 * a.abs_err + 0.05 * b.abs_err
    assert len(mix.components) == 2 and mix.components[0][0] == 0.95


def test_other_methods_agree_within_their_bounds():
    # Source: the exact method (checked above against scipy) as the reference for cubature and
    # Monte Carlo; Monte Carlo's interval is Clopper-Pearson at the stated confidence.
    model = strewn.Normal((0.2, 0.1), [[1.0, 0.3], [0.3, 0.5]])
    region = strewn.Region.polygon([(0, 0), (2, 0.2), (1.5, 1.4), (0.1, 1.0)])
    exact = strewn.probability(model, region)
    cub = strewn.probability(model, region, method="cubature", rel_tol=1e-9)
    assert cub.method == "cubature" and abs(cub.p - exact.p) <= cub.abs_err + exact.abs_err
    mc = strewn.probability(model, region, method="monte_carlo", samples=200_000, seed=7)
    assert mc.method == "monte_carlo" and mc.interval[0] <= exact.p <= mc.interval[1]
    assert exact.interval is None


def test_regions_from_geo_interface_and_wkt():
    # Source: shoelace areas of the squares; a Polygon from any __geo_interface__ object (what
    # shapely gives) equals the same polygon built directly.
    class Shape:
        __geo_interface__ = {"type": "Polygon",
                             "coordinates": [[[0, 0], [4, 0], [4, 3], [0, 3], [0, 0]],
                                             [[1, 1], [1, 2], [2, 2], [2, 1], [1, 1]]]}
    geo = strewn.Region.from_geo(Shape())
    direct = strewn.Region.polygon([(0, 0), (4, 0), (4, 3), (0, 3)], holes=[[(1, 1), (2, 1), (2, 2), (1, 2)]])
    wkt = strewn.Region.from_wkt("POLYGON ((0 0, 4 0, 4 3, 0 3, 0 0), (1 1, 1 2, 2 2, 2 1, 1 1))")
    assert geo.area == direct.area == wkt.area == 11.0
    model = strewn.Normal.from_axes((1.5, 1.5), 1.0, 0.5, 30)
    ps = [strewn.probability(model, r) for r in (geo, direct, wkt, Shape())]
    assert max(r.p for r in ps) - min(r.p for r in ps) <= 2 * max(r.abs_err for r in ps)
    assert strewn.Region.from_geojson(Shape.__geo_interface__).area == 11.0


def test_plugin_shapes_and_boolean_operations():
    # Source: areas: a unit disk is pi; a person footprint is a kind from the plugins; the union
    # of two disjoint disks holds the sum of their probabilities.
    kinds = {k["name"] for k in strewn.shape_kinds()}
    assert {"polygon", "rectangle", "disk", "ellipse", "ring_sector", "doorway", "person"} <= kinds
    person = strewn.shape("person", centre=np.array([2.0, 1.0]))
    assert person.area > 0
    a, b = strewn.Region.disk((0, 0), 1), strewn.Region.disk((3, 0), 1)
    model = strewn.Normal.from_axes((1.5, 0), 1.0, 1.0, 0)
    u = strewn.probability(model, a | b)
    pa, pb = strewn.probability(model, a), strewn.probability(model, b)
    assert abs(u.p - (pa.p + pb.p)) <= u.abs_err + pa.abs_err + pb.abs_err
    assert (a - strewn.Region.disk((0, 0), 0.5)).area == pytest.approx(0.75 * math.pi, rel=1e-5)


def test_region_polygon_is_the_polygon_plugins_region_and_refusals():
    # Region.polygon without holes is built in the module (no JSON round trip); it must give
    # the plugin's region (same probability, bit for bit, and area) and the plugin's refusals.
    poly = [(0.2, 0.1), (1.0, 0.0), (1.5, 0.6), (1.2, 1.3), (0.6, 1.5), (0.0, 1.1), (-0.3, 0.6), (-0.1, 0.3)]
    model = strewn.Normal([0.3, 0.2], [[1.0, 0.3], [0.3, 0.5]])
    for ring in (poly, poly[::-1], poly + [poly[0]]):
        fast, plugin = strewn.Region.polygon(ring), strewn.shape("polygon", outer=ring)
        assert fast.area == plugin.area
        assert strewn.probability(model, fast).p == strewn.probability(model, plugin).p
    for bad in ([(0, 0), (1, 1), (0, 1), (1, 0)], [(0, 0), (1, 0)], [(0, 0), (1, 0), (0, 0)],
                [(0, 0), (1, 0), (2, 0)]):
        with pytest.raises(strewn.InputError) as fast:
            strewn.Region.polygon(bad)
        with pytest.raises(strewn.InputError) as plugin:
            strewn.shape("polygon", outer=bad)
        assert str(fast.value) == str(plugin.value)
    with pytest.raises(strewn.InputError, match="hole 1 lies outside"):
        strewn.Region.polygon([(0, 0), (4, 0), (4, 4), (0, 4)], holes=[[(5, 5), (6, 5), (6, 6)]])
