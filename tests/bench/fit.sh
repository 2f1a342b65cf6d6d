#!/bin/bash
# Benchmark piece for the fit of sector scales (sector_fit.hpp): lidbox's fit and 1000 bootstrap
# resamples on a year of hourly pairs at three monitors, then scipy.optimize.nnls on the same
# matrix, and the ratios. Called by run.sh with <build-dir> <source-dir>.
set -euo pipefail
build=$1
src=$2
py=${LIDBOX_PYTHON:-/usr/bin/python3}
matrix=$(mktemp)
trap 'rm -f "$matrix"' EXIT
out=$("$build/bench_fit" "$matrix")
echo "$out" | grep -v '^scale_values='
fit=$(echo "$out" | sed -n 's/^fit_seconds_best=//p')
boot=$(echo "$out" | sed -n 's/^bootstrap_1000_seconds=//p')
scales=$(echo "$out" | sed -n 's/^scale_values=//p')
if "$py" -c 'import scipy' 2>/dev/null; then
  "$py" "$src/tests/bench/bench_fit_scipy.py" "$matrix" --fit-seconds "$fit" --bootstrap-seconds "$boot" --scales "$scales"
else
  echo "scipy not available under $py: ratios not measured"
fi
