#include <doctest/doctest.h>

#include "lidbox/base/error.hpp"
#include "lidbox/base/time.hpp"

using namespace lidbox;

TEST_CASE("day counting matches known calendar dates") {
  // 2000-03-01 is day 11017 after 1970-01-01 (closed form: 30 years incl. 7 leap days + Jan/Feb).
  CHECK(days_from_civil(1970, 1, 1) == 0);
  CHECK(days_from_civil(2000, 3, 1) == 11017);
  // 2026-12-01 is a Tuesday (ISO 8601 calendar; Monday = 0, so 1).
  CHECK(civil_from_utc_seconds(days_from_civil(2026, 12, 1) * 86400).day_of_week == 1);
  CHECK(format_utc(utc_seconds_from_civil({2024, 2, 29, 23, 0, 0, 0})) == "2024-02-29T23:00:00Z");
}

TEST_CASE("ISO 8601 times with Z and offsets give the same instant") {
  const UtcSeconds z = parse_iso8601("2026-01-05T13:00:00Z", nullptr, "t");
  CHECK(parse_iso8601("2026-01-05T14:00:00+01:00", nullptr, "t") == z);
  CHECK(parse_iso8601("2026-01-05 08:00-0500", nullptr, "t") == z);
  CHECK(parse_iso8601("2026-01-05T18:30+05:30", nullptr, "t") == z);
  CHECK(format_with_offset(z, -5 * 3600) == "2026-01-05T08:00:00-05:00");
}

TEST_CASE("an ISO time without an offset needs a zone, and bad times are refused whole") {
  try {
    (void)parse_iso8601("2026-01-05T13:00", nullptr, "met.csv:4");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "met.csv:4: time \"2026-01-05T13:00\" has no UTC offset, and no time zone is given for "
          "times without one; expected an ISO 8601 time such as 2026-01-05T13:00:00Z or "
          "2026-01-05T14:00+01:00");
  }
  CHECK_THROWS_AS((void)parse_iso8601("2026-02-30T00:00Z", nullptr, "t"), InputError);
  CHECK_THROWS_AS((void)parse_iso8601("2026-01-05T13:00:00.5Z", nullptr, "t"), InputError);
  CHECK_THROWS_AS((void)parse_iso8601("05/01/2026 13:00", nullptr, "t"), InputError);
  const TimeZone plus2 = TimeZone::parse("+02:00", "t");
  CHECK(parse_iso8601("2026-01-05T15:00", &plus2, "t") ==
        parse_iso8601("2026-01-05T13:00Z", nullptr, "t"));
}

TEST_CASE("a POSIX TZ string follows the POSIX sign and the EU summer-time rule") {
  // EU summer time: last Sunday of March 01:00 UTC to last Sunday of October 01:00 UTC
  // (Directive 2000/84/EC, Art. 2 and 3). In 2026: 29 March and 25 October.
  const TimeZone cet = TimeZone::parse("CET-1CEST,M3.5.0,M10.5.0/3", "t");
  CHECK(cet.standard_offset_s() == 3600);
  CHECK(cet.has_daylight_saving());
  const UtcSeconds switch_on = parse_iso8601("2026-03-29T01:00:00Z", nullptr, "t");
  CHECK(cet.civil_offset_s(switch_on - 1) == 3600);
  CHECK(cet.civil_offset_s(switch_on) == 7200);
  const UtcSeconds switch_off = parse_iso8601("2026-10-25T01:00:00Z", nullptr, "t");
  CHECK(cet.civil_offset_s(switch_off - 1) == 7200);
  CHECK(cet.civil_offset_s(switch_off) == 3600);
  // Local standard time never shifts.
  CHECK(cet.standard(switch_on).hour == 2);
  CHECK(cet.civil(switch_on).hour == 3);
}

TEST_CASE("US Eastern rules: second Sunday of March to first Sunday of November at 02:00 local") {
  // 15 U.S.C. 260a as amended by the Energy Policy Act of 2005: in 2026, 8 March and 1 November.
  const TimeZone est = TimeZone::parse("EST5EDT,M3.2.0,M11.1.0", "t");
  CHECK(est.standard_offset_s() == -5 * 3600);
  CHECK(est.civil_offset_s(parse_iso8601("2026-03-08T06:59:59Z", nullptr, "t")) == -5 * 3600);
  CHECK(est.civil_offset_s(parse_iso8601("2026-03-08T07:00:00Z", nullptr, "t")) == -4 * 3600);
  CHECK(est.civil_offset_s(parse_iso8601("2026-11-01T05:59:59Z", nullptr, "t")) == -4 * 3600);
  CHECK(est.civil_offset_s(parse_iso8601("2026-11-01T06:00:00Z", nullptr, "t")) == -5 * 3600);
}

TEST_CASE("local times skipped or repeated at a clock change are errors naming the place") {
  const TimeZone est = TimeZone::parse("EST5EDT,M3.2.0,M11.1.0", "t");
  try {
    (void)parse_iso8601("2026-03-08T02:30", &est, "met.csv:7");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "met.csv:7: local time 2026-03-08T02:30:00 does not exist in zone "
          "\"EST5EDT,M3.2.0,M11.1.0\" (clocks go forward); expected a local time that exists, or "
          "a time with an explicit UTC offset");
  }
  CHECK_THROWS_AS((void)parse_iso8601("2026-11-01T01:30", &est, "t"), InputError);
  CHECK(parse_iso8601("2026-11-01T00:30", &est, "t") ==
        parse_iso8601("2026-11-01T04:30Z", nullptr, "t"));
}

TEST_CASE("malformed zones are refused instead of silently meaning UTC") {
  CHECK_THROWS_AS((void)TimeZone::parse("Europe/Pariss", "t"), InputError);
  CHECK_THROWS_AS((void)TimeZone::parse("garbage", "t"), InputError);
  CHECK_THROWS_AS((void)TimeZone::parse("CET-1CEST", "t"), InputError);
  CHECK_THROWS_AS((void)TimeZone::parse("+25:00", "t"), InputError);
  CHECK(TimeZone::parse("<+0530>-5:30", "t").standard_offset_s() == 19800);
  CHECK(TimeZone::parse("-0330", "t").standard_offset_s() == -12600);
}

TEST_CASE("IANA zone names follow the system tzdata, also after its explicit table ends in 2037") {
  // EU summer time: last Sunday of March 01:00 UTC to last Sunday of October 01:00 UTC
  // (Directive 2000/84/EC, Art. 2 and 3); CET is UTC+1. In 2026: 29 March and 25 October; in
  // 2050: 27 March (proleptic Gregorian weekday arithmetic, python3 datetime).
  const TimeZone paris = TimeZone::parse("Europe/Paris", "case.toml: time_zone");
  CHECK(paris.from_tz_database());
  CHECK(paris.standard_offset_s() == 3600);
  CHECK(paris.has_daylight_saving());
  const UtcSeconds on = parse_iso8601("2026-03-29T01:00:00Z", nullptr, "t");
  CHECK(paris.civil_offset_s(on - 1) == 3600);
  CHECK(paris.civil_offset_s(on) == 7200);
  CHECK(paris.civil_offset_s(parse_iso8601("2026-10-25T00:59:59Z", nullptr, "t")) == 7200);
  CHECK(paris.civil_offset_s(parse_iso8601("2026-10-25T01:00:00Z", nullptr, "t")) == 3600);
  const UtcSeconds on_2050 = parse_iso8601("2050-03-27T01:00:00Z", nullptr, "t");
  CHECK(paris.civil_offset_s(on_2050 - 1) == 3600);
  CHECK(paris.civil_offset_s(on_2050) == 7200);
  // US Mountain time, UTC-7, with the daylight rule of 15 U.S.C. 260a: 8 March 2026 02:00 MST.
  const TimeZone denver = TimeZone::parse("America/Denver", "t");
  CHECK(denver.standard_offset_s() == -7 * 3600);
  CHECK(denver.civil_offset_s(parse_iso8601("2026-03-08T08:59:59Z", nullptr, "t")) == -7 * 3600);
  CHECK(denver.civil_offset_s(parse_iso8601("2026-03-08T09:00:00Z", nullptr, "t")) == -6 * 3600);
  CHECK(denver.civil_offset_s(parse_iso8601("2060-07-01T00:00:00Z", nullptr, "t")) == -6 * 3600);
  // A local time in an IANA zone, and one skipped by the spring change.
  CHECK(parse_iso8601("2026-07-01T12:00", &denver, "t") ==
        parse_iso8601("2026-07-01T18:00Z", nullptr, "t"));
  CHECK_THROWS_AS((void)parse_iso8601("2026-03-08T02:30", &denver, "t"), InputError);
  // A link name of the database reaches its zone.
  CHECK(TimeZone::parse("US/Mountain", "t").civil_offset_s(on) == -6 * 3600);
  CHECK(tzdata_version() != "unknown");
}

TEST_CASE("a misspelt IANA name is refused with a suggestion") {
  try {
    (void)TimeZone::parse("Europe/Pariss", "case.toml: time_zone");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "case.toml: time_zone: time zone \"Europe/Pariss\" is not in the system's time-zone "
          "database (did you mean \"Europe/Paris\"?); expected a fixed offset such as \"+01:00\" "
          "or \"UTC\", an IANA zone name such as \"Europe/Paris\", or a POSIX TZ string such as "
          "\"CET-1CEST,M3.5.0,M10.5.0/3\" (POSIX sign: hours WEST of Greenwich are positive)");
  }
}

TEST_CASE("daylight-saving zones answer in the year 500") {
  // Proleptic Gregorian calendar: the last Sunday of March 500 is the 28th, of October the 31st
  // (python3 datetime, which counts proleptic Gregorian days). Boost.Date_Time stops at 1400.
  const TimeZone cet = TimeZone::parse("CET-1CEST,M3.5.0,M10.5.0/3", "t");
  const UtcSeconds on = parse_iso8601("0500-03-28T01:00:00Z", nullptr, "t");
  CHECK(cet.civil_offset_s(on - 1) == 3600);
  CHECK(cet.civil_offset_s(on) == 7200);
  CHECK(cet.civil_offset_s(parse_iso8601("0500-10-31T01:00:00Z", nullptr, "t")) == 3600);
  CHECK(parse_iso8601("0500-07-01T14:00", &cet, "met.csv:2") ==
        parse_iso8601("0500-07-01T12:00Z", nullptr, "t"));
  const TimeZone denver = TimeZone::parse("America/Denver", "t");
  // Before the zone's first transition tzdata gives local mean time, -6:59:56 for Denver.
  CHECK(denver.civil_offset_s(on) == -(6 * 3600 + 59 * 60 + 56));
}

TEST_CASE("zero-based POSIX day rules count February 29 in leap years") {
  // IEEE Std 1003.1, section 8.3: "n" is the zero-based Julian day (0 <= n <= 365), leap days
  // counted. Day 59 is 29 February 2024 and 1 March 2025; day 300 is 27 October 2024
  // (python3 datetime: date(2024,1,1) + 59 days).
  const TimeZone z = TimeZone::parse("MST7MDT,59,300", "t");
  CHECK(z.civil_offset_s(parse_iso8601("2024-02-29T08:59:59Z", nullptr, "t")) == -7 * 3600);
  CHECK(z.civil_offset_s(parse_iso8601("2024-02-29T09:00:00Z", nullptr, "t")) == -6 * 3600);
  CHECK(z.civil_offset_s(parse_iso8601("2025-02-28T12:00:00Z", nullptr, "t")) == -7 * 3600);
  CHECK(z.civil_offset_s(parse_iso8601("2025-03-01T09:00:00Z", nullptr, "t")) == -6 * 3600);
  // The end: 02:00 MDT on 27 October 2024 is 08:00 UTC.
  CHECK(z.civil_offset_s(parse_iso8601("2024-10-27T07:59:59Z", nullptr, "t")) == -6 * 3600);
  CHECK(z.civil_offset_s(parse_iso8601("2024-10-27T08:00:00Z", nullptr, "t")) == -7 * 3600);
}

TEST_CASE("a POSIX rule that ends before it starts in the year spans the new year") {
  // MST7MDT,M3.2.0,31: daylight time from the second Sunday of March (8 March 2026) to day 31,
  // 1 February of the next year (IEEE Std 1003.1, section 8.3; the southern-hemisphere form).
  const TimeZone z = TimeZone::parse("MST7MDT,M3.2.0,31", "t");
  CHECK(z.civil_offset_s(parse_iso8601("2026-01-15T00:00:00Z", nullptr, "t")) == -6 * 3600);
  CHECK(z.civil_offset_s(parse_iso8601("2026-02-01T07:59:59Z", nullptr, "t")) == -6 * 3600);
  CHECK(z.civil_offset_s(parse_iso8601("2026-02-01T08:00:00Z", nullptr, "t")) == -7 * 3600);
  CHECK(z.civil_offset_s(parse_iso8601("2026-03-08T08:59:59Z", nullptr, "t")) == -7 * 3600);
  CHECK(z.civil_offset_s(parse_iso8601("2026-03-08T09:00:00Z", nullptr, "t")) == -6 * 3600);
}

namespace {

UtcSeconds utc(const char* iso) { return parse_iso8601(iso, nullptr, "test"); }

}  // namespace

TEST_CASE("local civil time where people read it carries the zone's abbreviation") {
  // Reference: python3 zoneinfo with the same system tzdata (Debian), run on 2026-12-02:
  //   datetime.fromisoformat(T).replace(tzinfo=timezone.utc).astimezone(ZoneInfo(Z))
  //   .strftime("%Y-%m-%d %H:%M"), .tzname()
  struct Case {
    const char* zone;
    const char* utc;
    const char* local;
  };
  const Case cases[] = {
      {"Europe/Paris", "2026-07-14T12:00:00Z", "2026-07-14 14:00 CEST"},
      {"Europe/Paris", "2026-01-12T13:00:00Z", "2026-01-12 14:00 CET"},
      {"America/Denver", "2026-01-12T21:00:00Z", "2026-01-12 14:00 MST"},
      {"America/Denver", "2026-07-14T20:00:00Z", "2026-07-14 14:00 MDT"},
      {"Australia/Adelaide", "2026-01-12T03:30:00Z", "2026-01-12 14:00 ACDT"},  // +10:30
      {"Australia/Adelaide", "2026-07-14T04:30:00Z", "2026-07-14 14:00 ACST"},  // +09:30
      {"Europe/Paris", "2040-07-14T12:00:00Z", "2040-07-14 14:00 CEST"},  // past the 2037 table
      {"America/Sao_Paulo", "2026-01-12T17:00:00Z", "2026-01-12 14:00 -03"},  // numeric in tzdata
      {"Asia/Kolkata", "2026-01-12T08:30:00Z", "2026-01-12 14:00 IST"},
  };
  for (const Case& c : cases) {
    CAPTURE(c.zone);
    CAPTURE(c.utc);
    const TimeZone z = TimeZone::parse(c.zone, "test");
    CHECK(format_local(utc(c.utc), z) == c.local);
    CHECK(z.display_name() == c.zone);
  }
  CHECK(format_local_clock(utc("2026-07-14T12:00:00Z"), TimeZone::parse("Europe/Paris", "t")) ==
        "14:00 CEST");
}

TEST_CASE("POSIX strings and fixed offsets name themselves") {
  // The abbreviations are the POSIX string's own names (IEEE Std 1003.1 section 8.3); the
  // instants follow the US rule of the string (second Sunday of March to first of November).
  const TimeZone mst = TimeZone::parse("MST7MDT,M3.2.0,M11.1.0", "t");
  CHECK(format_local(utc("2026-01-12T21:00:00Z"), mst) == "2026-01-12 14:00 MST");
  CHECK(format_local(utc("2026-07-14T20:00:00Z"), mst) == "2026-07-14 14:00 MDT");
  CHECK(mst.display_name() == "MST/MDT");
  const TimeZone quoted = TimeZone::parse("<+0530>-5:30", "t");
  CHECK(format_local(utc("2026-01-12T08:30:00Z"), quoted) == "2026-01-12 14:00 +0530");
  CHECK(quoted.display_name() == "+0530");
  const TimeZone fixed = TimeZone::parse("-07:00", "t");
  CHECK(format_local(utc("2026-01-12T21:00:00Z"), fixed) == "2026-01-12 14:00 UTC-07:00");
  CHECK(fixed.display_name() == "UTC-07:00");
  CHECK(TimeZone().abbreviation(0) == "UTC");
}
