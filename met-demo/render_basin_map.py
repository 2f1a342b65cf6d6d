#!/usr/bin/env python3
"""Renders met-demo/basin-map.svg from a `lidbox grid met-demo/basin-grid.toml` run (INVENTED
data): January's days with a daily mean concentration per unit flux above the case's level,
and the mean daily dilution per unit flux, side by side, one square per grid cell, north up.

    lidbox grid met-demo/basin-grid.toml -o outputs/basin-grid
    /usr/bin/python3 met-demo/render_basin_map.py outputs/basin-grid/maps_month.nc met-demo/basin-map.svg
"""
import sys

import numpy as np
import xarray as xr

src, dst = sys.argv[1], sys.argv[2]
ds = xr.open_dataset(src).sel(time="2026-01").isel(time=0)
lat, lon = ds["latitude"].values, ds["longitude"].values
CELL, PAD, TOP = 14, 40, 70


def ramp(x, lo, hi):
    """Pale yellow to dark red (a sequential ramp of our own)."""
    t = 0.0 if hi <= lo else min(1.0, max(0.0, (x - lo) / (hi - lo)))
    r = int(255 - 115 * t)
    g = int(245 - 215 * t)
    b = int(200 - 170 * t)
    return "#%02x%02x%02x" % (r, g, b)


def panel(x0, values, title, unit, fmt):
    lo, hi = float(np.nanmin(values)), float(np.nanmax(values))
    out = ['<text x="%d" y="%d" font-size="14" font-weight="bold">%s</text>' % (x0, TOP - 30, title)]
    ny, nx = values.shape
    for i in range(ny):
        for j in range(nx):
            v = values[i, j]
            y = TOP + (ny - 1 - i) * CELL  # north up
            fill = "#cccccc" if np.isnan(v) else ramp(v, lo, hi)
            out.append('<rect x="%d" y="%d" width="%d" height="%d" fill="%s"/>' % (x0 + j * CELL, y, CELL, CELL, fill))
    out.append('<rect x="%d" y="%d" width="%d" height="%d" fill="none" stroke="#333"/>' % (x0, TOP, nx * CELL, ny * CELL))
    ly = TOP + ny * CELL + 18
    for k in range(6):
        v = lo + (hi - lo) * k / 5
        out.append('<rect x="%d" y="%d" width="30" height="10" fill="%s"/>' % (x0 + k * 60, ly, ramp(v, lo, hi)))
        out.append('<text x="%d" y="%d" font-size="11">%s</text>' % (x0 + k * 60, ly + 24, fmt % v))
    out.append('<text x="%d" y="%d" font-size="11">%s</text>' % (x0, ly + 40, unit))
    out.append('<text x="%d" y="%d" font-size="10">%.2f N</text>' % (x0 + nx * CELL + 4, TOP + 8, lat[-1]))
    out.append('<text x="%d" y="%d" font-size="10">%.2f N</text>' % (x0 + nx * CELL + 4, TOP + ny * CELL, lat[0]))
    out.append('<text x="%d" y="%d" font-size="10">%.2f E</text>' % (x0, TOP - 6, lon[0]))
    out.append('<text x="%d" y="%d" font-size="10" text-anchor="end">%.2f E</text>' % (x0 + nx * CELL, TOP - 6, lon[-1]))
    return out


ny, nx = ds["valid_days"].shape
width = 2 * (nx * CELL + 2 * PAD) + 40
height = TOP + ny * CELL + 110
parts = ['<svg xmlns="http://www.w3.org/2000/svg" width="%d" height="%d" font-family="sans-serif">' % (width, height),
         '<rect width="100%" height="100%" fill="white"/>',
         '<text x="%d" y="22" font-size="16">INVENTED basin, January 2026 (lidbox grid, every cell its own box)</text>' % PAD]
parts += panel(PAD, ds["exceedance_days"].values, "Days with a daily mean above 20 s/m", "days of %d" %
               int(np.nanmax(ds["valid_days"].values)), "%.0f")
parts += panel(PAD + nx * CELL + 2 * PAD + 40, ds["dilution_mean"].values, "Mean daily dilution per unit flux",
               "s/m (x 1 ug m-2 s-1 = ug/m3)", "%.0f")
parts.append('<text x="%d" y="%d" font-size="10">Screening estimate from a single well-mixed box per cell; invented data; '
             'not an official forecast or alert.</text>' % (PAD, height - 8))
parts.append("</svg>")
with open(dst, "w") as f:
    f.write("\n".join(parts) + "\n")
print("wrote", dst)
