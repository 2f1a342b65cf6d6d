#include "lidbox/base/cf_time.hpp"

#include <cctype>
#include <cmath>
#include <cstdio>
#include <vector>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {
namespace {

// The first instant of the Gregorian reform (1582-10-15T00:00:00), from which the "standard"
// calendar and the proleptic Gregorian day count agree (CF 4.4.2).
const UtcSeconds kGregorianStart = days_from_civil(1582, 10, 15) * kSecondsPerDay;

bool is_digit(char c) {
  return c >= '0' && c <= '9';
}

// A small cursor over the reference-date text.
struct Cursor {
  std::string_view s;
  std::size_t pos = 0;
  [[nodiscard]] bool done() const { return pos >= s.size(); }
  [[nodiscard]] char peek() const { return done() ? '\0' : s[pos]; }
  bool take(char c) {
    if (peek() != c) return false;
    ++pos;
    return true;
  }
  // 1..max_digits decimal digits.
  bool number(int max_digits, int& out, int* ndigits = nullptr) {
    int n = 0;
    long v = 0;
    while (!done() && is_digit(peek()) && n < max_digits) {
      v = v * 10 + (s[pos] - '0');
      ++pos;
      ++n;
    }
    if (ndigits) *ndigits = n;
    out = static_cast<int>(v);
    return n > 0;
  }
  void spaces() {
    while (!done() && (peek() == ' ' || peek() == '\t')) ++pos;
  }
};

}  // namespace

CfTimeUnits parse_cf_time_units(std::string_view units, std::string_view calendar,
                                std::string_view where) {
  const std::string w(where);
  CfTimeUnits r;
  r.units_text = std::string(units);
  r.calendar_text = std::string(calendar);
  const std::string expected_units =
      "time units \"<unit> since <date> [time] [offset]\" with a unit of seconds, minutes, hours "
      "or days, e.g. \"hours since 2026-01-05 00:00:00 +00:00\" (CF Conventions 4.4)";

  const std::string cal = lower(trim(calendar));
  if (cal.empty() || cal == "standard" || cal == "gregorian") {
    r.calendar = CfCalendar::standard;
  } else if (cal == "proleptic_gregorian") {
    r.calendar = CfCalendar::proleptic_gregorian;
  } else {
    throw InputError(w, "calendar \"" + std::string(calendar) + "\"",
                     "calendar standard, gregorian or proleptic_gregorian (lidbox works on real "
                     "UTC hours; model calendars such as noleap or 360_day, and julian, utc or "
                     "tai, have no faithful map onto them)");
  }

  const std::string low = lower(units);
  const std::size_t since = low.find(" since ");
  if (since == std::string::npos) {
    throw InputError(w, "units \"" + std::string(units) + "\" (no \"since\")", expected_units);
  }
  const std::string unit_word(trim(std::string_view(low).substr(0, since)));
  static const std::vector<std::pair<std::vector<std::string>, double>> kUnits = {
      {{"seconds", "second", "secs", "sec", "s"}, 1.0},
      {{"minutes", "minute", "mins", "min"}, 60.0},
      {{"hours", "hour", "hrs", "hr", "h"}, 3600.0},
      {{"days", "day", "d"}, 86400.0},
  };
  bool found = false;
  for (const auto& [names, s] : kUnits) {
    for (const auto& n : names) {
      if (unit_word == n) {
        r.seconds_per_unit = s;
        found = true;
      }
    }
  }
  if (!found) {
    throw InputError(w, "time unit \"" + unit_word + "\" in units \"" + std::string(units) + "\"",
                     expected_units);
  }

  // Reference date: [-]Y-M-D, then optional [T| ]h:m[:s[.f]], then an optional offset.
  Cursor c{trim(std::string_view(units).substr(since + 7))};
  const auto bad_date = [&](const std::string& why) {
    return InputError(w,
                      "reference date \"" + std::string(c.s) + "\" in units \"" +
                          std::string(units) + "\" " + why,
                      expected_units);
  };
  const bool negative_year = c.take('-');
  int year = 0, month = 0, day = 0;
  if (!c.number(4, year) || !c.take('-') || !c.number(2, month) || !c.take('-') ||
      !c.number(2, day)) {
    throw bad_date("is not a date of the form YYYY-MM-DD");
  }
  if (negative_year) year = -year;
  int hour = 0, minute = 0, second = 0;
  double fraction = 0.0;
  const std::size_t after_date = c.pos;
  bool has_time = false;
  if (c.take('T') || c.take('t') || c.peek() == ' ') {
    c.spaces();
    int nd = 0;
    const std::size_t time_start = c.pos;
    if (c.number(2, hour, &nd) && c.take(':')) {
      has_time = true;
      if (!c.number(2, minute)) throw bad_date("has an invalid time of day");
      if (c.take(':')) {
        if (!c.number(2, second)) throw bad_date("has invalid seconds");
        if (c.take('.')) {
          double scale = 0.1;
          while (!c.done() && is_digit(c.peek())) {
            fraction += scale * (c.peek() - '0');
            scale /= 10.0;
            ++c.pos;
          }
        }
      }
    } else {
      // No time of day: what follows (if anything) is the offset.
      c.pos = time_start;
      if (c.pos == after_date + 1 && c.s[after_date] != ' ') {
        throw bad_date("has a 'T' without a time of day");
      }
    }
  }
  if (month < 1 || month > 12 || day < 1 || day > 31 || hour > 23 || minute > 59 || second > 60) {
    throw bad_date("has a field out of range");
  }
  if (second == 60) throw bad_date("names a leap second");
  // Day-of-month check through a round trip of the proleptic Gregorian count.
  const std::int64_t days = days_from_civil(year, month, day);
  {
    const CivilTime probe = civil_from_utc_seconds(days * kSecondsPerDay);
    if (probe.day != day || probe.month != month) throw bad_date("is not a calendar date");
  }

  // Offset.
  c.spaces();
  int offset_s = 0;
  if (!c.done()) {
    const std::string rest = lower(c.s.substr(c.pos));
    if (rest == "z" || rest == "utc" || rest == "gmt") {
      c.pos = c.s.size();
    } else if (!has_time) {
      // "2026-01-05 06" could be an hour or an offset; CF gives an offset only after a time.
      throw bad_date("has text after the date that is not a time of day (h:m[:s])");
    } else {
      int sign = 1;
      if (c.take('+')) {
        sign = 1;
      } else if (c.take('-')) {
        sign = -1;
      }
      int a = 0, nd = 0;
      if (!c.number(4, a, &nd)) throw bad_date("has an invalid UTC offset");
      int oh = 0, om = 0;
      if (c.take(':')) {
        if (nd > 2 || !c.number(2, om)) throw bad_date("has an invalid UTC offset");
        oh = a;
      } else if (nd <= 2) {
        oh = a;  // H or HH
      } else {
        oh = a / 100;  // HMM or HHMM
        om = a % 100;
      }
      if (oh > 23 || om > 59) throw bad_date("has a UTC offset out of range");
      offset_s = sign * (oh * 3600 + om * 60);
    }
    c.spaces();
    if (!c.done()) throw bad_date("has unexpected text \"" + std::string(c.s.substr(c.pos)) + "\"");
  }
  r.reference_utc = days * kSecondsPerDay + hour * 3600LL + minute * 60LL + second - offset_s;
  r.reference_fraction_s = fraction;
  if (r.calendar == CfCalendar::standard && r.reference_utc < kGregorianStart) {
    throw InputError(w,
                     "reference date \"" + std::string(c.s) +
                         "\" before 1582-10-15 in calendar \"" +
                         (cal.empty() ? std::string("standard") : cal) + "\"",
                     "a reference date on or after 1582-10-15, or calendar proleptic_gregorian "
                     "(the standard calendar is Julian before the reform; lidbox counts "
                     "proleptic Gregorian days)");
  }
  return r;
}

UtcSeconds decode_cf_time(const CfTimeUnits& u, double value, std::string_view where) {
  const std::string w(where);
  const double offset_s = value * u.seconds_per_unit + u.reference_fraction_s;
  // Years -9999..9999 stay far inside int64 seconds and double's exact integers.
  constexpr double kLimit = 10000.0 * 366.0 * 86400.0;
  if (!std::isfinite(offset_s) || std::fabs(offset_s) > 2.0 * kLimit) {
    throw InputError(w, "time value " + std::to_string(value) + " (" + u.units_text + ")",
                     "a finite time within the years -9999 to 9999");
  }
  const UtcSeconds t = u.reference_utc + static_cast<UtcSeconds>(std::llround(offset_s));
  if (u.calendar == CfCalendar::standard && t < kGregorianStart) {
    throw InputError(w,
                     "time value " + std::to_string(value) + " (" + u.units_text +
                         ") falls before 1582-10-15 in the standard calendar",
                     "times on or after 1582-10-15, or calendar proleptic_gregorian");
  }
  return t;
}

std::string cf_hours_since(UtcSeconds reference) {
  const CivilTime c = civil_from_utc_seconds(reference);
  char buf[64];
  std::snprintf(buf, sizeof buf, "hours since %04d-%02d-%02d %02d:%02d:%02d +00:00", c.year,
                c.month, c.day, c.hour, c.minute, c.second);
  return buf;
}

}  // namespace lidbox
