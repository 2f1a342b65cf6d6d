"""Writes tests/analysis/data/verification_reference.txt: seeded random ensemble forecasts and
observations with numpy's values of the verification scores, read by
tests/analysis/test_verification.cpp. test_verification_reference.py checks that the file is what
this script makes, so every number in it comes from numpy.

Format: lines "key value value ..." ("members" lines hold one case's 10 members).
    /usr/bin/python3 tests/reference/make_verification_reference.py > tests/analysis/data/verification_reference.txt
"""
import sys

import numpy as np


def reference_text():
    rng = np.random.default_rng(20261202)
    n, M = 400, 10
    truth = rng.gamma(4.0, 5.0, n)
    members = truth[:, None] * rng.lognormal(0.0, 0.35, (n, M)) + rng.normal(0, 2.0, (n, M))
    obs = truth * rng.lognormal(0.0, 0.2, n)
    level = 25.0
    p = (members > level).sum(axis=1) / M            # member counting
    o = (obs > level).astype(int)
    # Brier score and Murphy's decomposition over the distinct forecast values.
    bs = np.mean((p - o) ** 2)
    ob = o.mean()
    rel = res = 0.0
    table = []
    for pk in np.unique(p):
        sel = p == pk
        nk, ok = sel.sum(), o[sel].mean()
        rel += nk * (pk - ok) ** 2
        res += nk * (ok - ob) ** 2
        table.append((pk, nk, ok))
    rel, res, unc = rel / n, res / n, ob * (1 - ob)
    # Rank histogram: members below the observation (continuous values, no ties).
    ranks = (members < obs[:, None]).sum(axis=1)
    hist = np.bincount(ranks, minlength=M + 1)
    # 2x2: the ensemble mean above the level against the observation above it.
    f = members.mean(axis=1) > level
    a, b = int(np.sum(f & (o == 1))), int(np.sum(f & (o == 0)))
    c, d = int(np.sum(~f & (o == 1))), int(np.sum(~f & (o == 0)))
    tot = a + b + c + d
    ar = (a + b) * (a + c) / tot
    e = ((a + b) * (a + c) + (c + d) * (b + d)) / tot
    scores = [a / (a + c), b / (a + b), a / (a + b + c), (a + b) / (a + c), (a - ar) / (a + b + c - ar),
              (a + d - e) / (tot - e), a / (a + c) - b / (b + d)]
    lines = ["# numpy %s, seed 20261202: %d cases of %d members; level %g" % (np.__version__, n, M, level)]
    lines.append("observation " + " ".join(repr(float(x)) for x in obs))
    for row in members:
        lines.append("members " + " ".join(repr(float(x)) for x in row))
    lines.append("level %r" % level)
    lines.append("brier %r %r %r %r" % (bs, rel, res, unc))
    lines.append("reliability_rows %d" % len(table))
    for pk, nk, ok in table:
        lines.append("reliability %r %d %r" % (float(pk), int(nk), float(ok)))
    lines.append("rank_histogram " + " ".join(str(int(x)) for x in hist))
    lines.append("table %d %d %d %d" % (a, b, c, d))
    lines.append("scores_pod_far_csi_bias_ets_hss_peirce " + " ".join(repr(float(x)) for x in scores))
    return "\n".join(lines) + "\n"


if __name__ == "__main__":
    sys.stdout.write(reference_text())
