#!/usr/bin/env python3
"""The ctest report.browser: loads heldout's HTML report in headless chromium and fails when the
page logs an error or a figure does not render.

    check_report.py WRITER WORK_DIR

WRITER (tests/browser/write_report.cpp) writes the report of a seeded scenario with every
section and figure html_report draws, and prints "figures N svgs M". This script then

1. checks that it can see faults at all: a small page with a throwing script, a missing image,
   an SVG of zero size, a figure with nothing drawn and overlapping labels must be reported
   on each count (a blind check fails the test);
2. loads a copy of the report with a probe script put first in <head> (the report itself has
   no scripts); after the load event the probe writes into the DOM, as JSON, the errors seen
   (window 'error' events, resource load failures, unhandled rejections, console.error) and,
   per figure, the rendered size of each SVG, the shapes and labels drawn, labels that spill
   out of their SVG, and labels that overlap; chromium's --dump-dom returns that DOM;
3. fails on any error, console message, missing or empty figure, zero-size SVG, label outside
   its SVG, overlapping labels, or a page wider than the window (a table or figure that
   overflows), in a 1200px and in a 700px wide window;
4. keeps a screenshot, WORK_DIR/report.png, for a person to look at.

Exits 77 (ctest SKIP_RETURN_CODE) with a clear line when chromium is not installed, except
under CI=true, where a missing browser is a failure: CI installs it (.ci/run).
"""
import json
import os
import re
import shutil
import subprocess
import sys

SKIP = 77
# A desktop window, and a narrow one (half a laptop screen, a tablet): nothing may spill at either.
WIDTHS, HEIGHT = (1200, 700), 900

PROBE = r"""<script id="heldout-probe-script">
(function () {
  var errors = [];
  window.addEventListener('error', function (e) {
    var t = e.target;
    if (t && t !== window && (t.src || t.href)) errors.push('resource failed: ' + (t.src || t.href));
    else errors.push('script error: ' + e.message);
  }, true);
  window.addEventListener('unhandledrejection', function (e) { errors.push('unhandled rejection: ' + e.reason); });
  var ce = console.error;
  console.error = function () { errors.push('console.error: ' + Array.prototype.join.call(arguments, ' ')); ce.apply(console, arguments); };
  function box(r) { return {x: r.left, y: r.top, w: r.width, h: r.height}; }
  function overlap(a, b) {
    var dx = Math.min(a.right, b.right) - Math.max(a.left, b.left);
    var dy = Math.min(a.bottom, b.bottom) - Math.max(a.top, b.top);
    return dx > 1.5 && dy > 1.5;
  }
  window.addEventListener('load', function () {
    var out = {errors: errors, scrollWidth: document.documentElement.scrollWidth, innerWidth: window.innerWidth,
               figures: []};
    var figs = document.querySelectorAll('figure');
    for (var i = 0; i < figs.length; ++i) {
      var f = figs[i], outer = f.querySelector('svg');
      var cap = f.querySelector('figcaption');
      var rec = {index: i, caption: cap ? cap.textContent.slice(0, 60) : '', svgs: [], shapes: 0, labels: 0,
                 empty_labels: [], outside: [], overlapping: []};
      var svgs = f.querySelectorAll('svg');
      for (var s = 0; s < svgs.length; ++s) rec.svgs.push(box(svgs[s].getBoundingClientRect()));
      rec.shapes = f.querySelectorAll('path, line, polyline, polygon, circle, rect, ellipse').length;
      if (outer) {
        var o = outer.getBoundingClientRect();
        var texts = f.querySelectorAll('text');
        var rects = [];
        for (var k = 0; k < texts.length; ++k) {
          var t = texts[k], r = t.getBoundingClientRect(), s2 = t.textContent.trim();
          if (!s2) continue;
          rec.labels++;
          if (r.width <= 0 || r.height <= 0) { rec.empty_labels.push(s2); continue; }
          if (r.left < o.left - 1 || r.top < o.top - 1 || r.right > o.right + 1 || r.bottom > o.bottom + 1)
            rec.outside.push(s2);
          rects.push([s2, r]);
        }
        for (var a = 0; a < rects.length; ++a)
          for (var b = a + 1; b < rects.length; ++b)
            if (overlap(rects[a][1], rects[b][1])) rec.overlapping.push(rects[a][0] + ' / ' + rects[b][0]);
      }
      out.figures.push(rec);
    }
    var pre = document.createElement('pre');
    pre.id = 'heldout-probe';
    pre.textContent = JSON.stringify(out);
    document.body.appendChild(pre);
  });
})();
</script>
"""

# A page with one fault of each kind the check must see.
FAULTY = """<!DOCTYPE html><html lang="en"><head><meta charset="utf-8"><title>faults</title></head><body>
<script>undefined_function_of_the_fault_page();</script>
<img src="no-such-picture.png" alt="">
<figure><svg xmlns="http://www.w3.org/2000/svg" width="0" height="0" viewBox="0 0 10 10"><rect width="5" height="5"/></svg><figcaption>zero size</figcaption></figure>
<figure><svg xmlns="http://www.w3.org/2000/svg" width="200" height="100" viewBox="0 0 200 100"></svg><figcaption>nothing drawn</figcaption></figure>
<figure><svg xmlns="http://www.w3.org/2000/svg" width="200" height="100" viewBox="0 0 200 100"><line x1="0" y1="0" x2="9" y2="9" stroke="black"/>
<text x="10" y="50">first label</text><text x="14" y="52">second label</text><text x="190" y="50">spills out</text></svg><figcaption>labels</figcaption></figure>
</body></html>
"""


def find_chromium():
    for name in ("chromium", "chromium-browser"):
        path = shutil.which(name)
        if path:
            return path
    return None


def run_chromium(chromium, work, page, extra, width=WIDTHS[0]):
    args = [chromium, "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run", "--disable-extensions",
            "--allow-file-access-from-files", "--user-data-dir=" + os.path.join(work, "profile"),
            "--window-size=%d,%d" % (width, HEIGHT), "--virtual-time-budget=10000",
            "--enable-logging=stderr", "--v=0"] + extra + ["file://" + os.path.abspath(page)]
    r = subprocess.run(args, capture_output=True, text=True, timeout=180)
    return r


def probe(chromium, work, html, name, width=WIDTHS[0]):
    """Loads html (with the probe put first in <head>) and returns (probe JSON, console lines)."""
    head = html.find("<head>")
    if head < 0:
        raise SystemExit("report.browser: the page has no <head>")
    page = os.path.join(work, name)
    with open(page, "w", encoding="utf-8") as f:
        f.write(html[: head + 6] + PROBE + html[head + 6:])
    r = run_chromium(chromium, work, page, ["--dump-dom"], width)
    m = re.search(r'<pre id="heldout-probe">(.*?)</pre>', r.stdout, re.S)
    if r.returncode != 0 or not m:
        print(r.stderr[-4000:])
        raise SystemExit("report.browser: chromium exited %d without the probe's result for %s" % (r.returncode, name))
    text = m.group(1).replace("&lt;", "<").replace("&gt;", ">").replace("&quot;", '"').replace("&amp;", "&")
    console = [line for line in r.stderr.splitlines() if "CONSOLE" in line]
    return json.loads(text), console


def problems_of(result, console, expected_figures=None, expected_svgs=None):
    """Every fault found, as lines."""
    p = ["page error: " + e for e in result["errors"]]
    p += ["console: " + c for c in console]
    figs = result["figures"]
    if expected_figures is not None and len(figs) != expected_figures:
        p.append("figures: %d in the DOM, the writer made %d" % (len(figs), expected_figures))
    if expected_svgs is not None and sum(len(f["svgs"]) for f in figs) != expected_svgs:
        p.append("svgs: %d in figures, the writer made %d" % (sum(len(f["svgs"]) for f in figs), expected_svgs))
    for f in figs:
        what = "figure %d (%s...)" % (f["index"] + 1, f["caption"][:40])
        if not f["svgs"]:
            p.append(what + ": no <svg>")
        for k, b in enumerate(f["svgs"]):
            if b["w"] <= 0 or b["h"] <= 0:
                p.append(what + ": svg %d renders at %gx%g" % (k + 1, b["w"], b["h"]))
        if f["shapes"] == 0:
            p.append(what + ": nothing drawn (no path, line, polyline, polygon, circle or rect)")
        if f["labels"] == 0 and f["svgs"]:
            p.append(what + ": no label")
        for t in f["empty_labels"]:
            p.append(what + ": label '%s' renders empty" % t)
        for t in f["outside"]:
            p.append(what + ": label '%s' lies outside its svg" % t)
        for t in f["overlapping"]:
            p.append(what + ": labels overlap: %s" % t)
    if result["scrollWidth"] > result["innerWidth"]:
        p.append("page is %dpx wide in a %dpx window" % (result["scrollWidth"], result["innerWidth"]))
    return p


def main():
    if len(sys.argv) != 3:
        raise SystemExit("usage: check_report.py WRITER WORK_DIR")
    writer, work = sys.argv[1], sys.argv[2]
    chromium = find_chromium()
    if chromium is None:
        if os.environ.get("CI") == "true":
            raise SystemExit("report.browser: chromium is not installed, and under CI it must be (.ci/run installs it)")
        print("report.browser: SKIPPED: chromium is not installed (apt-get install chromium; "
              "bash cmake/setup.sh test installs it)")
        return SKIP
    shutil.rmtree(work, ignore_errors=True)
    os.makedirs(work)

    # 1. The check must see each kind of fault.
    bad, bad_console = probe(chromium, work, FAULTY, "faulty.html")
    found = problems_of(bad, bad_console)
    wanted = {"a script error": r"script error: .*undefined_function_of_the_fault_page",
              "a missing image": r"resource failed: .*no-such-picture\.png",
              "a zero-size svg": r"svg 1 renders at 0x0",
              "a figure with nothing drawn": r"figure 2 .*nothing drawn",
              "overlapping labels": r"labels overlap: first label / second label",
              "a label outside its svg": r"label 'spills out' lies outside"}
    blind = [k for k, rx in wanted.items() if not any(re.search(rx, line) for line in found)]
    if blind:
        print("\n".join(found))
        raise SystemExit("report.browser: the check does not see " + ", ".join(blind))
    print("report.browser: the check sees every planted fault (%d found on the faulty page)" % len(found))

    # 2. The report.
    page = os.path.join(work, "report.html")
    r = subprocess.run([writer, page], capture_output=True, text=True, timeout=600)
    m = re.search(r"figures (\d+) svgs (\d+)", r.stdout)
    if r.returncode != 0 or not m:
        raise SystemExit("report.browser: the writer failed (%d): %s%s" % (r.returncode, r.stdout, r.stderr))
    figures, svgs = int(m.group(1)), int(m.group(2))
    with open(page, encoding="utf-8") as f:
        html = f.read()
    found = []
    for width in WIDTHS:
        result, console = probe(chromium, work, html, "report-probed.html", width)
        print("report.browser: in a %dpx window" % width)
        for f in result["figures"]:
            print("  figure %d: %d svg (%s), %d shapes, %d labels: %s" %
                  (f["index"] + 1, len(f["svgs"]), ", ".join("%gx%g" % (b["w"], b["h"]) for b in f["svgs"]),
                   f["shapes"], f["labels"], f["caption"][:50]))
        found += ["%dpx window: %s" % (width, line) for line in problems_of(result, console, figures, svgs)]
    shot = run_chromium(chromium, work, page, ["--screenshot=" + os.path.join(work, "report.png")])
    if shot.returncode != 0:
        found.append("the screenshot failed: " + shot.stderr[-500:])
    if found:
        print("\n".join("FAULT: " + line for line in found))
        print("report.browser: %d faults in %s" % (len(found), page))
        return 1
    print("report.browser: %d figures (%d svgs) render, no error logged; screenshot %s" %
          (figures, svgs, os.path.join(work, "report.png")))
    return 0


if __name__ == "__main__":
    sys.exit(main())
