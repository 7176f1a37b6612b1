"""Scatter families in the Python module: the Student t against the normal scale mixture
(CHECKS.md, "Elliptical families": P_t(A) = int P_normal(A; m, S nu / w) f_chi2(w; nu) dw, by
scipy.integrate.quad over w of products of scipy.stats.norm differences on axis-parallel
rectangles), the uniform against exact areas, and the family through pickling and site files."""
import math
import pickle

import pytest
from scipy import integrate, stats

import strewn


def t_rectangle_scale_mixture(mean, sigmas, lo, hi, nu):
    def normal_given_w(w):
        k = math.sqrt(w / nu)
        p = 1.0
        for i in range(2):
            a, b = (lo[i] - mean[i]) / sigmas[i] * k, (hi[i] - mean[i]) / sigmas[i] * k
            p *= stats.norm.cdf(b) - stats.norm.cdf(a) if b < 0 else stats.norm.sf(a) - stats.norm.sf(b)
        return p * stats.chi2.pdf(w, nu)
    value, err = integrate.quad(normal_given_w, 0, math.inf, epsabs=1e-15, epsrel=1e-12, limit=500)
    return value, err


@pytest.mark.parametrize("nu,mean,sigmas,lo,hi", [
    (4.0, (0.0, 6.0), (0.3, 0.18), (0.2, 5.9), (0.9, 6.5)),
    (1.0, (0.0, 0.0), (1.0, 2.0), (3.0, -1.0), (8.0, 1.0)),
    (0.6, (1.0, -2.0), (0.5, 0.5), (-1.0, -3.0), (0.5, -2.2)),
    (25.0, (0.0, 0.0), (1.0, 1.0), (-0.5, -0.5), (1.5, 0.8)),
])
def test_student_t_rectangles_match_the_normal_scale_mixture(nu, mean, sigmas, lo, hi):
    ref, ref_err = t_rectangle_scale_mixture(mean, sigmas, lo, hi, nu)
    model = strewn.Normal.from_axes(mean, max(sigmas), min(sigmas), 0.0 if sigmas[0] >= sigmas[1] else 90.0)
    model = model.with_family("student_t", nu=nu)
    centre = ((lo[0] + hi[0]) / 2, (lo[1] + hi[1]) / 2)
    r = strewn.probability(model, strewn.Region.rectangle(centre, hi[0] - lo[0], hi[1] - lo[1]), rel_tol=1e-10)
    assert r.status == "converged"
    assert abs(r.p - ref) <= r.abs_err + ref_err + 1e-12 * ref, (r.p, ref, r.abs_err, ref_err)


def test_uniform_puts_area_over_the_ellipse_area_inside_its_support():
    # Exact areas: density 1 / (4 pi sigma_major sigma_minor) within the ellipse of semi-axes 2 sigma.
    model = strewn.Normal.from_axes((5.0, 5.0), 1.0, 0.5, 0.0).with_family("uniform")
    r = strewn.probability(model, strewn.Region.rectangle((5.2, 5.1), 0.4, 0.3), rel_tol=1e-12)
    assert r.p == pytest.approx(0.12 / (4 * math.pi * 0.5), rel=1e-12)


def test_a_family_survives_pickling_and_shows_in_repr():
    t = strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0).with_family("student_t", nu=3)
    back = pickle.loads(pickle.dumps(t))
    assert (back.family, back.nu) == ("student_t", 3.0)
    assert "student_t (nu = 3)" in repr(t)
    zone = strewn.Region.disk((0.2, 6.1), 0.25)
    assert strewn.probability(back, zone).p == strewn.probability(t, zone).p
    with pytest.raises(strewn.InputError, match="did you mean 'uniform'"):
        t.with_family("unifrom")


@pytest.mark.parametrize("arc", ["", ", arc_from_deg = 20, arc_to_deg = 250"])
def test_a_profile_source_survives_pickling_with_its_rows_and_arc(tmp_path, arc):
    # An invented leg test: rate (mm/h) at distances (m) from a head.
    (tmp_path / "leg.csv").write_text("distance_m,rate_mm_h\n0.5,9\n2,12\n4,11\n6,12.5\n8,8\n10,3\n11,0\n")
    (tmp_path / "lawn.toml").write_text(f"""
[[source]]
name = "head"
aim = [0.0, 0.0]
spread = {{ family = "profile", profile = "leg.csv"{arc} }}

[[zone]]
name = "path"
role = "keep_out"
shape = "rectangle"
params = {{ centre = [3.0, 4.0], width = 2.0, depth = 1.5 }}
""")
    model = strewn.load_site(str(tmp_path / "lawn.toml")).sources["head"]
    head = model.components[0][1] if isinstance(model, strewn.Mixture) else model
    back = pickle.loads(pickle.dumps(head))
    assert back.family == "profile"
    zone = strewn.Region.rectangle((3.0, 4.0), 2.0, 1.5)
    p, q = strewn.probability(head, zone).p, strewn.probability(back, zone).p
    assert p > 0.0 and q == pytest.approx(p, rel=1e-13, abs=0.0)
    # The arc came back: a zone behind the head (outside 20..250 degrees) gets nothing from it.
    behind = strewn.Region.rectangle((4.0, -3.0), 1.0, 1.0)
    assert (strewn.probability(back, behind).p == 0.0) == bool(arc)


def test_a_site_with_a_t_source_assesses_above_its_normal_twin_far_out(tmp_path):
    text = """
[[source]]
name = "thrower"
aim = [0.0, 0.0]
spread = {{ sigma = 0.3{family} }}

[[zone]]
name = "door"
role = "keep_out"
shape = "rectangle"
params = {{ centre = [3.0, 0.0], width = 0.5, depth = 2.0 }}
"""
    ps = {}
    for label, family in (("normal", ""), ("t", ', family = "student_t", nu = 3')):
        path = tmp_path / f"{label}.toml"
        path.write_text(text.format(family=family))
        ps[label] = strewn.load_site(str(path)).assess()[0]["all_sources"]["p_session"]
    # Ten sigmas out a normal puts ~1e-23 there, a t with 3 degrees of freedom ~1e-4.
    assert ps["t"] > 1e6 * ps["normal"]
