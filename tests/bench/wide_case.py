#!/usr/bin/env python3
"""Writes an INVENTED wide case for the chart benchmark: 16 tracers and 16 emission sectors over
one year of the invented met of long_case.py (no standards: tracers have no rules). Nothing here
describes a real place or real measurements. Stdlib only.

    /usr/bin/python3 tests/bench/wide_case.py <folder>
"""
import os
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import long_case  # noqa: E402

N = 16


def write_case(folder):
    os.makedirs(folder, exist_ok=True)
    with open(os.path.join(folder, "met-wide.csv"), "w") as f:
        f.write("time,mixing_height [m],wind_speed [m/s],wind_from [deg],air_temperature [degC]\n")
        f.write("\n".join(long_case.met_rows(8760)))
        f.write("\n")
    lines = ['# INVENTED scenario for the chart benchmark: 16 tracers, 16 sectors, one year of invented',
             '# met. Nothing here describes a real place or real measurements.',
             'name = "invented-wide"', 'title = "Invented basin city, 16 tracers and 16 sectors"',
             'invented = true', 'time_zone = "MST7MDT,M3.2.0,M11.1.0"', '',
             '[airshed]', 'x_side = "14 km"', 'y_side = "8 km"', '',
             '[met]', 'file = "met-wide.csv"', '', '[model]', 'spin_up = "none"', '']
    for p in range(N):
        lines += ['[pollutants.tracer%02d]' % p, 'unit = "ug/m3"', 'lifetime = "%d day"' % (1 + p),
                  'background = "%d ug/m3"' % (1 + p % 5), 'free_troposphere = "1 ug/m3"', '']
    for s in range(N):
        rates = ", ".join('tracer%02d = "%d kg/h"' % (p, 1 + (p * 7 + s * 3) % 11) for p in range(N))
        lines += ['[sectors.sector%02d]' % s, 'emissions = { %s }' % rates, '']
    case = os.path.join(folder, "invented-wide.toml")
    with open(case, "w") as f:
        f.write("\n".join(lines))
    return case


if __name__ == "__main__":
    print(write_case(sys.argv[1]))
