#!/usr/bin/env python3
"""Local civil time where people read: the summary's peak hours and first alert episode, and
report.md's episode table, are in the case's local civil time with the zone's abbreviation,
while hourly.csv and episodes.csv keep UTC.

Reference: python3 zoneinfo (the system tzdata) converts the UTC times of the tables. The demo's
POSIX zone "MST7MDT,M3.2.0,M11.1.0" has the same rules as America/Denver in 2026, so zoneinfo's
America/Denver is its reference; the demo is also rerun with Europe/Paris and with
Australia/Adelaide (a half-hour zone, daylight saving in January).

ctest runs it as: /usr/bin/python3 test_local_time.py <lidbox binary> <source dir>
"""
import csv
import os
import shutil
import subprocess
import sys
import tempfile
from datetime import datetime, timezone

try:
    from zoneinfo import ZoneInfo
except ImportError:
    sys.exit(77)

BINARY = os.path.abspath(sys.argv[1])
SOURCE = os.path.abspath(sys.argv[2])
DEMO = os.path.join(SOURCE, "met-demo")
failures = []


def check(cond, what):
    print(("ok: " if cond else "FAIL: ") + what)
    if not cond:
        failures.append(what)


def local(utc_text, zone):
    t = datetime.strptime(utc_text, "%Y-%m-%dT%H:%M:%SZ").replace(tzinfo=timezone.utc)
    d = t.astimezone(ZoneInfo(zone))
    return d.strftime("%Y-%m-%d %H:%M ") + d.tzname()


def run_demo(d, zone_line):
    for f in ("cindervale-met.csv", "cindervale-advisories.toml"):
        shutil.copy(os.path.join(DEMO, f), d)
    with open(os.path.join(DEMO, "cindervale.toml")) as f:
        text = f.read()
    text = text.replace('time_zone = "MST7MDT,M3.2.0,M11.1.0"', zone_line, 1)
    with open(os.path.join(d, "case.toml"), "w") as f:
        f.write(text)
    p = subprocess.run([BINARY, "run", "case.toml", "-o", "out", "-q"], cwd=d, capture_output=True,
                       text=True)
    check(p.returncode == 0, "%s: run exits 0 (%s)" % (zone_line, p.stderr.strip()))
    return os.path.join(d, "out")


def check_zone(zone_line, reference, abbreviations):
    with tempfile.TemporaryDirectory() as d:
        out = run_demo(d, zone_line)
        with open(os.path.join(out, "summary.txt")) as f:
            summary = f.read()
        with open(os.path.join(out, "hourly.csv")) as f:
            rows = list(csv.DictReader(f))
        check(rows[0]["period_start_utc"].endswith("Z"), "hourly.csv keeps UTC")
        for pol, col in (("CO", "CO_hour_mean [ppm]"), ("PM25", "PM25_hour_mean [ug m-3]")):
            peak = max(rows, key=lambda r: float(r[col]))
            want = local(peak["period_start_utc"], reference)
            line = next(l for l in summary.splitlines() if l.startswith(pol + " "))
            check(want in line, "%s: %s peak hour shown as %s (line: %s)" % (zone_line, pol, want, line.strip()))
        with open(os.path.join(out, "episodes.csv")) as f:
            episodes = list(csv.DictReader(f))
        check(episodes and episodes[0]["start_utc"].endswith("Z"), "episodes.csv keeps UTC")
        first = min(episodes, key=lambda e: e["start_utc"])
        want = local(first["start_utc"], reference)
        check("alert episodes: %d (first %s %s, %s, %s for" % (
            len(episodes), first["rule_set"], first["rule_id"], first["level_name"], want) in summary,
              "%s: summary's first episode starts %s" % (zone_line, want))
        with open(os.path.join(out, "report.md")) as f:
            md = f.read()
        for e in episodes:
            cells = "| %s | %s | %s |" % (e["pollutant"], local(e["start_utc"], reference),
                                          local(e["end_utc"], reference))
            check(cells in md, "%s: report.md episode %s" % (zone_line, cells))
        check(any(a in md for a in abbreviations), "%s: report.md names %s" % (zone_line, abbreviations))


check_zone('time_zone = "MST7MDT,M3.2.0,M11.1.0"', "America/Denver", ["MST"])
check_zone('time_zone = "Europe/Paris"', "Europe/Paris", ["CET"])
check_zone('time_zone = "Australia/Adelaide"', "Australia/Adelaide", ["ACDT"])
if failures:
    print("%d check(s) failed" % len(failures))
    sys.exit(1)
print("all checks passed")
