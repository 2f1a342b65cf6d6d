#include "lidbox/standards/episodes.hpp"

#include <cmath>

#include "lidbox/base/error.hpp"

namespace lidbox {

std::vector<Run> runs_above(const std::vector<double>& values, double threshold, int persistence) {
  if (persistence < 1) throw InputError("persistence", std::to_string(persistence), "at least 1");
  std::vector<Run> out;
  std::size_t start = 0;
  std::size_t length = 0;
  auto close = [&] {
    if (length >= static_cast<std::size_t>(persistence)) out.push_back(Run{start, length});
    length = 0;
  };
  for (std::size_t i = 0; i < values.size(); ++i) {
    const double v = values[i];
    if (!std::isnan(v) && v > threshold) {
      if (length == 0) start = i;
      ++length;
    } else {
      close();
    }
  }
  close();
  return out;
}

std::vector<Episode> find_episodes(const NamedSeries& series, const RuleSet& rules,
                                   int lst_offset_s, std::optional<UtcSeconds> issue_time_utc) {
  std::vector<Episode> out;
  std::vector<double> values;
  for (const AlertRule& a : rules.alerts) {
    const auto it = series.find(a.pollutant);
    if (it == series.end() || it->second.size() == 0) continue;
    const HourlySeries& s = it->second;
    const double factor = unit_factor(
        s.unit, a.unit, a.pollutant, rules.reference,
        a.where + ": alert \"" + a.id + "\" for series " + a.pollutant + " [" + s.unit + "]");
    // Every statistic here lies on a regular axis: value i starts at t0 + i * step and covers
    // `period_s`. The value buffer is reused across rules (large vectors are costly to map).
    values.clear();
    UtcSeconds t0 = s.first_hour_start_utc;
    UtcSeconds step = kSecondsPerHour;
    UtcSeconds period_s = kSecondsPerHour;
    if (a.statistic == StatisticKind::daily_mean) {
      const DailyValues dv = daily_means(s, lst_offset_s, 18);
      for (std::size_t d = 0; d < dv.size(); ++d) {
        values.push_back(dv.complete(d) ? dv.value[d] * factor : kMissing);
      }
      t0 = lst_day_start_utc(dv.first_day, lst_offset_s);
      step = period_s = kSecondsPerDay;
    } else if (a.statistic == StatisticKind::running_mean) {
      const RunningMeans rm = running_means(s, a.averaging_h, min_valid_count(a.averaging_h, 0.75));
      for (double m : rm.mean) values.push_back(m * factor);
      period_s = static_cast<UtcSeconds>(a.averaging_h) * kSecondsPerHour;
    } else {
      for (double v : s.values) values.push_back(v * factor);
    }
    auto start_of = [&](std::size_t i) { return t0 + static_cast<UtcSeconds>(i) * step; };
    for (const Run& r : runs_above(values, a.threshold, a.persistence)) {
      Episode e;
      e.rule_set_id = rules.id;
      e.rule_id = a.id;
      e.level_name = a.level_name;
      e.pollutant = a.pollutant;
      e.start_utc = start_of(r.begin);
      e.end_utc = start_of(r.begin + r.length - 1) + period_s;
      e.values_above = static_cast<int>(r.length);
      e.duration_h = static_cast<double>(e.end_utc - e.start_utc) / 3600.0;
      e.peak = values[r.begin];
      e.peak_start_utc = start_of(r.begin);
      for (std::size_t i = r.begin; i < r.begin + r.length; ++i) {
        if (values[i] > e.peak) {
          e.peak = values[i];
          e.peak_start_utc = start_of(i);
        }
      }
      e.unit = a.unit;
      e.threshold = a.threshold;
      if (issue_time_utc) {
        e.lead_time_h = static_cast<double>(e.start_utc - *issue_time_utc) / 3600.0;
      }
      e.legal_source = a.legal_source;
      e.checked = a.checked;
      out.push_back(std::move(e));
    }
  }
  return out;
}

}  // namespace lidbox
