"""Independent references for `lidbox evaluate`, run through the real binary on an invented case
and a seeded invented monitor file:

* every agreement statistic of the hour means and the daily means, recomputed with numpy/pandas
  from the pairs lidbox wrote (pairs.csv), to 1e-9 relative;
* the NNLS scales against scipy.optimize.nnls on the matrix lidbox wrote (fit_matrix.csv), and the
  Gaussian standard errors from numpy's inverse of KᵀWK;
* the Bayesian scaling against numpy's evaluation of the published formulas
  (x = xa + (KᵀSo⁻¹K + Sa⁻¹)⁻¹ KᵀSo⁻¹ (y − K xa), A = Ŝ KᵀSo⁻¹K, dofs = tr A; Tarantola 2005,
  Rodgers 2000);
* the 2×2 tables and scores from the day calls (verification_days.csv), by the CAWCR definitions.

Usage (ctest): /usr/bin/python3 test_evaluate_numpy.py <lidbox binary> <source dir>
Exit 77 (skip) when numpy, pandas or scipy are missing.
"""
import os
import subprocess
import sys
import tempfile

try:
    import numpy as np
    import pandas as pd
    from scipy.optimize import nnls
except ImportError as e:
    print("skip:", e)
    sys.exit(77)

BINARY = sys.argv[1]
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def close(a, b, rel, what):
    a, b = float(a), float(b)
    ok = (np.isnan(a) and np.isnan(b)) or abs(a - b) <= rel * max(abs(a), abs(b), 1e-300)
    check(ok, "%s: lidbox %r, reference %r" % (what, a, b))


CASE = """# INVENTED case for a reference test: not a real place.
name = "evalref"
time_zone = "-05:00"
invented = true
[airshed]
x_side = "10 km"
y_side = "8 km"
[met]
file = "met.csv"
[model]
spin_up = "none"
[pollutants.PM25]
unit = "ug/m3"
lifetime = "4 day"
background = "5 ug/m3"
free_troposphere = "2 ug/m3"
initial = "8 ug/m3"
[sectors.traffic]
emissions = { PM25 = "60 kg/h" }
hour_of_day = [0.3, 0.2, 0.2, 0.2, 0.3, 0.7, 1.5, 2.2, 2.0, 1.3, 1.1, 1.1,
               1.2, 1.2, 1.3, 1.6, 2.0, 2.2, 1.6, 1.0, 0.8, 0.6, 0.5, 0.4]
day_of_week = [1.1, 1.1, 1.1, 1.1, 1.1, 0.8, 0.7]
[sectors.heating]
emissions = { PM25 = "120 kg/h" }
hour_of_day = [0.8, 0.5, 0.4, 0.4, 0.4, 0.6, 1.3, 1.5, 1.0, 0.6, 0.5, 0.5,
               0.5, 0.5, 0.6, 0.8, 1.2, 1.9, 2.4, 2.5, 2.3, 1.9, 1.5, 1.1]
[standards]
rule_sets = ["us-naaqs", "who-2021"]
"""

rng = np.random.default_rng(20261202)
N = 24 * 30
t0 = pd.Timestamp("2026-01-01T00:00Z")
times = pd.date_range(t0, periods=N, freq="h")

with tempfile.TemporaryDirectory() as tmp:
    hour = np.arange(N) % 24
    h = 200 + 600 * np.clip(np.sin((hour - 7) / 12 * np.pi), 0, None) * (0.6 + 0.4 * rng.random(N))
    u = np.clip(1.0 + 1.5 * rng.random(N), 0.6, None)
    d = np.where((np.arange(N) // 40) % 2 == 0, 200.0, 20.0)
    with open(os.path.join(tmp, "met.csv"), "w") as f:
        f.write("time,mixing_height [m],wind_speed [m/s],wind_from [deg]\n")
        for i in range(N):
            f.write("%s,%.1f,%.2f,%.0f\n" % (times[i].strftime("%Y-%m-%dT%H:%M:%SZ"), h[i], u[i], d[i]))
    case = os.path.join(tmp, "case.toml")
    with open(case, "w") as f:
        f.write(CASE)
    run_out = os.path.join(tmp, "run")
    p = subprocess.run([BINARY, "run", case, "-o", run_out, "-q"], capture_output=True, text=True)
    check(p.returncode == 0, "lidbox run: %s" % p.stderr)
    hourly = pd.read_csv(os.path.join(run_out, "hourly.csv"))
    part = lambda n: hourly["PM25_part_%s [ug m-3]" % n].to_numpy()
    truth = {"background": 1.15, "traffic": 1.4, "heating": 0.6}
    obs = (truth["background"] * part("background") + part("initial") + truth["traffic"] * part("traffic")
           + truth["heating"] * part("heating") + rng.normal(0, 1.5, N))
    # Real-monitor features: gaps, values below detection, small negatives, a shorter period.
    cells = ["%.3f" % v for v in obs]
    for i in rng.choice(N, 40, replace=False):
        cells[i] = ""
    for i in rng.choice(N, 15, replace=False):
        cells[i] = "<2"
    cells[100] = "-0.4"
    with open(os.path.join(tmp, "mon.csv"), "w") as f:
        f.write("# INVENTED monitor for a reference test\ntime,PM2.5 [ug/m3]\n")
        for i in range(24, N):  # the first day is not monitored
            f.write("%s,%s\n" % (times[i].strftime("%Y-%m-%dT%H:%M:%SZ"), cells[i]))
    out = os.path.join(tmp, "ev")
    p = subprocess.run([BINARY, "evaluate", case, os.path.join(tmp, "mon.csv"), "--fit", "nnls",
                        "--bootstrap", "100", "-o", out, "-q"], capture_output=True, text=True)
    check(p.returncode == 0, "lidbox evaluate --fit nnls: %s" % p.stderr)

    # ---- statistics against numpy on the pairs lidbox wrote
    pairs = pd.read_csv(os.path.join(out, "pairs.csv"))
    stats = pd.read_csv(os.path.join(out, "statistics.csv"))
    check(len(pairs) == sum(1 for c in cells[24:] if c != ""), "pairs: %d" % len(pairs))
    O, P = pairs["observed"].to_numpy(), pairs["modelled"].to_numpy()
    check(abs(pairs.loc[pairs["below_detection_substituted"] == 1, "observed"] - 1.0).max() < 1e-12,
          "below detection substituted by L/2 = 1")

    def reference(O, P):
        pos = (O > 0) & (P > 0)
        fr = (O + P) > 0
        r = {}
        r["FB"] = (O.mean() - P.mean()) / (0.5 * (O.mean() + P.mean()))
        r["NMSE"] = np.mean((O - P) ** 2) / (O.mean() * P.mean())
        r["MG"] = np.exp(np.mean(np.log(O[pos])) - np.mean(np.log(P[pos])))
        r["VG"] = np.exp(np.mean((np.log(O[pos]) - np.log(P[pos])) ** 2))
        q = P[pos] / O[pos]
        r["FAC2"] = np.mean((q >= 0.5) & (q <= 2.0))
        r["MB"] = np.mean(P - O)
        r["ME"] = np.mean(np.abs(P - O))
        r["NMB"] = np.sum(P - O) / np.sum(O)
        r["NME"] = np.sum(np.abs(P - O)) / np.sum(O)
        r["MFB"] = 2 * np.mean((P[fr] - O[fr]) / (P[fr] + O[fr]))
        r["MFE"] = 2 * np.mean(np.abs(P[fr] - O[fr]) / (P[fr] + O[fr]))
        r["r"] = np.corrcoef(O, P)[0, 1]
        r["RMSE"] = np.sqrt(np.mean((P - O) ** 2))
        r["CRMSE"] = np.sqrt(np.mean(((P - P.mean()) - (O - O.mean())) ** 2))
        r["IOA"] = 1 - np.sum((P - O) ** 2) / np.sum((np.abs(P - O.mean()) + np.abs(O - O.mean())) ** 2)
        return r

    row = stats[(stats["model"] == "before") & (stats["averaging"] == "hour means")].iloc[0]
    check(int(row["N"]) == len(O), "N of hour means")
    check(int(row["N_positive"]) == int(np.sum((O > 0) & (P > 0))), "N positive (the negative value is left out)")
    for k, v in reference(O, P).items():
        close(row[k], v, 1e-8, "hour means " + k)
    # Daily means: LST (-05:00) days with at least 18 paired hours.
    t = pd.to_datetime(pairs["hour_start_utc"]) - pd.Timedelta(hours=5)
    g = pd.DataFrame({"day": t.dt.date, "O": O, "P": P}).groupby("day")
    daily = g.mean()[g.size() >= 18]
    rowd = stats[(stats["model"] == "before") & (stats["averaging"] == "daily means")].iloc[0]
    check(int(rowd["N"]) == len(daily), "daily means N %s vs %d" % (rowd["N"], len(daily)))
    for k, v in reference(daily["O"].to_numpy(), daily["P"].to_numpy()).items():
        close(rowd[k], v, 1e-8, "daily means " + k)

    # ---- NNLS against scipy on the matrix lidbox wrote
    M = pd.read_csv(os.path.join(out, "fit_matrix.csv"))
    cols = [c for c in M.columns[4:]]
    K = M[cols].to_numpy()
    y = M.iloc[:, 3].to_numpy()
    w = M["weight"].to_numpy()
    sw = np.sqrt(w)
    x_ref, rnorm = nnls(K * sw[:, None], y * sw)
    fit = pd.read_csv(os.path.join(out, "fit.csv"))
    for j, c in enumerate(cols):
        name = c.split(" [")[0]
        est = fit[fit["column"] == name].iloc[0]
        close(est["scale"], x_ref[j], 1e-9, "NNLS scale of " + name + " against scipy.optimize.nnls")
    # Gaussian standard errors (all scales off the bound here).
    res = y - K @ x_ref
    s2 = np.sum(w * res ** 2) / (len(y) - K.shape[1])
    cov = s2 * np.linalg.inv(K.T @ (K * w[:, None]))
    for j, c in enumerate(cols):
        name = c.split(" [")[0]
        est = fit[fit["column"] == name].iloc[0]
        close(est["gaussian_se"], np.sqrt(cov[j, j]), 1e-6, "Gaussian s.e. of " + name)
        check(abs(est["scale"] - truth[name]) < 3 * est["gaussian_se"],
              "%s recovered within 3 s.e.: %g vs %g +- %g" % (name, est["scale"], truth[name], est["gaussian_se"]))
    r2 = 1 - np.sum(w * res ** 2) / np.sum(w * (O - np.average(O, weights=w)) ** 2)
    close(fit["r2"].iloc[0], r2, 1e-9, "R2")

    # ---- Bayesian scaling against numpy's evaluation of the published formulas
    out_b = os.path.join(tmp, "evb")
    p = subprocess.run([BINARY, "evaluate", case, os.path.join(tmp, "mon.csv"), "--fit", "bayes",
                        "--prior", "traffic=1:0.5", "--prior", "background=1:0.1", "--obs-error", "2.5",
                        "--bootstrap", "0", "-o", out_b, "-q"], capture_output=True, text=True)
    check(p.returncode == 0, "lidbox evaluate --fit bayes: %s" % p.stderr)
    fb = pd.read_csv(os.path.join(out_b, "fit.csv"))
    xa = np.array([fb[fb["column"] == c.split(" [")[0]]["prior_mean"].iloc[0] for c in cols])
    sa = np.array([fb[fb["column"] == c.split(" [")[0]]["prior_sd"].iloc[0] for c in cols])
    check(list(sa) == [0.1, 0.5, 1.0], "priors as given, default 1:1 for heating: %s" % sa)
    So_inv = w / 2.5 ** 2
    KtSoK = K.T @ (K * So_inv[:, None])
    S_hat = np.linalg.inv(KtSoK + np.diag(1 / sa ** 2))
    x_hat = xa + S_hat @ (K.T @ (So_inv * (y - K @ xa)))
    A = S_hat @ KtSoK
    for j, c in enumerate(cols):
        name = c.split(" [")[0]
        est = fb[fb["column"] == name].iloc[0]
        close(est["scale"], x_hat[j], 1e-9, "Bayesian scale of " + name)
        close(est["gaussian_se"], np.sqrt(S_hat[j, j]), 1e-9, "posterior s.d. of " + name)
    close(fb["dofs"].iloc[0], np.trace(A), 1e-9, "degrees of freedom for signal")

    # ---- the 2x2 tables from the day calls
    vd = pd.read_csv(os.path.join(out, "verification_days.csv"))
    vt = pd.read_csv(os.path.join(out, "verification.csv"))
    check(len(vt) > 0, "verification rows")
    for _, v in vt.iterrows():
        sel = vd[(vd["model"] == v["model"]) & (vd["monitor"] == v["monitor"]) & (vd["rule_set"] == v["rule_set"])
                 & (vd["limit"] == v["limit"])]
        fo, ob = sel["modelled_exceeded"] == 1, sel["observed_exceeded"] == 1
        a, b, c, dd = int(np.sum(fo & ob)), int(np.sum(fo & ~ob)), int(np.sum(~fo & ob)), int(np.sum(~fo & ~ob))
        check((a, b, c, dd) == (v["a"], v["b"], v["c"], v["d"]), "2x2 of %s %s" % (v["limit"], v["model"]))
        n = a + b + c + dd
        if a + c > 0 and a + b > 0 and b + dd > 0:
            ar = (a + b) * (a + c) / n
            close(v["POD"], a / (a + c), 1e-9, "POD")
            close(v["FAR"], b / (a + b), 1e-9, "FAR")
            close(v["CSI"], a / (a + b + c), 1e-9, "CSI")
            close(v["ETS"], (a - ar) / (a + b + c - ar), 1e-9, "ETS")
            close(v["Peirce"], a / (a + c) - b / (b + dd), 1e-9, "Peirce")
    check(((vt["a"] + vt["c"]) > 0).any(), "at least one rule with observed exceedances")

if failures:
    print("%d failure(s)" % len(failures))
    sys.exit(1)
print("ok")
