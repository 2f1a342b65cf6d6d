#!/usr/bin/env python3
"""References for the grid benchmark (tests/bench/grid.sh), each a whole process:

  read  FILE          a plain read of blh, u10, v10 through the NetCDF library (netCDF4,
                      unpacked), a day of maps at a time;
  numpy FILE          the numpy loop a user writes: the same box (unit flux, held hour means,
                      no residual layer, no loss, the 0.5 m/s and 50 m floors, 10 x 10 km, wind
                      along x) stepped hour by hour in every cell at once, with the exact
                      exponential step and lid dilution, reading a day of maps at a time.
"""
import sys

import numpy as np
from netCDF4 import Dataset

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
