// Ensemble runs: the case's box run once per member of a met ensemble ([ensemble] in the case,
// ensemble_spec.hpp), the members stepped side by side on threads. Every member is read with the
// [met] table's settings (reading, hour label, gap rule, NetCDF variables) and must share the time
// axis of the [met] file, which stays the deterministic run; members differ only in their met and
// what follows from it (backgrounds by wind direction, floors).
#pragma once

#include <cstddef>
#include <functional>
#include <string>
#include <vector>

#include "lidbox/engine/run.hpp"

namespace lidbox {

// The members' met, in order, with a label for each ("m01.csv", or "member 3" of a NetCDF file).
struct EnsembleMet {
  std::vector<std::string> labels;
  std::vector<MetSeries> members;
};

// Reads every member (in the calling thread: the unit library is not known to be thread-safe)
// and checks that each has the time axis of `deterministic` (the [met] file): an InputError
// naming the member file otherwise, and one at [ensemble] members for fewer than 2 members.
// The case must have an [ensemble] table (InternalError otherwise).
EnsembleMet read_ensemble_met(const CaseSpec& c, const MetSeries& deterministic);

// Runs the case on each member's met, `threads` members at a time (0: as many as the machine
// has cores). Results in member order, each equal to run_case on that member alone. `progress`,
// when given, is called with the fraction of members done, from whichever thread finished one,
// one call at a time. An error in any member is rethrown (the lowest member's) after every
// thread has stopped.
std::vector<RunResult> run_ensemble(const CaseSpec& c, const std::vector<MetSeries>& members,
                                    unsigned threads = 0,
                                    const std::function<void(double)>& progress = {});

}  // namespace lidbox
