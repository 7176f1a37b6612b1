"""strewn.probability against `strewn assess --format json` on the bundled scenarios: the
sources built from the scenario's [[source]] tables (spread forms and wild components as
docs/scenario-format.md defines them) and every zone given by `shape` and `params`, integrated
with the scenario's method and tolerance, give the CLI's p_event, q_event and abs_err (the same
engine calls, so the same bits): 37 zone-source pairs over the six scenarios. Zones from
templates, geometry files or placed by offset and rotation need the site loader, which the module
does not have yet (issue 20's site API): they are left out here (6 of 21 zones), and the test
checks that each scenario keeps at least one zone."""
import tomllib

import pytest

import strewn

SCENARIOS = ["shapes/throwing_lane.toml", "shapes/drone_drop.toml", "shapes/lawn_sprinkler.toml",
             "shapes/small_lawn_heads.toml", "shapes/seed_drop_zone.toml", "tests/data/cli/closed_form_disk.toml"]


def normal(mean, spread):
    if "sigma_major" in spread:
        return strewn.Normal.from_axes(mean, spread["sigma_major"], spread["sigma_minor"], spread.get("angle_deg", 0.0))
    if "sigma" in spread:
        return strewn.Normal.from_axes(mean, spread["sigma"], spread["sigma"], 0.0)
    if "covariance" in spread:
        return strewn.Normal(mean, spread["covariance"])
    if "cep" in spread:
        return strewn.Normal.from_cep(mean, spread["cep"])
    if "r95" in spread:
        return strewn.Normal.from_r95(mean, spread["r95"])
    return strewn.Normal.from_fraction(mean, spread["fraction"], spread["radius"])


def model_of(source):
    """The source's scatter model as the CLI's loader builds it (engine/src/site/site_io.cpp): mean = aim +
    bias (or `mean`); a wild component's mean is aim + its own bias, by default the source's
    (mean - aim), the same floating-point steps; the core's weight 1 - (sum of wild weights).
    None for a source without a spread about its aim (heads, physics)."""
    if "spread" not in source:
        return None
    aim = source.get("aim", [0.0, 0.0])
    bias = source.get("bias", [0.0, 0.0])
    mean = source["mean"] if "mean" in source else [aim[0] + bias[0], aim[1] + bias[1]]
    main = normal(mean, source["spread"])
    wild = source.get("component", source.get("wild", []))  # [[source.wild]] is its former name
    if not wild:
        return main
    parts, wild_weight = [], 0.0
    for w in wild:
        b = w.get("bias", [mean[0] - aim[0], mean[1] - aim[1]])
        parts.append((w["weight"], normal([aim[0] + b[0], aim[1] + b[1]], w["spread"])))
        wild_weight += w["weight"]
    return strewn.Mixture([(1.0 - wild_weight, main)] + parts)


@pytest.mark.parametrize("scenario", SCENARIOS)
def test_zones_match_the_cli(cli_json, source_dir, scenario):
    path = source_dir / scenario
    with open(path, "rb") as f:
        spec = tomllib.load(f)
    settings = spec.get("settings", {})
    method = settings.get("method", "exact")
    rel_tol = settings.get("tolerance", 1e-8)
    cli = {z["name"]: {s["source"]: s for s in z["sources"]} for z in cli_json("assess", path)["zones"]}
    models = {s["name"]: model_of(s) for s in spec["source"]}
    compared = 0
    for zone in spec["zone"]:
        if "shape" not in zone or "offset" in zone or "rotation_deg" in zone:
            continue
        region = strewn.shape(zone["shape"], **zone.get("params", {}))
        for name, model in models.items():
            if model is None or name not in cli[zone["name"]]:
                continue
            ref = cli[zone["name"]][name]
            r = strewn.probability(model, region, method=method, rel_tol=rel_tol)
            assert (r.p, r.q, r.abs_err, r.converged) == \
                (ref["p_event"], ref["p_outside_event"], ref["abs_err"], ref["converged"]), (zone["name"], name, r, ref)
            compared += 1
    assert compared >= 1, f"{scenario}: no zone and source the module can build"
