// A POSIX TZ rule string ("CET-1CEST,M3.5.0,M10.5.0/3"), read and evaluated by lidbox itself.
//
// Grammar and meaning: IEEE Std 1003.1, Base Definitions, section 8.3 "TZ":
//   std offset [dst [offset] [,start[/time],end[/time]]]
//   offset  [+|-]hh[:mm[:ss]], positive WEST of Greenwich; dst defaults to one hour ahead of std
//   rules   Jn   Julian day 1..365, February 29 never counted
//           n    zero-based day 0..365, February 29 counted in leap years
//           Mm.w.d  day d (0 = Sunday) of week w (1..5, 5 = the last) of month m
//   time    local time of the change, default 02:00:00; the signed form and hours up to 167
//           come from RFC 8536, section 3.3.1 (the TZif footer), which tzdata footers use.
// The start time is read in standard time, the end time in daylight time. A start after the
// end in the year (southern hemisphere) means daylight time spans the new year.
//
// Evaluation needs no calendar library: rules are turned into instants with H. Hinnant's civil
// day count (time.hpp), so it holds for every year lidbox reads (-9999..9999), where
// Boost.Date_Time stops at 1400 and asserts on zero-based day rules.
#pragma once

#include <string>
#include <string_view>

#include "lidbox/base/time.hpp"

namespace lidbox::posix_tz {

struct Rule {
  enum class Kind { julian_no_leap, zero_based, month_week_day } kind = Kind::month_week_day;
  int a = 0;          // J: 1..365; n: 0..365; M: month 1..12
  int week = 0;       // M only: 1..5
  int weekday = 0;    // M only: 0 = Sunday .. 6
  int time_s = 7200;  // local time of the change [s], -167 h .. 167 h
};

struct Zone {
  std::string std_name;  // "MST", "+0530" (a quoted <...> name without its quotes)
  std::string dst_name;  // "" without daylight saving
  int std_east_s = 0;  // standard offset, seconds EAST of UTC (sign already turned)
  bool has_dst = false;
  int dst_east_s = 0;
  Rule start;
  Rule end;
};

// Reads the whole string. Returns an empty text on success, else why it failed (for a message);
// `require_rules` refuses a daylight name without its ",start,end" rules.
std::string parse(std::string_view spec, bool require_rules, Zone& out);

// The civil offset in force at `t` [s east of UTC]. Years beyond -99999..99999 are evaluated at
// that bound (no such instant comes from any lidbox reader).
int civil_offset_s(const Zone& zone, UtcSeconds t);
// Whether daylight saving is in force at `t`.
bool in_daylight_saving(const Zone& zone, UtcSeconds t);

}  // namespace lidbox::posix_tz
