// What an ensemble run writes beside the deterministic run's files, rendered in memory:
//   ensemble_hourly.csv    per hour: each pollutant's percentiles over the members of the hour
//                          means and the member mean, in the reporting unit
//   ensemble_days.csv      per rule and LST day: members counted, members exceeding, the
//                          probability by member counting (and kernel-dressed, when asked)
//   ensemble.nc            CF-NetCDF: per-member hour means on a `realization` dimension, the
//                          percentiles and the member mean, the daily probabilities per rule
//   ensemble_episodes.csv  per alert rule: members with an episode, the probability, and the
//                          spread of the first episode's start and length
// and a summary section with the headline and the caution that a finite ensemble proves neither
// 0 % nor 100 %.
#pragma once

#include <string>
#include <vector>

#include "lidbox/analysis/ensemble_statistics.hpp"
#include "lidbox/base/atomic_file.hpp"

namespace lidbox {

std::string render_ensemble_hourly_csv(const CaseSpec& c, const EnsembleOutcome& e);
std::string render_ensemble_days_csv(const EnsembleOutcome& e);
std::string render_ensemble_episodes_csv(const EnsembleOutcome& e);
// ensemble.nc's bytes.
std::string render_ensemble_netcdf(const CaseSpec& c, const EnsembleOutcome& e);
// The summary section (ends with a newline).
std::string render_ensemble_summary(const CaseSpec& c, const EnsembleOutcome& e);

// The files above.
std::vector<OutputFile> render_ensemble_outputs(const CaseSpec& c, const EnsembleOutcome& e);

}  // namespace lidbox
