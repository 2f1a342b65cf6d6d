// A run's hour means judged by the rule sets its case names: the same averaging, limits, indices
// and episodes as for observed data (standards_report.hpp), so modelled and observed tables
// compare line by line.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/standards/standards_report.hpp"

namespace lidbox {

// The run's mixed-layer hour means as named series in each pollutant's reporting unit, under the
// standards' canonical names ("PM25" -> "PM2.5"). Pollutants the standards do not know are
// left out and listed in `skipped`.
NamedSeries run_series(const CaseSpec& c, const RunResult& r, std::vector<std::string>* skipped);

// Computes the standards report for a run; nullopt when the case names no rule sets.
// `issue_time_override` replaces the case's issue time (command line).
std::optional<StandardsReport> run_standards(const CaseSpec& c, const RunResult& r,
                                             std::optional<UtcSeconds> issue_time_override);

// A few lines for the printed summary: limits exceeded per rule set, values above a level
// (an annual value above its level in an incomplete year said as such), rule sets that judge
// none of the pollutants, pollutants no rule set judges, alert episodes.
std::string standards_summary(const StandardsReport& report);

}  // namespace lidbox
