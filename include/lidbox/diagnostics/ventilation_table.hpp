// An agency's ventilation categories (shipped as data in src/data/ventilation/, README there).
//
// The ventilation coefficient is the mixing height times the wind speed, V = H u [m2/s]
// (decisions-references 1.2). Agencies publish their classes in their own units: kt ft
// (1 kt ft = 0.514444 m/s x 0.3048 m = 0.156803 m2/s, arithmetic), hundreds of ft x kt (the
// Utah clearing index, 15.6803 m2/s per unit), or m2/s. A table names its unit in UDUNITS-2
// spelling ("knot.ft", "100 knot.ft", "m2/s") and the daily statistic it classes; values are
// converted from m2/s to that unit before they are compared with the bounds.
//
// File format (TOML; every key checked, misspelt keys reported with a hint):
//   id, title, source, checked   strings (checked: SRC / MEM / PRAC, as for rule sets)
//   unit                         unit of the bounds, convertible to m2/s
//   statistic                    "min", "mean" or "afternoon_max" (of the daily ventilation)
//   wind_note                    which wind the agency uses (optional)
//   [[category]] name, below = x (value < x) or at_most = x (value <= x); the last one has no
//                bound. Bounds strictly increase.
#pragma once

#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lidbox/base/units.hpp"

namespace lidbox {

// Which daily ventilation value a table classes (the days of daily_diagnostics.hpp).
enum class VentilationStatistic { min, mean, afternoon_max };
const char* to_string(VentilationStatistic s);

struct VentilationCategory {
  std::string name;
  std::optional<double> bound;  // in the table's unit; none for the last category
  bool inclusive = false;       // at_most (<=) rather than below (<)
};

struct VentilationTable {
  std::string id;
  std::string title;
  std::string source;
  std::string checked;
  std::string unit;
  std::string wind_note;
  std::string path;  // "lidbox data: ventilation/<id>.toml" for a shipped table, else the path
  VentilationStatistic statistic = VentilationStatistic::afternoon_max;
  UnitConversion from_m2_s;  // m2/s -> unit
  std::vector<VentilationCategory> categories;

  // The value in the table's unit.
  [[nodiscard]] double in_table_unit(double ventilation_m2_s) const {
    return from_m2_s(ventilation_m2_s);
  }
  // Index into `categories` of a value in m2/s; -1 for NaN.
  [[nodiscard]] int classify(double ventilation_m2_s) const;
};

// From TOML text; `file` names it in messages.
VentilationTable parse_ventilation_table(std::string_view text, const std::string& file);
// An id of the shipped tables ("nws-blacksburg") or a path to a TOML file (contains '/' or ends
// in ".toml"). InputError naming the id and listing the shipped ones when not found.
VentilationTable load_ventilation_table(std::string_view id_or_path);
// Ids of the shipped tables, sorted.
std::vector<std::string> shipped_ventilation_tables();

}  // namespace lidbox
