"""`lidbox grid` on the invented basin demo (met-demo/basin-grid.toml), checked against numpy:

- the maps open in xarray with latitude/longitude coordinates equal to the input's, the units
  and the monthly time bounds (CF 7.1);
- ventilation mean and percentiles of the daily mean ventilation, recomputed with numpy
  (np.percentile, linear) from the input as netCDF4 unpacks it, on local-standard days (UTC-7);
- stagnation days by Horton et al. (2014) (daily mean 10 m wind < 3.2 m/s, daily mean 500 hPa
  wind < 13 m/s, daily precipitation < 1 mm) recomputed with numpy, cell by cell;
- the series file's cells are the ones asked for.

Run: /usr/bin/python3 test_grid_maps.py <lidbox-binary> <source-dir>  (exit 77 = skipped)
"""
import os
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
failures = []


def check(cond, what):
    print(("ok: " if cond else "FAIL: ") + what)
    if not cond:
        failures.append(what)


with tempfile.TemporaryDirectory() as tmp:
    p = subprocess.run([LIDBOX, "grid", os.path.join(SRC, "met-demo", "basin-grid.toml"), "-o", tmp, "-q"],
                       capture_output=True, text=True)
    check(p.returncode == 0, "lidbox grid exit 0: " + p.stderr)
    inp = netCDF4.Dataset(os.path.join(SRC, "met-demo", "basin-grid.nc"))
    blh = inp["blh"][:].filled(np.nan)
    wind = np.hypot(inp["u10"][:].filled(np.nan), inp["v10"][:].filled(np.nan))
    ws500 = inp["ws500"][:].filled(np.nan)
    tp = inp["tp"][:].filled(np.nan)
    lat, lon = inp["latitude"][:], inp["longitude"][:]

    ds = xr.open_dataset(os.path.join(tmp, "maps_month.nc"))
    check(np.array_equal(ds["latitude"].values, np.asarray(lat, dtype=float)), "latitude coordinate as the input's")
    check(np.array_equal(ds["longitude"].values, np.asarray(lon, dtype=float)), "longitude coordinate as the input's")
    check(ds["latitude"].attrs["units"] == "degrees_north" and ds["longitude"].attrs["units"] == "degrees_east",
          "coordinate units")
    check(ds["ventilation_mean"].attrs["units"] == "m2 s-1", "ventilation units m2 s-1")
    check(ds["stagnation_days_horton_2014"].attrs["units"] == "day", "stagnation days in days")
    check(ds["dilution_mean"].attrs["units"] == "s m-1", "dilution units s m-1")
    jan = ds.sel(time="2026-01")
    check(jan.sizes["time"] == 1, "one January record")
    bounds = jan["time_bnds"].values[0]
    # local standard months of UTC-7: 2026-01-01T07:00Z to 2026-02-01T07:00Z
    check(str(bounds[0]).startswith("2026-01-01T07:00") and str(bounds[1]).startswith("2026-02-01T07:00"),
          "January bounds in local standard time: %s" % bounds)

    # Reference days: the model hours are records 0..718 (instantaneous reading: the last record
    # only ends hour 718); local standard days of UTC-7 start at 07Z, so complete January days
    # are hours 7..7+24k; the demo starts 2026-01-01T00Z.
    hours = blh.shape[0] - 1
    first = 7
    ndays = (hours - first) // 24
    sl = slice(first, first + 24 * ndays)
    shape = (ndays, 24) + blh.shape[1:]
    vent = (blh[sl] * wind[sl]).reshape(shape)
    daily_vent = vent.mean(axis=1)
    check(np.allclose(jan["valid_days"].values[0], ndays), "valid days %d" % ndays)
    mean_ref = daily_vent.mean(axis=0)
    got = jan["ventilation_mean"].values[0]
    check(np.allclose(got, mean_ref, rtol=1e-9, atol=0), "ventilation mean (max rel diff %.2e)" %
          np.max(np.abs(got / mean_ref - 1)))
    for q in (10, 50, 90):
        ref = np.percentile(daily_vent, q, axis=0)
        got = jan["ventilation_p%d" % q].values[0]
        check(np.allclose(got, ref, rtol=1e-9, atol=0), "ventilation p%d as np.percentile (max rel diff %.2e)" %
              (q, np.max(np.abs(got / ref - 1))))
    w10 = wind[sl].reshape(shape).mean(axis=1)
    w500 = ws500[sl].reshape(shape).mean(axis=1)
    rain = tp[sl].reshape(shape).sum(axis=1)
    stag_ref = ((w10 < 3.2) & (w500 < 13.0) & (rain < 0.001)).sum(axis=0)
    got = jan["stagnation_days_horton_2014"].values[0]
    check(np.array_equal(got, stag_ref), "Horton stagnation days cell by cell (reference max %d, basin cells %d)" %
          (stag_ref.max(), int((stag_ref > 0).sum())))
    check(stag_ref.max() > 5 and stag_ref.min() < stag_ref.max(), "the basin stands out in the map")

    s = xr.open_dataset(os.path.join(tmp, "series.nc"))
    check(np.allclose(s["lat"].values, [41.05, 41.85]) or np.allclose(s["lat"].values, [40.95, 41.85]),
          "series cells near the asked points: %s" % s["lat"].values)
    check(s.sizes["time"] == hours, "series has every model hour")

if failures:
    print("%d failure(s)" % len(failures))
    sys.exit(1)
