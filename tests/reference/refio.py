"""Writes reference tables read by tests/support/reference.hpp.

Format: one entry a line, `name count v1 v2 ...`, numbers in repr() (round-trip) form.
Names are free text without spaces, e.g. `case3.truth`.
"""
import os
import sys


def out_path(script_file):
    stem = os.path.splitext(os.path.basename(script_file))[0]
    return os.path.join(sys.argv[1], stem + ".txt")


class Table:
    def __init__(self, script_file):
        self.path = out_path(script_file)
        self.lines = []

    def put(self, name, values):
        try:
            vals = list(values)
        except TypeError:
            vals = [values]
        self.lines.append(name + " " + str(len(vals)) + "".join(" " + repr(float(v)) for v in vals))

    def close(self):
        with open(self.path, "w") as f:
            f.write("\n".join(self.lines) + "\n")
