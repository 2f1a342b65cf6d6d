// An air-quality index as data: one TOML file per index under src/data/indices/ (found through
// base/data_dir, like the rule sets), or any file an agency writes in the same shape. The file
// carries the bands, the category names, colours and health messages, the averaging of each
// input, the reference conditions for gases and the sources (document, version, date) with how
// each part was checked. src/data/indices/README.md describes the keys.
//
// Three kinds of index are known:
//   breakpoints  a sub-index per input by the piecewise-linear equation of 40 CFR 58 App. G
//                  I = (I_hi - I_lo) / (BP_hi - BP_lo) * (C - BP_lo) + I_lo
//                after truncating C to the input's decimals; the highest sub-index of the day
//                counts (the US AQI);
//   bands        each input falls into one band per category; the poorest category of any input
//                is the index of the hour (the European Air Quality Index);
//   formula      a sum of exponential terms of several inputs,
//                  I = numerator / denominator * sum_k (exp(beta_k * C_k) - 1)
//                (Canada's AQHI; its coefficients are data).
//
// Checked when the file is read, each an InputError naming the file and line: unknown keys,
// a category without a colour (a "#RRGGBB" string), categories whose index ranges overlap or
// leave a gap, and bands of one input that overlap or leave a gap. For breakpoints the next
// row starts one truncation step (10^-decimals) above the previous row's top, and one index
// point above its top index; for bands the next band starts where the previous one ends (a
// value on an edge belongs to the lower band).
#pragma once

#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lidbox/base/concentration_units.hpp"
#include "lidbox/base/time.hpp"
#include "lidbox/standards/standards_evaluation.hpp"

namespace lidbox {

enum class IndexKind { breakpoints, bands, formula };
const char* to_string(IndexKind k);

struct IndexSource {
  std::string document;  // title or legal reference
  std::string version;
  std::string date;  // ISO date of the version
  std::string url;
  std::string checked;  // SRC: ... / MEM / PRAC, as in the rule sets
};

struct IndexCategory {
  std::string name;
  int index_lo = 0;  // index values of the category, inclusive
  int index_hi = 0;  // kOpenTop: no upper end
  std::string colour;  // "#RRGGBB"
  std::string colour_source;
  std::string groups_at_risk;      // who should take care
  std::string general_advice;      // recommended conduct for everyone
  std::string sensitive_advice;    // recommended conduct for the groups at risk
};
inline constexpr int kOpenTop = 1 << 30;

// How an input's value is formed from the hourly series.
enum class IndexStatistic {
  hourly,              // each hour's value (bands)
  running_mean,        // trailing mean of window_h hours ending with each hour (bands)
  daily_mean,          // LST day mean, complete at 18 h (breakpoints)
  daily_max_1h,        // LST day maximum hour (breakpoints)
  daily_max_8h,        // maximum of the 24 8-h means starting in the day (breakpoints)
  daily_max_8h_ozone,  // maximum of the 17 8-h means starting 07-23 LST (breakpoints)
};
const char* to_string(IndexStatistic s);

// Above the top row of a breakpoints scale.
enum class AboveTop {
  extrapolate,  // on the top row, marked beyond the index
  undefined,    // no sub-index (another averaging time takes over)
  hold_at_top,  // the top row's top index, marked held (1-h SO2 of the US AQI, see aqi.hpp)
};

struct IndexRow {
  double c_lo = 0.0, c_hi = 0.0;  // concentration in the scale's unit
  int i_lo = 0, i_hi = 0;         // breakpoints: index values; bands: the category's position
};

struct IndexScale {
  std::string name;       // "O3 8-h", the input as reports name it
  std::string pollutant;  // canonical pollutant name ("O3")
  IndexStatistic statistic = IndexStatistic::hourly;
  int window_h = 1;       // running_mean only
  int min_valid_h = 1;    // running_mean only
  std::string unit;       // unit of the rows ("ppm", "ug m-3", ...)
  int truncate_decimals = -99;  // breakpoints only; -99: not truncated
  AboveTop above_top = AboveTop::extrapolate;
  std::vector<IndexRow> rows;
  std::string where;  // "<file>:<line>" of the scale, for reports
};

struct FormulaTerm {
  std::string pollutant;
  std::string unit;
  double coefficient = 0.0;  // beta, per unit
};

struct AirIndex {
  std::string id;
  std::string name;
  std::string path;  // a shipped file by its data label ("lidbox data: indices/...")
  IndexKind kind = IndexKind::breakpoints;
  std::string version;  // "EPA-454/B-24-002 (May 2024)"
  ReferenceConditions reference;
  std::string beyond_name;  // breakpoints: the name above the top category ("Beyond the AQI")
  std::vector<IndexSource> sources;
  std::vector<IndexCategory> categories;  // in rising order of index
  std::vector<IndexScale> scales;         // breakpoints and bands
  // formula only
  double numerator = 1.0, denominator = 1.0;
  int window_h = 3, min_valid_h = 2;
  int minimum = 0;  // the rounded index is at least this
  std::vector<FormulaTerm> terms;

  // The category holding an index value; nullptr above an open-less top or below the first.
  [[nodiscard]] const IndexCategory* category_of(int index) const;
  // The scale named `name`; nullptr when the index has none.
  [[nodiscard]] const IndexScale* scale(std::string_view name) const;
};

AirIndex parse_air_index(std::string_view toml_text, std::string_view path);
AirIndex load_air_index_file(const std::filesystem::path& path);
// The shipped indices, data_dir("indices").
std::filesystem::path indices_directory();
std::vector<std::string> list_air_indices(const std::filesystem::path& dir);
// By id ("eu-eaqi-2017") from indices_directory(), or a file when `id_or_path` ends in ".toml"
// or holds a '/'. An unknown id is an InputError listing the ids, with a "did you mean" hint.
AirIndex load_air_index(std::string_view id_or_path);
// The shipped US AQI ("us-aqi-2024" / "us-aqi-2018"), read once per process.
const AirIndex& shipped_air_index(std::string_view id);

// ---------------------------------------------------------------- banded (hourly) index

struct BandedInput {
  std::string scale;  // the scale's name
  double concentration = 0.0;  // in the scale's unit
  int level = 0;  // 1-based position of the category
};

struct BandedHour {
  UtcSeconds hour_start_utc = 0;
  int level = 0;  // the poorest level of the inputs
  std::string category;
  std::string responsible;  // the scale with that level (the first in file order on ties)
  std::vector<BandedInput> inputs;
};

// The band level (1-based) of a value on a bands scale; 0 for a negative or missing value.
// A value on an edge belongs to the lower band; above the top band, the top band.
int band_level(const IndexScale& scale, double concentration);

// Hours where at least one input has a value. Gases are converted under the index's reference
// conditions.
std::vector<BandedHour> hourly_banded_index(const NamedSeries& series, const AirIndex& index);

}  // namespace lidbox
