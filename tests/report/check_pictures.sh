#!/bin/sh
# Renders every picture strewn draws in headless Chromium (Debian's chromium package) and checks
# them through the DOM after layout (check_pictures.js): title, axes, north, colour bar and legend
# present, no two texts overlapping, every text inside the picture, one number format, and an
# unsafe area drawn where the demo exceeds a limit; the lane demo once more in feet. The unsafe-area polygons of the GeoJSON are
# checked by GDAL (ogrinfo's SQLite dialect: ST_IsValid, ST_Area) and against the map's own grid
# (check_unsafe_geojson.py). The pages are kept in build/tests/picture_artifacts; with
# STREWN_PICTURE_SCREENSHOTS=1 a screenshot of each too, for a look by eye.
# usage: check_pictures.sh BUILD_DIR SOURCE_DIR
set -eu
build=$1 src=$2
out="$build/tests/picture_artifacts"
rm -rf "$out"
mkdir -p "$out"
strewn="$build/bin/strewn"
export STREWN_PLUGIN_PATH="$build/lib/strewn/plugins"
browser=$(command -v chromium || true)
[ -n "$browser" ] || { echo "pictures: chromium is not installed; run tools/setup.sh" >&2; exit 1; }
ogr=$(command -v ogrinfo || true)
[ -n "$ogr" ] || { echo "pictures: ogrinfo (gdal-bin) is not installed; run tools/setup.sh" >&2; exit 1; }

expect() {  # expect STATUS command...: run, and fail unless it exits with STATUS
  want=$1; shift
  got=0; "$@" >"$out/last_stdout.txt" 2>"$out/last_stderr.txt" || got=$?
  [ "$got" -eq "$want" ] || { echo "pictures: '$*' exited $got, expected $want" >&2; cat "$out/last_stderr.txt" >&2; exit 1; }
}
expect 0 "$strewn" map "$src/shapes/throwing_lane.toml" --cells 120 --svg "$out/lane_map.svg" --geojson "$out/lane_map.geojson" --csv "$out/lane_map.csv"
# The same lane written in feet: the plan labelled in feet (axes, scale bar, areas).
expect 0 "$strewn" map "$src/tests/data/cli/throwing_lane_feet.toml" --cells 120 --svg "$out/lane_feet_map.svg" --geojson "$out/lane_feet_map.geojson" --csv "$out/lane_feet_map.csv"
expect 0 "$strewn" map "$src/shapes/drone_drop.toml" --cells 80 --per event --svg "$out/drone_map.svg" --geojson "$out/drone_map.geojson"
expect 0 "$strewn" map "$src/shapes/lawn_sprinkler.toml" --cells 80 --svg "$out/sprinkler_map.svg"
expect 0 "$strewn" deposition "$src/shapes/small_lawn_heads.toml" --svg "$out/lawn_deposition.svg"
expect 0 "$strewn" deposition "$src/shapes/seed_drop_zone.toml" --svg "$out/seed_deposition.svg"
expect 0 "$strewn" deposition "$src/shapes/small_lawn_heads.toml" --measured "$src/shapes/field_data/lawn_cans.csv" --difference-svg "$out/lawn_difference.svg"
expect 0 "$strewn" fit "$src/shapes/field_data/lane_marks.csv" --plot "$out/lane_qq.svg"
# One group: one panel, 460 px wide, whose legend once ran out of the picture.
expect 0 "$strewn" fit "$src/shapes/field_data/board_marks.csv" --plot "$out/board_qq.svg"
# Two lanes with a net and a screen: barriers and their shadows drawn on the map.
expect 0 "$strewn" map "$src/shapes/netted_lanes.toml" --cells 60 --svg "$out/netted_map.svg"
expect 3 "$strewn" report "$src/shapes/throwing_lane.toml" --cells 80 --out "$out/lane_report.html"
# A drop from flight: its track and release point drawn in the report's map (issue 18).
expect 0 "$strewn" report "$src/shapes/drone_drop_flight.toml" --cells 60 --out "$out/drop_report.html"
expect 3 "$strewn" assess "$src/shapes/throwing_lane.toml"  # the demo exceeds a limit: its map must show an unsafe area

flags="--headless --no-sandbox --disable-gpu --no-first-run --disable-extensions --hide-scrollbars"
home=$(mktemp -d); trap 'rm -rf "$home"' EXIT
failed=0
check_page() {  # check_page NAME PAGE: dump the DOM after the checker ran, read its verdict
  # shellcheck disable=SC2086
  HOME="$home" timeout 180 "$browser" $flags --dump-dom "file://$2" >"$out/$1.dom.html" 2>/dev/null
  verdict=$(grep -o '<body[^>]*>' "$out/$1.dom.html" | grep -o 'data-pictures="[^"]*"' || echo 'data-pictures="(the checker did not run)"')
  if [ "$verdict" = 'data-pictures="ok"' ]; then echo "$1: ok"; else echo "$1: $verdict" >&2; failed=1; fi
  if [ "${STREWN_PICTURE_SCREENSHOTS:-0}" = 1 ]; then  # for a look by eye; off in the suite to save time
    # shellcheck disable=SC2086
    HOME="$home" timeout 180 "$browser" $flags --window-size=1200,1000 --screenshot="$out/$1.png" "file://$2" >/dev/null 2>&1 || true
  fi
}
svg_page() {  # svg_page NAME OPTIONS: the SVG inline in a page with the checker
  page="$out/$1.page.html"
  { echo '<!DOCTYPE html><html><head><meta charset="utf-8"><style>body{margin:0}</style></head><body>'
    sed '1{/^<?xml/d}' "$out/$1.svg"
    echo '<script>'; cat "$src/tests/report/check_pictures.js"; echo "checkPictures($2);</script></body></html>"; } >"$page"
  check_page "$1" "$page"
}
svg_page lane_map '{unsafe: true, numbers: true}'
svg_page lane_feet_map '{unsafe: true, numbers: true}'
grep -q 'x: east (ft)' "$out/lane_feet_map.svg" || { echo "pictures: the map of a scenario in feet has no axes in ft" >&2; failed=1; }
svg_page netted_map '{numbers: true}'
for mark in 'class="barrier"' 'class="shadow"' 'class="throwing-line"' 'class="standing-point"'; do
  grep -q "$mark" "$out/netted_map.svg" || { echo "pictures: the netted lanes' map draws no $mark" >&2; failed=1; }
done
svg_page drone_map '{numbers: true}'
svg_page sprinkler_map '{numbers: true}'
svg_page lawn_deposition '{}'
svg_page seed_deposition '{}'
svg_page lawn_difference '{}'
svg_page lane_qq '{plan: false}'
svg_page board_qq '{plan: false}'
# The report: the checker appended to a copy of the page, run on the map inside it.
{ sed 's#</body></html>##' "$out/lane_report.html"
  echo '<script>'; cat "$src/tests/report/check_pictures.js"
  echo "checkPictures({selector: '#map svg', unsafe: true, numbers: true});</script></body></html>"; } >"$out/lane_report.page.html"
check_page lane_report "$out/lane_report.page.html"
{ sed 's#</body></html>##' "$out/drop_report.html"
  echo '<script>'; cat "$src/tests/report/check_pictures.js"
  echo "checkPictures({selector: '#map svg', numbers: true});</script></body></html>"; } >"$out/drop_report.page.html"
check_page drop_report "$out/drop_report.page.html"
for mark in 'class="flight-track"' 'class="release-point"'; do
  grep -q "$mark" "$out/drop_report.html" || { echo "pictures: the drop report's map draws no $mark" >&2; failed=1; }
done
if grep -q 'Caution\. Caution' "$out/lane_report.html"; then echo "pictures: the report says 'Caution. Caution'" >&2; failed=1; fi
grep -q 'id="individual-risk"' "$out/lane_report.html" || { echo "pictures: the report leaves out individual risk" >&2; failed=1; }

# The unsafe areas in GeoJSON: valid polygons by GEOS (through GDAL), and their areas against the
# grid written beside them.
/usr/bin/python3 "$src/tests/report/check_unsafe_geojson.py" "$out/lane_map.geojson" "$out/lane_map.csv" || failed=1
/usr/bin/python3 "$src/tests/report/check_unsafe_geojson.py" "$out/lane_feet_map.geojson" "$out/lane_feet_map.csv" || failed=1
/usr/bin/python3 "$src/tests/report/check_unsafe_geojson.py" "$out/drone_map.geojson" || failed=1
[ "$failed" -eq 0 ] || { echo "pictures: see $out" >&2; exit 1; }
echo "pictures rendered and checked: $out"
