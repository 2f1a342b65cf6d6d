#include <doctest/doctest.h>

#include <cmath>
#include <string>

#include "lidbox/base/error.hpp"
#include "lidbox/standards/observations_csv.hpp"

using namespace lidbox;

namespace {

std::string error_of(const std::string& text) {
  try {
    (void)parse_observations_csv(text, "obs.csv");
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

}  // namespace

TEST_CASE("observations with gaps, offsets and empty cells become hourly series") {
  // Invented rows. 01:00+01:00 is 00:00Z, the same hour as the row before would be; here the
  // rows are 00:00Z, 01:00Z (written as 02:00+01:00) and, after a missing row, 03:00Z.
  const auto obs = parse_observations_csv(
      "# invented data\n"
      "time,PM2.5 [ug/m3],O3 [ppb],CO [ppm]\n"
      "2024-07-01T00:00Z,12.5,31,0.4\n"
      "2024-07-01T02:00:00+01:00,,29,0.5\n"
      "2024-07-01 03:00-00:00,14,,0.6\n",
      "obs.csv");
  CHECK(obs.rows == 3);
  REQUIRE(obs.series.count("PM2.5") == 1);
  const HourlySeries& pm = obs.series.at("PM2.5");
  CHECK(pm.unit == "ug m-3");
  CHECK(pm.first_hour_start_utc == 1719792000);  // 2024-07-01T00:00Z (closed form: days*86400)
  REQUIRE(pm.size() == 4);
  CHECK(pm.values[0] == 12.5);
  CHECK(std::isnan(pm.values[1]));  // empty cell
  CHECK(std::isnan(pm.values[2]));  // missing row
  CHECK(pm.values[3] == 14.0);
  CHECK(obs.series.at("O3").unit == "ppb");
  CHECK(obs.series.at("CO").values[3] == doctest::Approx(0.6));
}

TEST_CASE("a repeated hour is an error naming both lines") {
  CHECK(error_of("time,NO2 [ppb]\n"
                 "2024-07-01T00:00Z,1\n"
                 "2024-07-01T01:00+01:00,2\n") ==
        "obs.csv:3: time 2024-07-01T01:00+01:00 repeats the hour on line 2; expected strictly "
        "increasing hours");
  CHECK(error_of("time,NO2 [ppb]\n"
                 "2024-07-01T05:00Z,1\n"
                 "2024-07-01T04:00Z,2\n") ==
        "obs.csv:3: time 2024-07-01T04:00Z goes back before the hour on line 2; expected "
        "strictly increasing hours");
}

TEST_CASE("bad observation cells, headers and times name file, line and column") {
  CHECK(error_of("time,NO2 [ppb]\n2024-07-01T00:00Z,abc\n") ==
        "obs.csv:2: column \"NO2 [ppb]\": value \"abc\"; expected a number, or an empty cell for "
        "a missing value");
  CHECK(error_of("time,NO2\n") ==
        "obs.csv:1: column 2: header \"NO2\" has no unit; expected \"<pollutant> [<unit>]\", "
        "e.g. \"PM2.5 [ug/m3]\"");
  CHECK(error_of("time,PM2.5 [ppb]\n") ==
        "obs.csv:1: column \"PM2.5 [ppb]\": unit \"ppb\" is a mixing ratio; expected a "
        "molar_mass_g_mol for this pollutant, or a mass unit such as ug/m3");
  CHECK(error_of("time,S02 [ppb]\n") ==
        "obs.csv:1: column \"S02 [ppb]\": unknown pollutant \"S02\"; expected one of PM2.5, "
        "PM10, O3, NO2, SO2, CO, NO, benzene (did you mean \"SO2\"?)");
  CHECK(error_of("time,NO2 [ppb]\n2024-07-01T00:00,1\n") ==
        "obs.csv:2: time: time \"2024-07-01T00:00\" has no UTC offset, and no time zone is given "
        "for times without one; expected an ISO 8601 time such as 2026-01-05T13:00:00Z or "
        "2026-01-05T14:00+01:00");
  CHECK(error_of("time,NO2 [ppb]\n2024-07-01T00:00Z,1\n2024-07-01T01:30Z,1\n") ==
        "obs.csv:3: time 2024-07-01T01:30Z is off the hourly grid of line 2; expected whole "
        "hours after the first row");
  CHECK(error_of("time,NO2 [ppb]\n2024-02-30T00:00Z,1\n") ==
        "obs.csv:2: time: time \"2024-02-30T00:00Z\" is not a calendar date; expected an ISO 8601 "
        "time such as 2026-01-05T13:00:00Z or 2026-01-05T14:00+01:00");
  CHECK(error_of("time,NO2 [ppb]\n2024-07-01T00:00Z,1,2\n") ==
        "obs.csv:2: 3 cells; expected 2 cells as in the header");
  CHECK(error_of("when,NO2 [ppb]\n") ==
        "obs.csv:1: header \"when,NO2 [ppb]\"; expected \"time\" followed by columns like "
        "\"PM2.5 [ug/m3]\"");
  CHECK(error_of("time,NO2 [ppb]\n") == "obs.csv: no data rows; expected at least one hourly row");
}

TEST_CASE("UTC offsets for local standard time") {
  CHECK(parse_utc_offset_s("+01:00", "x") == 3600);
  CHECK(parse_utc_offset_s("-05:00", "x") == -18000);
  CHECK(parse_utc_offset_s("+0530", "x") == 19800);
  CHECK(parse_utc_offset_s("UTC", "x") == 0);
  // A zone with daylight saving gives its standard offset: daily statistics use local standard
  // time (40 CFR 50 App. N, section 1(c)).
  CHECK(parse_utc_offset_s("EST5EDT,M3.2.0,M11.1.0", "x") == -18000);
  // tzdata's zone "CET" is UTC+1 in winter (Directive 2000/84/EC keeps CET as standard time).
  CHECK(parse_utc_offset_s("CET", "x") == 3600);
  CHECK(parse_utc_offset_s("America/Denver", "x") == -7 * 3600);
  CHECK_THROWS_WITH_AS(parse_utc_offset_s("CEST", "--lst-offset"),
                       "--lst-offset: time zone \"CEST\" has no valid offset after its standard-time name; "
                       "expected a fixed offset such as \"+01:00\" or \"UTC\", an IANA zone name "
                       "such as \"Europe/Paris\", or a POSIX TZ string "
                       "such as \"CET-1CEST,M3.5.0,M10.5.0/3\" (POSIX sign: hours WEST of "
                       "Greenwich are positive)",
                       InputError);
}
