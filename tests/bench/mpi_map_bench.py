#!/usr/bin/env python3
"""Risk-map speed under mpirun (issue 21): cells per second, per rank and per computing rank,
for 1, 2 and 4 ranks side by side, and the bytes a tile sends back. Not part of the test run.

Usage: tests/bench/mpi_map_bench.py [STREWN] [SCENARIO] [CELLS]
  (defaults: build/bin/strewn, shapes/throwing_lane.toml, 300 cells along the longer side)

Each run is `strewn map SCENARIO --cells CELLS --threads 1 --csv OUT`; "map s" is the map's own
time as the summary prints it (tiles handed out, computed and gathered), "total s" the whole
process under mpirun (its start-up, loading and writing included); cells/s are from "map s". Under mpirun rank 0 hands out tiles and gathers them
and computes none, so N ranks have N - 1 computing ranks. A tile is whole rows, about eight per
process (engine/src/map/risk_map.cpp); it travels back as 9 bytes of header, 1 byte of
convergence and 16 bytes (value and bound, two doubles) a cell; a request for work is 8 bytes.
"""
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time

root = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
strewn = sys.argv[1] if len(sys.argv) > 1 else os.path.join(root, "build", "bin", "strewn")
scenario = sys.argv[2] if len(sys.argv) > 2 else os.path.join(root, "shapes", "throwing_lane.toml")
cells = sys.argv[3] if len(sys.argv) > 3 else "300"
mpirun = shutil.which("mpirun")
env = dict(os.environ, OMPI_MCA_rmaps_base_oversubscribe="1", OMPI_MCA_btl="self,vader")


def timed(cmd, out):
    start = time.monotonic()
    r = subprocess.run(cmd + ["--csv", out], env=env, capture_output=True, text=True)
    seconds = time.monotonic() - start
    if r.returncode != 0:
        sys.exit("failed: " + " ".join(cmd) + "\n" + r.stderr)
    m = re.search(r"grid: (\d+) x (\d+) cells.*; ([0-9.]+) s", r.stdout)
    return seconds, int(m.group(1)), int(m.group(2)), float(m.group(3))


with tempfile.TemporaryDirectory() as tmp:
    base = [strewn, "map", scenario, "--cells", cells, "--threads", "1"]
    rows = []
    total, columns, nrows, seconds = timed(base, os.path.join(tmp, "plain.csv"))
    n_cells = columns * nrows
    rows.append(("plain (no mpirun)", 1, 1, total, seconds))
    if mpirun:
        for n in (1, 2, 4):
            t, _, _, s = timed([mpirun, "--allow-run-as-root", "--oversubscribe", "--bind-to", "none", "-n", str(n)] + base,
                               os.path.join(tmp, f"n{n}.csv"))
            rows.append((f"mpirun -n {n}", n, max(1, n - 1), t, s))
    print(f"map of {columns} x {nrows} = {n_cells} cells, {os.cpu_count()} core(s) on this machine")
    print(f"{'run':<20}{'ranks':>6}{'computing':>10}{'total s':>9}{'map s':>7}{'cells/s':>10}{'/rank':>9}"
          f"{'/computing rank':>16}")
    for name, ranks, computing, t, s in rows:
        print(f"{name:<20}{ranks:>6}{computing:>10}{t:>9.2f}{s:>7.1f}{n_cells / s:>10.0f}{n_cells / s / ranks:>9.0f}"
              f"{n_cells / s / computing:>16.0f}")
    for n in (2, 4):
        tile_rows = max(1, nrows // (8 * n))
        print(f"-n {n}: tiles of {tile_rows} row(s) x {columns} cells: {9 + 1 + 16 * tile_rows * columns} bytes back "
              f"per tile, 8 bytes out; {16 * columns / 1.0:.0f} bytes per row")
