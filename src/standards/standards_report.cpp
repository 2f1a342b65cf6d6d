#include "lidbox/standards/standards_report.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <map>
#include <set>
#include <sstream>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/standards/pollutant.hpp"

namespace lidbox {

namespace {

RuleCoverage rule_coverage(const NamedSeries& series, const ReportOptions& options) {
  RuleCoverage c;
  std::set<std::string> judged_somewhere;
  for (const RuleSet& rs : options.rule_sets) {
    std::set<std::string> judged;
    for (const Limit& l : rs.limits) judged.insert(l.pollutant);
    for (const AlertRule& a : rs.alerts) judged.insert(a.pollutant);
    bool any = false;
    for (const auto& [name, s] : series) any = any || judged.count(name) > 0;
    if (!any) c.idle_rule_sets.push_back(rs.id);
    judged_somewhere.insert(judged.begin(), judged.end());
  }
  for (const auto& [name, s] : series) {
    if (!judged_somewhere.count(name)) c.unjudged_pollutants.push_back(name);
  }
  for (const std::string& name : options.unknown_pollutants) {
    const std::string near = closest_name(name, pollutant_names());
    c.unjudged_pollutants.push_back("\"" + name + "\" (not a pollutant name lidbox knows" +
                                    (near.empty() ? "" : "; did you mean \"" + near + "\"?") + ")");
  }
  return c;
}

}  // namespace

const AirIndex& aqi_index_of(const ReportOptions& options) {
  if (options.index && options.index->kind == IndexKind::breakpoints) return *options.index;
  return aqi_table_index(options.aqi_table);
}

const AirIndex& headline_index_of(const ReportOptions& options) {
  return options.index ? *options.index : aqi_table_index(options.aqi_table);
}

StandardsReport compute_standards_report(const NamedSeries& series, ReportOptions options) {
  StandardsReport r;
  r.coverage = rule_coverage(series, options);
  const int off = options.lst_offset_s;
  for (const auto& [name, s] : series) {
    const auto valid = static_cast<std::size_t>(
        std::count_if(s.values.begin(), s.values.end(), [](double v) { return !std::isnan(v); }));
    r.series.push_back(SeriesSummary{name, s.unit, s.first_hour_start_utc, s.size(), valid});
  }
  for (const RuleSet& rs : options.rule_sets) {
    auto limits = evaluate_limits(series, rs, off);
    r.limits.insert(r.limits.end(), limits.begin(), limits.end());
    auto episodes = find_episodes(series, rs, off, options.issue_time_utc);
    r.episodes.insert(r.episodes.end(), episodes.begin(), episodes.end());
  }
  r.daily = daily_statistics(series, off);
  for (const auto& [name, s] : series) {
    for (Period p : {Period::month, Period::quarter, Period::year}) {
      for (const PeriodMean& m : period_means_of_hours(s, off, p, 0.75)) {
        if (m.valid_count > 0) r.periods.push_back(PeriodRow{name, s.unit, p, m});
      }
    }
  }
  // A chosen index is always computed, whatever the flags say about the shipped ones.
  const bool formula = options.index && options.index->kind == IndexKind::formula;
  if (options.index && options.index->kind == IndexKind::breakpoints) options.with_aqi = true;
  if (formula) options.with_aqhi = true;
  if (options.with_aqi) r.aqi = daily_aqi(series, off, aqi_index_of(options));
  if (options.with_aqhi)
    r.aqhi = formula ? hourly_formula_index(series, *options.index) : hourly_aqhi(series);
  if (options.index && options.index->kind == IndexKind::bands)
    r.banded = hourly_banded_index(series, *options.index);
  std::vector<RollingRequest> unique;
  for (const RollingRequest& q : options.rolling) {
    if (std::find(unique.begin(), unique.end(), q) == unique.end()) unique.push_back(q);
  }
  options.rolling = unique;
  for (const RollingRequest& q : options.rolling) {
    for (const auto& [name, s] : series) {
      r.rolling.push_back(RollingTable{name, s.unit, running_means(s, q.window_h, q.min_valid_h)});
    }
  }
  r.options = std::move(options);
  return r;
}

}  // namespace lidbox
