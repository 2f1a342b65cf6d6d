// The exact emission cut: the largest scale of chosen emissions, from a chosen start hour, that
// brings each exceeded daily rule back to its level, computed from the linear parts of the runs
// with no trial runs.
//
// Linearity (physics note section 6): every hour mean is C = F + a G, where G is what the chosen
// sectors emit from the start hour on and F everything else (background, initial state, other
// sectors, and the chosen sectors before the start). Two runs per met give both: the case as it is
// (F + G) and the case with the chosen sectors at scale 0 from the start (F). Every element of a
// rule (rule_days.hpp) is linear too: e(a) = e_F + a e_G.
//
// Per rule and LST day on which the target exceeds (B = rounding_boundary(level, rounding), the
// largest value that rounds to at most the level):
//   limit, one run          a* = min over the day's elements with e_G > 0 of (B - e_F) / e_G
//                          (physics note section 6: s* = min over windows of
//                          (limit - avg_background) / avg_emissions)
//   alert, one run          with a_i = (T - e_F,i) / e_G,i (the scale at which element i stops
//                          being above), no episode of P consecutive elements touches the day
//                          when a <= min over P-windows W touching the day of max_{i in W} a_i
//   at most k of N members  the (k+1)-th smallest member a* (an order statistic over members)
//   percentile q of members the q-th percentile (percentile_linear) over members of the day's
//                          value is increasing in a: bisection on the linear parts (limits only)
// The whole-run row is the smallest a* over the days. A scale below 0 cannot be reached by
// cutting: the rest alone (F) exceeds, and the row says so with F's statistic and its share of
// the level. Each computation is repeated for all sectors from the same start.
//
// A scale a means: multiply the chosen sectors' emissions by a from the start hour; the cut is
// 1 - a. Reports round the cut UP to 0.1 % so that the printed cut suffices.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/standards/rule_set.hpp"

namespace lidbox {

// One way of cutting (the chosen sectors, or all sectors).
struct CutScale {
  bool feasible = true;
  double scale = 1.0;       // the largest scale that meets the level (feasible)
  double rest_value = 0.0;  // the target's statistic from the rest alone (scale 0), rule unit
};

struct CutRow {
  std::string rule_set_id;
  std::string rule_id;
  bool alert = false;
  std::string pollutant;  // canonical
  std::string statistic;
  std::string unit;
  double level = 0.0;
  double boundary = 0.0;    // rounding boundary (the level for alerts and unrounded limits)
  bool whole_run = false;   // the row for every day of the run
  std::int64_t day = 0;     // LST day (not whole_run)
  double value = kMissing;  // the target's statistic now (limits with one run or a percentile)
  CutScale chosen;
  CutScale all;
};

struct EmissionCut {
  CutRequest request;
  UtcSeconds start_utc = 0;
  std::string sectors_label;         // "home_heating", "home_heating and traffic"
  std::vector<CutRow> rows;          // rows of one rule: its days, then its whole-run row
  std::vector<std::string> skipped;  // rules the cut does not handle, with the reason
};

// The runs a cut is computed on: the target's met (one run, or every member) and the case.
// `member_met` is the ensemble's met (empty without an ensemble); InputError for a start outside
// the run (at [cut] start) and for a target that does not fit the ensemble (at [cut] target).
EmissionCut compute_emission_cut(const CaseSpec& c, const MetSeries& deterministic,
                                 const std::vector<MetSeries>& member_met,
                                 const std::vector<RuleSet>& rule_sets);

}  // namespace lidbox
