"""The site API (strewn.load_site and the Site's computations) against the command's JSON on the
bundled scenarios: the same engine calls (strewn/assess.hpp, design.hpp, deposition.hpp,
site_map.hpp), so the same values to the last bit. The command's JSON also carries
`strewn_version`, `units`, `caution` and fixed explanations (deposition's `grid.conventions`,
aim's `search_guarantee`), which the module leaves out; the module adds `status`
(strewn/status.hpp)."""
import csv
import io
import json
import math
import warnings

import numpy as np
import pytest

import strewn

ASSESS_SCENARIOS = ["shapes/throwing_lane.toml", "shapes/drone_drop.toml", "shapes/lawn_sprinkler.toml",
                    "shapes/small_lawn_heads.toml", "shapes/seed_drop_zone.toml",
                    "tests/data/cli/placed_zones.toml", "tests/data/cli/closed_form_disk.toml",
                    "shapes/town_park.toml"]

CLI_ONLY = {"strewn_version", "units", "caution", "conventions", "search_guarantee"}


def same_fields(module, cli, where="", ignore=("status",)):
    """Every field of the CLI's JSON (less CLI_ONLY) is in the module's record with the same
    value; the module has no other field than `status`."""
    if isinstance(cli, dict):
        assert isinstance(module, dict), where
        extra = set(module) - set(cli) - set(ignore)
        assert not extra, f"{where}: module-only fields {extra}"
        for k, v in cli.items():
            if k in CLI_ONLY:
                continue
            assert k in module, f"{where}: {k} missing"
            same_fields(module[k], v, f"{where}.{k}", ignore)
    elif isinstance(cli, list):
        assert len(module) == len(cli), where
        for i, (a, b) in enumerate(zip(module, cli)):
            same_fields(a, b, f"{where}[{i}]", ignore)
    else:
        assert module == cli, f"{where}: {module!r} != {cli!r}"


@pytest.mark.parametrize("scenario", ASSESS_SCENARIOS)
def test_assess_records_are_the_cli_zones(scenario, source_dir, cli_json):
    site = strewn.load_site(source_dir / scenario)
    records = site.assess()
    expected = cli_json("assess", source_dir / scenario)
    same_fields(records, expected["zones"], scenario)
    assert all(r["status"] in ("converged", "tolerance not met") for r in records)
    assert site.zone_names == [z["name"] for z in expected["zones"]]


def test_assess_with_method_and_tolerance(source_dir, cli_json):
    path = source_dir / "shapes/throwing_lane.toml"
    records = strewn.load_site(path).assess(method="cubature", rel_tol=1e-6, verify=True)
    expected = cli_json("assess", path, "--method", "cubature", "--tolerance", "1e-6", "--verify")
    same_fields(records, expected["zones"])


def test_records_make_a_data_frame(source_dir):
    pd = pytest.importorskip("pandas")
    records = strewn.load_site(source_dir / "shapes/throwing_lane.toml").assess()
    assert list(pd.DataFrame(records)["name"]) == [r["name"] for r in records]


def test_risk_map_is_the_cli_grid(source_dir, cli_json, cli, tmp_path):
    path = source_dir / "shapes/throwing_lane.toml"
    m = strewn.load_site(path).risk_map(cells=40, per="session")
    out = tmp_path / "grid.csv"
    summary = cli_json("map", path, "--cells", 40, "--per", "session", "--csv", out)
    rows = list(csv.reader(io.StringIO(out.read_text())))[1:]
    assert m.risk.shape == (summary["grid"]["rows"], summary["grid"]["columns"])
    # The CSV prints x, y with 9 digits, risk with 17 and its bound with 3.
    x = np.array([float(r[0]) for r in rows]).reshape(m.risk.shape)
    y = np.array([float(r[1]) for r in rows]).reshape(m.risk.shape)
    risk = np.array([float(r[2]) for r in rows]).reshape(m.risk.shape)
    bound = np.array([float(r[3]) for r in rows]).reshape(m.risk.shape)
    assert np.allclose(m.x, x, rtol=1e-8, atol=1e-8) and np.allclose(m.y, y, rtol=1e-8, atol=1e-8)
    assert np.array_equal(m.risk, risk)
    assert np.allclose(m.bound, bound, rtol=1e-2, atol=0)
    assert m.risk.max() == summary["max_risk"]
    assert m.info["footprint"] == summary["footprint"] and m.info["per"] == "session"
    assert m.info["spacing_m"] == summary["grid"]["spacing_m"]
    assert [c["label"] for c in m.contours] == [c["label"] for c in summary["contours"]]
    assert [len(c["lines"]) for c in m.contours] == [c["lines"] for c in summary["contours"]]


def test_a_source_given_only_its_mean_is_aimed_at_it_on_a_utm_site(source_dir, cli_json):
    # The trial's file: mean in UTM metres, no aim. The default extent is the site (not the
    # origin as well), as in `strewn map`, and the map is not zero everywhere.
    path = source_dir / "tests/data/cli/utm/mean_only.toml"
    m = strewn.load_site(path).risk_map(cells=20)
    summary = cli_json("map", path, "--cells", 20)
    assert m.info["spacing_m"] == summary["grid"]["spacing_m"] < 2.0
    assert m.x.min() > 512330.0 and m.y.min() > 5403700.0
    assert m.risk.max() == summary["max_risk"] > 0.01
    # A position in a repr is to the millimetre, not six significant figures (5.40371e+06).
    n = strewn.Normal((512350.5, 5403712.25), np.eye(2))
    assert "mean=(512350.5, 5403712.25)" in repr(n)


def test_risk_map_warns_as_the_cli_when_its_extent_holds_nothing(source_dir, cli):
    # The same words as `strewn map --extent` prints (cli/commands/map.cpp), with the keyword's
    # name; the map is still made. An extent over the site says nothing.
    path = source_dir / "tests/data/cli/utm/mean_only.toml"
    site = strewn.load_site(path)
    with pytest.warns(UserWarning) as caught:
        m = site.risk_map(cells=4, extent=(0, 0, 10, 10))
    empty = [w for w in caught if "holds no zone" in str(w.message)]
    assert len(empty) == 1 and empty[0].filename == __file__  # points at the caller's line
    status, _, err = cli("map", path, "--cells", 4, "--extent", 0, 0, 10, 10)
    assert status == 0
    assert "strewn: warning: --" + str(empty[0].message) + "\n" in err
    assert m.risk.shape == (4, 4) and m.risk.max() == 0.0
    with warnings.catch_warnings(record=True) as over_site:
        warnings.simplefilter("always")
        site.risk_map(cells=4, extent=(512340, 5403700, 512370, 5403730))
    assert not [w for w in over_site if "holds no zone" in str(w.message)]


def test_risk_map_warns_as_the_cli_when_its_cells_are_wider_than_the_risk_s_peak(source_dir, cli):
    # 4 cells over 30 m (7.5 m each) under a spread of decimetres: a peak between cell centres
    # is missed, and the map says so (the command's warning, with the keywords' names).
    path = source_dir / "tests/data/cli/utm/mean_only.toml"
    site = strewn.load_site(path)
    with pytest.warns(UserWarning, match="wider than the narrowest peak of the risk") as caught:
        site.risk_map(cells=4, extent=(512340, 5403700, 512370, 5403730))
    coarse = [str(w.message) for w in caught if "narrowest peak" in str(w.message)]
    assert len(coarse) == 1 and coarse[0].endswith("(extent=, cells=)")
    status, _, err = cli("map", path, "--cells", 4, "--extent", 512340, 5403700, 512370, 5403730)
    assert status == 0
    assert coarse[0].replace("(extent=, cells=)", "(--extent, --cells)") in err
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        site.risk_map(cells=400, extent=(512340, 5403700, 512370, 5403730))


def test_risk_map_per_year_with_an_extent(source_dir, cli_json, tmp_path):
    path = source_dir / "shapes/drone_drop.toml"
    site = strewn.load_site(path)
    m = site.risk_map(cells=24, per="year", extent=(-5, -5, 5, 5), footprint="disk",
                      footprint_params={"radius": 0.3})
    out = tmp_path / "grid.csv"
    cli_json("map", path, "--cells", 24, "--per", "year", "--extent", -5, -5, 5, 5, "--footprint", "disk",
             "--footprint-params", '{"radius": 0.3}', "--csv", out)
    risk = np.array([float(r.split(",")[2]) for r in out.read_text().splitlines()[1:]])
    assert np.array_equal(m.risk.ravel(), risk)


@pytest.mark.parametrize("args, kwargs", [
    (["shapes/throwing_lane.toml", "--zone", "spectator bench", "--direction", -1, 0],
     dict(zone="spectator bench", direction=(-1, 0))),
    (["shapes/lawn_sprinkler.toml", "--source", "rotor, east quarter of the sweep", "--direction", 0, 1],
     dict(source="rotor, east quarter of the sweep", direction=(0, 1))),
    (["shapes/throwing_lane.toml", "--person", 2, 3, "--limit", 1e-5, "--per", "session", "--max-move", 20],
     dict(person=(2, 3), limit=1e-5, per="session", max_move=20)),
])
def test_solve_clearance_is_the_cli(args, kwargs, source_dir, cli_json):
    site = strewn.load_site(source_dir / args[0])
    same_fields(site.solve_clearance(**kwargs), cli_json("solve", "clearance", source_dir / args[0], *args[1:]))


def test_solve_spacing_is_the_cli(source_dir, cli_json):
    # The demo pitch's spacing answer (docs/irrigation.md) and a failing request, field by field
    # against `strewn solve spacing --format json` (a metric site: metres and litres in both).
    path = source_dir / "shapes/sports_pitch_rotors.toml"
    site = strewn.load_site(path)
    found = site.solve_spacing(min_cu=80, max_litres_per_zone=60, most=2)
    same_fields(found, cli_json("solve", "spacing", path, "--min-cu", 80, "--max-water-per-zone", 60, "--most", 2))
    assert found["found"] and found["answer"]["cu_percent"] >= 80 and found["beyond"]["cu_percent"] < 80
    none = site.solve_spacing("pitch rotors", min_du=99.9, steps=4)
    same_fields(none, cli_json("solve", "spacing", path, "--layout", "pitch rotors", "--min-du", 99.9, "--steps", 4))
    assert not none["found"] and "DU" in none["why"]
    with pytest.raises(strewn.InputError, match="min_cu must be a percentage"):
        site.solve_spacing(min_cu=120)
    with pytest.raises(strewn.InputError, match="at least one limit"):
        site.solve_spacing()


def test_solve_spread_and_aim_are_the_cli(source_dir, cli_json):
    path = source_dir / "shapes/drone_drop.toml"
    site = strewn.load_site(path)
    same_fields(site.solve_spread(), cli_json("solve", "spread", path))
    same_fields(site.solve_aim("parcel drop"), cli_json("solve", "aim", path, "--source", "parcel drop"))
    lane = source_dir / "shapes/throwing_lane.toml"
    same_fields(strewn.load_site(lane).solve_spread("league thrower", min_factor=0.1, max_factor=10),
                cli_json("solve", "spread", lane, "--source", "league thrower", "--min", 0.1, "--max", 10))
    for name in ("solve_aim_door.toml", "solve_aim_impossible.toml"):
        p = source_dir / "tests/data/cli" / name
        same_fields(strewn.load_site(p).solve_aim(grid=11), cli_json("solve", "aim", p, "--grid", 11))


@pytest.mark.parametrize("scenario", ["shapes/small_lawn_heads.toml", "shapes/seed_drop_zone.toml",
                                      "tests/data/cli/deposition_uniform.toml", "shapes/sports_pitch_rotors.toml"])
def test_deposition_is_the_cli(scenario, source_dir, cli_json):
    d = strewn.load_site(source_dir / scenario).deposition()
    same_fields(d, cli_json("deposition", source_dir / scenario), scenario)


def one_line(e):
    text = str(e.value)
    assert text and "\n" not in text
    return text


@pytest.mark.parametrize("name", ["cli/bad_syntax.toml", "cli/typo_key.toml", "cli/negative_sigma.toml",
                                  "cli/bad_template.toml", "cli/missing_geometry_file.toml",
                                  "cli/geojson_unknown_feature.toml", "cli/no_such_file.toml",
                                  # GIS site plans: PROJ's and GDAL's refusals through the same loader
                                  "gis/unknown_crs.toml", "gis/missing_layer.toml", "gis/missing_feature.toml"])
def test_bad_files_raise_the_cli_message(name, source_dir, cli):
    path = source_dir / "tests/data" / name
    with pytest.raises(strewn.InputError) as e:
        strewn.load_site(path)
    status, out, err = cli("assess", path)
    assert status == 2 and err.strip() == f"strewn: error: {one_line(e)}", (str(e.value), err)


def test_bad_site_requests_raise_the_cli_message(source_dir, cli):
    path = source_dir / "shapes/throwing_lane.toml"
    site = strewn.load_site(path)
    cases = [(lambda: site.solve_clearance("no such zone"), ["solve", "clearance", path, "--zone", "no such zone"]),
             (lambda: site.deposition(), ["deposition", path]),
             (lambda: site.solve_aim("nobody"), ["solve", "aim", path, "--source", "nobody"])]
    for call, args in cases:
        with pytest.raises(strewn.InputError) as e:
            call()
        status, out, err = cli(*args)
        assert status == 2 and err.strip() == f"strewn: error: {one_line(e)}", (str(e.value), err)
    nodep = source_dir / "tests/data/cli/deposition_no_amount.toml"
    with pytest.raises(strewn.InputError) as e:
        strewn.load_site(nodep).deposition()
    status, out, err = cli("deposition", nodep)
    assert status == 2 and err.strip() == f"strewn: error: {one_line(e)}"
    for bad in (lambda: site.risk_map(cells=1), lambda: site.risk_map(per="week"),
                lambda: site.risk_map(window=(0, 0, 1)), lambda: site.assess(method="guess"),
                lambda: site.solve_clearance("spectator bench", steps=0)):
        with pytest.raises(strewn.InputError):
            bad()


def test_site_properties(source_dir):
    site = strewn.load_site(source_dir / "shapes/throwing_lane.toml")
    assert site.name == "Invented throwing hall, lane 2"
    assert set(site.zones) == set(site.zone_names) and set(site.sources) == set(site.source_names)
    assert all(isinstance(r, strewn.Region) for r in site.zones.values())
    assert "Invented throwing hall" in repr(site)


# Issue 15, item 11: renamed keywords keep their former names for one release, with a warning.
def test_former_keyword_names_still_work_and_warn(source_dir):
    site = strewn.load_site(source_dir / "shapes/drone_drop.toml")
    with pytest.warns(DeprecationWarning, match="window is the former name of extent"):
        old = site.risk_map(cells=6, window=(-5, -5, 5, 5))
    new = site.risk_map(cells=6, extent=(-5, -5, 5, 5))
    assert np.array_equal(old.risk, new.risk)
    with pytest.raises(strewn.InputError, match="give extent only"):
        site.risk_map(cells=6, window=(-5, -5, 5, 5), extent=(-5, -5, 5, 5))
    with pytest.warns(DeprecationWarning, match="window is the former name of search_half_width"):
        old = site.solve_aim("parcel drop", window=2.0, grid=5)
    new = site.solve_aim("parcel drop", search_half_width=2.0, grid=5)
    assert old == new
    lane = strewn.load_site(source_dir / "shapes/throwing_lane.toml")
    with pytest.warns(DeprecationWarning, match="window is the former name of max_move"):
        old = lane.solve_clearance("spectator bench", direction=(-1, 0), window=20)
    assert old["max_move_m"] == 20.0
    assert old == lane.solve_clearance("spectator bench", direction=(-1, 0), max_move=20)


def test_risk_map_warns_of_a_footprint_parameter_under_its_former_name(source_dir, cli):
    # The rectangle's `depth` was `height` (plugins/rectangle/rectangle.cpp): the map is made and
    # the same words as `strewn map --footprint-params` prints reach Python as a warning.
    path = source_dir / "shapes/drone_drop.toml"
    site = strewn.load_site(path)
    with pytest.warns(DeprecationWarning) as caught:
        old = site.risk_map(cells=6, extent=(-5, -5, 5, 5), footprint="rectangle",
                            footprint_params={"width": 0.5, "height": 0.3})
    assert len(caught) == 1 and "'height' is the former name of 'depth'" in str(caught[0].message)
    status, _, err = cli("map", path, "--cells", 6, "--extent", -5, -5, 5, 5, "--footprint", "rectangle",
                         "--footprint-params", '{"width": 0.5, "height": 0.3}')
    assert status == 0 and str(caught[0].message) in err
    new = site.risk_map(cells=6, extent=(-5, -5, 5, 5), footprint="rectangle",
                        footprint_params={"width": 0.5, "depth": 0.3})
    assert np.array_equal(old.risk, new.risk)


def test_former_spellings_in_a_file_warn(source_dir, tmp_path):
    import shutil
    shutil.copytree(source_dir / "shapes", tmp_path / "shapes")  # its GeoJSON files beside it
    text = (source_dir / "shapes/drone_drop.toml").read_text()
    assert "[[source.component]]" in text and 'role = "report_only"' in text
    old = tmp_path / "shapes/old.toml"
    old.write_text(text.replace("[[source.component]]", "[[source.wild]]").replace('"report_only"', '"watch"'))
    with pytest.warns(DeprecationWarning, match="former name of"):
        site = strewn.load_site(old)
    assert len(site.warnings) == 2
    new = strewn.load_site(source_dir / "shapes/drone_drop.toml")
    strip = [{k: v for k, v in z.items() if k != "geometry_file"} for z in site.assess()]
    assert strip == [{k: v for k, v in z.items() if k != "geometry_file"} for z in new.assess()]


def test_a_likely_mistake_in_a_file_is_a_user_warning(tmp_path):
    # The same path as a former spelling's warning, in its own category: nothing is deprecated.
    f = tmp_path / "radians.toml"
    f.write_text('[[source]]\naim = [0.0, 0.0]\nspread = { sigma_major = 2.0, sigma_minor = 1.0, angle_deg = 1.5708 }\n\n'
                 '[[zone]]\nname = "pad"\nrole = "target"\nshape = "disk"\nparams = { centre = [0.0, 0.0], radius = 1.0 }\n')
    with pytest.warns(UserWarning, match="looks like an angle in radians") as caught:
        site = strewn.load_site(f)
    assert not any(issubclass(w.category, DeprecationWarning) for w in caught)
    assert len(site.warnings) == 1


def test_a_file_in_feet_is_read_in_metres(tmp_path):
    # The international foot, 0.3048 m exactly (NIST SP 811, appendix B.8).
    body = '[[source]]\naim = [0, {a}]\nspread = {{ sigma = {s} }}\n[[zone]]\nname = "d"\nrole = "keep_out"\n' \
           'shape = "disk"\nparams = {{ centre = [{c}, 0], radius = {r} }}\n'
    metres = tmp_path / "m.toml"
    metres.write_text('[site]\nunits = "m"\n' + body.format(a=1.0, s=0.5, c=0.6, r=0.4))
    feet = tmp_path / "ft.toml"
    feet.write_text('[site]\nunits = "ft"\n' + body.format(a=1.0 / 0.3048, s=0.5 / 0.3048, c=0.6 / 0.3048, r=0.4 / 0.3048))
    a, b = strewn.load_site(metres), strewn.load_site(feet)
    assert (a.units, b.units) == ("m", "ft")
    pa = a.assess()[0]["sources"][0]
    pb = b.assess()[0]["sources"][0]
    assert abs(pa["p_event"] - pb["p_event"]) <= pa["abs_err"] + pb["abs_err"] + 1e-12 * pa["p_event"]


def test_a_former_shape_parameter_is_a_deprecation_warning_with_the_same_region(tmp_path):
    # The shape registry's alias table: the engine marks the warning as a former name
    # (WarningKind), which the module turns into a DeprecationWarning without reading its text.
    with pytest.warns(DeprecationWarning, match="parameter 'r_inner' is the former name of 'inner_radius'"):
        former = strewn.shape("annular_sector", centre=[0, 0], r_inner=1.0, r_outer=2.0)
    with pytest.warns(DeprecationWarning, match="shape kind 'annular_sector' is the former name of 'ring_sector'"):
        former_kind = strewn.shape("annular_sector", centre=[0, 0], inner_radius=1.0, outer_radius=2.0)
    assert former_kind.area == pytest.approx(former.area, rel=1e-14)
    now = strewn.Region.ring_sector((0, 0), 1.0, 2.0, 0.0, 360.0)
    # Ring area pi (R^2 - r^2) (elementary geometry).
    assert former.area == pytest.approx(math.pi * 3.0, rel=1e-14)
    assert now.area == pytest.approx(former.area, rel=1e-14)
    with pytest.warns(DeprecationWarning, match="height is the former name of depth"):
        rect = strewn.Region.rectangle((0, 0), 2.0, height=0.5)
    assert rect.area == pytest.approx(1.0, rel=1e-14)
    f = tmp_path / "former_param.toml"
    f.write_text('[[source]]\naim = [0.0, 0.0]\nspread = { sigma = 1.0 }\n\n'
                 '[[zone]]\nname = "bench"\nrole = "keep_out"\nshape = "rectangle"\n'
                 'params = { centre = [3.0, 0.0], width = 1.0, height = 2.0 }\n')
    with pytest.warns(DeprecationWarning, match=r"zone\[1\] 'bench'.params: shape 'rectangle': parameter 'height'") as caught:
        site = strewn.load_site(f)
    assert not any(w.category is UserWarning for w in caught)
    assert len(site.warnings) == 1


def test_site_crs_is_the_frame_proj_definition_or_none(source_dir, tmp_path):
    # [site] crs as written; an origin's local frame, which PROJ's own tool (cs2cs, proj-bin)
    # takes: the origin maps to (0, 0); a site tied to nothing: None.
    import shutil
    import subprocess
    assert strewn.load_site(source_dir / "shapes/town_park.toml").crs == "EPSG:32633"
    drone = strewn.load_site(source_dir / "shapes/drone_drop.toml")
    assert drone.crs is not None and "+proj=" in drone.crs
    if shutil.which("cs2cs"):
        out = subprocess.run(["cs2cs", "-f", "%.6f", "+proj=longlat +datum=WGS84 +type=crs", "+to", drone.crs],
                             input="-30 45\n", capture_output=True, text=True, check=True).stdout.split()
        assert abs(float(out[0])) < 1e-6 and abs(float(out[1])) < 1e-6
    f = tmp_path / "plain.toml"
    f.write_text('[[source]]\naim = [0.0, 0.0]\nspread = { sigma = 1.0 }\n\n'
                 '[[zone]]\nname = "pad"\nrole = "target"\nshape = "disk"\nparams = { centre = [0.0, 0.0], radius = 1.0 }\n')
    assert strewn.load_site(f).crs is None


@pytest.mark.parametrize("scenario", ["shapes/netted_lanes.toml", "shapes/drone_drop_flight.toml"])
def test_assess_throwers_barriers_and_drops_are_the_cli(scenario, source_dir, cli_json):
    """site.assess()'s throwers, barriers and sources_from_physics are the command's JSON keys of
    the same names, to the last bit (the same engine calls and the same JSON builders)."""
    records = strewn.load_site(source_dir / scenario).assess()
    expected = cli_json("assess", source_dir / scenario)
    same_fields(records, expected["zones"], scenario)
    for key in ("throwers", "barriers", "sources_from_physics"):
        same_fields(getattr(records, key), expected.get(key, []), f"{scenario}.{key}")


def test_drop_records_carry_the_derived_spread_and_its_check(source_dir):
    records = strewn.load_site(source_dir / "shapes/drone_drop_flight.toml").assess()
    (drop,) = records.sources_from_physics
    check = drop["monte_carlo_check"]
    # The check's verdict follows its p-value and level (KS on squared Mahalanobis distances).
    assert check["normal"] == (check["ks_p_value"] >= check["normality_level"])
    assert drop["shape"] == ("normal" if check["normal"] else "mixture")
    assert sum(c["weight"] for c in drop["components"]) == pytest.approx(1.0, abs=1e-12)
    if not check["normal"]:
        assert drop["mixture_check"]["passed"] == (drop["mixture_check"]["ks_p_value"] >= check["normality_level"])


def test_thrower_and_barrier_records_on_the_netted_lanes(source_dir):
    records = strewn.load_site(source_dir / "shapes/netted_lanes.toml").assess()
    names = [t["source"] for t in records.throwers]
    assert names == ["lane A throwers", "lane B thrower"]
    # Lane B: sigma_across = D tan(3.5 deg) at D = 6 m (the geometry by hand).
    point = records.throwers[1]["standing_points"][0]
    assert point["sigma_across_m"] == pytest.approx(6 * math.tan(math.radians(3.5)), rel=1e-12)
    assert {b["name"] for b in records.barriers} == {"lane net", "bar screen"}
    for b in records.barriers:
        for stop in b["stops"]:
            assert 0.0 <= stop["p_event"] <= b["catch"] + stop["abs_err"]
