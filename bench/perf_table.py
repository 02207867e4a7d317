#!/usr/bin/python3
"""Regenerates README's performance table: builds bench_suite (Release), runs it with
--benchmark_format=json and prints a markdown table of heldout against each baseline.

    /usr/bin/python3 bench/perf_table.py                       # build/release, then run
    /usr/bin/python3 bench/perf_table.py --no-build --build-dir build-stream-rel
    /usr/bin/python3 bench/perf_table.py --repetitions 3       # medians of 3 runs

bench/suite.cpp names every pair "<area>/heldout" and "<area>/baseline" (the baseline's
label says what it is). Ratio = baseline time / heldout time: heldout's throughput relative
to the baseline's, > 1 when heldout is faster. Times are CPU time of the benchmark thread,
except for the thread-scaling pairs ("/real_time" in the name: wall clock, 2 threads under
"heldout", 1 thread under "baseline"). Only ratios within one run are meaningful on the
shared machines; absolute times move by tens of percent between runs.
"""
import argparse
import json
import os
import subprocess
import sys

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
TARGETS = {  # the targets, by area prefix
    "pointwise": ">= 0.8",
    "bootstrap": ">= 20",
    "scaling": "reported (not a gate)",
}
UNIT = {"ns": 1e-9, "us": 1e-6, "ms": 1e-3, "s": 1.0}


def build(build_dir, default_dir):
    if not os.path.exists(os.path.join(build_dir, "CMakeCache.txt")):
        if build_dir == default_dir:
            cmd = ["cmake", "--preset", "release"]
        else:
            cmd = ["cmake", "-S", ROOT, "-B", build_dir, "-G", "Ninja", "-DCMAKE_BUILD_TYPE=Release",
                   "-DCMAKE_CXX_FLAGS_RELEASE=-O3 -DNDEBUG", "-DHELDOUT_BUILD_TESTS=OFF",
                   "-DHELDOUT_BUILD_EXAMPLES=OFF"]
        subprocess.run(cmd, cwd=ROOT, check=True, stdout=sys.stderr)
    subprocess.run(["cmake", "--build", build_dir, "--target", "bench_suite", "-j", "2"], cwd=ROOT, check=True,
                   stdout=sys.stderr)


def run(binary, min_time, repetitions, extra):
    cmd = [binary, "--benchmark_format=json", f"--benchmark_min_time={min_time}"]
    if repetitions > 1:
        cmd += [f"--benchmark_repetitions={repetitions}", "--benchmark_report_aggregates_only=true"]
    cmd += extra
    out = subprocess.run(cmd, check=True, stdout=subprocess.PIPE, text=True).stdout
    return json.loads(out)


def pairs_of(doc, repetitions):
    """{area: {"heldout": (seconds, label), "baseline": (seconds, label)}} in run order."""
    found = {}
    for b in doc["benchmarks"]:
        if repetitions > 1 and b.get("aggregate_name") != "median":
            continue
        if repetitions <= 1 and b.get("run_type") == "aggregate":
            continue
        parts = b["name"].split("/")
        if len(parts) < 2 or parts[1] not in ("heldout", "baseline"):
            continue
        wall = "real_time" in parts[2:]
        seconds = (b["real_time"] if wall else b["cpu_time"]) * UNIT[b.get("time_unit", "ns")]
        found.setdefault(parts[0], {})[parts[1]] = (seconds, b.get("label", ""), wall)
    return found


def shown(seconds):
    """ms, or µs for the in-cache rows (a few µs an iteration)."""
    return f"{seconds * 1e3:.1f} ms" if seconds >= 1e-4 else f"{seconds * 1e6:.2f} µs"


def cpu_model():
    """The CPU's model string and vendor (each figure names its CPU: vendors differ in bandwidth)."""
    model, vendor = "?", "?"
    try:
        with open("/proc/cpuinfo") as f:
            for line in f:
                key, _, value = line.partition(":")
                if key.strip() == "model name" and model == "?":
                    model = value.strip()
                elif key.strip() == "vendor_id" and vendor == "?":
                    vendor = value.strip()
    except OSError:
        pass
    return f"{model} ({vendor})"


def load_text():
    try:
        return ", ".join(f"{x:.1f}" for x in os.getloadavg())
    except OSError:
        return "?"


def table(found, context):
    lines = [
        "| Area | heldout | baseline (same run) | ratio | target |",
        "| --- | ---: | --- | ---: | --- |",
    ]
    for area, sides in found.items():
        if "heldout" not in sides or "baseline" not in sides:
            continue
        th, _, wall = sides["heldout"]
        tb, label, _ = sides["baseline"]
        target = next((t for k, t in TARGETS.items() if area.startswith(k)), "")
        clock = " (wall)" if wall else ""
        lines.append(f"| {area} | {shown(th)}{clock} | {label}: {shown(tb)} | "
                     f"{tb / th:.2f}x | {target} |")
    lines.append("")
    lines.append(f"Measured {context.get('date', '?')[:10]} on {context.get('num_cpus', '?')} shared vCPUs "
                 f"of {cpu_model()} (load average {load_text()} when the run ended) "
                 "(g++ 12 -O3, Release); ratio = baseline time / heldout time in the same run, CPU time "
                 "except the scaling rows. Regenerate: `/usr/bin/python3 bench/perf_table.py`.")
    return "\n".join(lines)


def main():
    default_dir = os.path.join(ROOT, "build", "release")
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("--build-dir", default=default_dir, help="CMake build directory (default build/release)")
    ap.add_argument("--no-build", action="store_true", help="expect bench/bench_suite to be built already")
    ap.add_argument("--min-time", default="0.2", help="--benchmark_min_time per benchmark (seconds)")
    ap.add_argument("--repetitions", type=int, default=1, help="repetitions; medians are used when > 1")
    ap.add_argument("extra", nargs="*", help="more arguments for bench_suite (e.g. --benchmark_filter=...)")
    args = ap.parse_args()
    build_dir = os.path.abspath(args.build_dir)
    if not args.no_build:
        build(build_dir, default_dir)
    binary = os.path.join(build_dir, "bench", "bench_suite")
    if not os.path.exists(binary):
        sys.exit(f"perf_table: {binary} not found (build it, or drop --no-build)")
    doc = run(binary, args.min_time, args.repetitions, args.extra)
    print(table(pairs_of(doc, args.repetitions), doc.get("context", {})))


if __name__ == "__main__":
    main()
