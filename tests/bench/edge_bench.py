#!/usr/bin/env python3
"""The exact method per edge against its Python peer, side by side in one run (issue 22).

The peer is numpy with scipy.special.owens_t vectorised over the edges
(python_bench.scipy_polygon_probability): whiten, then per edge one pair T(h, t2/h) - T(h, t1/h)
of Owen's T at the distance h of the edge's line from the mean and the ends' tangential
coordinates t1, t2, summed with the sign of each edge and taken from the winding number. That
is the edge decomposition of a polygon's probability into angular regions, each a difference of
Owen's T values: D. B. Owen (1956), "Tables for computing bivariate normal probabilities",
Ann. Math. Statist. 27(4), 1075-1090, and for polygons A. R. DiDonato, M. P. Jarnagin and
R. K. Hageman (1980), SIAM J. Sci. Stat. Comput. 1(2), 179-186.

strewn is timed twice: through the Python module (strewn.probability, what a Python user pays,
call overhead included) and inside one C++ process (build/bin/strewn_exact_count, CPU time of
many calls). Every time is CPU time (time.process_time, std::clock), the best of several
rounds, the rounds interleaving the three so that all see the same machine. Accuracy of both
against a 40-digit mpmath reference (python_bench.mp_polygon_probability: the same boundary
integral per edge by mpmath.quad, whitening in mpmath).

With --before-lib DIR (a folder holding another build's libstrewn.so.0.1, e.g. of the commit
before a change), the same driver is also timed on that library in the same rounds, for a
before/after ratio from one run.

Run with Debian's python3 from the source tree, after building strewn_python and strewn_exact_count:
    PYTHONPATH=build/python /usr/bin/python3 tests/bench/edge_bench.py [--build build] [--rounds 5] [--before-lib DIR]
"""
import argparse
import math
import os
import subprocess
import sys
import time
import timeit

import numpy as np

import strewn

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from python_bench import mp_polygon_probability, polygon_cases, scipy_polygon_probability  # noqa: E402


def cpu_seconds(fn, number):
    """CPU time per call of fn over `number` calls."""
    return timeit.timeit(fn, number=number, timer=time.process_time) / number


def cxx_seconds(binary, case, calls, library=None):
    """CPU time per call inside one process (strewn_exact_count prints it with --time), on the
    build's library or, with `library`, on the libstrewn in that folder."""
    env = dict(os.environ)
    if library:
        env["LD_LIBRARY_PATH"] = library + (":" + env["LD_LIBRARY_PATH"] if env.get("LD_LIBRARY_PATH") else "")
    out = subprocess.run([binary, case, str(calls), "--time"], check=True, capture_output=True, text=True,
                         env=env).stdout
    return float(out.split("cpu_ns_per_call=")[1].split()[0]) * 1e-9


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--build", default="build", help="the build tree (for bin/strewn_exact_count)")
    ap.add_argument("--rounds", type=int, default=5, help="interleaved rounds; the best of each is kept")
    ap.add_argument("--before-lib", help="a folder with another build's libstrewn.so.0.1, timed alongside")
    args = ap.parse_args()
    binary = os.path.join(args.build, "bin", "strewn_exact_count")
    mean, cov, cases = polygon_cases()
    model = strewn.Normal(mean, cov)
    wanted = {"8-vertex polygon": "octagon", "200-gon": "gon200"}
    print(f"strewn {strewn.__version__}, numpy {np.__version__}, scipy {__import__('scipy').__version__}; "
          f"CPU time per probability, best of {args.rounds} interleaved rounds")
    print(f"{'case':18} {'p':>10} {'peer us':>9} {'strewn py us':>13} {'strewn C++ us':>14} "
          f"{'peer/py':>8} {'peer/C++':>9} {'C++ ns/edge':>12} {'peer rel err':>13} {'strewn rel err':>15} "
          f"{'strewn bound':>13}" + (f" {'C++ before us':>14} {'before/after':>13}" if args.before_lib else ""))
    for name, poly in cases:
        if name not in wanted:
            continue
        region = strewn.Region.polygon(poly)
        r = strewn.probability(model, region)
        s = scipy_polygon_probability(mean, cov, poly)
        n_py = 20000 if len(poly) < 50 else 2000
        n_peer = 2000 if len(poly) < 50 else 500
        n_cxx = 200000 if len(poly) < 50 else 20000
        t_peer = t_py = t_cxx = t_before = math.inf
        for _ in range(args.rounds):
            t_peer = min(t_peer, cpu_seconds(lambda: scipy_polygon_probability(mean, cov, poly), n_peer))
            t_py = min(t_py, cpu_seconds(lambda: strewn.probability(model, region), n_py))
            t_cxx = min(t_cxx, cxx_seconds(binary, wanted[name], n_cxx))
            if args.before_lib:
                t_before = min(t_before, cxx_seconds(binary, wanted[name], n_cxx, args.before_lib))
        ref = mp_polygon_probability(mean, cov.tolist(), poly)
        e_peer = abs(float((s - ref) / ref))
        e_strewn = abs(float((r.p - ref) / ref))
        print(f"{name:18} {r.p:10.3e} {1e6 * t_peer:9.1f} {1e6 * t_py:13.2f} {1e6 * t_cxx:14.3f} "
              f"{t_peer / t_py:7.0f}x {t_peer / t_cxx:8.0f}x {1e9 * t_cxx / len(poly):12.0f} "
              f"{e_peer:13.1e} {e_strewn:15.1e} {r.abs_err / r.p:13.1e}" +
              (f" {1e6 * t_before:14.3f} {t_before / t_cxx:12.2f}x" if args.before_lib else ""))


if __name__ == "__main__":
    main()
