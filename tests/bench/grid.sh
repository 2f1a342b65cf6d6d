#!/bin/bash
# Benchmark piece for grid runs (never a ctest; the invented file takes disk and minutes):
# an invented ERA5-like grid of HOURS x 100 x 100 cells (LIDBOX_BENCH_GRID_HOURS, default 8760)
# of packed shorts; `lidbox grid` against a plain read of the same variables and against a numpy
# loop stepping the same box in every cell and against numpy computing the same maps (checked
# equal by tests/reference/test_grid_maps_numpy.py); 2 threads against 1 (one thread reads and
# steps in turn; two step while a third reads ahead); peak memory for the series and
# for four times it; MPI -np 2 against 2 threads when build/mpi/lidbox exists.
# Called by run.sh with <build-dir> <source-dir> (it needs the bench_grid_read target built).
set -euo pipefail
build=$(realpath "$1")
src=$(realpath "$2")
py=${LIDBOX_PYTHON:-/usr/bin/python3}
hours=${LIDBOX_BENCH_GRID_HOURS:-8760}
work="$build/bench-grid"
mkdir -p "$work"
[ -f "$work/grid-$hours.nc" ] || "$py" "$src/tests/bench/make_bench_grid.py" "$work/grid-$hours.nc" "$hours"
[ -f "$work/grid-$((4 * hours)).nc" ] || "$py" "$src/tests/bench/make_bench_grid.py" "$work/grid-$((4 * hours)).nc" $((4 * hours))
case_for() {  # <grid file> <case path>: the bench case (bench-grid-case.toml.in) on that grid
  sed "s#@GRID_FILE@#$1#" "$src/tests/bench/bench-grid-case.toml.in" > "$2"
}
case_for "$work/grid-$hours.nc" "$work/case-1.toml"
case_for "$work/grid-$((4 * hours)).nc" "$work/case-4.toml"
timed() {  # <label> <command...>: prints wall seconds, CPU seconds (user + system) and peak RSS in MB
  local t0 t1 rss cpu
  t0=$(date +%s.%N)
  /usr/bin/time -f "%M %U %S" -o "$work/rss" "${@:2}" > /dev/null
  t1=$(date +%s.%N)
  read -r rss user sys < "$work/rss"
  cpu=$(echo "$user + $sys" | bc)
  echo "$1 $(echo "$t1 - $t0" | bc) $cpu $((rss / 1024))"
}
ratio() { echo "scale=2; $1 / $2" | bc; }
# The machine may be shared: wall-clock ratios mean little when the load is above the cores, so
# every figure comes with its CPU time too (a thread speed-up shows only in wall time).
echo "cores $(nproc), load average before: $(cut -d' ' -f1-3 /proc/loadavg)"
read -r _ t_read c_read m_read < <(timed read "$py" "$src/tests/bench/bench_grid_reference.py" read "$work/grid-$hours.nc")
# The floor: NetCDF-C alone reading the stored shorts (bench_grid_read.cpp, a bench target).
read -r _ t_cread c_cread _ < <(timed cread "$build/bench_grid_read" "$work/grid-$hours.nc")
read -r _ t_numpy c_numpy m_numpy < <(timed numpy "$py" "$src/tests/bench/bench_grid_reference.py" numpy "$work/grid-$hours.nc")
read -r _ t_maps c_maps m_maps < <(timed maps "$py" "$src/tests/bench/bench_grid_reference.py" maps "$work/grid-$hours.nc")
read -r _ t1 c1 m1 < <(timed one "$build/lidbox" grid "$work/case-1.toml" -o "$work/out1" --threads 1 -q)
read -r _ t2 c2 m2 < <(timed two "$build/lidbox" grid "$work/case-1.toml" -o "$work/out2" --threads 2 -q)
read -r _ t4 c4 m4 < <(timed four "$build/lidbox" grid "$work/case-4.toml" -o "$work/out4" --threads 2 -q)
echo "grid $hours h x 100 x 100 cells (packed shorts), whole processes (wall s, CPU s, peak MB):"
echo "  plain read of blh/u10/v10 (netCDF4)   $t_read s, CPU $c_read s, peak $m_read MB"
echo "  NetCDF-C read of the stored shorts    $t_cread s, CPU $c_cread s (no unpacking, no stepping)"
echo "  numpy loop, same box in every cell    $t_numpy s, CPU $c_numpy s, peak $m_numpy MB"
echo "  numpy maps, the same maps as lidbox   $t_maps s, CPU $c_maps s, peak $m_maps MB"
echo "  lidbox grid, 1 thread                 $t1 s, CPU $c1 s, peak $m1 MB"
echo "  lidbox grid, 2 threads                $t2 s, CPU $c2 s, peak $m2 MB"
echo "  lidbox grid, 4 x the hours, 2 threads $t4 s, CPU $c4 s, peak $m4 MB"
echo "  lidbox (2 threads) / plain read:      wall $(ratio "$t2" "$t_read"), CPU (1 thread) $(ratio "$c1" "$c_read") (target <= 1.5)"
echo "  speed-up over the numpy loop:         wall $(ratio "$t_numpy" "$t2"), CPU (1 thread) $(ratio "$c_numpy" "$c1") (target >= 5)"
echo "    (the NetCDF-C read alone is $(ratio "$t_numpy" "$t_cread") times faster than the numpy loop)"
echo "  speed-up over the numpy maps:         wall $(ratio "$t_maps" "$t2"), CPU (1 thread) $(ratio "$c_maps" "$c1")"
echo "  2 threads against 1 (wall):           $(ratio "$t1" "$t2") (target >= 1.7; CPU 2 threads / 1: $(ratio "$c2" "$c1"))"
echo "  peak memory 4x hours / 1x:            $(echo "scale=3; $m4 / $m2" | bc) (target within 1.10)"
# MPI: a build of the same type with LIDBOX_MPI=ON next to this one (<build>-mpi, for example
# cmake -B build/release-mpi -DCMAKE_BUILD_TYPE=Release -DLIDBOX_MPI=ON), else the mpi preset's.
mpi_bin="$build-mpi/lidbox"
[ -x "$mpi_bin" ] || mpi_bin="$build/../mpi/lidbox"
if [ -x "$mpi_bin" ] && command -v mpirun > /dev/null; then
  read -r _ tm cm _ < <(timed mpi mpirun --allow-run-as-root --oversubscribe -np 2 "$mpi_bin" grid "$work/case-1.toml" -o "$work/outm" --threads 1 -q)
  echo "  MPI -np 2 (1 thread each)             $tm s, CPU $cm s; wall against 2 threads: $(ratio "$tm" "$t2")"
  cmp "$work/out2/maps_year.nc" "$work/outm/maps_year.nc" && echo "  MPI maps byte-identical to the threaded run"
fi
echo "load average after: $(cut -d' ' -f1-3 /proc/loadavg)"
