#!/usr/bin/env python3
"""The benchmark's reference: the held (hour-average) year solved with scipy's solve_ivp.

Reads the forcing written by bench_engine (SI units, one line per hour) and lidbox's hour means,
integrates the mixed and residual layers of every pollutant hour by hour (lid jump at the hour
start by the mixing rule, then RK45 at rtol 1e-9 over the hour), and prints two numbers: the
integration time in seconds and the worst relative difference of the hour means.
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
    H = max(rows[0][0], hmin)
    Hr = H
    c = np.zeros(P)
    cr = np.zeros(P)
    worst = 0.0
    for i, row in enumerate(rows):
        h_new = max(row[0], hmin)
        f = flushing(row[1], row[2])
        cb = np.array(row[3::3])
        ca = np.array(row[4::3])
        q = np.array(row[5::3])
        if h_new > H:  # entrain residual-layer air first, then free troposphere
            x = min(h_new - H, max(Hr - H, 0.0))
            c = (c * H + cr * x + ca * (h_new - H - x)) / h_new
            if x >= Hr - H:
                cr = np.zeros(P)
            Hr = max(Hr, h_new)
        elif h_new < H:  # detrain into the residual layer
            d_old, dh = Hr - H, H - h_new
            cr = (cr * d_old + c * dh) / (d_old + dh)
        H = h_new
        k = np.array([p[0] for p in proc])
        vd = np.array([p[1] for p in proc])
        kr = np.array([p[2] for p in proc])

        def rhs(t, y):
            C, Cr = y[:P], y[P:2 * P]
            dC = q / H + f * (cb - C) - (k + vd / H) * C
            return np.concatenate([dC, -kr * Cr, C])

        sol = solve_ivp(rhs, (0.0, 3600.0), np.concatenate([c, cr, np.zeros(P)]), rtol=1e-9, atol=1e-18)
        y = sol.y[:, -1]
        c, cr = y[:P], y[P:2 * P]
        mean = y[2 * P:] / 3600.0
        worst = max(worst, float(np.max(np.abs(lidbox[i] - mean) / mean)))
    print(time.perf_counter() - t0, worst)


if __name__ == "__main__":
    main()
