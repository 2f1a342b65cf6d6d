#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "lidbox/base/caution.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/met/netcdf_met.hpp"
#include "lidbox/report/netcdf_writer.hpp"
#include "netcdf_fixture.hpp"

using namespace lidbox;
using lidbox::test::nc_ok;
using lidbox::test::scratch_dir;

namespace {

const UtcSeconds k20260105 = 20458LL * 86400;  // 2026-01-05T00:00Z

// Reads back what the writer wrote, through NetCDF-C directly.
class NcReader {
 public:
  explicit NcReader(const std::string& path) { nc_ok(nc_open(path.c_str(), NC_NOWRITE, &id_)); }
  NcReader(const NcReader&) = delete;
  NcReader& operator=(const NcReader&) = delete;
  ~NcReader() { nc_close(id_); }
  int var(const std::string& name) const {
    int v = -1;
    nc_ok(nc_inq_varid(id_, name.c_str(), &v));
    return v;
  }
  std::string text(const std::string& var_name, const std::string& att) const {
    const int v = var_name.empty() ? NC_GLOBAL : var(var_name);
    std::size_t len = 0;
    nc_ok(nc_inq_attlen(id_, v, att.c_str(), &len));
    std::string s(len, '\0');
    nc_ok(nc_get_att_text(id_, v, att.c_str(), s.data()));
    return s;
  }
  std::vector<double> values(const std::string& name, std::size_t n) const {
    std::vector<double> r(n);
    nc_ok(nc_get_var_double(id_, var(name), r.data()));
    return r;
  }
  int format() const {
    int f = 0;
    nc_ok(nc_inq_format(id_, &f));
    return f;
  }

 private:
  int id_ = -1;
};

CfTable hourly_table() {
  CfTable t;
  for (int i = 0; i < 3; ++i) t.time_utc.push_back(k20260105 + 7 * 3600 + i * 3600);
  t.period_s = 3600;
  t.title = "test table";
  t.history = "lidbox test";
  t.station_name = "basin centre";
  t.lat_deg = 45.5;
  t.lon_deg = -7.25;
  t.global_attributes["case_name"] = "invented test case";
  CfVariable co;
  co.name = "co";
  co.standard_name = "mass_concentration_of_carbon_monoxide_in_air";
  co.long_name = "carbon monoxide, hour mean";
  co.units = "ug m-3";
  co.cell_methods = "time: mean (interval: 1 hour)";
  co.values = {100.0, std::nan(""), 300.5};
  t.vars.push_back(co);
  CfVariable flag;
  flag.name = "wind_floored";
  flag.long_name = "floor wind speed applied";
  flag.flag_values = {0, 1};
  flag.flag_meanings = "no yes";
  flag.values = {0, 1, 0};
  t.vars.push_back(flag);
  return t;
}

std::vector<std::string> dir_entries(const std::string& dir) {
  std::vector<std::string> r;
  for (const auto& e : std::filesystem::directory_iterator(dir)) {
    r.push_back(e.path().filename().string());
  }
  std::sort(r.begin(), r.end());
  return r;
}

}  // namespace

TEST_CASE("the writer lays out a CF timeSeries with bounds, fill values, flags and the caution") {
  const std::string path = scratch_dir("writer") + "/hourly.nc";
  write_cf_timeseries(path, hourly_table());
  NcReader r(path);
  // CF 4.4: time units, calendar and leap-second statement; Appendix H.4 layout.
  CHECK(r.text("time", "units") == "hours since 2026-01-05 07:00:00 +00:00");
  CHECK(r.text("time", "calendar") == "standard");
  CHECK(r.text("time", "units_metadata") == "leap_seconds: none");
  CHECK(r.text("time", "bounds") == "time_bnds");
  CHECK(r.values("time", 3) == std::vector<double>{0.0, 1.0, 2.0});
  // Period start label: hour k covers [k, k+1) hours after 07:00.
  CHECK(r.values("time_bnds", 6) == std::vector<double>{0.0, 1.0, 1.0, 2.0, 2.0, 3.0});
  const auto co = r.values("co", 3);
  CHECK(co[0] == 100.0);
  CHECK(co[1] == NC_FILL_DOUBLE);  // NaN written as the declared _FillValue
  CHECK(co[2] == 300.5);
  CHECK(r.text("co", "units") == "ug m-3");
  CHECK(r.text("co", "cell_methods") == "time: mean (interval: 1 hour)");
  CHECK(r.text("co", "coordinates") == "time lat lon station_name");
  CHECK(r.text("wind_floored", "flag_meanings") == "no yes");
  CHECK(r.values("wind_floored", 3) == std::vector<double>{0.0, 1.0, 0.0});
  CHECK(r.text("station_name", "cf_role") == "timeseries_id");
  CHECK(r.text("", "Conventions") == "CF-1.12");
  CHECK(r.text("", "featureType") == "timeSeries");
  CHECK(r.text("", "source") == std::string("lidbox ") + LIDBOX_VERSION);
  CHECK(r.text("", "caution") == kScreeningCaution);
  CHECK(r.text("", "case_name") == "invented test case");
  CHECK(r.text("", "history").find(" lidbox " LIDBOX_VERSION ": lidbox test") != std::string::npos);
  CHECK(r.values("lat", 1)[0] == 45.5);
  CHECK(r.format() == NC_FORMAT_NETCDF4_CLASSIC);
}

TEST_CASE("the NetCDF-3 format is available for tools that read only NetCDF-3") {
  const std::string path = scratch_dir("writer3") + "/hourly.nc";
  write_cf_timeseries(path, hourly_table(), CfFileFormat::netcdf3_64bit);
  NcReader r(path);
  CHECK(r.format() == NC_FORMAT_64BIT_OFFSET);
  CHECK(r.values("co", 3)[2] == 300.5);
}

TEST_CASE("met written by the writer reads back through the reader unchanged") {
  MetSeries m;
  m.source = "test";
  m.first_stamp_utc = k20260105;
  m.mixing_height_m = {300.0, 450.0, 800.0};
  m.wind_u_m_s = {-1.0, 0.5, 2.0};
  m.wind_v_m_s = {0.0, -2.0, 1.5};
  m.air_temperature_K = {270.0, 271.5, 273.0};
  m.extra.push_back({"background pm2.5", "ug m-3", {8.0, 9.0, 10.0}});
  m.filled = {0, 1, 0};
  const std::string path = scratch_dir("writer-met") + "/met.nc";
  write_cf_timeseries(path, met_cf_table(m));
  NetcdfMetOptions opt;
  opt.extra["bg"] = "background_pm2_5";  // the column name made a CF name
  const MetSeries back = read_met_netcdf(path, opt);
  CHECK(back.first_stamp_utc == m.first_stamp_utc);
  CHECK(back.mixing_height_m == m.mixing_height_m);
  // Components are written as such, so the round trip is exact.
  CHECK(back.wind_u_m_s == m.wind_u_m_s);
  CHECK(back.wind_v_m_s == m.wind_v_m_s);
  CHECK(back.air_temperature_K == m.air_temperature_K);
  REQUIRE(back.find_extra("bg") != nullptr);
  CHECK(back.find_extra("bg")->values == std::vector<double>{8.0, 9.0, 10.0});
  NcReader r(path);
  // Speed and direction are derived: |(0.5, -2)| and from-direction of u = 0.5, v = -2.
  const auto s = r.values("wind_speed", 3);
  CHECK(s[1] == doctest::Approx(std::hypot(0.5, -2.0)));
  const auto d = r.values("wind_from_direction", 3);
  CHECK(d[0] == doctest::Approx(90.0));  // u = -1, v = 0 blows west: from the east
  CHECK(r.values("met_filled", 3) == std::vector<double>{0.0, 1.0, 0.0});
  CHECK(r.text("met_filled", "flag_meanings") == "from_source gap_filled");
}

TEST_CASE("a failed write leaves the previous file and no temporary file") {
  const std::string dir = scratch_dir("writer-atomic");
  const std::string path = dir + "/out.nc";
  std::ofstream(path) << "previous";
  CfTable bad = hourly_table();
  bad.vars[0].values.pop_back();  // a programming error in the caller
  CHECK_THROWS_AS(write_cf_timeseries(path, bad), InternalError);
  CfTable fails_in_netcdf = hourly_table();
  fails_in_netcdf.vars[0].attributes["bad/name"] = "x";  // NetCDF refuses '/' in names
  try {
    write_cf_timeseries(path, fails_in_netcdf);
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()).rfind(path + ": writing failed (attribute bad/name: NetCDF: ", 0) ==
          0);
  }
  CHECK(dir_entries(dir) == std::vector<std::string>{"out.nc"});
  std::ifstream in(path);
  std::stringstream ss;
  ss << in.rdbuf();
  CHECK(ss.str() == "previous");
  write_cf_timeseries(path, hourly_table());  // and a good write replaces it
  CHECK(dir_entries(dir) == std::vector<std::string>{"out.nc"});
  CHECK(NcReader(path).values("co", 3)[0] == 100.0);
}

TEST_CASE("a missing output directory is an input error naming the path") {
  const std::string path = scratch_dir("writer-nodir") + "/absent/out.nc";
  try {
    write_cf_timeseries(path, hourly_table());
    FAIL("no error");
  } catch (const InputError& e) {
    const std::string dir = path.substr(0, path.size() - 7);
    CHECK(std::string(e.what()) == path + ": directory \"" + dir +
                                       "\" does not exist; expected an existing output directory");
  }
}

TEST_CASE("the in-memory rendering is a NetCDF file with the same content") {
  for (const auto format : {CfFileFormat::netcdf4_classic, CfFileFormat::netcdf3_64bit}) {
    const std::string bytes = render_cf_timeseries(hourly_table(), format);
    const std::string path = scratch_dir("writer-memory") + "/from-memory.nc";
    std::ofstream(path, std::ios::binary) << bytes;
    NcReader r(path);
    CHECK(r.format() == (format == CfFileFormat::netcdf4_classic ? NC_FORMAT_NETCDF4_CLASSIC
                                                                 : NC_FORMAT_64BIT_OFFSET));
    CHECK(r.values("co", 3)[2] == 300.5);
    CHECK(r.text("", "caution") == kScreeningCaution);
    CHECK(r.values("time_bnds", 6)[5] == 3.0);
  }
  CfTable bad = hourly_table();
  bad.time_utc[1] = bad.time_utc[0];
  CHECK_THROWS_AS(render_cf_timeseries(bad), InternalError);
}

TEST_CASE("daily values land on local-standard-time days with their valid counts") {
  CfDailySeries mean;
  mean.name = "PM25_daily_mean";
  mean.standard_name = "mass_concentration_of_pm2p5_ambient_aerosol_particles_in_air";
  mean.units = "ug m-3";
  mean.cell_methods = "time: mean (interval: 1 hour)";
  mean.first_day = 20458;  // 2026-01-05
  mean.values = {12.5, std::nan(""), 30.0};
  mean.valid_count = {24, 10, 20};
  mean.possible_count = 24;
  CfDailySeries peak;
  peak.name = "PM25_daily_max_1h";
  peak.units = "ug m-3";
  peak.cell_methods = "time: maximum";
  peak.first_day = 20459;
  peak.values = {55.0, 61.0, 40.0};
  const CfTable t = daily_cf_table({mean, peak}, -7 * 3600);
  REQUIRE(t.time_utc.size() == 4);  // 2026-01-05 .. 2026-01-08
  // LST midnight at UTC-7 is 07:00 UTC (closed form).
  CHECK(format_utc(t.time_utc[0]) == "2026-01-05T07:00:00Z");
  CHECK(t.period_s == 86400);
  CHECK(t.global_attributes.at("local_standard_time") == "UTC-07:00");
  const std::string path = scratch_dir("writer-daily") + "/daily.nc";
  write_cf_timeseries(path, t);
  NcReader r(path);
  CHECK(r.text("time", "units") == "hours since 2026-01-05 07:00:00 +00:00");
  CHECK(r.values("time_bnds", 8) ==
        std::vector<double>{0.0, 24.0, 24.0, 48.0, 48.0, 72.0, 72.0, 96.0});
  const auto m = r.values("PM25_daily_mean", 4);
  CHECK(m[0] == 12.5);
  CHECK(m[1] == NC_FILL_DOUBLE);
  CHECK(m[3] == NC_FILL_DOUBLE);  // the mean series ends a day before the maximum
  CHECK(r.values("PM25_daily_mean_valid_count", 4) == std::vector<double>{24.0, 10.0, 20.0, 0.0});
  CHECK(r.text("PM25_daily_mean", "ancillary_variables") == "PM25_daily_mean_valid_count");
  const auto p = r.values("PM25_daily_max_1h", 4);
  CHECK(p[0] == NC_FILL_DOUBLE);
  CHECK(p[1] == 55.0);
}
