// The hourly box balance of a well-mixed urban airshed with a residual layer aloft.
//
// Notation (SI: g, m, s), after the physics note (shared design, sections 1-4):
//   H   mixing height (the lid)              Hr  top of the residual layer
//   C   mixed-layer concentration [g m-3]    P   top of the most recent cycle's air, H <= P <= Hr
//   Cr  residual air of the most recent      Co  older residual air, between P and Hr
//       mixing cycle, between H and P        Cb  background of the air arriving upwind
//   Ca  free-troposphere concentration       q   emission flux [g m-2 s-1] = E / A
//   f   flushing rate [1/s] (footprint.hpp)  k   first-order loss [1/s]; vd dry deposition [m/s]
//
// Mixed layer, per unit ground area (M = C H):
//   dM/dt = q + f H Cb - f H C - k M - vd C + w+ Ce - w- C                 (physics note eq. 2)
// with w+ = max(dH/dt, 0) entraining air of concentration Ce (residual-layer air first, then
// free-troposphere air above Hr) and w- = max(-dH/dt, 0) leaving mixed-layer air behind in the
// residual layer (detrainment), which changes the box's mass but not C. The residual layer loses
// mass by first-order reaction and, optionally, by a wind aloft flushing it towards Ca.
//
// The residual layer holds the most recent mixing cycle (physics note section 3). A new cycle
// begins when the lid starts to fall after it has risen more than `cycle_threshold_m` above its
// lowest height since the previous cycle began: all residual air then above the lid becomes
// older air (Co, P..Hr) and the falling lid's air fills the new cycle's slab (Cr, H..P). A rising
// lid takes back Cr first, then Co, then free-troposphere air. Once the new slab is deeper than
// the threshold, the older air is vented to the free troposphere (budget line vented_aloft), so
// the evening air of a shallow day is never spread over the depth of a deep day before it. A lid
// that wiggles by less than the threshold neither starts a cycle nor vents. The threshold (100 m
// by default) is our choice, no source: above the scatter of hourly mixing heights at night,
// below the rise of any day worth the name. ResidualTop::highest_since_emptied keeps the earlier
// rule (one slab up to the highest lid since the layer was last emptied, never vented).
// The textbook steady state C = Cb + q L/(u H) is the special case k = vd = w = 0
// (Seinfeld and Pandis, Atmospheric Chemistry and Physics, box-model section; from memory).
//
// Integration (operator splitting that conserves mass exactly):
//   * lid moves are applied as instant mixing, C <- (C H1 + Ce (H2 - H1)) / H2 when rising, and
//     a transfer of C (H1 - H2) to the residual layer when falling; an instant move is the exact
//     solution of the lid sub-problem, so every gram is accounted for;
//   * between lid moves the coefficients are frozen and dC/dt = a - lambda C is solved exactly:
//       C(t+h) = C* + (C - C*) exp(-lambda h),  C* = a / lambda,
//       int C dt = C* h + (C - C*) (1 - exp(-lambda h)) / lambda        (expm1 for small lambda h)
//     which gives every budget line exactly.
//   * hour-average forcing (held): one lid jump at the start of the hour, then an exact step - the
//     result is exact for the held forcing, whatever the step;
//   * instantaneous forcing (interpolated): Strang splitting per sub-step (lid to the midpoint
//     height, exact step with midpoint coefficients, lid to the end height): second order in the
//     sub-step, with sub-steps chosen so that lambda h and the relative lid change stay small.
//
// Linearity (physics note section 6): every pollutant is carried as separate linear parts -
// part 0 the background (air advected in and air entrained from the free troposphere), part 1 the
// initial state, part 2+s emission sector s - whose sum is the total concentration.
//
// The engine allocates nothing and does no I/O while stepping: state and results are plain
// arrays sized once, so thousands of boxes can be stepped side by side.
#pragma once

#include <cstddef>
#include <vector>

#include "lidbox/engine/footprint.hpp"
#include "lidbox/met/met_series.hpp"

namespace lidbox {

struct PollutantProcesses {
  double loss_rate_per_s = 0.0;           // k in the mixed layer
  double deposition_velocity_m_s = 0.0;   // vd at the ground
  double residual_loss_rate_per_s = 0.0;  // k in the residual layer
};

// Which air the residual layer holds (see the notes at the top of this file).
enum class ResidualTop { most_recent_cycle, highest_since_emptied };

struct EngineOptions {
  MetReading reading = MetReading::hour_average;
  bool residual_layer = true;
  ResidualTop residual_top = ResidualTop::most_recent_cycle;
  double cycle_threshold_m = 100.0;  // rise and fall that make a new mixing cycle
  // The wind aloft that flushes the residual layer, as a multiple of the surface wind vector;
  // 0 keeps the residual layer in place (flushed only when the lid takes it back).
  double residual_wind_factor = 0.0;
  // Floors (physics note section 5): applied, counted and flagged, never silent.
  // 0.5 m/s is common practice (no source); 50 m is common practice (no source).
  double min_wind_m_s = 0.5;
  double min_mixing_height_m = 50.0;
  // Sub-step control for interpolated forcing (per sub-step of the coarse solution; the fine
  // one halves it). Defaults measured against a tight reference: README, "Accuracy".
  double max_lambda_dt = 0.1;                  // lambda * h per sub-step
  double max_relative_lid_change = 0.04;       // |dH| / H per sub-step
  double max_relative_flushing_change = 0.25;  // |df| / f per sub-step
  int max_substeps_per_hour = 3600;
  int fixed_substeps_per_hour = 0;  // > 0 overrides the adaptive choice (convergence studies)
};

// Forcing of a run of n hours, struct of arrays, SI units. Hour i covers
// [start + i h, start + (i+1) h).
struct Forcing {
  std::size_t n_hours = 0;
  std::size_t n_pollutants = 0;
  std::size_t n_sectors = 0;
  // Met. Instantaneous reading: n_hours + 1 values at the hour boundaries (node i = start of
  // hour i). Hour-average reading: n_hours values, held through their hour.
  std::vector<double> mixing_height_m;
  std::vector<double> wind_u_m_s;
  std::vector<double> wind_v_m_s;
  // [p * n_hours + i]: background of the inflowing air, and free-troposphere air, per hour [g m-3].
  std::vector<double> background_g_m3;
  std::vector<double> free_troposphere_g_m3;
  // [s * n_pollutants + p]: long-term mean emission rate of sector s over the footprint [g/s].
  std::vector<double> emission_g_s;
  // [(s * n_hours + i) * 2 + half]: clock factor of sector s in hour i; half 1 applies from
  // clock_split_s seconds into the hour (zones whose offset is not a whole hour change their local
  // hour mid-way through a UTC hour); with clock_split_s == 0 only half 0 is used.
  std::vector<double> clock_factor;
  int clock_split_s = 0;

  [[nodiscard]] std::size_t met_values() const { return mixing_height_m.size(); }
  // Element access in the layouts above.
  [[nodiscard]] double& background(std::size_t p, std::size_t i) {
    return background_g_m3[p * n_hours + i];
  }
  [[nodiscard]] double background(std::size_t p, std::size_t i) const {
    return background_g_m3[p * n_hours + i];
  }
  [[nodiscard]] double& free_troposphere(std::size_t p, std::size_t i) {
    return free_troposphere_g_m3[p * n_hours + i];
  }
  [[nodiscard]] double free_troposphere(std::size_t p, std::size_t i) const {
    return free_troposphere_g_m3[p * n_hours + i];
  }
  [[nodiscard]] double& emission(std::size_t s, std::size_t p) {
    return emission_g_s[s * n_pollutants + p];
  }
  [[nodiscard]] double emission(std::size_t s, std::size_t p) const {
    return emission_g_s[s * n_pollutants + p];
  }
  [[nodiscard]] double& clock(std::size_t s, std::size_t i, std::size_t half) {
    return clock_factor[(s * n_hours + i) * 2 + half];
  }
  [[nodiscard]] double clock(std::size_t s, std::size_t i, std::size_t half) const {
    return clock_factor[(s * n_hours + i) * 2 + half];
  }
};

struct BoxState {
  double mixing_height_m = 0.0;    // H
  double cycle_top_m = 0.0;        // P >= H: top of the most recent cycle's residual air
  double residual_top_m = 0.0;     // Hr >= P: top of all residual air
  double cycle_low_m = 0.0;        // lowest lid since the most recent cycle began
  std::size_t parts = 0;           // linear parts per pollutant (BoxEngine::parts())
  std::vector<double> c_g_m3;      // [p * parts + j], mixed layer
  std::vector<double> cr_g_m3;     // [p * parts + j], residual air of the most recent cycle
  std::vector<double> older_g_m3;  // [p * parts + j], older residual air (P..Hr)

  [[nodiscard]] double& c(std::size_t p, std::size_t j) { return c_g_m3[p * parts + j]; }
  [[nodiscard]] double c(std::size_t p, std::size_t j) const { return c_g_m3[p * parts + j]; }
  [[nodiscard]] double& cr(std::size_t p, std::size_t j) { return cr_g_m3[p * parts + j]; }
  [[nodiscard]] double cr(std::size_t p, std::size_t j) const { return cr_g_m3[p * parts + j]; }
  [[nodiscard]] double& older(std::size_t p, std::size_t j) { return older_g_m3[p * parts + j]; }
  [[nodiscard]] double older(std::size_t p, std::size_t j) const {
    return older_g_m3[p * parts + j];
  }
  // Sum of the parts of pollutant p in the mixed and residual layers [g m-3].
  [[nodiscard]] double c_total(std::size_t p) const;
  [[nodiscard]] double cr_total(std::size_t p) const;
  // Mean over the whole residual layer (H..Hr) of pollutant p, all parts; 0 without depth.
  [[nodiscard]] double residual_mean_total(std::size_t p) const;
  // Starts the run with a residual layer of the most recent cycle up to `top_m` (>= the lid).
  void set_residual_top(double top_m);
};

// Budget lines of one pollutant over an interval [g m-2 of footprint]; the signs are in the
// names (all values >= 0).
struct BudgetTerms {
  double emitted = 0.0;
  double advected_in = 0.0;
  double advected_out = 0.0;
  double reacted = 0.0;
  double deposited = 0.0;
  double entrained_from_residual = 0.0;
  double entrained_from_free_troposphere = 0.0;
  double detrained = 0.0;  // mixed layer -> residual layer (or out of the system without one)
  double residual_reacted = 0.0;
  double residual_advected_in = 0.0;
  double residual_advected_out = 0.0;
  double vented_aloft = 0.0;  // older residual air -> free troposphere when a new cycle begins

  BudgetTerms& operator+=(const BudgetTerms& o);
  // Net change of the mixed layer's mass implied by the lines.
  [[nodiscard]] double mixed_layer_change() const;
  // Net change of the residual layer's mass implied by the lines (with a residual layer).
  [[nodiscard]] double residual_layer_change() const;
  // Sum of the absolute lines: the scale against which closure is judged.
  [[nodiscard]] double magnitude() const;
};

// What one hour produced. Sized once by BoxEngine::make_result and reused.
struct HourResult {
  std::size_t parts = 0;
  std::vector<double> mean_c_g_m3;  // [p * parts + j]: hour mean, int C dt / 3600
  std::vector<BudgetTerms> budget;  // [p]
  double mixing_height_mean_m = 0.0;
  double wind_speed_mean_m_s = 0.0;  // speed actually used (after the calm floor)
  double wind_u_mean_m_s = 0.0;
  double wind_v_mean_m_s = 0.0;
  double flushing_rate_mean_per_s = 0.0;
  double ventilation_mean_m2_s = 0.0;  // hour mean of u H of the met as given (before floors)
  bool calm_floor = false;
  bool lid_floor = false;
  int substeps = 0;  // sub-steps computed (with interpolated forcing: both solutions)

  // Workspace of the interpolated step, sized by BoxEngine::make_result (not results).
  BoxState work_state;
  std::vector<double> work_mean;
  std::vector<BudgetTerms> work_budget;

  [[nodiscard]] double mean(std::size_t p, std::size_t j) const {
    return mean_c_g_m3[p * parts + j];
  }
  [[nodiscard]] double mean_total(std::size_t p) const;
};

class BoxEngine {
 public:
  BoxEngine(const Footprint& footprint, std::vector<PollutantProcesses> pollutants,
            std::size_t n_sectors, const EngineOptions& options);

  [[nodiscard]] std::size_t pollutants() const { return processes_.size(); }
  [[nodiscard]] std::size_t parts() const { return n_sectors_ + 2; }
  [[nodiscard]] const EngineOptions& options() const { return options_; }
  [[nodiscard]] const Footprint& footprint() const { return footprint_; }

  // A state of the right size with all concentrations zero and the lid at `mixing_height_m`
  // (floored), with no residual layer; BoxState::set_residual_top gives it one.
  [[nodiscard]] BoxState make_state(double mixing_height_m) const;
  [[nodiscard]] HourResult make_result() const;

  // Mass per unit area in the mixed and residual layers [g m-2], pollutant p, all parts.
  [[nodiscard]] double mixed_mass(const BoxState& s, std::size_t p) const;
  [[nodiscard]] double residual_mass(const BoxState& s, std::size_t p) const;

  // Most kinks of the forcing within one hour (clock split, two wind components, two calm-floor
  // crossings, the lid floor, two residual-layer tops).
  static constexpr int kMaxBreaks = 12;

  // Advances the state through hour `hour` of the forcing. No allocation, no I/O.
  void step_hour(BoxState& s, const Forcing& forcing, std::size_t hour, HourResult& out) const;

  // Many boxes of this engine (one pollutant) through the same hour of held forcing
  // (MetReading::hour_average), each with its own met: box i takes hour `hour` of `forcing`
  // (clock, emissions, free troposphere) with mixing height met.mixing_height_m[i], wind
  // (met.wind_u_m_s[i], met.wind_v_m_s[i]) and background met.background_g_m3[i] (or the
  // forcing's when null). The arithmetic is step_hour's, operation for operation (tests: equal
  // to step_hour to the last bit), arranged in passes over the boxes so that the boxes'
  // exponentials are one vectorised loop: grid runs (grid_run.hpp) step every cell this way.
  // Writes the hour means [g m-3] to mean_c_g_m3[i * parts() + j]; the budget lines are not
  // kept. InternalError for another reading or more than one pollutant.
  struct HeldMet {
    const double* mixing_height_m = nullptr;
    const double* wind_u_m_s = nullptr;
    const double* wind_v_m_s = nullptr;
    const double* background_g_m3 = nullptr;
  };
  struct BatchWork {  // sized on first use, reused
    std::vector<double> x, em1, f, fa;
    std::vector<unsigned char> residual;
    HourResult scratch;
  };
  void step_held_hours(BoxState* const* boxes, std::size_t n, const HeldMet& met,
                       const Forcing& forcing, std::size_t hour, BatchWork& work,
                       double* mean_c_g_m3) const;

  // e^-x and the integrals of the exact step (box_model.cpp).
  struct Phi {
    double decay, g1, g2;  // e^-x, h phi1(x), h^2 phi2(x)
  };

 private:
  void move_lid(BoxState& s, double new_height_m, const Forcing& F, std::size_t hour,
                HourResult& out) const;
  void start_cycle(BoxState& s) const;
  // Interpolated forcing: the hour's segments between the points where the forcing has a kink,
  // the sub-step the controls allow, one Strang solution with sub-steps `refine` times finer,
  // and the Richardson combination of a coarse and a fine solution.
  int hour_breaks(const BoxState& s, const Forcing& F, std::size_t hour, double* breaks) const;
  [[nodiscard]] double substep_limit_s(const Forcing& F, std::size_t hour) const;
  void interpolate(BoxState& s, const Forcing& F, std::size_t hour, const double* breaks,
                   int segments, double step_s, int refine, HourResult& out) const;
  bool combine(BoxState& s, const HourResult& coarse_met, HourResult& out) const;
  void vent_older(BoxState& s, HourResult& out) const;
  void exact_step(BoxState& s, double dt_s, double flushing_per_s, double flushing_aloft_per_s,
                  const Forcing& F, std::size_t hour, int half, HourResult& out) const;
  // The pieces of exact_step, shared with step_held_hours: the decay rates [1/s] of the mixed
  // layer and of the residual layer (0 when there is no residual air to update), and the
  // updates given their Phi; budget lines are added to *b unless b is null.
  [[nodiscard]] double mixed_rate_per_s(const BoxState& s, double f, std::size_t p) const;
  void mixed_update(BoxState& s, const Phi& ph, double dt, double f, double cb, const Forcing& F,
                    std::size_t hour, int half, std::size_t p, double* mean, BudgetTerms* b) const;
  [[nodiscard]] double residual_rate_per_s(const BoxState& s, double fa, std::size_t p) const;
  void residual_update(BoxState& s, const Phi& phr, double dt, double fa, double ca, std::size_t p,
                       BudgetTerms* b) const;
  double floored_height(double h, HourResult& out) const;
  // Flushing rate with the calm floor; returns the speed used.
  double flushing(double u, double v, double& f, HourResult& out) const;

  Footprint footprint_;
  FlushingGeometry geometry_;
  std::vector<PollutantProcesses> processes_;
  std::size_t n_sectors_;
  EngineOptions options_;
};

}  // namespace lidbox
