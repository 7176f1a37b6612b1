"""Findings of the independent trial of the module (2026-12-03), each with its check: copies of
elongated models, refused counts and translations, error messages that name the argument, and
Ctrl-C in site computations."""
import copy
import math
import os
import pickle
import re
import signal
import subprocess
import sys
import time

import numpy as np
import pytest

import strewn


def one_line(e):
    text = str(e.value)
    assert text and "\n" not in text
    return text


# --- 1: identical rings used to crash the WKT / GeoJSON readers (fixed in the engine) ---------------

@pytest.mark.parametrize("make", [
    lambda: strewn.Region.from_wkt("MULTIPOLYGON (((0 0, 1 0, 1 1, 0 1, 0 0)), ((0 0, 1 0, 1 1, 0 1, 0 0)))"),
    lambda: strewn.Region.from_wkt("POLYGON ((0 0, 1 0, 1 1, 0 1, 0 0), (0 0, 1 0, 1 1, 0 1, 0 0))"),
    lambda: strewn.Region.from_geojson('{"type":"MultiPolygon","coordinates":'
                                       '[[[[0,0],[1,0],[1,1],[0,0]]],[[[0,0],[1,0],[1,1],[0,0]]]]}'),
])
def test_duplicated_rings_are_refused(make):
    with pytest.raises(strewn.InputError) as e:
        make()
    one_line(e)


# --- 2: copies of elongated models are the same model ------------------------------------------------

@pytest.mark.parametrize("sigma_minor", [1e-6, 1e-8, 1e-9, 0.18])
def test_copies_reproduce_the_model_exactly(sigma_minor):
    n = strewn.Normal.from_axes((0.5, -2.0), 1.0, sigma_minor, 37.0)
    strip = strewn.Region.rectangle((0.5, -2.0), 0.5, 2 * sigma_minor, 37.0)
    original = strewn.probability(n, strip)
    for other in (pickle.loads(pickle.dumps(n)), copy.deepcopy(n), copy.copy(n)):
        assert np.array_equal(other.mean, n.mean) and np.array_equal(other.cov, n.cov)
        assert np.array_equal(other.cholesky, n.cholesky)
        r = strewn.probability(other, strip)
        assert (r.p, r.abs_err) == (original.p, original.abs_err)
    # Reference: the product of two 1-D normal probabilities, |u| < 0.25 and |v| < 1 sigma
    # (scipy.stats.norm: (cdf(0.25) - cdf(-0.25)) (cdf(1) - cdf(-1)) = 0.134771542702386).
    assert abs(original.p - 0.134771542702386) <= original.abs_err + 1e-15
    mix = strewn.Mixture([(0.9, n), (0.1, strewn.Normal.from_cep((0, 0), 2.0))])
    for other in (pickle.loads(pickle.dumps(mix)), copy.deepcopy(mix)):
        assert strewn.probability(other, strip).p == strewn.probability(mix, strip).p


@pytest.mark.parametrize("sigma_minor", [1e-6, 1e-8, 1e-9, 1e-12])
def test_axes_of_elongated_spreads(sigma_minor):
    major, minor, angle = strewn.Normal.from_axes((0, 0), 1.0, sigma_minor, 37.0).axes
    assert abs(major - 1.0) <= 1e-15 and abs(minor - sigma_minor) <= 1e-14 * sigma_minor
    assert abs(angle - 37.0) <= 1e-9


def test_old_pickles_still_load():
    n = strewn.Normal((0.0, 6.0), [[0.09, 0.01], [0.01, 0.04]])
    state = n.__getstate__()
    restored = strewn.Normal.__new__(strewn.Normal)
    restored.__setstate__(state[:2])  # a (mean, cov) state, as pickled before the factor was kept
    assert np.array_equal(restored.cholesky, n.cholesky)


# --- 4: bootstrap replicates -------------------------------------------------------------------------

@pytest.mark.parametrize("replicates", [0, -1, 1, 19, 2.5, 10**9])
def test_bootstrap_replicates_out_of_range_are_refused(replicates):
    xy = np.random.default_rng(0).normal(0, 0.3, size=(20, 2))
    with pytest.raises(strewn.InputError) as e:
        strewn.fit_impacts(xy, (0, 0), bootstrap_replicates=replicates)
    assert "bootstrap_replicates must be a whole number from 20 to 1000000" in one_line(e)


# --- 13: translations ---------------------------------------------------------------------------------

@pytest.mark.parametrize("dx, dy", [(float("nan"), 0.0), (0.0, float("inf")), (1e13, 0.0)])
def test_bad_translations_are_refused(dx, dy):
    sq = strewn.Region.polygon([(0, 0), (1, 0), (1, 1), (0, 1)])
    with pytest.raises(strewn.InputError) as e:
        sq.translated(dx, dy)
    assert "translated: dx and dy must be finite numbers within +-1e12 m" in one_line(e)


# --- 6, 7, 10: messages that name the argument ---------------------------------------------------------

@pytest.mark.parametrize("make, expected", [
    (lambda: strewn.Region.disk((0, 0), float("nan")), "disk: radius must be a finite number (got nan)"),
    (lambda: strewn.Region.rectangle((0, 0), 1, 1, float("nan")), "rectangle: angle_deg must be a finite number"),
    (lambda: strewn.Region.polygon([(0, 0), (float("inf"), 0), (1, 1)]), "polygon: outer must be finite numbers"),
    (lambda: strewn.Region.ring_sector((0, 0), 0, 2, float("nan"), 30), "ring_sector: from_angle_deg must be"),
    (lambda: strewn.shape("disk", centre=[0, 0], radius=float("inf")), "shape 'disk': radius must be finite"),
    (lambda: strewn.Region.disk((float("nan"), 0), 1), "disk: centre must be a point (x, y) of finite numbers"),
    (lambda: strewn.Region.polygon([]), "polygon: outer is empty"),
    (lambda: strewn.fit_counts(-1, 10, 1.0), "k must be a whole number, 0 or more (got -1)"),
    (lambda: strewn.fit_censored([0.1, 0.2], -1, 1.0), "outside must be a whole number, 0 or more"),
])
def test_messages_name_the_argument(make, expected):
    with pytest.raises(strewn.InputError) as e:
        make()
    assert expected in one_line(e) and "JSON" not in str(e.value)


def test_out_of_range_integers_are_input_errors():
    m = strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0)
    door = strewn.Region.rectangle((1.0, 6.0), 0.9, 2.0)
    xy = np.random.default_rng(0).normal(0, 0.3, size=(20, 2))
    for call, expected in ((lambda: strewn.probability(m, door, method="monte_carlo", samples=2**64), "samples"),
                           (lambda: strewn.probability(m, door, method="monte_carlo", seed=2**64), "seed"),
                           (lambda: strewn.fit_impacts(xy, (0, 0), seed=-1), "fit_impacts: seed")):
        with pytest.raises(strewn.InputError) as e:
            call()
        text = one_line(e)
        assert text.startswith(expected) and "_options" not in text and len(text) < 120, text


def test_tolerance_messages_use_the_argument_names():
    m = strewn.Normal.from_cep((0, 0), 1.0)
    disk = strewn.Region.disk((0, 0), 1.0)
    for kwargs, name in ((dict(rel_tol=0), "rel_tol"), (dict(abs_tol=2.0), "abs_tol")):
        with pytest.raises(strewn.InputError) as e:
            strewn.probability(m, disk, **kwargs)
        assert name in one_line(e) and "tolerance" not in str(e.value).replace("rel_tol", "").replace("abs_tol", "")


def test_strings_to_probability_at_are_named():
    m = strewn.Normal.from_cep((0, 0), 1.0)
    with pytest.raises(strewn.InputError) as e:
        strewn.probability_at(m, strewn.Region.disk((0, 0), 0.25), ["a"], ["b"])
    assert "xs and ys must be numbers" in one_line(e)


# --- 5: the docstring example of strewn.shape runs --------------------------------------------------------

def test_shape_docstring_example_runs():
    door = strewn.shape("doorway", hinge=[0, 0], latch=[0.9, 0], opens_toward="left_seen_from_hinge")
    assert door.area > 0
    assert 'latch=[0.9, 0], opens_toward="left_seen_from_hinge"' in strewn.shape.__doc__


# --- 3: Ctrl-C interrupts a long site map -------------------------------------------------------------------

def seconds_to_stop_after_ctrl_c(setup: str, call: str) -> float:
    """Runs `call` in a fresh Python after `setup`, sends SIGINT 1.5 s in, and returns the seconds
    from the signal to the KeyboardInterrupt (failing if it does not come within 60 s)."""
    code = ("import strewn, sys, numpy as np\n"
            f"{setup}\n"
            "print('start', flush=True)\n"
            "try:\n"
            f"    {call}\n"
            "except KeyboardInterrupt:\n"
            "    print('interrupted', flush=True); sys.exit(7)\n")
    proc = subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.PIPE, text=True, env=os.environ.copy())
    assert proc.stdout.readline().strip() == "start"
    time.sleep(1.5)
    sent = time.monotonic()
    proc.send_signal(signal.SIGINT)
    try:
        out, _ = proc.communicate(timeout=60)
    except subprocess.TimeoutExpired:
        proc.kill()
        pytest.fail(f"{call} did not stop within 60 s of Ctrl-C")
    assert proc.returncode == 7 and "interrupted" in out, (proc.returncode, out)
    return time.monotonic() - sent


def test_ctrl_c_interrupts_a_site_map(source_dir):
    site = f"site = strewn.load_site({str(source_dir / 'shapes/throwing_lane.toml')!r})"
    assert seconds_to_stop_after_ctrl_c(site, "site.risk_map(cells=2500, force=True)") < 30


@pytest.mark.parametrize("call", [
    # probability_at: a person disk at 4e6 points (about a minute of work on two cores)
    "strewn.probability_at(m, strewn.Region.disk((0, 0), 0.3), *np.meshgrid(np.linspace(-3, 3, 2000),"
    " np.linspace(-3, 3, 2000)), force=True)",
    # probability_many: 4e6 polygons (8 s or more without an interrupt)
    "strewn.probability_many(m, [strewn.Region.polygon([(0, 0), (1, 0), (1, 1), (0.2, 1.3)])] * 4000000)",
    # a Monte Carlo probability of 1e12 samples (forced past the ceiling)
    "strewn.probability(m, strewn.Region.disk((0.5, 0), 0.3), method='monte_carlo', samples=10**12, force=True)",
])
def test_ctrl_c_interrupts_the_long_calls(call):
    assert seconds_to_stop_after_ctrl_c("m = strewn.Normal.from_axes((0.2, 0.1), 1.0, 0.6, 30.0)", call) < 5


def test_geojson_dicts_are_regions_everywhere():
    m = strewn.Normal.from_cep((1, 0.5), 1.0)
    rect = {"type": "Polygon", "coordinates": [[[0, 0], [2, 0], [2, 1], [0, 1], [0, 0]]]}
    assert abs(strewn.probability(m, rect).p - strewn.probability(m, strewn.Region.rectangle((1, 0.5), 2, 1)).p) < 1e-15


@pytest.mark.parametrize("path", ["/nonexistent/plugins", __file__])
def test_add_plugin_dir_refuses_what_is_not_a_directory(path):
    with pytest.raises(strewn.InputError) as e:
        strewn.add_plugin_dir(path)
    assert one_line(e) == f"add_plugin_dir: '{path}' is not a directory"


def test_monte_carlo_work_beyond_the_ceiling_is_refused_unless_forced():
    # The command's sample ceiling (2e9 samples x components, strewn/work.hpp), here in the module.
    m = strewn.Normal.from_cep((0, 0), 1.0)
    disk = strewn.Region.disk((0.5, 0), 0.3)
    with pytest.raises(strewn.InputError, match="Monte Carlo samples"):
        strewn.probability(m, disk, method="monte_carlo", samples=10**12)
    with pytest.raises(strewn.InputError, match="force=True"):
        strewn.probability_many(m, [disk] * 3000, method="monte_carlo", samples=10**6)
    r = strewn.probability(m, disk, method="monte_carlo", samples=10**5)
    assert 0 < r.p < 1


@pytest.mark.parametrize("data, call", [
    # eight million impacts with a million bootstrap replicates: about 8 s of fitting on this
    # machine, so the Ctrl-C 1.5 s in comes while the fit runs (the data are made before "start")
    ("x = np.random.default_rng(1).normal(size=(8_000_000, 2))",
     "strewn.fit_impacts(x, aim=(0, 0), bootstrap_replicates=1_000_000)"),
    # an aim search on a 1001 x 1001 grid (a million evaluations of every limit)
    ("", "site.solve_aim('league thrower', grid=1001)"),
])
def test_ctrl_c_interrupts_fits_and_solves(data, call, source_dir):
    site = f"site = strewn.load_site({str(source_dir / 'shapes/throwing_lane.toml')!r})\n{data}"
    assert seconds_to_stop_after_ctrl_c(site, call) < 30


def test_a_monte_carlo_status_is_judged_against_the_request():
    # The Clopper-Pearson bound of 1e4 samples (scipy.stats.beta quantiles, as the engine
    # states) is far above rel_tol = 1e-8 of p: "tolerance not met"; a loose request is met.
    m = strewn.Normal.from_axes((0.0, 0.0), 1.0, 1.0, 0.0)
    disk = strewn.Region.disk((0.0, 0.0), 1.0)
    strict = strewn.probability(m, disk, method="monte_carlo", samples=10_000)
    assert strict.status == "tolerance not met" and not strict.converged
    assert "exceeds the requested tolerance" in strict.message
    # P(r <= 1) = 1 - exp(-1/2) for a circular normal of sigma 1 (Rayleigh distribution).
    truth = 1 - math.exp(-0.5)
    loose = strewn.probability(m, disk, method="monte_carlo", samples=10_000, rel_tol=0.5)
    assert loose.status == "converged" and loose.converged
    assert abs(loose.p - truth) <= loose.abs_err
    many = strewn.probability_many(m, [disk, disk], method="monte_carlo", samples=10_000)
    assert not many.converged.any()


def test_abs_tol_zero_means_no_absolute_tolerance():
    # The request is then judged on rel_tol alone: a far region's tiny p (Q(8)^2 / ... ~ 1e-30)
    # must meet 1e-8 relative to say "converged".
    m = strewn.Normal.from_axes((0.0, 0.0), 1.0, 1.0, 0.0)
    far = strewn.Region.rectangle((10.0, 0.0), 2.0, 2.0)
    r0 = strewn.probability(m, far, abs_tol=0)
    r1 = strewn.probability(m, far)
    assert r0.p == r1.p
    assert r0.status in ("converged", "tolerance not met")
    assert r0.converged == (r0.abs_err <= 1e-8 * min(r0.p, r0.q))
    with pytest.raises(strewn.InputError, match="abs_tol"):
        strewn.probability(m, far, abs_tol=-1e-9)


def test_a_result_repr_round_trips_p_and_q():
    m = strewn.Normal.from_axes((0.2, 0.1), 1.0, 0.6, 30.0)
    r = strewn.probability(m, strewn.Region.disk((0.5, 0.0), 0.3))
    text = repr(r)
    p = float(re.search(r"p=([^,]+),", text).group(1))
    q = float(re.search(r"q=([^,]+),", text).group(1))
    assert p == r.p and q == r.q
    assert "abs_err=" in text and "status='converged'" in text
