#!/bin/bash
# Benchmark piece for ensemble runs: 50 members x 10 days x 4 pollutants x 3 sectors.
# The engine alone (bench_ensemble), then the whole process: one `lidbox run` of the ensemble case
# against 50 single-member runs of the same case (the reference, run here), and their ratio.
# Called by run.sh with <build-dir> <source-dir>.
set -euo pipefail
build=$(cd "$1" && pwd)
src=$2
py=${LIDBOX_PYTHON:-/usr/bin/python3}
"$build/bench_ensemble"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
# Invented met: 50 members of 240 hours (seeded), and the case with and without [ensemble].
"$py" - "$work" "$src" <<'PY'
import math, os, random, re, sys
work, src = sys.argv[1], sys.argv[2]
os.makedirs(os.path.join(work, "members"))
for m in range(1, 51):
    rng = random.Random(9000 + m)
    rows = ["time,mixing_height [m],wind_speed [m/s],wind_from [deg]"]
    for k in range(240):
        d, h = divmod(k, 24)
        diurnal = max(0.0, math.sin((h - 6) / 12.0 * math.pi))
        rows.append("2026-02-%02dT%02d:00:00Z,%.0f,%.2f,%.0f" % (
            9 + d, h, (80 + 500 * diurnal) * rng.uniform(0.8, 1.2), 0.2 + 8 * rng.random() * rng.random(),
            rng.uniform(0, 360)))
    with open(os.path.join(work, "members", "m%02d.csv" % m), "w") as f:
        f.write("\n".join(rows) + "\n")
bench = open(os.path.join(src, "tests", "bench", "bench_ensemble.cpp")).read()
case = re.search(r'kCase = R"\((.*?)\)";', bench, re.S).group(1)
case = case.replace('file = "unused.csv"', 'file = "members/m01.csv"')
case += '[standards]\nrule_sets = ["eu-2008-50"]\naqi = false\naqhi = false\n'
with open(os.path.join(work, "single.toml"), "w") as f:
    f.write(case)
with open(os.path.join(work, "ensemble.toml"), "w") as f:
    f.write(case + '[ensemble]\nmembers = "members/m*.csv"\n')
PY
cd "$work"
now() { date +%s.%N; }
t0=$(now)
"$build/lidbox" run ensemble.toml -o out-ensemble -q
t1=$(now)
for m in $(seq -w 1 50); do
  sed "s#members/m01.csv#members/m$m.csv#" single.toml > one.toml
  "$build/lidbox" run one.toml -o "out-$m" -q
done
t2=$(now)
"$py" -c "
e = $t1 - $t0
s = $t2 - $t1
print('whole process: one ensemble run %.2f s, 50 single-member runs (reference) %.2f s, ratio %.1f (aim >= 10)' % (e, s, s / e))
"
