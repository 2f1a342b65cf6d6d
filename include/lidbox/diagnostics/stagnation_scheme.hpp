// Named stagnation-day schemes (shipped as data in src/data/stagnation/, README there;
// decisions-references 1.1 lists the published schemes and their inputs).
//
// A day (local standard time) is a stagnation day when every criterion holds: a daily statistic
// of one hourly field compared with a threshold. Runs of consecutive stagnation days are
// streaks; a streak of at least episode_min_days is an episode.
//
// Fields and their SI units:
//   mixing_height     m    the met's lid
//   wind_10m          m/s  the met's wind speed
//   wind_500hPa       m/s  wind speed at 500 hPa
//   precipitation     m    amount that fell in the hour (a day's total is the sum)
//   geostrophic_wind  m/s  sea-level (surface) geostrophic wind speed
//   mixed_layer_wind  m/s  mean wind in the mixed layer
//   transport_wind    m/s  transport wind
// Daily statistics over the day's 24 hours: mean, min, max, sum; morning_max over 06:00-11:59
// and afternoon_max over 12:00-17:59 (common practice, no source). A statistic is missing (NaN)
// when any hour it needs is missing, and then the day is not judged.
//
// File format (TOML): id, title, source, checked (strings), episode_min_days (1..30), and
// [[criterion]] field, statistic, below = "<quantity>" (<) or at_most = "<quantity>" (<=), the
// quantity in any unit UDUNITS-2 converts to the field's SI unit.
#pragma once

#include <array>
#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

namespace lidbox {

enum class DiagnosticField {
  mixing_height,
  wind_10m,
  wind_500hPa,
  precipitation,
  geostrophic_wind,
  mixed_layer_wind,
  transport_wind,
};
inline constexpr std::size_t kDiagnosticFields = 7;
const char* to_string(DiagnosticField f);
const char* si_unit(DiagnosticField f);  // "m", "m/s"
// All field names in the order above.
const std::array<const char*, kDiagnosticFields>& diagnostic_field_names();

enum class DailyStatistic { mean, min, max, sum, morning_max, afternoon_max };
const char* to_string(DailyStatistic s);

struct StagnationCriterion {
  DiagnosticField field = DiagnosticField::wind_10m;
  DailyStatistic statistic = DailyStatistic::mean;
  double threshold_si = 0.0;
  bool inclusive = false;  // at_most (<=) rather than below (<)
  std::string text;        // "mean wind_10m < 3.2 m/s", for reports

  [[nodiscard]] bool holds(double value_si) const {
    return inclusive ? value_si <= threshold_si : value_si < threshold_si;
  }
};

struct StagnationScheme {
  std::string id;
  std::string title;
  std::string source;
  std::string checked;
  std::string path;  // "lidbox data: stagnation/<id>.toml" for a shipped scheme, else the path
  int episode_min_days = 1;
  std::vector<StagnationCriterion> criteria;

  // The fields the criteria use, each once, in the order of DiagnosticField.
  [[nodiscard]] std::vector<DiagnosticField> fields() const;
};

StagnationScheme parse_stagnation_scheme(std::string_view text, const std::string& file);
// An id of the shipped schemes or a path to a TOML file; InputError listing the shipped ids.
StagnationScheme load_stagnation_scheme(std::string_view id_or_path);
std::vector<std::string> shipped_stagnation_schemes();

}  // namespace lidbox
