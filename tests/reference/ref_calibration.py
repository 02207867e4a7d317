#!/usr/bin/python3
"""Calibration: seeded probabilities and outcomes (numpy), reference values from base R
(tests/reference/ref_calibration.R, run with Rscript): glm logistic recalibration (Cox 1958),
Wald intervals, Wilson intervals of reliability bins (prop.test without continuity
correction), Spiegelhalter's z.

Cases:
  big      n = 400, miscalibrated (true logit 0.4 + 0.7 logit(p)), unit weights
  weighted n = 250, non-integer weights in [0.2, 3)
  small    n = 40, probabilities on a 0.05 grid (ties), unit weights
  extreme  n = 300, logits in [-18, 18] (p down to 1.5e-8), unit weights
"""
import os
import shutil
import subprocess
import sys
import tempfile

import numpy as np

import refio

HERE = os.path.dirname(os.path.abspath(__file__))
rng = np.random.default_rng(20261222)


def expit(x):
    return 1.0 / (1.0 + np.exp(-x))


cases = {}
x = rng.normal(0.0, 1.5, 400)
cases["big"] = (expit(x), (rng.random(400) < expit(0.4 + 0.7 * x)).astype(int), np.ones(400))
x = rng.normal(-0.5, 1.0, 250)
cases["weighted"] = (expit(x), (rng.random(250) < expit(-0.2 + 1.3 * x)).astype(int), rng.uniform(0.2, 3.0, 250))
p = np.round(rng.uniform(0.05, 0.95, 40) / 0.05) * 0.05
cases["small"] = (p, (rng.random(40) < p).astype(int), np.ones(40))
x = rng.uniform(-18, 18, 300)
cases["extreme"] = (expit(x), (rng.random(300) < expit(0.5 * x)).astype(int), np.ones(300))

t = refio.Table(__file__)
for name, (p, y, w) in cases.items():
    t.put(name + ".p", p)
    t.put(name + ".y", y)
    t.put(name + ".w", w)

stored = os.path.join(HERE, "ref_calibration_R.txt")
if shutil.which("Rscript"):
    with tempfile.TemporaryDirectory() as d:
        csv = os.path.join(d, "data.csv")
        with open(csv, "w") as f:
            f.write("case,p,y,w\n")
            for name, (p, y, w) in cases.items():
                for row in zip(p, y, w):
                    f.write(name + "," + ",".join(repr(float(v)) for v in row) + "\n")
        out = subprocess.run(["Rscript", os.path.join(HERE, "ref_calibration.R"), csv] + list(cases),
                             capture_output=True, text=True)
    if out.returncode != 0:
        sys.exit("ref_calibration.R failed:\n" + out.stderr)
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
