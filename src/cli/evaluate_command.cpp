#include "evaluate_command.hpp"

#include <cmath>
#include <filesystem>
#include <iostream>
#include <memory>
#include <optional>
#include <sstream>

#include "lidbox/analysis/calibrated_case.hpp"
#include "lidbox/analysis/ensemble_verification.hpp"
#include "lidbox/analysis/model_evaluation.hpp"
#include "lidbox/analysis/run_standards.hpp"
#include "lidbox/analysis/sector_fit.hpp"
#include "lidbox/base/atomic_file.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/diagnostics/daily_diagnostics.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/report/bulletin.hpp"
#include "lidbox/report/evaluation_report.hpp"
#include "lidbox/report/run_report.hpp"
#include "lidbox/standards/observations_csv.hpp"
#include "lidbox/standards/rule_set.hpp"
#include "progress.hpp"

namespace lidbox::cli {

namespace {

struct EvaluateArgs {
  std::string case_file;
  std::vector<std::string> monitors;
  std::string pollutant;
  std::string rules;
  std::string rules_dir;
  std::string below = "half";
  std::string fit;
  bool offset = false;
  bool no_background = false;
  std::vector<std::string> hold;
  std::vector<std::string> priors;
  double obs_error = 0.0;
  std::string weights;
  int bootstrap = 1000;
  int block_hours = 24;
  std::uint64_t seed = 1;
  std::string output_dir;
  bool quiet = false;
  std::vector<std::string> missing_values;
};

std::vector<std::string> split_list(const std::string& s) {
  std::vector<std::string> out;
  std::stringstream in(s);
  for (std::string item; std::getline(in, item, ',');) {
    const std::string t(trim(item));
    if (!t.empty()) out.push_back(t);
  }
  return out;
}

std::vector<RuleSet> rules_for(const CaseSpec& c, const EvaluateArgs& a) {
  if (!a.rules.empty()) {
    const auto dir = rules_directory(
        a.rules_dir.empty() ? std::nullopt : std::optional<std::filesystem::path>(a.rules_dir));
    const auto names = split_list(a.rules);
    if (names.empty()) throw InputError("--rules", "an empty list", "rule-set ids or files");
    return load_rule_sets(names, dir);
  }
  if (!c.standards) return {};
  const auto dir =
      rules_directory(c.standards->rules_dir.empty()
                          ? std::nullopt
                          : std::optional<std::filesystem::path>(c.standards->rules_dir));
  return load_rule_sets(c.standards->rule_sets, dir);
}

SectorFitOptions fit_options(const EvaluateArgs& a, std::size_t monitors) {
  SectorFitOptions o;
  if (a.fit == "nnls") {
    o.method = FitMethod::nnls;
  } else if (a.fit == "bayes") {
    o.method = FitMethod::bayes;
  } else {
    throw InputError("--fit", "\"" + a.fit + "\"" + did_you_mean(a.fit, {"nnls", "bayes"}),
                     "nnls or bayes");
  }
  o.offset = a.offset;
  o.background = !a.no_background;
  o.hold = a.hold;
  for (const auto& p : a.priors) {
    const auto [name, prior] = parse_prior(p, "--prior " + p);
    o.priors[name] = prior;
  }
  if (!o.priors.empty() && o.method != FitMethod::bayes) {
    throw InputError("--prior", "priors with --fit " + a.fit, "--fit bayes (NNLS takes no priors)");
  }
  if (a.obs_error != 0.0) {
    if (!(a.obs_error > 0.0)) {
      throw InputError("--obs-error", format_number(a.obs_error),
                       "a positive standard deviation in the case's unit");
    }
    o.observation_error = a.obs_error;
  }
  for (const auto& w : split_list(a.weights)) {
    double v = 0.0;
    if (!parse_double(w, v))
      throw InputError("--weights", "\"" + w + "\"", "comma-separated positive numbers");
    o.monitor_weights.push_back(v);
  }
  if (!o.monitor_weights.empty() && o.monitor_weights.size() != monitors) {
    throw InputError("--weights", std::to_string(o.monitor_weights.size()) + " weights",
                     "one per paired monitor series (" + std::to_string(monitors) + ")");
  }
  if (a.bootstrap < 0)
    throw InputError("--bootstrap", std::to_string(a.bootstrap), "0 or more resamples");
  o.bootstrap = a.bootstrap;
  o.block_hours = a.block_hours;
  o.seed = a.seed;
  return o;
}

// Every monitor file, read before the run so that a bad file is refused at once.
std::vector<Observations> read_monitor_files(const std::vector<std::string>& paths,
                                             const std::vector<std::string>& missing_values,
                                             std::vector<std::string>& notes) {
  ObservationsOptions options;
  options.missing_values = parse_missing_value_codes(missing_values, "--missing-value");
  std::vector<Observations> observations;
  for (std::size_t k = 0; k < paths.size(); ++k) {
    for (std::size_t j = 0; j < k; ++j) {
      if (std::filesystem::path(paths[j]).lexically_normal() ==
          std::filesystem::path(paths[k]).lexically_normal()) {
        throw InputError(paths[k], "given twice",
                         "each monitor file once (its hours would count twice)");
      }
    }
    observations.push_back(read_observations_csv(paths[k], options));
    for (const auto& note : reading_notes(observations.back())) {
      notes.push_back(paths[k] + ": " + note);
    }
  }
  return observations;
}

// The monitors paired with the run, labelled uniquely, with the model's series beside them.
void pair_monitors(const CaseSpec& c, const RunResult& r,
                   const std::vector<Observations>& observations, const EvaluateArgs& a,
                   EvaluationReportInput& in) {
  for (const auto& obs : observations) {
    for (auto& m : pair_monitor(c, r, obs, a.pollutant, in.below, &in.skipped))
      in.monitors.push_back(std::move(m));
  }
  // Labels name monitors in tables and charts: two files with one stem keep their paths.
  for (auto& m : in.monitors) {
    for (const auto& other : in.monitors) {
      if (other.label == m.label && other.monitor != m.monitor) m.label = m.monitor;
    }
  }
  for (const auto& m : in.monitors) in.modelled.push_back(model_total(c, r, m.case_index));
}

// The calibrated case run again: it must reproduce the fitted hour means (the engine is linear
// in its sources), apart from an offset and what spin-up's convergence test changes. Runs from
// the case's own folder (the output folder may not exist yet), with the original's paths.
std::string rerun_check(const CaseSpec& c, const SectorFitReport& fit, const FitDesign& design,
                        const std::string& label, const std::string& calibrated_name,
                        const std::vector<double>& fitted) {
  std::string base = std::filesystem::path(c.file).parent_path().string();
  if (base.empty()) base = ".";
  const CalibratedCase here = calibrated_case(c, read_text_file(c.file, c.file), fit, label, base);
  const CaseSpec cc =
      parse_case(here.text, (std::filesystem::path(base) / calibrated_name).string(), base);
  const RunResult rc = run_case(cc, read_case_met(cc));
  const std::vector<double> rerun = model_total(cc, rc, design.case_index);
  double offset = fitted_scale(fit, "offset");
  if (design.columns.empty() || design.columns.front().kind != FitColumn::Kind::offset)
    offset = 0.0;
  double worst = 0.0, scale = 0.0;
  for (std::size_t i = 0; i < rerun.size(); ++i) {
    worst = std::max(worst, std::fabs(rerun[i] + offset - fitted[i]));
    scale = std::max(scale, std::fabs(fitted[i]));
  }
  return "the calibrated case, run again, reproduces the fitted hour means to " +
         format_number(scale > 0 ? worst / scale : worst, 2) + " of their peak" +
         (offset != 0.0 ? " (with the offset added)" : "");
}

// Fits the sectors' scales to the monitors, evaluates the fitted model, and writes the
// calibrated case into `files`.
void fit_and_calibrate(const CaseSpec& c, const RunResult& r, const std::vector<RuleSet>& rules,
                       const EvaluateArgs& a, const std::string& dir, FitDesign& design,
                       EvaluationReportInput& in, std::vector<OutputFile>& files) {
  const SectorFitOptions opt = fit_options(a, in.monitors.size());
  std::vector<std::string> pollutants;
  for (const auto& m : in.monitors) {
    if (std::find(pollutants.begin(), pollutants.end(), m.pollutant) == pollutants.end()) {
      pollutants.push_back(m.pollutant);
    }
  }
  if (pollutants.size() > 1) {
    throw InputError("--fit", "monitors of " + join(pollutants),
                     "one pollutant to fit: choose it with --pollutant");
  }
  design = build_fit_design(c, r, in.monitors, opt);
  in.design = &design;
  SectorFitReport fit = fit_sectors(design, opt);
  for (const auto& m : in.monitors) fit.monitors.push_back(m.label);
  fit.weights = opt.monitor_weights.empty() ? std::vector<double>(in.monitors.size(), 1.0)
                                            : opt.monitor_weights;
  const std::vector<double> fitted = fitted_series(design, fit);
  in.fitted.assign(in.monitors.size(), fitted);
  const std::string label = std::string(opt.method == FitMethod::nnls ? "NNLS" : "Bayesian") +
                            " fit of " + fit.pollutant + " to " + join(fit.monitors);
  in.after = evaluate_against_monitors(in.monitors, in.fitted, r.hours,
                                       c.zone.standard_offset_s(), rules, "after the " + label);
  const CalibratedCase cal = calibrated_case(c, read_text_file(c.file, c.file), fit, label, dir);
  in.calibrated_case_name = c.name + "-calibrated.toml";
  in.calibrated_notes = cal.notes;
  in.calibrated_notes.push_back(
      rerun_check(c, fit, design, label, in.calibrated_case_name, fitted));
  in.fit = std::move(fit);
  files.push_back({in.calibrated_case_name, cal.text});
}

// The bulletin of the evaluated run, with what the monitors measured beside the model, the
// evaluation's time series chart inline, and the run's diagnostics as the outlook's reasons.
void add_bulletin(const CaseSpec& c, const MetSeries& met, const RunResult& r,
                  const EvaluationReportInput& in, const EnsembleOutcome* ens,
                  const BulletinTemplates& templates, std::vector<OutputFile>& files) {
  const std::optional<StandardsReport> standards = run_standards(c, r, std::nullopt);
  DiagnosticsSetup diag =
      load_diagnostics_setup(c.diagnostics.ventilation_table, c.diagnostics.schemes);
  diag.limits = c.plausibility;
  const DiagnosticsResult days = diagnose_met(met, c.met.reading, c.met.hour_label, c.zone, diag);
  BulletinInput b;
  b.c = &c;
  b.r = &r;
  b.standards = standards ? &*standards : nullptr;
  b.ensemble = ens;
  b.days = &days;
  b.diagnostics = &diag;
  b.monitors = &in.monitors;
  b.issue_time_utc = run_issue_time(c, std::nullopt);
  for (const auto& f : files) {
    if (f.name == "timeseries.svg") b.chart_svg = f.content;
  }
  b.templates = &templates;
  for (auto& f : render_bulletin(b)) files.push_back(std::move(f));
}

void run(const EvaluateArgs& a) {
  const CaseSpec c = load_case(a.case_file);
  EvaluationReportInput in;
  in.below = parse_below_detection(a.below, "--below-detection");
  std::vector<std::string> notes;  // said once the evaluation has succeeded
  const std::vector<Observations> observations =
      read_monitor_files(a.monitors, a.missing_values, notes);
  const std::vector<RuleSet> rules = rules_for(c, a);
  const MetSeries met = read_case_met(c);
  // Read before the run, so that a bad wording file stops it at once and writes nothing.
  const BulletinTemplates templates = load_bulletin_templates(c.bulletin_templates);
  Progress progress;
  const RunResult r =
      run_case(c, met, [&progress](double f, const char* s) { progress.update(f, s); });
  progress.finish();

  in.c = &c;
  in.hours = &r.hours;
  for (const auto& rs : rules) in.rule_set_ids.push_back(rs.id);
  pair_monitors(c, r, observations, a, in);
  in.before = evaluate_run(c, r, in.monitors, rules);
  std::optional<EnsembleOutcome> ens;
  if (c.ensemble) {
    // The members' daily probabilities per rule against the monitors' own day calls.
    ens = forecast_ensemble(c, met, rules, [&progress](double f) { progress.update(f, "ensemble"); });
    progress.finish();
    in.ensemble_members = ens->members.size();
    in.ensemble = verify_ensemble(in.before, ens->rules, a.seed);
  }
  const std::string dir = a.output_dir.empty()
                              ? (std::filesystem::path("outputs") / (c.name + "-evaluate")).string()
                              : a.output_dir;
  std::vector<OutputFile> files;
  FitDesign design;
  if (!a.fit.empty()) fit_and_calibrate(c, r, rules, a, dir, design, in, files);
  auto rendered = render_evaluation_outputs(in);
  files.insert(files.begin(), rendered.begin(), rendered.end());
  add_bulletin(c, met, r, in, ens ? &*ens : nullptr, templates, files);
  const auto written = write_output_files(dir, files);
  for (const auto& note : notes) std::cerr << "lidbox evaluate: note: " << note << "\n";
  if (!a.quiet) {
    std::cout << output_named(files, "summary.txt").content << "Written:";
    for (const auto& w : written) std::cout << ' ' << w.string();
    std::cout << '\n';
  }
}

}  // namespace

void add_evaluate_command(CLI::App& app, int& exit_code) {
  auto a = std::make_shared<EvaluateArgs>();
  CLI::App* sub = app.add_subcommand(
      "evaluate",
      "Pair a case's hour means with monitor files: agreement statistics with published criteria, "
      "profiles, exceedance verification, and (--fit) sector and background scales fitted to the "
      "monitors");
  sub->add_option("case", a->case_file, "Case file (TOML)")->required();
  sub->add_option(
         "monitors", a->monitors,
         "Monitor files in the observe format (time, then \"<pollutant> [<unit>]\" columns; "
         "empty cell = missing, \"<L\" = below the detection limit L)")
      ->required();
  sub->add_option("--missing-value", a->missing_values,
                  "a code the monitor files write for a missing value (e.g. -999); repeat or "
                  "separate by commas; such cells become gaps and are counted");
  sub->add_option("--pollutant", a->pollutant,
                  "Only this pollutant (needed with --fit when several pair)");
  sub->add_option(
      "--rules", a->rules,
      "Rule sets whose daily calls are verified (default: the case's [standards] rule_sets)");
  sub->add_option("--rules-dir", a->rules_dir, "Folder of rule-set files");
  sub->add_option("--below-detection", a->below, "Values \"<L\": half (L/2), limit, zero or drop")
      ->capture_default_str();
  sub->add_option("--fit", a->fit,
                  "Fit scales: nnls (non-negative least squares) or bayes (Gaussian priors)");
  sub->add_flag("--offset", a->offset, "Also fit a constant offset (any sign)");
  sub->add_flag("--no-background", a->no_background, "Hold the background at its case value");
  sub->add_option("--hold", a->hold, "Hold this sector at its case value (repeatable)")
      ->allow_extra_args(false);
  sub->add_option("--prior", a->priors,
                  "Bayesian prior NAME=MEAN:SD of a scale (repeatable; default 1:1)")
      ->allow_extra_args(false);
  sub->add_option(
      "--obs-error", a->obs_error,
      "Bayesian observation error, one hour, in the case's unit (default: the NNLS residual s.d.)");
  sub->add_option("--weights", a->weights,
                  "Weights of the monitor series in the fit, comma-separated");
  sub->add_option("--bootstrap", a->bootstrap, "Block-bootstrap resamples (0: none)")
      ->capture_default_str();
  sub->add_option("--block-hours", a->block_hours, "Bootstrap block length in hours")
      ->capture_default_str();
  sub->add_option("--seed", a->seed, "Bootstrap seed")->capture_default_str();
  sub->add_option("-o,--output", a->output_dir,
                  "Output folder (default: outputs/<case name>-evaluate)");
  sub->add_flag("-q,--quiet", a->quiet, "Print nothing on success");
  sub->callback([a, &exit_code] {
    run(*a);
    exit_code = 0;
  });
}

}  // namespace lidbox::cli
