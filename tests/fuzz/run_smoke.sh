#!/usr/bin/env bash
# Fuzz smoke run of the heldout tool's CSV reader: builds tests/fuzz/csv_fuzz.cpp with
# clang++-14 and libFuzzer (+ ASan, UBSan), then runs a fixed number of inputs starting from
# the seed corpus in tests/fuzz/corpus/ (copied, so the repository is not written to).
# Exits non-zero on a crash, a sanitizer report or a violated property.
#   bash tests/fuzz/run_smoke.sh [RUNS]      (default 200000)
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
root="$(cd "$here/../.." && pwd)"
runs="${1:-200000}"
cxx="${CXX_FUZZ:-clang++-14}"
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT

"$cxx" -std=c++20 -g -O1 -fsanitize=fuzzer,address,undefined -fno-sanitize-recover=all \
    -I"$root/examples/tool" "$here/csv_fuzz.cpp" -o "$work/csv_fuzz"
mkdir -p "$work/corpus"
cp "$here"/corpus/* "$work/corpus/"
# -seed fixes libFuzzer's own choices, so the smoke run is the same each time.
"$work/csv_fuzz" -runs="$runs" -seed=1 -max_len=4096 -timeout=10 -rss_limit_mb=2048 \
    -artifact_prefix="$work/" "$work/corpus" 2>"$work/log" || {
    tail -n 60 "$work/log"
    for a in "$work"/crash-* "$work"/leak-* "$work"/timeout-* "$work"/oom-*; do
        [ -e "$a" ] && { echo "input that failed ($a):"; od -c "$a" | head -20; }
    done
    echo "csv_fuzz: FAILED"
    exit 1
}
tail -n 2 "$work/log"
echo "csv_fuzz: $runs runs, no crash"
