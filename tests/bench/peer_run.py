#!/usr/bin/env python3
"""The peer of the whole-run benchmark: a short numpy/pandas script that does the job of
`lidbox run` on the invented long case (tests/bench/long_case.py), written independently of
lidbox's code from the physics (a well-mixed box under a moving lid with a residual layer).

numpy steps the held-forcing box exactly, hour by hour: the lid jumps at the start of the hour
(entraining residual-layer air first, then free-troposphere air; a falling lid leaves mixed air
in the residual layer), then dC/dt = a - lambda C is solved in closed form for each linear part
(background, initial state, each sector), C(t) = C* + (C0 - C*) exp(-lambda t). The first day is
repeated until the day's hour means change by less than 1e-3 of their peak. pandas then computes
the 8-h and 24-h running means and the daily mean, maximum and maximum 8-h mean on local standard
time days, and writes the hourly and daily tables as CSV.

    /usr/bin/python3 peer_run.py <case folder> <years> <output folder>

Prints the number of hours; writes <out>/peer_hourly.csv and <out>/peer_daily.csv.
"""
import math
import os
import sys

import numpy as np
import pandas as pd

R = 8.314462618  # J mol-1 K-1 (CODATA 2018)
DAY = 86400.0

# The invented case (long_case.py): footprint, floors, pollutants, sectors and clocks.
LX, LY, BEARING = 14000.0, 8000.0, 75.0
MIN_WIND, MIN_LID = 0.5, 50.0
PPM_CO = 1e-6 * 28.01 * 101325.0 / (R * 298.15)  # g m-3 per ppm at 25 degC, 1 atm
POLLUTANTS = [
    # name, g m-3 per reporting unit, loss [1/s], deposition [m/s], free troposphere [g m-3]
    ("CO", PPM_CO, 1.0 / (60 * DAY), 0.0, 0.10 * PPM_CO),
    ("PM25", 1e-6, 1.0 / (5 * DAY), 0.001, 2e-6),
]
TRAFFIC_HOURS = [0.3, 0.2, 0.2, 0.2, 0.3, 0.7, 1.5, 2.2, 2.0, 1.3, 1.1, 1.1,
                 1.2, 1.2, 1.3, 1.6, 2.0, 2.2, 1.6, 1.0, 0.8, 0.6, 0.5, 0.4]
TRAFFIC_DAYS = [1.05, 1.05, 1.05, 1.05, 1.1, 0.85, 0.75]  # Monday first
HEATING_HOURS = [0.8, 0.5, 0.4, 0.4, 0.4, 0.6, 1.3, 1.5, 1.0, 0.6, 0.5, 0.5,
                 0.5, 0.5, 0.6, 0.8, 1.2, 1.9, 2.4, 2.5, 2.3, 1.9, 1.5, 1.1]
# Emission rates [g/s] of (traffic, heating) per pollutant.
RATES = np.array([[2.4e6, 0.9e6], [12e3, 70e3]]) / 3600.0


def forcing(met):
    h = np.maximum(met["mixing_height [m]"].to_numpy(), MIN_LID)
    speed = met["wind_speed [m/s]"].to_numpy()
    frm = np.radians(met["wind_from [deg]"].to_numpy())
    u, v = -speed * np.sin(frm), -speed * np.cos(frm)
    b = math.radians(BEARING)
    wx = u * math.sin(b) + v * math.cos(b)
    wy = -u * math.cos(b) + v * math.sin(b)
    scale = np.where(speed < MIN_WIND, MIN_WIND / np.maximum(speed, 1e-300), 1.0)
    f = (np.abs(wx) / LX + np.abs(wy) / LY) * scale
    from_deg = np.degrees(np.arctan2(-u, -v)) % 360.0
    bg = np.empty((len(POLLUTANTS), len(h)))
    bg[0] = 0.15 * PPM_CO
    bg[1] = np.where((from_deg >= 90.0) & (from_deg < 270.0), 8e-6, 3e-6)
    local = met["time"].dt.tz_convert("America/Denver")
    hours, days = local.dt.hour.to_numpy(), local.dt.dayofweek.to_numpy()
    th = np.array(TRAFFIC_HOURS) / np.mean(TRAFFIC_HOURS)
    td = np.array(TRAFFIC_DAYS) / np.mean(TRAFFIC_DAYS)
    hh = np.array(HEATING_HOURS) / np.mean(HEATING_HOURS)
    clock = np.stack([th[hours] * td[days], hh[hours]])  # [sector, hour]
    q = RATES[:, :, None] * clock[None, :, :] / (LX * LY)  # [pollutant, sector, hour] g m-2 s-1
    return h, f, bg, q


def step(state, h_new, f, bg, q):
    """One held hour for all pollutants and parts; returns the hour means [pollutant, part]."""
    c, cr, H, top = state
    ca = np.array([p[4] for p in POLLUTANTS])
    if h_new > H:
        depth = max(top - H, 0.0)
        from_res = min(h_new - H, depth)
        from_free = h_new - H - from_res
        m = c * H + cr * from_res
        m[:, 0] += ca * from_free
        c = m / h_new
        if from_res >= depth:
            cr = np.zeros_like(cr)
        top = max(top, h_new)
    elif h_new < H:
        depth_old = max(top - H, 0.0)
        dh = H - h_new
        cr = (cr * depth_old + c * dh) / (depth_old + dh)
        top = H + depth_old
    H = h_new
    k = np.array([p[2] for p in POLLUTANTS])
    vd = np.array([p[3] for p in POLLUTANTS])
    lam = f + k + vd / H
    a = np.zeros_like(c)
    a[:, 0] = f * bg
    a[:, 2:] = q / H
    cstar = a / lam[:, None]
    x = lam * 3600.0
    decay = np.exp(-x)[:, None]
    mean = cstar + (c - cstar) * (-np.expm1(-x) / x)[:, None]
    c = cstar + (c - cstar) * decay
    if top > H:
        cr = cr * np.exp(-k * 3600.0)[:, None]
    return (c, cr, H, top), mean


def main():
    folder, years, out = sys.argv[1], sys.argv[2], sys.argv[3]
    met = pd.read_csv(os.path.join(folder, "met-%sy.csv" % years))
    met["time"] = pd.to_datetime(met["time"], utc=True)
    h, f, bg, q = forcing(met)
    n, P, J = len(h), len(POLLUTANTS), 4
    state = (np.array([[bg[p, 0], 0, 0, 0] for p in range(P)], float),
             np.array([[POLLUTANTS[p][4], 0, 0, 0] for p in range(P)], float), h[0], h[0])
    previous = None
    for _ in range(60):  # spin-up: the first day repeated
        day = np.empty((24, P))
        for i in range(24):
            state, mean = step(state, h[i], f[i], bg[:, i], q[:, :, i])
            day[i] = mean.sum(axis=1)
        if previous is not None and np.max(np.abs(day - previous).max(axis=0) /
                                           np.abs(previous).max(axis=0)) < 1e-3:
            break
        previous = day
    means = np.empty((n, P, J))
    for i in range(n):
        state, means[i] = step(state, h[i], f[i], bg[:, i], q[:, :, i])
    table = pd.DataFrame({"period_start_utc": met["time"]})
    for p, (name, unit, *_rest) in enumerate(POLLUTANTS):
        table[name + "_hour_mean"] = means[:, p, :].sum(axis=1) / unit
        for j, part in enumerate(("background", "initial", "traffic", "home_heating")):
            table["%s_part_%s" % (name, part)] = means[:, p, j] / unit
    os.makedirs(out, exist_ok=True)
    table.to_csv(os.path.join(out, "peer_hourly.csv"), index=False)
    series = table.set_index("period_start_utc")[[p[0] + "_hour_mean" for p in POLLUTANTS]]
    lst = series.tz_convert("Etc/GMT+7")  # local standard time, UTC-7
    daily = {}
    for name in series.columns:
        r8 = lst[name].rolling(8, min_periods=6).mean()
        r24 = lst[name].rolling(24, min_periods=18).mean()
        days = lst[name].resample("1D")
        daily[name + "_daily_mean"] = days.mean()
        daily[name + "_daily_max_1h"] = days.max()
        daily[name + "_daily_max_8h"] = r8.resample("1D").max()
        daily[name + "_daily_max_24h"] = r24.resample("1D").max()
    pd.DataFrame(daily).to_csv(os.path.join(out, "peer_daily.csv"))
    print("peer: %d hours" % n)


if __name__ == "__main__":
    main()
