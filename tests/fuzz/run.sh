#!/bin/bash
# Runs every libFuzzer target of a fuzz build (the `fuzz` preset) for SECONDS each, from a copy
# of its seed corpus in a temporary folder (the repository is never written), and prints the
# executions per target. Exit status 1 on any finding (crash, sanitizer report, an exception
# other than InputError, a leak, an input over the time or memory limit); the reproducer is kept
# in FINDINGS (default: build/fuzz/findings) for `./build/fuzz/<target> <file>`.
# Usage: tests/fuzz/run.sh [build dir, default build/fuzz] [seconds per target, default 60]
set -uo pipefail
src=$(cd "$(dirname "$0")/../.." && pwd)
build=$(realpath "${1:-$src/build/fuzz}")
seconds=${2:-60}
findings=${FINDINGS:-$build/findings}
mkdir -p "$findings"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
# A leak inside UDUNITS-2's parser is not ours to fix (lsan.supp says which).
export LSAN_OPTIONS="suppressions=$src/tests/fuzz/lsan.supp:print_suppressions=0${LSAN_OPTIONS:+:$LSAN_OPTIONS}"
status=0
for corpus in "$src"/tests/fuzz/corpus/*/; do
  target=$(basename "$corpus")
  exe="$build/$target"
  [ -x "$exe" ] || { echo "FAIL $target: $exe not built"; status=1; continue; }
  cp -r "$corpus" "$work/$target"
  log="$work/$target.log"
  # -timeout: one input that takes 10 s is a finding (a parser must refuse fast);
  # -rss_limit_mb: so is one that needs 2 GB. Both are saved like crashes.
  "$exe" "$work/$target" -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 \
      -print_final_stats=1 -artifact_prefix="$findings/$target-" > "$log" 2>&1
  rc=$?
  runs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -1)
  corpus_size=$(ls "$work/$target" | wc -l)
  if [ $rc -eq 0 ]; then
    printf 'ok   %-18s %10s executions in %s s, corpus %s inputs\n' "$target" "${runs:-?}" "$seconds" "$corpus_size"
  else
    printf 'FAIL %-18s exit %d after %s executions; reproducer in %s\n' "$target" "$rc" "${runs:-?}" "$findings"
    grep -E 'ERROR|finding|runtime error|SUMMARY|Test unit written' "$log" | head -20
    status=1
  fi
done
exit $status
