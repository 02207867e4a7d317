#!/usr/bin/python3
"""Runs every tests/reference/ref_*.py with the output directory as its argument.

Each ref_*.py builds seeded random inputs with numpy, computes reference values with a
general-purpose library (numpy / scipy.stats, named beside each value), and writes
<outdir>/<script stem>.txt through refio.write(). The C++ tests read those files with
tests/support/reference.hpp and compare to the stated tolerance.
"""
import os
import subprocess
import sys

outdir = sys.argv[1]
os.makedirs(outdir, exist_ok=True)
failed = []
for script in sys.argv[2:]:
    r = subprocess.run([sys.executable, script, outdir])
    if r.returncode != 0:
        failed.append(script)
if failed:
    sys.exit("reference scripts failed: " + ", ".join(failed))
print(f"{len(sys.argv) - 2} reference scripts written to {outdir}")
