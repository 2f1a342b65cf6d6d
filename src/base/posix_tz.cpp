#include "base/posix_tz.hpp"

#include <algorithm>
#include <array>
#include <cctype>

namespace lidbox::posix_tz {

namespace {

struct Cursor {
  std::string_view s;
  std::size_t i = 0;
  [[nodiscard]] bool done() const { return i >= s.size(); }
  [[nodiscard]] char peek() const { return done() ? '\0' : s[i]; }
};

bool read_name(Cursor& c) {
  std::size_t n = 0;
  if (c.peek() == '<') {
    ++c.i;
    while (!c.done() && c.peek() != '>') {
      const char ch = c.s[c.i++];
      if (!std::isalnum(static_cast<unsigned char>(ch)) && ch != '+' && ch != '-') return false;
      ++n;
    }
    if (c.peek() != '>') return false;
    ++c.i;
    return n >= 3;
  }
  while (!c.done() && std::isalpha(static_cast<unsigned char>(c.peek()))) {
    ++c.i;
    ++n;
  }
  return n >= 3;
}

bool read_number(Cursor& c, int max_digits, int& value) {
  int digits = 0;
  value = 0;
  while (!c.done() && std::isdigit(static_cast<unsigned char>(c.peek())) && digits < max_digits) {
    value = value * 10 + (c.s[c.i++] - '0');
    ++digits;
  }
  return digits > 0;
}

// [+|-]hh[:mm[:ss]] -> seconds with the sign as written; hours up to max_hours.
bool read_hms(Cursor& c, int max_hours, int& seconds) {
  int sign = 1;
  if (c.peek() == '+' || c.peek() == '-') {
    sign = c.peek() == '-' ? -1 : 1;
    ++c.i;
  }
  int h = 0, m = 0, s = 0;
  if (!read_number(c, 3, h) || h > max_hours) return false;
  if (c.peek() == ':') {
    ++c.i;
    if (!read_number(c, 2, m) || m > 59) return false;
    if (c.peek() == ':') {
      ++c.i;
      if (!read_number(c, 2, s) || s > 59) return false;
    }
  }
  seconds = sign * (h * 3600 + m * 60 + s);
  return true;
}

bool read_rule(Cursor& c, Rule& r) {
  if (c.peek() == 'M') {
    ++c.i;
    r.kind = Rule::Kind::month_week_day;
    if (!read_number(c, 2, r.a) || r.a < 1 || r.a > 12 || c.peek() != '.') return false;
    ++c.i;
    if (!read_number(c, 1, r.week) || r.week < 1 || r.week > 5 || c.peek() != '.') return false;
    ++c.i;
    if (!read_number(c, 1, r.weekday) || r.weekday > 6) return false;
  } else if (c.peek() == 'J') {
    ++c.i;
    r.kind = Rule::Kind::julian_no_leap;
    if (!read_number(c, 3, r.a) || r.a < 1 || r.a > 365) return false;
  } else {
    r.kind = Rule::Kind::zero_based;
    if (!read_number(c, 3, r.a) || r.a > 365) return false;
  }
  r.time_s = 7200;
  if (c.peek() == '/') {
    ++c.i;
    if (!read_hms(c, 167, r.time_s)) return false;
  }
  return true;
}

bool is_leap(int y) {
  return (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
}

// Days since 1970-01-01 of the rule's local date in year y.
std::int64_t rule_day(const Rule& r, int y) {
  const std::int64_t jan1 = days_from_civil(y, 1, 1);
  switch (r.kind) {
    case Rule::Kind::julian_no_leap:
      return jan1 + (r.a - 1) + (is_leap(y) && r.a >= 60 ? 1 : 0);
    case Rule::Kind::zero_based:
      return jan1 + r.a;
    case Rule::Kind::month_week_day:
      break;
  }
  const std::int64_t first = days_from_civil(y, r.a, 1);
  const std::int64_t next =
      r.a == 12 ? days_from_civil(y + 1, 1, 1) : days_from_civil(y, r.a + 1, 1);
  // 1970-01-01 was a Thursday (4 with Sunday = 0).
  const auto weekday_of_first = static_cast<int>(((first % 7) + 7 + 4) % 7);
  std::int64_t day = first + (r.weekday - weekday_of_first + 7) % 7 + 7 * (r.week - 1);
  while (day >= next) day -= 7;  // week 5 means the last such day of the month
  return day;
}

}  // namespace

std::string parse(std::string_view spec, bool require_rules, Zone& out) {
  Cursor c{spec};
  out = Zone{};
  int std_west = 0;
  if (!read_name(c)) return "does not start with a zone name of 3 or more letters";
  if (!read_hms(c, 24, std_west)) return "has no valid offset after its standard-time name";
  out.std_east_s = -std_west;
  if (c.done()) return "";
  if (!read_name(c)) return "has an invalid daylight-saving name";
  int dst_west = std_west - 3600;  // POSIX default: one hour ahead of standard time
  if (c.peek() != ',' && !c.done()) {
    if (!read_hms(c, 24, dst_west)) return "has an invalid daylight-saving offset";
  }
  out.dst_east_s = -dst_west;
  if (c.done() && !require_rules) return "";  // a footer with a name only: never in force
  if (c.peek() != ',') return "names daylight saving but gives no ',start,end' rule";
  ++c.i;
  if (!read_rule(c, out.start)) return "has an invalid start rule";
  if (c.peek() != ',') return "has no end rule";
  ++c.i;
  if (!read_rule(c, out.end)) return "has an invalid end rule";
  if (!c.done()) return "has unexpected text at position " + std::to_string(c.i + 1);
  out.has_dst = true;
  return "";
}

namespace {

bool same_rule(const Rule& a, const Rule& b) {
  return a.kind == b.kind && a.a == b.a && a.week == b.week && a.weekday == b.weekday &&
         a.time_s == b.time_s;
}

bool same_zone(const Zone& a, const Zone& b) {
  return a.std_east_s == b.std_east_s && a.has_dst == b.has_dst && a.dst_east_s == b.dst_east_s &&
         same_rule(a.start, b.start) && same_rule(a.end, b.end);
}

struct Change {
  UtcSeconds at;
  bool to_dst;
};

// The changes of the years around one local-standard year, and the instants that year spans:
// consecutive hours of a run fall in the same year, so their offsets need no new rule days.
struct YearChanges {
  Zone zone;
  UtcSeconds from = 1, to = 0;  // [from, to): the year's instants; empty until filled
  std::array<Change, 6> changes{};
};

const YearChanges& changes_around(const Zone& zone, UtcSeconds t) {
  thread_local YearChanges cache;
  if (t >= cache.from && t < cache.to && same_zone(cache.zone, zone)) return cache;
  const int y =
      civil_from_utc_seconds(std::clamp<UtcSeconds>(t, -3'200'000'000'000LL, 3'100'000'000'000LL) +
                             zone.std_east_s)
          .year;
  cache.zone = zone;
  // Inside the clamp the cached span is the year's; at the clamp's ends, the one instant asked.
  const bool clamped = t < -3'200'000'000'000LL || t > 3'100'000'000'000LL;
  cache.from = clamped ? t : days_from_civil(y, 1, 1) * kSecondsPerDay - zone.std_east_s;
  cache.to = clamped ? t + 1 : days_from_civil(y + 1, 1, 1) * kSecondsPerDay - zone.std_east_s;
  // A change's instant may fall in the next or previous year when its local time is near the
  // new year: the changes of the neighbouring years are kept too.
  std::size_t n = 0;
  for (int k = y - 1; k <= y + 1; ++k) {
    cache.changes[n++] = {
        rule_day(zone.start, k) * kSecondsPerDay + zone.start.time_s - zone.std_east_s, true};
    cache.changes[n++] = {rule_day(zone.end, k) * kSecondsPerDay + zone.end.time_s - zone.dst_east_s,
                          false};
  }
  return cache;
}

}  // namespace

int civil_offset_s(const Zone& zone, UtcSeconds t) {
  if (!zone.has_dst) return zone.std_east_s;
  // The latest change at or before t.
  bool found = false;
  Change latest{0, false};
  for (const Change& ch : changes_around(zone, t).changes) {
    if (ch.at <= t && (!found || ch.at > latest.at || (ch.at == latest.at && !ch.to_dst))) {
      latest = ch;
      found = true;
    }
  }
  if (!found) return zone.std_east_s;
  return latest.to_dst ? zone.dst_east_s : zone.std_east_s;
}

}  // namespace lidbox::posix_tz
