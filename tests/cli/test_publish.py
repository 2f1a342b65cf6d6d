#!/usr/bin/env python3
"""A run's output set is published as one step, and can be repeated byte for byte.

* Kill at every step: the binary's test hook (LIDBOX_TEST_KILL_AFTER_PUBLISH_STEP=k) sends it
  SIGKILL after the k-th completed file, after the temporary folder's sync (k = files + 1) and
  after the swap (k = files + 2). After each kill the output folder holds exactly the previous
  run's files or exactly the new run's, nothing else; the next run cleans the stale temporary
  and publishes the new set.
* A folder of the user's own files is refused (exit 2) and left as it was.
* With SOURCE_DATE_EPOCH set, two runs give byte-identical files, NetCDF included, and the
  NetCDF history names that time (reproducible-builds convention,
  https://reproducible-builds.org/specs/source-date-epoch/).

ctest runs it as: /usr/bin/python3 test_publish.py <lidbox binary> <source dir>
"""
import hashlib
import os
import shutil
import signal
import subprocess
import sys
import tempfile

BINARY = os.path.abspath(sys.argv[1])
SOURCE = os.path.abspath(sys.argv[2])
EPOCH = "1767225600"  # 2026-01-01T00:00:00Z
failures = []


def check(cond, what):
    print(("ok: " if cond else "FAIL: ") + what)
    if not cond:
        failures.append(what)


def run(args, cwd, kill_step=None):
    env = dict(os.environ, SOURCE_DATE_EPOCH=EPOCH)
    if kill_step is not None:
        env["LIDBOX_TEST_KILL_AFTER_PUBLISH_STEP"] = str(kill_step)
    return subprocess.run([BINARY] + args, cwd=cwd, env=env, capture_output=True, text=True)


def snapshot(folder):
    """{name: sha256} of a folder's files, or None when the folder does not exist."""
    if not os.path.isdir(folder):
        return None
    out = {}
    for name in sorted(os.listdir(folder)):
        with open(os.path.join(folder, name), "rb") as f:
            out[name] = hashlib.sha256(f.read()).hexdigest()
    return out


def temporaries(parent):
    return sorted(n for n in os.listdir(parent) if n.startswith(".out.tmp-"))


def main():
    with tempfile.TemporaryDirectory() as d:
        for name in ("cindervale.toml", "cindervale-met.csv", "cindervale-advisories.toml"):
            shutil.copy(os.path.join(SOURCE, "met-demo", name), d)
        # The previous run (no NetCDF) and the new one (with NetCDF), each published cleanly.
        p = run(["run", "cindervale.toml", "-o", "old", "-q"], d)
        check(p.returncode == 0, "the previous run exits 0 (%s)" % p.stderr.strip())
        p = run(["run", "cindervale.toml", "-o", "new", "-q", "--netcdf"], d)
        check(p.returncode == 0, "the new run exits 0 (%s)" % p.stderr.strip())
        old, new = snapshot(os.path.join(d, "old")), snapshot(os.path.join(d, "new"))
        check(old is not None and new is not None and set(old) < set(new),
              "the new set has more files than the previous one (%d, %d)" % (len(old), len(new)))
        files = len(new)
        for k in range(1, files + 3):
            out = os.path.join(d, "out")
            shutil.rmtree(out, ignore_errors=True)
            shutil.copytree(os.path.join(d, "old"), out)
            p = run(["run", "cindervale.toml", "-o", "out", "-q", "--netcdf"], d, kill_step=k)
            killed = p.returncode == -signal.SIGKILL
            seen = snapshot(out)
            expected = new if k == files + 2 else old
            check(killed and seen == expected,
                  "killed after step %d of %d: the folder holds exactly the %s set" %
                  (k, files + 2, "new" if expected is new else "previous"))
            p = run(["run", "cindervale.toml", "-o", "out", "-q", "--netcdf"], d)
            check(p.returncode == 0 and snapshot(out) == new and temporaries(d) == [],
                  "after the kill at step %d the next run publishes the new set and cleans up" % k)
        # A folder of the user's own files is refused and left as it was.
        mine = os.path.join(d, "mine")
        os.makedirs(mine)
        with open(os.path.join(mine, "thesis.tex"), "w") as f:
            f.write("my own work\n")
        p = run(["run", "cindervale.toml", "-o", "mine", "-q"], d)
        check(p.returncode == 2 and p.stderr.strip() ==
              'lidbox: error: mine: holds "thesis.tex", which a lidbox run does not write; '
              'expected a new or empty folder, or one an earlier run wrote (a run replaces the '
              'whole folder)',
              "a folder of the user's own files is refused (%s)" % p.stderr.strip())
        check(snapshot(mine) == {"thesis.tex": hashlib.sha256(b"my own work\n").hexdigest()} and
              temporaries(d) == [], "and left as it was, with no temporary beside it")
        # Byte-reproducible with SOURCE_DATE_EPOCH (the new run above used it too).
        p = run(["run", "cindervale.toml", "-o", "again", "-q", "--netcdf"], d)
        check(p.returncode == 0 and snapshot(os.path.join(d, "again")) == new,
              "two runs with SOURCE_DATE_EPOCH give byte-identical files, NetCDF included")
        dump = subprocess.run(["ncdump", "-h", os.path.join(d, "new", "hourly.nc")],
                              capture_output=True, text=True).stdout
        check(':history = "2026-01-01T00:00:00Z lidbox ' in dump,
              "the NetCDF history carries SOURCE_DATE_EPOCH's time")
    print("%d failure(s)" % len(failures))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
