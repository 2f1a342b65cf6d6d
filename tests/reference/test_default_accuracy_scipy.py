#!/usr/bin/env python3
"""Reference: the default sub-step controls against scipy's solve_ivp (Radau, rtol 1e-12) on four
days of realistic invented met read as instantaneous values, to a relative 1e-6 on every hour
mean and every end-of-hour residual-layer concentration.

The met (invented, seeded): a deep day (lid 1500 m), two shallow days (500 m, 450 m) and a
middling one (900 m); nights near 120 m with a scatter of +-20 m and one hour under the 50 m lid
floor; winds of 0.3-5 m/s that turn through the footprint's axes, an evening fall of the wind from
0.65 to 0.30 m/s within one hour and one hour under the 0.2 m/s calm floor. Two pollutants, one
emission sector with a diurnal clock, first-order loss in both layers, deposition, a wind aloft
over the residual layer.

The ODEs are the balance in concentration form (physics note, sections 2-3) with the residual
layer of the most recent mixing cycle (README, "Which air the residual layer holds"):
  dC/dt  = q/H + f (Cb - C) - (k + vd/H) C + (w+/H) (Ce - C)
  Ce = Cr below P, Co between P and Hr, Ca above Hr (a rising lid)
  d(Cr D)/dt = w- C - (kr + fa) Cr D + fa Ca D,  D = P - H   (the new cycle's slab)
  dCo/dt = -(kr + fa) Co + fa Ca                              (older air, P..Hr)
A falling lid starts a new cycle (all residual air becomes older, P = H) when it has risen more
than 100 m above its lowest since the last cycle began; the older air is vented when the new slab
is deeper than 100 m. Each hour is integrated piece by piece between the times where the forcing
has a kink (a wind component along a side changes sign, the wind crosses the calm floor, the lid
crosses its floor, a rising lid reaches P or Hr, a falling lid's new slab reaches 100 m), found
here from the met by their own closed forms. Hour means come from an extra state, the integral
of C.

lidbox's hour means are read from hourly.nc (doubles): the 7 significant digits of hourly.csv
would round them by up to 5e-7.

Run by ctest as: /usr/bin/python3 test_default_accuracy_scipy.py <lidbox binary> <source dir>
Exit 77 (skipped) when numpy or scipy is missing.
"""
import math
import os
import random
import subprocess
import sys
import tempfile

try:
    import netCDF4
    import numpy as np  # noqa: F401  (scipy needs it)
    from scipy.integrate import solve_ivp
except ImportError:
    print("netCDF4/numpy/scipy not available under", sys.executable)
    sys.exit(77)

LX, LY, BEARING = 12000.0, 7000.0, 60.0
WIND_FLOOR, LID_FLOOR, THRESHOLD, ALOFT = 0.2, 50.0, 100.0, 0.3
POLLUTANTS = [  # name, k, kr, vd, Cb, Ca, C0 (g/m3), emission (g/s)
    ("X", 2.0e-5, 1.0e-5, 0.003, 12e-6, 4e-6, 30e-6, 350.0),
    ("Y", 1.0 / (60 * 86400.0), 1.0 / (60 * 86400.0), 0.0, 150e-6, 100e-6, 300e-6, 2500.0),
]
HOUR_W = [0.4, 0.3, 0.3, 0.3, 0.4, 0.8, 1.4, 1.9, 1.7, 1.2, 1.0, 1.0,
          1.0, 1.0, 1.1, 1.3, 1.7, 1.9, 1.5, 1.1, 0.9, 0.7, 0.6, 0.5]
PEAKS = [1500.0, 500.0, 450.0, 900.0]
HOURS = 24 * len(PEAKS)


def invented_met():
    """Hourly stamps: lid [m], wind speed [m/s], direction the wind comes from [deg]."""
    rng = random.Random(20261202)
    rows = []
    for i in range(HOURS + 1):
        hour, day = i % 24, min(i // 24, len(PEAKS) - 1)
        lid = 120.0 + rng.uniform(-20.0, 20.0)
        if 7 <= hour <= 19:
            x = math.sin((hour - 7) / 12.0 * math.pi)
            lid = max(lid, PEAKS[day] * x ** 0.7 * rng.uniform(0.9, 1.1))
        speed = rng.uniform(0.4, 0.9)
        if 9 <= hour <= 17:
            speed = rng.uniform(1.5, 5.0)
        frm = (200.0 + 60.0 * math.sin(i / 7.0) + rng.uniform(-10.0, 10.0)) % 360.0
        rows.append([lid, speed, frm])
    rows[18][1], rows[19][1] = 0.65, 0.30   # the evening fall of the wind
    rows[43][1] = 0.1                         # under the calm floor
    rows[50][0] = 40.0                        # under the lid floor
    return rows


def components(speed, frm):
    th = math.radians(frm)
    return -speed * math.sin(th), -speed * math.cos(th)


def axes():
    b = math.radians(BEARING)
    return (math.sin(b), math.cos(b)), (-math.cos(b), math.sin(b))


EX, EY = axes()


def flushing(u, v, floor=True):
    s = math.hypot(u, v)
    if floor and s < WIND_FLOOR:
        u, v = u * WIND_FLOOR / s, v * WIND_FLOOR / s
    return abs(u * EX[0] + v * EX[1]) / LX + abs(u * EY[0] + v * EY[1]) / LY


def crossings(a, b, level):
    """Fractions x in (0, 1) where a + (b - a) x = level."""
    if (a - level) * (b - level) < 0:
        return [(a - level) / (a - b)]
    return []


class Box:
    def __init__(self):
        self.c = [p[6] for p in POLLUTANTS]
        self.cr = [0.0] * len(POLLUTANTS)
        self.co = [0.0] * len(POLLUTANTS)

    def run(self, met):
        area = LX * LY
        wmean = sum(HOUR_W) / 24.0
        h = max(met[0][0], LID_FLOOR)
        top_p = top_r = low = h
        means, residual_end = [], []
        for i in range(HOURS):
            h0, h1 = met[i][0], met[i + 1][0]
            u0, v0 = components(met[i][1], met[i][2])
            u1, v1 = components(met[i + 1][1], met[i + 1][2])
            lid = lambda x: max(h0 + (h1 - h0) * x, LID_FLOOR)  # noqa: E731
            wind = lambda x: (u0 + (u1 - u0) * x, v0 + (v1 - v0) * x)  # noqa: E731
            cuts = {0.0, 1.0}
            for a, b in ((u0 * EX[0] + v0 * EX[1], u1 * EX[0] + v1 * EX[1]),
                         (u0 * EY[0] + v0 * EY[1], u1 * EY[0] + v1 * EY[1])):
                cuts.update(crossings(a, b, 0.0))
            du, dv = u1 - u0, v1 - v0
            qa, qb, qc = du * du + dv * dv, 2 * (u0 * du + v0 * dv), u0 * u0 + v0 * v0 - WIND_FLOOR ** 2
            if qa > 0 and qb * qb - 4 * qa * qc > 0:
                r = math.sqrt(qb * qb - 4 * qa * qc)
                cuts.update(x for x in ((-qb - r) / (2 * qa), (-qb + r) / (2 * qa)) if 0 < x < 1)
            cuts.update(crossings(h0, h1, LID_FLOOR))
            if h1 > h0:
                cuts.update(crossings(h0, h1, top_p))
                cuts.update(crossings(h0, h1, top_r))
            cuts = sorted(cuts)
            integral = [0.0] * len(POLLUTANTS)
            k = 0
            while k < len(cuts) - 1:
                xa, xb = cuts[k], cuts[k + 1]
                ha, hb = lid(xa), lid(xb)
                w = (hb - ha) / ((xb - xa) * 3600.0)
                if w < 0 and h - low > THRESHOLD:
                    # A new cycle: all residual air above the lid becomes older air.
                    d_new, d_old = top_p - h, top_r - top_p
                    for p in range(len(POLLUTANTS)):
                        if d_new + d_old > 0:
                            self.co[p] = (self.co[p] * d_old + self.cr[p] * d_new) / (d_new + d_old)
                        self.cr[p] = 0.0
                    top_p = low = h
                if w < 0 and top_r > top_p and top_p - hb > THRESHOLD and top_p - ha < THRESHOLD:
                    # Split where the new slab reaches the threshold (the older air is vented there).
                    xv = xa + (top_p - THRESHOLD - ha) / (hb - ha) * (xb - xa)
                    cuts.insert(k + 1, xv)
                    continue
                self.piece(i, xa, xb, lid, wind, w, top_p, top_r, area, wmean, integral)
                h = hb
                if w > 0:
                    if h >= top_p - 1e-9:
                        top_p = max(top_p, h)
                        self.cr = [0.0] * len(POLLUTANTS)
                    if h >= top_r - 1e-9:
                        top_r = max(top_r, h)
                        self.co = [0.0] * len(POLLUTANTS)
                elif w < 0:
                    low = min(low, h)
                    if top_r > top_p and top_p - h > THRESHOLD - 1e-9:
                        self.co = [0.0] * len(POLLUTANTS)
                        top_r = top_p
                k += 1
            means.append([s / 3600.0 for s in integral])
            depth = top_r - h
            residual_end.append([(self.cr[p] * (top_p - h) + self.co[p] * (top_r - top_p)) / depth
                                 if depth > 1e-9 else 0.0 for p in range(len(POLLUTANTS))])
        return means, residual_end

    def piece(self, i, xa, xb, lid, wind, w, top_p, top_r, area, wmean, integral):
        ta, tb = xa * 3600.0, xb * 3600.0
        for p, (_, kk, kr, vd, cb, ca, _, e) in enumerate(POLLUTANTS):
            q = e * HOUR_W[i % 24] / wmean / area
            h_start = lid(xa)
            if w > 0:
                ce_kind = "cr" if h_start < top_p - 1e-9 else ("co" if h_start < top_r - 1e-9 else "ca")
            d0 = top_p - h_start

            def rhs(t, y):
                C, M, Co, _ = y   # M: Cr D while falling, Cr otherwise
                H = lid(t / 3600.0)
                u, v = wind(t / 3600.0)
                f = flushing(u, v)
                fa = flushing(u * ALOFT, v * ALOFT, floor=False)
                dC = q / H + f * (cb - C) - (kk + vd / H) * C
                if w > 0:
                    ce = {"cr": M, "co": Co, "ca": ca}[ce_kind]
                    dC += w / H * (ce - C)
                    dM = -(kr + fa) * M + fa * ca
                elif w < 0:
                    D = top_p - H
                    dM = -w * C - (kr + fa) * M + fa * ca * D
                else:
                    dM = -(kr + fa) * M + fa * ca
                dCo = -(kr + fa) * Co + fa * ca
                return [dC, dM, dCo, C]

            m0 = self.cr[p] * d0 if w < 0 else self.cr[p]
            sol = solve_ivp(rhs, (ta, tb), [self.c[p], m0, self.co[p], 0.0], method="DOP853",
                            rtol=1e-12, atol=1e-22)
            c, m, co, part = sol.y[:, -1]
            self.c[p], self.co[p] = c, co
            if w < 0:
                d1 = top_p - lid(xb)
                self.cr[p] = m / d1 if d1 > 0 else 0.0
            else:
                self.cr[p] = m
            integral[p] += part


def write_case(folder, met):
    with open(os.path.join(folder, "met.csv"), "w") as f:
        f.write("time,mixing_height [m],wind_speed [m/s],wind_from [deg]\n")
        for i, (lid, speed, frm) in enumerate(met):
            f.write("2026-02-%02dT%02d:00:00Z,%.10g,%.10g,%.10g\n" % (1 + i // 24, i % 24, lid, speed, frm))
    weights = ", ".join("%g" % w for w in HOUR_W)
    pollutants = ""
    for name, k, kr, vd, cb, ca, c0, _ in POLLUTANTS:
        pollutants += f"""[pollutants.{name}]
unit = "g/m3"
loss_rate = "{k!r} 1/s"
residual_loss_rate = "{kr!r} 1/s"
deposition_velocity = "{vd} m/s"
background = "{cb} g/m3"
free_troposphere = "{ca} g/m3"
initial = "{c0} g/m3"
"""
    emissions = ", ".join(f'{p[0]} = "{p[7]} g/s"' for p in POLLUTANTS)
    with open(os.path.join(folder, "case.toml"), "w") as f:
        f.write(f"""# invented reference case; the sub-step controls are the defaults
name = "default-accuracy"
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
min_wind_speed = "{WIND_FLOOR} m/s"
residual_wind_factor = {ALOFT}
{os.environ.get("LIDBOX_EXTRA", "")}
{pollutants}[sectors.city]
emissions = {{ {emissions} }}
hour_of_day = [{weights}]
""")


def main():
    binary = sys.argv[1]
    met = invented_met()
    with tempfile.TemporaryDirectory() as d:
        write_case(d, met)
        out = os.path.join(d, "out")
        p = subprocess.run([binary, "run", "-q", os.path.join(d, "case.toml"), "-o", out, "--netcdf"],
                           capture_output=True, text=True)
        if p.returncode != 0:
            print(p.stdout, p.stderr)
            return 1
        with netCDF4.Dataset(os.path.join(out, "hourly.nc")) as nc:
            got = {name: (np.array(nc[name][:]), np.array(nc[name + "_residual_end_of_hour"][:]))
                   for name, *_rest in POLLUTANTS}
            substeps = np.array(nc["substeps"][:])
    means, residual = Box().run(met)
    n = len(substeps)
    worst, worst_r = 0.0, 0.0
    for i in range(n):
        for p, (name, *_rest) in enumerate(POLLUTANTS):
            e = abs(got[name][0][i] - means[i][p]) / means[i][p]
            if os.environ.get("LIDBOX_DEBUG") and e > 1e-7:
                print(i, name, "%.2e" % e, substeps[i], met[i], met[i + 1])
            worst = max(worst, e)
            if residual[i][p] > 0:
                worst_r = max(worst_r, abs(got[name][1][i] - residual[i][p]) / residual[i][p])
    print("hours compared: %d; default controls, %.1f sub-steps per hour; worst relative "
          "difference: hour means %.2e, residual layer %.2e" % (n, substeps.mean(), worst, worst_r))
    ok = n == HOURS and worst < 1e-6 and worst_r < 1e-6
    print("PASS" if ok else "FAIL")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
