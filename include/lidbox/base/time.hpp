// Time layer: UTC internally, local standard time for daily statistics, local civil time (with
// daylight saving) for emission clocks.
//
// Instants are whole seconds since 1970-01-01T00:00:00Z (UtcSeconds); leap seconds are not
// counted (POSIX time, and CF "standard" calendar values with units_metadata leap_seconds: none).
//
// Time zones are given as a fixed offset ("UTC", "Z", "+01:00", "-0530"), as an IANA zone name
// from the system's time-zone database ("America/Denver", "Europe/Paris"; Debian's tzdata read
// through libdate-tz, H. Hinnant's date library), or as a POSIX TZ string with the POSIX sign
// convention, the one the TZ environment variable uses: "CET-1CEST,M3.5.0,M10.5.0/3" is one hour
// AHEAD of UTC (IEEE Std 1003.1, section 8.3, "TZ"). POSIX strings are read and evaluated by
// lidbox (src/base/posix_tz.hpp) for every year from -9999 to 9999.
// An IANA zone's "standard offset" is that of its current rule (the TZif footer, RFC 8536
// section 3.3): daily statistics in local standard time use today's standard time of the zone.
#pragma once

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>

namespace lidbox {

using UtcSeconds = std::int64_t;
inline constexpr UtcSeconds kSecondsPerHour = 3600;
inline constexpr UtcSeconds kSecondsPerDay = 86400;

// Broken-down wall-clock time.
struct CivilTime {
  int year = 1970;
  int month = 1;        // 1..12
  int day = 1;          // 1..31
  int hour = 0;         // 0..23
  int minute = 0;       // 0..59
  int second = 0;       // 0..59
  int day_of_week = 4;  // 0 = Monday ... 6 = Sunday (ISO 8601 order)
};

// Days since 1970-01-01 of a proleptic Gregorian date, and back (H. Hinnant's civil algorithms).
std::int64_t days_from_civil(int year, int month, int day);
CivilTime civil_from_utc_seconds(UtcSeconds t);         // the UTC wall clock of an instant
UtcSeconds utc_seconds_from_civil(const CivilTime& c);  // treats c as UTC

// "2026-01-05T13:00:00Z"
std::string format_utc(UtcSeconds t);
// "+01:00", "-05:30" for an offset in seconds east of UTC
std::string format_utc_offset(int offset_s);
// "2026-01-05T14:00:00+01:00"
std::string format_with_offset(UtcSeconds t, int offset_s);

class TimeZone {
 public:
  TimeZone();  // UTC
  // "UTC", "Z", "+01:00", "-05", "+0530", a POSIX TZ string, or an IANA name. InputError naming
  // `where`, with a suggestion for a misspelt IANA name.
  static TimeZone parse(std::string_view spec, std::string_view where);

  [[nodiscard]] int standard_offset_s() const { return standard_offset_s_; }
  [[nodiscard]] bool has_daylight_saving() const { return has_dst_; }
  // Civil offset (standard + daylight saving where in force) at an instant [s east of UTC].
  [[nodiscard]] int civil_offset_s(UtcSeconds t) const;
  [[nodiscard]] CivilTime civil(UtcSeconds t) const;     // local civil (wall-clock) time
  [[nodiscard]] CivilTime standard(UtcSeconds t) const;  // local standard time (never DST)
  // A local civil time to UTC. A time that does not exist (skipped at the spring change) or that
  // exists twice (repeated at the autumn change) is an InputError naming `where`.
  [[nodiscard]] UtcSeconds from_civil(const CivilTime& local, std::string_view where) const;
  [[nodiscard]] const std::string& spec() const { return spec_; }
  // True for an IANA name (then tzdata_version() says which database answered).
  [[nodiscard]] bool from_tz_database() const { return kind_ == Kind::iana; }
  // The abbreviation in force at an instant, as the zone's source names it: "CEST", "MST",
  // "ACDT"; tzdata's numeric ones stay numeric ("+0530", "-03"). A fixed offset is "UTC" or
  // "UTC+01:00" / "UTC-05:30". Same answer as python3 zoneinfo's tzname() for IANA zones.
  [[nodiscard]] std::string abbreviation(UtcSeconds t) const;
  // The zone by its name, for titles: the IANA name ("Europe/Paris"); a POSIX string by its
  // abbreviations ("MST/MDT", or "MST" without daylight saving); a fixed offset as "UTC-07:00".
  [[nodiscard]] std::string display_name() const;
  // What the zone is, for the outputs' metadata: "IANA tzdata 2026f", "POSIX TZ string" or
  // "fixed offset".
  [[nodiscard]] std::string kind_label() const;

 private:
  struct Rules;
  std::string spec_ = "UTC";
  int standard_offset_s_ = 0;
  bool has_dst_ = false;
  enum class Kind { fixed, posix, iana } kind_ = Kind::fixed;
  std::shared_ptr<const Rules> rules_;  // null for fixed offsets and POSIX strings without DST
  std::shared_ptr<const std::string> posix_std_name_;  // a POSIX string without DST: its name
};

// Local civil time where people read it: "2026-07-14 14:00 CEST" (date, hh:mm, abbreviation).
std::string format_local(UtcSeconds t, const TimeZone& zone);
// "14:00 CEST"
std::string format_local_clock(UtcSeconds t, const TimeZone& zone);

// The version of the system's tzdata ("2026f"), or "unknown"; for the outputs' metadata.
std::string tzdata_version();

// ISO 8601 date-time, "YYYY-MM-DDThh:mm[:ss[.fff]]" followed by "Z", "+hh:mm", "+hhmm" or "+hh";
// a space may stand for "T". Without an offset the time is local civil time in `zone_for_naive`,
// and without a zone it is an InputError. Fractions of a second are refused (hourly data).
UtcSeconds parse_iso8601(std::string_view text, const TimeZone* zone_for_naive,
                         std::string_view where);

}  // namespace lidbox
