#!/usr/bin/env python3
"""References for the grid benchmark (tests/bench/grid.sh), each a whole process:

  read  FILE          a plain read of blh, u10, v10 through the NetCDF library (netCDF4,
                      unpacked), a day of maps at a time;
  numpy FILE          the numpy loop a user writes: the same box (unit flux, held hour means,
                      no residual layer, no loss, the 0.5 m/s and 50 m floors, 10 x 10 km, wind
                      along x) stepped hour by hour in every cell at once, with the exact
                      exponential step and lid dilution, reading a day of maps at a time.
  maps  FILE [OUT]    the numpy program a user writes for the maps `lidbox grid` writes for the
                      bench case (tests/bench/grid.sh): per year and per month, valid days,
                      stagnation days, longest streak and episodes by the reduced Korshover-Angell (1982)
                      form, mean and 10/50/90th percentiles of the daily mean ventilation, mean
                      daily mean concentration per unit flux and the days it exceeds 20 s/m; the
                      box of `numpy` stepped exactly as lidbox steps it (spin-up by repeating the
                      first day), days in UTC, a day of maps at a time (the open year keeps its
                      daily mean ventilation per cell for the percentiles). OUT, when given, is a
                      NetCDF file with a group per period (maps_year/maps_month's variables).
"""
import calendar
import math
import sys
import time

import numpy as np
from netCDF4 import Dataset, num2date


def maps(nc, out_path):
    """The maps of the bench case (grid.sh case_for); definitions as include/lidbox/grid/grid_run.hpp
    documents them, written out here independently of lidbox's code."""
    # The case: 10 x 10 km box, x side west-east (bearing 90), unit flux 1 g m-2 s-1, flat clock,
    # zero background and free-troposphere air, no residual layer, no loss, held hour means
    # stamped at the start of their hour; the floors 0.5 m/s and 50 m (common practice, no source);
    # spin-up: the first day repeated from zero until no hour mean of the day changes by 1e-3 of
    # the day's peak, at most 60 days (lidbox's documented defaults).
    LX = LY = 10000.0
    bearing = math.radians(90.0)
    exu, exv, eyu, eyv = math.sin(bearing), math.cos(bearing), -math.cos(bearing), math.sin(bearing)
    inv_x, inv_y = 1.0 / LX, 1.0 / LY
    iso = (2.0 / math.pi) * (inv_x + inv_y)  # a wind of exactly zero: mean over directions
    WMIN, HMIN, HOUR = 0.5, 50.0, 3600.0
    flux = 1.0
    q = (flux * LX * LY) * 1.0 * (1.0 / (LX * LY))  # sector rate x clock / area [g m-2 s-1]
    spin_tol, spin_max_days = 1e-3, 60
    offset_s = 0  # time_zone = "UTC": local standard days are UTC days
    # Stagnation: daily mean 10 m wind speed below 4 m/s (Korshover and Angell 1982, Monthly
    # Weather Review 110, 1515-1518: a surface geostrophic wind below 8 m/s, taken as an anemometer
    # wind below 4 m/s: the reduced form of src/data/stagnation/korshover-angell-1982-10m.toml).
    stag_below = 4.0
    scheme = "korshover_angell_1982_10m"
    percentiles = (10.0, 50.0, 90.0)  # np.percentile's default: Hyndman and Fan (1996) definition 7
    level = 20.0  # [grid] exceedance_level, s/m, of the daily mean

    tv = nc["time"]
    stamps = num2date(tv[:], tv.units, getattr(tv, "calendar", "standard"),
                      only_use_cftime_datetimes=False, only_use_python_datetimes=True)
    t = np.array([calendar.timegm(d.timetuple()) for d in stamps], dtype=np.int64)
    if len(t) < 24 or np.any(np.diff(t) != 3600):
        print("%s: variable time: %d stamps, not all an hour apart; expected hourly stamps, at least "
              "24 of them" % (nc.filepath(), len(t)), file=sys.stderr)
        sys.exit(2)
    lat, lon = np.asarray(nc["latitude"][:], float), np.asarray(nc["longitude"][:], float)
    shape = (len(lat), len(lon))
    ncell = shape[0] * shape[1]

    def met(a, b):
        out = []
        for name in ("blh", "u10", "v10"):
            x = nc[name][a:b]
            out.append(np.ma.filled(np.ma.asarray(x, dtype=float), np.nan).reshape(b - a, ncell))
        return out

    def flushing(u, v):
        return np.abs(u * exu + v * exv) * inv_x + np.abs(u * eyu + v * eyv) * inv_y

    def step(C, Hs, h, u, v):
        """One held hour for every cell: lid jump, then the exact step; returns C, H, hour mean."""
        H = np.where(h < HMIN, HMIN, h)
        C = np.where(H > Hs, C * Hs / H, C)  # a rising lid mixes in clean free-troposphere air
        speed = np.sqrt(u * u + v * v)
        f = flushing(u, v)
        calm = speed < WMIN
        if calm.any():  # keep the direction, raise the speed to the floor
            with np.errstate(divide="ignore", invalid="ignore"):
                s = WMIN / speed
                f = np.where(calm, np.where(speed > 0, flushing(u * s, v * s), WMIN * iso), f)
        x = f * HOUR
        em1 = np.expm1(-x)
        with np.errstate(divide="ignore", invalid="ignore"):
            g1 = HOUR * (-em1 / x)
            g2 = HOUR * HOUR * ((x + em1) / (x * x))
        small = x < 1e-4
        if small.any():
            g1 = np.where(small, HOUR * (1 - x * (0.5 - x * (1 / 6 - x / 24))), g1)
            g2 = np.where(small, HOUR * HOUR * (0.5 - x * (1 / 6 - x * (1 / 24 - x / 120))), g2)
        a = q / H
        mean = (C * g1 + a * g2) / HOUR
        C = C * (1.0 + em1) + a * g1
        return C, H, mean

    # Spin-up on the first 24 hours, cell by cell until each converges.
    h0, u0, v0 = met(0, 24)
    C = np.zeros(ncell)
    Hs = np.maximum(h0[0], HMIN)
    done = np.zeros(ncell, bool)
    C_end = np.zeros(ncell)
    prev = None
    for day in range(1, spin_max_days + 1):
        cur = np.empty((24, ncell))
        for i in range(24):
            C, Hs, cur[i] = step(C, Hs, h0[i], u0[i], v0[i])
        if prev is not None:
            peak = np.abs(prev).max(axis=0)
            diff = np.abs(cur - prev).max(axis=0)
            with np.errstate(divide="ignore", invalid="ignore"):
                change = np.where(peak > 0, diff / peak, 0.0)
            new = ~done & (change < spin_tol)
            C_end[new] = C[new]
            done |= new
            if done.all():
                break
        prev = cur
    C = np.where(done, C_end, C)  # Hs is the last hour's lid either way
    dropped = np.zeros(ncell, bool)

    # Periods: year and month of the local standard day; bounds as UTC hours since 1970.
    def period(kind, day_start):
        y, m = (day_start.tm_year, day_start.tm_mon)
        if kind == "year":
            k, a, b = y, (y, 1), (y + 1, 1)
        else:
            k, a, b = y * 12 + m - 1, (y, m), (y + (m == 12), m % 12 + 1)
        bound = lambda ym: (calendar.timegm((ym[0], ym[1], 1, 0, 0, 0)) - offset_s) / 3600.0
        return k, bound(a), bound(b)

    names = ["valid_days", "stagnation_days_" + scheme, "longest_streak_" + scheme,
             "stagnation_episodes_" + scheme, "ventilation_mean"]
    names += ["ventilation_p%g" % p for p in percentiles] + ["dilution_mean", "exceedance_days"]
    kinds = ("year", "month")
    out = None
    if out_path:
        out = Dataset(out_path, "w", format="NETCDF4")
        out.comment = "INVENTED benchmark grid: numpy reference maps (tests/bench/bench_grid_reference.py)"
        for kind in kinds:
            g = out.createGroup(kind)
            g.createDimension("time", None)
            g.createDimension("bnds", 2)
            g.createDimension("latitude", shape[0])
            g.createDimension("longitude", shape[1])
            g.createVariable("time", "f8", ("time",)).units = "hours since 1970-01-01 00:00:00"
            g.createVariable("time_bnds", "f8", ("time", "bnds"))
            g.createVariable("latitude", "f8", ("latitude",))[:] = lat
            g.createVariable("longitude", "f8", ("longitude",))[:] = lon
            for n in names:
                g.createVariable(n, "f8", ("time", "latitude", "longitude"))

    class Acc:
        def __init__(self, key, start, end):
            self.key, self.start, self.end = key, start, end
            self.valid = np.zeros(ncell, int)
            self.stag = np.zeros(ncell, int)
            self.streak = np.zeros(ncell, int)
            self.longest = np.zeros(ncell, int)
            self.episodes = np.zeros(ncell, int)
            self.vent_sum = np.zeros(ncell)
            # the open period's daily means, for the percentiles (a row per day of the period)
            self.vent_days = np.empty((int(round((end - start) / 24.0)), ncell))
            self.n_days = 0
            self.dil_sum = np.zeros(ncell)
            self.dil_days = np.zeros(ncell, int)
            self.exceed = np.zeros(ncell, int)

    written = {k: 0 for k in kinds}
    summary = {}

    def close(kind, a):
        n = a.valid.astype(float)
        with np.errstate(divide="ignore", invalid="ignore"):
            vals = [a.valid, a.stag, a.longest, a.episodes, np.where(n > 0, a.vent_sum / n, np.nan)]
            vd = a.vent_days[:a.n_days] if a.n_days else np.full((1, ncell), np.nan)
            vals += list(np.percentile(vd, percentiles, axis=0, overwrite_input=True))
            a.vent_days = vd = None
            vals += [np.where(a.dil_days > 0, a.dil_sum / a.dil_days, np.nan), a.exceed]
        vals = [np.where(dropped, np.nan, np.asarray(v, float)).reshape(shape) for v in vals]
        summary.setdefault(kind, []).append(float(np.nanmean(vals[1])))
        if out is not None:
            g, r = out[kind], written[kind]
            g["time"][r] = a.start
            g["time_bnds"][r] = [a.start, a.end]
            for nm, v in zip(names, vals):
                g[nm][r] = v
        written[kind] += 1

    acc = {k: None for k in kinds}
    # Episodes: runs of episode_min (4) stagnation days or more; a run goes on across periods
    # and counts in the period of the day it reaches that length (the scheme file's
    # episode_min_days; Korshover and Angell 1982 count stagnation cases of 4 days or more).
    episode_min = 4
    run = np.zeros(ncell, int)
    local = t + offset_s
    day_of = local // 86400
    bounds = np.flatnonzero(np.diff(day_of)) + 1
    starts = np.concatenate(([0], bounds))
    ends = np.concatenate((bounds, [len(t)]))
    for a, b in zip(starts, ends):
        h, u, v = met(a, b)
        hod0 = int((local[a] % 86400) // 3600)
        st = time.gmtime(int(day_of[a]) * 86400)
        for kind in kinds:
            key, p0, p1 = period(kind, st)
            if acc[kind] is not None and acc[kind].key != key:
                close(kind, acc[kind])
                acc[kind] = None
            if acc[kind] is None:
                acc[kind] = Acc(key, p0, p1)
        dil = np.full((24, ncell), np.nan)
        vent = np.full((24, ncell), np.nan)
        wind = np.full((24, ncell), np.nan)
        for j in range(b - a):
            bad = ~(h[j] > 0) | ~np.isfinite(h[j]) | ~np.isfinite(u[j]) | ~np.isfinite(v[j])
            dropped |= bad
            C, Hs, mean = step(C, Hs, h[j], u[j], v[j])
            speed = np.sqrt(u[j] * u[j] + v[j] * v[j])
            dil[hod0 + j] = np.where(dropped, np.nan, mean / flux)
            vent[hod0 + j] = h[j] * speed
            wind[hod0 + j] = speed
        vent_mean = vent.sum(axis=0) / 24.0  # NaN unless all 24 hours are there
        complete = ~dropped & np.isfinite(vent_mean) & (b - a == 24)
        stagnant = complete & (wind.sum(axis=0) / 24.0 < stag_below)
        dil_mean = dil.sum(axis=0) / 24.0
        run = np.where(stagnant, run + 1, 0)
        reached = run == episode_min
        for kind in kinds:
            x = acc[kind]
            x.episodes += reached
            x.stag += stagnant
            x.streak = np.where(stagnant, x.streak + 1, 0)
            x.longest = np.maximum(x.longest, x.streak)
            x.valid += complete
            x.vent_sum += np.where(complete, vent_mean, 0.0)
            if complete.any():  # the same days for every cell still stepped
                x.vent_days[x.n_days] = np.where(complete, vent_mean, np.nan)
                x.n_days += 1
            ok = complete & np.isfinite(dil_mean)
            x.dil_sum += np.where(ok, dil_mean, 0.0)
            x.dil_days += ok
            x.exceed += ok & (dil_mean > level)
    for kind in kinds:
        close(kind, acc[kind])
    if out is not None:
        out.close()
    print("maps of %d hours: %d years, %d months; mean stagnation days per year %s" %
          (len(t), written["year"], written["month"], ["%.2f" % s for s in summary["year"]]))

mode, path = sys.argv[1], sys.argv[2]
nc = Dataset(path)
n = nc.dimensions["time"].size
if mode == "read":
    total = 0.0
    for d0 in range(0, n, 24):
        for name in ("blh", "u10", "v10"):
            total += float(nc[name][d0:d0 + 24].sum())
    print("read %d hours, checksum %.6e" % (n, total))
    sys.exit(0)
if mode == "maps":
    maps(nc, sys.argv[3] if len(sys.argv) > 3 else None)
    sys.exit(0)

L = 10000.0
q = 1.0
C = None
H_prev = None
acc = 0.0
for d0 in range(0, n, 24):
    blh = np.asarray(nc["blh"][d0:d0 + 24], dtype=float)
    u10 = np.asarray(nc["u10"][d0:d0 + 24], dtype=float)
    v10 = np.asarray(nc["v10"][d0:d0 + 24], dtype=float)
    for i in range(blh.shape[0]):
        H = np.maximum(blh[i], 50.0)
        speed = np.maximum(np.hypot(u10[i], v10[i]), 0.5)
        f = (np.abs(u10[i]) + np.abs(v10[i])) / L * (speed / np.maximum(np.hypot(u10[i], v10[i]), 1e-12))
        if C is None:
            C = q / (f * H)
            H_prev = H
        C = np.where(H > H_prev, C * H_prev / H, C)  # the lid rises into clean air
        lam = f
        cstar = q / H / lam
        e = np.exp(-lam * 3600.0)
        mean = cstar + (C - cstar) * (1.0 - e) / (lam * 3600.0)
        C = cstar + (C - cstar) * e
        H_prev = H
        acc += float(mean.mean())
print("stepped %d hours, mean %.6e" % (n, acc / n))
