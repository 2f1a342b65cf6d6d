#include "lidbox/analysis/ensemble_statistics.hpp"

#include <algorithm>
#include <cmath>
#include <map>

#include "lidbox/analysis/rule_days.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/engine/ensemble.hpp"
#include "lidbox/standards/episodes.hpp"
#include "lidbox/standards/pollutant.hpp"

namespace lidbox {

double silverman_bandwidth(const std::vector<double>& x) {
  const auto n = static_cast<double>(x.size());
  if (x.size() < 2) return 0.0;
  double mean = 0.0;
  for (double v : x) mean += v;
  mean /= n;
  double ss = 0.0;
  for (double v : x) ss += (v - mean) * (v - mean);
  const double var = ss / (n - 1.0);  // divisor N - 1, as scipy.stats.gaussian_kde
  return std::sqrt(std::pow(4.0 / (3.0 * n), 0.4) * var);
}

double kernel_exceedance_probability(const std::vector<double>& x, double t) {
  if (x.empty()) return kMissing;
  const double s = silverman_bandwidth(x);
  double p = 0.0;
  for (double v : x) {
    // 1 - Phi(z) = erfc(z / sqrt 2) / 2
    p += s > 0.0 ? 0.5 * std::erfc((t - v) / (s * std::sqrt(2.0))) : (v > t ? 1.0 : 0.0);
  }
  return p / static_cast<double>(x.size());
}

EnsemblePercentiles::EnsemblePercentiles(const std::vector<RunResult>& members,
                                         std::vector<double> q)
    : q_(std::move(q)), n_members_(members.size()) {
  if (members.empty()) throw InternalError("percentiles of an empty ensemble");
  n_hours_ = members.front().hours.size();
  n_pollutants_ = members.front().n_pollutants;
  values_.assign(n_hours_ * n_pollutants_ * q_.size(), 0.0);
  mean_.assign(n_hours_ * n_pollutants_, 0.0);
  std::vector<double> x(n_members_);
  for (std::size_t i = 0; i < n_hours_; ++i) {
    for (std::size_t p = 0; p < n_pollutants_; ++p) {
      double sum = 0.0;
      for (std::size_t m = 0; m < n_members_; ++m) {
        x[m] = members[m].total(i, p);
        sum += x[m];
      }
      mean_[i * n_pollutants_ + p] = sum / static_cast<double>(n_members_);
      for (std::size_t k = 0; k < q_.size(); ++k) {
        values_[(i * n_pollutants_ + p) * q_.size() + k] = percentile_linear(x, q_[k]);
      }
    }
  }
}

HourlySeries member_series(const CaseSpec& c, const RunResult& r, std::size_t p) {
  const PollutantSpec& ps = c.pollutants[p];
  HourlySeries s;
  s.first_hour_start_utc = r.hours.empty() ? 0 : r.hours.front().start_utc;
  s.unit = ps.unit.canonical;
  s.values.reserve(r.hours.size());
  for (std::size_t i = 0; i < r.hours.size(); ++i)
    s.values.push_back(r.total(i, p) / ps.unit.to_g_m3);
  return s;
}

namespace {

// Canonical pollutant name -> the case's pollutant index.
std::map<std::string, std::size_t> case_pollutants(const CaseSpec& c) {
  std::map<std::string, std::size_t> out;
  for (std::size_t p = 0; p < c.pollutants.size(); ++p) {
    if (const PollutantInfo* info = find_pollutant(c.pollutants[p].name)) out[info->name] = p;
  }
  return out;
}

template <class Rule>
double factor_for(const CaseSpec& c, std::size_t p, const RuleSet& rs, const Rule& rule) {
  return unit_factor(c.pollutants[p].unit.canonical, rule.unit, rule.pollutant, rs.reference,
                     rule.where + ": rule \"" + rule.id + "\" for " + c.pollutants[p].name);
}

template <class Rule>
EnsembleDay day_row(const RuleSet& rs, const Rule& rule, bool alert, double level,
                    std::int64_t day) {
  EnsembleDay e;
  e.rule_set_id = rs.id;
  e.rule_id = rule.id;
  e.alert = alert;
  e.pollutant = rule.pollutant;
  e.statistic = to_string(rule.statistic);
  e.unit = rule.unit;
  e.level = level;
  e.day = day;
  return e;
}

double median_of(std::vector<double> v) {
  return v.empty() ? kMissing : percentile_linear(v, 50.0);
}

void limit_days(const CaseSpec& c, const std::vector<std::vector<HourlySeries>>& series,
                const RuleSet& rs, const Limit& l, std::size_t p, bool kernel, EnsembleRules& out) {
  const int off = c.zone.standard_offset_s();
  const double f = factor_for(c, p, rs, l);
  std::vector<RuleDays> rd;
  for (const auto& member : series) rd.push_back(rule_days(l, member[p], f, off));
  const double boundary = rounding_boundary(l.level, l.rounding);
  for (std::size_t d = 0; d < rd.front().days(); ++d) {
    EnsembleDay e =
        day_row(rs, l, false, l.level, rd.front().first_day + static_cast<std::int64_t>(d));
    std::vector<double> counted;
    for (const RuleDays& r : rd) {
      const double v = r.day_complete[d] ? r.day_max(d) : kMissing;
      e.member_values.push_back(v);
      if (std::isnan(v)) continue;
      counted.push_back(v);
      e.exceeding += apply_rounding(v, l.rounding) > l.level;
    }
    e.members = static_cast<int>(counted.size());
    if (e.members == 0) continue;
    e.probability = static_cast<double>(e.exceeding) / e.members;
    if (kernel) e.kernel_probability = kernel_exceedance_probability(counted, boundary);
    out.days.push_back(std::move(e));
  }
}

void alert_days(const CaseSpec& c, const std::vector<std::vector<HourlySeries>>& series,
                const RuleSet& rs, const AlertRule& a, std::size_t p, EnsembleRules& out) {
  const int off = c.zone.standard_offset_s();
  const double f = factor_for(c, p, rs, a);
  std::vector<RuleDays> rd;
  std::vector<std::vector<std::uint8_t>> under_way;
  EnsembleEpisodes ep;
  ep.rule_set_id = rs.id;
  ep.rule_id = a.id;
  ep.level_name = a.level_name;
  ep.pollutant = a.pollutant;
  ep.members = static_cast<int>(series.size());
  std::vector<double> starts, lengths;
  for (const auto& member : series) {
    rd.push_back(rule_days(a, member[p], f, off));
    const RuleDays& r = rd.back();
    under_way.push_back(days_with_episode(r, a));
    const auto runs = runs_above(r.element, a.threshold, a.persistence);
    if (runs.empty()) {
      ep.member_first_start.push_back(kMissing);
      ep.member_first_length_h.push_back(kMissing);
      continue;
    }
    // As find_episodes: from the first element's start to the last one's end.
    const Run& first = runs.front();
    const UtcSeconds t0 =
        r.first_element_start_utc + static_cast<UtcSeconds>(first.begin) * r.element_step_s;
    const UtcSeconds t1 =
        r.first_element_start_utc +
        static_cast<UtcSeconds>(first.begin + first.length - 1) * r.element_step_s +
        r.element_period_s;
    ep.member_first_start.push_back(static_cast<double>(t0));
    ep.member_first_length_h.push_back(static_cast<double>(t1 - t0) / 3600.0);
    starts.push_back(static_cast<double>(t0));
    lengths.push_back(static_cast<double>(t1 - t0) / 3600.0);
  }
  ep.with_episode = static_cast<int>(starts.size());
  ep.probability = static_cast<double>(ep.with_episode) / ep.members;
  if (!starts.empty()) {
    ep.first_start_earliest = *std::min_element(starts.begin(), starts.end());
    ep.first_start_latest = *std::max_element(starts.begin(), starts.end());
    ep.first_start_median = median_of(starts);
    ep.length_h_min = *std::min_element(lengths.begin(), lengths.end());
    ep.length_h_max = *std::max_element(lengths.begin(), lengths.end());
    ep.length_h_median = median_of(lengths);
  }
  out.episodes.push_back(std::move(ep));
  for (std::size_t d = 0; d < rd.front().days(); ++d) {
    EnsembleDay e =
        day_row(rs, a, true, a.threshold, rd.front().first_day + static_cast<std::int64_t>(d));
    e.members = static_cast<int>(series.size());
    for (const auto& u : under_way) e.exceeding += u[d];
    e.probability = static_cast<double>(e.exceeding) / e.members;
    out.days.push_back(std::move(e));
  }
}

}  // namespace

EnsembleRules ensemble_rules(const CaseSpec& c, const std::vector<RunResult>& members,
                             const std::vector<RuleSet>& rule_sets, bool kernel_dressing) {
  if (members.size() < 2) throw InternalError("ensemble_rules with fewer than 2 members");
  const auto pollutants = case_pollutants(c);
  std::vector<std::vector<HourlySeries>> series(members.size());
  for (std::size_t m = 0; m < members.size(); ++m) {
    for (std::size_t p = 0; p < c.pollutants.size(); ++p)
      series[m].push_back(member_series(c, members[m], p));
  }
  EnsembleRules out;
  for (const RuleSet& rs : rule_sets) {
    for (const Limit& l : rs.limits) {
      const auto it = pollutants.find(l.pollutant);
      if (it == pollutants.end()) continue;
      if (!daily_rule(l)) {
        out.skipped.push_back(rs.id + " " + l.id + " (" + to_string(l.statistic) +
                              ", not a daily statistic)");
        continue;
      }
      limit_days(c, series, rs, l, it->second, kernel_dressing, out);
    }
    for (const AlertRule& a : rs.alerts) {
      const auto it = pollutants.find(a.pollutant);
      if (it != pollutants.end()) alert_days(c, series, rs, a, it->second, out);
    }
  }
  return out;
}

EnsembleOutcome forecast_ensemble(const CaseSpec& c, const MetSeries& deterministic,
                                  const std::vector<RuleSet>& rule_sets,
                                  const std::function<void(double)>& progress) {
  EnsembleMet met = read_ensemble_met(c, deterministic);
  std::vector<RunResult> runs = run_ensemble(c, met.members, 0, progress);
  EnsemblePercentiles percentiles(runs, c.ensemble->percentiles);
  EnsembleRules rules = ensemble_rules(c, runs, rule_sets, c.ensemble->kernel_dressing);
  return {std::move(met.labels),  std::move(met.members), std::move(runs),
          std::move(percentiles), std::move(rules),       c.ensemble->kernel_dressing};
}

}  // namespace lidbox
