// A whole run: a case and its met become forcing, the box is spun up (or started from given
// values), stepped hour by hour, and every hour's concentrations, parts, met used, flags and
// budget lines are kept.
#pragma once

#include <functional>
#include <string>
#include <vector>

#include "lidbox/engine/box_model.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/met/met_series.hpp"

namespace lidbox {

struct HourRecord {
  UtcSeconds start_utc = 0;  // the hour covers [start, start + 3600)
  int civil_offset_s = 0;    // local civil offset at the start of the hour
  // Met actually used (after floors), hour means.
  double mixing_height_m = 0.0;
  double wind_speed_m_s = 0.0;
  double wind_from_deg = 0.0;  // direction of the mean wind vector
  double ventilation_m2_s = 0.0;  // hour mean of u H of the met as given (before floors)
  double flushing_time_h = 0.0;  // 1 / f of the hour-mean flushing rate
  double residual_top_m = 0.0;   // end of hour
  bool filled = false;           // the met of this hour came from the gap rule
  bool calm_floor = false;
  bool lid_floor = false;
  int substeps = 0;
};

struct RunResult {
  std::size_t n_pollutants = 0;
  std::size_t n_parts = 0;  // 2 + sectors: background, initial, sectors...
  std::vector<HourRecord> hours;
  // [(i * n_pollutants + p) * n_parts + j] hour-mean mixed-layer concentration [g m-3]
  std::vector<double> mean_g_m3;
  // [i * n_pollutants + p], end of hour [g m-3]
  std::vector<double> end_mixed_g_m3;
  std::vector<double> end_residual_g_m3;
  // [i * n_pollutants + p] budget lines of the hour [g m-2] and masses at the end [g m-2]
  std::vector<BudgetTerms> budget;
  std::vector<double> mixed_mass_g_m2;
  std::vector<double> residual_mass_g_m2;
  std::vector<double> initial_mixed_mass_g_m2;     // [p] at the start of hour 0
  std::vector<double> initial_residual_mass_g_m2;  // [p]
  // Spin-up.
  int spin_up_days = 0;
  bool spin_up_converged = true;
  double spin_up_last_change = 0.0;
  int clock_split_s = 0;

  [[nodiscard]] double mean(std::size_t hour, std::size_t p, std::size_t part) const {
    return mean_g_m3[(hour * n_pollutants + p) * n_parts + part];
  }
  [[nodiscard]] std::size_t at(std::size_t hour, std::size_t p) const { return hour * n_pollutants + p; }
  [[nodiscard]] const BudgetTerms& budget_of(std::size_t hour, std::size_t p) const { return budget[at(hour, p)]; }
  [[nodiscard]] double mixed_mass(std::size_t hour, std::size_t p) const { return mixed_mass_g_m2[at(hour, p)]; }
  [[nodiscard]] double residual_mass(std::size_t hour, std::size_t p) const {
    return residual_mass_g_m2[at(hour, p)];
  }
  [[nodiscard]] double end_mixed(std::size_t hour, std::size_t p) const { return end_mixed_g_m3[at(hour, p)]; }
  [[nodiscard]] double end_residual(std::size_t hour, std::size_t p) const {
    return end_residual_g_m3[at(hour, p)];
  }
  [[nodiscard]] double total(std::size_t hour, std::size_t p) const;
  // Cumulative closure residual up to the end of `hour` [g m-2]: storage change minus the sum of
  // the lines, and its size relative to the summed absolute lines.
  [[nodiscard]] double closure_g_m2(std::size_t hour, std::size_t p, bool residual_layer) const;
  [[nodiscard]] double relative_closure(std::size_t p, bool residual_layer) const;
};

// Fraction done in [0, 1] with a short label ("spin-up", "run").
using ProgressFn = std::function<void(double fraction, const char* stage)>;

// Builds the forcing for the case's hours from its met; exposed for tests and benchmarks.
Forcing build_forcing(const CaseSpec& c, const MetSeries& met, std::vector<HourRecord>& hours);

RunResult run_case(const CaseSpec& c, const MetSeries& met, const ProgressFn& progress = {});

// The state at the start of hour 0 exactly as run_case starts from it: spun up on the first day
// of `F` (spin_up_days, spin_up_converged and spin_up_last_change are set in `spin`), or set from
// the case's initial values. For callers that step many boxes themselves (grid runs).
BoxState start_state(const CaseSpec& c, const MetSeries& met, const Forcing& F, const BoxEngine& engine,
                     RunResult& spin, const ProgressFn& progress = {});

// Reads the case's met file (CSV) with the case's settings.
MetSeries read_case_met(const CaseSpec& c);

}  // namespace lidbox
