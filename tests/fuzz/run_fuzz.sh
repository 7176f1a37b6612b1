#!/bin/sh
# Runs one fuzz target for a bounded time on bundled files as seeds.
# usage: run_fuzz.sh FUZZ_BUILD_DIR SOURCE_DIR SECONDS [TARGET [MISSING]]
# TARGET is scenario_fuzz (default), geometry_fuzz or impact_csv_fuzz. FUZZ_BUILD_DIR is the
# Clang tree tools/setup.sh configures; the target is brought up to date first. MISSING says
# what a missing tree means: "fail" (default, and under tools/setup.sh) or "skip" (exit 77,
# which ctest reports as skipped, for a contributor's plain build without the tree).
# Fails (exit 1) when the tree (unless skipped) or the binary is missing, the build fails, the fuzzer exits with
# a non-zero status, or it leaves a crash-, leak-, timeout- or oom- file: never a silent pass.
# (Before, the fuzzer's status was hidden behind a pipe and a missing binary printed "not found"
# and exited 0. Shown with a stub build step: no binary -> old exit 0, now 1; a fuzzer that
# reports an error and exits 77 without a crash file -> old exit 0, now 1.)
set -eu
fuzz_build=$1 src=$2 seconds=$3 target=${4:-scenario_fuzz} missing=${5:-fail}
[ -d "$fuzz_build" ] && fuzz_build=$(cd "$fuzz_build" && pwd)
src=$(cd "$src" && pwd)
if [ ! -f "$fuzz_build/CMakeCache.txt" ]; then
  if [ "$missing" = skip ]; then
    echo "$target: skipped: no Clang fuzz build in $fuzz_build (tools/setup.sh makes it)"
    exit 77
  fi
  echo "$target: no Clang fuzz build in $fuzz_build; run tools/setup.sh" >&2
  exit 1
fi
cmake --build "$fuzz_build" --parallel "$(nproc)" --target "$target" >"$fuzz_build/last_build_$target.log" 2>&1 ||
  { tail -20 "$fuzz_build/last_build_$target.log" >&2; exit 1; }
binary="$fuzz_build/bin/$target"
if [ ! -x "$binary" ]; then
  echo "$target: no fuzz binary at $binary" >&2
  exit 1
fi
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
mkdir "$work/corpus"
case "$target" in
  scenario_fuzz)
    cp "$src"/shapes/*.toml "$src"/shapes/templates/*.toml "$src"/tests/data/cli/*.toml \
       "$src"/tests/data/cases/*.toml "$work/corpus/" ;;
  geometry_fuzz)
    cp "$src"/shapes/sites/*.geojson "$src"/shapes/sites/*.wkt "$src"/tests/data/cli/geometry/*.geojson \
       "$src"/tests/data/cli/geometry/*.wkt "$work/corpus/" ;;
  impact_csv_fuzz)
    cp "$src"/shapes/field_data/*.csv "$src"/tests/data/fit/*.csv "$work/corpus/" ;;
  *)
    echo "run_fuzz.sh: unknown target '$target'" >&2
    exit 1 ;;
esac
# Inputs that once failed (tests/fuzz/regressions/TARGET/) are seeds too, so a fixed failure
# stays fixed and an open one fails every run, not only when the fuzzer happens upon it.
if [ -d "$src/tests/fuzz/regressions/$target" ]; then
  cp "$src/tests/fuzz/regressions/$target"/* "$work/corpus/"
fi
cd "$work"
# -timeout: one input taking 10 s is a hang; leaks are reported by AddressSanitizer at exit of
# each run (libFuzzer's -detect_leaks defaults to on). The fuzzer's own status is kept.
status=0
STREWN_PLUGIN_PATH="$fuzz_build/lib/strewn/plugins" "$binary" corpus \
  -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 -max_len=4096 -print_final_stats=1 \
  >fuzz.log 2>&1 || status=$?
tail -25 fuzz.log
kept=0
for f in crash-* leak-* timeout-* oom-*; do
  [ -f "$f" ] || continue
  kept=1
  echo "--- $target failure input $f:" >&2
  head -c 600 "$f" >&2
  echo >&2
  mkdir -p "$fuzz_build/failures" && cp "$f" "$fuzz_build/failures/$target-$f"
done
[ "$kept" -eq 0 ] || echo "$target: failure inputs kept in $fuzz_build/failures" >&2
if [ "$status" -ne 0 ] || [ "$kept" -ne 0 ]; then
  echo "$target: the fuzzer exited with status $status" >&2
  exit 1
fi
echo "$target: no failure in $seconds s"
