// Benchmark: fitting sector scales to monitors (sector_fit.hpp) on a year of hourly pairs at three
// monitors, five sectors and the background (invented, seeded): the NNLS fit with its
// diagnostics, then 1000 block-bootstrap resamples. Writes the weighted matrix to the file named
// by the first argument, so that the runner (tests/bench/fit.sh) can time scipy.optimize.nnls on
// the same numbers, and prints the times.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <random>

#include "lidbox/analysis/sector_fit.hpp"

using namespace lidbox;

namespace {

// An invented fit: a background and five sectors with random hour-of-day and day-of-week
// clocks, seen by three monitors with Gaussian noise around known scales.
FitDesign invented_design(std::size_t T, std::size_t monitors, std::size_t sectors) {
  std::mt19937_64 rng(20261202);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  std::normal_distribution<double> noise(0.0, 1.0);
  FitDesign d;
  d.pollutant = "PM2.5";
  d.unit = "ug m-3";
  d.hours = T;
  d.columns.push_back({FitColumn::Kind::background, "background", 0});
  for (std::size_t s = 0; s < sectors; ++s) {
    d.columns.push_back({FitColumn::Kind::sector, "sector" + std::to_string(s), s});
  }
  const std::size_t p = d.columns.size();
  // Column series like the parts of a run: each sector has its own random hour-of-day and
  // day-of-week clock, all divided by one varying dilution.
  std::vector<std::vector<double>> hour_w(sectors, std::vector<double>(24)),
      day_w(sectors, std::vector<double>(7));
  for (std::size_t s = 0; s < sectors; ++s) {
    for (double& w : hour_w[s]) w = 0.2 + 2.0 * u(rng);
    for (double& w : day_w[s]) w = 0.5 + u(rng);
  }
  d.column_series.assign(p, std::vector<double>(T));
  for (std::size_t i = 0; i < T; ++i) {
    const std::size_t h = i % 24, day = (i / 24) % 7;
    const double dilution =
        1.2 + std::sin(2 * M_PI * (static_cast<double>(h) - 4) / 24) + 0.5 * u(rng);
    d.column_series[0][i] = 5.0 + 2.0 * std::sin(2 * M_PI * static_cast<double>(i) / 2000.0);
    for (std::size_t s = 0; s < sectors; ++s) {
      d.column_series[s + 1][i] = 4.0 * hour_w[s][h] * day_w[s][day] / dilution;
    }
  }
  d.fixed_total.assign(T, 0.0);
  const std::vector<double> truth = {1.1, 0.8, 1.3, 0.5, 1.0, 1.7};
  d.K = DenseMatrix(T * monitors, p);
  std::size_t row = 0;
  for (std::size_t m = 0; m < monitors; ++m) {
    for (std::size_t i = 0; i < T; ++i, ++row) {
      double y = 0.0;
      for (std::size_t j = 0; j < p; ++j) {
        d.K(row, j) = d.column_series[j][i];
        y += truth[j] * d.column_series[j][i];
      }
      d.y.push_back(y + 2.0 * noise(rng));
      d.weight.push_back(m == 0 ? 2.0 : 1.0);
      d.row_monitor.push_back(m);
      d.row_hour.push_back(i);
    }
  }
  return d;
}

}  // namespace

int main(int argc, char** argv) {
  const std::size_t T = 8760, monitors = 3, sectors = 5;
  const FitDesign d = invented_design(T, monitors, sectors);
  const std::size_t p = d.columns.size();
  using clock = std::chrono::steady_clock;
  SectorFitOptions o;
  double best_fit = 1e9;
  SectorFitReport f;
  for (int rep = 0; rep < 5; ++rep) {
    const auto t0 = clock::now();
    f = fit_sectors(d, o);
    best_fit = std::min(best_fit, std::chrono::duration<double>(clock::now() - t0).count());
  }
  o.bootstrap = 1000;
  o.block_hours = 24;
  const auto t1 = clock::now();
  const SectorFitReport fb = fit_sectors(d, o);
  const double with_boot = std::chrono::duration<double>(clock::now() - t1).count();
  std::printf("rows %zu (%zu hours x %zu monitors), columns %zu\n", d.y.size(), T, monitors, p);
  std::printf("scales:");
  for (const auto& e : f.estimates) std::printf(" %s %.4f", e.name.c_str(), e.value);
  std::printf("\nbootstrap s.e. of sector0: %.4f (Gaussian %.4f)\n", fb.estimates[1].bootstrap_se,
              fb.estimates[1].gaussian_se);
  std::printf("fit_seconds_best=%.6f\n", best_fit);
  std::printf("bootstrap_1000_seconds=%.6f\n", with_boot - best_fit);
  if (argc > 1) {
    std::ofstream out(argv[1]);
    out.precision(17);
    for (std::size_t r = 0; r < d.y.size(); ++r) {
      const double s = std::sqrt(d.weight[r]);
      for (std::size_t j = 0; j < p; ++j) out << s * d.K(r, j) << ',';
      out << s * d.y[r] << ',' << d.row_hour[r] << '\n';
    }
    std::printf("scale_values=");
    for (const auto& e : f.estimates) std::printf("%.15g ", e.value);
    std::printf("\n");
  }
  return 0;
}
