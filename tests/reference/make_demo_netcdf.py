#!/usr/bin/env python3
"""Turns an invented demo met CSV into the CF-NetCDF demo files (all INVENTED data).

    /usr/bin/python3 tests/reference/make_demo_netcdf.py met-demo/cindervale-met.csv met-demo/

The CSV has a header `time,<name> [<unit>],...` (for example `mixing_height [m]`,
`wind_speed [m/s]`, `wind_from [deg]`, `air_temperature [degC]`), times in ISO 8601 with an
offset or Z, one row per hour, and empty fields for gaps. Written next to it (NETCDF3_CLASSIC,
read cleanly by cdo, ncdump, xarray and lidbox):

  <stem>-point.nc     the same series as a CF single timeSeries (Appendix H.4): doubles, so that a
                      run from it gives the same hours as a run from the CSV; gaps as _FillValue;
                      hour means with time_bnds (time = start of the hour, as the CSV labels them).
  <stem>-grid.nc      (time, lat, lon) on 5 x 7 cells of 0.05 deg around the point, the first
                      72 hours: the centre cell holds the point values exactly, the others vary
                      smoothly around them (formulas below); mixing height packed as shorts.
  <stem>-ensemble.nc  (realization, time) with 5 members at the point: member 0 is the point
                      series, members 1..4 perturb lid, wind speed and direction (formulas below).

The location is invented too (default 41.0 N, -112.0 E, round numbers for an invented city).
Deterministic: no random numbers, so a rerun gives the same files. Needs python3-netcdf4 and
numpy (Debian's /usr/bin/python3).
"""
import argparse
import csv
import datetime as dt
import os
import re
import sys

import netCDF4
import numpy as np

INVENTED = ("INVENTED demo data: an invented basin city with made-up meteorology; nothing here "
            "describes a real place or real measurements.")
CAUTION = ("Screening estimate from a single well-mixed box model; not an official forecast, "
           "air-quality alert or compliance determination. Official forecasts and alerts, local "
           "regulations and licensed professional practice prevail.")
FILL = -9999.0

# CSV column name -> (variable name, CF standard name)
KNOWN = {
    "mixing_height": ("mixing_height", "atmosphere_boundary_layer_thickness"),
    "wind_speed": ("wind_speed", "wind_speed"),
    "wind_from": ("wind_from_direction", "wind_from_direction"),
    "wind_from_direction": ("wind_from_direction", "wind_from_direction"),
    "eastward_wind": ("eastward_wind", "eastward_wind"),
    "northward_wind": ("northward_wind", "northward_wind"),
    "air_temperature": ("air_temperature", "air_temperature"),
    "surface_pressure": ("surface_air_pressure", "surface_air_pressure"),
}
# CSV unit spellings -> UDUNITS spellings for the units attribute.
UNITS = {"m/s": "m s-1", "deg": "degree", "degrees": "degree", "ug/m3": "ug m-3",
         "mg/m3": "mg m-3", "km/h": "km h-1"}


def read_csv(path):
    with open(path, newline="") as f:
        rows = list(csv.reader(f))
    header, body = rows[0], [r for r in rows[1:] if r]
    if header[0].strip() != "time":
        sys.exit(f"{path}: first column is {header[0]!r}; expected 'time'")
    columns = []
    for h in header[1:]:
        m = re.fullmatch(r"\s*([A-Za-z0-9_]+)\s*\[([^\]]+)\]\s*", h)
        if not m:
            sys.exit(f"{path}: column {h!r}; expected 'name [unit]'")
        columns.append((m.group(1), m.group(2).strip()))
    times = []
    for r in body:
        t = dt.datetime.fromisoformat(r[0].replace("Z", "+00:00"))
        if t.tzinfo is None:
            sys.exit(f"{path}: time {r[0]!r} without an offset; expected Z or +hh:mm")
        times.append(t.astimezone(dt.timezone.utc))
    for a, b in zip(times, times[1:]):
        if (b - a) != dt.timedelta(hours=1):
            sys.exit(f"{path}: step {a} -> {b}; expected one row per hour")
    values = np.array([[float(x) if x.strip() else np.nan for x in r[1:]] for r in body])
    return times, columns, values


def time_axis(ds, times, hours, bounds):
    ds.createDimension("time", hours)
    t = ds.createVariable("time", "f8", ("time",))
    t.standard_name = "time"
    t.long_name = "start of the hour" if bounds else "time"
    t.units = "hours since %s +00:00" % times[0].strftime("%Y-%m-%d %H:%M:%S")
    t.calendar = "standard"
    t.units_metadata = "leap_seconds: none"
    t.axis = "T"
    t[:] = np.arange(hours, dtype="f8")
    if bounds:
        ds.createDimension("nv", 2)
        t.bounds = "time_bnds"
        b = ds.createVariable("time_bnds", "f8", ("time", "nv"))
        b[:] = np.stack([np.arange(hours), np.arange(hours) + 1.0], axis=1)


def globals_(ds, title, csv_name, args):
    ds.Conventions = "CF-1.12"
    ds.title = title
    ds.invented = "true"
    ds.comment = INVENTED
    ds.source = "tests/reference/make_demo_netcdf.py from " + csv_name
    ds.source_csv = csv_name
    ds.history = "make_demo_netcdf.py " + " ".join(
        os.path.basename(x.rstrip("/")) or x for x in args)
    ds.caution = CAUTION


def scalar_position(ds, lat_deg, lon_deg):
    lat = ds.createVariable("lat", "f8", ())
    lat.standard_name, lat.units = "latitude", "degrees_north"
    lat[...] = lat_deg
    lon = ds.createVariable("lon", "f8", ())
    lon.standard_name, lon.units = "longitude", "degrees_east"
    lon[...] = lon_deg


def data_var(ds, name, sn, units, dims, dtype="f8", long_name=None, reading="hour_average"):
    v = ds.createVariable(name, dtype, dims, fill_value=(FILL if dtype == "f8" else
                                                        (np.float32(FILL) if dtype == "f4" else np.int16(-32767))))
    if sn:
        v.standard_name = sn
    v.long_name = long_name or name.replace("_", " ")
    v.units = units
    v.cell_methods = "time: mean (interval: 1 hour)" if reading == "hour_average" else "time: point"
    return v


def main():
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("csv")
    ap.add_argument("outdir")
    ap.add_argument("--lat", type=float, default=41.0, help="invented latitude [degrees_north]")
    ap.add_argument("--lon", type=float, default=-112.0, help="invented longitude [degrees_east]")
    ap.add_argument("--station", default="city_centre", help="station id of the point series")
    ap.add_argument("--reading", choices=["hour_average", "instantaneous"], default="hour_average",
                    help="how the CSV's values are meant (the demo's are hour means)")
    a = ap.parse_args()
    times, columns, values = read_csv(a.csv)
    n = len(times)
    stem = os.path.splitext(os.path.basename(a.csv))[0]
    csv_name = os.path.basename(a.csv)
    bounds = a.reading == "hour_average"
    known = {}  # variable name -> (standard name, units, values)
    others = []
    for k, (col, unit) in enumerate(columns):
        units = UNITS.get(unit, unit)
        if col in KNOWN:
            name, sn = KNOWN[col]
            known[name] = (sn, units, values[:, k])
        else:
            others.append((re.sub(r"[^A-Za-z0-9_]", "_", col), units, values[:, k], col))

    # -- point: CF single timeSeries (Appendix H.4) ----------------------------------------------
    point = os.path.join(a.outdir, stem + "-point.nc")
    with netCDF4.Dataset(point, "w", format="NETCDF3_CLASSIC") as ds:
        globals_(ds, "INVENTED demo met at one point, as a CF timeSeries", csv_name, sys.argv[1:])
        ds.featureType = "timeSeries"
        time_axis(ds, times, n, bounds)
        ds.createDimension("name_strlen", len(a.station))
        scalar_position(ds, a.lat, a.lon)
        st = ds.createVariable("station_name", "S1", ("name_strlen",))
        st.cf_role = "timeseries_id"
        st.long_name = "station name (invented)"
        st[:] = netCDF4.stringtochar(np.array([a.station], dtype="S%d" % len(a.station)))[0]
        for name, (sn, units, vals) in known.items():
            v = data_var(ds, name, sn, units, ("time",), reading=a.reading)
            v.coordinates = "time lat lon station_name"
            v[:] = np.ma.masked_invalid(vals)
        for name, units, vals, col in others:
            v = data_var(ds, name, "", units, ("time",), long_name=col, reading=a.reading)
            v.coordinates = "time lat lon station_name"
            v[:] = np.ma.masked_invalid(vals)

    # -- grid: 5 x 7 cells, 72 hours ----------------------------------------------------------------
    hours = min(n, 72)
    di = np.arange(-2, 3)[:, None]  # latitude offset index
    dj = np.arange(-3, 4)[None, :]  # longitude offset index
    # Smooth invented fields, exactly 1 (or 0) at the centre cell:
    #   lid   h * (1 + 0.04 di - 0.03 dj + 0.01 di dj)       (deeper to the north-west)
    #   speed s * (1 + 0.05 |dj| + 0.03 |di|)                (calmer on the basin floor)
    #   from  (d + 4 di - 3 dj) mod 360 [deg]
    #   temperature T + 0.4 |di| + 0.3 |dj| [same unit]      (cold pool in the middle)
    grid = os.path.join(a.outdir, stem + "-grid.nc")
    with netCDF4.Dataset(grid, "w", format="NETCDF3_CLASSIC") as ds:
        globals_(ds, "INVENTED demo met on a small grid around the point", csv_name, sys.argv[1:])
        ds.grid_comment = ("5 x 7 cells of 0.05 deg; the centre cell (lat index 2, lon index 3) "
                           "holds the point series exactly; the first %d hours" % hours)
        time_axis(ds, times, hours, bounds)
        ds.createDimension("lat", 5)
        ds.createDimension("lon", 7)
        la = ds.createVariable("lat", "f8", ("lat",))
        la.standard_name, la.units = "latitude", "degrees_north"
        la[:] = a.lat + 0.05 * np.arange(-2, 3)
        lo = ds.createVariable("lon", "f8", ("lon",))
        lo.standard_name, lo.units = "longitude", "degrees_east"
        lo[:] = a.lon + 0.05 * np.arange(-3, 4)
        for name, (sn, units, vals) in known.items():
            x = vals[:hours, None, None]
            if name == "mixing_height":
                field = x * (1 + 0.04 * di - 0.03 * dj + 0.01 * di * dj)
                v = data_var(ds, name, sn, units, ("time", "lat", "lon"), dtype="i2", reading=a.reading)
                v.scale_factor = 0.1  # packed: 0.1 m resolution (CF 8.1)
                v.add_offset = 0.0
            elif name == "wind_speed":
                field = x * (1 + 0.05 * np.abs(dj) + 0.03 * np.abs(di))
                v = data_var(ds, name, sn, units, ("time", "lat", "lon"), dtype="f4", reading=a.reading)
            elif name == "wind_from_direction":
                field = (x + 4.0 * di - 3.0 * dj) % 360.0
                v = data_var(ds, name, sn, units, ("time", "lat", "lon"), dtype="f4", reading=a.reading)
            elif name == "air_temperature":
                field = x + 0.4 * np.abs(di) + 0.3 * np.abs(dj)
                v = data_var(ds, name, sn, units, ("time", "lat", "lon"), dtype="f4", reading=a.reading)
            else:
                field = x + 0.0 * di * dj
                v = data_var(ds, name, sn, units, ("time", "lat", "lon"), dtype="f4", reading=a.reading)
            v[:] = np.ma.masked_invalid(field)

    # -- ensemble: 5 members at the point -----------------------------------------------------------
    members = 5
    t = np.arange(n)[None, :]
    m = np.arange(members)[:, None]
    # Member m > 0 (phase m, amplitude growing with m; member 0 unperturbed):
    #   lid   h * (1 + 0.05 m sin(2 pi t / 24 + m))
    #   speed s * (1 + 0.04 m cos(2 pi t / 30 + m))
    #   from  (d + 5 m sin(2 pi t / 48 + m)) mod 360
    ens = os.path.join(a.outdir, stem + "-ensemble.nc")
    with netCDF4.Dataset(ens, "w", format="NETCDF3_CLASSIC") as ds:
        globals_(ds, "INVENTED demo met ensemble at the point (5 members)", csv_name, sys.argv[1:])
        time_axis(ds, times, n, bounds)
        ds.createDimension("realization", members)
        r = ds.createVariable("realization", "i4", ("realization",))
        r.standard_name = "realization"
        r.long_name = "ensemble member (0 is the unperturbed series)"
        r[:] = np.arange(members)
        scalar_position(ds, a.lat, a.lon)
        for name, (sn, units, vals) in known.items():
            x = vals[None, :]
            if name == "mixing_height":
                field = x * (1 + 0.05 * m * np.sin(2 * np.pi * t / 24 + m))
            elif name == "wind_speed":
                field = x * (1 + 0.04 * m * np.cos(2 * np.pi * t / 30 + m))
            elif name == "wind_from_direction":
                field = (x + 5.0 * m * np.sin(2 * np.pi * t / 48 + m)) % 360.0
            else:
                field = x + 0.0 * m
            v = data_var(ds, name, sn, units, ("realization", "time"), reading=a.reading)
            v.coordinates = "time lat lon"
            v[:] = np.ma.masked_invalid(field)
    for p in (point, grid, ens):
        print("wrote", p, os.path.getsize(p), "bytes")


if __name__ == "__main__":
    main()
