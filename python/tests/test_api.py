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


def test_every_exported_name_method_and_property_has_a_docstring():
    # Beyond the list above: every name of __all__ and every public member of its classes
    # (the Result's fields, a Normal's mean and cov, a Site's zones, FitResult.keys, InputError
    # had none).
    import inspect
    missing = []
    for name in strewn.__all__:
        if name.startswith("__"):
            continue
        obj = getattr(strewn, name)
        if not (obj.__doc__ or "").strip():
            missing.append(name)
        if inspect.isclass(obj):
            missing += [f"{name}.{m}" for m, v in vars(obj).items()
                        if not m.startswith("_") and not (getattr(v, "__doc__", None) or "").strip()]
    assert not missing, missing


def test_dir_lists_the_public_names_only():
    # The typing names imported for annotations (Any, Mapping, ...) stayed in dir(strewn).
    assert set(dir(strewn)) == set(strewn.__all__)
