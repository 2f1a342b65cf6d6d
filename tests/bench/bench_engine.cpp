// Benchmark (not a test): one year of hourly met, four pollutants, three sectors.
// Prints the engine's time per simulated year for both readings of the forcing, and the ratio to
// scipy's solve_ivp solving the same hour-average case (tests/bench/scipy_year.py), run in the
// same invocation. Usage: bench_engine <source dir> <python3>
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <random>
#include <string>
#include <vector>

#include "lidbox/engine/box_model.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"

using namespace lidbox;
using Clock = std::chrono::steady_clock;

namespace {

const char* kCase = R"(
name = "bench-year"
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

MetSeries year_met(std::size_t n) {
  std::mt19937_64 rng(8760);  // invented, seeded
  std::uniform_real_distribution<double> U(0.0, 1.0);
  MetSeries m;
  m.source = "invented year";
  m.first_stamp_utc = 1767225600;  // 2026-01-01T00:00Z
  for (std::size_t i = 0; i < n; ++i) {
    const double hour = static_cast<double>(i % 24);
    const double day = static_cast<double>(i / 24);
    const double season = 0.5 - 0.5 * std::cos(day / 365.0 * 2.0 * 3.14159265);
    const double noon = 400.0 + 1400.0 * season;
    const double diurnal = std::max(0.0, std::sin((hour - 6.0) / 12.0 * 3.14159265));
    m.mixing_height_m.push_back((80.0 + noon * diurnal) * (0.8 + 0.4 * U(rng)));
    double u = 0.0, v = 0.0;
    wind_components(0.2 + 6.0 * U(rng) * U(rng) * 2.0, 360.0 * U(rng), u, v);
    m.wind_u_m_s.push_back(u);
    m.wind_v_m_s.push_back(v);
    m.filled.push_back(0);
    m.source_line.push_back(0);
  }
  return m;
}

struct Timing {
  double min_s = 0.0, median_s = 0.0;
};

Timing summarise(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  return {v.front(), v[v.size() / 2]};
}

// Engine time only: stepping through the prepared forcing.
Timing time_engine(const CaseSpec& c, const Forcing& F, int repeats, double& checksum,
                   long& substeps) {
  std::vector<PollutantProcesses> pr;
  for (const auto& p : c.pollutants) pr.push_back(p.processes);
  BoxEngine engine(c.footprint, pr, F.n_sectors, c.engine);
  HourResult r = engine.make_result();
  std::vector<double> times;
  for (int k = 0; k < repeats; ++k) {
    BoxState s = engine.make_state(F.mixing_height_m[0]);
    checksum = 0.0;
    substeps = 0;
    const auto t0 = Clock::now();
    for (std::size_t i = 0; i < F.n_hours; ++i) {
      engine.step_hour(s, F, i, r);
      checksum += r.mean_c_g_m3[0];
      substeps += r.substeps;
    }
    times.push_back(std::chrono::duration<double>(Clock::now() - t0).count());
  }
  return summarise(times);
}

// The held case for scipy (forcing in SI, one line per hour) and lidbox's own hour means of
// the total beside it, for the comparison in scipy_year.py.
void write_scipy_case(const CaseSpec& c, const Forcing& held, const std::string& path,
                      const std::string& lidbox_path) {
  const std::size_t n = held.n_hours;
  {
    std::ofstream f(path);
    f.precision(17);
    f << c.footprint.x_side_m << ' ' << c.footprint.y_side_m << ' ' << c.footprint.x_side_bearing_deg << ' '
      << c.engine.min_wind_m_s << ' ' << c.engine.min_mixing_height_m << ' ' << c.pollutants.size() << ' '
      << n << '\n';
    for (const auto& p : c.pollutants) {
      f << p.processes.loss_rate_per_s << ' ' << p.processes.deposition_velocity_m_s << ' '
        << p.processes.residual_loss_rate_per_s << '\n';
    }
    const std::size_t P = c.pollutants.size();
    for (std::size_t i = 0; i < n; ++i) {
      f << held.mixing_height_m[i] << ' ' << held.wind_u_m_s[i] << ' ' << held.wind_v_m_s[i];
      for (std::size_t p = 0; p < P; ++p) {
        double q = 0.0;
        for (std::size_t s = 0; s < held.n_sectors; ++s) {
          q += held.emission_g_s[s * P + p] * held.clock_factor[(s * n + i) * 2];
        }
        f << ' ' << held.background_g_m3[p * n + i] << ' ' << held.free_troposphere_g_m3[p * n + i] << ' '
          << q / c.footprint.area_m2();
      }
      f << '\n';
    }
  }
  // lidbox's own hour means of the total for the comparison.
  {
    std::vector<PollutantProcesses> pr;
    for (const auto& p : c.pollutants) pr.push_back(p.processes);
    BoxEngine engine(c.footprint, pr, held.n_sectors, c.engine);
    HourResult r = engine.make_result();
    BoxState s = engine.make_state(held.mixing_height_m[0]);
    std::ofstream f(lidbox_path);
    f.precision(17);
    for (std::size_t i = 0; i < n; ++i) {
      engine.step_hour(s, held, i, r);
      for (std::size_t p = 0; p < c.pollutants.size(); ++p) {
        double t = 0.0;
        for (std::size_t j = 0; j < engine.parts(); ++j) t += r.mean_c_g_m3[p * engine.parts() + j];
        f << t << (p + 1 < c.pollutants.size() ? ' ' : '\n');
      }
    }
  }
}

}  // namespace

int main(int argc, char** argv) {
  const std::string source = argc > 1 ? argv[1] : LIDBOX_SOURCE_DIR;
  const std::string python = argc > 2 ? argv[2] : "/usr/bin/python3";
  const std::size_t n = 8760;
  CaseSpec c = parse_case(kCase, "bench.toml", ".");
  const MetSeries met = year_met(n);
  std::vector<HourRecord> hours;

  std::printf("lidbox engine benchmark: %zu hours, %zu pollutants, %zu sectors (%zu linear parts each)\n",
              n, c.pollutants.size(), c.sectors.size(), c.sectors.size() + 2);
  c.engine.reading = c.met.reading = MetReading::hour_average;
  const Forcing held = build_forcing(c, met, hours);
  double sum_held = 0.0;
  long sub_held = 0;
  const Timing held_t = time_engine(c, held, 21, sum_held, sub_held);
  const double t_held = held_t.median_s;
  std::printf(
      "  hour-average forcing (held):          %8.3f ms per year median, %.3f min (%ld "
      "sub-steps)\n",
      t_held * 1e3, held_t.min_s * 1e3, sub_held);

  c.engine.reading = c.met.reading = MetReading::instantaneous;
  const Forcing inst = build_forcing(c, met, hours);
  double sum_inst = 0.0;
  long sub_inst = 0;
  const Timing inst_t = time_engine(c, inst, 5, sum_inst, sub_inst);
  std::printf(
      "  instantaneous forcing (interpolated): %8.3f ms per year median, %.3f min (%ld sub-steps, "
      "%.1f per hour)\n",
      inst_t.median_s * 1e3, inst_t.min_s * 1e3, sub_inst,
      static_cast<double>(sub_inst) / static_cast<double>(n));

  c.engine.reading = c.met.reading = MetReading::hour_average;
  const std::string path = "bench_engine_forcing.txt";
  write_scipy_case(c, held, path, "bench_engine_lidbox.txt");
  const std::string cmd = python + " " + source + "/tests/bench/scipy_year.py " + path + " bench_engine_lidbox.txt";
  FILE* pipe = popen(cmd.c_str(), "r");
  double t_scipy = 0.0, worst = 0.0;
  if (pipe && std::fscanf(pipe, "%lf %lf", &t_scipy, &worst) == 2 && pclose(pipe) == 0) {
    std::printf("  scipy solve_ivp, same held case:     %8.1f ms per year (totals only, 2 states per pollutant)\n",
                t_scipy * 1e3);
    std::printf("  ratio scipy / lidbox (held):          %8.0f x\n", t_scipy / t_held);
    std::printf("  worst relative difference of hour means, lidbox vs scipy: %.1e\n", worst);
  } else {
    std::printf("  scipy reference not available (%s)\n", cmd.c_str());
  }
  std::printf("  aim: a year in under 5 ms of engine time -> %s\n", t_held < 5e-3 ? "met" : "NOT met");
  return 0;
}
