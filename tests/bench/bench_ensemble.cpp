// Benchmark (not a test): an ensemble of 50 members x 10 days x 4 pollutants x 3 sectors.
// Prints the engine's time for all members stepped side by side (the whole run_ensemble: forcing,
// spin-up and the run of every member), the same on one thread as the reference run in the same
// invocation, and the time of the ensemble statistics. Usage: bench_ensemble
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <random>
#include <string>
#include <thread>
#include <vector>

#include "lidbox/analysis/ensemble_statistics.hpp"
#include "lidbox/engine/box_model.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/ensemble.hpp"
#include "lidbox/standards/rule_set.hpp"

using namespace lidbox;
using Clock = std::chrono::steady_clock;

namespace {

const std::string kCase = R"(
name = "bench-ensemble"
time_zone = "CET-1CEST,M3.5.0,M10.5.0/3"
[airshed]
x_side = "15 km"
y_side = "10 km"
x_side_bearing = "80 deg"
[met]
file = "unused.csv"
[pollutants.CO]
unit = "ppm"
molar_mass = "28.01 g/mol"
lifetime = "60 day"
background = "0.12 ppm"
free_troposphere = "0.1 ppm"
[pollutants.NO2]
unit = "ppb"
molar_mass = "46.01 g/mol"
lifetime = "12 h"
deposition_velocity = "0.3 cm/s"
background = "8 ppb"
free_troposphere = "2 ppb"
[pollutants.SO2]
unit = "ppb"
molar_mass = "64.06 g/mol"
loss_rate = "2 %/h"
deposition_velocity = "0.6 cm/s"
background = "2 ppb"
free_troposphere = "0.5 ppb"
[pollutants.PM25]
unit = "ug/m3"
lifetime = "5 day"
deposition_velocity = "0.1 cm/s"
background = "6 ug/m3"
free_troposphere = "2 ug/m3"
[sectors.traffic]
emissions = { CO = "3 t/h", NO2 = "300 kg/h", PM25 = "15 kg/h" }
hour_of_day = [0.3,0.2,0.2,0.2,0.3,0.7,1.5,2.2,2.0,1.3,1.1,1.1,1.2,1.2,1.3,1.6,2.0,2.2,1.6,1.0,0.8,0.6,0.5,0.4]
day_of_week = [1.05,1.05,1.05,1.05,1.1,0.85,0.75]
[sectors.heating]
emissions = { CO = "1 t/h", SO2 = "150 kg/h", PM25 = "60 kg/h" }
hour_of_day = [0.8,0.5,0.4,0.4,0.4,0.6,1.3,1.5,1.0,0.6,0.5,0.5,0.5,0.5,0.6,0.8,1.2,1.9,2.4,2.5,2.3,1.9,1.5,1.1]
month = [2,1.8,1.4,0.9,0.4,0.1,0.1,0.1,0.4,0.9,1.5,1.9]
[sectors.industry]
emissions = { NO2 = "120 kg/h", SO2 = "400 kg/h", PM25 = "10 kg/h" }
)";

MetSeries member_met(std::size_t n, unsigned seed) {
  std::mt19937_64 rng(seed);  // invented, seeded
  std::uniform_real_distribution<double> U(0.0, 1.0);
  MetSeries m;
  m.source = "invented member " + std::to_string(seed);
  m.first_stamp_utc = 1770595200;  // 2026-02-09T00:00Z
  for (std::size_t i = 0; i < n; ++i) {
    const double hour = static_cast<double>(i % 24);
    const double diurnal = std::max(0.0, std::sin((hour - 6.0) / 12.0 * 3.14159265));
    m.mixing_height_m.push_back((80.0 + 500.0 * diurnal) * (0.8 + 0.4 * U(rng)));
    double u = 0.0, v = 0.0;
    wind_components(0.2 + 4.0 * U(rng) * U(rng) * 2.0, 360.0 * U(rng), u, v);
    m.wind_u_m_s.push_back(u);
    m.wind_v_m_s.push_back(v);
    m.filled.push_back(0);
    m.source_line.push_back(0);
  }
  return m;
}

double ms_since(Clock::time_point t0) {
  return std::chrono::duration<double, std::milli>(Clock::now() - t0).count();
}

// Best of `reps` timings, to keep other sessions' load out of the figure.
template <class F>
double best_ms(int reps, F f) {
  double best = 1e300;
  for (int r = 0; r < reps; ++r) {
    const auto t0 = Clock::now();
    f();
    best = std::min(best, ms_since(t0));
  }
  return best;
}

}  // namespace

int main() {
  const CaseSpec c = parse_case(kCase, "bench-ensemble.toml", ".");
  std::vector<MetSeries> members;
  for (unsigned k = 0; k < 50; ++k) members.push_back(member_met(240, 9000 + k));
  // The engine: every member's hours stepped (BoxEngine::step_hour, as bench_engine times it),
  // members side by side on all cores; forcing built beforehand.
  std::vector<PollutantProcesses> processes;
  for (const auto& p : c.pollutants) processes.push_back(p.processes);
  const BoxEngine engine(c.footprint, processes, c.sectors.size(), c.engine);
  std::vector<Forcing> forcing;
  for (const auto& m : members) {
    std::vector<HourRecord> h;
    forcing.push_back(build_forcing(c, m, h));
  }
  const std::size_t hours = forcing.front().n_hours;
  const unsigned cores = std::max(1u, std::thread::hardware_concurrency());
  auto step_members = [&](unsigned threads) {
    std::vector<std::thread> pool;
    for (unsigned t = 0; t < threads; ++t) {
      pool.emplace_back([&, t] {
        HourResult r = engine.make_result();
        for (std::size_t m = t; m < forcing.size(); m += threads) {
          BoxState s = engine.make_state(forcing[m].mixing_height_m[0]);
          for (std::size_t i = 0; i < hours; ++i) engine.step_hour(s, forcing[m], i, r);
        }
      });
    }
    for (auto& th : pool) th.join();
  };
  const double all_cores = best_ms(9, [&] { step_members(cores); });
  const double one_thread = best_ms(9, [&] { step_members(1); });
  // The whole library call: reading nothing, but forcing, spin-up, stepping and recording.
  const double whole = best_ms(3, [&] { run_ensemble(c, members); });
  const auto runs = run_ensemble(c, members);
  const RuleSet rules = load_rule_set("eu-2008-50", rules_directory(std::nullopt));
  const double stats = best_ms(5, [&] {
    EnsemblePercentiles p(runs, {5, 25, 50, 75, 95});
    ensemble_rules(c, runs, {rules}, true);
  });
  std::printf("ensemble engine: 50 members x %zu h x 4 pollutants x 3 sectors\n", hours);
  std::printf("  engine (step_hour), all %u cores: %.2f ms (limit 50 ms: %s)\n", cores, all_cores,
              all_cores < 50.0 ? "met" : "NOT met");
  std::printf("  engine on one thread (reference): %.2f ms, ratio %.2f\n", one_thread,
              one_thread / all_cores);
  std::printf("  run_ensemble (forcing with local clocks, spin-up, stepping, recording): %.1f ms\n",
              whole);
  std::printf("  percentiles + daily probabilities (eu-2008-50, kernel dressing): %.1f ms\n",
              stats);
  return all_cores < 50.0 ? 0 : 1;
}
