"""strewn.probability's C++ entry (python/src/module.cpp, probability_fast) against its general
path: the call probability(model, region) with a Normal or Mixture and a Region is served in C++,
every other call by the Python function strewn._probability_general. Both must give the same
bits, the same errors with the same messages, and the same results from 8 threads as serially.
The values themselves are checked against scipy and closed forms in test_probability.py; here
the reference is the general path, strewn._strewn._probability with options built anew."""
import math
import pickle
import sys
from concurrent.futures import ThreadPoolExecutor

import numpy as np
import pytest

import strewn
from strewn import _strewn


def fields(r):
    """Every attribute of a Result, floats as their hex form (bit for bit)."""
    def bits(v):
        return float(v).hex() if isinstance(v, float) else v
    interval = None if r.interval is None else tuple(bits(v) for v in r.interval)
    return (bits(r.p), bits(r.q), bits(r.abs_err), bits(r.p_abs_err), bits(r.q_abs_err), r.method, r.status,
            r.converged, r.evaluations, r.message, interval, repr(r))


def general(model, region, method="exact", rel_tol=1e-8, abs_tol=1e-15, samples=1_000_000, seed=20261201,
            confidence=0.999, force=False):
    """The general path below the Python wrapper: the pybind11 overloads with options built anew
    (not the entry's cached defaults)."""
    options = _strewn._options(method, rel_tol, abs_tol, samples, seed, confidence)
    return _strewn._probability(model, region, options, force)


def python_frames(fn):
    """Names of the Python functions that run during fn() (sys.setprofile's "call" events)."""
    seen = []

    def profile(frame, event, arg):
        if event == "call":
            seen.append(frame.f_code.co_name)
    sys.setprofile(profile)
    try:
        fn()
    except strewn.InputError:  # a refused call still shows the path it took
        pass
    finally:
        sys.setprofile(None)
    return seen


def star_polygon(rng, n, centre, size):
    """A simple polygon of n vertices: sorted angles, random radii (star-shaped about centre)."""
    t = np.sort(rng.uniform(0, 2 * math.pi, n))
    r = size * rng.uniform(0.3, 1.0, n)
    return [(centre[0] + a * math.cos(b), centre[1] + a * math.sin(b)) for a, b in zip(r, t)]


def random_normal(rng):
    mean = rng.normal(0, 2, 2)
    return strewn.Normal.from_axes(tuple(mean), rng.uniform(0.2, 2), rng.uniform(0.05, 0.2), rng.uniform(0, 180))


def random_cases(seed, count):
    """(model, region) pairs: polygons of 3 to 60 vertices (either side of the 32 straight edges
    under which the GIL is kept), near and far from the mean, Normals, Mixtures, a heavy-tailed
    family, and arcs."""
    rng = np.random.default_rng(seed)
    cases = []
    for k in range(count):
        n = int(rng.integers(3, 61))
        region = strewn.Region.polygon(star_polygon(rng, n, rng.normal(0, 3, 2), rng.uniform(0.1, 4)))
        if k % 4 == 0:
            parts = [(float(w), random_normal(rng)) for w in rng.dirichlet(np.ones(int(rng.integers(2, 4))))]
            model = strewn.Mixture(parts)
        elif k % 4 == 1:
            model = random_normal(rng).with_family("student_t", nu=4)
        else:
            model = random_normal(rng)
        cases.append((model, region))
    cases.append((random_normal(rng), strewn.Region.ring_sector((0.5, 0.2), 0.3, 1.2, 10, 250)))
    cases.append((strewn.Mixture([(0.9, random_normal(rng)), (0.1, random_normal(rng))]),
                  strewn.Region.disk((1.0, -0.5), 0.8)))
    return cases


def test_the_common_call_is_served_in_cxx_and_gives_the_general_paths_bits():
    for model, region in random_cases(20, 60):
        fast = strewn.probability(model, region)
        assert fields(fast) == fields(general(model, region))
        assert fields(fast) == fields(strewn._probability_general(model, region))
        # Options equal to the defaults but other objects take the general path's _options().
        assert fields(fast) == fields(strewn.probability(model, region, str("exact"), float("1e-8")))
    model, region = random_cases(21, 1)[0]
    # Which path ran: the entry runs no Python function, with the defaults or options of plain
    # types; a value the Python function would convert (a numpy float) goes to the general one.
    assert "probability" not in python_frames(lambda: strewn.probability(model, region))
    assert "probability" not in python_frames(lambda: strewn.probability(model, region, rel_tol=1e-10))
    assert "probability" not in python_frames(lambda: strewn.probability(model, region, "cubature", 1e-6))
    assert "probability" in python_frames(lambda: strewn.probability(model, region, rel_tol=np.float64(1e-10)))
    assert "probability" in python_frames(lambda: strewn.probability(model, region, method=None))
    assert "probability" in python_frames(lambda: strewn.probability(model, region, force=1))


@pytest.mark.parametrize("method", ["exact", "cubature", "monte_carlo"])
def test_every_method_and_keyword_gives_the_general_paths_bits(method):
    # Served by the entry (plain floats, ints, str, bool) or by the general path (numpy scalars,
    # which it converts); in any order, alternating, so that the entry's per-thread options
    # cache is seen to follow the request.
    model, region = random_cases(22, 3)[2]
    samples = 20_000  # Monte Carlo: small, the call's result is compared, not its accuracy
    calls = [
        dict(method=method, samples=samples),
        dict(method=method, rel_tol=1e-6, samples=samples),
        dict(method=method, rel_tol=1e-6, samples=samples, abs_tol=1e-12),
        dict(method=method, abs_tol=0, samples=samples),
        dict(method=method, abs_tol=-0.0, samples=samples),
        dict(method=method, abs_tol=0.0, samples=samples),
        dict(method=method, samples=samples, seed=7),
        dict(method=method, samples=samples, confidence=0.95),
        dict(method=method, samples=samples, confidence=np.float64(0.95)),
        dict(method=method, samples=np.int64(samples), rel_tol=np.float32(1e-6)),
        dict(method=method, samples=samples, force=True),
        dict(method=method, samples=samples, force=False),
    ]
    for kwargs in calls + calls[::-1]:
        plain = {k: (v.item() if isinstance(v, np.generic) else v) for k, v in kwargs.items()}
        expected = general(model, region, **plain)
        assert fields(strewn.probability(model, region, **kwargs)) == fields(expected), kwargs
        assert fields(strewn._probability_general(model, region, **kwargs)) == fields(expected), kwargs
        # method and rel_tol may also come positionally
        rest = {k: v for k, v in kwargs.items() if k not in ("method", "rel_tol")}
        got = strewn.probability(model, region, kwargs["method"], kwargs.get("rel_tol", 1e-8), **rest)
        assert fields(got) == fields(expected)
    if method == "monte_carlo":
        r = strewn.probability(model, region, method=method, samples=samples)
        assert r.interval is not None and r.interval[0] <= r.p <= r.interval[1]


class MyNormal(strewn.Normal):
    pass


class MyMixture(strewn.Mixture):
    pass


class GeoThing:
    """Not a strewn type: a shapely-like object with __geo_interface__ (site metres)."""
    __geo_interface__ = {"type": "Polygon", "coordinates": [[(0.1, 5.7), (0.8, 6.1), (0.0, 6.6), (0.1, 5.7)]]}


def test_subclasses_and_other_types_take_the_general_path_with_the_same_values():
    mean, cov = (0.0, 6.0), [[0.09, 0.03], [0.03, 0.04]]
    base = strewn.Normal(mean, cov)
    sub = MyNormal(mean, cov)
    triangle = [(0.1, 5.7), (0.8, 6.1), (0.0, 6.6)]
    region = strewn.Region.polygon(triangle)
    expected = fields(strewn.probability(base, region))
    assert "probability" in python_frames(lambda: strewn.probability(sub, region))
    assert fields(strewn.probability(sub, region)) == expected
    wkt = "POLYGON ((0.1 5.7, 0.8 6.1, 0 6.6, 0.1 5.7))"
    for other in (wkt, GeoThing(), GeoThing.__geo_interface__, strewn.Region.from_wkt(wkt)):
        assert fields(strewn.probability(base, other)) == expected
    mix = strewn.Mixture([(0.7, base), (0.3, strewn.Normal.from_cep(mean, 0.5))])
    my_mix = MyMixture([(0.7, base), (0.3, strewn.Normal.from_cep(mean, 0.5))])
    assert fields(strewn.probability(my_mix, region)) == fields(strewn.probability(mix, region))
    # A one-component Mixture of the Normal is the Normal's probability (the entry takes the
    # Mixture overload, as the general path does).
    assert fields(strewn.probability(strewn.Mixture(base), region)) == fields(general(strewn.Mixture(base), region))


def raised(fn):
    with pytest.raises(Exception) as e:
        fn()
    return type(e.value), str(e.value)


def test_errors_are_those_of_the_general_path_with_the_same_messages():
    model = strewn.Normal((0.0, 6.0), [[0.09, 0.03], [0.03, 0.04]])
    region = strewn.Region.polygon([(0.1, 5.7), (0.8, 6.1), (0.0, 6.6)])
    bad_calls = [
        ((), {}), ((model,), {}), ((model, region, "exact", 1e-8, 3), {}), ((model, region), {"tol": 1e-9}),
        ((3, region), {}), ((model, 3), {}), ((model, region), {"method": "exactly"}),
        ((model, region), {"rel_tol": "x"}), ((model, region), {"rel_tol": -1.0}), ((model, region), {"abs_tol": 1.0}),
        ((model, region), {"samples": 1.5}), ((model, region), {"seed": -1}), ((None, None), {}),
        ((model, region), {"method": "monte_carlo", "samples": 10**10}),
        ((model, region), {"samples": 2**64}), ((model, region), {"rel_tol": 1}), ((model, region), {"seed": True}), ((model, region), {"rel_tol": 10**400}),
        ((model, region), {"rel_tol": float("nan")}), ((model, region), {"abs_tol": float("nan")}),
        ((model, region), {"confidence": 1.5}), ((model, region), {"method": "Exact"}),
        ((model, region, "exact"), {"method": "exact"}), ((model, region), {"force": True, "tol": 1}),
        ((model, region), {"method": "monte_carlo", "samples": 0}),
    ]
    for args, kwargs in bad_calls:
        got = raised(lambda: strewn.probability(*args, **kwargs))
        assert got == raised(lambda: strewn._probability_general(*args, **kwargs)), (args, kwargs)
    # The messages that name the function name it `probability`, as before the entry existed.
    assert raised(lambda: strewn.probability(model)) == (
        TypeError, "probability() missing 1 required positional argument: 'region'")
    assert raised(lambda: strewn.probability(model, region, tol=1e-9)) == (
        TypeError, "probability() got an unexpected keyword argument 'tol'")
    assert raised(lambda: strewn.probability(3, region)) == (
        strewn.InputError, "expected a strewn.Normal or strewn.Mixture, not int")
    kind, message = raised(lambda: strewn.probability(model, region, method="monte_carlo", samples=10**10))
    assert kind is strewn.InputError and "force=True" in message


def test_eight_threads_give_the_serial_results():
    cases = random_cases(23, 40) * 4
    serial = [fields(strewn.probability(m, r)) for m, r in cases]
    with ThreadPoolExecutor(max_workers=8) as pool:
        threaded = list(pool.map(lambda c: fields(strewn.probability(*c)), cases))
        threaded_general = list(pool.map(lambda c: fields(strewn.probability(*c, rel_tol=1e-8 * 1.0)), cases))
    assert threaded == serial
    assert threaded_general == serial
    # Requests that change from call to call (each thread's options cache follows them).
    tols = (1e-8, 1e-10, 1e-6)
    jobs = [(m, r, tols[i % 3]) for i, (m, r) in enumerate(cases)]
    serial_kw = [fields(general(m, r, rel_tol=t)) for m, r, t in jobs]
    with ThreadPoolExecutor(max_workers=8) as pool:
        threaded_kw = list(pool.map(lambda j: fields(strewn.probability(j[0], j[1], rel_tol=j[2])), jobs))
    assert threaded_kw == serial_kw


def test_the_entry_keeps_the_functions_signature_docstring_and_result_type():
    import inspect
    sig = inspect.signature(strewn._probability_general)
    plain = sig.replace(parameters=[p.replace(annotation=inspect.Parameter.empty) for p in sig.parameters.values()],
                        return_annotation=inspect.Signature.empty)
    assert inspect.signature(strewn.probability) == plain
    assert "Example::" in strewn.probability.__doc__ and "Returns a :class:`Result`" in strewn.probability.__doc__
    assert strewn.probability.__module__ == "strewn" and strewn.probability.__name__ == "probability"
    model = strewn.Normal.from_cep((0.0, 0.0), 1.0)
    r = strewn.probability(model, strewn.Region.polygon([(0, 0), (1, 0), (1, 1)]))
    assert type(r) is strewn.Result and "p_event" in strewn.Result.__doc__
    # repr: p and q to 17 significant digits (they round-trip through float()), abs_err to 3.
    text = repr(r)
    assert text.startswith("strewn.Result(p=") and text.endswith("method='exact', status='converged')")
    assert float(text.split("p=")[1].split(",")[0]) == r.p and float(text.split("q=")[1].split(",")[0]) == r.q
    assert isinstance(r.evaluations, int) and r.converged is True and r.message == "" and r.interval is None
    with pytest.raises(AttributeError):
        r.p = 0.5
    with pytest.raises(TypeError):
        strewn.Result()
    with pytest.raises(TypeError):  # as before: a Result is read, not pickled (it has no constructor)
        pickle.dumps(r)


def test_probability_many_and_at_take_a_normal_directly_with_the_mixtures_bits():
    # _probability_many and _probability_at have a Normal overload (module.cpp) that wraps it in a
    # one-component mixture itself, as pybind11's implicit conversion did: the same bits.
    cases = random_cases(24, 12)
    normals = [m for m, _ in cases if isinstance(m, strewn.Normal)]
    regions = [r for _, r in cases]
    x, y = np.meshgrid(-1 + 0.25 * np.arange(6), 5 + 0.25 * np.arange(3))
    footprint = strewn.Region.polygon([(-0.2, -0.1), (0.2, -0.1), (0.2, 0.1), (-0.2, 0.1)])
    for n in normals[:3]:
        many = strewn.probability_many(n, regions)
        as_mixture = strewn.probability_many(strewn.Mixture(n), regions)
        for a, b in zip(many, as_mixture):
            assert a.tobytes() == b.tobytes()
        assert [float(v).hex() for v in many.p] == [strewn.probability(n, r).p.hex() for r in regions]
        at = strewn.probability_at(n, footprint, x, y)
        at_mixture = strewn.probability_at(strewn.Mixture(n), footprint, x, y)
        for a, b in zip(at, at_mixture):
            assert a.tobytes() == b.tobytes()
