#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <fstream>

#include "lidbox/engine/case_file.hpp"
#include "lidbox/met/netcdf_met.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/report/run_netcdf.hpp"
#include "lidbox/analysis/run_standards.hpp"
#include "netcdf_fixture.hpp"

using namespace lidbox;
using lidbox::test::nc_ok;
using lidbox::test::scratch_dir;

namespace {

const char* kCase =
    "name = \"two-species\"\ntitle = \"invented test\"\ninvented = true\ntime_zone = \"UTC\"\n"
    "[airshed]\nx_side = \"10 km\"\ny_side = \"8 km\"\n[met]\nfile = \"m.csv\"\n"
    "[pollutants.CO]\nunit = \"ppm\"\nmolar_mass = \"28.01 g/mol\"\nreference_conditions = "
    "\"us\"\nbackground = \"0.15 ppm\"\nfree_troposphere = \"0.1 ppm\"\n"
    "[pollutants.PM25]\nunit = \"ug/m3\"\nbackground = \"5 ug/m3\"\nfree_troposphere = \"2 "
    "ug/m3\"\n[sectors.traffic]\nemissions = { CO = \"2 t/h\", PM25 = \"10 kg/h\" }\n";

MetSeries met(std::size_t n) {
  MetSeries m;
  m.source = "m.csv";
  m.first_stamp_utc = 20458LL * 86400;  // 2026-01-05T00:00Z
  for (std::size_t i = 0; i < n; ++i) {
    m.mixing_height_m.push_back(i % 24 < 8 ? 40.0 : 400.0);  // under the 50 m default floor
    m.wind_u_m_s.push_back(1.5);
    m.wind_v_m_s.push_back(-0.5);
  }
  m.filled.assign(n, 0);
  m.filled[5] = 1;
  m.source_line.assign(n, 0);
  return m;
}

double nc_value(const std::string& path, const std::string& var, std::size_t index) {
  int nc = 0, v = 0;
  nc_ok(nc_open(path.c_str(), NC_NOWRITE, &nc));
  nc_ok(nc_inq_varid(nc, var.c_str(), &v));
  double x = 0.0;
  nc_ok(nc_get_var1_double(nc, v, &index, &x));
  nc_close(nc);
  return x;
}

std::string nc_text(const std::string& path, const std::string& var, const std::string& att) {
  int nc = 0, v = NC_GLOBAL;
  nc_ok(nc_open(path.c_str(), NC_NOWRITE, &nc));
  if (!var.empty()) nc_ok(nc_inq_varid(nc, var.c_str(), &v));
  std::size_t len = 0;
  nc_ok(nc_inq_attlen(nc, v, att.c_str(), &len));
  std::string s(len, '\0');
  nc_ok(nc_get_att_text(nc, v, att.c_str(), s.data()));
  nc_close(nc);
  return s;
}

}  // namespace

TEST_CASE("the run's hourly table carries the run's values with CF names and reporting units") {
  const CaseSpec c = parse_case(kCase, "c.toml", ".");
  const RunResult r = run_case(c, met(48));
  const CfTable t = hourly_cf_table(c, r);
  REQUIRE(t.time_utc.size() == r.hours.size());
  CHECK(t.time_utc[0] == r.hours[0].start_utc);
  CHECK(t.period_s == 3600);
  const auto find = [&](const std::string& name) -> const CfVariable& {
    for (const auto& v : t.vars) {
      if (v.name == name) return v;
    }
    FAIL("no variable " << name);
    throw;
  };
  // CF names of the species in their reporting units (CF standard name table; references 7.1).
  CHECK(find("CO").standard_name == "mole_fraction_of_carbon_monoxide_in_air");
  CHECK(find("CO").units == "1e-6");
  CHECK(find("CO").attributes.at("reporting_unit") == "ppm");
  CHECK(find("CO").attributes.at("reference_conditions") == "298.15 K, 101325 Pa (us)");
  CHECK(find("PM25").standard_name ==
        "mass_concentration_of_pm2p5_ambient_aerosol_particles_in_air");
  CHECK(find("PM25").units == "ug m-3");
  CHECK(find("PM25_part_traffic").standard_name.empty());
  // Values are the run's own, divided by the unit's grams per cubic metre.
  const double to_ppm = 1.0 / c.pollutants[0].unit.to_g_m3;
  CHECK(find("CO").values[30] == doctest::Approx(r.total(30, 0) * to_ppm).epsilon(1e-15));
  CHECK(find("PM25_part_background").values[30] ==
        doctest::Approx(r.mean(30, 1, 0) * 1e6).epsilon(1e-15));
  CHECK(find("mixing_height").values[3] == doctest::Approx(50.0));  // the lid floor applied
  CHECK(find("lid_floor_applied").values[3] == 1.0);
  CHECK(find("lid_floor_applied").values[12] == 0.0);
  CHECK(find("met_filled").values[5] == 1.0);
  CHECK(t.global_attributes.at("invented") == "true");
  CHECK(t.station_name == "two-species");
}

TEST_CASE("the budget table closes as the run's budget does and renders to readable files") {
  const CaseSpec c = parse_case(kCase, "c.toml", ".");
  const RunResult r = run_case(c, met(48));
  const auto files = render_run_netcdf_outputs(c, r);
  REQUIRE(files.size() == 2);
  const std::string dir = scratch_dir("run-netcdf");
  for (const auto& f : files) std::ofstream(dir + "/" + f.name, std::ios::binary) << f.content;
  const double A = 10000.0 * 8000.0;  // footprint [m2]
  // Emitted PM2.5 over the footprint: 10 kg/h = 10000 g/h (case file) in every hour.
  CHECK(nc_value(dir + "/budget.nc", "PM25_emitted", 20) ==
        doctest::Approx(r.budget_of(20, 1).emitted * A));
  CHECK(nc_value(dir + "/budget.nc", "PM25_emitted", 20) == doctest::Approx(10000.0).epsilon(1e-9));
  CHECK(nc_value(dir + "/budget.nc", "CO_cumulative_closure", 47) ==
        doctest::Approx(r.closure_g_m2(47, 0, c.engine.residual_layer) * A));
  CHECK(nc_value(dir + "/hourly.nc", "PM25", 10) == doctest::Approx(r.total(10, 1) * 1e6));
  CHECK(nc_text(dir + "/hourly.nc", "PM25", "cell_methods") == "time: mean (interval: 1 hour)");
  CHECK(nc_text(dir + "/hourly.nc", "", "case_name") == "two-species");
  CHECK(nc_text(dir + "/budget.nc", "CO_emitted", "units") == "g h-1");
}

TEST_CASE("pollutant names map to CF standard names loosely and unknown ones to none") {
  CHECK(pollutant_standard_name("PM2.5", false) ==
        "mass_concentration_of_pm2p5_ambient_aerosol_particles_in_air");
  CHECK(pollutant_standard_name("pm10", false) ==
        "mass_concentration_of_pm10_ambient_aerosol_particles_in_air");
  CHECK(pollutant_standard_name("O3", true) == "mole_fraction_of_ozone_in_air");
  CHECK(pollutant_standard_name("NO2", false) == "mass_concentration_of_nitrogen_dioxide_in_air");
  CHECK(pollutant_standard_name("benzene", false).empty());
}

TEST_CASE("the demo run from the NetCDF point file equals the run from the CSV demo") {
  // Issue 4: "a run from the NetCDF demo gives the same hourly results as the same run from the
  // CSV demo". The point file holds the CSV's values as doubles, so equality is exact.
  const std::string demo = std::string(LIDBOX_SOURCE_DIR) + "/met-demo/";
  const CaseSpec c = load_case(demo + "cindervale.toml");
  const MetSeries from_csv = read_case_met(c);
  MetSeries from_nc = read_met_netcdf(demo + "cindervale-met-point.nc", {});
  fill_gaps(from_nc, c.met.max_gap_hours);
  validate_met(from_nc);
  REQUIRE(from_nc.size() == from_csv.size());
  CHECK(from_nc.first_stamp_utc == from_csv.first_stamp_utc);
  CHECK(from_nc.mixing_height_m == from_csv.mixing_height_m);
  CHECK(from_nc.filled == from_csv.filled);
  const RunResult a = run_case(c, from_csv);
  const RunResult b = run_case(c, from_nc);
  REQUIRE(a.hours.size() == b.hours.size());
  std::size_t differing = 0;
  for (std::size_t i = 0; i < a.hours.size(); ++i) {
    for (std::size_t p = 0; p < a.n_pollutants; ++p) {
      if (a.total(i, p) != b.total(i, p)) ++differing;
    }
  }
  CHECK(differing == 0);
  CHECK(a.mean_g_m3 == b.mean_g_m3);
}

TEST_CASE("the demo run's daily statistics land in daily.nc on local-standard-time days") {
  const std::string demo = std::string(LIDBOX_SOURCE_DIR) + "/met-demo/";
  const CaseSpec c = load_case(demo + "cindervale.toml");
  const RunResult r = run_case(c, read_case_met(c));
  const auto report = run_standards(c, r, std::nullopt);
  REQUIRE(report.has_value());
  REQUIRE(!report->daily.empty());
  const CfTable t = daily_statistics_cf_table(c, *report);
  // MST is UTC-7: each LST day starts at 07:00 UTC (closed form).
  CHECK(format_utc(t.time_utc.front()).substr(10) == "T07:00:00Z");
  CHECK(t.period_s == 86400);
  CHECK(t.global_attributes.at("local_standard_time") == "UTC-07:00");
  // Every row of the report is found in its variable at its day.
  std::size_t checked = 0;
  for (const auto& row : report->daily) {
    const std::string name = cf_variable_name(row.pollutant) + "_" + row.statistic;
    const auto v = std::find_if(t.vars.begin(), t.vars.end(),
                                [&](const CfVariable& x) { return x.name == name; });
    REQUIRE(v != t.vars.end());
    const auto k = static_cast<std::size_t>(
        (row.day * 86400 - report->options.lst_offset_s - t.time_utc.front()) / 86400);
    if (std::isnan(row.value)) {
      CHECK(std::isnan(v->values[k]));
    } else {
      CHECK(v->values[k] == row.value);
    }
    ++checked;
  }
  CHECK(checked == report->daily.size());
  const auto files = render_run_netcdf_outputs(c, r, &*report);
  REQUIRE(files.size() == 3);
  CHECK(files[2].name == "daily.nc");
  const std::string path = scratch_dir("run-daily") + "/daily.nc";
  std::ofstream(path, std::ios::binary) << files[2].content;
  CHECK(nc_text(path, "", "case_name") == "cindervale-january");
  CHECK(nc_text(path, "PM2_5_daily_mean", "cell_methods") == "time: mean (interval: 1 hour)");
  CHECK(nc_text(path, "PM2_5_daily_mean_complete", "flag_meanings") == "incomplete complete");
}
