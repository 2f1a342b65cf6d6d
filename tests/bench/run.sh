#!/bin/bash
# Runs every benchmark piece tests/bench/*.sh (except this file) with <build-dir> <source-dir>.
# Add a benchmark by adding a piece; each prints its own figures.
set -euo pipefail
build=$1
src=$2
status=0
for piece in "$src"/tests/bench/*.sh; do
  [ "$(basename "$piece")" = "run.sh" ] && continue
  echo "== $(basename "$piece" .sh)"
  bash "$piece" "$build" "$src" || status=1
done
exit $status
