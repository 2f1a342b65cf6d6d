#!/bin/bash
# The invented basin grid run serially, on 2 threads and on 2 MPI processes gives byte-identical
# maps and series (CI runs it with the LIDBOX_MPI=ON build; not a ctest, it needs mpirun).
# Usage: tests/cli/mpi_grid_bytes.sh <lidbox built with LIDBOX_MPI=ON> [source dir]
set -euo pipefail
lidbox=$(realpath "$1")
src=${2:-$(dirname "$0")/../..}
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
"$lidbox" grid "$src/met-demo/basin-grid.toml" -o "$out/serial" --threads 1 -q
"$lidbox" grid "$src/met-demo/basin-grid.toml" -o "$out/threads" --threads 2 -q
mpirun --allow-run-as-root --oversubscribe -np 2 "$lidbox" grid "$src/met-demo/basin-grid.toml" -o "$out/mpi" --threads 1 -q
grep -q "x 2 process(es)" "$out/mpi/summary.txt" || { echo "FAIL: the MPI run did not use 2 processes"; cat "$out/mpi/summary.txt"; exit 1; }
for f in maps_month.nc series.nc; do
  cmp "$out/serial/$f" "$out/threads/$f"
  cmp "$out/serial/$f" "$out/mpi/$f"
  echo "ok: $f byte-identical (serial, 2 threads, 2 MPI processes)"
done
