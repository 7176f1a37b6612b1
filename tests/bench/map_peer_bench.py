#!/usr/bin/env python3
"""Risk maps side by side in one run (issue 22): strewn against the Monte Carlo + KD-tree peer
(tests/bench/monte_carlo_map_peer.py), then the throwing-lane demo's 1000 x 1000 maps.

1. A person disk (radius 0.25 m) under an elliptical normal spread on a 512 x 512 grid:
   strewn.probability_at at rel_tol 1e-6 against the peer with 10^6 samples, each timed (wall
   and process CPU time, both using every core), the ratio, and both errors: strewn's bounds
   (every cell) and its actual error against strewn at rel_tol 1e-12 on every 8th cell (the exact
   method is checked against scipy and 40-digit mpmath references by the test suite); the peer's
   error against the same reference, and how many of those cells it leaves at 0.
2. `strewn map shapes/throwing_lane.toml --cells 1000` over a square extent (1000 x 1000 cells)
   with the person footprint and with a rectangle footprint (0.5 m x 0.3 m), each timed as a
   whole process (wall time, and CPU time of both threads: on a loaded machine half the CPU time
   is what the map would take on two idle cores), with the load average before each run.

Run with Debian's python3 and the build tree:
    PYTHONPATH=build/python /usr/bin/python3 tests/bench/map_peer_bench.py [--samples 1000000]
        [--strewn build/bin/strewn] [--skip-cli]
"""
import argparse
import os
import json
import pathlib
import resource
import subprocess
import sys
import time

import numpy as np

import strewn

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent))
from monte_carlo_map_peer import monte_carlo_disk_map  # noqa: E402

ROOT = pathlib.Path(__file__).resolve().parents[2]


def timed(fn):
    wall, cpu = time.perf_counter(), time.process_time()
    out = fn()
    return out, time.perf_counter() - wall, time.process_time() - cpu


def disk_map(samples, cells):
    model = strewn.Normal.from_axes((0.0, 6.0), 0.30, 0.18, 80.0)
    radius = 0.25
    person = strewn.Region.disk((0.0, 0.0), radius)
    h = 4.0 / cells  # exactly representable for cells a power of two: rows are exact runs
    x, y = np.meshgrid(-2.0 + h * np.arange(cells), 4.0 + h * np.arange(cells))
    print(f"1. Disk map (radius {radius} m), {cells} x {cells} cells, {os.cpu_count()} core(s), "
          f"load average {os.getloadavg()[0]:.1f}")
    res, t_strewn, c_strewn = timed(lambda: strewn.probability_at(model, person, x, y, rel_tol=1e-6))
    (mc, mc_se), t_mc, c_mc = timed(lambda: monte_carlo_disk_map(model.mean, model.cov, radius, x, y, samples))
    # strewn once more after the peer, so that a change of load shows as a spread of the two.
    _, t_strewn2, c_strewn2 = timed(lambda: strewn.probability_at(model, person, x, y, rel_tol=1e-6))
    sel = (slice(None, None, 8), slice(None, None, 8))
    ref = strewn.probability_at(model, person, x[sel], y[sel], rel_tol=1e-12)
    assert ref.converged.all()
    positive = res.p > 0
    bound_rel = np.max(res.abs_err[positive] / res.p[positive])
    err_strewn = np.max(np.abs(res.p[sel] - ref.p) / np.maximum(ref.p, 1e-300))
    big = ref.p >= 1e-3
    mc_rel = np.abs(mc[sel] - ref.p) / np.maximum(ref.p, 1e-300)
    print(f"  strewn.probability_at, rel_tol 1e-6: wall {t_strewn:.3f} s and {t_strewn2:.3f} s, "
          f"CPU {c_strewn:.3f} s and {c_strewn2:.3f} s; every cell converged: {bool(res.converged.all())}, "
          f"largest bound {bound_rel:.1e} relative, largest actual error {err_strewn:.1e} relative "
          f"({ref.p.size} cells against rel_tol 1e-12)")
    print(f"  Monte Carlo + cKDTree, {samples:.0e} samples: wall {t_mc:.3f} s, CPU {c_mc:.3f} s; "
          f"relative error where p >= 1e-3: median {np.median(mc_rel[big]):.1e}, largest {np.max(mc_rel[big]):.1e}; "
          f"cells with p < 1e-3: {int(np.sum(~big))}, of which it counts 0 in {int(np.sum(mc[sel][~big] == 0))}; "
          f"its own standard error at the largest p: {mc_se.max():.1e}")
    best = min(t_strewn, t_strewn2)
    print(f"  ratio, peer wall time / strewn wall time: {t_mc / best:.0f}x (against the slower strewn run: "
          f"{t_mc / max(t_strewn, t_strewn2):.0f}x); CPU time ratio {c_mc / min(c_strewn, c_strewn2):.0f}x")


def cli_maps(binary):
    print("2. strewn map shapes/throwing_lane.toml --cells 1000 --extent -5 0.5 5.5 11 (whole process)")
    for name, extra in (("person", []),
                        ("rectangle 0.5 x 0.3 m", ["--footprint", "rectangle", "--footprint-params",
                                                   '{"width": 0.5, "depth": 0.3}'])):
        cmd = [binary, "map", str(ROOT / "shapes/throwing_lane.toml"), "--cells", "1000", "--extent", "-5", "0.5",
               "5.5", "11", "--format", "json"] + extra
        load = os.getloadavg()[0]
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        start = time.perf_counter()
        run = subprocess.run(cmd, capture_output=True, text=True)
        wall = time.perf_counter() - start
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
        if run.returncode != 0:
            print(f"  {name}: failed ({run.returncode}): {run.stderr.strip()}")
            continue
        s = json.loads(run.stdout)
        grid = s.get("grid", {})
        print(f"  {name}: wall {wall:.2f} s, CPU {cpu:.2f} s (both threads) for {grid.get('columns')} x "
              f"{grid.get('rows')} cells (load average {load:.1f} before)")


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--samples", type=int, default=1_000_000, help="Monte Carlo samples of the peer")
    ap.add_argument("--cells", type=int, default=512, help="cells per side of the disk map")
    ap.add_argument("--strewn", default=str(ROOT / "build/bin/strewn"), help="the strewn program")
    ap.add_argument("--skip-cli", action="store_true", help="leave out the throwing-lane maps")
    args = ap.parse_args()
    print(f"strewn {strewn.__version__}, numpy {np.__version__}, scipy {__import__('scipy').__version__}")
    disk_map(args.samples, args.cells)
    if not args.skip_cli:
        cli_maps(args.strewn)


if __name__ == "__main__":
    main()
