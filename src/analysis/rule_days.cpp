#include "lidbox/analysis/rule_days.hpp"

#include <algorithm>
#include <cmath>

#include "lidbox/base/error.hpp"
#include "lidbox/standards/averaging.hpp"
#include "lidbox/standards/episodes.hpp"

namespace lidbox {

namespace {

std::int64_t floor_div(std::int64_t a, std::int64_t b) {
  const std::int64_t q = a / b;
  return (a % b != 0 && ((a < 0) != (b < 0))) ? q - 1 : q;
}

// The LST days the series' hours fall in.
void day_axis(const HourlySeries& s, int off, RuleDays& r) {
  r.first_day = lst_day_of(s.first_hour_start_utc, off);
  const std::int64_t last = lst_day_of(s.hour_start(s.size() - 1), off);
  const auto n = static_cast<std::size_t>(last - r.first_day + 1);
  r.day_begin.assign(n, 0);
  r.day_end.assign(n, 0);
  r.day_complete.assign(n, 0);
}

// Groups elements by the day `day_of(j)` returns (-1: in no day); days rise with j.
template <class DayOf>
void group_elements(RuleDays& r, DayOf day_of) {
  bool seen = false;
  std::size_t current = 0;
  for (std::size_t j = 0; j < r.element.size(); ++j) {
    const std::int64_t d = day_of(j);
    if (d < r.first_day || d >= r.first_day + static_cast<std::int64_t>(r.days())) continue;
    const auto k = static_cast<std::size_t>(d - r.first_day);
    if (!seen || k != current) {
      r.day_begin[k] = j;
      current = k;
      seen = true;
    }
    r.day_end[k] = j + 1;
  }
}

std::vector<double> scaled(const std::vector<double>& v, double f) {
  std::vector<double> out(v.size());
  for (std::size_t i = 0; i < v.size(); ++i) out[i] = v[i] * f;
  return out;
}

int present_in(const RuleDays& r, std::size_t d) {
  int n = 0;
  for (std::size_t j = r.day_begin[d]; j < r.day_end[d]; ++j) n += !std::isnan(r.element[j]);
  return n;
}

void hourly_elements(const HourlySeries& s, double f, int off, RuleDays& r) {
  r.element = scaled(s.values, f);
  r.first_element_start_utc = s.first_hour_start_utc;
  group_elements(r, [&](std::size_t j) { return lst_day_of(s.hour_start(j), off); });
}

void window_elements(const RunningMeans& rm, double f, RuleDays& r) {
  r.element = scaled(rm.mean, f);
  r.first_element_start_utc = rm.first_window_start_utc;
  r.element_period_s = static_cast<UtcSeconds>(rm.window_h) * kSecondsPerHour;
}

void daily_mean_elements(const HourlySeries& s, double f, int off, int required, RuleDays& r) {
  const DailyValues dv = daily_means(s, off, required);
  r.element = scaled(dv.value, f);
  r.first_element_start_utc = lst_day_start_utc(dv.first_day, off);
  r.element_step_s = r.element_period_s = kSecondsPerDay;
  group_elements(r, [&](std::size_t j) { return dv.day(j); });
  for (std::size_t d = 0; d < r.days(); ++d) {
    const std::size_t j = r.day_begin[d];
    r.day_complete[d] = r.day_end[d] > j && dv.complete(j);
  }
}

}  // namespace

double RuleDays::day_max(std::size_t d) const {
  double m = kMissing;
  for (std::size_t j = day_begin[d]; j < day_end[d]; ++j) {
    if (!std::isnan(element[j]) && !(element[j] <= m)) m = element[j];
  }
  return m;
}

bool daily_rule(const Limit& l) {
  switch (l.statistic) {
    case StatisticKind::hourly_value:
    case StatisticKind::running_mean:
    case StatisticKind::daily_mean:
    case StatisticKind::daily_max_1h:
    case StatisticKind::daily_max_8h_17_windows:
    case StatisticKind::daily_max_8h_24_windows:
      return true;
    default:
      return false;
  }
}

RuleDays rule_days(const Limit& l, const HourlySeries& s, double f, int off) {
  if (!daily_rule(l)) {
    throw InternalError(std::string("rule_days on the non-daily statistic ") +
                        to_string(l.statistic));
  }
  RuleDays r;
  if (s.size() == 0) return r;
  day_axis(s, off, r);
  switch (l.statistic) {
    case StatisticKind::hourly_value:
      hourly_elements(s, f, off, r);
      for (std::size_t d = 0; d < r.days(); ++d) r.day_complete[d] = present_in(r, d) > 0;
      break;
    case StatisticKind::daily_max_1h: {
      hourly_elements(s, f, off, r);
      const int required = min_valid_count(24, l.day_valid_fraction);
      for (std::size_t d = 0; d < r.days(); ++d) r.day_complete[d] = present_in(r, d) >= required;
      break;
    }
    case StatisticKind::running_mean: {
      // As standards_evaluation: windows need 75 % of their hours, and belong to their start's day.
      const RunningMeans rm = running_means(s, l.averaging_h, min_valid_count(l.averaging_h, 0.75));
      window_elements(rm, f, r);
      group_elements(r, [&](std::size_t j) { return lst_day_of(rm.window_start_utc(j), off); });
      for (std::size_t d = 0; d < r.days(); ++d) r.day_complete[d] = present_in(r, d) > 0;
      break;
    }
    case StatisticKind::daily_max_8h_17_windows:
    case StatisticKind::daily_max_8h_24_windows: {
      // The windows of a day as daily_max_of_windows assigns them (averaging.hpp): a window
      // starting at LST hour H belongs to day floor((H - first_start_hour) / 24) when its
      // position in that day is below window_count.
      const bool us = l.statistic == StatisticKind::daily_max_8h_17_windows;
      const DailyWindowRule w = us ? kUsOzoneDayWindows : kEuDayWindows;
      const RunningMeans rm = running_means(s, 8, 6, WindowSpan::reaching_into_series);
      window_elements(rm, f, r);
      group_elements(r, [&](std::size_t j) -> std::int64_t {
        const std::int64_t shifted =
            floor_div(rm.window_start_utc(j) + off, kSecondsPerHour) - w.first_start_hour;
        const std::int64_t day = floor_div(shifted, 24);
        return shifted - day * 24 < w.window_count ? day : -1;
      });
      const int required = min_valid_count(w.window_count, l.day_valid_fraction);
      for (std::size_t d = 0; d < r.days(); ++d) r.day_complete[d] = present_in(r, d) >= required;
      break;
    }
    case StatisticKind::daily_mean:
      daily_mean_elements(s, f, off, min_valid_count(24, l.day_valid_fraction), r);
      break;
    default:
      break;
  }
  return r;
}

RuleDays rule_days(const AlertRule& a, const HourlySeries& s, double f, int off) {
  RuleDays r;
  if (s.size() == 0) return r;
  day_axis(s, off, r);
  // As find_episodes (episodes.hpp): daily means count only when complete (18 of 24 hours).
  if (a.statistic == StatisticKind::daily_mean) {
    daily_mean_elements(s, f, off, 18, r);
    for (std::size_t j = 0; j < r.element.size(); ++j) {
      const auto d = static_cast<std::size_t>(j);
      if (d < r.days() && !r.day_complete[d]) r.element[j] = kMissing;
    }
    return r;
  }
  if (a.statistic == StatisticKind::running_mean) {
    window_elements(running_means(s, a.averaging_h, min_valid_count(a.averaging_h, 0.75)), f, r);
  } else {
    r.element = scaled(s.values, f);
    r.first_element_start_utc = s.first_hour_start_utc;
  }
  // A day's elements: those whose period overlaps it.
  for (std::size_t d = 0; d < r.days(); ++d) {
    const UtcSeconds d0 = lst_day_start_utc(r.first_day + static_cast<std::int64_t>(d), off);
    const UtcSeconds d1 = d0 + kSecondsPerDay;
    const UtcSeconds t0 = r.first_element_start_utc;
    // element j overlaps [d0, d1) when t0 + j step < d1 and t0 + j step + period > d0
    const std::int64_t lo = floor_div(d0 - r.element_period_s - t0, r.element_step_s) + 1;
    const std::int64_t hi = floor_div(d1 - 1 - t0, r.element_step_s) + 1;
    const auto n = static_cast<std::int64_t>(r.element.size());
    r.day_begin[d] = static_cast<std::size_t>(std::clamp<std::int64_t>(lo, 0, n));
    r.day_end[d] = static_cast<std::size_t>(std::clamp<std::int64_t>(hi, 0, n));
    if (r.day_end[d] < r.day_begin[d]) r.day_end[d] = r.day_begin[d];
    r.day_complete[d] = 1;
  }
  return r;
}

std::vector<std::uint8_t> days_with_episode(const RuleDays& r, const AlertRule& a) {
  std::vector<std::uint8_t> out(r.days(), 0);
  for (const Run& run : runs_above(r.element, a.threshold, a.persistence)) {
    for (std::size_t d = 0; d < r.days(); ++d) {
      if (run.begin < r.day_end[d] && run.begin + run.length > r.day_begin[d]) out[d] = 1;
    }
  }
  return out;
}

double rounding_boundary(double level, Rounding rounding) {
  if (rounding.mode == RoundingMode::none) return level;
  const double step = std::pow(10.0, -rounding.decimals);
  double lo = level - step;  // rounds to at most level - step / 2
  double hi = level + step;  // rounds above the level
  while (std::nextafter(lo, hi) < hi) {
    const double mid = lo + 0.5 * (hi - lo);
    if (mid <= lo || mid >= hi) break;
    (apply_rounding(mid, rounding) > level ? hi : lo) = mid;
  }
  return lo;
}

}  // namespace lidbox
