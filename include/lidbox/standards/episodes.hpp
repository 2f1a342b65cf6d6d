// Alert episodes: runs of consecutive values above an alert rule's threshold that last at least
// the rule's persistence (e.g. three consecutive hours for the EU SO2 and NO2 alert thresholds,
// Directive 2008/50/EC Annex XII), with the lead time from a forecast's issue time.
//
// "Above" is ">" (the directives say "exceeded"; whether equality counts is not stated in what
// was read: common practice, no source). A missing value ends a run.
// An episode spans from the start of its first value's period to the end of its last one:
// hours for hourly_value, whole LST days for daily_mean, and for a k-hour running mean from the
// start of the first window above to the end of the last window above.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lidbox/standards/rule_set.hpp"
#include "lidbox/standards/standards_evaluation.hpp"

namespace lidbox {

struct Episode {
  std::string rule_set_id;
  std::string rule_id;
  std::string level_name;
  std::string pollutant;
  UtcSeconds start_utc = 0;
  UtcSeconds end_utc = 0;   // exclusive
  int values_above = 0;     // consecutive values above (hours or days)
  double duration_h = 0.0;  // (end - start) in hours
  double peak = 0.0;        // highest value in the run, in `unit`
  UtcSeconds peak_start_utc = 0;
  std::string unit;
  double threshold = 0.0;
  std::optional<double> lead_time_h;  // start_utc - issue time, hours (negative: already begun)
  std::string legal_source;
  std::string checked;
};

// Start index and length of each run of values > threshold lasting >= persistence values.
struct Run {
  std::size_t begin = 0;
  std::size_t length = 0;
};
std::vector<Run> runs_above(const std::vector<double>& values, double threshold, int persistence);

// Episodes of every alert rule of `rules` whose pollutant is in `series`.
std::vector<Episode> find_episodes(const NamedSeries& series, const RuleSet& rules,
                                   int lst_offset_s, std::optional<UtcSeconds> issue_time_utc);

}  // namespace lidbox
