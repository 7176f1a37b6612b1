#!/bin/sh
# Renders `strewn report` in headless Chromium (Debian's chromium package) and checks that the
# map and the tables are present and visible (the page's own layout self-check), that it needs
# no network, and that it prints to PDF. The screenshot and PDF are kept as test artifacts.
# usage: check_report.sh BUILD_DIR SOURCE_DIR
set -eu
build=$1 src=$2
out="$build/tests/report_artifacts"
mkdir -p "$out"
rm -f "$out/report.html" "$out/report.png" "$out/report.pdf"
status=0
STREWN_PLUGIN_PATH="$build/lib/strewn/plugins" "$build/bin/strewn" report "$src/shapes/throwing_lane.toml" \
  --out "$out/report.html" || status=$?
[ "$status" -eq 3 ] || { echo "report: expected exit status 3 (limits exceeded in the demo), got $status" >&2; exit 1; }
browser=$(command -v chromium || true)
[ -n "$browser" ] || { echo "report: chromium is not installed; run tools/setup.sh" >&2; exit 1; }
if grep -Eq '(src|href)="(https?:)?//' "$out/report.html"; then
  echo "report: the page refers to something on the network" >&2; exit 1
fi
flags="--headless --no-sandbox --disable-gpu --no-first-run --disable-extensions"
home=$(mktemp -d); trap 'rm -rf "$home"' EXIT
# shellcheck disable=SC2086
HOME="$home" timeout 180 "$browser" $flags --dump-dom "file://$out/report.html" >"$out/dom.html" 2>/dev/null
check=$(grep -o 'data-check="[^"]*"' "$out/dom.html" || true)
echo "layout self-check: $check"
# Four tables: sources, zones, assessment, and individual risk (the demo's scorer has an occupancy).
[ "$check" = 'data-check="map:visible;tables:4"' ] || { echo "report: map or tables not visible" >&2; exit 1; }
for part in 'id="assessment"' 'id="zones"' 'id="sources"' 'id="field"' 'Caution' 'Assumptions' 'Methods and accuracy'; do
  grep -q "$part" "$out/report.html" || { echo "report: missing $part" >&2; exit 1; }
done
# shellcheck disable=SC2086
HOME="$home" timeout 180 "$browser" $flags --window-size=1000,2400 --screenshot="$out/report.png" "file://$out/report.html" >/dev/null 2>&1
# shellcheck disable=SC2086
HOME="$home" timeout 180 "$browser" $flags --print-to-pdf="$out/report.pdf" "file://$out/report.html" >/dev/null 2>&1
[ "$(wc -c <"$out/report.png")" -gt 20000 ] || { echo "report: screenshot is empty" >&2; exit 1; }
head -c 5 "$out/report.pdf" | grep -q '%PDF-' || { echo "report: no PDF printed" >&2; exit 1; }
echo "report rendered: $out/report.png, $out/report.pdf"
