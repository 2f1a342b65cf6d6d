#include "run_command.hpp"

#include <filesystem>
#include <iostream>
#include <memory>

#include "lidbox/analysis/run_standards.hpp"
#include "lidbox/base/output_folder.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
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
    const MetSeries met = read_case_met(c);
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
    const std::string summary = run_and_write(out, c, met, o).summary;
    const auto written = out.publish();
    if (!opt->quiet) {
      std::cout << summary << "\nWritten:";
      for (const auto& w : written) std::cout << ' ' << w.string();
      std::cout << '\n';
    }
    exit_code = 0;
  });
}

}  // namespace lidbox::cli
