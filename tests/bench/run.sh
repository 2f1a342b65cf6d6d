#!/usr/bin/env bash
# Runs every benchmark target (tests/bench/bench_*.cpp) from the build folder; each prints its own
# figures and its ratio against a reference run in the same invocation.
# Usage: tests/bench/run.sh <build dir> <source dir>
set -euo pipefail
build=$1
source=$2
python=${LIDBOX_PYTHON:-/usr/bin/python3}
cd "$build"
for src in "$source"/tests/bench/bench_*.cpp; do
  name=$(basename "$src" .cpp)
  echo "== $name"
  "./$name" "$source" "$python"
done
