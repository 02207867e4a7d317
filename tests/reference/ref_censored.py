"""Censored event times: seeded data with ties (numpy), reference values from R's survival
package and base R (tests/reference/ref_censored.R, run with Rscript).

Sources: R survival `concordance` (Harrell's C with timewt = "n", Uno's C with timewt = "n/G2"
and ymax, their infinitesimal-jackknife `var`), `survfit` (Kaplan–Meier of the censoring
times), and base-R transcriptions of the IPCW time-dependent AUC (Uno et al. 2007; Heagerty &
Zheng 2005) and the IPCW Brier score (Graf et al. 1999).
"""
import os
import shutil
import subprocess
import sys
import tempfile

import numpy as np

import refio

HERE = os.path.dirname(os.path.abspath(__file__))
rng = np.random.default_rng(20261204)
n = 300
# times on a coarse grid -> ties between events, and between events and censorings
event_time = np.round(rng.exponential(5.0, n), 0) + 1
censor_time = np.round(rng.exponential(8.0, n), 0) + 1
time = np.minimum(event_time, censor_time)
event = (event_time <= censor_time).astype(int)
x = rng.normal(size=n)
a = np.round(0.8 * np.log(1.0 / event_time) + x, 1)  # ties in the score
a[:5] = 0.0
a[5:8] = -0.0
b = np.round(rng.normal(size=n) + 0.3 * a, 1)
# a second truth without event/censoring ties at one time (for survfit)
time2 = np.arange(1, n + 1, dtype=float)
rng.shuffle(time2)
time2 = np.floor(time2 / 3)  # ties among equal kinds only:
event2 = (time2.astype(int) % 2).astype(int)  # all rows at one time share the indicator
tau, t0 = 6.0, 4.0
grid = [1.0, 2.5, 4.0, 7.0]

t = refio.Table(__file__)
t.put("time", time)
t.put("event", event)
t.put("a", a)
t.put("b", b)
t.put("time2", time2)
t.put("event2", event2)
t.put("tau", tau)
t.put("t0", t0)
t.put("grid", grid)
# Live when Rscript is installed; otherwise the R output stored beside this script (made by
# the same command on the same seeded data; entry `R.live` says which one the tests read).
stored = os.path.join(HERE, "ref_censored_R.txt")
if shutil.which("Rscript"):
    with tempfile.TemporaryDirectory() as d:
        csv = os.path.join(d, "data.csv")
        with open(csv, "w") as f:
            f.write("time,event,a,b,time2,event2\n")
            for row in zip(time, event, a, b, time2, event2):
                f.write(",".join(repr(float(v)) for v in row) + "\n")
        out = subprocess.run(
            ["Rscript", os.path.join(HERE, "ref_censored.R"), csv, repr(tau), repr(t0)] + [repr(g) for g in grid],
            capture_output=True, text=True)
    if out.returncode != 0:
        sys.exit("ref_censored.R failed:\n" + out.stderr)
    out = out.stdout
    live = 1.0
    if os.environ.get("HELDOUT_STORE_R_REFERENCE"):
        with open(stored, "w") as f:
            f.write(out)
else:
    with open(stored) as f:
        out = f.read()
    live = 0.0
t.put("R.live", live)
for line in out.splitlines():
    parts = line.split()
    if parts:
        t.put("R." + parts[0], [float(v) for v in parts[1:]])
t.close()
