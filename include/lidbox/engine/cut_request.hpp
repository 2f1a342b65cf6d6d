// What a forecaster asks the exact emission cut (emission_cut.hpp) for: which sectors to cut,
// from when, and on which run the rules must be met.
//
// Case file:
//   [cut]
//   sectors = ["home_heating"]              # the sectors to cut; "all sectors" is always given too
//   start = "2026-01-14T18:00:00-07:00"     # the start of an hour of the run (default: the first)
//   target = "deterministic"                # the [met] run (default), or
//   target = { member = 3 }                 # the 3rd ensemble member (1-based, ensemble order), or
//   target = { percentile = 90 }            # the 90th percentile over the members of each day's
//                                           # rule statistic, or
//   target = { at_most_members = 2 }        # at most 2 members still exceeding
// A cut and a [scenario] in one case are refused: the cut is computed on the case as it is.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "lidbox/base/time.hpp"
#include "lidbox/base/toml_table.hpp"

namespace lidbox {

enum class CutTargetKind { deterministic, member, percentile, at_most_members };

struct CutTarget {
  CutTargetKind kind = CutTargetKind::deterministic;
  std::size_t member = 0;   // 1-based position in the ensemble (kind member)
  double percentile = 0.0;  // in [0, 100] (kind percentile)
  int at_most_members = 0;  // >= 0 (kind at_most_members)
};

// "the deterministic run", "member 3", "the 90th percentile of the members",
// "at most 2 members exceeding"
std::string describe(const CutTarget& t);

struct CutRequest {
  std::vector<std::size_t> sectors;     // indices into CaseSpec::sectors, as named
  std::optional<UtcSeconds> start_utc;  // none: the first hour of the run
  CutTarget target;
  std::string start_where;   // "<file>:<line>: [cut] start"
  std::string target_where;  // "<file>:<line>: [cut] target"
};

// The [cut] table, when present. `has_ensemble` says whether the case has an [ensemble] table
// (a member, percentile or count target needs one); `ensemble_size` is its member count when
// known from the case file (0 otherwise), so a member past the end is reported here.
std::optional<CutRequest> read_cut_request(const TomlTable& top,
                                           const std::vector<std::string>& sector_names,
                                           const TimeZone& zone, bool has_ensemble,
                                           std::size_t ensemble_size);

// InputError at target_where when the target does not fit an ensemble of n members.
void check_cut_target(const CutRequest& cut, std::size_t n_members);

}  // namespace lidbox
