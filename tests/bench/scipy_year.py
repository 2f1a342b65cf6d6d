#!/usr/bin/env python3
"""The benchmark's reference: the held (hour-average) year solved with scipy's solve_ivp.

Reads the forcing written by bench_engine (SI units, one line per hour) and lidbox's hour means,
integrates the mixed and residual layers of every pollutant hour by hour (lid jump at the hour
start by the mixing rule, then RK45 at rtol 1e-9 over the hour), and prints two numbers: the
integration time in seconds and the worst relative difference of the hour means.

The residual layer holds the most recent mixing cycle (README, "Which air the residual layer
holds"): a falling lid that has risen more than 100 m above its lowest since the last cycle began
starts a new cycle (all residual air becomes older air), and the older air is vented once the new
cycle's slab is more than 100 m deep.
"""
import math
import sys
import time

import numpy as np
from scipy.integrate import solve_ivp


def main():
    with open(sys.argv[1]) as f:
        lx, ly, bearing, wmin, hmin, P, n = f.readline().split()
        lx, ly, bearing, wmin, hmin = map(float, (lx, ly, bearing, wmin, hmin))
        P, n = int(P), int(n)
        proc = [tuple(map(float, f.readline().split())) for _ in range(P)]
        rows = [list(map(float, f.readline().split())) for _ in range(n)]
    lidbox = np.loadtxt(sys.argv[2]).reshape(n, P)
    b = math.radians(bearing)
    ex, ey = (math.sin(b), math.cos(b)), (-math.cos(b), math.sin(b))
    iso = 2.0 / math.pi * (1 / lx + 1 / ly)

    def flushing(u, v):
        s = math.hypot(u, v)
        if s >= wmin:
            return abs(u * ex[0] + v * ex[1]) / lx + abs(u * ey[0] + v * ey[1]) / ly
        if s > 0:
            u, v = u * wmin / s, v * wmin / s
            return abs(u * ex[0] + v * ex[1]) / lx + abs(u * ey[0] + v * ey[1]) / ly
        return wmin * iso

    t0 = time.perf_counter()
    threshold = 100.0
    H = max(rows[0][0], hmin)
    Hp = Hr = low = H  # top of the new cycle's slab, top of all residual air, lowest lid
    c = np.zeros(P)
    cr = np.zeros(P)  # new cycle's slab, H..Hp
    co = np.zeros(P)  # older air, Hp..Hr
    worst = 0.0
    for i, row in enumerate(rows):
        h_new = max(row[0], hmin)
        f = flushing(row[1], row[2])
        cb = np.array(row[3::3])
        ca = np.array(row[4::3])
        q = np.array(row[5::3])
        if h_new > H:  # entrain the new slab, then older air, then free troposphere
            x = min(h_new - H, Hp - H)
            y = min(h_new - H - x, Hr - Hp)
            c = (c * H + cr * x + co * y + ca * (h_new - H - x - y)) / h_new
            if h_new >= Hp:
                cr, Hp = np.zeros(P), h_new
            if h_new >= Hr:
                co, Hr = np.zeros(P), h_new
        elif h_new < H:
            if H - low > threshold:  # a new cycle: all residual air above the lid is older air
                if Hr > H:
                    co = (co * (Hr - Hp) + cr * (Hp - H)) / (Hr - H)
                cr, Hp, low = np.zeros(P), H, H
            d_old, dh = Hp - H, H - h_new
            cr = (cr * d_old + c * dh) / (d_old + dh)
            low = min(low, h_new)
            if Hr > Hp and Hp - h_new > threshold:  # vented aloft
                co, Hr = np.zeros(P), Hp
        H = h_new
        k = np.array([p[0] for p in proc])
        vd = np.array([p[1] for p in proc])
        kr = np.array([p[2] for p in proc])

        def rhs(t, y):
            C, Cr, Co = y[:P], y[P:2 * P], y[2 * P:3 * P]
            dC = q / H + f * (cb - C) - (k + vd / H) * C
            return np.concatenate([dC, -kr * Cr, -kr * Co, C])

        sol = solve_ivp(rhs, (0.0, 3600.0), np.concatenate([c, cr, co, np.zeros(P)]), rtol=1e-9, atol=1e-18)
        y = sol.y[:, -1]
        c, cr, co = y[:P], y[P:2 * P], y[2 * P:3 * P]
        mean = y[3 * P:] / 3600.0
        worst = max(worst, float(np.max(np.abs(lidbox[i] - mean) / mean)))
    print(time.perf_counter() - t0, worst)


if __name__ == "__main__":
    main()
