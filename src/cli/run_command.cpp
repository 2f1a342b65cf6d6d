#include "run_command.hpp"

#include <filesystem>
#include <iostream>
#include <memory>

#include "lidbox/analysis/run_standards.hpp"
#include "lidbox/base/atomic_file.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/output_folder.hpp"
#include "lidbox/diagnostics/daily_diagnostics.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/report/chart.hpp"
#include "lidbox/report/bulletin.hpp"
#include "lidbox/report/chart.hpp"
#include "lidbox/report/cut_report.hpp"
#include "lidbox/report/diagnostics_report.hpp"
#include "lidbox/report/ensemble_report.hpp"
#include "lidbox/report/run_netcdf.hpp"
#include "lidbox/report/run_report.hpp"
#include "progress.hpp"

namespace lidbox::cli {

namespace {
struct RunOptions {
  std::string case_file;
  std::string output_dir;
  std::string issue_time;
  bool quiet = false;
  bool netcdf = false;
};
// Adds a section at the end of one of the rendered files (the summary).
void append_section(std::vector<OutputFile>& files, const std::string& name,
                    const std::string& text) {
  for (auto& f : files) {
    if (f.name == name) f.content += text;
  }
}
// chart.svg when the ensemble's band must be drawn (a single run's is written with the run),
// and the bulletin with that chart inline.
void add_chart_and_bulletin(std::vector<OutputFile>& files, const CaseSpec& c, const RunWritten& w,
                            const EnsembleOutcome* ens, const EmissionCut* cut,
                            const DiagnosticsSetup& diag, const DiagnosticsResult& days,
                            const BulletinTemplates& templates) {
  RunChartInput chart;
  chart.c = &c;
  chart.r = &w.result;
  chart.standards = w.standards ? &*w.standards : nullptr;
  chart.ensemble = ens ? &ens->percentiles : nullptr;
  chart.issue_time_utc = w.issue_time_utc;
  BulletinInput b;
  b.c = &c;
  b.r = &w.result;
  b.standards = chart.standards;
  b.ensemble = ens;
  b.cut = cut;
  b.days = &days;
  b.diagnostics = &diag;
  b.issue_time_utc = w.issue_time_utc;
  // The same chart as chart.svg; with an ensemble, chart.svg is this one (with the band).
  b.chart_svg = render_run_chart_svg(chart);
  if (ens) files.push_back({"chart.svg", b.chart_svg});
  b.templates = &templates;
  for (auto& f : render_bulletin(b)) files.push_back(std::move(f));
}
}  // namespace

void add_run_command(CLI::App& app, int& exit_code) {
  auto opt = std::make_shared<RunOptions>();
  CLI::App* run =
      app.add_subcommand("run", "Run a case: integrate the box hour by hour and write its tables");
  run->add_option("case", opt->case_file, "Case file (TOML)")->required();
  run->add_option("-o,--output", opt->output_dir, "Output folder (default: outputs/<case name>)");
  run->add_option("--issue-time", opt->issue_time,
                  "Forecast issue time (ISO 8601) for the lead time of alert episodes; overrides "
                  "[standards] issue_time");
  run->add_flag("--netcdf", opt->netcdf,
                "Also write hourly.nc, budget.nc and daily.nc (CF-1.12 timeSeries); same as "
                "[output] netcdf = true");
  run->add_flag("-q,--quiet", opt->quiet, "Print nothing on success");
  run->callback([opt, &exit_code] {
    const CaseSpec c = load_case(opt->case_file);
    if (!c.grid_table.empty()) {
      throw InputError(c.grid_table, "a [grid] table",
                       "a point case for `lidbox run`; run a grid case with `lidbox grid`");
    }
    const MetSeries met = read_case_met(c);
    // Read before the run, so that a bad wording file stops it at once and writes nothing.
    const BulletinTemplates templates = load_bulletin_templates(c.bulletin_templates);
    // The output folder is checked and its temporary made before the run, so a bad place
    // fails at once rather than after a long run.
    OutputFolder out(opt->output_dir.empty() ? c.output_directory : opt->output_dir);
    Progress progress;
    RunWriteOptions o;
    o.netcdf = opt->netcdf || c.netcdf_output;
    if (!opt->issue_time.empty())
      o.issue_time = parse_iso8601(opt->issue_time, &c.zone, "--issue-time");
    o.progress = [&progress](double f, const char* stage) { progress.update(f, stage); };
    o.after_run = [&progress] { progress.finish(); };
    o.chart = !c.ensemble;  // drawn below with the ensemble's band
    RunWritten w = run_and_write(out, c, met, o);
    DiagnosticsSetup diag =
        load_diagnostics_setup(c.diagnostics.ventilation_table, c.diagnostics.schemes);
    diag.limits = c.plausibility;
    const DiagnosticsResult days = diagnose_met(met, c.met.reading, c.met.hour_label, c.zone, diag);
    std::vector<OutputFile> files = {{"summary.txt", std::move(w.summary)}};
    append_diagnostics_outputs(files, diag, days);
    const auto rule_sets = w.standards ? w.standards->options.rule_sets : std::vector<RuleSet>{};
    std::optional<EnsembleOutcome> ens;
    if (c.ensemble) {
      ens = forecast_ensemble(c, met, rule_sets,
                              [&progress](double f) { progress.update(f, "ensemble"); });
      progress.finish();
      append_section(files, "summary.txt", render_ensemble_summary(c, *ens));
      for (auto& f : render_ensemble_outputs(c, *ens)) files.push_back(std::move(f));
    }
    std::optional<EmissionCut> cut;
    if (c.cut) {
      cut = compute_emission_cut(c, met, ens ? ens->member_met : std::vector<MetSeries>{}, rule_sets);
      append_section(files, "summary.txt", render_cut_summary(c, *cut));
      files.push_back({"cut.csv", render_cut_csv(c, *cut)});
    }
    add_chart_and_bulletin(files, c, w, ens ? &*ens : nullptr, cut ? &*cut : nullptr, diag, days,
                           templates);
    for (const auto& f : files) out.write_whole(f.name, f.content);
    const auto written = out.publish();
    if (!opt->quiet) {
      std::cout << files.front().content << "\nWritten:";
      for (const auto& p : written) std::cout << ' ' << p.string();
      std::cout << '\n';
    }
    exit_code = 0;
  });
}

}  // namespace lidbox::cli
