#!/usr/bin/env python3
"""Every chart lidbox draws, rendered in headless Chromium: the 7-day demo's chart.svg, the
5-day ensemble forecast's, the 75-day evaluation season's (daily bins), and `lidbox evaluate`'s
timeseries.svg (monitors overlaid, after an NNLS fit) and scatter.svg on that season. Each
screenshot is taken at the SVG's own width and height and must have exactly that size, and must
not be blank: at least 3 % of its pixels not white and at least 8 distinct colours (thresholds
common practice, no source: a chart with only its frame has well under 1 %).

Set LIDBOX_SCREENSHOTS=<folder> to keep the PNGs. Skips (77) without chromium or python3-PIL
(the README's second set-up command installs both).

Usage (ctest): python3 test_chart_render.py <lidbox binary> <source dir>
"""
import os
import re
import shutil
import subprocess
import sys
import tempfile

try:
    from PIL import Image
except ImportError:
    print("python3-PIL is not installed: skipped")
    sys.exit(77)

BINARY, SOURCE = os.path.abspath(sys.argv[1]), os.path.abspath(sys.argv[2])
CHROMIUM = shutil.which("chromium")
if not CHROMIUM:
    print("chromium is not installed: skipped")
    sys.exit(77)
DEMO = os.path.join(SOURCE, "met-demo")
KEEP = os.environ.get("LIDBOX_SCREENSHOTS")
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(args, what):
    p = subprocess.run([BINARY] + args, capture_output=True, text=True)
    check(p.returncode == 0, what + " exits 0: " + p.stderr)
    return p.returncode == 0


def render(svg_path, name, tmp):
    svg = open(svg_path, encoding="utf-8").read()
    m = re.match(r'<svg [^>]*width="(\d+)" height="(\d+)"', svg)
    check(m is not None, name + ": the SVG states its size")
    if not m:
        return
    w, h = int(m.group(1)), int(m.group(2))
    png = os.path.join(KEEP or tmp, name + ".png")
    subprocess.run([CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--hide-scrollbars",
                    "--screenshot=" + png, "--window-size=%d,%d" % (w, h), svg_path],
                   capture_output=True, timeout=180)
    check(os.path.exists(png), name + ": chromium wrote a screenshot")
    if not os.path.exists(png):
        return
    img = Image.open(png).convert("RGB")
    check(img.size == (w, h), "%s: screenshot %s, expected %dx%d" % (name, img.size, w, h))
    colours = img.getcolors(maxcolors=1 << 20) or []
    total = img.size[0] * img.size[1]
    white = sum(c for c, rgb in colours if rgb == (255, 255, 255))
    inked = 1.0 - white / total
    print("%s: %dx%d, %.1f %% of the pixels inked, %d colours" % (name, w, h, 100 * inked, len(colours)))
    check(inked >= 0.03, "%s: only %.2f %% of the pixels are not white" % (name, 100 * inked))
    check(len(colours) >= 8, "%s: only %d colours" % (name, len(colours)))


with tempfile.TemporaryDirectory() as tmp:
    if KEEP:
        os.makedirs(KEEP, exist_ok=True)
    out = os.path.join(tmp, "demo")
    if run(["run", os.path.join(DEMO, "cindervale.toml"), "-o", out, "-q"], "the demo"):
        render(os.path.join(out, "chart.svg"), "run-demo-chart", tmp)
    out = os.path.join(tmp, "forecast")
    if run(["run", os.path.join(DEMO, "cindervale-forecast.toml"), "-o", out, "-q"], "the forecast"):
        render(os.path.join(out, "chart.svg"), "run-forecast-ensemble-chart", tmp)
    out = os.path.join(tmp, "season")
    if run(["run", os.path.join(DEMO, "cindervale-season.toml"), "-o", out, "-q"], "the season"):
        render(os.path.join(out, "chart.svg"), "run-season-chart", tmp)
    out = os.path.join(tmp, "evaluate")
    if run(["evaluate", os.path.join(DEMO, "cindervale-season.toml"),
            os.path.join(DEMO, "cindervale-monitor-north.csv"), os.path.join(DEMO, "cindervale-monitor-south.csv"),
            "--pollutant", "PM2.5", "--fit", "nnls", "--weights", "1,0.5", "--bootstrap", "50", "--seed", "7",
            "-o", out], "evaluate"):
        render(os.path.join(out, "timeseries.svg"), "evaluate-timeseries", tmp)
        render(os.path.join(out, "scatter.svg"), "evaluate-scatter", tmp)

if failures:
    print("%d failure(s)" % len(failures))
    sys.exit(1)
print("ok")
