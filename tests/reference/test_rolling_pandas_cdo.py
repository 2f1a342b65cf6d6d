"""Independent references for lidbox's running means: pandas rolling(k, min_periods=m) and
cdo runmean with the min_periods construction of design/toolchain.md section 6, on the same
invented series with gaps, run through the real binary (`lidbox observe --rolling K:M`).

lidbox labels window i by its first hour (and gives its end); pandas labels the window's last
row; cdo's outputf prints one value per full window, in window order. Only windows lying wholly
inside the series are compared. Tolerances: lidbox writes 10 significant digits, cdo's outputf
here 6 decimals.

Usage (ctest): /usr/bin/python3 test_rolling_pandas_cdo.py <lidbox binary> <source dir>
Exit 77 (skip) when pandas, netCDF4 or cdo are missing.
"""
import csv
import os
import shutil
import subprocess
import sys
import tempfile

try:
    import numpy as np
    import pandas as pd
    import netCDF4
except ImportError as e:  # wrong interpreter or packages missing
    print("skip:", e)
    sys.exit(77)
if shutil.which("cdo") is None:
    print("skip: cdo not found")
    sys.exit(77)

BINARY = sys.argv[1]
WINDOWS = [(8, 6), (24, 18), (3, 2), (5, 3)]
N = 2000
failures = []

# Invented series: seeded, 3 decimals (what the CSV carries), single gaps, a 7-hour gap (which
# voids some 8-h windows) and a 30-hour gap (voids every window across it).
rng = np.random.default_rng(20260101)
values = np.round(0.5 + 2.0 * rng.random(N) + np.sin(np.arange(N) / 12.0), 3)
values[rng.random(N) < 0.12] = np.nan
values[400:407] = np.nan
values[1200:1230] = np.nan
t0 = pd.Timestamp("2025-01-01T00:00Z")
times = pd.date_range(t0, periods=N, freq="h")

with tempfile.TemporaryDirectory() as tmp:
    obs = os.path.join(tmp, "series.csv")
    with open(obs, "w") as f:
        f.write("# invented series for the running-mean reference test\n")
        f.write("time,CO [ppm]\n")
        for t, v in zip(times, values):
            f.write("%s,%s\n" % (t.strftime("%Y-%m-%dT%H:%MZ"), "" if np.isnan(v) else "%.3f" % v))
    out = os.path.join(tmp, "out")
    args = [BINARY, "observe", obs, "--rules", "us-naaqs", "--lst-offset", "+00:00",
            "--no-aqi", "--no-aqhi", "-o", out, "--prefix", "ref_"]
    for k, m in WINDOWS:
        args += ["--rolling", "%d:%d" % (k, m)]
    p = subprocess.run(args, capture_output=True, text=True)
    if p.returncode != 0:
        print("lidbox failed:", p.returncode, p.stderr)
        sys.exit(1)

    nc = os.path.join(tmp, "series.nc")
    ds = netCDF4.Dataset(nc, "w", format="NETCDF3_CLASSIC")  # classic: no HDF5 noise in cdo
    ds.createDimension("time", None)
    tv = ds.createVariable("time", "f8", ("time",))
    tv.units = "hours since 2025-01-01 00:00:00"
    tv.calendar = "standard"
    cv = ds.createVariable("co", "f8", ("time",), fill_value=-9999.0)
    tv[:] = np.arange(N, dtype="f8")
    cv[:] = np.ma.masked_invalid(values)
    ds.close()

    series = pd.Series(values)
    for k, m in WINDOWS:
        with open(os.path.join(out, "ref_rolling_%dh_min%d.csv" % (k, m))) as f:
            rows = list(csv.DictReader(f))
        lid = np.array([float(r["mean"]) if r["mean"] else np.nan for r in rows])
        starts = pd.to_datetime([r["window_start_utc"] for r in rows])
        ends = pd.to_datetime([r["window_end_utc"] for r in rows])
        full = N - k + 1
        if len(lid) != N or any(int(r["min_valid_hours"]) != m for r in rows):
            failures.append("k=%d: %d rows or wrong min_valid_hours" % (k, len(lid)))
            continue
        # pandas: trailing window labelled at its last row -> shift back to the window start.
        pdm = series.rolling(k, min_periods=m).mean().shift(-(k - 1)).to_numpy()[:full]
        # Labels: lidbox end = start + k h; pandas' label (last row) = end - 1 h.
        pandas_labels = times[k - 1:]
        if not (ends[:full] - pd.Timedelta(hours=1) == pandas_labels).all() or \
           not (starts[:full] == times[:full]).all():
            failures.append("k=%d: window labels do not line up with pandas" % k)
        cmd = ("cdo -s outputf,%%.6f,1 -ifthen -gec,%d -runsum,%d -setmisstoc,0 "
               "-setrtoc,-1e30,1e30,1 %s -runmean,%d %s" % (m, k, nc, k, nc))
        c = subprocess.run(cmd, shell=True, capture_output=True, text=True)
        cdo = np.array([float(x) for x in c.stdout.split()])
        cdo[cdo == -9999.0] = np.nan
        if len(cdo) != full:
            failures.append("k=%d: cdo gave %d values, expected %d (%s)" % (k, len(cdo), full, c.stderr))
            continue
        a = lid[:full]
        for name, ref, tol in (("pandas", pdm, 1e-9), ("cdo", cdo, 1e-6)):
            same_nan = np.array_equal(np.isnan(a), np.isnan(ref))
            ok = ~np.isnan(a) & ~np.isnan(ref)
            worst = float(np.max(np.abs(a[ok] - ref[ok]))) if ok.any() else 0.0
            print("k=%2d m=%2d vs %-6s: %4d windows, %3d missing, max |diff| = %.2e" %
                  (k, m, name, full, int(np.isnan(ref).sum()), worst))
            if not same_nan:
                failures.append("k=%d vs %s: missing windows differ" % (k, name))
            if worst > tol * max(1.0, float(np.nanmax(np.abs(ref)))):
                failures.append("k=%d vs %s: max difference %.3g above %.1g" % (k, name, worst, tol))
        # The gaps must have voided windows, or the test would not test completeness.
        if not np.isnan(pdm).any():
            failures.append("k=%d: no incomplete window in the test series" % k)

for f in failures:
    print("FAIL:", f)
sys.exit(1 if failures else 0)
