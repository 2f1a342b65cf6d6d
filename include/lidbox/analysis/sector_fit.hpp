// Scale factors for a case's emission sectors and its background, fitted to monitors.
//
// The box is linear in its sources (box_model.hpp: every pollutant is carried as separate parts),
// so the run's hour means of one pollutant are y_model(t) = Σ_j K_j(t) + K_init(t), with K_0 the
// background part (inflow and free-troposphere air) and K_j the part of sector j. Scaling a
// sector's emission of that pollutant by x_j scales its part by x_j exactly (and the background
// part with the background and free-troposphere values); the initial-state part is kept as it is.
// So the fit is linear (shared design, decisions-references §5):
//
//   y_m(t) − K_init(t) ≈ Σ_j x_j K_j(t) + c        for every monitor m and paired hour t
//
// with an optional constant offset c (same unit, any sign; for what the box cannot represent,
// such as a nearby source), rows weighted by the monitor's weight w_m.
//
// Methods
// * NNLS: x ≥ 0, c free; Lawson–Hanson (nnls.hpp). Gaussian standard errors from the
//   unconstrained least squares on the columns away from the bound,
//   cov = σ² (X_Fᵀ W X_F)⁻¹, σ² = Σ w r² / (N − p_F); a scale held at 0 is reported "at bound"
//   and has none (decisions-references §5). Degrees of freedom for signal = p_F.
// * Bayesian (Gaussian) scaling with priors x_a, S_a = diag(sd²) and observation error
//   S_o = diag(σ_o² / w) (Tarantola 2005; Rodgers 2000):
//     x̂ = x_a + (KᵀS_o⁻¹K + S_a⁻¹)⁻¹ KᵀS_o⁻¹ (y − K x_a),  Ŝ = (KᵀS_o⁻¹K + S_a⁻¹)⁻¹,
//     A = Ŝ KᵀS_o⁻¹K,  degrees of freedom for signal = tr(A).
//   σ_o is the user's, else the RMS of the NNLS residuals (stated in the report). x is not
//   constrained: a negative posterior mean is reported as it is, with a warning.
// * Block bootstrap (Künsch's moving blocks; hourly residuals are serially correlated, Hemann et
//   al. 2009): `block_hours` consecutive run hours with every monitor's rows at those hours,
//   ceil(T / L) blocks per resample, starts uniform over the run (std::mt19937_64 with the
//   given seed). Each resample is refitted by the same method; the standard error is the sample
//   standard deviation of the estimates. Gram matrices of blocks come from running sums, so a
//   resample costs O(T/L · p²), not O(N p²).
//
// Diagnostics: R² = 1 − Σw(y − ŷ)²/Σw(y − ȳ)²; t = estimate / standard error (|t| > 2: different
// from zero, EPA-450/4-87-010 §3.3); collinearity from the condition number of the column-scaled
// (unit-length, uncentred) design, warning above 30 (Belsley, Kuh & Welsch 1980, "condition
// indices of 30 or more"), and variance inflation factors from the correlation matrix of the
// columns, warning above 10 (common rule of thumb, no primary source read). Columns that are
// linearly dependent (condition number above 1e10) make the fit meaningless: InputError naming
// the columns. A column that is zero at every paired hour (a sector without emissions of the
// pollutant) is left out and listed.
#pragma once

#include <cstdint>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "lidbox/analysis/monitor_pairing.hpp"
#include "lidbox/analysis/nnls.hpp"

namespace lidbox {

enum class FitMethod { nnls, bayes };

struct ScalePrior {
  double mean = 1.0;
  double sd = 1.0;
};

struct SectorFitOptions {
  FitMethod method = FitMethod::nnls;
  bool offset = false;
  bool background = true;                    // fit the background's scale (else held at 1)
  std::vector<std::string> hold;             // sectors held at 1 (not fitted)
  std::map<std::string, ScalePrior> priors;  // by column name; others: mean 1, sd 1
  std::optional<double> observation_error;   // σ_o in the case unit (Bayesian)
  std::vector<double> monitor_weights;       // per monitor (same order); empty: all 1
  int bootstrap = 0;                         // resamples; 0: none
  int block_hours = 24;                      // common practice (no source): one day
  std::uint64_t seed = 1;
};

// "traffic=1:0.5" -> {"traffic", {1, 0.5}}; sd must be > 0. InputError naming `where`.
std::pair<std::string, ScalePrior> parse_prior(const std::string& text, const std::string& where);

struct FitColumn {
  enum class Kind { offset, background, sector };
  Kind kind = Kind::sector;
  std::string name;        // "offset", "background", or the sector's name
  std::size_t sector = 0;  // index in CaseSpec::sectors (Kind::sector)
};

// The linear problem: rows are (monitor, run hour) pairs.
struct FitDesign {
  std::string pollutant;  // canonical
  std::string unit;       // the case's unit
  std::size_t case_index = 0;
  std::vector<FitColumn> columns;  // the offset first when fitted
  std::vector<std::size_t> row_monitor;
  std::vector<std::size_t> row_hour;
  DenseMatrix K;                    // rows × columns, the offset column is 1
  std::vector<double> y;            // observed minus the fixed parts
  std::vector<double> weight;       // w_m of the row's monitor
  std::vector<double> fixed_total;  // per run hour: the parts not fitted (initial state, and the
                                    // background when it is held)
  std::vector<std::vector<double>> column_series;  // per column, per run hour (offset: 1)
  std::size_t hours = 0;
  std::vector<std::string> left_out;  // columns left out, with the reason
};

// All monitors must be of one pollutant. InputError for weights that are not positive or whose
// count differs from the monitors'.
FitDesign build_fit_design(const CaseSpec& c, const RunResult& r,
                           const std::vector<MonitorPollutant>& monitors,
                           const SectorFitOptions& options);

struct FitEstimate {
  std::string name;
  double value = 0.0;
  double gaussian_se = 0.0;                          // NaN at bound
  double bootstrap_se = 0.0;                         // NaN without bootstrap
  double bootstrap_low = 0.0, bootstrap_high = 0.0;  // 2.5 and 97.5 percentiles
  double t = 0.0;                                    // value / gaussian_se
  bool at_bound = false;
  double vif = 0.0;
  double prior_mean = 0.0, prior_sd = 0.0;  // Bayesian
};

struct SectorFitReport {
  FitMethod method = FitMethod::nnls;
  std::string pollutant, unit;
  std::size_t rows = 0;
  std::vector<std::string> monitors;
  std::vector<double> weights;
  std::vector<FitEstimate> estimates;  // in the design's column order
  double r2 = 0.0;
  double residual_sd = 0.0;        // σ (weighted, per unit weight)
  double residual_dof = 0.0;       // N − p_F
  double dofs = 0.0;               // degrees of freedom for signal
  double observation_error = 0.0;  // σ_o used (Bayesian)
  bool observation_error_estimated = false;
  double condition_number = 0.0;
  int bootstrap = 0, block_hours = 0;
  std::uint64_t seed = 0;
  std::vector<std::string> warnings;
  std::vector<std::string> left_out;
};

SectorFitReport fit_sectors(const FitDesign& d, const SectorFitOptions& options);

// The fitted model's hour means (per run hour, in the design's unit): Σ x_j K_j + fixed.
std::vector<double> fitted_series(const FitDesign& d, const SectorFitReport& fit);

// Scale of a case column after the fit: 1 for columns not fitted.
double fitted_scale(const SectorFitReport& fit, const std::string& column);

}  // namespace lidbox
