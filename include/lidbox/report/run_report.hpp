// What a run writes: the hourly table, the budget table, a summary and a chart, as text in
// memory (written atomically by atomic_file.hpp). Units are in every column header.
#pragma once

#include <string>
#include <vector>

#include "lidbox/base/atomic_file.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/report/standards_tables.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

// hourly.csv: one row per hour (period start/end in UTC and local civil time; met used with
// flags; ventilation coefficient; flushing time; per pollutant the hour mean, end-of-hour mixed
// and residual values and the parts from the background, the initial state and each sector).
std::string render_hourly_csv(const CaseSpec& c, const RunResult& r);
// budget.csv: one row per hour and pollutant, every budget line in g/h over the footprint, the
// masses at the end of the hour in g and the cumulative closure in g.
std::string render_budget_csv(const CaseSpec& c, const RunResult& r);
// The short text summary (also printed by the command line), with the standards' verdicts when
// the case names rule sets.
std::string render_summary(const CaseSpec& c, const MetSeries& met, const RunResult& r,
                           const StandardsReport* standards = nullptr);
// chart.svg: mixing height and wind, then each pollutant's hour means stacked by part.
std::string render_chart_svg(const CaseSpec& c, const RunResult& r);

// Every file of a run: the four above, then the standards tables and reports (limits.csv,
// daily.csv, periods.csv, aqi.csv, aqhi.csv, episodes.csv, report.md, report.json) when given.
std::vector<OutputFile> render_run_outputs(const CaseSpec& c, const MetSeries& met, const RunResult& r,
                                           const StandardsReport* standards = nullptr);

}  // namespace lidbox
