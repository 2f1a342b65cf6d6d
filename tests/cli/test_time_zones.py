#!/usr/bin/env python3
"""Time zones by name, POSIX rules that once escaped as internal errors, and the year 500.

The reference for every local offset is Python's zoneinfo (the standard library reading the same
system tzdata, an implementation independent of lidbox's) and, for POSIX strings, the rule text
of IEEE Std 1003.1, section 8.3, evaluated with Python's proleptic Gregorian datetime.

ctest runs it as: /usr/bin/python3 test_time_zones.py <lidbox binary> <source dir>
"""
import csv
import datetime as dt
import os
import re
import shutil
import subprocess
import sys
import tempfile
from zoneinfo import ZoneInfo

BINARY = os.path.abspath(sys.argv[1])
SOURCE = os.path.abspath(sys.argv[2])
DEMO = os.path.join(SOURCE, "met-demo")
failures = []


def check(cond, what):
    print(("ok: " if cond else "FAIL: ") + what)
    if not cond:
        failures.append(what)


def demo_copy(d, zone, shift_days=0, year=None, issue_time=None):
    """The invented demo case in d with another zone; met times moved by shift_days (or into
    another year)."""
    for name in ("cindervale.toml", "cindervale-met.csv", "cindervale-advisories.toml"):
        shutil.copy(os.path.join(DEMO, name), d)
    case = os.path.join(d, "cindervale.toml")
    text = open(case).read()
    text = re.sub(r'^time_zone = .*$', 'time_zone = "%s"' % zone, text, flags=re.M)
    if issue_time is not None:
        text = re.sub(r'^issue_time = .*$', 'issue_time = "%s"' % issue_time, text, flags=re.M)
    open(case, "w").write(text)
    met = os.path.join(d, "cindervale-met.csv")
    lines = open(met).read().splitlines()
    out = [lines[0]]
    for line in lines[1:]:
        stamp, rest = line.split(",", 1)
        t = dt.datetime.fromisoformat(stamp.replace("Z", "+00:00")) + dt.timedelta(days=shift_days)
        text_t = t.strftime("%Y-%m-%dT%H:%M:%SZ")
        if year is not None:
            text_t = "%04d" % year + text_t[4:]
        out.append(text_t + "," + rest)
    open(met, "w").write("\n".join(out) + "\n")
    return case


def run(args, cwd):
    return subprocess.run([BINARY] + args, cwd=cwd, capture_output=True, text=True)


def local_offsets(path):
    with open(path) as f:
        rows = list(csv.DictReader(f))
    return [(r["period_start_utc"], r["period_start_local"][-6:]) for r in rows]


def offset_text(delta):
    s = int(delta.total_seconds())
    sign = "-" if s < 0 else "+"
    s = abs(s)
    return "%s%02d:%02d" % (sign, s // 3600, (s % 3600) // 60)


def tzdata_version():
    with open("/usr/share/zoneinfo/tzdata.zi") as f:
        return f.readline().split()[-1]


def test_iana_name():
    # 55 days after 12 January is 8 March 2026, the US spring change (15 U.S.C. 260a).
    with tempfile.TemporaryDirectory() as d:
        case = demo_copy(d, "America/Denver", shift_days=55)
        p = run(["run", "-q", case, "-o", "out", "--netcdf"], d)
        check(p.returncode == 0, "America/Denver accepted (%d: %s)" % (p.returncode, p.stderr.strip()))
        if p.returncode != 0:
            return
        zone = ZoneInfo("America/Denver")
        rows = local_offsets(os.path.join(d, "out", "hourly.csv"))
        bad = [(u, o) for u, o in rows
               if offset_text(dt.datetime.fromisoformat(u.replace("Z", "+00:00")).astimezone(zone)
                              .utcoffset()) != o]
        check(not bad and len(rows) == 168, "every hour's local offset as zoneinfo gives it: %r" % bad[:3])
        check({o for _, o in rows} == {"-07:00", "-06:00"}, "the run crosses the spring change")
        summary = open(os.path.join(d, "out", "summary.txt")).read()
        want = "time zone America/Denver (IANA tzdata %s)" % tzdata_version()
        check(want in summary, "the summary names the zone and the tzdata version")
        nc = subprocess.run(["ncdump", "-h", os.path.join(d, "out", "hourly.nc")],
                            capture_output=True, text=True).stdout
        check(':time_zone = "America/Denver"' in nc, "NetCDF global attribute time_zone")
        check(':time_zone_source = "IANA tzdata %s"' % tzdata_version() in nc,
              "NetCDF global attribute time_zone_source with the tzdata version")


def posix_offset(t, std_east, dst_east, start_day, end_day):
    """Offsets for rules given as functions year -> local date, both changes at 02:00 local."""
    def change(year, day_fn, offset):
        return dt.datetime.combine(day_fn(year), dt.time(2)) - dt.timedelta(seconds=offset)
    y = t.year
    events = []
    for k in (y - 1, y, y + 1):
        events.append((change(k, start_day, std_east), dst_east))
        events.append((change(k, end_day, dst_east), std_east))
    events.sort()
    current = std_east
    for at, off in events:
        if at <= t:
            current = off
    return current


def second_sunday_of_march(y):
    d = dt.date(y, 3, 1)
    d += dt.timedelta(days=(6 - d.weekday()) % 7)
    return d + dt.timedelta(days=7)


def test_posix_rules_that_escaped():
    cases = [
        # zero-based day rules: day n counts February 29 (IEEE Std 1003.1, 8.3)
        ("MST7MDT,59,300", lambda y: dt.date(y, 1, 1) + dt.timedelta(days=59),
         lambda y: dt.date(y, 1, 1) + dt.timedelta(days=300), 55),
        # an end on day 31 (1 February), before the March start: daylight time over the new year
        ("MST7MDT,M3.2.0,31", second_sunday_of_march,
         lambda y: dt.date(y, 1, 1) + dt.timedelta(days=31), 0),
    ]
    for zone, start, end, shift in cases:
        with tempfile.TemporaryDirectory() as d:
            case = demo_copy(d, zone, shift_days=shift)
            p = run(["run", "-q", case, "-o", "out"], d)
            check(p.returncode == 0, "%s gives an answer (%d: %s)" % (zone, p.returncode, p.stderr.strip()))
            if p.returncode != 0:
                continue
            rows = local_offsets(os.path.join(d, "out", "hourly.csv"))
            bad = []
            for u, o in rows:
                t = dt.datetime.fromisoformat(u.replace("Z", ""))
                want = posix_offset(t, -7 * 3600, -6 * 3600, start, end)
                if offset_text(dt.timedelta(seconds=want)) != o:
                    bad.append((u, o))
            check(not bad, "%s: every hour's offset as the POSIX rule gives it: %r" % (zone, bad[:3]))


def test_year_500():
    # Year 500 with a daylight-saving zone: once an internal error (Boost's year range). The
    # issue time keeps its year 2026 first, then moves to 500 as well.
    with tempfile.TemporaryDirectory() as d:
        case = demo_copy(d, "MST7MDT,M3.2.0,M11.1.0", year=500, issue_time="0500-01-12T00:00:00-07:00")
        p = run(["run", "-q", case, "-o", "out"], d)
        check(p.returncode in (0, 2) and "internal error" not in p.stderr,
              "year 500 gives an answer or a placed input error (%d: %s)" % (p.returncode, p.stderr.strip()))
        if p.returncode == 0:
            rows = local_offsets(os.path.join(d, "out", "hourly.csv"))
            check(rows[0] == ("0500-01-12T07:00:00Z", "-07:00"), "year 500: winter is standard time")
        p = run(["run", "-q", case, "-o", "out2", "--issue-time", "0500-07-01T00:00"], d)
        check(p.returncode in (0, 2) and "internal error" not in p.stderr,
              "issue time in the year 500 (%d: %s)" % (p.returncode, p.stderr.strip()))


if __name__ == "__main__":
    test_iana_name()
    test_posix_rules_that_escaped()
    test_year_500()
    print("%d failed" % len(failures))
    sys.exit(1 if failures else 0)
