#!/usr/bin/env python3
"""How far restructuring can take the umbrella's include cost: the floor of bench/include_cost.sh.

bench/include_cost.sh compares a unit holding `#include <heldout/heldout.hpp>` with one holding
exactly the external headers ours include. This script asks what that ratio would become if
the code were written differently, by compiling two rewritten copies of include/heldout:

  * templated: the body of every non-template function (free inline functions and members of
    non-template classes) wrapped in a generic lambda that is never called, so it is parsed
    like the body of a template that is never instantiated: what turning every non-template
    function and class into a template would save;
  * no bodies: those bodies removed altogether (constructors keep their initialisers). This
    does not make a working library: it is the floor of any rewrite that keeps the umbrella's
    contents, since what is left is declarations, class layouts and template code.

Left as they are: functions whose return type is deduced or cannot be spelt back from clang's
type text (1 of 842 bodies on 2026-12-04), constexpr functions, and lambdas.
The copies are written to a temporary folder; the repository is not touched.

  /usr/bin/python3 bench/include_floor.py [--cxx g++-12] [--runs 5]

Needs clang++-14 (its JSON syntax tree names the bodies). Prints the median compiler time
(user + sys) of each unit, alternated run by run, and each ratio to the external headers.
"""
import argparse
import collections
import json
import os
import pathlib
import resource
import shutil
import statistics
import subprocess
import sys
import tempfile

ROOT = pathlib.Path(__file__).resolve().parent.parent
INCLUDE = ROOT / "include"
EIGEN = "/usr/include/eigen3"
FUNCTIONS = {"FunctionDecl", "CXXMethodDecl", "CXXConstructorDecl", "CXXDestructorDecl", "CXXConversionDecl"}
TEMPLATES = {"ClassTemplateDecl", "FunctionTemplateDecl", "ClassTemplatePartialSpecializationDecl",
             "ClassTemplateSpecializationDecl", "TypeAliasTemplateDecl", "VarTemplateDecl"}


def syntax_tree(unit):
    """The declarations in namespace heldout, as clang's JSON dump (a run of JSON objects)."""
    out = subprocess.run(["clang++-14", "-std=c++20", "-fsyntax-only", f"-I{INCLUDE}", f"-I{EIGEN}",
                          "-Xclang", "-ast-dump=json", "-Xclang", "-ast-dump-filter", "-Xclang", "heldout",
                          str(unit)], check=True, capture_output=True, text=True).stdout
    decoder, pos, objects = json.JSONDecoder(), 0, []
    while True:
        while pos < len(out) and out[pos].isspace():
            pos += 1
        if pos >= len(out):
            return objects
        obj, pos = decoder.raw_decode(out, pos)
        objects.append(obj)


def return_type(qual_type):
    """'double (int) const' -> 'double'; None where it cannot be spelt back (auto, pointers to functions)."""
    depth = 0
    for i, ch in enumerate(qual_type):
        if ch in "<[":
            depth += 1
        elif ch in ">]":
            depth -= 1
        elif ch == "(" and depth == 0:
            r = qual_type[:i].strip()
            return None if "auto" in r or "(" in r or "lambda" in r else r
    return None


def bodies(objects):
    """{file: [(begin, end, kind, return type)]}: the braces of every non-template function body.

    clang's dump omits a location's file when it is the previous location's, so the walk keeps
    the file last seen, in the order the dump prints them.
    """
    found = collections.defaultdict(list)
    current = {"file": None}

    def see(loc):
        if isinstance(loc, dict):
            for k in ("spellingLoc", "expansionLoc"):
                see(loc.get(k))
            if "file" in loc:
                current["file"] = loc["file"]

    def offset(loc):
        loc = loc.get("spellingLoc", loc)
        return loc["offset"], loc["tokLen"]

    def walk(node, skip):
        if isinstance(node, list):
            for x in node:
                walk(x, skip)
            return
        if not isinstance(node, dict):
            return
        kind = node.get("kind")
        see(node.get("loc"))
        if "range" in node:
            see(node["range"].get("begin"))
            see(node["range"].get("end"))
        skip = skip or kind in TEMPLATES or kind == "LambdaExpr"
        if (kind in FUNCTIONS and not skip and not node.get("isImplicit") and not node.get("constexpr")
                and not node.get("consteval")):
            for child in node.get("inner", []):
                if isinstance(child, dict) and child.get("kind") == "CompoundStmt":
                    see(child["range"]["begin"])
                    file = current["file"]
                    begin, _ = offset(child["range"]["begin"])
                    see(child["range"]["end"])
                    end, length = offset(child["range"]["end"])
                    qual = node.get("type", {}).get("qualType", "")
                    found[file].append((begin, end + length, kind, None if qual.startswith("auto") else
                                        ("void" if kind in ("CXXConstructorDecl", "CXXDestructorDecl")
                                         else return_type(qual))))
        for k, v in node.items():
            if k not in ("loc", "range") and isinstance(v, (list, dict)):
                walk(v, skip)

    walk(objects, False)
    return found


def rewrite(found, dest, mode):
    """Copy include/heldout to dest/heldout with the bodies templated or removed; bytes changed."""
    shutil.copytree(INCLUDE / "heldout", dest / "heldout")
    changed = 0
    for file, spans in found.items():
        if not file or not file.startswith(str(INCLUDE / "heldout") + "/"):
            continue
        data = pathlib.Path(file).read_bytes()
        out, pos = bytearray(), 0
        for begin, end, kind, ret in sorted(set(spans)):
            if begin < pos or ret is None or data[begin:begin + 1] != b"{" or data[end - 1:end] != b"}":
                continue  # nested, deduced return type, or a range that is not a brace pair
            special = kind in ("CXXConstructorDecl", "CXXDestructorDecl")
            if mode == "none":
                new = b"{}" if special else b"{ __builtin_unreachable(); }"
            elif ret == "void":
                new = b"{ [&](auto) -> void {" + data[begin + 1:end - 1] + b"}; }"
            else:
                new = b"{ [&](auto) -> " + ret.encode() + b" {" + data[begin + 1:end - 1] + b"}; __builtin_unreachable(); }"
            out += data[pos:begin] + new
            pos = end
            changed += end - begin
        out += data[pos:]
        (dest / pathlib.Path(file).relative_to(INCLUDE)).write_bytes(bytes(out))
    return changed


def cpu_seconds(cmd):
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    run = subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    if run.returncode != 0:  # a rewrite the compiler refuses: say where, rather than time nothing
        sys.exit(f"include_floor: {' '.join(cmd)} failed:\n{run.stderr[:4000]}")
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--cxx", default="g++-12")
    ap.add_argument("--runs", type=int, default=5)
    args = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        work = pathlib.Path(tmp)
        externals = sorted({line.strip() for h in (INCLUDE / "heldout").rglob("*.hpp")
                            if h.name != "mpi.hpp" and "mpi" not in h.parent.parts
                            for line in h.read_text().splitlines()
                            if line.startswith("#include <") and not line.startswith("#include <heldout/")})
        (work / "external.cpp").write_text("\n".join(externals) + "\nint main() {}\n")
        (work / "umbrella.cpp").write_text("#include <heldout/heldout.hpp>\nint main() {}\n")
        found = bodies(syntax_tree(work / "umbrella.cpp"))
        trees = {"as written": INCLUDE}
        for name, mode in (("templated", "lambda"), ("no bodies", "none")):
            dest = work / mode
            n = rewrite(found, dest, mode)
            trees[name] = dest
            print(f"{name}: {n} bytes of non-template function bodies rewritten", file=sys.stderr)
        times = collections.defaultdict(list)
        flags = [args.cxx, "-std=c++20", "-O0", "-w", f"-I{EIGEN}", "-c", "-o", os.devnull]
        for r in range(args.runs + 1):  # round 0 warms the caches and is not counted
            units = [("external", [str(work / "external.cpp")])]
            units += [(name, [f"-I{inc}", str(work / "umbrella.cpp")]) for name, inc in trees.items()]
            for name, extra in units:
                t = cpu_seconds(flags + extra)
                if r > 0:
                    times[name].append(t)
        base = statistics.median(times["external"])
        print(f"umbrella include cost with {args.cxx} (-O0, CPU time, median of {args.runs} alternated runs)")
        for name, ts in times.items():
            t = statistics.median(ts)
            print(f"  {name:10s} {t:6.2f} s  {t / base:5.2f}x")


if __name__ == "__main__":
    main()
