#include "lidbox/standards/standards_evaluation.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <tuple>

#include "base/civil_calendar.hpp"
#include "lidbox/base/error.hpp"

namespace lidbox {

namespace cc = civil_calendar;

const char* to_string(Verdict v) {
  switch (v) {
    case Verdict::within:
      return "within";
    case Verdict::exceeded:
      return "exceeded";
    case Verdict::incomplete:
      return "incomplete";
  }
  return "?";
}

namespace {

int days_in_year(int y) {
  return static_cast<int>(cc::days_from_ymd(y + 1, 1, 1) - cc::days_from_ymd(y, 1, 1));
}

// The values one year contributes to a limit: plain values, or an index range of running means.
struct YearBucket {
  int year = 0;
  std::vector<double> values;
  std::size_t begin = 0;  // running means: window index range [begin, end)
  std::size_t end = 0;
  int possible = 0;
  double annual = kMissing;  // annual statistics
  bool annual_complete = false;
  int annual_valid = 0;
};

YearBucket& bucket_for(std::vector<YearBucket>& b, int year) {
  if (b.empty() || b.back().year != year)
    b.push_back(YearBucket{year, {}, 0, 0, 0, kMissing, false, 0});
  return b.back();
}

// Intermediate tables in the SERIES unit, shared by every limit of a call that needs them
// (the WHO file alone asks for the same daily means at five levels). Means and maxima commute
// with a positive unit factor, so each limit scales the values it takes.
struct Cache {
  std::map<std::tuple<std::string, int, int>, DailyValues> daily;  // pollutant, statistic, required
  std::map<std::string, RunningMeans> running8;                    // pollutant -> 8-h, 6 valid

  const RunningMeans& eight_hour(const std::string& p, const HourlySeries& s) {
    auto it = running8.find(p);
    if (it == running8.end())
      it = running8.emplace(p, running_means(s, 8, 6, WindowSpan::reaching_into_series)).first;
    return it->second;
  }
  const DailyValues& day(const std::string& p, const HourlySeries& s, StatisticKind k, int required,
                         int off) {
    const auto key = std::make_tuple(p, static_cast<int>(k), required);
    auto it = daily.find(key);
    if (it != daily.end()) return it->second;
    DailyValues dv;
    switch (k) {
      case StatisticKind::daily_mean:
        dv = daily_means(s, off, required);
        break;
      case StatisticKind::daily_max_1h:
        dv = daily_max_1h(s, off, required);
        break;
      case StatisticKind::daily_max_8h_17_windows:
        dv = daily_max_of_windows(eight_hour(p, s), off, kUsOzoneDayWindows.requiring(required));
        break;
      case StatisticKind::daily_max_8h_24_windows:
        dv = daily_max_of_windows(eight_hour(p, s), off, kEuDayWindows.requiring(required));
        break;
      default:
        throw InternalError(std::string("statistic ") + to_string(k) + " is not a daily statistic");
    }
    return daily.emplace(key, std::move(dv)).first->second;
  }
};

std::string describe(const Limit& l) {
  const std::string s = to_string(l.statistic);
  switch (l.form) {
    case LimitForm::exceedances:
      return "count of " + s + (l.non_overlapping ? " (non-overlapping)" : "") + " above level";
    case LimitForm::nth_highest: {
      static const char* kSuffix[] = {"th", "st", "nd", "rd"};
      const int r = l.rank;
      const char* suffix = (r % 100 >= 11 && r % 100 <= 13) || r % 10 > 3 ? "th" : kSuffix[r % 10];
      return std::to_string(r) + suffix + " highest " + s +
             (l.non_overlapping ? " (non-overlapping)" : "");
    }
    case LimitForm::percentile: {
      char p[32];
      std::snprintf(p, sizeof p, "%g", l.percentile);
      return std::string(p) + "th percentile (" + to_string(l.ranking) + ") of " + s;
    }
    case LimitForm::annual_value:
      return s;
  }
  return s;
}

// Hour values (× f) by calendar year of their local-standard-time day.
void collect_hours(const HourlySeries& s, double f, int off, std::vector<YearBucket>& years) {
  for (std::size_t i = 0; i < s.size(); ++i) {
    const int y = year_of_day(lst_day_of(s.hour_start(i), off));
    const bool fresh = years.empty() || years.back().year != y;
    YearBucket& b = bucket_for(years, y);
    if (fresh) {
      b.possible = days_in_year(y) * 24;
      b.values.reserve(static_cast<std::size_t>(b.possible));
    }
    if (!std::isnan(s.values[i])) b.values.push_back(s.values[i] * f);
  }
}

// Running means (× f) by year of their window's start, kept whole in `rm` for the
// non-overlapping forms.
void collect_running(const HourlySeries& s, double f, const Limit& l, int off, RunningMeans& rm,
                     std::vector<YearBucket>& years) {
  rm = running_means(s, l.averaging_h, min_valid_count(l.averaging_h, 0.75));
  for (double& m : rm.mean) m *= f;
  for (std::size_t i = 0; i < rm.size(); ++i) {
    const int y = year_of_day(lst_day_of(rm.window_start_utc(i), off));
    const bool fresh = years.empty() || years.back().year != y;
    YearBucket& b = bucket_for(years, y);
    if (fresh) {
      b.begin = i;
      b.possible = days_in_year(y) * 24;
      b.values.reserve(static_cast<std::size_t>(b.possible));
    }
    b.end = i + 1;
    if (!std::isnan(rm.mean[i])) b.values.push_back(rm.mean[i]);
  }
}

// Daily values (× f) of complete days, and of incomplete days above the level where the rule
// counts them.
void collect_days(const HourlySeries& s, double f, const Limit& l, int off, Cache& cache,
                  std::vector<YearBucket>& years) {
  const int total = l.statistic == StatisticKind::daily_max_8h_17_windows ? 17 : 24;
  const DailyValues& dv =
      cache.day(l.pollutant, s, l.statistic, min_valid_count(total, l.day_valid_fraction), off);
  for (std::size_t d = 0; d < dv.size(); ++d) {
    const int y = year_of_day(dv.day(d));
    YearBucket& b = bucket_for(years, y);
    b.possible = days_in_year(y);
    const double v = dv.value[d] * f;
    if (std::isnan(v)) continue;
    const bool above = apply_rounding(v, l.rounding) > l.level;
    if (dv.complete(d) || (l.incomplete_day_counts_if_above && above)) b.values.push_back(v);
  }
}

// The annual mean of the quarters' means (US PM2.5 form).
void collect_quarterly(const HourlySeries& s, double f, const Limit& l, int off, Cache& cache,
                       std::vector<YearBucket>& years) {
  const DailyValues& dv = cache.day(l.pollutant, s, StatisticKind::daily_mean,
                                    min_valid_count(24, l.day_valid_fraction), off);
  const auto quarters = period_means_of_days(dv, Period::quarter, l.period_valid_fraction);
  for (const AnnualOfQuarters& a : annual_means_of_quarters(quarters)) {
    YearBucket& b = bucket_for(years, a.year);
    b.annual = a.mean * f;
    b.annual_complete = a.complete_quarters >= min_valid_count(4, l.year_coverage);
    b.annual_valid = a.complete_quarters;
    b.possible = 4;
  }
}

// The highest six-consecutive-month mean of the daily maximum 8-h means (WHO 2021 peak season).
void collect_peak_season(const HourlySeries& s, double f, const Limit& l, int off, Cache& cache,
                         std::vector<YearBucket>& years) {
  const DailyValues& dv = cache.day(l.pollutant, s, StatisticKind::daily_max_8h_24_windows,
                                    min_valid_count(24, l.day_valid_fraction), off);
  const auto months = period_means_of_days(dv, Period::month, l.period_valid_fraction);
  for (std::size_t m = 0; m < months.size(); ++m) {
    YearBucket& b = bucket_for(years, months[m].year);
    b.possible = 12;
    if (m + 6 > months.size()) continue;
    bool ok = true;
    double sum = 0.0;
    for (std::size_t j = m; j < m + 6; ++j) {
      ok = ok && months[j].complete;
      sum += months[j].mean;
    }
    if (!ok) continue;
    ++b.annual_valid;
    const double mean = sum / 6.0 * f;
    b.annual = std::isnan(b.annual) ? mean : std::max(b.annual, mean);
    b.annual_complete = true;
  }
}

std::vector<YearBucket> collect(const HourlySeries& s, double f, const Limit& l, int off,
                                RunningMeans* rm_out, Cache& cache) {
  std::vector<YearBucket> years;
  switch (l.statistic) {
    case StatisticKind::hourly_value:
      collect_hours(s, f, off, years);
      break;
    case StatisticKind::running_mean:
      collect_running(s, f, l, off, *rm_out, years);
      break;
    case StatisticKind::daily_mean:
    case StatisticKind::daily_max_1h:
    case StatisticKind::daily_max_8h_17_windows:
    case StatisticKind::daily_max_8h_24_windows:
      collect_days(s, f, l, off, cache, years);
      break;
    case StatisticKind::annual_mean:
      for (const PeriodMean& pm : period_means_of_hours(s, off, Period::year, l.year_coverage)) {
        YearBucket& b = bucket_for(years, pm.year);
        b.annual = pm.mean * f;
        b.annual_complete = pm.complete;
        b.annual_valid = pm.valid_count;
        b.possible = pm.possible_count;
      }
      break;
    case StatisticKind::annual_mean_of_quarterly_means:
      collect_quarterly(s, f, l, off, cache, years);
      break;
    case StatisticKind::peak_season_mean:
      collect_peak_season(s, f, l, off, cache, years);
      break;
  }
  return years;
}

// The statistic of one year's bucket for its limit's form; `monotone` when more data could
// only raise it.
double year_statistic(const Limit& l, const YearBucket& b, const RunningMeans& rm,
                      LimitYearResult& r, bool& monotone) {
  const bool rolling = l.statistic == StatisticKind::running_mean;
  monotone = false;
  switch (l.form) {
    case LimitForm::exceedances:
      r.allowed_exceedances = l.allowed_exceedances;
      monotone = true;
      return kMissing;  // the count is the statistic; no value, so no unit is attached to it
    case LimitForm::nth_highest:
      monotone = true;
      return apply_rounding(rolling && l.non_overlapping
                                ? nth_highest_non_overlapping(rm, b.begin, b.end, l.rank)
                                : nth_highest(b.values, l.rank),
                            l.rounding);
    case LimitForm::percentile:
      if (b.values.empty()) return kMissing;
      return apply_rounding(
          nth_highest(b.values,
                      percentile_rank(l.ranking, static_cast<int>(b.values.size()), l.percentile)),
          l.rounding);
    case LimitForm::annual_value:
      return apply_rounding(b.annual, l.rounding);
  }
  return kMissing;
}

// One limit's result for one calendar year.
LimitYearResult year_result(const RuleSet& rules, const Limit& l, const YearBucket& b,
                            const RunningMeans& rm) {
  LimitYearResult r;
  r.rule_set_id = rules.id;
  r.limit_id = l.id;
  r.pollutant = l.pollutant;
  r.kind = l.kind;
  r.year = b.year;
  r.statistic = describe(l);
  r.unit = l.unit;
  r.level = l.level;
  r.years_averaged = l.years_averaged;
  r.legal_source = l.legal_source;
  r.checked = l.checked;
  r.possible_count = b.possible;
  const bool annual = l.form == LimitForm::annual_value;
  r.valid_count = annual ? b.annual_valid : static_cast<int>(b.values.size());
  r.complete =
      annual ? b.annual_complete : r.valid_count >= min_valid_count(b.possible, l.year_coverage);
  if (l.statistic == StatisticKind::running_mean && l.non_overlapping) {
    r.exceedances = count_non_overlapping_exceedances(rm, b.begin, b.end, l.level, l.rounding);
  } else {
    r.exceedances = static_cast<int>(std::count_if(b.values.begin(), b.values.end(), [&](double v) {
      return apply_rounding(v, l.rounding) > l.level;
    }));
  }
  bool monotone = false;
  r.value = year_statistic(l, b, rm, r, monotone);
  if (annual) r.exceedances = -1;  // an annual value has nothing to count
  const bool above = l.form == LimitForm::exceedances ? r.exceedances > l.allowed_exceedances
                                                      : (!std::isnan(r.value) && r.value > l.level);
  if (above && (r.complete || monotone)) {
    r.verdict = Verdict::exceeded;
  } else {
    r.verdict = r.complete ? Verdict::within : Verdict::incomplete;
  }
  return r;
}

// Multi-year forms: the mean of the annual statistic over consecutive complete years, on the
// results from `first` on (one limit's years).
void apply_multi_year(const Limit& l, std::size_t first, std::vector<LimitYearResult>& out) {
  if (l.years_averaged <= 1) return;
  const auto n = static_cast<std::size_t>(l.years_averaged);
  for (std::size_t i = first; i < out.size(); ++i) {
    if (i + 1 < first + n) continue;
    double sum = 0.0;
    bool ok = true;
    for (std::size_t j = i + 1 - n; j <= i; ++j) {
      const double v = l.form == LimitForm::exceedances ? static_cast<double>(out[j].exceedances)
                                                        : out[j].value;
      ok = ok && out[j].complete && !std::isnan(v) &&
           out[j].year == out[i].year - static_cast<int>(i - j);
      sum += v;
    }
    if (!ok) continue;
    const double mean = sum / static_cast<double>(n);
    out[i].multi_year_value =
        l.form == LimitForm::exceedances ? mean : apply_rounding(mean, l.rounding);
    const double allowed =
        l.form == LimitForm::exceedances ? static_cast<double>(l.allowed_exceedances) : l.level;
    out[i].verdict = out[i].multi_year_value > allowed ? Verdict::exceeded : Verdict::within;
  }
}

}  // namespace

std::vector<LimitYearResult> evaluate_limits(const NamedSeries& series, const RuleSet& rules,
                                             int lst_offset_s) {
  std::vector<LimitYearResult> out;
  Cache cache;
  for (const Limit& l : rules.limits) {
    const auto it = series.find(l.pollutant);
    if (it == series.end() || it->second.size() == 0) continue;
    const double factor = unit_factor(it->second.unit, l.unit, l.pollutant, rules.reference,
                                      l.where + ": limit \"" + l.id + "\" for series " +
                                          l.pollutant + " [" + it->second.unit + "]");
    RunningMeans rm;
    const std::vector<YearBucket> years = collect(it->second, factor, l, lst_offset_s, &rm, cache);
    const std::size_t first_result = out.size();
    for (const YearBucket& b : years) {
      LimitYearResult r = year_result(rules, l, b, rm);
      // A calendar year the series only grazes (e.g. the hours before the first LST midnight)
      // with nothing counted says nothing; leave it out.
      if (r.valid_count > 0) out.push_back(std::move(r));
    }
    apply_multi_year(l, first_result, out);
  }
  return out;
}

std::vector<DailyStatisticsRow> daily_statistics(const NamedSeries& series, int lst_offset_s) {
  std::vector<DailyStatisticsRow> out;
  std::size_t rows = 0;
  for (const auto& [name, s] : series) rows += 4 * (s.size() / 24 + 2);
  out.reserve(rows);
  for (const auto& [name, s] : series) {
    if (s.size() == 0) continue;
    const RunningMeans rm8 = running_means(s, 8, 6, WindowSpan::reaching_into_series);
    const std::pair<const char*, DailyValues> tables[] = {
        {"daily_mean", daily_means(s, lst_offset_s, 18)},
        {"daily_max_1h", daily_max_1h(s, lst_offset_s, 18)},
        {"daily_max_8h_17_windows", daily_max_of_windows(rm8, lst_offset_s, kUsOzoneDayWindows)},
        {"daily_max_8h_24_windows", daily_max_of_windows(rm8, lst_offset_s, kEuDayWindows)},
    };
    for (const auto& [stat, dv] : tables) {
      for (std::size_t d = 0; d < dv.size(); ++d) {
        out.push_back(DailyStatisticsRow{name, dv.day(d), stat, dv.value[d], s.unit,
                                         dv.valid_count[d], dv.possible_count, dv.complete(d)});
      }
    }
  }
  return out;
}

}  // namespace lidbox
