#!/bin/sh
# One-step set-up on a fresh Debian 12 machine: installs every dependency from Debian's
# packages, then configures and builds strewn (library, plugins, program, Python module, tests,
# benchmarks) in ./build, and the fuzz target in ./build/fuzz. Safe to run again; later runs only rebuild what changed.
set -eu
cd "$(dirname "$0")/.."

PACKAGES="build-essential cmake libboost-dev libeigen3-dev libcubature-dev catch2 \
libtomlplusplus-dev nlohmann-json3-dev libcli11-dev libfmt-dev libbenchmark-dev \
python3 python3-scipy python3-mpmath clang-14 libclang-rt-14-dev chromium \
pybind11-dev python3-dev python3-numpy python3-pytest \
libgdal-dev gdal-bin libproj-dev proj-bin libopenmpi-dev openmpi-bin libnlopt-dev"

missing=""
for p in $PACKAGES; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing="$missing $p"
done
if [ -n "$missing" ]; then
  SUDO=""
  [ "$(id -u)" -ne 0 ] && SUDO="sudo"
  $SUDO apt-get update
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y --no-install-recommends $missing
fi

cmake -S . -B build -DCMAKE_BUILD_TYPE=Release -DSTREWN_REQUIRE_FUZZ=ON -DSTREWN_REQUIRE_PYTHON=ON
cmake --build build --parallel "$(nproc)"

# A second tree, built by Clang with libFuzzer and sanitizers, for the fuzz test of the scenario
# loader (ctest runs it from build/fuzz).
cmake -S . -B build/fuzz -DCMAKE_BUILD_TYPE=RelWithDebInfo \
  -DCMAKE_C_COMPILER=clang-14 -DCMAKE_CXX_COMPILER=clang++-14 \
  -DSTREWN_BUILD_FUZZ=ON -DSTREWN_BUILD_TESTS=OFF -DSTREWN_BUILD_BENCHMARKS=OFF
cmake --build build/fuzz --parallel "$(nproc)"
