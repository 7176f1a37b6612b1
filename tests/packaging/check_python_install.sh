#!/bin/sh
# Installs the build into a scratch prefix and imports the strewn Python package from there,
# with nothing from the build tree: the module must load the installed libstrewn (its RPATH),
# find the installed built-in plugins (next to libstrewn) and compute. The check value is the
# closed form P(|Z| <= r) = 1 - exp(-r^2 / 2) for a standard circular normal and a centred disk
# (Rayleigh distribution), computed here by Python's math module, not by strewn.
set -eu
BUILD_DIR="$(cd "$1" && pwd)"
PYTHON="$2"
PY_DIR="$3"
WORK="$BUILD_DIR/python-install-check"
rm -rf "$WORK"
mkdir -p "$WORK"
cmake --install "$BUILD_DIR" --prefix "$WORK/prefix" > "$WORK/install.log" 2>&1 || { cat "$WORK/install.log"; exit 1; }
case "$PY_DIR" in
  /*) SITE="$PY_DIR" ;;
  *) SITE="$WORK/prefix/$PY_DIR" ;;
esac
test -f "$SITE/strewn/__init__.py" || { echo "no strewn package in $SITE" >&2; exit 1; }
test -f "$SITE/strewn/__init__.pyi" || { echo "no type stubs in $SITE/strewn" >&2; exit 1; }
cd "$WORK"
env -u STREWN_PLUGIN_PATH -u LD_LIBRARY_PATH PYTHONPATH="$SITE" "$PYTHON" - "$SITE" <<'PY'
import math, os, sys
import strewn
site = os.path.realpath(sys.argv[1])
if not os.path.realpath(strewn.__file__).startswith(site):
    sys.exit(f"imported {strewn.__file__}, not the installed package in {site}")
kinds = {k["name"]: k["module_path"] for k in strewn.shape_kinds()}
prefix = os.path.realpath(os.path.join(site, os.pardir))
for kind in ("disk", "polygon", "rectangle", "ring_sector", "person"):
    if kind not in kinds:
        sys.exit(f"the installed package does not find the built-in plugin {kind!r} (found {sorted(kinds)})")
    if "python-install-check" not in kinds[kind]:
        sys.exit(f"plugin {kind!r} loaded from {kinds[kind]}, not from the install prefix")
r = strewn.probability(strewn.Normal((0, 0), [[1, 0], [0, 1]]), strewn.Region.disk((0, 0), 1.5))
ref = -math.expm1(-1.5 ** 2 / 2)
print(f"installed strewn {strewn.__version__}: disk p = {r.p!r} +- {r.abs_err:.3g}, closed form {ref!r}")
if not abs(r.p - ref) <= r.abs_err + 1e-16:
    sys.exit("the installed module does not give the closed-form probability")
PY
echo "python install check passed"
