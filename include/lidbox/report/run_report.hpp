// What a run writes: the hourly table, the budget table, a summary and a chart, published as one
// set by output_folder.hpp. Units are in every column header.
#pragma once

#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "lidbox/base/atomic_file.hpp"
#include "lidbox/base/output_folder.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/report/netcdf_writer.hpp"
#include "lidbox/report/standards_tables.hpp"

namespace lidbox {

class RowPipe;  // src/report/row_pipe.hpp: rows formatted and written on a thread of their own

// hourly.csv: one row per hour (period start/end in UTC and local civil time; met used with
// flags; ventilation coefficient; flushing time; per pollutant the hour mean, end-of-hour mixed
// and residual values and the parts from the background, the initial state and each sector).
void write_hourly_csv(TextFile& f, const CaseSpec& c, const RunResult& r);
// hourly.csv written while the run steps (hour() is called from the run's HourObserver): each
// hour's numbers are copied into blocks that a second thread formats and writes, so the table
// costs the stepping thread little and memory stays bounded. The same bytes as write_hourly_csv.
class HourlyStream {
 public:
  HourlyStream(OutputFolder& folder, const CaseSpec& c);
  ~HourlyStream();
  HourlyStream(const HourlyStream&) = delete;
  HourlyStream& operator=(const HourlyStream&) = delete;
  void hour(const RunResult& r, std::size_t i);
  // After the last hour: waits for the writer and completes the file.
  void close();

 private:
  OutputFolder& folder_;
  const CaseSpec& c_;
  std::unique_ptr<TextFile> csv_;
  std::unique_ptr<RowPipe> pipe_;  // declared after csv_: stopped before the file is dropped
};
// budget.csv: one row per hour and pollutant, every budget line in g/h over the footprint, the
// masses at the end of the hour in g and the cumulative closure in g.
void write_budget_csv(TextFile& f, const CaseSpec& c, const RunResult& r);
// budget.csv, and budget.nc with `netcdf`, written hour by hour while the run steps (hour() is
// the run's HourObserver, RunStreaming in run.hpp), so that the run need not keep its budget.
class BudgetStream {
 public:
  BudgetStream(OutputFolder& folder, const CaseSpec& c, bool netcdf,
               CfFileFormat format = CfFileFormat::netcdf4_classic);
  ~BudgetStream();
  BudgetStream(const BudgetStream&) = delete;
  BudgetStream& operator=(const BudgetStream&) = delete;
  void hour(const RunResult& r, std::size_t i);
  // After the last hour: completes the files.
  void close();

 private:
  static constexpr std::size_t kBlockHours = 4096;  // NetCDF values are put in blocks of hours
  OutputFolder& folder_;
  const CaseSpec& c_;
  bool netcdf_;
  CfFileFormat format_;
  std::unique_ptr<TextFile> csv_;
  std::unique_ptr<RowPipe> pipe_;  // budget.csv's rows, formatted on a thread of their own
  std::unique_ptr<CfStreamWriter> nc_;
  std::vector<double> closure_;  // [p] after the latest hour
  std::size_t per_hour_ = 0;     // NetCDF values per hour
  std::vector<double> row_;      // one hour's NetCDF values
  std::vector<double> block_;    // [variable * kBlockHours + hour in the block]
  std::size_t block_first_ = 0;
};

// The short text summary (also printed by the command line), with the standards' verdicts when
// the case names rule sets.
std::string render_summary(const CaseSpec& c, const MetSeries& met, const RunResult& r,
                           const StandardsReport* standards = nullptr);
// Every file of a run into `folder` (published by the caller) except summary.txt, whose text is
// returned for the caller to complete and write: hourly.csv (unless `hourly_streamed`: an
// HourlyStream wrote it), budget.csv (unless the run streamed it), chart.svg (chart.hpp; unless `chart` is false, for a caller that draws it later with
// more, such as an ensemble's band), then the standards tables and reports (limits.csv,
// daily.csv, periods.csv, aqi.csv, aqhi.csv, episodes.csv, report.md, report.json) when given,
// and the NetCDF files (run_netcdf.hpp) with `netcdf`. Independent files are written on two
// threads.
std::string write_run_outputs(OutputFolder& folder, const CaseSpec& c, const MetSeries& met,
                              const RunResult& r, const StandardsReport* standards, bool netcdf,
                              CfFileFormat format = CfFileFormat::netcdf4_classic,
                              bool chart = true, bool hourly_streamed = false);

// The forecast issue time a run's outputs use: the override (command line), else the case's
// [standards] issue_time, else none.
std::optional<UtcSeconds> run_issue_time(const CaseSpec& c,
                                         std::optional<UtcSeconds> issue_time_override);

struct RunWriteOptions {
  bool netcdf = false;
  CfFileFormat format = CfFileFormat::netcdf4_classic;
  std::optional<UtcSeconds> issue_time;  // overrides the case's [standards] issue_time
  // false: chart.svg is left to the caller (render_run_chart_svg), e.g. to add an ensemble band
  bool chart = true;
  ProgressFn progress;
  std::function<void()> after_run;  // called when the stepping is done (progress, timing)
};

struct RunWritten {
  RunResult result;  // with its budget streamed (RunResult::budget_streamed)
  std::optional<StandardsReport> standards;
  std::string summary;
  std::optional<UtcSeconds> issue_time_utc;  // run_issue_time
};

// A whole run into `folder` (published by the caller): the budget streamed to its files while
// the box steps, then the standards and every other file but summary.txt (write_run_outputs).
RunWritten run_and_write(OutputFolder& folder, const CaseSpec& c, const MetSeries& met,
                         const RunWriteOptions& options);

}  // namespace lidbox
