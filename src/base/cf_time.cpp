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

const char* const kExpectedUnits =
    "time units \"<unit> since <date> [time] [offset]\" with a unit of seconds, minutes, hours "
    "or days, e.g. \"hours since 2026-01-05 00:00:00 +00:00\" (CF Conventions 4.4)";

CfCalendar parse_calendar(std::string_view calendar, const std::string& w) {
  const std::string cal = lower(trim(calendar));
  if (cal.empty() || cal == "standard" || cal == "gregorian") return CfCalendar::standard;
  if (cal == "proleptic_gregorian") return CfCalendar::proleptic_gregorian;
  throw InputError(w, "calendar \"" + std::string(calendar) + "\"",
                   "calendar standard, gregorian or proleptic_gregorian (lidbox works on real "
                   "UTC hours; model calendars such as noleap or 360_day, and julian, utc or "
                   "tai, have no faithful map onto them)");
}

// Seconds per unit of the word before " since " (UDUNITS-2 names and abbreviations).
double seconds_per_unit(std::string_view units, std::size_t since, const std::string& w) {
  const std::string low = lower(units);
  const std::string unit_word(trim(std::string_view(low).substr(0, since)));
  static const std::vector<std::pair<std::vector<std::string>, double>> kUnits = {
      {{"seconds", "second", "secs", "sec", "s"}, 1.0},
      {{"minutes", "minute", "mins", "min"}, 60.0},
      {{"hours", "hour", "hrs", "hr", "h"}, 3600.0},
      {{"days", "day", "d"}, 86400.0},
  };
  for (const auto& [names, s] : kUnits) {
    for (const auto& n : names) {
      if (unit_word == n) return s;
    }
  }
  throw InputError(w, "time unit \"" + unit_word + "\" in units \"" + std::string(units) + "\"",
                   kExpectedUnits);
}

// The reference instant's fields, read from "[-]Y-M-D [T| ]h:m[:s[.f]] [offset]".
struct Reference {
  int year = 0, month = 0, day = 0, hour = 0, minute = 0, second = 0;
  double fraction = 0.0;
  bool has_time = false;
  int offset_s = 0;
};

class ReferenceReader {
 public:
  ReferenceReader(std::string_view text, std::string_view units, std::string w)
      : c_{text}, units_(units), w_(std::move(w)) {}

  InputError bad(const std::string& why) const {
    return InputError(w_,
                      "reference date \"" + std::string(c_.s) + "\" in units \"" +
                          std::string(units_) + "\" " + why,
                      kExpectedUnits);
  }

  Reference read() {
    Reference r;
    const bool negative_year = c_.take('-');
    if (!c_.number(4, r.year) || !c_.take('-') || !c_.number(2, r.month) || !c_.take('-') ||
        !c_.number(2, r.day)) {
      throw bad("is not a date of the form YYYY-MM-DD");
    }
    if (negative_year) r.year = -r.year;
    read_time_of_day(r);
    if (r.month < 1 || r.month > 12 || r.day < 1 || r.day > 31 || r.hour > 23 || r.minute > 59 ||
        r.second > 60) {
      throw bad("has a field out of range");
    }
    if (r.second == 60) throw bad("names a leap second");
    // Day-of-month check through a round trip of the proleptic Gregorian count.
    const CivilTime probe =
        civil_from_utc_seconds(days_from_civil(r.year, r.month, r.day) * kSecondsPerDay);
    if (probe.day != r.day || probe.month != r.month) throw bad("is not a calendar date");
    read_offset(r);
    return r;
  }

  [[nodiscard]] std::string_view text() const { return c_.s; }

 private:
  void read_time_of_day(Reference& r) {
    const std::size_t after_date = c_.pos;
    if (!(c_.take('T') || c_.take('t') || c_.peek() == ' ')) return;
    c_.spaces();
    int nd = 0;
    const std::size_t time_start = c_.pos;
    if (c_.number(2, r.hour, &nd) && c_.take(':')) {
      r.has_time = true;
      if (!c_.number(2, r.minute)) throw bad("has an invalid time of day");
      if (c_.take(':')) {
        if (!c_.number(2, r.second)) throw bad("has invalid seconds");
        if (c_.take('.')) {
          double scale = 0.1;
          while (!c_.done() && is_digit(c_.peek())) {
            r.fraction += scale * (c_.peek() - '0');
            scale /= 10.0;
            ++c_.pos;
          }
        }
      }
    } else {
      // No time of day: what follows (if anything) is the offset.
      r.hour = 0;
      c_.pos = time_start;
      if (c_.pos == after_date + 1 && c_.s[after_date] != ' ') {
        throw bad("has a 'T' without a time of day");
      }
    }
  }

  void read_offset(Reference& r) {
    c_.spaces();
    if (c_.done()) return;
    const std::string rest = lower(c_.s.substr(c_.pos));
    if (rest == "z" || rest == "utc" || rest == "gmt") {
      c_.pos = c_.s.size();
      return;
    }
    if (!r.has_time) {
      // "2026-01-05 06" could be an hour or an offset; CF gives an offset only after a time.
      throw bad("has text after the date that is not a time of day (h:m[:s])");
    }
    const int sign = c_.take('-') ? -1 : (c_.take('+'), 1);
    int a = 0, nd = 0;
    if (!c_.number(4, a, &nd)) throw bad("has an invalid UTC offset");
    int oh = 0, om = 0;
    if (c_.take(':')) {
      if (nd > 2 || !c_.number(2, om)) throw bad("has an invalid UTC offset");
      oh = a;
    } else if (nd <= 2) {
      oh = a;  // H or HH
    } else {
      oh = a / 100;  // HMM or HHMM
      om = a % 100;
    }
    if (oh > 23 || om > 59) throw bad("has a UTC offset out of range");
    r.offset_s = sign * (oh * 3600 + om * 60);
    c_.spaces();
    if (!c_.done()) throw bad("has unexpected text \"" + std::string(c_.s.substr(c_.pos)) + "\"");
  }

  Cursor c_;
  std::string_view units_;
  std::string w_;
};

}  // namespace

CfTimeUnits parse_cf_time_units(std::string_view units, std::string_view calendar,
                                std::string_view where) {
  const std::string w(where);
  CfTimeUnits r;
  r.units_text = std::string(units);
  r.calendar_text = std::string(calendar);
  r.calendar = parse_calendar(calendar, w);
  const std::size_t since = lower(units).find(" since ");
  if (since == std::string::npos) {
    throw InputError(w, "units \"" + std::string(units) + "\" (no \"since\")", kExpectedUnits);
  }
  r.seconds_per_unit = seconds_per_unit(units, since, w);
  ReferenceReader reader(trim(units.substr(since + 7)), units, w);
  const Reference ref = reader.read();
  r.reference_utc = days_from_civil(ref.year, ref.month, ref.day) * kSecondsPerDay +
                    ref.hour * 3600LL + ref.minute * 60LL + ref.second - ref.offset_s;
  r.reference_fraction_s = ref.fraction;
  if (r.calendar == CfCalendar::standard && r.reference_utc < kGregorianStart) {
    const std::string cal = lower(trim(calendar));
    throw InputError(w,
                     "reference date \"" + std::string(reader.text()) +
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
