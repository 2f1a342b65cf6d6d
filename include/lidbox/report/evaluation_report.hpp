// What `lidbox evaluate` writes: a run against monitors (model_evaluation.hpp), and optionally
// the fit of sector scales (sector_fit.hpp) with the evaluation after it. Rendered in memory, each
// output linear in the number of pairs.
//
//   evaluation.md          the report: inputs, the pairs used and why others were not, how
//                          zeros, below-detection and negative values are treated, statistics
//                          with the published criteria (met / not met), profiles, exceedance
//                          verification, the fit, the caution
//   statistics.csv         one row per monitor, pollutant and averaging (before, and after a fit)
//   pairs.csv              every paired hour: observed, modelled (and fitted)
//   profiles.csv           mean diurnal (local hour) and weekly profiles
//   verification.csv       the 2×2 table and scores per rule and monitor
//   verification_days.csv  each day's values and calls
//   timeseries.svg         the model's hour means with the monitor overlaid (and the fit)
//   scatter.svg            modelled against observed hour means, 1:1 and factor-2 lines
//   summary.txt            the few lines the command prints
//   ensemble_verification.csv  with an [ensemble]: Brier score and decomposition, reliability
//                          table and rank histogram per monitor and rule
//   fit.csv, fit_matrix.csv with a fit: the estimates, and the weighted problem itself (rows of
//                          monitor, hour, weight, y minus the fixed parts, and the columns), so
//                          that anyone can refit it
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lidbox/analysis/ensemble_verification.hpp"
#include "lidbox/analysis/model_evaluation.hpp"
#include "lidbox/analysis/sector_fit.hpp"
#include "lidbox/base/atomic_file.hpp"
#include "lidbox/engine/case_file.hpp"

namespace lidbox {

struct EvaluationReportInput {
  const CaseSpec* c = nullptr;
  const std::vector<HourRecord>* hours = nullptr;
  std::vector<MonitorPollutant> monitors;
  std::vector<std::vector<double>> modelled;  // per monitor, per run hour (before)
  std::vector<std::string> skipped;           // monitor columns the case lacks
  BelowDetection below = BelowDetection::half_limit;
  std::vector<std::string> rule_set_ids;
  ModelEvaluation before;
  // With an [ensemble] in the case: its daily probabilities verified against the monitors.
  std::size_t ensemble_members = 0;
  std::vector<EnsembleRuleVerification> ensemble;
  // With a fit:
  std::optional<SectorFitReport> fit;
  const FitDesign* design = nullptr;        // the fit's matrix (fit_matrix.csv)
  std::vector<std::vector<double>> fitted;  // per monitor, per run hour (after)
  std::optional<ModelEvaluation> after;
  std::string calibrated_case_name;  // file name of the calibrated case, when written
  std::vector<std::string> calibrated_notes;
};

std::vector<OutputFile> render_evaluation_outputs(const EvaluationReportInput& in);

// The two charts alone (tests render them in chromium).
std::string render_evaluation_timeseries_svg(const EvaluationReportInput& in);
std::string render_evaluation_scatter_svg(const EvaluationReportInput& in);

}  // namespace lidbox
