// Benchmark (not a test): the steps of `lidbox run <case>` in one process, timed apart, for the
// share of the time in reading the met, stepping the box, computing the standards' statistics
// and writing the outputs (CSV and standards tables; NetCDF with --netcdf). whole_run.py runs it
// beside the real binary and the peer script. Usage: bench_run <case.toml> [--netcdf]
#include <chrono>
#include <cstdio>
#include <cstring>
#include <filesystem>

#include "lidbox/analysis/run_standards.hpp"
#include "lidbox/base/output_folder.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/report/run_report.hpp"

using namespace lidbox;
using Clock = std::chrono::steady_clock;

int main(int argc, char** argv) {
  if (argc < 2) {
    std::fprintf(stderr, "usage: bench_run <case.toml> [--netcdf]\n");
    return 2;
  }
  const bool netcdf = argc > 2 && std::strcmp(argv[2], "--netcdf") == 0;
  const auto t0 = Clock::now();
  const CaseSpec c = load_case(argv[1]);
  const MetSeries met = read_case_met(c);
  const auto t1 = Clock::now();
  // The same steps as run_and_write, timed apart: the budget files are written while the box
  // steps, timed inside the observer.
  OutputFolder out("bench_run_out");
  BudgetStream budget(out, c, netcdf);
  double streaming_s = 0.0;
  RunStreaming streaming;
  streaming.keep_budget = false;
  streaming.on_hour = [&](const RunResult& res, std::size_t i) {
    const auto a = Clock::now();
    budget.hour(res, i);
    streaming_s += std::chrono::duration<double>(Clock::now() - a).count();
  };
  const RunResult r = run_case(c, met, {}, streaming);
  budget.close();
  const auto t2 = Clock::now();
  const auto standards = run_standards(c, r, std::nullopt);
  const auto t3 = Clock::now();
  out.write_whole("summary.txt",
                  write_run_outputs(out, c, met, r, standards ? &*standards : nullptr, netcdf));
  (void)out.publish();
  const auto t4 = Clock::now();
  std::filesystem::remove_all("bench_run_out");
  const auto s = [](Clock::time_point a, Clock::time_point b) {
    return std::chrono::duration<double>(b - a).count();
  };
  const double total = s(t0, t4);
  const double read = s(t0, t1), step = s(t1, t2) - streaming_s, stats = s(t2, t3);
  const double write = s(t3, t4) + streaming_s;
  std::printf(
      "lidbox time shares (%s, %.3f s in one process): read %.0f %%, step %.0f %%, statistics "
      "%.0f %%, write %.0f %%",
      netcdf ? "with NetCDF" : "CSV", total, 100 * read / total, 100 * step / total,
      100 * stats / total, 100 * write / total);
  std::printf(" (read %.3f s, step %.3f s, statistics %.3f s, write %.3f s)\n", read, step, stats,
              write);
  return 0;
}
