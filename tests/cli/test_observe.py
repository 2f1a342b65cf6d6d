"""Runs the real `lidbox observe` on invented observation files: good input gives the tables and
both reports; bad input gives exit code 2, a message naming file and line, and no files.

Usage (ctest): python3 test_observe.py <lidbox binary> <source dir>
"""
import json
import os
import subprocess
import sys
import tempfile

BINARY, SOURCE = sys.argv[1], sys.argv[2]
CAUTION_START = "Screening estimate from a single well-mixed box model"
# Monitor data are measurements: their reports carry this caution, never the model's.
MEASURED_START = "Summary of measured data as given (no model)"
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(args):
    p = subprocess.run([BINARY] + args, capture_output=True, text=True)
    return p.returncode, p.stdout, p.stderr


def write(path, text):
    with open(path, "w") as f:
        f.write(text)


with tempfile.TemporaryDirectory() as tmp:
    # Invented: 72 hours of NO2 with a 3-hour run above the EU alert threshold of 400 ug/m3.
    rows = ["# invented data for a command-line test", "time,NO2 [ug/m3],PM10 [ug/m3]"]
    for h in range(72):
        no2 = 450 if 30 <= h < 33 else 40
        pm = "" if h == 5 else "30"
        rows.append("2025-03-%02dT%02d:00Z,%d,%s" % (1 + h // 24, h % 24, no2, pm))
    good = os.path.join(tmp, "good.csv")
    write(good, "\n".join(rows) + "\n")
    out = os.path.join(tmp, "out")
    rc, so, se = run(["observe", good, "--rules", "eu-2008", "--lst-offset", "+01:00",
                      "--issue-time", "2025-03-01T00:00Z", "-o", out])
    check(rc == 0, "good file exits 0 (got %d, stderr %s)" % (rc, se))
    names = sorted(os.listdir(out)) if os.path.isdir(out) else []
    check(names == sorted("good_" + n for n in ["limits.csv", "daily.csv", "periods.csv", "episodes.csv",
                                                 "aqi.csv", "aqhi.csv", "report.md",
                                                 "report.json"]), "files written: %s" % names)
    if "good_report.json" in names:
        rep = json.load(open(os.path.join(out, "good_report.json")))
        check(rep["caution"].startswith(MEASURED_START), "JSON carries the measured-data caution")
        check(CAUTION_START not in json.dumps(rep), "JSON does not carry the model's caution")
        check(rep["official"] is False, "JSON says it is not official")
        eps = [e for e in rep["episodes"] if e["rule_id"] == "NO2-alert"]
        check(len(eps) == 1 and eps[0]["start_utc"] == "2025-03-02T06:00:00Z"
              and eps[0]["duration_h"] == 3 and eps[0]["lead_time_h"] == 30,
              "NO2 alert episode with lead time 30 h: %s" % eps)
        check(rep["rule_sets"][0]["id"] == "eu-2008-50", "prefix eu-2008 selects eu-2008-50")
    md = open(os.path.join(out, "good_report.md")).read() if "good_report.md" in names else ""
    check(md.count(MEASURED_START) == 2, "Markdown carries the measured-data caution at top and bottom")
    check(CAUTION_START not in md, "Markdown does not carry the model's caution")
    check("(measured data)" in md.split("\n")[0], "Markdown title says measured data")
    check("Directive 2008/50/EC" in md, "Markdown names the legal source")

    # Duplicate hour: exit 2, file:line in the message, nothing written.
    dup = os.path.join(tmp, "dup.csv")
    write(dup, "time,CO [ppm]\n2025-01-01T00:00Z,0.5\n2025-01-01T01:00Z,0.6\n"
               "2025-01-01T02:00+01:00,0.7\n")
    out2 = os.path.join(tmp, "out2")
    rc, so, se = run(["observe", dup, "--lst-offset", "-05:00", "-o", out2])
    check(rc == 2, "duplicate hour exits 2 (got %d)" % rc)
    check(se.strip() == "lidbox: error: %s:4: time 2025-01-01T02:00+01:00 repeats the "
          "hour on line 3; expected strictly increasing hours" % dup, "message: %r" % se)
    check(not os.path.exists(out2), "nothing written for bad input")

    # A user rule file with an unknown statistic: exit 2 naming the file and line.
    bad_rules = os.path.join(tmp, "local.toml")
    write(bad_rules, '[rule_set]\nid = "local"\nname = "x"\nlegal_source = "invented"\n'
                     'legal_date = "2026-01-01"\nreference_temperature_K = 293.0\n'
                     'reference_pressure_Pa = 101300.0\n[[limit]]\nid = "a"\npollutant = "CO"\n'
                     'kind = "k"\naveraging = "8-hour"\nstatistic = "max_8h"\nlevel = 1.0\n')
    rc, so, se = run(["observe", good, "--rules", bad_rules, "--lst-offset", "+01:00",
                      "-o", out2])
    check(rc == 2, "bad rule file exits 2 (got %d)" % rc)
    check(se.strip() == "lidbox: error: %s:13: [[limit]] statistic: unknown statistic \"max_8h\"; expected one of "
          "hourly_value, running_mean, daily_mean, daily_max_1h, daily_max_8h_17_windows, "
          "daily_max_8h_24_windows, annual_mean, annual_mean_of_quarterly_means, "
          "peak_season_mean" % bad_rules, "rule message asserted whole: %r" % se)
    check(not os.path.exists(out2), "nothing written for a bad rule file")

    # Unknown rule-set id, bad offset, missing required option.
    rc, so, se = run(["observe", good, "--rules", "us-naqs", "--lst-offset", "+01:00", "-o", out2])
    rules_dir = os.path.join(os.path.abspath(SOURCE), "src", "data", "rules")
    check(rc == 2 and se.strip() == "lidbox: error: rule set \"us-naqs\": not found in %s; expected "
          "one of eu-2008-50, eu-2024-2881, us-naaqs, who-2021 (did you mean \"us-naaqs\"?)"
          % rules_dir, "unknown id: %d %r" % (rc, se))
    rc, so, se = run(["observe", good, "--lst-offset", "CEST", "-o", out2])
    check(rc == 2 and se.strip() == "lidbox: error: --lst-offset: time zone \"CEST\" has no valid "
          "offset after its standard-time name; expected a fixed offset such as \"+01:00\" or "
          "\"UTC\", an IANA zone name such as \"Europe/Paris\", or a POSIX TZ string such as \"CET-1CEST,M3.5.0,M10.5.0/3\" (POSIX sign: hours "
          "WEST of Greenwich are positive)", "bad offset: %d %r" % (rc, se))
    rc, so, se = run(["observe", good, "-o", out2])
    check(rc == 2 and se.strip() == "--lst-offset is required\nRun with --help for more information.",
          "missing --lst-offset: %d %r" % (rc, se))
    check(not os.path.exists(out2), "nothing written for bad options")

# The invented demo file in met-demo/: the EU ozone information-threshold episodes must be the
# runs of hours above 180 ug/m3, recomputed here from the file (ideal gas at 293 K, 101.3 kPa,
# M(O3) = 48.00 g/mol: design/references.md section 4).
demo = os.path.join(SOURCE, "met-demo", "observations-invented.csv")
with tempfile.TemporaryDirectory() as tmp:
    rc, so, se = run(["observe", demo, "--rules", "eu-2008-50", "--lst-offset", "-05:00",
                      "--issue-time", "2025-07-03T12:00Z", "-o", tmp, "--prefix", "demo_"])
    check(rc == 0, "demo file exits 0 (got %d, %s)" % (rc, se))
    factor = 48.00 / (8.314462618 * 293.0 / 101300.0 * 1000.0)
    rows = [l.strip().split(",") for l in open(demo) if l.strip() and not l.startswith("#")][1:]
    above = [(r[0], r[2] != "" and float(r[2]) * factor > 180.0) for r in rows]
    runs, start = [], None
    for i, (t, a) in enumerate(above + [("", False)]):
        if a and start is None:
            start = i
        if not a and start is not None:
            runs.append((above[start][0], i - start))
            start = None
    rep = json.load(open(os.path.join(tmp, "demo_report.json")))
    got = [(e["start_utc"].replace(":00:00Z", ":00Z"), e["duration_h"])
           for e in rep["episodes"] if e["rule_id"] == "O3-information"]
    check(len(runs) > 0, "the demo has ozone above the information threshold")
    check(got == runs, "demo O3 information episodes %s == recomputed %s" % (got, runs))

# Issue 13 item 14: one spelling of the output folder (-o/--output); --out still works but warns;
# `observe` says its tables are measured data and does not print the box model's caution.
# Item 10: declared missing-value codes become counted gaps, small negatives are kept and counted.
with tempfile.TemporaryDirectory() as tmp:
    rows = ["time,PM2.5 [ug/m3]"]
    for h in range(48):
        v = {5: "-999", 6: "9999", 7: "-2.5"}.get(h, "20")
        rows.append("2025-03-%02dT%02d:00Z,%s" % (1 + h // 24, h % 24, v))
    coded = os.path.join(tmp, "coded.csv")
    write(coded, "\n".join(rows) + "\n")
    out = os.path.join(tmp, "o1")
    rc, so, se = run(["observe", coded, "--lst-offset", "+00:00", "--output", out,
                      "--missing-value", "-999,9999"])
    check(rc == 0, "declared codes: exit 0 (got %d, %s)" % (rc, se))
    check("lidbox observe: note: 2 PM2.5 values hold a declared missing-value code and are gaps "
          "in these tables" in se, "codes counted: %r" % se)
    check("lidbox observe: note: 1 PM2.5 values are below zero (lowest -2.5 ug m-3), within the "
          "instrument-noise tolerance; kept as measured" in se, "negatives counted: %r" % se)
    check("measured data" in se and CAUTION_START not in se,
          "observe states measured data, not the model's caution: %r" % se)
    out2 = os.path.join(tmp, "o2")
    rc, so, se = run(["observe", coded, "--lst-offset", "+00:00", "--out", out2,
                      "--missing-value", "-999", "--missing-value", "9999"])
    check(rc == 0 and "warning: --out is deprecated; use -o/--output" in se and os.path.isdir(out2),
          "--out is a deprecated alias: %d %r" % (rc, se))
    rc, so, se = run(["observe", coded, "--lst-offset", "+00:00", "-o", os.path.join(tmp, "o3")])
    check(rc == 2 and se.strip() == "lidbox: error: %s:7: column \"PM2.5 [ug m-3]\": monitor "
          "concentration -999 ug m-3 is outside the plausible range; expected a monitor "
          "concentration from -5 to 5000 ug/m3 (common practice, no source; a missing-value code "
          "such as -999 must be declared (observe --missing-value))" % coded,
          "undeclared -999 refused: %d %r" % (rc, se))
    check(not os.path.exists(os.path.join(tmp, "o3")), "nothing written for undeclared codes")
    rc, so, se = run(["--help"])
    check(rc == 0 and "met-dump" in so, "met-dump is listed in --help")
    rc, so, se = run(["observe", "--help"])
    check("-o,--output" in so and "--out " not in so, "observe --help shows -o,--output only: %r" % so)

print("%d failure(s)" % len(failures))
sys.exit(1 if failures else 0)
