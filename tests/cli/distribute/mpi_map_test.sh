#!/bin/sh
# `mpirun -n N strewn map` against the plain run (issue 21): the CSV and the GeoTIFF written
# under mpirun with N = 1, 2, 3 and 4 ranks must equal, byte for byte, those of one process
# (the reference here is the single-process run of the same binary: the tiles of a distributed
# run are computed by the same code and must be copied back bit for bit). Then the fault
# behaviour: bad input stops every rank with exit 2, prints the message once, writes nothing.
# Usage: mpi_map_test.sh STREWN MPIEXEC SCENARIO WORKDIR
set -u
strewn=$1 mpiexec=$2 scenario=$3 work=$4
if [ -z "$mpiexec" ] || ! command -v "$mpiexec" >/dev/null 2>&1; then
  echo "SKIPPED: mpirun not found (install openmpi-bin; tools/setup.sh does)"; exit 77
fi
# Loopback only, as root in CI, more ranks than cores on a 2-core machine.
export OMPI_MCA_btl=self,vader OMPI_MCA_rmaps_base_oversubscribe=1 OMPI_MCA_btl_vader_single_copy_mechanism=none
run() { "$mpiexec" --allow-run-as-root --oversubscribe -n "$@"; }
rm -rf "$work" && mkdir -p "$work" && cd "$work" || exit 1
fail=0
"$strewn" map "$scenario" --cells 90 --csv plain.csv --geotiff plain.tif > plain.txt || { echo "plain run failed"; exit 1; }
for n in 1 2 3 4; do
  run "$n" "$strewn" map "$scenario" --cells 90 --csv "n$n.csv" --geotiff "n$n.tif" > "n$n.txt" 2> "n$n.err" || { echo "FAIL: mpirun -n $n exited $?"; cat "n$n.err"; fail=1; continue; }
  cmp plain.csv "n$n.csv" && cmp plain.tif "n$n.tif" || { echo "FAIL: -n $n output differs from the plain run"; fail=1; }
  # The summary is printed once (rank 0), not once per rank.
  [ "$(grep -c '^strewn .* map:' "n$n.txt")" = 1 ] || { echo "FAIL: -n $n printed the summary $(grep -c '^strewn .* map:' "n$n.txt") times"; fail=1; }
  echo "mpirun -n $n: CSV and GeoTIFF identical to the plain run"
done
# Bad input on every rank: exit 2, one message, no file.
run 3 "$strewn" map missing_scenario.toml --csv bad.csv > bad.txt 2> bad.err
status=$?
[ "$status" = 2 ] || { echo "FAIL: bad input under mpirun exited $status, not 2"; fail=1; }
[ "$(grep -c '^strewn: error: missing_scenario.toml' bad.err)" = 1 ] || { echo "FAIL: the error was not printed exactly once:"; cat bad.err; fail=1; }
[ ! -e bad.csv ] || { echo "FAIL: bad input left bad.csv"; fail=1; }
# A bad option: the same.
run 2 "$strewn" map "$scenario" --cells 1 --csv bad2.csv > bad2.txt 2> bad2.err
status=$?
[ "$status" = 2 ] || { echo "FAIL: a bad --cells under mpirun exited $status, not 2"; fail=1; }
[ "$(grep -c '^strewn: error:' bad2.err)" = 1 ] || { echo "FAIL: the --cells error was not printed exactly once:"; cat bad2.err; fail=1; }
[ ! -e bad2.csv ] || { echo "FAIL: a bad --cells left bad2.csv"; fail=1; }
[ "$fail" = 0 ] && echo "all mpirun map checks passed"
exit "$fail"
