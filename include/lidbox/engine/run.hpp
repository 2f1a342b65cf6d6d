// A whole run: a case and its met become forcing, the box is spun up (or started from given
// values), stepped hour by hour, and every hour's concentrations, parts, met used, flags and
// budget lines are kept.
#pragma once

#include <functional>
#include <string>
#include <vector>

#include "lidbox/base/work_meter.hpp"
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
  // Running sums over the hours recorded so far, per pollutant, in hour order [g m-2]: the net
  // change the lines imply (the residual layer's lines included when the run has one) and the
  // lines' absolute size.
  std::vector<double> lines_sum_g_m2;
  std::vector<double> magnitude_sum_g_m2;
  bool stepped_with_residual_layer = true;
  // With a streamed budget (RunStreaming::keep_budget false) the budget lines and masses are held
  // for the latest hour only: budget_of(hour, p) and the masses read that hour whatever `hour`
  // says, and closure_series_g_m2 is refused.
  bool budget_streamed = false;
  // Spin-up.
  int spin_up_days = 0;
  bool spin_up_converged = true;
  double spin_up_last_change = 0.0;
  int clock_split_s = 0;

  // Each read of an hour's values counts towards the work meter (base/work_meter.hpp).
  [[nodiscard]] double mean(std::size_t hour, std::size_t p, std::size_t part) const {
    work_meter::add();
    return mean_g_m3[(hour * n_pollutants + p) * n_parts + part];
  }
  [[nodiscard]] std::size_t at(std::size_t hour, std::size_t p) const { return hour * n_pollutants + p; }
  [[nodiscard]] const BudgetTerms& budget_of(std::size_t hour, std::size_t p) const {
    work_meter::add();
    return budget[budget_at(hour, p)];
  }
  [[nodiscard]] double mixed_mass(std::size_t hour, std::size_t p) const {
    work_meter::add();
    return mixed_mass_g_m2[budget_at(hour, p)];
  }
  [[nodiscard]] double residual_mass(std::size_t hour, std::size_t p) const {
    work_meter::add();
    return residual_mass_g_m2[budget_at(hour, p)];
  }
  [[nodiscard]] std::size_t budget_at(std::size_t hour, std::size_t p) const {
    return budget_streamed ? p : at(hour, p);
  }
  [[nodiscard]] double end_mixed(std::size_t hour, std::size_t p) const {
    work_meter::add();
    return end_mixed_g_m3[at(hour, p)];
  }
  [[nodiscard]] double end_residual(std::size_t hour, std::size_t p) const {
    work_meter::add();
    return end_residual_g_m3[at(hour, p)];
  }
  [[nodiscard]] double total(std::size_t hour, std::size_t p) const;
  // Cumulative closure residual up to the end of `hour` [g m-2]: storage change minus the sum of
  // the lines, and its size relative to the summed absolute lines.
  // One hour costs time linear in `hour`; for every hour use closure_series_g_m2.
  [[nodiscard]] double closure_g_m2(std::size_t hour, std::size_t p, bool residual_layer) const;
  // The cumulative closure after every hour in one pass, [at(hour, p)] [g m-2]; the same
  // numbers as closure_g_m2 (the lines are summed in the same order).
  [[nodiscard]] std::vector<double> closure_series_g_m2(bool residual_layer) const;
  // The closure after `hour` when it is the latest hour recorded (from the running sums, O(1)).
  [[nodiscard]] double closure_latest_g_m2(std::size_t hour, std::size_t p) const;
  // |closure| / summed |lines| over the whole run, from the running sums.
  [[nodiscard]] double relative_closure(std::size_t p, bool residual_layer) const;
};

// Fraction done in [0, 1] with a short label ("spin-up", "run").
using ProgressFn = std::function<void(double fraction, const char* stage)>;

// Called after each hour of the run (not of the spin-up) is recorded, in hour order, so that
// outputs can be written while the run steps.
using HourObserver = std::function<void(const RunResult& r, std::size_t hour)>;

struct RunStreaming {
  HourObserver on_hour;
  bool keep_budget = true;  // false: the budget lines and masses of the latest hour only
};

// Builds the forcing for the case's hours from its met; exposed for tests and benchmarks.
Forcing build_forcing(const CaseSpec& c, const MetSeries& met, std::vector<HourRecord>& hours);

RunResult run_case(const CaseSpec& c, const MetSeries& met, const ProgressFn& progress = {},
                   const RunStreaming& streaming = {});

// The state at the start of hour 0 exactly as run_case starts from it: spun up on the first day
// of `F` (spin_up_days, spin_up_converged and spin_up_last_change are set in `spin`), or set from
// the case's initial values. For callers that step many boxes themselves (grid runs).
BoxState start_state(const CaseSpec& c, const MetSeries& met, const Forcing& F, const BoxEngine& engine,
                     RunResult& spin, const ProgressFn& progress = {});

// Reads the case's met file (CSV) with the case's settings.
MetSeries read_case_met(const CaseSpec& c);

}  // namespace lidbox
