#!/bin/bash
# Benchmark piece for whole runs: lidbox against the peer script on invented 1-, 10- and 30-year
# cases (whole_run.py prints the figures). Called by run.sh with <build-dir> <source-dir>.
set -euo pipefail
build=$1
src=$2
py=${LIDBOX_PYTHON:-/usr/bin/python3}
if ! "$py" -c 'import numpy, pandas' 2>/dev/null; then
  echo "numpy or pandas not available under $py: the peer cannot run"
  exit 0
fi
"$py" "$src/tests/bench/whole_run.py" "$build" "$src" ${LIDBOX_BENCH_YEARS:-}
