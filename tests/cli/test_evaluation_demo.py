"""The invented evaluation season of the README, made again with the binary under test: the met
and two monitors from make_evaluation_season.py (known scales background 1.15, traffic 1.30,
home_heating 0.75 plus seeded, serially correlated noise), then `lidbox evaluate --fit nnls` with
the README's options. The fit must recover every known scale within the 95 % interval of its own
block bootstrap, and report the pairs the README describes.

Usage (ctest): python3 test_evaluation_demo.py <lidbox binary> <source dir>
"""
import csv
import os
import subprocess
import sys
import tempfile

BINARY, SOURCE = sys.argv[1], os.path.abspath(sys.argv[2])
TRUTH = {"background": 1.15, "traffic": 1.30, "home_heating": 0.75}
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


for name in ["cindervale-season.toml", "cindervale-season-met.csv", "cindervale-monitor-north.csv",
             "cindervale-monitor-south.csv"]:
    text = open(os.path.join(SOURCE, "met-demo", name)).read()
    check("INVENTED" in text or name.endswith("met.csv"), name + " is labelled invented")

with tempfile.TemporaryDirectory() as tmp:
    p = subprocess.run(["/usr/bin/python3", os.path.join(SOURCE, "met-demo", "make_evaluation_season.py"),
                        BINARY, tmp], capture_output=True, text=True)
    check(p.returncode == 0, "the generator runs: " + p.stderr)
    out = os.path.join(tmp, "ev")
    p = subprocess.run([BINARY, "evaluate", os.path.join(tmp, "cindervale-season.toml"),
                        os.path.join(tmp, "cindervale-monitor-north.csv"),
                        os.path.join(tmp, "cindervale-monitor-south.csv"), "--pollutant", "PM2.5",
                        "--fit", "nnls", "--weights", "1,0.5", "--bootstrap", "1000", "--seed", "7", "-o", out],
                       capture_output=True, text=True)
    check(p.returncode == 0, "evaluate exits 0: " + p.stderr)
    check("cindervale-monitor-south PM2.5: 1320 pairs (120 monitor hours outside the run" in p.stdout,
          "the south monitor's partial overlap is reported: " + p.stdout)
    fit = {r["column"]: r for r in csv.DictReader(open(os.path.join(out, "fit.csv")))} if p.returncode == 0 else {}
    for name, truth in TRUTH.items():
        if name not in fit:
            check(False, name + " fitted")
            continue
        lo, hi = float(fit[name]["bootstrap_p2.5"]), float(fit[name]["bootstrap_p97.5"])
        check(lo <= truth <= hi, "%s: known scale %.2f inside the bootstrap 95 %% interval %.4f to %.4f"
              % (name, truth, lo, hi))
        check(float(fit[name]["bootstrap_se"]) >= float(fit[name]["gaussian_se"]),
              name + ": the block bootstrap sees the serial correlation the Gaussian error ignores")

if failures:
    print("%d failure(s)" % len(failures))
    sys.exit(1)
print("ok")
