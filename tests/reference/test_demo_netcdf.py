"""The NetCDF demo files in met-demo/ (INVENTED data) read by lidbox give the demo series.

- the point file, through `lidbox met-dump`, equals its own values as netCDF4 reads them
  (degC -> K, speed and direction -> components by the WMO-No. 8 convention), gaps included;
- the grid's cell nearest the point, and ensemble member 0, equal the point series (by the
  construction in make_demo_netcdf.py), and the footprint mean equals xarray's cos-latitude
  weighted mean of the same cells;
- when the demo CSV named in the files is present (met-demo/, or LIDBOX_DEMO_CSV), the script
  rerun from it reproduces the committed files value for value.

Run: /usr/bin/python3 test_demo_netcdf.py <lidbox-binary> <source-dir>  (exit 77 = skipped)
"""
import csv
import io
import os
import shutil
import subprocess
import sys
import tempfile

try:
    import netCDF4
    import numpy as np
    import xarray as xr
except ImportError as e:
    print(f"skipped: {e}")
    sys.exit(77)

LIDBOX, SRC = sys.argv[1], sys.argv[2]
DEMO = os.path.join(SRC, "met-demo")
STEM = "cindervale-met"
FILES = {k: os.path.join(DEMO, f"{STEM}-{k}.nc") for k in ("point", "grid", "ensemble")}
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def dump(path, *opts):
    p = subprocess.run([LIDBOX, "met-dump", path, *opts], capture_output=True, text=True)
    if p.returncode != 0:
        raise AssertionError(f"met-dump {path} {opts}: {p.returncode} {p.stderr}")
    rows = list(csv.reader(io.StringIO(p.stdout)))
    cols = {}
    for i, name in enumerate(rows[0]):
        vals = [r[i] for r in rows[1:]]
        cols[name] = vals if name == "time" else np.array([float(x) if x else np.nan for x in vals])
    return cols


def same(a, b, rtol, atol=0.0):
    return a.shape == b.shape and bool(np.allclose(a, b, rtol=rtol, atol=atol, equal_nan=True))


for k, p in FILES.items():
    check(os.path.exists(p), f"{p} is missing")
if failures:
    sys.exit(1)

for k, p in FILES.items():
    with netCDF4.Dataset(p) as ds:
        check(ds.invented == "true" and ds.comment.startswith("INVENTED"), f"{k}: labelled invented")

with netCDF4.Dataset(FILES["point"]) as ds:
    h = ds["mixing_height"][:].astype("f8").filled(np.nan)
    s = ds["wind_speed"][:].astype("f8").filled(np.nan)
    d = ds["wind_from_direction"][:].astype("f8").filled(np.nan)
    ta = ds["air_temperature"][:].astype("f8").filled(np.nan)
    check(ds["air_temperature"].units == "degC", "point: temperature in degC as in the CSV")
    source_csv = ds.source_csv
u = -s * np.sin(np.radians(d))
v = -s * np.cos(np.radians(d))
pt = dump(FILES["point"])
check(pt["time"][0] == "2026-01-12T07:00:00Z" and len(pt["time"]) == 168, f"point: {pt['time'][0]}, {len(pt['time'])} hours")
check(same(pt["mixing_height [m]"], h, 0, 1e-9), "point: mixing height")
check(same(pt["eastward_wind [m/s]"], u, 1e-9, 1e-9), "point: u")
check(same(pt["northward_wind [m/s]"], v, 1e-9, 1e-9), "point: v")
check(same(pt["air_temperature [K]"], ta + 273.15, 1e-12, 1e-9), "point: T")
check(int(np.isnan(pt["mixing_height [m]"]).sum()) == 2, "point: the demo's two-hour gap is kept as a gap")

# Grid: the cell at the point is the point series (packed to 0.1 m, floats to 1e-7).
g = dump(FILES["grid"], "--point", "41.0,-112.0")
n = len(g["time"])
check(n == 72 and g["time"] == pt["time"][:72], "grid: the first 72 hours")
check(same(g["mixing_height [m]"], h[:n], 0, 0.05 + 1e-9), "grid: centre cell = point (mixing height)")
check(same(g["eastward_wind [m/s]"], u[:n], 1e-6, 1e-6), "grid: centre cell = point (u)")
fp = dump(FILES["grid"], "--footprint", "40.9,41.1,-112.2,-111.8")
x = xr.open_dataset(FILES["grid"])
w = np.cos(np.deg2rad(x.lat))
ref = x.mixing_height.astype("f8").weighted(w).mean(("lat", "lon")).values
# xarray skips missing cells by default; lidbox calls an hour with any missing cell missing, and
# the demo's gaps cover every cell, so the two agree here.
# xarray unpacks the shorts to float32, hence the tolerance.
check(same(fp["mixing_height [m]"], ref, 1e-6, 1e-6), "grid: footprint mean = xarray weighted mean")
corner = dump(FILES["grid"], "--point", "40.9,-112.15")  # di = -2, dj = -3: h * (1 + 0.07)
check(same(corner["mixing_height [m]"], h[:n] * 1.07, 0, 0.05 + 1e-9), "grid: the corner cell follows its formula")

e0 = dump(FILES["ensemble"], "--member", "0")
# The CSV from met-dump carries 10 significant digits.
check(same(e0["mixing_height [m]"], h, 0, 1e-9) and same(e0["eastward_wind [m/s]"], u, 1e-9, 1e-9),
      "ensemble: member 0 = point")
e4 = dump(FILES["ensemble"], "--member", "4")
check(float(np.nanmax(np.abs(e4["mixing_height [m]"] / h - 1.0))) > 0.1, "ensemble: member 4 is perturbed")

csv_path = os.environ.get("LIDBOX_DEMO_CSV", os.path.join(DEMO, source_csv))
if os.path.exists(csv_path):
    tmp = tempfile.mkdtemp(prefix="demo-netcdf-", dir=os.getcwd())
    shutil.copy(csv_path, os.path.join(tmp, source_csv))
    subprocess.run(["/usr/bin/python3", os.path.join(SRC, "tests", "reference", "make_demo_netcdf.py"),
                    os.path.join(tmp, source_csv), tmp], check=True, capture_output=True)
    for k, p in FILES.items():
        with netCDF4.Dataset(p) as a, netCDF4.Dataset(os.path.join(tmp, os.path.basename(p))) as b:
            for name, var in a.variables.items():
                if var.dtype.kind == "S":
                    continue
                check(same(var[:].astype("f8").filled(np.nan), b[name][:].astype("f8").filled(np.nan), 0, 0),
                      f"{k}: {name} is not what make_demo_netcdf.py makes from {csv_path}; rerun it")
    shutil.rmtree(tmp)
    print("committed files reproduced from", csv_path)
else:
    print("note: the demo CSV", source_csv, "is not in met-demo/; reproduction not checked")

if failures:
    sys.exit(1)
print("demo NetCDF files agree")
