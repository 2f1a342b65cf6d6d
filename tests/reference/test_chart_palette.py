#!/usr/bin/env python3
"""The charts' palette (include/lidbox/report/chart.hpp) stays readable for people with the
common colour-vision deficiencies.

Method:
- sRGB to linear RGB and relative luminance Y = 0.2126 R + 0.7152 G + 0.0722 B (the sRGB
  transfer function and the WCAG 2.x definition of relative luminance); CIE 1976 L*, a*, b* from
  linear RGB through the sRGB (D65) matrix (IEC 61966-2-1).
- Protanopia and deuteranopia simulated by the severity-1.0 matrices of Machado, Oliveira and
  Fernandes (2009), "A physiologically-based model for simulation of color vision deficiency",
  IEEE TVCG 15(6), doi 10.1109/TVCG.2009.113, applied to linear RGB (the values as published
  with the paper and reproduced in open CVD libraries: secondary source).
Criteria (common practice, no source): neighbours in the sector stack differ by at least 15 in
L* (lightness alone tells them apart, even in greyscale print); every two stack colours, and every
two line colours drawn on one panel, stay at least 10 apart (CIE76 delta E) under each simulation.

Usage (ctest): python3 test_chart_palette.py <lidbox binary> <source dir>
"""
import itertools
import os
import re
import sys

SOURCE = os.path.abspath(sys.argv[2])
header = open(os.path.join(SOURCE, "include", "lidbox", "report", "chart.hpp")).read()
stack = re.findall(r'"(#[0-9a-f]{6})"', header[header.index("kPaletteStack[]"):header.index("};")])
named = dict(re.findall(r'kPalette(\w+) = "(#[0-9a-f]{6})"', header))
# Lines drawn together on a concentration panel (run, ensemble median, monitor, fit, levels)
# on the lid-and-wind panel (residual-layer top, wind), and in the scatter (model, after a fit).
LINE_GROUPS = [["Line", "Median", "Monitor", "Fit", "Level"], ["Residual", "Wind"], ["Median", "Amber"]]

MACHADO = {
    "protanopia": [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216],
                   [-0.003882, -0.048116, 1.051998]],
    "deuteranopia": [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413],
                     [-0.011820, 0.042940, 0.968881]],
}


def linear(hex_colour):
    def one(c):
        c /= 255.0
        return c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4
    return [one(int(hex_colour[k:k + 2], 16)) for k in (1, 3, 5)]


def lab(rgb):
    r, g, b = [min(1.0, max(0.0, v)) for v in rgb]
    x = 0.4124 * r + 0.3576 * g + 0.1805 * b
    y = 0.2126 * r + 0.7152 * g + 0.0722 * b
    z = 0.0193 * r + 0.1192 * g + 0.9505 * b

    def f(t):
        return t ** (1 / 3) if t > (6 / 29) ** 3 else t / (3 * (6 / 29) ** 2) + 4 / 29
    fx, fy, fz = f(x / 0.95047), f(y), f(z / 1.08883)
    return (116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz))


def simulate(rgb, m):
    return [sum(m[i][j] * rgb[j] for j in range(3)) for i in range(3)]


def delta_e(a, b):
    return sum((p - q) ** 2 for p, q in zip(a, b)) ** 0.5


failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


check(len(stack) == 8, "eight stack colours read from chart.hpp: %s" % stack)
for a, b in zip(stack, stack[1:]):
    dl = abs(lab(linear(a))[0] - lab(linear(b))[0])
    print("stack neighbours %s %s: L* differs by %.1f" % (a, b, dl))
    check(dl >= 15, "stack neighbours %s and %s differ by only %.1f in L*" % (a, b, dl))
groups = [("stack", stack)] + [("lines " + "/".join(g), [named[n] for n in g]) for g in LINE_GROUPS]
for vision, m in MACHADO.items():
    for label, colours in groups:
        worst = min((delta_e(lab(simulate(linear(a), m)), lab(simulate(linear(b), m))), a, b)
                    for a, b in itertools.combinations(colours, 2))
        print("%s, %s: smallest delta E %.1f (%s, %s)" % (vision, label, *worst))
        check(worst[0] >= 10, "%s, %s: %s and %s only %.1f apart" % (vision, label, worst[1], worst[2], worst[0]))

if failures:
    print("%d failure(s)" % len(failures))
    sys.exit(1)
print("ok")
