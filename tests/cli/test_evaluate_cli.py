"""Runs the real `lidbox evaluate` on the invented Cindervale case: a good monitor file gives the
report, tables, charts and (with --fit) the calibrated case; bad input gives exit code 2, a message
naming the place, and no output folder.

Usage (ctest): python3 test_evaluate_cli.py <lidbox binary> <source dir>
"""
import csv
import os
import shutil
import subprocess
import sys
import tempfile

BINARY, SOURCE = sys.argv[1], os.path.abspath(sys.argv[2])
CASE = os.path.join(SOURCE, "met-demo", "cindervale.toml")
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(args):
    p = subprocess.run([BINARY] + args, capture_output=True, text=True)
    return p.returncode, p.stdout, p.stderr


def write(path, text):
    with open(path, "w") as f:
        f.write(text)


def refused(args, out, message_start, what):
    rc, so, se = run(args + ["-o", out])
    check(rc == 2, "%s: exit 2 (got %d, %s)" % (what, rc, se.strip()))
    check(se.startswith("lidbox: error: " + message_start), "%s: message %r" % (what, se.strip()))
    check(not os.path.exists(out), "%s: nothing written" % what)


with tempfile.TemporaryDirectory() as tmp:
    rc, so, se = run(["run", CASE, "-o", os.path.join(tmp, "run"), "-q"])
    check(rc == 0, "run the demo case: " + se)
    with open(os.path.join(tmp, "run", "hourly.csv")) as f:
        hourly = list(csv.DictReader(f))
    # Invented monitor: the model's PM2.5 with its traffic part doubled, CO in ppb (the case is in
    # ppm), a gap, a value below detection and a small negative value.
    rows = ["# INVENTED monitor for a command-line test", "time,PM2.5 [ug/m3],CO [ppb],O3 [ppb]"]
    for i, h in enumerate(hourly):
        pm = float(h["PM25_hour_mean [ug m-3]"]) + float(h["PM25_part_traffic [ug m-3]"])
        co = 1000 * float(h["CO_hour_mean [ppm]"])
        cell = "%.3f" % pm
        if i == 10:
            cell = ""
        elif i == 11:
            cell = "<2"
        elif i == 12:
            cell = "-0.3"
        rows.append("%s,%s,%.1f,30" % (h["period_start_utc"], cell, co))
    mon = os.path.join(tmp, "mon.csv")
    write(mon, "\n".join(rows) + "\n")

    out = os.path.join(tmp, "ev")
    rc, so, se = run(["evaluate", CASE, mon, "-o", out])
    check(rc == 0, "evaluate exits 0: " + se)
    names = sorted(os.listdir(out)) if os.path.isdir(out) else []
    check(names == sorted(["evaluation.md", "statistics.csv", "pairs.csv", "profiles.csv", "verification.csv",
                           "verification_days.csv", "timeseries.svg", "scatter.svg", "summary.txt",
                           "bulletin.html", "bulletin.md", "bulletin.txt"]),
          "files: %s" % names)
    # The bulletin of an evaluated run names what the monitor measured beside the model: the
    # monitor's highest hour (computed here from the file written above) and the model's hour
    # mean then, from hourly.csv, both with 4 significant digits (%.4g).
    bmd = open(os.path.join(out, "bulletin.md")).read() if "bulletin.md" in names else ""
    pm_obs = [(float(r.split(",")[1]), k) for k, r in enumerate(rows[2:])
              if r.split(",")[1] not in ("", "<2")]
    peak, at = max(pm_obs)
    modelled = float(hourly[at]["PM25_hour_mean [ug m-3]"])
    check("NOT AN OFFICIAL ALERT" in bmd and "What the monitors measured" in bmd,
          "evaluate writes a bulletin with a monitors section, never an official alert")
    check("mon (PM2.5): highest hour measured %.4g ug m-3" % peak in bmd
          and "when the model gave %.4g ug m-3" % modelled in bmd,
          "the monitor's highest hour %.4g and the model's %.4g in the bulletin:\n%s" % (peak, modelled, bmd))
    check("mon PM2.5: 167 pairs (0 monitor hours outside the run, 1 missing, 1 below detection, 1 negative kept)"
          in so, "pair counts printed: " + so)
    check("mon.csv: O3 (not in the case)" in open(os.path.join(out, "evaluation.md")).read(),
          "the monitor's O3 column is reported as skipped")
    md = open(os.path.join(out, "evaluation.md")).read() if "evaluation.md" in names else ""
    check(md.count("Screening estimate from a single well-mixed box model") == 2, "caution at top and bottom")
    check("| mon | CO | ppb -> ppm (x0.001) |" in md, "CO converted from ppb to the case's ppm")
    check("chang-hanna-2004" in md and "boylan-russell-2006" in md, "criteria with their papers")

    # Fit: the traffic part doubled is found again (the noise is only the 3 decimals written).
    outf = os.path.join(tmp, "fit")
    rc, so, se = run(["evaluate", CASE, mon, "--pollutant", "PM2.5", "--fit", "nnls", "--bootstrap", "50",
                      "-o", outf])
    check(rc == 0, "evaluate --fit exits 0: " + se)
    fit = {r["column"]: r for r in csv.DictReader(open(os.path.join(outf, "fit.csv")))} if rc == 0 else {}
    if fit:
        check(abs(float(fit["traffic"]["scale"]) - 2.0) < 0.05, "traffic scale near 2: %s" % fit["traffic"]["scale"])
        check(abs(float(fit["home_heating"]["scale"]) - 1.0) < 0.05, "heating scale near 1")
    cal = os.path.join(outf, "cindervale-january-calibrated.toml")
    check(os.path.exists(cal), "calibrated case written")
    if os.path.exists(cal):
        text = open(cal).read()
        check(text.count("# lidbox evaluate (NNLS fit of PM2.5 to mon):") >= 4, "changed lines carry comments")
        rc2, _, se2 = run(["run", cal, "-o", os.path.join(tmp, "calrun"), "-q"])
        check(rc2 == 0, "the calibrated case runs from its own folder: " + se2)

    # --hold and --prior take one value each, wherever they stand among the positionals.
    rc, so, se = run(["evaluate", "--hold", "home_heating", CASE, mon, "--pollutant", "PM2.5", "--fit", "nnls",
                      "--bootstrap", "0", "-o", os.path.join(tmp, "hold")])
    check(rc == 0 and "home_heating: held at 1 (--hold)" in open(os.path.join(tmp, "hold", "evaluation.md")).read(),
          "--hold before the case: " + se)

    # Bad input.
    late = os.path.join(tmp, "late.csv")
    write(late, "time,PM2.5 [ug/m3]\n2025-07-01T00:00Z,5\n2025-07-01T01:00Z,6\n")
    refused(["evaluate", CASE, late], os.path.join(tmp, "x1"),
            late + ": monitor hours 2025-07-01T00:00:00Z to 2025-07-01T01:00:00Z do not overlap the run's hours",
            "no overlapping hours")
    refused(["evaluate", CASE, mon, "--pollutant", "NO2"], os.path.join(tmp, "x2"),
            "--pollutant NO2: a pollutant the case " + CASE + " does not have", "pollutant the case lacks")
    refused(["evaluate", CASE, mon, "--pollutant", "PM2.5", "--fit", "bayes", "--prior", "traffic=1:-0.2"],
            os.path.join(tmp, "x3"), "--prior traffic=1:-0.2: prior standard deviation \"-0.2\"",
            "prior with a negative spread")
    refused(["evaluate", CASE, mon, "--fit", "nnls"], os.path.join(tmp, "x4"),
            "--fit: monitors of", "fit of two pollutants at once")
    # home_heating replaced by a copy of traffic at half the rate: proportional columns.
    same = open(CASE).read().replace("cindervale-met.csv", os.path.join(SOURCE, "met-demo", "cindervale-met.csv"))
    same = same.replace('"cindervale-advisories.toml"', '"%s"' % os.path.join(SOURCE, "met-demo",
                                                                              "cindervale-advisories.toml"))
    start = same.index("[sectors.home_heating]")
    end = same.index("[standards]")
    same = same[:start] + '[sectors.copy]\nemissions = { CO = "1.2 t/h", PM25 = "6 kg/h" }\nhour_of_day = [0.3, 0.2, 0.2, 0.2, 0.3, 0.7, 1.5, 2.2, 2.0, 1.3, 1.1, 1.1,\n               1.2, 1.2, 1.3, 1.6, 2.0, 2.2, 1.6, 1.0, 0.8, 0.6, 0.5, 0.4]\nday_of_week = [1.05, 1.05, 1.05, 1.05, 1.1, 0.85, 0.75]\n\n' + same[end:]
    collinear = os.path.join(tmp, "collinear.toml")
    write(collinear, same)
    refused(["evaluate", collinear, mon, "--pollutant", "PM2.5", "--fit", "nnls", "--no-background"],
            os.path.join(tmp, "x5"), "the fit's columns traffic, copy: hour-by-hour responses at the monitors "
            "that are linearly dependent", "all sectors collinear")

    # An ensemble case: the members' daily probabilities against an invented monitor made from the
    # control run with +-30 % noise. Brier score from the reliability table (o is 0 or 1, so
    # sum over a group of (p - o)^2 = n (p^2 - 2 p f + f)), Murphy's identity, histogram bins.
    fcase = os.path.join(SOURCE, "met-demo", "cindervale-forecast.toml")
    rc, so, se = run(["run", fcase, "-o", os.path.join(tmp, "fc"), "-q"])
    check(rc == 0, "run the forecast demo: " + se)
    import random
    rnd = random.Random(3)
    fc = list(csv.DictReader(open(os.path.join(tmp, "fc", "hourly.csv")))) if rc == 0 else []
    fmon = os.path.join(tmp, "fcmon.csv")
    write(fmon, "# INVENTED monitor for a command-line test\ntime,PM2.5 [ug/m3],PM10 [ug/m3]\n" + "".join(
        "%s,%.1f,%.1f\n" % (r["period_start_utc"], float(r["PM25_hour_mean [ug m-3]"]) * rnd.uniform(0.7, 1.3),
                           float(r["PM10_hour_mean [ug m-3]"]) * rnd.uniform(0.7, 1.3)) for r in fc))
    eout = os.path.join(tmp, "ens")
    rc, so, se = run(["evaluate", fcase, fmon, "--rules", "who-2021,eu-2008-50", "-o", eout])
    check(rc == 0, "evaluate an ensemble case: " + se)
    rows = list(csv.DictReader(open(os.path.join(eout, "ensemble_verification.csv")))) if rc == 0 else []
    check(len({(r["rule_set"], r["limit"]) for r in rows}) >= 3, "ensemble rows for several rules")
    for key in {(r["monitor"], r["rule_set"], r["limit"]) for r in rows}:
        sel = [r for r in rows if (r["monitor"], r["rule_set"], r["limit"]) == key]
        head = sel[0]
        n, bs = int(head["days"]), float(head["brier"])
        rel, res, unc = float(head["reliability"]), float(head["resolution"]), float(head["uncertainty"])
        table = [(float(r["forecast_probability"]), int(r["days_with_probability"]), float(r["observed_frequency"]))
                 for r in sel if r["table"] == "reliability"]
        check(abs(sum(k * (p * p - 2 * p * f + f) for p, k, f in table) / n - bs) < 1e-9, "%s: BS from the table" % (key,))
        check(abs(bs - (rel - res + unc)) < 1e-9, "%s: BS = REL - RES + UNC" % (key,))
        ranks = [int(r["days_at_rank"]) for r in sel if r["table"] == "rank_histogram"]
        check(len(ranks) == int(head["members"]) + 1, "%s: members + 1 rank bins" % (key,))
        check(0 < sum(ranks) <= n, "%s: ranked days" % (key,))
    check("## Ensemble (12 members) against the monitors" in open(os.path.join(eout, "evaluation.md")).read()
          if rc == 0 else False, "the report's ensemble section")

    # The charts render (headless chromium, when installed) to a picture that is not blank.
    chromium = shutil.which("chromium")
    if chromium and os.path.isdir(out):
        for svg in ["timeseries.svg", "scatter.svg"]:
            png = os.path.join(tmp, svg + ".png")
            subprocess.run([chromium, "--headless", "--no-sandbox", "--disable-gpu", "--screenshot=" + png,
                            "--window-size=1100,700", os.path.join(out, svg)], capture_output=True, timeout=120)
            check(os.path.exists(png) and os.path.getsize(png) > 10000, svg + " renders in chromium")

if failures:
    print("%d failure(s)" % len(failures))
    sys.exit(1)
print("ok")
