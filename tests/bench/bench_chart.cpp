// Benchmark (not a test): what chart.svg costs in a run. Steps the case once, then times
// render_run_chart_svg (with the standards' levels and episodes) against two references in the
// same process: stepping the box, and writing hourly.csv, the table the chart sits beside.
// Prints the chart's bytes, its time, the ratios and the chart's bytes per simulated hour.
// Usage: bench_chart <case.toml> [repeats]
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>

#include "lidbox/analysis/run_standards.hpp"
#include "lidbox/base/output_folder.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/report/chart.hpp"
#include "lidbox/report/run_report.hpp"

using namespace lidbox;
using Clock = std::chrono::steady_clock;

namespace {
double seconds(Clock::time_point a, Clock::time_point b) {
  return std::chrono::duration<double>(b - a).count();
}
}  // namespace

int main(int argc, char** argv) {
  if (argc < 2) {
    std::fprintf(stderr, "usage: bench_chart <case.toml> [repeats]\n");
    return 2;
  }
  const int repeats = argc > 2 ? std::max(1, std::atoi(argv[2])) : 3;
  const CaseSpec c = load_case(argv[1]);
  const MetSeries met = read_case_met(c);
  const auto t0 = Clock::now();
  const RunResult r = run_case(c, met, {});
  const double step_s = seconds(t0, Clock::now());
  const auto standards = run_standards(c, r, std::nullopt);
  RunChartInput in;
  in.c = &c;
  in.r = &r;
  in.standards = standards ? &*standards : nullptr;
  in.issue_time_utc = run_issue_time(c, std::nullopt);
  double chart_s = 1e300, table_s = 1e300;
  std::size_t bytes = 0;
  for (int k = 0; k < repeats; ++k) {
    const auto a = Clock::now();
    bytes = render_run_chart_svg(in).size();
    chart_s = std::min(chart_s, seconds(a, Clock::now()));
    OutputFolder out("bench_chart_out");
    const auto b = Clock::now();
    TextFile f(out, "hourly.csv");
    write_hourly_csv(f, c, r);
    f.close();
    table_s = std::min(table_s, seconds(b, Clock::now()));
  }
  std::filesystem::remove_all("bench_chart_out");
  const double hours = static_cast<double>(r.hours.size());
  std::printf(
      "%-28s %7.0f h  chart %8zu bytes (%6.2f B/h)  %8.4f s  | step %7.3f s, hourly.csv %7.3f s"
      "  | chart/step %5.2f  chart/hourly.csv %5.2f\n",
      c.name.c_str(), hours, bytes, static_cast<double>(bytes) / hours, chart_s, step_s, table_s,
      chart_s / step_s, chart_s / table_s);
  return 0;
}
