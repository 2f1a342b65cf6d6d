#!/bin/bash
# Benchmark piece for the box engine: a year of hourly forcing, four pollutants, three sectors,
# and scipy's solve_ivp on the same held case (the binary runs it and prints the ratio).
# Called by run.sh with <build-dir> <source-dir>.
set -euo pipefail
build=$1
src=$2
cd "$build"
./bench_engine "$src" "${LIDBOX_PYTHON:-/usr/bin/python3}"
