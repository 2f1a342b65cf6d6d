// Reader for observed hourly concentrations (an analyst's monitor data) in CSV:
//
//   # lines starting with '#' are comments (e.g. "invented data for the demo")
//   time,PM2.5 [ug/m3],O3 [ppb],CO [ppm]
//   2024-07-01T00:00Z,12.5,31,0.4
//   2024-07-01T01:00:00+01:00,,29,0.5        <- an empty cell is a missing value
//
// * `time` is ISO 8601 with an explicit offset ("Z", "+hh:mm", "+hhmm", "+hh"); a space may
//   stand for "T"; seconds are optional and must be 0. The time is the START of the hour the
//   value averages (common practice for hourly monitor data, no source).
// * Rows are strictly increasing whole hours after the first; missing rows are gaps (NaN).
//   A repeated or decreasing hour, a time off the hour grid, a cell that is not a number, a
//   row with the wrong number of cells, an unknown pollutant or unit: InputError
//   "<file>:<line>: ...; expected ...".
// * Column names are pollutants (see pollutant.hpp, e.g. "PM2.5", "pm25", "O3") with the unit in
//   brackets (concentration_units.hpp); each series keeps the canonical unit ("ug m-3", "ppb").
// * A cell "<L" (L a number >= 0 in the column's unit) is a value below the detection limit L:
//   the series has a missing value there (the averages of the standards do not invent one) and
//   `below_detection` keeps L, so that a caller can substitute and say so (monitor_pairing.hpp).
#pragma once

#include <filesystem>
#include <map>
#include <string>
#include <string_view>

#include "lidbox/standards/standards_evaluation.hpp"

namespace lidbox {

struct Observations {
  NamedSeries series;  // canonical pollutant name -> hourly series
  // Pollutants with "<L" cells -> L at those hours, NaN elsewhere; as long as the series.
  std::map<std::string, std::vector<double>> below_detection;
  std::string path;
  std::size_t rows = 0;
};

Observations parse_observations_csv(std::string_view text, std::string_view path);
Observations read_observations_csv(const std::filesystem::path& path);

// An ISO 8601 instant with an explicit offset, as accepted in the `time` column.
// InputError naming `where` otherwise.
UtcSeconds parse_instant_with_offset(std::string_view text, std::string_view where);

// "+01:00", "-05:00", "+0530", "-05", "UTC", "Z" -> seconds east of UTC (|offset| <= 14 h).
int parse_utc_offset_s(std::string_view text, std::string_view where);

}  // namespace lidbox
