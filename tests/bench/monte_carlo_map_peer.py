#!/usr/bin/env python3
"""The Monte Carlo + KD-tree peer of a risk map (issue 22): what a careful analyst would write
without strewn, to compare against `strewn map` / strewn.probability_at.

It draws N impact points of a normal scatter model (numpy's Generator.multivariate_normal, a
fixed seed), puts them in a scipy.spatial.cKDTree, and counts, for every cell centre, the points
within the footprint's radius of it (query_ball_point with return_length=True, all cores): the
cell's probability estimate is count / N, with a binomial standard error sqrt(p (1 - p) / N).
It handles a disk footprint only (the KD-tree's ball query); any other shape would need a
bounding-ball query and a point-in-polygon test per candidate, slower still.

Used by tests/bench/map_peer_bench.py; run on its own it prints one map's time:
    /usr/bin/python3 tests/bench/monte_carlo_map_peer.py [--samples 1000000] [--cells 512]
"""
import argparse
import time

import numpy as np
from scipy import spatial


def monte_carlo_disk_map(mean, cov, radius, x, y, samples=1_000_000, seed=20261203):
    """P(impact within `radius` of each (x, y)) for impacts ~ N(mean, cov), by counting samples.

    Returns (p, standard_error), arrays shaped like x."""
    rng = np.random.default_rng(seed)
    points = rng.multivariate_normal(np.asarray(mean, float), np.asarray(cov, float), size=samples)
    tree = spatial.cKDTree(points)
    centres = np.column_stack([np.ravel(x), np.ravel(y)])
    counts = tree.query_ball_point(centres, radius, return_length=True, workers=-1)
    p = (np.asarray(counts, float) / samples).reshape(np.shape(x))
    return p, np.sqrt(p * (1.0 - p) / samples)


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--samples", type=int, default=1_000_000)
    ap.add_argument("--cells", type=int, default=512)
    args = ap.parse_args()
    h = 4.0 / args.cells
    x, y = np.meshgrid(-2.0 + h * np.arange(args.cells), 4.0 + h * np.arange(args.cells))
    cov = np.array([[0.0189, 0.0052], [0.0052, 0.0861]])  # about sigma 0.30 x 0.18 at 80 degrees
    start = time.perf_counter()
    p, _ = monte_carlo_disk_map((0.0, 6.0), cov, 0.25, x, y, args.samples)
    print(f"{args.cells} x {args.cells} cells, {args.samples} samples: {time.perf_counter() - start:.2f} s, "
          f"largest p {p.max():.4f}")


if __name__ == "__main__":
    main()
