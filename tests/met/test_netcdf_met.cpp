#include <doctest/doctest.h>

#include <cmath>
#include <fstream>
#include <numbers>

#include "lidbox/base/error.hpp"
#include "lidbox/met/netcdf_met.hpp"
#include "netcdf_fixture.hpp"

using namespace lidbox;
using lidbox::test::NcWriter;
using lidbox::test::scratch_dir;

namespace {

const UtcSeconds k20260105 = 20458LL * 86400;  // 2026-01-05T00:00Z (days_from_civil)

std::string error_of(const std::string& path, const NetcdfMetOptions& opt = {}) {
  try {
    (void)read_met_netcdf(path, opt);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

// time(time) with the given units and values, plus u and v = 1 m/s with standard names.
struct Simple {
  NcWriter w;
  int t_dim, t_var, u_var, v_var;
  Simple(const std::string& path, const std::string& time_units, std::size_t n,
         int mode = NC_NETCDF4)
      : w(path, mode) {
    t_dim = w.dim("time", n);
    t_var = w.var("time", NC_DOUBLE, {t_dim});
    w.text(t_var, "standard_name", "time");
    w.text(t_var, "units", time_units);
    u_var = w.var("u10", NC_FLOAT, {t_dim}, "eastward_wind", "m s-1");
    v_var = w.var("v10", NC_FLOAT, {t_dim}, "northward_wind", "m s-1");
  }
  int blh(nc_type type = NC_FLOAT, const std::string& units = "m") {
    const int b = w.var("blh", type, {t_dim});
    w.text(b, "standard_name", "atmosphere_boundary_layer_thickness");
    w.text(b, "units", units);
    return b;
  }
};

std::vector<double> iota(std::size_t n, double step = 1.0) {
  std::vector<double> r(n);
  for (std::size_t i = 0; i < n; ++i) r[i] = static_cast<double>(i) * step;
  return r;
}

}  // namespace

TEST_CASE("a packed single series is unpacked, gap-marked and converted to SI") {
  const std::string path = scratch_dir("packed") + "/point.nc";
  {
    NcWriter w(path);
    const int td = w.dim("time", 6);
    const int t = w.var("time", NC_DOUBLE, {td});
    w.text(t, "standard_name", "time");
    // 01:00 at +01:00 is 00:00 UTC (CF 4.4 offset).
    w.text(t, "units", "hours since 2026-01-05 01:00:00 +01:00");
    w.text(t, "calendar", "standard");
    const int h = w.var("zmix", NC_SHORT, {td}, "atmosphere_boundary_layer_thickness", "km");
    w.number(h, "scale_factor", NC_DOUBLE, {0.01});
    w.number(h, "add_offset", NC_DOUBLE, {0.5});
    w.number(h, "_FillValue", NC_SHORT, {-32767});
    const int u = w.var("u", NC_FLOAT, {td}, "eastward_wind", "m s-1");
    w.number(u, "missing_value", NC_FLOAT, {-999});
    const int v = w.var("v", NC_FLOAT, {td}, "northward_wind", "km h-1");
    const int ta = w.var("t2m", NC_FLOAT, {td}, "air_temperature", "degC");
    const int ps = w.var("sp", NC_FLOAT, {td}, "surface_air_pressure", "hPa");
    w.end_define();
    w.put(t, iota(6));
    w.put(h, {0, 50, 100, -32767, 150, 200});
    w.put(u, {1, 2, 3, 4, -999, 6});
    w.put(v, {3.6, 7.2, 3.6, 3.6, 3.6, 3.6});
    w.put(ta, {0, 1, 2, 3, 4, 5});
    w.put(ps, {1013.25, 1000, 1000, 1000, 1000, 1000});
  }
  NetcdfReadInfo info;
  const MetSeries m = read_met_netcdf(path, {}, &info);
  CHECK(m.first_stamp_utc == k20260105);
  REQUIRE(m.size() == 6);
  // Closed form: (packed * 0.01 + 0.5) km * 1000 m/km (CF 8.1 packing).
  CHECK(m.mixing_height_m[0] == doctest::Approx(500.0));
  CHECK(m.mixing_height_m[1] == doctest::Approx(1000.0));
  CHECK(m.mixing_height_m[2] == doctest::Approx(1500.0));
  CHECK(std::isnan(m.mixing_height_m[3]));  // _FillValue, compared packed (CF 2.5.1)
  CHECK(m.mixing_height_m[5] == doctest::Approx(2500.0));
  CHECK(m.wind_u_m_s[1] == doctest::Approx(2.0));
  CHECK(std::isnan(m.wind_u_m_s[4]));                            // missing_value
  CHECK(m.wind_v_m_s[1] == doctest::Approx(2.0));                // 7.2 km/h = 2 m/s
  CHECK(m.air_temperature_K[1] == doctest::Approx(274.15));      // degC + 273.15
  CHECK(m.surface_pressure_Pa[0] == doctest::Approx(101325.0));  // hPa * 100
  CHECK(m.source_line[3] == 4);
  CHECK(info.role_variable.at("mixing_height") == "zmix");
  CHECK(info.layout == "a single time series");
  CHECK(info.time_step == "hourly, used as is");
  CHECK(info.time_bounds_label.empty());  // no bounds in this file
  CHECK(m.source == path);
}

TEST_CASE("speed and direction become components and single-level dimensions are dropped") {
  const std::string path = scratch_dir("speed") + "/point.nc";
  {
    NcWriter w(path, NC_CLASSIC_MODEL);
    const int td = w.dim("time", 2);
    const int zd = w.dim("height", 1);
    const int t = w.var("time", NC_DOUBLE, {td});
    w.text(t, "units", "days since 2026-01-05");
    const int h = w.var("mixing_height", NC_FLOAT, {td});
    w.text(h, "units", "ft");
    const int s = w.var("ws", NC_FLOAT, {td, zd}, "wind_speed", "knot");
    const int d = w.var("wd", NC_FLOAT, {td, zd}, "wind_from_direction", "degree");
    w.end_define();
    w.put(t, {0.0, 1.0 / 24.0});
    w.put(h, {1000, 2000});
    w.put(s, {10, 10});
    w.put(d, {90, 180});
  }
  NetcdfMetOptions opt;
  opt.variables["mixing_height"] = "mixing_height";
  const MetSeries m = read_met_netcdf(path, opt);
  REQUIRE(m.size() == 2);
  CHECK(m.first_stamp_utc == k20260105);
  CHECK(m.mixing_height_m[0] == doctest::Approx(304.8));  // 1 ft = 0.3048 m exactly
  // From 90 deg (east wind) blows west: u = -s sin(90) = -10 kt = -5.14444 m/s (WMO-No. 8).
  CHECK(m.wind_u_m_s[0] == doctest::Approx(-5.144444));
  CHECK(std::fabs(m.wind_v_m_s[0]) < 1e-9);
  // From 180 deg blows north: v = -s cos(180) = +5.14444 m/s.
  CHECK(m.wind_v_m_s[1] == doctest::Approx(5.144444));
  CHECK(m.air_temperature_K.empty());
}

TEST_CASE("mapping the speed form chooses it over components in the same file") {
  const std::string path = scratch_dir("both-forms") + "/w.nc";
  {
    NcWriter w(path);
    const int td = w.dim("time", 1);
    const int t = w.var("time", NC_DOUBLE, {td}, "time", "hours since 2026-01-05");
    const int h = w.var("h", NC_FLOAT, {td}, "atmosphere_boundary_layer_thickness", "m");
    const int u = w.var("u", NC_FLOAT, {td}, "eastward_wind", "m s-1");
    const int v = w.var("v", NC_FLOAT, {td}, "northward_wind", "m s-1");
    const int s = w.var("ws100", NC_FLOAT, {td}, "wind_speed", "m s-1");
    const int d = w.var("wd100", NC_FLOAT, {td}, "wind_from_direction", "degree");
    w.end_define();
    for (const auto& [var, x] :
         {std::pair{t, 0.0}, {h, 500.0}, {u, 1.0}, {v, 1.0}, {s, 4.0}, {d, 270.0}}) {
      w.put(var, {x});
    }
  }
  CHECK(read_met_netcdf(path, {}).wind_u_m_s[0] == doctest::Approx(1.0));  // components
  NetcdfMetOptions opt;
  opt.variables["wind_speed"] = "ws100";
  // From 270 deg (west) at 4 m/s: u = +4, v = 0 (WMO-No. 8).
  const MetSeries m = read_met_netcdf(path, opt);
  CHECK(m.wind_u_m_s[0] == doctest::Approx(4.0));
  CHECK(std::fabs(m.wind_v_m_s[0]) < 1e-12);
}

namespace {
std::string write_stations(const std::string& dir) {
  const std::string path = dir + "/stations.nc";
  NcWriter w(path);
  const int sd = w.dim("station", 3);
  const int nd = w.dim("name_strlen", 8);
  const int td = w.dim("time", 4);
  w.text(NC_GLOBAL, "featureType", "timeSeries");
  const int sn = w.var("station_name", NC_CHAR, {sd, nd});
  w.text(sn, "cf_role", "timeseries_id");
  const int t = w.var("time", NC_DOUBLE, {td}, "time", "minutes since 2026-01-05 00:00:00Z");
  const int h = w.var("pblh", NC_FLOAT, {sd, td}, "atmosphere_boundary_layer_thickness", "m");
  const int u = w.var("u", NC_FLOAT, {sd, td}, "eastward_wind", "m/s");
  const int v = w.var("v", NC_FLOAT, {sd, td}, "northward_wind", "m/s");
  w.end_define();
  std::string names(24, '\0');
  names.replace(0, 5, "north");
  names.replace(8, 6, "centre");
  names.replace(16, 5, "south");
  w.put_text(sn, names);
  w.put(t, {0, 60, 120, 180});
  std::vector<double> hv, uv;
  for (int s = 0; s < 3; ++s) {
    for (int k = 0; k < 4; ++k) {
      hv.push_back(1000.0 * s + 10.0 * k + 100.0);
      uv.push_back(s);
    }
  }
  w.put(h, hv);
  w.put(u, uv);
  w.put(v, uv);
  return path;
}
}  // namespace

TEST_CASE("a station file gives the chosen station and lists the ids otherwise") {
  const std::string path = write_stations(scratch_dir("stations"));
  NetcdfMetOptions opt;
  opt.station_id = "centre";
  NetcdfReadInfo info;
  const MetSeries m = read_met_netcdf(path, opt, &info);
  REQUIRE(m.size() == 4);
  // Station index 1: 1000 * 1 + 10 * k + 100 (fixture's closed form).
  CHECK(m.mixing_height_m[0] == doctest::Approx(1100.0));
  CHECK(m.mixing_height_m[3] == doctest::Approx(1130.0));
  CHECK(m.wind_u_m_s[2] == doctest::Approx(1.0));
  CHECK(info.layout == "station \"centre\"");
  CHECK(error_of(path) == path +
                              ": variable \"station_name\": 3 stations (north, centre, south) and "
                              "no station chosen; expected a station id (--station or [met] "
                              "station)");
  opt.station_id = "east";
  CHECK(error_of(path, opt) == path +
                                   ": variable \"station_name\": no station \"east\"; expected one "
                                   "of the stations north, centre, south");
}

namespace {
std::string write_grid(const std::string& dir) {
  const std::string path = dir + "/grid.nc";
  NcWriter w(path);
  const int td = w.dim("time", 3);
  const int yd = w.dim("latitude", 3);
  const int xd = w.dim("longitude", 4);
  const int t = w.var("time", NC_INT, {td});
  w.text(t, "units", "hours since 2026-01-05");
  const int la = w.var("latitude", NC_DOUBLE, {yd});
  w.text(la, "units", "degrees_north");
  const int lo = w.var("longitude", NC_DOUBLE, {xd});
  w.text(lo, "units", "degrees_east");
  const int h = w.var("blh", NC_FLOAT, {td, yd, xd}, "atmosphere_boundary_layer_thickness", "m");
  w.number(h, "_FillValue", NC_FLOAT, {-1});
  const int u = w.var("u10", NC_FLOAT, {td, yd, xd}, "eastward_wind", "m s-1");
  const int v = w.var("v10", NC_FLOAT, {td, yd, xd}, "northward_wind", "m s-1");
  w.end_define();
  w.put(t, {0, 1, 2});
  w.put(la, {40, 41, 42});
  w.put(lo, {10, 11, 12, 13});
  std::vector<double> hv, uv, vv;
  for (int k = 0; k < 3; ++k) {
    for (int i = 0; i < 3; ++i) {
      for (int j = 0; j < 4; ++j) {
        hv.push_back(k == 1 && i == 2 && j == 2 ? -1.0 : 1000.0 + 100.0 * i + 10.0 * j + k);
        uv.push_back(j);
        vv.push_back(0.0);
      }
    }
  }
  w.put(h, hv);
  w.put(u, uv);
  w.put(v, vv);
  return path;
}
}  // namespace

TEST_CASE("a grid gives the nearest cell to a point and the cos-latitude mean over a footprint") {
  const std::string path = write_grid(scratch_dir("grid"));
  NetcdfMetOptions opt;
  opt.point = LatLon{40.9, 12.2};
  const MetSeries p = read_met_netcdf(path, opt);
  REQUIRE(p.size() == 3);
  // Nearest centre to 40.9N 12.2E is (41, 12): i = 1, j = 2 -> 1000 + 100 + 20 + k.
  CHECK(p.mixing_height_m[0] == doctest::Approx(1120.0));
  CHECK(p.mixing_height_m[2] == doctest::Approx(1122.0));
  CHECK(p.wind_u_m_s[0] == doctest::Approx(2.0));

  opt.point.reset();
  opt.footprint = LatLonBox{40.5, 42.5, 10.5, 12.5};
  const MetSeries f = read_met_netcdf(path, opt);
  // Cells i = 1, 2 and j = 1, 2; weights cos(41 deg), cos(42 deg) (relative cell areas).
  const double w1 = std::cos(41.0 * std::numbers::pi / 180.0);
  const double w2 = std::cos(42.0 * std::numbers::pi / 180.0);
  const double expected0 = 1000.0 + 10.0 * 1.5 + 100.0 * (1.0 * w1 + 2.0 * w2) / (w1 + w2);
  CHECK(f.mixing_height_m[0] == doctest::Approx(expected0).epsilon(1e-12));
  CHECK(f.mixing_height_m[2] == doctest::Approx(expected0 + 2.0).epsilon(1e-12));
  CHECK(std::isnan(f.mixing_height_m[1]));  // one cell of the footprint is missing at k = 1
  CHECK(f.wind_u_m_s[0] == doctest::Approx(1.5));

  // Across the 180th meridian nothing lies inside; the message shows the grid's extent.
  opt.footprint = LatLonBox{40.0, 42.0, 170.0, -170.0};
  CHECK(error_of(path, opt) ==
        path +
            ": variable \"blh\": no grid cell centre inside the footprint lat 40..42, lon "
            "170..-170 (grid lat 40..42, lon 10..13); expected a footprint that contains at "
            "least one cell centre");
  CHECK(error_of(path) == path +
                              ": variable \"blh\": a grid of 3 x 4 cells and neither a point nor a "
                              "footprint; expected a point (--point LAT,LON) or a footprint "
                              "(lat/lon box)");
}

TEST_CASE("an ensemble member is chosen by its realization value") {
  const std::string path = scratch_dir("ensemble") + "/ens.nc";
  {
    NcWriter w(path);
    const int td = w.dim("time", 3);
    const int md = w.dim("ens_member", 4);
    const int t = w.var("time", NC_DOUBLE, {td});
    w.text(t, "units", "hours since 2026-01-05 00:00:00 +00:00");
    const int m = w.var("ens_member", NC_INT, {md});
    w.text(m, "standard_name", "realization");
    const int h = w.var("blh", NC_FLOAT, {md, td}, "atmosphere_boundary_layer_thickness", "m");
    const int u = w.var("u10", NC_FLOAT, {td, md}, "eastward_wind", "m s-1");
    const int v = w.var("v10", NC_FLOAT, {td}, "northward_wind", "m s-1");
    w.end_define();
    w.put(t, {0, 1, 2});
    w.put(m, {1, 2, 3, 4});
    std::vector<double> hv, uv;
    for (int i = 0; i < 4; ++i) {
      for (int k = 0; k < 3; ++k) hv.push_back(500.0 + 100.0 * i + k);
    }
    for (int k = 0; k < 3; ++k) {
      for (int i = 0; i < 4; ++i) uv.push_back(10.0 * k + i);
    }
    w.put(h, hv);
    w.put(u, uv);
    w.put(v, {0, 0, 0});
  }
  NetcdfMetOptions opt;
  opt.member = 3;
  const MetSeries m = read_met_netcdf(path, opt);
  // Member value 3 is index 2: blh = 500 + 200 + k, u = 10 k + 2 (dimension order differs).
  CHECK(m.mixing_height_m[0] == doctest::Approx(700.0));
  CHECK(m.mixing_height_m[2] == doctest::Approx(702.0));
  CHECK(m.wind_u_m_s[1] == doctest::Approx(12.0));
  opt.member = 7;
  CHECK(error_of(path, opt) == path +
                                   ": variable \"blh\": dimension \"ens_member\": no member 7; "
                                   "expected one of the members 1, 2, 3, 4");
  CHECK(error_of(path) == path +
                              ": variable \"blh\": 4 ensemble members along dimension "
                              "\"ens_member\" and no member chosen; expected a member (--member "
                              "or [met] member)");
}

TEST_CASE("sub-hourly data become hour means under the 75 percent rule or on-the-hour samples") {
  const std::string path = scratch_dir("subhourly") + "/q.nc";
  {
    Simple s(path, "minutes since 2026-01-05 00:00", 12);
    const int h = s.blh();
    s.w.number(h, "_FillValue", NC_FLOAT, {-9});
    s.w.end_define();
    s.w.put(h, {100, 200, 300, 400, 500, -9, -9, 800, 900, -9, 1100, 1200});
    s.w.put(s.t_var, iota(12, 15.0));
    s.w.put(s.u_var, std::vector<double>(12, 1.0));
    s.w.put(s.v_var, std::vector<double>(12, 1.0));
  }
  NetcdfReadInfo info;
  MetSeries m = read_met_netcdf(path, {}, &info);
  REQUIRE(m.size() == 3);
  CHECK(m.mixing_height_m[0] == doctest::Approx(250.0));  // (100+200+300+400)/4
  CHECK(std::isnan(m.mixing_height_m[1]));                // 2 of 4 valid < 75 %
  CHECK(m.mixing_height_m[2] == doctest::Approx((900.0 + 1100.0 + 1200.0) / 3.0));  // 3 of 4
  CHECK(info.time_step == "900 s, hour means of the samples in [H, H+1h) stamped H (75 % rule)");
  NetcdfMetOptions opt;
  opt.sub_hourly = SubHourlyRule::on_the_hour;
  m = read_met_netcdf(path, opt);
  REQUIRE(m.size() == 3);
  CHECK(m.mixing_height_m[1] == doctest::Approx(500.0));
  CHECK(m.mixing_height_m[2] == doctest::Approx(900.0));
  opt.sub_hourly = SubHourlyRule::refuse;
  CHECK(error_of(path, opt) == path +
                                   ": variable \"time\": a time step of 900 s; expected hourly "
                                   "data (sub-hourly refused by option)");
}

TEST_CASE("three-hourly data are refused unless linear interpolation is asked for") {
  const std::string path = scratch_dir("coarse") + "/3h.nc";
  {
    Simple s(path, "days since 2026-01-05", 4);
    const int h = s.blh();
    s.w.end_define();
    s.w.put(h, {300, 600, 900, 1200});
    s.w.put(s.t_var, {0.0, 0.125, 0.25, 0.5});  // the 09:00 record is absent
    s.w.put(s.u_var, {1, 2, 3, 4});
    s.w.put(s.v_var, {0, 0, 0, 0});
  }
  CHECK(error_of(path) == path +
                              ": variable \"time\": a time step of 10800 s (3 h); expected hourly "
                              "data, or linear interpolation to hours asked for ([met] "
                              "coarse_step = \"linear\", --coarse linear)");
  NetcdfMetOptions opt;
  opt.coarse = CoarseStepRule::linear;
  const MetSeries m = read_met_netcdf(path, opt);
  REQUIRE(m.size() == 13);
  // Linear in time between 300 at 00:00 and 600 at 03:00: 400 at 01:00 (closed form).
  CHECK(m.mixing_height_m[1] == doctest::Approx(400.0));
  CHECK(m.mixing_height_m[5] == doctest::Approx(800.0));
  CHECK(m.mixing_height_m[6] == doctest::Approx(900.0));
  CHECK(std::isnan(m.mixing_height_m[7]));  // next to the absent 09:00 record
  CHECK(std::isnan(m.mixing_height_m[9]));
  CHECK(m.mixing_height_m[12] == doctest::Approx(1200.0));
  CHECK(m.wind_u_m_s[4] == doctest::Approx(2.0 + 1.0 / 3.0));
  CHECK(m.source_line[3] == 2);
  CHECK(m.source_line[4] == 0);
}

TEST_CASE("a missing variable lists the variables present and the closest name") {
  const std::string path = scratch_dir("missing") + "/m.nc";
  {
    Simple s(path, "hours since 2026-01-05", 2);
    const int b = s.w.var("blh", NC_FLOAT, {s.t_dim});
    s.w.text(b, "units", "m");
    s.w.end_define();
    s.w.put(b, {500, 600});
    s.w.put(s.t_var, {0, 1});
    s.w.put(s.u_var, {1, 1});
    s.w.put(s.v_var, {1, 1});
  }
  CHECK(error_of(path) ==
        path +
            ": no variable for the mixing height (standard_name "
            "\"atmosphere_boundary_layer_thickness\") among the variables present: time, u10, "
            "v10, blh; did you mean \"blh\"?; expected a variable with that standard_name, or "
            "the role \"mixing_height\" mapped to a variable name");
  NetcdfMetOptions opt;
  opt.variables["mixing_height"] = "bhl";
  CHECK(error_of(path, opt) ==
        path +
            ": variable \"bhl\" (mapped to the mixing height) not found among the variables "
            "present: time, u10, v10, blh; did you mean \"blh\"?; expected one of the variables "
            "present");
  opt.variables["mixing_height"] = "blh";
  CHECK(read_met_netcdf(path, opt).mixing_height_m[1] == doctest::Approx(600.0));
  opt.variables["mixing_hieght"] = "blh";
  CHECK_THROWS_AS((void)read_met_netcdf(path, opt), InputError);
}

TEST_CASE("wrong dimensions, bad times, calendars and units name the file and variable") {
  const std::string dir = scratch_dir("bad");
  {
    NcWriter w(dir + "/dims.nc");
    const int td = w.dim("time", 2);
    const int ld = w.dim("level", 2);
    const int t = w.var("time", NC_DOUBLE, {td});
    w.text(t, "units", "hours since 2026-01-05");
    (void)w.var("blh", NC_FLOAT, {td, ld}, "atmosphere_boundary_layer_thickness", "m");
    (void)w.var("u", NC_FLOAT, {td}, "eastward_wind", "m s-1");
    (void)w.var("v", NC_FLOAT, {td}, "northward_wind", "m s-1");
  }
  CHECK(error_of(dir + "/dims.nc") ==
        dir +
            "/dims.nc: variable \"blh\": dimensions (time=2, level=2) with dimension \"level\" of "
            "length 2 that is neither time, station, ensemble member, latitude nor longitude; "
            "expected dimensions time [, station | member | latitude, longitude], other "
            "dimensions of length 1");
  const auto simple = [&](const std::string& name, const std::string& units,
                          const std::vector<double>& times, const std::string& calendar,
                          const std::string& blh_units) {
    Simple s(dir + "/" + name, units, times.size());
    if (!calendar.empty()) s.w.text(s.t_var, "calendar", calendar);
    const int h = s.blh(NC_FLOAT, blh_units);
    s.w.end_define();
    s.w.put(h, std::vector<double>(times.size(), 500.0));
    s.w.put(s.t_var, times);
    s.w.put(s.u_var, std::vector<double>(times.size(), 1.0));
    s.w.put(s.v_var, std::vector<double>(times.size(), 1.0));
    return dir + "/" + name;
  };
  std::string p = simple("decreasing.nc", "hours since 2026-01-05", {0, 1, 3, 2}, "", "m");
  CHECK(error_of(p) == p + ": variable \"time\": a decreasing time at index 3 "
                           "(2026-01-05T02:00:00Z after 2026-01-05T03:00:00Z); expected strictly "
                           "increasing times");
  p = simple("duplicate.nc", "hours since 2026-01-05", {0, 1, 1}, "", "m");
  CHECK(error_of(p) == p + ": variable \"time\": a duplicate time at index 2 "
                           "(2026-01-05T01:00:00Z after 2026-01-05T01:00:00Z); expected strictly "
                           "increasing times");
  p = simple("noleap.nc", "hours since 2026-01-05", {0, 1}, "noleap", "m");
  CHECK(error_of(p) == p + ": variable \"time\": calendar \"noleap\"; expected calendar standard, "
                           "gregorian or proleptic_gregorian (lidbox works on real UTC hours; "
                           "model calendars such as noleap or 360_day, and julian, utc or tai, "
                           "have no faithful map onto them)");
  p = simple("unit.nc", "hours since 2026-01-05", {0, 1}, "", "kg");
  CHECK(error_of(p) == p + ": variable \"blh\": unit \"kg\" cannot be converted to \"m\"; "
                           "expected a unit of length convertible to \"m\"");
  p = simple("offhour.nc", "minutes since 2026-01-05", {30, 90}, "", "m");
  CHECK(error_of(p) == p + ": variable \"time\": hourly stamps off the whole hour (first "
                           "2026-01-05T00:30:00Z); expected stamps on whole UTC hours");
  std::ofstream(dir + "/text.nc") << "time,mixing_height [m]\n";
  CHECK(error_of(dir + "/text.nc").rfind(dir + "/text.nc: not readable as NetCDF (", 0) == 0);
  CHECK(error_of(dir + "/absent.nc") ==
        dir + "/absent.nc: no such file; expected an existing NetCDF file");
}

TEST_CASE("observed concentrations come out in ug m-3 and ppb on hours labelled by their start") {
  const std::string path = scratch_dir("conc") + "/obs.nc";
  {
    NcWriter w(path);
    const int td = w.dim("time", 3);
    const int bd = w.dim("nv", 2);
    const int t = w.var("time", NC_DOUBLE, {td});
    w.text(t, "units", "hours since 2026-01-05 00:00:00 +00:00");
    w.text(t, "bounds", "time_bnds");
    const int tb = w.var("time_bnds", NC_DOUBLE, {td, bd});
    // The older PM2.5 name (an alias of ..._particles_in_air in the CF table).
    const int pm = w.var("pm25", NC_FLOAT, {td},
                         "mass_concentration_of_pm2p5_ambient_aerosol_in_air", "kg m-3");
    w.number(pm, "_FillValue", NC_FLOAT, {-1});
    const int o3 = w.var("o3", NC_FLOAT, {td}, "mole_fraction_of_ozone_in_air", "ppm");
    const int other = w.var("rh", NC_FLOAT, {td});
    w.text(other, "units", "%");
    w.end_define();
    w.put(t, {1, 2, 3});  // stamped at the end of each hour
    w.put(tb, {0, 1, 1, 2, 2, 3});
    w.put(pm, {1e-8, -1, 2.5e-8});
    w.put(o3, {0.04, 0.05, 0.06});
    w.put(other, {50, 60, 70});
  }
  const auto all = read_concentrations_netcdf(path, {});
  REQUIRE(all.size() == 2);
  CHECK(all[0].first == "pm2p5");
  CHECK(all[0].second.unit == "ug m-3");
  CHECK(all[0].second.first_hour_start_utc == k20260105);   // lower bound of [0, 1] h
  CHECK(all[0].second.values[0] == doctest::Approx(10.0));  // 1e-8 kg m-3 = 10 ug m-3
  CHECK(std::isnan(all[0].second.values[1]));
  CHECK(all[1].first == "o3");
  CHECK(all[1].second.unit == "ppb");
  CHECK(all[1].second.values[2] == doctest::Approx(60.0));  // 0.06 ppm = 60 ppb
}

TEST_CASE("a background series is read as an extra met column in ug m-3") {
  const std::string path = scratch_dir("extra") + "/bg.nc";
  {
    Simple s(path, "hours since 2026-01-05", 2);
    const int h = s.blh();
    const int bg =
        s.w.var("pm25_bg", NC_FLOAT, {s.t_dim},
                "mass_concentration_of_pm2p5_ambient_aerosol_particles_in_air", "mg m-3");
    s.w.end_define();
    s.w.put(h, {500, 600});
    s.w.put(bg, {0.012, 0.015});
    s.w.put(s.t_var, {0, 1});
    s.w.put(s.u_var, {1, 1});
    s.w.put(s.v_var, {1, 1});
  }
  NetcdfMetOptions opt;
  opt.extra["background_pm2p5"] = "mass_concentration_of_pm2p5_ambient_aerosol_particles_in_air";
  const MetSeries m = read_met_netcdf(path, opt);
  const MetColumn* c = m.find_extra("background_pm2p5");
  REQUIRE(c != nullptr);
  CHECK(c->unit == "ug m-3");
  CHECK(c->values[1] == doctest::Approx(15.0));  // 0.015 mg m-3 = 15 ug m-3
  opt.extra["background_pm2p5"] = "pm25bg";
  CHECK(error_of(path, opt) ==
        path +
            ": no variable or standard_name \"pm25bg\" for column \"background_pm2p5\" among the "
            "variables present: time, u10, v10, blh, pm25_bg; did you mean \"pm25_bg\"?; expected "
            "a variable name or a CF standard_name present in the file");
}

TEST_CASE("the closest-name hint skips other roles' variables and too distant names") {
  const std::string dir = scratch_dir("hint");
  const auto write = [&](const std::string& name, const std::string& extra_var) {
    Simple s(dir + "/" + name, "hours since 2026-01-05", 2);
    if (!extra_var.empty()) (void)s.w.var(extra_var, NC_FLOAT, {s.t_dim}, "", "m");
    return dir + "/" + name;
  };
  // "pblh_m" begins with the common short name "pblh"; u10 (eastward_wind) is never offered.
  std::string p = write("prefix.nc", "pblh_m");
  CHECK(error_of(p).find("among the variables present: time, u10, v10, pblh_m; did you mean "
                         "\"pblh_m\"?; expected") != std::string::npos);
  p = write("none.nc", "");
  CHECK(error_of(p).find("among the variables present: time, u10, v10; expected") !=
        std::string::npos);
}

TEST_CASE("a 0..360 grid with descending latitudes serves a point given west of Greenwich") {
  const std::string path = scratch_dir("grid360") + "/g.nc";
  {
    NcWriter w(path);
    const int td = w.dim("time", 2);
    const int yd = w.dim("lat", 3);
    const int xd = w.dim("lon", 3);
    const int t = w.var("time", NC_DOUBLE, {td}, "time", "hours since 2026-01-05");
    const int la = w.var("lat", NC_FLOAT, {yd}, "latitude", "degrees_north");
    const int lo = w.var("lon", NC_FLOAT, {xd}, "longitude", "degrees_east");
    // Unsigned shorts in a signed type (NetCDF User Guide, _Unsigned): -25536 is 40000.
    const int h = w.var("blh", NC_SHORT, {td, yd, xd}, "atmosphere_boundary_layer_thickness", "m");
    w.text(h, "_Unsigned", "true");
    w.number(h, "scale_factor", NC_DOUBLE, {0.05});
    const int u = w.var("u", NC_FLOAT, {td}, "eastward_wind", "m s-1");
    const int v = w.var("v", NC_FLOAT, {td}, "northward_wind", "m s-1");
    w.end_define();
    w.put(t, {0, 1});
    w.put(la, {42, 41, 40});
    w.put(lo, {247, 248, 249});  // 248 E = 112 W
    std::vector<double> hv(18, 1000.0);
    hv[4] = -25536;       // time 0, lat 41, lon 248
    hv[9 + 4] = 30000.0;  // time 1, same cell
    w.put(h, hv);
    w.put(u, {1, 1});
    w.put(v, {0, 0});
  }
  NetcdfMetOptions opt;
  opt.point = LatLon{41.1, -112.05};
  const MetSeries m = read_met_netcdf(path, opt);
  // 40000 * 0.05 m and 30000 * 0.05 m (closed form of the packing).
  CHECK(m.mixing_height_m[0] == doctest::Approx(2000.0));
  CHECK(m.mixing_height_m[1] == doctest::Approx(1500.0));
  opt.point.reset();
  opt.footprint = LatLonBox{40.5, 41.5, -112.5, -111.5};  // just that cell, given in -180..180
  CHECK(read_met_netcdf(path, opt).mixing_height_m[0] == doctest::Approx(2000.0));
}

TEST_CASE("a half wind, a foreign time axis and an unknown role are refused by name") {
  const std::string dir = scratch_dir("roles");
  {
    NcWriter w(dir + "/half.nc");
    const int td = w.dim("time", 2);
    const int t = w.var("time", NC_DOUBLE, {td}, "time", "hours since 2026-01-05");
    const int h = w.var("h", NC_FLOAT, {td}, "atmosphere_boundary_layer_thickness", "m");
    const int u = w.var("u", NC_FLOAT, {td}, "eastward_wind", "m s-1");
    w.end_define();
    w.put(t, {0, 1});
    w.put(h, {300, 400});
    w.put(u, {1, 2});
  }
  CHECK(error_of(dir + "/half.nc") ==
        dir +
            "/half.nc: no variable for the northward wind (standard_name \"northward_wind\") "
            "among the variables present: time, h, u; expected a variable with that "
            "standard_name, or the role \"northward_wind\" mapped to a variable name");
  {
    NcWriter w(dir + "/two_axes.nc");
    const int td = w.dim("time", 2);
    const int t2d = w.dim("time2", 2);
    const int t = w.var("time", NC_DOUBLE, {td}, "time", "hours since 2026-01-05");
    const int t2 = w.var("time2", NC_DOUBLE, {t2d}, "time", "hours since 2026-01-06");
    const int h = w.var("h", NC_FLOAT, {td}, "atmosphere_boundary_layer_thickness", "m");
    const int u = w.var("u", NC_FLOAT, {t2d}, "eastward_wind", "m s-1");
    const int v = w.var("v", NC_FLOAT, {t2d}, "northward_wind", "m s-1");
    w.end_define();
    w.put(t, {0, 1});
    w.put(t2, {0, 1});
    w.put(h, {300, 400});
    w.put(u, {1, 2});
    w.put(v, {1, 2});
  }
  CHECK(error_of(dir + "/two_axes.nc") ==
        dir +
            "/two_axes.nc: variable \"u\": a time axis different from that of \"h\"; expected all "
            "met variables on one time axis");
  NetcdfMetOptions opt;
  opt.variables["mixing_hieght"] = "h";
  CHECK(error_of(dir + "/half.nc", opt) ==
        dir +
            "/half.nc: unknown variable role \"mixing_hieght\"; did you mean \"mixing_height\"?; "
            "expected one of mixing_height, "
            "eastward_wind, northward_wind, wind_speed, wind_from_direction, air_temperature, "
            "surface_pressure, time");
}

TEST_CASE("a curvilinear grid is read through its 2-D latitude and longitude") {
  const std::string path = scratch_dir("curvilinear") + "/c.nc";
  {
    NcWriter w(path);
    const int td = w.dim("time", 2);
    const int yd = w.dim("y", 2);
    const int xd = w.dim("x", 3);
    const int t = w.var("time", NC_DOUBLE, {td}, "time", "hours since 2026-01-05");
    const int la = w.var("nav_lat", NC_DOUBLE, {yd, xd}, "latitude", "degrees_north");
    const int lo = w.var("nav_lon", NC_DOUBLE, {yd, xd}, "longitude", "degrees_east");
    const int h = w.var("blh", NC_FLOAT, {td, yd, xd}, "atmosphere_boundary_layer_thickness", "m");
    w.text(h, "coordinates", "nav_lat nav_lon");
    const int u = w.var("u", NC_FLOAT, {td}, "eastward_wind", "m s-1");
    const int v = w.var("v", NC_FLOAT, {td}, "northward_wind", "m s-1");
    w.end_define();
    w.put(t, {0, 1});
    // A sheared grid: each row's longitudes shift by 0.3 deg (a projection's look).
    w.put(la, {45.0, 45.1, 45.2, 45.5, 45.6, 45.7});
    w.put(lo, {7.0, 7.5, 8.0, 7.3, 7.8, 8.3});
    std::vector<double> hv;
    for (int k = 0; k < 2; ++k) {
      for (int c = 0; c < 6; ++c) hv.push_back(100.0 * (c + 1) + k);
    }
    w.put(h, hv);
    w.put(u, {1, 1});
    w.put(v, {0, 0});
  }
  NetcdfMetOptions opt;
  opt.point = LatLon{45.58, 7.75};  // nearest centre: row 1, column 1 (45.6 N, 7.8 E)
  NetcdfReadInfo info;
  const MetSeries m = read_met_netcdf(path, opt, &info);
  CHECK(m.mixing_height_m[0] == doctest::Approx(500.0));
  CHECK(m.mixing_height_m[1] == doctest::Approx(501.0));
  opt.point.reset();
  opt.footprint = LatLonBox{45.05, 45.65, 7.2, 7.9};  // (45.1, 7.5), (45.5, 7.3), (45.6, 7.8)
  const MetSeries f = read_met_netcdf(path, opt, &info);
  CHECK(f.mixing_height_m[0] == doctest::Approx((200.0 + 400.0 + 500.0) / 3.0));  // equal weights
  CHECK(info.layout == "mean over 3 grid cells in the footprint (equal weights)");
}

TEST_CASE("a ragged station layout is refused with the layouts lidbox reads") {
  const std::string path = scratch_dir("ragged") + "/r.nc";
  {
    NcWriter w(path);
    const int sd = w.dim("station", 2);
    const int od = w.dim("obs", 5);
    const int rs = w.var("row_size", NC_INT, {sd});
    w.text(rs, "sample_dimension", "obs");
    (void)w.var("time", NC_DOUBLE, {od}, "time", "hours since 2026-01-05");
    (void)w.var("blh", NC_FLOAT, {od}, "atmosphere_boundary_layer_thickness", "m");
  }
  CHECK(error_of(path) == path +
                              ": a ragged-array layout (variable \"row_size\" has "
                              "sample_dimension, CF Appendix H.2.4/H.2.5); expected a single time "
                              "series or the orthogonal layout X(station, time) (CF Appendix "
                              "H.2.1, H.4)");
}

TEST_CASE("a display name stands for the path in messages and in the series' source") {
  const std::string path = write_stations(scratch_dir("display"));
  NetcdfMetOptions opt;
  opt.display_name = "met/stations.nc";
  CHECK(error_of(path, opt) ==
        "met/stations.nc: variable \"station_name\": 3 stations (north, centre, south) and no "
        "station chosen; expected a station id (--station or [met] station)");
  opt.station_id = "south";
  CHECK(read_met_netcdf(path, opt).source == "met/stations.nc");
  opt.display_name = "absent.nc";
  CHECK(error_of(path + ".missing", opt) ==
        "absent.nc: no such file; expected an existing NetCDF file");
}

TEST_CASE("time bounds tell which end of the hour the met stamps mark") {
  const std::string path = scratch_dir("bounds") + "/b.nc";
  {
    Simple s(path, "hours since 2026-01-05", 2);
    const int h = s.blh();
    const int nv = s.w.dim("nv", 2);
    s.w.text(s.t_var, "bounds", "time_bnds");
    const int b = s.w.var("time_bnds", NC_DOUBLE, {s.t_dim, nv});
    s.w.end_define();
    s.w.put(s.t_var, {1, 2});
    s.w.put(b, {0, 1, 1, 2});  // stamps at the end of each hour (CF 7.1 bounds)
    s.w.put(h, {300, 400});
    s.w.put(s.u_var, {1, 1});
    s.w.put(s.v_var, {0, 0});
  }
  NetcdfReadInfo info;
  const MetSeries m = read_met_netcdf(path, {}, &info);
  CHECK(info.time_bounds_label == "period_end");
  CHECK(m.first_stamp_utc == k20260105 + 3600);  // met keeps its stamps
  (void)read_met_netcdf(std::string(LIDBOX_SOURCE_DIR) + "/met-demo/cindervale-met-point.nc", {},
                        &info);
  CHECK(info.time_bounds_label == "period_start");  // the demo's hour means, as its CSV
}
