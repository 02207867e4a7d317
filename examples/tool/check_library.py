#!/usr/bin/python3
"""Compares the heldout tool's --json output with the library's own numbers for the same file.

usage: check_library.py OUT.json LIBRARY.jsonl   (run by run_tool.cmake with LIBRARY=ON)

LIBRARY.jsonl is what check_library (check_library.cpp) printed: the estimates and
comparisons computed from the library's free functions, without the tool's code. Every line
must match a row of the tool's output to 1e-9 relative: value, interval (cut to [0, 1] where
the tool says "clipped": true), difference and p-value (null: drawn at random, not compared).
The tool must report nothing the reference lacks either, for the measures the reference
covers, and every comparison carries a Holm-adjusted p when its measure has 2 pairs or more.
"""
import json
import sys

out = json.load(open(sys.argv[1]))
ref = [json.loads(line) for line in open(sys.argv[2]) if line.strip()]
failures = []


def close(what, got, want, rel=1e-9):
    if want is None:
        return
    if got is None or not (abs(got - want) <= rel * max(abs(want), 1e-300) or abs(got - want) < 1e-13):
        failures.append("%s: tool %r, library %r" % (what, got, want))


est = {(m["name"], e["key"]): e for m in out["models"] for e in m["estimates"]}
cmp_ = {(c["first"], c["second"], c["key"]): c for c in out["comparisons"]}
checked = 0
keys = set()
for r in ref:
    keys.add(r["key"])
    if r["kind"] == "estimate":
        e = est.get((r["model"], r["key"]))
        if e is None:
            failures.append("no estimate of %s for %s" % (r["key"], r["model"]))
            continue
        what = "%s %s" % (r["model"], r["key"])
        close(what + " value", e["value"], r["value"])
        lo, hi = r["lower"], r["upper"]
        if e["clipped"]:
            lo, hi = max(0.0, lo), min(1.0, hi)
        close(what + " lower", e["lower"], lo)
        close(what + " upper", e["upper"], hi)
        checked += 1 + (lo is not None) + (hi is not None)
    else:
        c = cmp_.get((r["first"], r["second"], r["key"]))
        if c is None:
            failures.append("no comparison of %s for %s vs %s" % (r["key"], r["first"], r["second"]))
            continue
        what = "%s vs %s %s" % (r["first"], r["second"], r["key"])
        close(what + " difference", c["difference"], r["difference"])
        close(what + " p", c["p_value"], r["p_value"])
        checked += 1 + (r["p_value"] is not None)
for (name, key), e in est.items():
    if key in keys and not any(r["kind"] == "estimate" and r["model"] == name and r["key"] == key for r in ref):
        failures.append("the tool reports %s for %s; the library gives none" % (key, name))
pairs = {}
for c in out["comparisons"]:
    pairs.setdefault(c["key"], []).append(c)
for key, cs in pairs.items():
    for c in cs:
        if (len(cs) >= 2) != (c["adjusted_p_value"] is not None):
            failures.append("%s %s vs %s: Holm p %r with %d pairs" % (key, c["first"], c["second"],
                                                                     c["adjusted_p_value"], len(cs)))
        if c["adjusted_p_value"] is not None and c["adjusted_p_value"] < c["p_value"] - 1e-15:
            failures.append("%s: Holm p below p" % key)
if checked == 0:
    failures.append("nothing compared")
if failures:
    print("\n".join(failures))
    sys.exit(1)
print("%d values agree with the library's free functions" % checked)
