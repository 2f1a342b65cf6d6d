// What an ensemble says: percentiles of the members' hour means, and per day and rule how many
// members exceed and how probable an exceedance is.
//
// Percentiles: the linear interpolation between order statistics that numpy.percentile uses by
// default (method "linear", Hyndman and Fan 1996 definition 7): with the N values sorted,
// h = (N - 1) q / 100 and P(q) = x[floor h] + (h - floor h) (x[floor h + 1] - x[floor h]).
//
// Member counting: P = k / N with k members exceeding [ECMWF forecast user guide]. A finite
// ensemble does not prove 0 % or 100 %: every report says so beside the numbers.
//
// Kernel dressing (optional): each member value x_k becomes a normal distribution N(x_k, s^2)
// with s^2 = (4 / (3 N))^(2/5) var(x), var with divisor N - 1 (Silverman's rule of thumb,
// Silverman 1986; the same bandwidth as scipy.stats.gaussian_kde(bw_method="silverman")), and
//   P(x > t) = (1/N) sum_k (1 - Phi((t - x_k) / s)).
// When all members agree (var = 0) the kernels collapse and P is the member count.
// The threshold t is the rule's rounding boundary (rule_days.hpp): the probability that the
// value, rounded as the rule says, is above the level.
//
// Multi-day events: the episode rule is applied to each member first, then members are counted
// [ECMWF forecast user guide, section 7.1.2]; probabilities of episodes are never combined from
// daily probabilities.
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "lidbox/engine/case_file.hpp"
#include "lidbox/base/percentile.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/standards/rule_set.hpp"

namespace lidbox {


// Silverman's bandwidth s (see above) and the dressed probability of exceeding t.
double silverman_bandwidth(const std::vector<double>& x);
double kernel_exceedance_probability(const std::vector<double>& x, double t);

// Percentiles over the members of every hour mean, per pollutant, in g m-3.
class EnsemblePercentiles {
 public:
  EnsemblePercentiles(const std::vector<RunResult>& members, std::vector<double> percentiles);

  [[nodiscard]] const std::vector<double>& percentiles() const { return q_; }
  [[nodiscard]] std::size_t hours() const { return n_hours_; }
  [[nodiscard]] std::size_t pollutants() const { return n_pollutants_; }
  [[nodiscard]] std::size_t members() const { return n_members_; }
  // The k-th percentile (index into percentiles()) of pollutant p in hour i [g m-3].
  [[nodiscard]] double value(std::size_t hour, std::size_t p, std::size_t k) const {
    return values_[(hour * n_pollutants_ + p) * q_.size() + k];
  }
  // Mean over the members [g m-3].
  [[nodiscard]] double mean(std::size_t hour, std::size_t p) const {
    return mean_[hour * n_pollutants_ + p];
  }

 private:
  std::vector<double> q_;
  std::size_t n_hours_ = 0, n_pollutants_ = 0, n_members_ = 0;
  std::vector<double> values_;
  std::vector<double> mean_;
};

// One rule on one LST day over the ensemble.
struct EnsembleDay {
  std::string rule_set_id;
  std::string rule_id;
  bool alert = false;        // an alert rule: "exceeding" means an episode is under way that day
  std::string pollutant;     // canonical name
  std::string statistic;     // the rule's statistic (to_string(StatisticKind))
  std::string unit;          // the rule's unit
  double level = 0.0;        // level or threshold
  std::int64_t day = 0;      // LST day number
  int members = 0;           // members whose day counts (complete)
  int exceeding = 0;         // of those, how many exceed (limits: rounded value > level)
  double probability = 0.0;  // exceeding / members
  double kernel_probability = kMissing;  // kernel-dressed, when asked for (limits only)
  std::vector<double> member_values;     // limits: each member's day value (NaN if incomplete)
};

// One alert rule over the ensemble: how many members have an episode, and the spread of the
// first episode's start and length among them.
struct EnsembleEpisodes {
  std::string rule_set_id;
  std::string rule_id;
  std::string level_name;
  std::string pollutant;
  int members = 0;
  int with_episode = 0;
  double probability = 0.0;
  // Over the members with an episode (NaN / 0 without any): first start, UTC seconds as double.
  double first_start_earliest = kMissing, first_start_median = kMissing,
         first_start_latest = kMissing;
  double length_h_min = kMissing, length_h_median = kMissing, length_h_max = kMissing;
  std::vector<double> member_first_start;  // per member; NaN without an episode
  std::vector<double> member_first_length_h;
};

struct EnsembleRules {
  std::vector<EnsembleDay> days;
  std::vector<EnsembleEpisodes> episodes;
  std::vector<std::string> skipped;  // "us-naaqs PM2.5-annual: annual statistic", ...
};

// The hour means of pollutant p of a run as a series in its reporting unit.
HourlySeries member_series(const CaseSpec& c, const RunResult& r, std::size_t p);

// Per day and rule, and per alert rule, over the members (each with >= 2 members).
EnsembleRules ensemble_rules(const CaseSpec& c, const std::vector<RunResult>& members,
                             const std::vector<RuleSet>& rule_sets, bool kernel_dressing);

// A whole ensemble forecast: the members read (ensemble.hpp), run side by side, and judged.
struct EnsembleOutcome {
  std::vector<std::string> labels;  // per member
  std::vector<MetSeries> member_met;
  std::vector<RunResult> members;
  EnsemblePercentiles percentiles;
  EnsembleRules rules;
  bool kernel_dressing = false;
};

// The case must have an [ensemble] table; `deterministic` is the [met] file's series (the time
// axis every member must share). `progress` gets the fraction of members run.
EnsembleOutcome forecast_ensemble(const CaseSpec& c, const MetSeries& deterministic,
                                  const std::vector<RuleSet>& rule_sets,
                                  const std::function<void(double)>& progress = {});

}  // namespace lidbox
