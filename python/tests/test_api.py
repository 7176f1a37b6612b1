"""The public API as issue 20 lists it: every name documented with an example, and every name in
the type stubs (strewn/__init__.pyi)."""
import ast
from pathlib import Path

import strewn

DOCUMENTED = ["probability", "probability_many", "probability_at", "fit_impacts", "fit_counts", "fit_censored",
              "shape", "shape_kinds", "add_plugin_dir", "Normal", "Mixture", "Region", "Normal.from_axes",
              "Normal.from_cep", "Normal.from_r95", "Normal.from_fraction", "Normal.scaled", "Normal.moved_to",
              "Region.polygon", "Region.rectangle", "Region.disk", "Region.ellipse", "Region.ring_sector",
              "Region.from_wkt", "Region.from_geojson", "Region.from_geo", "Region.union",
              "Region.difference", "Region.intersection", "Region.translated", "Region.contains"]


def resolve(name):
    obj = strewn
    for part in name.split("."):
        obj = getattr(obj, part)
    return obj


def test_every_public_name_has_a_docstring_with_an_example():
    missing = [n for n in DOCUMENTED if "Example" not in (resolve(n).__doc__ or "")]
    assert not missing, missing


def test_the_stubs_name_everything_exported():
    stub = Path(strewn.__file__).with_name("__init__.pyi")
    tree = ast.parse(stub.read_text())
    names = {n.name for n in tree.body if isinstance(n, (ast.FunctionDef, ast.ClassDef))}
    names |= {t.id for n in tree.body if isinstance(n, ast.AnnAssign) for t in [n.target]}
    assert set(strewn.__all__) - names == set()
    assert (Path(strewn.__file__).parent / "py.typed").exists()


def test_input_error_and_version():
    assert issubclass(strewn.InputError, ValueError)
    assert strewn.__version__.count(".") == 2
