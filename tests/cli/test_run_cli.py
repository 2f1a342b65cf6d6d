#!/usr/bin/env python3
"""Runs the real lidbox binary: the invented demo, and bad inputs.

For the demo: exit code 0, the summary on stdout, all four outputs written, 168 hourly rows,
the parts adding up to the total in every row, and the budget closing.
For each bad input: exit code 2, the message on stderr asserted whole, and no output left.

ctest runs it as: /usr/bin/python3 test_run_cli.py <lidbox binary> <source dir>
"""
import csv
import os
import shutil
import subprocess
import sys
import tempfile

BINARY = os.path.abspath(sys.argv[1])
SOURCE = os.path.abspath(sys.argv[2])
DEMO_CASE = os.path.join(SOURCE, "met-demo", "cindervale.toml")
DEMO_MET = os.path.join(SOURCE, "met-demo", "cindervale-met.csv")
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)
    else:
        print("ok:", what)


def run(args, cwd):
    return subprocess.run([BINARY] + args, cwd=cwd, capture_output=True, text=True)


def test_demo():
    with tempfile.TemporaryDirectory() as d:
        p = run(["run", DEMO_CASE, "-o", "out"], d)
        check(p.returncode == 0, "demo exits 0 (stderr: %s)" % p.stderr.strip())
        check("CAUTION: Screening estimate from a single well-mixed box model" in p.stdout,
              "summary carries the caution")
        check("Period   2026-01-12T07:00:00Z to 2026-01-19T07:00:00Z (168 hours)" in p.stdout,
              "summary states the period")
        check("2 h gap-filled (linear interpolation)" in p.stdout, "summary counts the filled hours")
        for name in ("hourly.csv", "budget.csv", "summary.txt", "chart.svg", "limits.csv", "daily.csv",
                     "periods.csv", "episodes.csv", "aqi.csv", "aqhi.csv", "report.md", "report.json"):
            check(os.path.isfile(os.path.join(d, "out", name)), "demo writes " + name)
        leftovers = [f for f in os.listdir(os.path.join(d, "out")) if f.startswith(".")]
        check(leftovers == [], "no temporary files left behind")
        with open(os.path.join(d, "out", "hourly.csv")) as f:
            rows = list(csv.DictReader(f))
        check(len(rows) == 168, "168 hourly rows")
        worst = 0.0
        for row in rows:
            for pol, unit in (("CO", "ppm"), ("PM25", "ug m-3")):
                total = float(row["%s_hour_mean [%s]" % (pol, unit)])
                parts = sum(float(row["%s_part_%s [%s]" % (pol, part, unit)] or 0)
                            for part in ("background", "initial", "traffic", "home_heating"))
                worst = max(worst, abs(parts - total) / total)
        # The table prints 7 significant digits: parts and total agree to that.
        check(worst < 2e-6, "parts add up to the total in every row (worst %.1e)" % worst)
        check(sum(int(r["met_filled"]) for r in rows) == 2, "two filled hours flagged")
        check(any(int(r["calm_floor_applied"]) for r in rows), "calm-floor hours flagged")
        # The standards' daily means are the LST-day means of the hourly table (40 CFR 50 App. N
        # 1(c): midnight to midnight local standard time; the case's zone is UTC-7 in winter).
        with open(os.path.join(d, "out", "daily.csv")) as f:
            daily = [r for r in csv.DictReader(f) if r["pollutant"] == "PM2.5" and r["statistic"] == "daily_mean"]
        by_day = {}
        for row in rows:
            day = row["period_start_local"][:10]  # civil = standard time in January
            by_day.setdefault(day, []).append(float(row["PM25_hour_mean [ug m-3]"]))
        worst_day = max(abs(float(r["value"]) - sum(by_day[r["date_lst"]]) / len(by_day[r["date_lst"]]))
                        for r in daily if r["complete"] == "true")
        check(len(daily) == 7 and worst_day < 1e-5,
              "daily PM2.5 means recomputed from hourly.csv (%d days, worst %.1e)" % (len(daily), worst_day))
        # The invented advisory (met-demo/cindervale-advisories.toml): three or more consecutive
        # hours above 45 ug/m3; recomputed from hourly.csv.
        runs, start = [], None
        values = [float(r["PM25_hour_mean [ug m-3]"]) for r in rows] + [0.0]
        for i, v in enumerate(values):
            if v > 45.0 and start is None:
                start = i
            if v <= 45.0 and start is not None:
                if i - start >= 3:
                    runs.append((rows[start]["period_start_utc"], i - start))
                start = None
        with open(os.path.join(d, "out", "episodes.csv")) as f:
            episodes = [(r["start_utc"], int(r["values_above"])) for r in csv.DictReader(f)
                        if r["rule_id"] == "PM2.5-advisory"]
        check(len(runs) > 0 and episodes == runs,
              "advisory episodes %s recomputed from hourly.csv %s" % (episodes, runs))
        with open(os.path.join(d, "out", "report.md")) as f:
            md = f.read()
        check(md.count("Screening estimate from a single well-mixed box model") >= 1, "report.md carries the caution")
        check("40 CFR Part 50" in md and "Directive 2008/50/EC" in md, "report.md names the legal sources")
        with open(os.path.join(d, "out", "budget.csv")) as f:
            budget = list(csv.DictReader(f))
        check(len(budget) == 2 * 168, "budget rows per hour and pollutant")
        mass = max(float(r["mixed_layer_mass [g]"]) + float(r["residual_layer_mass [g]"]) for r in budget)
        closure = max(abs(float(r["cumulative_closure [g]"])) for r in budget)
        check(closure < 1e-10 * mass * 168, "budget closes to rounding (%.1e g of %.1e g)" % (closure, mass))
        # The residual layer carries yesterday's air into the morning: some morning hour takes
        # more CO from the residual layer than the city emits in it.
        carried = [r for r in budget if r["pollutant"] == "CO" and
                   float(r["entrained_from_residual [g/h]"]) > float(r["emitted [g/h]"])]
        check(len(carried) > 0, "residual layer re-entrained in the morning (%d hours)" % len(carried))


def test_netcdf_demo():
    """The same invented met as CF-NetCDF gives the same hourly table; the run's own NetCDF output
    opens in xarray with the values and decoded times of the CSV table."""
    with tempfile.TemporaryDirectory() as d:
        a = run(["run", "-q", DEMO_CASE, "-o", "csv"], d)
        b = run(["run", "-q", os.path.join(SOURCE, "met-demo", "cindervale-netcdf.toml"), "-o", "nc"], d)
        check(a.returncode == 0 and b.returncode == 0, "CSV and NetCDF demos exit 0 (%s)" % b.stderr.strip())
        with open(os.path.join(d, "csv", "hourly.csv")) as f1, open(os.path.join(d, "nc", "hourly.csv")) as f2:
            check(f1.read() == f2.read(), "NetCDF met gives a byte-identical hourly table")
        for name in ("hourly.nc", "budget.nc", "daily.nc"):
            check(os.path.isfile(os.path.join(d, "nc", name)), "[output] netcdf = true writes " + name)
        try:
            import numpy as np
            import xarray as xr
        except ImportError:
            print("skip: xarray not available under", sys.executable)
            return
        with open(os.path.join(d, "csv", "hourly.csv")) as f:
            rows = list(csv.DictReader(f))
        ds = xr.open_dataset(os.path.join(d, "nc", "hourly.nc"))
        co = ds["CO"].values
        want = np.array([float(r["CO_hour_mean [ppm]"]) for r in rows])
        check(np.max(np.abs(co - want) / want) < 1e-6, "xarray reads the CO hour means of hourly.csv")
        t0 = np.datetime_as_string(ds["time"].values[0], unit="s") + "Z"
        check(t0 == rows[0]["period_start_utc"], "xarray decodes the first hour as %s (%s)" % (rows[0]["period_start_utc"], t0))
        check(ds.attrs.get("featureType") == "timeSeries", "featureType timeSeries")
        # rolling_8h_min6.nc against pandas rolling(8, min_periods=6) on the hourly table: pandas
        # labels a window at its last row, lidbox's NetCDF at its start (time_bnds hold both).
        try:
            import pandas as pd
        except ImportError:
            print("skip: pandas not available")
            return
        r8 = xr.open_dataset(os.path.join(d, "nc", "rolling_8h_min6.nc"))
        # The last 7 windows run past the end of the run (lidbox keeps those with 6 or 7 hours;
        # pandas has no rows there), so the comparison covers the 161 windows inside the run.
        inside = len(want) - 7
        ref = pd.Series(want).rolling(8, min_periods=6).mean().shift(-7).to_numpy()[:inside]
        got = r8["CO_mean_8h_min6"].values[:inside]
        check(not np.isnan(ref).any() and np.max(np.abs(got - ref) / ref) < 1e-6,
              "rolling_8h_min6.nc equals pandas rolling(8, min_periods=6) on hourly.csv (%d windows)" % inside)


def test_rolling_same_length():
    """Two running means of one length with different minimums ("8" and "8:8") get their own
    files and variables, named by window and minimum, in CSV and NetCDF (issue 13 item 5)."""
    with tempfile.TemporaryDirectory() as d:
        bad_case(d, ('aqi_table = "2024"', 'aqi_table = "2024"\nrolling = ["8", "8:8"]'))
        shutil.copy(os.path.join(SOURCE, "met-demo", "cindervale-advisories.toml"), d)
        p = run(["run", "-q", "case.toml", "-o", "out", "--netcdf"], d)
        check(p.returncode == 0, "rolling 8 and 8:8 with --netcdf exit 0 (stderr: %s)" % p.stderr.strip())
        out = os.path.join(d, "out")
        for name in ("rolling_8h_min6.csv", "rolling_8h_min8.csv", "rolling_8h_min6.nc", "rolling_8h_min8.nc"):
            check(os.path.isfile(os.path.join(out, name)), "rolling 8 and 8:8 write " + name)
        if p.returncode != 0:
            return
        # Each CSV holds its own minimum only: 8:8 is the default 6 of 8 for "8" (0.75 * 8).
        for m in (6, 8):
            with open(os.path.join(out, "rolling_8h_min%d.csv" % m)) as f:
                rows = list(csv.DictReader(f))
            check(rows and all(r["min_valid_hours"] == str(m) for r in rows),
                  "rolling_8h_min%d.csv holds only windows needing %d hours (%d rows)" % (m, m, len(rows)))
        try:
            import netCDF4
        except ImportError:
            print("skip: netCDF4 not available under", sys.executable)
            return
        for m in (6, 8):
            with netCDF4.Dataset(os.path.join(out, "rolling_8h_min%d.nc" % m)) as ds:
                check("CO_mean_8h_min%d" % m in ds.variables,
                      "rolling_8h_min%d.nc names CO_mean_8h_min%d (has %s)" % (m, m, sorted(ds.variables)))


def bad_case(tmp, case_edit=None, met_lines=None):
    with open(DEMO_CASE) as f:
        text = f.read()
    if case_edit:
        text = text.replace(*case_edit)
    with open(DEMO_MET) as f:
        lines = f.read().splitlines()
    if met_lines is not None:
        lines = met_lines(lines)
    with open(os.path.join(tmp, "case.toml"), "w") as f:
        f.write(text)
    with open(os.path.join(tmp, "cindervale-met.csv"), "w") as f:
        f.write("\n".join(lines) + "\n")


def expect_error(name, message, case_edit=None, met_lines=None, args=None, copy=()):
    with tempfile.TemporaryDirectory() as d:
        bad_case(d, case_edit, met_lines)
        for f in copy:
            shutil.copy(os.path.join(SOURCE, "met-demo", f), d)
        p = run(args or ["run", "case.toml", "-o", "out"], d)
        check(p.returncode == 2, name + ": exit code 2 (got %d)" % p.returncode)
        got = p.stderr.strip()
        want = "lidbox: error: " + message
        check(got == want, name + ": message asserted whole" +
              ("" if got == want else "\n   got:  %s\n   want: %s" % (got, want)))
        check(not os.path.exists(os.path.join(d, "out")), name + ": no output written")


def replace_field(lines, row, col, value):
    cells = lines[row].split(",")
    cells[col] = value
    out = list(lines)
    out[row] = ",".join(cells)
    return out


def test_bad_inputs():
    expect_error("unknown key",
                 'case.toml:10: [airshed]: unknown key "x_sid"; expected one of x_side, y_side, '
                 'x_side_bearing (did you mean "x_side"?)',
                 case_edit=('x_side = "14 km"', 'x_sid = "14 km"'))
    expect_error("missing value",
                 'case.toml:27: [pollutants.CO]: no "background"; expected the concentration of the '
                 'air arriving upwind, such as background = "0.1 ppm"',
                 case_edit=('background = "0.15 ppm"', ""))
    expect_error("number without a unit",
                 'case.toml:11: [airshed] y_side: a number without a unit; expected a length with '
                 'its unit in quotes, such as "500 m"',
                 case_edit=('y_side = "8 km"', "y_side = 8000"))
    expect_error("zone",
                 'case.toml:7: (top level) time_zone: time zone "Mountain" has no valid offset '
                 "after its standard-time name; expected a fixed offset such as \"+01:00\" or "
                 '"UTC", an IANA zone name such as "Europe/Paris", or a POSIX TZ string such as "CET-1CEST,M3.5.0,M10.5.0/3" (POSIX sign: '
                 "hours WEST of Greenwich are positive)",
                 case_edit=('time_zone = "MST7MDT,M3.2.0,M11.1.0"', 'time_zone = "Mountain"'))
    expect_error("decreasing time",
                 "cindervale-met.csv:21: time 2026-01-13T00:00:00Z is before the previous row's "
                 "2026-01-13T01:00:00Z; expected strictly increasing hourly times",
                 met_lines=lambda L: L[:20] + [L[18]] + L[20:])
    expect_error("duplicate time",
                 "cindervale-met.csv:6: time 2026-01-12T10:00:00Z repeats the previous row; "
                 "expected strictly increasing hourly times",
                 met_lines=lambda L: L[:5] + [L[4]] + L[6:])
    expect_error("not a number",
                 'cindervale-met.csv:11: column "mixing_height [m]": "abc" is not a number; '
                 "expected a decimal number, or an empty cell for a missing value",
                 met_lines=lambda L: replace_field(L, 10, 1, "abc"))
    expect_error("long gap",
                 "cindervale-met.csv:11: a gap of 4 hours (2026-01-12T16:00:00Z to "
                 "2026-01-12T19:00:00Z); expected gaps of at most 3 hours (set [met] max_gap_hours "
                 "to fill longer gaps, or split the run)",
                 met_lines=lambda L: L[:10] + L[14:])
    expect_error("unit",
                 'cindervale-met.csv:1: column "wind_speed [kg]": unit "kg" cannot be converted '
                 'to "m/s"; expected a unit of speed convertible to "m/s"',
                 met_lines=lambda L: [L[0].replace("wind_speed [m/s]", "wind_speed [kg]")] + L[1:])
    expect_error("missing column",
                 "cindervale-met.csv:1: no complete wind (found: time, mixing_height [m], "
                 'wind_speed [m/s], air_temperature [degC]); expected columns "wind_speed [unit]" '
                 'and "wind_from [deg]", or "eastward_wind [unit]" and "northward_wind [unit]"',
                 met_lines=lambda L: [",".join(c for i, c in enumerate(l.split(",")) if i != 3) for l in L])
    expect_error("negative mixing height",
                 'cindervale-met.csv:6: column "mixing_height [m]": mixing height -20 m is outside '
                 "the plausible range; expected a mixing height from 0 to 10000 m (common practice, "
                 "no source; change it in [plausibility] mixing_height)",
                 met_lines=lambda L: replace_field(L, 5, 1, "-20"))
    expect_error("direction",
                 'cindervale-met.csv:6: column "wind_from [deg]": wind direction 400 deg is outside '
                 "the plausible range; expected a wind direction from 0 to 360 deg (WMO-No. 8 "
                 "convention, 0 to 360 degrees clockwise from north; change it in [plausibility] "
                 "wind_from)",
                 met_lines=lambda L: replace_field(L, 5, 3, "400"))
    expect_error("NetCDF variable",
                 'cindervale-met-point.nc: variable "blh" (mapped to the mixing height) not found '
                 "among the variables present: time, time_bnds, lat, lon, station_name, "
                 "mixing_height, wind_speed, wind_from_direction, air_temperature; expected one of "
                 "the variables present",
                 case_edit=('file = "cindervale-met.csv"',
                            'file = "cindervale-met-point.nc"\nvariables = { mixing_height = "blh" }'),
                 copy=["cindervale-met-point.nc"])
    expect_error("missing case file", "nothere.toml: the file cannot be opened; expected a readable file",
                 args=["run", "nothere.toml", "-o", "out"])


def test_usage():
    with tempfile.TemporaryDirectory() as d:
        p = run([], d)
        check(p.returncode == 2, "no subcommand: exit code 2")
        p = run(["--version"], d)
        check(p.returncode == 0 and p.stdout.strip().startswith("lidbox "), "--version")
        p = run(["--help"], d)
        check(p.returncode == 0 and "Screening estimate" in p.stdout, "--help carries the caution")
        p = run(["run", "a.toml", "--bogus"], d)
        check(p.returncode == 2, "unknown option: exit code 2")


if __name__ == "__main__":
    test_demo()
    test_netcdf_demo()
    test_rolling_same_length()
    test_bad_inputs()
    test_usage()
    print("%d failed" % len(failures))
    sys.exit(1 if failures else 0)
