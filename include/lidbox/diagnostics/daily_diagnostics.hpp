// Daily ventilation and stagnation from hourly met alone: no emissions needed.
//
// Days are local-standard-time days (the zone's standard offset, never daylight saving, as for
// the daily statistics of the standards), so every day has 24 hours; an hour belongs to the day
// of its start. A day whose hours are not all in the series is partial: it is listed but not
// judged, and it breaks streaks.
//
// Ventilation uses the met as given (decisions-references 1.2: not after the engine's floors,
// which would hide the poorest hours): V = H |u10| [m2/s] each hour; per day its minimum, mean
// and afternoon maximum (12:00-17:59). A table's category classes the statistic it names.
//
// Streaks (StreakCounter): consecutive judged stagnation days. A day that is not stagnant, or
// not judged (missing data), ends a streak. An episode is a streak of at least the scheme's
// episode_min_days, counted once when it reaches that length.
#pragma once

#include "lidbox/base/plausibility.hpp"

#include <array>
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "lidbox/base/time.hpp"
#include "lidbox/diagnostics/stagnation_scheme.hpp"
#include "lidbox/diagnostics/ventilation_table.hpp"
#include "lidbox/met/met_series.hpp"

namespace lidbox {

// One day's hourly values of each field, 24 values from hour 00 of the local standard day
// (NaN where missing); nullptr for a field the input does not have.
struct DayHours {
  std::array<const double*, kDiagnosticFields> field{};
  [[nodiscard]] const double* of(DiagnosticField f) const {
    return field[static_cast<std::size_t>(f)];
  }
};

// The statistic of 24 hourly values; NaN when a needed hour is NaN.
double daily_statistic(const double* hours24, DailyStatistic s);

struct VentilationDay {
  double min_m2_s = 0.0;
  double mean_m2_s = 0.0;
  double afternoon_max_m2_s = 0.0;
  [[nodiscard]] double value(VentilationStatistic s) const;
};
// From the day's hourly mixing height and 10 m wind speed (NaN statistics when an hour is missing).
VentilationDay ventilation_day(const double* mixing_height_m, const double* wind_m_s);

// The verdict of a scheme on one day: 1 stagnant, 0 not, -1 not judged (a needed value missing).
int judge_day(const StagnationScheme& scheme, const DayHours& day);

class StreakCounter {
 public:
  explicit StreakCounter(int episode_min_days) : min_days_(episode_min_days) {}
  // Adds the next day's verdict (judge_day); returns the day's place in its streak (1, 2, ...)
  // or 0 when the day is not stagnant.
  int add(int verdict);
  [[nodiscard]] int current() const { return current_; }
  [[nodiscard]] int longest() const { return longest_; }
  [[nodiscard]] int stagnant_days() const { return stagnant_; }
  [[nodiscard]] int judged_days() const { return judged_; }
  [[nodiscard]] int episodes() const { return episodes_; }

 private:
  int min_days_ = 1;
  int current_ = 0;
  int longest_ = 0;
  int stagnant_ = 0;
  int judged_ = 0;
  int episodes_ = 0;
};

// Hourly inputs of a point: element i covers the hour starting at first_hour_start_utc + i h.
// Fields in SI units (stagnation_scheme.hpp); an empty vector is an absent field.
struct HourlyDiagnosticsInput {
  std::string source;  // for messages
  UtcSeconds first_hour_start_utc = 0;
  int standard_offset_s = 0;
  std::array<std::vector<double>, kDiagnosticFields> field;
  [[nodiscard]] const std::vector<double>& of(DiagnosticField f) const {
    return field[static_cast<std::size_t>(f)];
  }
  [[nodiscard]] std::size_t hours() const { return of(DiagnosticField::mixing_height).size(); }
};

// The inputs from a met series: mixing height and 10 m wind speed from the met as read (before
// any floor); other fields from met.extra columns named like the field (converted from the
// column's unit by UDUNITS-2). An hour-average reading labelled at the period end is moved to
// the hour it averages; an instantaneous value is taken for the hour that starts at its stamp.
// Every field in `needed` must be present: otherwise an InputError naming the field, the
// source and the columns it has. Precipitation and the 500 hPa wind are checked against
// `limits` (plausibility.hpp; a case's [plausibility] table reaches them through its limits).
HourlyDiagnosticsInput diagnostics_input(const MetSeries& met, MetReading reading, HourLabel label,
                                         const TimeZone& zone,
                                         const std::vector<DiagnosticField>& needed,
                                         const PlausibilityLimits& limits = PlausibilityLimits());

struct DiagnosticDay {
  UtcSeconds start_utc = 0;  // 00:00 local standard time
  std::string date;          // "2026-01-12" (local standard time)
  int hours = 0;             // hours of the day in the series
  VentilationDay ventilation;
  int category = -1;            // index into the table's categories; -1 when none
  double category_value = 0;    // the classed statistic in the table's unit
  std::vector<int> verdict;     // per scheme: 1, 0, -1 (not judged)
  std::vector<int> streak_day;  // per scheme: place in the streak, 0 when not stagnant
};

struct StagnationEpisode {
  std::size_t scheme = 0;
  std::size_t first_day = 0;  // index into days
  int days = 0;
};

struct SchemeSummary {
  int judged_days = 0;
  int stagnant_days = 0;
  int longest_streak = 0;
  int episodes = 0;
};

struct DiagnosticsSetup {
  std::optional<VentilationTable> table;
  std::vector<StagnationScheme> schemes;
  // The plausible ranges of the extra fields: the shipped ones, or a case's [plausibility].
  PlausibilityLimits limits;
  // Every field the schemes need, each once (mixing height and 10 m wind always).
  [[nodiscard]] std::vector<DiagnosticField> needed_fields() const;
};

// Loads a table (empty id: none) and schemes by id or path.
DiagnosticsSetup load_diagnostics_setup(const std::string& table,
                                        const std::vector<std::string>& schemes);

struct DiagnosticsResult {
  std::vector<DiagnosticDay> days;
  std::vector<SchemeSummary> summary;       // per scheme
  std::vector<StagnationEpisode> episodes;  // streaks of at least episode_min_days, in order
  std::vector<int> category_days;           // per category of the table
};

// Days, verdicts, streaks and episodes. Time and memory linear in the number of hours.
DiagnosticsResult diagnose(const HourlyDiagnosticsInput& in, const DiagnosticsSetup& setup);
// diagnostics_input with the setup's fields, then diagnose.
DiagnosticsResult diagnose_met(const MetSeries& met, MetReading reading, HourLabel label,
                               const TimeZone& zone, const DiagnosticsSetup& setup);

}  // namespace lidbox
