#!/usr/bin/env python3
"""Writes met-demo/cindervale-met.csv: INVENTED hourly winter meteorology for Cindervale, an
invented basin city (no real place, no real measurements).

Seven days of hourly values in January 2026: four days of stagnation (shallow nights, weak
winds, a low afternoon lid that sinks from day to day), a fifth day with the lowest lid, then
a windy frontal passage on the evening of day six and a well-ventilated seventh day. Two hours
are left empty on purpose to show the gap rule. Deterministic (fixed seed); stdlib only.

    /usr/bin/python3 met-demo/make_demo_met.py
"""
import math
import os
import random

random.seed(20260112)
START_LOCAL = (2026, 1, 12)  # local standard time, UTC-7 (the case's zone is MST7MDT)
HOURS = 7 * 24

# (night lid [m], afternoon lid [m], mean wind [m/s], wind from [deg]) per day
DAYS = [
    (110, 520, 1.6, 200),   # day 1: inversion setting in
    (80, 420, 1.1, 170),    # day 2
    (65, 360, 0.8, 150),    # day 3
    (55, 330, 0.7, 120),    # day 4
    (40, 300, 0.6, 100),    # day 5: the stagnant core, night lid under the 50 m floor
    (60, 380, 0.9, 210),    # day 6: front arrives in the evening
    (600, 1400, 9.0, 320),  # day 7: post-frontal, windy and deep
]


def lid(day, hour):
    night, noon, _, _ = DAYS[day]
    if hour < 9 or hour >= 19:
        return night
    if hour < 14:  # morning growth
        x = (hour - 9) / 5.0
        return night + (noon - night) * math.sin(0.5 * math.pi * x) ** 1.5
    if hour < 16:
        return noon
    x = (hour - 16) / 3.0  # evening collapse
    return noon + (night - noon) * x


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    rows = []
    for k in range(HOURS):
        day, hour = divmod(k, 24)
        h = lid(day, hour)
        _, _, wind, frm = DAYS[day]
        speed = wind * (1.0 + 0.5 * math.sin((hour - 9) / 24.0 * 2 * math.pi))
        if day == 5 and hour >= 17:  # frontal passage: wind and lid pick up fast
            ramp = min(1.0, (hour - 16) / 4.0)
            speed = speed + ramp * 8.0
            frm = 210 + ramp * 110
            h = h + ramp * 700
        speed = max(0.0, speed * random.uniform(0.75, 1.25))
        if day in (3, 4) and hour in (2, 3, 4, 5):
            speed = random.uniform(0.1, 0.4)  # calm small hours under the inversion
        frm = (frm + random.uniform(-25, 25)) % 360
        h = h * random.uniform(0.92, 1.08)
        t = -9.0 + 5.0 * math.sin((hour - 9) / 24.0 * 2 * math.pi) + (8.0 if day == 6 else 0.0)
        ut = k + 7  # local standard time UTC-7
        d, hh = divmod(ut, 24)
        stamp = "2026-01-%02dT%02d:00:00Z" % (START_LOCAL[2] + d, hh)
        if k in (61, 62):  # a two-hour gap in the record
            rows.append("%s,,,,%.1f" % (stamp, t))
            continue
        rows.append("%s,%.0f,%.2f,%.0f,%.1f" % (stamp, h, speed, frm, t))
    path = os.path.join(here, "cindervale-met.csv")
    with open(path, "w") as f:
        f.write("time,mixing_height [m],wind_speed [m/s],wind_from [deg],air_temperature [degC]\n")
        f.write("\n".join(rows) + "\n")
    print("wrote", path, len(rows), "rows")


if __name__ == "__main__":
    main()
