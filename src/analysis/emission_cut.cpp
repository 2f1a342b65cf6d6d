#include "lidbox/analysis/emission_cut.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

#include "lidbox/analysis/ensemble_statistics.hpp"
#include "lidbox/analysis/rule_days.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/engine/ensemble.hpp"
#include "lidbox/standards/pollutant.hpp"

namespace lidbox {

namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

// One run's rule elements split into the rest (F) and the cut part (G).
struct Split {
  RuleDays f;
  RuleDays g;
};

// Hourly series of pollutant p of the rest and of the cut part, in its reporting unit.
struct RunParts {
  std::vector<HourlySeries> rest;  // [p]
  std::vector<HourlySeries> cut;   // [p]
};

RunParts parts_of(const CaseSpec& c, const RunResult& full, const RunResult& rest) {
  RunParts out;
  for (std::size_t p = 0; p < c.pollutants.size(); ++p) {
    HourlySeries f = member_series(c, rest, p);
    HourlySeries g = member_series(c, full, p);
    for (std::size_t i = 0; i < g.values.size(); ++i) g.values[i] -= f.values[i];
    out.rest.push_back(std::move(f));
    out.cut.push_back(std::move(g));
  }
  return out;
}

// The scale at which element i stops exceeding b: +inf when it never does, -inf when the rest
// alone exceeds and the cut part cannot help.
double element_scale(double f, double g, double b) {
  if (std::isnan(f) || std::isnan(g)) return kInf;
  if (g > 0.0) return (b - f) / g;
  return f > b ? -kInf : kInf;
}

// Limit, one run, day d: the largest scale keeping every element of the day at or under b.
double limit_day_scale(const Split& s, std::size_t d, double b) {
  double a = kInf;
  for (std::size_t j = s.f.day_begin[d]; j < s.f.day_end[d]; ++j)
    a = std::min(a, element_scale(s.f.element[j], s.g.element[j], b));
  return a;
}

// Alert, one run: for each day the largest scale with no episode touching it.
std::vector<double> alert_day_scales(const Split& s, const AlertRule& a) {
  const std::size_t n = s.f.element.size();
  const auto P = static_cast<std::size_t>(a.persistence);
  std::vector<double> ai(n);
  for (std::size_t i = 0; i < n; ++i)
    ai[i] = element_scale(s.f.element[i], s.g.element[i], a.threshold);
  // w[j] = max of ai over the window [j, j + P): the scale above which that window is all above.
  std::vector<double> w(n >= P ? n - P + 1 : 0, -kInf);
  for (std::size_t j = 0; j < w.size(); ++j) {
    for (std::size_t i = j; i < j + P; ++i) w[j] = std::max(w[j], ai[i]);
  }
  std::vector<double> out(s.f.days(), kInf);
  for (std::size_t d = 0; d < s.f.days(); ++d) {
    if (s.f.day_end[d] <= s.f.day_begin[d]) continue;
    const std::size_t lo = s.f.day_begin[d] + 1 >= P ? s.f.day_begin[d] + 1 - P : 0;
    for (std::size_t j = lo; j < s.f.day_end[d] && j < w.size(); ++j)
      out[d] = std::min(out[d], w[j]);
  }
  return out;
}

double day_value(const RuleDays& f, const RuleDays& g, std::size_t d, double a) {
  double m = kMissing;
  for (std::size_t j = f.day_begin[d]; j < f.day_end[d]; ++j) {
    const double v = f.element[j] + a * g.element[j];
    if (!std::isnan(v) && !(v <= m)) m = v;
  }
  return m;
}

// The q-th percentile over members of the day's value at scale a.
double percentile_at(const std::vector<Split>& runs, std::size_t d, double q, double a) {
  std::vector<double> x;
  for (const Split& s : runs) x.push_back(day_value(s.f, s.g, d, a));
  return percentile_linear(x, q);
}

// Percentile target: phi(a) rises with a (every member's value does, G >= 0), so bisection.
CutScale percentile_scale(const std::vector<Split>& runs, std::size_t d, double q, double b) {
  CutScale cs;
  cs.rest_value = percentile_at(runs, d, q, 0.0);
  if (cs.rest_value > b) {
    cs.feasible = false;
    cs.scale = kMissing;
    return cs;
  }
  double lo = 0.0, hi = 1.0;
  for (int it = 0; it < 200 && hi - lo > 1e-15 * hi; ++it) {
    const double mid = 0.5 * (lo + hi);
    (percentile_at(runs, d, q, mid) > b ? hi : lo) = mid;
  }
  cs.scale = lo;
  return cs;
}

double kth_smallest(std::vector<double> v, std::size_t k) {
  std::nth_element(v.begin(), v.begin() + static_cast<long>(k), v.end());
  return v[k];
}

CutScale from_scale(double a, double rest) {
  CutScale cs;
  cs.rest_value = rest;
  cs.feasible = a >= 0.0;
  cs.scale = cs.feasible ? std::min(a, 1.0) : kMissing;
  return cs;
}

double rest_max(const Split& s, std::size_t d) {
  return s.f.day_max(d);
}

// Per day: the scale and rest value for the target over the runs (one run unless the target is
// an ensemble count or percentile). `day_scale(run, d)` is a run's own scale for day d.
template <class DayScale>
CutScale target_scale(const CutTarget& t, const std::vector<Split>& runs, std::size_t d, double b,
                      bool alert, DayScale day_scale) {
  if (t.kind == CutTargetKind::percentile) {
    if (alert) return CutScale{false, kMissing, kMissing};
    return percentile_scale(runs, d, t.percentile, b);
  }
  if (t.kind == CutTargetKind::at_most_members) {
    std::vector<double> a, rest;
    for (std::size_t m = 0; m < runs.size(); ++m) {
      a.push_back(day_scale(m, d));
      rest.push_back(rest_max(runs[m], d));
    }
    const auto k = static_cast<std::size_t>(t.at_most_members);
    const double rest_k = kth_smallest(rest, rest.size() - 1 - k);  // the (k+1)-th highest
    return from_scale(kth_smallest(a, k), rest_k);
  }
  return from_scale(day_scale(0, d), rest_max(runs.front(), d));
}

// The target's value now (scale 1) for a limit's day.
double value_now(const CutTarget& t, const std::vector<Split>& runs, std::size_t d) {
  if (t.kind == CutTargetKind::percentile) return percentile_at(runs, d, t.percentile, 1.0);
  if (t.kind == CutTargetKind::at_most_members) {
    std::vector<double> v;
    for (const Split& s : runs) v.push_back(day_value(s.f, s.g, d, 1.0));
    return kth_smallest(v, v.size() - 1 - static_cast<std::size_t>(t.at_most_members));
  }
  return day_value(runs.front().f, runs.front().g, d, 1.0);
}

std::string sectors_label(const CaseSpec& c, const std::vector<std::size_t>& idx) {
  std::vector<std::string> names;
  for (std::size_t k : idx) names.push_back(c.sectors[k].name);
  if (names.size() == 1) return names.front();
  const std::string last = names.back();
  names.pop_back();
  return join(names) + " and " + last;
}

// Which runs the target needs, cut as `scenario_case` says (chosen or all sectors at 0).
std::vector<RunParts> target_parts(const CaseSpec& c, const CaseSpec& zeroed,
                                   const std::vector<MetSeries>& mets) {
  const std::vector<RunResult> full = run_ensemble(c, mets);
  const std::vector<RunResult> rest = run_ensemble(zeroed, mets);
  std::vector<RunParts> out;
  for (std::size_t m = 0; m < mets.size(); ++m) out.push_back(parts_of(c, full[m], rest[m]));
  return out;
}

CaseSpec zeroed_case(const CaseSpec& c, const std::vector<std::size_t>& sectors, UtcSeconds start) {
  CaseSpec z = c;
  z.cut.reset();
  EmissionScenario s;
  s.start_utc = start;
  s.sector_scale.assign(c.sectors.size(), 1.0);
  for (std::size_t k : sectors) s.sector_scale[k] = 0.0;
  s.where = c.cut->start_where;
  z.scenario = s;
  return z;
}

template <class Rule>
std::vector<Split> splits(const CaseSpec& c, const std::vector<RunParts>& parts, const Rule& rule,
                          std::size_t p, const RuleSet& rs) {
  const double f =
      unit_factor(c.pollutants[p].unit.canonical, rule.unit, rule.pollutant, rs.reference,
                  rule.where + ": rule \"" + rule.id + "\" for " + c.pollutants[p].name);
  const int off = c.zone.standard_offset_s();
  std::vector<Split> out;
  for (const RunParts& rp : parts)
    out.push_back({rule_days(rule, rp.rest[p], f, off), rule_days(rule, rp.cut[p], f, off)});
  return out;
}

template <class Rule>
CutRow row_of(const RuleSet& rs, const Rule& rule, bool alert, double level, double boundary) {
  CutRow r;
  r.rule_set_id = rs.id;
  r.rule_id = rule.id;
  r.alert = alert;
  r.pollutant = rule.pollutant;
  r.statistic = to_string(rule.statistic);
  r.unit = rule.unit;
  r.level = level;
  r.boundary = boundary;
  return r;
}

// The whole-run row: the smallest scale of the days (an infeasible day makes it infeasible).
CutScale whole_run(const std::vector<CutScale>& days) {
  CutScale w;
  w.rest_value = -kInf;
  for (const CutScale& d : days) {
    w.rest_value = std::max(w.rest_value, d.rest_value);
    if (!d.feasible) w.feasible = false;
    if (w.feasible) w.scale = std::min(w.scale, d.scale);
  }
  if (!w.feasible) w.scale = kMissing;
  return w;
}

// Appends the whole-run row when more than one day needed a cut.
template <class Rule>
void add_whole_run_row(const RuleSet& rs, const Rule& rule, bool alert, double level,
                       double boundary, const std::vector<CutScale>& day_c,
                       const std::vector<CutScale>& day_a, EmissionCut& out) {
  if (day_c.size() <= 1) return;
  CutRow r = row_of(rs, rule, alert, level, boundary);
  r.whole_run = true;
  r.chosen = whole_run(day_c);
  r.all = whole_run(day_a);
  out.rows.push_back(r);
}

// The parts of the target's runs with all emissions and with the cut sectors zeroed.
struct CutParts {
  std::vector<RunParts> chosen;  // the chosen sectors zeroed from the start
  std::vector<RunParts> all;     // every sector zeroed from the start
};

// One row per complete day above a daily limit's rounding boundary, then the whole run.
void add_limit_rows(const CaseSpec& c, const CutParts& parts, const RuleSet& rs, const Limit& l,
                    std::size_t p, EmissionCut& out) {
  const CutTarget& t = c.cut->target;
  if (!daily_rule(l)) {
    out.skipped.push_back(rs.id + " " + l.id + " (" + to_string(l.statistic) +
                          ", not a daily statistic)");
    return;
  }
  const double b = rounding_boundary(l.level, l.rounding);
  const auto sc = splits(c, parts.chosen, l, p, rs);
  const auto sa = splits(c, parts.all, l, p, rs);
  std::vector<CutScale> day_c, day_a;
  for (std::size_t d = 0; d < sc.front().f.days(); ++d) {
    bool complete = true;
    for (const Split& s : sc) complete = complete && s.f.day_complete[d];
    if (!complete) continue;
    const double now = value_now(t, sc, d);
    if (!(now > b)) continue;
    CutRow r = row_of(rs, l, false, l.level, b);
    r.day = sc.front().f.first_day + static_cast<std::int64_t>(d);
    r.value = now;
    r.chosen = target_scale(t, sc, d, b, false, [&](std::size_t m, std::size_t dd) {
      return limit_day_scale(sc[m], dd, b);
    });
    r.all = target_scale(t, sa, d, b, false, [&](std::size_t m, std::size_t dd) {
      return limit_day_scale(sa[m], dd, b);
    });
    day_c.push_back(r.chosen);
    day_a.push_back(r.all);
    out.rows.push_back(r);
  }
  add_whole_run_row(rs, l, false, l.level, b, day_c, day_a, out);
}

// One row per day with an episode of the alert rule, then the whole run.
void add_alert_rows(const CaseSpec& c, const CutParts& parts, const RuleSet& rs,
                    const AlertRule& a, std::size_t p, EmissionCut& out) {
  const CutTarget& t = c.cut->target;
  if (t.kind == CutTargetKind::percentile) {
    out.skipped.push_back(rs.id + " " + a.id +
                          " (an episode has no value to take a percentile of: use "
                          "at_most_members)");
    return;
  }
  const auto sc = splits(c, parts.chosen, a, p, rs);
  const auto sa = splits(c, parts.all, a, p, rs);
  std::vector<std::vector<double>> ac, aa;
  for (const Split& s : sc) ac.push_back(alert_day_scales(s, a));
  for (const Split& s : sa) aa.push_back(alert_day_scales(s, a));
  std::vector<CutScale> day_c, day_a;
  for (std::size_t d = 0; d < sc.front().f.days(); ++d) {
    CutRow r = row_of(rs, a, true, a.threshold, a.threshold);
    r.day = sc.front().f.first_day + static_cast<std::int64_t>(d);
    r.chosen = target_scale(t, sc, d, a.threshold, true,
                            [&](std::size_t m, std::size_t dd) { return ac[m][dd]; });
    if (r.chosen.feasible && r.chosen.scale >= 1.0) continue;  // no episode that day now
    r.all = target_scale(t, sa, d, a.threshold, true,
                         [&](std::size_t m, std::size_t dd) { return aa[m][dd]; });
    day_c.push_back(r.chosen);
    day_a.push_back(r.all);
    out.rows.push_back(r);
  }
  add_whole_run_row(rs, a, true, a.threshold, a.threshold, day_c, day_a, out);
}

// The met of the runs the target looks at: the deterministic run, one member, or all members.
std::vector<MetSeries> target_mets(const CutRequest& cut, const MetSeries& deterministic,
                                   const std::vector<MetSeries>& member_met) {
  const CutTarget& t = cut.target;
  if (t.kind == CutTargetKind::deterministic) return {deterministic};
  check_cut_target(cut, member_met.size());
  if (t.kind == CutTargetKind::member) return {member_met.at(t.member - 1)};
  return member_met;
}

}  // namespace

EmissionCut compute_emission_cut(const CaseSpec& c, const MetSeries& deterministic,
                                 const std::vector<MetSeries>& member_met,
                                 const std::vector<RuleSet>& rule_sets) {
  if (!c.cut) throw InternalError("compute_emission_cut on a case without [cut]");
  EmissionCut out;
  out.request = *c.cut;
  const std::vector<MetSeries> mets = target_mets(*c.cut, deterministic, member_met);
  const UtcSeconds first =
      deterministic.first_stamp_utc -
      (c.met.reading == MetReading::hour_average && c.met.hour_label == HourLabel::period_end
           ? kSecondsPerHour
           : 0);
  const std::size_t n_hours =
      c.met.reading == MetReading::instantaneous ? deterministic.size() - 1 : deterministic.size();
  out.start_utc = c.cut->start_utc.value_or(first);
  hour_index_in_run(out.start_utc, first, n_hours, c.cut->start_where);
  out.sectors_label = sectors_label(c, c.cut->sectors);
  std::vector<std::size_t> every(c.sectors.size());
  for (std::size_t k = 0; k < every.size(); ++k) every[k] = k;
  const CutParts parts{target_parts(c, zeroed_case(c, c.cut->sectors, out.start_utc), mets),
                       target_parts(c, zeroed_case(c, every, out.start_utc), mets)};
  std::map<std::string, std::size_t> pollutants;
  for (std::size_t p = 0; p < c.pollutants.size(); ++p) {
    if (const PollutantInfo* info = find_pollutant(c.pollutants[p].name))
      pollutants[info->name] = p;
  }
  for (const RuleSet& rs : rule_sets) {
    for (const Limit& l : rs.limits) {
      const auto it = pollutants.find(l.pollutant);
      if (it != pollutants.end()) add_limit_rows(c, parts, rs, l, it->second, out);
    }
    for (const AlertRule& a : rs.alerts) {
      const auto it = pollutants.find(a.pollutant);
      if (it != pollutants.end()) add_alert_rows(c, parts, rs, a, it->second, out);
    }
  }
  return out;
}

}  // namespace lidbox
