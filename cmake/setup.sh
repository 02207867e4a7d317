#!/usr/bin/env bash
# One-command set-up for a fresh Debian 12 machine (README "Quick start").
#   bash cmake/setup.sh demo   installs what is missing, builds (release), runs the demo
#   bash cmake/setup.sh test   installs what is missing, builds (dev: Debug, -Werror), runs every test
# Run from the repository root, as root or with sudo available.
set -euo pipefail
cd "$(dirname "$0")/.."
mode=${1:-test}

packages=(cmake ninja-build g++ libeigen3-dev libboost-math-dev doctest-dev libbenchmark-dev
          python3-scipy python3-numpy r-base-core r-cran-survival libcli11-dev openmpi-bin libopenmpi-dev)
missing=()
for p in "${packages[@]}"; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
    echo "setup: installing ${missing[*]}"
    sudo=""
    [ "$(id -u)" -eq 0 ] || sudo="sudo"
    $sudo apt-get update -qq
    DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}"
fi

jobs=$(nproc 2>/dev/null || echo 2)
case "$mode" in
demo)
    cmake --preset release -DHELDOUT_BUILD_TESTS=OFF -DHELDOUT_BUILD_BENCH=OFF >/dev/null
    cmake --build --preset release --target heldout_demo -j "$jobs"
    ./build/release/examples/heldout_demo
    ;;
test)
    cmake --preset dev
    cmake --build --preset dev -j "$jobs"
    ctest --preset dev
    ;;
*)
    echo "usage: bash cmake/setup.sh demo|test" >&2
    exit 2
    ;;
esac
