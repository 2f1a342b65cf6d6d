// Private to the standards code: proleptic-Gregorian day arithmetic on plain integers, so that
// daily, monthly, quarterly and annual statistics need nothing from the time layer but a
// local-standard-time offset in seconds.
//
// Algorithms: H. Hinnant, "chrono-Compatible Low-Level Date Algorithms" (days_from_civil,
// civil_from_days), valid for every date representable here.
#pragma once

#include <cstdint>

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

constexpr std::int64_t days_from_ymd(int y, int m, int d) {
  const std::int64_t yy = static_cast<std::int64_t>(y) - (m <= 2 ? 1 : 0);
  const std::int64_t era = floor_div(yy, 400);
  const std::int64_t yoe = yy - era * 400;
  const std::int64_t mp = (m + 9) % 12;
  const std::int64_t doy = (153 * mp + 2) / 5 + d - 1;
  const std::int64_t doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
  return era * 146097 + doe - 719468;
}

constexpr Ymd ymd_from_days(std::int64_t z) {
  z += 719468;
  const std::int64_t era = floor_div(z, 146097);
  const std::int64_t doe = z - era * 146097;
  const std::int64_t yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
  const std::int64_t doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
  const std::int64_t mp = (5 * doy + 2) / 153;
  const std::int64_t d = doy - (153 * mp + 2) / 5 + 1;
  const std::int64_t m = mp < 10 ? mp + 3 : mp - 9;
  const std::int64_t y = yoe + era * 400 + (m <= 2 ? 1 : 0);
  return Ymd{static_cast<int>(y), static_cast<int>(m), static_cast<int>(d)};
}

constexpr int days_in_month(int y, int m) {
  constexpr int kDays[] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
  const bool leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
  return m == 2 && leap ? 29 : kDays[m - 1];
}

static_assert(days_from_ymd(1970, 1, 1) == 0);
static_assert(days_from_ymd(2000, 3, 1) == 11017);
static_assert(ymd_from_days(11017).month == 3);

}  // namespace lidbox::civil_calendar
