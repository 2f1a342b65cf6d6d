#!/usr/bin/env python3
"""Writes an INVENTED long case: a demo-like basin city (2 pollutants, 2 sectors, standards on)
with `years` years of invented hourly met, for the output checksum test and the whole-run
benchmark. Nothing here describes a real place or real measurements.

The met is a smooth annual and daily cycle with pseudo-random weather from a fixed linear
congruential generator (Knuth's MMIX constants), so the file is the same on every machine and
Python version. Stdlib only.

    /usr/bin/python3 tests/bench/long_case.py <folder> <years> [--netcdf]
"""
import math
import os
import sys

START_UTC_DAY = 20454  # 2026-01-01 as days since 1970-01-01


class Lcg:
    """x <- a x + c mod 2^64 (Knuth, MMIX); uniform() in [0, 1) from the top 53 bits."""

    def __init__(self, seed):
        self.x = seed

    def uniform(self):
        self.x = (6364136223846793005 * self.x + 1442695040888963407) % (1 << 64)
        return (self.x >> 11) / float(1 << 53)


def stamp(hour_index):
    days, hour = divmod(hour_index, 24)
    # Civil date from days since 1970-01-01 (proleptic Gregorian; Hinnant's days_from_civil
    # inverse, common practice).
    z = START_UTC_DAY + days + 719468
    era = z // 146097
    doe = z - era * 146097
    yoe = (doe - doe // 1460 + doe // 36524 - doe // 146096) // 365
    y = yoe + era * 400
    doy = doe - (365 * yoe + yoe // 4 - yoe // 100)
    mp = (5 * doy + 2) // 153
    d = doy - (153 * mp + 2) // 5 + 1
    m = mp + 3 if mp < 10 else mp - 9
    if m <= 2:
        y += 1
    return "%04d-%02d-%02dT%02d:00:00Z" % (y, m, d, hour)


def met_rows(hours):
    rng = Lcg(20260101)
    weather = 0.0  # a slow random walk: stagnant (negative) to windy (positive) spells
    for k in range(hours):
        local_hour = (k - 7) % 24  # the case's zone is about UTC-7
        season = math.cos(2.0 * math.pi * (k / 24.0 - 15.0) / 365.25)  # +1 mid-January
        weather = 0.97 * weather + 0.06 * (rng.uniform() - 0.5)
        day_shape = max(0.0, math.sin(math.pi * (local_hour - 8) / 11.0)) if 8 <= local_hour <= 19 else 0.0
        night = 90.0 + 60.0 * (1.0 - season) + 400.0 * max(0.0, weather)
        noon = 450.0 + 700.0 * (1.0 - season) + 900.0 * max(0.0, weather)
        lid = night + (noon - night) * day_shape
        lid *= 0.9 + 0.2 * rng.uniform()
        speed = (1.2 + 0.8 * (1.0 - season) + 12.0 * max(0.0, weather)) * (0.7 + 0.6 * rng.uniform())
        speed *= 1.0 + 0.4 * day_shape
        frm = (200.0 + 140.0 * weather + 60.0 * (rng.uniform() - 0.5)) % 360.0
        temp = -5.0 - 10.0 * season + 6.0 * day_shape + 2.0 * (rng.uniform() - 0.5)
        yield "%s,%.0f,%.2f,%.0f,%.1f" % (stamp(k), lid, speed, frm, temp)


CASE = """# INVENTED scenario for tests and benchmarks: a demo-like basin city over {years} years of
# invented met. Nothing here describes a real place or real measurements.
name = "invented-{years}y"
title = "Invented basin city, {years} years of invented met"
invented = true
time_zone = "MST7MDT,M3.2.0,M11.1.0"

[airshed]
x_side = "14 km"
y_side = "8 km"
x_side_bearing = "75 deg"

[met]
file = "met-{years}y.csv"
reading = "hour_average"
hour_label = "period_start"
max_gap_hours = 3

[model]
residual_layer = true
spin_up = "repeat_first_day"
spin_up_tolerance = 0.001

[pollutants.CO]
unit = "ppm"
molar_mass = "28.01 g/mol"
reference_conditions = "us"
lifetime = "60 day"
background = "0.15 ppm"
free_troposphere = "0.10 ppm"

[pollutants.PM25]
unit = "ug/m3"
lifetime = "5 day"
deposition_velocity = "0.1 cm/s"
free_troposphere = "2 ug/m3"
background = {{ by_wind_from = [
  {{ from = "90 deg", to = "270 deg", value = "8 ug/m3" }},
  {{ from = "270 deg", to = "90 deg", value = "3 ug/m3" }},
] }}

[sectors.traffic]
emissions = {{ CO = "2.4 t/h", PM25 = "12 kg/h" }}
hour_of_day = [0.3, 0.2, 0.2, 0.2, 0.3, 0.7, 1.5, 2.2, 2.0, 1.3, 1.1, 1.1,
               1.2, 1.2, 1.3, 1.6, 2.0, 2.2, 1.6, 1.0, 0.8, 0.6, 0.5, 0.4]
day_of_week = [1.05, 1.05, 1.05, 1.05, 1.1, 0.85, 0.75]

[sectors.home_heating]
emissions = {{ CO = "0.9 t/h", PM25 = "70 kg/h" }}
hour_of_day = [0.8, 0.5, 0.4, 0.4, 0.4, 0.6, 1.3, 1.5, 1.0, 0.6, 0.5, 0.5,
               0.5, 0.5, 0.6, 0.8, 1.2, 1.9, 2.4, 2.5, 2.3, 1.9, 1.5, 1.1]

[standards]
rule_sets = ["us-naaqs", "eu-2008-50", "who-2021"]
aqi_table = "2024"
{output}"""


def write_case(folder, years, netcdf=False):
    """Writes <folder>/invented-<years>y.toml and its met; returns the case path."""
    os.makedirs(folder, exist_ok=True)
    hours = int(round(years * 8766))  # 365.25 days a year
    met = os.path.join(folder, "met-%sy.csv" % years)
    with open(met, "w") as f:
        f.write("time,mixing_height [m],wind_speed [m/s],wind_from [deg],air_temperature [degC]\n")
        f.write("\n".join(met_rows(hours)))
        f.write("\n")
    case = os.path.join(folder, "invented-%sy.toml" % years)
    with open(case, "w") as f:
        f.write(CASE.format(years=years, output="\n[output]\nnetcdf = true\n" if netcdf else ""))
    return case


if __name__ == "__main__":
    print(write_case(sys.argv[1], int(sys.argv[2]), "--netcdf" in sys.argv[3:]))
