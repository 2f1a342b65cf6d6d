// Grid runs on small ERA5-like files written by the tests: a cell's hourly series against a point
// run of the same cell (1e-12 relative), the closed-form steady state, byte-identical files
// whatever the threads and chunks, and the refusals of bad grids.
#include <doctest/doctest.h>

#include <netcdf.h>

#include <cmath>
#include <fstream>
#include <iterator>
#include <sstream>

#include "lidbox/base/error.hpp"
#include "lidbox/base/percentile.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/grid/grid_run.hpp"
#include "netcdf_fixture.hpp"

using namespace lidbox;
using lidbox::test::nc_ok;
using lidbox::test::NcWriter;
using lidbox::test::scratch_dir;

namespace {

struct GridFixture {
  std::size_t hours = 72, nlat = 3, nlon = 4;
  bool valid_time = true;  // "valid_time" in seconds since 1970, else "time" in hours since 1900
  bool lat_coordinate = true;
  bool v_on_other_grid = false;
  bool one_map_chunks = false;
  bool constant = false;  // 500 m and (2, 0) m/s everywhere, all the time
  long bad_hour = -1;     // an hour whose mixing height at cell (1, 2) is the fill value
};

double blh_of(const GridFixture& g, std::size_t t, std::size_t i, std::size_t j) {
  if (g.constant) return 500.0;
  const double diurnal =
      std::sin(2.0 * 3.14159265358979 * (static_cast<double>(t % 24) - 9.0) / 24.0);
  return 300.0 + 150.0 * static_cast<double>(i) + 40.0 * static_cast<double>(j) +
         250.0 * std::max(0.0, diurnal) + 10.0 * static_cast<double>(t % 7);
}
double u_of(const GridFixture& g, std::size_t t, std::size_t i, std::size_t j) {
  if (g.constant) return 2.0;
  return 0.5 + 0.8 * static_cast<double>(j) - 0.3 * static_cast<double>(i) +
         1.5 * std::sin(0.1 * static_cast<double>(t));
}
double v_of(const GridFixture& g, std::size_t t, std::size_t i, std::size_t j) {
  if (g.constant) return 0.0;
  return -1.0 + 0.4 * static_cast<double>(i + j) + std::cos(0.07 * static_cast<double>(t));
}

// Packed shorts with scale_factor and add_offset, as ERA5 downloads have them.
void write_grid(const std::string& path, const GridFixture& g) {
  NcWriter w(path);
  const int td = w.dim(g.valid_time ? "valid_time" : "time", g.hours);
  const int yd = w.dim("latitude", g.nlat);
  const int xd = w.dim("longitude", g.nlon);
  const int x2 = g.v_on_other_grid ? w.dim("longitude2", g.nlon) : xd;
  const int tv = g.valid_time ? w.var("valid_time", NC_INT64, {td}) : w.var("time", NC_INT, {td});
  w.text(tv, "units",
         g.valid_time ? "seconds since 1970-01-01" : "hours since 1900-01-01 00:00:00.0");
  w.text(tv, "calendar", g.valid_time ? "proleptic_gregorian" : "gregorian");
  const int la = g.lat_coordinate ? w.var("latitude", NC_DOUBLE, {yd}, "", "degrees_north") : -1;
  const int lo = w.var("longitude", NC_DOUBLE, {xd}, "", "degrees_east");
  const int lo2 = g.v_on_other_grid ? w.var("longitude2", NC_DOUBLE, {x2}, "", "degrees_east") : -1;
  const int b = w.var("blh", NC_SHORT, {td, yd, xd});
  const int u = w.var("u10", NC_SHORT, {td, yd, xd});
  const int v = w.var("v10", NC_SHORT, {td, yd, x2});
  const double scale[3] = {0.1, 0.001, 0.001}, offset[3] = {1500.0, 0.0, 0.0};
  const int ids[3] = {b, u, v};
  const char* units[3] = {"m", "m s**-1", "m s**-1"};
  for (int k = 0; k < 3; ++k) {
    w.text(ids[k], "units", units[k]);
    w.number(ids[k], "scale_factor", NC_DOUBLE, {scale[k]});
    w.number(ids[k], "add_offset", NC_DOUBLE, {offset[k]});
    w.number(ids[k], "_FillValue", NC_SHORT, {-32767});
    if (g.one_map_chunks) {
      const std::size_t chunks[3] = {1, g.nlat, g.nlon};
      nc_ok(nc_def_var_chunking(w.id(), ids[k], NC_CHUNKED, chunks));
    }
  }
  w.end_define();
  std::vector<double> t(g.hours), lat(g.nlat), lon(g.nlon);
  for (std::size_t h = 0; h < g.hours; ++h) {
    // 2026-01-10T00:00Z: 1768003200 s since 1970, 1104720 h since 1900
    t[h] = g.valid_time ? 1768003200.0 + 3600.0 * static_cast<double>(h)
                        : 1104720.0 + static_cast<double>(h);
  }
  for (std::size_t i = 0; i < g.nlat; ++i) lat[i] = 40.0 + 0.25 * static_cast<double>(i);
  for (std::size_t j = 0; j < g.nlon; ++j) lon[j] = -112.0 + 0.25 * static_cast<double>(j);
  w.put(tv, t);
  if (la >= 0) w.put(la, lat);
  w.put(lo, lon);
  if (lo2 >= 0) w.put(lo2, lon);
  std::vector<double> vals[3];
  for (std::size_t h = 0; h < g.hours; ++h) {
    for (std::size_t i = 0; i < g.nlat; ++i) {
      for (std::size_t j = 0; j < g.nlon; ++j) {
        const double phys[3] = {blh_of(g, h, i, j), u_of(g, h, i, j), v_of(g, h, i, j)};
        for (int k = 0; k < 3; ++k) vals[k].push_back(std::round((phys[k] - offset[k]) / scale[k]));
        if (static_cast<long>(h) == g.bad_hour && i == 1 && j == 2) vals[0].back() = -32767;
      }
    }
  }
  for (int k = 0; k < 3; ++k) w.put(ids[k], vals[k]);
  w.close();
}

std::string grid_case_text(const std::string& grid_extra, const std::string& diagnostics = "") {
  return R"(name = "grid-test"
invented = true
time_zone = "-05:00"
[airshed]
x_side = "10 km"
y_side = "6 km"
x_side_bearing = "90 deg"
[met]
file = "grid.nc"
variables = { mixing_height = "blh", eastward_wind = "u10", northward_wind = "v10" }
[pollutants.PM25]
unit = "ug/m3"
lifetime = "2 day"
deposition_velocity = "0.2 cm/s"
free_troposphere = "2 ug/m3"
background = { by_wind_from = [ { from = "90 deg", to = "270 deg", value = "8 ug/m3" },
                                { from = "270 deg", to = "90 deg", value = "3 ug/m3" } ] }
)" + diagnostics +
         "[grid]\n" + grid_extra;
}

std::string bytes_of(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  return std::string(std::istreambuf_iterator<char>(in), {});
}

std::vector<double> read_var(const std::string& path, const std::string& name) {
  int id = -1, v = -1, nd = 0;
  nc_ok(nc_open(path.c_str(), NC_NOWRITE, &id));
  nc_ok(nc_inq_varid(id, name.c_str(), &v));
  nc_ok(nc_inq_varndims(id, v, &nd));
  std::vector<int> dims(static_cast<std::size_t>(nd));
  nc_ok(nc_inq_vardimid(id, v, dims.data()));
  std::size_t n = 1;
  for (int d : dims) {
    std::size_t len = 0;
    nc_ok(nc_inq_dimlen(id, d, &len));
    n *= len;
  }
  std::vector<double> out(n);
  nc_ok(nc_get_var_double(id, v, out.data()));
  nc_close(id);
  return out;
}

}  // namespace

TEST_CASE("a grid cell's hourly series equals a point run of the same cell to 1e-12") {
  // Reference: run_case on read_met_netcdf of the nearest cell (the point path of the tool), for
  // two cells of the 12 (neither the last, which a forcing left over from another cell would
  // give), with held hour means and with instantaneous values interpolated in time.
  for (bool valid_time : {true, false}) {
    for (bool instantaneous : {false, true}) {
      CAPTURE(valid_time);
      CAPTURE(instantaneous);
      const std::string dir = scratch_dir(valid_time ? "grid-point-vt" : "grid-point-t");
      GridFixture g;
      g.valid_time = valid_time;
      write_grid(dir + "/grid.nc", g);
      std::string text = grid_case_text(
          "series = [ { latitude = \"40.25 deg\", longitude = \"-111.5 deg\" }, "
          "{ latitude = \"40 deg\", longitude = \"-112 deg\" } ]\nthreads = 2\n");
      if (instantaneous)
        text.replace(text.find("[met]\n"), 6, "[met]\nreading = \"instantaneous\"\n");
      const GridCase gc = parse_grid_case(text, dir + "/grid.toml", dir);
      std::filesystem::remove_all(dir + "/out");
      run_grid(gc, dir + "/out", {});
      const auto conc = read_var(dir + "/out/series.nc", "concentration");  // [hour][cell]
      const auto dil = read_var(dir + "/out/series.nc", "concentration_per_unit_flux");
      const LatLon cells[2] = {LatLon{40.0, -112.0}, LatLon{40.25, -111.5}};  // storage order
      for (std::size_t k = 0; k < 2; ++k) {
        CaseSpec point = gc.cell;
        point.met.netcdf.point = cells[k];
        const MetSeries met = read_case_met(point);
        const RunResult r = run_case(point, met);
        REQUIRE(conc.size() == 2 * r.hours.size());
        double worst = 0.0;
        for (std::size_t i = 0; i < r.hours.size(); ++i) {
          const double c = conc[2 * i + k], d = dil[2 * i + k];
          worst = std::max(worst, std::fabs(c - r.total(i, 0)) / std::fabs(r.total(i, 0)));
          worst = std::max(worst, std::fabs(d - r.mean(i, 0, 2)) / std::fabs(r.mean(i, 0, 2)));
        }
        CHECK(worst <= 1e-12);
        CHECK(r.total(40, 0) > 3e-6);  // a real concentration, not zeros on both sides
      }
    }
  }
}

TEST_CASE("threads and chunk lengths give byte-identical files") {
  const std::string dir = scratch_dir("grid-bytes");
  GridFixture g;
  g.hours = 24 * 5 + 7;
  write_grid(dir + "/grid.nc", g);
  const std::string series =
      "series = [ { latitude = \"40 deg\", longitude = \"-112 deg\" }, "
      "{ latitude = \"40.5 deg\", longitude = \"-111.25 deg\" } ]\n"
      "periods = [\"year\", \"month\", \"season\"]\nexceedance_level = \"20 s/m\"\n";
  const std::string diag = "[diagnostics]\nschemes = [\"korshover-angell-1982-10m\"]\n";
  std::string first_maps, first_series;
  for (const auto& extra :
       {std::string("threads = 1\n"), std::string("threads = 3\nchunk_days = 1\n"),
        std::string("threads = 2\nchunk_days = 3\n")}) {
    CAPTURE(extra);
    const GridCase gc =
        parse_grid_case(grid_case_text(series + extra, diag), dir + "/grid.toml", dir);
    const std::string out = dir + "/out";
    std::filesystem::remove_all(out);
    run_grid(gc, out, {});
    const std::string maps = bytes_of(out + "/maps_month.nc") + bytes_of(out + "/maps_year.nc") +
                             bytes_of(out + "/maps_season.nc");
    const std::string s = bytes_of(out + "/series.nc");
    CHECK(maps.size() > 1000);
    if (first_maps.empty()) {
      first_maps = maps;
      first_series = s;
    } else {
      CHECK(maps == first_maps);
      CHECK(s == first_series);
    }
  }
}

TEST_CASE("a cell with a bad hour is dropped from that day on, whatever the chunk length") {
  // Documented in grid_run.hpp: a cell whose met turns bad is dropped from that moment on. The
  // fixture starts 2026-01-10T00Z (19:00 local at -05:00); hour 600 is 2026-02-04T00Z, so
  // January closes with the cell's values and February is a fill value; the series stops there.
  const std::string dir = scratch_dir("grid-drop");
  GridFixture g;
  g.hours = 24 * 27;
  g.bad_hour = 600;
  write_grid(dir + "/grid.nc", g);
  const std::string series =
      "series = [ { latitude = \"40.25 deg\", longitude = \"-111.5 deg\" } ]\n"
      "periods = [\"month\"]\n";
  std::string first;
  for (const auto& extra : {std::string("chunk_days = 1\n"), std::string("chunk_days = 5\n"),
                            std::string("chunk_days = 40\n")}) {
    CAPTURE(extra);
    const GridCase gc = parse_grid_case(grid_case_text(series + extra), dir + "/g.toml", dir);
    const std::string out = dir + "/out";
    std::filesystem::remove_all(out);
    const GridRunSummary S = run_grid(gc, out, {});
    CHECK(S.dropped_cells == 1);
    CHECK(S.first_dropped.find("2026-02-04T00:00:00Z: mixing height missing") != std::string::npos);
    const auto valid = read_var(out + "/maps_month.nc", "valid_days");  // [month][lat][lon]
    REQUIRE(valid.size() == 2 * 12);
    const std::size_t cell = 1 * 4 + 2;
    // Local days (UTC-5) run 05Z to 05Z: January 10..31 are whole inside the series (22 days,
    // the 9th is cut); February 1..4 for the neighbour (the 5th ends after the last hour).
    CHECK(valid[cell] == valid[cell + 1]);
    CHECK(valid[cell] == 22.0);
    CHECK(valid[12 + cell] > 1e30);  // February, which holds the bad hour: the fill value
    CHECK(valid[12 + cell + 1] == 4.0);
    const auto dil = read_var(out + "/series.nc", "concentration_per_unit_flux");
    REQUIRE(dil.size() == g.hours);
    CHECK(std::isfinite(dil[599]));
    CHECK(dil[599] > 0.0);
    CHECK(!(dil[600] < 1e30));  // fill (or NaN) from the bad hour on
    CHECK(!(dil[g.hours - 1] < 1e30));
    const std::string maps = bytes_of(out + "/maps_month.nc") + bytes_of(out + "/series.nc");
    if (first.empty()) first = maps;
    CHECK(maps == first);
  }
}

TEST_CASE("constant met gives the closed-form dilution and every day stagnant") {
  // Closed form (textbook steady state of a box, Seinfeld and Pandis, from memory; physics note
  // eq. 2 with k = vd = 0 and a still lid): C/q = 1/(f H) with f = u/x_side = 2/10000 1/s and
  // H = 500 m: 10 s/m. Ventilation u H = 1000 m2/s every hour. A 2 m/s wind is under the
  // reduced Korshover-Angell 4 m/s.
  const std::string dir = scratch_dir("grid-constant");
  GridFixture g;
  g.constant = true;
  g.hours = 24 * 6;
  write_grid(dir + "/grid.nc", g);
  std::string text = grid_case_text("percentiles = [5, 50]\nexceedance_level = \"9.99 s/m\"\n",
                                    "[diagnostics]\nschemes = [\"korshover-angell-1982-10m\"]\n");
  text.replace(text.find("lifetime = \"2 day\""), 18, "");
  text.replace(text.find("deposition_velocity = \"0.2 cm/s\""), 32, "");
  const GridCase gc = parse_grid_case(text, dir + "/grid.toml", dir);
  run_grid(gc, dir + "/out", {});
  const std::string f = dir + "/out/maps_year.nc";
  // 6 UTC days from 00Z in UTC-5: local days 01-09 (5 h), 01-10 .. 01-14 complete (5), 01-15 (19 h)
  for (double v : read_var(f, "valid_days")) CHECK(v == 5.0);
  for (double v : read_var(f, "stagnation_days_korshover_angell_1982_10m")) CHECK(v == 5.0);
  for (double v : read_var(f, "longest_streak_korshover_angell_1982_10m")) CHECK(v == 5.0);
  // Five stagnant days in a row hold one episode of the scheme's 4 days (Korshover and Angell
  // 1982, as src/data/stagnation/korshover-angell-1982-10m.toml states it).
  for (double v : read_var(f, "stagnation_episodes_korshover_angell_1982_10m")) CHECK(v == 1.0);
  for (double v : read_var(f, "ventilation_mean"))
    CHECK(v == doctest::Approx(1000.0).epsilon(1e-9));
  for (double v : read_var(f, "ventilation_p5")) CHECK(v == doctest::Approx(1000.0).epsilon(1e-9));
  for (double v : read_var(f, "dilution_mean")) CHECK(v == doctest::Approx(10.0).epsilon(1e-6));
  for (double v : read_var(f, "exceedance_days")) CHECK(v == 5.0);
}

TEST_CASE("percentiles interpolate linearly between order statistics as numpy does") {
  // numpy.percentile([1, 2, 3, 4, 10], q) (default "linear"): q=50 -> 3, q=90 -> 7.6, q=10 -> 1.4
  std::vector<double> v = {10, 2, 4, 1, 3};
  CHECK(percentile_linear(v, 50) == 3.0);
  CHECK(percentile_linear(v, 90) == doctest::Approx(7.6).epsilon(1e-15));
  CHECK(percentile_linear(v, 10) == doctest::Approx(1.4).epsilon(1e-15));
  CHECK(percentile_linear(v, 100) == 10.0);
  std::vector<double> none;
  CHECK(std::isnan(percentile_linear(none, 50)));
}

TEST_CASE("a grid without a latitude coordinate is refused naming the variable") {
  const std::string dir = scratch_dir("grid-nolat");
  GridFixture g;
  g.lat_coordinate = false;
  write_grid(dir + "/grid.nc", g);
  const GridCase gc = parse_grid_case(grid_case_text(""), dir + "/grid.toml", dir);
  CHECK_THROWS_WITH_AS(
      run_grid(gc, dir + "/out", {}),
      "grid.nc: variable \"blh\": dimension \"latitude\" (place 2 of (valid_time=72, latitude=3, "
      "longitude=4)) has no latitude coordinate; expected a grid (time, latitude, longitude) whose "
      "latitude and longitude dimensions have 1-D coordinate variables of the same name with units "
      "degrees_north or standard_name latitude",
      InputError);
  CHECK_FALSE(std::filesystem::exists(dir + "/out/maps_year.nc"));
}

TEST_CASE("variables on different grids are refused naming the variable") {
  const std::string dir = scratch_dir("grid-mismatch");
  GridFixture g;
  g.v_on_other_grid = true;
  write_grid(dir + "/grid.nc", g);
  const GridCase gc = parse_grid_case(grid_case_text(""), dir + "/grid.toml", dir);
  CHECK_THROWS_WITH_AS(run_grid(gc, dir + "/out", {}),
                       "grid.nc: variable \"v10\": dimensions (valid_time=72, latitude=3, "
                       "longitude2=4), a grid other "
                       "than \"blh\"'s (valid_time=72, latitude=3, longitude=4); expected every "
                       "variable of a grid run "
                       "on the same (time, latitude, longitude) grid",
                       InputError);
}

TEST_CASE("a scheme whose field the grid case does not map is refused naming the field") {
  const std::string dir = scratch_dir("grid-field");
  write_grid(dir + "/grid.nc", GridFixture{});
  CHECK_THROWS_WITH_AS(
      parse_grid_case(grid_case_text("", "[diagnostics]\nschemes = [\"horton-2014\"]\n"),
                      "grid.toml", dir),
      "grid.toml: [diagnostics] fields: no variable for the field \"wind_500hPa\" a chosen "
      "stagnation scheme needs; "
      "expected fields = { wind_500hPa = \"<variable>\" }, or a scheme that does not need it",
      InputError);
}

TEST_CASE("a file chunked one map per time step runs and the summary says how to rechunk it") {
  const std::string dir = scratch_dir("grid-chunks");
  GridFixture g;
  g.one_map_chunks = true;
  write_grid(dir + "/grid.nc", g);
  const GridCase gc = parse_grid_case(grid_case_text(""), dir + "/grid.toml", dir);
  const GridRunSummary s = run_grid(gc, dir + "/out", {});
  CHECK(s.chunk_note.find("is chunked one map per time step") != std::string::npos);
  CHECK(s.text.find("nccopy -c valid_time/720,latitude/16,longitude/16 in.nc out.nc") !=
        std::string::npos);
  CHECK(std::filesystem::exists(dir + "/out/maps_year.nc"));
}

TEST_CASE("ERA5 short names are found without a mapping") {
  const std::string dir = scratch_dir("grid-era5");
  write_grid(dir + "/grid.nc", GridFixture{});
  std::string text = grid_case_text("");
  text.replace(text.find("variables = {"),
               text.find('\n', text.find("variables = {")) - text.find("variables = {"), "");
  const GridCase gc = parse_grid_case(text, dir + "/grid.toml", dir);
  const GridRunSummary s = run_grid(gc, dir + "/out", {});
  CHECK(s.text.find("(blh, u10, v10)") != std::string::npos);
}
