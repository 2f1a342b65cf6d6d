// Private to the standards code: day arithmetic on plain integers (days since 1970-01-01), so that
// daily, monthly, quarterly and annual statistics need nothing from the time layer but a
// local-standard-time offset in seconds. The algorithms are the time layer's (time.hpp).
#pragma once

#include <cstdint>

#include "lidbox/base/time.hpp"

namespace lidbox::civil_calendar {

struct Ymd {
  int year = 1970;
  int month = 1;  // 1..12
  int day = 1;    // 1..31
};

// floor(a / b) for b > 0, also for negative a (instants before 1970).
constexpr std::int64_t floor_div(std::int64_t a, std::int64_t b) {
  const std::int64_t q = a / b;
  return (a % b != 0 && a < 0) ? q - 1 : q;
}

// The day arithmetic itself lives in the time layer (time.hpp); these are its integer views.
inline std::int64_t days_from_ymd(int y, int m, int d) { return days_from_civil(y, m, d); }

inline Ymd ymd_from_days(std::int64_t z) {
  const CivilTime c = civil_from_utc_seconds(z * kSecondsPerDay);
  return Ymd{c.year, c.month, c.day};
}

constexpr int days_in_month(int y, int m) {
  constexpr int kDays[] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
  const bool leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
  return m == 2 && leap ? 29 : kDays[m - 1];
}

}  // namespace lidbox::civil_calendar
