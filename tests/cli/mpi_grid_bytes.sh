#!/bin/bash
# The invented basin grid run serially, on 2 threads and on 2 MPI processes gives byte-identical
# maps and series (ctest cli_mpi_grid_bytes in a LIDBOX_MPI=ON build; CI step "MPI grid run").
# SOURCE_DATE_EPOCH fixes the files' `history` time, the one attribute that would differ.
# Usage: tests/cli/mpi_grid_bytes.sh <lidbox built with LIDBOX_MPI=ON> [source dir] [mpirun]
set -euo pipefail
lidbox=$(realpath "$1")
src=$(realpath "${2:-$(dirname "$0")/../..}")
mpirun=${3:-mpirun}
export SOURCE_DATE_EPOCH=1767225600  # 2026-01-01T00:00:00Z
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
case_file="$src/met-demo/basin-grid.toml"
"$lidbox" grid "$case_file" -o "$out/serial" --threads 1 -q
"$lidbox" grid "$case_file" -o "$out/threads" --threads 2 -q
"$mpirun" --allow-run-as-root --oversubscribe -np 2 "$lidbox" grid "$case_file" -o "$out/mpi" --threads 1 -q
grep -q "x 2 process(es)" "$out/mpi/summary.txt" || { echo "FAIL: the MPI run did not use 2 processes"; cat "$out/mpi/summary.txt"; exit 1; }
grep -q "x 1 process(es)" "$out/serial/summary.txt" || { echo "FAIL: the serial run's summary"; cat "$out/serial/summary.txt"; exit 1; }
files=$(cd "$out/serial" && ls *.nc)
[ -n "$files" ] || { echo "FAIL: the serial run wrote no NetCDF file"; exit 1; }
[ "$(cd "$out/mpi" && ls *.nc)" = "$files" ] || { echo "FAIL: the MPI run wrote other files"; ls "$out/mpi"; exit 1; }
for f in $files; do
  cmp "$out/serial/$f" "$out/threads/$f"
  cmp "$out/serial/$f" "$out/mpi/$f"
  echo "ok: $f byte-identical (serial, 2 threads, 2 MPI processes)"
done
