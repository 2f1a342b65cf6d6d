// Air-quality rule sets as data: limit values / standards / guidelines and alert thresholds, read
// from one TOML file per rule set. The shipped files live in src/data/rules/ (US NAAQS, EU
// 2008/50/EC, EU 2024/2881 2030 values, WHO 2021 guidelines with interim targets); a user may write
// their own in the same format and pass its path.
//
// File format (every key is checked; an unknown key is an error with a "did you mean" hint):
//
//   [rule_set]
//   id = "us-naaqs"                       # short name used on the command line
//   name = "..."                          # full title
//   legal_source = "40 CFR Part 50"       # the instrument
//   legal_date = "2024-05-06"             # date of the latest amendment encoded
//   reference_temperature_K = 298.15      # ppb/ppm <-> ug/m3 conversions for this rule set
//   reference_pressure_Pa = 101325.0
//   note = "..."                          # optional
//
//   [[limit]]
//   id = "CO-8h"                    # unique within the file
//   pollutant = "CO"                # see pollutant.hpp (an unknown name is an error)
//   kind = "primary standard"       # the instrument's own word: limit value, AQG, IT-1, ...
//   averaging = "8-hour"            # "1-hour", "<k>-hour", "24-hour", "day", "year",
//                                   # "peak-season"
//   statistic = "running_mean"      # see StatisticKind
//   level = 9.0
//   unit = "ppm"                    # any unit of concentration_units.hpp
//   form = "exceedances"            # exceedances | nth_highest | percentile | annual_value
//   allowed_exceedances = 1         # form = exceedances
//   rank = 4                        # form = nth_highest
//   percentile = 98.0               # form = percentile
//   ranking = "us_98th"             # form = percentile: us_98th | us_99th | nearest_rank
//   non_overlapping = true          # running_mean: count / rank non-overlapping windows
//   rounding = "round_half_up:0"    # none | round_half_up:<d> | truncate:<d>
//   day_valid_fraction = 0.75       # a valid day: share of its hours (daily mean, daily max
//                                   # 1-h) or 8-h windows (daily max 8-h); only for the
//                                   # statistics built from days
//   period_valid_fraction = 0.75    # a valid quarter (annual_mean_of_quarterly_means) or
//                                   # month (peak_season_mean): share of its valid days
//   year_coverage = 0.9             # a covered year: share of the values a full year has
//                                   # (hours; valid days for daily statistics; quarters for
//                                   # annual_mean_of_quarterly_means); not for peak_season_mean
//   incomplete_day_counts_if_above = true  # an incomplete day still counts when above the
//                                   # level
//   years_averaged = 3              # the form averages this many calendar years
//   legal_source = "40 CFR 50.8(a)(1)"
//   legal_date = "2011-08-31"       # optional
//   checked = "SRC: ..."            # how this entry was verified: SRC / MEM / PRAC, with detail
//   note = "..."                    # optional
//
// The two kinds of completeness are separate, as the published rules keep them: a day is valid
// with e.g. 18 of 24 hours (75 %), and a year is covered with e.g. 90 % of its values (the EU
// data-quality objectives, Directive 2008/50/EC Annex I A). Defaults: 0.75 for the day and the
// period; year_coverage 0.75, or 1.0 (all four quarters) for annual_mean_of_quarterly_means.
// The former single key min_valid_fraction is refused with a message naming the two.
//
//   [[alert]]
//   id = "SO2-alert"
//   pollutant = "SO2"
//   level_name = "alert threshold"        # the rule set's own word
//   averaging = "1-hour"
//   statistic = "hourly_value"            # hourly_value | running_mean | daily_mean
//   threshold = 500.0
//   unit = "ug/m3"
//   persistence = 3                       # consecutive values (hours, or days for daily_mean)
//   above legal_source = "..."; legal_date = "..."; checked = "..."; note = "..."
//
// Errors are InputError with "<file>:<line>: <found>; expected <expected>".
#pragma once

#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lidbox/base/concentration_units.hpp"
#include "lidbox/standards/averaging.hpp"

namespace lidbox {

enum class StatisticKind {
  hourly_value,                    // each hour
  running_mean,                    // k-hour running mean, labelled by start hour
  daily_mean,                      // LST midnight-to-midnight mean
  daily_max_1h,                    // highest hour of the LST day
  daily_max_8h_17_windows,         // US ozone, Appendix U
  daily_max_8h_24_windows,         // EU, windows assigned to the day they end in
  annual_mean,                     // mean of the year's hours
  annual_mean_of_quarterly_means,  // US PM2.5, Appendix N section 4.4
  peak_season_mean,  // WHO 2021 ozone: highest 6-month running mean of monthly MDA8 means
};

enum class LimitForm { exceedances, nth_highest, percentile, annual_value };

const char* to_string(StatisticKind s);
const char* to_string(LimitForm f);
const char* to_string(RankingTable t);

struct Limit {
  std::string id;
  std::string pollutant;  // canonical name
  std::string kind;
  std::string averaging;  // as written
  int averaging_h = 1;    // window for running_mean; 1, 8, 24 for the others
  StatisticKind statistic = StatisticKind::hourly_value;
  double level = 0.0;
  std::string unit;  // as written
  LimitForm form = LimitForm::exceedances;
  int allowed_exceedances = 0;
  int rank = 1;
  double percentile = 0.0;
  RankingTable ranking = RankingTable::nearest_rank;
  bool non_overlapping = false;
  Rounding rounding;
  double day_valid_fraction = 0.75;     // share of a day's hours or windows for a valid day
  double period_valid_fraction = 0.75;  // share of a quarter's or month's days
  double year_coverage = 0.75;          // share of a full year's values for a covered year
  bool incomplete_day_counts_if_above = false;
  int years_averaged = 1;
  std::string legal_source;
  std::string legal_date;
  std::string checked;
  std::string note;
  std::string where;  // "file:line" of the [[limit]] table
};

struct AlertRule {
  std::string id;
  std::string pollutant;
  std::string level_name;
  std::string averaging;
  int averaging_h = 1;
  StatisticKind statistic = StatisticKind::hourly_value;
  double threshold = 0.0;
  std::string unit;
  int persistence = 1;
  std::string legal_source;
  std::string legal_date;
  std::string checked;
  std::string note;
  std::string where;
};

struct RuleSet {
  std::string id;
  std::string name;
  std::string legal_source;
  std::string legal_date;
  std::string note;
  ReferenceConditions reference;
  std::string path;  // as reports name it: the path given, or "lidbox data: rules/<id>.toml"
  std::vector<Limit> limits;
  std::vector<AlertRule> alerts;
};

// Parses a rule-set file's text; `path` names it in messages.
RuleSet parse_rule_set(std::string_view toml_text, std::string_view path);
// Reads and parses a file; an unreadable file is an InputError naming it.
RuleSet load_rule_set_file(const std::filesystem::path& path);

// The folder of rule sets named by id: `explicit_dir` if given, else the environment variable
// LIDBOX_RULES_DIR, else the shipped ones, data_dir("rules") (data_dir.hpp).
std::filesystem::path rules_directory(const std::optional<std::filesystem::path>& explicit_dir);
// Ids of the rule sets in a folder (file stems of *.toml), sorted.
std::vector<std::string> list_rule_sets(const std::filesystem::path& dir);
// A rule set by id ("us-naaqs") from `dir`, or a file when `name_or_path` ends in ".toml" or holds
// a '/'. A unique beginning of an id is enough ("eu-2008"). An unknown id is an InputError
// listing the ids with a "did you mean" hint.
RuleSet load_rule_set(std::string_view name_or_path, const std::filesystem::path& dir);
// Several, in order ("us-naaqs", "eu-2008", "my-agency.toml"); a name given twice is an
// InputError (its limits would be reported twice).
std::vector<RuleSet> load_rule_sets(const std::vector<std::string>& names_or_paths,
                                    const std::filesystem::path& dir);

// Conversion factor from a series unit to a rule's unit for one pollutant under the rule set's
// reference conditions: value_in_rule_unit = value_in_series_unit * factor. `where` names the
// rule for errors (e.g. a mixing ratio for PM).
double unit_factor(std::string_view series_unit, std::string_view rule_unit,
                   std::string_view pollutant, const ReferenceConditions& ref,
                   std::string_view where);

}  // namespace lidbox
