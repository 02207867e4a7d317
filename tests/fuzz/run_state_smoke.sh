#!/usr/bin/env bash
# Fuzz smoke run of loading accumulator state: builds tests/fuzz/state_fuzz.cpp with
# clang++-14 and libFuzzer (+ ASan, UBSan), writes a seed corpus of valid states of every
# accumulator (the same file built as a plain program), then runs a fixed number of inputs.
# Exits non-zero on a crash, a sanitizer report or an exception other than input_error.
#   bash tests/fuzz/run_state_smoke.sh [RUNS]      (default 100000)
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
root="$(cd "$here/../.." && pwd)"
runs="${1:-100000}"
cxx="${CXX_FUZZ:-clang++-14}"
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
flags=(-std=c++20 -g -O1 -I"$root/include" -I"$root/tests" -isystem /usr/include/eigen3)

"$cxx" "${flags[@]}" -DHELDOUT_STATE_SEEDS "$here/state_fuzz.cpp" -o "$work/state_seeds"
mkdir -p "$work/corpus"
"$work/state_seeds" "$work/corpus"
"$cxx" "${flags[@]}" -fsanitize=fuzzer,address,undefined -fno-sanitize-recover=all \
    "$here/state_fuzz.cpp" -o "$work/state_fuzz"
# -seed fixes libFuzzer's own choices, so the smoke run is the same each time.
"$work/state_fuzz" -runs="$runs" -seed=1 -max_len=65536 -timeout=10 -rss_limit_mb=2048 \
    -artifact_prefix="$work/" "$work/corpus" 2>"$work/log" || {
    tail -n 60 "$work/log"
    for a in "$work"/crash-* "$work"/leak-* "$work"/timeout-* "$work"/oom-*; do
        [ -e "$a" ] && { echo "input that failed ($a):"; od -A d -t x1 "$a" | head -20; }
    done
    echo "state_fuzz: FAILED"
    exit 1
}
tail -n 2 "$work/log"
echo "state_fuzz: $runs runs, no crash"
