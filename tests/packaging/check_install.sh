#!/bin/sh
# Installs the build into a scratch prefix, builds a consumer program and an out-of-tree plugin
# against the installed package, and runs them: the consumer must find the installed built-in
# plugins, and the user's plugin must load and give the triangle's closed-form probability.
set -eu
BUILD_DIR="$1"
SOURCE_DIR="$2"
WORK="$BUILD_DIR/packaging-check"
rm -rf "$WORK"
cmake --install "$BUILD_DIR" --prefix "$WORK/prefix" > "$WORK.log" 2>&1 || { cat "$WORK.log"; exit 1; }
for project in consumer plugin; do
  cmake -S "$SOURCE_DIR/tests/packaging/$project" -B "$WORK/$project" \
        -DCMAKE_PREFIX_PATH="$WORK/prefix" -DCMAKE_BUILD_TYPE=Release > "$WORK/$project.log" 2>&1 \
    || { cat "$WORK/$project.log"; exit 1; }
  cmake --build "$WORK/$project" >> "$WORK/$project.log" 2>&1 || { cat "$WORK/$project.log"; exit 1; }
done
# The consumer runs against the installed library only: no plugin path from the build tree.
env -u STREWN_PLUGIN_PATH LD_LIBRARY_PATH="$(dirname "$(find "$WORK/prefix" -name 'libstrewn.so' | head -1)")" \
  "$WORK/consumer/consumer"
# The installed strewn program lists and uses the user's plugin from STREWN_PLUGIN_PATH.
STREWN_PLUGIN_PATH="$WORK/plugin" "$WORK/prefix/bin/strewn" shapes | grep -q right_triangle
echo "packaging check passed"
