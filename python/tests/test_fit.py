"""The fits against the CLI's JSON (`strewn fit ... --format json`) on the bundled field data
(shapes/field_data/lane_marks.csv) and on counts and censored data: same fields, same values
(the same engine functions on the same numbers, so equal to the last bit, allowed 1e-13
relative for the decimal round trip of the JSON)."""
import csv
import math

import numpy as np
import pytest

import strewn


def read_groups(path):
    """Points per group and their file line numbers (as the CLI numbers rows), aim from '# aim'."""
    groups, rows, aim = {}, {}, None
    with open(path) as f:
        lines = f.read().splitlines()
    header = None
    for number, line in enumerate(lines, start=1):
        if line.startswith("#"):
            if line.replace(" ", "").startswith("#aim="):
                aim = tuple(float(v) for v in line.split("=", 1)[1].split(","))
            continue
        cells = next(csv.reader([line]))
        if header is None:
            header = cells
            continue
        row = dict(zip(header, cells))
        g = row.get("group", "")
        groups.setdefault(g, []).append((float(row["x"]), float(row["y"])))
        rows.setdefault(g, []).append(number)
    return {g: np.array(p) for g, p in groups.items()}, rows, aim


def same(a, b, path=""):
    """Recursive comparison of the CLI's JSON value a with the module's value b."""
    if isinstance(a, dict):
        for k, v in a.items():
            same(v, b[k], f"{path}.{k}")
    elif isinstance(a, list):
        assert len(a) == len(b), path
        for k, (x, y) in enumerate(zip(a, b)):
            same(x, y, f"{path}[{k}]")
    elif isinstance(a, float) or isinstance(b, float):
        assert a is not None and b is not None, (path, a, b)
        assert math.isclose(a, b, rel_tol=1e-13, abs_tol=1e-300), (path, a, b)
    else:
        assert a == b, (path, a, b)


def test_fit_impacts_matches_the_cli(cli_json, source_dir):
    data = source_dir / "shapes/field_data/lane_marks.csv"
    groups, rows, aim = read_groups(data)
    cli = cli_json("fit", data)
    assert sorted(g["group"] for g in cli["groups"]) == sorted(groups)
    for g in cli["groups"]:
        name = g.pop("group")
        fit = strewn.fit_impacts(groups[name], aim=aim, confidence=cli["confidence"])
        # The CLI names outliers by file line; the module by index into xy (and i + 1).
        assert [rows[name][i] for i in fit.outliers] == g.pop("outlier_rows")
        # The Student-t fit: strewn.fit_student_t with the command's defaults (replicates, seed)
        # gives the group's "student_t" object (test_student_t_fit_matches_the_cli); the model
        # comparison and the written model are the command's.
        for key in ("student_t", "student_t_skipped", "comparison", "written"):
            g.pop(key, None)
        same(g, fit.to_dict())
        assert fit.model.axes == pytest.approx((fit.sigma_major, fit.sigma_minor, fit.angle_deg), rel=1e-12)
        assert fit.design_model.axes[0] == pytest.approx(fit.sigma_major * fit.design_factor, rel=1e-12)


def test_student_t_fit_matches_the_cli(cli_json, source_dir):
    data = source_dir / "shapes/field_data/lane_marks.csv"
    groups, _, _ = read_groups(data)
    cli = cli_json("fit", data, "--student-t")
    fitted = 0
    for g in cli["groups"]:
        if g["student_t"] is None:  # the command reports a t the data cannot support; so does the module
            with pytest.raises(strewn.InputError):
                strewn.fit_student_t(groups[g["group"]], confidence=cli["confidence"])
            continue
        fit = strewn.fit_student_t(groups[g["group"]], confidence=cli["confidence"])
        same(g["student_t"], fit.to_dict())
        assert fit.n == g["n"] and fit.bootstrap_replicates > 0
        # The model carries the fit: its family, nu and scale matrix.
        assert (fit.model.family, fit.model.nu) == ("student_t", fit.nu)
        assert np.allclose(fit.model.cov, fit.scale, rtol=1e-12, atol=0)
        fitted += 1
    assert fitted > 0


def test_student_t_fit_refuses_too_few_impacts_and_takes_zero_replicates():
    rng = np.random.default_rng(5)
    with pytest.raises(strewn.InputError, match="impacts"):
        strewn.fit_student_t(rng.normal(size=(5, 2)))
    point = strewn.fit_student_t(rng.standard_t(4, size=(60, 2)), bootstrap_replicates=0)
    assert point.bootstrap_replicates == 0 and 1.0 <= point.nu <= 100.0
    with pytest.raises(strewn.InputError, match="bootstrap_replicates"):
        strewn.fit_student_t(rng.normal(size=(50, 2)), bootstrap_replicates=-3)


@pytest.mark.parametrize("k,n,radius", [(41, 60, 0.3), (12, 12, 0.5), (1, 30, 2.0)])
def test_fit_counts_matches_the_cli(cli_json, k, n, radius):
    cli = cli_json("fit", "--counts", k, n, "--radius", radius, "--aim", 0, 6)
    fit = strewn.fit_counts(k, n, radius)
    same(cli["counts"], fit.to_dict())
    assert (fit.sigma is None) == (k == n)


def test_fit_censored_matches_the_cli(cli_json, source_dir, tmp_path):
    groups, _, aim = read_groups(source_dir / "shapes/field_data/lane_marks.csv")
    points = groups["league thrower"]
    data = tmp_path / "league.csv"
    data.write_text("# aim = 0, 6\nx,y\n" + "".join(f"{x!r},{y!r}\n" for x, y in points))
    cli = cli_json("fit", data, "--outside", 3, "--radius", 2.5)
    # Radii as the CLI takes them: |p - aim| = sqrt(dx^2 + dy^2).
    radii = [math.sqrt((x - aim[0]) ** 2 + (y - aim[1]) ** 2) for x, y in points]
    fit = strewn.fit_censored(radii, outside=3, radius=2.5)
    same(cli["censored"], fit.to_dict())
