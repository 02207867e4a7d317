#!/usr/bin/env bash
# The compile-time cost of including heldout: the time to compile a translation unit holding
# only `#include <heldout/heldout.hpp>` (and per-area headers) and an empty main, divided by
# the time for a unit that includes exactly the external headers (standard library, Eigen,
# Boost, platform) that our headers include: what heldout itself adds. Same flags, runs
# alternated, median of N. Fails when the umbrella ratio exceeds the limit (default 1.5;
# CI passes a limit of 0 to print the figures without gating on them, see .ci/run).
#
#   bench/include_cost.sh [compiler] [runs] [limit] [areas]   e.g. bench/include_cost.sh clang++-14 5
# areas=no measures only the umbrella against the external headers (what CI prints; the 12
# per-area units take most of the script's time).
set -euo pipefail
cxx=${1:-g++-12}
runs=${2:-5}
limit=${3:-1.5}
areas=${4:-yes}
root=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
flags=(-std=c++20 -O0 -I"$root/include" -I/usr/include/eigen3)
[[ $cxx == clang* ]] && [[ ${HELDOUT_LIBCXX:-0} == 1 ]] && flags+=(-stdlib=libc++)

# Every external header any heldout header includes (the MPI layer is not in the umbrella).
grep -rhoE '^#include <[^>]+>' "$root/include/heldout" --exclude=mpi.hpp --exclude-dir=mpi |
    grep -v '<heldout/' | sort -u >"$work/external.hpp"
{ cat "$work/external.hpp"; echo 'int main() {}'; } >"$work/external.cpp"

units=(external)
printf '#include <heldout/heldout.hpp>\nint main() {}\n' >"$work/umbrella.cpp"
units+=(umbrella)
area_list=(core loss measure plan stream estimate compare calibration censored query slices report)
[[ $areas == no ]] && area_list=()
for area in "${area_list[@]}"; do
    printf '#include <heldout/%s.hpp>\nint main() {}\n' "$area" >"$work/$area.cpp"
    units+=("$area")
done

# Wall time is what the limit applies to; the compiler's CPU time (user + sys) is printed beside
# it because on a shared machine the wall time of one run also measures the other jobs.
declare -A times cpu
TIMEFORMAT='%R %U %S'
for ((r = 0; r < runs; ++r)); do
    for u in "${units[@]}"; do
        { time "$cxx" "${flags[@]}" -c "$work/$u.cpp" -o "$work/$u.o" 2>"$work/log" || { cat "$work/log" >&2; exit 1; }; } 2>"$work/time"
        read -r real user sys <"$work/time"
        times[$u]+="$real "
        cpu[$u]+="$(awk -v a="$user" -v b="$sys" 'BEGIN {print a + b}') "
    done
done

median() { tr ' ' '\n' <<<"$1" | grep . | sort -g | awk '{a[NR]=$1} END {print (NR%2) ? a[(NR+1)/2] : (a[NR/2]+a[NR/2+1])/2}'; }
base=$(median "${times[external]}")
cbase=$(median "${cpu[external]}")
printf 'include cost with %s (-O0, median of %d alternated runs; %s)\n' "$cxx" "$runs" "$(uptime | sed 's/.*load/load/')"
printf '  %-12s %6s %7s %7s %7s\n' unit wall ratio cpu ratio
printf '  %-12s %5.2fs %7s %6.2fs\n' external "$base" "" "$cbase"
status=0
for u in "${units[@]:1}"; do
    t=$(median "${times[$u]}")
    c=$(median "${cpu[$u]}")
    ratio=$(awk -v a="$t" -v b="$base" 'BEGIN {printf "%.2f", a / b}')
    cratio=$(awk -v a="$c" -v b="$cbase" 'BEGIN {printf "%.2f", a / b}')
    printf '  %-12s %5.2fs %6.2fx %6.2fs %6.2fx\n' "$u" "$t" "$ratio" "$c" "$cratio"
    if [[ $u == umbrella ]] && [[ $limit != 0 ]] && awk -v r="$ratio" -v l="$limit" 'BEGIN {exit !(r > l)}'; then
        echo "include cost: the umbrella header costs ${ratio}x its external headers (limit ${limit}x)" >&2
        status=1
    fi
done
exit $status
