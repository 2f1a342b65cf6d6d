// Everything the standards code computes for a set of named hourly series: limits per year,
// daily statistics, monthly, quarterly and annual means of the hours (complete at 75 %), AQI,
// AQHI, alert episodes and optional running-mean tables. The same computation serves modelled
// series (`lidbox run`) and observed ones (`lidbox observe`), so their tables compare line by
// line; report/standards_tables.hpp renders it.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lidbox/standards/aqhi.hpp"
#include "lidbox/standards/aqi.hpp"
#include "lidbox/standards/episodes.hpp"
#include "lidbox/standards/rule_set.hpp"
#include "lidbox/standards/standards_evaluation.hpp"

namespace lidbox {

struct RollingRequest {
  int window_h = 8;
  int min_valid_h = 6;

  // Tables and variables are named by window and minimum, so "8" and "8:8" never clash:
  // "8h_min6", as in rolling_8h_min6.csv and CO_mean_8h_min6.
  [[nodiscard]] std::string name() const {
    return std::to_string(window_h) + "h_min" + std::to_string(min_valid_h);
  }
  [[nodiscard]] bool operator==(const RollingRequest& o) const {
    return window_h == o.window_h && min_valid_h == o.min_valid_h;
  }
};

struct ReportOptions {
  std::vector<RuleSet> rule_sets;
  int lst_offset_s = 0;                      // local standard time, seconds east of UTC
  // Local civil time for what people read (episodes, peaks, alerts in report.md and summaries);
  // the tables keep UTC. A run passes its case's zone; observations their fixed LST offset.
  TimeZone zone;
  std::optional<UtcSeconds> issue_time_utc;  // forecast issue time, for episode lead times
  AqiTable aqi_table = AqiTable::epa_2024;
  bool with_aqi = true;
  bool with_aqhi = true;
  // The index the case chose (air_index.hpp): a breakpoints index replaces the US AQI table, a
  // formula index the shipped AQHI, and a bands index adds an hourly table of its own.
  std::optional<AirIndex> index;
  std::vector<RollingRequest> rolling;  // extra running-mean tables (a request given twice: once)
  // Names of the input's pollutants that match no pollutant identity (pollutant.hpp), e.g. a
  // case's "fine_dust": no rule can judge them, and the report says so.
  std::vector<std::string> unknown_pollutants;
  // The series are measurements (observe), not the box model's estimate: the reports carry
  // kMeasuredDataCaution instead of kScreeningCaution (caution.hpp).
  bool measured_data = false;
  std::string input_label;  // e.g. "observations obs.csv", "model run case.toml"
  std::string file_prefix;  // written files are file_prefix + name ("obs_limits.csv")
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

// Which pollutants the selected rule sets judge: nothing passes silently.
struct RuleCoverage {
  std::vector<std::string> idle_rule_sets;  // selected rule sets that judge none of the pollutants
  // Pollutants no selected rule set judges (limits or alerts): the known ones by canonical name,
  // then the unknown names as given, each with a hint where one is close ("PM 10" -> "PM10").
  std::vector<std::string> unjudged_pollutants;
};

struct StandardsReport {
  ReportOptions options;
  std::vector<SeriesSummary> series;
  std::vector<LimitYearResult> limits;
  std::vector<DailyStatisticsRow> daily;
  std::vector<PeriodRow> periods;
  std::vector<DailyAqi> aqi;
  std::vector<AqhiHour> aqhi;
  std::vector<BandedHour> banded;  // the chosen bands index, hour by hour
  std::vector<Episode> episodes;
  std::vector<RollingTable> rolling;
  RuleCoverage coverage;
};

// The breakpoints index used for the daily AQI: the chosen one, else the US AQI of aqi_table.
const AirIndex& aqi_index_of(const ReportOptions& options);
// The index people read: the chosen one, else the US AQI of aqi_table.
const AirIndex& headline_index_of(const ReportOptions& options);

// Computes every table. InputError for series the rules cannot use (unit conversions).
StandardsReport compute_standards_report(const NamedSeries& series, ReportOptions options);

}  // namespace lidbox
