#include <doctest/doctest.h>

#include <fstream>
#include <sstream>

#include "base/civil_calendar.hpp"
#include "lidbox/base/atomic_file.hpp"
#include "lidbox/base/caution.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/report/standards_tables.hpp"

using namespace lidbox;

namespace {

const std::filesystem::path kRulesDir = std::filesystem::path(LIDBOX_SOURCE_DIR) / "src" / "data" / "rules";

StandardsReport invented_report() {
  // Invented: two days of SO2 with a three-hour run above 500 ug/m3 and NO2/O3/PM2.5 at
  // constant levels, CET standard time.
  const UtcSeconds t0 = civil_calendar::days_from_ymd(2025, 2, 3) * kSecondsPerDay;
  NamedSeries s;
  std::vector<double> so2(48, 100.0);
  so2[10] = so2[11] = so2[12] = 600.0;
  s["SO2"] = HourlySeries{t0, so2, "ug m-3"};
  s["NO2"] = HourlySeries{t0, std::vector<double>(48, 20.0), "ppb"};
  s["O3"] = HourlySeries{t0, std::vector<double>(48, 30.0), "ppb"};
  s["PM2.5"] = HourlySeries{t0, std::vector<double>(48, 10.0), "ug m-3"};
  ReportOptions opt;
  opt.rule_sets.push_back(load_rule_set("eu-2008-50", kRulesDir));
  opt.rule_sets.push_back(load_rule_set("us-naaqs", kRulesDir));
  opt.lst_offset_s = 3600;
  opt.issue_time_utc = t0;
  opt.rolling.push_back({8, 6});
  opt.input_label = "invented test series";
  return compute_standards_report(s, opt);
}

}  // namespace

TEST_CASE("both reports carry the caution, the rule sources and the AQI table version") {
  const StandardsReport r = invented_report();
  const std::string md = report_markdown(r);
  const std::string json = report_json(r);
  CHECK(md.find(kScreeningCaution) != std::string::npos);
  CHECK(json.find(kScreeningCaution) != std::string::npos);
  CHECK(json.find("\"official\": false") != std::string::npos);
  for (const std::string& s : {md, json}) {
    CHECK(s.find("Directive 2008/50/EC of 21 May 2008") != std::string::npos);
    CHECK(s.find("40 CFR Part 50") != std::string::npos);
    CHECK(s.find("EPA-454/B-24-002 (May 2024)") != std::string::npos);
  }
  CHECK(md.find("UTC+01:00 (no daylight saving)") != std::string::npos);
}

TEST_CASE("the SO2 alert episode appears with its lead time in every output") {
  const StandardsReport r = invented_report();
  REQUIRE(r.episodes.size() == 1);
  CHECK(r.episodes[0].rule_id == "SO2-alert");
  CHECK(*r.episodes[0].lead_time_h == 10.0);  // issued at the first hour, run starts at hour 10
  const auto files = render_standards_report(r);
  const auto find = [&](const std::string& name) {
    for (const auto& f : files) {
      if (f.name == name) return f.content;
    }
    FAIL("missing file " << name);
    return std::string();
  };
  CHECK(find("episodes.csv") ==
        "rule_set,rule_id,level_name,pollutant,start_utc,end_utc,duration [h],values_above,peak,"
        "unit,peak_start_utc,threshold,lead_time [h],legal_source,checked\n"
        "eu-2008-50,SO2-alert,alert threshold,SO2,2025-02-03T10:00:00Z,2025-02-03T13:00:00Z,3,3,"
        "600,ug/m3,2025-02-03T10:00:00Z,500,10,Directive 2008/50/EC Annex XII A,\"SRC: 500 "
        "ug/m3 measured over three consecutive hours, SSI 2003/428 Sch. 1 Pt I 1.2; ERA module "
        "on Art. 13/Annex XII. The representativeness condition (100 km2 or a zone) is not "
        "modelled\"\n");
  CHECK(find("report.json").find("\"lead_time_h\": 10") != std::string::npos);
  // Long-format tables name their units.
  CHECK(find("daily.csv").rfind("pollutant,date_lst,statistic,value,unit,", 0) == 0);
  CHECK(find("aqhi.csv").find("NO2 3-h mean [ppb]") != std::string::npos);
  // February 2025 in CET: the series covers 3 Feb 01:00 .. 5 Feb 01:00 LST, 48 of 672 hours.
  CHECK(find("periods.csv").find("NO2,month,2025,2,2025-02-01,2025-02-28,20,ppb,48,672,false") !=
        std::string::npos);
  CHECK(find("rolling_8h_min6.csv")
            .find("SO2,2025-02-03T03:00:00Z,2025-02-03T11:00:00Z,162.5,ug m-3,8,8,6") !=
        std::string::npos);  // (7 * 100 + 600) / 8 = 162.5, closed form
}

TEST_CASE("report files are written atomically with the prefix") {
  const auto dir = std::filesystem::path(LIDBOX_BINARY_DIR) / "test_standards_report_out";
  std::filesystem::remove_all(dir);
  StandardsReport r = invented_report();
  r.options.file_prefix = "run_";
  const auto paths = write_standards_report(r, dir);
  CHECK(paths.size() == 9);
  for (const auto& p : paths) CHECK(std::filesystem::exists(p));
  CHECK(std::filesystem::exists(dir / "run_report.md"));
  // The reports name the tables as written.
  std::ifstream md(dir / "run_report.md");
  std::stringstream text;
  text << md.rdbuf();
  CHECK(text.str().find("`run_limits.csv`") != std::string::npos);
  // No temporary left behind.
  for (const auto& e : std::filesystem::directory_iterator(dir)) {
    CHECK(e.path().filename().string().rfind(".", 0) != 0);
  }
}

TEST_CASE("an unwritable output place is an input error and leaves no temporary") {
  const auto base = std::filesystem::path(LIDBOX_BINARY_DIR) / "test_atomic_blocker";
  std::filesystem::remove_all(base);
  { std::ofstream(base) << "a file, not a folder"; }
  CHECK_THROWS_AS(write_file_atomically(base / "x.csv", "data"), InputError);
  std::filesystem::remove(base);
  const auto ok = std::filesystem::path(LIDBOX_BINARY_DIR) / "test_atomic_ok.txt";
  write_file_atomically(ok, "first");
  write_file_atomically(ok, "second");
  std::ifstream in(ok);
  std::stringstream text;
  text << in.rdbuf();
  CHECK(text.str() == "second");
}
