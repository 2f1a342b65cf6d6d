// A run judged against monitors: agreement statistics for hour means, daily means and each rule's
// own daily statistic, mean diurnal and weekly profiles, and verification of the daily exceedance
// calls of every rule (agreement.hpp, verification.hpp).
//
// * Hour means: the pairs of monitor_pairing.hpp, each monitor alone and, with several monitors
//   of one pollutant, all of them together.
// * Daily means and the rules' daily statistics are computed from the PAIRED hours only (the
//   model masked where the monitor has no value), so that both sides average the same hours; a
//   day counts when it is complete by the rule's own completeness (daily means: 18 of 24 hours,
//   as the standards use) in that masked series. Days are LST days of the case's time zone.
// * A rule's daily statistic: daily_mean, daily_max_1h, daily_max_8h_17_windows,
//   daily_max_8h_24_windows as averaging.hpp computes them; an hourly_value rule is verified on
//   the day's highest hour (the day exceeded when any hour was), a k-hour running_mean rule on the
//   day's highest window starting in that day. Annual and seasonal rules give no daily calls and
//   are listed in `notes`.
// * A day is "exceeded" when its value, converted to the rule's unit under the rule set's
//   reference conditions and rounded as the rule says, is above the level (standards_evaluation).
// * Profiles: means of the paired hours by local civil hour (daylight saving included, as the
//   emission clocks) and by local day of the week (Monday first).
#pragma once

#include <array>
#include <string>
#include <vector>

#include "lidbox/analysis/agreement.hpp"
#include "lidbox/analysis/monitor_pairing.hpp"
#include "lidbox/analysis/verification.hpp"
#include "lidbox/standards/rule_set.hpp"

namespace lidbox {

struct PairedValues {
  std::string monitor;    // label of the monitor, or "all monitors"
  std::string pollutant;  // canonical
  std::string unit;       // the case's unit
  std::string averaging;  // "hour means", "daily means", or the rule statistic's name
  PairingLevel level = PairingLevel::hour_means;
  std::vector<long long> key;  // run hour index, or LST day number
  std::vector<double> observed;
  std::vector<double> modelled;
  AgreementStatistics stats;  // valid when observed is not empty
  std::vector<CriterionResult> criteria;
};

struct Profiles {
  std::string monitor;
  std::string pollutant;
  std::string unit;
  std::array<double, 24> hour_observed{}, hour_modelled{};
  std::array<int, 24> hour_count{};
  std::array<double, 7> weekday_observed{}, weekday_modelled{};
  std::array<int, 7> weekday_count{};
};

struct DayCall {
  std::int64_t day = 0;   // LST days since 1970-01-01
  double observed = 0.0;  // in the rule's unit, rounded as the rule says
  double modelled = 0.0;
  bool observed_exceeded = false;
  bool modelled_exceeded = false;
};

struct RuleVerification {
  std::string monitor;  // label, or "all monitors"
  std::string rule_set_id;
  std::string limit_id;
  std::string pollutant;
  std::string statistic;  // the daily value compared
  double level = 0.0;
  std::string unit;  // the rule's unit
  std::string legal_source;
  std::vector<DayCall> days;
  ContingencyTable table;
  CategoricalScores scores;
};

struct ModelEvaluation {
  std::string model_label;  // "run of cindervale.toml", "after the NNLS fit"
  std::vector<PairedValues> pairs;
  std::vector<Profiles> profiles;
  std::vector<RuleVerification> verifications;
  std::vector<std::string> notes;
};

// `modelled[m]` is the model's hour-mean series (per run hour, in monitors[m].unit) that
// monitors[m] is compared with; `hours` the run's hours (stamps and civil offsets).
ModelEvaluation evaluate_against_monitors(const std::vector<MonitorPollutant>& monitors,
                                          const std::vector<std::vector<double>>& modelled,
                                          const std::vector<HourRecord>& hours, int lst_offset_s,
                                          const std::vector<RuleSet>& rules,
                                          const std::string& model_label);

// The same with the run's own totals.
ModelEvaluation evaluate_run(const CaseSpec& c, const RunResult& r,
                             const std::vector<MonitorPollutant>& monitors,
                             const std::vector<RuleSet>& rules);

}  // namespace lidbox
