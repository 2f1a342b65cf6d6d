#!/usr/bin/env python3
"""Writes met-demo/forecast/: an INVENTED hourly met forecast ensemble for Cindervale, an invented
basin city (no real place, no real forecast centre, no real measurements).

Issued 2026-02-09 14:00 local standard time (UTC-7), valid from local midnight of 9 February for
five days (120 hours): a control run (control.csv) and 12 perturbed members (member-01.csv ...
member-12.csv). A winter stagnation deepens for three days; the members disagree on how shallow
the nights get and on when a front ends it (early on day 4 in some members, late on day 5 in
others). Deterministic (fixed seed); stdlib only.

    /usr/bin/python3 met-demo/make_demo_forecast.py
"""
import math
import os
import random

HOURS = 5 * 24
MEMBERS = 12
# (night lid [m], afternoon lid [m], mean wind [m/s], wind from [deg]) per day of the control
DAYS = [
    (120, 560, 1.7, 200),
    (80, 430, 1.1, 170),
    (55, 340, 0.8, 140),
    (45, 310, 0.7, 120),
    (70, 420, 1.0, 200),
]
FRONT_CONTROL_H = 4 * 24 + 6  # hours after the start (local 06:00 on 13 Feb)


def lid(night, noon, hour):
    if hour < 9 or hour >= 19:
        return night
    if hour < 14:
        x = (hour - 9) / 5.0
        return night + (noon - night) * math.sin(0.5 * math.pi * x) ** 1.5
    if hour < 16:
        return noon
    x = (hour - 16) / 3.0
    return noon + (night - noon) * x


def series(rng, lid_factor, wind_factor, front_h):
    rows = []
    for k in range(HOURS):
        day, hour = divmod(k, 24)
        night, noon, wind, frm = DAYS[day]
        h = lid(night * lid_factor, noon * lid_factor, hour)
        speed = wind * wind_factor * (1.0 + 0.5 * math.sin((hour - 9) / 24.0 * 2 * math.pi))
        if k >= front_h:  # the front: wind and lid pick up within four hours
            ramp = min(1.0, (k - front_h + 1) / 4.0)
            speed += ramp * 8.0
            frm = frm + ramp * 120
            h += ramp * 800
        speed = max(0.05, speed * rng.uniform(0.85, 1.15))
        frm = (frm + rng.uniform(-20, 20)) % 360
        h = max(30.0, h * rng.uniform(0.94, 1.06))
        ut = k + 7  # local standard time UTC-7
        d, hh = divmod(ut, 24)
        stamp = "2026-02-%02dT%02d:00:00Z" % (9 + d, hh)
        rows.append("%s,%.0f,%.2f,%.0f" % (stamp, h, speed, frm))
    return rows


def write(path, rows):
    with open(path, "w") as f:
        f.write("time,mixing_height [m],wind_speed [m/s],wind_from [deg]\n")
        f.write("\n".join(rows) + "\n")


def main():
    out = os.path.join(os.path.dirname(os.path.abspath(__file__)), "forecast")
    os.makedirs(out, exist_ok=True)
    write(os.path.join(out, "control.csv"), series(random.Random(20260209), 1.0, 1.0, FRONT_CONTROL_H))
    rng = random.Random(902)
    for m in range(1, MEMBERS + 1):
        lid_factor = rng.uniform(0.8, 1.25)
        wind_factor = rng.uniform(0.75, 1.3)
        front_h = FRONT_CONTROL_H + rng.randint(-14, 16)
        write(os.path.join(out, "member-%02d.csv" % m), series(random.Random(1000 + m), lid_factor, wind_factor, front_h))
    print("wrote", out, "control and", MEMBERS, "members of", HOURS, "hours")


if __name__ == "__main__":
    main()
