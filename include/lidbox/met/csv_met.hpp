// Hourly meteorology from CSV.
//
// One header row; a `time` column in ISO 8601 (with "Z" or an offset, or local civil time when a
// zone is given); every other column carries its unit in brackets: `mixing_height [m]`,
// `wind_speed [m/s]`, `wind_from [deg]` (or `eastward_wind [m/s]` and `northward_wind [m/s]`),
// optional `air_temperature [degC]` and `surface_air_pressure [hPa]`. Any unit that UDUNITS-2
// converts to the expected one is accepted (ft, km, kt, km/h, mph, degC, K, hPa ...). Any other
// column is kept as an extra column with its declared unit (background series, for example).
//
// Missing hours (a jump in time) and empty cells are gaps, filled by met.hpp's rule and flagged.
// Duplicate or decreasing times, times off the hourly grid, missing required columns, non-numbers,
// negative mixing heights or speeds and directions outside 0-360 are InputErrors naming file:line.
#pragma once

#include "lidbox/base/plausibility.hpp"

#include <string>

#include "lidbox/met/met_series.hpp"
#include "lidbox/base/time.hpp"

namespace lidbox {

struct CsvMetOptions {
  const TimeZone* zone_for_naive_times = nullptr;  // null: every time must carry an offset
  int max_gap_hours = 3;
  // Each cell is checked against its range as read (plausibility.hpp), so that the message
  // names its line and column; null: the shipped ranges.
  const PlausibilityLimits* limits = nullptr;
};

// `display_name` is used in messages (the path as the user wrote it).
MetSeries read_met_csv(const std::string& path, const CsvMetOptions& options,
                       const std::string& display_name);

// The same from text already in memory (tests, other front ends).
MetSeries parse_met_csv(const std::string& text, const CsvMetOptions& options,
                        const std::string& display_name);

// "wind_speed [m/s]" -> name "wind_speed", unit "m/s". A header without brackets gives an empty
// unit.
void split_header(const std::string& header, std::string& name, std::string& unit);

}  // namespace lidbox
