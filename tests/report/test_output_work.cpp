#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <filesystem>

#include "lidbox/analysis/run_standards.hpp"
#include "lidbox/base/work_meter.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/report/run_netcdf.hpp"
#include "lidbox/report/run_report.hpp"
#include "netcdf_fixture.hpp"

using namespace lidbox;

namespace {

// An invented case with two pollutants, two sectors and three rule sets, like the demo.
const char* kCase =
    "name = \"work\"\ntitle = \"invented test\"\ninvented = true\n"
    "time_zone = \"MST7MDT,M3.2.0,M11.1.0\"\n"
    "[airshed]\nx_side = \"14 km\"\ny_side = \"8 km\"\n[met]\nfile = \"m.csv\"\n"
    "[pollutants.CO]\nunit = \"ppm\"\nmolar_mass = \"28.01 g/mol\"\nreference_conditions = "
    "\"us\"\nlifetime = \"60 day\"\nbackground = \"0.15 ppm\"\nfree_troposphere = \"0.1 ppm\"\n"
    "[pollutants.PM25]\nunit = \"ug/m3\"\nlifetime = \"5 day\"\nbackground = \"5 ug/m3\"\n"
    "free_troposphere = \"2 ug/m3\"\n"
    "[sectors.traffic]\nemissions = { CO = \"2.4 t/h\", PM25 = \"12 kg/h\" }\n"
    "[sectors.heating]\nemissions = { CO = \"0.9 t/h\", PM25 = \"70 kg/h\" }\n"
    "[standards]\nrule_sets = [\"us-naaqs\", \"eu-2008-50\", \"who-2021\"]\n";

// Invented met: a daily lid cycle and a wind that wanders over a 9-day period.
MetSeries invented_met(std::size_t n) {
  MetSeries m;
  m.source = "m.csv";
  m.first_stamp_utc = 20454LL * 86400;  // 2026-01-01T00:00Z
  for (std::size_t i = 0; i < n; ++i) {
    const double day = static_cast<double>(i % 24) / 24.0;
    const double slow = static_cast<double>(i) / (9.0 * 24.0);
    m.mixing_height_m.push_back(120.0 + 500.0 * std::pow(std::sin(M_PI * day), 2));
    m.wind_u_m_s.push_back(1.0 + 0.8 * std::sin(2.0 * M_PI * slow));
    m.wind_v_m_s.push_back(0.6 * std::cos(2.0 * M_PI * slow));
  }
  m.filled.assign(n, 0);
  m.source_line.assign(n, 0);
  return m;
}

// The work of writing every output of a run of `hours` hours (tables, summary, chart, standards
// tables and reports, NetCDF; the budget is written while the box steps), as counted by the work
// meter: the whole run as the command line makes it.
std::uint64_t output_work(std::size_t hours) {
  const CaseSpec c = parse_case(kCase, "work.toml", ".");
  const MetSeries met = invented_met(hours);
  const auto dir = lidbox::test::scratch_dir("output_work_" + std::to_string(hours));
  RunWriteOptions o;
  o.netcdf = true;
  std::uint64_t stepping = 0;
  o.after_run = [&stepping] { stepping = work_meter::total(); };
  work_meter::reset();
  {
    OutputFolder folder(std::filesystem::path(dir) / "out");
    const RunWritten w = run_and_write(folder, c, met, o);
    REQUIRE(w.standards);
    folder.write_whole("summary.txt", w.summary);
    (void)folder.publish();
  }
  const std::uint64_t w = work_meter::total();
  std::filesystem::remove_all(dir);
  return w;
}

}  // namespace

TEST_CASE("doubling a run's length at most doubles the work of writing its outputs") {
  // Closed form: work a + b n (a fixed part, b per hour) gives work(2n) / work(n) < 2 for any
  // a >= 0; a sum started again from the first hour for every row gives nearly 4.
  const std::uint64_t w1 = output_work(60 * 24);
  const std::uint64_t w2 = output_work(120 * 24);
  MESSAGE("work for 1440 h: " << w1 << ", for 2880 h: " << w2);
  CHECK(w2 <= 2 * w1);
  // The meter counts something that grows with the run: more than 1.5 times the work.
  CHECK(2 * w2 > 3 * w1);
}
