#!/usr/bin/python3
"""Checks a report the heldout tool wrote with --report (run by run_tool.cmake, REPORT=ON).

usage: check_report.py REPORT.html

1. Self-contained: Python's html.parser reads it; no <script>, <link>, <iframe>, <img> or
   <object>; every href is an anchor in the page ("#..."), no src attribute at all; the
   inline SVG figures are well-formed XML (xml.etree parses each).
2. In a real browser (Debian's chromium, when installed; CI installs it through
   cmake/setup.sh): headless chromium loads the file (--dump-dom, offline: no network
   access is needed) and the DOM it built has every figure and table the file has, and a
   screenshot of the page is written and is not blank. Where chromium is missing the
   script says so and checks 1 only.
"""
import os
import re
import shutil
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET
from html.parser import HTMLParser

path = sys.argv[1]
text = open(path, encoding="utf-8").read()


class Scan(HTMLParser):
    def __init__(self):
        super().__init__()
        self.tags = {}
        self.problems = []

    def handle_starttag(self, tag, attrs):
        self.tags[tag] = self.tags.get(tag, 0) + 1
        if tag in ("script", "link", "iframe", "img", "object", "embed"):
            self.problems.append("<%s> in a self-contained page" % tag)
        for k, v in attrs:
            if k == "src":
                self.problems.append("src=%r" % v)
            if k == "href" and not (v or "").startswith("#"):
                self.problems.append("href=%r points outside the page" % v)


s = Scan()
s.feed(text)
def top_level_svgs(t):
    """Each outermost <svg>...</svg> (figures may nest an <svg> inside)."""
    out, depth, start = [], 0, 0
    for m in re.finditer(r"<svg\b|</svg>", t):
        if m.group() == "</svg>":
            depth -= 1
            if depth == 0:
                out.append(t[start:m.end()])
        else:
            if depth == 0:
                start = m.start()
            depth += 1
    return out


svgs = top_level_svgs(text)
for i, svg in enumerate(svgs):
    try:
        ET.fromstring(svg)
    except ET.ParseError as e:
        s.problems.append("figure %d is not well-formed XML: %s" % (i + 1, e))
if not svgs:
    s.problems.append("no figure")
if "<table" not in text:
    s.problems.append("no table")
if s.problems:
    print("\n".join(s.problems))
    sys.exit(1)
tables = s.tags.get("table", 0)
print("self-contained: %d figures, %d tables, no external reference" % (len(svgs), tables))

chromium = shutil.which("chromium") or shutil.which("chromium-browser")
if not chromium:
    print("chromium not installed: browser check skipped")
    sys.exit(0)
url = "file://" + os.path.abspath(path)
flags = ["--headless", "--disable-gpu", "--no-sandbox", "--no-first-run", "--disable-extensions",
         "--allow-file-access-from-files"]
with tempfile.TemporaryDirectory() as tmp:
    flags.append("--user-data-dir=" + tmp)
    dom = subprocess.run([chromium, *flags, "--dump-dom", url], capture_output=True, text=True, timeout=120)
    if dom.returncode != 0:
        print("chromium failed (%d):\n%s" % (dom.returncode, dom.stderr[-2000:]))
        sys.exit(1)
    got_svgs = len(top_level_svgs(dom.stdout))
    got_tables = len(re.findall(r"<table\b", dom.stdout))
    if got_svgs < len(svgs) or got_tables != tables:
        print("the browser's DOM has %d figures and %d tables, the file %d and %d" % (got_svgs, got_tables,
                                                                                   len(svgs), tables))
        sys.exit(1)
    shot = os.path.join(os.path.dirname(os.path.abspath(path)), "report.png")
    r = subprocess.run([chromium, *flags, "--window-size=1200,3000", "--screenshot=" + shot, url],
                       capture_output=True, text=True, timeout=120)
    if r.returncode != 0 or not os.path.exists(shot) or os.path.getsize(shot) < 20000:
        print("no screenshot, or a blank one (%s):\n%s" % (shot, r.stderr[-2000:]))
        sys.exit(1)
print("chromium loaded it: %d figures and %d tables in its DOM; screenshot %s (%d bytes)" % (
    got_svgs, got_tables, shot, os.path.getsize(shot)))
