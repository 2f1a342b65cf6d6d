// A rule's values, day by day, as linear functionals of an hourly series: the common ground of
// ensemble probabilities (ensemble_statistics.hpp) and the exact emission cut (emission_cut.hpp).
//
// Every daily rule statistic the forecast layer handles is the maximum of a day's "elements",
// each a linear functional of the hour means (the same averaging as standards_evaluation.hpp and
// episodes.hpp, from averaging.hpp):
//   limit hourly_value            elements: the hours of the LST day       (every day counts)
//   limit daily_max_1h            elements: the hours of the LST day       (day complete at the
//                                                                           rule's fraction of 24)
//   limit running_mean (k h)      elements: the k-h running means starting in the day
//   limit daily_max_8h_17_windows elements: the 8-h means of the day's 17 windows (US, 40 CFR 50
//   limit daily_max_8h_24_windows           Appendix U) or 24 windows (EU, 2008/50/EC Annex VII)
//   limit daily_mean              one element: the day's mean (complete at the rule's fraction)
//   alert rules                   elements: the rule's values in time order (hours, running
//                                 means or complete daily means), an episode being `persistence`
//                                 consecutive elements above the threshold; a day's elements are
//                                 those whose period overlaps the day
// Annual, quarterly and peak-season statistics are not daily: rule_days refuses them
// (daily_rule() says which are handled).
//
// Because every element is linear in the hourly series with weights that depend only on which
// hours are present, elements(F + a G) = elements(F) + a elements(G) for series F, G with the
// same hours present (physics note section 6).
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "lidbox/base/hourly_series.hpp"
#include "lidbox/standards/rule_set.hpp"

namespace lidbox {

struct RuleDays {
  std::vector<double> element;  // in the rule's unit; NaN where missing
  UtcSeconds first_element_start_utc = 0;
  UtcSeconds element_step_s = 3600;    // element j starts at first + j * step
  UtcSeconds element_period_s = 3600;  // and covers this long
  std::int64_t first_day = 0;          // LST day of day index 0 (the series' first hour)
  std::vector<std::size_t> day_begin;  // elements [begin, end) of each day
  std::vector<std::size_t> day_end;
  std::vector<std::uint8_t> day_complete;  // the day's statistic counts

  [[nodiscard]] std::size_t days() const { return day_begin.size(); }
  // Largest element of day d (NaN when it has none present).
  [[nodiscard]] double day_max(std::size_t d) const;
};

// Whether rule_days handles a limit's statistic (the daily ones listed above).
bool daily_rule(const Limit& limit);

// The rule applied to `series` (hourly, in its unit), `factor` converting the series' unit to
// the rule's (rule_set.hpp unit_factor); days are LST days at `lst_offset_s`.
RuleDays rule_days(const Limit& limit, const HourlySeries& series, double factor, int lst_offset_s);
RuleDays rule_days(const AlertRule& alert, const HourlySeries& series, double factor,
                   int lst_offset_s);

// The start index and length of each episode of an alert's elements (runs_above, episodes.hpp)
// and whether one overlaps day d, per day.
std::vector<std::uint8_t> days_with_episode(const RuleDays& r, const AlertRule& alert);

// The largest value whose rounding under `rounding` is not above `level` (the level itself when
// there is no rounding): the boundary a statistic must stay at or under. Found on the doubles
// themselves from apply_rounding (averaging.hpp), so it honours that function's nudge.
double rounding_boundary(double level, Rounding rounding);

}  // namespace lidbox
