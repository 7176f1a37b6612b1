"""strewn: the probability that scattered impacts land in the zones of a site plan.

Python bindings over the strewn engine (the library behind the ``strewn`` command). Coordinates
are site metres (x east, y north); angles are degrees counter-clockwise from +x. Every
probability comes with an error bound ``abs_err`` that covers the true error, or says that the
requested accuracy was not met.

Example::

    >>> import strewn
    >>> model = strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0)
    >>> door = strewn.Region.rectangle((1.0, 6.0), 0.9, 2.0)
    >>> r = strewn.probability(model, door)
    >>> round(r.p, 6), r.status
    (0.001453, 'converged')

Bad input raises :class:`strewn.InputError` (a ``ValueError``) with the engine's one-line
message, the same text the command line prints.
"""

from __future__ import annotations

import functools as _functools
import json as _json
import math as _math
import warnings as _warnings
from typing import Any, Iterable, Mapping, NamedTuple, Optional, Sequence, Tuple, Union

import numpy as _np

from . import _strewn
from ._strewn import InputError, Mixture, Normal, Region, Result, cep_from_sigma, probability_of_any, r95_from_sigma

__version__: str = _strewn.__version__

__all__ = [
    "InputError", "Normal", "Mixture", "Region", "Result", "Probabilities", "FootprintProbabilities",
    "FitResult", "shape", "shape_kinds", "add_plugin_dir", "probability", "probability_many",
    "probability_at", "fit_impacts", "fit_student_t", "fit_counts", "fit_censored", "probability_of_any",
    "cep_from_sigma", "r95_from_sigma", "__version__",
]

Model = Union[Normal, Mixture]

# --- docstrings of the compiled classes ------------------------------------------------------------

def _static_with_doc(cls: type, name: str, doc: str) -> None:
    compiled = getattr(cls, name)

    def method(*args: Any, **kwargs: Any) -> Any:
        return compiled(*args, **kwargs)
    method.__name__ = name
    method.__qualname__ = f"{cls.__name__}.{name}"
    method.__doc__ = doc
    setattr(cls, name, staticmethod(method))


Normal.__doc__ = """A bivariate normal scatter model (one component).

``Normal(mean, cov)``: mean (x, y) in metres, covariance a symmetric positive definite 2 x 2
matrix in m^2. Other spreads through the class methods ``from_axes``, ``from_cep``,
``from_r95`` and ``from_fraction``. Read-only properties: ``mean`` (m), ``cov`` (m^2) and
``axes`` (sigma_major m, sigma_minor m, angle_deg).

``cholesky`` is the lower Cholesky factor L (cov = L L^T) the engine integrates with; a spread
built from its axes keeps a factor computed from the axes, more accurate than one from the
rounded ``cov`` (for ratios above about 1e4:1 ``Normal(n.mean, n.cov)`` is a slightly different
model). ``copy``, ``deepcopy`` and ``pickle`` keep the factor: a copy is the same model to the
last bit.

``with_family(family, nu=0)`` gives the same mean and spread with another radial family
(docs/scenario-format.md, "Scatter families"): ``'student_t'`` with ``nu`` > 0 degrees of
freedom (heavy tails; the spread is its scale matrix) or ``'uniform'`` (flat over the ellipse of
semi-axes 2 sigma_major, 2 sigma_minor); ``family`` and ``nu`` read it back. Every probability,
site and map function takes such a component.

    >>> t4 = strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0).with_family("student_t", nu=4)
    >>> t4.family, t4.nu
    ('student_t', 4.0)

Example::

    >>> n = strewn.Normal((0.0, 6.0), [[0.09, 0.0], [0.0, 0.04]])
    >>> n.axes
    (0.3, 0.2, 0.0)
"""
_static_with_doc(Normal, "from_axes", """Normal.from_axes(mean, sigma_major, sigma_minor, angle_deg=0) -> Normal

Spread from its principal axes: sigma_major >= sigma_minor > 0 (metres), the major axis at
angle_deg degrees counter-clockwise from +x.

Example::

    >>> strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0)
""")
_static_with_doc(Normal, "from_cep", """Normal.from_cep(mean, cep) -> Normal

Circular spread from its CEP (m), the radius holding half the impacts:
sigma = CEP / sqrt(2 ln 2).

Example::

    >>> strewn.Normal.from_cep((0.0, 0.0), 0.5).axes[0]   # sigma, m
    0.42466090014400953
""")
_static_with_doc(Normal, "from_r95", """Normal.from_r95(mean, r95) -> Normal

Circular spread from R95 (m), the radius holding 95% of the impacts:
sigma = R95 / sqrt(-2 ln 0.05).

Example::

    >>> strewn.Normal.from_r95((0.0, 0.0), 1.2)
""")
_static_with_doc(Normal, "from_fraction", """Normal.from_fraction(mean, fraction, radius) -> Normal

Circular spread such that ``fraction`` (0 < fraction < 1) of the impacts land within
``radius`` metres of the mean: sigma = radius / sqrt(-2 ln(1 - fraction)).

Example::

    >>> strewn.Normal.from_fraction((0.0, 6.0), 0.9, 0.5)   # 90% within 0.5 m
""")
Mixture.__doc__ = """A weighted mixture of normals: ``Mixture([(weight, Normal), ...])``.

Weights are in (0, 1] and sum to 1 (within 1e-9). ``components`` gives the (weight, Normal)
pairs back. A ``Normal`` is accepted wherever a model is expected.

Example::

    >>> core = strewn.Normal.from_axes((0, 6), 0.30, 0.18, 80)
    >>> wild = strewn.Normal.from_axes((0, 6), 0.9, 0.9, 0)
    >>> model = strewn.Mixture([(0.95, core), (0.05, wild)])
"""
Region.__doc__ = """A region of the site plan: closed loops of segments and elliptic arcs (metres).

Build with ``Region.polygon``, ``.rectangle``, ``.disk``, ``.ellipse``, ``.ring_sector``,
``Region.from_wkt``, ``Region.from_geojson``, ``Region.from_geo`` (any object with
``__geo_interface__``, e.g. a shapely geometry) or ``strewn.shape(kind, **params)`` for any
plugin kind. Properties: ``area`` (m^2), ``perimeter`` (m), ``bounds`` (xmin, ymin, xmax,
ymax in m). ``a | b``, ``a - b`` and ``a & b`` combine regions (polygonised; the area moved is
carried into the error bound).

Example::

    >>> bench = strewn.Region.rectangle((3.0, 1.0), 2.0, 0.5)
    >>> bench.area
    1.0
"""
Result.__doc__ = """The result of :func:`strewn.probability`.

Attributes: ``p`` (probability of an impact in the region, per event), ``q`` (its complement,
computed directly so that a q near 0 keeps its relative accuracy), ``abs_err`` (bound on the
absolute error of both; ``p_abs_err`` / ``q_abs_err`` add the final rounding of a value near 1),
``method`` ("exact", "cubature" or "monte_carlo"), ``status`` ("converged" or "tolerance not
met"), ``converged``, ``evaluations``, ``message`` (why not converged, or notes) and
``interval`` (the Clopper-Pearson interval for monte_carlo, else None). These are the
``p_event``, ``q_event``, ``abs_err``, ``converged``, ``evaluations`` and ``message`` of a
source in ``strewn assess --format json``.
"""


# --- regions ---------------------------------------------------------------------------------------

def _point(p: Sequence[float], what: str) -> list:
    try:
        x, y = (float(v) for v in p)
    except (TypeError, ValueError):
        raise InputError(f"{what} must be a point (x, y) in metres") from None
    if not (_math.isfinite(x) and _math.isfinite(y)):
        raise InputError(f"{what} must be a point (x, y) of finite numbers (got ({x}, {y}))")
    return [x, y]


def _point_array(points: Iterable[Sequence[float]], what: str) -> Any:
    try:
        arr = _np.asarray(points, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"{what} must be a sequence of points (x, y) in metres") from None
    if arr.size == 0:
        raise InputError(f"{what} is empty: it needs at least 3 points (x, y) in metres")
    if arr.ndim != 2 or arr.shape[1] != 2:
        raise InputError(f"{what} must be a sequence of points (x, y) in metres")
    if not _np.isfinite(arr).all():
        _finite_values(arr, what)
    return arr


def _points(points: Iterable[Sequence[float]], what: str) -> list:
    return _point_array(points, what).tolist()


def _finite_values(values: Any, what: str) -> None:
    arr = _np.asarray(values, dtype=float)
    if not _np.all(_np.isfinite(arr)):
        bad = arr.ravel()[~_np.isfinite(arr.ravel())][0]
        raise InputError(f"{what} must be finite numbers (got {bad})")


def _fit_confidence(confidence: Any, what: str) -> float:
    """The confidence of a fit's intervals, in the command's range (0.5 to 0.9999)."""
    c = float(confidence)
    if not (0.5 <= c <= 0.9999):
        raise InputError(f"{what}: confidence must be 0.5 to 0.9999 (got {confidence!r}), as strewn fit --confidence")
    return c


def _whole(value: Any, what: str, lo: int, hi: int) -> int:
    if isinstance(value, bool) or not isinstance(value, (int, _np.integer)) or not lo <= int(value) <= hi:
        raise InputError(f"{what} must be a whole number from {lo} to {hi} (got {value!r})")
    return int(value)


def _number(v: Any, what: str) -> float:
    try:
        x = float(v)
    except (TypeError, ValueError):
        raise InputError(f"{what} must be a number (got {v!r})") from None
    if not _math.isfinite(x):
        raise InputError(f"{what} must be a finite number (got {x})")
    return x


_UNSET: Any = object()  # a keyword argument not given (None can be a value)


def shape(kind: str, sagitta: float = 0.0, **params: Any) -> Region:
    """Build a region of any shape kind from the plugins (``strewn shapes`` lists them).

    Parameters are the kind's parameters as in a scenario file (lengths in metres, angles in
    degrees; a former parameter name, e.g. ``r_inner``, is read with a ``DeprecationWarning``);
    ``sagitta`` (m) is the polygonisation tolerance of composite shapes (0: 1e-6 of
    their size). The plugins are found as the command finds them: next to the engine library,
    then ``STREWN_PLUGIN_PATH``, then directories given to :func:`add_plugin_dir`.

    Example::

        >>> person = strewn.shape("person", centre=[2.0, 1.0])
        >>> door = strewn.shape("doorway", hinge=[0, 0], latch=[0.9, 0], opens_toward="left_seen_from_hinge")
    """
    def plain(v: Any) -> Any:
        if isinstance(v, _np.ndarray):
            return v.tolist()
        if isinstance(v, (list, tuple)):
            return [plain(x) for x in v]
        if isinstance(v, Mapping):
            return {k: plain(x) for k, x in v.items()}
        if isinstance(v, _np.generic):
            return v.item()
        return v
    def check_finite(v: Any, name: str) -> None:
        if isinstance(v, float) and not _math.isfinite(v):
            raise InputError(f"shape '{kind}': {name} must be finite numbers (got {v})")
        if isinstance(v, list):
            for x in v:
                check_finite(x, name)
        if isinstance(v, dict):
            for k, x in v.items():
                check_finite(x, f"{name}.{k}")
    values = {k: plain(v) for k, v in params.items()}
    for k, v in values.items():
        check_finite(v, k)
    s = float(sagitta)
    if not (_math.isfinite(s) and s >= 0):
        raise InputError(f"shape '{kind}': sagitta must be a finite number, 0 or more (got {sagitta!r})")
    region, shown = _strewn._shape(kind, _json.dumps(values), s)
    for category, message in shown:  # a parameter under its former name: DeprecationWarning
        _warnings.warn(message, category, stacklevel=2)
    return region


def shape_kinds() -> list:
    """The shape kinds the plugins offer: a list of dicts with ``name``, ``summary``,
    ``params_json`` (the plugin's parameter description) and ``module_path``.

    Example::

        >>> sorted(k["name"] for k in strewn.shape_kinds())[:3]
        ['composite', 'disk', 'doorway']
    """
    return _strewn._shape_kinds()


def add_plugin_dir(path: str) -> None:
    """Load every shape plugin (``*.so``) in a directory, after the default search path.
    A path that is not a directory raises :class:`InputError`.

    Example::

        >>> strewn.add_plugin_dir("/opt/site-shapes/plugins")
    """
    import os
    folder = _os_path(path)
    if not os.path.isdir(folder):
        raise InputError(f"add_plugin_dir: '{folder}' is not a directory")
    _strewn._add_plugin_dir(folder)


def _polygon(outer: Sequence[Sequence[float]], holes: Sequence[Sequence[Sequence[float]]] = ()) -> Region:
    """Region.polygon(outer, holes=()) -> Region

    A polygon from its outer ring and optional holes, each a sequence of (x, y) vertices in
    metres (any orientation; a closing vertex equal to the first is allowed).

    Example::

        >>> lawn = strewn.Region.polygon([(0, 0), (4, 0), (4, 3), (0, 3)],
        ...                              holes=[[(1, 1), (2, 1), (2, 2), (1, 2)]])
        >>> lawn.area
        11.0
    """
    # Without holes, built in the module directly (the polygon plugin's region, checked and
    # normalised the same way, without its JSON round trip: about 7x faster for 8 vertices).
    if len(holes) == 0:
        return _strewn._polygon(_point_array(outer, "polygon: outer"))
    return shape("polygon", outer=_points(outer, "polygon: outer"),
                 holes=[_points(h, f"polygon: hole {i + 1}") for i, h in enumerate(holes)])


def _rectangle(centre: Sequence[float], width: float, depth: Any = _UNSET, angle_deg: float = 0.0, *,
               height: Any = _UNSET) -> Region:
    """Region.rectangle(centre, width, depth, angle_deg=0) -> Region

    A rectangle centred at ``centre`` (m), ``width`` along its rotated x axis and ``depth``
    across it (m, a length on the plan), rotated by ``angle_deg`` degrees counter-clockwise.
    ``height=`` is the former name of ``depth`` (a ``DeprecationWarning``).

    Example::

        >>> strewn.Region.rectangle((3.0, 1.0), 2.0, 0.5, angle_deg=30).area
        1.0
    """
    depth = _renamed("height", "depth", height, depth)
    if depth is _UNSET:
        raise InputError("rectangle: depth is required")
    return shape("rectangle", centre=_point(centre, "rectangle: centre"), width=_number(width, "rectangle: width"),
                 depth=_number(depth, "rectangle: depth"), angle_deg=_number(angle_deg, "rectangle: angle_deg"))


def _disk(centre: Sequence[float], radius: float) -> Region:
    """Region.disk(centre, radius) -> Region

    A disk of ``radius`` metres about ``centre`` (m).

    Example::

        >>> strewn.Region.disk((0.0, 0.0), 1.0).area
        3.141592653589793
    """
    return shape("disk", centre=_point(centre, "disk: centre"), radius=_number(radius, "disk: radius"))


def _ellipse(centre: Sequence[float], semi_major: float, semi_minor: float, angle_deg: float = 0.0) -> Region:
    """Region.ellipse(centre, semi_major, semi_minor, angle_deg=0) -> Region

    An ellipse about ``centre`` with semi-axes in metres, the major one at ``angle_deg``
    degrees counter-clockwise from +x.

    Example::

        >>> strewn.Region.ellipse((0, 0), 2.0, 1.0, angle_deg=45)
    """
    return shape("ellipse", centre=_point(centre, "ellipse: centre"), semi_major=_number(semi_major, "ellipse: semi_major"),
                 semi_minor=_number(semi_minor, "ellipse: semi_minor"), angle_deg=_number(angle_deg, "ellipse: angle_deg"))


def _ring_sector(centre: Sequence[float], inner_radius: Any = _UNSET, outer_radius: Any = _UNSET,
                 from_angle_deg: Any = _UNSET, to_angle_deg: Any = _UNSET, *, r_inner: Any = _UNSET,
                 r_outer: Any = _UNSET, theta_from_deg: Any = _UNSET, theta_to_deg: Any = _UNSET) -> Region:
    """Region.ring_sector(centre, inner_radius, outer_radius, from_angle_deg, to_angle_deg) -> Region

    The part of the ring inner_radius <= r <= outer_radius (m) about ``centre`` between the
    directions from_angle_deg and to_angle_deg (degrees counter-clockwise from +x, swept
    counter-clockwise). inner_radius = 0 gives a pie slice. (The ``ring_sector`` plugin kind.)
    The former keyword names ``r_inner``, ``r_outer``, ``theta_from_deg``, ``theta_to_deg`` are
    read with a ``DeprecationWarning``.

    Example::

        >>> throw_arc = strewn.Region.ring_sector((0, 0), 5.0, 12.0, 60.0, 120.0)
    """
    values = {"inner_radius": _renamed("r_inner", "inner_radius", r_inner, inner_radius),
              "outer_radius": _renamed("r_outer", "outer_radius", r_outer, outer_radius),
              "from_angle_deg": _renamed("theta_from_deg", "from_angle_deg", theta_from_deg, from_angle_deg),
              "to_angle_deg": _renamed("theta_to_deg", "to_angle_deg", theta_to_deg, to_angle_deg)}
    for name, value in values.items():
        if value is _UNSET:
            raise InputError(f"ring_sector: {name} is required")
    return shape("ring_sector", centre=_point(centre, "ring_sector: centre"),
                 **{k: _number(v, f"ring_sector: {k}") for k, v in values.items()})


def _from_wkt(text: str) -> Region:
    """Region.from_wkt(text) -> Region

    A POLYGON or MULTIPOLYGON in WKT, coordinates in site metres.

    Example::

        >>> strewn.Region.from_wkt("POLYGON ((0 0, 2 0, 2 1, 0 1, 0 0))").area
        2.0
    """
    return _strewn._from_wkt(str(text))


def _from_geojson(geojson: Union[str, Mapping[str, Any]], origin: Optional[Sequence[float]] = None,
                  feature: str = "") -> Region:
    """Region.from_geojson(geojson, origin=None, feature="") -> Region

    A Polygon or MultiPolygon (bare, or in a Feature or FeatureCollection), as text or a dict.
    With ``origin=(lon_deg, lat_deg)`` positions are WGS 84 longitude/latitude (RFC 7946),
    projected to site metres about that origin (transverse Mercator); without it they are taken
    as site metres. ``feature`` picks a feature of a collection by properties.name or id.

    Example::

        >>> strewn.Region.from_geojson({"type": "Polygon",
        ...     "coordinates": [[[0, 0], [2, 0], [2, 1], [0, 1], [0, 0]]]}).area
        2.0
    """
    text = geojson if isinstance(geojson, str) else _json.dumps(geojson)
    if origin is None:
        return _strewn._from_geojson(text, False, 0.0, 0.0, str(feature))
    lon, lat = _point(origin, "origin")
    return _strewn._from_geojson(text, True, lon, lat, str(feature))


def _from_geo(obj: Any) -> Region:
    """Region.from_geo(obj) -> Region

    A region from any object with ``__geo_interface__`` (a shapely Polygon or MultiPolygon,
    a geopandas geometry, a GeoJSON-like dict), its coordinates in site metres. Shapely is
    not a dependency: only the protocol is used.

    Example::

        >>> from shapely.geometry import box          # if shapely is installed
        >>> strewn.Region.from_geo(box(0, 0, 2, 1)).area
        2.0
    """
    geo = getattr(obj, "__geo_interface__", obj)
    if not isinstance(geo, Mapping):
        raise InputError("a region must be a strewn.Region or have __geo_interface__ (a Polygon or MultiPolygon)")
    return _from_geojson(dict(geo))


def _default_sagitta(a: Region, b: Region) -> float:
    xa0, ya0, xa1, ya1 = a.bounds
    xb0, yb0, xb1, yb1 = b.bounds
    return 1e-6 * max(max(xa1, xb1) - min(xa0, xb0), max(ya1, yb1) - min(ya0, yb0))


def _combiner(op: str, doc: str):
    def method(self: Region, other: Any, sagitta: Optional[float] = None) -> Region:
        other = _as_region(other)
        s = _default_sagitta(self, other) if sagitta is None else float(sagitta)
        return self._combine(other, op, s)
    method.__doc__ = doc
    return method


Region.polygon = staticmethod(_polygon)
Region.rectangle = staticmethod(_rectangle)
Region.disk = staticmethod(_disk)
Region.ellipse = staticmethod(_ellipse)
Region.ring_sector = staticmethod(_ring_sector)
Region.from_wkt = staticmethod(_from_wkt)
Region.from_geojson = staticmethod(_from_geojson)
Region.from_geo = staticmethod(_from_geo)
Region.union = _combiner("unite", """region.union(other, sagitta=None) -> Region (also ``a | b``)

The union, computed on a polygonisation whose sagitta (m) defaults to 1e-6 of the pair's size.
The area the polygonisation may move (``approximation_area``) enters every ``abs_err`` on the
result: with arcs (disks, ellipses, sectors) the default sagitta gives bounds near 1e-6 and
"tolerance not met" at the default rel_tol 1e-8; ``a.union(b, sagitta=1e-10 * size)`` meets it
(``|``, ``-`` and ``&`` use the default). The same holds for ``difference`` and ``intersection``.

Example::

    >>> (strewn.Region.disk((0, 0), 1) | strewn.Region.disk((1, 0), 1)).area
""")
Region.difference = _combiner("subtract", """region.difference(other, sagitta=None) -> Region (also ``a - b``)

Example::

    >>> lawn_without_bed = lawn - strewn.Region.disk((2, 1.5), 0.5)
""")
Region.intersection = _combiner("intersect", """region.intersection(other, sagitta=None) -> Region (also ``a & b``)

Example::

    >>> overlap = strewn.Region.disk((0, 0), 1) & strewn.Region.disk((1, 0), 1)
""")
Region.__or__ = Region.union
Region.__sub__ = Region.difference
Region.__and__ = Region.intersection


def _as_region(obj: Any) -> Region:
    if isinstance(obj, Region):
        return obj
    if hasattr(obj, "__geo_interface__"):
        return _from_geo(obj)
    if isinstance(obj, str):
        return _from_wkt(obj)
    if isinstance(obj, Mapping) and "type" in obj:  # a GeoJSON-like dict, as Region.from_geo takes
        return _from_geo(obj)
    raise InputError(f"expected a strewn.Region, a WKT string, a GeoJSON-like dict or an object with __geo_interface__, "
                     f"not {type(obj).__name__}")


def _as_model(obj: Any) -> Model:
    if isinstance(obj, (Normal, Mixture)):
        return obj
    raise InputError(f"expected a strewn.Normal or strewn.Mixture, not {type(obj).__name__}")


@_functools.lru_cache(maxsize=64)
def _options(method: str, rel_tol: float, abs_tol: float, samples: int, seed: int, confidence: float):
    # Cached: building the options costs about as much as a small polygon's integration. The
    # engine reads them only (const), so one object serves every thread.
    samples = _whole(samples, "samples", 1, 10**12)  # as settings.samples in a scenario
    seed = _whole(seed, "seed", 0, 2**64 - 1)
    for name, v in (("rel_tol", rel_tol), ("abs_tol", abs_tol), ("confidence", confidence)):
        if isinstance(v, bool) or not isinstance(v, (int, float, _np.integer, _np.floating)):
            raise InputError(f"{name} must be a number (got {v!r})")
    if not (0 <= float(abs_tol) < 1):
        raise InputError(f"abs_tol must be in [0, 1) (0: none, rel_tol alone judges the request; got {abs_tol!r})")
    try:
        return _strewn._options(str(method), float(rel_tol), float(abs_tol), samples, seed, float(confidence))
    except InputError as e:  # the engine names its fields; the arguments here are rel_tol, abs_tol
        raise InputError(str(e).replace("rel_tolerance", "rel_tol").replace("abs_tolerance", "abs_tol")) from None


# --- probabilities ---------------------------------------------------------------------------------

# probability()'s defaults as objects, so that a call with all of them is recognised by identity
# (six `is` tests) and takes _DEFAULT_OPTIONS without hashing its arguments: the lru_cache of
# _options() hashes three floats and two ints, about 700 instructions of a call that the exact
# method finishes in about 10,000 (8-vertex polygon; README, "Benchmarks").
_D_METHOD, _D_REL, _D_ABS, _D_SAMPLES, _D_SEED, _D_CONF = "exact", 1e-8, 1e-15, 1_000_000, 20261201, 0.999
_DEFAULT_OPTIONS = _options(_D_METHOD, _D_REL, _D_ABS, _D_SAMPLES, _D_SEED, _D_CONF)


def probability(model: Model, region: Any, method: str = _D_METHOD, rel_tol: float = _D_REL, *,
                abs_tol: float = _D_ABS, samples: int = _D_SAMPLES, seed: int = _D_SEED,
                confidence: float = _D_CONF, force: bool = False) -> Result:
    # probability() for every call that its C++ entry does not serve itself (module.cpp,
    # probability_fast: it serves (Normal or Mixture, Region) with no other argument). Named
    # `probability` so that Python's own errors (a missing or unexpected argument) name it so.
    # The common call inline: a Region and a Normal or Mixture as they are, the default options.
    if type(region) is not Region:
        region = _as_region(region)
    if type(model) is not Normal and type(model) is not Mixture:
        model = _as_model(model)
    if (method is _D_METHOD and rel_tol is _D_REL and abs_tol is _D_ABS and samples is _D_SAMPLES
            and seed is _D_SEED and confidence is _D_CONF):
        options = _DEFAULT_OPTIONS
    else:
        options = _options(method, rel_tol, abs_tol, samples, seed, confidence)
    return _strewn._probability(model, region, options, force is True or bool(force))


_probability_general = probability
# strewn.probability is a C++ function (module.cpp, probability_fast) that serves
# probability(model, region, ...) with a Normal or Mixture and a Region and options of plain
# types itself and passes every other call to _probability_general above: the Python wrapper and
# pybind11's dispatcher cost about 8,000 instructions a call, as much as the engine's 8-vertex
# polygon (README, "Benchmarks"). It takes its defaults from the _D_* values here.
# Its signature (first lines, for inspect.signature and help()) is _probability_general's.
probability = _strewn._make_probability(_probability_general, _D_METHOD, _D_REL, _D_ABS, _D_SAMPLES, _D_SEED,
                                        _D_CONF, """\
probability(model, region, method='exact', rel_tol=1e-08, *, abs_tol=1e-15, samples=1000000, \
seed=20261201, confidence=0.999, force=False)
--

Probability that one impact from ``model`` lands in ``region`` (per event).

``method``: "exact" (Owen's T on edges, Gauss-Kronrod on arcs; the default), "cubature" or
"monte_carlo" (``samples``, ``seed``, Clopper-Pearson interval at ``confidence``). The
request is met when abs_err <= max(abs_tol, rel_tol * min(p, q)) (exact) or
max(abs_tol, rel_tol * p) (cubature, Monte Carlo: a sampled result whose bound is above
that says "tolerance not met"); ``abs_tol=0`` means no absolute tolerance. ``region`` may be a :class:`Region`, a WKT string or
any object with ``__geo_interface__`` (site metres). Releases the GIL while it computes,
except by the exact method on a Normal over at most 32 straight edges (about 2 us, no
longer than the release itself would cost).
Monte Carlo work beyond the command's ceiling (2e9 samples x components x (regions + edges / 8)) is refused unless
``force``; Ctrl-C interrupts a Monte Carlo run.

Returns a :class:`Result` with ``p, q, abs_err, method, status``.

Example::

    >>> model = strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0)
    >>> r = strewn.probability(model, strewn.Region.disk((0.5, 6.0), 0.2))
    >>> r.p, r.abs_err, r.status
""")


class Probabilities(NamedTuple):
    """Per-region results of :func:`probability_many`: numpy arrays ``p``, ``q``, ``abs_err``
    and ``converged`` (bool), in the order of the regions."""
    p: _np.ndarray
    q: _np.ndarray
    abs_err: _np.ndarray
    converged: _np.ndarray


def probability_many(model: Model, regions: Iterable[Any], method: str = "exact", rel_tol: float = 1e-8, *,
                     abs_tol: float = 1e-15, samples: int = 1_000_000, seed: int = 20261201,
                     confidence: float = 0.999, threads: int = 0, force: bool = False) -> Probabilities:
    """:func:`probability` of one model over many regions, as numpy arrays.

    The regions are shared among ``threads`` threads (0: every core) with the GIL released;
    each value is bit-for-bit the one :func:`probability` gives for that region. Monte Carlo
    work beyond 2e9 samples x components x (regions + edges / 8) is refused unless ``force``; Ctrl-C
    interrupts the call between regions.

    Example::

        >>> model = strewn.Normal.from_cep((0, 0), 1.0)
        >>> rings = [strewn.Region.ring_sector((0, 0), r, r + 1, 0, 360) for r in range(5)]
        >>> res = strewn.probability_many(model, rings)
        >>> res.p.sum()    # the disk of radius 5, m
    """
    rs = [_as_region(r) for r in regions]
    p, q, err, conv = _strewn._probability_many(_as_model(model), rs,
                                                _options(method, rel_tol, abs_tol, samples, seed, confidence),
                                                int(threads), bool(force))
    return Probabilities(p, q, err, conv)


class FootprintProbabilities(NamedTuple):
    """Results of :func:`probability_at`: numpy arrays ``p``, ``abs_err`` and ``converged``
    (bool), each of the broadcast shape of xs and ys."""
    p: _np.ndarray
    abs_err: _np.ndarray
    converged: _np.ndarray


def probability_at(model: Model, footprint: Any, xs: Any, ys: Any, method: str = "exact",
                   rel_tol: float = 1e-8, *, abs_tol: float = 1e-15, threads: int = 0,
                   force: bool = False) -> FootprintProbabilities:
    """Probability of an impact in ``footprint`` placed at each point (xs, ys), per event.

    The footprint is given with its reference point (where the person stands) at (0, 0): the
    value at (x, y) is that of the footprint moved by (x, y) (``strewn map``'s cells; use
    ``footprint.translated(-cx, -cy)`` to put another reference point at the origin). xs and ys
    (metres) are broadcast together; the arrays returned have their common shape. This is the
    engine's risk-map kernel (``compute_risk_map``): points evenly spaced along a row (like
    ``x0 + h * numpy.arange(n)`` at one y) share the footprint's set-up, and a whole ellipse
    (person, disk) or a footprint of straight edges (rectangle, doorway, polygon, a composite of
    those) is served from tables of its whitened nodes or vertices; any other point is set up on
    its own. A point's value
    does not depend on the other points. Work is shared among ``threads`` (0: every core) with
    the GIL released, and refused beyond the command's map ceiling (2e8 units of point x
    component x edge) unless ``force``.

    Example::

        >>> model = strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0)
        >>> person = strewn.Region.disk((0, 0), 0.25)
        >>> x, y = numpy.meshgrid(-2 + 0.125 * numpy.arange(33), 4 + 0.125 * numpy.arange(33))
        >>> res = strewn.probability_at(model, person, x, y)
        >>> res.p.shape
        (33, 33)
    """
    try:
        xs_, ys_ = _np.asarray(xs, dtype=float), _np.asarray(ys, dtype=float)
    except (TypeError, ValueError):
        raise InputError("probability_at: xs and ys must be numbers (arrays of x and y in metres)") from None
    try:
        x, y = _np.broadcast_arrays(xs_, ys_)
    except ValueError:
        raise InputError(f"probability_at: xs of shape {_np.shape(xs)} and ys of shape {_np.shape(ys)} "
                         f"cannot be broadcast together") from None
    shape_ = x.shape
    cols = shape_[-1] if len(shape_) else 1
    rows = int(_np.prod(shape_[:-1])) if len(shape_) > 1 else 1
    if x.size == 0:
        empty = _np.zeros(shape_)
        return FootprintProbabilities(empty, empty.copy(), _np.ones(shape_, dtype=bool))
    x2 = _np.ascontiguousarray(x).reshape(rows, cols)
    y2 = _np.ascontiguousarray(y).reshape(rows, cols)
    p, err, conv = _strewn._probability_at(_as_model(model), _as_region(footprint), x2, y2,
                                           _options(method, rel_tol, abs_tol, 1_000_000, 20261201, 0.999),
                                           int(threads), bool(force))
    return FootprintProbabilities(p.reshape(shape_), err.reshape(shape_), conv.reshape(shape_))


# --- fitting ---------------------------------------------------------------------------------------

class FitResult:
    """A fit's record: the fields of ``strewn fit --format json`` as attributes.

    ``to_dict()`` gives the plain dict (JSON-ready except for model objects, which it leaves
    out); ``record["sigma"]`` works like ``record.sigma``. Fits from impacts also carry
    ``model`` (the fitted Normal), ``design_model`` (its spread scaled by ``design_factor``) and
    ``mixture_model`` (the two-component Mixture, or None).
    """

    _models = ("model", "design_model", "mixture_model")

    def __init__(self, kind: str, fields: Mapping[str, Any]):
        self.kind = kind
        self.__dict__.update(fields)

    def __getitem__(self, key: str) -> Any:
        return self.__dict__[key]

    def keys(self):
        """The field names, as in the CLI's JSON (the strewn models ``model``, ``design_model``
        and ``mixture_model``, and ``kind``, left out).

        Example::

            >>> sorted(strewn.fit_counts(41, 60, 0.3).keys())[:3]
        """
        return [k for k in self.__dict__ if k not in self._models and k != "kind"]

    def to_dict(self) -> dict:
        """The fields as a plain dict (``keys()`` and their values), e.g. for ``json.dumps`` or a
        row of ``pandas.DataFrame``.

        Example::

            >>> strewn.fit_counts(41, 60, 0.3).to_dict()["sigma"]
        """
        return {k: self.__dict__[k] for k in self.keys()}

    def __repr__(self) -> str:
        main = ", ".join(f"{k}={self.__dict__[k]!r}" for k in ("n", "k", "measured", "sigma", "sigma_ci")
                         if k in self.__dict__)
        return f"strewn.FitResult({self.kind}: {main})"


def fit_impacts(xy: Any, aim: Sequence[float], confidence: float = 0.95, *,
                bootstrap_replicates: int = 2000, seed: int = 20261202) -> FitResult:
    """Fit a bivariate normal to impact coordinates, with the uncertainty the data leave.

    ``xy``: array of shape (n, 2), metres; ``aim``: the aim point (m), for the bias and
    Hotelling's T^2 test of "no bias" (required, as the command requires ``--aim`` or an
    ``# aim`` line). Gives what ``strewn fit DATA.csv --format json`` gives
    for one group: mean, bias, covariance (m^2), sigma_major/minor and angle with bootstrap
    intervals (seeded), the circular-equivalent sigma with its chi-square interval, CEP and R95
    (m), goodness of fit, outliers (``outliers``: 0-based indices; ``outlier_rows``: 1-based as
    the CLI numbers a file without groups), the design factor and the two-component mixture.
    ``bootstrap_replicates``: 20 to 1,000,000 (the bootstrap of the axes' intervals);
    ``seed``: 0 to 2**53, as the command's ``--seed``. ``sigma`` is the circular-equivalent
    scale sqrt(trace(cov) / 2); ``cep`` and ``r95`` are the radii about the fitted mean that
    hold 50% and 95% of the fitted (elliptical) normal, so they differ from
    ``cep_from_sigma(sigma)`` for an elongated spread. Outliers are flagged, not removed: they
    stay in every fitted value (drop them from ``xy`` and fit again to see their effect).

    Example::

        >>> rng = numpy.random.default_rng(1)
        >>> xy = rng.normal([0.1, 6.0], [0.3, 0.2], size=(40, 2))
        >>> f = strewn.fit_impacts(xy, aim=(0, 6))
        >>> f.sigma, f.sigma_ci, f.cep
    """
    arr = _np.ascontiguousarray(_np.asarray(xy, dtype=float))
    if arr.ndim != 2 or arr.shape[1] != 2:
        raise InputError(f"fit_impacts: xy must be an array of shape (n, 2), got shape {arr.shape}")
    if not (_np.isfinite(arr).all() and (_np.abs(arr) <= 1e12).all()):
        raise InputError("fit_impacts: every coordinate must be a finite number at most 1e12 from the origin, "
                         "as in strewn fit's CSV")
    replicates = _whole(bootstrap_replicates, "fit_impacts: bootstrap_replicates", 20, 1_000_000)
    seed = _whole(seed, "fit_impacts: seed", 0, 2**53)
    return FitResult("impacts", _strewn._fit_impacts(arr, _np.asarray(_point(aim, "aim")),
                                                     _fit_confidence(confidence, "fit_impacts"), replicates, seed))


def fit_student_t(xy: Any, confidence: float = 0.95, *, bootstrap_replicates: Optional[int] = None,
                  seed: int = 20261202, nu_min: float = 1.0, nu_max: float = 100.0) -> FitResult:
    """Fit a bivariate Student-t to impact coordinates by maximum likelihood (EM for the
    location and scale, nu by profile likelihood over ``nu_min`` .. ``nu_max``; Liu & Rubin 1995),
    with seeded parametric-bootstrap intervals.

    Gives what ``strewn fit DATA.csv --student-t --format json`` gives under a group's
    ``student_t`` key: ``nu`` with ``nu_ci``, ``nu_ci_open_above`` (True when no nu up to
    ``nu_max`` is ruled out: ``nu_ci`` is then ``[low, None]``, "nu above low") and ``nu_at``
    ('interior', 'lower_end' or 'upper_end'), ``location`` (m), ``scale`` (the scale matrix, m^2; the covariance is
    nu / (nu - 2) times it for nu > 2), ``sigma_major``/``sigma_minor``/``angle_deg``,
    ``sigma``, ``cep`` and ``r95`` (m) each with its ``_ci``, ``log_likelihood``,
    ``bootstrap_replicates`` and ``interval_method``; plus ``n``, ``confidence``, ``aic``,
    ``bic`` and ``model`` (a ``Normal`` carrying the student_t family, for ``probability``).
    ``bootstrap_replicates``: None takes the command's number (400, fewer above 2,500
    impacts), 0 gives the point fit without intervals; ``seed`` as the command's ``--seed``.
    The intervals' measured coverage is in docs/intervals.md (30 to 200 impacts, nu 3 to 30).

    Example::

        >>> f = strewn.fit_student_t(xy)
        >>> f.nu, f.nu_ci, f.r95, f.r95_ci
        >>> strewn.probability(f.model, strewn.Region.disk((0, 6), 1.0))
    """
    arr = _np.ascontiguousarray(_np.asarray(xy, dtype=float))
    if arr.ndim != 2 or arr.shape[1] != 2:
        raise InputError(f"fit_student_t: xy must be an array of shape (n, 2), got shape {arr.shape}")
    replicates = -1 if bootstrap_replicates is None else _whole(
        bootstrap_replicates, "fit_student_t: bootstrap_replicates", 0, 1_000_000)
    seed = _whole(seed, "fit_student_t: seed", 0, 2**53)
    return FitResult("student_t", _strewn._fit_student_t(arr, float(confidence), replicates, seed,
                                                         float(nu_min), float(nu_max)))


def fit_counts(k: int, n: int, radius: float, confidence: float = 0.95) -> FitResult:
    """Fit a centred circular spread to counts: ``k`` of ``n`` impacts within ``radius`` m of
    the aim. Sigma (m) with the Clopper-Pearson interval mapped to sigma; with k = n there is no
    point estimate (``sigma`` is None) and ``written_sigma`` is the one-sided upper bound, as in
    ``strewn fit --counts K N --radius A --format json``. With k = 0 the data bound sigma from
    below only and no spread can be given: refused (``InputError``, naming the lower bound), as
    the command refuses it.

    Example::

        >>> f = strewn.fit_counts(41, 60, 0.3)
        >>> f.sigma, f.sigma_ci
    """
    for name, v in (("k", k), ("n", n)):
        if isinstance(v, bool) or not float(v).is_integer() or v < 0:
            raise InputError(f"fit_counts: {name} must be a whole number, 0 or more (got {v!r})")
        if v > 10**12:
            raise InputError(f"fit_counts: {name} must be at most 1e12 (got {v!r}), as strewn fit --counts")
    return FitResult("counts", _strewn._fit_counts(int(k), int(n), float(radius),
                                                   _fit_confidence(confidence, "fit_counts")))


def fit_censored(radii: Any, outside: int, radius: float, confidence: float = 0.95) -> FitResult:
    """Maximum-likelihood sigma (m) of a centred circular spread from censored data: the radii
    (m, distances from the aim) of the impacts measured, and ``outside`` impacts known only to
    lie beyond ``radius`` m. The interval and the one-sided upper bound are exact (the test on
    the estimate inverted over seeded simulated samples; the asymptotic likelihood-ratio
    interval is given beside them for comparison), as in
    ``strewn fit DATA.csv --outside M --radius A --format json``.

    Example::

        >>> f = strewn.fit_censored([0.12, 0.31, 0.25, 0.4, 0.08], outside=2, radius=0.6)
        >>> f.sigma, f.sigma_ci
    """
    if isinstance(outside, bool) or not float(outside).is_integer() or outside < 0:
        raise InputError(f"fit_censored: outside must be a whole number, 0 or more (got {outside!r})")
    if outside > 10**12:
        raise InputError(f"fit_censored: outside must be at most 1e12 (got {outside!r}), as strewn fit --outside")
    arr = _np.asarray(radii, dtype=float)
    if arr.ndim > 1:
        raise InputError(f"fit_censored: radii must be a list of distances from the aim (m), got shape {arr.shape}")
    r = [float(v) for v in arr.ravel()]
    return FitResult("censored", _strewn._fit_censored(r, int(outside), float(radius),
                                                       _fit_confidence(confidence, "fit_censored")))


# --- sites -----------------------------------------------------------------------------------------

Site = _strewn.Site
Site.__doc__ = """A site read from a scenario file (TOML, docs/scenario-format.md) by :func:`load_site`.

Read-only: ``name``, ``file``, ``notes``, ``zone_names``, ``source_names``, ``zones`` (name ->
:class:`Region`, site metres), ``sources`` (name -> :class:`Mixture`). Computations, each the
engine call behind the matching command and with its JSON's fields: :meth:`assess`,
:meth:`risk_map`, :meth:`solve_clearance`, :meth:`solve_spread`, :meth:`solve_aim`,
:meth:`deposition`. Each releases the GIL while it computes.

Example::

    >>> site = strewn.load_site("shapes/throwing_lane.toml")
    >>> [(z["name"], z["limit"]["holds"]) for z in site.assess() if "limit" in z]
"""


class SiteRiskMap(NamedTuple):
    """Result of :meth:`Site.risk_map`: numpy arrays ``x``, ``y`` (cell centres, m), ``risk``
    (probability that an impact lands on the footprint standing there, per ``per``) and
    ``bound`` (bound on |risk - exact|), each of shape (rows, columns) with x growing along a
    row; ``contours`` (list of dicts ``level``, ``label``, ``log10_accuracy``, ``lines``: a list
    of (points (n, 2) array in m, closed)) and ``info`` (``footprint``, ``per``, ``origin``,
    ``spacing_m``, ``columns``, ``rows``, ``converged``, ``status``)."""
    x: _np.ndarray
    y: _np.ndarray
    risk: _np.ndarray
    bound: _np.ndarray
    contours: list
    info: dict


def load_site(path: Any) -> Site:
    """Read a scenario file (TOML; docs/scenario-format.md) as ``strewn assess FILE`` does.

    Relative template and geometry paths start at the file's folder; shape kinds come from the
    plugins (:func:`add_plugin_dir` adds more). A bad file raises :class:`InputError` with the
    command's one-line message ("FILE:LINE:COLUMN: key: reason"); a former spelling in it gives a
    ``DeprecationWarning``, a likely mistake (an angle in degrees that looks like radians, a
    spread larger than the plan) a ``UserWarning``; both are also in ``site.warnings``. A file in feet (``units = "ft"``) is read
    in metres: every length the site's methods take and return is in metres (``site.units``
    says the file's unit).

    Example::

        >>> site = strewn.load_site("shapes/throwing_lane.toml")
        >>> site.zone_names[:2]
    """
    site = _strewn._load_site(_os_path(path))
    # The loader's warnings, as the command line prints them on stderr: former spellings in the
    # file (``[[source.wild]]``, ``role = "watch"``, ...), still read for one release, and likely
    # mistakes, read as written.
    for category, message in site._warnings_to_show:  # the category follows the engine's WarningKind
        _warnings.warn(message, category, stacklevel=2)
    return site




def _renamed(former: str, now: str, former_value: Any, value: Any) -> Any:
    """The value of a keyword argument that has a former name, still accepted for one release."""
    if former_value is _UNSET:
        return value
    if value is not _UNSET:
        raise InputError(f"{former} is the former name of {now}: give {now} only")
    _warnings.warn(f"{former} is the former name of {now}; it is accepted in this release and will be refused "
                   f"in the next", DeprecationWarning, stacklevel=3)
    return former_value


def _default(value: Any, default: Any) -> Any:
    return default if value is _UNSET else value


def _os_path(path: Any) -> str:
    try:
        import os
        return os.fspath(path)
    except TypeError:
        raise InputError(f"expected a path (str or os.PathLike), not {type(path).__name__}") from None


def _positive(value: Any, what: str) -> float:
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise InputError(f"{what} must be a number (got {value!r})") from None
    if not (_math.isfinite(v) and v > 0):
        raise InputError(f"{what} must be a finite number above 0 (got {value!r})")
    return v


class AssessRecords(list):
    """The zone records of :meth:`Site.assess` (a list, one dict per zone) with the assessment's
    other parts as attributes, each the value of the same key in ``strewn assess FILE --format
    json``: ``throwers``, ``barriers`` and ``sources_from_physics`` (empty lists when the site
    has none).

    Example::

        >>> records = strewn.load_site("shapes/drone_drop_flight.toml").assess()
        >>> records.sources_from_physics[0]["monte_carlo_check"]["normal"]
        True
    """

    def __init__(self, zones: Iterable[dict], parts: Mapping[str, Any]):
        super().__init__(zones)
        self.throwers = list(parts.get("throwers", []))
        self.barriers = list(parts.get("barriers", []))
        self.sources_from_physics = list(parts.get("sources_from_physics", []))


def _site_assess(self: Site, method: Optional[str] = None, rel_tol: Optional[float] = None, *,
                 verify: bool = False) -> list:
    """Every zone against every source: the zone records of ``strewn assess FILE --format json``.

    A list of dicts, one per zone, with the same keys and values as the command's ``zones``:
    ``name``, ``role``, ``shape``, ``geometry_file`` (when from a file), ``sources`` (per source
    ``p_event``, ``p_outside_event`` (1 - p, computed directly; ``q_event`` is its former name),
    ``abs_err``, ``p_session``, ``p_year`` with their ``*_abs_err``,
    ``expected_hits_per_year``, ...; probabilities per event unless named), ``all_sources``
    (the totals), ``occupancy`` and ``limit`` (``value``, ``per``, ``compared``,
    ``compared_upper_bound``, ``holds``, ``undecided``) where the zone has them, and
    ``status``. ``method`` and ``rel_tol`` override the file's settings (``--method``,
    ``--tolerance``); ``verify`` runs a second method beside each (``--verify``).
    ``pandas.DataFrame(records)`` gives one row per zone; ``pandas.json_normalize(records,
    "sources", ["name", "role"])`` one per zone and source. Ctrl-C interrupts it.

    The list is an :class:`AssessRecords`: its attributes ``throwers`` (the spread each
    thrower became, per standing point), ``barriers`` (each barrier with the share of each
    source's events it stops, ``stops``) and ``sources_from_physics`` (each drop: the flight,
    the unscented and Monte Carlo moments, the normality check, the components and, for a
    mixture, ``mixture_check``) are the command's JSON keys of the same names.

    Example::

        >>> site = strewn.load_site("shapes/throwing_lane.toml")
        >>> for z in site.assess():
        ...     print(z["name"], z["all_sources"]["p_session"], z.get("limit", {}).get("holds"))
    """
    if rel_tol is not None:
        rel_tol = _positive(rel_tol, "rel_tol")
    zones, parts = self._assess("" if method is None else str(method), 0.0 if rel_tol is None else rel_tol,
                                bool(verify))
    return AssessRecords(zones, _json.loads(parts))


def _site_risk_map(self: Site, cells: int = 200, per: str = "session", *, footprint: str = "person",
                   footprint_params: Optional[Mapping[str, Any]] = None,
                   extent: Optional[Sequence[float]] = _UNSET, threads: int = 0, force: bool = False,
                   window: Optional[Sequence[float]] = _UNSET) -> SiteRiskMap:
    """The site's risk map, as ``strewn map FILE`` computes it (its ``--csv`` grid).

    For every cell centre, the probability that an impact lands on a ``footprint`` (a shape kind,
    default "person"; ``footprint_params`` its parameters, a kind with a centre stands on it)
    standing there: every source combined per ``per`` ("event": the largest single source;
    "session" or "year": at least one impact from any source). ``cells`` along the longer side
    (2 to 4000), ``extent`` (x0, y0, x1, y1) in metres (default: the zones, the aims and 3 sigma,
    plus 5%; ``window`` is its former name), ``threads`` (0: every core); refused above the map's work ceiling unless ``force``.
    Returns a :class:`SiteRiskMap` (x, y, risk, bound arrays of shape (rows, columns), contours,
    info). Ctrl-C interrupts it.

    Example::

        >>> m = strewn.load_site("shapes/throwing_lane.toml").risk_map(cells=100, per="session")
        >>> m.risk.max(), (m.bound / numpy.maximum(m.risk, 1e-300)).max()
    """
    cells = _whole(cells, "cells", 2, 4000)
    threads = _whole(threads, "threads", 0, 256)
    extent = _renamed("window", "extent", window, extent)
    win: list = []
    if extent is not None and extent is not _UNSET:
        try:
            win = [float(v) for v in extent]
        except (TypeError, ValueError):
            raise InputError("extent must be (x0, y0, x1, y1) in metres") from None
        if len(win) != 4:
            raise InputError("extent must be (x0, y0, x1, y1) in metres")
    params = _json.dumps(dict(footprint_params) if footprint_params is not None else {})
    x, y, risk, bound, contours, info, shown = self._risk_map(str(footprint), params, str(per), cells, win, threads,
                                                              bool(force))
    for category, message in shown:  # an extent that holds no zone and no mean impact point, as `strewn map` warns
        _warnings.warn(message, category, stacklevel=2)
    return SiteRiskMap(x, y, risk, bound, contours, info)


def _site_solve_clearance(self: Site, zone: Optional[str] = None, *, person: Optional[Sequence[float]] = None,
                          source: Optional[str] = None, limit: float = 1e-6, per: str = "year",
                          direction: Optional[Sequence[float]] = None, max_move: float = _UNSET, steps: int = 200,
                          tolerance: float = 1e-4, window: float = _UNSET) -> dict:
    """Smallest move along ``direction`` at which the limit(s) hold: ``strewn solve clearance``.

    Move a ``zone`` (it needs a limit), a ``person`` footprint standing at (x, y) m (with its
    own ``limit`` per ``per``: "event", "session" or "year"), or a whole ``source`` (aim and
    impacts). ``direction`` (dx, dy) defaults to away from the mean impact point; ``max_move`` (m,
    default 50; ``window`` is its former name) is the largest move, scanned in ``steps`` then refined to ``tolerance`` (m). Returns the
    fields of the command's JSON: ``subject``, ``direction``, ``zones_checked``, ``found``,
    ``shift_m`` (m), ``shift_fails_m``, ``risk_over_limit_at_shift``, ... or ``why``, and
    ``status``. Limits are judged on upper bounds (p + abs_err).

    Example::

        >>> site = strewn.load_site("shapes/throwing_lane.toml")
        >>> site.solve_clearance("spectator bench", direction=(-1, 0))["shift_m"]
    """
    return self._solve_clearance(
        "" if zone is None else str(zone), None if person is None else _point(person, "person"),
        "" if source is None else str(source), _positive(limit, "limit"), str(per),
        None if direction is None else _point(direction, "direction"),
        _positive(_default(_renamed("window", "max_move", window, max_move), 50.0), "max_move"),
        _whole(steps, "steps", 1, 100000), _positive(tolerance, "tolerance"))


def _site_solve_spread(self: Site, source: Optional[str] = None, *, min_factor: float = 0.01,
                       max_factor: float = 100.0, steps: int = 200, tolerance: float = 1e-6) -> dict:
    """Largest factor on the spread (every source, or ``source``) at which every limit holds:
    ``strewn solve spread``.

    Factors from ``min_factor`` to ``max_factor`` are scanned in ``steps`` (on the logarithm),
    then refined to ``tolerance`` (on the logarithm). Returns the fields of the command's JSON:
    ``found``, ``factor``, ``factor_fails``, ``holds_over_whole_window``, ``limiting_zone``,
    ``spreads`` (per source ``cep_m`` and its scaled ``components`` in m and degrees) or ``why``,
    and ``status``.

    Example::

        >>> strewn.load_site("shapes/drone_drop.toml").solve_spread()["factor"]
    """
    return self._solve_spread("" if source is None else str(source), _positive(min_factor, "min_factor"),
                              _positive(max_factor, "max_factor"), _whole(steps, "steps", 1, 100000),
                              _positive(tolerance, "tolerance"))


def _site_solve_aim(self: Site, source: Optional[str] = None, *, target: Optional[str] = None,
                    min_target: Optional[float] = None, search_half_width: float = _UNSET, grid: int = 41,
                    tolerance: float = 1e-3, window: float = _UNSET) -> dict:
    """Aim point of one source with the most target hits within every limit, or with
    ``min_target`` the least keep-out risk with P(target) at least that: ``strewn solve aim``.

    ``source`` defaults to the only one, ``target`` to the first target zone; the search covers a
    square of half-width ``search_half_width`` m about the current aim (0, the default: three times
    the largest sigma; ``window`` is its former name) on a ``grid`` x ``grid``
    grid, then a compass search down to ``tolerance`` m. Returns the fields of the command's
    JSON: ``objective``, ``current_aim``, ``found``, ``aim`` (m), ``target_p``,
    ``keep_out_total_p`` (per event) or ``why`` and ``failing_limit``, and ``status``.

    Example::

        >>> strewn.load_site("shapes/drone_drop.toml").solve_aim("parcel drop")["aim"]
    """
    if min_target is not None:
        min_target = _positive(min_target, "min_target")
    half_width = _default(_renamed("window", "search_half_width", window, search_half_width), 0.0)
    w = float(half_width)
    if not (_math.isfinite(w) and w >= 0):
        raise InputError(f"search_half_width must be a finite number, 0 or above (got {half_width!r})")
    return self._solve_aim("" if source is None else str(source), "" if target is None else str(target),
                           min_target, w, _whole(grid, "grid", 2, 1001), _positive(tolerance, "tolerance"))


def _site_solve_spacing(self: Site, layout: Optional[str] = None, *, min_cu: Optional[float] = None,
                        min_du: Optional[float] = None, max_litres_per_zone: Optional[float] = None,
                        least: float = 0.3, most: float = 1.3, steps: int = 20, tolerance: float = 0.01) -> dict:
    """Largest spacing of a sprinkler layout (its pattern kept) at which Christiansen's CU is at
    least ``min_cu``, the low-quarter DU at least ``min_du`` (percent; both need the scenario's
    catch grid) and no keep-out zone gets more than ``max_litres_per_zone`` litres per run
    (judged on upper bounds): ``strewn solve spacing`` (docs/irrigation.md). Give at least one.

    ``layout`` defaults to the site's only layout. Spacings from ``least`` to ``most`` times the
    head's radius are scanned in ``steps``, then bisected down to ``tolerance`` m. Returns the
    fields of the command's JSON in metres and litres (as in a metric site): ``layout``,
    ``found``, ``window`` (m), ``answer`` (``spacing_m``, ``heads``, ``run_hours``,
    ``cu_percent``, ``du_percent``, ``limits``: each ``limit``, ``value``, ``target``, ``margin``,
    ``holds``), ``holds_over_whole_window`` and ``beyond`` (the spacing just past it, where a
    limit fails), or ``why`` and ``smallest_tried``; and ``evaluations``.

    Example::

        >>> a = strewn.load_site("shapes/sports_pitch_rotors.toml").solve_spacing(min_cu=80, max_litres_per_zone=60, most=2)
        >>> a["answer"]["spacing_m"], a["answer"]["cu_percent"]
    """
    def percent(v: Optional[float], what: str) -> Optional[float]:
        if v is None:
            return None
        try:
            f = float(v)
        except (TypeError, ValueError):
            raise InputError(f"{what} must be a number (got {v!r})") from None
        if not (0.0 <= f <= 100.0):
            raise InputError(f"{what} must be a percentage from 0 to 100 (got {v!r})")
        return f

    litres = None
    if max_litres_per_zone is not None:
        try:
            litres = float(max_litres_per_zone)
        except (TypeError, ValueError):
            raise InputError(f"max_litres_per_zone must be a number (got {max_litres_per_zone!r})") from None
        if not (_math.isfinite(litres) and litres >= 0):
            raise InputError(f"max_litres_per_zone must be a finite number, 0 or above (got {max_litres_per_zone!r})")
    return self._solve_spacing("" if layout is None else str(layout), percent(min_cu, "min_cu"), percent(min_du, "min_du"),
                               litres, _positive(least, "least"), _positive(most, "most"),
                               _whole(steps, "steps", 1, 1000), _positive(tolerance, "tolerance"))


def _site_deposition(self: Site) -> dict:
    """Where the emitted material lands: the fields of ``strewn deposition FILE --format json``.

    ``emitted`` (in ``amount_unit``), ``grid`` (``on_grid``, ``off_grid`` with errors,
    ``cu_percent``, ``du_low_quarter_percent``, ``scheduling_coefficient`` (``value`` and its
    driest window, docs/deposition.md), depths in ``depth_unit``) and ``cans`` (per can
    ``x``, ``y`` in m, ``depth``, ``cell_amount``, ...) when the file has a catch grid, ``zones``
    (``amount`` and ``fraction`` per zone) and ``off_site``. Needs a ``[deposition]`` table.
    With sprinkler heads (``[[head]]``, ``[[layout]]``; docs/irrigation.md) also ``heads`` (per
    head ``x``, ``y``, ``radius`` in m, ``arc_deg``, ``flow`` in L/min, ``own_rate`` and
    ``share_rate`` in mm/h), ``precipitation`` (``area`` in m^2, ``rate``, ``catch_rate`` in mm/h)
    and, with a ``target_depth``, ``run_time`` (``minutes``, ``with_allowance_minutes``, with
    bounds): always metric, whatever the file's units.

    Example::

        >>> d = strewn.load_site("shapes/small_lawn_heads.toml").deposition()
        >>> d["grid"]["cu_percent"], d["grid"]["du_low_quarter_percent"]
    """
    return self._deposition()


Site.assess = _site_assess
Site.risk_map = _site_risk_map
Site.solve_clearance = _site_solve_clearance
Site.solve_spread = _site_solve_spread
Site.solve_aim = _site_solve_aim
Site.solve_spacing = _site_solve_spacing
Site.deposition = _site_deposition
__all__ += ["Site", "SiteRiskMap", "AssessRecords", "load_site"]


InputError.__doc__ = (
    "Bad input: a value, file or option strewn refuses, with the same one-line message as the "
    "command line's (file, line and key where there is one). A ValueError.\n\n"
    "Example::\n\n"
    "    >>> try:\n"
    "    ...     strewn.Region.disk((0, 0), -1)\n"
    "    ... except strewn.InputError as e:\n"
    "    ...     print(e)")


def __dir__():
    # The public names only (PEP 562): the typing names imported for annotations stay out of
    # dir(strewn) and editors' completion.
    return sorted(set(__all__) | {"__version__"} & set(globals()))
