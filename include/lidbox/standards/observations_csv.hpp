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
// * Plausibility (plausibility.hpp): every value is checked against its range; a cell equal to a
//   declared missing-value code is a gap, counted in `missing_code_count`; an undeclared -999 is
//   an error "<file>:<line>: column ...: monitor concentration -999 ug m-3 is outside the
//   plausible range; expected ...".
#pragma once

#include <filesystem>
#include <map>
#include <string>
#include <string_view>

#include "lidbox/base/plausibility.hpp"
#include "lidbox/standards/standards_evaluation.hpp"

namespace lidbox {

// How to read monitor data beyond the format itself.
struct ObservationsOptions {
  // Codes the file writes for "no value" (e.g. -999, 9999), declared by the user: such cells
  // become gaps and are counted. An undeclared code is judged as a value, so -999 is refused.
  std::vector<double> missing_values;
  // Ranges "monitor_concentration" and, for CO, "monitor_co" (plausibility.hpp), in ug/m3; a
  // mole fraction is compared through its unit's factor at US reference conditions. Values
  // below zero but within the lower bound (instrument noise) are kept as measured and counted.
  PlausibilityLimits limits;
};

// Values below zero that were kept (instrument noise), per pollutant.
struct SmallNegatives {
  std::size_t count = 0;
  double lowest = 0.0;  // in the series' unit
};

struct Observations {
  NamedSeries series;  // canonical pollutant name -> hourly series
  // Pollutants with "<L" cells -> L at those hours, NaN elsewhere; as long as the series.
  std::map<std::string, std::vector<double>> below_detection;
  std::string path;
  std::size_t rows = 0;
  std::map<std::string, std::size_t> missing_code_count;  // cells holding a declared code
  std::map<std::string, SmallNegatives> small_negatives;
};

Observations parse_observations_csv(std::string_view text, std::string_view path,
                                    const ObservationsOptions& options = {});
Observations read_observations_csv(const std::filesystem::path& path,
                                   const ObservationsOptions& options = {});

// "-999", "-999,9999" (each text may hold a comma-separated list) -> the codes; InputError at
// `where` for anything that is not a number.
std::vector<double> parse_missing_value_codes(const std::vector<std::string>& texts,
                                              std::string_view where);
// One sentence per thing the reader did not take as a plain value (declared missing-value codes,
// small negatives kept as measured), so that nothing is dropped silently; "<L" cells are the
// caller's to describe, since callers treat them differently.
std::vector<std::string> reading_notes(const Observations& obs);

// An ISO 8601 instant with an explicit offset, as accepted in the `time` column.
// InputError naming `where` otherwise.
UtcSeconds parse_instant_with_offset(std::string_view text, std::string_view where);

// "+01:00", "-05:00", "+0530", "-05", "UTC", "Z" -> seconds east of UTC (|offset| <= 14 h); a
// POSIX TZ string or an IANA name ("America/Denver") gives the zone's standard offset (time.hpp).
int parse_utc_offset_s(std::string_view text, std::string_view where);

}  // namespace lidbox
