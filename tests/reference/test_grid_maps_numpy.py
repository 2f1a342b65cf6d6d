#!/usr/bin/env python3
"""`lidbox grid`'s maps against an independent numpy implementation of the same maps: the `maps`
mode of tests/bench/bench_grid_reference.py, which the grid benchmark (grid.sh) also times, so
this test also shows that the benchmark compares the same job.

On a short INVENTED bench grid (make_bench_grid.py, HOURS hours, default 1460: two months and a
partial day, the year and month periods), runs `lidbox grid`
and the numpy maps, and compares every map variable of maps_year.nc and maps_month.nc with the
numpy one: day counts and streaks exactly, continuous fields to 1e-9 relative; the records' time
and time_bnds exactly and the fill values in the same cells. Prints the worst difference per
variable. The reference is numpy (Debian's python3-numpy, np.percentile's default linear method,
np.expm1) following the definitions in include/lidbox/grid/grid_run.hpp.

Run: /usr/bin/python3 test_grid_maps_numpy.py <lidbox-binary> <source-dir> [HOURS]
Exit 0 on agreement, 1 on a disagreement, 77 when netCDF4 is missing (skipped).
"""
import os
import subprocess
import sys
import tempfile

try:
    import numpy as np
    from netCDF4 import Dataset
except ImportError as e:
    print(f"skipped: {e}")
    sys.exit(77)

LIDBOX, SRC = sys.argv[1], sys.argv[2]
HOURS = int(sys.argv[3]) if len(sys.argv) > 3 else 1460
PY = sys.executable
BENCH = os.path.join(SRC, "tests", "bench")
COUNTS = ("valid_days", "stagnation_days_", "longest_streak_", "stagnation_episodes_", "exceedance_days")
RTOL = 1e-9
failures = []


def check(cond, what):
    print(("ok: " if cond else "FAIL: ") + what)
    if not cond:
        failures.append(what)


with open(os.path.join(BENCH, "bench-grid-case.toml.in")) as f:
    CASE = f.read()  # the benchmark's case (tests/bench/grid.sh), on the grid made below

with tempfile.TemporaryDirectory() as tmp:
    grid = os.path.join(tmp, "grid-%d.nc" % HOURS)
    subprocess.run([PY, os.path.join(BENCH, "make_bench_grid.py"), grid, str(HOURS)], check=True)
    case = os.path.join(tmp, "case.toml")
    with open(case, "w") as f:
        f.write(CASE.replace("@GRID_FILE@", grid))
    p = subprocess.run([LIDBOX, "grid", case, "-o", os.path.join(tmp, "out"), "-q"],
                       capture_output=True, text=True)
    check(p.returncode == 0, "lidbox grid exit 0 " + p.stderr.strip())
    ref_path = os.path.join(tmp, "ref.nc")
    p = subprocess.run([PY, os.path.join(BENCH, "bench_grid_reference.py"), "maps", grid, ref_path],
                       capture_output=True, text=True)
    check(p.returncode == 0, "numpy maps exit 0 " + p.stderr.strip())
    if failures:
        sys.exit(1)
    ref_file = Dataset(ref_path)
    for kind in ("year", "month"):
        lb = Dataset(os.path.join(tmp, "out", "maps_%s.nc" % kind))
        ref = ref_file[kind]
        n_lb, n_ref = lb.dimensions["time"].size, ref.dimensions["time"].size
        check(n_lb == n_ref and n_lb > 0, "%s: %d records (numpy %d)" % (kind, n_lb, n_ref))
        if n_lb != n_ref:
            continue
        check(np.array_equal(lb["time"][:], ref["time"][:]) and
              np.array_equal(lb["time_bnds"][:], ref["time_bnds"][:]),
              "%s: time and time_bnds equal (%s)" % (kind, lb["time_bnds"][:].tolist()))
        maps = [v for v in lb.variables if lb[v].dimensions[1:] == ("latitude", "longitude")]
        check(sorted(maps) == sorted(v for v in ref.variables if ref[v].ndim == 3),
              "%s: the same variables (lidbox %s)" % (kind, maps))
        for name in maps:
            if name not in ref.variables:
                continue
            a = np.ma.filled(lb[name][:].astype(float), np.nan)
            b = np.asarray(ref[name][:], dtype=float)
            same_fill = np.array_equal(np.isnan(a), np.isnan(b))
            ok = np.isfinite(b) & np.isfinite(a)
            desc = "range %.6g..%.6g" % (np.nanmin(b), np.nanmax(b)) if ok.any() else "all fill"
            if name.startswith(COUNTS):
                worst = float(np.max(np.abs(a[ok] - b[ok]), initial=0.0))
                differ = int(np.count_nonzero(a[ok] != b[ok]))
                check(same_fill and differ == 0,
                      "%s %s exact: worst difference %g day(s), %d cell-records differ (%s)" %
                      (kind, name, worst, differ, desc))
            else:
                rel = np.abs(a[ok] - b[ok]) / np.abs(b[ok])
                worst = float(np.max(rel, initial=0.0))
                check(same_fill and worst <= RTOL,
                      "%s %s within %g relative: worst %.3e (%s)" % (kind, name, RTOL, worst, desc))
        # The case must exercise what is compared: counts that vary over the grid.
        for name in maps:
            if name.startswith(("stagnation_days_", "exceedance_days")):
                b = np.asarray(ref[name][:], dtype=float)
                check(np.nanmin(b) < np.nanmax(b), "%s %s varies over the grid" % (kind, name))

if failures:
    print("%d failure(s)" % len(failures))
    sys.exit(1)
print("the numpy maps mode and lidbox grid agree on %d hours" % HOURS)
