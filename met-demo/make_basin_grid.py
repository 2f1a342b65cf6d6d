#!/usr/bin/env python3
"""Writes met-demo/basin-grid.nc: an INVENTED ERA5-like grid over an invented basin (no real
place, no real measurements), for `lidbox grid met-demo/basin-grid.toml`.

30 days of hourly values in January 2026 on 20 x 30 cells (0.1 deg, around 41 N 112 W only so
that local times look plausible). A basin of low ground in the west-centre of the grid keeps a
shallow lid and weak winds; the ridges around it mix deeper and blow harder. Two stagnation
spells (days 4-13 and 20-26) are ended by windy, wet fronts. Variables as ERA5 names them: blh
[m], u10, v10 [m s**-1], tp [m, the hour's precipitation], and ws500 [m s**-1], an invented
500 hPa wind speed; packed shorts with scale_factor/add_offset, time in hours since 1900
(int32), chunked a day of maps at a time, compressed. Deterministic (no random numbers).

    /usr/bin/python3 met-demo/make_basin_grid.py
"""
import math
import os

import numpy as np
from netCDF4 import Dataset

NT, NY, NX = 30 * 24, 20, 30
lat = 40.05 + 0.1 * np.arange(NY)
lon = -113.45 + 0.1 * np.arange(NX)
LON, LAT = np.meshgrid(lon, lat)
# The basin: a Gaussian hollow, elongated west-east, centred at 41.0 N, 112.6 W.
# Gentle ridges and valleys around it, for texture in the maps.
texture = np.sin(3.1 * LON) * np.cos(4.3 * LAT)
basin = np.exp(-(((LON + 112.6) / 0.55) ** 2 + ((LAT - 41.0) / 0.35) ** 2))

# Synoptic state per day: 1 = fully stagnant, 0 = well mixed.
stag = np.zeros(30)
stag[3:13] = np.linspace(0.6, 1.0, 10)
stag[19:26] = np.linspace(0.7, 0.95, 7)
rain_days = {13, 14, 26}

blh = np.empty((NT, NY, NX))
u10 = np.empty_like(blh)
v10 = np.empty_like(blh)
tp = np.zeros_like(blh)
ws500 = np.empty_like(blh)
for t in range(NT):
    day, hour_utc = divmod(t, 24)
    hour_local = (hour_utc - 7) % 24  # UTC-7
    s = stag[day]
    sun = max(0.0, math.sin(math.pi * (hour_local - 8) / 9.0)) if 8 <= hour_local <= 17 else 0.0
    night = 120 + 380 * (1 - s)
    afternoon = 1800 - 1300 * s
    depth = (night + (afternoon - night) * sun) * (1.0 - 0.55 * basin * s)
    blh[t] = depth * (1 + 0.04 * texture * math.sin(0.3 * t)) + 20
    speed = (7.5 - 6.0 * s) * (1.0 - 0.6 * basin * s) * (0.8 + 0.4 * sun)
    direction = math.radians(250 + 40 * math.sin(2 * math.pi * t / 97.0))  # wind from WSW-W
    u10[t] = -speed * math.sin(direction) * (1 + 0.1 * texture)
    v10[t] = -speed * math.cos(direction) * (1 - 0.1 * texture)
    ws500[t] = (24 - 15 * s) * (1 + 0.05 * (LAT - 41.0))
    if day in rain_days and 6 <= hour_utc <= 20:
        tp[t] = 0.0008 * (1 + 0.5 * texture)

path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "basin-grid.nc")
with Dataset(path, "w", format="NETCDF4") as nc:
    nc.title = "INVENTED ERA5-like hourly met over an invented basin (lidbox demo)"
    nc.comment = ("Invented scenario: not a real place, not real measurements. Written by "
                  "met-demo/make_basin_grid.py.")
    nc.createDimension("time", NT)
    nc.createDimension("latitude", NY)
    nc.createDimension("longitude", NX)
    t = nc.createVariable("time", "i4", ("time",))
    t.units = "hours since 1900-01-01 00:00:00.0"
    t.long_name = "time"
    t.calendar = "gregorian"
    t[:] = 1104504 + np.arange(NT)  # 2026-01-01T00:00Z
    la = nc.createVariable("latitude", "f4", ("latitude",))
    la.units = "degrees_north"
    la[:] = lat
    lo = nc.createVariable("longitude", "f4", ("longitude",))
    lo.units = "degrees_east"
    lo[:] = lon

    def packed(name, data, units, long_name, scale, offset):
        v = nc.createVariable(name, "i2", ("time", "latitude", "longitude"), zlib=True, complevel=6,
                              shuffle=True, chunksizes=(24, NY, NX), fill_value=-32767)
        v.set_auto_maskandscale(False)
        v.scale_factor = scale
        v.add_offset = offset
        v.units = units
        v.long_name = long_name
        v[:] = np.round((data - offset) / scale).astype("i2")

    packed("blh", blh, "m", "Boundary layer height", 5.0, 1600.0)
    packed("u10", u10, "m s**-1", "10 metre U wind component", 0.05, 0.0)
    packed("v10", v10, "m s**-1", "10 metre V wind component", 0.05, 0.0)
    packed("tp", tp, "m", "Total precipitation", 1e-5, 0.3)
    packed("ws500", ws500, "m s**-1", "Wind speed at 500 hPa (invented)", 0.1, 20.0)
print("wrote", path, os.path.getsize(path), "bytes")
