"""An instance made by __new__ without __init__ (python/src/module.cpp, initialised_caster) is
refused with a TypeError before anything reads its C++ value: its methods, properties, pickling,
and every function it is passed to, strewn.probability's C++ entry included. Before, a Normal's
repr printed garbage, its probability ended in "numerical check failed", a Region's repr crashed
the interpreter."""
import copy
import pickle

import pytest

import strewn
from strewn import _strewn

NOT_INITIALISED = "object was not initialised"


def bare(cls):
    return cls.__new__(cls)


@pytest.fixture
def normal():
    return strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0)


@pytest.fixture
def square():
    return strewn.Region.polygon([(0, 5), (1, 5), (1, 7), (0, 7)])


@pytest.mark.parametrize("cls", [strewn.Normal, strewn.Mixture])
@pytest.mark.parametrize("use", [repr, copy.copy, copy.deepcopy, pickle.dumps])
def test_a_bare_model_is_refused_by_its_own_methods(cls, use):
    with pytest.raises(TypeError, match=NOT_INITIALISED):
        use(bare(cls))


@pytest.mark.parametrize("cls", [strewn.Region, strewn.Site])
def test_a_bare_region_or_site_is_refused_by_its_repr(cls):
    with pytest.raises(TypeError, match=NOT_INITIALISED):
        repr(bare(cls))  # a Region's crashed the interpreter


@pytest.mark.parametrize("cls, attribute", [(strewn.Normal, "mean"), (strewn.Normal, "axes"),
                                            (strewn.Normal, "family"), (strewn.Mixture, "components"),
                                            (strewn.Region, "area"), (strewn.Region, "bounds"),
                                            (strewn.Site, "zone_names"), (strewn.Site, "name")])
def test_a_bare_instance_is_refused_by_its_properties(cls, attribute):
    with pytest.raises(TypeError, match=NOT_INITIALISED) as e:
        getattr(bare(cls), attribute)
    assert f"strewn.{cls.__name__} object" in str(e.value) and "\n" not in str(e.value)


def test_a_bare_normal_or_mixture_is_refused_by_probability_on_both_paths(square):
    for model in (bare(strewn.Normal), bare(strewn.Mixture)):
        with pytest.raises(TypeError, match=NOT_INITIALISED):
            strewn.probability(model, square)  # the C++ entry, which hands it to the general path
        with pytest.raises(TypeError, match=NOT_INITIALISED):
            strewn.probability(model, square, rel_tol=1e-6, seed=3)  # the Python function
        with pytest.raises(TypeError, match=NOT_INITIALISED):
            strewn.probability_many(model, [square])
        with pytest.raises(TypeError, match=NOT_INITIALISED):
            strewn.probability_at(model, square, [0.0], [0.0])


def test_a_bare_region_is_refused_by_probability_on_both_paths(normal, square):
    mixture = strewn.Mixture([(0.5, normal), (0.5, normal.scaled(2.0))])
    for model in (normal, mixture):
        with pytest.raises(TypeError, match=NOT_INITIALISED):
            strewn.probability(model, bare(strewn.Region))
        with pytest.raises(TypeError, match=NOT_INITIALISED):
            strewn.probability(model, bare(strewn.Region), "cubature")
        with pytest.raises(TypeError, match=NOT_INITIALISED):
            strewn.probability_many(model, [square, bare(strewn.Region)])
    with pytest.raises(TypeError, match=NOT_INITIALISED):
        square | bare(strewn.Region)


def test_a_bare_normal_is_refused_as_a_mixture_component(normal):
    with pytest.raises(TypeError, match=NOT_INITIALISED):
        strewn.Mixture([(0.5, normal), (0.5, bare(strewn.Normal))])
    with pytest.raises(TypeError, match=NOT_INITIALISED):
        strewn.Mixture(bare(strewn.Normal))


def test_bare_options_are_refused_by_the_private_entry(normal, square):
    with pytest.raises(TypeError, match=NOT_INITIALISED):
        _strewn._probability(normal, square, bare(_strewn._Options), False)


def test_a_subclass_instance_whose_base_was_never_initialised_is_refused():
    class Shifted(strewn.Normal):
        def __init__(self):  # never calls the base's __init__
            pass

    with pytest.raises(TypeError, match=NOT_INITIALISED):
        repr(Shifted.__new__(Shifted))


# Already so before the fix, kept as pins: Result is not a pybind11 class and refuses __new__
# itself; __init__ after __new__ still gives a usable object.
def test_a_result_cannot_be_made_by_new():
    with pytest.raises(TypeError):
        strewn.Result.__new__(strewn.Result)
    with pytest.raises(TypeError):
        strewn.Result()


def test_init_after_new_gives_a_usable_normal(square):
    n = bare(strewn.Normal)
    n.__init__((0.0, 6.0), [[0.09, 0.0], [0.0, 0.04]])
    assert n.mean == pytest.approx([0.0, 6.0])
    assert strewn.probability(n, square).p == strewn.probability(strewn.Normal(n.mean, n.cov), square).p
