#!/bin/sh
# `mpirun -n N strewn map` and `mpirun -n N strewn sweep` against the plain runs (issue 21): the
# map's CSV and GeoTIFF and the sweep's CSV written under mpirun with N = 1, 2, 3 and 4 ranks must
# equal, byte for byte, those of one process (the reference is the single-process run of the same
# binary: a distributed run computes the same items with the same code and must copy them back
# bit for bit; the sweep's values themselves are checked against `assess` in cli_sweep_test).
# Then the fault behaviour: bad input stops every rank with exit 2, prints the message once and
# writes nothing.
# Usage: mpi_runs_test.sh STREWN MPIEXEC SCENARIO STUDY WORKDIR
set -u
strewn=$1 mpiexec=$2 scenario=$3 study=$4 work=$5
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
# The sweep: the same rows whatever the number of ranks, the summary printed once.
"$strewn" sweep "$study" --csv sweep_plain.csv > sweep_plain.txt || { echo "plain sweep failed"; exit 1; }
for n in 2 3 4; do
  run "$n" "$strewn" sweep "$study" --csv "sweep_n$n.csv" > "sweep_n$n.txt" 2> "sweep_n$n.err" || { echo "FAIL: sweep under mpirun -n $n exited $?"; cat "sweep_n$n.err"; fail=1; continue; }
  cmp sweep_plain.csv "sweep_n$n.csv" || { echo "FAIL: sweep -n $n rows differ from the plain run"; fail=1; }
  [ "$(grep -c '^strewn .* sweep:' "sweep_n$n.txt")" = 1 ] || { echo "FAIL: sweep -n $n printed its summary more than once"; fail=1; }
  echo "mpirun -n $n: sweep CSV identical to the plain run"
done
printf '[study]\nscenario = "%s"\n[[axis]]\nzone = "bench"\nparameter = "offset_x"\nvalues = [1]\n' "$scenario" > bad_study.toml
run 3 "$strewn" sweep bad_study.toml --csv bad_sweep.csv > bad_sweep.txt 2> bad_sweep.err
status=$?
[ "$status" = 2 ] || { echo "FAIL: a bad study under mpirun exited $status, not 2"; fail=1; }
[ "$(grep -c "^strewn: error: bad_study.toml:4:8: axis\[1\].zone: the scenario has no zone named 'bench'" bad_sweep.err)" = 1 ] || { echo "FAIL: the study error was not printed exactly once:"; cat bad_sweep.err; fail=1; }
[ ! -e bad_sweep.csv ] || { echo "FAIL: a bad study left bad_sweep.csv"; fail=1; }
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
[ "$fail" = 0 ] && echo "all mpirun map and sweep checks passed"
exit "$fail"
