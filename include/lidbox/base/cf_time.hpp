// CF time coordinates: "<unit> since <reference date> [time] [offset]" plus the calendar.
//
// CF Conventions, section 4.4 "Time Coordinate" and 4.4.2 "Calendar":
//   - units "seconds|minutes|hours|days since YYYY-M-D [h:m:s[.f]] [offset]"; UDUNITS fixes
//     minute = 60 s, hour = 3600 s, day = 86400 s. "month" and "year" are refused (CF discourages
//     them; their length is not a calendar month or year).
//   - the time of day defaults to 00:00:00 and the offset to zero (UTC). Offsets: Z, UTC, H, H:M,
//     HH:MM, HHMM, HMM, with an optional sign; "-6:00" is six hours behind UTC.
//   - calendar "standard" (the default; "gregorian" is a deprecated synonym) is the mixed
//     Julian/Gregorian calendar. lidbox counts days proleptic Gregorian, which agrees with it from
//     1582-10-15 on; a "standard" reference date or time value before 1582-10-15 is refused rather
//     than decoded wrongly. "proleptic_gregorian" is accepted for any date. Every other calendar
//     (julian, noleap/365_day, all_leap/366_day, 360_day, utc, tai, none) is refused: lidbox
//     works on real UTC hours, and a model calendar has no faithful map onto them.
//   - values never count leap seconds (units_metadata "leap_seconds: none"), as UtcSeconds.
#pragma once

#include <string>
#include <string_view>

#include "lidbox/base/time.hpp"

namespace lidbox {

enum class CfCalendar { standard, proleptic_gregorian };

struct CfTimeUnits {
  std::string units_text;     // as found in the file
  std::string calendar_text;  // as found ("" when absent)
  CfCalendar calendar = CfCalendar::standard;
  double seconds_per_unit = 3600.0;
  UtcSeconds reference_utc = 0;       // the reference instant, whole seconds ...
  double reference_fraction_s = 0.0;  // ... plus a fraction in [0, 1) from "42.5" seconds
};

// Parses a time coordinate's units and calendar attributes. `where` names the file and variable
// ("met.nc: variable \"time\""). InputError for a malformed text, a unit other than seconds,
// minutes, hours or days, an unsupported calendar, or a "standard" reference date before
// 1582-10-15.
CfTimeUnits parse_cf_time_units(std::string_view units, std::string_view calendar,
                                std::string_view where);

// The instant of one time value, rounded to the nearest whole second. InputError (naming `where`
// and the value) for a non-finite value, a "standard" instant before 1582-10-15, or an instant
// beyond the years -9999..9999.
UtcSeconds decode_cf_time(const CfTimeUnits& units, double value, std::string_view where);

// "hours since 2026-01-05 00:00:00 +00:00", the form the writer uses.
std::string cf_hours_since(UtcSeconds reference);

}  // namespace lidbox
