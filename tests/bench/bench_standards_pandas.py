"""pandas doing the rolling means alone (k = 3, 8, 24 with min_periods = ceil(0.75 k)) on the
same shape of data as bench_standards.cpp: six series of 87 672 hours with 5 % missing
(invented, seeded; values do not change rolling's speed). Prints the time and its ratio to the
lidbox time passed in."""
import argparse
import math
import time

import numpy as np
import pandas as pd

ap = argparse.ArgumentParser()
ap.add_argument("--lidbox-seconds", type=float, required=True)
a = ap.parse_args()

rng = np.random.default_rng(20260101)
n = 87672
frame = pd.DataFrame({name: np.where(rng.random(n) < 0.05, np.nan, rng.random(n) * 50)
                      for name in ["PM2.5", "PM10", "O3", "NO2", "SO2", "CO"]})
best = math.inf
for _ in range(5):
    t = time.perf_counter()
    for k in (3, 8, 24):
        for col in frame.columns:
            frame[col].rolling(k, min_periods=math.ceil(0.75 * k)).mean()
    best = min(best, time.perf_counter() - t)
print("pandas %s rolling means only (k = 3, 8, 24; 6 series), best of 5: %.3f s" % (pd.__version__, best))
print("lidbox full standards computation / pandas rolling means alone: %.2f" % (a.lidbox_seconds / best))
