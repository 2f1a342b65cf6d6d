#include "lidbox/standards/averaging.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <functional>

#include "base/civil_calendar.hpp"
#include "lidbox/base/error.hpp"

namespace lidbox {

namespace cc = civil_calendar;

int min_valid_count(int total, double fraction) {
  if (!(fraction > 0.0 && fraction <= 1.0)) {
    throw InputError("completeness fraction", std::to_string(fraction), "a value in (0, 1]");
  }
  if (total < 0) throw InputError("completeness total", std::to_string(total), "a count >= 0");
  // The small tolerance keeps 0.75 * 8 = 6 at 6 despite binary rounding of the product.
  return static_cast<int>(std::ceil(fraction * static_cast<double>(total) - 1e-9));
}

double apply_rounding(double value, Rounding rounding) {
  if (std::isnan(value) || rounding.mode == RoundingMode::none) return value;
  // A table instead of std::pow: this runs once per compared value.
  static constexpr double kPow10[] = {1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 1e-1, 1e0, 1e1,
                                      1e2,  1e3,  1e4,  1e5,  1e6,  1e7,  1e8, 1e9};
  const double scale = rounding.decimals >= -6 && rounding.decimals <= 9
                           ? kPow10[rounding.decimals + 6]
                           : std::pow(10.0, rounding.decimals);
  const double x = value * scale;
  const double nudge = 1e-9 * std::max(1.0, std::fabs(x));
  double r = 0.0;
  if (rounding.mode == RoundingMode::truncate) {
    r = x >= 0.0 ? std::floor(x + nudge) : std::ceil(x - nudge);
  } else {
    r = x >= 0.0 ? std::floor(x + 0.5 + nudge) : -std::floor(-x + 0.5 + nudge);
  }
  return r / scale;
}

std::string to_string(Rounding rounding) {
  switch (rounding.mode) {
    case RoundingMode::none:
      return "none";
    case RoundingMode::round_half_up:
      return "round_half_up:" + std::to_string(rounding.decimals);
    case RoundingMode::truncate:
      return "truncate:" + std::to_string(rounding.decimals);
  }
  return "none";
}

RunningMeans running_means(const HourlySeries& series, int window_h, int min_valid_h,
                           WindowSpan span) {
  if (window_h < 1) throw InputError("window_h", std::to_string(window_h), "at least 1 hour");
  if (min_valid_h < 1 || min_valid_h > window_h) {
    throw InputError("min_valid_h", std::to_string(min_valid_h),
                     "1 .. " + std::to_string(window_h) + " hours");
  }
  const auto n = static_cast<std::int64_t>(series.size());
  const std::int64_t k = window_h;
  const std::int64_t lead = span == WindowSpan::reaching_into_series && n > 0 ? k - 1 : 0;
  RunningMeans out;
  out.window_h = window_h;
  out.min_valid_h = min_valid_h;
  out.leading_windows = static_cast<std::size_t>(lead);
  out.first_window_start_utc = series.first_hour_start_utc - lead * kSecondsPerHour;
  out.mean.assign(static_cast<std::size_t>(n + lead), kMissing);
  out.valid_h.assign(static_cast<std::size_t>(n + lead), 0);
  // Running sum over the window [s, s + k) of series hours, moved one hour at a time from the
  // end of the series backwards so each hour enters once and leaves once; s < 0 are the windows
  // starting before the first hour.
  double sum = 0.0;
  int count = 0;
  for (std::int64_t s = n - 1; s >= -lead; --s) {
    if (s >= 0) {
      const double in = series.values[static_cast<std::size_t>(s)];
      if (!std::isnan(in)) {
        sum += in;
        ++count;
      }
    }
    if (s + k < n) {
      const double leaving = series.values[static_cast<std::size_t>(s + k)];
      if (!std::isnan(leaving)) {
        sum -= leaving;
        --count;
      }
    }
    const auto w = static_cast<std::size_t>(s + lead);
    out.valid_h[w] = count;
    if (count >= min_valid_h) out.mean[w] = sum / count;
  }
  return out;
}

std::int64_t lst_day_of(UtcSeconds t, int lst_offset_s) {
  return cc::floor_div(t + lst_offset_s, kSecondsPerDay);
}

UtcSeconds lst_day_start_utc(std::int64_t day, int lst_offset_s) {
  return day * kSecondsPerDay - lst_offset_s;
}

std::string format_day(std::int64_t day) {
  const cc::Ymd d = cc::ymd_from_days(day);
  if (d.year < 0 || d.year > 9999) {
    char buf[24];
    std::snprintf(buf, sizeof buf, "%d-%02d-%02d", d.year, d.month, d.day);
    return buf;
  }
  // Digit by digit: this runs for every row of the daily tables.
  char buf[10] = {static_cast<char>('0' + d.year / 1000),
                  static_cast<char>('0' + d.year / 100 % 10),
                  static_cast<char>('0' + d.year / 10 % 10),
                  static_cast<char>('0' + d.year % 10),
                  '-',
                  static_cast<char>('0' + d.month / 10),
                  static_cast<char>('0' + d.month % 10),
                  '-',
                  static_cast<char>('0' + d.day / 10),
                  static_cast<char>('0' + d.day % 10)};
  return std::string(buf, 10);
}

int year_of_day(std::int64_t day) {
  return cc::ymd_from_days(day).year;
}
int month_of_day(std::int64_t day) {
  return cc::ymd_from_days(day).month;
}

namespace {

// Day span of a series in LST: first and one-past-last day touched.
std::pair<std::int64_t, std::int64_t> day_span(const HourlySeries& s, int lst_offset_s) {
  if (s.size() == 0) return {0, 0};
  const std::int64_t first = lst_day_of(s.first_hour_start_utc, lst_offset_s);
  const std::int64_t last = lst_day_of(s.hour_start(s.size() - 1), lst_offset_s);
  return {first, last + 1};
}

template <class Combine>
DailyValues daily_fold(const HourlySeries& s, int lst_offset_s, int min_valid_h, Combine combine,
                       bool mean) {
  if (min_valid_h < 1 || min_valid_h > 24) {
    throw InputError("min_valid_h", std::to_string(min_valid_h), "1 .. 24 hours");
  }
  const auto [first, end] = day_span(s, lst_offset_s);
  DailyValues out;
  out.first_day = first;
  out.possible_count = 24;
  out.required_count = min_valid_h;
  const auto days = static_cast<std::size_t>(end - first);
  out.value.assign(days, kMissing);
  out.valid_count.assign(days, 0);
  std::vector<double> acc(days, 0.0);
  for (std::size_t i = 0; i < s.size(); ++i) {
    const double v = s.values[i];
    if (std::isnan(v)) continue;
    const auto d = static_cast<std::size_t>(lst_day_of(s.hour_start(i), lst_offset_s) - first);
    acc[d] = out.valid_count[d] == 0 ? v : combine(acc[d], v);
    ++out.valid_count[d];
  }
  for (std::size_t d = 0; d < days; ++d) {
    if (out.valid_count[d] == 0) continue;
    out.value[d] = mean ? acc[d] / out.valid_count[d] : acc[d];
  }
  return out;
}

}  // namespace

DailyValues daily_means(const HourlySeries& series, int lst_offset_s, int min_valid_h) {
  return daily_fold(
      series, lst_offset_s, min_valid_h, [](double a, double v) { return a + v; }, true);
}

DailyValues daily_max_1h(const HourlySeries& series, int lst_offset_s, int min_valid_h) {
  return daily_fold(
      series, lst_offset_s, min_valid_h, [](double a, double v) { return std::max(a, v); }, false);
}

DailyValues daily_max_of_windows(const RunningMeans& means, int lst_offset_s,
                                 DailyWindowRule rule) {
  if (rule.window_count < 1 || rule.window_count > 24 || rule.min_valid_windows < 1 ||
      rule.min_valid_windows > rule.window_count) {
    throw InputError("daily window rule",
                     std::to_string(rule.window_count) + " windows, " +
                         std::to_string(rule.min_valid_windows) + " required",
                     "1 .. 24 windows and 1 .. that many required");
  }
  DailyValues out;
  out.possible_count = rule.window_count;
  out.required_count = rule.min_valid_windows;
  if (means.size() == 0) return out;
  // A window starting at LST hour H (counted from 1970-01-01 00:00 LST) belongs to day
  // floor((H - first_start_hour) / 24), at position (H - first_start_hour) mod 24 in that day.
  auto local_hour = [&](std::size_t i) {
    return cc::floor_div(means.window_start_utc(i) + lst_offset_s, kSecondsPerHour);
  };
  auto assigned_day = [&](std::size_t i) {
    return cc::floor_div(local_hour(i) - rule.first_start_hour, 24);
  };
  auto in_a_day = [&](std::size_t i) {
    const std::int64_t shifted = local_hour(i) - rule.first_start_hour;
    return shifted - cc::floor_div(shifted, 24) * 24 < rule.window_count;
  };
  // The day span runs from the first to the last window starting inside the series that
  // belongs to some day (a US day has no window starting 00:00-06:00, so a series starting at
  // midnight opens on that day). Earlier windows only count toward the days of that span.
  std::size_t i0 = std::min(means.leading_windows, means.size() - 1);
  while (i0 + 1 < means.size() && !in_a_day(i0)) ++i0;
  std::size_t i1 = means.size() - 1;
  while (i1 > i0 && !in_a_day(i1)) --i1;
  const std::int64_t first = assigned_day(i0);
  const std::int64_t last = std::max(first, assigned_day(i1));
  out.first_day = first;
  const auto days = static_cast<std::size_t>(last - first + 1);
  out.value.assign(days, kMissing);
  out.valid_count.assign(days, 0);
  for (std::size_t i = 0; i < means.size(); ++i) {
    const double v = means.mean[i];
    if (std::isnan(v)) continue;
    const std::int64_t shifted = local_hour(i) - rule.first_start_hour;
    const std::int64_t day = cc::floor_div(shifted, 24);
    const std::int64_t position = shifted - day * 24;
    if (position >= rule.window_count || day < first || day > last) continue;
    const auto d = static_cast<std::size_t>(day - first);
    out.value[d] = out.valid_count[d] == 0 ? v : std::max(out.value[d], v);
    ++out.valid_count[d];
  }
  return out;
}

namespace {

struct PeriodKey {
  int year;
  int index;
};

PeriodKey period_of_day(std::int64_t day, Period p) {
  const cc::Ymd d = cc::ymd_from_days(day);
  switch (p) {
    case Period::month:
      return {d.year, d.month};
    case Period::quarter:
      return {d.year, (d.month - 1) / 3 + 1};
    case Period::year:
      return {d.year, 0};
  }
  return {d.year, 0};
}

std::pair<std::int64_t, std::int64_t> period_days(PeriodKey k, Period p) {
  switch (p) {
    case Period::month:
      return {cc::days_from_ymd(k.year, k.index, 1),
              cc::days_from_ymd(k.year, k.index, cc::days_in_month(k.year, k.index))};
    case Period::quarter: {
      const int m0 = (k.index - 1) * 3 + 1;
      return {cc::days_from_ymd(k.year, m0, 1),
              cc::days_from_ymd(k.year, m0 + 2, cc::days_in_month(k.year, m0 + 2))};
    }
    case Period::year:
      return {cc::days_from_ymd(k.year, 1, 1), cc::days_from_ymd(k.year, 12, 31)};
  }
  return {0, 0};
}

void check_fraction(double f) {
  if (!(f > 0.0 && f <= 1.0)) {
    throw InputError("min_fraction", std::to_string(f), "a completeness fraction in (0, 1]");
  }
}

// Walks day numbers in order and closes a PeriodMean whenever the period changes.
template <class DaySource>
std::vector<PeriodMean> fold_periods(std::int64_t first_day, std::int64_t end_day, Period period,
                                     double min_fraction, int units_per_day, DaySource day_sum) {
  check_fraction(min_fraction);
  std::vector<PeriodMean> out;
  double sum = 0.0;
  for (std::int64_t day = first_day; day < end_day;) {
    const PeriodKey key = period_of_day(day, period);
    const auto [p0, p1] = period_days(key, period);
    PeriodMean pm;
    pm.year = key.year;
    pm.index = key.index;
    pm.first_day = p0;
    pm.last_day = p1;
    pm.possible_count = static_cast<int>(p1 - p0 + 1) * units_per_day;
    sum = 0.0;
    for (; day < end_day && day <= p1; ++day) day_sum(day, sum, pm.valid_count);
    if (pm.valid_count > 0) pm.mean = sum / pm.valid_count;
    pm.complete = pm.valid_count >= min_valid_count(pm.possible_count, min_fraction);
    out.push_back(pm);
  }
  return out;
}

}  // namespace

std::vector<PeriodMean> period_means_of_hours(const HourlySeries& series, int lst_offset_s,
                                              Period period, double min_fraction) {
  // Per-day sums first (one pass over the hours), then periods over days.
  // Named variables, not a structured binding: the lambda below captures `first`, which C++17
  // forbids for a binding and clang 14 refuses even in C++20.
  const auto span = day_span(series, lst_offset_s);
  const std::int64_t first = span.first;
  const std::int64_t end = span.second;
  const auto days = static_cast<std::size_t>(end - first);
  std::vector<double> sum(days, 0.0);
  std::vector<int> count(days, 0);
  for (std::size_t i = 0; i < series.size(); ++i) {
    const double v = series.values[i];
    if (std::isnan(v)) continue;
    const auto d = static_cast<std::size_t>(lst_day_of(series.hour_start(i), lst_offset_s) - first);
    sum[d] += v;
    ++count[d];
  }
  return fold_periods(first, end, period, min_fraction, 24,
                      [&](std::int64_t day, double& s, int& c) {
                        const auto d = static_cast<std::size_t>(day - first);
                        s += sum[d];
                        c += count[d];
                      });
}

std::vector<PeriodMean> period_means_of_days(const DailyValues& days, Period period,
                                             double min_fraction) {
  const std::int64_t first = days.first_day;
  const std::int64_t end = first + static_cast<std::int64_t>(days.size());
  return fold_periods(first, end, period, min_fraction, 1,
                      [&](std::int64_t day, double& s, int& c) {
                        const auto d = static_cast<std::size_t>(day - first);
                        if (!days.complete(d) || std::isnan(days.value[d])) return;
                        s += days.value[d];
                        ++c;
                      });
}

std::vector<AnnualOfQuarters> annual_means_of_quarters(const std::vector<PeriodMean>& quarters) {
  std::vector<AnnualOfQuarters> out;
  for (const PeriodMean& q : quarters) {
    if (out.empty() || out.back().year != q.year) {
      out.push_back(AnnualOfQuarters{q.year, 0.0, 0, false});
    }
    AnnualOfQuarters& a = out.back();
    if (q.complete && !std::isnan(q.mean)) {
      a.mean += q.mean;
      ++a.complete_quarters;
    }
  }
  for (AnnualOfQuarters& a : out) {
    a.complete = a.complete_quarters == 4;
    a.mean = a.complete_quarters > 0 ? a.mean / a.complete_quarters : kMissing;
  }
  return out;
}

int percentile_rank(RankingTable table, int n, double percentile) {
  if (n < 1) throw InputError("percentile_rank n", std::to_string(n), "at least 1 value");
  struct Row {
    int n_max;
    int rank;
  };
  // 40 CFR 50 Appendix N Table 1 (98th percentile) and the Appendix T ranking (99th).
  static constexpr Row k98[] = {{50, 1},  {100, 2}, {150, 3}, {200, 4},
                                {250, 5}, {300, 6}, {350, 7}, {366, 8}};
  static constexpr Row k99[] = {{100, 1}, {200, 2}, {300, 3}, {366, 4}};
  switch (table) {
    case RankingTable::us_98th:
      for (const Row& r : k98) {
        if (n <= r.n_max) return r.rank;
      }
      return 8;
    case RankingTable::us_99th:
      for (const Row& r : k99) {
        if (n <= r.n_max) return r.rank;
      }
      return 4;
    case RankingTable::nearest_rank: {
      if (!(percentile > 0.0 && percentile <= 100.0)) {
        throw InputError("percentile", std::to_string(percentile), "a value in (0, 100]");
      }
      const int k = static_cast<int>(std::ceil(percentile / 100.0 * n - 1e-9));
      return n - std::max(k, 1) + 1;
    }
  }
  return 1;
}

double nth_highest(std::vector<double> values, int n) {
  if (n < 1) throw InputError("nth_highest n", std::to_string(n), "a rank of at least 1");
  values.erase(std::remove_if(values.begin(), values.end(), [](double v) { return std::isnan(v); }),
               values.end());
  if (values.size() < static_cast<std::size_t>(n)) return kMissing;
  const auto it = values.begin() + (n - 1);
  std::nth_element(values.begin(), it, values.end(), std::greater<>());
  return *it;
}

int count_non_overlapping_exceedances(const RunningMeans& means, std::size_t begin, std::size_t end,
                                      double level, Rounding rounding) {
  int count = 0;
  end = std::min(end, means.size());
  for (std::size_t i = begin; i < end; ++i) {
    const double v = apply_rounding(means.mean[i], rounding);
    if (!std::isnan(v) && v > level) {
      ++count;
      i += static_cast<std::size_t>(means.window_h) - 1;
    }
  }
  return count;
}

double nth_highest_non_overlapping(const RunningMeans& means, std::size_t begin, std::size_t end,
                                   int n) {
  if (n < 1) throw InputError("nth_highest n", std::to_string(n), "a rank of at least 1");
  end = std::min(end, means.size());
  std::vector<std::size_t> order;
  for (std::size_t i = begin; i < end; ++i) {
    if (!std::isnan(means.mean[i])) order.push_back(i);
  }
  std::stable_sort(order.begin(), order.end(),
                   [&](std::size_t a, std::size_t b) { return means.mean[a] > means.mean[b]; });
  std::vector<std::size_t> chosen;
  const auto k = static_cast<std::size_t>(means.window_h);
  for (std::size_t i : order) {
    const bool overlaps = std::any_of(chosen.begin(), chosen.end(),
                                      [&](std::size_t c) { return (i > c ? i - c : c - i) < k; });
    if (overlaps) continue;
    chosen.push_back(i);
    if (chosen.size() == static_cast<std::size_t>(n)) return means.mean[i];
  }
  return kMissing;
}

}  // namespace lidbox
