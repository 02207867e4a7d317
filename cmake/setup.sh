#!/usr/bin/env bash
# One-command set-up for a fresh Debian 12 machine (README "Quick start").
#   bash cmake/setup.sh demo   installs what the demo needs, builds it (release), runs it
#   bash cmake/setup.sh tool   installs what the tool needs, builds the `heldout` tool (release)
#                              and installs it into PREFIX (default /usr/local): PREFIX=~/.local ...
#   bash cmake/setup.sh test   installs what every test needs, builds (dev: Debug, -Werror), runs every test
# Run from anywhere, as root or with sudo available. Only packages that are absent are
# installed. Package-manager, configure and build output go to build/setup.log; the script
# prints one line per step with the time it took, and the end of the log when a step fails.
set -euo pipefail
cd "$(dirname "$0")/.."
mode=${1:-test}
case "$mode" in
demo | tool | test) ;;
*)
    echo "usage: bash cmake/setup.sh demo|tool|test" >&2
    exit 2
    ;;
esac

# What each mode needs. The demo: a compiler, CMake, Ninja, Eigen and Boost.Math headers.
demo_packages=(cmake ninja-build g++ libeigen3-dev libboost-math-dev)
tool_packages=("${demo_packages[@]}" libcli11-dev)
# Every test (others add theirs here).
packages=(cmake ninja-build g++ libeigen3-dev libboost-math-dev doctest-dev libbenchmark-dev
          python3-scipy python3-numpy r-base-core r-cran-survival libcli11-dev openmpi-bin libopenmpi-dev)
packages+=(chromium) # the HTML report's browser test (tests/browser: report.browser)

mkdir -p build
log=build/setup.log
: >"$log"
start=$SECONDS

# step "what" command...: runs the command with its output in the log, prints the time taken.
step() {
    local what=$1 t0=$SECONDS
    shift
    printf 'setup: %s ... ' "$what"
    if "$@" >>"$log" 2>&1; then
        printf 'done (%ds)\n' $((SECONDS - t0))
    else
        local rc=$?
        printf 'FAILED after %ds; the end of %s:\n' $((SECONDS - t0)) "$log"
        tail -n 60 "$log" | sed 's/^/  | /'
        exit "$rc"
    fi
}

case "$mode" in
demo) wanted=("${demo_packages[@]}") ;;
tool) wanted=("${tool_packages[@]}") ;;
test) wanted=("${packages[@]}") ;;
esac
missing=()
for p in "${wanted[@]}"; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
    sudo=""
    [ "$(id -u)" -eq 0 ] || sudo="sudo"
    step "updating the package lists" $sudo apt-get update -q
    step "installing ${#missing[@]} packages (${missing[*]})" \
        $sudo env DEBIAN_FRONTEND=noninteractive apt-get install -y -q --no-install-recommends "${missing[@]}"
else
    echo "setup: every package needed is installed"
fi

jobs=$(nproc 2>/dev/null || echo 2)
case "$mode" in
demo)
    # warnings are the dev preset's business (-Werror there), not a reason to refuse a user the demo
    step "configuring (release)" cmake --preset release -DHELDOUT_BUILD_TESTS=OFF -DHELDOUT_BUILD_BENCH=OFF \
        -DHELDOUT_BUILD_TOOL=OFF -DHELDOUT_WERROR=OFF
    step "building the demo" cmake --build --preset release --target heldout_demo -j "$jobs"
    echo "setup: set-up took $((SECONDS - start))s; running the demo"
    echo
    ./build/release/examples/heldout_demo
    ;;
tool)
    prefix=${PREFIX:-/usr/local}
    step "configuring (release)" cmake --preset release -DHELDOUT_BUILD_TESTS=OFF -DHELDOUT_BUILD_BENCH=OFF \
        -DHELDOUT_BUILD_TOOL=ON -DHELDOUT_WERROR=OFF
    step "building the tool" cmake --build --preset release --target heldout_cli -j "$jobs"
    sudo=""
    if ! mkdir -p "$prefix/bin" 2>/dev/null || [ ! -w "$prefix/bin" ]; then
        [ "$(id -u)" -eq 0 ] || sudo="sudo"
    fi
    step "installing $prefix/bin/heldout" $sudo cmake --install build/release --component tool --prefix "$prefix"
    echo "setup: done in $((SECONDS - start))s; try: $prefix/bin/heldout --help"
    ;;
test)
    step "configuring (dev)" cmake --preset dev
    step "building everything (dev)" cmake --build --preset dev -j "$jobs"
    echo "setup: set-up took $((SECONDS - start))s; running the tests"
    ctest --preset dev
    echo "setup: done in $((SECONDS - start))s"
    ;;
esac
