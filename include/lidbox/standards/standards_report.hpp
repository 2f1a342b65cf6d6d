// Everything the standards code computes for a set of named hourly series - limits per year,
// daily statistics, AQI, AQHI, alert episodes, optional running-mean tables - and its rendering
// as long-format CSV tables, a Markdown report for people and a JSON report for programs.
// Both reports carry kScreeningCaution and the legal source of every rule used; the AQI table
// version is named wherever AQI values appear. The same functions serve modelled series
// (`lidbox run`) and observed ones (`lidbox observe`), so their tables compare line by line.
//
// Files (prefix + name): limits.csv, daily.csv, periods.csv (monthly, quarterly and annual
// means of the hours, complete at 75 %), aqi.csv, aqhi.csv, episodes.csv,
// rolling_<k>h.csv (one per requested window), report.md, report.json. Times in CSV are UTC
// ("2024-07-01T13:00:00Z"); dates of daily values are LST dates, with the offset stated in the
// reports.
#pragma once

#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include "lidbox/standards/aqhi.hpp"
#include "lidbox/base/atomic_file.hpp"
#include "lidbox/standards/aqi.hpp"
#include "lidbox/standards/episodes.hpp"
#include "lidbox/standards/rule_set.hpp"
#include "lidbox/standards/standards_evaluation.hpp"

namespace lidbox {

struct RollingRequest {
  int window_h = 8;
  int min_valid_h = 6;
};

struct ReportOptions {
  std::vector<RuleSet> rule_sets;
  int lst_offset_s = 0;                      // local standard time, seconds east of UTC
  std::optional<UtcSeconds> issue_time_utc;  // forecast issue time, for episode lead times
  AqiTable aqi_table = AqiTable::epa_2024;
  bool with_aqi = true;
  bool with_aqhi = true;
  std::vector<RollingRequest> rolling;  // extra running-mean tables
  std::string input_label;              // e.g. "observations obs.csv", "model run case.toml"
  std::string file_prefix;              // written files are file_prefix + name ("obs_limits.csv")
};

struct SeriesSummary {
  std::string pollutant;
  std::string unit;
  UtcSeconds first_hour_start_utc = 0;
  std::size_t hours = 0;
  std::size_t valid_hours = 0;
};

struct PeriodRow {
  std::string pollutant;
  std::string unit;
  Period period = Period::month;
  PeriodMean mean;
};

struct RollingTable {
  std::string pollutant;
  std::string unit;
  RunningMeans means;
};

struct StandardsReport {
  ReportOptions options;
  std::vector<SeriesSummary> series;
  std::vector<LimitYearResult> limits;
  std::vector<DailyStatisticsRow> daily;
  std::vector<PeriodRow> periods;
  std::vector<DailyAqi> aqi;
  std::vector<AqhiHour> aqhi;
  std::vector<Episode> episodes;
  std::vector<RollingTable> rolling;
};

// Computes every table. InputError for series the rules cannot use (unit conversions).
StandardsReport compute_standards_report(const NamedSeries& series, ReportOptions options);

// Renders every file in memory (no I/O), so nothing is written when rendering fails. File names
// carry options.file_prefix: "obs_limits.csv", "obs_report.md", ...
std::vector<OutputFile> render_standards_report(const StandardsReport& report);
std::string report_markdown(const StandardsReport& report);
std::string report_json(const StandardsReport& report);

// Writes the rendered files into `dir`, atomically (atomic_file.hpp), and returns their paths.
std::vector<std::filesystem::path> write_standards_report(const StandardsReport& report,
                                                          const std::filesystem::path& dir);

// "+01:00" for an offset in seconds (instants: format_utc in time.hpp).
std::string format_offset(int offset_s);

}  // namespace lidbox
