#include "observe_command.hpp"

#include <cmath>
#include <iostream>
#include <memory>
#include <sstream>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/standards/observations_csv.hpp"
#include "lidbox/standards/rule_set.hpp"
#include "lidbox/report/standards_tables.hpp"

namespace lidbox::cli {

namespace {

struct ObserveArgs {
  std::string observations;
  std::string rules = "us-naaqs,eu-2008-50";
  std::string rules_dir;
  std::string lst_offset;
  std::string issue_time;
  std::string aqi_table = "2024";
  std::string index;
  std::string out_dir = "outputs";
  std::string deprecated_out;  // --out, the old spelling of -o/--output
  std::vector<std::string> missing_values;
  std::string prefix;
  std::vector<std::string> rolling;
  bool no_aqi = false;
  bool no_aqhi = false;
};

std::vector<std::string> split_list(const std::string& s) {
  std::vector<std::string> out;
  std::stringstream in(s);
  for (std::string item; std::getline(in, item, ',');) {
    if (!item.empty()) out.push_back(item);
  }
  return out;
}

// "8" or "8:6" -> window 8 h, at least 6 valid hours (default ceil(0.75 k)).
RollingRequest parse_rolling(const std::string& text) {
  const auto where = "--rolling " + text;
  const auto colon = text.find(':');
  auto to_int = [&](const std::string& s) {
    std::size_t used = 0;
    int v = 0;
    try {
      v = std::stoi(s, &used);
    } catch (...) {
      used = 0;
    }
    if (used != s.size() || v < 1 || v > 8784) {
      throw InputError(where, "\"" + s + "\"", "K or K:M with 1 <= M <= K <= 8784 hours");
    }
    return v;
  };
  RollingRequest q;
  q.window_h = to_int(text.substr(0, colon));
  q.min_valid_h = colon == std::string::npos ? min_valid_count(q.window_h, 0.75)
                                             : to_int(text.substr(colon + 1));
  if (q.min_valid_h > q.window_h) {
    throw InputError(where, "M = " + std::to_string(q.min_valid_h) + " > K", "M <= K");
  }
  return q;
}

void run(const ObserveArgs& a) {
  ObservationsOptions read_options;
  read_options.missing_values = parse_missing_value_codes(a.missing_values, "--missing-value");
  const auto obs = read_observations_csv(a.observations, read_options);
  std::string out_dir = a.out_dir;
  if (!a.deprecated_out.empty()) {
    std::cerr << "lidbox observe: warning: --out is deprecated; use -o/--output\n";
    out_dir = a.deprecated_out;
  }
  ReportOptions opt;
  opt.lst_offset_s = parse_utc_offset_s(a.lst_offset, "--lst-offset");
  opt.zone = TimeZone::parse(format_utc_offset(opt.lst_offset_s), "--lst-offset");
  if (!a.issue_time.empty()) {
    opt.issue_time_utc = parse_instant_with_offset(a.issue_time, "--issue-time");
  }
  opt.aqi_table = parse_aqi_table(a.aqi_table, "--aqi-table");
  opt.with_aqi = !a.no_aqi;
  opt.with_aqhi = !a.no_aqhi;
  if (!a.index.empty()) opt.index = load_air_index(a.index);
  for (const auto& r : a.rolling) opt.rolling.push_back(parse_rolling(r));
  const auto dir = rules_directory(
      a.rules_dir.empty() ? std::nullopt : std::optional<std::filesystem::path>(a.rules_dir));
  const auto names = split_list(a.rules);
  if (names.empty()) throw InputError("--rules", "an empty list", "rule-set ids or files");
  opt.rule_sets = load_rule_sets(names, dir);
  opt.input_label = "observations " + a.observations;
  opt.file_prefix =
      a.prefix.empty() ? std::filesystem::path(a.observations).stem().string() + "_" : a.prefix;
  for (const auto& [pollutant, limits] : obs.below_detection) {
    std::size_t n = 0;
    for (double l : limits) n += std::isnan(l) ? 0 : 1;
    std::cerr << "lidbox observe: note: " << n << " " << pollutant
              << " values below detection (\"<L\") are missing values in these tables\n";
  }
  for (const auto& note : reading_notes(obs)) std::cerr << "lidbox observe: note: " << note << "\n";
  opt.measured_data = true;
  const auto report = compute_standards_report(obs.series, std::move(opt));
  const auto written = write_standards_report(report, out_dir);
  for (const auto& p : written) std::cout << "wrote " << p.string() << "\n";
  // Monitor data are measurements, not the box model's estimate: the model's caution would
  // misdescribe them.
  std::cerr << "lidbox observe: these tables summarise measured data from " << a.observations
            << " as given (no model); a screening summary, not an official compliance "
               "determination or alert.\n";
}

}  // namespace

void add_observe_command(CLI::App& app, int& exit_code) {
  auto args = std::make_shared<ObserveArgs>();
  CLI::App* sub = app.add_subcommand(
      "observe",
      "Averages, standards, AQI/AQHI and alert episodes for observed hourly concentrations");
  sub->add_option("observations", args->observations,
                  "CSV: time (ISO 8601 with offset, start of hour), then \"<pollutant> [<unit>]\" "
                  "columns; empty cell = missing")
      ->required();
  sub->add_option("--rules", args->rules,
                  "comma-separated rule-set ids (us-naaqs, eu-2008-50, eu-2024-2881, who-2021) "
                  "or TOML files")
      ->capture_default_str();
  sub->add_option(
      "--rules-dir", args->rules_dir,
      "folder of rule-set files (default: $LIDBOX_RULES_DIR, else the shipped src/data/rules)");
  sub->add_option("--lst-offset", args->lst_offset,
                  "local standard time as a fixed UTC offset, e.g. -05:00 (no daylight saving)")
      ->required();
  sub->add_option("--issue-time", args->issue_time,
                  "forecast issue time (ISO 8601 with offset) for episode lead times");
  sub->add_option("--aqi-table", args->aqi_table, "US AQI breakpoints: 2024 or 2018")
      ->capture_default_str();
  sub->add_option("--index", args->index,
                  "the index people read: an id of the shipped indices (us-aqi-2024, us-aqi-2018, "
                  "eu-eaqi-2017, ca-aqhi) or the path of an index TOML file");
  sub->add_option("-o,--output", args->out_dir, "Output folder")->capture_default_str();
  // The old spelling, kept hidden for scripts; it warns.
  sub->add_option("--out", args->deprecated_out, "deprecated: -o/--output")->group("");
  sub->add_option("--missing-value", args->missing_values,
                  "a code the file writes for a missing value (e.g. -999); repeat or separate by "
                  "commas; such cells become gaps and are counted");
  sub->add_option("--prefix", args->prefix, "file-name prefix (default: <observations stem>_)");
  sub->add_option("--rolling", args->rolling,
                  "also write running means: K or K:M (K-hour windows, at least M valid hours)");
  sub->add_flag("--no-aqi", args->no_aqi, "skip the US AQI table");
  sub->add_flag("--no-aqhi", args->no_aqhi, "skip the Canada AQHI table");
  // Errors rise to main(), which maps them to exit codes like every other subcommand's.
  sub->callback([args, &exit_code] {
    run(*args);
    exit_code = 0;
  });
}

}  // namespace lidbox::cli
