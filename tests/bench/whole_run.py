#!/usr/bin/env python3
"""Whole-run benchmark: `lidbox run` (CSV outputs with standards, then with --netcdf as well) and
the peer script peer_run.py on the same invented 1-, 10- and 30-year cases (long_case.py), in one
go. For each: wall time and CPU time (user + system) of the whole process, their ratios, peak
memory (the child's getrusage maxrss) and bytes per simulated hour, then the share of lidbox's
time in reading, stepping, statistics and writing (bench_run, the same steps in one process).
The machine's load is printed beside the figures: other work on the machine lengthens wall times.

    /usr/bin/python3 whole_run.py <build dir> <source dir> [years ...]
"""
import os
import subprocess
import sys
import tempfile
import time

BUILD, SOURCE = os.path.abspath(sys.argv[1]), os.path.abspath(sys.argv[2])
YEARS = [int(y) for y in sys.argv[3:]] or [1, 10, 30]
LIDBOX = os.path.join(BUILD, "lidbox")
BENCH_RUN = os.path.join(BUILD, "bench_run")
sys.path.insert(0, os.path.join(SOURCE, "tests", "bench"))
import long_case  # noqa: E402


def measure(cmd, cwd):
    """(wall s, cpu s, peak bytes) of one run of cmd; raises when it fails."""
    with tempfile.TemporaryFile() as err:
        t0 = time.monotonic()
        p = subprocess.Popen(cmd, cwd=cwd, stdout=subprocess.DEVNULL, stderr=err)
        _, status, ru = os.wait4(p.pid, 0)
        wall = time.monotonic() - t0
        p.returncode = os.waitstatus_to_exitcode(status)
        if p.returncode != 0:
            err.seek(0)
            raise RuntimeError("%s failed (%d): %s" % (" ".join(cmd), p.returncode,
                                                       err.read().decode()))
    return wall, ru.ru_utime + ru.ru_stime, ru.ru_maxrss * 1024


def best(cmd, cwd, repeats):
    """The fastest of `repeats` runs by wall time, and the largest peak memory seen."""
    runs = [measure(cmd, cwd) for _ in range(repeats)]
    wall = min(r[0] for r in runs)
    cpu = min(r[1] for r in runs)
    return wall, cpu, max(r[2] for r in runs)


def load():
    with open("/proc/loadavg") as f:
        return f.read().split()[0]


def main():
    print("whole-run benchmark: invented demo-like case (2 pollutants, 2 sectors, 3 rule sets)")
    print("machine: %d cores, 1-min load average %s at start" % (os.cpu_count(), load()))
    rows = []
    with tempfile.TemporaryDirectory() as d:
        for years in YEARS:
            folder = os.path.join(d, "y%d" % years)
            case = long_case.write_case(folder, years)
            hours = int(round(years * 8766))
            repeats = 3 if years <= 10 else 1
            name = os.path.basename(case)
            csv = best([LIDBOX, "run", name, "-o", "out", "-q"], folder, repeats)
            nc = best([LIDBOX, "run", name, "-o", "out", "-q", "--netcdf"], folder, repeats)
            peer = best([sys.executable, os.path.join(SOURCE, "tests", "bench", "peer_run.py"),
                         folder, str(years), "peer"], folder, 2 if years <= 10 else 1)
            shares = subprocess.run([BENCH_RUN, name], cwd=folder, capture_output=True,
                                    text=True, check=True).stdout.strip()
            rows.append((years, hours, csv, nc, peer))
            print("\n%d year(s), %d hours (load %s)" % (years, hours, load()))
            for label, (wall, cpu, peak) in (("lidbox run (CSV + standards)", csv),
                                             ("lidbox run --netcdf", nc),
                                             ("peer script (numpy + pandas)", peer)):
                print("  %-30s wall %7.3f s  cpu %7.3f s  peak %7.1f MB  %6.0f bytes/hour" %
                      (label, wall, cpu, peak / 1e6, peak / hours))
            print("  ratio peer / lidbox: CSV %.1fx wall (%.1fx cpu), --netcdf %.1fx wall (%.1fx cpu)"
                  % (peer[0] / csv[0], peer[1] / csv[1], peer[0] / nc[0], peer[1] / nc[1]))
            print("  " + shares)
    if len(rows) > 1:
        print("\nmemory per added hour (peak difference / hours difference):")
        for (y0, h0, c0, n0, _), (y1, h1, c1, n1, _) in zip(rows, rows[1:]):
            print("  %2d -> %2d years: CSV %.0f bytes/hour, --netcdf %.0f bytes/hour" %
                  (y0, y1, (c1[2] - c0[2]) / (h1 - h0), (n1[2] - n0[2]) / (h1 - h0)))
    print("\nload at end: %s" % load())


if __name__ == "__main__":
    main()
