#!/usr/bin/env python3
"""The outputs stay byte-identical: runs the invented demo and an invented 10-year case (both
with --netcdf and standards) and compares a checksum of every output file with the list in
tests/cli/output_checksums.txt.

Source of the check values: the outputs of lidbox before the output writers were rewritten for
speed (a regression guard, no external source): commit bffd1b9 for the demo, and for the 10-year
case commit 6c937ba, which is bffd1b9 with the budget closure summed once (in the same order, so
the same numbers) because bffd1b9 needs many minutes for 10 years. The list was then regenerated
when main's changes to the physics and the standards (the residual layer's mixing cycles, a
vented_aloft budget line, stagnation tables) were merged, with the rewritten writers. chart.svg (and bulletin.html, which embeds it; bulletin.md and
bulletin.txt carry the same text and are compared) is left out: its
drawing is being changed on purpose for long runs. NetCDF files are compared through ncdump's
text (header and data) without the global `history` attribute, which carries the time of the run;
tables and texts are compared byte for byte.

A change that is meant to change the outputs regenerates the list in the same commit:
    /usr/bin/python3 tests/cli/test_output_checksums.py <lidbox> <source dir> --update

ctest runs it as: /usr/bin/python3 test_output_checksums.py <lidbox binary> <source dir>
"""
import hashlib
import os
import re
import shutil
import subprocess
import sys
import tempfile

BINARY = os.path.abspath(sys.argv[1])
SOURCE = os.path.abspath(sys.argv[2])
UPDATE = "--update" in sys.argv[3:]
LIST = os.path.join(SOURCE, "tests", "cli", "output_checksums.txt")
sys.path.insert(0, os.path.join(SOURCE, "tests", "bench"))
import long_case  # noqa: E402  (the invented long case shared with the benchmark)

SKIPPED = {"chart.svg", "bulletin.html"}  # bulletin.html embeds chart.svg


def canonical_ncdump(path):
    """ncdump's text in an order of its own: dimensions, then each variable's declaration and
    attributes sorted by name, the global attributes without `history`, then each variable's data
    sorted by name. NetCDF-4 files list variables in creation order or by name depending on how
    the file was made; the order carries no data. The time dimension was unlimited before the
    writer learnt to give its known length, which changes how the header prints it but neither
    the data nor the attributes."""
    text = subprocess.run(["ncdump", path], capture_output=True, check=True).stdout.decode()
    lines = text.split("\n")[1:]  # the first line names the file
    section, dims, variables, globals_, data = None, [], {}, [], {}
    current = None
    for line in lines:
        stripped = line.strip()
        if stripped in ("", "}"):
            continue
        if stripped in ("dimensions:", "variables:", "data:", "// global attributes:"):
            section = stripped
            continue
        if section == "dimensions:":
            m = re.match(r"^(\s*time = )UNLIMITED ; // \((\d+) currently\)$", line)
            dims.append(m.group(1) + m.group(2) + " ;" if m else line)
        elif section == "variables:":
            m = re.match(r"^\t(\w+) (\w+)[(;]", line)
            if m:
                current = m.group(2)
                variables[current] = [line]
            elif current is not None:
                variables[current].append(line)
        elif section == "// global attributes:":
            if not stripped.startswith(":history = "):
                globals_.append(line)
        elif section == "data:":
            m = re.match(r"^ (\w+) = ", line)
            if m:
                current = m.group(1)
                data[current] = [line]
            elif current is not None and current in data:
                data[current].append(line)
    out = dims + ["variables:"]
    for k in sorted(variables):
        out += variables[k]
    out += ["globals:"] + globals_ + ["data:"]
    for k in sorted(data):
        out += data[k]
    return "\n".join(out).encode()


def checksum(path):
    if path.endswith(".nc"):
        if shutil.which("ncdump") is None:
            print("ncdump not found: skipped")
            sys.exit(77)
        return hashlib.sha256(canonical_ncdump(path)).hexdigest()
    with open(path, "rb") as f:
        return hashlib.sha256(f.read()).hexdigest()


def run_case(workdir, case_file, label, out):
    p = subprocess.run([BINARY, "run", case_file, "-o", "out", "--netcdf", "-q"], cwd=workdir,
                       capture_output=True, text=True)
    if p.returncode != 0:
        print("FAIL: %s exits %d: %s" % (label, p.returncode, p.stderr.strip()))
        sys.exit(1)
    folder = os.path.join(workdir, "out")
    for name in sorted(os.listdir(folder)):
        if name in SKIPPED:
            continue
        out["%s/%s" % (label, name)] = checksum(os.path.join(folder, name))


def main():
    sums = {}
    with tempfile.TemporaryDirectory() as d:
        demo = os.path.join(d, "demo")
        os.makedirs(demo)
        for name in ("cindervale.toml", "cindervale-met.csv", "cindervale-advisories.toml"):
            shutil.copy(os.path.join(SOURCE, "met-demo", name), demo)
        run_case(demo, "cindervale.toml", "demo", sums)
        ten = os.path.join(d, "ten")
        case = long_case.write_case(ten, 10)
        run_case(ten, os.path.basename(case), "invented-10y", sums)
    if UPDATE:
        with open(LIST, "w") as f:
            for k in sorted(sums):
                f.write("%s  %s\n" % (sums[k], k))
        print("wrote", LIST, len(sums), "checksums")
        return 0
    expected = {}
    with open(LIST) as f:
        for line in f:
            digest, name = line.split()
            expected[name] = digest
    failures = 0
    for name in sorted(set(expected) | set(sums)):
        if name not in sums:
            print("FAIL: %s was not written" % name)
        elif name not in expected:
            print("FAIL: %s is new (not in the list)" % name)
        elif sums[name] != expected[name]:
            print("FAIL: %s differs from the stored checksum" % name)
        else:
            print("ok: %s" % name)
            continue
        failures += 1
    print("%d of %d outputs identical" % (len(expected) - failures, len(expected)))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
