#!/usr/bin/python3
"""Times the exact AUC with numpy/scipy (rank-sum route: scipy.stats.rankdata + sum) on the very
data bench_ranking uses, and prints the ratio to heldout's time measured in the same session.

    /usr/bin/python3 bench/ranking_numpy.py build/release/bench/bench_ranking [workdir]

Steps: (1) `bench_ranking --write-data=DIR` writes labels (uint8) and float32 / float64 scores
for n = 1e5, 1e6, 1e7 plus the AUCs heldout computed; (2) this script loads them with
numpy.fromfile (labels also as int32 and bool), computes AUC = (sum of the positives' midranks - m(m+1)/2) / (m n) with
scipy.stats.rankdata, checks that it equals heldout's value to 1e-12, and times it (best of a
few repetitions); (3) it runs bench_ranking on the matching benchmarks (--benchmark_out JSON) and prints
numpy time / heldout time. Both are CPU times (time.process_time, Google Benchmark cpu_time):
on a shared machine wall times of two processes run at different moments do not compare.
Target: >= 8.
"""
import json
import os
import subprocess
import sys
import tempfile
import time

import numpy as np
from scipy import stats

bench = sys.argv[1]
work = sys.argv[2] if len(sys.argv) > 2 else tempfile.mkdtemp(prefix="heldout_ranking_")
os.makedirs(work, exist_ok=True)
subprocess.run([bench, "--write-data=" + work], check=True)


def auc_rank_sum(y, s):
    r = stats.rankdata(s)  # midranks, ties averaged
    pos = y == 1
    m = int(pos.sum())
    n = len(y) - m
    return (r[pos].sum() - m * (m + 1) / 2) / (m * n)


sizes = [100_000, 1_000_000, 10_000_000]
labels = {"u8": np.uint8, "int": np.int32, "bool": np.bool_}  # heldout: uint8_t, int, bool
numpy_ms = {}
for n in sizes:
    y8 = np.fromfile(os.path.join(work, f"labels_{n}.u8"), dtype=np.uint8)
    ref = [float(v) for v in open(os.path.join(work, f"auc_{n}.txt")).read().split()]
    for kind, dt, expect in (("float", np.float32, ref[0]), ("double", np.float64, ref[1])):
        s = np.fromfile(os.path.join(work, f"scores_{n}.f{32 if dt is np.float32 else 64}"), dtype=dt)
        for lab, ldt in labels.items():
            y = y8.astype(ldt)
            reps = 5 if n < 10_000_000 else 2
            best = float("inf")
            for _ in range(reps):
                t0 = time.process_time()
                a = auc_rank_sum(y, s)
                best = min(best, time.process_time() - t0)
            assert abs(a - expect) <= 1e-12 * abs(expect), (n, kind, lab, a, expect)
            numpy_ms[(kind, lab, n)] = best * 1e3

jpath = os.path.join(work, "heldout.json")
subprocess.run([bench, "--benchmark_filter=^auc_(float|double)_(u8|int|bool)/", "--benchmark_out=" + jpath,
                "--benchmark_out_format=json", "--benchmark_min_time=0.2"], check=True, capture_output=True)
heldout_ms = {}
for b in json.load(open(jpath))["benchmarks"]:
    name, n = b["name"].split("/")[:2]
    _, kind, lab = name.split("_")
    unit = {"ns": 1e-6, "us": 1e-3, "ms": 1.0, "s": 1e3}[b["time_unit"]]
    heldout_ms[(kind, lab, int(n))] = b["cpu_time"] * unit

print(f"{'scores':8} {'labels':6} {'n':>10} {'numpy/scipy cpu ms':>19} {'heldout cpu ms':>15} {'speed-up':>9}")
for n in sizes:
    for kind in ("float", "double"):
        for lab in labels:
            a, h = numpy_ms[(kind, lab, n)], heldout_ms[(kind, lab, n)]
            print(f"{kind:8} {lab:6} {n:>10} {a:>19.2f} {h:>15.2f} {a / h:>8.1f}x")
print("(AUC values of both routes agree to 1e-12; target: heldout >= 8x faster)")
