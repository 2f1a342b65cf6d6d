// An ensemble's daily exceedance probabilities verified against monitors (decisions-references §3
// and §4): for each monitor and each rule with daily calls, over the days the monitor completes,
//   * the Brier score of the member-counting probability k/M with Murphy's decomposition and the
//     reliability table (verification.hpp), the outcome being the monitor's own day call;
//   * the rank histogram of the monitor's day value among the members' day values (days where
//     every member's day is complete; Hamill 2001 on reading it).
// The monitor's day values and calls are those of the deterministic evaluation
// (model_evaluation.hpp: the rule's statistic, unit and rounding); the members' come from
// ensemble_rules (ensemble_statistics.hpp), computed from each member's whole series.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "lidbox/analysis/ensemble_statistics.hpp"
#include "lidbox/analysis/model_evaluation.hpp"

namespace lidbox {

struct EnsembleRuleVerification {
  std::string monitor;
  std::string rule_set_id;
  std::string limit_id;
  std::string pollutant;
  std::string statistic;
  std::string unit;
  double level = 0.0;
  int members = 0;
  BrierDecomposition brier;               // over the days with a monitor call (brier.n of them)
  std::vector<long long> rank_histogram;  // members + 1 bins
  std::size_t days_ranked = 0;
};

// `seed` breaks ties in the rank histogram.
std::vector<EnsembleRuleVerification> verify_ensemble(const ModelEvaluation& deterministic,
                                                      const EnsembleRules& ensemble,
                                                      std::uint64_t seed);

}  // namespace lidbox
