#!/bin/sh
# The Student-t fit's coverage study over the grid of docs/intervals.md ("Student-t fit"):
# n in {30, 50, 100, 200} impacts, true nu in {3, 5, 10, 30}, SETS seeded data sets per cell,
# REPLICATES bootstrap refits per world, one thread, niced (the machine is shared).
#   tests/bench/t_fit_coverage_grid.sh BUILD_DIR [SETS] [REPLICATES] [SEED]
# One line per cell from build/bin/strewn_t_fit_coverage (tests/bench/t_fit_coverage.cpp).
# A cell's binomial standard error at 95% is sqrt(0.95 * 0.05 / SETS): 1.3% at 300, 0.7% at 1000.
set -e
build=${1:?usage: t_fit_coverage_grid.sh BUILD_DIR [SETS] [REPLICATES] [SEED]}
sets=${2:-1000}
replicates=${3:-200}
seed=${4:-20261203}
for n in 30 50 100 200; do
  for nu in 3 5 10 30; do
    nice -n 10 "$build/bin/strewn_t_fit_coverage" "$sets" "$n" "$nu" "$replicates" "$seed"
  done
done
