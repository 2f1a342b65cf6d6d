#include "lidbox/analysis/model_evaluation.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <tuple>

#include "lidbox/base/error.hpp"
#include "lidbox/standards/averaging.hpp"
#include "lidbox/standards/standards_evaluation.hpp"

namespace lidbox {

namespace {

void finish(PairedValues& pv) {
  if (pv.observed.empty()) return;
  pv.stats = agreement_statistics(pv.observed, pv.modelled);
  for (const Criterion& c : criteria_for(pv.level, pv.pollutant)) {
    pv.criteria.push_back(check_criterion(c, pv.stats));
  }
}

// A rule's daily statistic, as this file computes it for both sides.
struct DailyKind {
  StatisticKind kind = StatisticKind::daily_mean;  // hourly_value -> daily_max_1h
  int window_h = 1;                                // running means
  int required = 18;
  [[nodiscard]] auto key() const {
    return std::make_tuple(static_cast<int>(kind), window_h, required);
  }
};

std::string name_of(const DailyKind& k) {
  if (k.kind == StatisticKind::running_mean) {
    return "daily max " + std::to_string(k.window_h) +
           "-h running mean (windows starting in the day)";
  }
  return to_string(k.kind);
}

PairingLevel level_of(const DailyKind& k) {
  switch (k.kind) {
    case StatisticKind::daily_mean:
      return PairingLevel::daily_means;
    case StatisticKind::daily_max_1h:
      return PairingLevel::daily_max_1h;
    case StatisticKind::daily_max_8h_17_windows:
    case StatisticKind::daily_max_8h_24_windows:
      return PairingLevel::daily_max_8h;
    default:
      return k.window_h == 8 ? PairingLevel::daily_max_8h : PairingLevel::other_daily;
  }
}

// The daily kind a limit is verified on; false for annual and seasonal statistics.
bool daily_kind_of(const Limit& l, DailyKind& k) {
  switch (l.statistic) {
    case StatisticKind::hourly_value:
      k = {StatisticKind::daily_max_1h, 1, 18};
      return true;
    case StatisticKind::running_mean:
      k = {StatisticKind::running_mean, l.averaging_h, 18};
      return true;
    case StatisticKind::daily_mean:
    case StatisticKind::daily_max_1h:
    case StatisticKind::daily_max_8h_24_windows:
      k = {l.statistic, 1, min_valid_count(24, l.day_valid_fraction)};
      return true;
    case StatisticKind::daily_max_8h_17_windows:
      k = {l.statistic, 1, min_valid_count(17, l.day_valid_fraction)};
      return true;
    default:
      return false;
  }
}

DailyValues daily_of(const HourlySeries& s, const DailyKind& k, int off) {
  switch (k.kind) {
    case StatisticKind::daily_mean:
      return daily_means(s, off, k.required);
    case StatisticKind::daily_max_1h:
      return daily_max_1h(s, off, k.required);
    case StatisticKind::daily_max_8h_17_windows:
      return daily_max_of_windows(running_means(s, 8, 6, WindowSpan::reaching_into_series), off,
                                  kUsOzoneDayWindows.requiring(k.required));
    case StatisticKind::daily_max_8h_24_windows:
      return daily_max_of_windows(running_means(s, 8, 6, WindowSpan::reaching_into_series), off,
                                  kEuDayWindows.requiring(k.required));
    case StatisticKind::running_mean:
      return daily_max_of_windows(running_means(s, k.window_h, min_valid_count(k.window_h)), off,
                                  DailyWindowRule{0, 24, k.required});
    default:
      throw InternalError(std::string("daily_of: ") + to_string(k.kind));
  }
}

struct MaskedPair {
  HourlySeries observed, modelled;
};

MaskedPair masked(const MonitorPollutant& m, const std::vector<double>& model,
                  const std::vector<HourRecord>& hours) {
  MaskedPair mp;
  mp.observed.first_hour_start_utc = mp.modelled.first_hour_start_utc = hours.front().start_utc;
  mp.observed.unit = mp.modelled.unit = m.unit;
  mp.observed.values = m.observed;
  mp.modelled.values.assign(model.size(), kMissing);
  for (std::size_t i = 0; i < model.size(); ++i) {
    if (!std::isnan(m.observed[i])) mp.modelled.values[i] = model[i];
  }
  return mp;
}

PairedValues daily_pairs(const MonitorPollutant& m, const MaskedPair& mp, const DailyKind& k,
                         int off) {
  PairedValues pv;
  pv.monitor = m.label;
  pv.pollutant = m.pollutant;
  pv.unit = m.unit;
  pv.averaging = k.kind == StatisticKind::daily_mean ? "daily means" : name_of(k);
  pv.level = level_of(k);
  const DailyValues o = daily_of(mp.observed, k, off);
  const DailyValues p = daily_of(mp.modelled, k, off);
  for (std::size_t d = 0; d < o.size() && d < p.size(); ++d) {
    if (!o.complete(d) || !p.complete(d) || std::isnan(o.value[d]) || std::isnan(p.value[d]))
      continue;
    pv.key.push_back(o.day(d));
    pv.observed.push_back(o.value[d]);
    pv.modelled.push_back(p.value[d]);
  }
  return pv;
}

void append(PairedValues& all, const PairedValues& one) {
  all.key.insert(all.key.end(), one.key.begin(), one.key.end());
  all.observed.insert(all.observed.end(), one.observed.begin(), one.observed.end());
  all.modelled.insert(all.modelled.end(), one.modelled.begin(), one.modelled.end());
}

Profiles profiles_of(const MonitorPollutant& m, const std::vector<double>& model,
                     const std::vector<HourRecord>& hours) {
  Profiles pr;
  pr.monitor = m.label;
  pr.pollutant = m.pollutant;
  pr.unit = m.unit;
  for (std::size_t i = 0; i < hours.size(); ++i) {
    if (std::isnan(m.observed[i])) continue;
    const CivilTime lt = civil_from_utc_seconds(hours[i].start_utc + hours[i].civil_offset_s);
    const auto h = static_cast<std::size_t>(lt.hour);
    const auto w = static_cast<std::size_t>(lt.day_of_week);
    pr.hour_observed[h] += m.observed[i];
    pr.hour_modelled[h] += model[i];
    ++pr.hour_count[h];
    pr.weekday_observed[w] += m.observed[i];
    pr.weekday_modelled[w] += model[i];
    ++pr.weekday_count[w];
  }
  for (std::size_t h = 0; h < 24; ++h) {
    const double n = pr.hour_count[h];
    pr.hour_observed[h] = n > 0 ? pr.hour_observed[h] / n : kMissing;
    pr.hour_modelled[h] = n > 0 ? pr.hour_modelled[h] / n : kMissing;
  }
  for (std::size_t w = 0; w < 7; ++w) {
    const double n = pr.weekday_count[w];
    pr.weekday_observed[w] = n > 0 ? pr.weekday_observed[w] / n : kMissing;
    pr.weekday_modelled[w] = n > 0 ? pr.weekday_modelled[w] / n : kMissing;
  }
  return pr;
}

RuleVerification verify(const MonitorPollutant& m, const PairedValues& daily, const RuleSet& rs,
                        const Limit& l) {
  RuleVerification v;
  v.monitor = m.label;
  v.rule_set_id = rs.id;
  v.limit_id = l.id;
  v.pollutant = m.pollutant;
  v.statistic = daily.averaging;
  v.level = l.level;
  v.unit = l.unit;
  v.legal_source = l.legal_source;
  const double f =
      unit_factor(m.unit, l.unit, m.pollutant, rs.reference, rs.path + ": limit " + l.id);
  for (std::size_t d = 0; d < daily.key.size(); ++d) {
    DayCall call;
    call.day = daily.key[d];
    call.observed = apply_rounding(daily.observed[d] * f, l.rounding);
    call.modelled = apply_rounding(daily.modelled[d] * f, l.rounding);
    call.observed_exceeded = call.observed > l.level;
    call.modelled_exceeded = call.modelled > l.level;
    v.table.add(call.modelled_exceeded, call.observed_exceeded);
    v.days.push_back(call);
  }
  v.scores = categorical_scores(v.table);
  return v;
}

// The daily kinds to pair for pollutant `pol` (daily means first, then each rule's own), and
// the limits that give daily calls; limits without daily calls get a note.
std::vector<DailyKind> daily_kinds_of(const std::string& pol, const std::vector<RuleSet>& rules,
                                      std::vector<std::pair<const RuleSet*, const Limit*>>& limits,
                                      std::vector<std::string>& notes) {
  std::vector<DailyKind> kinds = {DailyKind{StatisticKind::daily_mean, 1, 18}};
  for (const RuleSet& rs : rules) {
    for (const Limit& l : rs.limits) {
      if (l.pollutant != pol) continue;
      DailyKind k;
      if (!daily_kind_of(l, k)) {
        notes.push_back(rs.id + " " + l.id + ": " + to_string(l.statistic) +
                        " gives no daily calls; not verified day by day");
        continue;
      }
      limits.emplace_back(&rs, &l);
      bool seen = false;
      for (const DailyKind& e : kinds) seen = seen || e.key() == k.key();
      if (!seen) kinds.push_back(k);
    }
  }
  return kinds;
}

// The hour means of one monitor paired with the model, at the hours the monitor reports.
PairedValues hour_pairs(const MonitorPollutant& m, const std::vector<double>& model,
                        std::size_t n_hours) {
  PairedValues h;
  h.monitor = m.label;
  h.pollutant = m.pollutant;
  h.unit = m.unit;
  h.averaging = "hour means";
  h.level = PairingLevel::hour_means;
  for (std::size_t i = 0; i < n_hours; ++i) {
    if (std::isnan(m.observed[i])) continue;
    h.key.push_back(static_cast<long long>(i));
    h.observed.push_back(m.observed[i]);
    h.modelled.push_back(model[i]);
  }
  return h;
}

// One pollutant's monitors, and what evaluating them produces.
struct PollutantPairs {
  std::vector<std::size_t> monitors;                     // indexes into the monitor list
  std::vector<DailyKind> kinds;                          // the daily kinds paired
  std::vector<std::pair<const RuleSet*, const Limit*>> limits;  // limits with daily calls
  std::vector<std::vector<PairedValues>> daily_by_monitor;      // [monitor][kind]
};

// Hour and daily pairs of each monitor, and pooled over the monitors when there are several.
void add_pairs(const std::vector<MonitorPollutant>& monitors,
               const std::vector<std::vector<double>>& modelled,
               const std::vector<HourRecord>& hours, int off, PollutantPairs& pp,
               ModelEvaluation& ev) {
  const bool pooled = pp.monitors.size() > 1;
  PairedValues all_hours;
  std::vector<PairedValues> all_daily(pp.kinds.size());
  for (std::size_t idx : pp.monitors) {
    const MonitorPollutant& m = monitors[idx];
    PairedValues h = hour_pairs(m, modelled[idx], hours.size());
    if (pooled) append(all_hours, h);
    finish(h);
    ev.pairs.push_back(std::move(h));
    const MaskedPair mp = masked(m, modelled[idx], hours);
    pp.daily_by_monitor.emplace_back();
    for (std::size_t k = 0; k < pp.kinds.size(); ++k) {
      PairedValues d = daily_pairs(m, mp, pp.kinds[k], off);
      if (pooled) append(all_daily[k], d);
      finish(d);
      pp.daily_by_monitor.back().push_back(d);
      ev.pairs.push_back(std::move(d));
    }
    ev.profiles.push_back(profiles_of(m, modelled[idx], hours));
  }
  if (!pooled) return;
  const MonitorPollutant& first = monitors[pp.monitors.front()];
  all_hours.monitor = "all monitors";
  all_hours.pollutant = first.pollutant;
  all_hours.unit = first.unit;
  all_hours.averaging = "hour means";
  finish(all_hours);
  ev.pairs.push_back(std::move(all_hours));
  for (std::size_t k = 0; k < pp.kinds.size(); ++k) {
    PairedValues& d = all_daily[k];
    d.monitor = "all monitors";
    d.pollutant = first.pollutant;
    d.unit = first.unit;
    d.averaging = pp.daily_by_monitor.front()[k].averaging;
    d.level = pp.daily_by_monitor.front()[k].level;
    finish(d);
    ev.pairs.push_back(std::move(d));
  }
}

// Day-by-day exceedance calls of each daily limit, per monitor and pooled.
void add_verifications(const std::vector<MonitorPollutant>& monitors, const PollutantPairs& pp,
                       ModelEvaluation& ev) {
  const bool pooled = pp.monitors.size() > 1;
  for (const auto& [rs, l] : pp.limits) {
    DailyKind k;
    daily_kind_of(*l, k);
    std::size_t which = 0;
    for (std::size_t e = 0; e < pp.kinds.size(); ++e) {
      if (pp.kinds[e].key() == k.key()) which = e;
    }
    RuleVerification pooled_v;
    for (std::size_t j = 0; j < pp.monitors.size(); ++j) {
      RuleVerification v = verify(monitors[pp.monitors[j]], pp.daily_by_monitor[j][which], *rs, *l);
      if (pooled && pooled_v.limit_id.empty()) {
        pooled_v = v;
      } else if (pooled) {
        pooled_v.days.insert(pooled_v.days.end(), v.days.begin(), v.days.end());
        pooled_v.table.a += v.table.a;
        pooled_v.table.b += v.table.b;
        pooled_v.table.c += v.table.c;
        pooled_v.table.d += v.table.d;
      }
      ev.verifications.push_back(std::move(v));
    }
    if (pooled) {
      pooled_v.monitor = "all monitors";
      pooled_v.scores = categorical_scores(pooled_v.table);
      ev.verifications.push_back(std::move(pooled_v));
    }
  }
}

}  // namespace

ModelEvaluation evaluate_against_monitors(const std::vector<MonitorPollutant>& monitors,
                                          const std::vector<std::vector<double>>& modelled,
                                          const std::vector<HourRecord>& hours, int off,
                                          const std::vector<RuleSet>& rules,
                                          const std::string& model_label) {
  if (monitors.size() != modelled.size() || hours.empty()) {
    throw InternalError("evaluate_against_monitors: monitors and model series do not match");
  }
  ModelEvaluation ev;
  ev.model_label = model_label;
  // Pollutants in first-seen order, with their monitors.
  std::vector<std::string> pollutants;
  for (const auto& m : monitors) {
    if (std::find(pollutants.begin(), pollutants.end(), m.pollutant) == pollutants.end()) {
      pollutants.push_back(m.pollutant);
    }
  }
  for (const std::string& pol : pollutants) {
    PollutantPairs pp;
    for (std::size_t k = 0; k < monitors.size(); ++k) {
      if (monitors[k].pollutant == pol) pp.monitors.push_back(k);
    }
    pp.kinds = daily_kinds_of(pol, rules, pp.limits, ev.notes);
    add_pairs(monitors, modelled, hours, off, pp, ev);
    add_verifications(monitors, pp, ev);
  }
  return ev;
}

ModelEvaluation evaluate_run(const CaseSpec& c, const RunResult& r,
                             const std::vector<MonitorPollutant>& monitors,
                             const std::vector<RuleSet>& rules) {
  std::vector<std::vector<double>> modelled;
  for (const auto& m : monitors) modelled.push_back(model_total(c, r, m.case_index));
  return evaluate_against_monitors(monitors, modelled, r.hours, c.zone.standard_offset_s(), rules,
                                   "run of " + c.file);
}

}  // namespace lidbox
