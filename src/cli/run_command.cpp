#include "run_command.hpp"

#include <filesystem>
#include <iostream>
#include <memory>

#include "lidbox/atomic_file.hpp"
#include "lidbox/case_file.hpp"
#include "lidbox/run.hpp"
#include "lidbox/run_report.hpp"
#include "progress.hpp"

namespace lidbox::cli {

namespace {
struct RunOptions {
  std::string case_file;
  std::string output_dir;
  bool quiet = false;
};
}  // namespace

void add_run_command(CLI::App& app, int& exit_code) {
  auto opt = std::make_shared<RunOptions>();
  CLI::App* run = app.add_subcommand("run", "Run a case: integrate the box hour by hour and write its tables");
  run->add_option("case", opt->case_file, "Case file (TOML)")->required();
  run->add_option("-o,--output", opt->output_dir, "Output folder (default: outputs/<case name>)");
  run->add_flag("-q,--quiet", opt->quiet, "Print nothing on success");
  run->callback([opt, &exit_code] {
    const CaseSpec c = load_case(opt->case_file);
    const MetSeries met = read_case_met(c);
    Progress progress;
    const RunResult r = run_case(c, met, [&progress](double f, const char* stage) { progress.update(f, stage); });
    progress.finish();
    const auto files = render_run_outputs(c, met, r);
    const std::string dir = opt->output_dir.empty() ? c.output_directory : opt->output_dir;
    std::vector<std::pair<std::filesystem::path, std::string>> targets;
    std::vector<std::string> written;
    for (const auto& f : files) {
      targets.emplace_back(std::filesystem::path(dir) / f.name, f.content);
      written.push_back(targets.back().first.string());
    }
    write_files_atomically(targets);
    if (!opt->quiet) {
      std::cout << files[2].content << "\nWritten:";
      for (const auto& w : written) std::cout << ' ' << w;
      std::cout << '\n';
    }
    exit_code = 0;
  });
}

}  // namespace lidbox::cli
