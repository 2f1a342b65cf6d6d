#!/usr/bin/env python3
"""Writes the INVENTED evaluation demo of met-demo/cindervale-season.toml (no real place, no real
measurements):

* cindervale-season-met.csv: 75 days of hourly winter met (1 December 2025 to 13 February 2026,
  local standard time UTC-7): stagnation episodes of 3 to 8 days whose lids sink day by day,
  ended by windy fronts with deep lids; southerly flow in the episodes (regional haze), northerly
  behind the fronts. Seeded.
* cindervale-monitor-north.csv and cindervale-monitor-south.csv: two invented monitors made from
  the case's own run (`lidbox run`) with KNOWN scales applied to its PM2.5 parts,

      PM2.5 = 1.15 background + initial + 1.30 traffic + 0.75 home_heating + noise,

  and serially correlated noise (AR(1), phi 0.6). The north monitor flags values under its
  detection limit (3 ug/m3) as "<3", reports CO in ppb (the case uses ppm), misses 2 % of hours
  and a 36-hour outage. The south monitor is noisier, reports small negative values as measured,
  and starts on day 20 and runs 5 days past the season, so it only partly overlaps the run.

    /usr/bin/python3 met-demo/make_evaluation_season.py <lidbox binary> [<output folder>]

The default output folder is met-demo; the case file is read from met-demo and its met file is
looked for beside it, so a different output folder gets its own copy of the case.
"""
import csv
import math
import os
import random
import shutil
import subprocess
import sys
import tempfile

SCALES = {"background": 1.15, "traffic": 1.30, "home_heating": 0.75}
DAYS = 75
OFFSET_H = 7  # local standard time is UTC-7


def stamp(k):
    """UTC stamp of hour k of the season (hour 0 = 2025-12-01T00:00 local = 07:00 UTC)."""
    import datetime
    t = datetime.datetime(2025, 12, 1, OFFSET_H) + datetime.timedelta(hours=k)
    return t.strftime("%Y-%m-%dT%H:%M:%SZ")


def make_met(rnd):
    # Regimes: (days, first-night lid, last-night lid, afternoon lid, wind, wind from)
    regimes = []
    while sum(r[0] for r in regimes) < DAYS:
        n = rnd.randint(3, 8)
        regimes.append((n, rnd.uniform(90, 140), rnd.uniform(40, 70), rnd.uniform(300, 550),
                        rnd.uniform(0.6, 1.4), rnd.uniform(150, 230)))
        regimes.append((rnd.randint(1, 2), 500, 450, rnd.uniform(1100, 1600), rnd.uniform(5, 9),
                        rnd.uniform(300, 360)))
    rows = []
    day = 0
    for n, first, last, noon, wind, frm in regimes:
        for d in range(n):
            if day >= DAYS:
                break
            night = first + (last - first) * d / max(1, n - 1)
            for hour in range(24):
                if hour < 9 or hour >= 19:
                    h = night
                elif hour < 14:
                    h = night + (noon - night) * math.sin(0.5 * math.pi * (hour - 9) / 5.0) ** 1.5
                elif hour < 16:
                    h = noon
                else:
                    h = noon + (night - noon) * (hour - 16) / 3.0
                speed = wind * (1.0 + 0.5 * math.sin((hour - 9) / 24.0 * 2 * math.pi))
                speed = max(0.0, speed * rnd.uniform(0.75, 1.25))
                direction = (frm + rnd.uniform(-30, 30)) % 360
                t = -8.0 + 5.0 * math.sin((hour - 9) / 24.0 * 2 * math.pi)
                rows.append("%s,%.0f,%.2f,%.0f,%.1f" % (stamp(day * 24 + hour), h * rnd.uniform(0.92, 1.08),
                                                         speed, direction, t))
            day += 1
    return rows


def ar1(rnd, n, sd, phi):
    e, out = 0.0, []
    for _ in range(n):
        e = phi * e + math.sqrt(1 - phi * phi) * rnd.gauss(0.0, sd)
        out.append(e)
    return out


def main():
    if len(sys.argv) < 2:
        sys.exit(__doc__)
    binary = sys.argv[1]
    here = os.path.dirname(os.path.abspath(__file__))
    out_dir = os.path.abspath(sys.argv[2]) if len(sys.argv) > 2 else here
    os.makedirs(out_dir, exist_ok=True)
    rnd = random.Random(20251201)
    met = make_met(rnd)
    with open(os.path.join(out_dir, "cindervale-season-met.csv"), "w") as f:
        f.write("time,mixing_height [m],wind_speed [m/s],wind_from [deg],air_temperature [degC]\n")
        f.write("\n".join(met) + "\n")
    case = os.path.join(out_dir, "cindervale-season.toml")
    if out_dir != here:
        shutil.copy(os.path.join(here, "cindervale-season.toml"), case)
    with tempfile.TemporaryDirectory() as tmp:
        subprocess.run([binary, "run", case, "-o", tmp, "-q"], check=True)
        with open(os.path.join(tmp, "hourly.csv")) as f:
            hourly = list(csv.DictReader(f))
    n = len(hourly)
    part = lambda i, name: float(hourly[i]["PM25_part_%s [ug m-3]" % name])
    truth = [SCALES["background"] * part(i, "background") + part(i, "initial")
             + SCALES["traffic"] * part(i, "traffic") + SCALES["home_heating"] * part(i, "home_heating")
             for i in range(n)]
    # North: relative and absolute noise, detection limit 3 ug/m3, gaps, CO in ppb.
    noise = ar1(rnd, n, 2.0, 0.6)
    outage = set(range(900, 936))
    rows = []
    for i in range(n):
        v = truth[i] * (1.0 + 0.05 * rnd.gauss(0, 1)) + noise[i]
        co = 1000.0 * float(hourly[i]["CO_hour_mean [ppm]"]) * (1.0 + 0.04 * rnd.gauss(0, 1))
        if i in outage or rnd.random() < 0.02:
            rows.append("%s,," % stamp(i))
            continue
        cell = "<3" if v < 3.0 else "%.1f" % v
        rows.append("%s,%s,%.0f" % (stamp(i), cell, co))
    with open(os.path.join(out_dir, "cindervale-monitor-north.csv"), "w") as f:
        f.write("# INVENTED monitor data for the lidbox evaluation demo: made from cindervale-season.toml's\n"
                "# own run with known scales (background 1.15, traffic 1.30, home_heating 0.75) plus seeded\n"
                "# noise. Not measurements. Time is the start of each hour (UTC); empty cell = missing;\n"
                "# \"<3\" = below the detection limit of 3 ug/m3.\n")
        f.write("time,PM2.5 [ug/m3],CO [ppb]\n" + "\n".join(rows) + "\n")
    # South: noisier, raw small negatives, days 20 to 80.
    noise = ar1(rnd, n + 5 * 24, 3.0, 0.6)
    rows = []
    for k in range(20 * 24, n + 5 * 24):
        if k < n:
            v = truth[k] * (1.0 + 0.08 * rnd.gauss(0, 1)) + noise[k]
            rows.append("%s,%.1f" % (stamp(k), v))
        else:
            rows.append("%s,%.1f" % (stamp(k), 6.0 + noise[k]))
    with open(os.path.join(out_dir, "cindervale-monitor-south.csv"), "w") as f:
        f.write("# INVENTED monitor data for the lidbox evaluation demo (see cindervale-monitor-north.csv);\n"
                "# noisier, small negative values reported as measured, and a period from day 20 that runs\n"
                "# 5 days past the season. Not measurements.\n")
        f.write("time,PM2.5 [ug/m3]\n" + "\n".join(rows) + "\n")
    print("wrote the season met and two monitors in", out_dir, "(%d hours)" % n)


if __name__ == "__main__":
    main()
