#!/bin/bash
# Benchmark piece for chart.svg: its size and time on the 7-day demo, the 5-day ensemble
# forecast, invented 91-day, 10-year and 30-year cases (long_case.py) and an invented year of 16
# tracers and 16 sectors (wide_case.py), against stepping the
# box and writing hourly.csv in the same process (bench_chart). Called by run.sh with
# <build-dir> <source-dir>.
set -euo pipefail
build=$1
src=$2
py=${LIDBOX_PYTHON:-/usr/bin/python3}
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
cd "$tmp"
"$build/bench_chart" "$src/met-demo/cindervale.toml"
"$build/bench_chart" "$src/met-demo/cindervale-forecast.toml"
for years in 0.25 ${LIDBOX_BENCH_YEARS:-10 30}; do
  case=$("$py" -c "import sys; sys.path.insert(0, '$src/tests/bench'); import long_case; print(long_case.write_case('$tmp/c$years', $years))")
  "$build/bench_chart" "$case" 1
done
"$build/bench_chart" "$("$py" "$src/tests/bench/wide_case.py" "$tmp/wide")" 1
