// Benchmark: every shipped rule set's statistics, daily tables, AQI, AQHI and episodes on ten
// years of hourly data for six pollutants (invented, seeded). Prints wall times; the runner
// (tests/bench/standards.sh) sets them against pandas computing the rolling means alone.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <random>

#include "lidbox/standards/rule_set.hpp"
#include "lidbox/report/standards_tables.hpp"

using namespace lidbox;

int main() {
  const std::size_t hours = 87672;   // 2015-01-01 .. 2024-12-31: 3652 days
  const UtcSeconds t0 = 1420070400;  // 2015-01-01T00:00:00Z
  std::mt19937_64 rng(20260101);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  struct Spec {
    const char* name;
    const char* unit;
    double base, amplitude;
  };
  const Spec specs[] = {{"PM2.5", "ug m-3", 10, 6}, {"PM10", "ug m-3", 22, 12},
                        {"O3", "ppb", 35, 25},      {"NO2", "ppb", 20, 15},
                        {"SO2", "ppb", 4, 3},       {"CO", "ppm", 0.5, 0.3}};
  NamedSeries series;
  for (const Spec& s : specs) {
    std::vector<double> v(hours);
    for (std::size_t i = 0; i < hours; ++i) {
      const double diurnal = std::sin(2.0 * M_PI * static_cast<double>(i % 24) / 24.0);
      v[i] =
          u(rng) < 0.05
              ? kMissing
              : std::max(0.0, s.base + s.amplitude * diurnal * u(rng) + s.amplitude * 0.5 * u(rng));
    }
    series[s.name] = HourlySeries{t0, std::move(v), s.unit};
  }
  ReportOptions opt;
  const auto dir = rules_directory(std::nullopt);
  for (const auto& id : list_rule_sets(dir)) opt.rule_sets.push_back(load_rule_set(id, dir));
  opt.lst_offset_s = -5 * 3600;
  opt.issue_time_utc = t0;
  opt.input_label = "benchmark (invented data)";

  using clock = std::chrono::steady_clock;
  double best_compute = 1e30, best_render = 1e30;
  std::size_t limits = 0, bytes = 0;
  for (int rep = 0; rep < 5; ++rep) {
    const auto a = clock::now();
    const StandardsReport r = compute_standards_report(series, opt);
    const auto b = clock::now();
    const auto files = render_standards_report(r);
    const auto c = clock::now();
    best_compute = std::min(best_compute, std::chrono::duration<double>(b - a).count());
    best_render = std::min(best_render, std::chrono::duration<double>(c - b).count());
    limits = r.limits.size();
    bytes = 0;
    for (const auto& f : files) bytes += f.content.size();
  }
  std::printf("series: 6 pollutants x %zu hours (10 years), 5 %% missing\n", hours);
  std::printf("rule sets: %zu, limit-year results: %zu\n", opt.rule_sets.size(), limits);
  std::printf("compute (limits, daily tables, AQI, AQHI, episodes), best of 5: %.3f s\n",
              best_compute);
  std::printf("render CSV/Markdown/JSON in memory (%.1f MB), best of 5: %.3f s\n",
              static_cast<double>(bytes) / 1e6, best_render);
  std::printf("compute_seconds_best=%.6f\n", best_compute);
  return 0;
}
