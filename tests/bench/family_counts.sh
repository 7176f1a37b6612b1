#!/bin/sh
# Instructions per probability (callgrind) for each family x case of bench/family_cases.hpp:
#   tests/bench/family_counts.sh [BUILD_DIR] [CALLS]
# Each count is callgrind's total for CALLS probabilities less that of a run with 0 calls (the
# start-up), divided by CALLS. Counts are repeatable on one machine; wall times are not.
build=${1:-build}
calls=${2:-2000}
driver="$build/bin/strewn_family_count"
total() {
  out=$(mktemp)
  valgrind --tool=callgrind --callgrind-out-file="$out" "$driver" "$@" >/dev/null 2>&1
  sed -n 's/^summary: //p' "$out"
  rm -f "$out"
}
base=$(total octagon_nonconvex normal 0)
for c in octagon_nonconvex elliptical_sector_offset elliptical_sector_wet; do
  for f in normal student_t4 student_t2.5 uniform profile profile_arc; do
    n=$(total "$c" "$f" "$calls")
    echo "$c $f $(( (n - base) / calls ))"
  done
done
