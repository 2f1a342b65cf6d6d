#include <doctest/doctest.h>

#include <cmath>

#include "lidbox/met/csv_met.hpp"
#include "lidbox/base/error.hpp"

using namespace lidbox;

TEST_CASE("CSV met converts every column from the unit in its header") {
  // 1 ft = 0.3048 m, 1 kt = 1852/3600 m/s (SI Brochure, non-SI units accepted for use).
  const std::string text =
      "time,mixing_height [ft],wind_speed [kt],wind_from [deg],air_temperature [degC]\n"
      "2026-01-05T00:00:00Z,1000,10,90,-5\n"
      "2026-01-05T01:00:00Z,2000,0,270,-6\n";
  const MetSeries m = parse_met_csv(text, {}, "t.csv");
  REQUIRE(m.size() == 2);
  CHECK(m.mixing_height_m[0] == doctest::Approx(304.8));
  // A wind FROM the east (90 deg) blows towards the west: u < 0, v = 0 (WMO convention).
  CHECK(m.wind_u_m_s[0] == doctest::Approx(-10.0 * 1852.0 / 3600.0));
  CHECK(m.wind_v_m_s[0] == doctest::Approx(0.0).epsilon(1e-12));
  CHECK(m.air_temperature_K[0] == doctest::Approx(268.15));
  CHECK(wind_from_deg(m.wind_u_m_s[0], m.wind_v_m_s[0]) == doctest::Approx(90.0));
}

TEST_CASE("missing hours and empty cells are filled linearly and flagged") {
  // Gap rule (physics note section 5): linear interpolation between the neighbouring hours.
  const std::string text =
      "time,mixing_height [m],eastward_wind [m/s],northward_wind [m/s],co_bg [ppb]\n"
      "2026-01-05T00:00Z,100,1,0,100\n"
      "2026-01-05T01:00Z,,,,\n"
      "2026-01-05T03:00Z,400,4,2,160\n";
  const MetSeries m = parse_met_csv(text, {}, "t.csv");
  REQUIRE(m.size() == 4);
  CHECK(m.mixing_height_m[1] == doctest::Approx(200.0));
  CHECK(m.mixing_height_m[2] == doctest::Approx(300.0));
  CHECK(m.wind_u_m_s[2] == doctest::Approx(3.0));
  CHECK(m.wind_v_m_s[1] == doctest::Approx(2.0 / 3.0));
  CHECK(m.extra[0].values[2] == doctest::Approx(140.0));
  CHECK(m.filled == std::vector<std::uint8_t>{0, 1, 1, 0});
  CHECK(m.source_line == std::vector<int>{2, 3, 0, 4});
}

TEST_CASE("times without an offset need the case's zone") {
  const std::string text =
      "time,mixing_height [m],wind_speed [m/s],wind_from [deg]\n"
      "2026-01-05T08:00,100,1,0\n2026-01-05T09:00,100,1,0\n";
  CHECK_THROWS_AS((void)parse_met_csv(text, {}, "t.csv"), InputError);
  const TimeZone z = TimeZone::parse("-05:00", "t");
  CsvMetOptions o;
  o.zone_for_naive_times = &z;
  CHECK(format_utc(parse_met_csv(text, o, "t.csv").first_stamp_utc) == "2026-01-05T13:00:00Z");
}

TEST_CASE("a gap at the start of the series cannot be filled") {
  const std::string text =
      "time,mixing_height [m],wind_speed [m/s],wind_from [deg]\n"
      "2026-01-05T00:00Z,,1,0\n2026-01-05T01:00Z,100,1,0\n";
  try {
    (void)parse_met_csv(text, {}, "t.csv");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "t.csv: missing values at 2026-01-05T00:00:00Z at the start of the series; expected "
          "values at the first and last hour (gaps are filled only between valid hours)");
  }
}

TEST_CASE("times off the hourly grid and wrong field counts are refused") {
  const std::string off =
      "time,mixing_height [m],wind_speed [m/s],wind_from [deg]\n"
      "2026-01-05T00:00Z,100,1,0\n2026-01-05T01:30Z,100,1,0\n";
  CHECK_THROWS_WITH_AS((void)parse_met_csv(off, {}, "t.csv"),
                       "t.csv:3: time 2026-01-05T01:30:00Z is off the hourly grid of "
                       "2026-01-05T00:00:00Z; expected times a whole number of hours apart",
                       InputError);
  const std::string fields =
      "time,mixing_height [m],wind_speed [m/s],wind_from [deg]\n2026-01-05T00:00Z,100,1\n";
  CHECK_THROWS_WITH_AS((void)parse_met_csv(fields, {}, "t.csv"),
                       "t.csv:2: 3 fields; expected 4 fields as in the header", InputError);
}
