#!/bin/bash
# Benchmark piece for the standards library: lidbox's full computation, then pandas' rolling
# means alone on the same shape of data, and the ratio. Called by run.sh with
# <build-dir> <source-dir>.
set -euo pipefail
build=$1
src=$2
py=${LIDBOX_PYTHON:-/usr/bin/python3}
out=$("$build/bench_standards")
echo "$out" | grep -v '^compute_seconds_best='
seconds=$(echo "$out" | sed -n 's/^compute_seconds_best=//p')
if "$py" -c 'import pandas' 2>/dev/null; then
  "$py" "$src/tests/bench/bench_standards_pandas.py" --lidbox-seconds "$seconds"
else
  echo "pandas not available under $py: ratio not measured"
fi
