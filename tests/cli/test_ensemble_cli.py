#!/usr/bin/env python3
"""Runs the real lidbox binary on ensemble cases: the invented forecast demo, and bad inputs.

Demo: exit code 0, the ensemble files written, the summary's ensemble section, and
ensemble_hourly.csv's percentiles equal to numpy.percentile (default linear method) of the
members' hour means taken from single-member runs of each member.
Bad inputs: exit code 2, the message on stderr asserted whole, and no output folder.

ctest runs it as: /usr/bin/python3 test_ensemble_cli.py <lidbox binary> <source dir>
"""
import csv
import os
import shutil
import subprocess
import sys
import tempfile

try:
    import numpy as np
except ImportError:
    print("numpy missing: skipped")
    sys.exit(77)

BINARY = os.path.abspath(sys.argv[1])
SOURCE = os.path.abspath(sys.argv[2])
DEMO = os.path.join(SOURCE, "met-demo")
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)
    else:
        print("ok:", what)


def run(args, cwd):
    return subprocess.run([BINARY] + args, cwd=cwd, capture_output=True, text=True)


def demo_copy(d):
    """The forecast demo case and its met in folder d (so edits never touch the source tree)."""
    shutil.copytree(os.path.join(DEMO, "forecast"), os.path.join(d, "forecast"))
    shutil.copy(os.path.join(DEMO, "cindervale-advisories.toml"), d)
    with open(os.path.join(DEMO, "cindervale-forecast.toml")) as f:
        return f.read()


def write_case(d, text, name="case.toml"):
    path = os.path.join(d, name)
    with open(path, "w") as f:
        f.write(text)
    return path


def read_csv(path):
    with open(path) as f:
        return list(csv.DictReader(f))


def test_demo_against_single_member_runs():
    with tempfile.TemporaryDirectory() as d:
        text = demo_copy(d)
        p = run(["run", write_case(d, text), "-o", "out"], d)
        check(p.returncode == 0, "forecast demo exits 0 (stderr: %s)" % p.stderr.strip())
        for name in ("ensemble_hourly.csv", "ensemble_days.csv", "ensemble_episodes.csv", "cut.csv"):
            check(os.path.isfile(os.path.join(d, "out", name)), "ensemble run writes " + name)
        check("Ensemble 12 members (forecast/member-01.csv ... forecast/member-12.csv)" in p.stdout,
              "summary names the members")
        check("a finite ensemble proves neither 0 % nor 100 %" in p.stdout, "summary carries the counting caution")
        ens = read_csv(os.path.join(d, "out", "ensemble_hourly.csv"))
        check(len(ens) == 120, "120 hourly percentile rows")
        # Each member alone: the same case with the member as its [met] file and no ensemble.
        single = text.split("[ensemble]")[0] + "[model]" + text.split("[model]")[1].split("[cut]")[0]
        members = []
        for m in range(1, 13):
            case = single.replace('file = "forecast/control.csv"', 'file = "forecast/member-%02d.csv"' % m)
            pm = run(["run", write_case(d, case, "m%02d.toml" % m), "-o", "m%02d" % m, "-q", "--netcdf"], d)
            check(pm.returncode == 0, "member %d alone exits 0" % m)
            members.append([float(r["PM10_hour_mean [ug m-3]"]) for r in read_csv(os.path.join(d, "m%02d" % m, "hourly.csv"))])
        x = np.array(members)
        worst = 0.0
        for q in (5, 25, 50, 75, 95):
            # Reference: numpy.percentile, default method "linear".
            ref = np.percentile(x, q, axis=0)
            got = np.array([float(r["PM10_p%d [ug m-3]" % q]) for r in ens])
            worst = max(worst, float(np.max(np.abs(got - ref) / ref)))
        # Both tables print 7 significant digits.
        check(worst < 2e-6, "percentiles equal numpy's over single-member runs (worst %.2g)" % worst)
        ref_mean = x.mean(axis=0)
        got_mean = np.array([float(r["PM10_member_mean [ug m-3]"]) for r in ens])
        check(float(np.max(np.abs(got_mean - ref_mean) / ref_mean)) < 2e-6, "member mean equals numpy's mean")
        # ensemble.nc opens in xarray with its realization dimension, and each member's hour means
        # are those of the member run alone (its hourly.nc), to rounding.
        try:
            import xarray as xr
        except ImportError:
            print("xarray missing: ensemble.nc not checked")
            return
        with xr.open_dataset(os.path.join(d, "out", "ensemble.nc")) as ens_nc:
            check(ens_nc.sizes["realization"] == 12 and ens_nc.sizes["time"] == 120, "ensemble.nc: 12 realizations x 120 h")
            worst = 0.0
            for m in range(1, 13):
                with xr.open_dataset(os.path.join(d, "m%02d" % m, "hourly.nc")) as one:
                    a = ens_nc["PM10_hour_mean"].sel(realization=m).values
                    b = one["PM10"].values
                    worst = max(worst, float(np.max(np.abs(a - b) / b)))
            check(worst < 1e-12, "ensemble.nc members equal single-member runs (worst %.2g)" % worst)
            ref = np.percentile(ens_nc["PM10_hour_mean"].values, 95, axis=0)
            got = ens_nc["PM10_percentile"].sel(percentile=95.0).values
            check(float(np.max(np.abs(got - ref) / ref)) < 1e-12, "ensemble.nc percentiles equal numpy's")
            days = read_csv(os.path.join(d, "out", "ensemble_days.csv"))
            row = [r for r in days if r["rule"] == "PM10-day" and r["day_lst"] == "2026-02-12"][0]
            k = [i for i, r in enumerate(ens_nc["rule_id"].values) if r.decode() == "eu-2008-50 PM10-day"][0]
            p = float(ens_nc["exceedance_probability"].values[k, 3])
            check(abs(p - float(row["probability_member_count"])) < 1e-4, "ensemble.nc probability equals the table's")


def expect_error(name, message, edit, prepare=None):
    with tempfile.TemporaryDirectory() as d:
        text = edit(demo_copy(d))
        if prepare:
            prepare(d)
        write_case(d, text)
        p = run(["run", "case.toml", "-o", "out"], d)
        check(p.returncode == 2, "%s: exit code 2 (got %d)" % (name, p.returncode))
        got = p.stderr.strip()
        check(got == "lidbox: error: " + message, "%s: message\n   got: %s\n  want: lidbox: error: %s" % (name, got, message))
        check(not os.path.exists(os.path.join(d, "out")), "%s: no output written" % name)


def drop_last_row(d):
    path = os.path.join(d, "forecast", "member-07.csv")
    with open(path) as f:
        lines = f.readlines()
    with open(path, "w") as f:
        f.writelines(lines[:-1])


def test_bad_inputs():
    expect_error(
        "a member on another time axis",
        "forecast/member-07.csv: 119 hourly stamps from 2026-02-09T07:00:00Z, not the time axis of the [met] "
        "file; expected every member on the time axis of \"forecast/control.csv\" (120 hourly stamps from "
        "2026-02-09T07:00:00Z)",
        lambda t: t, drop_last_row)
    expect_error(
        "one member asked for probabilities",
        "case.toml:21: [ensemble] members: 1 member; expected at least 2 members: a probability from one "
        "member is no probability",
        lambda t: t.replace('members = "forecast/member-*.csv"', 'members = ["forecast/member-01.csv"]'))
    expect_error(
        "a pattern that matches nothing",
        "case.toml:21: [ensemble] members: \"forecast/membr-*.csv\" matches no file; expected a pattern "
        "that matches the members' met files",
        lambda t: t.replace("forecast/member-*.csv", "forecast/membr-*.csv"))
    expect_error(
        "a percentile outside 0-100",
        "case.toml:22: [ensemble] percentiles: 105 at position 5; expected rising percentiles from 0 to 100, "
        "such as [5, 25, 50, 75, 95]",
        lambda t: t.replace("percentiles = [5, 25, 50, 75, 95]", "percentiles = [5, 25, 50, 75, 105]"))

    expect_error(
        "a cut start outside the run",
        "case.toml:72: [cut] start: 2026-02-20T01:00:00Z, outside the run; expected the start of an hour from "
        "2026-02-09T07:00:00Z to 2026-02-14T06:00:00Z",
        lambda t: t.replace('start = "2026-02-10T18:00:00-07:00"', 'start = "2026-02-19T18:00:00-07:00"'))
    expect_error(
        "a sector that does not exist",
        "case.toml:71: [cut] sectors: no sector \"home_heatng\" (did you mean \"home_heating\"?); expected one "
        "of the case's sectors: traffic, home_heating, industry",
        lambda t: t.replace('sectors = ["home_heating"]', 'sectors = ["home_heatng"]'))
    expect_error(
        "a member count the ensemble cannot have",
        "case.toml:73: [cut] target: at most 12 of 12 members, which every scale meets; expected a count from 0 to 11",
        lambda t: t.replace("target = { at_most_members = 1 }", "target = { at_most_members = 12 }"))


test_demo_against_single_member_runs()
test_bad_inputs()
if failures:
    print("%d failure(s)" % len(failures))
    sys.exit(1)
print("all ok")
