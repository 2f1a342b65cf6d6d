#!/usr/bin/env python3
"""Indices as data through the real binary: a case that chooses the European index gets its
hourly table and report section; a bad index file (a gap between bands, overlapping bands, a
missing colour, an unknown key) or an unknown id stops the run with exit code 2, a message naming
the file and line, and no output.
(A case's relative path is resolved against the case's folder, here "./".)

ctest runs it as: /usr/bin/python3 test_indices_cli.py <lidbox binary> <source dir>
"""
import csv
import os
import shutil
import subprocess
import sys
import tempfile

BINARY = os.path.abspath(sys.argv[1])
SOURCE = os.path.abspath(sys.argv[2])
DEMO = os.path.join(SOURCE, "met-demo")
SHIPPED = os.path.join(SOURCE, "src", "data", "indices", "eu-eaqi-2017.toml")
failures = []


def check(cond, what):
    print(("ok: " if cond else "FAIL: ") + what)
    if not cond:
        failures.append(what)


def case_dir(d, index_line):
    for f in ("cindervale-met.csv", "cindervale-advisories.toml"):
        shutil.copy(os.path.join(DEMO, f), d)
    with open(os.path.join(DEMO, "cindervale.toml")) as f:
        text = f.read()
    text = text.replace('aqi_table = "2024"\n', 'aqi_table = "2024"\n' + index_line + "\n", 1)
    with open(os.path.join(d, "case.toml"), "w") as f:
        f.write(text)
    return next(i + 1 for i, l in enumerate(text.splitlines()) if l.startswith("index = "))


def run(args, cwd):
    return subprocess.run([BINARY] + args, cwd=cwd, capture_output=True, text=True)


def test_european_index():
    with tempfile.TemporaryDirectory() as d:
        case_dir(d, 'index = "eu-eaqi-2017"')
        p = run(["run", "case.toml", "-o", "out"], d)
        check(p.returncode == 0, "a case choosing eu-eaqi-2017 runs (stderr: %s)" % p.stderr.strip())
        path = os.path.join(d, "out", "index.csv")
        check(os.path.isfile(path), "index.csv written")
        if not os.path.isfile(path):
            return
        with open(path) as f:
            rows = list(csv.DictReader(f))
        # 168 hours of PM2.5 (24-h running means from the first hour on, 18 of 24 needed) and
        # CO (not an input of the index): an hour exists wherever PM2.5's mean does.
        check(len(rows) > 100, "index.csv has hourly rows (%d)" % len(rows))
        names = {"Good", "Fair", "Moderate", "Poor", "Very poor"}
        check(all(r["category"] in names for r in rows), "categories are the EEA's names")
        # The level follows the EEA viewer's PM2.5 bands (0-10, 10-20, 20-25, 25-50, 50-800).
        edges = [10, 20, 25, 50]
        ok = True
        for r in rows:
            c = r["PM2.5 24-h running [ug m-3]"]
            if c:
                want = 1 + sum(1 for e in edges if float(c) > e)
                ok = ok and int(r["PM2.5 24-h running level"]) == want
        check(ok, "every PM2.5 level matches the published bands")
        with open(os.path.join(d, "out", "report.md")) as f:
            md = f.read()
        check("## European Air Quality Index (EEA, five levels, 2017)" in md, "report.md has the index section")


def expect_error(name, index_line, bad_text, want_tail):
    with tempfile.TemporaryDirectory() as d:
        line = case_dir(d, index_line)
        if bad_text is not None:
            with open(os.path.join(d, "bad.toml"), "w") as f:
                f.write(bad_text)
        p = run(["run", "case.toml", "-o", "out"], d)
        check(p.returncode == 2, name + ": exit code 2 (got %d)" % p.returncode)
        want = "lidbox: error: case.toml:%d: [standards] index: %s" % (line, want_tail)
        got = p.stderr.strip()
        check(got == want, name + ": message asserted whole" +
              ("" if got == want else "\n   got:  %s\n   want: %s" % (got, want)))
        check(not os.path.exists(os.path.join(d, "out")), name + ": no output written")


def shipped_with(old, new):
    with open(SHIPPED) as f:
        text = f.read()
    assert old in text, old
    return text.replace(old, new, 1)


def line_of(text, needle):
    return next(i + 1 for i, l in enumerate(text.splitlines()) if needle in l)


def test_bad_files():
    gap = shipped_with("rows = [[0, 40], [40, 100],", "rows = [[0, 40], [45, 100],")
    expect_error("gap between bands", 'index = "bad.toml"', gap,
                 "./bad.toml:%d: [[scale]] rows row 2: a gap between bands: starts at 45 ug m-3 after "
                 "row 1 ends at 40; expected the next band to start where the previous one ends (40)"
                 % line_of(gap, "[45, 100]"))
    overlap = shipped_with("rows = [[0, 80], [80, 120],", "rows = [[0, 80], [70, 120],")
    expect_error("overlapping bands", 'index = "bad.toml"', overlap,
                 "./bad.toml:%d: [[scale]] rows row 2: overlapping bands: starts at 70 ug m-3 after "
                 "row 1 ends at 80; expected the next band to start where the previous one ends (80)"
                 % line_of(overlap, "[70, 120]"))
    no_colour = shipped_with('colour = "#F0E641"\n', "")
    expect_error("missing colour", 'index = "bad.toml"', no_colour,
                 "./bad.toml:%d: [[category]]: no \"colour\"; expected a colour \"#RRGGBB\""
                 % (line_of(no_colour, 'name = "Moderate"') - 1))
    unknown = shipped_with('note = "', 'notes = "')
    expect_error("unknown key", 'index = "bad.toml"', unknown,
                 "./bad.toml:%d: [index]: unknown key \"notes\"; expected one of id, name, kind, "
                 "version, reference_temperature_K, reference_pressure_Pa, beyond_name, note "
                 "(did you mean \"note\"?)" % line_of(unknown, "notes = "))
    expect_error("unknown id", 'index = "eu-eaqi"', None,
                 "index \"eu-eaqi\": not found in lidbox data: indices/; expected one of ca-aqhi, "
                 "eu-eaqi-2017, us-aqi-2018, us-aqi-2024 or the path of an index file")


def test_observe_index():
    with tempfile.TemporaryDirectory() as d:
        bad = shipped_with("rows = [[0, 40], [40, 100],", "rows = [[0, 40], [45, 100],")
        with open(os.path.join(d, "bad.toml"), "w") as f:
            f.write(bad)
        p = run(["observe", os.path.join(DEMO, "observations-invented.csv"), "--lst-offset",
                 "-07:00", "--index", "bad.toml", "--out", "out"], d)
        check(p.returncode == 2, "observe --index bad.toml: exit code 2 (got %d)" % p.returncode)
        check(("bad.toml:%d: [[scale]] rows row 2: a gap between bands" % line_of(bad, "[45, 100]"))
              in p.stderr, "observe names the file and line (%s)" % p.stderr.strip())


test_european_index()
test_bad_files()
test_observe_index()
if failures:
    print("%d check(s) failed" % len(failures))
    sys.exit(1)
print("all checks passed")
