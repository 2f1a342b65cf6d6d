#!/usr/bin/env python3
"""The bulletin through the real binary.

- The demo (one run) and the forecast demo (an ensemble and an emission cut) write bulletin.html,
  bulletin.md and bulletin.txt with the same content: the same headline, the not-official line and
  the caution in each; the HTML is self-contained (no external file, script or link) and has print
  rules; the ensemble's headline gives the share of members; the cut section gives the cut.
- A wording file whose template names an unknown field stops the run: exit code 2, the message
  with the file and line asserted whole, no output.
- bulletin.html renders in headless Chromium: the screenshot has the window's size and is not
  blank (its non-white pixels counted with a small PNG decoder on zlib). Skipped (77) without
  chromium.

ctest runs it as: /usr/bin/python3 test_bulletin.py <lidbox binary> <source dir>
"""
import html
import os
import re
import shutil
import struct
import subprocess
import sys
import tempfile
import zlib

BINARY = os.path.abspath(sys.argv[1])
SOURCE = os.path.abspath(sys.argv[2])
DEMO = os.path.join(SOURCE, "met-demo")
TEMPLATES = os.path.join(SOURCE, "src", "data", "bulletin", "en.toml")
failures = []
skipped = []


def check(cond, what):
    print(("ok: " if cond else "FAIL: ") + what)
    if not cond:
        failures.append(what)


def run(args, cwd):
    return subprocess.run([BINARY] + args, cwd=cwd, capture_output=True, text=True)


def read(path):
    with open(path, encoding="utf-8") as f:
        return f.read()


def flat(text):
    return " ".join(text.split())


def check_three(out, name):
    h, m, t = (read(os.path.join(out, "bulletin." + x)) for x in ("html", "md", "txt"))
    headline = next(l[2:] for l in m.splitlines() if l.startswith("> "))
    headline = re.sub(r" \*\*\[.*\]\*\*$", "", headline)
    check(headline and flat(headline) in flat(t), name + ": the text bulletin has the headline")
    check(flat(headline) in flat(html.unescape(re.sub(r"<[^>]+>", " ", h))),
          name + ": the HTML bulletin has the headline")
    for text, kind in ((h, "html"), (m, "md"), (t, "txt")):
        check("NOT AN OFFICIAL ALERT" in text, name + ": bulletin.%s says it is not an official alert" % kind)
        check("Screening estimate from a single well-mixed box model" in flat(text),
              name + ": bulletin.%s carries the caution" % kind)
    for bad in ("<script", "<link", "src=", "href=", "url(", "@import"):
        check(bad not in h, name + ": bulletin.html has no %s (self-contained)" % bad)
    check("@media print" in h and "@page" in h, name + ": bulletin.html has print rules")
    check(h.count("<svg") >= 2, name + ": bulletin.html has its timeline and chart inline")
    return headline, h, m, t


def test_demo():
    with tempfile.TemporaryDirectory() as d:
        p = run(["run", os.path.join(DEMO, "cindervale.toml"), "-o", "out", "-q"], d)
        check(p.returncode == 0, "demo: exit 0 (%s)" % p.stderr.strip())
        headline, h, m, t = check_three(os.path.join(d, "out"), "demo")
        check("in a single model run (no ensemble, so no probability)" in headline,
              "demo: a single run says it has no probability")
        check("Cindervale basin (invented)" in headline, "demo: the headline names the area")
        check("MST" in headline, "demo: the headline is in local time")
        if shutil.which("chromium"):
            screenshot(os.path.join(d, "out", "bulletin.html"), d)
        else:
            skipped.append("chromium")


def test_forecast():
    with tempfile.TemporaryDirectory() as d:
        p = run(["run", os.path.join(DEMO, "cindervale-forecast.toml"), "-o", "out", "-q"], d)
        check(p.returncode == 0, "forecast: exit 0 (%s)" % p.stderr.strip())
        headline, h, m, t = check_three(os.path.join(d, "out"), "forecast")
        check(re.search(r"in \d+ of 12 forecast members \([0-9.]+ %\)", headline) is not None,
              "forecast: the headline gives the share of the 12 members (%s)" % headline)
        check("European Air Quality Index" in headline, "forecast: the chosen index names the air")
        check("Cutting home_heating by" in m, "forecast: the cut section gives the cut")


def test_bad_template():
    with tempfile.TemporaryDirectory() as d:
        for f in ("cindervale-met.csv", "cindervale-advisories.toml"):
            shutil.copy(os.path.join(DEMO, f), d)
        case = read(os.path.join(DEMO, "cindervale.toml"))
        case = re.sub(r"\[bulletin\]\n(.*\n)*?\n", "", case + "\n")
        with open(os.path.join(d, "case.toml"), "w") as f:
            f.write(case + '\n[bulletin]\ntemplates = "bad.toml"\n')
        text = read(TEMPLATES).replace('title = "Air-quality outlook for {area}"',
                                       'title = "Air-quality outlook for {areas}"')
        with open(os.path.join(d, "bad.toml"), "w") as f:
            f.write(text)
        line = next(i + 1 for i, l in enumerate(text.splitlines()) if "{areas}" in l)
        p = run(["run", "case.toml", "-o", "out"], d)
        check(p.returncode == 2, "bad template: exit code 2 (got %d)" % p.returncode)
        want = ("lidbox: error: ./bad.toml:%d: [bulletin] title: unknown field {areas}; expected one "
                "of area (did you mean \"area\"?)" % line)
        got = p.stderr.strip()
        check(got == want, "bad template: message asserted whole" +
              ("" if got == want else "\n   got:  %s\n   want: %s" % (got, want)))
        check(not os.path.exists(os.path.join(d, "out")), "bad template: no output written")


def png_pixels(path):
    """(width, height, rows of bytes, bytes per pixel) of an 8-bit RGB/RGBA PNG (no interlace)."""
    data = open(path, "rb").read()
    check(data[:8] == b"\x89PNG\r\n\x1a\n", "screenshot is a PNG")
    pos, idat, w = 8, b"", 0
    while pos < len(data):
        n, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + n]
        if kind == b"IHDR":
            w, h, depth, colour, _, _, interlace = struct.unpack(">IIBBBBB", body)
            assert depth == 8 and colour in (2, 6) and interlace == 0, (depth, colour, interlace)
            bpp = 3 if colour == 2 else 4
        elif kind == b"IDAT":
            idat += body
        pos += 12 + n
    raw = zlib.decompress(idat)
    stride = w * bpp
    rows, prev = [], bytearray(stride)
    for y in range(h):
        f = raw[y * (stride + 1)]
        line = bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
        for x in range(stride):  # PNG filters, RFC 2083 section 6
            a = line[x - bpp] if x >= bpp else 0
            b = prev[x]
            c = prev[x - bpp] if x >= bpp else 0
            if f == 1:
                line[x] = (line[x] + a) & 255
            elif f == 2:
                line[x] = (line[x] + b) & 255
            elif f == 3:
                line[x] = (line[x] + (a + b) // 2) & 255
            elif f == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                line[x] = (line[x] + (a if pa <= pb and pa <= pc else b if pb <= pc else c)) & 255
        rows.append(bytes(line))
        prev = line
    return w, h, rows, bpp


def screenshot(page, d):
    png = os.path.join(d, "bulletin.png")
    p = subprocess.run(["chromium", "--headless", "--no-sandbox", "--disable-gpu", "--hide-scrollbars",
                        "--screenshot=" + png, "--window-size=1000,1600", "file://" + page],
                       capture_output=True, text=True, timeout=180)
    check(os.path.isfile(png), "chromium wrote a screenshot (%s)" % p.stderr.strip()[-200:])
    if not os.path.isfile(png):
        return
    w, h, rows, bpp = png_pixels(png)
    check((w, h) == (1000, 1600), "screenshot is 1000 x 1600 (got %d x %d)" % (w, h))
    dark = red = 0
    for row in rows:
        for x in range(0, len(row), bpp):
            r, g, b = row[x], row[x + 1], row[x + 2]
            if r + g + b < 600:
                dark += 1
            if r > 150 and g < 60 and b < 80:
                red += 1  # the not-official box's border and text (#b00020)
    share = dark / float(w * h)
    check(share > 0.03, "screenshot is not blank: %.1f %% of pixels not white" % (100 * share))
    check(red > 500, "the not-official box is drawn in red (%d pixels)" % red)


test_demo()
test_forecast()
test_bad_template()
if failures:
    print("%d check(s) failed" % len(failures))
    sys.exit(1)
print("all checks passed" + (" (screenshot skipped: no %s)" % skipped[0] if skipped else ""))
