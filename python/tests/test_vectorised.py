"""The vectorised forms against loops of single calls (bit for bit), probability_at against
probability() of the moved footprint (within the two bounds), and thread safety: a
ThreadPoolExecutor of 8 workers gives the results of serial calls."""
import math
from concurrent.futures import ThreadPoolExecutor

import numpy as np

import strewn

MODEL = strewn.Mixture([(0.9, strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0)),
                        (0.1, strewn.Normal.from_axes((0.1, 6.2), 0.9, 0.9, 0.0))])


def regions():
    out = []
    for k in range(12):
        c = (0.3 * k - 1.5, 5.0 + 0.2 * k)
        out += [strewn.Region.rectangle(c, 0.5 + 0.1 * k, 0.4, angle_deg=10 * k),
                strewn.Region.disk(c, 0.2 + 0.05 * k),
                strewn.Region.ring_sector(c, 0.1, 0.6, 15 * k, 15 * k + 100)]
    return out


def bits(a):
    return np.asarray(a, dtype=float).view(np.uint64)


def test_probability_many_is_bit_identical_to_single_calls():
    # Source: the definition (the same engine call per region, whatever the threads).
    rs = regions()
    many = strewn.probability_many(MODEL, rs)
    single = [strewn.probability(MODEL, r) for r in rs]
    np.testing.assert_array_equal(bits(many.p), bits([r.p for r in single]))
    np.testing.assert_array_equal(bits(many.q), bits([r.q for r in single]))
    np.testing.assert_array_equal(bits(many.abs_err), bits([r.abs_err for r in single]))
    assert many.converged.all()
    one_thread = strewn.probability_many(MODEL, rs, threads=1)
    np.testing.assert_array_equal(bits(one_thread.p), bits(many.p))


def test_probability_at_is_bit_identical_to_single_calls():
    # A grid whose rows are evenly spaced (the map kernel's runs) and scattered points: each
    # value equals the one-point call at that point. Source: the definition.
    person = strewn.Region.disk((0.0, 0.0), 0.25)
    xs = -1.0 + 0.0625 * np.arange(40)
    ys = 5.0 + 0.0625 * np.arange(24)
    x, y = np.meshgrid(xs, ys)
    grid = strewn.probability_at(MODEL, person, x, y)
    assert grid.p.shape == (24, 40)
    for j in range(0, 24, 5):
        for i in range(0, 40, 3):
            one = strewn.probability_at(MODEL, person, x[j, i], y[j, i])
            assert one.p.shape == ()
            assert bits(one.p) == bits(grid.p[j, i]) and bits(one.abs_err) == bits(grid.abs_err[j, i])
    rng = np.random.default_rng(3)
    px, py = rng.uniform(-1, 1.5, 50), rng.uniform(5, 7, 50)
    scattered = strewn.probability_at(MODEL, person, px, py)
    loop = [strewn.probability_at(MODEL, person, a, b) for a, b in zip(px, py)]
    np.testing.assert_array_equal(bits(scattered.p), bits([r.p for r in loop]))
    np.testing.assert_array_equal(bits(scattered.abs_err), bits([r.abs_err for r in loop]))
    # Broadcasting: one row of xs against a column of ys is the meshgrid.
    broadcast = strewn.probability_at(MODEL, person, xs[None, :], ys[:, None])
    np.testing.assert_array_equal(bits(broadcast.p), bits(grid.p))


def test_probability_at_agrees_with_probability_of_the_moved_footprint():
    # Source: probability() of the footprint translated to the point (the integrator checked
    # against scipy in test_probability.py); the two agree within their combined bounds.
    for footprint in (strewn.Region.disk((0, 0), 0.25), strewn.Region.rectangle((0, 0), 0.6, 0.3, 20),
                      strewn.shape("person", centre=[0, 0])):
        x = np.array([-0.5, 0.0, 0.25, 1.0, 2.5])
        y = np.array([6.0, 6.1, 5.7, 6.4, 6.0])
        at = strewn.probability_at(MODEL, footprint, x, y)
        for k in range(len(x)):
            r = strewn.probability(MODEL, footprint.translated(x[k], y[k]))
            assert abs(at.p[k] - r.p) <= at.abs_err[k] + r.abs_err + 1e-300


def test_probability_at_of_polygonal_footprints_is_the_map(tmp_path):
    # The map of a site with one source and probability_at of the same model and footprint at the
    # map's cell centres: the same engine kernel (compute_risk_map) on the same cells, so the same
    # bits, for footprints of straight edges (issue 22: tabled whitened vertices per component).
    # Source: the definition. Against probability() of the moved footprint (the integrator
    # checked against scipy in test_probability.py): within the two bounds.
    site_file = tmp_path / "yard.toml"
    site_file.write_text("""
[site]
name = "Invented yard for a map test"
units = "metres"

[settings]
method = "exact"
tolerance = 1e-8

[[source]]
name = "one thrower"
aim = [0.0, 6.0]
bias = [0.1, -0.05]
spread = { sigma_major = 0.30, sigma_minor = 0.18, angle_deg = 80 }

[[zone]]
name = "board"
role = "target"
shape = "rectangle"
params = { centre = [0.0, 6.0], width = 1.0, depth = 1.0 }
""")
    site = strewn.load_site(site_file)
    model = strewn.Normal.from_axes((0.1, 5.95), 0.30, 0.18, 80.0)
    for kind, params in (("rectangle", {"width": 0.5, "depth": 0.3, "angle_deg": 25.0}),
                         ("polygon", {"outer": [[0, 0], [0.5, 0], [0.5, 0.2], [0.2, 0.2], [0.2, 0.6], [0, 0.6]]})):
        m = site.risk_map(cells=24, per="event", extent=(-1.5, 4.5, 1.7, 7.7), footprint=kind, footprint_params=params)
        if kind == "rectangle":  # stands on its centre, [0, 0] in the map
            footprint = strewn.shape(kind, centre=[0.0, 0.0], **params)
        else:  # stands on its bounding box's centre, as the map places it
            footprint = strewn.shape(kind, **params).translated(-0.25, -0.3)
        at = strewn.probability_at(model, footprint, m.x, m.y, rel_tol=1e-8)
        np.testing.assert_array_equal(bits(at.p), bits(m.risk))
        np.testing.assert_array_equal(bits(at.abs_err), bits(m.bound))
        assert at.converged.all()
        for j, i in ((0, 0), (12, 11), (20, 5), (23, 23)):
            r = strewn.probability(model, footprint.translated(m.x[j, i], m.y[j, i]), rel_tol=1e-8)
            assert abs(at.p[j, i] - r.p) <= at.abs_err[j, i] + r.abs_err + 1e-300


def test_threads_give_the_serial_results():
    # Eight workers calling probability, probability_many and probability_at at once (the GIL is
    # released inside) give exactly the serial results.
    rs = regions()
    serial = [strewn.probability(MODEL, r) for r in rs]
    with ThreadPoolExecutor(max_workers=8) as pool:
        parallel = list(pool.map(lambda r: strewn.probability(MODEL, r), rs * 4))
    for k, r in enumerate(parallel):
        s = serial[k % len(rs)]
        assert (bits(r.p), bits(r.q), bits(r.abs_err)) == (bits(s.p), bits(s.q), bits(s.abs_err))
    person = strewn.Region.disk((0.0, 0.0), 0.25)
    x, y = np.meshgrid(-1.0 + 0.125 * np.arange(16), 5.0 + 0.125 * np.arange(16))
    ref_map = strewn.probability_at(MODEL, person, x, y).p
    ref_many = strewn.probability_many(MODEL, rs).p
    with ThreadPoolExecutor(max_workers=8) as pool:
        maps = list(pool.map(lambda _: strewn.probability_at(MODEL, person, x, y).p, range(8)))
        manys = list(pool.map(lambda _: strewn.probability_many(MODEL, rs).p, range(8)))
    for m in maps:
        np.testing.assert_array_equal(bits(m), bits(ref_map))
    for m in manys:
        np.testing.assert_array_equal(bits(m), bits(ref_many))


def test_short_polygons_keep_the_gil_and_give_the_serial_results():
    # An exact probability of a Normal over at most 32 straight edges keeps the GIL (its release
    # would cost about as much as the computation); longer ones release it. Both sides of that
    # threshold, called from eight threads, give the serial results bit for bit, and a call with
    # the default options (taken by identity) gives what the same options passed as new objects
    # give (taken through _options).
    normal = strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0)
    polygons = []
    for n in (8, 32, 33, 200):
        t = 2 * math.pi * np.arange(n) / n
        polygons.append(strewn.Region.polygon(list(zip(0.2 + 0.5 * np.cos(t), 6.1 + 0.35 * np.sin(t)))))
    serial = [strewn.probability(normal, r) for r in polygons]
    explicit = [strewn.probability(normal, r, str("exact"), float("1e-8"), abs_tol=float("1e-15"),
                                   samples=int("1000000"), seed=int("20261201"), confidence=float("0.999"))
                for r in polygons]
    for s, e in zip(serial, explicit):
        assert (bits(s.p), bits(s.q), bits(s.abs_err)) == (bits(e.p), bits(e.q), bits(e.abs_err))
    with ThreadPoolExecutor(max_workers=8) as pool:
        parallel = list(pool.map(lambda r: strewn.probability(normal, r), polygons * 8))
    for k, r in enumerate(parallel):
        s = serial[k % len(polygons)]
        assert (bits(r.p), bits(r.q), bits(r.abs_err)) == (bits(s.p), bits(s.q), bits(s.abs_err))


def test_probability_at_shapes():
    # numpy broadcasting rules: the result has the common shape of xs and ys, empty stays empty.
    person = strewn.Region.disk((0.0, 0.0), 0.25)
    assert strewn.probability_at(MODEL, person, np.zeros(0), 6.0).p.shape == (0,)
    cube = strewn.probability_at(MODEL, person, np.zeros((2, 3, 4)), 5.5 + 0.25 * np.arange(4))
    assert cube.p.shape == cube.abs_err.shape == cube.converged.shape == (2, 3, 4)
    line = strewn.probability_at(MODEL, person, 0.0, 5.5 + 0.25 * np.arange(4))
    np.testing.assert_array_equal(bits(cube.p[1, 2]), bits(line.p))
