"""Round trips between lidbox and the field's own NetCDF tools.

Files written here with python3-netcdf4 and python3-xarray (packed values, fill values, times in
minutes, hours and days since dates with offsets, a station file, a grid, an ensemble) are read by
`lidbox met-dump`; the expected series come from netCDF4's own unpacking, cftime's own time
decoding and xarray's own selection and weighting. Files lidbox writes are opened by xarray and
ncdump and checked there. Bad inputs must exit 2, name the file and variable, and write nothing.

Run: /usr/bin/python3 test_netcdf_roundtrip.py <lidbox-binary> <source-dir>  (exit 77 = skipped)
"""
import csv
import io
import math
import os
import shutil
import subprocess
import sys
import tempfile

try:
    import cftime
    import netCDF4
    import numpy as np
    import xarray as xr
except ImportError as e:  # the pyenv python3 has none of these
    print(f"skipped: {e}")
    sys.exit(77)

LIDBOX = sys.argv[1]
WORK = tempfile.mkdtemp(prefix="netcdf-roundtrip-", dir=os.getcwd())
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def close(a, b, rel=1e-6, abs_=1e-9):
    if a is None or b is None or (isinstance(a, float) and math.isnan(a)):
        return (a is None or math.isnan(a)) and (b is None or (isinstance(b, float) and math.isnan(b)))
    return abs(a - b) <= abs_ + rel * abs(b)


def run(*args):
    return subprocess.run([LIDBOX, *args], capture_output=True, text=True)


def dump(path, *opts):
    """Decoded hourly met from lidbox as {column: [values]} with the time column as text."""
    p = run("met-dump", path, *opts)
    if p.returncode != 0:
        raise AssertionError(f"met-dump {path} {opts} failed ({p.returncode}): {p.stderr}")
    rows = list(csv.reader(io.StringIO(p.stdout)))
    header, body = rows[0], rows[1:]
    out = {}
    for i, name in enumerate(header):
        col = [r[i] for r in body]
        out[name] = col if name == "time" or name == "hour_start" else [
            float(x) if x != "" else float("nan") for x in col]
    return out


def iso(dates):
    return [d.strftime("%Y-%m-%dT%H:%M:%SZ") for d in dates]


def uv(speed, from_deg):
    # WMO-No. 8 convention: direction the wind comes from, clockwise from north.
    th = np.radians(from_deg)
    return -speed * np.sin(th), -speed * np.cos(th)


# ---------------------------------------------------------------------------------------------
# 1. Packed values, fill values, minutes since a date with an offset (NetCDF-4, netCDF4-python).
p1 = os.path.join(WORK, "packed.nc")
with netCDF4.Dataset(p1, "w", format="NETCDF4") as ds:
    ds.createDimension("time", None)
    t = ds.createVariable("time", "f8", ("time",))
    t.standard_name = "time"
    t.units = "minutes since 2026-01-05 06:00:00 +01:00"
    t.calendar = "gregorian"
    t[:] = np.arange(0, 8 * 60, 60)
    h = ds.createVariable("pbl", "i2", ("time",), fill_value=-32767)
    h.standard_name = "atmosphere_boundary_layer_thickness"
    h.units = "km"
    h.scale_factor = 0.001
    h.add_offset = 1.0
    h[:] = np.ma.masked_array([0.15, 0.2, 0.35, 0.0, 0.8, 1.25, 1.6, 1.7],
                              mask=[0, 0, 0, 1, 0, 0, 0, 0])  # netCDF4 packs on write
    s = ds.createVariable("ff", "f4", ("time",), fill_value=-999.0)
    s.standard_name = "wind_speed"
    s.units = "knot"
    s.missing_value = np.float32(-888.0)
    s[:] = [4, 6, -888, 8, 10, 12, 10, 8]
    d = ds.createVariable("dd", "f4", ("time",))
    d.standard_name = "wind_from_direction"
    d.units = "degree"
    d[:] = [0, 45, 90, 135, 180, 225, 270, 315]
    ta = ds.createVariable("t2", "f4", ("time",))
    ta.standard_name = "air_temperature"
    ta.units = "degC"
    ta[:] = np.linspace(-3, 4, 8)

got = dump(p1)
with netCDF4.Dataset(p1) as ds:  # netCDF4's own unpacking and masking are the reference
    h_ref = ds["pbl"][:].astype("f8").filled(np.nan) * 1000.0
    s_ref = ds["ff"][:].astype("f8").filled(np.nan) * 1852.0 / 3600.0  # 1 kt = 1852/3600 m/s
    d_ref = ds["dd"][:].astype("f8")
    ta_ref = ds["t2"][:].astype("f8") + 273.15
    t_ref = cftime.num2date(ds["time"][:], ds["time"].units, calendar="standard",
                            only_use_cftime_datetimes=False)
check(got["time"] == iso(t_ref), f"packed: times {got['time'][:2]} vs cftime {iso(t_ref)[:2]}")
check(got["time"][0] == "2026-01-05T05:00:00Z", "packed: 06:00 at +01:00 is 05:00 UTC")
for i in range(8):
    check(close(got["mixing_height [m]"][i], float(h_ref[i])), f"packed: h[{i}] {got['mixing_height [m]'][i]} vs {h_ref[i]}")
    u_ref, v_ref = uv(s_ref[i], d_ref[i])
    check(close(got["eastward_wind [m/s]"][i], float(u_ref), abs_=1e-6), f"packed: u[{i}]")
    check(close(got["northward_wind [m/s]"][i], float(v_ref), abs_=1e-6), f"packed: v[{i}]")
    check(close(got["air_temperature [K]"][i], float(ta_ref[i]), rel=1e-7), f"packed: T[{i}]")
check(math.isnan(got["mixing_height [m]"][3]), "packed: _FillValue becomes a gap")
check(math.isnan(got["eastward_wind [m/s]"][2]), "packed: missing_value becomes a gap")

# ---------------------------------------------------------------------------------------------
# 2. Days since a date with a negative offset, NETCDF3_CLASSIC (the format cdo reads cleanly).
p2 = os.path.join(WORK, "days.nc")
with netCDF4.Dataset(p2, "w", format="NETCDF3_CLASSIC") as ds:
    ds.createDimension("time", 5)
    t = ds.createVariable("time", "f8", ("time",))
    t.units = "days since 2026-01-04 18:00 -06:00"
    t.calendar = "proleptic_gregorian"
    t[:] = np.arange(5) / 24.0
    for name, sn, units, vals in [("zi", "atmosphere_boundary_layer_thickness", "m", [200, 250, 300, 350, 400]),
                                  ("u", "eastward_wind", "m s-1", [1, 2, 3, 4, 5]),
                                  ("v", "northward_wind", "m s-1", [0, 0, 0, 0, 0]),
                                  ("ps", "surface_air_pressure", "hPa", [1000, 1001, 1002, 1003, 1004])]:
        var = ds.createVariable(name, "f4", ("time",))
        var.standard_name, var.units = sn, units
        var[:] = vals
got = dump(p2)
with netCDF4.Dataset(p2) as ds:
    t_ref = cftime.num2date(ds["time"][:], ds["time"].units, calendar="proleptic_gregorian",
                            only_use_cftime_datetimes=False)
check(got["time"] == iso(t_ref), f"days: times {got['time']} vs cftime {iso(t_ref)}")
check(got["time"][0] == "2026-01-05T00:00:00Z", "days: 18:00 at -06:00 is 00:00 UTC next day")
check(got["surface_pressure [Pa]"] == [100000.0, 100100.0, 100200.0, 100300.0, 100400.0], "days: hPa to Pa")

# ---------------------------------------------------------------------------------------------
# 3. A station file written by xarray (variable-length strings, featureType timeSeries).
p3 = os.path.join(WORK, "stations.nc")
times = np.array(["2026-01-05T00:00", "2026-01-05T01:00", "2026-01-05T02:00"], dtype="datetime64[ns]")
ids = ["harbour", "old_town", "airport"]
hv = np.array([[300.0, 320, 340], [500, 520, 540], [700, 720, 740]])
ds = xr.Dataset(
    {"blh": (("station", "time"), hv, {"standard_name": "atmosphere_boundary_layer_thickness", "units": "m"}),
     "u10": (("station", "time"), hv / 100.0, {"standard_name": "eastward_wind", "units": "m s-1"}),
     "v10": (("station", "time"), -hv / 200.0, {"standard_name": "northward_wind", "units": "m s-1"}),
     "station_name": (("station",), np.array(ids, dtype=object), {"cf_role": "timeseries_id"})},
    coords={"time": ("time", times)},
    attrs={"featureType": "timeSeries", "Conventions": "CF-1.12"})
ds.time.encoding.update({"units": "hours since 2026-01-05 00:00:00+00:00", "calendar": "standard"})
ds.to_netcdf(p3, format="NETCDF4")
got = dump(p3, "--station", "old_town")
sel = xr.open_dataset(p3).set_coords("station_name").swap_dims({"station": "station_name"}).sel(station_name="old_town")
check(got["mixing_height [m]"] == [float(x) for x in sel.blh.values], f"stations: {got['mixing_height [m]']}")
check(all(close(a, float(b)) for a, b in zip(got["eastward_wind [m/s]"], sel.u10.values)), "stations: u")
check(got["time"] == [str(x)[:19] + "Z" for x in sel.time.values], "stations: times")
bad = run("met-dump", p3)
check(bad.returncode == 2 and "3 stations (harbour, old_town, airport) and no station chosen" in bad.stderr,
      f"stations: no station chosen: {bad.stderr}")

# ---------------------------------------------------------------------------------------------
# 4. A grid written by xarray: the nearest cell and a cos-latitude footprint mean.
p4 = os.path.join(WORK, "grid.nc")
lat = np.arange(44.0, 46.01, 0.25)
lon = np.arange(6.0, 8.51, 0.25)
tt = np.array(["2026-01-05T00", "2026-01-05T01", "2026-01-05T02", "2026-01-05T03"], dtype="datetime64[ns]")
k, i, j = np.meshgrid(np.arange(4), np.arange(lat.size), np.arange(lon.size), indexing="ij")
blh = 400.0 + 30.0 * k + 7.0 * i + 3.0 * j + 5.0 * np.sin(i * j)
ws = 2.0 + 0.1 * i + 0.05 * j * k
wd = (200.0 + 10.0 * j + 5.0 * k) % 360.0
g = xr.Dataset(
    {"blh": (("time", "lat", "lon"), blh.astype("f4"), {"standard_name": "atmosphere_boundary_layer_thickness", "units": "m"}),
     "si10": (("time", "lat", "lon"), ws.astype("f4"), {"standard_name": "wind_speed", "units": "m s-1"}),
     "wdir": (("time", "lat", "lon"), wd.astype("f4"), {"standard_name": "wind_from_direction", "units": "degree"})},
    coords={"time": tt, "lat": ("lat", lat, {"standard_name": "latitude", "units": "degrees_north"}),
            "lon": ("lon", lon, {"standard_name": "longitude", "units": "degrees_east"})})
g.to_netcdf(p4)
got = dump(p4, "--point", "45.07,7.69")
cell = xr.open_dataset(p4).sel(lat=45.07, lon=7.69, method="nearest")  # inside one cell: same as great-circle nearest
check(all(close(a, float(b)) for a, b in zip(got["mixing_height [m]"], cell.blh.values)), f"grid point: {got['mixing_height [m]']} vs {cell.blh.values}")
u_ref, v_ref = uv(cell.si10.values.astype("f8"), cell.wdir.values.astype("f8"))
check(all(close(a, float(b), abs_=1e-5) for a, b in zip(got["eastward_wind [m/s]"], u_ref)), "grid point: u")
got = dump(p4, "--footprint", "44.9,45.3,7.4,7.9")
box = xr.open_dataset(p4).sel(lat=slice(44.9, 45.3), lon=slice(7.4, 7.9))
w = np.cos(np.deg2rad(box.lat))
hm = box.blh.astype("f8").weighted(w).mean(("lat", "lon")).values
u_all, v_all = uv(box.si10.astype("f8"), box.wdir.astype("f8"))
um = u_all.weighted(w).mean(("lat", "lon")).values
check(box.blh.shape[1:] == (2, 2), f"grid footprint: {box.blh.shape} cells")
check(all(close(a, float(b)) for a, b in zip(got["mixing_height [m]"], hm)), f"grid footprint: h {got['mixing_height [m]']} vs {hm}")
check(all(close(a, float(b), abs_=1e-6) for a, b in zip(got["eastward_wind [m/s]"], um)), "grid footprint: u by components")

# ---------------------------------------------------------------------------------------------
# 5. An ensemble with a realization coordinate.
p5 = os.path.join(WORK, "ensemble.nc")
e = xr.Dataset(
    {"blh": (("realization", "time"), np.array([[300.0, 310], [400, 410], [500, 510]]), {"standard_name": "atmosphere_boundary_layer_thickness", "units": "m"}),
     "u": (("time",), np.array([1.0, 2.0]), {"standard_name": "eastward_wind", "units": "m s-1"}),
     "v": (("time",), np.array([0.0, 0.0]), {"standard_name": "northward_wind", "units": "m s-1"})},
    coords={"time": tt[:2], "realization": ("realization", np.array([0, 1, 2]), {"standard_name": "realization"})})
e.to_netcdf(p5)
got = dump(p5, "--member", "2")
check(got["mixing_height [m]"] == [500.0, 510.0], f"ensemble: {got['mixing_height [m]']}")

# ---------------------------------------------------------------------------------------------
# 6. What lidbox writes, opened by xarray and ncdump.
out = os.path.join(WORK, "written.nc")
p = run("met-dump", p1, "--fill-gaps", "3", "--to-netcdf", out)
check(p.returncode == 0 and p.stdout == "", f"writer: met-dump --to-netcdf: {p.returncode} {p.stderr}")
x = xr.open_dataset(out)
# The hourly stamps of file 1 as cftime decodes them (05:00 to 12:00 UTC).
check([str(v)[:19] + "Z" for v in x.time.values] == iso(cftime.num2date(
          np.arange(0, 480, 60), "minutes since 2026-01-05 06:00:00 +01:00",
          only_use_cftime_datetimes=False)), f"writer: xarray times {x.time.values[:2]}")
check(x.mixing_height.attrs["units"] == "m" and x.mixing_height.attrs["standard_name"] == "atmosphere_boundary_layer_thickness", "writer: h attributes")
check(close(float(x.mixing_height.values[3]), (h_ref[2] + h_ref[4]) / 2.0), f"writer: filled hour is the linear interpolation {x.mixing_height.values[3]}")
check(list(x.met_filled.values) == [0, 0, 1, 1, 0, 0, 0, 0], f"writer: flags {x.met_filled.values}")
check(x.met_filled.attrs["flag_meanings"] == "from_source gap_filled", "writer: flag meanings")
check(all(close(float(a), float(b)) for a, b in zip(x.air_temperature.values, ta_ref)), "writer: T")
check(x.attrs["featureType"] == "timeSeries" and x.attrs["Conventions"] == "CF-1.12", "writer: globals")
check(x.attrs["caution"].startswith("Screening estimate from a single well-mixed box model"), "writer: caution")
check(x.time.encoding["units"] == "hours since 2026-01-05 05:00:00 +00:00", f"writer: {x.time.encoding.get('units')}")
nd = subprocess.run(["ncdump", "-t", out], capture_output=True, text=True).stdout
check('time:units_metadata = "leap_seconds: none" ;' in nd, "ncdump: units_metadata")
check('time = "2026-01-05 05", "2026-01-05 06"' in nd, f"ncdump -t: decoded times")
check('mixing_height:units = "m" ;' in nd, "ncdump: units")

# cdo reads the NetCDF-3 variant: the same stamps and values (cdo prints 6 significant digits).
if shutil.which("cdo"):
    out3 = os.path.join(WORK, "written3.nc")
    p = run("met-dump", p1, "--fill-gaps", "3", "--netcdf3", "--to-netcdf", out3)
    check(p.returncode == 0, f"writer: NetCDF-3: {p.stderr}")
    stamps = subprocess.run(["cdo", "-s", "showtimestamp", out3], capture_output=True, text=True).stdout.split()
    check(stamps == [str(v)[:19] for v in x.time.values], f"cdo: time stamps {stamps[:2]}")
    vals = subprocess.run(["cdo", "-s", "output", "-selname,mixing_height", out3],
                          capture_output=True, text=True).stdout.split()
    check([float(v) for v in vals] == [float(f"{v:.6g}") for v in x.mixing_height.values],
          f"cdo: values {vals}")
else:
    print("note: cdo not installed; the cdo check did not run")

# Hour means with bounds: observed concentrations written back, NaN as _FillValue.
p6 = os.path.join(WORK, "obs.nc")
with netCDF4.Dataset(p6, "w", format="NETCDF4") as ds:
    ds.createDimension("time", 4)
    ds.createDimension("nv", 2)
    t = ds.createVariable("time", "f8", ("time",))
    t.units = "hours since 2026-01-05 00:00:00 +00:00"
    t.bounds = "time_bnds"
    t[:] = [1, 2, 3, 4]  # stamped at the period end
    b = ds.createVariable("time_bnds", "f8", ("time", "nv"))
    b[:] = [[0, 1], [1, 2], [2, 3], [3, 4]]
    pm = ds.createVariable("pm25", "f4", ("time",), fill_value=-1.0)
    pm.standard_name = "mass_concentration_of_pm2p5_ambient_aerosol_in_air"  # the older name
    pm.units = "ug m-3"
    pm[:] = np.ma.masked_array([12.0, 30.0, 0.0, 45.5], mask=[0, 0, 1, 0])
out2 = os.path.join(WORK, "obs_written.nc")
p = run("met-dump", p6, "--concentrations", "--to-netcdf", out2)
check(p.returncode == 0, f"writer: concentrations: {p.stderr}")
check(p.stderr == "lidbox met-dump: note: pm2p5: 1 of 4 hours missing (_FillValue, missing_value "
      "or outside valid_range): gaps in the output\n", f"writer: the fill value is counted: {p.stderr!r}")
x = xr.open_dataset(out2)
check(str(x.time.values[0])[:19] == "2026-01-05T00:00:00", "writer: hour labelled by its start")
check(str(x.time_bnds.values[0][1])[:19] == "2026-01-05T01:00:00", f"writer: time_bnds {x.time_bnds.values[0]}")
v = x.pm2p5.values
check(close(float(v[0]), 12.0) and math.isnan(float(v[2])) and close(float(v[3]), 45.5), f"writer: pm2p5 {v}")
check(x.pm2p5.attrs["standard_name"] == "mass_concentration_of_pm2p5_ambient_aerosol_particles_in_air", "writer: current PM name")
check(x.pm2p5.attrs["cell_methods"] == "time: mean (interval: 1 hour)", "writer: cell_methods")

# ---------------------------------------------------------------------------------------------
# 7. Bad inputs: exit 2, file and variable named, nothing written.
def bad_file(name, edit):
    path = os.path.join(WORK, name)
    with netCDF4.Dataset(path, "w", format="NETCDF4") as ds:
        ds.createDimension("time", 3)
        ds.createDimension("level", 2)
        t = ds.createVariable("time", "f8", ("time",))
        t.units = "hours since 2026-01-05"
        t[:] = [0, 1, 2]
        for name_, sn in [("u", "eastward_wind"), ("v", "northward_wind")]:
            var = ds.createVariable(name_, "f4", ("time",))
            var.standard_name, var.units = sn, "m s-1"
            var[:] = [1, 1, 1]
        edit(ds)
    return path


def blh(dims=("time",), units="m", sn="atmosphere_boundary_layer_thickness", name="blh"):
    def edit(ds):
        var = ds.createVariable(name, "f4", dims)
        if sn:
            var.standard_name = sn
        var.units = units
        var[:] = np.full([ds.dimensions[d].size for d in dims], 500.0)
    return edit


def decreasing(ds):
    blh()(ds)
    ds["time"][:] = [0, 2, 1]


def noleap(ds):
    blh()(ds)
    ds["time"].calendar = "noleap"


cases = [
    ("missing.nc", blh(sn="", name="pblh_m"),
     "no variable for the mixing height (standard_name \"atmosphere_boundary_layer_thickness\") among the "
     "variables present: time, u, v, pblh_m; did you mean \"pblh_m\"?; expected a variable with that "
     "standard_name, or the role \"mixing_height\" mapped to a variable name"),
    ("dims.nc", blh(dims=("time", "level")), ": variable \"blh\": dimensions (time=3, level=2)"),
    ("decreasing.nc", decreasing, ": variable \"time\": a decreasing time at index 2"),
    ("noleap.nc", noleap, ": variable \"time\": calendar \"noleap\"; expected calendar standard"),
    ("unit.nc", blh(units="m s-1"), ": variable \"blh\": unit \"m s-1\" cannot be converted to \"m\""),
]
for name, edit, expected in cases:
    path = bad_file(name, edit)
    target = os.path.join(WORK, "not_written_" + name)
    p = run("met-dump", path, "--to-netcdf", target)
    check(p.returncode == 2, f"bad {name}: exit {p.returncode}")
    check(p.stderr.startswith("lidbox met-dump: error: " + path + ":"), f"bad {name}: names the file: {p.stderr}")
    check(expected in p.stderr, f"bad {name}: message {p.stderr!r}")
    check(not os.path.exists(target), f"bad {name}: nothing written")
check(not [f for f in os.listdir(WORK) if f.startswith(".")], "no temporary files left")
msg = run("met-dump", os.path.join(WORK, "missing.nc")).stderr
check(msg == "lidbox met-dump: error: " + os.path.join(WORK, "missing.nc") + ": " + cases[0][2] + "\n",
      f"missing variable: whole message {msg!r}")

if failures:
    print(f"{len(failures)} failures; files kept in {WORK}")
    sys.exit(1)
shutil.rmtree(WORK)
print("all round trips agree")
