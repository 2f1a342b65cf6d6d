#!/usr/bin/env python3
"""chart.svg of real runs: a 5-day forecast with its ensemble, the 7-day demo and an invented
91-day case (tests/bench/long_case.py). Each chart must be self-contained (no external
reference), carry the caution and name its zone, and its time-axis tick labels must not overlap:
read from the <text class="tick-x"> elements, each label spans its x (text-anchor middle) plus
and minus half its estimated width, font-size x characters x 0.6 (common practice for
sans-serif digits, no source), and neighbours in a row (same y) must not touch. The long case's
chart stays under 300 kB (the issue's limit) because it is drawn from daily bins.

Usage (ctest): python3 test_chart_cli.py <lidbox binary> <source dir>
"""
import os
import re
import subprocess
import sys
import tempfile

BINARY, SOURCE = os.path.abspath(sys.argv[1]), os.path.abspath(sys.argv[2])
sys.path.insert(0, os.path.join(SOURCE, "tests", "bench"))
import long_case  # noqa: E402

failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


TICK = re.compile(r'<text x="([0-9.]+)" y="([0-9.]+)" class="tick-x"[^>]*>([^<]*)</text>')


def tick_rows(svg):
    rows = {}
    for x, y, text in TICK.findall(svg):
        rows.setdefault(float(y), []).append((float(x), text))
    return rows


def check_chart(path, name, max_bytes, min_labels):
    size = os.path.getsize(path)
    print("%s: chart.svg %d bytes" % (name, size))
    check(size < max_bytes, "%s: chart.svg is %d bytes, expected under %d" % (name, size, max_bytes))
    svg = open(path, encoding="utf-8").read()
    for bad in ("href", "url(", "<image", "<script", "@import"):
        check(bad not in svg, "%s: the chart refers to nothing outside itself (%s)" % (name, bad))
    check("Screening estimate from a single well-mixed box model" in svg, name + ": caution in the chart")
    check("MST/MDT, UTC-07:00 standard" in svg, name + ": the zone is named")
    check("MST7MDT,M3" not in svg, name + ": the POSIX rule itself is not shown")
    rows = tick_rows(svg)
    labels = sum(len(r) for r in rows.values())
    check(labels >= min_labels, "%s: %d tick labels, expected at least %d" % (name, labels, min_labels))
    worst = None
    for y, row in rows.items():
        row.sort()
        for (x0, t0), (x1, t1) in zip(row, row[1:]):
            gap = (x1 - 0.6 * 12 * len(t1) / 2) - (x0 + 0.6 * 12 * len(t0) / 2)
            worst = gap if worst is None else min(worst, gap)
            check(gap > 0, "%s: tick labels %r at x %.1f and %r at x %.1f (y %.1f) overlap"
                  % (name, t0, x0, t1, x1, y))
    print("%s: %d tick labels in %d rows, smallest gap %.1f px" % (name, labels, len(rows), worst or 0))
    return svg


with tempfile.TemporaryDirectory() as tmp:
    # The 5-day forecast with its ensemble: the band, the issue time and the limits are drawn.
    out = os.path.join(tmp, "forecast")
    p = subprocess.run([BINARY, "run", os.path.join(SOURCE, "met-demo", "cindervale-forecast.toml"),
                        "-o", out, "-q"], capture_output=True, text=True)
    check(p.returncode == 0, "forecast run exits 0: " + p.stderr)
    if p.returncode == 0:
        svg = check_chart(os.path.join(out, "chart.svg"), "5-day forecast", 300_000, 20)
        check("ensemble p5-p95 (12 members)" in svg, "forecast: the ensemble band is labelled")
        check("ensemble median" in svg, "forecast: the ensemble median is drawn")
        check("issued 2026-02-09 14:00 MST" in svg, "forecast: the issue time is marked")
        check("eu-2008-50 day: 50 ug m-3" in svg, "forecast: the EU daily PM10 limit is labelled")
        check("Tue 02-10" in svg, "forecast: days are labelled with their weekday")
        check(">06:00<" in svg, "forecast: local hours are labelled")
    # The 7-day demo: episodes shaded, alert levels labelled.
    out = os.path.join(tmp, "demo")
    p = subprocess.run([BINARY, "run", os.path.join(SOURCE, "met-demo", "cindervale.toml"), "-o", out, "-q"],
                       capture_output=True, text=True)
    check(p.returncode == 0, "demo run exits 0: " + p.stderr)
    if p.returncode == 0:
        svg = check_chart(os.path.join(out, "chart.svg"), "7-day demo", 300_000, 30)
        check("alert episode" in svg, "demo: episodes are shaded and named in the legend")
        check("cindervale-advisories stagnation advisory (invented) (1-hour): 45 ug m-3" in svg,
              "demo: the invented PM2.5 advisory is labelled in the case's unit")
        check("stacked by part:" in svg and "home_heating" in svg, "demo: the sector stack")
        check("wind speed [m/s]" in svg and "height above ground [m]" in svg, "demo: lid-and-wind axes")
    # An invented 91-day case: daily bins, weekly labels, a small file.
    case = long_case.write_case(os.path.join(tmp, "long"), 0.25)
    out = os.path.join(tmp, "long-out")
    p = subprocess.run([BINARY, "run", case, "-o", out, "-q"], capture_output=True, text=True)
    check(p.returncode == 0, "91-day run exits 0: " + p.stderr)
    if p.returncode == 0:
        svg = check_chart(os.path.join(out, "chart.svg"), "91-day case", 300_000, 40)
        check("drawn as daily means of the hour means" in svg, "91-day: drawn from daily bins")
        check(">01-05<" in svg and ">01-12<" in svg, "91-day: weekly labels on Mondays")
        check(">12:00<" not in svg, "91-day: no hour labels")

if failures:
    print("%d failure(s)" % len(failures))
    sys.exit(1)
print("ok")
