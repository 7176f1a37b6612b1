#!/bin/sh
# Installs the build into a scratch prefix, builds a consumer program and an out-of-tree plugin
# against the installed package, and runs them: the consumer must find the installed built-in
# plugins, the README's library example must assess a demo, and the user's plugin must load and give the triangle's closed-form probability.
set -eu
BUILD_DIR="$1"
SOURCE_DIR="$2"
WORK="$BUILD_DIR/packaging-check"
rm -rf "$WORK"
cmake --install "$BUILD_DIR" --prefix "$WORK/prefix" > "$WORK.log" 2>&1 || { cat "$WORK.log"; exit 1; }
for project in consumer plugin site_example; do
  cmake -S "$SOURCE_DIR/tests/packaging/$project" -B "$WORK/$project" \
        -DCMAKE_PREFIX_PATH="$WORK/prefix" -DCMAKE_BUILD_TYPE=Release > "$WORK/$project.log" 2>&1 \
    || { cat "$WORK/$project.log"; exit 1; }
  cmake --build "$WORK/$project" >> "$WORK/$project.log" 2>&1 || { cat "$WORK/$project.log"; exit 1; }
done
# The consumer runs against the installed library only: no plugin path from the build tree.
env -u STREWN_PLUGIN_PATH LD_LIBRARY_PATH="$(dirname "$(find "$WORK/prefix" -name 'libstrewn.so' | head -1)")" \
  "$WORK/consumer/consumer"
# The README's example assesses a demo through the public headers only and prints every zone's
# verdict (the lane's fire exit door exceeds its limit: see the golden throwing_lane.json).
env -u STREWN_PLUGIN_PATH LD_LIBRARY_PATH="$(dirname "$(find "$WORK/prefix" -name 'libstrewn.so' | head -1)")" \
  "$WORK/site_example/site_example" "$SOURCE_DIR/shapes/throwing_lane.toml" > "$WORK/site_example.txt" \
  || { cat "$WORK/site_example.txt"; echo "the README's library example failed" >&2; exit 1; }
grep -q "fire exit door .*limit exceeded" "$WORK/site_example.txt" \
  || { cat "$WORK/site_example.txt"; echo "the README's library example gave the wrong verdict" >&2; exit 1; }
# The installed strewn program lists and uses the user's plugin from STREWN_PLUGIN_PATH.
STREWN_PLUGIN_PATH="$WORK/plugin" "$WORK/prefix/bin/strewn" shapes | grep -q right_triangle
# ... and its triangle gives the right probability: legs 1.5 along +x and +y from the mean of a
# standard circular normal, P(X > 0, Y > 0, X + Y < 1.5) = int_0^1.5 phi(x) (Phi(1.5 - x) - 1/2) dx,
# computed here by scipy.integrate.quad (Debian's python3-scipy), not by strewn. Deliberate
# fault that made this fail: the plugin's second vertex at 1.01 legs (a wrong triangle); the
# name check above still passed.
cat > "$WORK/triangle.toml" <<'TOML'
[[source]]
name = "unit"
aim = [0.0, 0.0]
spread = { sigma = 1.0 }

[[zone]]
name = "triangle"
role = "report_only"
shape = "right_triangle"
params = { legs = 1.5 }
TOML
STREWN_PLUGIN_PATH="$WORK/plugin" "$WORK/prefix/bin/strewn" assess "$WORK/triangle.toml" --format json \
  > "$WORK/triangle.json" || { echo "strewn assess of the plugin's triangle failed" >&2; exit 1; }
/usr/bin/python3 - "$WORK/triangle.json" <<'PY'
import json, sys
from scipy import integrate, stats
L = 1.5
ref, ref_err = integrate.quad(lambda x: stats.norm.pdf(x) * (stats.norm.cdf(L - x) - 0.5), 0, L,
                              epsabs=1e-15, epsrel=1e-13)
src = json.load(open(sys.argv[1]))["zones"][0]["sources"][0]
p, err = src["p_event"], src["abs_err"]
print(f"right_triangle: strewn p = {p!r} +- {err:.3g}, scipy quad {ref!r} +- {ref_err:.3g}")
if not abs(p - ref) <= err + ref_err + 1e-15 or not err <= 1e-8 * ref:
    sys.exit("the out-of-tree plugin's triangle does not give the closed-form probability")
PY
echo "packaging check passed"
