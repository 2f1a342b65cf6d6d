// Applying a rule set's limits to named hourly series: one result per limit and LST calendar
// year, in the limit's own unit (converted under the rule set's reference conditions).
//
// What a result says is arithmetic on the series given, never a compliance determination: the
// words are "within" / "exceeded" / "incomplete", and every report carries kScreeningCaution.
//
// Per statistic (years are LST calendar years; a value belongs to the year of its LST day, a
// running mean to the year of its start hour):
//   hourly_value, running_mean     -> the hours / windows of the year (running means need
//                                     ceil(0.75 k) hours, dividing by the hours present)
//   daily_*                        -> days valid at day_valid_fraction of their hours or
//                                     windows, plus incomplete days above the level when
//                                     incomplete_day_counts_if_above is set
//   annual_mean                    -> the hours of the year
//   annual_mean_of_quarterly_means -> days valid at day_valid_fraction, quarters valid at
//                                     period_valid_fraction of their days, the mean of the
//                                     valid quarters
//   peak_season_mean               -> highest mean of six consecutive monthly means (months
//                                     valid at period_valid_fraction) of the 24-window daily
//                                     8-h maximum, windows starting in the year
// A year is covered (complete) when its counted values reach year_coverage of the values a full
// year has: hours, valid days, or quarters; a peak season when six consecutive valid months
// exist. The day's rule and the year's are separate keys, as in the published rules (e.g. EU:
// 18 of 24 hours for a day, 90 % data capture for the year). Every compared value is first
// rounded as the limit says.
#pragma once

#include <map>
#include <string>
#include <vector>

#include "lidbox/base/hourly_series.hpp"
#include "lidbox/standards/rule_set.hpp"

namespace lidbox {

// Pollutant (canonical name, see pollutant.hpp) -> hourly series in a concentration unit.
using NamedSeries = std::map<std::string, HourlySeries>;

enum class Verdict { within, exceeded, incomplete };
const char* to_string(Verdict v);

struct LimitYearResult {
  std::string rule_set_id;
  std::string limit_id;
  std::string pollutant;
  std::string kind;
  int year = 0;
  std::string statistic;    // e.g. "4th highest daily_max_8h_17_windows"
  double value = kMissing;  // the year's statistic in `unit`, after rounding; NaN for counts
                            // (form exceedances: see `exceedances`)
  std::string unit;
  double level = 0.0;
  int exceedances = 0;  // above the level this year (non-overlapping if asked); -1 if annual
  int allowed_exceedances = -1;  // -1 when the form is not a count
  int valid_count = 0;           // values counted this year
  int possible_count = 0;        // values a full year has
  bool complete = false;
  int years_averaged = 1;
  double multi_year_value = kMissing;  // mean of value (or of the count) over years_averaged
                                       // consecutive complete years
                                       // ending with this one, rounded; NaN if not available
  Verdict verdict = Verdict::incomplete;
  std::string legal_source;
  std::string checked;
};

// Results for every limit of `rules` whose pollutant is in `series` (others are skipped), for
// each LST calendar year with at least one value counted.
// A series unit that cannot be converted to the limit unit is an InputError naming both.
std::vector<LimitYearResult> evaluate_limits(const NamedSeries& series, const RuleSet& rules,
                                             int lst_offset_s);

// One row of the daily-statistics table: everything per LST day, in the series unit.
struct DailyStatisticsRow {
  std::string pollutant;
  std::int64_t day = 0;
  // daily_mean, daily_max_1h, daily_max_8h_17_windows or daily_max_8h_24_windows (static text)
  const char* statistic = "";
  double value = kMissing;
  std::string unit;
  int valid_count = 0;
  int possible_count = 0;
  bool complete = false;
};

// Daily mean (18 of 24 h), daily max 1-h (18 of 24 h), and the two daily 8-h maxima
// (13 of 17 and 18 of 24 windows) for every series.
std::vector<DailyStatisticsRow> daily_statistics(const NamedSeries& series, int lst_offset_s);

}  // namespace lidbox
