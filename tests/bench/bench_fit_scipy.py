"""scipy.optimize.nnls on the matrix bench_fit.cpp wrote (a year of hourly pairs at three
monitors, five sectors and the background; rows already weighted): the single fit, best of 5,
and a moving-block bootstrap of 100 resamples (24 h blocks) timed and scaled to 1000. Prints the
times, the ratios to lidbox's and the largest difference between the scales."""
import argparse
import time

import numpy as np
from scipy import __version__ as scipy_version
from scipy.optimize import nnls

ap = argparse.ArgumentParser()
ap.add_argument("matrix")
ap.add_argument("--fit-seconds", type=float, required=True)
ap.add_argument("--bootstrap-seconds", type=float, required=True)
ap.add_argument("--scales", required=True)
a = ap.parse_args()

data = np.loadtxt(a.matrix, delimiter=",")
A, b, hour = data[:, :-2], data[:, -2], data[:, -1].astype(int)
best = np.inf
for _ in range(5):
    t = time.perf_counter()
    x, _ = nnls(A, b)
    best = min(best, time.perf_counter() - t)
lid = np.array([float(v) for v in a.scales.split()])
print("scipy %s nnls, one fit (%d x %d), best of 5: %.4f s" % (scipy_version, A.shape[0], A.shape[1], best))
print("largest relative difference of the scales, lidbox vs scipy: %.1e" % np.max(np.abs(lid - x) / np.abs(x)))
print("lidbox fit (with Gaussian s.e., VIF, condition number) / scipy nnls alone: %.2f" % (a.fit_seconds / best))

T, L = hour.max() + 1, 24
rows_of_hour = [np.flatnonzero(hour == t) for t in range(T)]
rng = np.random.default_rng(1)
n_boot = 100
t = time.perf_counter()
for _ in range(n_boot):
    starts = rng.integers(0, T - L + 1, size=(T + L - 1) // L)
    idx = np.concatenate([np.concatenate(rows_of_hour[s:s + L]) for s in starts])
    nnls(A[idx], b[idx])
boot = (time.perf_counter() - t) * 1000 / n_boot
print("scipy nnls moving-block bootstrap, %d resamples timed, scaled to 1000: %.2f s" % (n_boot, boot))
print("lidbox 1000 resamples / scipy 1000 resamples: %.3f" % (a.bootstrap_seconds / boot))
