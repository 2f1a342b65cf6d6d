#include "lidbox/analysis/ensemble_verification.hpp"

#include <cmath>
#include <map>
#include <tuple>

namespace lidbox {

std::vector<EnsembleRuleVerification> verify_ensemble(const ModelEvaluation& det,
                                                      const EnsembleRules& ens,
                                                      std::uint64_t seed) {
  // The ensemble's days by rule and day.
  std::map<std::tuple<std::string, std::string, std::int64_t>, const EnsembleDay*> days;
  for (const EnsembleDay& d : ens.days) {
    if (!d.alert) days[{d.rule_set_id, d.rule_id, d.day}] = &d;
  }
  std::vector<EnsembleRuleVerification> out;
  for (const RuleVerification& v : det.verifications) {
    if (v.monitor == "all monitors") continue;
    std::vector<double> p;
    std::vector<int> o;
    std::vector<std::vector<double>> members;
    std::vector<double> observed;
    int m = 0;
    for (const DayCall& call : v.days) {
      const auto it = days.find({v.rule_set_id, v.limit_id, call.day});
      if (it == days.end() || it->second->members == 0) continue;
      const EnsembleDay& d = *it->second;
      p.push_back(d.probability);
      o.push_back(call.observed_exceeded ? 1 : 0);
      m = std::max(m, static_cast<int>(d.member_values.size()));
      bool complete = !d.member_values.empty();
      for (double x : d.member_values) complete = complete && !std::isnan(x);
      if (complete) {
        members.push_back(d.member_values);
        observed.push_back(call.observed);
      }
    }
    if (p.empty()) continue;
    EnsembleRuleVerification r;
    r.monitor = v.monitor;
    r.rule_set_id = v.rule_set_id;
    r.limit_id = v.limit_id;
    r.pollutant = v.pollutant;
    r.statistic = v.statistic;
    r.unit = v.unit;
    r.level = v.level;
    r.members = m;
    const std::string where = v.monitor + " " + v.rule_set_id + " " + v.limit_id;
    r.brier = brier_decomposition(p, o, where);
    if (!members.empty()) {
      r.rank_histogram = rank_histogram(members, observed, seed, where);
      r.days_ranked = members.size();
    }
    out.push_back(std::move(r));
  }
  return out;
}

}  // namespace lidbox
