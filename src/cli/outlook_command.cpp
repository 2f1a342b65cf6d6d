#include "outlook_command.hpp"

#include <filesystem>
#include <iostream>
#include <memory>

#include "lidbox/base/atomic_file.hpp"
#include "lidbox/base/caution.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/diagnostics/daily_diagnostics.hpp"
#include "lidbox/met/csv_met.hpp"
#include "lidbox/met/netcdf_met.hpp"
#include "lidbox/report/diagnostics_report.hpp"
#include "netcdf_options.hpp"

namespace lidbox::cli {

namespace {

struct OutlookArgs {
  std::string met;
  std::string zone = "UTC";
  std::string table = "usfs-vcis";
  std::vector<std::string> schemes;
  std::string reading = "hour_average";
  std::string hour_label = "period_start";
  int max_gap_hours = 3;
  std::string output_dir;
  bool quiet = false;
  NetcdfOptionTexts nc;
};

bool is_netcdf(const std::string& path) {
  const std::string ext = lower(std::filesystem::path(path).extension().string());
  return ext == ".nc" || ext == ".nc4" || ext == ".cdf";
}

void run_outlook(const OutlookArgs& a) {
  const TimeZone zone = TimeZone::parse(a.zone, "--zone");
  MetReading reading = MetReading::hour_average;
  if (a.reading == "instantaneous") {
    reading = MetReading::instantaneous;
  } else if (a.reading != "hour_average") {
    throw InputError("--reading", "\"" + a.reading + "\"", "hour_average or instantaneous");
  }
  HourLabel label = HourLabel::period_start;
  if (a.hour_label == "period_end") {
    label = HourLabel::period_end;
  } else if (a.hour_label != "period_start") {
    throw InputError("--hour-label", "\"" + a.hour_label + "\"", "period_start or period_end");
  }
  const DiagnosticsSetup setup =
      load_diagnostics_setup(a.table == "none" ? "" : a.table, a.schemes);
  MetSeries met;
  if (is_netcdf(a.met)) {
    NetcdfMetOptions o = netcdf_met_options(a.nc);
    met = read_met_netcdf(a.met, o);
    fill_gaps(met, a.max_gap_hours);
  } else {
    CsvMetOptions o;
    o.zone_for_naive_times = &zone;
    o.max_gap_hours = a.max_gap_hours;
    met = read_met_csv(a.met, o, a.met);
  }
  validate_met(met);
  const DiagnosticsResult r = diagnose_met(met, reading, label, zone, setup);
  std::vector<OutputFile> files = {{"summary.txt", "lidbox outlook: " + a.met + " (zone " +
                                                       zone.spec() + ")\n" +
                                                       std::string(kScreeningCaution) + "\n"}};
  append_diagnostics_outputs(files, setup, r);
  if (!a.output_dir.empty()) {
    const auto written = write_output_files(a.output_dir, files);
    if (!a.quiet) {
      std::cout << files[0].content << "\nWritten:";
      for (const auto& w : written) std::cout << ' ' << w.string();
      std::cout << '\n';
    }
    return;
  }
  if (!a.quiet)
    std::cout << files[0].content << "\n" << output_named(files, "stagnation.csv").content;
}

}  // namespace

void add_outlook_command(CLI::App& app, int& exit_code) {
  auto a = std::make_shared<OutlookArgs>();
  CLI::App* sub = app.add_subcommand(
      "outlook",
      "Ventilation classes, stagnation days, streaks and episodes from met alone (no emissions)");
  sub->add_option("met", a->met, "Met file: CSV (as for a case) or CF-NetCDF")->required();
  sub->add_option("--zone", a->zone,
                  "Time zone of the local standard days (as a case's time_zone)");
  sub->add_option("--table", a->table,
                  "Ventilation category table: a shipped id or a TOML path; none for none");
  sub->add_option("--scheme", a->schemes,
                  "Stagnation scheme (repeatable): a shipped id or a TOML path");
  sub->add_option("--reading", a->reading, "hour_average or instantaneous (as [met] reading)");
  sub->add_option("--hour-label", a->hour_label,
                  "period_start or period_end (as [met] hour_label)");
  sub->add_option("--max-gap", a->max_gap_hours, "Longest gap filled, hours");
  sub->add_option("-o,--output", a->output_dir,
                  "Write summary.txt, stagnation.csv and stagnation_episodes.csv here");
  sub->add_flag("-q,--quiet", a->quiet, "Print nothing on success");
  add_netcdf_options(*sub, a->nc);
  sub->callback([a, &exit_code] {
    run_outlook(*a);
    exit_code = 0;
  });
}

}  // namespace lidbox::cli
