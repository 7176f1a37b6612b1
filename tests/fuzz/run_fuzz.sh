#!/bin/sh
# Runs the scenario fuzz target for a bounded time on the bundled scenarios as seeds.
# usage: run_fuzz.sh FUZZ_BUILD_DIR SOURCE_DIR SECONDS
# FUZZ_BUILD_DIR is the Clang tree tools/setup.sh configures; it is brought up to date first.
set -eu
fuzz_build=$1 src=$2 seconds=$3
if [ ! -f "$fuzz_build/CMakeCache.txt" ]; then
  echo "scenario_fuzz: no Clang fuzz build in $fuzz_build; run tools/setup.sh" >&2
  exit 1
fi
cmake --build "$fuzz_build" --parallel "$(nproc)" >"$fuzz_build/last_build.log" 2>&1 ||
  { tail -20 "$fuzz_build/last_build.log" >&2; exit 1; }
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
mkdir "$work/corpus"
cp "$src"/shapes/*.toml "$src"/shapes/templates/*.toml "$src"/tests/data/cli/*.toml \
   "$src"/tests/data/cases/*.toml "$work/corpus/"
cd "$work"
# -timeout: one input taking 10 s is a hang; leaks are reported by AddressSanitizer at exit of
# each run (libFuzzer's -detect_leaks defaults to on).
STREWN_PLUGIN_PATH="$fuzz_build/lib/strewn/plugins" "$fuzz_build/bin/scenario_fuzz" corpus \
  -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 -max_len=4096 -print_final_stats=1 2>&1 |
  tail -25
# The pipe hides the fuzzer's status; a crash leaves a crash-*, leak-* or timeout-* file.
if ls crash-* leak-* timeout-* oom-* >/dev/null 2>&1; then
  echo "scenario_fuzz: failure inputs kept:" >&2
  for f in crash-* leak-* timeout-* oom-*; do [ -f "$f" ] && { echo "--- $f" >&2; head -c 600 "$f" >&2; echo >&2; }; done
  exit 1
fi
