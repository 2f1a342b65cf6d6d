"""Runs the real `lidbox outlook` and `lidbox run` for the stagnation diagnostics: an invented
hand-made met file with a calm spell (known answers by construction), a scheme whose field is
missing (exit 2, the field named, nothing written), the NetCDF demo, and the demo run's
stagnation.csv.

Usage (ctest): python3 test_outlook.py <lidbox binary> <source dir>
"""
import csv
import os
import subprocess
import sys
import tempfile

BINARY, SOURCE = sys.argv[1], sys.argv[2]
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(args):
    p = subprocess.run([BINARY] + args, capture_output=True, text=True)
    return p.returncode, p.stdout, p.stderr


with tempfile.TemporaryDirectory() as tmp:
    # Invented: 6 UTC days; days 0-3 calm (mixing height 300 m, 1.5 m/s, dry, 8 m/s at 500 hPa),
    # days 4-5 windy and wet. Ventilation of a calm day: 300 m x 1.5 m/s = 450 m2/s.
    rows = ["time,mixing_height [m],wind_speed [m/s],wind_from [deg],precipitation [mm],wind_500hPa [kt]"]
    for h in range(24 * 6):
        calm = h // 24 < 4
        rows.append("2026-01-%02dT%02d:00:00Z,%d,%g,200,%g,%g" % (
            10 + h // 24, h % 24, 300 if calm else 1200, 1.5 if calm else 6.0, 0 if calm else 0.5,
            15 if calm else 40))
    met = os.path.join(tmp, "met.csv")
    with open(met, "w") as f:
        f.write("\n".join(rows) + "\n")

    out = os.path.join(tmp, "out")
    code, stdout, err = run(["outlook", met, "--scheme", "horton-2014", "--scheme",
                             "korshover-angell-1982-10m", "--table", "nws-blacksburg", "-o", out])
    check(code == 0, "outlook exit 0 (got %d: %s)" % (code, err))
    check("Screening estimate" in stdout, "the caution is printed")
    # Horton et al. (2014): 10 m wind 1.5 < 3.2 m/s, 15 kt = 7.7 m/s < 13 m/s, dry: days 0-3.
    check("horton-2014: 4 stagnation days of 6 judged, longest streak 4 d, 1 episode(s) of >= 1 d" in stdout,
          "horton summary line: " + stdout)
    # Korshover and Angell reduced form: >= 4 days makes the calm spell one episode.
    check("korshover-angell-1982-10m: 4 stagnation days of 6 judged, longest streak 4 d, 1 episode(s) of >= 4 d"
          in stdout, "korshover summary line")
    check("episode 2026-01-10 .. 2026-01-13 (4 d)" in stdout, "episode dates")
    with open(os.path.join(out, "stagnation.csv")) as f:
        table = list(csv.DictReader(f))
    check(len(table) == 6, "six days")
    # 450 m2/s / 0.156803 = 2869.9 kt ft -> NWS Blacksburg category 1 (<= 28500)
    check(table[0]["nws-blacksburg_afternoon_max [knot.ft]"].startswith("2869.8"),
          "calm day in kt ft: " + table[0]["nws-blacksburg_afternoon_max [knot.ft]"])
    check(table[0]["nws-blacksburg_category"] == "1", "calm day category 1")
    # 1200 m x 6 m/s = 7200 m2/s = 45917 kt ft -> category 3 (38001-51000)
    check(table[5]["nws-blacksburg_category"] == "3", "windy day category 3")
    check([r["horton-2014_streak_day"] for r in table] == ["1", "2", "3", "4", "0", "0"], "streak days")
    with open(os.path.join(out, "stagnation_episodes.csv")) as f:
        eps = f.read().splitlines()
    check(eps[1:] == ["horton-2014,2026-01-10,2026-01-13,4,1", "korshover-angell-1982-10m,2026-01-10,2026-01-13,4,4"],
          "episodes file: %r" % eps)

    # A scheme whose field is missing: exit 2, the field named, nothing written.
    out2 = os.path.join(tmp, "out2")
    code, stdout, err = run(["outlook", met, "--scheme", "wang-angell-1999", "-o", out2])
    check(code == 2, "missing field exit 2 (got %d)" % code)
    check('no field "geostrophic_wind" for the chosen stagnation scheme' in err, "missing field named: " + err)
    check(not os.path.exists(out2), "nothing written on error")

    # The NetCDF demo point file: the reader's path, the 10 m wind scheme.
    code, stdout, err = run(["outlook", os.path.join(SOURCE, "met-demo", "cindervale-met-point.nc"),
                             "--zone", "MST7MDT,M3.2.0,M11.1.0", "--scheme", "korshover-angell-1982-10m"])
    check(code == 0, "outlook on NetCDF exit 0 (got %d: %s)" % (code, err))
    check("date_lst,hours," in stdout, "the daily table is printed")

    # `run` writes stagnation.csv beside its other tables, and the summary has the section.
    run_out = os.path.join(tmp, "run")
    code, stdout, err = run(["run", os.path.join(SOURCE, "met-demo", "cindervale.toml"), "-o", run_out])
    check(code == 0, "demo run exit 0 (got %d: %s)" % (code, err))
    check(os.path.exists(os.path.join(run_out, "stagnation.csv")), "run writes stagnation.csv")
    check("Ventilation and stagnation (met only, local standard days):" in stdout, "run summary section")

if failures:
    print("%d failure(s)" % len(failures))
    sys.exit(1)
print("all outlook checks passed")
