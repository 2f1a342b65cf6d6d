// The US Air Quality Index (40 CFR 58 Appendix G; EPA Technical Assistance Document for the
// Reporting of Daily Air Quality): piecewise-linear sub-indices per pollutant, the highest of
// which is the day's AQI, with its responsible pollutant.
//
//   I = (I_hi - I_lo) / (BP_hi - BP_lo) * (C - BP_lo) + I_lo           (Appendix G; TAD eq. 1)
//
// C is truncated first (O3 to 0.001 ppm, PM2.5 to 0.1 ug/m3, PM10 to 1 ug/m3 [TAD]; CO to
// 0.1 ppm, SO2 and NO2 to 1 ppb [from memory]) and I is rounded to the nearest integer.
//
// The breakpoints, category names, colours and health messages are data: src/data/indices/
// us-aqi-2024.toml and us-aqi-2018.toml (air_index.hpp); an agency's own breakpoints file works
// the same way. The rules below stay in code: truncation, rounding, the averaging recipes and the
// hand-over between averaging times (a scale's above_top).
//
// Two breakpoint tables are shipped, selectable, and named in every output that uses them:
//   AqiTable::epa_2024 - EPA-454/B-24-002 (May 2024): PM2.5 rows 0.0-9.0 / 9.1-35.4 / 35.5-55.4 /
//       55.5-125.4 / 125.5-225.4 / 225.5-325.4 (301-500, one row). Other pollutants as in 2018.
//       The PM2.5 rows come from secondary copies (design/references.md 2.2, note c); whether
//       the 2024 document also merged the 301-400 / 401-500 rows of the other pollutants was
//       not verified, so they are kept as two rows.
//   AqiTable::epa_2018 - the table in use 2016-2024 (TAD EPA-454/B-18-007): PM2.5 0.0-12.0 /
//       12.1-35.4 / 35.5-55.4 / 55.5-150.4 / 150.5-250.4 / 250.5-350.4 / 350.5-500.4
//       (WAC 296-307-09860 App. B, citing the TAD of September 2018).
// O3 8-h rows 0.000-0.054 ... 0.106-0.200 ppm; 8-h O3 does not define AQI >= 301 (use 1-h O3,
// 0.125-0.604 ppm, rows from 101). 1-h SO2 does not define AQI >= 200: 24-h SO2 rows 305-1004
// ppb do (74 FR 30469 footnotes; the same footnotes under PMC 9133359 Table 2: "1-hour SO2
// values do not define higher AQI values (>= 200). AQI values of 200 or greater are calculated
// with 24-h SO2 concentrations"). PM10, CO, NO2 rows: design/references.md 2.2, from memory,
// matching secondary copies of the TAD.
//
// A day whose 1-h SO2 maximum is above 304 ppb while its 24-h mean is below 305 ppb: the
// footnote leaves that case open, and no published text seen says what to report. lidbox takes
// the most conservative reading the footnote and the table support: the 1-h sub-index is held
// at 200, the top of the 1-h scale (row 186-304 ppb -> 151-200), since the 1-h value may not
// define anything higher and the 24-h mean defines nothing below 201; the higher of that and
// the 24-h sub-index counts. So a 350 ppb hour makes the day at least "Unhealthy", never
// "Good" (SubIndex::held_at_scale_top marks it).
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lidbox/standards/air_index.hpp"
#include "lidbox/standards/standards_evaluation.hpp"

namespace lidbox {

enum class AqiTable { epa_2024, epa_2018 };
// "EPA-454/B-24-002 (May 2024)" / "EPA-454/B-18-007 (Sept 2018)": the version of the shipped file
const char* aqi_table_name(AqiTable t);
// "2024" / "2018"; InputError naming `where` for anything else.
AqiTable parse_aqi_table(std::string_view text, std::string_view where);
// The shipped index file of a table: us-aqi-2024 / us-aqi-2018.
const AirIndex& aqi_table_index(AqiTable t);

enum class AqiInput { o3_8h, o3_1h, pm25_24h, pm10_24h, co_8h, so2_1h, so2_24h, no2_1h };
const char* to_string(AqiInput p);       // the scale name in the shipped files: "O3 8-h", ...
const char* aqi_input_unit(AqiInput p);  // "ppm", "ug m-3" or "ppb"

struct AqiBreakpoint {
  double bp_lo, bp_hi;
  int i_lo, i_hi;
};
// The rows of one pollutant in a table (empty where the table has none).
std::vector<AqiBreakpoint> aqi_breakpoints(AqiInput p, AqiTable t);

struct SubIndex {
  std::string input;  // the scale's name, "PM2.5 24-h"
  std::string unit;   // the scale's unit, canonical ("ug m-3")
  double concentration = 0.0;  // after truncation, in `unit`
  int aqi = 0;
  bool beyond_the_aqi = false;  // above the top breakpoint: extrapolated on the top row
  // 1-h SO2 above 304 ppb: the sub-index is held at 200, the top of the 1-h scale (see above).
  bool held_at_scale_top = false;
};

// Sub-index of a concentration in the scale's unit. Empty when the scale does not define it:
// negative values, below the first row (1-h O3 below 0.125 ppm, 24-h SO2 below 305 ppb), above
// the top row of a scale whose above_top is "undefined" or "hold_at_top" (8-h O3 above 0.200
// ppm, 1-h SO2 above 304 ppb).
std::optional<SubIndex> index_sub_index(const IndexScale& scale, double concentration);
std::optional<SubIndex> aqi_sub_index(AqiInput p, double concentration, AqiTable t);

// The category name of an AQI value in `index` (its beyond_name above the top category).
std::string aqi_category(int aqi, const AirIndex& index);
// Good, Moderate, Unhealthy for Sensitive Groups, Unhealthy, Very Unhealthy, Hazardous, and
// "Beyond the AQI" above 500 (EPA category names, from us-aqi-2024.toml).
const char* aqi_category(int aqi);

struct DailyAqi {
  std::int64_t day = 0;  // LST
  int aqi = 0;
  std::string responsible;  // the pollutant input with the highest sub-index
  std::string category;
  std::vector<SubIndex> sub_indices;
};

// Daily AQI from named hourly series, each scale of `index` by its statistic: O3 8-h = 17-window
// daily maximum and 1-h = daily maximum (the higher sub-index is used, 74 FR 30469 footnote 1),
// PM2.5 and PM10 daily means, CO daily maximum of the 24 8-h means starting in the day (common
// practice, no source), SO2 and NO2 daily maximum hours (a scale whose above_top is
// "hold_at_top" is held at its top index above its top row, see above); only complete days
// (75 %) are used. Gases are converted under the index's reference conditions (25 degC and
// 101.325 kPa for the US AQI). Days with no sub-index are left out.
std::vector<DailyAqi> daily_aqi(const NamedSeries& series, int lst_offset_s, const AirIndex& index);
std::vector<DailyAqi> daily_aqi(const NamedSeries& series, int lst_offset_s, AqiTable table);

}  // namespace lidbox
