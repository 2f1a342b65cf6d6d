#include <doctest/doctest.h>

#include <string>

#include "lidbox/base/error.hpp"
#include "lidbox/standards/air_index.hpp"
#include "lidbox/standards/aqhi.hpp"
#include "lidbox/standards/aqi.hpp"

using namespace lidbox;

namespace {

// The European Air Quality Index, five levels, as published on the EEA's index viewer page,
// "About the Index" (discomap.eea.europa.eu/map/AQI/Viewer; the index launched by the EEA and
// the European Commission in November 2017), concentrations in ug/m3, transcribed here
// independently of src/data/indices/eu-eaqi-2017.toml. Checked with the search tool on
// 2026-12-02. The later six-level and WHO-2021-aligned versions could NOT be confirmed from a
// primary source and are not shipped or tested.
struct Bands {
  const char* scale;
  double edges[4];  // Good|Fair, Fair|Moderate, Moderate|Poor, Poor|Very poor
};
const Bands kEaqi2017[] = {
    {"PM2.5 24-h running", {10, 20, 25, 50}},  // 0-10 10-20 20-25 25-50 50-800
    {"PM10 24-h running", {20, 35, 50, 100}},  // 0-20 20-35 35-50 50-100 100-1200
    {"NO2 1-h", {40, 100, 200, 400}},          // 0-40 40-100 100-200 200-400 400-1000
    {"O3 1-h", {80, 120, 180, 240}},           // 0-80 80-120 120-180 180-240 240-600
    {"SO2 1-h", {100, 200, 350, 500}},         // 0-100 100-200 200-350 350-500 500-1250
};
const char* kEaqiNames[] = {"Good", "Fair", "Moderate", "Poor", "Very poor"};  // same page

std::string valid_head(const char* kind) {
  return std::string("[index]\nid = \"t\"\nname = \"t\"\nkind = \"") + kind +
         "\"\nversion = \"v\"\nreference_temperature_K = 293.0\nreference_pressure_Pa = "
         "101300.0\n[[source]]\ndocument = \"d\"\nversion = \"v\"\ndate = \"2026-01-01\"\nchecked "
         "= \"PRAC\"\n";
}
std::string category(const char* name, const char* range, const char* colour) {
  return std::string("[[category]]\nname = \"") + name + "\"\nindex = " + range +
         (colour ? std::string("\ncolour = \"") + colour + "\"" : std::string()) +
         "\ngroups_at_risk = \"g\"\ngeneral_advice = \"a\"\nsensitive_advice = \"s\"\n";
}
std::string two_categories() {
  return category("A", "[1, 1]", "#112233") + category("B", "[2, 2]", "#445566");
}
std::string band_scale(const char* rows) {
  return std::string("[[scale]]\nname = \"NO2 1-h\"\npollutant = \"NO2\"\nstatistic = "
                     "\"hourly\"\nunit = \"ug/m3\"\nrows = ") +
         rows + "\n";
}

}  // namespace

TEST_CASE("the European index gives its published level on each side of every band edge") {
  const AirIndex ix = load_air_index("eu-eaqi-2017");
  CHECK(ix.kind == IndexKind::bands);
  CHECK(ix.version == "EEA European Air Quality Index, five levels, launched November 2017");
  REQUIRE(ix.categories.size() == 5);
  for (std::size_t k = 0; k < 5; ++k) CHECK(ix.categories[k].name == kEaqiNames[k]);
  for (const Bands& b : kEaqi2017) {
    CAPTURE(b.scale);
    const IndexScale* s = ix.scale(b.scale);
    REQUIRE(s);
    CHECK(band_level(*s, 0.0) == 1);
    for (int e = 0; e < 4; ++e) {
      CAPTURE(b.edges[e]);
      // Just below and on the edge: the lower level (a value on a shared end belongs to the
      // lower band: common practice, no source); just above: the next level.
      CHECK(band_level(*s, b.edges[e] - 0.01) == e + 1);
      CHECK(band_level(*s, b.edges[e]) == e + 1);
      CHECK(band_level(*s, b.edges[e] + 0.01) == e + 2);
    }
    // Above the top of the page's table (800, 1200, 1000, 600, 1250): still the poorest level.
    CHECK(band_level(*s, 5000.0) == 5);
  }
}

TEST_CASE("the European index of an hour is the poorest level of its inputs") {
  // NO2 in ppb converted at the EU reference conditions of the file (293 K, 101.3 kPa):
  // 1 ppb = 46.01 / (8.314462618 * 293 / 101300 * 1e3) ug/m3 = 1.91318 ug/m3 (closed form).
  // 100 ppb = 191.3 ug/m3 (Moderate, 100-200); 110 ppb = 210.4 ug/m3 (Poor, 200-400).
  // O3 100 ug/m3 is Fair (80-120). EEA viewer bands as above.
  const AirIndex ix = load_air_index("eu-eaqi-2017");
  NamedSeries s;
  s["NO2"] = HourlySeries{0, {100.0, 110.0}, "ppb"};
  s["O3"] = HourlySeries{0, {100.0, 100.0}, "ug m-3"};
  const auto h = hourly_banded_index(s, ix);
  REQUIRE(h.size() == 2);
  CHECK(h[0].category == "Moderate");
  CHECK(h[0].responsible == "NO2 1-h");
  CHECK(h[0].inputs[0].concentration == doctest::Approx(191.318).epsilon(1e-5));
  CHECK(h[1].category == "Poor");
  CHECK(h[1].level == 4);
}

TEST_CASE("the shipped US AQI files carry the EPA category names and colours") {
  // EPA category names (74 FR 30469 table) and colours green, yellow, orange, red, purple,
  // maroon; the RGB values are the TAD's as remembered (from memory).
  const AirIndex& ix = aqi_table_index(AqiTable::epa_2024);
  REQUIRE(ix.categories.size() == 6);
  CHECK(ix.categories[2].name == "Unhealthy for Sensitive Groups");
  CHECK(ix.categories[0].colour == "#00E400");
  CHECK(ix.categories[5].colour == "#7E0023");
  CHECK(ix.scale("SO2 1-h")->above_top == AboveTop::hold_at_top);
  CHECK(aqi_table_index(AqiTable::epa_2018).version == "EPA-454/B-18-007 (Sept 2018)");
}

TEST_CASE("the AQHI coefficients are read from the data file") {
  // Stieb et al. 2008 coefficients (from memory), as in aqhi.hpp.
  const AirIndex& ix = aqhi_index();
  REQUIRE(ix.terms.size() == 3);
  CHECK(ix.terms[0].coefficient == 0.000871);
  CHECK(ix.numerator / ix.denominator == doctest::Approx(1000.0 / 10.4));
  CHECK(ix.category_of(11)->name == "Very High");
}

TEST_CASE("a bad index file names its file and line") {
  const std::string head = valid_head("bands");
  // A sound file parses.
  CHECK_NOTHROW(parse_air_index(head + two_categories() + band_scale("[[0, 10], [10, 20]]"), "ok.toml"));
  CHECK_THROWS_WITH_AS(
      parse_air_index(head + two_categories() + band_scale("[[0, 10], [8, 20]]"), "x.toml"),
      "x.toml:32: [[scale]] rows row 2: overlapping bands: starts at 8 ug m-3 after row 1 ends at "
      "10; expected the next band to start where the previous one ends (10)",
      InputError);
  CHECK_THROWS_WITH_AS(
      parse_air_index(head + two_categories() + band_scale("[[0, 10], [12, 20]]"), "x.toml"),
      "x.toml:32: [[scale]] rows row 2: a gap between bands: starts at 12 ug m-3 after row 1 ends "
      "at 10; expected the next band to start where the previous one ends (10)",
      InputError);
  CHECK_THROWS_WITH_AS(
      parse_air_index(head + category("A", "[1, 1]", "#112233") + category("B", "[2, 2]", nullptr) +
                          band_scale("[[0, 10], [10, 20]]"),
                      "x.toml"),
      "x.toml:20: [[category]]: no \"colour\"; expected a colour \"#RRGGBB\"", InputError);
  CHECK_THROWS_WITH_AS(
      parse_air_index(head + category("A", "[1, 1]", "#112233") + category("B", "[3, 3]", "#445566") +
                          band_scale("[[0, 10], [10, 20]]"),
                      "x.toml"),
      "x.toml:22: [[category]] index: a gap between categories: category \"B\" starts at 3 after "
      "\"A\" ends at 1; expected categories in rising order, each starting one index point above "
      "the previous one's end",
      InputError);
  CHECK_THROWS_WITH_AS(
      parse_air_index(head + two_categories() + band_scale("[[0, 10], [10, 20]]") + "colour = 1\n",
                      "x.toml"),
      "x.toml:33: [[scale]]: unknown key \"colour\"; expected one of name, pollutant, statistic, "
      "window_hours, min_valid_hours, unit, truncate_decimals, above_top, rows, checked",
      InputError);
}

TEST_CASE("a bad breakpoints file: rows that skip a truncation step") {
  const std::string file = valid_head("breakpoints") + category("A", "[0, 50]", "#112233") +
                           category("B", "[51, 100]", "#445566") +
                           "[[scale]]\nname = \"PM2.5 24-h\"\npollutant = \"PM2.5\"\nstatistic = "
                           "\"daily_mean\"\nunit = \"ug/m3\"\ntruncate_decimals = 1\nabove_top = "
                           "\"extrapolate\"\nrows = [[0.0, 9.0, 0, 50], [9.2, 35.4, 51, 100]]\n";
  // 9.0 then 9.1 is the EPA's pattern (rows one truncation step apart); 9.2 leaves 9.1 out.
  CHECK_THROWS_WITH_AS(parse_air_index(file, "b.toml"),
                       "b.toml:34: [[scale]] rows row 2: a gap between bands: starts at 9.2 ug m-3 "
                       "after row 1 ends at 9; expected the next row to start one truncation step "
                       "(0.1) above 9",
                       InputError);
}
