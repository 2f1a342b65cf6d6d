#!/usr/bin/env python3
"""Writes an INVENTED reanalysis-sized grid for the grid benchmark: HOURS x 100 x 100 cells of
blh, u10, v10 as packed shorts (ERA5 layout, time in hours since 1900), a day of maps per chunk.
Smooth invented fields (a diurnal lid, a slow synoptic wind, a basin), so that it compresses.

    /usr/bin/python3 make_bench_grid.py OUT.nc HOURS
"""
import sys

import numpy as np
from netCDF4 import Dataset

out, hours = sys.argv[1], int(sys.argv[2])
NY = NX = 100
lat = 30.0 + 0.25 * np.arange(NY)
lon = -120.0 + 0.25 * np.arange(NX)
LON, LAT = np.meshgrid(lon, lat)
basin = np.exp(-(((LON + 107.5) / 3.0) ** 2 + ((LAT - 42.0) / 2.0) ** 2))
with Dataset(out, "w", format="NETCDF4") as nc:
    nc.comment = "INVENTED benchmark grid (lidbox tests/bench), not real data"
    nc.createDimension("time", None)
    nc.createDimension("latitude", NY)
    nc.createDimension("longitude", NX)
    t = nc.createVariable("time", "i4", ("time",))
    t.units = "hours since 1900-01-01 00:00:00.0"
    t.calendar = "gregorian"
    la = nc.createVariable("latitude", "f4", ("latitude",))
    la.units = "degrees_north"
    la[:] = lat
    lo = nc.createVariable("longitude", "f4", ("longitude",))
    lo.units = "degrees_east"
    lo[:] = lon
    spec = {"blh": ("m", 1.0, 1600.0), "u10": ("m s**-1", 0.01, 0.0), "v10": ("m s**-1", 0.01, 0.0)}
    vs = {}
    for name, (units, scale, offset) in spec.items():
        v = nc.createVariable(name, "i2", ("time", "latitude", "longitude"), zlib=True, complevel=1,
                              chunksizes=(24, NY, NX), fill_value=-32767)
        v.set_auto_maskandscale(False)
        v.scale_factor, v.add_offset, v.units = scale, offset, units
        vs[name] = (v, scale, offset)
    for d0 in range(0, hours, 24):
        n = min(24, hours - d0)
        h = np.arange(d0, d0 + n)[:, None, None]
        sun = np.clip(np.sin(np.pi * ((h % 24) - 14) / 12.0), 0, None)  # local noon near 19Z
        syn = 0.5 + 0.5 * np.sin(2 * np.pi * h / (24 * 5.3))
        blh = (150 + 1400 * sun) * (1 - 0.5 * basin * syn) + 30
        speed = (1 + 6 * (1 - syn)) * (1 - 0.5 * basin)
        u = speed * np.cos(2 * np.pi * h / 97.0)
        v = speed * np.sin(2 * np.pi * h / 97.0)
        for name, data in (("blh", blh), ("u10", u), ("v10", v)):
            var, scale, offset = vs[name]
            var[d0:d0 + n] = np.round((np.broadcast_to(data, (n, NY, NX)) - offset) / scale).astype("i2")
        t[d0:d0 + n] = 1104504 + np.arange(d0, d0 + n)
