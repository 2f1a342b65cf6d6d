"""The verification reference file read by tests/analysis/test_verification.cpp is exactly what
numpy computes in make_verification_reference.py (so the C++ test compares with numpy, not with
numbers typed by hand).

Usage (ctest): /usr/bin/python3 test_verification_reference.py <lidbox binary> <source dir>
Exit 77 (skip) when numpy is missing.
"""
import os
import sys

try:
    import numpy  # noqa: F401
except ImportError as e:
    print("skip:", e)
    sys.exit(77)

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from make_verification_reference import reference_text  # noqa: E402

path = os.path.join(sys.argv[2], "tests", "analysis", "data", "verification_reference.txt")
stored = open(path).read()
made = reference_text()
# The first line names the numpy version; the numbers must agree to the last digit printed.
if stored.split("\n", 1)[1] != made.split("\n", 1)[1]:
    print("FAIL: %s differs from make_verification_reference.py's output" % path)
    sys.exit(1)
print("ok")
