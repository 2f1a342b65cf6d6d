// Averages that air-quality standards are judged on, computed from an hourly series.
//
// Every function here is O(n) in the number of hours (running sums and single passes; ranking
// uses nth_element on one year's daily values at a time). None prints, none exits; inputs that
// break a precondition (window of 0 hours, a fraction outside (0, 1]) raise InputError naming the
// parameter.
//
// Conventions
// * An hour's value is the mean over [start, start + 1 h); NaN marks a missing hour.
// * A k-hour running mean is computed for every hour i as the mean of hours i .. i+k-1 that are
//   present (the "divide by the hours present" rule of 40 CFR 50.8 for CO and Appendix U for
//   ozone), provided at least `min_valid_h` of them are present; otherwise it is missing. Hours
//   before the first and after the last value of the series count as missing, at both ends
//   alike: daily 8-h maxima also take the k-1 windows that start before the first hour and end
//   inside the series (WindowSpan::reaching_into_series), as they take the windows that run
//   past its end.
// * A running mean has two labels: the start of its first hour (US ozone, Appendix U) and the
//   end of its last hour (EU, Directive 2008/50/EC Annex VII/XI: "assigned to the day on which it
//   ends"). pandas' trailing rolling(k) labels the start of the last hour, i.e. end - 1 h.
// * Days, months, quarters and years are calendar periods in local standard time (LST), given
//   as a fixed offset east of UTC in seconds; daylight saving time is never applied
//   (40 CFR 50 Appendix N section 1(c), Appendix T section 1(c): "midnight to midnight (local
//   standard time)"). Days are numbered as days since 1970-01-01 of the LST calendar.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "lidbox/base/hourly_series.hpp"

namespace lidbox {

// ---------------------------------------------------------------- completeness and rounding

// Smallest whole number of hours (or days, or windows) that is at least `fraction` of `total`:
// ceil(fraction * total). 0.75 of 8 h gives 6, of 24 h gives 18, of 17 windows gives 13.
// `fraction` must be in (0, 1].
int min_valid_count(int total, double fraction = 0.75);

enum class RoundingMode {
  none,           // compare the value as computed
  round_half_up,  // 9.5 -> 10, 9.4 -> 9 (40 CFR 50.8(d) for CO)
  truncate,       // 0.0719 -> 0.071 (ozone, AQI inputs)
};

struct Rounding {
  RoundingMode mode = RoundingMode::none;
  int decimals = 0;  // digits after the point; negative rounds to tens (-1), hundreds (-2)
};

// Rounds or truncates toward the decimal digit the standard names. Values such as 0.071 are
// stored slightly below their decimal value, so a relative nudge of 1e-9 is added before the
// floor; it is far below any reported digit. NaN stays NaN.
double apply_rounding(double value, Rounding rounding);

// "round_half_up:1", "truncate:3", "none"
std::string to_string(Rounding rounding);

// ---------------------------------------------------------------- running means

enum class WindowLabel { start, end };

// Which windows running_means() computes.
enum class WindowSpan {
  from_each_hour,        // one window starting at each hour of the series
  reaching_into_series,  // also the k-1 windows starting before the first hour
};

struct RunningMeans {
  int window_h = 1;
  int min_valid_h = 1;
  std::size_t leading_windows = 0;        // windows starting before the series' first hour
  UtcSeconds first_window_start_utc = 0;  // window i covers [start + i h, start + (i + k) h)
  std::vector<double> mean;               // NaN where fewer than min_valid_h hours are present
  std::vector<int> valid_h;               // hours present in window i

  [[nodiscard]] std::size_t size() const { return mean.size(); }
  [[nodiscard]] UtcSeconds window_start_utc(std::size_t i) const {
    return first_window_start_utc + static_cast<UtcSeconds>(i) * kSecondsPerHour;
  }
  [[nodiscard]] UtcSeconds window_end_utc(std::size_t i) const {
    return window_start_utc(i) + static_cast<UtcSeconds>(window_h) * kSecondsPerHour;
  }
  [[nodiscard]] UtcSeconds label_utc(std::size_t i, WindowLabel label) const {
    return label == WindowLabel::start ? window_start_utc(i) : window_end_utc(i);
  }
};

// One window per hour of the series, starting at each hour (so the last k-1 windows run past
// the end and are usually incomplete); with WindowSpan::reaching_into_series also the k-1
// windows before them that end inside the series. window_h >= 1, 1 <= min_valid_h <= window_h.
RunningMeans running_means(const HourlySeries& series, int window_h, int min_valid_h,
                           WindowSpan span = WindowSpan::from_each_hour);

// ---------------------------------------------------------------- daily values (LST)

struct DailyValues {
  std::int64_t first_day = 0;    // LST days since 1970-01-01 of value[0]
  std::vector<double> value;     // NaN when nothing was present that day
  std::vector<int> valid_count;  // hours (or windows) present that day
  int possible_count = 24;       // hours (or windows) a full day has
  int required_count = 18;       // present count that makes a day complete

  [[nodiscard]] std::size_t size() const { return value.size(); }
  [[nodiscard]] std::int64_t day(std::size_t i) const {
    return first_day + static_cast<std::int64_t>(i);
  }
  [[nodiscard]] bool complete(std::size_t i) const { return valid_count[i] >= required_count; }
};

// The LST day that holds an instant, and that day's start as a UTC instant.
std::int64_t lst_day_of(UtcSeconds t, int lst_offset_s);
UtcSeconds lst_day_start_utc(std::int64_t day, int lst_offset_s);
// "2024-07-01"
std::string format_day(std::int64_t day);
// Calendar fields of an LST day number.
int year_of_day(std::int64_t day);
int month_of_day(std::int64_t day);

// Mean of the hours present in each LST day; complete with >= min_valid_h of 24 hours.
DailyValues daily_means(const HourlySeries& series, int lst_offset_s, int min_valid_h = 18);
// Highest hour of each LST day; complete with >= min_valid_h of 24 hours.
DailyValues daily_max_1h(const HourlySeries& series, int lst_offset_s, int min_valid_h = 18);

// Which running means make up a day's maximum: `window_count` consecutive windows, the first
// starting at LST hour `first_start_hour` of the day (negative: on the previous day).
struct DailyWindowRule {
  int first_start_hour = 0;
  int window_count = 24;
  int min_valid_windows = 18;

  // The same windows with another completeness requirement (a rule file's own fraction).
  [[nodiscard]] constexpr DailyWindowRule requiring(int min_valid) const {
    return {first_start_hour, window_count, min_valid};
  }
};

// US ozone, 40 CFR 50 Appendix U (2015): 17 windows starting 07:00 .. 23:00, the last ending at
// 07:00 the next day; day complete with 13 valid windows (75 %).
inline constexpr DailyWindowRule kUsOzoneDayWindows{7, 17, 13};
// EU, Directive 2008/50/EC Annex VII note and Annex XI note (same text in 2024/2881): 24 windows
// assigned to the day they end in, the first 17:00 (previous day) to 01:00, the last 16:00 to
// 24:00; day complete with 18 valid windows (75 %, Annex VII A.2).
inline constexpr DailyWindowRule kEuDayWindows{-7, 24, 18};

// Highest valid running mean among a day's windows. valid_count counts valid windows. The days
// are those holding a window that starts inside the series; windows starting before it (see
// WindowSpan) count toward those days, so a series starting at 00:00 gives the EU day one its
// windows from 22:00 and 23:00 the previous day (6 and 7 hours present).
DailyValues daily_max_of_windows(const RunningMeans& means, int lst_offset_s, DailyWindowRule rule);

// ---------------------------------------------------------------- months, quarters, years (LST)

enum class Period { month, quarter, year };

struct PeriodMean {
  int year = 0;
  int index = 0;               // month 1..12, quarter 1..4, 0 for a year
  std::int64_t first_day = 0;  // LST day numbers, inclusive
  std::int64_t last_day = 0;
  double mean = kMissing;  // mean of the values counted
  int valid_count = 0;     // hours (or complete days) counted
  int possible_count = 0;  // hours (or days) the whole calendar period has
  bool complete = false;   // valid_count >= ceil(min_fraction * possible_count)
};

// Mean of the hours present in each calendar period the series touches.
std::vector<PeriodMean> period_means_of_hours(const HourlySeries& series, int lst_offset_s,
                                              Period period, double min_fraction);
// Mean of the complete days in each calendar period (incomplete days are not counted).
std::vector<PeriodMean> period_means_of_days(const DailyValues& days, Period period,
                                             double min_fraction);

struct AnnualOfQuarters {
  int year = 0;
  double mean = kMissing;  // mean of the four quarterly means
  int complete_quarters = 0;
  bool complete = false;  // all four quarters complete
};
// 40 CFR 50 Appendix N section 4.4: the annual mean is the mean of the four quarterly means.
std::vector<AnnualOfQuarters> annual_means_of_quarters(const std::vector<PeriodMean>& quarters);

// ---------------------------------------------------------------- ranks and percentiles

enum class RankingTable {
  us_98th,  // 40 CFR 50 Appendix N Table 1 (also Appendix S): rank 1 for n 1-50 ... 8 for 351-366
  us_99th,  // 40 CFR 50 Appendix T: rank 1 for n 1-100 ... 4 for 301-366
  nearest_rank,  // rank = n - ceil(p/100 * n) + 1 (common practice, no source)
};

// Rank from the top (1 = highest) of the percentile value among n values (n >= 1).
int percentile_rank(RankingTable table, int n, double percentile = 0.0);
// The n-th highest of the non-NaN values (n >= 1); NaN when there are fewer.
double nth_highest(std::vector<double> values, int n);

// ---------------------------------------------------------------- exceedances

// Running means above `level`, counted so that no two counted windows overlap: scanning in time
// order, each counted window blocks the next k-1 windows. For windows of equal length this
// earliest-first choice gives the largest possible number of non-overlapping exceedances.
// Values are compared after `rounding`. Only windows with index in [begin, end) are considered.
int count_non_overlapping_exceedances(const RunningMeans& means, std::size_t begin, std::size_t end,
                                      double level, Rounding rounding);

// The n-th highest running mean when windows overlapping a higher chosen one are excluded
// (greedy: take the highest, drop the windows overlapping it, repeat). NaN when fewer remain.
double nth_highest_non_overlapping(const RunningMeans& means, std::size_t begin, std::size_t end,
                                   int n);

}  // namespace lidbox
