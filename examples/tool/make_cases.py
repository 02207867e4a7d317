#!/usr/bin/python3
"""Writes the CSV files of the tool's edge-case tests into a directory (run by run_tool.cmake
through SETUP, before the tool runs).

usage: make_cases.py DIR

  odd_names.csv   long layout (columns failed, p, model) whose model names hold control
                  characters, a quote and a backslash, and ill-formed UTF-8 bytes: the JSON
                  and the SVG plots must stay valid (json.loads / xml.etree parse them).
  low_error.csv   10 folds of 20 rows (columns fold, failed, good): a model with 0 to 2 errors
                  per fold, so the corrected t interval of its error rate reaches below 0 and
                  that of its AUC above 1; the tool clips both to [0, 1] with a note.
  one_error.csv   one test set of 40 rows where the model errs once: the t interval of its
                  Brier score reaches below 0.
Deterministic: no randomness.
"""
import os
import sys

out = sys.argv[1]
os.makedirs(out, exist_ok=True)

names = [b"ctl\x01\x1f\x7fend", b'quote"back\\slash', b"bad\xff\xc3utf8\xe2\x82", b"tab\tnew\nline",
         b"ok \xc3\xa9\xe2\x82\xac"]
truth = [i % 2 for i in range(12)]
with open(os.path.join(out, "odd_names.csv"), "wb") as f:
    f.write(b"failed,p,model\n")
    for k, name in enumerate(names):
        quoted = b'"' + name.replace(b'"', b'""') + b'"'
        for i, y in enumerate(truth):
            p = (0.55 if y else 0.45) + 0.03 * ((i * 7 + k * 3) % 5 - 2)
            f.write(b"%d,%.2f,%s\n" % (y, p, quoted))

errors = [0, 0, 0, 1, 0, 0, 0, 0, 2, 0]  # per fold, of 20 rows
with open(os.path.join(out, "low_error.csv"), "w", newline="") as f:
    f.write("fold,failed,good\n")
    for fold, e in enumerate(errors):
        for i in range(20):
            y = i % 2
            wrong = i < e  # the first e rows of the fold are misclassified
            p = (0.3 if y else 0.7) if wrong else (0.9 if y else 0.1)
            f.write("f%d,%d,%s\n" % (fold, y, p))

with open(os.path.join(out, "one_error.csv"), "w", newline="") as f:
    f.write("failed,good\n")
    for i in range(40):
        y = i % 2
        p = 0.0 if i == 1 else float(y)  # row 1 (y = 1) gets p = 0: squared error 1, else 0
        f.write("%d,%s\n" % (y, p))
