#include <doctest/doctest.h>

#include "lidbox/base/cf_time.hpp"
#include "lidbox/base/error.hpp"

#include <limits>

using namespace lidbox;

namespace {
std::string decode(const char* units, double value, const char* calendar = "standard") {
  return format_utc(decode_cf_time(parse_cf_time_units(units, calendar, "t"), value, "t"));
}
std::string error_of(const char* units, const char* calendar) {
  try {
    (void)parse_cf_time_units(units, calendar, "met.nc: variable \"time\"");
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}
}  // namespace

TEST_CASE("CF time units in seconds minutes hours and days decode to UTC") {
  // Closed form: reference + value * (1, 60, 3600, 86400) s (CF 4.4; UDUNITS unit lengths).
  CHECK(decode("hours since 2026-01-05 00:00:00 +00:00", 13) == "2026-01-05T13:00:00Z");
  CHECK(decode("minutes since 2026-01-05T06:00Z", 90) == "2026-01-05T07:30:00Z");
  CHECK(decode("seconds since 2026-01-05 06:00:00", 7200) == "2026-01-05T08:00:00Z");
  // 2026-01-05 is day 20458 after 1970-01-01 (Python datetime.date difference).
  CHECK(decode("days since 1970-01-01", 20458) == "2026-01-05T00:00:00Z");
  CHECK(decode("days since 1970-01-01", 20458.5) == "2026-01-05T12:00:00Z");
  // A reanalysis-style reference: 1900-01-01 + 1107360 h = 2026-04-30 (Python datetime).
  CHECK(decode("hours since 1900-01-01 00:00:00.0", 1107360) == "2026-04-30T00:00:00Z");
  CHECK(decode("Hours Since 2026-1-5", 1) == "2026-01-05T01:00:00Z");
}

TEST_CASE("CF time offsets shift the reference to UTC in every allowed form") {
  // CF 4.4 example: "seconds since 1992-10-8 15:15:42.5 -6:00" is 6 h behind UTC, so the
  // reference is 21:15:42.5 UTC; 0.5 s later is exactly 21:15:43 UTC.
  CHECK(decode("seconds since 1992-10-8 15:15:42.5 -6:00", 0.5) == "1992-10-08T21:15:43Z");
  // H, HH:MM, HHMM, HMM and Z (CF 4.4 offset forms); +05:30 puts UTC 5.5 h earlier.
  CHECK(decode("hours since 2026-01-05 00:00 +1", 0) == "2026-01-04T23:00:00Z");
  CHECK(decode("hours since 2026-01-05 00:00:00 +05:30", 0) == "2026-01-04T18:30:00Z");
  CHECK(decode("hours since 2026-01-05 00:00:00 +0530", 0) == "2026-01-04T18:30:00Z");
  CHECK(decode("hours since 2026-01-05 00:00:00 -330", 0) == "2026-01-05T03:30:00Z");
  CHECK(decode("hours since 2026-01-05T00:00:00Z", 2) == "2026-01-05T02:00:00Z");
  CHECK(decode("hours since 2026-01-05 00:00:00 UTC", 2) == "2026-01-05T02:00:00Z");
}

TEST_CASE("the writer's time units read back to the same instant") {
  const UtcSeconds t0 = utc_seconds_from_civil({2026, 1, 5, 7, 0, 0, 0});
  CHECK(cf_hours_since(t0) == "hours since 2026-01-05 07:00:00 +00:00");
  CHECK(decode_cf_time(parse_cf_time_units(cf_hours_since(t0), "standard", "t"), 3.0, "t") ==
        t0 + 3 * 3600);
}

TEST_CASE("calendars other than standard gregorian and proleptic_gregorian are refused") {
  // CF 4.4.2 lists noleap, 360_day, julian, ... ; lidbox refuses them by design.
  CHECK(error_of("days since 2026-01-01", "noleap") ==
        "met.nc: variable \"time\": calendar \"noleap\"; expected calendar standard, gregorian or "
        "proleptic_gregorian (lidbox works on real UTC hours; model calendars such as noleap or "
        "360_day, and julian, utc or tai, have no faithful map onto them)");
  CHECK_THROWS_AS(parse_cf_time_units("days since 2026-01-01", "360_day", "t"), InputError);
  CHECK_THROWS_AS(parse_cf_time_units("days since 2026-01-01", "julian", "t"), InputError);
  CHECK_THROWS_AS(parse_cf_time_units("days since 2026-01-01", "utc", "t"), InputError);
  CHECK_NOTHROW(parse_cf_time_units("days since 2026-01-01", "GREGORIAN", "t"));
  CHECK_NOTHROW(parse_cf_time_units("days since 2026-01-01", "", "t"));
}

TEST_CASE("dates before the Gregorian reform are refused in standard and decoded in proleptic") {
  // The standard calendar is Julian before 1582-10-15 (CF 4.4.2); lidbox does not guess.
  CHECK(error_of("days since 1500-01-01", "standard") ==
        "met.nc: variable \"time\": reference date \"1500-01-01\" before 1582-10-15 in calendar "
        "\"standard\"; expected a reference date on or after 1582-10-15, or calendar "
        "proleptic_gregorian (the standard calendar is Julian before the reform; lidbox counts "
        "proleptic Gregorian days)");
  CHECK(decode("days since 1500-01-01", 1, "proleptic_gregorian") == "1500-01-02T00:00:00Z");
  // A reference after the reform with a value that reaches back before it.
  const auto u = parse_cf_time_units("days since 1582-10-15", "standard", "t");
  CHECK_NOTHROW(decode_cf_time(u, 0, "t"));
  CHECK_THROWS_AS(decode_cf_time(u, -1, "t"), InputError);
}

TEST_CASE("malformed time units are refused with the expected form") {
  CHECK(error_of("months since 2026-01-01", "standard") ==
        "met.nc: variable \"time\": time unit \"months\" in units \"months since 2026-01-01\"; "
        "expected time units \"<unit> since <date> [time] [offset]\" with a unit of seconds, "
        "minutes, hours or days, e.g. \"hours since 2026-01-05 00:00:00 +00:00\" (CF Conventions "
        "4.4)");
  CHECK_THROWS_AS(parse_cf_time_units("hours", "", "t"), InputError);
  CHECK_THROWS_AS(parse_cf_time_units("hours since 2026-13-01", "", "t"), InputError);
  CHECK_THROWS_AS(parse_cf_time_units("hours since 2026-02-30", "", "t"), InputError);
  CHECK_THROWS_AS(parse_cf_time_units("hours since 2026-01-05 06", "", "t"), InputError);
  CHECK_THROWS_AS(parse_cf_time_units("hours since 2026-01-05 00:00 +25", "", "t"), InputError);
  CHECK_THROWS_AS(parse_cf_time_units("hours since 2026-01-05 00:00 junk", "", "t"), InputError);
  CHECK_THROWS_AS(decode_cf_time(parse_cf_time_units("hours since 2026-01-05", "", "t"),
                                 std::numeric_limits<double>::infinity(), "t"),
                  InputError);
}
