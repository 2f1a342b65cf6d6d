// The stagnation and ventilation diagnostics rendered: stagnation.csv (one row per local-standard
// day), stagnation_episodes.csv (one row per episode) and a summary section, for `run` and for
// `outlook`. Units are in every column header.
#pragma once

#include <string>
#include <vector>

#include "lidbox/base/atomic_file.hpp"
#include "lidbox/diagnostics/daily_diagnostics.hpp"

namespace lidbox {

// stagnation.csv: date (local standard time), hours in the series, ventilation min / mean /
// afternoon max [m2/s], the table's statistic in its unit and its category, then per scheme
// the verdict (1, 0, empty when not judged) and the day's place in its streak.
std::string render_stagnation_csv(const DiagnosticsSetup& setup, const DiagnosticsResult& r);
// stagnation_episodes.csv: scheme, first and last date, days.
std::string render_episodes_csv(const DiagnosticsSetup& setup, const DiagnosticsResult& r);
// The summary section: days per category, and per scheme the judged and stagnation days, the
// longest streak and the episodes, with each table's and scheme's source and check.
std::string render_diagnostics_summary(const DiagnosticsSetup& setup, const DiagnosticsResult& r);

// Adds stagnation.csv and stagnation_episodes.csv to a run's files and the summary section to
// its summary.txt (which must be there).
void append_diagnostics_outputs(std::vector<OutputFile>& files, const DiagnosticsSetup& setup,
                                const DiagnosticsResult& r);

}  // namespace lidbox
