"""A table of bad inputs, run through the real binary: every kind must give exit code 2, a
message naming the place (file and line, or variable, or option) and what was expected, and no
file in the output folder. Checked here, case by case (issue 13, "how we will know it works").

The inputs are invented and written by this script; the expected words are lidbox's own
(common practice, no source). NetCDF inputs are made with Debian's python3-netCDF4; without it
those kinds are skipped and counted.

Usage (ctest): /usr/bin/python3 test_bad_inputs.py <lidbox binary> <source dir>
"""
import concurrent.futures
import os
import subprocess
import sys
import tempfile

BINARY, SOURCE = sys.argv[1], sys.argv[2]

try:
    import netCDF4  # noqa: F401  (Debian: python3-netcdf4)
    import numpy as np
    HAVE_NETCDF = True
except ImportError:
    HAVE_NETCDF = False

MET_HEADER = "time,mixing_height [m],wind_speed [m/s],wind_from [deg]"


def met_rows(n=30, start_hour=0):
    """n hourly rows from 2026-01-12T00:00Z, invented values."""
    rows = []
    for h in range(start_hour, start_hour + n):
        rows.append("2026-01-%02dT%02d:00:00Z,%d,%.1f,%d" % (12 + h // 24, h % 24, 300 + 10 * (h % 5),
                                                             2.0 + 0.1 * (h % 3), 200))
    return rows


def met_text(rows=None, header=MET_HEADER):
    return header + "\n" + "\n".join(met_rows() if rows is None else rows) + "\n"


def met_with_row(i, row):
    rows = met_rows()
    rows[i] = row
    return met_text(rows)


CASE = """# invented case for the bad-input table
name = "bad-input"
title = "invented"
invented = true
time_zone = "UTC"

[airshed]
x_side = "10 km"
y_side = "8 km"

[met]
file = "met.csv"
reading = "hour_average"
hour_label = "period_start"

[model]
residual_layer = true
spin_up = "none"

[pollutants.CO]
unit = "ppm"
molar_mass = "28.01 g/mol"
reference_conditions = "us"
lifetime = "60 day"
deposition_velocity = "0 cm/s"
background = "0.15 ppm"
free_troposphere = "0.10 ppm"

[sectors.traffic]
emissions = { CO = "2.4 t/h" }
"""


def case_with(old, new):
    assert old in CASE, old
    return CASE.replace(old, new, 1)


RULES = """[rule_set]
id = "local-test"
name = "invented local rules"
legal_source = "invented for a test"
legal_date = "2026-01-01"
reference_temperature_K = 298.15
reference_pressure_Pa = 101325.0

[[alert]]
id = "CO-test"
pollutant = "CO"
level_name = "invented"
averaging = "1-hour"
statistic = "hourly_value"
threshold = 1.2
unit = "ppm"
persistence = 1
legal_source = "invented"
checked = "PRAC: invented"
"""


def obs_text(values=None, header="time,PM2.5 [ug/m3]"):
    values = values or ["12.0"] * 30
    rows = ["2026-01-%02dT%02d:00Z,%s" % (12 + h // 24, h % 24, v) for h, v in enumerate(values)]
    return header + "\n" + "\n".join(rows) + "\n"


def obs_with(i, value):
    values = ["12.0"] * 30
    values[i] = value
    return obs_text(values)


# Each kind: (name, files {name: text or bytes or a callable(path)}, command words with "OUT" for
# the output folder, [words the message must hold: the place, then the expectation]).
KINDS = []


def kind(name, files, args, words):
    KINDS.append((name, files, args, words))


def run_kind(met, words, case=CASE, extra=None):
    files = {"case.toml": case, "met.csv": met}
    files.update(extra or {})
    return files, ["run", "case.toml", "-o", "OUT"], words


# --- met CSV -----------------------------------------------------------------------------------
kind("met: empty file", *run_kind("", ["met.csv", "the file is empty", "expected a header row"]))
kind("met: no time column", *run_kind(met_text(header=MET_HEADER.replace("time,", "when,")),
                                      ["met.csv:1", "no \"time\" column", "expected a column named time"]))
kind("met: semicolons", *run_kind(met_text(header=MET_HEADER.replace(",", ";")),
                                  ["met.csv:1", "separator must be a comma", "expected a column"]))
kind("met: no mixing height", *run_kind(
    met_text(header="time,height [m],wind_speed [m/s],wind_from [deg]"),
    ["met.csv:1", "no mixing height column", "expected a column \"mixing_height [unit]\""]))
kind("met: wind half given", *run_kind(
    "time,mixing_height [m],wind_speed [m/s]\n2026-01-12T00:00Z,100,1\n",
    ["met.csv:1", "no complete wind", "expected columns"]))
kind("met: both wind forms", *run_kind(
    "time,mixing_height [m],wind_speed [m/s],wind_from [deg],eastward_wind [m/s],northward_wind [m/s]\n",
    ["met.csv:1", "both speed/direction and u/v", "expected either"]))
kind("met: column twice", *run_kind(met_text(header=MET_HEADER + ",wind_from [deg]"),
                                    ["met.csv:1", "a second column named \"wind_from\"", "expected each column name once"]))
kind("met: unknown unit", *run_kind(met_text(header=MET_HEADER.replace("[m]", "[kg]")),
                                    ["met.csv:1", "mixing_height [kg]", "expected"]))
kind("met: open quote", *run_kind(met_with_row(1, "2026-01-12T01:00:00Z,\"300,2,200"),
                                  ["met.csv:3", "is not closed", "expected a closing quote"]))
kind("met: field count", *run_kind(met_with_row(1, "2026-01-12T01:00:00Z,300,2"),
                                   ["met.csv:3", "3 fields", "expected 4 fields as in the header"]))
kind("met: not a number", *run_kind(met_with_row(1, "2026-01-12T01:00:00Z,3OO,2,200"),
                                    ["met.csv:3", "\"3OO\" is not a number", "expected a decimal number"]))
kind("met: bad time", *run_kind(met_with_row(1, "2026-01-12 1h,300,2,200"),
                                ["met.csv:3", "is not of the form", "expected an ISO 8601 time"]))
kind("met: impossible date", *run_kind(met_with_row(1, "2026-02-30T01:00:00Z,300,2,200"),
                                       ["met.csv:3", "is not a calendar date", "expected an ISO 8601 time"]))
kind("met: repeated time", *run_kind(met_with_row(1, "2026-01-12T00:00:00Z,300,2,200"),
                                     ["met.csv:3", "repeats the previous row", "expected strictly increasing"]))
kind("met: time goes back", *run_kind(met_with_row(2, "2026-01-12T00:30:00Z,300,2,200"),
                                      ["met.csv:4", "is before the previous row", "expected strictly increasing"]))
kind("met: off the hour grid", *run_kind(met_with_row(2, "2026-01-12T02:30:00Z,300,2,200"),
                                         ["met.csv:4", "off the hourly grid", "expected times a whole number of hours apart"]))
kind("met: long gap", *run_kind(met_text(met_rows()[:5] + met_rows()[9:]),
                                ["met.csv:7", "a gap of 4 hours", "expected gaps of at most 3 hours"]))
kind("met: year 9999 after 2026", *run_kind(
    met_text(met_rows()[:2] + ["9999-01-12T00:00:00Z,300,2,200"]),
    ["met.csv:4", "a gap of", "expected gaps of at most 3 hours"]))
kind("met: gap at the start", *run_kind(met_with_row(0, "2026-01-12T00:00:00Z,,2,200"),
                                        ["met.csv", "at the start of the series", "expected values at the first and last hour"]))
kind("met: one row", *run_kind(met_text(met_rows()[:1]),
                               ["met.csv", "1 data rows", "expected at least two hourly rows"]))
kind("met: negative mixing height", *run_kind(met_with_row(3, "2026-01-12T03:00:00Z,-5,2,200"),
                                              ["met.csv:5", "mixing height -5 m", "expected a mixing height from 0 to 10000 m"]))
kind("met: mixing height 1e300", *run_kind(met_with_row(3, "2026-01-12T03:00:00Z,1e300,2,200"),
                                           ["met.csv:5", "mixing height 1e300 m is outside the plausible range",
                                            "expected a mixing height from 0 to 10000 m"]))
kind("met: wind of 99999 m/s", *run_kind(met_with_row(3, "2026-01-12T03:00:00Z,300,99999,200"),
                                         ["met.csv:5", "wind speed 99999 m/s is outside the plausible range",
                                          "expected a wind speed from 0 to 115 m/s"]))
kind("met: negative wind speed", *run_kind(met_with_row(3, "2026-01-12T03:00:00Z,300,-1,200"),
                                           ["met.csv:5", "wind speed -1 m/s", "expected a wind speed from 0 to 115 m/s"]))
kind("met: direction 400", *run_kind(met_with_row(3, "2026-01-12T03:00:00Z,300,2,400"),
                                     ["met.csv:5", "wind direction 400 deg", "expected a wind direction from 0 to 360 deg"]))
kind("met: temperature of -300 degC", *run_kind(
    MET_HEADER + ",air_temperature [degC]\n" + "\n".join(
        r + (",-300" if i == 3 else ",-5") for i, r in enumerate(met_rows())) + "\n",
    ["met.csv:5", "air temperature -300 degC", "expected an air temperature from 173.15 to 343.15 K"]))
kind("met: CR-only lines", *run_kind(met_text().replace("\n", "\r"),
                                     ["met.csv:1", "carriage return alone", "expected lines ending in LF or CR LF"]))
kind("met: NUL in the header", *run_kind(met_text(header="ti\0me" + MET_HEADER[4:]),
                                         ["met.csv:1", "ti\\0me", "expected a column named time"]))
kind("met: path is a folder", *run_kind(None, ["met.csv", "the path is a folder", "expected a file"]))
kind("met: file missing", {"case.toml": CASE}, ["run", "case.toml", "-o", "OUT"],
     ["met.csv", "cannot be opened", "expected a readable file"])
kind("met: a 1 MB line", *run_kind("x" * 1000000 + "\n", ["met.csv:1", "a first line of 1000000 bytes",
                                                          "\u2026", "expected a header row"]))

kind("met: 500 hPa wind of 999 m/s", *run_kind(
    MET_HEADER + ",wind_500hPa [m/s]\n" + "\n".join(
        r + (",999" if i == 3 else ",20") for i, r in enumerate(met_rows())) + "\n",
    ["met.csv:5", "column \"wind_500hPa [m/s]\"", "500 hPa wind speed 999 m/s",
     "expected a 500 hPa wind speed from 0 to 150 m/s"],
    case=CASE + '\n[diagnostics]\nschemes = ["horton-2014"]\n'))

# --- NetCDF met ----------------------------------------------------------------------------------
NC_CASE = case_with('file = "met.csv"', 'file = "met.nc"\nreading = "instantaneous"').replace(
    'reading = "hour_average"\nhour_label = "period_start"\n', "", 1)


def netcdf_met(path, speed=None, direction=None, blh=None, scale_factor=None, fill_all=False):
    d = netCDF4.Dataset(path, "w")
    n = 30
    d.createDimension("time", n)
    t = d.createVariable("time", "f8", ("time",))
    t.units = "hours since 2026-01-12 00:00:00"
    t.standard_name = "time"
    t[:] = np.arange(n)
    h = d.createVariable("blh", "f4", ("time",), fill_value=np.float32(-9999.0))
    h.units = "m"
    h.standard_name = "atmosphere_boundary_layer_thickness"
    if fill_all:
        h[:] = np.ma.masked_all(n)
    else:
        h[:] = np.full(n, 300.0) if blh is None else blh
    if scale_factor is not None:
        s = d.createVariable("ws", "i2", ("time",))
        s.scale_factor = scale_factor
        s.add_offset = 0.0
        s.set_auto_maskandscale(False)
        s[:] = np.full(n, 20, dtype="i2")
    else:
        s = d.createVariable("ws", "f4", ("time",))
        s[:] = np.full(n, 2.0) if speed is None else speed
    s.units = "m s-1"
    s.standard_name = "wind_speed"
    w = d.createVariable("wd", "f4", ("time",))
    w.units = "degree"
    w.standard_name = "wind_from_direction"
    w[:] = np.full(n, 200.0) if direction is None else direction
    d.close()


def with_value(i, v, base):
    a = np.full(30, base)
    a[i] = v
    return a


def nc_kind(name, maker, words):
    if not HAVE_NETCDF:
        return
    kind(name, {"case.toml": NC_CASE, "met.nc": maker}, ["run", "case.toml", "-o", "OUT"], words)


nc_kind("netcdf: direction 400", lambda p: netcdf_met(p, direction=with_value(4, 400.0, 200.0)),
        ["met.nc: variable \"wd\"", "record 5", "wind direction 400 deg",
         "expected a wind direction from 0 to 360 deg"])
nc_kind("netcdf: negative speed", lambda p: netcdf_met(p, speed=with_value(4, -3.0, 2.0)),
        ["met.nc: variable \"ws\"", "record 5", "wind speed -3 m/s", "expected a wind speed from 0 to 115 m/s"])
nc_kind("netcdf: scale_factor 0", lambda p: netcdf_met(p, scale_factor=0.0),
        ["met.nc: variable \"ws\"", "scale_factor 0", "expected a scale_factor other than 0"])
nc_kind("netcdf: all fill", lambda p: netcdf_met(p, fill_all=True),
        ["met.nc: variable \"blh\"", "every value is missing", "expected valid values"])
nc_kind("netcdf: mixing height 1e30", lambda p: netcdf_met(p, blh=with_value(2, 1e30, 300.0)),
        ["met.nc: variable \"blh\"", "record 3", "is outside the plausible range",
         "expected a mixing height from 0 to 10000 m"])
def netcdf_pm25(path, value):
    """Monitor PM2.5 in CF-NetCDF, 30 hours of 12 ug m-3 and one hour of `value`, no fill value."""
    d = netCDF4.Dataset(path, "w")
    d.createDimension("time", 30)
    t = d.createVariable("time", "f8", ("time",))
    t.units = "hours since 2026-01-12 00:00:00"
    t.standard_name = "time"
    t[:] = np.arange(30)
    v = d.createVariable("pm25", "f4", ("time",), fill_value=False)
    v.units = "ug m-3"
    v.standard_name = "mass_concentration_of_pm2p5_ambient_aerosol_particles_in_air"
    v[:] = with_value(6, value, 12.0)
    d.close()


if HAVE_NETCDF:
    # An undeclared 9999 in measured NetCDF data: the monitor range applies as in the CSV reader.
    kind("netcdf monitor: undeclared 9999", {"obs.nc": lambda p: netcdf_pm25(p, 9999.0)},
         ["met-dump", "--concentrations", "obs.nc", "--to-netcdf", "OUT"],
         ["obs.nc: variable pm2p5 (2026-01-12T06:00:00Z)", "9999 ug m-3",
          "expected a monitor concentration from -5 to 5000 ug/m3"])

kind("netcdf: not NetCDF", {"case.toml": NC_CASE, "met.nc": "this is text\n"},
     ["run", "case.toml", "-o", "OUT"], ["met.nc", "not readable as NetCDF", "expected a NetCDF-3 or NetCDF-4 file"])
kind("netcdf: path is a folder", {"case.toml": NC_CASE, "met.nc": None},
     ["run", "case.toml", "-o", "OUT"], ["met.nc", "the path is a folder", "expected a NetCDF file"])

# --- case TOML -----------------------------------------------------------------------------------
kind("case: TOML syntax", *run_kind(met_text(), ["case.toml:3", "TOML syntax error", "expected valid TOML"],
                                    case=case_with('title = "invented"', 'title = "invented')))
kind("case: unknown key", *run_kind(met_text(), ["case.toml:7", "unknown key \"airshd\"", "expected one of"],
                                    case=case_with("[airshed]", "[airshd]")))
kind("case: no name", *run_kind(met_text(), ["case.toml:1", "no \"name\"", "expected a string in quotes"],
                                case=case_with('name = "bad-input"\n', "")))
kind("case: number without unit", *run_kind(met_text(), ["case.toml:8", "x_side", "a number without a unit",
                                                         "expected a length with its unit"],
                                            case=case_with('x_side = "10 km"', "x_side = 10")))
kind("case: wrong unit", *run_kind(met_text(), ["case.toml:8", "x_side", "expected"],
                                   case=case_with('x_side = "10 km"', 'x_side = "10 kg"')))
kind("case: max_gap_hours 49", *run_kind(met_text(), ["case.toml:15", "max_gap_hours: 49",
                                                      "expected a whole number from 0 to 48"],
                                         case=case_with('hour_label = "period_start"',
                                                        'hour_label = "period_start"\nmax_gap_hours = 49')))
kind("case: spin_up_max_days 2^32+1", *run_kind(
    met_text(), ["case.toml:19", "spin_up_max_days: 4294967297", "expected a whole number from 1 to"],
    case=case_with('spin_up = "none"', 'spin_up = "none"\nspin_up_max_days = 4294967297')))
kind("case: max_substeps_per_hour 2^32+1", *run_kind(
    met_text(), ["case.toml:19", "max_substeps_per_hour: 4294967297", "expected a whole number from 1 to"],
    case=case_with('spin_up = "none"', 'spin_up = "none"\nmax_substeps_per_hour = 4294967297')))
kind("case: emission of 1e30 t/h", *run_kind(
    met_text(), ["case.toml:30", "CO", "emission rate", "is outside the plausible range",
                 "expected an emission rate from 0 to"],
    case=case_with('CO = "2.4 t/h"', 'CO = "1e30 t/h"')))
kind("case: background of 1e9 ug/m3 equivalent", *run_kind(
    met_text(), ["case.toml:26", "background", "is outside the plausible range", "expected a concentration from 0 to"],
    case=case_with('background = "0.15 ppm"', 'background = "1e6 ppm"')))
kind("case: plausibility unknown key", *run_kind(
    met_text(), ["case.toml:33", "[plausibility]", "unknown key \"mixing_heigth\"",
                 "(did you mean \"mixing_height\"?)"],
    case=CASE + '\n[plausibility]\nmixing_heigth = ["0 m", "12 km"]\n'))
kind("case: plausibility min above max", *run_kind(
    met_text(), ["case.toml:33", "[plausibility] mixing_height", "expected two quantities"],
    case=CASE + '\n[plausibility]\nmixing_height = ["12 km", "0 m"]\n'))
kind("case: plausibility override refuses a row", *run_kind(
    met_text(), ["met.csv:2", "mixing height 300 m is outside the plausible range",
                 "expected a mixing height from 0 to 250 m"],
    case=CASE + '\n[plausibility]\nmixing_height = ["0 m", "250 m"]\n'))
kind("case: path is a folder", {"case.toml": None}, ["run", "case.toml", "-o", "OUT"],
     ["case.toml", "the path is a folder", "expected a file"])
kind("case: file missing", {}, ["run", "case.toml", "-o", "OUT"],
     ["case.toml", "cannot be opened", "expected a readable file"])
kind("case: bad pollutant unit", *run_kind(met_text(), ["case.toml:21", "unit", "expected"],
                                           case=case_with('unit = "ppm"', 'unit = "parsecs"')))
kind("case: negative lifetime", *run_kind(met_text(), ["case.toml:24", "lifetime", "expected"],
                                          case=case_with('lifetime = "60 day"', 'lifetime = "-60 day"')))

# --- rule TOML -----------------------------------------------------------------------------------
RULE_CASE = CASE + '\n[standards]\nrule_sets = ["local.toml"]\n'
kind("rules: TOML syntax", *run_kind(met_text(), ["local.toml:2", "TOML syntax error", "expected valid TOML"],
                                     case=RULE_CASE, extra={"local.toml": RULES.replace('id = "local-test"', 'id = "local-test')}))
kind("rules: unknown key", *run_kind(met_text(), ["local.toml:17", "unknown key \"persistance\"", "did you mean"],
                                     case=RULE_CASE, extra={"local.toml": RULES.replace("persistence", "persistance")}))
kind("rules: wrapped integer", *run_kind(met_text(), ["local.toml:17", "persistence: 4294967297",
                                                      "expected a whole number"],
                                         case=RULE_CASE, extra={"local.toml": RULES.replace("persistence = 1", "persistence = 4294967297")}))
kind("rules: no rules", *run_kind(met_text(), ["local.toml", "no [[limit]] or [[alert]] tables", "expected at least one rule"],
                                  case=RULE_CASE, extra={"local.toml": RULES.split("[[alert]]")[0]}))
kind("rules: file missing (observe)", {"obs.csv": obs_text()},
     ["observe", "obs.csv", "--lst-offset", "+00:00", "--rules", "nothere.toml", "-o", "OUT"],
     ["nothere.toml", "expected"])

# --- observations CSV ----------------------------------------------------------------------------
OBS = ["observe", "obs.csv", "--lst-offset", "+00:00", "-o", "OUT"]


def obs_kind(name, text, words, extra_args=()):
    args = list(OBS)
    extra_args = list(extra_args)
    if "--lst-offset" in extra_args:  # replaces the default offset rather than adding a second
        i = extra_args.index("--lst-offset")
        args[args.index("--lst-offset") + 1] = extra_args[i + 1]
        del extra_args[i:i + 2]
    kind(name, {"obs.csv": text}, args + extra_args, words)


obs_kind("observations: header without unit", obs_text(header="time,PM2.5"),
         ["obs.csv:1", "has no unit", "expected \"<pollutant> [<unit>]\""])
obs_kind("observations: unknown pollutant", obs_text(header="time,dust [ug/m3]"),
         ["obs.csv:1", "dust", "expected"])
obs_kind("observations: not a number", obs_with(3, "twelve"),
         ["obs.csv:5", "value \"twelve\"", "expected a number, or an empty cell"])
obs_kind("observations: repeated hour", obs_text().replace("2026-01-12T01:00Z", "2026-01-12T00:00Z"),
         ["obs.csv:3", "repeats the hour on line 2", "expected strictly increasing hours"])
obs_kind("observations: off the grid", obs_text().replace("2026-01-12T02:00Z", "2026-01-12T02:30Z"),
         ["obs.csv:4", "off the hourly grid", "expected whole hours after the first row"])
obs_kind("observations: undeclared -999", obs_with(3, "-999"),
         ["obs.csv:5", "monitor concentration -999 ug m-3 is outside the plausible range",
          "expected a monitor concentration from -5 to 5000 ug/m3", "--missing-value"])
obs_kind("observations: 99999", obs_with(3, "99999"),
         ["obs.csv:5", "monitor concentration 99999 ug m-3 is outside the plausible range",
          "expected a monitor concentration from -5 to 5000 ug/m3"])
obs_kind("observations: negative beyond the noise", obs_with(3, "-50"),
         ["obs.csv:5", "monitor concentration -50 ug m-3", "expected a monitor concentration from -5"])
obs_kind("observations: CR-only", obs_text().replace("\n", "\r"),
         ["obs.csv:1", "carriage return alone", "expected lines ending in LF or CR LF"])
obs_kind("observations: semicolons", obs_text(header="time;PM2.5 [ug/m3]"),
         ["obs.csv:1", "separator must be a comma", "expected \"time\" followed by"])
obs_kind("observations: open quote", obs_with(3, "\"12"),
         ["obs.csv:5", "is not closed", "expected a closing quote"])
obs_kind("observations: no data rows", "time,PM2.5 [ug/m3]\n",
         ["obs.csv", "no data rows", "expected at least one hourly row"])
obs_kind("observations: bad missing-value code", obs_text(),
         ["--missing-value", "\"n/a\"", "expected a number"], extra_args=["--missing-value", "n/a"])
kind("observations: path is a folder", {"obs.csv": None}, OBS,
     ["obs.csv", "the path is a folder", "expected a file"])

# --- command-line values and zones ---------------------------------------------------------------
obs_kind("command line: UTC offset out of range", obs_text(), ["--lst-offset", "expected"],
         extra_args=["--lst-offset", "+25:00"])
obs_kind("command line: rolling 0", obs_text(), ["--rolling 0", "expected K or K:M"],
         extra_args=["--rolling", "0"])
obs_kind("command line: rolling M > K", obs_text(), ["--rolling 8:9", "expected M <= K"],
         extra_args=["--rolling", "8:9"])
obs_kind("command line: unknown rule set", obs_text(), ["us-naqs", "expected"],
         extra_args=["--rules", "us-naqs"])
obs_kind("command line: bad issue time", obs_text(), ["--issue-time", "expected an ISO 8601 time"],
         extra_args=["--issue-time", "tomorrow"])
obs_kind("command line: AQI table", obs_text(), ["--aqi-table", "expected"],
         extra_args=["--aqi-table", "1999"])
kind("command line: run issue time", *run_kind(met_text(), ["--issue-time", "expected an ISO 8601 time"]))
KINDS[-1][2].extend(["--issue-time", "yesterday"])
obs_kind("zones: unknown IANA name", obs_text(), ["--lst-offset", "Europe/Nowhere", "expected"],
         extra_args=["--lst-offset", "Europe/Nowhere"])
kind("zones: case zone unknown", *run_kind(met_text(), ["case.toml:5", "time_zone", "expected"],
                                           case=case_with('time_zone = "UTC"', 'time_zone = "Mars/Olympus"')))
kind("zones: POSIX rule day 400", *run_kind(met_text(), ["case.toml:5", "expected"],
                                            case=case_with('time_zone = "UTC"', 'time_zone = "MST7MDT,M3.2.0,J400"')))


def materialise(folder, files):
    for name, content in files.items():
        path = os.path.join(folder, name)
        if content is None:
            os.makedirs(path)
        elif callable(content):
            content(path)
        else:
            data = content.encode("utf-8") if isinstance(content, str) else content
            with open(path, "wb") as f:
                f.write(data)


def check_kind(index, tmp):
    name, files, args, words = KINDS[index]
    folder = os.path.join(tmp, "k%03d" % index)
    os.makedirs(folder)
    materialise(folder, files)
    out = os.path.join(folder, "out")
    argv = [BINARY] + [out if a == "OUT" else a for a in args]
    p = subprocess.run(argv, cwd=folder, capture_output=True, timeout=60)
    err = p.stderr.decode("utf-8", "replace")
    problems = []
    if p.returncode != 2:
        problems.append("exit code %d, expected 2" % p.returncode)
    for w in words:
        if w not in err:
            problems.append("message lacks %r" % w)
    if len(err) > 1200:
        problems.append("message of %d characters" % len(err))
    left = []
    if os.path.isdir(out):
        for root, dirs, names in os.walk(out):
            left += [os.path.join(root, n) for n in names]
    siblings = [n for n in os.listdir(folder) if n.startswith("out") and n != "out"]
    if left or siblings:
        problems.append("files left behind: %s %s" % (left, siblings))
    return name, problems, err.strip()


def main():
    failures = 0
    with tempfile.TemporaryDirectory() as tmp:
        with concurrent.futures.ThreadPoolExecutor(max_workers=2) as pool:
            results = list(pool.map(lambda i: check_kind(i, tmp), range(len(KINDS))))
    for name, problems, err in results:
        if problems:
            failures += 1
            print("FAIL: %s: %s\n   got: %s" % (name, "; ".join(problems), err[:600]))
        else:
            print("ok: %s: %s" % (name, err[:200]))
    print("%d kinds, %d failed%s" % (len(KINDS), failures,
                                     "" if HAVE_NETCDF else " (NetCDF kinds skipped: no netCDF4)"))
    if len(KINDS) < 60:
        print("FAIL: fewer than 60 kinds")
        return 1
    return 1 if failures else 0


sys.exit(main())
