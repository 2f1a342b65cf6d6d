#!/usr/bin/env python3
"""Reference: an entrainment case solved independently with scipy's solve_ivp (LSODA/Radau at
rtol 1e-11) and compared with `lidbox run` to a relative 1e-6.

The case (invented): two days of instantaneous hourly met (interpolated linearly between
stamps), a lid that grows from 80 m to 900 m in the morning and collapses in the evening, a
turning wind, one emission sector with a diurnal clock, first-order loss in both layers, dry
deposition, background inflow, a residual layer and free-troposphere air above it.

The ODEs are the concentration form of the balance (physics note, sections 2-3):
  dC/dt  = q/H + f (Cb - C) - (k + vd/H) C + (w+/H) (Ce - C),  Ce = Cr below Hr, Ca above
  rising lid:  dCr/dt = -kr Cr,                      Hr = max(Hr, H)
  falling lid: d(Cr D)/dt = w- C - kr Cr D,          D = Hr - H
Each hour is integrated separately (the forcing has kinks at the stamps) and split where a
rising lid reaches Hr. Hour means come from an extra state, the integral of C.

Run by ctest as: /usr/bin/python3 test_entrainment_scipy.py <lidbox binary> <source dir>
Exit 77 (skipped) when numpy or scipy is missing.
"""
import csv
import math
import os
import subprocess
import sys
import tempfile

try:
    import numpy as np
    from scipy.integrate import solve_ivp
except ImportError:
    print("numpy/scipy not available under", sys.executable)
    sys.exit(77)

LX, LY, BEARING = 12000.0, 7000.0, 60.0
K, KR, VD = 2.0e-5, 1.0e-5, 0.003
CB, CA, C0 = 12e-6, 4e-6, 30e-6          # g/m3
E_G_S = 350.0                            # g/s, long-term mean
HOUR_W = [0.4, 0.3, 0.3, 0.3, 0.4, 0.8, 1.4, 1.9, 1.7, 1.2, 1.0, 1.0,
          1.0, 1.0, 1.1, 1.3, 1.7, 1.9, 1.5, 1.1, 0.9, 0.7, 0.6, 0.5]
HOURS = 48


def lid(hour):
    h = hour % 24
    if h < 8 or h >= 20:
        return 80.0
    if h <= 13:
        return 80.0 + (900.0 - 80.0) * (h - 8) / 5.0
    if h <= 16:
        return 900.0
    return 900.0 + (80.0 - 900.0) * (h - 16) / 4.0


def wind(hour):
    speed = 2.0 + 2.0 * math.sin(hour / 24.0 * 2 * math.pi) ** 2
    frm = (200.0 + 5.0 * hour) % 360.0
    th = math.radians(frm)
    return -speed * math.sin(th), -speed * math.cos(th), speed, frm


def flushing(u, v):
    b = math.radians(BEARING)
    ex = (math.sin(b), math.cos(b))
    ey = (-math.cos(b), math.sin(b))
    wx = u * ex[0] + v * ex[1]
    wy = u * ey[0] + v * ey[1]
    return abs(wx) / LX + abs(wy) / LY


def reference():
    area = LX * LY
    wmean = sum(HOUR_W) / 24.0
    c, cr = C0, 0.0
    hr = lid(0)
    means, residual_end = [], []
    for i in range(HOURS):
        h0, h1 = lid(i), lid(i + 1)
        u0, v0, _, _ = wind(i)
        u1, v1, _, _ = wind(i + 1)
        q = E_G_S * HOUR_W[i % 24] / wmean / area
        rate = (h1 - h0) / 3600.0

        def forcing(t):
            x = t / 3600.0
            return h0 + (h1 - h0) * x, u0 + (u1 - u0) * x, v0 + (v1 - v0) * x

        # Split a rising hour where the lid passes the residual-layer top.
        pieces = [(0.0, 3600.0)]
        if rate > 0 and h0 < hr < h1:
            ts = (hr - h0) / rate
            pieces = [(0.0, ts), (ts, 3600.0)]
        integral = 0.0
        for (ta, tb) in pieces:
            h_mid = forcing(0.5 * (ta + tb))[0]
            below_top = h_mid < hr - 1e-9
            # A falling lid is integrated in the residual layer's mass Mr = Cr D (which starts
            # from zero depth without a singularity); otherwise in Cr itself.
            falling = rate < 0
            y1 = cr * (hr - forcing(ta)[0]) if falling else cr

            def rhs(t, y):
                C, Y, _ = y
                H, u, v = forcing(t)
                f = flushing(u, v)
                dC = q / H + f * (CB - C) - (K + VD / H) * C
                if rate > 0:
                    ce = Y if below_top else CA
                    dC += rate / H * (ce - C)
                    dY = -KR * Y
                elif falling:
                    dY = -rate * C - KR * Y
                else:
                    dY = -KR * Y
                return [dC, dY, C]

            sol = solve_ivp(rhs, (ta, tb), [c, y1, 0.0], method="Radau", rtol=1e-11, atol=1e-20)
            c, y_end, part = sol.y[:, -1]
            cr = y_end / (hr - forcing(tb)[0]) if falling else y_end
            integral += part
            if rate > 0 and not below_top:
                hr = forcing(tb)[0]
                cr = 0.0
        if rate > 0 and h1 >= hr:
            hr = h1
        means.append(integral / 3600.0)
        residual_end.append(cr if hr > h1 + 1e-9 else 0.0)
    return means, residual_end


def write_case(folder):
    with open(os.path.join(folder, "met.csv"), "w") as f:
        f.write("time,mixing_height [m],wind_speed [m/s],wind_from [deg]\n")
        for i in range(HOURS + 1):
            _, _, s, d = wind(i)
            f.write("2026-02-%02dT%02d:00:00Z,%.10g,%.10g,%.10g\n" % (1 + i // 24, i % 24, lid(i), s, d))
    weights = ", ".join("%g" % w for w in HOUR_W)
    with open(os.path.join(folder, "case.toml"), "w") as f:
        f.write(f"""# invented reference case
name = "scipy-reference"
time_zone = "UTC"
[airshed]
x_side = "{LX} m"
y_side = "{LY} m"
x_side_bearing = "{BEARING} deg"
[met]
file = "met.csv"
reading = "instantaneous"
[model]
spin_up = "none"
residual_layer = true
max_lambda_dt = 0.001
max_relative_lid_change = 0.0002
max_substeps_per_hour = 50000
[pollutants.X]
unit = "g/m3"
loss_rate = "{K} 1/s"
residual_loss_rate = "{KR} 1/s"
deposition_velocity = "{VD} m/s"
background = "{CB} g/m3"
free_troposphere = "{CA} g/m3"
initial = "{C0} g/m3"
[sectors.city]
emissions = {{ X = "{E_G_S} g/s" }}
hour_of_day = [{weights}]
""")


def main():
    binary = sys.argv[1]
    with tempfile.TemporaryDirectory() as d:
        write_case(d)
        out = os.path.join(d, "out")
        p = subprocess.run([binary, "run", "-q", os.path.join(d, "case.toml"), "-o", out],
                           capture_output=True, text=True)
        if p.returncode != 0:
            print(p.stdout, p.stderr)
            return 1
        with open(os.path.join(out, "hourly.csv")) as f:
            rows = list(csv.DictReader(f))
    means, residual = reference()
    worst = 0.0
    worst_r = 0.0
    for i, row in enumerate(rows):
        got = float(row["X_hour_mean [g m-3]"])
        worst = max(worst, abs(got - means[i]) / means[i])
        rgot = float(row["X_residual_end_of_hour [g m-3]"] or 0.0)
        if residual[i] > 0:
            worst_r = max(worst_r, abs(rgot - residual[i]) / residual[i])
    print("hours compared: %d; worst relative difference: hour means %.2e, residual layer %.2e"
          % (len(rows), worst, worst_r))
    ok = len(rows) == HOURS and worst < 1e-6 and worst_r < 1e-6
    print("PASS" if ok else "FAIL")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
