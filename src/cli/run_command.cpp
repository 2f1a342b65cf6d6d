#include "run_command.hpp"

#include <filesystem>
#include <iostream>
#include <memory>

#include "lidbox/analysis/run_standards.hpp"
#include "lidbox/base/atomic_file.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/diagnostics/daily_diagnostics.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/report/diagnostics_report.hpp"
#include "lidbox/report/run_netcdf.hpp"
#include "lidbox/report/run_report.hpp"
#include "lidbox/report/cut_report.hpp"
#include "lidbox/report/ensemble_report.hpp"
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
    Progress progress;
    const RunResult r =
        run_case(c, met, [&progress](double f, const char* stage) { progress.update(f, stage); });
    progress.finish();
    std::optional<UtcSeconds> issue;
    if (!opt->issue_time.empty()) issue = parse_iso8601(opt->issue_time, &c.zone, "--issue-time");
    const auto standards = run_standards(c, r, issue);
    const DiagnosticsSetup diag =
        load_diagnostics_setup(c.diagnostics.ventilation_table, c.diagnostics.schemes);
    const DiagnosticsResult days = diagnose_met(met, c.met.reading, c.met.hour_label, c.zone, diag);
    auto files = render_run_outputs(c, met, r, standards ? &*standards : nullptr);
    append_diagnostics_outputs(files, diag, days);
    if (opt->netcdf || c.netcdf_output) {
      for (auto& f : render_run_netcdf_outputs(c, r, standards ? &*standards : nullptr)) {
        files.push_back(std::move(f));
      }
    }
    const auto rule_sets = standards ? standards->options.rule_sets : std::vector<RuleSet>{};
    std::optional<EnsembleOutcome> ens;
    if (c.ensemble) {
      ens = forecast_ensemble(c, met, rule_sets,
                              [&progress](double f) { progress.update(f, "ensemble"); });
      progress.finish();
      append_section(files, "summary.txt", render_ensemble_summary(c, *ens));
      for (auto& f : render_ensemble_outputs(c, *ens)) files.push_back(std::move(f));
    }
    if (c.cut) {
      const EmissionCut cut =
          compute_emission_cut(c, met, ens ? ens->member_met : std::vector<MetSeries>{}, rule_sets);
      append_section(files, "summary.txt", render_cut_summary(c, cut));
      files.push_back({"cut.csv", render_cut_csv(c, cut)});
    }
    const std::string dir = opt->output_dir.empty() ? c.output_directory : opt->output_dir;
    const auto written = write_output_files(dir, files);
    if (!opt->quiet) {
      std::cout << output_named(files, "summary.txt").content << "\nWritten:";
      for (const auto& w : written) std::cout << ' ' << w.string();
      std::cout << '\n';
    }
    exit_code = 0;
  });
}

}  // namespace lidbox::cli
